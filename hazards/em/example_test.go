package em_test

import (
	"fmt"

	"chargeward/hazards/em"
)

// Two coaxial 50 mm loops 10 mm apart: Maxwell's mutual inductance, and the force per square ampere
// (∂M/∂d, attractive for co-directed currents).
func ExampleMutual() {
	m := em.Mutual(0.05, 0.05, 0.01)
	f := em.MutualDz(0.05, 0.05, 0.01)
	fmt.Printf("M = %.4g nH, dM/dd = %.4g µH/m\n", m*1e9, f*1e6)
	// Output: M = 107.7 nH, dM/dd = -6.015 µH/m
}

// A 28-turn pancake wound from 6 mm to 59 mm radius: Wheeler's flat-spiral formula.
func ExampleWheelerSpiral() {
	l := em.WheelerSpiral((0.006+0.059)/2, 0.059-0.006, 28)
	fmt.Printf("L = %.3g µH\n", l*1e6)
	// Output: L = 38.7 µH
}
