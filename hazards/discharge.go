package hazards

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"

	"chargeward/schema"
)

// Basis strings for the discharge quantities.
const (
	basisDecay = "first-order RC decay v(t) = V0·e^(−t/τ), τ = C/G, so t = τ·ln(V0/Vs) (Alexander & Sadiku, " +
		"Fundamentals of Electric Circuits, 5th ed., §7.2; section from memory)"
	basisParallelPaths = "parallel conductances add, G = Σ 1/Ri (Ohm's and Kirchhoff's laws)"
)

// DecayVoltage returns v0·e^(−t/τ) (V): the voltage of a capacitor discharging through a resistance, time
// constant tau (s), after t (s). Valid for tau > 0, t ≥ 0. Source: first-order RC natural response (Alexander &
// Sadiku, Fundamentals of Electric Circuits, 5th ed., §7.2; section from memory).
func DecayVoltage(v0, tau, t float64) float64 { return v0 * math.Exp(-t/tau) }

// DecayTime returns the time (s) for an RC decay of time constant tau (s) to fall from v0 to vs (V):
// τ·ln(v0/vs), or 0 when v0 ≤ vs. Valid for tau > 0, vs > 0. Same source as DecayVoltage.
func DecayTime(v0, vs, tau float64) float64 {
	if v0 <= vs {
		return 0
	}
	return tau * math.Log(v0/vs)
}

// Dielectric absorption: the fraction of the charge voltage that reappears on open circuit after a brief short,
// by dielectric. Sources as in CHECKS.md: film and ceramic figures from makers' technical notes (MIL-C-19978
// method; partial); aluminium electrolytic and tantalum from memory; paper-oil is not in CHECKS.md and is from
// memory. lo is used as the nominal, hi as the worst case.
var absorption = map[string]struct {
	lo, hi float64
	basis  string
}{
	"film-polypropylene":     {0.0005, 0.001, "film capacitor makers' technical notes, MIL-C-19978 method (partial)"},
	"film-polyester":         {0.002, 0.0025, "film capacitor makers' technical notes, MIL-C-19978 method (partial)"},
	"ceramic-c0g":            {0.003, 0.006, "ceramic capacitor makers' technical notes (partial)"},
	"ceramic-x7r":            {0.01, 0.025, "ceramic capacitor makers' technical notes (partial)"},
	"aluminium-electrolytic": {0.10, 0.15, "typical figure for aluminium electrolytics (from memory)"},
	"tantalum":               {0.01, 0.05, "typical figure for tantalum capacitors (from memory)"},
	"paper-oil":              {0.02, 0.05, "typical figure for paper-oil capacitors (from memory; confirm with the maker)"},
}

// paths are the permanent discharge paths across the bank.
type paths struct {
	// Bleeder: chains in parallel, each of n elements of rEl ohms, tolerance tolR.
	chains, n  int
	rEl, tolR  float64
	hasBleeder bool
	// Balancing: one resistor rb (tolerance tolB) across each of the S·P cells.
	rb, tolB float64
	// Leakage conductance per cell, S: stated (credited in the nominal case) and modelled (largest leakage of a
	// good cell, used only for a lower bound when nothing else discharges the bank).
	gLeakStated, gLeakModel float64
	leakBasis               string
}

// gBleeder returns the bleeder conductance (S) with k chains and each element at r ohms.
func (p paths) gBleeder(k int, r float64) float64 {
	if !p.hasBleeder || k <= 0 {
		return 0
	}
	return float64(k) / (float64(p.n) * r)
}

// gBank returns the conductance (S) across the bank terminals of the symmetric network: bleeder chains plus P
// strings of S cells each shunted by conductance gCell: G = Gb + P·gCell/S. By symmetry every cell stays at V/S,
// so the network decays as one capacitance C = P·Ccell/S through G (Kirchhoff's laws).
func gBank(gb, gCell float64, s, p int) float64 { return gb + float64(p)*gCell/float64(s) }

