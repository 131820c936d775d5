package hazards

import (
	"fmt"
	"math"
	"testing"
)

// TestAWGDiameter checks the gauge formula against ASTM B258 table values, which are rounded to four
// significant figures: the computed diameter must round to the tabulated one (half a unit in the fourth
// figure is the tolerance).
func TestAWGDiameter(t *testing.T) {
	tests := []struct {
		n      int
		mm     float64
		source string
	}{
		{14, 1.628, "ASTM B258 (CHECKS.md, found)"},
		{18, 1.024, "ASTM B258 (CHECKS.md, found)"},
		{36, 0.1270, "ASTM B258 definition: 0.0050 in exactly"},
		{-3, 11.68, "ASTM B258 definition: 0000 = 0.4600 in exactly"},
		{10, 2.588, "ASTM B258 table, from memory"},
		{12, 2.053, "ASTM B258 table, from memory"},
		{16, 1.291, "ASTM B258 table, from memory"},
		{22, 0.6438, "ASTM B258 table, from memory"},
	}
	for _, tt := range tests {
		t.Run(fmt.Sprintf("AWG%d", tt.n), func(t *testing.T) {
			d, ok := AWGDiameter(tt.n)
			if !ok {
				t.Fatalf("got not ok, want %g mm", tt.mm)
			}
			got := d * 1e3
			unit := math.Pow(10, math.Floor(math.Log10(tt.mm))-3) // a unit in the 4th significant figure
			if math.Abs(got-tt.mm) > unit/2 {
				t.Errorf("got %.5f mm, want %.4g mm (%s)", got, tt.mm, tt.source)
			}
		})
	}
	for _, n := range []int{-4, 57} {
		if _, ok := AWGDiameter(n); ok {
			t.Errorf("AWG %d: got ok, want out of range", n)
		}
	}
}
