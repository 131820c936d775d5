package rules

import (
	"strings"
	"testing"

	"chargeward/hazards"
	"chargeward/schema"
)

// ruleCase makes one rule fire (fire) and, separately, keeps it quiet in a nearby state (quiet; nil means
// the base fixture). The thresholds crossed are the policy's, whose sources are in policy.yaml; the
// fixtures only place a value on either side of them.
type ruleCase struct {
	rule        string
	fire, quiet func(f *fixture)
}

var ruleCases = []ruleCase{
	// DOE/LBNL capacitor classes: shock >= 100 V and >= 10 J (Table 2.2.13).
	{"SHK-01", func(f *fixture) { f.shockClass() }, func(f *fixture) { f.set("bank.voltage", 400); f.set("bank.energy", 9) }},
	// DOE-HDBK-1092 reflex: > 400 V and > 0.25 J.
	{"SHK-02", func(f *fixture) { f.set("bank.voltage", 450); f.set("bank.energy", 5) }, func(f *fixture) { f.set("bank.voltage", 450); f.set("bank.energy", 0.2) }},
	// IEC 61010-1 §6.3.1: 70 V DC and 45 µC.
	{"SHK-03", func(f *fixture) { f.set("bank.voltage", 300); f.set("bank.energy", 5) }, func(f *fixture) { f.set("bank.voltage", 300); f.set("bank.energy", 5); f.set("bank.charge", 40e-6) }},
	// LBNL Table 2.3.3 arc flash: >= 100 V and >= 10 kJ.
	{"ARC-01", func(f *fixture) { f.set("bank.voltage", 1000); f.set("bank.energy", 20e3) }, func(f *fixture) { f.set("bank.voltage", 1000); f.set("bank.energy", 5e3) }},
	// LBNL Table 2.3.5 thermal: < 100 V and > 100 J.
	{"THM-01", func(f *fixture) { f.set("bank.energy", 200) }, func(f *fixture) { f.set("bank.voltage", 120); f.set("bank.energy", 200) }},
	// NEC 460.6(A): 50 V within 60 s (<= 1000 V).
	{"DIS-01", func(f *fixture) { f.set("discharge.time_to_safe", 100) }, nil},
	// NEC 460.28(A): above 1000 V, 300 s are allowed: 200 s passes there.
	{"DIS-01", func(f *fixture) { f.set("bank.voltage", 2000); f.set("discharge.time_to_safe", 400) }, func(f *fixture) { f.set("bank.voltage", 2000); f.set("discharge.time_to_safe", 200) }},
	{"DIS-02", func(f *fixture) { failSafeDump(f, 10); f.set("discharge.time_to_safe", 100) }, func(f *fixture) { failSafeDump(f, 10) }},
	// τ = 1 MΩ · 1.1 mF = 1100 s; 10 Ω gives 11 ms.
	{"DIS-03", func(f *fixture) { failSafeDump(f, 1e6) }, func(f *fixture) { failSafeDump(f, 10) }},
	{"DIS-04", func(f *fixture) { f.rig.Bleeder = nil }, func(f *fixture) { f.rig.Bleeder = nil; failSafeDump(f, 10) }},
	{"DIS-05", func(f *fixture) { f.shockClass(); f.set("discharge.time_to_safe_single_fault", 100) }, func(f *fixture) { f.shockClass() }},
	{"DIS-11", func(f *fixture) {
		f.shockClass()
		delete(f.q, "discharge.time_to_safe_single_fault")
		f.rig.Bleeder.Count = iptr(1)
	},
		func(f *fixture) { f.shockClass(); delete(f.q, "discharge.time_to_safe_single_fault") }},
	{"DIS-06", func(f *fixture) { f.rig.Controls.Discharge = "screwdriver" }, nil},
	{"DIS-06", func(f *fixture) { f.rig.Controls.Discharge = "touch" }, func(f *fixture) { f.rig.Controls.Discharge = "shorting-stick" }},
	{"DIS-07", func(f *fixture) { f.rig.Controls.Discharge = "none" }, nil},
	{"DIS-08", func(f *fixture) { f.shockClass(); f.rig.Controls.GroundingHook = bptr(false) },
		func(f *fixture) {
			f.shockClass()
			f.rig.Controls.GroundingHook = bptr(false)
			f.rig.Controls.Discharge = "shorting-stick"
		}},
	{"DIS-09", func(f *fixture) { f.set("bank.voltage", 300); f.rig.Controls.VerifyBeforeTouch = bptr(false) }, func(f *fixture) { f.set("bank.voltage", 300) }},
	// NFPA 79 §6.5.1: τ·ln(300/60) = 60 s · 1.61 = 97 s > 5 s.
	{"DIS-10", func(f *fixture) { f.set("bank.voltage", 300); f.set("discharge.time_constant", 60) }, func(f *fixture) { f.set("bank.voltage", 300); f.set("discharge.time_constant", 2) }},
	{"DIS-12", func(f *fixture) { f.set("pulse.final_bank_voltage", -80) }, func(f *fixture) { f.set("pulse.final_bank_voltage", -20) }},
	{"DIS-13", func(f *fixture) { f.set("discharge.absorption_recovery", 100) }, func(f *fixture) { f.set("discharge.absorption_recovery", 6) }},
	{"DIS-14", func(f *fixture) {
		failSafeDump(f, 10)
		f.rig.Dump.EnergyRating = f64(1)
		f.set("dump.energy", 2.4)
		f.set("dump.energy_fraction", 2.4)
	},
		func(f *fixture) {
			failSafeDump(f, 10)
			f.rig.Dump.EnergyRating = f64(10)
			f.set("dump.energy", 2.4)
			f.set("dump.energy_fraction", 0.24)
		}},
	{"BLD-01", func(f *fixture) { f.set("bleeder.power", 2) }, nil},
	{"BLD-02", func(f *fixture) { f.set("bleeder.power", 0.7) }, func(f *fixture) { f.set("bleeder.power", 0.5) }},
	{"BLD-03", func(f *fixture) { f.set("bleeder.element_voltage", 400) }, nil},
	{"BLD-04", func(f *fixture) { f.set("bleeder.element_voltage", 300) }, func(f *fixture) { f.set("bleeder.element_voltage", 280) }},
	{"SUP-01", func(f *fixture) { f.rig.Supply.Isolation = "stays-connected" }, nil},
	{"SUP-02", func(f *fixture) { f.shockClass(); f.rig.Supply.Isolation = "switched" }, func(f *fixture) { f.shockClass() }},
	{"SUP-03", func(f *fixture) { mainsFed(f) }, func(f *fixture) {
		mainsFed(f)
		f.rig.Supply.Transformers = []schema.Transformer{{SecondaryVoltage: f64(42)}}
	}},
	{"SUP-04", func(f *fixture) { mainsFed(f); f.rig.Controls.MainsIsolation = "none" }, func(f *fixture) { mainsFed(f) }},
	{"SUP-05", func(f *fixture) { f.set("supply.charging_loss", 100) }, nil},
	{"BNK-01", func(f *fixture) { f.set("bank.voltage", 120) }, nil},
	{"BNK-02", func(f *fixture) { f.set("bank.voltage", 95) }, func(f *fixture) { f.set("bank.voltage", 89) }},
	{"BNK-03", func(f *fixture) { seriesPair(f); f.set("bank.cell_voltage_max", 120) }, func(f *fixture) { seriesPair(f) }},
	{"BNK-04", func(f *fixture) { seriesPair(f); f.rig.Bank.Balancing = nil }, func(f *fixture) { seriesPair(f) }},
	{"BNK-05", func(f *fixture) { seriesPair(f); f.rig.Bank.Balancing.VoltageRating = f64(30) }, func(f *fixture) { seriesPair(f) }},
	// Balancing power 63²/100 = 40 W against 1 W.
	{"BNK-05", func(f *fixture) { seriesPair(f); f.rig.Bank.Balancing.Resistance = f64(100) }, nil},
	// Common practice: polarised cells tolerate about 1 to 1.5 V reversed (policy 1 V); 0.5 × 63 V is 32 V, 0.01 × 63 V is 0.63 V.
	{"BNK-06", func(f *fixture) { f.rig.Bank.Dielectric = "aluminium-electrolytic"; f.set("pulse.reversal", 0.5) },
		func(f *fixture) { f.rig.Bank.Dielectric = "aluminium-electrolytic"; f.set("pulse.reversal", 0.01) }},
	{"BNK-07", func(f *fixture) { f.rig.Bank.PulseRated = bptr(false) }, nil},
	{"BNK-08", func(f *fixture) { f.set("pulse.peak_current", 3000) }, func(f *fixture) { f.set("pulse.peak_current", 3000); f.rig.Bank.Parallel = iptr(2) }},
	{"SWT-01", func(f *fixture) { f.rig.Switch.Blocking = f64(50) }, nil},
	{"SWT-02", func(f *fixture) { f.rig.Switch.Blocking = f64(80) }, func(f *fixture) { f.rig.Switch.Blocking = f64(100) }},
	// 1000 A over 800 A with an I²t of 1000 A²s against 800²·10 ms/2 = 3200 A²s: short-pulse credit.
	{"SWT-03", func(f *fixture) { f.rig.Switch.Surge = f64(800); f.set("pulse.i2t", 4000) }, func(f *fixture) { f.rig.Switch.Surge = f64(800) }},
	// A short pulse within the half-sine's I²t earns the equal-I²t comparison instead (common practice).
	{"SWT-03", func(f *fixture) { f.rig.Switch.Surge = f64(800); f.set("switch.surge_i2t_ratio", 1.5) },
		func(f *fixture) { f.rig.Switch.Surge = f64(800); f.set("switch.surge_i2t_ratio", 0.1) }},
	// With the projectile in place the peak can exceed the coil-only pulse: the switch must carry the larger.
	{"SWT-03", func(f *fixture) {
		f.rig.Switch.Surge = f64(800)
		f.set("pulse.peak_current", 700)
		f.set("launch.peak_current_with_projectile", 1000)
		f.set("pulse.i2t", 4000)
	}, func(f *fixture) {
		f.rig.Switch.Surge = f64(800)
		f.set("pulse.peak_current", 700)
		f.set("launch.peak_current_with_projectile", 750)
		f.set("pulse.i2t", 4000)
	}},
	{"SWT-08", func(f *fixture) { f.rig.Switch.Surge = f64(800); f.set("switch.surge_i2t_ratio", 0.1) },
		func(f *fixture) { f.rig.Switch.Surge = f64(800); f.set("switch.surge_i2t_ratio", 1.5) }},
	{"SWT-04", func(f *fixture) { f.rig.Switch.Surge = f64(1100) }, func(f *fixture) { f.rig.Switch.Surge = f64(1300) }},
	{"SWT-05", func(f *fixture) { f.rig.Switch.I2t = f64(500) }, nil},
	{"SWT-06", func(f *fixture) { f.rig.Switch.I2t = f64(1100) }, func(f *fixture) { f.rig.Switch.I2t = f64(1300) }},
	{"SWT-07", func(f *fixture) { f.rig.Switch.DiDt = f64(1.1e7) }, func(f *fixture) { f.rig.Switch.Kind = "igbt"; f.rig.Switch.DiDt = nil }},
	// IEC 60085 class F, 155 °C: 20 °C + 200 K = 220 °C; five shots of 30 K reach 170 °C.
	{"COL-01", func(f *fixture) { f.set("coil.temperature_rise", 200) }, nil},
	{"COL-02", func(f *fixture) { f.set("coil.temperature_rise", 30) }, func(f *fixture) { f.set("coil.temperature_rise", 20) }},
	// With the physics' own count of shots to the class limit (IEC 60949 form), that count decides.
	{"COL-02", func(f *fixture) { f.set("coil.shots_to_class", 3) }, func(f *fixture) { f.set("coil.temperature_rise", 30); f.set("coil.shots_to_class", 6) }},
	{"PRJ-01", func(f *fixture) { f.set("launch.height", 2.8) }, func(f *fixture) { f.set("launch.height", 2.4) }},
	{"PRJ-02", func(f *fixture) { measure(f).LaunchHeight = f64(2.9) }, func(f *fixture) { f.set("launch.height", 1); measure(f).LaunchHeight = f64(1.1) }},
	// Range v²·sin(2·5°)/g: 20 m/s gives 7.1 m (beyond 3 m), 12 m/s gives 2.55 m (beyond the 2 m zone only).
	{"PRJ-03", func(f *fixture) { f.set("launch.speed", 20) }, func(f *fixture) { f.set("launch.speed", 12) }},
	{"PRJ-04", func(f *fixture) { f.set("launch.speed", 12) }, nil},
	{"PRJ-05", func(f *fixture) { f.set("projectile.temperature_rise", 50) }, nil},
	{"PRJ-06", func(f *fixture) { f.set("projectile.temperature_rise", 10) }, func(f *fixture) { f.set("projectile.temperature_rise", 5) }},
	// ANSI/ISEA Z87.1: goggles 76.2 m/s (3.06 J for the 6.35 mm ball); spectacles 45.7 m/s.
	{"EYE-01", func(f *fixture) { f.set("launch.speed", 80) }, nil},
	{"EYE-01", func(f *fixture) { f.set("launch.kinetic_energy", 5) }, nil},
	{"EYE-01", func(f *fixture) { f.rig.Controls.EyeProtection = "none" }, func(f *fixture) { f.rig.Controls.EyeProtection = "spectacles" }},
	{"FLD-01", func(f *fixture) { f.set("field.implant_distance", 4) }, nil},
	{"FLD-02", func(f *fixture) { f.rig.Controls.ImplantWarning = bptr(false) }, func(f *fixture) { f.rig.Controls.ImplantWarning = bptr(false); f.set("field.implant_distance", 0) }},
	// 29 CFR 1910.95: 140 dB peak.
	{"NOI-01", func(f *fixture) { f.set("noise.peak_spl", 150) }, func(f *fixture) { f.set("noise.peak_spl", 130) }},
	{"NOI-02", func(f *fixture) { f.set("bank.energy", 100); f.rig.Controls.HearingProtection = bptr(false) },
		func(f *fixture) {
			f.set("bank.energy", 100)
			f.set("noise.peak_spl", 120)
			f.rig.Controls.HearingProtection = bptr(false)
		}},
	{"GRD-01", func(f *fixture) { f.set("bank.energy", 50); f.rig.Controls.Enclosure = "none" }, func(f *fixture) { f.rig.Controls.Enclosure = "none"; f.set("bank.energy", 5) }},
	{"GRD-02", func(f *fixture) { f.set("bank.energy", 50); f.rig.Controls.Enclosure = "partial" }, func(f *fixture) { f.set("bank.energy", 50) }},
	{"GRD-03", func(f *fixture) { f.set("bank.energy", 200); f.rig.Controls.Interlock = bptr(false) }, func(f *fixture) { f.set("bank.energy", 50); f.rig.Controls.Interlock = bptr(false) }},
	{"GRD-04", func(f *fixture) { f.set("bank.energy", 50); f.rig.Controls.ChargedIndicator = bptr(false) }, func(f *fixture) { f.set("bank.energy", 5); f.rig.Controls.ChargedIndicator = bptr(false) }},
	{"GRD-06", func(f *fixture) { f.rig.Controls.RemoteFiring = f64(0.1) }, func(f *fixture) { f.rig.Controls.RemoteFiring = f64(2) }},
	{"GRD-05", func(f *fixture) { f.shockClass(); f.rig.Controls.Supervised = bptr(false) }, func(f *fixture) { f.shockClass() }},
	{"MEA-01", func(f *fixture) { measure(f).ChargeVoltage = f64(70) }, func(f *fixture) { measure(f).ChargeVoltage = f64(61) }},
	{"MEA-04", func(f *fixture) { f.rig.Supply.Regulated = f64(50); measure(f).ChargeVoltage = f64(60) }, func(f *fixture) { f.rig.Supply.Regulated = f64(50); measure(f).ChargeVoltage = f64(51) }},
	{"MEA-02", func(f *fixture) { measure(f).DecayTime = f64(30); f.set("discharge.decay_time_predicted", 10) },
		func(f *fixture) { measure(f).DecayTime = f64(11); f.set("discharge.decay_time_predicted", 10) }},
	{"MEA-02", nil, func(f *fixture) { // the nearer of two paths is judged: 14 ms against a dump's 12 ms
		measure(f).DecayTime = f64(0.014)
		f.set("discharge.decay_time_predicted", 30)
		f.set("dump.decay_time_predicted", 0.012)
	}},
	{"MEA-03", func(f *fixture) { measure(f).LaunchHeight = f64(1) }, func(f *fixture) { measure(f).LaunchHeight = f64(0.5) }},
	{"MEA-05", func(f *fixture) { f.set("coil.inductance_disagreement", -0.3) }, func(f *fixture) { f.set("coil.inductance_disagreement", 0.1) }},
	{"MEA-06", func(f *fixture) { f.set("coil.resistance_disagreement", 0.5) }, func(f *fixture) { f.set("coil.resistance_disagreement", -0.15) }},
	{"MEA-07", func(f *fixture) { f.set("coil.winding_fill", 1.08) }, func(f *fixture) { f.set("coil.winding_fill", 0.9) }},
	{"COL-03", func(f *fixture) { f.set("coil.skin_depth_ratio", 1.5) }, func(f *fixture) { f.set("coil.skin_depth_ratio", 0.4) }},
	// Any launch pushes back on the coil; a run with no force (no take-off) does not.
	// A site that allows 120 s to the safe voltage is looser than the reference 60 s (NEC 460.6(A)); one that
	// allows 30 s is stricter and needs no acceptance.
	{"INF-05", func(f *fixture) {
		f.sitePolicy = "thresholds:\n  residual.time_low: {value: 120 s, unit: s, basis: \"site variance\"}\n"
	}, func(f *fixture) {
		f.sitePolicy = "thresholds:\n  residual.time_low: {value: 30 s, unit: s, basis: \"site rule\"}\n"
	}},
	{"COL-04", func(f *fixture) { f.set("launch.peak_force", 5000) }, func(f *fixture) { f.set("launch.peak_force", 0) }},
	{"PRJ-01", func(f *fixture) { // with the physics' ceiling figures the message says how fast it arrives
		f.set("launch.height", 10)
		f.set("launch.ceiling_impact_speed", 12)
		f.set("launch.time_to_ceiling", 0.2)
	}, nil},
	{"INF-01", func(f *fixture) { f.rig.Bleeder = nil; failSafeDump(f, 10) }, nil},
	{"INF-02", func(f *fixture) { f.rig.Switch = nil }, nil},
	{"INF-03", func(f *fixture) { f.rig.Projectile = nil; f.rig.Controls.EyeProtection = "" }, func(f *fixture) { f.rig.Projectile = nil }},
	{"INF-04", func(f *fixture) {
		f.gaps = append(f.gaps, hazards.Gap{Field: "bank.esr", Effect: "the pulse cannot be computed"})
	}, nil},
}

