package hazards

import (
	"fmt"
	"io/fs"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"chargeward"
	"chargeward/schema"
)

// elDCRig is a minimal dc-supply rig: a bank of s×p cells of c farads charged to v volts.
func elDCRig(c, v float64, s, p int) *schema.Rig {
	return &schema.Rig{
		Supply: &schema.Supply{Kind: "dc-supply", DCVoltage: elF(v)},
		Bank:   schema.Bank{Capacitance: elF(c), CapacitanceTolerance: elF(0.2), VoltageRating: elF(450), Series: elI(s), Parallel: elI(p), Dielectric: "aluminium-electrolytic"},
	}
}

// TestEnergyIdentities checks W = ½CV² = Q²/2C = ½QV between bank.energy and bank.charge, nominal and worst
// (identities from Q = CV; any circuits text). Tolerance 1e-12 relative: rounding only.
func TestEnergyIdentities(t *testing.T) {
	for _, r := range []*schema.Rig{elDiscThrower(), elFlashBank(), elRingJumper(), elDCRig(10e-3, 450, 3, 5)} {
		t.Run(r.Rig.Name, func(t *testing.T) {
			a := elAssess(t, r)
			w, q, c, v := elQ(t, a, "bank.energy"), elQ(t, a, "bank.charge"), elQ(t, a, "bank.capacitance"), elQ(t, a, "bank.voltage")
			for _, k := range []struct {
				name       string
				w, q, c, v float64
			}{{"nominal", w.Value, q.Value, c.Value, v.Value}, {"worst", *w.Worst, *q.Worst, *c.Worst, *v.Worst}} {
				if got, want := k.w, k.q*k.q/(2*k.c); !scalar.EqualWithinRel(got, want, 1e-12) {
					t.Errorf("%s: ½CV² got %.9g J, Q²/2C want %.9g J", k.name, got, want)
				}
				if got, want := k.w, 0.5*k.q*k.v; !scalar.EqualWithinRel(got, want, 1e-12) {
					t.Errorf("%s: ½CV² got %.9g J, ½QV want %.9g J", k.name, got, want)
				}
			}
		})
	}
}

// TestSeriesParallel checks C = P·Ccell/S against an explicit reduction: S capacitors in series combine as
// 1/C = Σ 1/Ci, P strings in parallel as C = Σ Ci (Alexander & Sadiku, Fundamentals of Electric Circuits,
// 5th ed., §6.4; section from memory). Tolerance 1e-12 relative: rounding of the loop sums.
func TestSeriesParallel(t *testing.T) {
	for _, tc := range []struct{ s, p int }{{1, 1}, {2, 2}, {3, 1}, {1, 4}, {5, 7}} {
		t.Run(fmt.Sprintf("%dS%dP", tc.s, tc.p), func(t *testing.T) {
			const c = 2200e-6
			var inv float64
			for i := 0; i < tc.s; i++ {
				inv += 1 / c
			}
			var want float64
			for j := 0; j < tc.p; j++ {
				want += 1 / inv
			}
			if got := SeriesParallelCapacitance(c, tc.s, tc.p); !scalar.EqualWithinRel(got, want, 1e-12) {
				t.Errorf("got %.9g F, want %.9g F", got, want)
			}
			// The bank's energy is the sum over cells of ½Ccell(V/S)² when the cells share equally.
			a := elAssess(t, elDCRig(c, 100*float64(tc.s), tc.s, tc.p))
			cells := float64(tc.s*tc.p) * Energy(c, 100)
			if got := elQ(t, a, "bank.energy").Value; !scalar.EqualWithinRel(got, cells, 1e-12) {
				t.Errorf("energy: got %.9g J, want Σ cells %.9g J", got, cells)
			}
		})
	}
}

