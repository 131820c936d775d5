package hazards

import (
	"fmt"
	"math"
	"math/rand"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"chargeward/internal/riggen"
	"chargeward/schema"
)

// rk4 integrates x' = f(x) with the classical fourth-order Runge–Kutta method, n steps of dt.
func rk4(f func([]float64) []float64, x []float64, dt float64, n int) []float64 {
	x = append([]float64(nil), x...)
	tmp := make([]float64, len(x))
	for range n {
		k1 := f(x)
		for i := range x {
			tmp[i] = x[i] + dt/2*k1[i]
		}
		k2 := f(tmp)
		for i := range x {
			tmp[i] = x[i] + dt/2*k2[i]
		}
		k3 := f(tmp)
		for i := range x {
			tmp[i] = x[i] + dt*k3[i]
		}
		k4 := f(tmp)
		for i := range x {
			x[i] += dt / 6 * (k1[i] + 2*k2[i] + 2*k3[i] + k4[i])
		}
	}
	return x
}

// TestDecayAgainstODE checks V(t) = V0·e^(−t/τ) against a classical RK4 integration of C·dV/dt = −V/R with
// dt = τ/1000. RK4's global error is O(dt⁴): about (1e-3)⁴·t/τ ≈ 1e-11 relative over 5τ, so 1e-9 is a safe
// tolerance.
func TestDecayAgainstODE(t *testing.T) {
	for _, tc := range []struct {
		name    string
		c, r, v float64
	}{
		{"2200 µF, 100 kΩ, 705 V", 2200e-6, 100e3, 705},
		{"94 µF, 220 kΩ, 330 V", 94e-6, 220e3, 330},
		{"600 µF, 10 Ω, 400 V", 600e-6, 10, 400},
	} {
		t.Run(tc.name, func(t *testing.T) {
			tau := tc.r * tc.c
			f := func(x []float64) []float64 { return []float64{-x[0] / (tc.r * tc.c)} }
			x := []float64{tc.v}
			for k := 1; k <= 5; k++ {
				x = rk4(f, x, tau/1000, 1000)
				if got, want := DecayVoltage(tc.v, tau, float64(k)*tau), x[0]; !scalar.EqualWithinRel(got, want, 1e-9) {
					t.Errorf("t = %dτ: got %.12g V, want %.12g V (RK4)", k, got, want)
				}
			}
			// The time to 50 V inverts the decay: V(t50) = 50 V.
			t50 := DecayTime(tc.v, 50, tau)
			if got := DecayVoltage(tc.v, tau, t50); !scalar.EqualWithinRel(got, 50, 1e-12) {
				t.Errorf("V(t50): got %.12g V, want 50 V", got)
			}
		})
	}
}

// TestAssessedDecayAgainstODE checks the assessed time constant, time to safe and curve for each demo rig
// against an RK4 integration of C·dV/dt = −V/Rbl, with the bleeder resistance taken straight from the rig
// (n·R/k). Tolerance 1e-6 relative: RK4 with τ/2000 steps is far more accurate; the crossing time is found by
// linear interpolation between steps of τ/2000, whose error is below (τ/2000)²/(8τ²) ≈ 3e-8 relative.
func TestAssessedDecayAgainstODE(t *testing.T) {
	for _, r := range []*schema.Rig{elDiscThrower(), elFlashBank(), elRingJumper()} {
		t.Run(r.Rig.Name, func(t *testing.T) {
			a := elAssess(t, r)
			b := r.Bleeder
			rbl := float64(*b.ElementsInSeries) * *b.Resistance / float64(*b.Count)
			c := SeriesParallelCapacitance(*r.Bank.Capacitance, *r.Bank.Series, *r.Bank.Parallel)
			v0 := elQ(t, a, "bank.voltage").Value
			tau := rbl * c
			if got := elQ(t, a, "discharge.time_constant").Value; !scalar.EqualWithinRel(got, tau, 1e-12) {
				t.Errorf("τ: got %.9g s, want %.9g s", got, tau)
			}
			f := func(x []float64) []float64 { return []float64{-x[0] / tau} }
			dt := tau / 2000
			x, tt, tHit := []float64{v0}, 0.0, 0.0
			for x[0] > 50 {
				prev := x[0]
				x = rk4(f, x, dt, 1)
				tt += dt
				if x[0] <= 50 {
					tHit = tt - dt + dt*(prev-50)/(prev-x[0])
				}
			}
			if got := elQ(t, a, "discharge.time_to_safe").Value; !scalar.EqualWithinRel(got, tHit, 1e-6) {
				t.Errorf("time to 50 V: got %.9g s, want %.9g s (RK4)", got, tHit)
			}
			curve, ok := a.Curve("discharge.decay")
			if !ok {
				t.Fatal("got no discharge.decay curve")
			}
			i := len(curve.X) / 3
			want := rk4(f, []float64{v0}, curve.X[i]/4000, 4000)[0]
			if !scalar.EqualWithinRel(curve.Y[i], want, 1e-6) {
				t.Errorf("curve at %.4g s: got %.9g V, want %.9g V (RK4)", curve.X[i], curve.Y[i], want)
			}
		})
	}
}

