package hazards_test

import (
	"fmt"

	"chargeward/hazards"
)

// A lossless 1 mF, 20 µH loop charged to 500 V rings at a quarter period of (π/2)√(LC) ≈ 222 µs with a peak
// of V0√(C/L) ≈ 3.54 kA; a unidirectional switch stops it at the half period with the bank fully reversed.
func ExampleRLCPulse() {
	p, err := hazards.RLCPulse(hazards.LoopModel{C: 1e-3, V0: 500, L: 1e-6, CoilL: 19e-6, Topology: hazards.Unidirectional})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%s, peak %.4g A at %.4g µs, bank left at %.4g V\n", p.Regime, p.PeakCurrent, p.TimeToPeak*1e6, p.VEnd)
	// Output: underdamped, peak 3536 A at 222.1 µs, bank left at -500 V
}

// The bare diameter of AWG 14 copper by ASTM B258.
func ExampleAWGDiameter() {
	d, _ := hazards.AWGDiameter(14)
	fmt.Printf("AWG 14: %.4g mm\n", d*1e3)
	// Output: AWG 14: 1.628 mm
}
