package rules

import (
	"math"
	"strconv"
	"strings"
)

// FormatQuantity writes v (SI, in unit) with three significant figures and an SI prefix where the unit
// takes one: 0.0022 F is "2.20 mF", 1.5e8 A/s is "150 A/µs" (the trade's unit for di/dt), 0.25 with unit
// "%" is "25 %", 403.15 with unit "°C" (a kelvin value shown in degrees Celsius) is "130 °C", 3.2 with
// unit "x" is "3.20×".
func FormatQuantity(v float64, unit string) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "not finite"
	}
	switch unit {
	case "%":
		return sig3(v*100) + " %"
	case "°C":
		return sig3(v-273.15) + " °C"
	case "°": // an angle held in radians, shown in degrees
		return sig3(v*180/math.Pi) + "°"
	case "x":
		return sig3(v) + "×"
	case "1", "":
		return sig3(v)
	case "K", "dB", "Ω·m", "kg/m³", "kg·m/s", "m/s²", "m/s", "m²", "rad":
		return sig3(v) + " " + unit
	case "A/s":
		return withPrefix(v/1e6, "A/µs")
	case "kg":
		return withPrefix(v*1000, "g")
	}
	return withPrefix(v, unit)
}

var prefixes = []struct {
	exp int
	sym string
}{{12, "T"}, {9, "G"}, {6, "M"}, {3, "k"}, {0, ""}, {-3, "m"}, {-6, "µ"}, {-9, "n"}, {-12, "p"}}

func withPrefix(v float64, unit string) string {
	a := math.Abs(v)
	if a == 0 {
		return "0 " + unit
	}
	for _, p := range prefixes {
		scale := math.Pow(10, float64(p.exp))
		// 999.6 rounds to 1.00e3 at three figures: choose the prefix from the rounded value
		r := roundSig(a/scale, 3)
		if r >= 1 || p.exp == -12 {
			if r >= 1000 && p.exp < 12 {
				continue
			}
			return sig3(v/scale) + " " + p.sym + unit
		}
	}
	return sig3(v) + " " + unit
}

func roundSig(x float64, n int) float64 {
	if x == 0 {
		return 0
	}
	d := math.Ceil(math.Log10(math.Abs(x)))
	pow := math.Pow(10, float64(n)-d)
	return math.Round(x*pow) / pow
}

// sig3 formats with three significant figures, without exponent for magnitudes from 1e-3 to 1e6.
func sig3(v float64) string {
	if v == 0 {
		return "0"
	}
	a := math.Abs(v)
	if a >= 1e6 || a < 1e-3 {
		return strconv.FormatFloat(v, 'g', 3, 64)
	}
	r := roundSig(v, 3)
	if r == math.Trunc(r) && v == math.Trunc(v) {
		return strconv.FormatFloat(r, 'f', 0, 64) // a whole number (a count, a stated rating) as written
	}
	digits := 3 - int(math.Floor(math.Log10(math.Abs(r)))) - 1
	if digits < 0 {
		digits = 0
	}
	s := strconv.FormatFloat(r, 'f', digits, 64)
	if strings.Contains(s, ".") && digits > 0 {
		// keep significant trailing zeros: three figures are three figures
		return s
	}
	return s
}
