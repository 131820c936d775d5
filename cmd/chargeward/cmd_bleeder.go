package main

import (
	"encoding/json"
	"errors"
	"flag"
	"fmt"
	"io"
	"strings"

	"chargeward/hazards"
	"chargeward/schema"
)

var bleederCommand = command{name: "bleeder", summary: "size a permanent bleeder resistor for a bank", run: runBleeder}

const bleederUsage = `Usage: chargeward bleeder --capacitance C --voltage V [options]

Sizes a permanent bleeder across a capacitor bank: the window of resistance that brings the bank from V to
the safe voltage within the time allowed (at the slow tolerance corner) without overloading the resistors
or the charger, the IEC 60063 E12 and E24 values inside it, how many resistors in series, the power rating
each needs and the time to safe each gives. With --series, one group of resistors goes across each cell,
so the bleeder also balances the cells.

Without --safe and --within the residual-voltage target of NFPA 70 (NEC) 2023 applies: 50 V within 1 min
up to 1000 V (460.6(A)), within 5 min above (460.28(A)). Local codes and your institution's electrical
safety program govern; have the design checked by a qualified person, and verify with a meter before
touching the bank.

Values take units: 1100uF, 680V, 50V, 60s, 350V, 2W, 50%, 20mA.
Exit status: 0 a plan was found, 2 bad input or no standard resistor meets the request.
`

// quantityFlag is a flag holding a value with a unit, parsed by schema.ParseQuantity.
type quantityFlag struct {
	unit string
	v    float64
	set  bool
}

func (q *quantityFlag) String() string {
	if q == nil || !q.set {
		return ""
	}
	return fmt.Sprintf("%g", q.v)
}

func (q *quantityFlag) Set(s string) error {
	v, err := schema.ParseQuantity(s, q.unit)
	if err != nil {
		var qe *schema.QuantityError
		if errors.As(err, &qe) && qe.Detail != "" {
			return fmt.Errorf("%s (%s)", qe.Summary, strings.TrimSuffix(qe.Detail, "."))
		}
		return err
	}
	q.v, q.set = v, true
	return nil
}

func runBleeder(args []string, e *env) error {
	fs := newFlags("bleeder", bleederUsage, e)
	c := &quantityFlag{unit: "F"}
	v := &quantityFlag{unit: "V"}
	safe := &quantityFlag{unit: "V"}
	within := &quantityFlag{unit: "s"}
	elemV := &quantityFlag{unit: "V"}
	power := &quantityFlag{unit: "W"}
	derating := &quantityFlag{unit: "1"}
	charger := &quantityFlag{unit: "A"}
	share := &quantityFlag{unit: "1"}
	capTol := &quantityFlag{unit: "1"}
	resTol := &quantityFlag{unit: "1"}
	fs.Var(c, "capacitance", "equivalent capacitance of the bank (required), e.g. 1100uF")
	fs.Var(v, "voltage", "highest charge voltage of the bank (required), e.g. 680V")
	fs.Var(safe, "safe", "residual voltage to reach (default 50V, NEC 460)")
	fs.Var(within, "within", "time allowed to reach it (default 60s up to 1000 V, 300s above; NEC 460)")
	series := fs.Int("series", 1, "series cells in the bank; one resistor group goes across each cell")
	fs.Var(elemV, "element-voltage", "voltage rating of one resistor; more resistors per cell keep each below it")
	fs.Var(power, "power", "power rating of one resistor; without it the plan states the rating needed")
	fs.Var(derating, "derating", "fraction of rated power allowed continuously (default 50%)")
	fs.Var(charger, "charger-current", "charger current capability; the bleeder may take --charger-share of it")
	fs.Var(share, "charger-share", "share of the charger current the bleeder may take (default 10%)")
	fs.Var(capTol, "cap-tolerance", "capacitance tolerance, ± (default 20%)")
	fs.Var(resTol, "tolerance", "resistor tolerance, ± (default 5%)")
	format := fs.String("format", "text", "output format: text or json")
	if done, err := parseFlags(fs, args, e); done {
		return err
	}
	bad := func(format string, a ...any) error {
		fmt.Fprintf(e.stderr, "chargeward bleeder: "+format+"\n", a...)
		return exitError{exitBadInput}
	}
	if fs.NArg() > 0 {
		return bad("unexpected argument %q; every value is given with a flag (see --help)", fs.Arg(0))
	}
	if !c.set || !v.set {
		return bad("--capacitance and --voltage are required (see --help)")
	}
	if *format != "text" && *format != "json" {
		return bad("--format: got %q, want text or json", *format)
	}
	req := hazards.BleederRequest{Capacitance: c.v, Voltage: v.v, Series: *series, ElementVoltage: elemV.v, PowerRating: power.v,
		Derating: derating.v, ChargerCurrent: charger.v, ChargerShare: share.v}
	dSafe, dWithin, basis := hazards.ResidualTarget(v.v)
	req.SafeVoltage, req.TimeAllowed = dSafe, dWithin
	targetBasis := basis
	if safe.set {
		req.SafeVoltage = safe.v
	}
	if within.set {
		req.TimeAllowed = within.v
	}
	if safe.set || within.set {
		targetBasis = "as given on the command line"
		if !safe.set || !within.set {
			targetBasis += "; the rest from " + basis
		}
	}
	if derating.set && derating.v == 0 || share.set && share.v == 0 {
		return bad("--derating and --charger-share must be above 0")
	}
	if capTol.set {
		req.CapacitanceTolerance = &capTol.v
	}
	if resTol.set {
		req.ResistorTolerance = &resTol.v
	}
	plan, err := hazards.SizeBleeder(req)
	var we *hazards.WindowError
	switch {
	case errors.As(err, &we):
		if *format == "json" {
			if err := writeBleederJSON(e.stdout, we.Plan, targetBasis, we); err != nil {
				return err
			}
		} else {
			writeBleederText(e.stdout, we.Plan, targetBasis)
		}
		fmt.Fprintf(e.stderr, "chargeward bleeder: no standard resistor meets the request: the %s bound wins (R ≥ %s against R ≤ %s from the time limit).\nTo change: %s.\n",
			we.Winner, ohms(we.Plan.RMin), ohms(we.Plan.RMax), we.Advice)
		return exitError{exitBadInput}
	case err != nil:
		return bad("%v", err)
	}
	if *format == "json" {
		return writeBleederJSON(e.stdout, plan, targetBasis, nil)
	}
	writeBleederText(e.stdout, plan, targetBasis)
	return nil
}

