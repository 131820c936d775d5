package hazards

import (
	"errors"
	"fmt"
	"math"
	"math/rand"
	"os"
	"strings"
	"testing"
	"time"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/integrate/quad"

	"chargeward/hazards/em"
	"chargeward/hazards/ode"
	"chargeward/internal/riggen"
	"chargeward/schema"
)

// demoCoil builds the demo disc thrower's coil as the tests use it until the coil stage supplies one: a
// 28-turn flat spiral of AWG 12 copper (bare diameter 2.053 mm, ASTM B258) with turn centres spread evenly
// from 6 mm to 59 mm radius, one filament per turn at z = −wire radius. Invented demo data, not a reference.
func demoCoil() (*CoilModel, float64, float64) {
	const turns = 28
	wr := 2.053e-3 / 2
	c := &CoilModel{WireRadius: wr, Material: "copper"}
	var length float64
	for j := 0; j < turns; j++ {
		r := 6e-3 + 53e-3*(float64(j)+0.5)/turns
		c.Filaments = append(c.Filaments, Filament{R: r, Z: -wr, Turns: 1})
		length += 2 * math.Pi * r
	}
	// Inductance by summing self (round wire, LoopSelf) and mutual (Maxwell) terms.
	var l float64
	for i, a := range c.Filaments {
		l += em.LoopSelf(a.R, wr)
		for j := i + 1; j < len(c.Filaments); j++ {
			l += 2 * em.Mutual(a.R, c.Filaments[j].R, 0)
		}
	}
	c.L = l
	c.R20 = Copper.Resistivity20 * length / (math.Pi * wr * wr)
	c.Mass = Copper.Density * length * math.Pi * wr * wr
	return c, c.L, c.R20
}

// demoLoop is the demo disc thrower's loop: 2200 µF equivalent at 718 V, 0.05 Ω and 1 µH outside the coil,
// a unidirectional thyristor with a 1.2 V drop. Invented demo data.
func demoLoop(c *CoilModel) LoopModel {
	return LoopModel{C: 2200e-6, V0: 718, R: 0.05, BankR: 0.045, L: 1e-6, CoilL: c.L, CoilR: c.R20, Drop: 1.2, Topology: Unidirectional}
}

// demoInput is the demo rig's 6061 aluminium disc, 110 mm × 3 mm, resting 1.5 mm above the coil face.
func demoInput(nr, nz int) launchInput {
	c, _, _ := demoCoil()
	ro, th := 0.055, 3e-3
	return launchInput{
		coil: c, loop: demoLoop(c), mat: Aluminium6061,
		outerR: ro, thick: th, gap: 1.5e-3,
		mass: Aluminium6061.Density * math.Pi * ro * ro * th,
		nr:   nr, nz: nz, ambient: 293.15,
	}
}

func mustSetup(t testing.TB, in launchInput) *launchSetup {
	t.Helper()
	s, err := newLaunchSetup(in)
	if err != nil {
		t.Fatalf("setup: got error %v, want none", err)
	}
	return s
}

// TestLaunchEnergyBalance checks the energy balance: stored energy = left in the bank + resistive losses
// in the coil loop and every filament + kinetic + potential + impact losses + field energy still in the
// inductances (conservation of energy, the invariant of CHECKS.md), within 0.5 % of the stored energy.
func TestLaunchEnergyBalance(t *testing.T) {
	tests := []struct {
		name     string
		topology string
		at       string
		gap      float64
		v0       float64
	}{
		{"demo disc, unidirectional", Unidirectional, "", 1.5e-3, 718},
		{"demo disc, antiparallel diode", AntiparallelDiode, "", 1.5e-3, 718},
		{"demo disc, crowbar at bank", Crowbar, "bank", 1.5e-3, 718},
		{"demo disc, crowbar at coil", Crowbar, "coil", 1.5e-3, 718},
		{"demo disc at low voltage (lifts late or not at all)", Unidirectional, "", 1.5e-3, 40},
		{"disc 20 mm above the coil", Unidirectional, "", 20e-3, 718},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			in := demoInput(16, 2)
			in.loop.Topology = tc.topology
			in.loop.CrowbarAt = tc.at
			in.gap = tc.gap
			s := mustSetup(t, in)
			r, err := s.run(in.loop.C, tc.v0, launchOptions{})
			if err != nil {
				t.Fatalf("got error %v, want none", err)
			}
			sum := r.Bank + r.LoopLoss + r.RingLoss + r.Kinetic + r.Potential + r.Impact + r.Field
			t.Logf("error %.2g; switch off %.4g s, take-off %.4g s, end %.4g s", math.Abs(sum-r.Stored)/r.Stored, r.SwitchOff, r.TakeOff, r.TEnd)
			t.Logf("stored %.4g J: bank %.4g, loop %.4g, rings %.4g, kinetic %.4g, potential %.4g, impact %.4g, field %.3g; speed %.4g m/s, peak %.4g A, steps %d",
				r.Stored, r.Bank, r.LoopLoss, r.RingLoss, r.Kinetic, r.Potential, r.Impact, r.Field, r.Speed, r.PeakCurrent, r.Steps)
			if e := math.Abs(sum-r.Stored) / r.Stored; e > 0.005 {
				t.Errorf("got energy sum %.6g J, want the stored %.6g J within 0.5 %% (error %.3g)", sum, r.Stored, e)
			}
		})
	}
}

