package hazards

import (
	"fmt"
	"math"
)

// AWGDiameter returns the bare diameter, m, of American Wire Gauge n (−3 for 0000, −2 for 000, −1 for 00,
// 0 … 56) by the defining relation of ASTM B258:
//
//	d = 0.127 mm × 92^((36 − n)/39)
//
// which makes gauge 36 exactly 0.0050 in and gauge 0000 exactly 0.4600 in. The standard's table rounds the
// result to four significant figures; this function returns it unrounded. ok is false outside −3 … 56.
func AWGDiameter(n int) (d float64, ok bool) {
	if n < -3 || n > 56 {
		return 0, false
	}
	return 0.127e-3 * math.Pow(92, float64(36-n)/39), true
}

// wireSize resolves a conductor's bare diameter from a stated metric diameter (which wins) or an AWG number,
// and says where it came from.
func wireSize(diameter *float64, gauge *int) (d float64, basis string, err error) {
	switch {
	case diameter != nil:
		if !(*diameter > 0) || math.IsInf(*diameter, 0) {
			return 0, "", fmt.Errorf("wire diameter %g m is not positive", *diameter)
		}
		return *diameter, "stated bare diameter", nil
	case gauge != nil:
		d, ok := AWGDiameter(*gauge)
		if !ok {
			return 0, "", fmt.Errorf("wire gauge AWG %d is outside 0000 (−3) … 56", *gauge)
		}
		return d, fmt.Sprintf("AWG %d per ASTM B258: d = 0.127 mm × 92^((36 − n)/39)", *gauge), nil
	}
	return 0, "", nil
}