// fullNetwork integrates the unlumped cell network — P strings of S cells tied at their ends, cell (i, j)
// shunted by g[i][j], bleeder conductance gb across the bank — with RK4 and returns the bank voltage at time t.
// Kirchhoff's current law: each string carries one current Di downward; c·dv_ij/dt = Di − g_ij·v_ij; the
// strings share the terminal voltage, and Σ Di = −gb·V.
func fullNetwork(c, v0, gb float64, g [][]float64, t float64, steps int) float64 {
	p, s := len(g), len(g[0])
	f := func(x []float64) []float64 {
		var v, sg float64
		for i := range p {
			for j := range s {
				sg += g[i][j] * x[i*s+j]
			}
		}
		for j := range s {
			v += x[j]
		}
		dv := -(float64(s)*gb*v + sg) / (float64(p) * c) // from Σ_i (c·dV/dt + Σ_j g·v)/S = −gb·V
		out := make([]float64, len(x))
		for i := range p {
			var si float64
			for j := range s {
				si += g[i][j] * x[i*s+j]
			}
			di := (c*dv + si) / float64(s)
			for j := range s {
				out[i*s+j] = (di - g[i][j]*x[i*s+j]) / c
			}
		}
		return out
	}
	x := make([]float64, p*s)
	for k := range x {
		x[k] = v0 / float64(s)
	}
	x = rk4(f, x, t/float64(steps), steps)
	var v float64
	for j := range s {
		v += x[j]
	}
	return v
}

// TestFaultDecayAgainstFullNetwork checks the three-state matrix-exponential solution for one open balancing
// resistor against an RK4 integration of the full S·P-cell network (an independent formulation: no symmetry
// reduction, time stepping instead of the matrix exponential). Tolerance 1e-6 relative: RK4 with 4000 steps
// over at most a few of the fastest time constants is accurate to far better than that.
func TestFaultDecayAgainstFullNetwork(t *testing.T) {
	for _, tc := range []struct {
		s, p      int
		g, gf, gb float64
	}{
		{2, 1, 1e-4, 1e-7, 1e-5},
		{2, 2, 1e-4, 0, 0},
		{3, 2, 2e-4, 1e-6, 5e-5},
		{4, 3, 1e-4, 1e-5, 0},
		{1, 3, 1e-4, 0, 1e-5},
	} {
		t.Run(fmt.Sprintf("%dS%dP", tc.s, tc.p), func(t *testing.T) {
			const c, v0 = 1000e-6, 600.0
			f := newFaultDecay(c, v0, tc.g, tc.gf, tc.gb, tc.s, tc.p)
			g := make([][]float64, tc.p)
			for i := range g {
				g[i] = make([]float64, tc.s)
				for j := range g[i] {
					g[i][j] = tc.g
				}
			}
			g[0][0] = tc.gf
			for _, tt := range []float64{1, 5, 20} {
				got, want := f.at(tt), fullNetwork(c, v0, tc.gb, g, tt, 4000)
				if !scalar.EqualWithinRel(got, want, 1e-6) {
					t.Errorf("t = %g s: got %.9g V, want %.9g V (full network, RK4)", tt, got, want)
				}
			}
		})
	}
}