// faultDecay is the bank voltage after one balancing resistor opens: the asymmetric network solved exactly as a
// linear ODE x' = A·x by the matrix exponential (gonum mat.Dense.Exp).
//
// States (V): xf the faulted cell, xo each other cell of its string, xh each cell of the P−1 healthy strings.
// With cells of capacitance c (F), shunt conductance g on healthy cells and gf on the faulted one, bleeder
// conductance gb across the bank, and the strings tied at their ends (so each string's sum is the bank voltage
// V = xf + (S−1)·xo = S·xh):
//
//	dV/dt = −(S·gb·V + Σ g·x)/(P·c),  Ii = (−c·dV/dt − Σ_string g·x)/S,  c·dx/dt = −g·x − Ii.
//
// Kirchhoff's current law at every node; the reduction to three states uses the symmetry of the identical cells.
type faultDecay struct {
	a    *mat.Dense
	x0   *mat.VecDense
	s, p int
}

func newFaultDecay(c, v0, g, gf, gb float64, s, p int) faultDecay {
	S, P := float64(s), float64(p)
	// Columns of A: the derivative of the state for each unit state.
	a := mat.NewDense(3, 3, nil)
	for k := 0; k < 3; k++ {
		var x [3]float64
		x[k] = 1
		xf, xo, xh := x[0], x[1], x[2]
		v := (xf + (S-1)*xo + (P-1)*S*xh) / P
		sumG := gf*xf + (S-1)*g*xo + (P-1)*S*g*xh
		dv := -(S*gb*v + sumG) / (P * c)
		iF := (-c*dv - gf*xf - (S-1)*g*xo) / S
		iH := (-c*dv - S*g*xh) / S
		a.Set(0, k, (-gf*xf-iF)/c)
		a.Set(1, k, (-g*xo-iF)/c)
		a.Set(2, k, (-g*xh-iH)/c)
	}
	return faultDecay{a: a, x0: mat.NewVecDense(3, []float64{v0 / S, v0 / S, v0 / S}), s: s, p: p}
}

// at returns the bank voltage (V) at time t (s).
func (f faultDecay) at(t float64) float64 {
	var e mat.Dense
	var at mat.Dense
	at.Scale(t, f.a)
	e.Exp(&at)
	var x mat.VecDense
	x.MulVec(&e, f.x0)
	S, P := float64(f.s), float64(f.p)
	return (x.AtVec(0) + (S-1)*x.AtVec(1) + (P-1)*S*x.AtVec(2)) / P
}

// timeTo returns the first time (s) at which the bank voltage falls to vs, found on a geometric grid from tMin
// and refined by bisection to 1e-9 relative; ok is false when it stays above vs up to tMax.
func (f faultDecay) timeTo(vs, tMin, tMax float64) (float64, bool) {
	if f.at(0) <= vs {
		return 0, true
	}
	lo := 0.0
	for t := tMin; t <= tMax; t *= 1.25 {
		if f.at(t) <= vs {
			hi := t
			for i := 0; i < 200 && hi-lo > 1e-9*hi; i++ {
				mid := 0.5 * (lo + hi)
				if f.at(mid) <= vs {
					hi = mid
				} else {
					lo = mid
				}
			}
			return hi, true
		}
		lo = t
	}
	return 0, false
}

// decay is one decay scenario of the symmetric network.
type decay struct {
	tau, tauW float64 // s, nominal and worst case
	lowerB    bool    // a leakage-only lower bound
}