// TestLaunchFarProjectile checks the limit of a projectile far from the coil: the coupling vanishes and the
// coil current must be the closed-form series R-L-C pulse (RLCPulse; Nilsson & Riedel, Electric Circuits,
// ch. 8): peak current and time to peak within 1e-4 relative, for each switch topology.
func TestLaunchFarProjectile(t *testing.T) {
	for _, topo := range []struct{ name, at string }{{Unidirectional, ""}, {AntiparallelDiode, ""}, {Crowbar, "bank"}, {Crowbar, "coil"}} {
		t.Run(topo.name+" "+topo.at, func(t *testing.T) {
			in := demoInput(8, 1)
			in.gap = 100 // m: M ≈ μ0 π a²b²/(2d³) ≈ 1e-14 H against a 40 µH coil
			in.loop.Topology, in.loop.CrowbarAt = topo.name, topo.at
			s := mustSetup(t, in)
			r, err := s.run(in.loop.C, in.loop.V0, launchOptions{})
			if err != nil {
				t.Fatalf("got error %v", err)
			}
			want, err := RLCPulse(in.loop)
			if err != nil {
				t.Fatalf("RLCPulse: %v", err)
			}
			// Tolerance 1e-4 relative (the requirement); the integrator runs at 1e-7 and the peak
			// is located as the zero of i·di/dt on the dense output.
			if !scalar.EqualWithinRel(r.PeakCurrent, want.PeakCurrent, 1e-4) {
				t.Errorf("got peak current %.7g A, want %.7g A", r.PeakCurrent, want.PeakCurrent)
			}
			if !scalar.EqualWithinRel(r.TimeToPeak, want.TimeToPeak, 1e-4) {
				t.Errorf("got time to peak %.7g s, want %.7g s", r.TimeToPeak, want.TimeToPeak)
			}
			if r.TakeOff >= 0 {
				t.Errorf("got take-off at %g s, want none (no coupling)", r.TakeOff)
			}
		})
	}
}

// TestLaunchConvergence checks that twice the filaments (radially and through the thickness) changes the
// take-off speed by less than 2 % (the criterion; convergence under refinement, CHECKS.md).
func TestLaunchConvergence(t *testing.T) {
	in := demoInput(16, 2)
	base := mustSetup(t, in)
	in2 := demoInput(32, 4)
	fine := mustSetup(t, in2)
	r1, err := base.run(in.loop.C, in.loop.V0, launchOptions{})
	if err != nil {
		t.Fatal(err)
	}
	r2, err := fine.run(in.loop.C, in.loop.V0, launchOptions{})
	if err != nil {
		t.Fatal(err)
	}
	d := math.Abs(r2.Speed-r1.Speed) / r2.Speed
	t.Logf("16×2: %.5g m/s, 32×4: %.5g m/s, change %.3g", r1.Speed, r2.Speed, d)
	if d >= 0.02 {
		t.Errorf("got speed %.5g m/s at 16×2 and %.5g m/s at 32×4 (change %.3g), want a change below 2 %%", r1.Speed, r2.Speed, d)
	}
}

// TestMutualDzFiniteDifference checks Maxwell's analytic ∂M/∂d (em.MutualDz) against a central finite
// difference of em.Mutual, and the Hermite table against direct summation.
func TestMutualDzFiniteDifference(t *testing.T) {
	tests := []struct{ a, b, d float64 }{
		{0.03, 0.03, 0.002}, {0.01, 0.05, 0.004}, {0.0586, 0.054, 0.0035}, {0.02, 0.02, 0.3}, {0.05, 0.01, 0.5},
	}
	for _, tc := range tests {
		t.Run(fmt.Sprintf("a %g b %g d %g", tc.a, tc.b, tc.d), func(t *testing.T) {
			// Step: h = 1e-5·d balances truncation (h²M'''/6) and rounding (ε M/h); expect ~1e-8 relative.
			h := 1e-5 * tc.d
			fd := (em.Mutual(tc.a, tc.b, tc.d+h) - em.Mutual(tc.a, tc.b, tc.d-h)) / (2 * h)
			got := em.MutualDz(tc.a, tc.b, tc.d)
			if !scalar.EqualWithinRel(got, fd, 1e-6) {
				t.Errorf("got ∂M/∂d %.10g H/m, want the finite difference %.10g H/m", got, fd)
			}
		})
	}
}

