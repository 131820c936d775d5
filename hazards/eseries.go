package hazards

import (
	"math"
	"sort"
)

// Preferred numbers of IEC 60063 (Preferred number series for resistors and capacitors). The lists are
// hard-coded as the standard tabulates them: rounding 10^(i/24) gives the wrong value at several places
// (2.7, 3.0, 3.3, 3.6, 3.9, 4.3, 4.7 and 8.2 in E24), so the series must never be computed.
var (
	// E12 is the IEC 60063 E12 series (±10 % tolerance class), one decade, as integers × 0.1.
	E12 = []int{10, 12, 15, 18, 22, 27, 33, 39, 47, 56, 68, 82}
	// E24 is the IEC 60063 E24 series (±5 % tolerance class), one decade, as integers × 0.1.
	E24 = []int{10, 11, 12, 13, 15, 16, 18, 20, 22, 24, 27, 30, 33, 36, 39, 43, 47, 51, 56, 62, 68, 75, 82, 91}
)

// eEpsilon is the relative slack when comparing a preferred value with a bound, so that 4.7e3 computed as
// 47 × 10² is not refused by a bound of 4700 that differs in the last bit.
const eEpsilon = 1e-9

// Decade-scaled preferred values between 1 mΩ and 1 TΩ cover every resistor a bleeder could use.
const eMinDecade, eMaxDecade = -4, 11

// eValue returns the preferred value m × 10^(d−1), so that mantissa 47 at decade 3 is 4.7e3.
func eValue(m, d int) float64 { return float64(m) * math.Pow10(d-1) }

// EValues returns every value of the series (E12 or E24) in [lo, hi], ascending, between 1 mΩ and 1 TΩ.
func EValues(series []int, lo, hi float64) []float64 {
	var out []float64
	if !(hi >= lo) {
		return nil
	}
	for d := eMinDecade; d <= eMaxDecade; d++ {
		for _, m := range series {
			v := eValue(m, d)
			if v >= lo*(1-eEpsilon) && v <= hi*(1+eEpsilon) {
				out = append(out, v)
			}
		}
	}
	return out
}

// ENearest returns the value of the series closest to x on a logarithmic scale (the way the series is spaced;
// IEC 60063 steps are equal ratios), for x > 0. Ties go to the lower value.
func ENearest(series []int, x float64) float64 {
	if !(x > 0) || math.IsInf(x, 0) {
		return math.NaN()
	}
	d := int(math.Floor(math.Log10(x))) + 1 // x lies in [10^(d−1), 10^d)
	var cands []float64
	for _, dd := range []int{d - 1, d, d + 1} {
		for _, m := range series {
			cands = append(cands, eValue(m, dd))
		}
	}
	sort.Float64s(cands)
	best, bestD := cands[0], math.Inf(1)
	for _, c := range cands {
		if dist := math.Abs(math.Log(c / x)); dist < bestD-1e-12 {
			best, bestD = c, dist
		}
	}
	return best
}

// EFloor returns the largest value of the series not above x (within eEpsilon); ok is false below 1 mΩ.
func EFloor(series []int, x float64) (float64, bool) {
	v := EValues(series, 0, x)
	if len(v) == 0 {
		return 0, false
	}
	return v[len(v)-1], true
}

// ECeil returns the smallest value of the series not below x (within eEpsilon); ok is false above 1 TΩ.
func ECeil(series []int, x float64) (float64, bool) {
	v := EValues(series, x, math.Inf(1))
	if len(v) == 0 {
		return 0, false
	}
	return v[0], true
}
