package hazards

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/integrate/quad"

	"chargeward/schema"
)

// elQ returns the named quantity or fails the test.
func elQ(t *testing.T, a *Assessment, name string) Quantity {
	t.Helper()
	q, ok := a.Q(name)
	if !ok {
		t.Fatalf("quantity %s missing; have %v", name, a.Names())
	}
	return q
}

func elAssess(t *testing.T, r *schema.Rig) *Assessment {
	t.Helper()
	a, err := Assess(r, DefaultTargets())
	if err != nil {
		t.Fatalf("Assess: %v", err)
	}
	return a
}

// elHasGap reports whether a gap for field was recorded.
func elHasGap(a *Assessment, field string) bool {
	for _, g := range a.Gaps {
		if g.Field == field {
			return true
		}
	}
	return false
}

// elMainsRig is a minimal mains-rectifier rig around a supply s.
func elMainsRig(s *schema.Supply) *schema.Rig {
	return &schema.Rig{Supply: s, Bank: schema.Bank{Capacitance: elF(1000e-6), VoltageRating: elF(450), CapacitanceTolerance: elF(0.2)}}
}

// TestDoublerOn240V checks the trade fact that a voltage doubler fed from 240 V RMS charges its bank to about
// 680 V: twice the peak (2·√2·240 = 678.8 V), not twice the RMS (480 V). Source: common practice (CHECKS.md,
// rectifiers). Tolerance 1 %: "about 680 V" is quoted to two significant figures and the two 1 V diode drops
// take 0.3 % off the ideal figure.
func TestDoublerOn240V(t *testing.T) {
	a := elAssess(t, elMainsRig(&schema.Supply{MainsVoltage: elF(240), Rectifier: "doubler", DiodeDrop: elF(1)}))
	got := elQ(t, a, "supply.peak_voltage").Value
	if !scalar.EqualWithinRel(got, 680, 0.01) {
		t.Errorf("doubler on 240 V: got %.1f V, want about 680 V", got)
	}
}

// TestRectifierPeaks checks the no-load peak for each rectifier kind against the peak of a sinusoid, √2·Vrms
// (definition of RMS for a sine), times the stage multiple, less one drop per diode on the charging path
// (Horowitz & Hill, The Art of Electronics, 3rd ed., ch. 9; section from memory). High line adds the stated
// tolerance to the RMS input. Tolerance 1e-12 relative: the same arithmetic done two ways, rounding only.
func TestRectifierPeaks(t *testing.T) {
	vp := math.Sqrt2 * 120
	tests := []struct {
		name      string
		s         schema.Supply
		want, hot float64
	}{
		{"half-wave", schema.Supply{MainsVoltage: elF(120), Rectifier: "half-wave", DiodeDrop: elF(0.7), MainsTolerance: elF(0.05)}, vp - 0.7, vp*1.05 - 0.7},
		{"bridge", schema.Supply{MainsVoltage: elF(120), Rectifier: "bridge", DiodeDrop: elF(0.7), MainsTolerance: elF(0.05)}, vp - 1.4, vp*1.05 - 1.4},
		{"doubler", schema.Supply{MainsVoltage: elF(120), Rectifier: "doubler", DiodeDrop: elF(0.7), MainsTolerance: elF(0.05)}, 2*vp - 1.4, 2*vp*1.05 - 1.4},
		{"3-stage multiplier", schema.Supply{MainsVoltage: elF(120), Rectifier: "multiplier", Stages: elI(3), DiodeDrop: elF(0.7), MainsTolerance: elF(0.05)}, 6*vp - 4.2, 6*vp*1.05 - 4.2},
		{"defaults: 1 V drop, +10 %", schema.Supply{MainsVoltage: elF(120), Rectifier: "bridge"}, vp - 2, vp*1.1 - 2},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s := tc.s
			q := elQ(t, elAssess(t, elMainsRig(&s)), "supply.peak_voltage")
			if !scalar.EqualWithinRel(q.Value, tc.want, 1e-12) {
				t.Errorf("nominal: got %.6g V, want %.6g V", q.Value, tc.want)
			}
			if q.Worst == nil || !scalar.EqualWithinRel(*q.Worst, tc.hot, 1e-12) {
				t.Errorf("high line: got %v, want %.6g V", q.Worst, tc.hot)
			}
		})
	}
}