// assessDischarge computes discharge paths and bleeder quantities (DESIGN.md §4.3): discharge.time_constant,
// discharge.time_to_safe, discharge.time_to_safe_single_fault, the bleeder's power and element voltage, the
// balancing resistors' power, the dump resistor's peak current and energy, dielectric absorption, and the
// curves discharge.decay and discharge.decay_single_fault.
func assessDischarge(a *Assessment) error {
	m := a.m.bank
	if m == nil {
		return nil // the bank stage recorded why
	}
	vs := a.Targets.SafeVoltage
	if !(vs > 0) || math.IsInf(vs, 0) {
		return fmt.Errorf("targets: safe voltage %g V, want a positive finite voltage", vs)
	}
	r := a.Rig
	p, err := dischargePaths(r, m)
	if err != nil {
		return err
	}
	if err := bleederQuantities(a, r, m, p); err != nil {
		return err
	}
	if err := balancingQuantities(a, r, m, p); err != nil {
		return err
	}

	// Intact network. Nominal: nominal resistors and any stated leakage. Worst: +C, the worst charge voltage,
	// resistors at +tolerance and no credit for leakage.
	gCell := p.gLeakStated
	gCellW := 0.0
	if p.rb > 0 {
		gCell += 1 / p.rb
		gCellW += 1 / (p.rb * (1 + p.tolB))
	}
	g := gBank(p.gBleeder(p.chains, p.rEl), gCell, m.S, m.P)
	gW := gBank(p.gBleeder(p.chains, p.rEl*(1+p.tolR)), gCellW, m.S, m.P)
	in := []Input{{"C", "bank.capacitance", m.C, "F"}, {"V0", "bank.voltage", m.V, "V"}, {"Vs", "targets.safe_voltage", vs, "V"}}
	if p.hasBleeder {
		in = append(in, Input{"Rbl", "bleeder.resistance", p.rEl, "Ω"}, Input{"n", "bleeder.elements_in_series", float64(p.n), "1"}, Input{"k", "bleeder.count", float64(p.chains), "1"})
	}
	if p.rb > 0 {
		in = append(in, Input{"Rb", "bank.balancing.resistance", p.rb, "Ω"})
	}
	if p.gLeakStated > 0 {
		in = append(in, Input{"Gleak", "bank.leakage", p.gLeakStated, "S"})
	}
	formulaG := "G = k/(n·Rbl) + P/(S·Rb) + P·Gleak/S"
	worstNote := "worst case at +C tolerance, the worst charge voltage, resistors at +tolerance and no credit for leakage"
	var intact decay
	var intactNote []string
	if !p.hasBleeder {
		a.AddGap("bleeder", "no bleeder is stated: nothing but balancing resistors (if any) and the cells' own leakage discharges the bank after the charger is removed")
	}
	switch {
	case g > 0 && gW > 0:
		intact = decay{tau: m.C / g, tauW: m.CWorst / gW}
		if p.gLeakStated > 0 {
			intactNote = append(intactNote, "the stated leakage is credited in the nominal case only")
		} else {
			intactNote = append(intactNote, "leakage not credited: it falls well below its catalogue maximum in a rested cell")
		}
	case g > 0: // only stated leakage discharges the bank
		intact = decay{tau: m.C / g, tauW: m.CWorst / g, lowerB: true}
		intactNote = append(intactNote, "only the stated leakage discharges the bank; the worst case keeps it (nothing else exists), so the time is a lower bound")
	case p.gLeakModel > 0:
		gl := gBank(0, p.gLeakModel, m.S, m.P)
		intact = decay{tau: m.C / gl, tauW: m.CWorst / gl, lowerB: true}
		in = append(in, Input{"Gleak", "bank.leakage (model)", p.gLeakModel, "S"})
		intactNote = append(intactNote, "nothing but leakage discharges the bank: leakage model "+p.leakBasis+
			"; real leakage is usually far lower, so this is a lower bound and the real time may be hours")
	default:
		a.AddGap("bank.leakage", "no discharge path is stated and the cells' leakage cannot be modelled (no dielectric or leakage figure): the time to a safe voltage cannot be computed and may be unbounded")
		return dumpAndAbsorption(a, r, m, p, vs)
	}
	tSafe, tSafeW := DecayTime(m.V, vs, intact.tau), DecayTime(m.VWorst, vs, intact.tauW)
	lb := ""
	if intact.lowerB {
		lb = " (lower bound)"
	}
	targetNote := fmt.Sprintf("to the caller's safe voltage %.4g V; NFPA 70 (NEC) 460.6(A) asks for 50 V within 1 min (≤ 1000 V), 460.28(A) within 5 min above", vs)
	if err := addAll(a,
		Quantity{Name: "discharge.time_constant", Value: intact.tau, Worst: Worst(intact.tauW), Unit: "s", Formula: "τ = C/G, " + formulaG,
			Inputs: in, Basis: basisParallelPaths + "; " + basisDecay, Note: joinNotes(append(append([]string{}, intactNote...), worstNote+lb))},
		Quantity{Name: "discharge.time_to_safe", Value: tSafe, Worst: Worst(tSafeW), Unit: "s", Formula: "t = τ·ln(V0/Vs)",
			Inputs: in, Basis: basisDecay, Note: joinNotes(append(append([]string{targetNote}, intactNote...), worstNote+lb))},
	); err != nil {
		return err
	}
	a.Curves = append(a.Curves, decayCurve("discharge.decay", m.V, func(t float64) float64 { return DecayVoltage(m.V, intact.tau, t) }, math.Max(tSafe, tSafeW), a.Targets.TimeAllowed))

	// Single fault: the one open resistor that slows the decay most — one bleeder chain, or one balancing
	// resistor (which leaves its cell to its leakage). A failed path never speeds the decay, so the result is at
	// least the intact time.
	sf, sfW, sfCurve, sfNote, err := singleFault(a, p, m, vs, intact, tSafe, tSafeW)
	if err != nil {
		return err
	}
	if err := a.Add(Quantity{Name: "discharge.time_to_safe_single_fault", Value: sf, Worst: Worst(sfW), Unit: "s", Formula: "t = τ'·ln(V0/Vs) with one resistor open; balancing faults by the matrix exponential of the cell network",
		Inputs: in, Basis: basisDecay + "; asymmetric faults: linear RC network x' = A·x solved by the matrix exponential (gonum mat.Dense.Exp; Higham, Functions of Matrices, 2008, Alg. 10.20)",
		Note: joinNotes([]string{targetNote, sfNote})}); err != nil {
		return err
	}
	if sfCurve != nil {
		a.Curves = append(a.Curves, decayCurve("discharge.decay_single_fault", m.V, sfCurve, math.Max(sf, sfW), a.Targets.TimeAllowed))
	}
	if err := measuredDecay(a, r, m, vs, intact.tau, "discharge.decay_time_predicted", "the permanent discharge paths"); err != nil {
		return err
	}
	return dumpAndAbsorption(a, r, m, p, vs)
}

