package hazards_test

import (
	"fmt"

	"chargeward/hazards"
)

// A bank of 1100 µF charged to 680 V must fall to 50 V within one minute (NEC 460.6(A)); its two series cells
// are rated 350 V, so the bleeder is split across them.
func ExampleSizeBleeder() {
	plan, err := hazards.SizeBleeder(hazards.BleederRequest{
		Capacitance: 1100e-6, Voltage: 680, SafeVoltage: 50, TimeAllowed: 60, Series: 2, ElementVoltage: 350,
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("window %.3g–%.3g kΩ for the chain, %d resistors\n", plan.RMin/1e3, plan.RMax/1e3, plan.Elements)
	for _, c := range plan.Choices {
		fmt.Printf("%s: %.3g kΩ each, %.3g s to 50 V (worst %.3g s), %.3g W each, rated %g W\n",
			c.Series, c.Element/1e3, c.TimeToSafe, c.TimeToSafeWorst, c.Power, c.PowerStandard)
	}
	// Output:
	// window 0–16.6 kΩ for the chain, 2 resistors
	// E12: 8.2 kΩ each, 47.1 s to 50 V (worst 59.3 s), 14.1 W each, rated 50 W
	// E24: 8.2 kΩ each, 47.1 s to 50 V (worst 59.3 s), 14.1 W each, rated 50 W
}

// The time for a 2200 µF bank on a 100 kΩ bleeder (τ = 220 s) to fall from 680 V to 50 V.
func ExampleDecayTime() {
	fmt.Printf("%.0f s\n", hazards.DecayTime(680, 50, 100e3*2200e-6))
	// Output: 574 s
}

// The nearest IEC 60063 values to 5 kΩ.
func ExampleENearest() {
	fmt.Println(hazards.ENearest(hazards.E12, 5000), hazards.ENearest(hazards.E24, 5000))
	// Output: 4700 5100
}