// TestTransformerEquivalences checks series and parallel secondaries against single-transformer equivalents:
// identical secondaries in series add (Kirchhoff's voltage law), in parallel they give the voltage of one; a
// transformer scales the secondary by mains/primary; the no-load rise multiplies the secondary. Tolerance 1e-12
// relative: rounding only.
func TestTransformerEquivalences(t *testing.T) {
	tr := func(vs float64, n int) schema.Transformer {
		return schema.Transformer{PrimaryVoltage: elF(230), SecondaryVoltage: elF(vs), Regulation: elF(0.08), Count: elI(n)}
	}
	peak := func(s schema.Supply) float64 {
		return elQ(t, elAssess(t, elMainsRig(&s)), "supply.peak_voltage").Value
	}
	base := schema.Supply{MainsVoltage: elF(230), Rectifier: "bridge", DiodeDrop: elF(1)}
	tests := []struct {
		name string
		a, b schema.Supply
	}{
		{"two in series = one of twice the voltage",
			elWith(base, func(s *schema.Supply) { s.Transformers = []schema.Transformer{tr(120, 2)}; s.Secondaries = "series" }),
			elWith(base, func(s *schema.Supply) { s.Transformers = []schema.Transformer{tr(240, 1)} })},
		{"two listed in series = count 2",
			elWith(base, func(s *schema.Supply) {
				s.Transformers = []schema.Transformer{tr(120, 1), tr(120, 1)}
				s.Secondaries = "series"
			}),
			elWith(base, func(s *schema.Supply) { s.Transformers = []schema.Transformer{tr(120, 2)}; s.Secondaries = "series" })},
		{"parallel = single",
			elWith(base, func(s *schema.Supply) { s.Transformers = []schema.Transformer{tr(120, 3)}; s.Secondaries = "parallel" }),
			elWith(base, func(s *schema.Supply) { s.Transformers = []schema.Transformer{tr(120, 1)} })},
		{"mains 10 % above the primary = secondary 10 % higher",
			elWith(base, func(s *schema.Supply) { s.MainsVoltage = elF(253); s.Transformers = []schema.Transformer{tr(100, 1)} }),
			elWith(base, func(s *schema.Supply) { s.Transformers = []schema.Transformer{tr(110, 1)} })},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if ga, gb := peak(tc.a), peak(tc.b); !scalar.EqualWithinRel(ga, gb, 1e-12) {
				t.Errorf("got %.6g V, want %.6g V (the equivalent)", ga, gb)
			}
		})
	}
	// The 8 % no-load rise: peak + drops = √2·Vsec·1.08.
	s := elWith(base, func(s *schema.Supply) { s.Transformers = []schema.Transformer{tr(100, 1)} })
	if got, want := peak(s)+2, math.Sqrt2*100*1.08; !scalar.EqualWithinRel(got, want, 1e-12) {
		t.Errorf("no-load rise: got %.6g V, want %.6g V", got, want)
	}
}

func elWith(s schema.Supply, f func(*schema.Supply)) schema.Supply { f(&s); return s }

// TestRegulatedCap checks that a regulated charge voltage caps the bank voltage but not the supply's peak.
func TestRegulatedCap(t *testing.T) {
	a := elAssess(t, elMainsRig(&schema.Supply{MainsVoltage: elF(240), Rectifier: "bridge", Regulated: elF(300)}))
	if got := elQ(t, a, "bank.voltage"); got.Value != 300 || *got.Worst != 300 {
		t.Errorf("bank voltage: got %g (worst %g) V, want 300 V", got.Value, *got.Worst)
	}
	if got := elQ(t, a, "supply.peak_voltage").Value; !(got > 300) {
		t.Errorf("supply peak: got %g V, want the unregulated peak above 300 V", got)
	}
}

