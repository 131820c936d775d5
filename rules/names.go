package rules

import (
	"reflect"
	"sort"
	"strings"

	"chargeward/schema"
)

// kind is the type a name has inside a condition.
type kind int

const (
	kindNum  kind = iota + 1 // float64 (counts are numbers too)
	kindBool                 // bool
	kindStr                  // string (enumerations)
)

func (k kind) String() string {
	switch k {
	case kindNum:
		return "number"
	case kindBool:
		return "bool"
	case kindStr:
		return "string"
	}
	return "invalid"
}

// nameInfo describes one name a condition may read.
type nameInfo struct {
	kind kind
	unit string // SI unit symbol for numbers; "" for bool and string
}

// quantityCatalog lists the assessment quantities a rule may name (DESIGN.md §9 and those the physics
// stages add), with their units. A condition naming anything else is a load diagnostic, so a misspelling
// is caught before a rig is judged. A quantity in this list may still be absent from an assessment; a rule
// that reads an absent quantity yields a "could not be checked" finding.
var quantityCatalog = map[string]string{
	// supply (hazards/supply.go)
	"supply.peak_voltage":                 "V",
	"supply.charge_time_constant":         "s",
	"supply.time_to_95":                   "s",
	"supply.inrush_current":               "A",
	"supply.charging_loss":                "J",
	"supply.charging_resistor_peak_power": "W",

	// bank (hazards/bank.go)
	"bank.capacitance":         "F",
	"bank.voltage":             "V",
	"bank.voltage_rating":      "V",
	"bank.energy":              "J",
	"bank.charge":              "C",
	"bank.voltage_margin":      "1",
	"bank.cell_voltage_max":    "V",
	"bank.cell_voltage_margin": "1",
	"bank.shorted_cell_energy": "J",
	"bank.esr":                 "Ω",
	"balancing.power":          "W",
	"balancing.power_fraction": "1",

	// discharge, bleeder, dump (hazards/discharge.go)
	"discharge.time_constant":             "s",
	"discharge.time_to_safe":              "s",
	"discharge.time_to_safe_single_fault": "s",
	"discharge.absorption_recovery":       "V",
	"discharge.decay_time_predicted":      "s",
	"bleeder.resistance":                  "Ω",
	"bleeder.power":                       "W",
	"bleeder.total_power":                 "W",
	"bleeder.power_fraction":              "1",
	"bleeder.element_voltage":             "V",
	"bleeder.element_voltage_fraction":    "1",
	"dump.peak_current":                   "A",
	"dump.peak_power":                     "W",
	"dump.energy":                         "J",
	"dump.energy_fraction":                "1",
	"dump.time_constant":                  "s",
	"dump.time_to_safe":                   "s",
	"dump.decay_time_predicted":           "s",

	// pulse and coil (DESIGN.md §9; hazards/pulse.go, coil.go)
	"pulse.peak_current":    "A",
	"pulse.time_to_peak":    "s",
	"pulse.di_dt_max":       "A/s",
	"pulse.i2t":             "A²s",
	"pulse.reversal":        "1",
	"coil.inductance":       "H",
	"coil.resistance":       "Ω",
	"coil.temperature_rise": "K",

	// launch and field (DESIGN.md §9; hazards/launch.go, field.go)
	"launch.speed":                    "m/s",
	"launch.kinetic_energy":           "J",
	"launch.height":                   "m",
	"launch.efficiency":               "1",
	"launch.exclusion_radius":         "m",
	"launch.ceiling_impact_speed":     "m/s",
	"launch.momentum":                 "kg·m/s",
	"projectile.cooldown":             "s",
	"coil.final_temperature":          "K",
	"coil.shots_to_class":             "1",
	"coil.i2t":                        "A²s",
	"pulse.duration":                  "s",
	"pulse.cell_peak_current":         "A",
	"pulse.cell_peak_current_ratio":   "1",
	"pulse.cell_reverse_voltage":      "V",
	"pulse.cell_reverse_ratio":        "1",
	"pulse.damping_ratio":             "1",
	"switch.surge_ratio":              "1",
	"switch.surge_i2t_ratio":          "1",
	"switch.pulse_to_rating_duration": "1",
	"switch.i2t_ratio":                "1",
	"switch.di_dt_ratio":              "1",
	"switch.voltage_ratio":            "1",
	"projectile.temperature_rise":     "K",
	"field.peak_flux_density":         "T",
	"field.implant_distance":          "m",

	// further quantities of the physics stages, for site rules
	"coil.inductance_disagreement":            "1",
	"coil.inductance_filaments":               "H",
	"coil.inductance_method_spread":           "1",
	"coil.inductance_wheeler":                 "H",
	"coil.mass":                               "kg",
	"coil.resistance_ambient":                 "Ω",
	"coil.resistance_disagreement":            "1",
	"coil.skin_depth_ratio":                   "1",
	"coil.winding_fill":                       "1",
	"coil.wire_diameter":                      "m",
	"coil.wire_length":                        "m",
	"launch.measured_energy":                  "J",
	"launch.measured_speed":                   "m/s",
	"launch.peak_acceleration":                "m/s²",
	"launch.peak_current_with_projectile":     "A",
	"launch.peak_force":                       "N",
	"launch.time_to_ceiling":                  "s",
	"loop.bank_esr":                           "Ω",
	"loop.inductance":                         "H",
	"loop.resistance":                         "Ω",
	"loop.switch_drop":                        "V",
	"loop.switch_resistance":                  "Ω",
	"loop.wiring_inductance":                  "H",
	"loop.wiring_resistance":                  "Ω",
	"pulse.coil_energy":                       "J",
	"pulse.diode_i2t":                         "A²s",
	"pulse.final_bank_voltage":                "V",
	"pulse.width":                             "s",
	"supply.charging_resistor_mean_power":     "W",
	"supply.charging_resistor_power_fraction": "1",

	// impulse noise, when a stage estimates it
	"noise.peak_spl": "dB",
}

