package hazards

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"

	"chargeward/hazards/em"
)

// annulus is one annular current filament of the projectile: a shorted turn of rectangular section,
// radial width W by axial thickness T, centred at mean radius R and at height Z above the projectile's
// underside. All in metres.
type annulus struct {
	R, Z, W, T float64
}

// ErrGeometry is returned (wrapped) for a projectile or coil geometry the filament model cannot represent.
var ErrGeometry = errors.New("geometry cannot be modelled")

// discretise divides a disc (inner radius ri = 0) or ring (ri > 0) of outer radius ro and thickness thick
// (m) into nr equal-width annuli radially and nz equal layers axially.
//
// For a solid disc the central element, radius ro/nr, is left out of the circuit: in a field that is
// nearly uniform across it the induced current density grows with radius (J ∝ r), so the central element
// carries a share of the induced current of order (1/nr)² and of the coupled energy of order (1/nr)⁴, and
// the thin-ring inductance formula does not hold for a section as wide as its own mean radius. The
// projectile's mass is taken from the whole geometry elsewhere. The convergence test (twice the filaments)
// bounds the effect.
func discretise(ro, ri, thick float64, nr, nz int) ([]annulus, error) {
	if !(ro > 0 && ri >= 0 && ri < ro && thick > 0) || !finite(ro, ri, thick) {
		return nil, fmt.Errorf("%w: projectile outer radius %g m, inner radius %g m, thickness %g m", ErrGeometry, ro, ri, thick)
	}
	if nr < 1 || nz < 1 || nr*nz > maxRings {
		return nil, fmt.Errorf("%w: %d × %d filaments (at most %d)", ErrGeometry, nr, nz, maxRings)
	}
	w := (ro - ri) / float64(nr)
	t := thick / float64(nz)
	first := 0
	if ri == 0 {
		first = 1
		if nr == 1 {
			return nil, fmt.Errorf("%w: a solid disc needs at least 2 radial filaments", ErrGeometry)
		}
	}
	rings := make([]annulus, 0, (nr-first)*nz)
	for iz := 0; iz < nz; iz++ {
		for ir := first; ir < nr; ir++ {
			rings = append(rings, annulus{R: ri + (float64(ir)+0.5)*w, Z: (float64(iz) + 0.5) * t, W: w, T: t})
		}
	}
	return rings, nil
}

// maxRings bounds the number of projectile filaments (the model's cost grows with its square).
const maxRings = 256

// nearFactor: pairs of filaments whose centres are closer than nearFactor × the larger section side get
// the geometric-mean-distance correction of their mutual inductance; beyond it the correction is below
// about 1e-4 of the logarithm and the centre-filament formula stands alone.
const nearFactor = 10

// rectLogPhi is a fourth antiderivative of ln(X² + Y²): ∂²/∂X² ∂²/∂Y² Φ = ln(X² + Y²), with
//
//	Φ = (X²Y²/4 − X⁴/24 − Y⁴/24) ln(X² + Y²) + (X³Y/3) atan(Y/X) + (XY³/3) atan(X/Y) − 25X²Y²/24
//
// (the function behind Maxwell's GMD of a rectangle, Treatise §692; verified symbolically when written,
// and in TestRectGMD against Maxwell's square and strip values). Φ(0, ·) and Φ(·, 0) take their limits.
func rectLogPhi(x, y float64) float64 {
	x, y = math.Abs(x), math.Abs(y)
	x2, y2 := x*x, y*y
	var v float64
	if r2 := x2 + y2; r2 > 0 {
		v = (x2*y2/4 - x2*x2/24 - y2*y2/24) * math.Log(r2)
	}
	if x > 0 && y > 0 {
		v += x*x2*y/3*math.Atan(y/x) + x*y*y2/3*math.Atan(x/y)
	}
	return v - 25*x2*y2/24
}

