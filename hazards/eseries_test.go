package hazards

import (
	"fmt"
	"math"
	"slices"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

// TestESeriesTables checks the hard-coded series against the IEC 60063 tables (E12 and E24 columns; table
// numbering from memory): the values, and two properties of the standard's tables — E12 is every second E24
// term, and the tabulated E24 departs from the rounded geometric series 10^(i/24) at exactly eight values
// (2.7, 3.0, 3.3, 3.6, 3.9, 4.3, 4.7 and 8.2), which is why the lists are hard-coded (CHECKS.md).
func TestESeriesTables(t *testing.T) {
	wantE12 := []int{10, 12, 15, 18, 22, 27, 33, 39, 47, 56, 68, 82}
	wantE24 := []int{10, 11, 12, 13, 15, 16, 18, 20, 22, 24, 27, 30, 33, 36, 39, 43, 47, 51, 56, 62, 68, 75, 82, 91}
	if !slices.Equal(E12, wantE12) {
		t.Errorf("E12: got %v, want %v", E12, wantE12)
	}
	if !slices.Equal(E24, wantE24) {
		t.Errorf("E24: got %v, want %v", E24, wantE24)
	}
	for i, v := range E12 {
		if E24[2*i] != v {
			t.Errorf("E12[%d] = %d: got E24[%d] = %d, want equal", i, v, 2*i, E24[2*i])
		}
	}
	var differ []int
	for i, v := range E24 {
		if r := int(math.Round(10 * math.Pow(10, float64(i)/24))); r != v {
			differ = append(differ, v)
		}
	}
	if want := []int{27, 30, 33, 36, 39, 43, 47, 82}; !slices.Equal(differ, want) {
		t.Errorf("values departing from round(10^(i/24)): got %v, want %v", differ, want)
	}
}

// TestENearest checks nearest-value selection on a logarithmic scale (the series are equal-ratio steps,
// IEC 60063), across decades, with ties to the lower value. Expected values are worked by hand from the tables.
func TestENearest(t *testing.T) {
	tests := []struct {
		series []int
		name   string
		x      float64
		want   float64
	}{
		{E12, "E12", 4.6e3, 4.7e3},
		{E12, "E12", 5.0e3, 4.7e3}, // ln(5/4.7) = 0.062 < ln(5.6/5) = 0.113
		{E24, "E24", 5.0e3, 5.1e3},
		{E24, "E24", 100, 100},
		{E24, "E24", 9.6, 10}, // across the decade: ln(10/9.6) = 0.041 < ln(9.6/9.1) = 0.054
		{E12, "E12", 0.95, 1.0},
		{E12, "E12", math.Sqrt(10 * 12), 10}, // the geometric midpoint of 10 and 12: a tie, to the lower
		{E24, "E24", 1e6, 1e6},
	}
	for _, tc := range tests {
		t.Run(fmt.Sprintf("%s %g", tc.name, tc.x), func(t *testing.T) {
			if got := ENearest(tc.series, tc.x); !scalar.EqualWithinRel(got, tc.want, 1e-12) {
				t.Errorf("got %g, want %g", got, tc.want)
			}
		})
	}
	if !math.IsNaN(ENearest(E12, 0)) {
		t.Errorf("ENearest(0): got a value, want NaN")
	}
}

// TestEFloorCeil checks the floor and ceiling selections, including an exact preferred value computed with
// rounding error (8.2e3 as 82 × 10² must match a bound of 8200).
func TestEFloorCeil(t *testing.T) {
	tests := []struct {
		name        string
		series      []int
		x           float64
		floor, ceil float64
	}{
		{"E24 8.29k", E24, 8.29e3, 8.2e3, 9.1e3},
		{"E12 8.29k", E12, 8.29e3, 8.2e3, 10e3},
		{"E24 exact 8.2k", E24, 8200, 8200, 8200},
		{"E12 exact 0.47", E12, 0.47, 0.47, 0.47},
		{"E24 between decades", E24, 9.5e5, 9.1e5, 1e6},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			f, okF := EFloor(tc.series, tc.x)
			c, okC := ECeil(tc.series, tc.x)
			if !okF || !okC || !scalar.EqualWithinRel(f, tc.floor, 1e-12) || !scalar.EqualWithinRel(c, tc.ceil, 1e-12) {
				t.Errorf("got floor %g (%v), ceil %g (%v); want %g, %g", f, okF, c, okC, tc.floor, tc.ceil)
			}
		})
	}
	if v := EValues(E12, 1e3, 1e4); len(v) != 13 || v[0] != 1e3 || v[12] != 1e4 {
		t.Errorf("E12 in [1k, 10k]: got %v, want the 12 values of the decade and 10k", v)
	}
}