// TestFaultDecaySymmetricLimit checks that with no resistor actually open (gf = g) the network reduces to one RC
// decay with G = gb + P·g/S (the closed form the intact case uses). Tolerance 1e-9 relative: the matrix
// exponential (Higham's scaling and squaring) is accurate to about machine precision times the norm.
func TestFaultDecaySymmetricLimit(t *testing.T) {
	const c, v0, g, gb = 470e-6, 450.0, 2e-5, 1e-5
	for _, sp := range [][2]int{{1, 1}, {2, 1}, {3, 4}} {
		s, p := sp[0], sp[1]
		f := newFaultDecay(c, v0, g, g, gb, s, p)
		tau := SeriesParallelCapacitance(c, s, p) / gBank(gb, g, s, p)
		for _, tt := range []float64{0.1 * tau, tau, 4 * tau} {
			if got, want := f.at(tt), DecayVoltage(v0, tau, tt); !scalar.EqualWithinRel(got, want, 1e-9) {
				t.Errorf("%dS%dP, t = %.3g s: got %.12g V, want %.12g V", s, p, tt, got, want)
			}
		}
	}
}

// TestNECTargets checks the default targets against NFPA 70 (NEC) 2023, 460.6(A): residual voltage of a
// capacitor rated 1000 V or less reduced to 50 V or less within 1 minute of disconnection (600 V in editions
// before 2023); and that a bleeder sized exactly to that limit is assessed at the limit (τ = 60 s/ln(V0/50)).
func TestNECTargets(t *testing.T) {
	tg := DefaultTargets()
	if tg.SafeVoltage != 50 || tg.TimeAllowed != 60 {
		t.Fatalf("got %g V within %g s, want 50 V within 60 s (NEC 460.6(A))", tg.SafeVoltage, tg.TimeAllowed)
	}
	c, v := 1100e-6, 680.0
	rbl := 60 / (c * math.Log(v/50))
	r := elDCRig(1100e-6, v, 1, 1)
	r.Bleeder = &schema.Bleeder{Resistance: elF(rbl), Tolerance: elF(0.05)}
	a := elAssess(t, r)
	if got := elQ(t, a, "discharge.time_to_safe").Value; !scalar.EqualWithinRel(got, 60, 1e-12) {
		t.Errorf("got %.12g s, want 60 s", got)
	}
}

// TestLeakageOnlyClosedForm checks the leakage-only lower bound against the closed form of the catalogue rule
// I = 0.01·C·V (µA, µF, V; common practice): the cell's leakage resistance is Vr/I = 100/C[F] Ω, so its time
// constant is 100 s whatever C, and the bank (S series × P parallel) decays with the same 100 s. Tolerance 1e-12
// relative: rounding only.
func TestLeakageOnlyClosedForm(t *testing.T) {
	r := elDCRig(2200e-6, 700, 2, 2) // 0.01·2200·450 µA = 9.9 mA ≫ 3 µA
	a := elAssess(t, r)
	if !elHasGap(a, "bleeder") {
		t.Errorf("got gaps %v, want one for the missing bleeder", a.Gaps)
	}
	if got := elQ(t, a, "discharge.time_constant").Value; !scalar.EqualWithinRel(got, 100, 1e-12) {
		t.Errorf("τ: got %.12g s, want 100 s", got)
	}
	if got, want := elQ(t, a, "discharge.time_to_safe").Value, 100*math.Log(700.0/50); !scalar.EqualWithinRel(got, want, 1e-12) {
		t.Errorf("t: got %.12g s, want %.12g s", got, want)
	}
	// No dielectric and no leakage figure: nothing bounds the decay, so no time at all, and a gap.
	r.Bank.Dielectric = ""
	a = elAssess(t, r)
	if _, ok := a.Q("discharge.time_to_safe"); ok || !elHasGap(a, "bank.leakage") {
		t.Errorf("got a time to safe or no bank.leakage gap (%v), want a gap only", a.Gaps)
	}
}