// singleFault returns the single-fault time to safe (nominal, worst), a sampler for its curve and a note.
func singleFault(a *Assessment, p paths, m *BankModel, vs float64, intact decay, tSafe, tSafeW float64) (sf, sfW float64, curve func(float64) float64, note string, err error) {
	type cand struct {
		t, tW float64
		curve func(float64) float64
		note  string
		ok    bool
	}
	var cands []cand
	leakOnly := func(why string) cand {
		gl := gBank(0, p.gLeakModel, m.S, m.P)
		if gl <= 0 {
			return cand{}
		}
		tau := m.C / gl
		return cand{t: DecayTime(m.V, vs, tau), tW: DecayTime(m.VWorst, vs, m.CWorst/gl),
			curve: func(t float64) float64 { return DecayVoltage(m.V, tau, t) },
			note:  why + "; nothing else discharges the bank, so the time through leakage alone is estimated (" + p.leakBasis + "); a lower bound: real leakage is usually far lower", ok: true}
	}
	gCell := p.gLeakStated
	gCellW := 0.0
	if p.rb > 0 {
		gCell += 1 / p.rb
		gCellW += 1 / (p.rb * (1 + p.tolB))
	}
	if p.hasBleeder {
		g := gBank(p.gBleeder(p.chains-1, p.rEl), gCell, m.S, m.P)
		gW := gBank(p.gBleeder(p.chains-1, p.rEl*(1+p.tolR)), gCellW, m.S, m.P)
		why := "one bleeder element open (its chain carries no current)"
		switch {
		case g > 0 && gW > 0:
			tau := m.C / g
			cands = append(cands, cand{t: DecayTime(m.V, vs, tau), tW: DecayTime(m.VWorst, vs, m.CWorst/gW),
				curve: func(t float64) float64 { return DecayVoltage(m.V, tau, t) }, note: why + "; the remaining paths decay as one RC", ok: true})
		default:
			if c := leakOnly(why); c.ok {
				cands = append(cands, c)
			} else {
				a.AddGap("bank.leakage", "with the bleeder failed open nothing discharges the bank and its leakage cannot be modelled: the single-fault time is unbounded")
			}
		}
	}
	if p.rb > 0 && m.S > 1 {
		gb := p.gBleeder(p.chains, p.rEl)
		gbW := p.gBleeder(p.chains, p.rEl*(1+p.tolR))
		f := newFaultDecay(m.CCell, m.V, gCell, p.gLeakStated, gb, m.S, m.P)
		fW := newFaultDecay(m.CCell*(1+m.Tolerance), m.VWorst, gCellW, 0, gbW, m.S, m.P)
		tMin := math.Max(intact.tau, 1e-9) / 100
		const tMax = 1e9 // s, about 32 years: beyond this the decay is treated as unbounded
		t, ok := f.timeTo(vs, tMin, tMax)
		tW, okW := fW.timeTo(vs, tMin, tMax)
		why := "one balancing resistor open (its cell keeps its charge but for the other paths)"
		if ok && okW {
			cands = append(cands, cand{t: t, tW: tW, curve: f.at, note: why, ok: true})
		} else if c := leakOnly(why); c.ok {
			// The faulted cell has only its own leakage: its share V/S decays with the leakage time constant.
			tauL := m.CCell / p.gLeakModel
			c.t = math.Max(c.t, DecayTime(m.V/float64(m.S), vs, tauL))
			c.tW = math.Max(c.tW, DecayTime(m.VWorst/float64(m.S), vs, tauL))
			cands = append(cands, c)
		} else {
			a.AddGap("bank.leakage", "with one balancing resistor open its cell has no discharge path that can be modelled: the single-fault time is unbounded")
		}
	}
	if len(cands) == 0 {
		// No resistor to fail (no bleeder, no balancing): the single fault cannot lengthen the intact decay.
		return tSafe, tSafeW, func(t float64) float64 { return DecayVoltage(m.V, intact.tau, t) },
			"no bleeder or balancing resistor that could fail: the intact figure applies", nil
	}
	best := cands[0]
	for _, c := range cands[1:] {
		if c.tW > best.tW {
			best = c
		}
	}
	sf, sfW, curve = math.Max(best.t, tSafe), math.Max(best.tW, tSafeW), best.curve
	note = best.note + "; never less than the intact time"
	if best.t < tSafe {
		// The estimate for the faulted network came out faster than the intact figure (a leakage model credited
		// only here); the intact decay is the honest lower bound, and its curve is shown.
		curve = func(t float64) float64 { return DecayVoltage(m.V, intact.tau, t) }
		note += " (the intact figure governs here)"
	}
	return sf, sfW, curve, note, nil
}