// TestShortedCellEnergy checks the energy a shorted cell receives against energy bookkeeping done the long way:
// the faulted string and the healthy strings equalise to a common voltage fixed by charge conservation, and the
// energy lost is what was stored before minus after, less the shorted cell's own energy (a closed system of
// ideal capacitors). For S = 1 the faulted string is a dead short and receives the whole energy of the others.
// Tolerance 1e-9 relative: rounding in differences of nearly equal energies.
func TestShortedCellEnergy(t *testing.T) {
	for _, tc := range []struct{ s, p int }{{1, 1}, {1, 2}, {2, 2}, {3, 4}, {4, 2}} {
		t.Run(fmt.Sprintf("%dS%dP", tc.s, tc.p), func(t *testing.T) {
			const c, v = 1000e-6, 600.0
			got := ShortedCellEnergy(c, v, tc.s, tc.p)
			s, p := float64(tc.s), float64(tc.p)
			var want float64
			if tc.s == 1 {
				want = (p - 1) * Energy(c, v)
			} else {
				// Healthy strings: total capacitance (p−1)c/s, charge (p−1)(c/s)v. The faulted string's s−1 cells each
				// hold charge c·v/s; in series they act as c/(s−1) at (s−1)v/s.
				cH, qH := (p-1)*c/s, (p-1)*c/s*v
				cF, qF := c/(s-1), c*v/s
				vf := (qH + qF) / (cH + cF)
				before := (p-1)*s*Energy(c, v/s) + (s-1)*Energy(c, v/s) // all cells but the shorted one
				after := Energy(cH+cF, vf)
				want = before - after
			}
			if !scalar.EqualWithinAbsOrRel(got, want, 1e-12, 1e-9) {
				t.Errorf("got %.9g J, want %.9g J", got, want)
			}
		})
	}
}

// TestCellShare checks the series-cell sharing model against its limits: equal cells with no spread share
// equally; the capacitive divider of two series capacitors charged from zero carries the same charge Q on both,
// so V1 = Q/C1 (definition of capacitance); balancing resistors much smaller than the leakage resistance force
// equal shares. Tolerance 1e-9 relative (rounding), 1e-3 for the balancing limit (Rb/Rleak = 1e-4).
func TestCellShare(t *testing.T) {
	t.Run("equal cells", func(t *testing.T) {
		n, w, ok := cellShare(4, 400, 1e-3, 0, 0, 0, 0)
		if !ok || !scalar.EqualWithinRel(n, 0.25, 1e-9) || !scalar.EqualWithinRel(w, 0.25, 1e-9) {
			t.Errorf("got %g, %g (ok %v), want 0.25, 0.25", n, w, ok)
		}
	})
	t.Run("capacitive divider", func(t *testing.T) {
		// Two cells, ±20 %: C1 = 0.8C, C2 = 1.2C, same Q = V·C1C2/(C1+C2); V1 = Q/C1.
		c1, c2 := 0.8, 1.2
		want := (c1 * c2 / (c1 + c2)) / c1
		_, w, _ := cellShare(2, 400, 1e-9, 0, 1e12, 0, 0.2)
		if !scalar.EqualWithinRel(w, want, 1e-9) {
			t.Errorf("got %.9g, want %.9g", w, want)
		}
	})
	t.Run("balancing dominates", func(t *testing.T) {
		n, _, _ := cellShare(2, 400, 1e-3, 1.0, 40, 0, 0) // Rleak = 400 kΩ, Rb = 40 Ω
		if !scalar.EqualWithinRel(n, 0.5, 1e-3) {
			t.Errorf("got %.6g, want 0.5", n)
		}
	})
	t.Run("no balancing, no leakage model", func(t *testing.T) {
		if _, _, ok := cellShare(2, 400, 0, 0, 0, 0, 0.2); ok {
			t.Errorf("got ok, want not bounded")
		}
	})
}

// TestMoreCapacitanceNeverLowersEnergy is a property test: at a fixed charge voltage, energy and charge are
// non-decreasing in the cell capacitance and in the parallel count (W = ½CV², monotone in C).
func TestMoreCapacitanceNeverLowersEnergy(t *testing.T) {
	prevW, prevQ := 0.0, 0.0
	for _, c := range []float64{1e-6, 4.7e-6, 47e-6, 470e-6, 2200e-6, 10e-3, 0.1} {
		for p := 1; p <= 4; p++ {
			a := elAssess(t, elDCRig(c, 300, 1, p))
			w, q := elQ(t, a, "bank.energy").Value, elQ(t, a, "bank.charge").Value
			if p == 1 && (w < prevW || q < prevQ) {
				t.Errorf("C = %g F: got W = %g J, Q = %g C, want ≥ %g J, %g C", c, w, q, prevW, prevQ)
			}
			if p == 1 {
				prevW, prevQ = w, q
			}
			if w1 := elQ(t, elAssess(t, elDCRig(c, 300, 1, 1)), "bank.energy").Value; w < w1 {
				t.Errorf("C = %g F, P = %d: got %g J, want ≥ %g J (P = 1)", c, p, w, w1)
			}
		}
	}
}

