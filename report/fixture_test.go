package report

import (
	"fmt"
	"math"
	"strings"
	"testing"

	"chargeward/hazards"
	"chargeward/rules"
	"chargeward/schema"
)

// The reviews below are built by hand for layout and rendering tests. Their numbers are invented demo values
// (an invented rig), never expected physics; the tests only check that what goes in comes out.

func f64(v float64) *float64 { return &v }
func intp(v int) *int        { return &v }

const fixtureYAML = `# invented demo rig for report tests
rig:
  name: Bench demo thrower
  owner: A. Tester
  location: Room T1
  purpose: layout test
  revision: "C"
bank:
  capacitance: 2200 uF   # per cell, Ω µ ² ° ≤ ± must print
  voltage_rating: 400 V
  series: 2
  parallel: 2
`

// fixtureReview builds a review with n findings spread over hazard classes. A long name stresses wrapping.
func fixtureReview(t testing.TB, n int, name string) *rules.Review {
	t.Helper()
	rig := &schema.Rig{
		Rig: schema.Info{Name: name, Owner: "A. Tester", Location: "Room T1", Purpose: "layout test", Revision: "C"},
		Bank: schema.Bank{Capacitance: f64(2200e-6), VoltageRating: f64(400), Series: intp(2), Parallel: intp(2),
			Dielectric: "aluminium-electrolytic"},
		Room:   &schema.Room{CeilingHeight: f64(2.7)},
		Source: schema.Source{File: "demo.yaml", Raw: []byte(fixtureYAML)},
	}
	a := &hazards.Assessment{Rig: rig, Targets: hazards.DefaultTargets()}
	add := func(q hazards.Quantity) {
		if err := a.Add(q); err != nil {
			t.Fatal(err)
		}
	}
	add(hazards.Quantity{Name: "bank.capacitance", Value: 2.2e-3, Worst: hazards.Worst(2.64e-3), Unit: "F",
		Formula: "C = C_cell·P/S", Inputs: []hazards.Input{{Symbol: "C_cell", Name: "bank.capacitance", Value: 2.2e-3, Unit: "F"},
			{Symbol: "S", Name: "bank.series", Value: 2, Unit: "1"}, {Symbol: "P", Name: "bank.parallel", Value: 2, Unit: "1"}},
		Basis: "series and parallel capacitance, any circuits text", Note: "worst case at +20 % tolerance"})
	add(hazards.Quantity{Name: "bank.voltage", Value: 705, Unit: "V", Formula: "measured charge voltage",
		Basis: "rig measurement"})
	add(hazards.Quantity{Name: "bank.energy", Value: 546.7, Worst: hazards.Worst(656.1), Unit: "J", Formula: "E = ½·C·V²",
		Inputs: []hazards.Input{{Symbol: "C", Name: "bank.capacitance", Value: 2.2e-3, Unit: "F"}, {Symbol: "V", Name: "bank.voltage", Value: 705, Unit: "V"}},
		Basis:  "energy of a capacitor, any physics text"})
	add(hazards.Quantity{Name: "discharge.time_to_safe", Value: 586, Worst: hazards.Worst(640), Unit: "s",
		Formula: "t = τ·ln(V0/Vsafe)", Basis: "RC decay", Inputs: []hazards.Input{{Symbol: "τ", Name: "discharge.time_constant", Value: 220, Unit: "s"}}})
	add(hazards.Quantity{Name: "pulse.peak_current", Value: 3270, Worst: hazards.Worst(3610), Unit: "A", Formula: "RLC closed form",
		Basis: "series RLC"})
	add(hazards.Quantity{Name: "coil.resistance", Value: 1.5e-3, Unit: "Ω", Formula: "R = ρ·l/A", Basis: "ASTM B258 wire table"})
	add(hazards.Quantity{Name: "pulse.i2t", Value: 51200, Unit: "A²s", Formula: "∫i²dt", Basis: "action integral"})
	add(hazards.Quantity{Name: "launch.height", Value: 3.1, Worst: hazards.Worst(3.8), Unit: "m", Formula: "h = v²/2g", Basis: "ballistics"})
	add(hazards.Quantity{Name: "pulse.reversal", Value: 0.62, Unit: "1", Formula: "−V_end/V0", Basis: "series RLC"})
	a.AddGap("switch.di_dt_critical", "the switch's di/dt margin cannot be checked")

	// Demo curves for the figures.
	decay := func(name string, tau float64) hazards.Curve {
		c := hazards.Curve{Name: name, XLabel: "time (s)", YLabel: "bank voltage (V)", XUnit: "s", YUnit: "V"}
		for i := 0; i <= 100; i++ {
			x := float64(i) * 12
			c.X = append(c.X, x)
			c.Y = append(c.Y, 705*math.Exp(-x/tau))
		}
		return c
	}
	a.Curves = append(a.Curves, decay("discharge.decay", 220), decay("discharge.decay_single_fault", 440))
	wave := func(name, ylabel, yunit string, amp, damp float64) hazards.Curve {
		c := hazards.Curve{Name: name, XLabel: "time (s)", YLabel: ylabel, XUnit: "s", YUnit: yunit}
		for i := 0; i <= 200; i++ {
			x := float64(i) * 20e-6
			c.X = append(c.X, x)
			c.Y = append(c.Y, amp*math.Exp(-x/damp)*math.Sin(x/1e-3))
		}
		return c
	}
	a.Curves = append(a.Curves,
		wave("pulse.current", "current (A)", "A", 3270, 2e-3), wave("launch.current", "current (A)", "A", 2900, 1.5e-3),
		wave("pulse.bank_voltage", "bank voltage (V)", "V", 705, 2e-3), wave("launch.bank_voltage", "bank voltage (V)", "V", 650, 1.5e-3))
	h := hazards.Curve{Name: "launch.height", XLabel: "time (s)", YLabel: "height (m)", XUnit: "s", YUnit: "m"}
	for i := 0; i <= 100; i++ {
		x := float64(i) * 0.016
		h.X = append(h.X, x)
		h.Y = append(h.Y, math.Max(0, 7.8*x-0.5*9.81*x*x))
	}
	a.Curves = append(a.Curves, h)

	classes := []string{"shock", "stored energy", "projectile", "thermal", "magnetic field", "procedure"}
	sevs := []rules.Severity{rules.Danger, rules.Warning, rules.Caution, rules.Notice}
	disps := []rules.Disposition{rules.MustFix, rules.Controls, rules.Advisory}
	r := &rules.Review{Assessment: a, Verdict: rules.NotReady, RulebookDigest: strings.Repeat("ab", 32),
		PolicyDigest: strings.Repeat("cd", 32), RuleCount: 40}
	for i := 0; i < n; i++ {
		r.Findings = append(r.Findings, rules.Finding{
			Rule: fmt.Sprintf("T%s-%02d", strings.ToUpper(classes[i%len(classes)][:2]), i), Hazard: classes[i%len(classes)],
			Title: "Demo finding " + fmt.Sprint(i), Severity: sevs[i%len(sevs)], Disposition: disps[i%len(disps)],
			Message: fmt.Sprintf("The bank stores %s at %s; the bleeder takes %s to reach 50 V (limit 60 s). Ω µ ² ° ≤ ±.",
				SI(546.7, "J"), SI(705, "V"), SI(586, "s")),
			Basis:    "NFPA 70 (NEC) 460.6(A), 2023 ed. (demo)",
			Controls: []string{"Fit a bleeder that reaches 50 V within 60 s.", "Verify 0 V with a meter before touching."},
		})
	}
	// Sort by class as the Review contract says.
	for i := 1; i < len(r.Findings); i++ {
		for j := i; j > 0 && classIndex(classes, r.Findings[j].Hazard) < classIndex(classes, r.Findings[j-1].Hazard); j-- {
			r.Findings[j], r.Findings[j-1] = r.Findings[j-1], r.Findings[j]
		}
	}
	r.Checklist = []rules.ChecklistItem{
		{Phase: rules.SetUp, Text: "Check the bleeder is fitted and the enclosure is closed."},
		{Phase: rules.Firing, Text: "Record the charge voltage before firing.", Measured: "charge voltage, V", From: []string{"TSH-00"}},
		{Phase: rules.AfterFiring, Text: "Wait for the bleeder, then verify the bank voltage with a meter.", Measured: "bank voltage before touching, V"},
		{Phase: rules.Storage, Text: "Store the bank with a shorting link fitted."},
	}
	r.Overrides = []rules.Override{{Key: "discharge.time_allowed", Reference: 60, Site: 120, Unit: "s", Basis: "site rule (demo)", Looser: true}}
	r.Thresholds = []rules.Threshold{{Key: "discharge.safe_voltage", Value: 50, Unit: "V", Basis: "NFPA 70 (NEC) 460.6(A), 2023 ed.", Confidence: "found"},
		{Key: "discharge.time_allowed", Value: 120, Unit: "s", Basis: "site rule (demo)", Confidence: "found"}}
	return r
}

func classIndex(cs []string, c string) int {
	for i, x := range cs {
		if x == c {
			return i
		}
	}
	return len(cs)
}
