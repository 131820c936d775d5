package rules

import (
	"strings"
	"testing"
)

// TestCatalogUnits: every quantity the physics computes for the demo rigs that the catalog names carries the
// unit the catalog states (rules format messages and compare thresholds by it), and every quantity of the
// DESIGN.md §9 contract is in the catalog.
func TestCatalogUnits(t *testing.T) {
	s := mustDefault(t)
	for _, rig := range []string{"disc-thrower", "ring-jumper", "flash-bank"} {
		rv := demoReview(t, s, rig)
		for _, q := range rv.Assessment.Quantities {
			if u, ok := quantityCatalog[q.Name]; ok && u != q.Unit {
				t.Errorf("%s: %s: got unit %q from the physics, catalog says %q", rig, q.Name, q.Unit, u)
			}
		}
	}
	for _, n := range []string{"supply.peak_voltage", "bank.capacitance", "bank.voltage", "bank.voltage_rating", "bank.energy", "bank.charge",
		"bank.cell_voltage_max", "discharge.time_constant", "discharge.time_to_safe", "discharge.time_to_safe_single_fault", "bleeder.power",
		"pulse.peak_current", "pulse.time_to_peak", "pulse.di_dt_max", "pulse.i2t", "pulse.reversal", "coil.inductance", "coil.resistance",
		"coil.temperature_rise", "launch.speed", "launch.kinetic_energy", "launch.height", "launch.efficiency", "projectile.temperature_rise",
		"field.peak_flux_density", "field.implant_distance"} {
		if _, ok := quantityCatalog[n]; !ok {
			t.Errorf("DESIGN.md §9 quantity %s is not in the catalog", n)
		}
	}
}

// TestEveryThresholdIsUsed: every policy entry is read by a rule, a derived limit or the physics targets,
// so the policy holds no dead numbers.
func TestEveryThresholdIsUsed(t *testing.T) {
	s := mustDefault(t)
	used := map[string]bool{
		// Targets and TargetsFor (set.go)
		"residual.safe_voltage": true, "residual.time_low": true, "residual.time_high": true, "residual.class_boundary": true,
		"field.implant_limit": true, "derating.resistor_power": true, "ambient.reference": true, "launch.default_tilt": true,
		// deriveLimits (env.go)
		"eye.spectacles_speed": true, "eye.goggles_speed": true, "eye.faceshield_speed": true,
		"eye.spectacles_energy": true, "eye.goggles_energy": true, "eye.faceshield_energy": true,
	}
	for _, r := range s.Rules() {
		for _, e := range s.Policy().Entries() {
			if strings.Contains(r.When+" "+r.Applies+" "+r.Message, "policy."+e.Key) {
				used[e.Key] = true
			}
		}
	}
	for _, e := range s.Policy().Entries() {
		if !used[e.Key] {
			t.Errorf("policy entry %s is read by no rule, limit or target", e.Key)
		}
	}
}

// TestHostileDisableAllListsEveryRule keeps the hostile site rulebook that disables every default rule
// (testdata/hostile, run by the command tests) in step with the rulebook: when a rule is added, add its id
// there too.
func TestHostileDisableAllListsEveryRule(t *testing.T) {
	data := string(readTestdata(t, "hostile/rules-disable-all.yaml"))
	for _, r := range mustDefault(t).Rules() {
		if !strings.Contains(data, "{id: "+r.ID+",") {
			t.Errorf("testdata/hostile/rules-disable-all.yaml does not disable %s; add it", r.ID)
		}
	}
}