// TestBankModel checks that the bank stage leaves the model later stages read, consistent with its quantities.
func TestBankModel(t *testing.T) {
	a := elAssess(t, elDiscThrower())
	m := a.m.bank
	if m == nil {
		t.Fatal("got no bank model, want one")
	}
	c, v := elQ(t, a, "bank.capacitance"), elQ(t, a, "bank.voltage")
	if m.C != c.Value || m.CWorst != *c.Worst || m.V != v.Value || m.VWorst != *v.Worst || m.S != 2 || m.P != 2 {
		t.Errorf("got %+v, want C, V and counts as the quantities", *m)
	}
	// ESR of 2 series × 2 parallel cells of 45 mΩ: 45 mΩ (series adds, parallel halves).
	if !scalar.EqualWithinRel(m.ESR, 45e-3, 1e-12) {
		t.Errorf("ESR: got %g Ω, want 0.045 Ω", m.ESR)
	}
}

// TestBankGaps checks that missing bank facts become gaps.
func TestBankGaps(t *testing.T) {
	r := elDCRig(1e-3, 300, 2, 1)
	r.Bank.Capacitance = nil
	a := elAssess(t, r)
	if !elHasGap(a, "bank.capacitance") || a.m.bank != nil {
		t.Errorf("no capacitance: got gaps %v, model %v; want a gap and no model", a.Gaps, a.m.bank)
	}
	r = elDCRig(1e-3, 300, 2, 1)
	r.Bank.ESR, r.Bank.VoltageRating = nil, nil
	a = elAssess(t, r)
	if !elHasGap(a, "bank.esr") || !elHasGap(a, "bank.voltage_rating") {
		t.Errorf("got gaps %v, want bank.esr and bank.voltage_rating", a.Gaps)
	}
	if _, ok := a.Q("bank.voltage_margin"); ok {
		t.Errorf("got a voltage margin without a rating")
	}
	// No supply: the bank is assumed charged to its rating, and the supply gap says why.
	r = elDCRig(1e-3, 300, 2, 1)
	r.Supply = nil
	a = elAssess(t, r)
	if v := elQ(t, a, "bank.voltage").Value; v != 900 || !elHasGap(a, "supply") {
		t.Errorf("no supply: got %g V, gaps %v; want 900 V (2 × 450 V) and a supply gap", v, a.Gaps)
	}
}

// Demo rigs built in Go (an invented scenario: the same figures as testdata/rigs/*.yaml), for the tests until
// the loader is on main. They are inputs, never expected values.

func elF(v float64) *float64 { return &v }
func elI(v int) *int         { return &v }
func elB(v bool) *bool       { return &v }

// elDiscThrower mirrors testdata/rigs/disc-thrower.yaml (electrical sections).
func elDiscThrower() *schema.Rig {
	return &schema.Rig{
		Rig: schema.Info{Name: "Open-day disc thrower, bench 4", Revision: "B"},
		Supply: &schema.Supply{Kind: "mains-rectifier", MainsVoltage: elF(240), MainsFrequency: elF(50), MainsTolerance: elF(0.10),
			Rectifier: "doubler", DiodeDrop: elF(1.0), ChargingResistor: elF(1e3), ChargingResistorPower: elF(10), Isolation: "switched"},
		Bank: schema.Bank{Capacitance: elF(2200e-6), CapacitanceTolerance: elF(0.20), VoltageRating: elF(400), Dielectric: "aluminium-electrolytic",
			ESR: elF(45e-3), PeakCurrent: elF(1500), Series: elI(2), Parallel: elI(2), PulseRated: elB(false)},
		Bleeder:      &schema.Bleeder{Resistance: elF(100e3), Count: elI(1), ElementsInSeries: elI(1), PowerRating: elF(2), VoltageRating: elF(500), Tolerance: elF(0.05)},
		Measurements: &schema.Measurements{ChargeVoltage: elF(705)},
	}
}