// TestChargingLossEqualsStored checks the classic result that charging a capacitor from a constant source V
// through a resistor R dissipates in R as much energy as ends up stored, ½CV² (Alexander & Sadiku,
// Fundamentals of Electric Circuits, 5th ed., ch. 7; the exact section from memory). The dissipation is
// integrated independently with gonum's Gauss–Legendre quadrature, ∫ (V/R)²e^(−2t/RC)·R dt over 0..40τ
// (the tail beyond 40τ is e^(−80) of the total). Tolerance 1e-9 relative: 128-point Gauss–Legendre on an
// entire function over 80 e-folds is accurate far below that.
func TestChargingLossEqualsStored(t *testing.T) {
	for _, tc := range []struct {
		name    string
		r, c, v float64
	}{
		{"1 kΩ, 2200 µF, 680 V", 1e3, 2200e-6, 680},
		{"22 kΩ, 600 µF, 400 V", 22e3, 600e-6, 400},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, _, loss := chargeRC(tc.r, tc.c, tc.v, 0)
			tau := tc.r * tc.c
			integral := quad.Fixed(func(x float64) float64 {
				i := tc.v / tc.r * math.Exp(-x/tau)
				return i * i * tc.r
			}, 0, 40*tau, 128, nil, 0)
			stored := Energy(tc.c, tc.v)
			if !scalar.EqualWithinRel(loss, stored, 1e-12) {
				t.Errorf("chargeRC loss: got %.9g J, want the stored %.9g J", loss, stored)
			}
			if !scalar.EqualWithinRel(integral, stored, 1e-9) {
				t.Errorf("∫i²R dt: got %.9g J, want the stored %.9g J", integral, stored)
			}
		})
	}
}

// TestCurrentLimitedCharge checks chargeRC's constant-current-then-RC charge against a stepped integration of
// C·dv/dt = min(Ilim, (V−v)/R) (forward Euler, dt = τ/20000; the global error of forward Euler is O(dt), so
// about 1e-4 relative here; tolerance 1e-3 relative).
func TestCurrentLimitedCharge(t *testing.T) {
	for _, tc := range []struct {
		name          string
		r, c, v, ilim float64
	}{
		{"flash trainer: 4.7 kΩ, 94 µF, 330 V, 5 mA", 4.7e3, 94e-6, 330, 5e-3},
		{"limit just binding", 1e3, 1e-3, 100, 0.09},
		{"limit far below V/R", 10, 1e-3, 100, 0.1},
	} {
		t.Run(tc.name, func(t *testing.T) {
			t95, i0, loss := chargeRC(tc.r, tc.c, tc.v, tc.ilim)
			tau := tc.r * tc.c
			tEnd := 2 * t95
			dt := math.Min(tau, tEnd) / 20000
			var v, tt, w, tHit float64
			for tt < tEnd {
				i := math.Min(tc.ilim, (tc.v-v)/tc.r)
				w += i * i * tc.r * dt
				v += i / tc.c * dt
				tt += dt
				if tHit == 0 && v >= 0.95*tc.v {
					tHit = tt
				}
			}
			if !scalar.EqualWithinRel(t95, tHit, 1e-3) {
				t.Errorf("t95: got %.6g s, want %.6g s (stepped)", t95, tHit)
			}
			if i0 != math.Min(tc.ilim, tc.v/tc.r) {
				t.Errorf("I0: got %g A, want %g A", i0, math.Min(tc.ilim, tc.v/tc.r))
			}
			// Beyond 2·t95 the remaining loss is below ½C(0.05²·V)² ≪ 1e-3 of the total.
			if !scalar.EqualWithinRel(loss, w, 1e-3) {
				t.Errorf("loss in R: got %.6g J, want %.6g J (stepped)", loss, w)
			}
		})
	}
}

