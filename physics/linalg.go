package physics

import "math"

// luFactor overwrites the n×n row-major matrix a with its LU factors by
// Gaussian elimination with partial pivoting (Golub & Van Loan, Matrix
// Computations, 4th ed., alg. 3.4.1) and records the row interchanges in
// piv. It reports false if a pivot is exactly zero. It is meant for the
// small systems of pointwise solves and does not allocate.
func luFactor(a []float64, n int, piv []int) bool {
	for k := 0; k < n; k++ {
		p := k
		best := math.Abs(a[k*n+k])
		for i := k + 1; i < n; i++ {
			if v := math.Abs(a[i*n+k]); v > best {
				p, best = i, v
			}
		}
		piv[k] = p
		if best == 0 {
			return false
		}
		if p != k {
			for j := 0; j < n; j++ {
				a[k*n+j], a[p*n+j] = a[p*n+j], a[k*n+j]
			}
		}
		inv := 1 / a[k*n+k]
		for i := k + 1; i < n; i++ {
			l := a[i*n+k] * inv
			a[i*n+k] = l
			if l == 0 {
				continue
			}
			for j := k + 1; j < n; j++ {
				a[i*n+j] -= l * a[k*n+j]
			}
		}
	}
	return true
}

// luSolve overwrites b with the solution of A x = b, given the factors of A
// from luFactor.
func luSolve(a []float64, n int, piv []int, b []float64) {
	for k := 0; k < n; k++ {
		if p := piv[k]; p != k {
			b[k], b[p] = b[p], b[k]
		}
	}
	for i := 1; i < n; i++ {
		s := b[i]
		for j := 0; j < i; j++ {
			s -= a[i*n+j] * b[j]
		}
		b[i] = s
	}
	for i := n - 1; i >= 0; i-- {
		s := b[i]
		for j := i + 1; j < n; j++ {
			s -= a[i*n+j] * b[j]
		}
		b[i] = s / a[i*n+i]
	}
}
