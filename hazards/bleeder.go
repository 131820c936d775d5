package hazards

import (
	"errors"
	"fmt"
	"math"
)

// ResidualTarget returns the residual-voltage target for a capacitor of the given rated or working voltage
// (V): 50 V within 60 s up to 1000 V (NFPA 70 (NEC) 2023, 460.6(A); 600 V in editions before 2023) and 50 V
// within 300 s above 1000 V (NEC 2023, 460.28(A); also Cal. Code Regs. Title 8 §2893(a)). A site's policy may
// ask for less; local codes govern.
func ResidualTarget(v float64) (safe, within float64, basis string) {
	if v > 1000 {
		return 50, 300, "NFPA 70 (NEC) 2023, 460.28(A): 50 V or less within 5 min (over 1000 V)"
	}
	return 50, 60, "NFPA 70 (NEC) 2023, 460.6(A): 50 V or less within 1 min (1000 V and below)"
}

// BleederRequest asks for a permanent bleeder across a bank. Zero optional fields take the default stated.
type BleederRequest struct {
	Capacitance float64 // F, equivalent capacitance of the bank (required)
	Voltage     float64 // V, highest charge voltage of the bank (required)
	SafeVoltage float64 // V, residual voltage to reach (required)
	TimeAllowed float64 // s, time allowed to reach it (required)
	// Series is the number of series cells in the bank; the bleeder is split into an equal number of resistors
	// per cell, one group across each cell, so it also balances the cells. Default 1.
	Series int
	// ElementVoltage is the voltage rating of one resistor (its limiting element voltage), V; more resistors
	// per cell are used until each stays at or below it. Default 0: no limit stated, one resistor per cell.
	ElementVoltage float64
	// PowerRating is the rated power of one resistor, W. With it, the power sets a lower bound on the
	// resistance; without it, the plan states the rating each resistor needs. Default 0.
	PowerRating float64
	// Derating is the fraction of rated power a resistor may dissipate continuously. Default 0.5 (common
	// practice: at most 50 % of rating for a continuously loaded resistor).
	Derating float64
	// ChargerCurrent is the charger's current capability, A; the bleeder may take at most ChargerShare of it at
	// full voltage. Default 0: no bound from the charger.
	ChargerCurrent float64
	// ChargerShare is the fraction of ChargerCurrent the bleeder may take. Default 0.1 (a design margin chosen
	// here so that the bank still reaches full charge promptly; not from a standard).
	ChargerShare float64
	// CapacitanceTolerance is the bank's ± capacitance tolerance as a fraction. Nil: 0.20.
	CapacitanceTolerance *float64
	// ResistorTolerance is the resistors' ± tolerance as a fraction. Nil: 0.05.
	ResistorTolerance *float64
}

// BleederChoice is one standard resistor value and what it gives.
type BleederChoice struct {
	Series          string  // "E12" or "E24"
	Element         float64 // Ω, each resistor
	Total           float64 // Ω, the whole chain (Elements × Element)
	TimeToSafe      float64 // s, nominal
	TimeToSafeWorst float64 // s, at +C and +R tolerance
	Power           float64 // W, each resistor at full voltage, nominal
	PowerWorst      float64 // W, each resistor at −R tolerance
	PowerNeeded     float64 // W, rating each resistor needs: PowerWorst / Derating
	PowerStandard   float64 // W, the next common power rating at or above PowerNeeded; 0 above 100 W
	Current         float64 // A, bleeder current at full voltage (−R tolerance)
}

// BleederPlan is the answer to a BleederRequest.
type BleederPlan struct {
	Request        BleederRequest // with the defaults filled in
	PerCell        int            // resistors in series across each cell
	Elements       int            // resistors in series across the bank, Series × PerCell
	ElementVoltage float64        // V across each resistor at full voltage
	// The window for the whole chain's resistance, Ω: RMax from the time limit, RMin the larger of the power
	// and charger bounds (0 when neither applies).
	RMin, RMax         float64
	RMinPower          float64 // Ω, 0 when no power rating is given
	RMinCharger        float64 // Ω, 0 when no charger current is given
	LowerBound         string  // which lower bound is binding: "power", "charger" or "none"
	EMin, EMax         float64 // Ω, the window for one resistor: RMin/Elements, RMax/Elements
	E12, E24           []float64
	Choices            []BleederChoice // the largest E12 and E24 values in the window (least power, time still met)
	Basis, Assumptions []string
}

