package hazards

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

// TestRLCPulseLossless checks the R → 0 limit against the LC oscillator: i = V0 √(C/L) sin(t/√LC), peak at a
// quarter period (identity of the undamped series L-C circuit).
func TestRLCPulseLossless(t *testing.T) {
	l := LoopModel{C: 1e-3, V0: 500, L: 1e-5, CoilL: 1e-5}
	p, err := RLCPulse(l)
	if err != nil {
		t.Fatal(err)
	}
	want := 500 * math.Sqrt(1e-3/2e-5)
	// closed forms in float64: 1e-12 covers rounding in sin/atan.
	if !scalar.EqualWithinRel(p.PeakCurrent, want, 1e-12) {
		t.Errorf("got peak %g A, want %g A", p.PeakCurrent, want)
	}
	if tq := math.Pi / 2 * math.Sqrt(2e-5*1e-3); !scalar.EqualWithinRel(p.TimeToPeak, tq, 1e-12) {
		t.Errorf("got time to peak %g s, want %g s", p.TimeToPeak, tq)
	}
	if v := p.BankVoltage(p.End); !scalar.EqualWithinRel(v, -500, 1e-12) {
		t.Errorf("got final bank voltage %g V, want −500 V (full reversal)", v)
	}
}
