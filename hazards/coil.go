package hazards

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"

	"chargeward/hazards/em"
	"chargeward/schema"
)

// Filament is one coaxial circular current filament of the coil.
type Filament struct {
	R float64 // radius, m
	Z float64 // axial position of the filament's centre, m; the coil face nearest the projectile is z = 0,
	//             the coil lies at z ≤ 0, the projectile above at z > 0
	Turns float64 // turns this filament stands for (1 for one turn per filament)
}

// CoilModel is the coil as later stages use it. Owner: pulse and coil (issue 4).
type CoilModel struct {
	Filaments  []Filament // the coil as filaments, all carrying the coil current
	L          float64    // inductance used in the pulse model, H (measured if given, else the filament sum)
	R20        float64    // DC resistance at 20 °C, Ω (measured if given)
	WireRadius float64    // bare conductor radius, m
	Material   string     // "copper" or "aluminium"
	Mass       float64    // conductor mass, kg (for heating)

	Conductor       Material // the conductor's properties (Material names it)
	Section         float64  // conductor cross-section πr², m² (0 when the wire is not known)
	WireLength      float64  // conductor length, m (0 when the geometry is not known)
	LWheeler        float64  // inductance by Wheeler's formula, H (0 when not computable)
	LFilaments      float64  // inductance by the filament sum, H (0 when not computable)
	Ambient         float64  // K, the coil's starting temperature
	InsulationClass float64  // K, the insulation's thermal class limit (0 when not stated)
}

// maxFilaments bounds the filament model (its matrix has n² entries); larger coils use Wheeler's formula.
const maxFilaments = 3000

// maxTurns bounds the turns of a coil this model accepts: far beyond any pulse coil, it keeps a misstated
// turn count from exhausting memory.
const maxTurns = 100000

// ErrCoil is returned (wrapped) for a coil geometry that cannot exist.
var ErrCoil = errors.New("coil geometry is impossible")

// maxWindingFill is the largest winding fill (wire outer diameter / pitch available per turn) accepted. A
// fill a little above 1 comes from rounded dimensions or a wire size stated loosely (the demo disc thrower
// is at about 1.08); at 1.5 the turns need half as much room again as the dimensions give, which no
// rounding explains, and the turns would overlap in the model.
const maxWindingFill = 1.5

// coilGeometry is the coil's winding as filaments, with Wheeler's estimate for the same winding.
type coilGeometry struct {
	fil         []Filament
	wireLength  float64 // m
	wheeler     float64 // H
	wheelerName string  // which of Wheeler's formulas
	inRange     bool    // geometry inside the range Wheeler states for the formula
	accuracy    float64 // Wheeler's stated accuracy inside that range
	fill        float64 // wire outer diameter over the pitch it is given (> 1: the turns do not fit)
	formula     string
	inputs      []Input
}

// windSpiral places n turns of a flat spiral evenly between radii ri and ro (m), wire outer diameter dw (m),
// one filament per turn at z = −dw/2 (the face touching the coil's top surface is z = 0). Wheeler's
// flat-spiral formula uses the mean radius a = (ri + ro)/2 and depth c = ro − ri.
func windSpiral(n int, ri, ro, dw float64) (coilGeometry, error) {
	if !(ro > ri && ri >= 0) {
		return coilGeometry{}, fmt.Errorf("%w: flat spiral outer radius %g m is not above its inner radius %g m", ErrCoil, ro, ri)
	}
	p := (ro - ri) / float64(n)
	g := coilGeometry{fill: dw / p, wheelerName: "Wheeler's flat-spiral formula L[µH] = a²n²/(8a + 11c) (a, c in inches)"}
	for k := 0; k < n; k++ {
		r := ri + (float64(k)+0.5)*p
		g.fil = append(g.fil, Filament{R: r, Z: -dw / 2, Turns: 1})
		g.wireLength += math.Hypot(2*math.Pi*r, p)
	}
	a, c := (ri+ro)/2, ro-ri
	g.wheeler = em.WheelerSpiral(a, c, float64(n))
	g.inRange, g.accuracy = c > 0.2*a, 0.05
	g.formula = "filaments r_k = ri + (k + ½)(ro − ri)/n at z = −d/2; wire length Σ √((2πr_k)² + p²)"
	g.inputs = []Input{{"n", "coil.turns", float64(n), "1"}, {"ri", "coil.inner_diameter/2", ri, "m"}, {"ro", "coil.outer_diameter/2", ro, "m"}, {"a", "mean radius", a, "m"}, {"c", "radial depth", c, "m"}}
	return g, nil
}

