package schema

import (
	"fmt"
	"math"
	"sort"
	"strings"
)

// rigRequired are the fields without which no review can start. Everything else may be missing: a missing
// value is nil in the Rig and becomes a finding later, never a silent default.
var rigRequired = []string{"rig", "rig.name", "rig.revision", "bank", "bank.capacitance", "bank.voltage_rating"}

// rigAllowZero are the quantities and counts for which zero is a meaningful statement.
var rigAllowZero = []string{
	"rig.audience_distance",
	"supply.diode_drop", "supply.mains_tolerance", "supply.transformers[].regulation",
	"bank.capacitance_tolerance", "bank.esr", "bank.leakage", "bank.leakage_spread",
	"bank.balancing.tolerance", "bleeder.tolerance",
	"switch.on_resistance", "switch.forward_drop",
	"coil.inner_diameter", "coil.insulation_thickness",
	"wiring.stray_inductance", "wiring.resistance", "wiring.separation",
	"projectile.inner_diameter", "projectile.payload_mass", "projectile.gap",
	"room.tilt",
	"controls.remote_firing_distance", "controls.exclusion_zone",
}

// insulationClasses are the IEC 60085 thermal classes by letter, as the class temperature in °C
// (IEC 60085:2007, Table 1 — from memory: Y 90, A 105, E 120, B 130, F 155, H 180, N 200, R 220).
var insulationClasses = map[string]float64{"Y": 90, "A": 105, "E": 120, "B": 130, "F": 155, "H": 180, "N": 200, "R": 220}

// awgNames are the AWG sizes above 0, written as the trade writes them, mapped to the gauge number
// (ASTM B258: 0000 = "4/0" is gauge −3).
var awgNames = map[string]int{"4/0": -3, "0000": -3, "3/0": -2, "000": -2, "2/0": -1, "00": -1, "1/0": 0, "0": 0}

var rigHooks = map[string]func(string) (any, bool){
	"coil.insulation_class": func(s string) (any, bool) {
		t := strings.TrimSpace(s)
		t = strings.TrimSpace(strings.TrimPrefix(strings.TrimPrefix(t, "class"), "Class"))
		if c, ok := insulationClasses[t]; ok {
			return c + 273.15, true
		}
		return nil, false
	},
	"coil.wire_gauge": func(s string) (any, bool) {
		t := strings.TrimSpace(strings.TrimPrefix(strings.TrimSpace(s), "AWG"))
		if g, ok := awgNames[t]; ok {
			return g, true
		}
		return nil, false
	},
}

// RigDecodeOptions are the rules LoadRig applies; exported so tests and tools can see them.
func RigDecodeOptions() DecodeOptions {
	return DecodeOptions{Required: rigRequired, AllowZero: rigAllowZero, AllowNegative: []string{"coil.wire_gauge"}, Hooks: rigHooks}
}

// LoadRig reads a rig description. name is the file name for messages ("-" for standard input). On any
// problem it returns a nil rig and a Diagnostics error listing every problem found, each at its line and
// column. The rig's values are in SI units; a value not stated in the file is nil.
func LoadRig(name string, data []byte) (rig *Rig, err error) {
	defer func() {
		if r := recover(); r != nil { // defence in depth: a defect must not take the caller down
			rig, err = nil, Diagnostics{{Severity: SeverityError, Code: "INTERNAL", Summary: fmt.Sprintf("loader failure: %v", r),
				Detail: "This is a defect in chargeward; please report it with the file.", File: name, Line: 1, Column: 1}}
		}
	}()
	root, diags := ReadYAML(name, data)
	if root == nil {
		return nil, diags
	}
	r := &Rig{Source: Source{File: name, Raw: data, Pos: map[string]Pos{}}}
	diags = append(diags, Decode(name, root, r, RigDecodeOptions(), r.Source.Pos)...)
	if !diags.HasErrors() {
		diags = append(diags, checkRig(r)...)
	}
	if !diags.HasErrors() {
		// The JSON Schema is the contract editors see; the decoder above enforces the same rules with better
		// messages, so the schema only speaks when they have drifted apart.
		compiled, err := RigSchema()
		if err != nil {
			return nil, Diagnostics{{Severity: SeverityError, Code: "INTERNAL", Summary: "the embedded rig schema does not compile: " + err.Error(),
				Detail: "This is a defect in chargeward; please report it.", File: name, Line: 1, Column: 1}}
		}
		diags = append(diags, ValidateNode(name, root, compiled)...)
	}
	if diags.HasErrors() {
		sortDiags(diags)
		return nil, diags
	}
	return r, nil
}

// sortDiags orders diagnostics by position, keeping the order of those at the same place.
func sortDiags(ds Diagnostics) {
	sort.SliceStable(ds, func(i, j int) bool {
		if ds[i].Line != ds[j].Line {
			return ds[i].Line < ds[j].Line
		}
		return ds[i].Column < ds[j].Column
	})
}

