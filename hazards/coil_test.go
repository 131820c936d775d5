package hazards

import (
	"errors"
	"math"
	"os"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"chargeward/hazards/em"
	"chargeward/schema"
)

// pcLoadDemo loads a demo rig (invented scenario) and assesses it.
func pcLoadDemo(t testing.TB, name string) (*schema.Rig, *Assessment) {
	t.Helper()
	b, err := os.ReadFile("../testdata/rigs/" + name + ".yaml")
	if err != nil {
		t.Fatal(err)
	}
	r, err := schema.LoadRig(name+".yaml", b)
	if err != nil {
		t.Fatal(err)
	}
	a, err := Assess(r, DefaultTargets())
	if err != nil {
		t.Fatal(err)
	}
	return r, a
}

// pcQ returns a quantity's value or fails.
func pcQ(t testing.TB, a *Assessment, name string) Quantity {
	t.Helper()
	q, ok := a.Q(name)
	if !ok {
		t.Fatalf("got no %s, want it", name)
	}
	if q.Basis == "" || q.Unit == "" || q.Formula == "" {
		t.Errorf("%s: got basis %q unit %q formula %q, want all three", name, q.Basis, q.Unit, q.Formula)
	}
	return q
}

// TestAssessCoilPancake checks the demo pancake's coil quantities against identities of the model and
// against Wheeler's flat-spiral formula within the 5 % Wheeler states for c > 0.2a.
func TestAssessCoilPancake(t *testing.T) {
	_, a := pcLoadDemo(t, "disc-thrower")
	cm := a.m.coil
	if cm == nil {
		t.Fatal("got no coil model, want one")
	}
	if len(cm.Filaments) != 28 {
		t.Errorf("got %d filaments, want one per turn (28)", len(cm.Filaments))
	}
	for _, f := range cm.Filaments {
		if f.Z > 0 || f.R < 0.006 || f.R > 0.059 || f.Turns != 1 {
			t.Errorf("got filament %+v, want z ≤ 0 and 6 mm ≤ r ≤ 59 mm", f)
		}
	}
	lf := pcQ(t, a, "coil.inductance_filaments").Value
	lw := pcQ(t, a, "coil.inductance_wheeler").Value
	if l := pcQ(t, a, "coil.inductance").Value; l != lf || cm.L != lf {
		t.Errorf("got coil.inductance %g (model %g), want the filament sum %g (no measured value)", l, cm.L, lf)
	}
	if !scalar.EqualWithinRel(lf, lw, 0.05) {
		t.Errorf("got filament sum %g H, want Wheeler %g H within 5 %% (Wheeler 1928, c > 0.2a)", lf, lw)
	}
	// R20 = ρ20 ℓ / S and m = ρm S ℓ, with S from the rig's AWG 14 (ASTM B258): identities of the model,
	// rounding only.
	d, _ := AWGDiameter(14)
	s := math.Pi * d * d / 4
	ell := pcQ(t, a, "coil.wire_length").Value
	if r := pcQ(t, a, "coil.resistance").Value; !scalar.EqualWithinRel(r, Copper.Resistivity20*ell/s, 1e-12) {
		t.Errorf("got R20 %g Ω, want ρ20ℓ/S = %g Ω", r, Copper.Resistivity20*ell/s)
	}
	if m := pcQ(t, a, "coil.mass").Value; !scalar.EqualWithinRel(m, Copper.Density*s*ell, 1e-12) {
		t.Errorf("got mass %g kg, want %g kg", m, Copper.Density*s*ell)
	}
	// Wire length of 28 turns at the mean radius, 2π·32.5 mm·28, is a lower bound within the pitch term.
	if low := 2 * math.Pi * 0.0325 * 28; ell < low || ell > low*1.001 {
		t.Errorf("got wire length %g m, want just above 2π·a·n = %g m", ell, low)
	}
}

