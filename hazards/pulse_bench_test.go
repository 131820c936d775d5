package hazards

import (
	"fmt"
	"testing"
)

// BenchmarkCoilInductance times the filament sum (matrix, Cholesky check and sum) for the demo pancake
// (28 turns) and a 3-layer, 60-turn solenoid.
func BenchmarkCoilInductance(b *testing.B) {
	d, _ := AWGDiameter(12)
	pan, err := windSpiral(28, 0.006, 0.059, d)
	if err != nil {
		b.Fatal(err)
	}
	d16, _ := AWGDiameter(16)
	sol, err := windSolenoid(60, 3, 0.02, 0.03, d16, d16)
	if err != nil {
		b.Fatal(err)
	}
	for _, c := range []struct {
		name string
		g    coilGeometry
		wr   float64
	}{{"pancake28", pan, d / 2}, {"solenoid60", sol, d16 / 2}} {
		b.Run(c.name, func(b *testing.B) {
			for i := 0; i < b.N; i++ {
				if _, err := filamentInductance(c.g.fil, c.wr); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkRLCPulse times the closed-form pulse with its integrals, for each topology of the demo-like loop.
func BenchmarkRLCPulse(b *testing.B) {
	base := LoopModel{C: 2.2e-3, V0: 718, R: 0.0496, L: 0.74e-6, CoilL: 38.6e-6, CoilR: 0.0298, Drop: 1.2, BankR: 0.045}
	for _, tp := range []struct{ topo, at string }{{Unidirectional, ""}, {AntiparallelDiode, ""}, {Crowbar, "coil"}, {Crowbar, "bank"}} {
		l := base
		l.Topology, l.CrowbarAt = tp.topo, tp.at
		b.Run(fmt.Sprintf("%s%s", tp.topo, tp.at), func(b *testing.B) {
			for i := 0; i < b.N; i++ {
				if _, err := RLCPulse(l); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
