package solver

import (
	"fmt"
	"math"
)

// CGSettings controls ConjugateGradient. A nil pointer, or a zero field,
// selects the documented default.
type CGSettings struct {
	// Tolerance on the relative residual ‖b − A x‖₂ / ‖b‖₂ (default 1e-10).
	Tolerance float64
	// MaxIterations bounds the number of iterations (default 2n, at least
	// 100).
	MaxIterations int
	// Jacobi selects the diagonal (Jacobi) preconditioner M = diag(A).
	Jacobi bool
}

// CGResult reports the outcome of ConjugateGradient.
type CGResult struct {
	// Iterations is the number of iterations performed.
	Iterations int
	// Residual is the final relative residual ‖b − A x‖₂ / ‖b‖₂ (the
	// absolute residual when b is zero), recomputed from x at the end.
	Residual float64
}

// NotConvergedError is returned by ConjugateGradient when the tolerance was
// not met within the iteration limit.
type NotConvergedError struct {
	Iterations int
	Residual   float64
	Tolerance  float64
}

// Error implements the error interface.
func (e *NotConvergedError) Error() string {
	return fmt.Sprintf("solver: conjugate gradients did not converge in %d iterations: relative residual %.3g > tolerance %.3g", e.Iterations, e.Residual, e.Tolerance)
}

// ConjugateGradient solves A x = b for a symmetric positive definite A by
// the (optionally Jacobi-preconditioned) conjugate gradient method of M. R.
// Hestenes and E. Stiefel, J. Res. Nat. Bur. Standards 49(6), 1952, in the
// preconditioned form of Y. Saad, "Iterative Methods for Sparse Linear
// Systems", 2nd ed., Algorithm 9.1.
//
// On entry x holds the initial guess; on return it holds the last iterate,
// also when an error is returned. The symmetry of A is assumed, not checked.
// ConjugateGradient returns an error if A is not square, if the Jacobi
// preconditioner meets a non-positive diagonal entry (naming the row), if a
// search direction has non-positive curvature (A is not positive definite,
// naming the iteration), or a *NotConvergedError. It panics if len(b) or
// len(x) differs from the order of A.
func ConjugateGradient(a *CSR, b, x []float64, s *CGSettings) (CGResult, error) {
	var res CGResult
	n, c := a.Dims()
	if n != c {
		return res, notSquare(n, c)
	}
	if len(b) != n || len(x) != n {
		panic(fmt.Sprintf("solver: ConjugateGradient: order %d, len(b) = %d, len(x) = %d", n, len(b), len(x)))
	}
	tol := 1e-10
	maxIter := max(2*n, 100)
	var jacobi bool
	if s != nil {
		if s.Tolerance > 0 {
			tol = s.Tolerance
		}
		if s.MaxIterations > 0 {
			maxIter = s.MaxIterations
		}
		jacobi = s.Jacobi
	}
	var inv []float64
	if jacobi {
		inv = a.Diagonal()
		for i, d := range inv {
			if !(d > 0) {
				return res, fmt.Errorf("solver: Jacobi preconditioner: diagonal entry %d is %v, not positive", i, d)
			}
			inv[i] = 1 / d
		}
	}
	scale := norm2(b)
	if scale == 0 {
		scale = 1
	}
	r := make([]float64, n)
	z := make([]float64, n)
	p := make([]float64, n)
	ap := make([]float64, n)
	precondition := func() {
		if inv == nil {
			copy(z, r)
			return
		}
		for i, ri := range r {
			z[i] = inv[i] * ri
		}
	}
	for {
		// (Re)start from the true residual r = b − A x.
		a.MulVecTo(r, x)
		for i := range r {
			r[i] = b[i] - r[i]
		}
		precondition()
		copy(p, z)
		rz := dot(r, z)
		rel := norm2(r) / scale
		for res.Iterations < maxIter && rel > tol {
			a.MulVecTo(ap, p)
			curv := dot(p, ap)
			if !(curv > 0) {
				res.Residual = RelativeResidual(a, x, b)
				return res, fmt.Errorf("solver: conjugate gradients: non-positive curvature pᵀAp = %v at iteration %d; the matrix is not positive definite", curv, res.Iterations+1)
			}
			alpha := rz / curv
			for i := range x {
				x[i] += alpha * p[i]
				r[i] -= alpha * ap[i]
			}
			precondition()
			rzNew := dot(r, z)
			beta := rzNew / rz
			rz = rzNew
			for i := range p {
				p[i] = z[i] + beta*p[i]
			}
			res.Iterations++
			rel = norm2(r) / scale
		}
		// The recursively updated residual drifts from the true one:
		// judge the true residual, and restart if only the recursive one
		// met the tolerance.
		res.Residual = RelativeResidual(a, x, b)
		if res.Residual <= tol {
			return res, nil
		}
		if res.Iterations >= maxIter {
			return res, &NotConvergedError{Iterations: res.Iterations, Residual: res.Residual, Tolerance: tol}
		}
	}
}

func dot(x, y []float64) float64 {
	var s float64
	for i, v := range x {
		s += v * y[i]
	}
	return s
}

func norm2(x []float64) float64 {
	var s float64
	for _, v := range x {
		s += v * v
	}
	return math.Sqrt(s)
}