// ErrBleederWindow is wrapped by the error SizeBleeder returns when no standard resistor meets the request.
var ErrBleederWindow = errors.New("no bleeder resistance meets the request")

// WindowError says which bound wins and what to change.
type WindowError struct {
	Plan   BleederPlan // the window as far as it was computed
	Winner string      // "power", "charger" or "series" (no standard value inside a non-empty window)
	Advice string
}

func (e *WindowError) Error() string {
	return fmt.Sprintf("%v: the %s bound needs R ≥ %.4g Ω but the time limit needs R ≤ %.4g Ω; %s",
		ErrBleederWindow, e.Winner, e.Plan.RMin, e.Plan.RMax, e.Advice)
}

func (e *WindowError) Unwrap() error { return ErrBleederWindow }

// standardPowers are common power ratings of through-hole, wirewound and chassis-mount resistors, W (common
// practice: resistor makers' ranges).
var standardPowers = []float64{0.125, 0.25, 0.5, 0.6, 1, 2, 3, 5, 7, 10, 15, 20, 25, 50, 100}

// SizeBleeder returns the window of bleeder resistance that meets the request and the standard values in it.
//
// Upper bound (time): the chain must bring the bank from V to Vs within T at the slow corner,
// R·(1+tolR)·C·(1+tolC)·ln(V/Vs) ≤ T, so R ≤ T / ((1+tolR)(1+tolC)·C·ln(V/Vs)) (first-order RC decay;
// Alexander & Sadiku, Fundamentals of Electric Circuits, 5th ed., §7.2, section from memory).
// Lower bound (power): each of n resistors dissipates (V/n)²/(R/n·(1−tolR)) ≤ d·Prated, so
// R ≥ V²/(n·(1−tolR)·d·Prated) (Joule heating). Lower bound (charger): V/(R(1−tolR)) ≤ share·Icharger.
// The chain is n = Series × k resistors, with k per cell the least that keeps V/n at or below the element
// voltage rating. Units: SI throughout. Errors: invalid requests; a *WindowError (wrapping ErrBleederWindow)
// when the window is empty or holds no E24 value.
func SizeBleeder(req BleederRequest) (BleederPlan, error) {
	var p BleederPlan
	if err := checkRequest(&req); err != nil {
		return p, err
	}
	p.Request = req
	tolC, tolR := *req.CapacitanceTolerance, *req.ResistorTolerance
	k := 1
	if req.ElementVoltage > 0 {
		k = int(math.Ceil(req.Voltage/float64(req.Series)/req.ElementVoltage - 1e-12))
		k = max(k, 1)
		p.Assumptions = append(p.Assumptions, fmt.Sprintf("%d resistor(s) per cell keep each at or below its %.4g V element rating", k, req.ElementVoltage))
	} else {
		p.Assumptions = append(p.Assumptions, "no element voltage rating given: one resistor per cell; check each resistor's limiting element voltage")
	}
	p.PerCell, p.Elements = k, k*req.Series
	n := float64(p.Elements)
	p.ElementVoltage = req.Voltage / n
	ln := math.Log(req.Voltage / req.SafeVoltage)
	p.RMax = req.TimeAllowed / ((1 + tolR) * (1 + tolC) * req.Capacitance * ln)
	p.Basis = append(p.Basis, "time bound: first-order RC decay t = R·C·ln(V/Vs) at +C and +R tolerance (Alexander & Sadiku, Fundamentals of Electric Circuits, 5th ed., §7.2; section from memory)")
	p.LowerBound = "none"
	if req.PowerRating > 0 {
		p.RMinPower = req.Voltage * req.Voltage / (n * (1 - tolR) * req.Derating * req.PowerRating)
		p.Basis = append(p.Basis, fmt.Sprintf("power bound: each resistor at most %s of its rating at full voltage and −R tolerance (Joule heating; derating common practice)", pct(req.Derating)))
	}
	if req.ChargerCurrent > 0 {
		p.RMinCharger = req.Voltage / ((1 - tolR) * req.ChargerShare * req.ChargerCurrent)
		p.Basis = append(p.Basis, fmt.Sprintf("charger bound: the bleeder takes at most %s of the charger's current at full voltage (a design margin chosen here)", pct(req.ChargerShare)))
	}
	p.RMin = math.Max(p.RMinPower, p.RMinCharger)
	switch {
	case p.RMin == 0:
	case p.RMinPower >= p.RMinCharger:
		p.LowerBound = "power"
	default:
		p.LowerBound = "charger"
	}
	p.EMin, p.EMax = p.RMin/n, p.RMax/n
	p.Assumptions = append(p.Assumptions, fmt.Sprintf("capacitance ±%s, resistors ±%s", pct(tolC), pct(tolR)))
	if p.RMin > p.RMax {
		return p, &WindowError{Plan: p, Winner: p.LowerBound, Advice: windowAdvice(p)}
	}
	p.E12 = EValues(E12, p.EMin, p.EMax)
	p.E24 = EValues(E24, p.EMin, p.EMax)
	for _, s := range []struct {
		name string
		v    []float64
	}{{"E12", p.E12}, {"E24", p.E24}} {
		if len(s.v) > 0 {
			p.Choices = append(p.Choices, p.choice(s.name, s.v[len(s.v)-1]))
		}
	}
	if len(p.Choices) == 0 {
		advice := fmt.Sprintf("no E24 value lies between %s and %s per resistor; use a closer-tolerance series (E48 and finer)", fmtOhm(p.EMin), fmtOhm(p.EMax))
		if k, ok := countThatFits(p); ok {
			advice += fmt.Sprintf(", %d resistors in series (%d per cell)", k*req.Series, k)
		}
		return p, &WindowError{Plan: p, Winner: "series", Advice: advice + " or more time"}
	}
	// Keep the listings short: the values nearest the upper bound are the useful ones.
	p.E12, p.E24 = lastN(p.E12, 12), lastN(p.E24, 12)
	return p, nil
}