// TestMutualTable measures the interpolation error of the coil↔filament mutual table against direct
// summation of Maxwell's formula between nodes, and checks that its derivative is the derivative of its
// value (so the force and the motional EMF are consistent). Bound: 1e-6 relative to the largest value
// (cubic Hermite error h⁴M””/384 with node spacing 10 % of the distance, DESIGN choice stated in
// mutualTable's comment).
func TestMutualTable(t *testing.T) {
	in := demoInput(16, 2)
	s := mustSetup(t, in)
	n := s.n
	m, d := make([]float64, n), make([]float64, n)
	me, de := make([]float64, n), make([]float64, n)
	var scaleM, scaleD float64
	s.tab.exact(0, me, de)
	for k := 0; k < n; k++ {
		scaleM = math.Max(scaleM, math.Abs(me[k]))
		scaleD = math.Max(scaleD, math.Abs(de[k]))
	}
	var worstM, worstD float64
	for i := 0; i < 60; i++ {
		h := s.tab.a * math.Expm1((float64(i)+0.5)*s.tab.du) // midpoints, where the error is largest
		s.tab.at(h, m, d)
		s.tab.exact(h, me, de)
		for k := 0; k < n; k++ {
			worstM = math.Max(worstM, math.Abs(m[k]-me[k])/scaleM)
			worstD = math.Max(worstD, math.Abs(d[k]-de[k])/scaleD)
		}
	}
	t.Logf("largest interpolation error: M %.2g, dM/dh %.2g (relative to the largest value)", worstM, worstD)
	if worstM > 1e-6 {
		t.Errorf("got M interpolation error %.3g, want ≤ 1e-6", worstM)
	}
	if worstD > 1e-4 { // the derivative of a cubic Hermite is one order less accurate
		t.Errorf("got dM/dh interpolation error %.3g, want ≤ 1e-4", worstD)
	}
	// The derivative returned is the derivative of the interpolant: central difference of the table.
	h0, dh := 0.0123, 1e-7
	mp, mm := make([]float64, n), make([]float64, n)
	s.tab.at(h0+dh, mp, d)
	s.tab.at(h0-dh, mm, d)
	s.tab.at(h0, m, d)
	for k := 0; k < n; k++ {
		fd := (mp[k] - mm[k]) / (2 * dh)
		if !scalar.EqualWithinAbsOrRel(d[k], fd, 1e-6*scaleD, 1e-5) {
			t.Errorf("filament %d: got dM/dh %.8g, want the interpolant's slope %.8g", k, d[k], fd)
		}
	}
}

// TestRingInductance checks the projectile's filament inductance matrix: symmetric, positive definite
// (gonum Cholesky, in ringInductance), reciprocal, and its section-averaged neighbour mutuals converged
// against a finer quadrature (the 4 × 4 rule against 8 × 8 over the half-sections).
func TestRingInductance(t *testing.T) {
	for _, d := range [][2]int{{4, 1}, {16, 2}, {32, 4}, {8, 8}} {
		t.Run(fmt.Sprintf("%d×%d", d[0], d[1]), func(t *testing.T) {
			rings, err := discretise(0.055, 0, 3e-3, d[0], d[1])
			if err != nil {
				t.Fatal(err)
			}
			l, _, err := ringInductance(rings)
			if err != nil {
				t.Fatalf("got error %v, want an SPD matrix", err)
			}
			n := len(rings)
			for i := 0; i < n; i++ {
				for j := 0; j < n; j++ {
					if l[i*n+j] != l[j*n+i] {
						t.Fatalf("got L[%d][%d] = %g ≠ L[%d][%d] = %g, want symmetry", i, j, l[i*n+j], j, i, l[j*n+i])
					}
					if i != j && l[i*n+j] >= math.Sqrt(l[i*n+i]*l[j*n+j]) {
						t.Errorf("got coupling ≥ 1 between filaments %d and %d", i, j)
					}
				}
			}
		})
	}
}

// TestRectGMD checks the closed-form geometric mean distance of rectangular sections: a square's own GMD
// is 0.44705 × its side and a thin strip's is e^{−3/2} = 0.22313 × its width (Maxwell, Treatise §692;
// Grover, Inductance Calculations, 1946, Table 1); em.RectGMD's 0.2235 (b + c) within 0.5 % (Grover);
// between separated rectangles, against a 16-point Gauss–Legendre average of ln|P − Q| (gonum quad nodes);
// and far apart the GMD tends to the centre distance.
func TestRectGMD(t *testing.T) {
	self := func(w, h float64) float64 { p := annulus{R: 1, W: w, T: h}; return math.Exp(sectionLogGMD(p, p)) }
	tests := []struct {
		name      string
		got, want float64
		tol       float64 // relative; reason beside each
	}{
		// Maxwell's square value is quoted to 5 figures.
		{"square, 0.44705 s", self(2e-3, 2e-3), 0.44705 * 2e-3, 2e-5},
		// A strip of aspect 1e-4 differs from the zero-thickness limit by O(1e-4).
		{"thin strip, e^{−3/2} W", self(5e-3, 5e-7), math.Exp(-1.5) * 5e-3, 2e-4},
		{"rectangle 3.4 × 1.5 mm against 0.2235 (b + c)", self(3.4e-3, 1.5e-3), em.RectGMD(3.4e-3, 1.5e-3), 5e-3},
		{"rectangle 6.9 × 0.375 mm against 0.2235 (b + c)", self(6.9e-3, 0.375e-3), em.RectGMD(6.9e-3, 0.375e-3), 5e-3},
	}
	p := annulus{R: 0.02, Z: 0, W: 3e-3, T: 1e-3}
	q := annulus{R: 0.026, Z: 2e-3, W: 2e-3, T: 1.5e-3}
	tests = append(tests, struct {
		name      string
		got, want float64
		tol       float64
	}{"separated rectangles against Gauss–Legendre", sectionLogGMD(p, q), gaussLogMean(p, q), 1e-9}) // smooth integrand: 16 points converge to ~1e-12
	far := annulus{R: 0.5, Z: 0.3, W: 3e-3, T: 1e-3}
	tests = append(tests, struct {
		name      string
		got, want float64
		tol       float64
	}{"far apart: GMD → centre distance", math.Exp(sectionLogGMD(p, far)), math.Hypot(far.R-p.R, far.Z-p.Z), 1e-6}) // correction O((size/D)²) ≈ 1e-5·…
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if !scalar.EqualWithinRel(tc.got, tc.want, tc.tol) {
				t.Errorf("got %.8g, want %.8g (tolerance %g)", tc.got, tc.want, tc.tol)
			}
		})
	}
}

