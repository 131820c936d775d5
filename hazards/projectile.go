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

// gauss4 holds the 4-point Gauss–Legendre nodes and weights on [−½, ½] (Abramowitz & Stegun, Table 25.4).
var gauss4 = [4][2]float64{
	{-0.4305681557970263, 0.1739274225687269},
	{-0.1699905217924281, 0.3260725774312731},
	{0.1699905217924281, 0.3260725774312731},
	{0.4305681557970263, 0.1739274225687269},
}

// nearFactor: filaments whose centres are closer than nearFactor × the larger section side are
// "neighbours" and their mutual is averaged over both sections; farther ones use Maxwell's formula at
// the centres, whose error is of order (side/distance)²/24 ≤ 0.7 % there and falls quickly beyond.
const nearFactor = 2.5

// sectionMutual returns the mutual inductance, H, of two coaxial rectangular-section rings carrying uniform
// current density: Maxwell's coaxial-circle formula averaged over both sections by a 4 × 4 Gauss–Legendre
// rule in each. This is the mean over the sections that the geometric-mean-distance method of Maxwell
// (Treatise §691–693) approximates by one logarithm; averaging the full formula instead keeps the curvature
// terms. The integrand has only a logarithmic singularity on a shared edge, which the rule integrates to
// about 0.1 % (see TestSectionMutual).
func sectionMutual(p, q annulus) float64 {
	var sum float64
	for _, a := range gauss4 {
		for _, b := range gauss4 {
			r1, z1, w1 := p.R+a[0]*p.W, p.Z+b[0]*p.T, a[1]*b[1]
			for _, c := range gauss4 {
				for _, d := range gauss4 {
					r2, z2 := q.R+c[0]*q.W, q.Z+d[0]*q.T
					sum += w1 * c[1] * d[1] * em.Mutual(r1, r2, z1-z2)
				}
			}
		}
	}
	return sum
}

// ringSelf returns the self-inductance, H, of a rectangular-section ring by the GMD form
// L = μ0 R [ln(8R/g) − 2], g = 0.2235 (W + T) (Grover, Inductance Calculations, 1946, ch. 13 and Table 1).
func ringSelf(p annulus) float64 { return em.LoopSelfGMD(p.R, em.RectGMD(p.W, p.T)) }

// ringInductance returns the fixed inductance matrix of the projectile's filaments, H (row-major, n × n),
// and checks that it is symmetric positive definite by a Cholesky factorisation (gonum mat).
func ringInductance(rings []annulus) ([]float64, *mat.Cholesky, error) {
	n := len(rings)
	l := make([]float64, n*n)
	for i, p := range rings {
		l[i*n+i] = ringSelf(p)
		for j := i + 1; j < n; j++ {
			q := rings[j]
			dist := math.Hypot(p.R-q.R, p.Z-q.Z)
			var m float64
			if dist < nearFactor*math.Max(math.Max(p.W, p.T), math.Max(q.W, q.T)) {
				m = sectionMutual(p, q)
			} else {
				m = em.Mutual(p.R, q.R, p.Z-q.Z)
			}
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
// the simulation conserves energy exactly in the limit of small steps. The interpolation error of a cubic
// Hermite is h⁴ max|M””|/384 per interval; with Δu = 0.1 it is below 1e-6 relative (TestMutualTable).
type mutualTable struct {
	coil  []Filament
	rings []annulus
	base  float64 // height of the projectile's underside above the coil face at rest (the gap), m
	a, du float64
	nodes [][]float64 // node i: M_k then dM_k/dh (2n values); nil until computed
}

// tableDu is the node spacing in u = ln(1 + h/a).
const tableDu = 0.1

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
