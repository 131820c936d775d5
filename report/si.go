package report

import (
	"math"
	"strconv"
	"strings"
)

// SI formats v (in the SI base unit named by unit) with three significant digits and an SI prefix chosen so
// that the number lies in [1, 1000): SI(3270, "A") is "3.27 kA", SI(0.0022, "F") is "2.2 mF". Trailing zeros
// of the fraction are dropped. The prefix rules follow the SI Brochure (BIPM, 9th edition, 2019, §3):
//
//   - units that take a prefix directly (V, A, F, H, Ω, J, W, C, T, Hz, N, Pa, VA) use prefixes from p to G;
//   - seconds take only sub-multiples (ms, µs, ns): a time above one second stays in seconds ("586 s");
//   - metres take km, mm, µm; m² is scaled to mm² and cm² is not used;
//   - mass in kg is shown in g, mg or kg, never "kkg";
//   - the rate of rise of current, A/s, is shown in A/µs as on thyristor data sheets (common practice);
//   - dimensionless ratios (unit "1") are printed as plain numbers; "%" is kept as given;
//   - every other unit (K, A²s, m/s, Ω·m, ...) is printed without a prefix, in scientific notation
//     (×10ⁿ) when |v| ≥ 10⁴ or |v| < 10⁻³. A²s is not prefixed because "kA²s" is ambiguous between
//     10³ A²s and (kA)²s = 10⁶ A²s.
//
// NaN and ±Inf, which never leave package hazards, are printed as "—" rather than as a number.
func SI(v float64, unit string) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "—"
	}
	switch unit {
	case "V", "A", "F", "H", "Ω", "J", "W", "C", "T", "Hz", "N", "Pa", "VA":
		return prefixed(v, unit, -12, 9)
	case "s":
		return prefixed(v, unit, -9, 0)
	case "m":
		return prefixed(v, unit, -6, 3)
	case "m²":
		return joinUnit(sig3(v*1e6), "mm²")
	case "kg":
		if a := math.Abs(v); a != 0 && a < 1 {
			return prefixed(v*1e3, "g", -3, 0)
		}
		return joinUnit(sig3(v), "kg")
	case "A/s":
		return joinUnit(sig3(v*1e-6), "A/µs")
	case "1", "":
		return plain(v)
	case "%":
		return sig3(v) + " %"
	}
	return joinUnit(plain(v), unit)
}

// SIValue is SI without the unit's prefix choice: it returns the number alone and the prefixed unit, for
// tables that put them in separate columns.
func SIValue(v float64, unit string) (number, prefixedUnit string) {
	s := SI(v, unit)
	if i := strings.LastIndexByte(s, ' '); i >= 0 && unit != "1" && unit != "" {
		return s[:i], s[i+1:]
	}
	return s, ""
}

func joinUnit(num, unit string) string {
	if unit == "" {
		return num
	}
	return num + " " + unit
}

var prefixes = map[int]string{-12: "p", -9: "n", -6: "µ", -3: "m", 0: "", 3: "k", 6: "M", 9: "G"}

// prefixed scales v by a power of 1000 between 10^lo and 10^hi so that the rounded mantissa lies in [1, 1000).
func prefixed(v float64, unit string, lo, hi int) string {
	if v == 0 {
		return "0 " + unit
	}
	r := round3(v) // round first so that 999.7 becomes 1000 and takes the next prefix
	e := int(math.Floor(math.Log10(math.Abs(r))/3)) * 3
	e = max(lo, min(hi, e))
	return sig3(r/math.Pow(10, float64(e))) + " " + prefixes[e] + unit
}

// round3 rounds v to three significant digits.
func round3(v float64) float64 {
	if v == 0 {
		return 0
	}
	f, _ := strconv.ParseFloat(strconv.FormatFloat(v, 'e', 2, 64), 64)
	return f
}

// sig3 prints v with three significant digits (at least one integer digit, no exponent), trailing zeros of
// the fraction dropped: 3.270 → "3.27", 2.20 → "2.2", 586.4 → "586", 1234 → "1234".
func sig3(v float64) string {
	if v == 0 {
		return "0"
	}
	r := round3(v)
	a := math.Abs(r)
	dec := 0
	switch {
	case a < 1e-3:
		return sci(v)
	case a < 10:
		dec = 2 - int(math.Floor(math.Log10(a)))
	case a < 100:
		dec = 1
	}
	s := strconv.FormatFloat(r, 'f', dec, 64)
	if strings.ContainsRune(s, '.') {
		s = strings.TrimRight(strings.TrimRight(s, "0"), ".")
	}
	if s == "-0" {
		s = "0"
	}
	return s
}

// plain prints a number without a prefix: three significant digits, scientific notation outside
// [10⁻³, 10⁴).
func plain(v float64) string {
	if v == 0 {
		return "0"
	}
	if a := math.Abs(round3(v)); a >= 1e4 || a < 1e-3 {
		return sci(v)
	}
	return sig3(v)
}

var superscript = strings.NewReplacer("-", "⁻", "0", "⁰", "1", "¹", "2", "²", "3", "³", "4", "⁴", "5", "⁵",
	"6", "⁶", "7", "⁷", "8", "⁸", "9", "⁹")

// sci prints v as m×10ⁿ with a three-significant-digit mantissa: 51200 → "5.12×10⁴".
func sci(v float64) string {
	s := strconv.FormatFloat(v, 'e', 2, 64) // "5.12e+04"
	m, e, _ := strings.Cut(s, "e")
	n, _ := strconv.Atoi(e)
	if strings.ContainsRune(m, '.') {
		m = strings.TrimRight(strings.TrimRight(m, "0"), ".")
	}
	return m + "×10" + superscript.Replace(strconv.Itoa(n))
}