// gaussLogMean averages ln|P − Q| over two separated sections by 16-point Gauss–Legendre in each of the
// four directions (gonum integrate/quad nodes).
func gaussLogMean(p, q annulus) float64 {
	x, w := make([]float64, 16), make([]float64, 16)
	quad.Legendre{}.FixedLocations(x, w, -0.5, 0.5)
	var sum float64
	for i := range x {
		for j := range x {
			for k := range x {
				for l := range x {
					dr := (p.R + x[i]*p.W) - (q.R + x[k]*q.W)
					dz := (p.Z + x[j]*p.T) - (q.Z + x[l]*q.T)
					sum += w[i] * w[j] * w[k] * w[l] * 0.5 * math.Log(dr*dr+dz*dz)
				}
			}
		}
	}
	return sum
}

// TestLaunchMonotonic checks monotonic sanity: more stored energy never lowers the take-off speed, and a
// thicker non-conducting gap never raises it.
func TestLaunchMonotonic(t *testing.T) {
	in := demoInput(12, 1)
	s := mustSetup(t, in)
	prev := -1.0
	for _, v0 := range []float64{100, 200, 400, 600, 718, 800} {
		r, err := s.run(in.loop.C, v0, launchOptions{})
		if err != nil {
			t.Fatal(err)
		}
		if r.Speed < prev {
			t.Errorf("at %g V: got speed %.5g m/s, want ≥ %.5g m/s (the speed at the lower voltage)", v0, r.Speed, prev)
		}
		prev = r.Speed
	}
	prev = math.Inf(1)
	for _, gap := range []float64{0, 0.5e-3, 1.5e-3, 3e-3, 6e-3, 12e-3, 25e-3} {
		g := in
		g.gap = gap
		r, err := mustSetup(t, g).run(in.loop.C, in.loop.V0, launchOptions{})
		if err != nil {
			t.Fatal(err)
		}
		if r.Speed > prev {
			t.Errorf("at gap %g m: got speed %.5g m/s, want ≤ %.5g m/s (the speed at the smaller gap)", gap, r.Speed, prev)
		}
		prev = r.Speed
	}
}

// TestLaunchBounds checks that a run that would need more steps or wall time than allowed ends with a clear
// error wrapping ErrSimulation, promptly.
func TestLaunchBounds(t *testing.T) {
	s := mustSetup(t, demoInput(16, 2))
	tests := []struct {
		name string
		o    launchOptions
		want error
	}{
		{"step limit", launchOptions{maxSteps: 20}, ode.ErrMaxSteps},
		{"wall time", launchOptions{deadline: time.Now().Add(-time.Second)}, ode.ErrDeadline},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, err := s.run(2200e-6, 718, tc.o)
			if !errors.Is(err, ErrSimulation) || !errors.Is(err, tc.want) {
				t.Errorf("got error %v, want %v wrapping %v", err, ErrSimulation, tc.want)
			}
		})
	}
}

// demoAssessment loads a demo rig and attaches the test coil, loop and bank models (the coil and pulse
// stages fill these in a full assessment).
func demoAssessment(t testing.TB, edit func(*schema.Rig)) *Assessment {
	t.Helper()
	data, err := os.ReadFile("../testdata/rigs/disc-thrower.yaml")
	if err != nil {
		t.Fatal(err)
	}
	rig, err := schema.LoadRig("disc-thrower.yaml", data)
	if err != nil {
		t.Fatal(err)
	}
	if edit != nil {
		edit(rig)
	}
	c, _, _ := demoCoil()
	l := demoLoop(c)
	a := &Assessment{Rig: rig, Targets: DefaultTargets()}
	a.m.coil, a.m.loop = c, &l
	a.m.bank = &BankModel{C: l.C, CWorst: 1.2 * l.C, V: l.V0, VWorst: 790}
	return a
}

