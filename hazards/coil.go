package hazards

// Filament is one coaxial circular current filament of the coil.
type Filament struct {
	R float64 // radius, m
	Z float64 // axial position of the filament's centre, m; the coil face nearest the projectile is z = 0,
	//             the coil lies at z ≤ 0, the projectile above at z > 0
	Turns float64 // turns this filament stands for (1 for one turn per filament)
}

// CoilModel is the coil as later stages use it. Owner: pulse and coil (issue 4).
type CoilModel struct {
	Filaments  []Filament // the coil as filaments, all carrying the coil current
	L          float64    // inductance used in the pulse model, H (measured if given, else the filament sum)
	R20        float64    // DC resistance at 20 °C, Ω (measured if given)
	WireRadius float64    // bare conductor radius, m
	Material   string     // "copper" or "aluminium"
	Mass       float64    // conductor mass, kg (for heating)
}

// assessCoil computes the coil quantities (DESIGN.md §4.5). PLACEHOLDER until issue 4 lands.
func assessCoil(a *Assessment) error { return nil }
