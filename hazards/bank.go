package hazards

import (
	"fmt"
	"math"

	"chargeward/schema"
)

// BankModel is the bank as later stages use it. Owner: electrical physics (issue 3).
type BankModel struct {
	C      float64 // equivalent capacitance, F (nominal)
	CWorst float64 // equivalent capacitance at +tolerance, F
	V      float64 // charge voltage used for the review, V (nominal)
	VWorst float64 // charge voltage at high line, V
	S, P   int     // series cells per string, parallel strings
	ESR    float64 // equivalent series resistance of the whole bank, Ω (0 when not stated; see Gaps)

	CCell      float64 // capacitance of one cell, F (nominal)
	Tolerance  float64 // ± capacitance tolerance as a fraction (stated or the 0.20 default)
	VRating    float64 // equivalent voltage rating of the bank S·Vr,cell, V (0 when not stated; see Gaps)
	Dielectric string  // as in the rig; "" when not stated
	// PeakCurrentRating is the bank's peak-current rating P·Ipk,cell, A (0 when not stated).
	PeakCurrentRating float64
	// Energy and EnergyWorst are ½CV² and ½·CWorst·VWorst², J.
	Energy, EnergyWorst float64
}

// defaultCapacitanceTolerance is used when bank.capacitance_tolerance is not stated: ±20 % is the common
// tolerance of aluminium electrolytic cells (IEC 60062 letter code M; common practice).
const defaultCapacitanceTolerance = 0.20

// bankCaps is the bank's arrangement and equivalent capacitance.
type bankCaps struct {
	CCell, Tol float64
	S, P       int
	C, CWorst  float64 // F; C = P·Ccell/S, CWorst at +Tol
	TolNote    string  // "" when the tolerance is stated
}

// bankCapacitance returns the equivalent capacitance of S series cells in each of P parallel strings:
// C = P·Ccell/S (series capacitances add reciprocally, parallel ones add). Units: F. ok is false when the cell
// capacitance is not stated.
func bankCapacitance(r *schema.Rig) (b bankCaps, ok bool, err error) {
	bk := r.Bank
	if bk.Capacitance == nil {
		return b, false, nil
	}
	b.CCell = *bk.Capacitance
	if !(b.CCell > 0) || math.IsInf(b.CCell, 0) {
		return b, false, fmt.Errorf("bank.capacitance: got %g F, want a positive finite capacitance", b.CCell)
	}
	b.S, b.P = 1, 1
	if bk.Series != nil {
		b.S = *bk.Series
	}
	if bk.Parallel != nil {
		b.P = *bk.Parallel
	}
	if b.S < 1 || b.P < 1 {
		return b, false, fmt.Errorf("bank.series, bank.parallel: got %d × %d, want counts ≥ 1", b.S, b.P)
	}
	b.Tol = defaultCapacitanceTolerance
	if bk.CapacitanceTolerance != nil {
		b.Tol = *bk.CapacitanceTolerance
	} else {
		b.TolNote = "capacitance tolerance not stated: ±20 % assumed"
	}
	if b.Tol < 0 || b.Tol >= 1 {
		return b, false, fmt.Errorf("bank.capacitance_tolerance: got %g, want a fraction in [0, 1)", b.Tol)
	}
	b.C = SeriesParallelCapacitance(b.CCell, b.S, b.P)
	b.CWorst = b.C * (1 + b.Tol)
	return b, true, nil
}

// SeriesParallelCapacitance returns the capacitance of p parallel strings of s identical cells of capacitance c
// (F): p·c/s. Series capacitors add as reciprocals, parallel ones add (Alexander & Sadiku, Fundamentals of
// Electric Circuits, 5th ed., §6.4; section from memory). Valid for s, p ≥ 1.
func SeriesParallelCapacitance(c float64, s, p int) float64 { return float64(p) * c / float64(s) }

// Energy returns the energy ½CV² (J) stored in capacitance c (F) at voltage v (V).
func Energy(c, v float64) float64 { return 0.5 * c * v * v }