// dischargePaths collects the bleeder, balancing and leakage paths of the rig.
func dischargePaths(r *schema.Rig, m *BankModel) (p paths, err error) {
	if b := r.Bleeder; b != nil {
		if b.Resistance == nil {
			return p, nil // recorded by bleederQuantities
		}
		p.hasBleeder = true
		p.rEl, p.n, p.chains, p.tolR = *b.Resistance, 1, 1, 0.05
		if b.ElementsInSeries != nil {
			p.n = *b.ElementsInSeries
		}
		if b.Count != nil {
			p.chains = *b.Count
		}
		if b.Tolerance != nil {
			p.tolR = *b.Tolerance
		}
		if !(p.rEl > 0) || math.IsInf(p.rEl, 0) || p.n < 1 || p.chains < 1 || p.tolR < 0 || p.tolR >= 1 {
			return p, fmt.Errorf("bleeder: got %g Ω × %d in series × %d chains, tolerance %g; want a positive resistance, counts ≥ 1 and a tolerance in [0, 1)", p.rEl, p.n, p.chains, p.tolR)
		}
	}
	if bal := r.Bank.Balancing; bal != nil && bal.Resistance != nil {
		p.rb, p.tolB = *bal.Resistance, 0.05
		if bal.Tolerance != nil {
			p.tolB = *bal.Tolerance
		}
		if !(p.rb > 0) || math.IsInf(p.rb, 0) || p.tolB < 0 || p.tolB >= 1 {
			return p, fmt.Errorf("bank.balancing: got %g Ω, tolerance %g; want a positive resistance and a tolerance in [0, 1)", p.rb, p.tolB)
		}
	}
	l := leakageOf(r.Bank)
	if l.I > 0 && r.Bank.VoltageRating != nil && *r.Bank.VoltageRating > 0 {
		g := l.I / *r.Bank.VoltageRating // linear leakage resistance Vr/I
		p.gLeakModel, p.leakBasis = g, l.Basis
		if l.Stated {
			p.gLeakStated = g
		}
	}
	return p, nil
}

