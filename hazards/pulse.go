package hazards

// LoopModel is the series R-L-C discharge loop as later stages use it. Owner: pulse and coil (issue 4).
type LoopModel struct {
	C        float64 // bank capacitance, F
	V0       float64 // initial bank voltage, V
	R        float64 // total loop resistance except the coil: ESR + wiring + switch, Ω
	L        float64 // loop inductance except the coil: wiring stray + switch, H
	CoilL    float64 // coil inductance, H
	CoilR    float64 // coil resistance at 20 °C, Ω
	Drop     float64 // switch forward drop, V
	Topology string  // "unidirectional", "antiparallel-diode" or "crowbar"
	// CrowbarAt is "coil" or "bank" for a crowbar topology.
	CrowbarAt string
}

// assessPulse computes the coil-only pulse (DESIGN.md §4.4). PLACEHOLDER until issue 4 lands.
func assessPulse(a *Assessment) error { return nil }
