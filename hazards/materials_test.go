package hazards

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

func TestMaterialByName(t *testing.T) {
	tests := []struct {
		name    string
		want    float64 // ρ20, Ω·m
		alpha   float64 // 1/K
		density float64 // kg/m³
		source  string
	}{
		{"copper", 1.7241e-8, 0.00393, 8890, "NBS Handbook 100; IEC 60287-1-1 Table 1"},
		{"Copper", 1.7241e-8, 0.00393, 8890, "case ignored"},
		{"aluminium", 2.8264e-8, 0.00403, 2710, "IEC 60287-1-1 Table 1 (1350 grade)"},
		{"aluminum-1350", 2.8264e-8, 0.00403, 2710, "IEC 60287-1-1 Table 1; US spelling"},
		{"aluminium-1100", 2.9e-8, 0.0040, 2710, "producers' data sheets (partial); α from memory"},
		{"aluminium-6061", 3.99e-8, 0.0035, 2700, "from memory"},
		{"brass", 6.16e-8, 0.0015, 8530, "from memory"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			m, ok := MaterialByName(tt.name)
			if !ok {
				t.Fatalf("got not found, want %s (%s)", tt.name, tt.source)
			}
			if m.Resistivity20 != tt.want || m.Alpha20 != tt.alpha || m.Density != tt.density {
				t.Errorf("got ρ20 %g α %g ρm %g, want %g %g %g (%s)", m.Resistivity20, m.Alpha20, m.Density, tt.want, tt.alpha, tt.density, tt.source)
			}
			if m.Basis == "" || m.SpecificHeat <= 0 {
				t.Errorf("got basis %q c %g, want a basis and c > 0", m.Basis, m.SpecificHeat)
			}
		})
	}
	if _, ok := MaterialByName("steel"); ok {
		t.Errorf("got steel found, want not found (ferromagnetic, not modelled by ρ alone)")
	}
}

// TestMaterialIEC60949Consistency checks the tabulated materials against IEC 60949 (1988) Table 1, whose
// constant K = √(σ (β + 20) / ρ20) ties the volumetric heat σ, the reciprocal temperature coefficient β and ρ20
// together: copper K = 226 A·s½/mm², β = 234.5 °C; aluminium K = 148, β = 228.
func TestMaterialIEC60949Consistency(t *testing.T) {
	tests := []struct {
		m    Material
		K    float64 // A·s½/mm²
		beta float64 // °C
	}{
		{Copper, 226, 234.5},
		{Aluminium1350, 148, 228},
	}
	for _, tt := range tests {
		t.Run(tt.m.Name, func(t *testing.T) {
			k := math.Sqrt(tt.m.VolumetricHeat()*(tt.beta+20)/tt.m.Resistivity20) * 1e-6 // A·s½/m² → /mm²
			// IEC 60949 rounds K to 3 significant figures: 0.3 % covers the rounding.
			if !scalar.EqualWithinRel(k, tt.K, 3e-3) {
				t.Errorf("got K %.2f, want %.0f (IEC 60949 Table 1)", k, tt.K)
			}
			// α20 = 1/(β + 20): the tabulated α20 and IEC 60949's β agree to their 3–4 significant figures.
			if !scalar.EqualWithinRel(tt.m.Alpha20, 1/(tt.beta+20), 1e-3) {
				t.Errorf("got α20 %g, want 1/(β+20) = %g", tt.m.Alpha20, 1/(tt.beta+20))
			}
		})
	}
}
