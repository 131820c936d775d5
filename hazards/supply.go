package hazards

import (
	"fmt"
	"math"

	"chargeward/schema"
)

// Defaults used when the rig is silent. Each is stated in the Note of every quantity that uses it.
const (
	defaultMainsTolerance = 0.10 // +10 %: the high-line corner (IEC 60038 allows ±10 % at the supply terminals)
	defaultMainsFrequency = 50.0 // Hz; the lower of the two common mains frequencies gives the longer ripple period
	defaultDiodeDrop      = 1.0  // V per silicon rectifier diode at charging current (common practice)
	// assumedRegulationRise is the no-load rise used in the worst case when a transformer's regulation is not
	// stated: small mains transformers commonly rise 5–20 % at no load (common practice, from memory); 10 %
	// is used and a Gap is recorded.
	assumedRegulationRise = 0.10
)

// Basis strings shared by several quantities.
const (
	basisRectifier = "common practice: a capacitor-input rectifier at no load charges to the peak of its AC input " +
		"less the diode drops on the charging path; an n-stage Cockcroft–Walton (Greinacher) multiplier to 2n times " +
		"that peak (Horowitz & Hill, The Art of Electronics, 3rd ed., ch. 9; section from memory)"
	basisRC = "first-order RC step response v(t) = V(1 − e^(−t/τ)), τ = RC (Alexander & Sadiku, Fundamentals of " +
		"Electric Circuits, 5th ed., ch. 7; section from memory)"
	basisChargingLoss = "charging a capacitor from a constant source through any resistance dissipates in the " +
		"resistance as much energy as ends up stored, ½CV² (Alexander & Sadiku, Fundamentals of Electric Circuits, " +
		"5th ed., ch. 6–7; section from memory)"
)

// supplyPeak is the result of peakVoltage: the no-load DC the supply can put on the bank.
type supplyPeak struct {
	V, VWorst float64 // V; nominal line and the high-line, no-load corner
	HasWorst  bool    // false for a dc supply, whose stated maximum output has no line tolerance
	Formula   string
	Inputs    []Input
	Note      string
	Basis     string
}

// rectifierFactor returns the multiple k of the AC peak and the number of diode drops on the charging path for a
// rectifier kind: half-wave (1, 1), bridge (1, 2), doubler (2, 2), n-stage multiplier (2n, 2n).
func rectifierFactor(kind string, stages *int) (k float64, diodes int, err error) {
	switch kind {
	case "half-wave":
		return 1, 1, nil
	case "bridge":
		return 1, 2, nil
	case "doubler":
		return 2, 2, nil
	case "multiplier":
		n := 1
		if stages != nil {
			n = *stages
		}
		if n < 1 {
			return 0, 0, fmt.Errorf("supply.stages: got %d, want ≥ 1", n)
		}
		return 2 * float64(n), 2 * n, nil
	}
	return 0, 0, fmt.Errorf("supply.rectifier: unknown kind %q", kind)
}