// cellLeakage is the leakage model of one cell: its current at rated voltage and the basis of that figure.
type cellLeakage struct {
	I      float64 // A at the cell's rated voltage; 0 when unknown
	Stated bool    // from bank.leakage rather than a model
	Basis  string
	Spread float64 // fractional spread between cells for the sharing worst case
}

// Insulation-resistance time constants R_ins·C (s) used as the leakage model of non-electrolytic cells. Makers of
// film and ceramic capacitors state a minimum insulation resistance as such a time constant; these values are
// from memory of typical data sheets and are a model of the largest leakage, not a measurement.
var insulationTimeConstant = map[string]float64{
	"film-polypropylene": 30000,
	"film-polyester":     10000,
	"paper-oil":          5000,
	"ceramic-c0g":        1000,
	"ceramic-x7r":        1000,
}

// leakageOf returns the leakage model of one cell. A stated leakage (at rated voltage) is used as given.
// Otherwise, for aluminium electrolytic and tantalum cells, the catalogue rule I = max(0.01·C·V µA, 3 µA) with C
// in µF and V in volts, after 2 minutes at rated voltage (common practice: manufacturers' catalogue practice);
// in SI units I = max(0.01·C·Vr, 3e-6) A with C in F. For other dielectrics I = C·Vr/τins (see
// insulationTimeConstant, from memory). Both models give the largest leakage a good cell shows, so a discharge
// time computed from them alone is a lower bound.
func leakageOf(bk schema.Bank) cellLeakage {
	l := cellLeakage{Spread: 0.5}
	switch bk.Dielectric {
	case "aluminium-electrolytic", "tantalum":
		l.Spread = 1.0
	}
	if bk.LeakageSpread != nil && *bk.LeakageSpread >= 0 {
		l.Spread = *bk.LeakageSpread
	}
	if bk.Leakage != nil && *bk.Leakage > 0 {
		l.I, l.Stated, l.Basis = *bk.Leakage, true, "the rig's stated leakage at rated voltage"
		return l
	}
	if bk.Capacitance == nil || bk.VoltageRating == nil || !(*bk.VoltageRating > 0) {
		return l
	}
	c, vr := *bk.Capacitance, *bk.VoltageRating
	switch bk.Dielectric {
	case "aluminium-electrolytic", "tantalum":
		l.I = math.Max(0.01*c*vr, 3e-6)
		l.Basis = "manufacturers' catalogue practice: I ≤ 0.01·C·V µA or 3 µA, whichever is greater, after 2 min at rated voltage (common practice)"
	default:
		if tau, ok := insulationTimeConstant[bk.Dielectric]; ok {
			l.I = c * vr / tau
			l.Basis = fmt.Sprintf("insulation resistance as a time constant R·C ≥ %g s for %s (typical data-sheet minimum; from memory)", tau, bk.Dielectric)
		}
	}
	return l
}

// cellShare returns the highest fraction of the string voltage on any one of s series cells.
//
// Steady state (resistive divider): each cell is its leakage resistance Vr/I in parallel with its balancing
// resistor (rb, 0 = none). The highest cell has the least leakage I and, in the worst corner, the balancing
// resistor at +tolB; the others leak (1+spread)·I and have balancing at −tolB. Right after a fast charge the
// cells share as a capacitive divider: the cell at −tolC against the others at +tolC. Both dividers are
// circuit identities (Kirchhoff's laws); the spread and tolerances are the model's inputs. nominal uses the
// resistive divider with nominal resistors and the leakage spread (cells never leak alike); worst takes the
// larger of the two dividers at the tolerance corners. ok is false when nothing bounds the steady-state share
// (no balancing resistor and no leakage model).
func cellShare(s int, vr, ileak, spread, rb, tolB, tolC float64) (nominal, worst float64, ok bool) {
	if s <= 1 {
		return 1, 1, true
	}
	n := float64(s - 1)
	capShare := (1 / (1 - tolC)) / (1/(1-tolC) + n/(1+tolC))
	par := func(a, b float64) float64 {
		switch {
		case a <= 0:
			return b
		case b <= 0:
			return a
		}
		return a * b / (a + b)
	}
	var rlHi, rlLo float64 // leakage resistance of the least- and most-leaking cells, Ω
	if ileak > 0 && vr > 0 {
		rlHi, rlLo = vr/ileak, vr/(ileak*(1+spread))
	}
	if rb <= 0 && rlHi <= 0 {
		return 1 / float64(s), capShare, false
	}
	hi, lo := par(rb, rlHi), par(rb, rlLo)
	nominal = hi / (hi + n*lo)
	hiW, loW := par(rb*(1+tolB), rlHi), par(rb*(1-tolB), rlLo)
	worst = math.Max(hiW/(hiW+n*loW), capShare)
	return nominal, worst, true
}

