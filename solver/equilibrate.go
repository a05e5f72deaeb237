package solver

import (
	"fmt"
	"math"
)

// EquilibrationSettings controls EquilibrateSymmetricTo. A nil pointer, or a
// zero field, selects the documented default.
type EquilibrationSettings struct {
	// MaxIterations bounds the number of scaling sweeps (default 30).
	MaxIterations int
	// Tolerance is the accepted deviation of every row and column maximum
	// of D A D from one (default 1e-2; each sweep halves the exponent of the
	// deviation, so tighter tolerances are cheap but rarely useful).
	Tolerance float64
}

// EquilibrationResult reports what EquilibrateSymmetricTo achieved.
type EquilibrationResult struct {
	// Iterations is the number of sweeps performed.
	Iterations int
	// Deviation is max_i |1 - m_i|, where m_i is the largest magnitude in
	// row i and column i of D A D after the last sweep.
	Deviation float64
}

// EquilibrateSymmetricTo computes a positive diagonal scaling d such that
// every row and every column of D A D (D = diag(d)) has largest magnitude
// close to one, and writes it into d. Being the same on both sides, the
// scaling keeps a symmetric matrix symmetric. To solve A x = b with it, solve
// (D A D) y = D b and set x = D y.
//
// The iteration is the symmetric form of Ruiz's scaling (D. Ruiz, "A
// scaling algorithm to equilibrate both rows and columns norms in matrices",
// RAL-TR-2001-034): d_i ← d_i / sqrt(m_i) with m_i the largest magnitude in
// row i and column i of the current D A D. For a symmetric matrix the
// deviation from one shrinks at least geometrically.
//
// EquilibrateSymmetricTo returns an error if a is not square, if a row and
// its column are both empty or zero (the matrix is then singular), or if a
// value is not finite. It panics if len(d) is not the order of a.
func EquilibrateSymmetricTo(d []float64, a *CSR, s *EquilibrationSettings) (EquilibrationResult, error) {
	n, c := a.Dims()
	if n != c {
		return EquilibrationResult{}, notSquare(n, c)
	}
	if len(d) != n {
		panic(fmt.Sprintf("solver: EquilibrateSymmetricTo: len(d) = %d, matrix order %d", len(d), n))
	}
	maxIter, tol := 30, 1e-2
	if s != nil {
		if s.MaxIterations > 0 {
			maxIter = s.MaxIterations
		}
		if s.Tolerance > 0 {
			tol = s.Tolerance
		}
	}
	for i := 0; i < n; i++ {
		for p := a.rowPtr[i]; p < a.rowPtr[i+1]; p++ {
			if v := a.val[p]; math.IsNaN(v) || math.IsInf(v, 0) {
				return EquilibrationResult{}, fmt.Errorf("solver: non-finite value %v at (%d, %d)", v, i, a.colIdx[p])
			}
		}
	}
	return ruiz(d, a, maxIter, tol, true)
}

// symmetricScaling computes the scaling of EquilibrateSymmetricTo with the
// given limits, leaving d_i = 1 for an empty or zero row and column (the
// factorisation then reports the singularity with its pivot step).
func symmetricScaling(d []float64, a *CSR, maxIter int, tol float64) {
	_, _ = ruiz(d, a, maxIter, tol, false)
}

// ruiz runs the symmetric Ruiz iteration from d = 1. With strict set a zero
// row and column is an error; otherwise it is left unscaled.
func ruiz(d []float64, a *CSR, maxIter int, tol float64, strict bool) (EquilibrationResult, error) {
	var res EquilibrationResult
	for i := range d {
		d[i] = 1
	}
	m := make([]float64, len(d))
	for {
		symmetricMaxTo(m, d, a)
		res.Deviation = 0
		for i, mi := range m {
			if mi == 0 {
				if strict {
					return res, fmt.Errorf("solver: row and column %d are zero; the matrix is singular", i)
				}
				m[i] = 1
			}
			res.Deviation = math.Max(res.Deviation, math.Abs(1-m[i]))
		}
		if res.Deviation <= tol || res.Iterations == maxIter {
			return res, nil
		}
		for i, mi := range m {
			d[i] /= math.Sqrt(mi)
		}
		res.Iterations++
	}
}

// symmetricMaxTo sets m[i] to the largest magnitude in row i and column i
// of diag(d) A diag(d).
func symmetricMaxTo(m, d []float64, a *CSR) {
	for i := range m {
		m[i] = 0
	}
	for i := 0; i < a.rows; i++ {
		for p := a.rowPtr[i]; p < a.rowPtr[i+1]; p++ {
			j := a.colIdx[p]
			v := math.Abs(d[i] * a.val[p] * d[j])
			m[i] = math.Max(m[i], v)
			m[j] = math.Max(m[j], v)
		}
	}
}