// TestSupplyGaps checks that missing supply facts become gaps, never values.
func TestSupplyGaps(t *testing.T) {
	tests := []struct {
		name  string
		s     *schema.Supply
		field string
		none  string // quantity that must not exist
	}{
		{"no supply", nil, "supply", "supply.peak_voltage"},
		{"no rectifier", &schema.Supply{MainsVoltage: elF(240)}, "supply.rectifier", "supply.peak_voltage"},
		{"no mains voltage", &schema.Supply{Rectifier: "bridge"}, "supply.mains_voltage", "supply.peak_voltage"},
		{"no dc voltage", &schema.Supply{Kind: "dc-supply"}, "supply.dc_voltage", "supply.peak_voltage"},
		{"no charging resistor", &schema.Supply{MainsVoltage: elF(240), Rectifier: "bridge"}, "supply.charging_resistor", "supply.inrush_current"},
		{"transformer regulation unknown", &schema.Supply{MainsVoltage: elF(230), Rectifier: "bridge",
			Transformers: []schema.Transformer{{SecondaryVoltage: elF(100)}}}, "supply.transformers[0].regulation", "supply.inrush_current"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			a := elAssess(t, elMainsRig(tc.s))
			if !elHasGap(a, tc.field) {
				t.Errorf("got gaps %v, want one for %s", a.Gaps, tc.field)
			}
			if _, ok := a.Q(tc.none); ok {
				t.Errorf("got quantity %s, want none", tc.none)
			}
		})
	}
}

// TestSupplyBadInput checks that impossible states are errors, not NaN.
func TestSupplyBadInput(t *testing.T) {
	tests := []struct {
		name string
		s    *schema.Supply
	}{
		{"negative dc voltage", &schema.Supply{Kind: "dc-supply", DCVoltage: elF(-5)}},
		{"diode drops exceed the peak", &schema.Supply{MainsVoltage: elF(1), Rectifier: "bridge", DiodeDrop: elF(1)}},
		{"zero-stage multiplier", &schema.Supply{MainsVoltage: elF(240), Rectifier: "multiplier", Stages: elI(0)}},
		{"unknown rectifier", &schema.Supply{MainsVoltage: elF(240), Rectifier: "quadrupler"}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if _, err := Assess(elMainsRig(tc.s), DefaultTargets()); err == nil {
				t.Errorf("got no error, want one")
			}
		})
	}
}

// TestChargingResistorMeanPower checks the mean charging-resistor power against its closed form for a constant
// source: W_R = ½CV² over t95 = RC·ln 20 gives P̄ = V²/(2R·ln 20), independent of C (first-order RC, as
// above). Tolerance 1e-12 relative: rounding only. A missing power rating is a gap, not a pass.
func TestChargingResistorMeanPower(t *testing.T) {
	s := &schema.Supply{Kind: "dc-supply", DCVoltage: elF(400), ChargingResistor: elF(22e3), ChargingResistorPower: elF(10)}
	a := elAssess(t, elMainsRig(s))
	want := 400.0 * 400 / (2 * 22e3 * math.Log(20))
	if got := elQ(t, a, "supply.charging_resistor_mean_power").Value; !scalar.EqualWithinRel(got, want, 1e-12) {
		t.Errorf("got %.9g W, want %.9g W", got, want)
	}
	if got := elQ(t, a, "supply.charging_resistor_power_fraction").Value; !scalar.EqualWithinRel(got, want/10, 1e-12) {
		t.Errorf("fraction: got %.9g, want %.9g", got, want/10)
	}
	s.ChargingResistorPower = nil
	if a := elAssess(t, elMainsRig(s)); !elHasGap(a, "supply.charging_resistor_power") {
		t.Errorf("got gaps %v, want one for the power rating", a.Gaps)
	}
}
