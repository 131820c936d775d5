package hazards

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

// TestAdiabaticKFactor derives the k factors of IEC 60364-4-43 Table 43A (IEC 60364-5-54 Annex A) from the
// adiabatic formula: k = √(I²t)/S for a conductor heated from the cable's operating to its short-circuit
// temperature, k = K √ln((θf + β)/(θi + β)).
func TestAdiabaticKFactor(t *testing.T) {
	tests := []struct {
		name           string
		m              Material
		thetaI, thetaF float64 // °C
		k              float64 // A·s½/mm²
		source         string
	}{
		{"PVC copper", Copper, 70, 160, 115, "IEC 60364-4-43 Table 43A"},
		{"XLPE copper", Copper, 90, 250, 143, "IEC 60364-5-54 Annex A"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			s := 1e-6 // 1 mm²
			i2t := AdiabaticI2t(tt.m, s, tt.thetaI+273.15, tt.thetaF+273.15)
			k := math.Sqrt(i2t) / (s * 1e6)
			// k is tabulated to 3 significant figures and IEC 60949's K to 3: 0.5 % covers both roundings.
			if !scalar.EqualWithinRel(k, tt.k, 5e-3) {
				t.Errorf("got k %.2f, want %.0f (%s)", k, tt.k, tt.source)
			}
			back, err := AdiabaticFinal(tt.m, s, i2t, tt.thetaI+273.15)
			if err != nil {
				t.Fatal(err)
			}
			// inverse functions: rounding only.
			if !scalar.EqualWithinRel(back, tt.thetaF+273.15, 1e-12) {
				t.Errorf("got θf %g K, want %g K (inverse of AdiabaticI2t)", back, tt.thetaF+273.15)
			}
		})
	}
}

// TestAdiabaticSmallRise checks the small-pulse limit: for a small rise the temperature-dependent form
// reduces to ΔT = ρ(θi) I²t / (σ S²) (resistive heat into the heat capacity, resistivity at the start).
func TestAdiabaticSmallRise(t *testing.T) {
	s, i2t, ti := 3.31e-6, 1000.0, 293.15
	tf, err := AdiabaticFinal(Copper, s, i2t, ti)
	if err != nil {
		t.Fatal(err)
	}
	want := Copper.Resistivity(ti) * i2t / (Copper.VolumetricHeat() * s * s)
	// the exact rise exceeds the linear one by a factor ≈ 1 + x/2, x = α ΔT ≈ 1e-3 here: 1e-3 tolerance.
	if got := tf - ti; !scalar.EqualWithinRel(got, want, 1e-3) || got < want {
		t.Errorf("got ΔT %g K, want just above %g K", got, want)
	}
}

func TestShotsToLimit(t *testing.T) {
	s := 3.31e-6
	one := AdiabaticI2t(Copper, s, 293.15, 303.15) // I²t of one 10 K shot from 20 °C
	// geometric growth of (θ + β): n shots of the same I²t reach ln((θlim+β)/(θi+β)) / ln(per shot).
	want := int(math.Floor(math.Log((130+234.45)/(20+234.45)) / math.Log((30+234.45)/(20+234.45))))
	if got := ShotsToLimit(Copper, s, one, 293.15, 403.15); got != want {
		t.Errorf("got %d shots, want %d", got, want)
	}
	if got := ShotsToLimit(Copper, s, 0, 293.15, 403.15); got != -1 {
		t.Errorf("got %d for no current, want −1", got)
	}
	if _, err := AdiabaticFinal(Copper, 0, 1, 293.15); err == nil {
		t.Errorf("got no error for S = 0")
	}
}