// ShortedCellEnergy returns the energy (J) that the other strings of a bank of p parallel strings, each of s
// cells of capacitance c (F) charged to v (V), deliver into one cell that shorts. The faulted string drops to
// (s−1)/s of v with capacitance c/(s−1); the other strings (capacitance (p−1)c/s) equalise with it through the
// fault, dissipating ½·C1C2/(C1+C2)·(v/s)² (charge redistribution between two capacitors; for s = 1 the faulted
// string is a short and the whole ½(p−1)cv² is delivered). The shorted cell's own ½c(v/s)² comes on top.
// Source: charge conservation between two capacitors (Alexander & Sadiku, Fundamentals of Electric Circuits,
// 5th ed., ch. 6 problems; from memory). Valid for s, p ≥ 1.
func ShortedCellEnergy(c, v float64, s, p int) float64 {
	if p <= 1 {
		return 0
	}
	c2 := float64(p-1) * c / float64(s)
	dv := v / float64(s)
	if s == 1 {
		return 0.5 * c2 * dv * dv
	}
	c1 := c / float64(s-1)
	return 0.5 * c1 * c2 / (c1 + c2) * dv * dv
}

// assessBank computes the bank quantities (DESIGN.md §4.2) and leaves the BankModel for later stages.
func assessBank(a *Assessment) error {
	r := a.Rig
	bk, ok, err := bankCapacitance(r)
	if err != nil {
		return err
	}
	if !ok {
		a.AddGap("bank.capacitance", "the cell capacitance is not stated, so the bank's capacitance, energy, charge and every discharge time cannot be computed")
		return nil
	}
	b := r.Bank
	notes := []string{}
	if bk.TolNote != "" {
		notes = append(notes, bk.TolNote)
	}
	inC := []Input{{"Ccell", "bank.capacitance", bk.CCell, "F"}, {"S", "bank.series", float64(bk.S), "1"}, {"P", "bank.parallel", float64(bk.P), "1"}, {"tol", "bank.capacitance_tolerance", bk.Tol, "1"}}
	basisSP := "series capacitances add reciprocally, parallel ones add (Alexander & Sadiku, Fundamentals of Electric Circuits, 5th ed., §6.4; section from memory)"
	if err := a.Add(Quantity{Name: "bank.capacitance", Value: bk.C, Worst: Worst(bk.CWorst), Unit: "F", Formula: "C = P·Ccell/S; worst C·(1+tol)",
		Inputs: inC, Basis: basisSP, Note: joinNotes(append([]string{fmt.Sprintf("%d series × %d parallel", bk.S, bk.P), "worst case at +tolerance"}, notes...))}); err != nil {
		return err
	}
	cs, ok, err := chargeVoltage(r)
	if err != nil {
		return err
	}
	if !ok {
		a.AddGap("bank.voltage_rating", "neither the supply, a measured charge voltage nor the bank's voltage rating is stated, so the charge voltage and the stored energy cannot be computed")
		return nil
	}
	m := &BankModel{C: bk.C, CWorst: bk.CWorst, V: cs.V, VWorst: cs.VWorst, S: bk.S, P: bk.P, CCell: bk.CCell, Tolerance: bk.Tol, Dielectric: b.Dielectric}
	m.Energy, m.EnergyWorst = Energy(bk.C, cs.V), Energy(bk.CWorst, cs.VWorst)
	a.m.bank = m // later fields (ESR, ratings) are filled in below through the same pointer
	inV := []Input{{"C", "bank.capacitance", bk.C, "F"}, {"V", "bank.voltage", cs.V, "V"}}
	worstNote := "worst case at +C tolerance and the worst charge voltage"
	if err := addAll(a,
		Quantity{Name: "bank.voltage", Value: cs.V, Worst: Worst(cs.VWorst), Unit: "V", Formula: cs.Formula, Inputs: cs.Inputs, Basis: cs.Basis, Note: cs.Note},
		Quantity{Name: "bank.energy", Value: m.Energy, Worst: Worst(m.EnergyWorst), Unit: "J", Formula: "W = ½CV²", Inputs: inV,
			Basis: "energy stored in a capacitor, W = ½CV² (Alexander & Sadiku, Fundamentals of Electric Circuits, 5th ed., §6.2; section from memory)", Note: worstNote},
		Quantity{Name: "bank.charge", Value: bk.C * cs.V, Worst: Worst(bk.CWorst * cs.VWorst), Unit: "C", Formula: "Q = CV", Inputs: inV,
			Basis: "definition of capacitance, Q = CV", Note: worstNote},
	); err != nil {
		return err
	}
	if b.ESR != nil && *b.ESR >= 0 {
		m.ESR = *b.ESR * float64(bk.S) / float64(bk.P)
		if err := a.Add(Quantity{Name: "bank.esr", Value: m.ESR, Unit: "Ω", Formula: "ESR = S·ESRcell/P",
			Inputs: []Input{{"ESRcell", "bank.esr", *b.ESR, "Ω"}, {"S", "bank.series", float64(bk.S), "1"}, {"P", "bank.parallel", float64(bk.P), "1"}},
			Basis:  "series resistances add, parallel ones combine reciprocally (Ohm's law)", Note: "at the frequency of the maker's figure; ESR rises when the cells are cold"}); err != nil {
			return err
		}
	} else {
		a.AddGap("bank.esr", "the cells' ESR is not stated: the bank's share of the loop resistance is taken as zero, which overstates the peak current and understates heating in the cells")
	}
	if b.PeakCurrent != nil && *b.PeakCurrent > 0 {
		m.PeakCurrentRating = *b.PeakCurrent * float64(bk.P)
	}
	if err := a.Add(Quantity{Name: "bank.shorted_cell_energy", Value: ShortedCellEnergy(bk.CCell, cs.V, bk.S, bk.P), Worst: Worst(ShortedCellEnergy(bk.CCell*(1+bk.Tol), cs.VWorst, bk.S, bk.P)),
		Unit: "J", Formula: "W = ½·C1C2/(C1+C2)·(V/S)², C1 = Ccell/(S−1) (∞ for S = 1), C2 = (P−1)·Ccell/S",
		Inputs: []Input{{"Ccell", "bank.capacitance", bk.CCell, "F"}, {"V", "bank.voltage", cs.V, "V"}, {"S", "bank.series", float64(bk.S), "1"}, {"P", "bank.parallel", float64(bk.P), "1"}},
		Basis:  "charge redistribution between two capacitors through a fault (charge conservation; energy loss ½·C1C2/(C1+C2)·ΔV²)",
		Note: fmt.Sprintf("energy the %d other string(s) deliver into one shorted cell; the cell's own %.3g J comes on top; worst case at +C tolerance and worst charge voltage",
			bk.P-1, Energy(bk.CCell, cs.V/float64(bk.S)))}); err != nil {
		return err
	}
	if b.VoltageRating == nil || !(*b.VoltageRating > 0) {
		a.AddGap("bank.voltage_rating", "the cells' voltage rating is not stated, so the voltage margin and the per-cell voltage check cannot be computed")
		return nil
	}
	vr := *b.VoltageRating
	m.VRating = float64(bk.S) * vr
	leak := leakageOf(b)
	var rb, tolB float64
	var inShare []Input
	if b.Balancing != nil && b.Balancing.Resistance != nil && *b.Balancing.Resistance > 0 {
		rb, tolB = *b.Balancing.Resistance, 0.05
		if b.Balancing.Tolerance != nil {
			tolB = *b.Balancing.Tolerance
		}
		inShare = append(inShare, Input{"Rb", "bank.balancing.resistance", rb, "Ω"}, Input{"tolB", "bank.balancing.tolerance", tolB, "1"})
	}
	shareN, shareW, shareOK := cellShare(bk.S, vr, leak.I, leak.Spread, rb, tolB, bk.Tol)
	vcell, vcellW := cs.V*shareN, cs.VWorst*shareW
	shareNote := []string{}
	switch {
	case bk.S == 1:
		shareNote = append(shareNote, "one cell per string: the cell carries the whole bank voltage")
	default:
		if leak.I > 0 {
			inShare = append(inShare, Input{"Ileak", "bank.leakage", leak.I, "A"}, Input{"spread", "bank.leakage_spread", leak.Spread, "1"})
			shareNote = append(shareNote, fmt.Sprintf("leakage model: %s; leakage resistance Vr/I; the least-leaking cell against others leaking %s more", leak.Basis, pct(leak.Spread)))
			if b.LeakageSpread == nil {
				shareNote = append(shareNote, "leakage spread not stated: assumed 100 % for electrolytic and tantalum cells, 50 % for others (nominally identical electrolytic cells commonly differ in leakage by a factor of two or more; common practice, from memory)")
			}
		}
		if rb == 0 {
			shareNote = append(shareNote, "no balancing resistors: sharing is left to the cells' leakage")
		}
		shareNote = append(shareNote, fmt.Sprintf("worst case the larger of the steady-state resistive divider at the tolerance corners and the capacitive divider after a fast charge (±%s)", pct(bk.Tol)))
		if !shareOK {
			a.AddGap("bank.leakage", "series cells without balancing resistors and with no leakage figure or dielectric: the steady-state share of each cell cannot be bounded; the value shown is an equal share")
		}
	}
	inShare = append([]Input{{"V", "bank.voltage", cs.V, "V"}, {"S", "bank.series", float64(bk.S), "1"}, {"Vr,cell", "bank.voltage_rating", vr, "V"}}, inShare...)
	basisShare := "steady state: resistive divider of balancing and leakage resistances; just after charge: capacitive divider (Kirchhoff's laws; common practice for series capacitor strings)"
	return addAll(a,
		Quantity{Name: "bank.voltage_rating", Value: m.VRating, Unit: "V", Formula: "Vr = S·Vr,cell",
			Inputs: []Input{{"Vr,cell", "bank.voltage_rating", vr, "V"}, {"S", "bank.series", float64(bk.S), "1"}},
			Basis:  "series cells share the string voltage; their ratings add only when the sharing is equal (common practice)",
			Note:   "valid only when the cells share equally; see bank.cell_voltage_max"},
		Quantity{Name: "bank.voltage_margin", Value: 1 - cs.V/m.VRating, Worst: Worst(1 - cs.VWorst/m.VRating), Unit: "1", Formula: "margin = 1 − V/Vr",
			Inputs: []Input{{"V", "bank.voltage", cs.V, "V"}, {"Vr", "bank.voltage_rating", m.VRating, "V"}},
			Basis:  "ratio to the rated voltage", Note: "negative when the bank is charged above its rating; worst case at the worst charge voltage"},
		Quantity{Name: "bank.cell_voltage_max", Value: vcell, Worst: Worst(vcellW), Unit: "V", Formula: "Vcell = V·Rhi/(Rhi + (S−1)·Rlo); worst max(resistive corner, capacitive divider)",
			Inputs: inShare, Basis: basisShare, Note: joinNotes(shareNote)},
		Quantity{Name: "bank.cell_voltage_margin", Value: 1 - vcell/vr, Worst: Worst(1 - vcellW/vr), Unit: "1", Formula: "margin = 1 − Vcell/Vr,cell",
			Inputs: []Input{{"Vcell", "bank.cell_voltage_max", vcell, "V"}, {"Vr,cell", "bank.voltage_rating", vr, "V"}},
			Basis:  "ratio to the cell's rated voltage", Note: "negative when one cell is driven above its rating"},
	)
}