// TestMoreCapacitanceNeverShortensTimeToSafe is a property test: at a fixed charge voltage and bleeder, the time
// to safe is non-decreasing in the capacitance (t = R·C·ln(V0/Vs) is monotone in C).
func TestMoreCapacitanceNeverShortensTimeToSafe(t *testing.T) {
	prev, prevW := 0.0, 0.0
	for _, c := range []float64{1e-6, 10e-6, 100e-6, 470e-6, 1e-3, 4.7e-3, 22e-3} {
		r := elDCRig(c, 400, 1, 1)
		r.Bleeder = &schema.Bleeder{Resistance: elF(47e3)}
		q := elQ(t, elAssess(t, r), "discharge.time_to_safe")
		if q.Value < prev || *q.Worst < prevW {
			t.Errorf("C = %g F: got %g s (worst %g s), want ≥ %g s (%g s)", c, q.Value, *q.Worst, prev, prevW)
		}
		prev, prevW = q.Value, *q.Worst
	}
}

// TestLargerBleederNeverShortensTimeToSafe is a property test: a larger bleeder resistance never shortens the
// time to safe, intact or with one bleeder failed.
func TestLargerBleederNeverShortensTimeToSafe(t *testing.T) {
	for _, bal := range []bool{false, true} {
		prev, prevSF := 0.0, 0.0
		for _, rbl := range []float64{1e3, 10e3, 47e3, 100e3, 1e6, 10e6} {
			r := elDCRig(1000e-6, 600, 2, 1)
			r.Bleeder = &schema.Bleeder{Resistance: elF(rbl), Count: elI(2)}
			if bal {
				r.Bank.Balancing = &schema.Balancing{Resistance: elF(220e3)}
			}
			a := elAssess(t, r)
			ts, sf := elQ(t, a, "discharge.time_to_safe").Value, elQ(t, a, "discharge.time_to_safe_single_fault").Value
			if ts < prev || sf < prevSF {
				t.Errorf("balancing %v, R = %g Ω: got %g s / %g s (single fault), want ≥ %g s / %g s", bal, rbl, ts, sf, prev, prevSF)
			}
			prev, prevSF = ts, sf
		}
	}
}

// TestFailedBleederNeverShortens is a property test over varied rigs: the single-fault time is never shorter than
// the intact time (nominal and worst), and removing a whole chain never shortens the intact time.
func TestFailedBleederNeverShortens(t *testing.T) {
	rigs := map[string]*schema.Rig{"disc thrower": elDiscThrower(), "flash bank": elFlashBank(), "ring jumper": elRingJumper()}
	for _, count := range []int{1, 2, 3} {
		for _, bal := range []float64{0, 100e3} {
			for _, leak := range []float64{0, 1e-4} {
				r := elDCRig(2200e-6, 700, 2, 2)
				r.Bleeder = &schema.Bleeder{Resistance: elF(150e3), Count: elI(count), ElementsInSeries: elI(2)}
				if bal > 0 {
					r.Bank.Balancing = &schema.Balancing{Resistance: elF(bal)}
				}
				if leak > 0 {
					r.Bank.Leakage = elF(leak)
				}
				rigs[fmt.Sprintf("%d chains, Rb %g, leakage %g", count, bal, leak)] = r
			}
		}
	}
	for name, r := range rigs {
		t.Run(name, func(t *testing.T) {
			a := elAssess(t, r)
			ts, sf := elQ(t, a, "discharge.time_to_safe"), elQ(t, a, "discharge.time_to_safe_single_fault")
			if sf.Value < ts.Value || *sf.Worst < *ts.Worst {
				t.Errorf("got single fault %g s (worst %g s), want ≥ intact %g s (%g s)", sf.Value, *sf.Worst, ts.Value, *ts.Worst)
			}
			if c := r.Bleeder.Count; c != nil && *c > 1 {
				r2 := *r
				b := *r.Bleeder
				b.Count = elI(*c - 1)
				r2.Bleeder = &b
				if t2 := elQ(t, elAssess(t, &r2), "discharge.time_to_safe").Value; t2 < ts.Value {
					t.Errorf("one chain fewer: got %g s, want ≥ %g s", t2, ts.Value)
				}
			}
		})
	}
}