// peakVoltage returns the no-load peak DC voltage the supply can put on the bank (DESIGN.md §4.1).
//
// Mains rectifier: Vpk = k·√2·Vac − n·Vd, where Vac is the RMS input to the rectifier (the mains, or the
// transformer secondaries scaled by mains/primary and raised by the no-load regulation; secondaries in series
// add, in parallel they do not), k and n come from rectifierFactor and Vd is the forward drop per diode. The
// worst case takes high line Vac·(1+tol). Units: V. Valid for a capacitor-input rectifier at no load (the state
// of a fully charged bank). A dc supply gives its stated maximum output. ok is false when the rig does not state
// enough (the gaps say what); err reports an impossible state.
func peakVoltage(r *schema.Rig) (p supplyPeak, ok bool, gaps []Gap, err error) {
	s := r.Supply
	if s == nil {
		return p, false, []Gap{{"supply", "no charger is described, so the supply's peak voltage and the charge voltage cannot be computed"}}, nil
	}
	kind := s.Kind
	if kind == "" {
		kind = "mains-rectifier"
	}
	if kind == "dc-supply" {
		if s.DCVoltage == nil {
			return p, false, []Gap{{"supply.dc_voltage", "the dc supply's maximum output is not stated, so the peak voltage on the bank cannot be computed"}}, nil
		}
		v := *s.DCVoltage
		if !(v > 0) || math.IsInf(v, 0) {
			return p, false, nil, fmt.Errorf("supply.dc_voltage: got %g V, want a positive finite voltage", v)
		}
		p = supplyPeak{V: v, VWorst: v, Formula: "Vpk = Vdc,max",
			Inputs: []Input{{"Vdc,max", "supply.dc_voltage", v, "V"}},
			Note:   "the dc supply's stated maximum output; no line tolerance applies",
			Basis:  "the supply's stated rating"}
		return p, true, nil, nil
	}
	if kind != "mains-rectifier" {
		return p, false, nil, fmt.Errorf("supply.kind: unknown kind %q", kind)
	}
	if s.Rectifier == "" {
		return p, false, []Gap{{"supply.rectifier", "the rectifier kind is not stated, so the supply's peak voltage cannot be computed"}}, nil
	}
	k, nd, err := rectifierFactor(s.Rectifier, s.Stages)
	if err != nil {
		return p, false, nil, err
	}
	var notes []string
	tol := defaultMainsTolerance
	if s.MainsTolerance != nil {
		tol = *s.MainsTolerance
	} else {
		notes = append(notes, "mains tolerance not stated: +10 % assumed for high line")
	}
	vd := defaultDiodeDrop
	if s.DiodeDrop != nil {
		vd = *s.DiodeDrop
	} else {
		notes = append(notes, "diode drop not stated: 1 V per diode assumed")
	}
	var inputs []Input
	var vac, vacWorst float64 // RMS at the rectifier input, nominal and high-line no-load
	if len(s.Transformers) == 0 {
		if s.MainsVoltage == nil {
			return p, false, []Gap{{"supply.mains_voltage", "the mains voltage is not stated, so the supply's peak voltage cannot be computed"}}, nil
		}
		vac = *s.MainsVoltage
		vacWorst = vac * (1 + tol)
		inputs = append(inputs, Input{"Vac", "supply.mains_voltage", vac, "V"})
		notes = append(notes, "rectifier fed straight from the mains (no transformer)")
	} else {
		conn := s.Secondaries
		n := 0
		for _, t := range s.Transformers {
			c := 1
			if t.Count != nil {
				c = *t.Count
			}
			if c < 1 {
				return p, false, nil, fmt.Errorf("supply.transformers.count: got %d, want ≥ 1", c)
			}
			n += c
		}
		if conn == "" {
			conn = "single"
			if n > 1 {
				conn = "series"
				notes = append(notes, "secondary connection not stated for several transformers: series assumed (the higher voltage)")
			}
		}
		var sum, sumWorst, maxV, maxWorst float64
		for i, t := range s.Transformers {
			if t.SecondaryVoltage == nil {
				return p, false, []Gap{{fmt.Sprintf("supply.transformers[%d].secondary_voltage", i), "a transformer's secondary voltage is not stated, so the supply's peak voltage cannot be computed"}}, nil
			}
			ratio := 1.0
			if t.PrimaryVoltage != nil && *t.PrimaryVoltage > 0 {
				if s.MainsVoltage != nil {
					ratio = *s.MainsVoltage / *t.PrimaryVoltage
					inputs = append(inputs, Input{"Vpri", fmt.Sprintf("supply.transformers[%d].primary_voltage", i), *t.PrimaryVoltage, "V"})
				} else {
					notes = append(notes, "mains voltage not stated: the transformer is taken at its rated primary")
				}
			} else if i == 0 {
				notes = append(notes, "transformer primary rating not stated: the secondary is taken at its rating at the stated mains")
			}
			rise, riseWorst := 0.0, assumedRegulationRise
			if t.Regulation != nil {
				rise, riseWorst = *t.Regulation, *t.Regulation
				inputs = append(inputs, Input{"reg", fmt.Sprintf("supply.transformers[%d].regulation", i), rise, "1"})
			} else {
				gaps = append(gaps, Gap{fmt.Sprintf("supply.transformers[%d].regulation", i), "the transformer's no-load rise is not stated; the worst-case peak assumes 10 %"})
				notes = append(notes, "transformer regulation not stated: nominal without no-load rise, worst case with 10 % assumed")
			}
			vs := *t.SecondaryVoltage
			inputs = append(inputs, Input{"Vsec", fmt.Sprintf("supply.transformers[%d].secondary_voltage", i), vs, "V"})
			c := 1
			if t.Count != nil {
				c = *t.Count
			}
			v := vs * ratio * (1 + rise)
			vw := vs * ratio * (1 + riseWorst) * (1 + tol)
			sum += float64(c) * v
			sumWorst += float64(c) * vw
			maxV, maxWorst = math.Max(maxV, v), math.Max(maxWorst, vw)
		}
		switch conn {
		case "series":
			vac, vacWorst = sum, sumWorst
			notes = append(notes, fmt.Sprintf("%d secondaries in series add", n))
		case "parallel", "single":
			vac, vacWorst = maxV, maxWorst
			if conn == "parallel" {
				notes = append(notes, "secondaries in parallel: the highest secondary is used")
			}
		default:
			return p, false, nil, fmt.Errorf("supply.secondaries: unknown connection %q", conn)
		}
		notes = append(notes, "the secondary includes its no-load rise in both cases, because a fully charged bank draws no current")
	}
	inputs = append(inputs, Input{"k", "supply.rectifier", k, "1"}, Input{"n", "supply.rectifier", float64(nd), "1"},
		Input{"Vd", "supply.diode_drop", vd, "V"}, Input{"tol", "supply.mains_tolerance", tol, "1"})
	p = supplyPeak{
		V:        k*math.Sqrt2*vac - float64(nd)*vd,
		VWorst:   k*math.Sqrt2*vacWorst - float64(nd)*vd,
		HasWorst: true,
		Formula:  "Vpk = k·√2·Vac − n·Vd; worst at high line Vac·(1+tol)",
		Inputs:   inputs,
		Basis:    basisRectifier,
	}
	notes = append([]string{fmt.Sprintf("%s rectifier: k = %g, %d diode drops", s.Rectifier, k, nd)}, notes...)
	p.Note = joinNotes(notes)
	if !(p.V > 0) {
		return p, false, nil, fmt.Errorf("supply: the diode drops (%d × %g V) exceed the rectified peak (%g V)", nd, vd, k*math.Sqrt2*vac)
	}
	return p, true, gaps, nil
}