// bleederQuantities adds the bleeder's resistance, power and element voltage.
func bleederQuantities(a *Assessment, r *schema.Rig, m *BankModel, p paths) error {
	b := r.Bleeder
	if b == nil {
		return nil
	}
	if !p.hasBleeder {
		a.AddGap("bleeder.resistance", "the bleeder's resistance is not stated, so its discharge time and power cannot be computed")
		return nil
	}
	rTot := float64(p.n) * p.rEl / float64(p.chains)
	vEl, vElW := m.V/float64(p.n), m.VWorst/float64(p.n)
	pw, pwW := vEl*vEl/p.rEl, vElW*vElW/(p.rEl*(1-p.tolR))
	in := []Input{{"V", "bank.voltage", m.V, "V"}, {"R", "bleeder.resistance", p.rEl, "Ω"}, {"n", "bleeder.elements_in_series", float64(p.n), "1"},
		{"k", "bleeder.count", float64(p.chains), "1"}, {"tol", "bleeder.tolerance", p.tolR, "1"}}
	qs := []Quantity{
		{Name: "bleeder.resistance", Value: rTot, Worst: Worst(rTot * (1 + p.tolR)), Unit: "Ω", Formula: "Rbl = n·R/k", Inputs: in[1:],
			Basis: "series resistances add, parallel chains combine reciprocally (Ohm's law)", Note: "worst case at +tolerance (slowest discharge)"},
		{Name: "bleeder.power", Value: pw, Worst: Worst(pwW), Unit: "W", Formula: "P = (V/n)²/R", Inputs: in,
			Basis: "Joule heating P = V²/R", Note: "continuous dissipation in one element at full charge while the charger holds the bank; worst case at the worst charge voltage and −tolerance"},
		{Name: "bleeder.total_power", Value: pw * float64(p.n*p.chains), Worst: Worst(pwW * float64(p.n*p.chains)), Unit: "W", Formula: "Ptot = V²/Rbl", Inputs: in,
			Basis: "Joule heating P = V²/R", Note: "all bleeder elements together; the charger must supply this continuously"},
		{Name: "bleeder.element_voltage", Value: vEl, Worst: Worst(vElW), Unit: "V", Formula: "Vel = V/n", Inputs: in[:3],
			Basis: "equal resistors in series share the voltage equally (Ohm's law)", Note: "worst case at the worst charge voltage"},
	}
	if b.PowerRating != nil && *b.PowerRating > 0 {
		pr := *b.PowerRating
		qs = append(qs, Quantity{Name: "bleeder.power_fraction", Value: pw / pr, Worst: Worst(pwW / pr), Unit: "1", Formula: "P/Prated",
			Inputs: []Input{{"P", "bleeder.power", pw, "W"}, {"Prated", "bleeder.power_rating", pr, "W"}},
			Basis:  "ratio to the rated power; common practice keeps a continuously loaded resistor at or below 50 % of its rating",
			Note:   "above 1 the element overheats and may fail open, leaving the bank charged"})
	} else {
		a.AddGap("bleeder.power_rating", "the bleeder's power rating is not stated, so its power margin cannot be checked")
	}
	if b.VoltageRating != nil && *b.VoltageRating > 0 {
		vr := *b.VoltageRating
		qs = append(qs, Quantity{Name: "bleeder.element_voltage_fraction", Value: vEl / vr, Worst: Worst(vElW / vr), Unit: "1", Formula: "Vel/Vrated",
			Inputs: []Input{{"Vel", "bleeder.element_voltage", vEl, "V"}, {"Vrated", "bleeder.voltage_rating", vr, "V"}},
			Basis:  "ratio to the element's rated (limiting element) voltage", Note: "above 1 the element may flash over or drift"})
	} else {
		a.AddGap("bleeder.voltage_rating", "the bleeder's element voltage rating is not stated, so the voltage across each element cannot be checked")
	}
	return addAll(a, qs...)
}

