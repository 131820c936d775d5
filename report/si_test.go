package report

import (
	"math"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

// The prefix values are those of the SI Brochure (BIPM, 9th edition, 2019), Table 7: p = 10⁻¹², n = 10⁻⁹,
// µ = 10⁻⁶, m = 10⁻³, k = 10³, M = 10⁶, G = 10⁹. Each expected string is the value rewritten with one of those
// factors and rounded to three significant digits.
func TestSI(t *testing.T) {
	tests := []struct {
		v    float64
		unit string
		want string
	}{
		{3270, "A", "3.27 kA"},
		{586.4, "s", "586 s"},
		{2.2e-3, "F", "2.2 mF"},
		{1.5e-3, "Ω", "1.5 mΩ"},
		{100e3, "Ω", "100 kΩ"},
		{705, "V", "705 V"},
		{0, "V", "0 V"},
		{-230, "V", "-230 V"},
		{999.7, "V", "1 kV"},     // rounds to 1.00×10³ and takes the next prefix
		{0.0009996, "A", "1 mA"}, // 9.996×10⁻⁴ rounds to 1.00×10⁻³
		{4120, "s", "4120 s"},    // seconds take no multiple prefix
		{2.5e-6, "s", "2.5 µs"},  // µ is U+00B5 MICRO SIGN, as in the fonts' WGL4 set
		{1.2e-3, "H", "1.2 mH"},
		{47e-12, "F", "47 pF"},
		{2.7, "m", "2.7 m"},
		{1.5e-3, "m", "1.5 mm"},
		{6e-6, "m²", "6 mm²"},      // 1 mm² = 10⁻⁶ m²
		{0.012, "kg", "12 g"},      // 1 g = 10⁻³ kg
		{150e6, "A/s", "150 A/µs"}, // 1 A/µs = 10⁶ A/s
		{51200, "A²s", "5.12×10⁴ A²s"},
		{850, "A²s", "850 A²s"},
		{0.62, "1", "0.62"},
		{42.5, "K", "42.5 K"},
		{7.8, "m/s", "7.8 m/s"},
		{2.82e-8, "Ω·m", "2.82×10⁻⁸ Ω·m"},
		{math.NaN(), "V", "—"},
		{math.Inf(1), "J", "—"},
	}
	for _, tt := range tests {
		t.Run(tt.want, func(t *testing.T) {
			if got := SI(tt.v, tt.unit); got != tt.want {
				t.Errorf("SI(%g, %q): got %q, want %q", tt.v, tt.unit, got, tt.want)
			}
		})
	}
}

// parseSI reads back what SI prints for the directly prefixed units, using the Table 7 factors.
func parseSI(t *testing.T, s, unit string) float64 {
	t.Helper()
	num, u, ok := strings.Cut(s, " ")
	if !ok {
		t.Fatalf("%q: no unit", s)
	}
	p := strings.TrimSuffix(u, unit)
	factor := map[string]float64{"p": 1e-12, "n": 1e-9, "µ": 1e-6, "m": 1e-3, "": 1, "k": 1e3, "M": 1e6, "G": 1e9}[p]
	if factor == 0 {
		t.Fatalf("%q: unknown prefix %q", s, p)
	}
	v, err := strconv.ParseFloat(num, 64)
	if err != nil {
		t.Fatalf("%q: %v", s, err)
	}
	return v * factor
}

// TestSIRoundTrip reads every printed value back and checks that it equals the input to three significant
// digits, and that the number lies in [1, 1000) wherever the prefix range allows.
func TestSIRoundTrip(t *testing.T) {
	for _, unit := range []string{"V", "A", "F", "Ω", "J"} {
		for e := -11.0; e <= 11; e += 0.37 {
			v := 1.234567 * math.Pow(10, e)
			t.Run(unit+strconv.FormatFloat(v, 'g', 4, 64), func(t *testing.T) {
				s := SI(v, unit)
				got := parseSI(t, s, unit)
				// Three significant digits: the rounding error is at most half a unit in the third digit,
				// 5×10⁻³ relative.
				if !scalar.EqualWithinRel(got, v, 5e-3) {
					t.Errorf("SI(%g, %q) = %q reads back as %g, want %g", v, unit, s, got, v)
				}
				num, _, _ := strings.Cut(s, " ")
				n, _ := strconv.ParseFloat(num, 64)
				if v >= 1e-12 && v < 1e12 && (n < 1 || n >= 1000) {
					t.Errorf("SI(%g, %q) = %q: mantissa %g outside [1, 1000)", v, unit, s, n)
				}
			})
		}
	}
}
