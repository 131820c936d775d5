package hazards

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

// TestAssessPulseDemo checks the disc thrower's pulse quantities against the loop they came from (the
// closed form re-evaluated on a.m.loop), physical bounds and the stress identities. Demo values are inputs
// only: nothing here compares with a remembered figure.
func TestAssessPulseDemo(t *testing.T) {
	r, a := pcLoadDemo(t, "disc-thrower")
	l := a.m.loop
	if l == nil {
		t.Fatal("got no loop model, want one")
	}
	if l.Topology != Unidirectional || l.CoilL != a.m.coil.L || l.CoilR != a.m.coil.R20 || l.C != a.m.bank.C || l.V0 != a.m.bank.V {
		t.Errorf("got loop %+v, want the bank, coil and unidirectional switch", *l)
	}
	p, err := RLCPulse(*l)
	if err != nil {
		t.Fatal(err)
	}
	ipk := pcQ(t, a, "pulse.peak_current")
	if ipk.Value != p.PeakCurrent || ipk.Worst == nil || *ipk.Worst < ipk.Value {
		t.Errorf("got peak %g (worst %v), want %g with a larger worst case", ipk.Value, ipk.Worst, p.PeakCurrent)
	}
	// Physical bound: at the peak L di/dt = 0, so i_peak ≤ (V0 − Vd)/R.
	if bound := (l.V0 - l.Drop) / (l.R + l.CoilR); ipk.Value >= bound {
		t.Errorf("got peak %g A, want below (V0 − Vd)/R = %g A", ipk.Value, bound)
	}
	// Coil heat cannot exceed the stored energy.
	if e := pcQ(t, a, "pulse.coil_energy").Value; e >= 0.5*l.C*l.V0*l.V0 {
		t.Errorf("got coil energy %g J, want below ½CV0²", e)
	}
	rev := pcQ(t, a, "pulse.reversal").Value
	if rev <= 0 || rev >= 1 || !scalar.EqualWithinRel(pcQ(t, a, "pulse.final_bank_voltage").Value, -rev*l.V0, 1e-12) {
		t.Errorf("got reversal %g, want 0 < r < 1 and the bank left at −r·V0", rev)
	}
	// Stress identities.
	sw := r.Switch
	i2t := pcQ(t, a, "pulse.i2t").Value
	checks := []struct {
		name string
		want float64
	}{
		{"switch.surge_ratio", ipk.Value / *sw.Surge},
		{"switch.surge_i2t_ratio", i2t / (*sw.Surge * *sw.Surge * *sw.SurgePulse / 2)},
		{"switch.i2t_ratio", i2t / *sw.I2t},
		{"switch.di_dt_ratio", (l.V0 - l.Drop) / (l.L + l.CoilL) / *sw.DiDt},
		{"switch.voltage_ratio", l.V0 / *sw.Blocking},
		{"pulse.cell_peak_current_ratio", ipk.Value / 2 / *r.Bank.PeakCurrent},
		{"pulse.cell_reverse_voltage", rev * l.V0 / 2},
		{"pulse.cell_reverse_ratio", rev * l.V0 / 2 / 1.0},
	}
	for _, c := range checks {
		t.Run(c.name, func(t *testing.T) {
			q := pcQ(t, a, c.name)
			// same arithmetic in a different order: rounding only.
			if !scalar.EqualWithinRel(q.Value, c.want, 1e-12) {
				t.Errorf("got %.12g, want %.12g", q.Value, c.want)
			}
			if q.Worst == nil || *q.Worst < q.Value {
				t.Errorf("got worst %v, want ≥ nominal %g", q.Worst, q.Value)
			}
		})
	}
	// Heating: the reported rise is IEC 60949's adiabatic rise for coil.i2t.
	ci2t := pcQ(t, a, "coil.i2t").Value
	tf, err := AdiabaticFinal(Copper, a.m.coil.Section, ci2t, 293.15)
	if err != nil {
		t.Fatal(err)
	}
	if got := pcQ(t, a, "coil.temperature_rise").Value; !scalar.EqualWithinRel(got, tf-293.15, 1e-12) {
		t.Errorf("got rise %g K, want %g K", got, tf-293.15)
	}
	if n := pcQ(t, a, "coil.shots_to_class"); n.Value < 1 || *n.Worst > n.Value {
		t.Errorf("got shots %g (worst %g), want ≥ 1 and worst ≤ nominal", n.Value, *n.Worst)
	}
	for _, name := range []string{"pulse.current", "pulse.bank_voltage"} {
		c, ok := a.Curve(name)
		if !ok || len(c.X) != len(c.Y) || len(c.X) < 100 {
			t.Errorf("got curve %s ok=%v with %d points, want ≥ 100", name, ok, len(c.X))
			continue
		}
		if name == "pulse.bank_voltage" && (c.Y[0] != l.V0 || !scalar.EqualWithinAbs(c.Y[len(c.Y)-1], -rev*l.V0, 1e-9)) {
			t.Errorf("got bank voltage from %g to %g, want V0 to −rV0", c.Y[0], c.Y[len(c.Y)-1])
		}
	}
}

