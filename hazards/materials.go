package hazards

import "strings"

// Material is a conductor material: its resistivity and temperature coefficient at 20 °C and the thermal
// properties the heating calculations need.
type Material struct {
	Name          string
	Resistivity20 float64 // Ω·m at 20 °C
	Alpha20       float64 // temperature coefficient of resistivity at 20 °C, 1/K: ρ(θ) ≈ ρ20 [1 + α20 (θ − 20 °C)]
	Density       float64 // kg/m³
	SpecificHeat  float64 // J/(kg·K), near room temperature
	Basis         string  // where the values come from
	// ResistivitySpread is the fractional spread of ρ20 between lots or tempers (0.10 = ±10 %); the launch
	// worst case takes the low end, which gives the larger eddy currents. Zero where the grade fixes ρ.
	ResistivitySpread float64
}

// VolumetricHeat returns the volumetric specific heat Density·SpecificHeat, J/(K·m³).
func (m Material) VolumetricHeat() float64 { return m.Density * m.SpecificHeat }

// Resistivity returns ρ(θ) = ρ20 [1 + α20 (θ − 293.15 K)], Ω·m, at the conductor temperature theta (K).
// The linear law is the one IEC 60287-1-1 (§2.1.1) uses for conductor resistance; valid from about
// −50 °C to a few hundred °C for copper and aluminium.
func (m Material) Resistivity(theta float64) float64 {
	return m.Resistivity20 * (1 + m.Alpha20*(theta-293.15))
}

// Copper: annealed copper, IACS. ρ20 = 1/58 Ω·mm²/m = 1.7241e-8 Ω·m, α20 = 0.00393 /K, 8.89 g/cm³ (NBS
// Handbook 100, Copper Wire Tables, 1966; IEC 60287-1-1 Table 1). Specific heat: IEC 60949 Table 1 gives the
// volumetric specific heat σ = 3.45e6 J/(K·m³), which over 8890 kg/m³ is 388 J/(kg·K).
var Copper = Material{
	Name:          "copper",
	Resistivity20: 1.7241e-8,
	Alpha20:       0.00393,
	Density:       8890,
	SpecificHeat:  3.45e6 / 8890,
	Basis:         "NBS Handbook 100 (1966) and IEC 60287-1-1 Table 1 (ρ20, α20, density); IEC 60949 Table 1 (σ = 3.45 MJ/(K·m³))",
}

// Aluminium1350 is electrical-conductor grade aluminium (EC, 61 % IACS): ρ20 = 2.8264e-8 Ω·m,
// α20 = 0.00403 /K (IEC 60287-1-1 Table 1), 2.71 g/cm³ (producers' data sheets); specific heat from
// IEC 60949 Table 1, σ = 2.5e6 J/(K·m³), over 2710 kg/m³ (922 J/(kg·K)).
var Aluminium1350 = Material{
	Name:          "aluminium-1350",
	Resistivity20: 2.8264e-8,
	Alpha20:       0.00403,
	Density:       2710,
	SpecificHeat:  2.5e6 / 2710,
	Basis:         "IEC 60287-1-1 Table 1 (ρ20, α20); producers' data sheets (density); IEC 60949 Table 1 (σ = 2.5 MJ/(K·m³))",
}

// Aluminium1100 is commercially pure (99.0 %) aluminium, about 59 % IACS: ρ20 ≈ 2.9e-8 Ω·m (producers'
// data sheets, partial); α20 ≈ 0.0040 /K and c ≈ 900 J/(kg·K) from memory.
var Aluminium1100 = Material{
	Name:          "aluminium-1100",
	Resistivity20: 2.9e-8,
	Alpha20:       0.0040,
	Density:       2710,
	SpecificHeat:  900,
	Basis:         "producers' data sheets (ρ20 ≈ 2.9e-8 Ω·m, 2.71 g/cm³); α20 and c from memory",
}

// Aluminium6061 is 6061-T6 alloy, about 43 % IACS: ρ20 ≈ 4.0e-8 Ω·m, α20 ≈ 0.0035 /K, 2700 kg/m³,
// c ≈ 896 J/(kg·K) — all from memory (typical producers' figures); the temper changes ρ by ±10 %.
var Aluminium6061 = Material{
	Name:          "aluminium-6061",
	Resistivity20: 3.99e-8,
	Alpha20:       0.0035,
	Density:       2700,
	SpecificHeat:  896,
	Basis:         "from memory: typical producers' figures for 6061-T6 (43 % IACS); temper changes ρ by about ±10 %",

	ResistivitySpread: 0.10,
}

// Brass is cartridge brass C26000 (70/30), about 28 % IACS: ρ20 ≈ 6.2e-8 Ω·m, α20 ≈ 0.0015 /K,
// 8530 kg/m³, c ≈ 380 J/(kg·K) — all from memory (typical producers' figures).
var Brass = Material{
	Name:          "brass",
	Resistivity20: 6.16e-8,
	Alpha20:       0.0015,
	Density:       8530,
	SpecificHeat:  380,
	Basis:         "from memory: typical producers' figures for C26000 cartridge brass (28 % IACS)",
}

// MaterialByName returns the conductor material of that name: "copper", "aluminium" or "aluminum"
// (conductor grade 1350), "aluminium-1350", "aluminium-1100", "aluminium-6061", "brass". Case is ignored
// and "aluminum" is accepted for "aluminium". Steel is deliberately absent: a ferromagnetic projectile is
// not described by a resistivity alone.
func MaterialByName(name string) (Material, bool) {
	n := strings.ReplaceAll(strings.ToLower(strings.TrimSpace(name)), "aluminum", "aluminium")
	switch n {
	case "copper", "cu":
		return Copper, true
	case "aluminium", "aluminium-1350", "al":
		return Aluminium1350, true
	case "aluminium-1100":
		return Aluminium1100, true
	case "aluminium-6061":
		return Aluminium6061, true
	case "brass":
		return Brass, true
	}
	return Material{}, false
}
