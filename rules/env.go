package rules

import (
	"math"
	"strings"

	"chargeward/hazards"
)

// evalEnv is the environment one condition runs in. Every name of the namespace reaches it through the
// typed getters below (the compiler rewrites names into getter calls), which record what was read and what
// was absent. An absent value reads as the zero value, but the evaluator never judges a rule whose
// condition read an absent value: it reports that the rule could not be checked.
type evalEnv struct {
	a        *hazards.Assessment
	facts    map[string]any
	sections map[string]bool
	policy   *Policy
	limits   map[string]float64
	gap      *hazards.Gap
	override *Override // the loosened threshold a 'loosened' rule is rendering

	read    []string // names read, in order, without duplicates
	missing []string // names read that were absent
}

// reset clears what was read, for the next expression.
func (e *evalEnv) reset() {
	e.read = e.read[:0]
	e.missing = e.missing[:0]
}

func (e *evalEnv) note(path string, present bool) {
	for _, r := range e.read {
		if r == path {
			return
		}
	}
	e.read = append(e.read, path)
	if !present {
		e.missing = append(e.missing, path)
	}
}

func (e *evalEnv) lookup(path string) (any, bool) {
	switch {
	case strings.HasPrefix(path, "rig."):
		v, ok := e.facts[path]
		return v, ok
	case strings.HasPrefix(path, "policy."):
		v, ok := e.policy.Value(strings.TrimPrefix(path, "policy."))
		return v, ok
	case strings.HasPrefix(path, "limit."):
		v, ok := e.limits[path]
		return v, ok
	case path == "gap.field":
		if e.gap == nil {
			return nil, false
		}
		return e.gap.Field, true
	case path == "gap.effect":
		if e.gap == nil {
			return nil, false
		}
		return e.gap.Effect, true
	case strings.HasPrefix(path, "override."):
		if e.override == nil {
			return nil, false
		}
		switch path {
		case "override.key":
			return e.override.Key, true
		case "override.site":
			return FormatQuantity(e.override.Site, e.override.Unit), true
		case "override.reference":
			return FormatQuantity(e.override.Reference, e.override.Unit), true
		case "override.basis":
			return e.override.Basis, true
		}
		return nil, false
	case strings.HasPrefix(path, "worst."):
		if e.a == nil {
			return nil, false
		}
		q, ok := e.a.Q(strings.TrimPrefix(path, "worst."))
		if !ok {
			return nil, false
		}
		if q.Worst != nil {
			return *q.Worst, true
		}
		return q.Value, true
	}
	if e.a == nil {
		return nil, false
	}
	q, ok := e.a.Q(path)
	if !ok {
		return nil, false
	}
	return q.Value, true
}

// Num returns a numeric name (SI). Called by compiled conditions only.
func (e *evalEnv) Num(path string) float64 {
	v, ok := e.lookup(path)
	f, isNum := v.(float64)
	e.note(path, ok && isNum)
	return f
}

// Bool returns a boolean name. Called by compiled conditions only.
func (e *evalEnv) Bool(path string) bool {
	v, ok := e.lookup(path)
	b, isBool := v.(bool)
	e.note(path, ok && isBool)
	return b
}

// Str returns a string name (an enumeration value). Called by compiled conditions only.
func (e *evalEnv) Str(path string) string {
	v, ok := e.lookup(path)
	s, isStr := v.(string)
	e.note(path, ok && isStr)
	return s
}

// Stated reports whether a name or a section is present, without counting it as read.
func (e *evalEnv) Stated(path string) bool {
	if strings.HasPrefix(path, "rig.") && e.sections[path] {
		return true
	}
	_, ok := e.lookup(path)
	return ok
}

// newEnv prepares the environment for one assessment.
func newEnv(a *hazards.Assessment, p *Policy) *evalEnv {
	e := &evalEnv{a: a, policy: p}
	if a != nil {
		e.facts, e.sections = factValues(a.Rig)
	} else {
		e.facts, e.sections = factValues(nil)
	}
	e.limits = deriveLimits(e, p)
	return e
}