// TestAssessLaunchDemo runs the launch and field stages on the demo disc thrower and checks that every
// quantity is present, finite, carries a unit, formula and basis, and agrees with the physics it reports.
func TestAssessLaunchDemo(t *testing.T) {
	a := demoAssessment(t, nil)
	if err := assessLaunch(a); err != nil {
		t.Fatalf("assessLaunch: got error %v", err)
	}
	if err := assessField(a); err != nil {
		t.Fatalf("assessField: got error %v", err)
	}
	for _, g := range a.Gaps {
		t.Errorf("got gap %s (%s), want none for the demo rig", g.Field, g.Effect)
	}
	names := []string{"launch.speed", "launch.kinetic_energy", "launch.momentum", "launch.peak_force", "launch.peak_acceleration",
		"launch.peak_current_with_projectile", "launch.efficiency", "projectile.temperature_rise", "projectile.cooldown",
		"launch.height", "launch.time_to_ceiling", "launch.ceiling_impact_speed", "launch.exclusion_radius",
		"field.peak_flux_density", "field.implant_distance"}
	for _, n := range names {
		q, ok := a.Q(n)
		if !ok {
			t.Errorf("got no %s, want it", n)
			continue
		}
		if q.Unit == "" || q.Formula == "" || q.Basis == "" || !(q.Value >= 0) {
			t.Errorf("%s: got unit %q, formula %q, basis %q, value %g; want all set and a non-negative value", n, q.Unit, q.Formula, q.Basis, q.Value)
		}
		if q.Worst != nil && *q.Worst < q.Value && n != "launch.time_to_ceiling" {
			t.Errorf("%s: got worst %g below nominal %g", n, *q.Worst, q.Value)
		}
		t.Logf("%-38s %12.5g %-6s worst %v  (%s)", n, q.Value, q.Unit, fmtWorst(q.Worst), q.Note)
	}
	v, _ := a.Q("launch.speed")
	ke, _ := a.Q("launch.kinetic_energy")
	h, _ := a.Q("launch.height")
	// Identities: E = ½ m v² with the demo disc's mass, h ≥ v²/2g (plus the rise during the push).
	m := Aluminium6061.Density * math.Pi * 0.055 * 0.055 * 3e-3
	if !scalar.EqualWithinRel(ke.Value, 0.5*m*v.Value*v.Value, 1e-12) {
		t.Errorf("got kinetic energy %g J, want ½ m v² = %g J", ke.Value, 0.5*m*v.Value*v.Value)
	}
	if h.Value < v.Value*v.Value/(2*gravity) {
		t.Errorf("got height %g m, want at least v²/2g = %g m", h.Value, v.Value*v.Value/(2*gravity))
	}
	for _, c := range []string{"launch.current", "launch.bank_voltage", "launch.height"} {
		cv, ok := a.Curve(c)
		if !ok || len(cv.X) < 10 || len(cv.X) != len(cv.Y) {
			t.Errorf("curve %s: got %v with %d points, want it sampled", c, ok, len(cv.X))
		}
	}
	if _, ok := a.Q("launch.measured_speed"); ok {
		t.Errorf("got launch.measured_speed without a measured launch height")
	}
}

func fmtWorst(w *float64) string {
	if w == nil {
		return "—"
	}
	return fmt.Sprintf("%.5g", *w)
}

// TestAssessLaunchGaps checks that missing or unmodellable inputs become gaps, never silent defaults.
func TestAssessLaunchGaps(t *testing.T) {
	f := func(v float64) *float64 { return &v }
	tests := []struct {
		name     string
		edit     func(*schema.Rig)
		noModels bool
		gap      string
		computed bool // the launch is still computed (on a worst-case assumption)
	}{
		{"steel projectile", func(r *schema.Rig) { r.Projectile.Material = "steel" }, false, "projectile.material", false},
		{"no material", func(r *schema.Rig) { r.Projectile.Material = "" }, false, "projectile.material", false},
		{"no thickness", func(r *schema.Rig) { r.Projectile.Thickness = nil }, false, "projectile.thickness", false},
		{"no diameter", func(r *schema.Rig) { r.Projectile.OuterDiameter = nil }, false, "projectile.outer_diameter", false},
		{"ring without bore", func(r *schema.Rig) { r.Projectile.Kind = "ring" }, false, "projectile.inner_diameter", false},
		{"no gap: computed lying on the coil", func(r *schema.Rig) { r.Projectile.Gap = nil }, false, "projectile.gap", true},
		{"no ceiling", func(r *schema.Rig) { r.Room.CeilingHeight = nil }, false, "room.ceiling_height", true},
		{"no projectile on a disc thrower", func(r *schema.Rig) { r.Projectile = nil }, false, "projectile", false},
		{"no coil model", nil, true, "coil", false},
		{"unknown alloy with resistivity and density", func(r *schema.Rig) {
			r.Projectile.Material = "other"
			r.Projectile.Resistivity, r.Projectile.Density = f(5e-8), f(2700)
		}, false, "projectile.material", true},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			a := demoAssessment(t, tc.edit)
			if tc.noModels {
				a.m.coil = nil
			}
			if err := assessLaunch(a); err != nil {
				t.Fatalf("got error %v, want a gap", err)
			}
			found := false
			for _, g := range a.Gaps {
				found = found || g.Field == tc.gap
			}
			if !found {
				t.Errorf("got gaps %v, want one for %s", a.Gaps, tc.gap)
			}
			if _, ok := a.Q("launch.speed"); ok != tc.computed {
				t.Errorf("got launch.speed computed %v, want %v", ok, tc.computed)
			}
		})
	}
}

// TestAssessLaunchMeasured checks the speed and energy derived from a measured launch height:
// v = √(2 g h), E = m g h (free flight without drag).
func TestAssessLaunchMeasured(t *testing.T) {
	h := 1.8
	a := demoAssessment(t, func(r *schema.Rig) { r.Measurements.LaunchHeight = &h })
	if err := assessLaunch(a); err != nil {
		t.Fatal(err)
	}
	v, ok1 := a.Q("launch.measured_speed")
	e, ok2 := a.Q("launch.measured_energy")
	m := Aluminium6061.Density * math.Pi * 0.055 * 0.055 * 3e-3
	if !ok1 || !ok2 || !scalar.EqualWithinRel(v.Value, math.Sqrt(2*gravity*h), 1e-14) || !scalar.EqualWithinRel(e.Value, m*gravity*h, 1e-12) {
		t.Errorf("got %v %g m/s, %v %g J; want %g m/s, %g J", ok1, v.Value, ok2, e.Value, math.Sqrt(2*gravity*h), m*gravity*h)
	}
}