// limitCatalog lists values the evaluator derives from the policy and the rig, so that rules need not
// repeat the look-up (documented in the rulebook's header).
var limitCatalog = map[string]nameInfo{
	"limit.time_allowed":     {kindNum, "s"},   // residual.time_low or residual.time_high by the bank voltage class
	"limit.eye_speed":        {kindNum, "m/s"}, // impact speed the declared eye protection is tested at (0 for none)
	"limit.eye_energy":       {kindNum, "J"},   // impact energy of that test (0 for none)
	"limit.ambient":          {kindNum, "K"},   // the coil's stated ambient, else ambient.reference
	"limit.cells_parallel":   {kindNum, "1"},   // bank.parallel, default 1
	"limit.cells_series":     {kindNum, "1"},   // bank.series, default 1
	"limit.bleeder_elements": {kindNum, "1"},   // bleeder.elements_in_series, default 1
	"limit.bleeder_chains":   {kindNum, "1"},   // bleeder.count, default 1
	"limit.tilt":             {kindNum, "rad"}, // room.tilt, else launch.default_tilt
	"limit.projectile_range": {kindNum, "m"},   // worst launch.exclusion_radius, else v² sin 2θ / g
	"limit.peak_current":     {kindNum, "A"},   // larger of worst pulse.peak_current and worst launch.peak_current_with_projectile
	"limit.surge_i2t_ratio":  {kindNum, "1"},   // worst switch.surge_i2t_ratio, else worst pulse.i2t / (I_TSM² t_p / 2)
	"limit.decay_predicted":  {kindNum, "s"},   // predicted time for the measured decay, nearest path
}

// rigFacts lists every leaf of schema.Rig by its YAML path, prefixed "rig.", with its kind and unit, and
// every section (pointer to struct) as a prefix that stated() accepts.
func rigFacts() (leaves map[string]nameInfo, sections map[string]bool) {
	leaves = map[string]nameInfo{}
	sections = map[string]bool{"rig": true}
	var walk func(t reflect.Type, prefix string)
	walk = func(t reflect.Type, prefix string) {
		for i := 0; i < t.NumField(); i++ {
			f := t.Field(i)
			tag := strings.Split(f.Tag.Get("yaml"), ",")[0]
			if tag == "" || tag == "-" {
				continue
			}
			path := prefix + "." + tag
			ft := f.Type
			switch {
			case ft.Kind() == reflect.Struct:
				sections[path] = true
				walk(ft, path)
			case ft.Kind() == reflect.Pointer && ft.Elem().Kind() == reflect.Struct:
				sections[path] = true
				walk(ft.Elem(), path)
			case ft.Kind() == reflect.Slice:
				leaves[path] = nameInfo{kindNum, "1"} // the number of entries
			case ft.Kind() == reflect.String:
				leaves[path] = nameInfo{kindStr, ""}
			case ft.Kind() == reflect.Pointer && ft.Elem().Kind() == reflect.Bool:
				leaves[path] = nameInfo{kindBool, ""}
			case ft.Kind() == reflect.Pointer && (ft.Elem().Kind() == reflect.Float64 || ft.Elem().Kind() == reflect.Int):
				u := f.Tag.Get("unit")
				if u == "" {
					u = "1"
				}
				leaves[path] = nameInfo{kindNum, u}
			}
		}
	}
	walk(reflect.TypeOf(schema.Rig{}), "rig")
	return leaves, sections
}

// factValues flattens the stated values of a rig into their "rig."-prefixed paths. A nil pointer, an empty
// string and a nil section are absent; a slice is stated (its length) when its section is.
func factValues(r *schema.Rig) (vals map[string]any, sections map[string]bool) {
	vals = map[string]any{}
	sections = map[string]bool{"rig": true}
	if r == nil {
		return vals, sections
	}
	var walk func(v reflect.Value, prefix string)
	walk = func(v reflect.Value, prefix string) {
		t := v.Type()
		for i := 0; i < t.NumField(); i++ {
			f := t.Field(i)
			tag := strings.Split(f.Tag.Get("yaml"), ",")[0]
			if tag == "" || tag == "-" {
				continue
			}
			path := prefix + "." + tag
			fv := v.Field(i)
			switch {
			case fv.Kind() == reflect.Struct:
				sections[path] = true
				walk(fv, path)
			case fv.Kind() == reflect.Pointer && f.Type.Elem().Kind() == reflect.Struct:
				if !fv.IsNil() {
					sections[path] = true
					walk(fv.Elem(), path)
				}
			case fv.Kind() == reflect.Slice:
				vals[path] = float64(fv.Len())
			case fv.Kind() == reflect.String:
				if s := fv.String(); s != "" {
					vals[path] = s
				}
			case fv.Kind() == reflect.Pointer:
				if fv.IsNil() {
					continue
				}
				switch e := fv.Elem(); e.Kind() {
				case reflect.Bool:
					vals[path] = e.Bool()
				case reflect.Float64:
					vals[path] = e.Float()
				case reflect.Int:
					vals[path] = float64(e.Int())
				}
			}
		}
	}
	walk(reflect.ValueOf(r).Elem(), "rig")
	return vals, sections
}

// sortedKeys returns the keys of a map in order.
func sortedKeys[V any](m map[string]V) []string {
	k := make([]string, 0, len(m))
	for s := range m {
		k = append(k, s)
	}
	sort.Strings(k)
	return k
}