// choice evaluates one element value.
func (p BleederPlan) choice(series string, r float64) BleederChoice {
	req := p.Request
	tolC, tolR := *req.CapacitanceTolerance, *req.ResistorTolerance
	n := float64(p.Elements)
	c := BleederChoice{Series: series, Element: r, Total: n * r}
	c.TimeToSafe = DecayTime(req.Voltage, req.SafeVoltage, c.Total*req.Capacitance)
	c.TimeToSafeWorst = DecayTime(req.Voltage, req.SafeVoltage, c.Total*(1+tolR)*req.Capacitance*(1+tolC))
	c.Power = p.ElementVoltage * p.ElementVoltage / r
	c.PowerWorst = p.ElementVoltage * p.ElementVoltage / (r * (1 - tolR))
	c.PowerNeeded = c.PowerWorst / req.Derating
	for _, w := range standardPowers {
		if w >= c.PowerNeeded*(1-1e-12) {
			c.PowerStandard = w
			break
		}
	}
	c.Current = req.Voltage / (c.Total * (1 - tolR))
	return c
}

// windowAdvice says what to change when the lower bound exceeds the upper.
func windowAdvice(p BleederPlan) string {
	req := p.Request
	tolR := *req.ResistorTolerance
	var advice []string
	if p.RMinPower > p.RMax {
		// The rating each resistor needs at the largest E24 value inside the time bound, and the least count of
		// resistors per cell of the stated rating for which an E24 value meets every bound.
		if rel, ok := EFloor(E24, p.EMax); ok {
			need := p.ElementVoltage * p.ElementVoltage / (rel * (1 - tolR)) / req.Derating
			advice = append(advice, fmt.Sprintf("resistors rated at least %.3g W each (%s of %s, %d in series)", need, "E24", fmtOhm(rel), p.Elements))
		}
		if k, ok := countThatFits(p); ok {
			advice = append(advice, fmt.Sprintf("%d resistors in series (%d per cell) of %.3g W", k*req.Series, k, req.PowerRating))
		}
	}
	if p.RMinCharger > p.RMax {
		iNeed := req.Voltage / ((1 - tolR) * req.ChargerShare * p.RMax)
		advice = append(advice, fmt.Sprintf("a charger of at least %.3g A", iNeed), "a dump resistor switched in after disconnection instead of a permanent bleeder")
	}
	advice = append(advice, "more time")
	return joinOr(advice)
}

