package report_test

import (
	"fmt"

	"chargeward/report"
)

// ExampleSI shows how values in SI base units are printed in reviews: three significant figures with the SI
// prefix that keeps the mantissa between 1 and 1000 (SI Brochure, 9th ed., §3), di/dt in A/µs as on thyristor
// data sheets, and times no larger than seconds.
func ExampleSI() {
	fmt.Println(report.SI(0.0022, "F"))
	fmt.Println(report.SI(3292.3, "A"))
	fmt.Println(report.SI(0.000380343, "s"))
	fmt.Println(report.SI(582.158, "s"))
	fmt.Println(report.SI(1.77595e7, "A/s"))
	fmt.Println(report.SI(0.045, "Ω"))
	// Output:
	// 2.2 mF
	// 3.29 kA
	// 380 µs
	// 582 s
	// 17.8 A/µs
	// 45 mΩ
}
