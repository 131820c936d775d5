// Package riggen generates random but valid rig descriptions for property tests. The rigs are YAML text, so
// every property test also runs the loader. The ranges are wide on purpose (a few joules to tens of
// kilojoules, film and electrolytic banks, every switch topology) and say nothing about real rigs: they
// are test inputs, never expected values.
package riggen

import (
	"fmt"
	"math"
	"math/rand"
	"strings"
)

// Options select which optional sections a generated rig has.
type Options struct {
	// Launch includes a coil and a projectile (and so the launch simulation).
	Launch bool
	// Extras adds, at random, the less common parts of a description: a rig kind, mains tolerance and a
	// transformer, bleeder tolerance, a measured coil, a payload, a tilted launch axis and measurements.
	// Off, the generator draws exactly the sequence it always did, so seeded tests elsewhere keep their rigs.
	Extras bool
}

// Rig returns the YAML text of one random rig drawn from r.
func Rig(r *rand.Rand, opt Options) string {
	var b strings.Builder
	w := func(format string, args ...any) { fmt.Fprintf(&b, format+"\n", args...) }
	pick := func(xs ...string) string { return xs[r.Intn(len(xs))] }
	between := func(lo, hi float64) float64 { return lo + r.Float64()*(hi-lo) }

	w("rig:")
	w("  name: Generated rig %d", r.Intn(1_000_000))
	w("  revision: \"%d\"", 1+r.Intn(9))
	w("  audience_distance: %.2f m", between(0.5, 8))
	if opt.Extras && r.Intn(2) == 0 {
		w("  kind: %s", pick("disc-thrower", "ring-jumper", "magnetizer", "cd-welder", "flash-bank", "coil-accelerator", "other"))
	}

	series := 1 + r.Intn(3)
	rating := pick("63", "160", "250", "400", "450", "500", "800")
	var ratingV float64
	fmt.Sscan(rating, &ratingV)
	chargeV := ratingV * float64(series) * between(0.5, 1.05)

	w("supply:")
	if r.Intn(2) == 0 {
		w("  kind: dc-supply")
		w("  dc_voltage: %.1f V", chargeV)
		w("  current_limit: %.1f mA", between(1, 100))
	} else {
		w("  kind: mains-rectifier")
		mains := pick("120", "230", "240")
		w("  mains_voltage: %s V", mains)
		w("  mains_frequency: %s Hz", pick("50", "60"))
		rect := pick("half-wave", "bridge", "doubler")
		w("  rectifier: %s", rect)
		w("  regulated_voltage: %.1f V", chargeV)
		if opt.Extras && r.Intn(2) == 0 {
			w("  mains_tolerance: %.0f %%", between(5, 15))
			// A step-up or step-down transformer whose secondary peak, rectified, reaches the charge voltage.
			k := map[string]float64{"half-wave": 1, "bridge": 1, "doubler": 2}[rect]
			w("  transformers:")
			w("    - {primary_voltage: %s V, secondary_voltage: %.1f V, regulation: %.0f %%, rating: %.0f VA}",
				mains, chargeV/(k*math.Sqrt2)*between(1.0, 1.2)+2, between(3, 12), between(20, 500))
		}
	}
	w("  charging_resistor: %.0f Ω", between(100, 50_000))
	w("  isolation: %s", pick("interlocked", "unplugged", "switched", "stays-connected"))

	dielectric := pick("aluminium-electrolytic", "film-polypropylene", "film-polyester")
	capUF := between(10, 5000)
	if dielectric != "aluminium-electrolytic" {
		capUF = between(1, 400)
	}
	w("bank:")
	w("  capacitance: %.1f uF", capUF)
	w("  capacitance_tolerance: %.0f %%", between(1, 20))
	w("  voltage_rating: %s V", rating)
	w("  dielectric: %s", dielectric)
	w("  esr: %.1f mΩ", between(1, 200))
	w("  peak_current_rating: %.0f A", between(50, 5000))
	w("  series: %d", series)
	w("  parallel: %d", 1+r.Intn(4))
	if series > 1 && r.Intn(2) == 0 {
		w("  balancing:")
		w("    resistance: %.0f kΩ", between(10, 470))
		w("    power_rating: %.1f W", between(0.25, 5))
	}
	if r.Intn(5) != 0 {
		w("bleeder:")
		w("  resistance: %.0f kΩ", between(1, 1000))
		w("  count: %d", 1+r.Intn(2))
		w("  elements_in_series: %d", 1+r.Intn(3))
		w("  power_rating: %.1f W", between(0.25, 10))
		w("  voltage_rating: %.0f V", between(200, 1500))
		if opt.Extras && r.Intn(2) == 0 {
			w("  tolerance: %.0f %%", between(1, 10))
		}
	}
	if r.Intn(3) == 0 {
		w("dump:")
		w("  resistance: %.1f Ω", between(1, 100))
		w("  energy_rating: %.0f J", between(10, 2000))
		w("  switching: %s", pick("normally-closed-relay", "manual", "on-command"))
		w("  fail_safe: %v", r.Intn(2) == 0)
	}
	topology := pick("unidirectional", "antiparallel-diode", "crowbar")
	w("switch:")
	w("  kind: %s", pick("thyristor", "igbt", "spark-gap"))
	w("  topology: %s", topology)
	if topology == "crowbar" {
		w("  crowbar_at: %s", pick("coil", "bank"))
	}
	w("  blocking_voltage: %.0f V", chargeV*between(0.8, 3))
	w("  surge_current: %.1f kA", between(0.5, 10))
	w("  i2t_rating: %.1f kA²s", between(1, 200))
	w("  di_dt_critical: %.0f A/us", between(50, 500))
	w("  forward_drop: %.1f V", between(0, 2))
	if opt.Launch {
		// The winding always fits its stated dimensions (winding fill at most 1/1.02): hazards refuses a
		// coil whose turns need more room than the geometry gives.
		if opt.Extras && r.Intn(4) == 0 {
			w("coil:")
			w("  form: measured")
			w("  measured_inductance: %.1f uH", between(5, 200))
			w("  measured_resistance: %.1f mΩ", between(5, 300))
			w("  material: copper")
			w("  insulation_class: %s", pick("B", "F"))
		} else if r.Intn(2) == 0 {
			gauge := 10 + r.Intn(8)
			turns := 5 + r.Intn(30)
			inner := between(5, 20)
			build := float64(turns) * awgDiameterMM(gauge)
			w("coil:")
			w("  form: flat-spiral")
			w("  turns: %d", turns)
			w("  inner_diameter: %.1f mm", inner)
			w("  outer_diameter: %.1f mm", inner+2*build*between(1.02, 1.6)+0.1)
			w("  wire_gauge: %d", gauge)
			w("  material: copper")
			w("  insulation_class: %s", pick("A", "B", "F", "H"))
		} else {
			gauge := 12 + r.Intn(8)
			layers := 1 + r.Intn(3)
			turns := layers * (5 + r.Intn(25))
			w("coil:")
			w("  form: solenoid")
			w("  turns: %d", turns)
			w("  layers: %d", layers)
			w("  inner_diameter: %.1f mm", between(20, 60))
			w("  length: %.1f mm", float64(turns/layers)*awgDiameterMM(gauge)*between(1.02, 1.5)+0.1)
			w("  wire_gauge: %d", gauge)
			w("  material: copper")
			w("  insulation_class: %s", pick("B", "F"))
		}
		w("wiring:")
		w("  length: %.2f m", between(0.3, 3))
		w("  cross_section: %.1f mm²", between(1.5, 16))
		w("  separation: %.0f mm", between(5, 40))
		w("projectile:")
		kind := pick("disc", "ring")
		w("  kind: %s", kind)
		w("  material: %s", pick("aluminium-1100", "aluminium-6061", "copper"))
		od := between(40, 130)
		w("  outer_diameter: %.1f mm", od)
		if kind == "ring" {
			w("  inner_diameter: %.1f mm", od*between(0.5, 0.8))
		}
		w("  thickness: %.1f mm", between(1, 10))
		w("  gap: %.1f mm", between(0.5, 5))
		if opt.Extras && r.Intn(3) == 0 {
			w("  payload_mass: %.0f g", between(1, 50))
		}
	}
	w("room:")
	w("  ceiling_height: %.1f m", between(2.2, 8))
	if opt.Extras && r.Intn(3) == 0 {
		w("  launch_axis: tilted")
		w("  tilt: %.1f deg", between(0, 15))
	} else {
		w("  launch_axis: vertical")
	}
	w("controls:")
	w("  enclosure: %s", pick("none", "partial", "full"))
	w("  interlock: %v", r.Intn(2) == 0)
	w("  charged_indicator: %v", r.Intn(2) == 0)
	w("  grounding_hook: %v", r.Intn(2) == 0)
	w("  eye_protection: %s", pick("none", "spectacles", "goggles", "faceshield"))
	w("  hearing_protection: %v", r.Intn(2) == 0)
	w("  exclusion_zone: %.1f m", between(0.5, 6))
	w("  discharge_method: %s", pick("wait-for-bleeder", "dump-resistor", "shorting-stick", "touch"))
	if opt.Extras && r.Intn(2) == 0 {
		w("measurements:")
		w("  charge_voltage: %.1f V", chargeV*between(0.95, 1.02))
		w("  decay_time: %.1f s", between(1, 120))
		if opt.Launch {
			w("  launch_height: %.2f m", between(0.05, 2))
		}
	}
	return b.String()
}

// awgDiameterMM is the bare diameter of AWG gauge g in mm, d = 0.127 mm × 92^((36 − g)/39) (ASTM B258).
func awgDiameterMM(g int) float64 {
	return 0.127 * math.Pow(92, float64(36-g)/39)
}