// chargeState is the bank's charge voltage for the review.
type chargeState struct {
	V, VWorst float64 // V
	Formula   string
	Inputs    []Input
	Note      string
	Basis     string
}

// chargeVoltage returns the charge voltage used for the review: the supply peak, capped by a stated regulated
// voltage; raised to a measured charge voltage if one higher than the prediction is stated (a review never uses
// less than was observed). With no computable supply it falls back to a measured charge voltage, then to the
// bank's voltage rating; each fallback is said in the Note and recorded as a Gap by peakVoltage.
func chargeVoltage(r *schema.Rig) (cs chargeState, ok bool, err error) {
	p, pok, _, err := peakVoltage(r)
	if err != nil {
		return cs, false, err
	}
	var notes []string
	var measured *float64
	if r.Measurements != nil && r.Measurements.ChargeVoltage != nil && *r.Measurements.ChargeVoltage > 0 {
		measured = r.Measurements.ChargeVoltage
	}
	switch {
	case pok:
		cs = chargeState{V: p.V, VWorst: p.VWorst, Formula: "V = Vpk", Basis: p.Basis,
			Inputs: []Input{{"Vpk", "supply.peak_voltage", p.V, "V"}}}
		if r.Supply.Regulated != nil && *r.Supply.Regulated > 0 {
			reg := *r.Supply.Regulated
			cs.Formula = "V = min(Vreg, Vpk)"
			cs.Inputs = append(cs.Inputs, Input{"Vreg", "supply.regulated_voltage", reg, "V"})
			cs.V, cs.VWorst = math.Min(reg, p.V), math.Min(reg, p.VWorst)
			notes = append(notes, "capped by the regulated charge voltage; if the regulation fails the bank reaches supply.peak_voltage")
		}
		if !p.HasWorst {
			notes = append(notes, "dc supply: the worst case equals the stated maximum output")
		} else {
			notes = append(notes, "worst case at high line: "+p.Note)
		}
	case measured != nil:
		cs = chargeState{V: *measured, VWorst: *measured, Formula: "V = Vmeasured", Basis: "measured on the rig",
			Inputs: []Input{{"Vmeasured", "measurements.charge_voltage", *measured, "V"}}}
		notes = append(notes, "supply not computable: the measured charge voltage is used; it has no tolerance corner")
		measured = nil
	case r.Bank.VoltageRating != nil && *r.Bank.VoltageRating > 0:
		s := 1
		if r.Bank.Series != nil {
			s = *r.Bank.Series
		}
		v := float64(s) * *r.Bank.VoltageRating
		cs = chargeState{V: v, VWorst: v, Formula: "V = S·Vr,cell (assumed)", Basis: "assumption: the bank may be charged to its voltage rating",
			Inputs: []Input{{"Vr,cell", "bank.voltage_rating", *r.Bank.VoltageRating, "V"}, {"S", "bank.series", float64(s), "1"}}}
		notes = append(notes, "supply not computable and no measured charge voltage: the bank is assumed charged to its rated voltage")
	default:
		return cs, false, nil
	}
	if measured != nil && *measured > cs.V {
		cs.Inputs = append(cs.Inputs, Input{"Vmeasured", "measurements.charge_voltage", *measured, "V"})
		notes = append(notes, fmt.Sprintf("the measured charge voltage %.4g V exceeds the prediction %.4g V and is used as nominal", *measured, cs.V))
		cs.Formula += "; raised to the measured voltage"
		cs.V = *measured
		cs.VWorst = math.Max(cs.VWorst, *measured)
	}
	cs.Note = joinNotes(notes)
	return cs, true, nil
}