// sectionLogGMD returns ln g, g the geometric mean distance (m) between the rectangular sections of p and q
// in the meridian (r, z) plane: ln g = (1/(A_p A_q)) ∫∫ ln|P − Q| dA_P dA_Q, in closed form as the signed
// sum of Φ/2 over the 16 corner differences (Maxwell, Treatise §691–692; Grover, Inductance Calculations,
// 1946, ch. 2). Exact for the plane sections; p = q gives the section's own GMD.
func sectionLogGMD(p, q annulus) float64 {
	xs := [2]float64{p.R - p.W/2, p.R + p.W/2}
	us := [2]float64{q.R - q.W/2, q.R + q.W/2}
	ys := [2]float64{p.Z - p.T/2, p.Z + p.T/2}
	vs := [2]float64{q.Z - q.T/2, q.Z + q.T/2}
	// ∫∫ f(u − x) du dx over [x1,x2]×[u1,u2] = F(u2−x1) − F(u2−x2) − F(u1−x1) + F(u1−x2) for F'' = f:
	// the sign is + where the indices differ, in each of the two directions.
	var sum float64
	for i, u := range us {
		for j, x := range xs {
			sx := -1.0
			if i != j {
				sx = 1
			}
			for k, v := range vs {
				for l, y := range ys {
					sy := -1.0
					if k != l {
						sy = 1
					}
					sum += sx * sy * rectLogPhi(u-x, v-y)
				}
			}
		}
	}
	return sum / 2 / (p.W * p.T * q.W * q.T)
}

// ringSelf returns the self-inductance, H, of a rectangular-section ring by the GMD form
// L = μ0 R [ln(8R/g) − 2] with g the section's exact GMD (Grover, Inductance Calculations, 1946, ch. 13;
// em.RectGMD's 0.2235 (W + T) approximates the same g within 0.5 %).
func ringSelf(p annulus) float64 { return em.LoopSelfGMD(p.R, math.Exp(sectionLogGMD(p, p))) }

// ringMutual returns the mutual inductance, H, of two coaxial rectangular-section rings: Maxwell's formula
// for filaments at the section centres, corrected for the finite sections by the GMD method,
//
//	M = M_Maxwell(R_p, R_q, Z_p − Z_q) + μ0 √(R_p R_q) ln(ρ/g),
//
// where ρ is the centres' distance in the meridian plane and g the sections' GMD. For neighbours M ≈
// μ0 √(R_p R_q) [ln(8√(R_p R_q)/ρ) − 2] (Maxwell's close-circle limit, Grover ch. 13), so the correction
// replaces the centre distance by the GMD, consistently with the self-inductance; for distant pairs ρ/g → 1.
func ringMutual(p, q annulus) float64 {
	m := em.Mutual(p.R, q.R, p.Z-q.Z)
	rho := math.Hypot(p.R-q.R, p.Z-q.Z)
	if rho < nearFactor*math.Max(math.Max(p.W, p.T), math.Max(q.W, q.T)) {
		m += em.Mu0 * math.Sqrt(p.R*q.R) * (math.Log(rho) - sectionLogGMD(p, q))
	}
	return m
}

// ringInductance returns the fixed inductance matrix of the projectile's filaments, H (row-major, n × n),
// and checks that it is symmetric positive definite by a Cholesky factorisation (gonum mat).
func ringInductance(rings []annulus) ([]float64, *mat.Cholesky, error) {
	n := len(rings)
	l := make([]float64, n*n)
	for i, p := range rings {
		l[i*n+i] = ringSelf(p)
		for j := i + 1; j < n; j++ {
			m := ringMutual(p, rings[j])
			l[i*n+j], l[j*n+i] = m, m
		}
	}
	for i, v := range l {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, nil, fmt.Errorf("%w: projectile filament inductance entry %d is not finite (section too wide for its radius)", ErrGeometry, i)
		}
	}
	var ch mat.Cholesky
	if !ch.Factorize(mat.NewSymDense(n, append([]float64(nil), l...))) {
		return nil, nil, fmt.Errorf("%w: projectile inductance matrix is not positive definite", ErrGeometry)
	}
	return l, &ch, nil
}

