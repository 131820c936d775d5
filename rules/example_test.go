package rules_test

import (
	"fmt"

	"chargeward/hazards"
	"chargeward/rules"
	"chargeward/schema"
)

func f(v float64) *float64 { return &v }

// A hand-built assessment of an (invented) bank judged against the default rulebook and policy: a 400 V,
// 50 J bank discharged with a screwdriver.
func ExampleSet_Evaluate() {
	set, err := rules.Default()
	if err != nil {
		panic(err)
	}
	rig := &schema.Rig{
		Rig:      schema.Info{Name: "example", Revision: "1"},
		Bank:     schema.Bank{Capacitance: f(625e-6), VoltageRating: f(450)},
		Controls: &schema.Controls{Discharge: "screwdriver"},
	}
	a := &hazards.Assessment{Rig: rig, Targets: set.Targets()}
	for _, q := range []hazards.Quantity{
		{Name: "bank.voltage", Value: 400, Unit: "V"},
		{Name: "bank.energy", Value: 50, Unit: "J"},
	} {
		if err := a.Add(q); err != nil {
			panic(err)
		}
	}
	rv, err := set.Evaluate(a)
	if err != nil {
		panic(err)
	}
	fmt.Println(rv.Verdict)
	for _, f := range rv.Findings {
		if f.Rule == "SHK-01" || f.Rule == "DIS-06" {
			fmt.Println(f.Rule, f.Severity, f.Disposition)
		}
	}
	// Output:
	// not ready
	// SHK-01 DANGER controls
	// DIS-06 DANGER must-fix
}

func ExampleFormatQuantity() {
	fmt.Println(rules.FormatQuantity(2200e-6, "F"))
	fmt.Println(rules.FormatQuantity(1.5e8, "A/s"))
	fmt.Println(rules.FormatQuantity(428.15, "°C"))
	// Output:
	// 2.20 mF
	// 150 A/µs
	// 155 °C
}