// windSolenoid places n turns in `layers` layers on a bore of radius ri (m), winding length b (m), radial
// pitch pr between layers (m), wire outer diameter dw (m). Layer j has its turns at radius ri + (j + ½) pr
// and at z = −dw/2 − k·b/perLayer, the end turn touching the face nearest the projectile (z = 0).
// Wheeler's single-layer formula uses the centre radius and b; the multi-layer one the mean radius, b and
// the depth c = layers·pr.
func windSolenoid(n, layers int, ri, b, pr, dw float64) (coilGeometry, error) {
	if layers < 1 || layers > n {
		return coilGeometry{}, fmt.Errorf("%w: %d layers for %d turns", ErrCoil, layers, n)
	}
	perLayer := (n + layers - 1) / layers
	pz := b / float64(perLayer)
	g := coilGeometry{fill: math.Max(dw/pz, dw/pr)}
	left := n
	for j := 0; j < layers; j++ {
		m := n / layers
		if j < n%layers {
			m++
		}
		r := ri + (float64(j)+0.5)*pr
		for k := 0; k < m && left > 0; k++ {
			g.fil = append(g.fil, Filament{R: r, Z: -dw/2 - float64(k)*pz, Turns: 1})
			g.wireLength += math.Hypot(2*math.Pi*r, pz)
			left--
		}
	}
	if layers == 1 {
		a := ri + pr/2
		g.wheeler = em.WheelerSolenoid(a, b, float64(n))
		g.wheelerName = "Wheeler's solenoid formula L[µH] = a²n²/(9a + 10b) (a, b in inches)"
		g.inRange, g.accuracy = b > 0.8*a, 0.01
		g.inputs = []Input{{"n", "coil.turns", float64(n), "1"}, {"a", "turn radius", a, "m"}, {"b", "coil.length", b, "m"}}
	} else {
		c := float64(layers) * pr
		a := ri + c/2
		g.wheeler = em.WheelerMultilayer(a, b, c, float64(n))
		g.wheelerName = "Wheeler's multi-layer formula L[µH] = 0.8a²n²/(6a + 9b + 10c) (a, b, c in inches)"
		// "the three terms nearly equal": within a factor 2 of each other.
		lo, hi := math.Min(6*a, math.Min(9*b, 10*c)), math.Max(6*a, math.Max(9*b, 10*c))
		g.inRange, g.accuracy = hi < 2*lo, 0.01
		g.inputs = []Input{{"n", "coil.turns", float64(n), "1"}, {"a", "mean radius", a, "m"}, {"b", "coil.length", b, "m"}, {"c", "radial depth", c, "m"}}
	}
	g.formula = "filaments at r = ri + (j + ½)pr (layer j), z = −d/2 − k·b/(turns per layer); wire length Σ √((2πr)² + pz²)"
	return g, nil
}

// filamentInductance returns Σ_ij M_ij for the filaments of wire radius wr: LoopSelf on the diagonal
// (Y = ½, uniform current), Maxwell's mutual inductance off it. It checks that the matrix is positive
// definite (gonum Cholesky), as any physical inductance matrix is.
func filamentInductance(fil []Filament, wr float64) (float64, error) {
	n := len(fil)
	r, z, w := make([]float64, n), make([]float64, n), make([]float64, n)
	for i, f := range fil {
		r[i], z[i], w[i] = f.R, f.Z, f.Turns
	}
	m, err := em.InductanceMatrix(r, z, w, em.RoundWireGMD(wr))
	if err != nil {
		return 0, fmt.Errorf("%w: %v", ErrCoil, err)
	}
	var ch mat.Cholesky
	if !ch.Factorize(mat.NewSymDense(n, m)) {
		return 0, fmt.Errorf("%w: the filament inductance matrix is not positive definite (overlapping turns?)", ErrCoil)
	}
	return em.SeriesInductance(m), nil
}

