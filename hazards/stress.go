package hazards

import (
	"fmt"
	"math"
)

// defaultSurgePulse is the base of a surge rating when the rig does not state it: one half-sine of 10 ms
// (50 Hz mains), the usual first figure on thyristor data sheets (IEC 60747-6 terminology).
const defaultSurgePulse = 10e-3

// reverseTolerance returns the reverse voltage, V, a cell of the dielectric tolerates and the basis, or
// ok = false for a non-polar dielectric (no polarity limit).
func reverseTolerance(dielectric string) (v float64, basis string, ok bool) {
	switch dielectric {
	case "aluminium-electrolytic":
		return 1.0, "common practice: aluminium electrolytics tolerate only about 1–1.5 V reversed; the lower end is used", true
	case "tantalum":
		return 1.0, "from memory: tantalum makers allow about 10 % of the rated voltage, at most about 1 V, reversed at 25 °C", true
	}
	return 0, "", false
}

// ratio builds a dimensionless stress quantity x/rating.
func ratio(name string, nom, worst, rating float64, formula string, in []Input, basis, note string) Quantity {
	return Quantity{Name: name, Value: nom / rating, Worst: Worst(worst / rating), Unit: "1", Formula: formula, Inputs: in, Basis: basis, Note: note}
}

// assessStress compares the pulse with the ratings of the switch and the cells (DESIGN.md §4.4). Each result
// is a ratio of stress to rating (above 1: over the rating), nominal and worst case; the rules judge them. A
// missing rating is a gap.
func assessStress(a *Assessment, nom, wst LoopModel, pn, pw PulseResult) error {
	var qs []Quantity
	if sw := a.Rig.Switch; sw != nil {
		if sw.Surge != nil && *sw.Surge > 0 {
			itsm := *sw.Surge
			tp := defaultSurgePulse
			tpNote := "surge rating base not stated: 10 ms assumed"
			if sw.SurgePulse != nil && *sw.SurgePulse > 0 {
				tp, tpNote = *sw.SurgePulse, fmt.Sprintf("surge rating base %.3g ms", *sw.SurgePulse*1e3)
			}
			ratingI2t := itsm * itsm * tp / 2
			in := []Input{{"I_TSM", "switch.surge_current", itsm, "A"}, {"t_p", "switch.surge_pulse", tp, "s"}, {"I²t", "pulse.i2t", pn.SwitchI2t, "A²s"}, {"i_peak", "pulse.peak_current", pn.PeakCurrent, "A"}}
			qs = append(qs,
				ratio("switch.surge_ratio", pn.PeakCurrent, pw.PeakCurrent, itsm, "i_peak / I_TSM", in,
					"IEC 60747-6 terminology: I_TSM is the peak of one non-repetitive half-sine of 10 ms (50 Hz) or 8.3 ms (60 Hz)",
					"peak against peak, without credit for the shorter pulse: the shorter pulse heats the junction less, so this errs towards safety; "+tpNote),
				ratio("switch.surge_i2t_ratio", pn.SwitchI2t, pw.SwitchI2t, ratingI2t, "I²t_pulse / (I_TSM² t_p / 2)", in,
					"common practice: a pulse shorter than the rating's half-sine is compared with it at equal I²t, the half-sine's I²t being I_TSM²·t_p/2",
					"valid for pulses from about 1 ms up to t_p; a much shorter pulse is limited by how fast conduction spreads across the die, for which only the maker's short-pulse curve and the di/dt check are a basis; single shots only, the die cooling fully between them"),
				Quantity{Name: "switch.pulse_to_rating_duration", Value: pn.FirstZero / tp, Worst: Worst(pw.FirstZero / tp), Unit: "1",
					Formula: "pulse.duration / t_p", Inputs: in, Basis: "comparison of pulse lengths",
					Note: "below about 0.1 (1 ms against 10 ms) the equal-I²t comparison is outside its usual range"},
			)
		} else {
			a.AddGap("switch.surge_current", "the switch's surge current rating (I_TSM) is not stated: the peak current cannot be checked against it")
		}
		if sw.I2t != nil && *sw.I2t > 0 {
			qs = append(qs, ratio("switch.i2t_ratio", pn.SwitchI2t, pw.SwitchI2t, *sw.I2t, "I²t_pulse / I²t_rating",
				[]Input{{"I²t", "pulse.i2t", pn.SwitchI2t, "A²s"}, {"I²t_rating", "switch.i2t_rating", *sw.I2t, "A²s"}},
				"IEC 60747-6 terminology: the I²t rating is for one non-repetitive pulse of the rating's duration", "single shot; no credit for the shorter pulse"))
		} else {
			a.AddGap("switch.i2t_rating", "the switch's I²t rating is not stated: the pulse's action integral cannot be checked against it")
		}
		if sw.DiDt != nil && *sw.DiDt > 0 {
			qs = append(qs, ratio("switch.di_dt_ratio", pn.DiDtMax, pw.DiDtMax, *sw.DiDt, "(di/dt)_max / (di/dt)_cr",
				[]Input{{"di/dt", "pulse.di_dt_max", pn.DiDtMax, "A/s"}, {"(di/dt)cr", "switch.di_dt_critical", *sw.DiDt, "A/s"}},
				"IEC 60747-6 terminology: critical rate of rise of on-state current", "rate of rise at turn-on set by the loop inductance; gate drive and snubber not modelled"))
		} else {
			a.AddGap("switch.di_dt_critical", "the switch's critical rate of rise of current is not stated: di/dt cannot be checked")
		}
		if sw.Blocking != nil && *sw.Blocking > 0 {
			vn := math.Max(nom.V0, pn.Reversal*nom.V0)
			vw := math.Max(wst.V0, pw.Reversal*wst.V0)
			qs = append(qs, ratio("switch.voltage_ratio", vn, vw, *sw.Blocking, "max(V0, reversed bank voltage) / V_block",
				[]Input{{"V0", "bank.voltage", nom.V0, "V"}, {"V_block", "switch.blocking_voltage", *sw.Blocking, "V"}},
				"IEC 60747-6 terminology: V_DRM / V_RRM, the repetitive peak off-state and reverse voltages",
				"the charged bank is across the open switch; a unidirectional switch also blocks the reversed bank afterwards; worst case at high line"))
		} else {
			a.AddGap("switch.blocking_voltage", "the switch's blocking voltage is not stated: it cannot be checked against the bank voltage")
		}
	}

	bm := a.m.bank
	p := float64(max(bm.P, 1))
	s := float64(max(bm.S, 1))
	cellI := []Input{{"i_peak", "pulse.peak_current", pn.PeakCurrent, "A"}, {"P", "bank.parallel", p, "1"}}
	qs = append(qs, Quantity{Name: "pulse.cell_peak_current", Value: pn.PeakCurrent / p, Worst: Worst(pw.PeakCurrent / p), Unit: "A", Formula: "i_peak / P",
		Inputs: cellI, Basis: "parallel strings share the current", Note: "equal sharing assumed; unequal ESR or wiring makes one string carry more"})
	if r := a.Rig.Bank.PeakCurrent; r != nil && *r > 0 {
		qs = append(qs, ratio("pulse.cell_peak_current_ratio", pn.PeakCurrent/p, pw.PeakCurrent/p, *r, "(i_peak / P) / I_cell,rated",
			append(cellI, Input{"I_cell,rated", "bank.peak_current_rating", *r, "A"}), "maker's peak-current rating of the cell", "equal sharing between strings"))
	} else {
		a.AddGap("bank.peak_current_rating", "the cells' peak current rating is not stated: the pulse current per cell cannot be checked")
	}
	vrN, vrW := pn.Reversal*nom.V0/s, pw.Reversal*wst.V0/s
	revIn := []Input{{"reversal", "pulse.reversal", pn.Reversal, "1"}, {"V0", "bank.voltage", nom.V0, "V"}, {"S", "bank.series", s, "1"}}
	qs = append(qs, Quantity{Name: "pulse.cell_reverse_voltage", Value: vrN, Worst: Worst(vrW), Unit: "V", Formula: "reversal · V0 / S", Inputs: revIn,
		Basis: "series cells share the reversed voltage", Note: "equal sharing assumed"})
	switch v, basis, polar := reverseTolerance(bm.Dielectric); {
	case bm.Dielectric == "":
		a.AddGap("bank.dielectric", "the cells' dielectric is not stated: the reversed voltage cannot be judged against what it tolerates")
	case polar:
		qs = append(qs, ratio("pulse.cell_reverse_ratio", vrN, vrW, v, "cell reverse voltage / tolerated reverse voltage",
			append(revIn, Input{"V_rev,tol", "tolerated by " + bm.Dielectric, v, "V"}), basis,
			"a polarised cell driven beyond it conducts, heats and may vent; a ringing or unidirectional discharge reverses it every shot"))
	}
	return addAll(a, qs...)
}