// deriveLimits computes the limit.* names from the policy and the rig.
func deriveLimits(e *evalEnv, p *Policy) map[string]float64 {
	l := map[string]float64{}
	val := func(k string) float64 { v, _ := p.Value(k); return v }

	// Time allowed to reach the safe voltage, by voltage class (NEC 460.6(A) ≤ 1000 V, 460.28(A) above).
	if v, ok := e.lookup("worst.bank.voltage"); ok {
		if v.(float64) > val("residual.class_boundary") {
			l["limit.time_allowed"] = val("residual.time_high")
		} else {
			l["limit.time_allowed"] = val("residual.time_low")
		}
	}
	// Eye protection: the impact the declared protection is tested at.
	if s, ok := e.facts["rig.controls.eye_protection"].(string); ok {
		switch s {
		case "none":
			l["limit.eye_speed"], l["limit.eye_energy"] = 0, 0
		case "spectacles":
			l["limit.eye_speed"], l["limit.eye_energy"] = val("eye.spectacles_speed"), val("eye.spectacles_energy")
		case "goggles":
			l["limit.eye_speed"], l["limit.eye_energy"] = val("eye.goggles_speed"), val("eye.goggles_energy")
		case "faceshield":
			l["limit.eye_speed"], l["limit.eye_energy"] = val("eye.faceshield_speed"), val("eye.faceshield_energy")
		}
	}
	if t, ok := e.facts["rig.coil.ambient_temperature"].(float64); ok {
		l["limit.ambient"] = t
	} else {
		l["limit.ambient"] = val("ambient.reference")
	}
	def := func(name, fact string) {
		if v, ok := e.facts[fact].(float64); ok {
			l[name] = v
		} else {
			l[name] = 1
		}
	}
	def("limit.cells_parallel", "rig.bank.parallel")
	def("limit.cells_series", "rig.bank.series")
	def("limit.bleeder_elements", "rig.bleeder.elements_in_series")
	def("limit.bleeder_chains", "rig.bleeder.count")

	// Launch tilt and the reach of a tilted launch: the launch stage's exclusion radius (worst case) when it
	// gives one, else R = v² sin 2θ / g on flat ground without drag (an upper bound on the real range).
	if t, ok := e.facts["rig.room.tilt"].(float64); ok {
		l["limit.tilt"] = t
	} else {
		l["limit.tilt"] = val("launch.default_tilt")
	}
	if r, ok := e.lookup("worst.launch.exclusion_radius"); ok {
		l["limit.projectile_range"] = r.(float64)
	} else if v, ok := e.lookup("worst.launch.speed"); ok {
		const g = 9.80665 // m/s², standard gravity (CGPM 1901)
		s := v.(float64)
		l["limit.projectile_range"] = s * s * math.Sin(2*l["limit.tilt"]) / g
	}

	// The peak current the switch and the cells must carry: the coil-only pulse (DESIGN.md §9's
	// pulse.peak_current), or the pulse with the projectile in place where that is larger (a conducting disc
	// on the coil lowers the loop's effective inductance and raises the peak), worst case of each.
	if p, ok := e.lookup("worst.pulse.peak_current"); ok {
		peak := p.(float64)
		if w, ok := e.lookup("worst.launch.peak_current_with_projectile"); ok {
			peak = math.Max(peak, w.(float64))
		}
		l["limit.peak_current"] = peak
	}

	// The pulse's I²t against that of the surge rating's half-sine, I_TSM²·t_p/2 (t_p 10 ms when not stated):
	// the physics' own ratio when it gives one, else from pulse.i2t and the rig's ratings (common practice,
	// equal-I²t comparison of a shorter pulse).
	if r, ok := e.lookup("worst.switch.surge_i2t_ratio"); ok {
		l["limit.surge_i2t_ratio"] = r.(float64)
	} else if i2t, ok := e.lookup("worst.pulse.i2t"); ok {
		if itsm, ok := e.facts["rig.switch.surge_current"].(float64); ok && itsm > 0 {
			tp := 10e-3 // s: one half-sine of 50 Hz, the usual base of I_TSM (IEC 60747-6 terminology)
			if t, ok := e.facts["rig.switch.surge_pulse"].(float64); ok && t > 0 {
				tp = t
			}
			l["limit.surge_i2t_ratio"] = i2t.(float64) / (itsm * itsm * tp / 2)
		}
	}

	// Predicted decay for the measured decay (from the measured charge voltage to the measured end voltage):
	// the physics gives it along the permanent paths (discharge.decay_time_predicted) and through the dump
	// (dump.decay_time_predicted); the measurement is compared with the nearer of the two, since the rig
	// does not say which path was timed.
	if meas, ok := e.facts["rig.measurements.decay_time"].(float64); ok {
		first := true
		for _, n := range []string{"discharge.decay_time_predicted", "dump.decay_time_predicted"} {
			if v, ok := e.lookup(n); ok {
				t := v.(float64)
				if first || math.Abs(t-meas) < math.Abs(l["limit.decay_predicted"]-meas) {
					l["limit.decay_predicted"] = t
				}
				first = false
			}
		}
	}
	return l
}
