package em

import (
	"errors"
	"fmt"
	"math"
)

// metresPerInch converts Wheeler's inch formulas: L[µH] = f(a, b, c in inches) with f homogeneous of
// degree 1 in length, so L[H] = 1e-6 · f(a, b, c in metres) / 0.0254.
const metresPerInch = 0.0254

// WheelerSolenoid returns the inductance, H, of a single-layer solenoid of mean radius a (m), winding length
// b (m) and n turns, by Wheeler's formula
//
//	L[µH] = a² n² / (9a + 10b),  a and b in inches
//
// (H. A. Wheeler, "Simple inductance formulas for radio coils", Proc. IRE 16(10), 1275–1285, 1928). It
// approximates the current-sheet inductance within about 1 % for b > 0.8a. NaN unless a, b, n > 0.
func WheelerSolenoid(a, b, n float64) float64 {
	if !(a > 0 && b > 0 && n > 0) {
		return math.NaN()
	}
	return 1e-6 / metresPerInch * a * a * n * n / (9*a + 10*b)
}

// WheelerSpiral returns the inductance, H, of a flat spiral (pancake) of mean radius a (m), radial depth of
// winding c (m) and n turns, by Wheeler's formula
//
//	L[µH] = a² n² / (8a + 11c),  a and c in inches
//
// (Wheeler, Proc. IRE 16(10), 1928). About 5 % accurate for c > 0.2a. NaN unless a, c, n > 0.
func WheelerSpiral(a, c, n float64) float64 {
	if !(a > 0 && c > 0 && n > 0) {
		return math.NaN()
	}
	return 1e-6 / metresPerInch * a * a * n * n / (8*a + 11*c)
}

// WheelerMultilayer returns the inductance, H, of a multi-layer solenoid of mean radius a (m), winding
// length b (m), radial depth c (m) and n turns, by Wheeler's formula
//
//	L[µH] = 0.8 a² n² / (6a + 9b + 10c),  a, b, c in inches
//
// (Wheeler, Proc. IRE 16(10), 1928), about 1 % when the three terms of the denominator are nearly equal
// (accuracy statement from memory). NaN unless a, b, c, n > 0.
func WheelerMultilayer(a, b, c, n float64) float64 {
	if !(a > 0 && b > 0 && c > 0 && n > 0) {
		return math.NaN()
	}
	return 0.8e-6 / metresPerInch * a * a * n * n / (6*a + 9*b + 10*c)
}

// RoundWireGMD returns the geometric mean distance of a round wire's section from itself, r e^(−1/4), m
// (Maxwell 1891, §692).
func RoundWireGMD(r float64) float64 { return r * math.Exp(-0.25) }

// ErrGeometry is returned (wrapped) for filaments whose inductance cannot be computed.
var ErrGeometry = errors.New("filament geometry cannot be evaluated")

// InductanceMatrix returns the n × n inductance matrix, H, of coaxial circular filaments of radii r (m) at
// axial positions z (m), each carrying turns[i] turns (nil: one each) of a conductor whose section has the
// geometric mean distance gmd (m) from itself, stored row-major:
//
//	M_ii = N_i² LoopSelfGMD(r_i, gmd),  M_ij = N_i N_j Mutual(r_i, r_j, |z_i − z_j|)
//
// (Maxwell's GMD method and his coaxial-circle mutual inductance; Grover 1946, ch. 13). Filaments that
// coincide, or radii that are not positive and finite, are an error.
func InductanceMatrix(r, z, turns []float64, gmd float64) ([]float64, error) {
	n := len(r)
	if len(z) != n || (turns != nil && len(turns) != n) || n == 0 {
		return nil, fmt.Errorf("%w: %d radii, %d positions, %d turn counts", ErrGeometry, n, len(z), len(turns))
	}
	m := make([]float64, n*n)
	w := func(i int) float64 {
		if turns == nil {
			return 1
		}
		return turns[i]
	}
	for i := 0; i < n; i++ {
		self := w(i) * w(i) * LoopSelfGMD(r[i], gmd)
		if math.IsNaN(self) || math.IsInf(self, 0) {
			return nil, fmt.Errorf("%w: filament %d (radius %g m, GMD %g m)", ErrGeometry, i, r[i], gmd)
		}
		m[i*n+i] = self
		for j := i + 1; j < n; j++ {
			v := w(i) * w(j) * Mutual(r[i], r[j], math.Abs(z[i]-z[j]))
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, fmt.Errorf("%w: filaments %d and %d coincide or are invalid", ErrGeometry, i, j)
			}
			m[i*n+j], m[j*n+i] = v, v
		}
	}
	return m, nil
}

// SeriesInductance returns Σ_ij M_ij, H: the inductance of the filaments connected in series, all carrying
// the same current, from the row-major matrix m.
func SeriesInductance(m []float64) float64 {
	var s float64
	for _, v := range m {
		s += v
	}
	return s
}