func failSafeDump(f *fixture, ohms float64) {
	f.rig.Dump = &schema.Dump{Resistance: f64(ohms), Switching: "normally-closed-relay", FailSafe: bptr(true)}
}

func mainsFed(f *fixture) {
	f.rig.Supply = &schema.Supply{Kind: "mains-rectifier", MainsVoltage: f64(230), Rectifier: "bridge", Transformers: nil,
		ChargingResistor: f64(1000), ChargingResistorPower: f64(10), Isolation: "interlocked"}
}

func seriesPair(f *fixture) {
	f.rig.Bank.Series = iptr(2)
	f.set("bank.voltage_rating", 200)
	f.set("bank.cell_voltage_max", 33)
	f.rig.Bank.Balancing = &schema.Balancing{Resistance: f64(10e3), PowerRating: f64(1), VoltageRating: f64(200)}
}

func measure(f *fixture) *schema.Measurements {
	if f.rig.Measurements == nil {
		f.rig.Measurements = &schema.Measurements{}
	}
	return f.rig.Measurements
}

// TestBaseFixtureIsQuiet: the well-guarded base rig draws no finding at all, so each case below shows the
// effect of its one change.
func TestBaseFixtureIsQuiet(t *testing.T) {
	s := mustDefault(t)
	rv := evaluate(t, s, baseFixture())
	for _, f := range rv.Findings {
		t.Errorf("got finding %s %q: %s, want none", f.Rule, f.Title, f.Message)
	}
	if rv.Verdict != Ready {
		t.Errorf("got verdict %v, want ready", rv.Verdict)
	}
}