// mutualTable gives the mutual inductances M_k(h) between the whole coil (all its filaments in series) and
// each projectile filament k, and their derivatives dM_k/dh, as the projectile rises a height h above its
// rest position. Nodes are spaced geometrically, h_i = a (e^{i Δu} − 1), so that the node spacing stays a
// fixed fraction Δu of the distance to the coil; nodes are computed on first use (a run only visits the few
// centimetres the projectile rises while the current flows). Between nodes M is the cubic Hermite
// interpolant of the exact values and derivatives (Maxwell's formula and its analytic derivative), and
// dM/dh is that interpolant's derivative, so that the force and the motional EMF come from one function and
// the simulation conserves energy exactly in the limit of small steps. Nodes are filled in lazily, so a
// table (and the launchSetup holding it) is not safe for concurrent use. The interpolation error of a cubic
// Hermite is h⁴ max|M””|/384 per interval; with Δu = 0.08 it is below 1e-6 of the largest value (TestMutualTable).
type mutualTable struct {
	coil  []Filament
	rings []annulus
	base  float64 // height of the projectile's underside above the coil face at rest (the gap), m
	a, du float64
	nodes [][]float64 // node i: M_k then dM_k/dh (2n values); nil until computed
}

// tableDu is the node spacing in u = ln(1 + h/a).
const tableDu = 0.08

// tableMaxNodes bounds the table (h up to a·e^{60} is far beyond any flight in the model).
const tableMaxNodes = 600

func newMutualTable(coil []Filament, rings []annulus, gap float64) *mutualTable {
	// a: the smallest axial distance between a coil filament and a projectile filament at rest.
	a := math.Inf(1)
	for _, c := range coil {
		for _, r := range rings {
			a = math.Min(a, gap+r.Z-c.Z)
		}
	}
	return &mutualTable{coil: coil, rings: rings, base: gap, a: a, du: tableDu, nodes: make([][]float64, 0, 64)}
}

// nodeH returns the height of node i.
func (t *mutualTable) nodeH(i int) float64 { return t.a * math.Expm1(float64(i)*t.du) }

// node returns the exact values at node i, computing them on first use.
func (t *mutualTable) node(i int) []float64 {
	for len(t.nodes) <= i {
		t.nodes = append(t.nodes, nil)
	}
	if t.nodes[i] == nil {
		n := len(t.rings)
		v := make([]float64, 2*n)
		t.exact(t.nodeH(i), v[:n], v[n:])
		t.nodes[i] = v
	}
	return t.nodes[i]
}

// exact writes M_k(h) and dM_k/dh by direct summation of Maxwell's formula over the coil filaments.
func (t *mutualTable) exact(h float64, m, d []float64) {
	for k, r := range t.rings {
		var sm, sd float64
		z := t.base + h + r.Z
		for _, c := range t.coil {
			sm += c.Turns * em.Mutual(c.R, r.R, z-c.Z)
			sd += c.Turns * em.MutualDz(c.R, r.R, z-c.Z)
		}
		m[k], d[k] = sm, sd
	}
}

// at writes the interpolated M_k(h) and dM_k/dh into m and d. h below zero is read as zero (the
// projectile cannot sink into the coil).
func (t *mutualTable) at(h float64, m, d []float64) {
	if !(h > 0) {
		h = 0
	}
	u := math.Log1p(h/t.a) / t.du
	i := int(u)
	if i >= tableMaxNodes-1 {
		t.exact(h, m, d)
		return
	}
	h0, h1 := t.nodeH(i), t.nodeH(i+1)
	p, q := t.node(i), t.node(i+1)
	n := len(t.rings)
	dh := h1 - h0
	s := (h - h0) / dh
	s2, s3 := s*s, s*s*s
	// Cubic Hermite basis and its derivative (with respect to s).
	h00, h10, h01, h11 := 2*s3-3*s2+1, s3-2*s2+s, -2*s3+3*s2, s3-s2
	g00, g10, g01, g11 := 6*s2-6*s, 3*s2-4*s+1, -6*s2+6*s, 3*s2-2*s
	for k := 0; k < n; k++ {
		m0, m1, d0, d1 := p[k], q[k], p[n+k], q[n+k]
		m[k] = h00*m0 + h10*dh*d0 + h01*m1 + h11*dh*d1
		d[k] = (g00*m0+g01*m1)/dh + g10*d0 + g11*d1
	}
}