// elFlashBank mirrors testdata/rigs/flash-bank.yaml (electrical sections).
func elFlashBank() *schema.Rig {
	return &schema.Rig{
		Rig: schema.Info{Name: "Photoflash trainer, kit 7", Revision: "1.2"},
		Supply: &schema.Supply{Kind: "dc-supply", DCVoltage: elF(300), DCCurrent: elF(5e-3), ChargingResistor: elF(4.7e3), ChargingResistorPower: elF(1),
			Isolation: "interlocked"},
		Bank: schema.Bank{Capacitance: elF(47e-6), CapacitanceTolerance: elF(0.10), VoltageRating: elF(360), Dielectric: "aluminium-electrolytic",
			ESR: elF(1.2), PeakCurrent: elF(200), Series: elI(1), Parallel: elI(2), PulseRated: elB(true)},
		Bleeder:      &schema.Bleeder{Resistance: elF(220e3), Count: elI(1), ElementsInSeries: elI(1), PowerRating: elF(1), VoltageRating: elF(500), Tolerance: elF(0.01)},
		Measurements: &schema.Measurements{ChargeVoltage: elF(298), DecayTime: elF(37), DecayTo: elF(50)},
	}
}

// elRingJumper mirrors testdata/rigs/ring-jumper.yaml (electrical sections).
func elRingJumper() *schema.Rig {
	return &schema.Rig{
		Rig: schema.Info{Name: "Classroom jumping ring, cart 2", Revision: "3"},
		Supply: &schema.Supply{Kind: "dc-supply", DCVoltage: elF(400), DCCurrent: elF(20e-3), ChargingResistor: elF(22e3), ChargingResistorPower: elF(10),
			Isolation: "interlocked"},
		Bank: schema.Bank{Capacitance: elF(150e-6), CapacitanceTolerance: elF(0.05), VoltageRating: elF(500), Dielectric: "film-polypropylene",
			ESR: elF(2e-3), PeakCurrent: elF(3000), Series: elI(1), Parallel: elI(4), PulseRated: elB(true)},
		Bleeder:      &schema.Bleeder{Resistance: elF(22e3), ElementsInSeries: elI(2), Count: elI(1), PowerRating: elF(5), VoltageRating: elF(350), Tolerance: elF(0.05)},
		Dump:         &schema.Dump{Resistance: elF(10), EnergyRating: elF(150), PowerRating: elF(50), Switching: "normally-closed-relay", FailSafe: elB(true)},
		Measurements: &schema.Measurements{ChargeVoltage: elF(396), DecayTime: elF(14e-3), DecayTo: elF(50)},
	}
}

// TestDemoRigsLoaded assesses the shipped demo rigs as the loader reads them, and checks that the Go copies used
// by the other tests hold the same electrical figures (every quantity of the supply, bank and discharge stages
// equal). The demo rigs are invented inputs, so nothing here is an expected physical value.
func TestDemoRigsLoaded(t *testing.T) {
	for file, mk := range map[string]func() *schema.Rig{"disc-thrower": elDiscThrower, "flash-bank": elFlashBank, "ring-jumper": elRingJumper} {
		t.Run(file, func(t *testing.T) {
			data, err := fs.ReadFile(chargeward.Demos, "testdata/rigs/"+file+".yaml")
			if err != nil {
				t.Fatal(err)
			}
			r, err := schema.LoadRig(file+".yaml", data)
			if err != nil {
				t.Fatalf("LoadRig: %v", err)
			}
			loaded, mine := elAssess(t, r), elAssess(t, mk())
			for _, q := range mine.Quantities {
				if !strings.HasPrefix(q.Name, "supply.") && !strings.HasPrefix(q.Name, "bank.") && !strings.HasPrefix(q.Name, "discharge.") &&
					!strings.HasPrefix(q.Name, "bleeder.") && !strings.HasPrefix(q.Name, "dump.") {
					continue
				}
				got := elQ(t, loaded, q.Name)
				if !scalar.EqualWithinRel(got.Value, q.Value, 1e-12) {
					t.Errorf("%s: loaded rig %g, Go copy %g", q.Name, got.Value, q.Value)
				}
				if got.Basis == "" || got.Formula == "" || got.Unit == "" {
					t.Errorf("%s: got basis %q, formula %q, unit %q; want all stated", q.Name, got.Basis, got.Formula, got.Unit)
				}
			}
			for _, name := range []string{"supply.peak_voltage", "bank.capacitance", "bank.voltage", "bank.voltage_rating", "bank.energy", "bank.charge",
				"bank.cell_voltage_max", "discharge.time_constant", "discharge.time_to_safe", "discharge.time_to_safe_single_fault", "bleeder.power"} {
				elQ(t, loaded, name) // DESIGN.md §9: these exist whenever the rig has the part
			}
		})
	}
}