// balancingQuantities adds the balancing resistors' power, from the highest cell voltage.
func balancingQuantities(a *Assessment, r *schema.Rig, m *BankModel, p paths) error {
	if p.rb <= 0 {
		return nil
	}
	vc, ok := a.Q("bank.cell_voltage_max")
	if !ok {
		return nil
	}
	vw := vc.Value
	if vc.Worst != nil {
		vw = *vc.Worst
	}
	pw, pwW := vc.Value*vc.Value/p.rb, vw*vw/(p.rb*(1-p.tolB))
	in := []Input{{"Vcell", "bank.cell_voltage_max", vc.Value, "V"}, {"Rb", "bank.balancing.resistance", p.rb, "Ω"}}
	qs := []Quantity{{Name: "balancing.power", Value: pw, Worst: Worst(pwW), Unit: "W", Formula: "P = Vcell²/Rb", Inputs: in,
		Basis: "Joule heating P = V²/R", Note: "the most loaded balancing resistor at full charge; worst case at the worst cell voltage and −tolerance"}}
	if bal := r.Bank.Balancing; bal.PowerRating != nil && *bal.PowerRating > 0 {
		qs = append(qs, Quantity{Name: "balancing.power_fraction", Value: pw / *bal.PowerRating, Worst: Worst(pwW / *bal.PowerRating), Unit: "1", Formula: "P/Prated",
			Inputs: append(in, Input{"Prated", "bank.balancing.power_rating", *bal.PowerRating, "W"}), Basis: "ratio to the rated power", Note: "above 1 the resistor overheats"})
	}
	return addAll(a, qs...)
}

// measuredDecay adds the predicted time for a measured decay, for the predicted-versus-measured check.
func measuredDecay(a *Assessment, r *schema.Rig, m *BankModel, vs, tau float64, name, what string) error {
	ms := r.Measurements
	if ms == nil || ms.DecayTime == nil || tau <= 0 {
		return nil
	}
	v0 := m.V
	from := "bank.voltage"
	if ms.ChargeVoltage != nil && *ms.ChargeVoltage > 0 {
		v0, from = *ms.ChargeVoltage, "measurements.charge_voltage"
	}
	to := vs
	toName := "targets.safe_voltage"
	if ms.DecayTo != nil && *ms.DecayTo > 0 {
		to, toName = *ms.DecayTo, "measurements.decay_to"
	}
	return a.Add(Quantity{Name: name, Value: DecayTime(v0, to, tau), Unit: "s", Formula: "t = τ·ln(V0/Vto)",
		Inputs: []Input{{"τ", "time constant", tau, "s"}, {"V0", from, v0, "V"}, {"Vto", toName, to, "V"}, {"tmeasured", "measurements.decay_time", *ms.DecayTime, "s"}},
		Basis:  basisDecay, Note: "prediction for the measured decay through " + what + ", to compare with measurements.decay_time"})
}