// TestCurves checks that both decay curves exist, are finite, start at the charge voltage, fall monotonically
// and reach past the time allowed and the time to safe.
func TestCurves(t *testing.T) {
	for _, r := range []*schema.Rig{elDiscThrower(), elFlashBank(), elRingJumper()} {
		a := elAssess(t, r)
		v0 := elQ(t, a, "bank.voltage").Value
		for _, name := range []string{"discharge.decay", "discharge.decay_single_fault"} {
			t.Run(r.Rig.Name+"/"+name, func(t *testing.T) {
				c, ok := a.Curve(name)
				if !ok {
					t.Fatal("got no curve")
				}
				q := "discharge.time_to_safe"
				if name == "discharge.decay_single_fault" {
					q += "_single_fault"
				}
				end := c.X[len(c.X)-1]
				if len(c.X) < 100 || c.Y[0] != v0 || end < a.Targets.TimeAllowed || end < elQ(t, a, q).Value {
					t.Errorf("got %d points, V(0) = %g V, end %g s; want ≥ 100 points, %g V, beyond %g s and %s", len(c.X), c.Y[0], end, v0, a.Targets.TimeAllowed, q)
				}
				for i := 1; i < len(c.Y); i++ {
					if math.IsNaN(c.Y[i]) || c.Y[i] > c.Y[i-1] {
						t.Fatalf("point %d: got %g V after %g V, want a finite fall", i, c.Y[i], c.Y[i-1])
					}
				}
			})
		}
	}
}

// TestBalancingFault checks a balanced bank without a bleeder: one balancing resistor open leaves a single string
// with no path for its cell's charge but leakage, so the single-fault time falls back to the leakage model and is
// far longer than the intact time; with two strings the faulted cell discharges through the other string.
func TestBalancingFault(t *testing.T) {
	r := elDCRig(1000e-6, 700, 2, 1)
	r.Bank.Balancing = &schema.Balancing{Resistance: elF(22e3), Tolerance: elF(0.05)}
	a := elAssess(t, r)
	ts, sf := elQ(t, a, "discharge.time_to_safe"), elQ(t, a, "discharge.time_to_safe_single_fault")
	// Intact: each cell decays with Ccell·Rb = 22 s, so t = 22·ln(700/50).
	if want := 22 * math.Log(700.0/50); !scalar.EqualWithinRel(ts.Value, want, 1e-12) {
		t.Errorf("intact: got %.9g s, want %.9g s", ts.Value, want)
	}
	// Faulted cell holds 350 V and leaks with the 100 s catalogue time constant: t ≥ 100·ln(350/50).
	if want := 100 * math.Log(350.0/50); sf.Value < want {
		t.Errorf("single fault: got %.6g s, want ≥ %.6g s", sf.Value, want)
	}
	r.Bank.Parallel = elI(2)
	a = elAssess(t, r)
	if sf2 := elQ(t, a, "discharge.time_to_safe_single_fault").Value; !(sf2 > elQ(t, a, "discharge.time_to_safe").Value) {
		t.Errorf("two strings: got single fault %g s, want longer than intact", sf2)
	}
}

// TestDumpAndAbsorption checks the dump resistor's peak current (Ohm's law, V/(Rd + ESR)) and time to safe on
// the ring jumper, and the absorption recovery of an electrolytic bank at the 10 % lower figure of CHECKS.md
// (aluminium electrolytic 10–15 %, from memory). Tolerance 1e-12 relative: rounding only.
func TestDumpAndAbsorption(t *testing.T) {
	a := elAssess(t, elRingJumper())
	rl := 10 + 2e-3/4 // dump + ESR of 4 cells in parallel
	if got, want := elQ(t, a, "dump.peak_current").Value, 400/rl; !scalar.EqualWithinRel(got, want, 1e-12) {
		t.Errorf("dump peak: got %.9g A, want %.9g A", got, want)
	}
	if got, want := elQ(t, a, "dump.time_to_safe").Value, 600e-6*rl*math.Log(400.0/50); !scalar.EqualWithinRel(got, want, 1e-12) {
		t.Errorf("dump time: got %.9g s, want %.9g s", got, want)
	}
	d := elAssess(t, elDiscThrower())
	v := elQ(t, d, "bank.voltage").Value
	if got := elQ(t, d, "discharge.absorption_recovery").Value; !scalar.EqualWithinRel(got, 0.10*v, 1e-12) {
		t.Errorf("absorption: got %.6g V, want %.6g V", got, 0.10*v)
	}
}