// demoRigAssessment loads a demo rig and runs the stages before the launch, so that benchmarks and tests
// use the coil, loop and bank models a full assessment uses.
func demoRigAssessment(tb testing.TB, file string) *Assessment {
	tb.Helper()
	data, err := os.ReadFile("../testdata/rigs/" + file)
	if err != nil {
		tb.Fatal(err)
	}
	rig, err := schema.LoadRig(file, data)
	if err != nil {
		tb.Fatal(err)
	}
	a := &Assessment{Rig: rig, Targets: DefaultTargets()}
	for _, s := range stages {
		if s.name == "launch" {
			break
		}
		if err := s.run(a); err != nil {
			tb.Fatal(err)
		}
	}
	if a.m.coil == nil || a.m.loop == nil {
		tb.Fatalf("%s: the coil and pulse stages left no models", file)
	}
	return a
}

// BenchmarkLaunch times one full simulation of the demo disc thrower with the models of a full assessment:
// the division, the fixed matrices and the mutual table, then one shot with its waveforms recorded.
// Target: ≤ 50 ms per run on the project's 2-core machine.
func BenchmarkLaunch(b *testing.B) {
	a := demoRigAssessment(b, "disc-thrower.yaml")
	ps, ok := readProjectile(a)
	if !ok {
		b.Fatal("demo projectile not readable")
	}
	loop := *a.m.loop
	b.ReportAllocs()
	for b.Loop() {
		s, _, err := setupFor(a, ps, loop, 293.15)
		if err != nil {
			b.Fatal(err)
		}
		if _, err := s.run(loop.C, loop.V0, launchOptions{record: true}); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkLaunchTestCoil is BenchmarkLaunch with the tests' own 28-filament demo coil (demoCoil).
func BenchmarkLaunchTestCoil(b *testing.B) {
	in := demoInput(16, 2)
	b.ReportAllocs()
	for b.Loop() {
		s, err := newLaunchSetup(in)
		if err != nil {
			b.Fatal(err)
		}
		if _, err := s.run(in.loop.C, in.loop.V0, launchOptions{record: true}); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkLaunchAssess times the whole launch stage on the demo rig: setup, the nominal and the worst-case
// shots, the flight and the quantities.
func BenchmarkLaunchAssess(b *testing.B) {
	a0 := demoRigAssessment(b, "disc-thrower.yaml")
	b.ReportAllocs()
	for b.Loop() {
		a := &Assessment{Rig: a0.Rig, Targets: a0.Targets, m: a0.m}
		if err := assessLaunch(a); err != nil {
			b.Fatal(err)
		}
	}
}

// TestAssessDemoRigsLaunch runs the whole assessment on the shipped demo rigs and checks that the launch
// and field quantities appear for the two rigs that throw something, finite and with their bases.
func TestAssessDemoRigsLaunch(t *testing.T) {
	tests := []struct {
		file   string
		launch bool
	}{{"disc-thrower.yaml", true}, {"ring-jumper.yaml", true}, {"flash-bank.yaml", false}}
	for _, tc := range tests {
		t.Run(tc.file, func(t *testing.T) {
			data, err := os.ReadFile("../testdata/rigs/" + tc.file)
			if err != nil {
				t.Fatal(err)
			}
			rig, err := schema.LoadRig(tc.file, data)
			if err != nil {
				t.Fatal(err)
			}
			a, err := Assess(rig, DefaultTargets())
			if err != nil {
				t.Fatalf("got error %v", err)
			}
			for _, n := range []string{"launch.speed", "launch.kinetic_energy", "launch.height", "projectile.temperature_rise", "field.peak_flux_density", "field.implant_distance"} {
				q, ok := a.Q(n)
				if ok != tc.launch && !(ok && strings.HasPrefix(n, "field.")) {
					t.Errorf("%s: got present %v, want %v", n, ok, tc.launch)
				}
				if ok {
					t.Logf("%-30s %10.4g %-5s worst %s", n, q.Value, q.Unit, fmtWorst(q.Worst))
				}
			}
			for _, g := range a.Gaps {
				if strings.HasPrefix(g.Field, "projectile") || g.Field == "room.ceiling_height" {
					t.Logf("gap %s: %s", g.Field, g.Effect)
				}
			}
		})
	}
}

// TestChooseFilaments checks the division rule on the two demo projectiles' shapes.
func TestChooseFilaments(t *testing.T) {
	tests := []struct {
		name                    string
		w, thick, delta         float64
		ring                    bool
		requested, wantR, wantZ int
	}{
		// 55 mm disc, 3 mm thick, δ = 4 mm: layers ≤ δ/2 → 2; 16 annuli (δ-rule gives 14).
		{"disc", 0.055, 3e-3, 4e-3, false, 0, 16, 2},
		// 9 mm × 12 mm ring, δ = 3.43 mm: 7 layers capped at 4 (3 mm), near-square → 3 annuli.
		{"ring", 9e-3, 12e-3, 3.43e-3, true, 0, 3, 4},
		{"requested radial count", 0.055, 3e-3, 4e-3, false, 24, 24, 2},
		{"thin skin: capped at 64 filaments", 0.055, 10e-3, 0.5e-3, false, 0, 16, 4},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			nr, nz := chooseFilaments(tc.w, tc.thick, tc.delta, tc.ring, tc.requested)
			if nr != tc.wantR || nz != tc.wantZ {
				t.Errorf("got %d × %d, want %d × %d", nr, nz, tc.wantR, tc.wantZ)
			}
		})
	}
}

// ringJumperInput builds the launch input of the demo ring jumper through the earlier stages (coil,
// pulse), so that the ring on its solenoid is checked with the models a full assessment uses.
func ringJumperInput(t *testing.T) launchInput {
	t.Helper()
	data, err := os.ReadFile("../testdata/rigs/ring-jumper.yaml")
	if err != nil {
		t.Fatal(err)
	}
	rig, err := schema.LoadRig("ring-jumper.yaml", data)
	if err != nil {
		t.Fatal(err)
	}
	a := &Assessment{Rig: rig, Targets: DefaultTargets()}
	for _, s := range stages {
		if s.name == "launch" {
			break
		}
		if err := s.run(a); err != nil {
			t.Fatal(err)
		}
	}
	if a.m.coil == nil || a.m.loop == nil {
		t.Fatal("ring jumper: the coil and pulse stages left no models")
	}
	ps, ok := readProjectile(a)
	if !ok {
		t.Fatal("ring jumper: projectile not readable")
	}
	return launchInput{coil: a.m.coil, loop: *a.m.loop, mat: ps.mat, outerR: ps.outerR, innerR: ps.innerR,
		thick: ps.thick, gap: ps.gap, mass: ps.mass, nr: 3, nz: 4, ambient: 293.15}
}

// TestLaunchRingJumper checks the ring on a solenoid with a crowbar at the bank: energy balance within
// 0.5 % and twice the filaments (from the 3 × 4 that chooseFilaments picks) changing the speed by less
// than 2 %.
func TestLaunchRingJumper(t *testing.T) {
	in := ringJumperInput(t)
	r1, err := mustSetup(t, in).run(in.loop.C, in.loop.V0, launchOptions{})
	if err != nil {
		t.Fatal(err)
	}
	sum := r1.Bank + r1.LoopLoss + r1.RingLoss + r1.Kinetic + r1.Potential + r1.Impact + r1.Field
	if e := math.Abs(sum-r1.Stored) / r1.Stored; e > 0.005 {
		t.Errorf("got energy sum %.6g J, want the stored %.6g J within 0.5 %% (error %.3g)", sum, r1.Stored, e)
	}
	in.nr, in.nz = 6, 8
	r2, err := mustSetup(t, in).run(in.loop.C, in.loop.V0, launchOptions{})
	if err != nil {
		t.Fatal(err)
	}
	d := math.Abs(r2.Speed-r1.Speed) / r2.Speed
	t.Logf("ring: 3×4 %.5g m/s, 6×8 %.5g m/s (change %.3g); energy error %.2g", r1.Speed, r2.Speed, d, math.Abs(sum-r1.Stored)/r1.Stored)
	if d >= 0.02 {
		t.Errorf("got %.5g m/s at 3×4 and %.5g m/s at 6×8 (change %.3g), want below 2 %%", r1.Speed, r2.Speed, d)
	}
}

// TestRandomLaunchProperties is a property test over generated launch rigs (internal/riggen; random test
// inputs, not expected values): every rig assesses without error in bounded time, every launch quantity is
// finite, the efficiency lies in [0, 1), the height is at least v²/2g, the kinetic energy is ½ m v², the
// worst case is never below the nominal speed, and the shot's energy balances within 0.5 %.
func TestRandomLaunchProperties(t *testing.T) {
	rng := rand.New(rand.NewSource(11))
	n := 40
	if testing.Short() {
		n = 8
	}
	var flew int
	var slowest time.Duration
	var worstBalance float64
	for i := range n {
		src := riggen.Rig(rng, riggen.Options{Launch: true})
		rig, err := schema.LoadRig(fmt.Sprintf("gen-%d.yaml", i), []byte(src))
		if err != nil {
			t.Fatalf("rig %d: generator made an invalid rig: %v", i, err)
		}
		start := time.Now()
		a, err := Assess(rig, DefaultTargets())
		d := time.Since(start)
		slowest = max(slowest, d)
		if err != nil {
			if strings.HasPrefix(err.Error(), "launch:") || strings.HasPrefix(err.Error(), "field:") {
				t.Errorf("rig %d: got error %v\n%s", i, err, src)
			} else {
				t.Logf("rig %d: an earlier stage refused it: %v", i, err)
			}
			continue
		}
		if d > 2*time.Second && !raceDetector {
			t.Errorf("rig %d: got %v for the assessment, want under 2 s", i, d)
		}
		v, ok := a.Q("launch.speed")
		if !ok {
			continue
		}
		if v.Value > 0 {
			flew++
		}
		eff, _ := a.Q("launch.efficiency")
		h, _ := a.Q("launch.height")
		ke, _ := a.Q("launch.kinetic_energy")
		mom, _ := a.Q("launch.momentum")
		if !(eff.Value >= 0 && eff.Value < 1) {
			t.Errorf("rig %d: got efficiency %g, want in [0, 1)", i, eff.Value)
		}
		if h.Value < v.Value*v.Value/(2*gravity)*(1-1e-12) {
			t.Errorf("rig %d: got height %g m below v²/2g = %g m", i, h.Value, v.Value*v.Value/(2*gravity))
		}
		// ½ m v² = ½ p v (identity; m from the momentum).
		if !scalar.EqualWithinAbsOrRel(ke.Value, 0.5*mom.Value*v.Value, 1e-12, 1e-12) {
			t.Errorf("rig %d: got kinetic energy %g J, want ½ p v = %g J", i, ke.Value, 0.5*mom.Value*v.Value)
		}
		if v.Worst != nil && *v.Worst < v.Value*(1-1e-9) {
			t.Errorf("rig %d: got worst speed %g below nominal %g", i, *v.Worst, v.Value)
		}
		// Energy balance of the same shot, rebuilt from the assessment's models (conservation of energy).
		ps, _ := readProjectile(a)
		s, _, err := setupFor(a, ps, *a.m.loop, 293.15)
		if err != nil {
			t.Fatalf("rig %d: setup: %v", i, err)
		}
		r, err := s.run(a.m.loop.C, a.m.loop.V0, launchOptions{})
		if err != nil {
			t.Fatalf("rig %d: run: %v", i, err)
		}
		sum := r.Bank + r.LoopLoss + r.RingLoss + r.Kinetic + r.Potential + r.Impact + r.Field
		if e := math.Abs(sum-r.Stored) / r.Stored; e > 0.005 {
			t.Errorf("rig %d (%s): got energy sum %.6g J against %.6g J stored (error %.3g), want within 0.5 %%", i, a.m.loop.Topology, sum, r.Stored, e)
		}
		worstBalance = math.Max(worstBalance, math.Abs(sum-r.Stored)/r.Stored)
	}
	t.Logf("%d rigs, %d launched, slowest assessment %v, largest energy-balance error %.2g", n, flew, slowest, worstBalance)
	if flew == 0 {
		t.Errorf("got no rig that launched, want some (the generator changed?)")
	}
}

// TestAssessLaunchTimeout checks that a rig that would need more wall time than the policy allows ends the
// assessment with a clear error (wrapping ErrSimulation and ode.ErrDeadline), not a hang.
func TestAssessLaunchTimeout(t *testing.T) {
	a := demoAssessment(t, nil)
	a.Targets.SimulationTimeout = 1e-9 // s: already past when the run starts
	start := time.Now()
	err := assessLaunch(a)
	if !errors.Is(err, ErrSimulation) || !errors.Is(err, ode.ErrDeadline) {
		t.Errorf("got error %v, want one wrapping %v and %v", err, ErrSimulation, ode.ErrDeadline)
	}
	if d := time.Since(start); d > time.Second {
		t.Errorf("got %v before the error, want it promptly", d)
	}
}

// TestAssessLaunchAxis checks the exclusion radius for the launch axes: a vertical launch at the stated
// tilt, a horizontal one at the longest (45°) range v²/g, both plus the projectile's radius (projectile
// motion without drag, v² sin 2θ / g; the ceiling is removed so that the free-flight range applies).
func TestAssessLaunchAxis(t *testing.T) {
	tilt := 10 * math.Pi / 180
	tests := []struct {
		name  string
		edit  func(*schema.Rig)
		theta float64
	}{
		{"vertical, stated tilt", func(r *schema.Rig) { r.Room.Tilt = &tilt; r.Room.CeilingHeight = nil }, tilt},
		{"horizontal axis", func(r *schema.Rig) { r.Room.LaunchAxis = "horizontal"; r.Room.CeilingHeight = nil }, math.Pi / 4},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			a := demoAssessment(t, tc.edit)
			if err := assessLaunch(a); err != nil {
				t.Fatal(err)
			}
			v, _ := a.Q("launch.speed")
			ex, ok := a.Q("launch.exclusion_radius")
			want := v.Value*v.Value*math.Sin(2*tc.theta)/gravity + 0.055
			if !ok || !scalar.EqualWithinRel(ex.Value, want, 1e-12) {
				t.Errorf("got %v %g m, want %g m", ok, ex.Value, want)
			}
		})
	}
}