// assessCoil computes the coil quantities (DESIGN.md §4.5): inductance by Wheeler's formula and by the
// filament sum, wire length, resistance at 20 °C and at the ambient, conductor mass; a measured inductance or
// resistance overrides the computed one and their disagreement is reported.
func assessCoil(a *Assessment) error {
	c := a.Rig.Coil
	if c == nil {
		if coilRequired(a.Rig.Rig.Kind) {
			a.AddGap("coil", "no coil is described: its inductance, resistance and heating, and the pulse through it, cannot be computed")
		}
		return nil
	}
	cm := &CoilModel{Ambient: a.Targets.ReferenceAmbient}
	if c.Ambient != nil {
		cm.Ambient = *c.Ambient
	}
	if c.InsulationClass != nil {
		cm.InsulationClass = *c.InsulationClass
	} else {
		a.AddGap("coil.insulation_class", "the insulation's thermal class is not stated: the number of shots before it is reached cannot be computed")
	}
	matName := c.Material
	if matName == "" {
		matName = "copper"
		a.AddGap("coil.material", "the coil conductor material is not stated: copper is assumed; aluminium would heat about 2.3 times as much per shot")
	}
	cond, ok := MaterialByName(matName)
	if !ok {
		return fmt.Errorf("%w: coil material %q has no resistivity in the table", ErrCoil, c.Material)
	}
	cm.Conductor, cm.Material = cond, cond.Name
	if cond.Name == Aluminium1350.Name {
		cm.Material = "aluminium"
	}

	d, dBasis, err := wireSize(c.WireDiameter, c.WireGauge)
	if err != nil {
		return fmt.Errorf("%w: %v", ErrCoil, err)
	}
	var geo *coilGeometry
	if d == 0 {
		if c.Form != "measured" || c.Resistance == nil {
			a.AddGap("coil.wire_gauge", "the coil wire size (gauge or diameter) is not stated: the coil resistance, the filament model and the heating cannot be computed")
		}
	} else {
		cm.WireRadius = d / 2
		cm.Section = math.Pi * d * d / 4
		ins := 0.0
		if c.Insulation != nil {
			ins = *c.Insulation
		}
		dw := d + 2*ins
		if err := addAll(a, Quantity{Name: "coil.wire_diameter", Value: d, Unit: "m", Formula: "bare conductor diameter", Basis: dBasis}); err != nil {
			return err
		}
		geo, err = coilWinding(a, c, dw)
		if err != nil {
			return err
		}
		if geo != nil && geo.fill > maxWindingFill {
			// Turns placed closer than the wire's own diameter overlap: the filament sum and the launch
			// model would compute a coil that cannot exist.
			return fmt.Errorf("%w: coil.turns do not fit the stated dimensions: the wire needs %.3g times the room per turn that the geometry gives (winding fill above %g)", ErrCoil, geo.fill, maxWindingFill)
		}
	}

	// Inductance.
	var lComp float64
	lBasis := ""
	if geo != nil {
		cm.Filaments = geo.fil
		cm.LWheeler = geo.wheeler
		note := fmt.Sprintf("stated accuracy about %s", pct(geo.accuracy))
		if !geo.inRange {
			note = "the geometry is outside the range for which Wheeler states his accuracy; the filament sum is the better estimate"
		}
		if err := a.Add(Quantity{Name: "coil.inductance_wheeler", Value: geo.wheeler, Unit: "H", Formula: geo.wheelerName, Inputs: geo.inputs,
			Basis: "H. A. Wheeler, \"Simple inductance formulas for radio coils\", Proc. IRE 16(10), 1928", Note: note}); err != nil {
			return err
		}
		if len(geo.fil) <= maxFilaments {
			lf, err := filamentInductance(geo.fil, cm.WireRadius)
			if err != nil {
				return err
			}
			cm.LFilaments = lf
			if err := addAll(a,
				Quantity{Name: "coil.inductance_filaments", Value: lf, Unit: "H",
					Formula: "L = Σ_i μ0 r_i [ln(8r_i/ρw) − 7/4] + Σ_{i≠j} M(r_i, r_j, |z_i − z_j|), one filament per turn; " + geo.formula,
					Inputs:  append(geo.inputs, Input{"ρw", "coil.wire_diameter/2", cm.WireRadius, "m"}),
					Basis:   "Maxwell, Treatise on Electricity and Magnetism (3rd ed., 1891), §701 (coaxial circles) and the round-wire loop self-inductance (Y = ½); elliptic integrals by the AGM (NIST DLMF §19.8)",
					Note:    "low-frequency (uniform current) inductance; at the pulse frequency the current crowds to the surface and the inductance is a little lower"},
				Quantity{Name: "coil.inductance_method_spread", Value: lf/geo.wheeler - 1, Unit: "1", Formula: "L_filaments / L_Wheeler − 1",
					Inputs: []Input{{"L_filaments", "coil.inductance_filaments", lf, "H"}, {"L_Wheeler", "coil.inductance_wheeler", geo.wheeler, "H"}},
					Basis:  "comparison of two independent methods", Note: "Wheeler's formulas describe a current sheet; round wire with gaps between turns differs by a few per cent (Rosa's correction)"},
			); err != nil {
				return err
			}
			lComp, lBasis = lf, "filament sum (coil.inductance_filaments)"
		} else {
			lComp, lBasis = geo.wheeler, fmt.Sprintf("Wheeler's formula (coil.inductance_wheeler): more than %d turns for the filament model", maxFilaments)
		}
	}
	if c.Inductance != nil && !(*c.Inductance > 0 && !math.IsInf(*c.Inductance, 0)) {
		return fmt.Errorf("%w: measured inductance %g H is not positive", ErrCoil, *c.Inductance)
	}
	if c.Resistance != nil && !(*c.Resistance >= 0 && !math.IsInf(*c.Resistance, 0)) {
		return fmt.Errorf("%w: measured resistance %g Ω is negative", ErrCoil, *c.Resistance)
	}
	switch {
	case c.Inductance != nil:
		cm.L = *c.Inductance
		if err := a.Add(Quantity{Name: "coil.inductance", Value: cm.L, Unit: "H", Formula: "measured", Inputs: []Input{{"L", "coil.measured_inductance", cm.L, "H"}},
			Basis: "measured value stated in the rig (overrides the computed one)"}); err != nil {
			return err
		}
		if lComp > 0 {
			if err := a.Add(Quantity{Name: "coil.inductance_disagreement", Value: cm.L/lComp - 1, Unit: "1", Formula: "L_measured / L_computed − 1",
				Inputs: []Input{{"L_measured", "coil.measured_inductance", cm.L, "H"}, {"L_computed", lBasis, lComp, "H"}},
				Basis:  "comparison of measurement and calculation", Note: "a large disagreement means the stated geometry, the wire or the measurement is wrong"}); err != nil {
				return err
			}
		}
	case lComp > 0:
		cm.L = lComp
		if err := a.Add(Quantity{Name: "coil.inductance", Value: cm.L, Unit: "H", Formula: "L = " + lBasis, Inputs: []Input{{"L", lBasis, lComp, "H"}},
			Basis: "computed from the stated geometry; no measured inductance given", Note: "leads and terminals are not included"}); err != nil {
			return err
		}
	default:
		a.AddGap("coil.measured_inductance", "the coil inductance can be neither computed from the rig nor taken from a measurement: the pulse cannot be computed")
	}

	// Resistance and mass.
	var rComp float64
	if geo != nil {
		cm.WireLength = geo.wireLength
		cm.Mass = cond.Density * cm.Section * geo.wireLength
		rComp = cond.Resistivity20 * geo.wireLength / cm.Section
		if err := addAll(a,
			Quantity{Name: "coil.wire_length", Value: geo.wireLength, Unit: "m", Formula: geo.formula, Inputs: geo.inputs,
				Basis: "geometry of the winding", Note: "leads to the terminals are not included"},
			Quantity{Name: "coil.mass", Value: cm.Mass, Unit: "kg", Formula: "m = ρm · πd²/4 · ℓ",
				Inputs: []Input{{"ρm", "density of " + cond.Name, cond.Density, "kg/m³"}, {"d", "coil.wire_diameter", d, "m"}, {"ℓ", "coil.wire_length", geo.wireLength, "m"}},
				Basis:  cond.Basis, Note: "conductor only, without insulation"},
			Quantity{Name: "coil.winding_fill", Value: geo.fill, Unit: "1", Formula: "wire outer diameter / pitch available per turn",
				Inputs: []Input{{"d", "coil.wire_diameter + 2·coil.insulation_thickness", d, "m"}},
				Basis:  "geometry of the winding", Note: "above 1 the stated turns do not fit the stated dimensions: the geometry, the turns or the wire is misstated"},
		); err != nil {
			return err
		}
	}
	switch {
	case c.Resistance != nil:
		cm.R20 = *c.Resistance
		if err := a.Add(Quantity{Name: "coil.resistance", Value: cm.R20, Unit: "Ω", Formula: "measured", Inputs: []Input{{"R", "coil.measured_resistance", cm.R20, "Ω"}},
			Basis: "measured value stated in the rig (overrides the computed one)", Note: "taken as the value at 20 °C"}); err != nil {
			return err
		}
		if rComp > 0 {
			if err := a.Add(Quantity{Name: "coil.resistance_disagreement", Value: cm.R20/rComp - 1, Unit: "1", Formula: "R_measured / R_computed − 1",
				Inputs: []Input{{"R_measured", "coil.measured_resistance", cm.R20, "Ω"}, {"R_computed", "ρ20 ℓ / S", rComp, "Ω"}},
				Basis:  "comparison of measurement and calculation", Note: "leads, joints and the meter's lead resistance raise the measured value"}); err != nil {
				return err
			}
		}
	case rComp > 0:
		cm.R20 = rComp
		if err := a.Add(Quantity{Name: "coil.resistance", Value: rComp, Unit: "Ω", Formula: "R20 = ρ20 ℓ / (πd²/4)",
			Inputs: []Input{{"ρ20", "resistivity of " + cond.Name, cond.Resistivity20, "Ω·m"}, {"ℓ", "coil.wire_length", cm.WireLength, "m"}, {"d", "coil.wire_diameter", d, "m"}},
			Basis:  cond.Basis, Note: "DC resistance; skin and proximity effects raise the resistance at the pulse frequency"}); err != nil {
			return err
		}
	default:
		a.AddGap("coil.measured_resistance", "the coil resistance can be neither computed nor taken from a measurement: it is taken as zero, which overstates the current")
	}
	if cm.R20 > 0 {
		rAmb := cm.R20 * (1 + cond.Alpha20*(cm.Ambient-293.15))
		if err := a.Add(Quantity{Name: "coil.resistance_ambient", Value: rAmb, Unit: "Ω", Formula: "R = R20 [1 + α20 (θ − 20 °C)]",
			Inputs: []Input{{"R20", "coil.resistance", cm.R20, "Ω"}, {"α20", "temperature coefficient of " + cond.Name, cond.Alpha20, "1/K"}, {"θ", "coil.ambient_temperature", cm.Ambient, "K"}},
			Basis:  "IEC 60287-1-1 §2.1.1 (linear temperature law)", Note: "the pulse uses R20 (colder conductor, more current)"}); err != nil {
			return err
		}
	}
	if cm.L > 0 {
		a.m.coil = cm
	}
	return nil
}