// assessSupply computes the supply quantities (DESIGN.md §4.1): supply.peak_voltage, and where a charging
// resistor (or a dc supply's current limit) and the bank are stated, supply.charge_time_constant,
// supply.time_to_95, supply.inrush_current, supply.charging_loss and supply.charging_resistor_peak_power.
func assessSupply(a *Assessment) error {
	r := a.Rig
	p, ok, gaps, err := peakVoltage(r)
	if err != nil {
		return err
	}
	for _, g := range gaps {
		a.AddGap(g.Field, g.Effect)
	}
	if !ok {
		return nil
	}
	q := Quantity{Name: "supply.peak_voltage", Value: p.V, Unit: "V", Formula: p.Formula, Inputs: p.Inputs, Basis: p.Basis, Note: p.Note}
	if p.HasWorst {
		q.Worst = Worst(p.VWorst)
	}
	if err := a.Add(q); err != nil {
		return err
	}
	cs, ok, err := chargeVoltage(r)
	if err != nil || !ok {
		return err
	}
	bk, ok, err := bankCapacitance(r)
	if err != nil || !ok {
		return err // the bank stage records the gap
	}
	s := r.Supply
	var ilim float64 // A; 0 = no current limit
	if s.Kind == "dc-supply" && s.DCCurrent != nil && *s.DCCurrent > 0 {
		ilim = *s.DCCurrent
	}
	if s.ChargingResistor == nil || !(*s.ChargingResistor > 0) {
		if ilim == 0 {
			a.AddGap("supply.charging_resistor", "no charging resistor is stated: the charging time, the inrush current and the charging loss cannot be computed; without one the inrush is limited only by the source and diode impedance")
			return nil
		}
		// Constant-current charge from a current-limited dc supply.
		t95 := 0.95 * bk.C * cs.V / ilim
		t95w := 0.95 * bk.CWorst * cs.VWorst / ilim
		in := []Input{{"C", "bank.capacitance", bk.C, "F"}, {"V", "bank.voltage", cs.V, "V"}, {"Ilim", "supply.current_limit", ilim, "A"}}
		return addAll(a,
			Quantity{Name: "supply.time_to_95", Value: t95, Worst: Worst(t95w), Unit: "s", Formula: "t95 = 0.95·C·V/Ilim (constant-current charge)",
				Inputs: in, Basis: "i = C·dv/dt at constant current (Alexander & Sadiku, Fundamentals of Electric Circuits, 5th ed., ch. 6; section from memory)",
				Note: "no charging resistor: the supply's current limit sets the charge rate; worst case at +C tolerance and worst charge voltage"},
			Quantity{Name: "supply.inrush_current", Value: ilim, Unit: "A", Formula: "I0 = Ilim", Inputs: in[2:],
				Basis: "the supply's stated current limit", Note: "no charging resistor: the inrush is the supply's current limit"})
	}
	rc := *s.ChargingResistor
	tau, tauW := rc*bk.C, rc*bk.CWorst
	inRC := []Input{{"R", "supply.charging_resistor", rc, "Ω"}, {"C", "bank.capacitance", bk.C, "F"}}
	tolNote := "worst case at +C tolerance (" + pct(bk.Tol) + ")"
	if err := a.Add(Quantity{Name: "supply.charge_time_constant", Value: tau, Worst: Worst(tauW), Unit: "s", Formula: "τ = R·C",
		Inputs: inRC, Basis: basisRC, Note: tolNote}); err != nil {
		return err
	}
	t95, i0, loss := chargeRC(rc, bk.C, cs.V, ilim)
	t95w, i0w, lossw := chargeRC(rc, bk.CWorst, cs.VWorst, ilim)
	inV := append(append([]Input{}, inRC...), Input{"V", "bank.voltage", cs.V, "V"})
	formula95 := "t95 = τ·ln 20 ≈ 3τ"
	formulaI := "I0 = V/R"
	formulaLoss := "W_R = ½CV²"
	basisLoss := basisChargingLoss
	basis95 := basisRC
	note := "from an empty bank to full charge; " + tolNote + " and worst charge voltage"
	if ilim > 0 && ilim*rc < cs.V {
		inV = append(inV, Input{"Ilim", "supply.current_limit", ilim, "A"})
		formula95 = "constant current to V − Ilim·R, t1 = C(V − Ilim·R)/Ilim, then RC decay to 5 % of V"
		formulaI = "I0 = min(V/R, Ilim)"
		formulaLoss = "W_R = Ilim²·R·t1 + ½C(Ilim·R)²"
		basis95 = "constant-current then first-order RC charge (Alexander & Sadiku, Fundamentals of Electric Circuits, 5th ed., ch. 6–7; section from memory)"
		basisLoss = basis95
		note += "; the supply's current limit governs the start of the charge and the rest of the loss falls in the supply"
	} else if s.Kind != "dc-supply" {
		note += "; a rectified mains source charges only near the crests, so the real charge is slower than this DC-equivalent figure and the loss of the same order (the mains frequency is not used)"
	}
	if err := addAll(a,
		Quantity{Name: "supply.time_to_95", Value: t95, Worst: Worst(t95w), Unit: "s", Formula: formula95, Inputs: inV, Basis: basis95, Note: note},
		Quantity{Name: "supply.inrush_current", Value: i0, Worst: Worst(i0w), Unit: "A", Formula: formulaI, Inputs: inV, Basis: "Ohm's law at the first instant of charge, the bank voltage being zero",
			Note: "into an empty bank; worst case at the worst charge voltage"},
		Quantity{Name: "supply.charging_loss", Value: loss, Worst: Worst(lossw), Unit: "J", Formula: formulaLoss, Inputs: inV, Basis: basisLoss, Note: note},
		Quantity{Name: "supply.charging_resistor_peak_power", Value: i0 * i0 * rc, Worst: Worst(i0w * i0w * rc), Unit: "W", Formula: "P0 = I0²·R", Inputs: inV,
			Basis: "Joule heating P = I²R", Note: "at the first instant of charge; the resistor must carry this as a pulse (compare with its pulse rating, not only supply.charging_resistor_power)"},
		Quantity{Name: "supply.charging_resistor_mean_power", Value: loss / t95, Worst: Worst(lossw / t95w), Unit: "W", Formula: "P̄ = W_R/t95", Inputs: inV,
			Basis: "mean of the Joule heating over one charge", Note: "the whole charging loss spread over the time to 95 % (slightly high); repeated charges heat the resistor at this rate"},
	); err != nil {
		return err
	}
	if s.ChargingResistorPower == nil || !(*s.ChargingResistorPower > 0) {
		a.AddGap("supply.charging_resistor_power", "the charging resistor's power rating is not stated, so its loading during a charge cannot be checked")
		return nil
	}
	pr := *s.ChargingResistorPower
	return a.Add(Quantity{Name: "supply.charging_resistor_power_fraction", Value: loss / t95 / pr, Worst: Worst(lossw / t95w / pr), Unit: "1", Formula: "P̄/Prated",
		Inputs: []Input{{"P̄", "supply.charging_resistor_mean_power", loss / t95, "W"}, {"Prated", "supply.charging_resistor_power", pr, "W"}},
		Basis:  "ratio to the rated continuous power", Note: "resistors tolerate short overloads by their makers' short-time ratings; above 1 over repeated charges the resistor overheats"})
}