// dumpAndAbsorption adds the dump-resistor and dielectric-absorption quantities.
func dumpAndAbsorption(a *Assessment, r *schema.Rig, m *BankModel, p paths, vs float64) error {
	if d := r.Dump; d != nil {
		if d.Resistance == nil || !(*d.Resistance > 0) {
			a.AddGap("dump.resistance", "the dump resistor's value is not stated, so its peak current and discharge time cannot be computed")
		} else {
			rd := *d.Resistance
			rl := rd + m.ESR
			in := []Input{{"V", "bank.voltage", m.V, "V"}, {"Rd", "dump.resistance", rd, "Ω"}, {"ESR", "bank.esr", m.ESR, "Ω"}, {"C", "bank.capacitance", m.C, "F"}}
			tau, tauW := m.C*rl, m.CWorst*rl
			qs := []Quantity{
				{Name: "dump.peak_current", Value: m.V / rl, Worst: Worst(m.VWorst / rd), Unit: "A", Formula: "Ipk = V/(Rd + ESR); worst V/Rd",
					Inputs: in, Basis: "Ohm's law at the instant the dump closes", Note: "wiring inductance only slows the rise; worst case at the worst charge voltage without the ESR"},
				{Name: "dump.peak_power", Value: m.V * m.V / rl, Worst: Worst(m.VWorst * m.VWorst / rd), Unit: "W", Formula: "Ppk = V²/Rd",
					Inputs: in, Basis: "Joule heating P = V²/R", Note: "at the instant the dump closes"},
				{Name: "dump.energy", Value: m.Energy, Worst: Worst(m.EnergyWorst), Unit: "J", Formula: "W = ½CV²",
					Inputs: in, Basis: "energy balance: the dump resistor absorbs all the stored energy but the small share in the ESR", Note: "one full dump; worst case at +C and the worst charge voltage"},
				{Name: "dump.time_constant", Value: tau, Worst: Worst(tauW), Unit: "s", Formula: "τ = C·(Rd + ESR)", Inputs: in, Basis: basisDecay, Note: "the permanent paths in parallel are neglected (they only speed it)"},
				{Name: "dump.time_to_safe", Value: DecayTime(m.V, vs, tau), Worst: Worst(DecayTime(m.VWorst, vs, tauW)), Unit: "s", Formula: "t = τ·ln(V0/Vs)",
					Inputs: append(in, Input{"Vs", "targets.safe_voltage", vs, "V"}), Basis: basisDecay, Note: "once the dump has engaged; whether it engages is a matter of its switching and fail-safe design"},
			}
			if d.EnergyRating != nil && *d.EnergyRating > 0 {
				qs = append(qs, Quantity{Name: "dump.energy_fraction", Value: m.Energy / *d.EnergyRating, Worst: Worst(m.EnergyWorst / *d.EnergyRating), Unit: "1", Formula: "W/Wrated",
					Inputs: []Input{{"W", "dump.energy", m.Energy, "J"}, {"Wrated", "dump.energy_rating", *d.EnergyRating, "J"}}, Basis: "ratio to the resistor's pulse energy rating", Note: "above 1 the resistor may crack or fuse open"})
			} else {
				a.AddGap("dump.energy_rating", "the dump resistor's pulse energy rating is not stated, so it cannot be checked against the stored energy")
			}
			if err := addAll(a, qs...); err != nil {
				return err
			}
			if err := measuredDecay(a, r, m, vs, tau, "dump.decay_time_predicted", "the dump resistor"); err != nil {
				return err
			}
		}
	}
	ab, ok := absorption[r.Bank.Dielectric]
	if !ok {
		a.AddGap("bank.dielectric", "the cells' dielectric is not stated, so the voltage recovered by dielectric absorption after a brief short cannot be estimated")
		return nil
	}
	vr, vrW := ab.lo*m.V, ab.hi*m.VWorst
	return a.Add(Quantity{Name: "discharge.absorption_recovery", Value: vr, Worst: Worst(vrW), Unit: "V", Formula: "Vrec = fDA·V",
		Inputs: []Input{{"V", "bank.voltage", m.V, "V"}, {"fDA", "bank.dielectric", ab.lo, "1"}},
		Basis:  "dielectric absorption fraction for " + r.Bank.Dielectric + ": " + ab.basis + " (CHECKS.md)",
		Note: fmt.Sprintf("voltage that reappears on open circuit after a brief short of a bank held at V; fraction %s–%s, worst case at the upper figure and the worst charge voltage; recovered energy about %.3g J (worst); keep a shorting link on the bank in storage",
			pct(ab.lo), pct(ab.hi), Energy(m.CWorst, vrW))})
}

// decayCurve samples the nominal v(t) from full charge on 241 points out to 1.25 × the later of the (worst-case)
// time to safe and the time allowed (1 s when both are zero).
func decayCurve(name string, v0 float64, v func(float64) float64, tSafe, tAllowed float64) Curve {
	end := 1.25 * math.Max(tSafe, tAllowed)
	if !(end > 0) || math.IsInf(end, 0) {
		end = 1
	}
	const n = 241
	c := Curve{Name: name, XLabel: "time (s)", YLabel: "bank voltage (V)", XUnit: "s", YUnit: "V", X: make([]float64, n), Y: make([]float64, n)}
	for i := range n {
		t := end * float64(i) / (n - 1)
		y := v(t)
		if math.IsNaN(y) || math.IsInf(y, 0) {
			y = v0 // never let a non-finite value out; cannot happen for the decays above
		}
		c.X[i], c.Y[i] = t, y
	}
	return c
}