// writeBleederText prints the plan as a short report.
func writeBleederText(w io.Writer, p hazards.BleederPlan, targetBasis string) {
	r := p.Request
	fmt.Fprintf(w, "Bleeder for %s charged to %s, to %s within %s (%s)\n\n", farads(r.Capacitance), volts(r.Voltage), volts(r.SafeVoltage), seconds(r.TimeAllowed), targetBasis)
	fmt.Fprintf(w, "Resistors in series  %d (%d per cell × %d cells), %s across each\n", p.Elements, p.PerCell, r.Series, volts(p.ElementVoltage))
	upper := "∞"
	if p.RMax > 0 {
		upper = ohms(p.RMax)
	}
	fmt.Fprintf(w, "Window (whole chain) %s to %s   upper bound: time; lower bound: %s\n", ohms(p.RMin), upper, p.LowerBound)
	if p.RMinPower > 0 {
		fmt.Fprintf(w, "  power bound        R ≥ %s\n", ohms(p.RMinPower))
	}
	if p.RMinCharger > 0 {
		fmt.Fprintf(w, "  charger bound      R ≥ %s\n", ohms(p.RMinCharger))
	}
	fmt.Fprintf(w, "Window (each)        %s to %s\n", ohms(p.EMin), ohms(p.EMax))
	fmt.Fprintf(w, "E12 in window        %s\n", list(p.E12))
	fmt.Fprintf(w, "E24 in window        %s\n", list(p.E24))
	if len(p.Choices) > 0 {
		fmt.Fprintf(w, "\n%-6s %-10s %-10s %-16s %-16s %-10s %s\n", "series", "each", "chain", "time to safe", "worst case", "power", "rating needed")
		for _, c := range p.Choices {
			rating := "over 100 W: split the chain"
			if c.PowerStandard > 0 {
				rating = fmt.Sprintf("%.3g W (use %g W)", c.PowerNeeded, c.PowerStandard)
			}
			fmt.Fprintf(w, "%-6s %-10s %-10s %-16s %-16s %-10s %s\n", c.Series, ohms(c.Element), ohms(c.Total), seconds(c.TimeToSafe), seconds(c.TimeToSafeWorst),
				fmt.Sprintf("%.3g W", c.Power), rating)
		}
	}
	fmt.Fprintln(w, "\nAssumptions:")
	for _, a := range p.Assumptions {
		fmt.Fprintln(w, "  -", a)
	}
	fmt.Fprintln(w, "Basis:")
	for _, b := range p.Basis {
		fmt.Fprintln(w, "  -", b)
	}
	fmt.Fprintln(w, "\nA bleeder can fail open: verify the bank voltage with a meter and short it with a grounding hook before")
	fmt.Fprintln(w, "touching. Local codes and your institution's electrical safety program govern.")
}

