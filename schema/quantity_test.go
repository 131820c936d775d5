package schema

import (
	"errors"
	"math"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

// TestParseQuantity checks conversions to SI. Prefix factors are those of the BIPM SI Brochure (9th ed.,
// 2019, Table 7); 0 °C = 273.15 K (ibid. §2.3.1); 1 min = 60 s and 1° = π/180 rad (ibid. Table 8);
// 1 g/cm³ = 1000 kg/m³ and 1 Ω·mm²/m = 10⁻⁶ Ω·m follow from the prefix definitions. "51 kA²s" means
// 51 000 A²s as thyristor data sheets write it (common practice); it is consistent with I²t = ITSM²·t/2 for
// a 10 ms half-sine of 3.2 kA, which gives 51 200 A²s.
func TestParseQuantity(t *testing.T) {
	cases := []struct {
		in, unit string
		want     float64
	}{
		{"2200 uF", "F", 2200e-6},
		{"2200 µF", "F", 2200e-6},
		{"2200 \u03bcF", "F", 2200e-6}, // Greek mu, which NFKC normalisation makes of the micro sign
		{"2200uF", "F", 2200e-6},
		{"4.7 nF", "F", 4.7e-9},
		{"100 pF", "F", 100e-12},
		{"0.5", "F", 0.5},
		{"0.75 kV", "V", 750},
		{"1.2e3 V", "V", 1200},
		{"+450 V", "V", 450},
		{"450\u00a0V", "V", 450}, // no-break space between number and unit (SI Brochure §5.4.3 style)
		{"10 kΩ", "Ω", 10e3},
		{"10 k\u2126", "Ω", 10e3}, // the ohm sign U+2126
		{"10 kohm", "Ω", 10e3},
		{"4.7 Mohms", "Ω", 4.7e6},
		{"45 mΩ", "Ω", 45e-3},
		{"1.2 mH", "H", 1.2e-3},
		{"3.2 kA", "A", 3200},
		{"10 ms", "s", 10e-3},
		{"2 min", "s", 120},
		{"118 mm", "m", 0.118},
		{"2.5 cm", "m", 0.025},
		{"12 g", "kg", 0.012},
		{"1.5 kg", "kg", 1.5},
		{"150 J", "J", 150},
		{"2 kJ", "J", 2000},
		{"5 W", "W", 5},
		{"50 Hz", "Hz", 50},
		{"0.5 mT", "T", 0.5e-3},
		{"300 K", "K", 300},
		{"20 °C", "K", 293.15},
		{"155 degC", "K", 428.15},
		{"-40 °C", "K", 233.15},
		{"10 %", "1", 0.10},
		{"±5 %", "1", 0.05},
		{"0.2", "1", 0.2},
		{"51 kA²s", "A²s", 51e3},
		{"51 kA^2s", "A²s", 51e3},
		{"72 A2s", "A²s", 72},
		{"150 A/us", "A/s", 150e6},
		{"150 A/µs", "A/s", 150e6},
		{"2 kA/µs", "A/s", 2e9},
		{"1e6 A/s", "A/s", 1e6},
		{"4 m/s", "m/s", 4},
		{"36 km/h", "m/s", 10},
		{"250 VA", "VA", 250},
		{"1.5 kVA", "VA", 1500},
		{"6 mm²", "m²", 6e-6},
		{"6 mm2", "m²", 6e-6},
		{"6 mm^2", "m²", 6e-6},
		{"1 cm²", "m²", 1e-4},
		{"2.82e-8 Ω·m", "Ω·m", 2.82e-8},
		{"2.82e-8 ohm m", "Ω·m", 2.82e-8},
		{"2.82 µΩ·cm", "Ω·m", 2.82e-8},
		{"0.0282 Ω·mm²/m", "Ω·m", 2.82e-8},
		{"2700 kg/m³", "kg/m³", 2700},
		{"2.7 g/cm³", "kg/m³", 2700},
		{"5 deg", "rad", 5 * math.Pi / 180},
		{"5°", "rad", 5 * math.Pi / 180},
		{"0.1 rad", "rad", 0.1},
	}
	for _, c := range cases {
		t.Run(c.in+" as "+c.unit, func(t *testing.T) {
			got, err := ParseQuantity(c.in, c.unit)
			if err != nil {
				t.Fatalf("got error %v, want %g", err, c.want)
			}
			// 1e-15 relative: prefixes shift the decimal exponent exactly; the non-decimal factors (60, π/180,
			// 1/3.6) and the °C offset each add at most one rounding of a double (~1.1e-16).
			if !scalar.EqualWithinRel(got, c.want, 1e-15) {
				t.Errorf("got %.17g, want %.17g", got, c.want)
			}
		})
	}
}

func TestParseQuantityErrors(t *testing.T) {
	cases := []struct {
		in, unit string
		code     string
		offset   int
	}{
		{"400 V", "F", "UNIT-DIMENSION", 4},
		{"2200", "F", "UNIT-MISSING", 0},
		{"2 H", "F", "UNIT-DIMENSION", 2},
		{"20", "K", "UNIT-MISSING", 0},
		{"10", "1", "UNIT-MISSING", 0},
		{"450 Volt", "V", "UNIT-UNKNOWN", 4},
		{"450 v", "V", "UNIT-UNKNOWN", 4},
		{"450 kk", "V", "UNIT-UNKNOWN", 4},
		{"2,2 mF", "F", "UNIT-SYNTAX", 1},
		{"1_000 V", "V", "UNIT-SYNTAX", 1},
		{"abc", "V", "UNIT-SYNTAX", 0},
		{"", "V", "UNIT-SYNTAX", 0},
		{"  ", "V", "UNIT-SYNTAX", 0},
		{"unknown", "V", "UNIT-SYNTAX", 0},
		{"NaN", "V", "UNIT-NONFINITE", 0},
		{".inf", "V", "UNIT-NONFINITE", 0},
		{"-Inf V", "V", "UNIT-NONFINITE", 0},
		{"1e400 V", "V", "UNIT-NONFINITE", 0},
		{"1e308 GV", "V", "UNIT-NONFINITE", 0},
		{"\u2212400 V", "V", "UNIT-LOOKALIKE", 0},
		{"450 \u0412", "V", "UNIT-LOOKALIKE", 4}, // Cyrillic Ve
		{"４50 V", "V", "UNIT-LOOKALIKE", 0},      // fullwidth digit
		{"45 m\u03a9\u200b", "Ω", "UNIT-LOOKALIKE", 5},
		{"5 °", "m", "UNIT-DIMENSION", 2},
	}
	for _, c := range cases {
		t.Run(c.in+" as "+c.unit, func(t *testing.T) {
			_, err := ParseQuantity(c.in, c.unit)
			var qe *QuantityError
			if !errors.As(err, &qe) {
				t.Fatalf("got %v, want a QuantityError %s", err, c.code)
			}
			if qe.Code != c.code || qe.Offset != c.offset {
				t.Errorf("got %s at offset %d (%s), want %s at offset %d", qe.Code, qe.Offset, qe.Summary, c.code, c.offset)
			}
			if !errors.Is(err, ErrUnit) {
				t.Errorf("got errors.Is(err, ErrUnit) false, want true")
			}
		})
	}
}

// TestUnitTagsKnown checks that every unit named in the rig model's tags is a dimension ParseQuantity knows,
// with a name and an example that itself parses.
func TestUnitTagsKnown(t *testing.T) {
	for _, u := range Units() {
		t.Run(u, func(t *testing.T) {
			if UnitName(u) == "" || UnitExample(u) == "" {
				t.Fatalf("got name %q, example %q; want both", UnitName(u), UnitExample(u))
			}
			if _, err := ParseQuantity(UnitExample(u), u); err != nil {
				t.Errorf("got %v parsing the example %q, want none", err, UnitExample(u))
			}
		})
	}
	for _, f := range rigFields() {
		if f.unit != "" && UnitName(f.unit) == "" {
			t.Errorf("got unit tag %q on %s, want a known dimension", f.unit, f.pattern)
		}
	}
}