func TestEachRuleFiresAndStaysQuiet(t *testing.T) {
	s := mustDefault(t)
	byID := map[string]Rule{}
	for _, r := range s.Rules() {
		byID[r.ID] = r
	}
	for i, c := range ruleCases {
		r, ok := byID[c.rule]
		if !ok {
			t.Fatalf("case %d names rule %s, which is not in the default rulebook", i, c.rule)
		}
		if c.fire != nil {
			t.Run(c.rule+"/fires", func(t *testing.T) {
				f := baseFixture()
				c.fire(f)
				rv := evaluate(t, s, f)
				got, ok := findRule(rv, c.rule)
				if !ok {
					t.Fatalf("got no %s finding, want one; findings: %v", c.rule, ids(rv))
				}
				if strings.Contains(got.Title, "could not be checked") {
					t.Fatalf("got %q (%s), want the rule judged", got.Title, got.Message)
				}
				if got.Severity != r.Severity || got.Disposition != r.Disposition || got.Basis == "" {
					t.Errorf("got %v %v basis %q, want %v %v and a basis", got.Severity, got.Disposition, got.Basis, r.Severity, r.Disposition)
				}
				if strings.Contains(got.Message, "(not stated)") || strings.Contains(got.Message, "{") {
					t.Errorf("got message %q, want every placeholder filled", got.Message)
				}
			})
		}
		t.Run(c.rule+"/quiet", func(t *testing.T) {
			f := baseFixture()
			if c.quiet != nil {
				c.quiet(f)
			}
			rv := evaluate(t, s, f)
			if got, ok := findRule(rv, c.rule); ok {
				t.Errorf("got %s finding %q: %s, want none", c.rule, got.Title, got.Message)
			}
		})
	}
}

// TestEveryRuleHasCases: every rule of the default rulebook has a case that fires it and one that keeps
// it quiet.
func TestEveryRuleHasCases(t *testing.T) {
	s := mustDefault(t)
	fires, quiet := map[string]bool{}, map[string]bool{}
	for _, c := range ruleCases {
		if c.fire != nil {
			fires[c.rule] = true
		}
		quiet[c.rule] = true
	}
	for _, r := range s.Rules() {
		if !fires[r.ID] || !quiet[r.ID] {
			t.Errorf("rule %s: got fires=%v quiet=%v, want a case of each", r.ID, fires[r.ID], quiet[r.ID])
		}
	}
}

func ids(rv *Review) []string {
	var s []string
	for _, f := range rv.Findings {
		s = append(s, f.Rule)
	}
	return s
}
