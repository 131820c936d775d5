// Package hazards computes the physics that decides a charged-capacitor rig's hazards: supply peak voltage,
// bank energy and voltage sharing, discharge paths and bleeder sizing, the R-L-C pulse through switch and
// coil, coil heating, the projectile launch and the magnetic field around the coil.
//
// Every function is a pure function of a schema.Rig and plain numeric targets; nothing here judges a result
// (that is package rules) or performs I/O. Every computed value is a Quantity carrying its SI unit, the
// formula, its inputs, its basis (the published source of the method, "common practice" or "from memory")
// and, where tolerances make it worse, its worst case. No NaN or Inf leaves this package: an impossible
// state is an error.
package hazards

import (
	"errors"
	"fmt"
	"math"
	"sort"

	"chargeward/schema"
)

// Quantity is one computed value. Value and Worst are in SI base units (Unit).
type Quantity struct {
	Name    string   // dotted name, DESIGN.md §9 ("bank.energy")
	Value   float64  // nominal
	Worst   *float64 // worst case over the stated tolerances; nil when tolerances do not apply
	Unit    string   // SI unit symbol: "J", "V", "A²s", "1" for a dimensionless ratio
	Formula string   // the formula in symbols or words
	Inputs  []Input  // the values the formula used
	Basis   string   // published source with clause, "common practice" or "from memory"
	Note    string   // assumptions and the worst-case corner, in words
}

// Input is one value a formula used.
type Input struct {
	Symbol string  // as written in the formula ("C", "V0")
	Name   string  // quantity name or rig field path ("bank.capacitance")
	Value  float64 // SI
	Unit   string
}

// Gap records information the rig does not state, so that a quantity could not be computed. A gap is never
// read as safe: package rules turns each one into a finding.
type Gap struct {
	Field  string // rig field path that is missing ("switch.i2t_rating")
	Effect string // clause saying what could not be computed ("the switch's I²t margin cannot be checked")
}

// Curve is a sampled waveform for a figure.
type Curve struct {
	Name   string    // "discharge.decay", "discharge.decay_single_fault", "pulse.current", "launch.current", ...
	XLabel string    // quantity and unit of the abscissa, "time (s)"
	YLabel string    // "bank voltage (V)"
	XUnit  string    // "s"
	YUnit  string    // "V"
	X, Y   []float64 // SI values
}

// Targets are the few policy values that quantities are computed against. The caller takes them from the
// policy (package rules); hazards never imports rules.
type Targets struct {
	SafeVoltage       float64 // V; residual voltage considered safe (NEC 460 uses 50 V)
	TimeAllowed       float64 // s; time allowed to reach SafeVoltage (for reference curves only)
	ImplantFluxLimit  float64 // T; field limit for people with implanted medical devices (0.5 mT)
	Derating          float64 // fraction; resistor power derating margin used by the bleeder sizing (0.5)
	ReferenceAmbient  float64 // K; ambient temperature for heating (293.15)
	LaunchTilt        float64 // rad; default worst-case launch tilt when the rig states none
	SimulationTimeout float64 // s of wall time allowed for the launch simulation; 0 means the default
}

// DefaultTargets are the values used when no policy is given (tests, examples). Basis of each in the policy.
func DefaultTargets() Targets {
	return Targets{
		SafeVoltage:      50,                // NFPA 70 (NEC) 460.6(A), 2023 ed.
		TimeAllowed:      60,                // NFPA 70 (NEC) 460.6(A), 2023 ed., capacitors ≤ 1000 V
		ImplantFluxLimit: 0.5e-3,            // ACGIH TLV for static magnetic fields, implanted devices
		Derating:         0.5,               // common practice: run resistors at ≤ 50 % of rated power
		ReferenceAmbient: 293.15,            // 20 °C, the reference temperature of IEC 60287-1-1 resistivities
		LaunchTilt:       5 * math.Pi / 180, // common practice: assume 5° of tilt for a hand-aligned coil
	}
}

// Assessment is everything computed for one rig.
type Assessment struct {
	Rig        *schema.Rig
	Targets    Targets
	Quantities []Quantity // in the order computed; use Q to look one up
	Curves     []Curve
	Gaps       []Gap
	index      map[string]int
	m          models // stage models for later stages (assess.go)
}

// Q returns the named quantity and whether it exists.
func (a *Assessment) Q(name string) (Quantity, bool) {
	if a.index == nil {
		return Quantity{}, false
	}
	i, ok := a.index[name]
	if !ok {
		return Quantity{}, false
	}
	return a.Quantities[i], true
}

// Curve returns the named curve and whether it exists.
func (a *Assessment) Curve(name string) (Curve, bool) {
	for _, c := range a.Curves {
		if c.Name == name {
			return c, true
		}
	}
	return Curve{}, false
}

// ErrNonFinite is returned (wrapped) when a computation would produce NaN or Inf.
var ErrNonFinite = errors.New("computation produced a non-finite value")

// Add appends q, replacing an earlier quantity of the same name. A non-finite value is an error.
func (a *Assessment) Add(q Quantity) error {
	if math.IsNaN(q.Value) || math.IsInf(q.Value, 0) || (q.Worst != nil && (math.IsNaN(*q.Worst) || math.IsInf(*q.Worst, 0))) {
		return fmt.Errorf("%s: %w", q.Name, ErrNonFinite)
	}
	if a.index == nil {
		a.index = map[string]int{}
	}
	if i, ok := a.index[q.Name]; ok {
		a.Quantities[i] = q
		return nil
	}
	a.index[q.Name] = len(a.Quantities)
	a.Quantities = append(a.Quantities, q)
	return nil
}

// AddGap records missing information once per field.
func (a *Assessment) AddGap(field, effect string) {
	for _, g := range a.Gaps {
		if g.Field == field {
			return
		}
	}
	a.Gaps = append(a.Gaps, Gap{Field: field, Effect: effect})
}

// Names returns the quantity names in sorted order.
func (a *Assessment) Names() []string {
	n := make([]string, 0, len(a.Quantities))
	for _, q := range a.Quantities {
		n = append(n, q.Name)
	}
	sort.Strings(n)
	return n
}

// Worst returns a pointer to v, for Quantity.Worst.
func Worst(v float64) *float64 { return &v }