// TestAssessCoilSolenoid checks the multi-layer solenoid of the ring-jumper demo: filament count, layer
// radii and the filament sum against Wheeler's multi-layer formula. Its terms 6a, 9b, 10c are far from
// equal, outside the range of Wheeler's 1 %, so the check uses the 3 % that the same formula keeps for
// short thick coils (Grover 1946, ch. 16 comparison tables; from memory) and the model must say so.
func TestAssessCoilSolenoid(t *testing.T) {
	_, a := pcLoadDemo(t, "ring-jumper")
	cm := a.m.coil
	if cm == nil || len(cm.Filaments) != 60 {
		t.Fatalf("got coil model %v, want 60 filaments", cm)
	}
	radii := map[float64]int{}
	for _, f := range cm.Filaments {
		radii[f.R]++
	}
	if len(radii) != 3 {
		t.Errorf("got %d distinct radii, want 3 layers", len(radii))
	}
	lf := pcQ(t, a, "coil.inductance_filaments").Value
	lw := pcQ(t, a, "coil.inductance_wheeler")
	if !scalar.EqualWithinRel(lf, lw.Value, 0.03) {
		t.Errorf("got filament sum %g H, want Wheeler %g H within 3 %%", lf, lw.Value)
	}
	if lw.Note == "" || lw.Note[:5] == "state" {
		t.Errorf("got Wheeler note %q, want the out-of-range warning", lw.Note)
	}
}

// TestAssessCoilMeasured checks that measured values override and that the disagreement is reported.
func TestAssessCoilMeasured(t *testing.T) {
	r, _ := pcLoadDemo(t, "disc-thrower")
	lm, rm := 50e-6, 0.04
	r.Coil.Inductance, r.Coil.Resistance = &lm, &rm
	a, err := Assess(r, DefaultTargets())
	if err != nil {
		t.Fatal(err)
	}
	lf := pcQ(t, a, "coil.inductance_filaments").Value
	if got := pcQ(t, a, "coil.inductance").Value; got != lm || a.m.coil.L != lm || a.m.loop.CoilL != lm {
		t.Errorf("got L %g, want the measured %g everywhere", got, lm)
	}
	if got := pcQ(t, a, "coil.inductance_disagreement").Value; !scalar.EqualWithinRel(got, lm/lf-1, 1e-12) {
		t.Errorf("got disagreement %g, want %g", got, lm/lf-1)
	}
	if got := pcQ(t, a, "coil.resistance").Value; got != rm || a.m.coil.R20 != rm {
		t.Errorf("got R %g, want the measured %g", got, rm)
	}
	if _, ok := a.Q("coil.resistance_disagreement"); !ok {
		t.Errorf("got no coil.resistance_disagreement, want one")
	}
}

// TestAssessCoilGaps checks that missing coil facts become gaps, never safe defaults.
func TestAssessCoilGaps(t *testing.T) {
	r, _ := pcLoadDemo(t, "disc-thrower")
	r.Coil.WireGauge, r.Coil.InsulationClass, r.Coil.Material = nil, nil, ""
	a, err := Assess(r, DefaultTargets())
	if err != nil {
		t.Fatal(err)
	}
	for _, f := range []string{"coil.wire_gauge", "coil.insulation_class", "coil.material", "coil.measured_inductance"} {
		found := false
		for _, g := range a.Gaps {
			found = found || g.Field == f
		}
		if !found {
			t.Errorf("got no gap %s, want one", f)
		}
	}
	if _, ok := a.Q("pulse.peak_current"); ok {
		t.Errorf("got a pulse without a coil inductance, want none")
	}
}

func TestAssessCoilImpossible(t *testing.T) {
	r, _ := pcLoadDemo(t, "disc-thrower")
	od := 0.01 // outer diameter below the 12 mm inner diameter
	r.Coil.OuterDiameter = &od
	if _, err := Assess(r, DefaultTargets()); !errors.Is(err, ErrCoil) {
		t.Errorf("got %v, want ErrCoil", err)
	}
}

// TestTwoWireInductance checks the two-wire line against its far-apart expansion (μ0/π)[ln(s/r) − (r/s)²]
// per metre of line plus the internal term μ0/4π.
func TestTwoWireInductance(t *testing.T) {
	r, s, ell := 1e-3, 1.0, 2.0 // one metre of line
	got := TwoWireInductance(ell, r, s)
	want := em.Mu0/math.Pi*(math.Log(s/r)-(r/s)*(r/s)) + em.Mu0/(4*math.Pi)
	// acosh(x) = ln 2x − 1/(4x²) − 3/(32x⁴) − … (DLMF 4.38.3 with x = s/2r): the omitted term is ~1e-12.
	if !scalar.EqualWithinRel(got, want, 1e-11) {
		t.Errorf("got %g H, want %g H", got, want)
	}
	if !math.IsNaN(TwoWireInductance(1, 1e-3, 1.5e-3)) {
		t.Errorf("got a value for overlapping wires, want NaN")
	}
}
