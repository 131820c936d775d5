package hazards

import (
	"math"
	"testing"

	"chargeward/hazards/em"
)

// demoCoil builds the demo disc thrower's coil as the tests use it until the coil stage supplies one: a
// 28-turn flat spiral of AWG 12 copper (bare diameter 2.053 mm, ASTM B258) with turn centres spread evenly
// from 6 mm to 59 mm radius, one filament per turn at z = −wire radius. Invented demo data, not a reference.
func demoCoil() (*CoilModel, float64, float64) {
	const turns = 28
	wr := 2.053e-3 / 2
	c := &CoilModel{WireRadius: wr, Material: "copper"}
	var length float64
	for j := 0; j < turns; j++ {
		r := 6e-3 + 53e-3*(float64(j)+0.5)/turns
		c.Filaments = append(c.Filaments, Filament{R: r, Z: -wr, Turns: 1})
		length += 2 * math.Pi * r
	}
	// Inductance by summing self (round wire, LoopSelf) and mutual (Maxwell) terms.
	var l float64
	for i, a := range c.Filaments {
		l += em.LoopSelf(a.R, wr)
		for j := i + 1; j < len(c.Filaments); j++ {
			l += 2 * em.Mutual(a.R, c.Filaments[j].R, 0)
		}
	}
	c.L = l
	c.R20 = Copper.Resistivity20 * length / (math.Pi * wr * wr)
	c.Mass = Copper.Density * length * math.Pi * wr * wr
	return c, c.L, c.R20
}

// demoLoop is the demo disc thrower's loop: 2200 µF equivalent at 718 V, 0.05 Ω and 1 µH outside the coil,
// a unidirectional thyristor with a 1.2 V drop. Invented demo data.
func demoLoop(c *CoilModel) LoopModel {
	return LoopModel{C: 2200e-6, V0: 718, R: 0.05, L: 1e-6, CoilL: c.L, CoilR: c.R20, Drop: 1.2, Topology: "unidirectional"}
}

// demoInput is the demo rig's 6061 aluminium disc, 110 mm × 3 mm, resting 1.5 mm above the coil face.
func demoInput(nr, nz int) launchInput {
	c, _, _ := demoCoil()
	ro, th := 0.055, 3e-3
	return launchInput{
		coil: c, loop: demoLoop(c), esr: 0.0225, mat: Aluminium6061,
		outerR: ro, thick: th, gap: 1.5e-3,
		mass: Aluminium6061.Density * math.Pi * ro * ro * th,
		nr:   nr, nz: nz, ambient: 293.15,
	}
}

func mustSetup(t testing.TB, in launchInput) *launchSetup {
	t.Helper()
	s, err := newLaunchSetup(in)
	if err != nil {
		t.Fatalf("setup: got error %v, want none", err)
	}
	return s
}

// TestLaunchEnergyBalance checks the energy balance: stored energy = left in the bank + resistive losses
// in the coil loop and every filament + kinetic + potential + impact losses + field energy still in the
// inductances (conservation of energy, the invariant of CHECKS.md), within 0.5 % of the stored energy.
func TestLaunchEnergyBalance(t *testing.T) {
	tests := []struct {
		name     string
		topology string
		gap      float64
		v0       float64
	}{
		{"demo disc, unidirectional", "unidirectional", 1.5e-3, 718},
		{"demo disc, antiparallel diode", "antiparallel-diode", 1.5e-3, 718},
		{"demo disc, crowbar at bank", "crowbar", 1.5e-3, 718},
		{"demo disc at low voltage (does not lift at first)", "unidirectional", 1.5e-3, 40},
		{"disc 20 mm above the coil", "unidirectional", 20e-3, 718},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			in := demoInput(16, 2)
			in.loop.Topology = tc.topology
			in.crowbarAt = "bank"
			in.gap = tc.gap
			s := mustSetup(t, in)
			r, err := s.run(in.loop.C, tc.v0, launchOptions{})
			if err != nil {
				t.Fatalf("got error %v, want none", err)
			}
			sum := r.Bank + r.LoopLoss + r.RingLoss + r.Kinetic + r.Potential + r.Impact + r.Field
			t.Logf("stored %.4g J: bank %.4g, loop %.4g, rings %.4g, kinetic %.4g, potential %.4g, impact %.4g, field %.3g; speed %.4g m/s, peak %.4g A, steps %d",
				r.Stored, r.Bank, r.LoopLoss, r.RingLoss, r.Kinetic, r.Potential, r.Impact, r.Field, r.Speed, r.PeakCurrent, r.Steps)
			if e := math.Abs(sum-r.Stored) / r.Stored; e > 0.005 {
				t.Errorf("got energy sum %.6g J, want the stored %.6g J within 0.5 %% (error %.3g)", sum, r.Stored, e)
			}
		})
	}
}