// chargeRC returns the time to 95 % of V, the initial current and the energy dissipated in R when an empty
// capacitor C (F) charges to V (V) through R (Ω) from a source limited to ilim (A; 0 = unlimited).
//
// Unlimited, or ilim·R ≥ V: t95 = RC·ln 20, I0 = V/R, W = ½CV². Otherwise the source first delivers ilim until
// the capacitor reaches V − ilim·R (t1 = C(V − ilim·R)/ilim, dissipating ilim²·R·t1 in R), then the remaining gap
// ilim·R decays with τ = RC (dissipating ½C(ilim·R)²). Source: first-order circuit analysis (Alexander & Sadiku,
// Fundamentals of Electric Circuits, 5th ed., ch. 7; section from memory).
func chargeRC(r, c, v, ilim float64) (t95, i0, loss float64) {
	if ilim <= 0 || ilim*r >= v {
		return r * c * math.Log(20), v / r, 0.5 * c * v * v
	}
	gap := ilim * r
	t1 := c * (v - gap) / ilim
	if gap <= 0.05*v {
		t95 = c * 0.95 * v / ilim
	} else {
		t95 = t1 + r*c*math.Log(gap/(0.05*v))
	}
	return t95, ilim, ilim*ilim*r*t1 + 0.5*c*gap*gap
}

// addAll adds each quantity, stopping at the first error.
func addAll(a *Assessment, qs ...Quantity) error {
	for _, q := range qs {
		if err := a.Add(q); err != nil {
			return err
		}
	}
	return nil
}

// joinNotes joins note clauses with "; ".
func joinNotes(n []string) string {
	out := ""
	for i, s := range n {
		if i > 0 {
			out += "; "
		}
		out += s
	}
	return out
}

// pct formats a fraction as a percentage ("20 %").
func pct(f float64) string { return fmt.Sprintf("%.3g %%", 100*f) }