// TestDischargeBadInput checks that impossible inputs are errors.
func TestDischargeBadInput(t *testing.T) {
	r := elDiscThrower()
	if _, err := Assess(r, Targets{SafeVoltage: 0}); err == nil {
		t.Errorf("safe voltage 0: got no error, want one")
	}
	r.Bleeder.Resistance = elF(-1)
	if _, err := Assess(r, DefaultTargets()); err == nil {
		t.Errorf("negative bleeder: got no error, want one")
	}
}

// TestRandomRigProperties is a property test over generated rigs (internal/riggen; random test inputs, not
// expected values): for every rig the electrical quantities satisfy W = ½CV², the single-fault time is never
// shorter than the intact time, and raising the capacitance or the bleeder resistance never shortens the time
// to safe (nor lowers the energy, for the capacitance).
func TestRandomRigProperties(t *testing.T) {
	rng := rand.New(rand.NewSource(3))
	n := 150
	if testing.Short() {
		n = 30
	}
	var nTime, nBleeder int
	defer func() {
		t.Logf("%d rigs, %d with times to safe, %d with a bleeder resized", n, nTime, nBleeder)
		if nTime == 0 || nBleeder == 0 {
			t.Errorf("got %d rigs with times and %d with bleeders, want some of each (the generator changed?)", nTime, nBleeder)
		}
	}()
	for i := range n {
		text := riggen.Rig(rng, riggen.Options{})
		load := func() *schema.Rig {
			r, err := schema.LoadRig(fmt.Sprintf("gen-%d.yaml", i), []byte(text))
			if err != nil {
				t.Fatalf("rig %d: LoadRig: %v\n%s", i, err, text)
			}
			return r
		}
		r := load()
		a, err := Assess(r, DefaultTargets())
		if err != nil {
			t.Fatalf("rig %d: Assess: %v\n%s", i, err, text)
		}
		c, okC := a.Q("bank.capacitance")
		v, okV := a.Q("bank.voltage")
		w, okW := a.Q("bank.energy")
		if !okC || !okV || !okW {
			continue
		}
		if !scalar.EqualWithinRel(w.Value, 0.5*c.Value*v.Value*v.Value, 1e-12) {
			t.Errorf("rig %d: W = %g J, want ½CV² = %g J", i, w.Value, 0.5*c.Value*v.Value*v.Value)
		}
		ts, ok1 := a.Q("discharge.time_to_safe")
		sf, ok2 := a.Q("discharge.time_to_safe_single_fault")
		if !ok1 || !ok2 {
			continue
		}
		if sf.Value < ts.Value || *sf.Worst < *ts.Worst {
			t.Errorf("rig %d: single fault %g s (worst %g s) shorter than intact %g s (%g s)", i, sf.Value, *sf.Worst, ts.Value, *ts.Worst)
		}
		nTime++
		more := load()
		*more.Bank.Capacitance *= 1.5
		am := elAssess(t, more)
		if got := elQ(t, am, "discharge.time_to_safe"); below(got.Value, ts.Value) || below(*got.Worst, *ts.Worst) {
			t.Errorf("rig %d: 1.5 × C gave %.17g s (worst %.17g s), want ≥ %.17g s (%.17g s)", i, got.Value, *got.Worst, ts.Value, *ts.Worst)
		}
		if got := elQ(t, am, "bank.energy"); got.Value < w.Value {
			t.Errorf("rig %d: 1.5 × C gave %g J, want ≥ %g J", i, got.Value, w.Value)
		}
		if r.Bleeder != nil && r.Bleeder.Resistance != nil {
			nBleeder++
			big := load()
			*big.Bleeder.Resistance *= 2
			if got := elQ(t, elAssess(t, big), "discharge.time_to_safe"); below(got.Value, ts.Value) || below(*got.Worst, *ts.Worst) {
				t.Errorf("rig %d: 2 × bleeder gave %g s, want ≥ %g s", i, got.Value, ts.Value)
			}
		}
	}
}

// below reports whether got is below want by more than rounding: when only catalogue leakage discharges an
// electrolytic bank its time constant (100 s per cell) does not depend on C at all, and the two figures then
// differ in the last bits only; 1e-12 relative is many ulps and far below any physical change.
func below(got, want float64) bool { return got < want*(1-1e-12) }