// TestLaunchWorstTakesResistivitySpread: for a projectile whose material spreads in resistivity (6061:
// about ±10 % with temper, from memory), the worst case also shoots the worst bank at the low end of the
// spread, which carries the larger eddy currents. Identity of the model: the worst speed is the larger of
// the worst speed at the table's ρ and the worst speed of the same rig with 0.9·ρ stated (a stated
// resistivity carries no spread), and never below the worst at the table's ρ alone.
func TestLaunchWorstTakesResistivitySpread(t *testing.T) {
	speed := func(rho *float64) float64 {
		rig, _ := pcLoadDemo(t, "disc-thrower")
		rig.Projectile.Resistivity = rho
		a, err := Assess(rig, DefaultTargets())
		if err != nil {
			t.Fatal(err)
		}
		q, ok := a.Q("launch.speed")
		if !ok || q.Worst == nil {
			t.Fatalf("got no worst launch.speed, want one")
		}
		return *q.Worst
	}
	rho := Aluminium6061.Resistivity20
	low := rho * (1 - Aluminium6061.ResistivitySpread)
	withSpread, atTable, atLow := speed(nil), speed(&rho), speed(&low)
	if withSpread < atTable {
		t.Errorf("got worst speed %g m/s with the spread, want at least %g m/s (table ρ alone)", withSpread, atTable)
	}
	// The same simulations run in both cases; only float rounding of the setup can differ.
	if want := math.Max(atTable, atLow); !scalar.EqualWithinRel(withSpread, want, 1e-9) {
		t.Errorf("got worst speed %g m/s, want max(%g, %g) = %g m/s", withSpread, atTable, atLow, want)
	}
	if !(atLow > atTable) {
		t.Errorf("got %g m/s at 0.9ρ and %g m/s at ρ, want the lower resistivity faster", atLow, atTable)
	}
}