// TestAssessPulseTopologies checks the crowbar demo (no reversal; the diode carries the tail) and the
// antiparallel-diode variant of the disc thrower (rings down; the diode carries the reverse lobes).
func TestAssessPulseTopologies(t *testing.T) {
	_, a := pcLoadDemo(t, "ring-jumper")
	if rev := pcQ(t, a, "pulse.reversal").Value; rev != 0 {
		t.Errorf("crowbar at the bank: got reversal %g, want 0", rev)
	}
	if d := pcQ(t, a, "pulse.diode_i2t").Value; !(d > 0) {
		t.Errorf("crowbar: got diode I²t %g, want > 0", d)
	}
	r, _ := pcLoadDemo(t, "disc-thrower")
	r.Switch.Topology = AntiparallelDiode
	a, err := Assess(r, DefaultTargets())
	if err != nil {
		t.Fatal(err)
	}
	uni, _ := RLCPulse(LoopModel{C: a.m.loop.C, V0: a.m.loop.V0, R: a.m.loop.R, L: a.m.loop.L, CoilL: a.m.loop.CoilL, CoilR: a.m.loop.CoilR, Drop: a.m.loop.Drop})
	// The switch carries the same first lobe; the coil also the reverse lobes.
	if sw := pcQ(t, a, "pulse.i2t").Value; !(sw > uni.SwitchI2t) {
		t.Errorf("got switch I²t %g, want above the first lobe's %g (later forward lobes)", sw, uni.SwitchI2t)
	}
	if c, s := pcQ(t, a, "coil.i2t").Value, pcQ(t, a, "pulse.i2t").Value; !(c > s) {
		t.Errorf("got coil I²t %g ≤ switch I²t %g, want the coil to carry the diode lobes too", c, s)
	}
}

// TestAssessPulseGaps checks that missing ratings and loop parts become gaps.
func TestAssessPulseGaps(t *testing.T) {
	r, _ := pcLoadDemo(t, "disc-thrower")
	r.Switch.Surge, r.Switch.I2t, r.Switch.DiDt, r.Switch.Blocking, r.Switch.Drop = nil, nil, nil, nil, nil
	r.Bank.PeakCurrent = nil
	r.Wiring.Separation = nil
	a, err := Assess(r, DefaultTargets())
	if err != nil {
		t.Fatal(err)
	}
	want := []string{"switch.surge_current", "switch.i2t_rating", "switch.di_dt_critical", "switch.blocking_voltage",
		"switch.forward_drop", "bank.peak_current_rating", "wiring.separation"}
	for _, f := range want {
		found := false
		for _, g := range a.Gaps {
			found = found || g.Field == f
		}
		if !found {
			t.Errorf("got no gap %s, want one", f)
		}
	}
	for _, n := range []string{"switch.surge_ratio", "switch.i2t_ratio", "switch.di_dt_ratio", "switch.voltage_ratio"} {
		if _, ok := a.Q(n); ok {
			t.Errorf("got %s without its rating, want none", n)
		}
	}
}

// TestAssessPulseBounds checks the flash-bank demo with its stray inductance removed (no coil, no inductance):
// the pulse quantities are the upper bounds (V0 − Vd)/R and ½CV0²/R.
func TestAssessPulseBounds(t *testing.T) {
	rig, _ := pcLoadDemo(t, "flash-bank")
	rig.Wiring.StrayInductance = nil
	a, err := Assess(rig, DefaultTargets())
	if err != nil {
		t.Fatal(err)
	}
	rt := pcQ(t, a, "loop.resistance").Value
	v := a.m.bank.V
	vd := *rig.Switch.Drop
	if got := pcQ(t, a, "pulse.peak_current").Value; !scalar.EqualWithinRel(got, (v-vd)/rt, 1e-12) {
		t.Errorf("got %g A, want (V0 − Vd)/R = %g A", got, (v-vd)/rt)
	}
	if got := pcQ(t, a, "pulse.i2t").Value; !scalar.EqualWithinRel(got, 0.5*a.m.bank.C*v*v/rt, 1e-12) {
		t.Errorf("got %g A²s, want ½CV0²/R", got)
	}
	if a.m.loop != nil {
		t.Errorf("got a loop model without inductance, want none")
	}
	if math.IsNaN(pcQ(t, a, "pulse.peak_current").Value) {
		t.Errorf("got NaN")
	}
}