// bleederJSON is the machine-readable plan; every value in SI units.
type bleederJSON struct {
	Capacitance float64         `json:"capacitance"`
	Voltage     float64         `json:"voltage"`
	SafeVoltage float64         `json:"safe_voltage"`
	TimeAllowed float64         `json:"time_allowed"`
	TargetBasis string          `json:"target_basis"`
	Series      int             `json:"series"`
	PerCell     int             `json:"resistors_per_cell"`
	Elements    int             `json:"resistors_in_series"`
	ElementV    float64         `json:"element_voltage"`
	RMin        float64         `json:"resistance_min"`
	RMax        float64         `json:"resistance_max"`
	RMinPower   float64         `json:"resistance_min_power,omitempty"`
	RMinCharger float64         `json:"resistance_min_charger,omitempty"`
	LowerBound  string          `json:"lower_bound"`
	EMin        float64         `json:"element_min"`
	EMax        float64         `json:"element_max"`
	E12         []float64       `json:"e12"`
	E24         []float64       `json:"e24"`
	Choices     []choiceJSON    `json:"choices"`
	Assumptions []string        `json:"assumptions"`
	Basis       []string        `json:"basis"`
	Error       *bleederErrJSON `json:"error,omitempty"`
}

type choiceJSON struct {
	Series          string  `json:"series"`
	Element         float64 `json:"element"`
	Total           float64 `json:"total"`
	TimeToSafe      float64 `json:"time_to_safe"`
	TimeToSafeWorst float64 `json:"time_to_safe_worst"`
	Power           float64 `json:"power"`
	PowerWorst      float64 `json:"power_worst"`
	PowerNeeded     float64 `json:"power_rating_needed"`
	PowerStandard   float64 `json:"power_rating_standard"`
	Current         float64 `json:"current"`
}

type bleederErrJSON struct {
	Winner string `json:"winning_bound"`
	Advice string `json:"advice"`
}

func writeBleederJSON(w io.Writer, p hazards.BleederPlan, targetBasis string, we *hazards.WindowError) error {
	r := p.Request
	out := bleederJSON{Capacitance: r.Capacitance, Voltage: r.Voltage, SafeVoltage: r.SafeVoltage, TimeAllowed: r.TimeAllowed, TargetBasis: targetBasis,
		Series: r.Series, PerCell: p.PerCell, Elements: p.Elements, ElementV: p.ElementVoltage, RMin: p.RMin, RMax: p.RMax,
		RMinPower: p.RMinPower, RMinCharger: p.RMinCharger, LowerBound: p.LowerBound, EMin: p.EMin, EMax: p.EMax,
		E12: nonNil(p.E12), E24: nonNil(p.E24), Choices: []choiceJSON{}, Assumptions: p.Assumptions, Basis: p.Basis}
	for _, c := range p.Choices {
		out.Choices = append(out.Choices, choiceJSON(c))
	}
	if we != nil {
		out.Error = &bleederErrJSON{Winner: we.Winner, Advice: we.Advice}
	}
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(out)
}

func nonNil(v []float64) []float64 {
	if v == nil {
		return []float64{}
	}
	return v
}

func list(v []float64) string {
	if len(v) == 0 {
		return "none"
	}
	s := make([]string, len(v))
	for i, x := range v {
		s[i] = ohms(x)
	}
	return strings.Join(s, " ")
}

// eng formats v with an SI prefix and 3 significant figures ("8.2 kΩ", "1.1 mF").
func eng(v float64, unit string) string {
	prefixes := []struct {
		f float64
		p string
	}{{1e9, "G"}, {1e6, "M"}, {1e3, "k"}, {1, ""}, {1e-3, "m"}, {1e-6, "µ"}, {1e-9, "n"}, {1e-12, "p"}}
	if v == 0 {
		return "0 " + unit
	}
	a := v
	if a < 0 {
		a = -a
	}
	for _, p := range prefixes {
		if a >= p.f*(1-1e-9) {
			return fmt.Sprintf("%.3g %s%s", v/p.f, p.p, unit)
		}
	}
	return fmt.Sprintf("%.3g %s", v, unit)
}

func ohms(v float64) string   { return eng(v, "Ω") }
func volts(v float64) string  { return fmt.Sprintf("%.4g V", v) }
func farads(v float64) string { return eng(v, "F") }
func seconds(v float64) string {
	if v >= 600 {
		return fmt.Sprintf("%.3g s (%.3g min)", v, v/60)
	}
	return fmt.Sprintf("%.3g s", v)
}

var _ flag.Value = (*quantityFlag)(nil)