// Upper bounds on counts (see checkRig): a thousand cells, chains or units, and ten thousand turns, are
// far beyond a bench rig and keep every model run within seconds.
const (
	maxCells = 1000
	maxTurns = 10000
)

func deref(v *float64) float64 {
	if v == nil {
		return 0
	}
	return *v
}

// checkRig applies the rules that relate fields to each other or bound a value above.
func checkRig(r *Rig) Diagnostics {
	var ds Diagnostics
	at := func(path, code, summary, detail string) {
		p := r.Source.Pos[path]
		ds = append(ds, Diagnostic{Severity: SeverityError, Code: code, Summary: summary, Detail: detail, File: r.Source.File, Line: p.Line, Column: p.Column, Path: path})
	}
	fraction := func(path string, v *float64) {
		if v != nil && *v > 1 {
			at(path, "UNIT-RANGE", fmt.Sprintf("%s: %.4g %% is more than 100 %%", path, *v*100), "A tolerance is a fraction of the nominal value: write e.g. 10 % or 0.10.")
		}
	}
	if s := r.Supply; s != nil {
		fraction("supply.mains_tolerance", s.MainsTolerance)
		for i, t := range s.Transformers {
			fraction(fmt.Sprintf("supply.transformers[%d].regulation", i), t.Regulation)
		}
	}
	fraction("bank.capacitance_tolerance", r.Bank.CapacitanceTolerance)
	if b := r.Bank.Balancing; b != nil {
		fraction("bank.balancing.tolerance", b.Tolerance)
	}
	if b := r.Bleeder; b != nil {
		fraction("bleeder.tolerance", b.Tolerance)
	}
	if c := r.Coil; c != nil {
		if c.InnerDiameter != nil && c.OuterDiameter != nil && *c.InnerDiameter >= *c.OuterDiameter {
			at("coil.outer_diameter", "RIG-CONFLICT", "coil.outer_diameter is not larger than coil.inner_diameter",
				"The outer diameter of the winding must exceed its inner diameter; check that the two are not swapped.")
		}
		if c.WireGauge != nil && (*c.WireGauge < -3 || *c.WireGauge > 56) {
			at("coil.wire_gauge", "FIELD-RANGE", fmt.Sprintf("coil.wire_gauge: AWG %d is outside the ASTM B258 range 4/0 to 56", *c.WireGauge),
				"Write the AWG number (e.g. 12, or \"1/0\"), or give wire_diameter instead.")
		}
	}
	if p := r.Projectile; p != nil && p.InnerDiameter != nil && p.OuterDiameter != nil && *p.InnerDiameter >= *p.OuterDiameter {
		at("projectile.inner_diameter", "RIG-CONFLICT", "projectile.inner_diameter is not smaller than projectile.outer_diameter",
			"A ring's bore must be smaller than its outside diameter; for a disc, leave inner_diameter out or write 0.")
	}
	// Counts far beyond any bench rig: the models would run for minutes (the launch simulation carries one
	// state per filament) or divide by counts that no hand-built rig has; refused with a position rather
	// than ended by a time limit.
	count := func(path string, v *int, limit int) {
		if v != nil && *v > limit {
			at(path, "FIELD-RANGE", fmt.Sprintf("%s: %d is more than %d", path, *v, limit),
				fmt.Sprintf("chargeward models bench rigs with at most %d here; check the value.", limit))
		}
	}
	count("bank.series", r.Bank.Series, maxCells)
	count("bank.parallel", r.Bank.Parallel, maxCells)
	if b := r.Bleeder; b != nil {
		count("bleeder.count", b.Count, maxCells)
		count("bleeder.elements_in_series", b.ElementsInSeries, maxCells)
	}
	if s := r.Supply; s != nil {
		for i, t := range s.Transformers {
			count(fmt.Sprintf("supply.transformers[%d].count", i), t.Count, maxCells)
		}
	}
	if c := r.Coil; c != nil {
		count("coil.turns", c.Turns, maxTurns)
		count("coil.layers", c.Layers, maxTurns)
	}
	if p, rm := r.Projectile, r.Room; p != nil && rm != nil && rm.CeilingHeight != nil && rm.LaunchAxis != "horizontal" {
		if h := deref(p.Gap) + deref(p.Thickness); h >= *rm.CeilingHeight {
			at("room.ceiling_height", "RIG-CONFLICT", fmt.Sprintf("the projectile at rest (gap + thickness = %.4g m) does not fit below room.ceiling_height %.4g m", h, *rm.CeilingHeight),
				"The ceiling height is measured from the coil face; check the units of the ceiling, the gap and the thickness.")
		}
	}
	if rm := r.Room; rm != nil && rm.Tilt != nil && *rm.Tilt > math.Pi/2 {
		at("room.tilt", "UNIT-RANGE", "room.tilt is more than 90° from vertical", "Give the worst-case tilt of the launch axis from vertical, e.g. 5 deg.")
	}
	return ds
}
