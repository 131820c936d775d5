package rules

import (
	"testing"

	"chargeward/hazards"
	"chargeward/schema"
)

// fixture is a hand-built rig and assessment for rule tests. The base fixture is a small, well-guarded
// bench rig (invented, for tests only) on which no rule of the default rulebook fires; each test case
// changes one thing and checks that exactly the rule it targets responds.
type fixture struct {
	rig        *schema.Rig
	q          map[string][2]float64 // name → nominal, worst
	gaps       []hazards.Gap
	sitePolicy string // a site policy file to evaluate under instead of the defaults; "" for none
}

func f64(v float64) *float64 { return &v }
func iptr(v int) *int        { return &v }
func bptr(v bool) *bool      { return &v }

func baseFixture() *fixture {
	r := &schema.Rig{
		Rig:    schema.Info{Name: "test rig", Revision: "1", AudienceDistance: f64(3)},
		Supply: &schema.Supply{Kind: "dc-supply", DCVoltage: f64(60), ChargingResistor: f64(1000), ChargingResistorPower: f64(10), Isolation: "interlocked"},
		Bank: schema.Bank{Capacitance: f64(1.1e-3), VoltageRating: f64(100), Dielectric: "film-polypropylene", PeakCurrent: f64(2000),
			Series: iptr(1), Parallel: iptr(1), PulseRated: bptr(true)},
		Bleeder:    &schema.Bleeder{Resistance: f64(4700), Count: iptr(2), ElementsInSeries: iptr(1), PowerRating: f64(1), VoltageRating: f64(350)},
		Switch:     &schema.Switch{Kind: "thyristor", Topology: "unidirectional", Blocking: f64(600), Surge: f64(5000), I2t: f64(1e5), DiDt: f64(1e8)},
		Coil:       &schema.Coil{Form: "solenoid", InsulationClass: f64(428.15)},
		Projectile: &schema.Projectile{Kind: "ring"},
		Room:       &schema.Room{CeilingHeight: f64(3), LaunchAxis: "vertical"},
		Controls: &schema.Controls{Enclosure: "full", Interlock: bptr(true), ChargedIndicator: bptr(true), GroundingHook: bptr(true),
			EyeProtection: "goggles", HearingProtection: bptr(true), ExclusionZone: f64(2), ImplantWarning: bptr(true),
			MainsIsolation: "rcd", Discharge: "wait-for-bleeder", VerifyBeforeTouch: bptr(true), Supervised: bptr(true)},
	}
	return &fixture{rig: r, q: map[string][2]float64{
		"supply.peak_voltage":                 {60, 63},
		"supply.charging_loss":                {2, 2.2},
		"supply.time_to_95":                   {3, 3.3},
		"supply.charging_resistor_peak_power": {3.6, 4},
		"bank.capacitance":                    {1.1e-3, 1.2e-3},
		"bank.voltage":                        {60, 63},
		"bank.voltage_rating":                 {100, 100},
		"bank.energy":                         {2, 2.4},
		"bank.charge":                         {0.066, 0.076},
		"bank.cell_voltage_max":               {60, 63},
		"discharge.time_constant":             {2.6, 2.9},
		"discharge.time_to_safe":              {0.5, 0.6},
		"discharge.time_to_safe_single_fault": {1, 1.2},
		"bleeder.power":                       {0.1, 0.12},
		"bleeder.element_voltage":             {60, 63},
		"pulse.peak_current":                  {1000, 1000},
		"pulse.i2t":                           {1000, 1000},
		"pulse.di_dt_max":                     {1e7, 1e7},
		"pulse.reversal":                      {0, 0},
		"coil.temperature_rise":               {2, 2},
		"launch.speed":                        {3, 3},
		"launch.kinetic_energy":               {0.1, 0.1},
		"launch.height":                       {0.46, 0.46},
		"projectile.temperature_rise":         {1, 1},
		"field.implant_distance":              {0.5, 0.5},
	}}
}

// set stores a quantity with the same nominal and worst value.
func (f *fixture) set(name string, v float64) { f.q[name] = [2]float64{v, v} }

// shockClass puts the bank in the shock class (400 V, 50 J).
func (f *fixture) shockClass() {
	f.set("bank.voltage", 400)
	f.set("bank.energy", 50)
	f.set("bank.voltage_rating", 500)
	f.rig.Bank.VoltageRating = f64(500)
	f.set("bleeder.element_voltage", 100)
}

func (f *fixture) assessment(t *testing.T) *hazards.Assessment {
	t.Helper()
	a := &hazards.Assessment{Rig: f.rig, Targets: hazards.DefaultTargets()}
	for _, name := range sortedKeys(f.q) {
		v := f.q[name]
		unit, ok := quantityCatalog[name]
		if !ok {
			t.Fatalf("fixture quantity %q is not in the catalog", name)
		}
		if err := a.Add(hazards.Quantity{Name: name, Value: v[0], Worst: hazards.Worst(v[1]), Unit: unit, Basis: "test fixture"}); err != nil {
			t.Fatal(err)
		}
	}
	for _, g := range f.gaps {
		a.AddGap(g.Field, g.Effect)
	}
	return a
}

func mustDefault(t *testing.T) *Set {
	t.Helper()
	s, err := Default()
	if err != nil {
		t.Fatalf("default rule set does not load: %v", err)
	}
	return s
}

func evaluate(t *testing.T, s *Set, f *fixture) *Review {
	t.Helper()
	if f.sitePolicy != "" {
		site, err := Load("site-policy.yaml", []byte(f.sitePolicy), "", nil)
		if err != nil {
			t.Fatalf("Load site policy: %v", err)
		}
		s = site
	}
	rv, err := s.Evaluate(f.assessment(t))
	if err != nil {
		t.Fatalf("Evaluate: %v", err)
	}
	return rv
}

func findRule(rv *Review, id string) (Finding, bool) {
	for _, f := range rv.Findings {
		if f.Rule == id {
			return f, true
		}
	}
	return Finding{}, false
}
