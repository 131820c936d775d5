package hazards

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"chargeward/hazards/em"
)

// TestAxialField checks the on-axis loop field against its closed forms: μ0 I/(2R) at the centre of one
// loop and the dipole field μ0 m/(2π z³) far away (Griffiths, Introduction to Electrodynamics, 4th ed.,
// Example 5.6 and eq. 5.88), and the implant distance against the inverted single-loop formula
// z = √((μ0 I R²/(2 B))^{2/3} − R²).
func TestAxialField(t *testing.T) {
	const i, r = 1000.0, 0.05
	loop := []Filament{{R: r, Z: 0, Turns: 1}}
	tests := []struct {
		name      string
		got, want float64
		tol       float64
	}{
		{"centre μ0 I / 2R", AxialField(loop, i, 0), em.Mu0 * i / (2 * r), 1e-14},                           // same formula: rounding only
		{"turns multiply", AxialField([]Filament{{R: r, Turns: 7}}, i, 0), 7 * em.Mu0 * i / (2 * r), 1e-14}, // linearity
		// Far field: the relative correction to the dipole term is 1.5 (R/z)² = 3.75e-5 at z = 200 R.
		{"dipole far field", AxialField(loop, i, 200*r), em.Mu0 * i * math.Pi * r * r / (2 * math.Pi * math.Pow(200*r, 3)), 5e-5},
	}
	limit := 0.5e-3
	d, err := ImplantDistance(loop, i, limit)
	if err != nil {
		t.Fatal(err)
	}
	want := math.Sqrt(math.Pow(em.Mu0*i*r*r/(2*limit), 2.0/3) - r*r)
	tests = append(tests, struct {
		name      string
		got, want float64
		tol       float64
	}{"implant distance, inverted loop formula", d, want, 1e-8}) // bisection to 1e-9
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if !scalar.EqualWithinRel(tc.got, tc.want, tc.tol) {
				t.Errorf("got %.10g, want %.10g", tc.got, tc.want)
			}
		})
	}
	if d0, err := ImplantDistance(loop, 1e-3, limit); err != nil || d0 != 0 {
		t.Errorf("weak field: got %g, %v; want 0 m (already below the limit at the face)", d0, err)
	}
	if _, err := ImplantDistance(loop, i, 0); err == nil {
		t.Errorf("zero limit: got no error, want one")
	}
}

// TestBallistics checks the flight helpers against uniformly accelerated motion.
func TestBallistics(t *testing.T) {
	f := ballistic(0.01, 10, 0.005, 0)
	if want := 0.01 + 100/(2*gravity); !scalar.EqualWithinRel(f.apex, want, 1e-14) || f.reaches {
		t.Errorf("no ceiling: got apex %g (reaches %v), want %g and no strike", f.apex, f.reaches, want)
	}
	f = ballistic(0, 10, 0, 2.7)
	// Time to climb 2.7 m at 10 m/s: (10 − √(100 − 2g·2.7))/g; impact speed √(100 − 2g·2.7).
	vc := math.Sqrt(100 - 2*gravity*2.7)
	if !f.reaches || !scalar.EqualWithinRel(f.impactSpeed, vc, 1e-14) || !scalar.EqualWithinRel(f.timeToCeiling, (10-vc)/gravity, 1e-12) {
		t.Errorf("ceiling: got reaches %v, speed %g, time %g; want true, %g, %g", f.reaches, f.impactSpeed, f.timeToCeiling, vc, (10-vc)/gravity)
	}
	th := 5 * math.Pi / 180
	if got, want := tiltedRange(5, th, 0), 25*math.Sin(2*th)/gravity; !scalar.EqualWithinRel(got, want, 1e-14) {
		t.Errorf("tilted range: got %g, want %g", got, want)
	}
	// With a ceiling in the way the conservative range is still no longer than the free range.
	if c, free := tiltedRange(20, th, 2.7), tiltedRange(20, th, 0); !(c > 0 && c <= free) {
		t.Errorf("ceiling-limited range: got %g, want in (0, %g]", c, free)
	}
}