// coilRequired reports whether a rig of this kind works through a coil.
func coilRequired(kind string) bool {
	switch kind {
	case "disc-thrower", "ring-jumper", "magnetizer", "coil-accelerator":
		return true
	}
	return false
}

// coilWinding builds the winding from the rig's coil for wire outer diameter dw (m), or returns nil with
// gaps when the geometry is not stated.
func coilWinding(a *Assessment, c *schema.Coil, dw float64) (*coilGeometry, error) {
	form := c.Form
	if form == "measured" && (c.Turns == nil || c.InnerDiameter == nil) {
		return nil, nil // a measured coil without geometry: no filaments
	}
	if form == "measured" {
		form = "flat-spiral"
		if c.Length != nil || (c.Layers != nil && *c.Layers > 1) {
			form = "solenoid"
		}
	}
	missing := false
	if c.Turns == nil || *c.Turns < 1 {
		a.AddGap("coil.turns", "the number of turns is not stated: the coil inductance and resistance cannot be computed")
		missing = true
	}
	if c.InnerDiameter == nil {
		a.AddGap("coil.inner_diameter", "the coil's inner diameter is not stated: its inductance and resistance cannot be computed")
		missing = true
	}
	if form == "" {
		a.AddGap("coil.form", "the coil form (flat spiral or solenoid) is not stated: its inductance cannot be computed")
		missing = true
	}
	if missing {
		return nil, nil
	}
	n, ri := *c.Turns, *c.InnerDiameter/2
	if n > maxTurns {
		return nil, fmt.Errorf("%w: %d turns is more than the %d this model accepts", ErrCoil, n, maxTurns)
	}
	if ri < 0 || math.IsInf(ri, 0) || math.IsNaN(ri) {
		return nil, fmt.Errorf("%w: inner diameter %g m", ErrCoil, 2*ri)
	}
	switch form {
	case "flat-spiral":
		ro := ri + float64(n)*dw
		if c.OuterDiameter != nil {
			ro = *c.OuterDiameter / 2
		}
		g, err := windSpiral(n, ri, ro, dw)
		return &g, err
	case "solenoid":
		layers := 1
		if c.Layers != nil {
			layers = *c.Layers
		}
		if layers < 1 {
			return nil, fmt.Errorf("%w: %d layers", ErrCoil, layers)
		}
		perLayer := (n + layers - 1) / layers
		b := float64(perLayer) * dw
		if c.Length != nil {
			b = *c.Length
		}
		pr := dw
		if c.OuterDiameter != nil && layers > 0 {
			pr = (*c.OuterDiameter/2 - ri) / float64(layers)
		}
		if !(b > 0 && pr > 0) {
			return nil, fmt.Errorf("%w: solenoid length %g m, radial pitch %g m", ErrCoil, b, pr)
		}
		g, err := windSolenoid(n, layers, ri, b, pr, dw)
		return &g, err
	}
	return nil, fmt.Errorf("%w: unknown coil form %q", ErrCoil, c.Form)
}
