package rules

import (
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