// countThatFits returns the least number of resistors per cell, above the plan's, for which the power bound
// lies inside the time bound with an E24 value between them; ok is false when the charger bound alone closes
// the window or no count up to 1000 per cell fits.
func countThatFits(p BleederPlan) (int, bool) {
	req := p.Request
	if p.RMinCharger > p.RMax || req.PowerRating <= 0 {
		return 0, false
	}
	tolR := *req.ResistorTolerance
	for k := p.PerCell + 1; k <= 1000; k++ {
		n := float64(k * req.Series)
		rmin := math.Max(req.Voltage*req.Voltage/(n*(1-tolR)*req.Derating*req.PowerRating), p.RMinCharger)
		if rmin <= p.RMax && len(EValues(E24, rmin/n, p.RMax/n)) > 0 {
			return k, true
		}
	}
	return 0, false
}

// joinOr joins alternatives: "a, b or c".
func joinOr(s []string) string {
	switch len(s) {
	case 0:
		return ""
	case 1:
		return s[0]
	}
	out := ""
	for i, x := range s[:len(s)-1] {
		if i > 0 {
			out += ", "
		}
		out += x
	}
	return out + " or " + s[len(s)-1]
}

// fmtOhm formats a resistance with an SI prefix ("8.2 kΩ").
func fmtOhm(r float64) string {
	switch {
	case r >= 1e6:
		return fmt.Sprintf("%.3g MΩ", r/1e6)
	case r >= 1e3:
		return fmt.Sprintf("%.3g kΩ", r/1e3)
	}
	return fmt.Sprintf("%.3g Ω", r)
}

// checkRequest validates the request and fills in the defaults.
func checkRequest(r *BleederRequest) error {
	pos := func(name string, v float64) error {
		if !(v > 0) || math.IsInf(v, 0) {
			return fmt.Errorf("%s: got %g, want a positive finite value", name, v)
		}
		return nil
	}
	for _, c := range []struct {
		name string
		v    float64
	}{{"capacitance", r.Capacitance}, {"voltage", r.Voltage}, {"safe voltage", r.SafeVoltage}, {"time allowed", r.TimeAllowed}} {
		if err := pos(c.name, c.v); err != nil {
			return err
		}
	}
	if r.Voltage <= r.SafeVoltage {
		return fmt.Errorf("voltage %g V is not above the safe voltage %g V: no bleeder is needed to reach it", r.Voltage, r.SafeVoltage)
	}
	if r.Series == 0 {
		r.Series = 1
	}
	if r.Series < 1 || r.Series > 1000 {
		return fmt.Errorf("series: got %d, want 1 to 1000 cells", r.Series)
	}
	if r.Derating == 0 {
		r.Derating = 0.5
	}
	if r.ChargerShare == 0 {
		r.ChargerShare = 0.1
	}
	if r.CapacitanceTolerance == nil {
		r.CapacitanceTolerance = Worst(defaultCapacitanceTolerance)
	}
	if r.ResistorTolerance == nil {
		r.ResistorTolerance = Worst(0.05)
	}
	for _, c := range []struct {
		name     string
		v        float64
		min, max float64
	}{
		{"derating", r.Derating, 1e-3, 1}, {"charger share", r.ChargerShare, 1e-6, 1},
		{"capacitance tolerance", *r.CapacitanceTolerance, 0, 0.99}, {"resistor tolerance", *r.ResistorTolerance, 0, 0.5},
		{"element voltage", r.ElementVoltage, 0, math.MaxFloat64}, {"power rating", r.PowerRating, 0, math.MaxFloat64},
		{"charger current", r.ChargerCurrent, 0, math.MaxFloat64},
	} {
		if !(c.v >= c.min && c.v <= c.max) {
			return fmt.Errorf("%s: got %g, want %g to %g", c.name, c.v, c.min, c.max)
		}
	}
	if r.ElementVoltage > 0 && r.Voltage/float64(r.Series)/r.ElementVoltage > 1e4 {
		return fmt.Errorf("element voltage %g V: more than 10 000 resistors per cell would be needed", r.ElementVoltage)
	}
	return nil
}

// lastN returns the last n elements of v.
func lastN(v []float64, n int) []float64 {
	if len(v) > n {
		return v[len(v)-n:]
	}
	return v
}
