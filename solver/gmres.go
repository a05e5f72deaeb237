package solver

import (
	"fmt"
	"math"
)

// LinearOperator applies a linear operator A to x: dst = A x, with
// len(dst) == len(x). It must not keep x or dst, and x and dst never
// share memory. An error stops the solver that called it.
type LinearOperator func(dst, x []float64) error

// GMRESSettings controls GMRES. A nil pointer, or a zero field, selects the
// documented default.
type GMRESSettings struct {
	// Tolerance on the relative residual ‖b − A x‖₂ / ‖b‖₂ (default 1e-10).
	Tolerance float64
	// Restart is the dimension m of the Krylov subspace built before
	// GMRES(m) restarts from its current iterate (default 30). It is capped
	// at the order n of the system; Restart ≥ n is full GMRES.
	Restart int
	// MaxIterations bounds the total number of Arnoldi steps over all
	// restart cycles (default max(2n, 100)).
	MaxIterations int
}

// GMRESResult reports the outcome of GMRES.
type GMRESResult struct {
	// Iterations is the number of Arnoldi steps, each one application of
	// the operator.
	Iterations int
	// Products counts all applications of the operator: the Arnoldi steps
	// plus one per restart cycle to form the residual b − A x (that one is
	// skipped when x is zero on entry, so a solve from a zero guess that
	// converges within the first cycle has Products == Iterations).
	Products int
	// Residual is the final relative residual ‖b − A x‖₂ / ‖b‖₂. Within a
	// restart cycle it is the residual of the small least-squares problem,
	// updated by the Givens rotations; it equals the true residual in
	// exact arithmetic, and the true residual is recomputed at every
	// restart. It is zero when b is zero.
	Residual float64
	// Converged reports Residual ≤ Tolerance.
	Converged bool
}

// GMRES solves A x = b for a general (nonsymmetric) nonsingular operator
// given as a function, by the restarted generalised minimal residual method
// GMRES(m) of Y. Saad and M. H. Schultz, "GMRES: a generalized minimal
// residual algorithm for solving nonsymmetric linear systems", SIAM J. Sci.
// Stat. Comput. 7(3), 856–869, 1986; see also Y. Saad, "Iterative Methods
// for Sparse Linear Systems", 2nd ed., Section 6.5, and C. T. Kelley,
// "Iterative Methods for Linear and Nonlinear Equations", SIAM 1995,
// Chapter 3 (section numbers from memory). No preconditioner is applied.
//
// The Arnoldi basis is orthogonalised by modified Gram–Schmidt with one
// reorthogonalisation pass when a vector loses more than a factor √2 of its
// norm (the criterion of Daniel, Gragg, Kaufman and Stewart, Math. Comp. 30,
// 1976, from memory); the Hessenberg least-squares problem is reduced by Givens
// rotations, which give the residual norm at every step without forming x.
// Without restarts GMRES terminates in at most n steps in exact arithmetic.
//
// On entry x holds the initial guess; on return it holds the last iterate,
// also when an error is returned. If b is zero, x is set to zero. GMRES
// returns the error of the operator wrapped with the iteration number, or a
// *ConvergenceError with Method "gmres" when the tolerance is not met within
// MaxIterations, when the operator produces a non-finite value
// (NotFinite), or when the Krylov subspace becomes invariant without
// convergence, which happens only for a singular operator. It panics if
// len(x) != len(b).
func GMRES(a LinearOperator, b, x []float64, s *GMRESSettings) (GMRESResult, error) {
	n := len(b)
	if len(x) != n {
		panic(fmt.Sprintf("solver: GMRES: len(b) = %d, len(x) = %d", n, len(x)))
	}
	tol := 1e-10
	restart := 30
	maxIter := max(2*n, 100)
	if s != nil {
		if s.Tolerance > 0 {
			tol = s.Tolerance
		}
		if s.Restart > 0 {
			restart = s.Restart
		}
		if s.MaxIterations > 0 {
			maxIter = s.MaxIterations
		}
	}
	if n == 0 {
		return GMRESResult{Converged: true}, nil
	}
	w := newGMRESWork(n, min(restart, n))
	return w.solve(a, b, x, tol, maxIter)
}

// gmresWork holds the memory of GMRES(m) for systems of order n, so that
// repeated solves (one per Newton step) do not allocate.
type gmresWork struct {
	n, m int
	// v holds the m+1 Arnoldi vectors as the columns of an n×(m+1)
	// column-major array.
	v []float64
	// h holds the (m+1)×m Hessenberg matrix column-major, reduced in place
	// to upper triangular form by the Givens rotations (cs, sn).
	h      []float64
	cs, sn []float64
	// g is the right-hand side ‖r₀‖ e₁ of the least-squares problem, rotated
	// along with h; y its solution.
	g, y []float64
}

func newGMRESWork(n, m int) *gmresWork {
	return &gmresWork{
		n:  n,
		m:  m,
		v:  make([]float64, n*(m+1)),
		h:  make([]float64, (m+1)*m),
		cs: make([]float64, m),
		sn: make([]float64, m),
		g:  make([]float64, m+1),
		y:  make([]float64, m),
	}
}

// col returns Arnoldi vector j.
func (w *gmresWork) col(j int) []float64 { return w.v[j*w.n : (j+1)*w.n] }

// solve runs GMRES(w.m) on a x = b from the initial guess in x.
func (w *gmresWork) solve(a LinearOperator, b, x []float64, tol float64, maxIter int) (GMRESResult, error) {
	var res GMRESResult
	m := w.m
	bnorm := norm2(b)
	if bnorm == 0 {
		clear(x)
		res.Converged = true
		return res, nil
	}
	fail := func(detail string, notFinite bool) (GMRESResult, error) {
		return res, &ConvergenceError{Method: "gmres", Iterations: res.Iterations, Residual: res.Residual, Tolerance: tol, NotFinite: notFinite, Detail: detail}
	}
	if !finiteFloat(bnorm) {
		res.Residual = math.NaN()
		return fail("non-finite right-hand side", true)
	}
	zeroGuess := true
	for _, xi := range x {
		if xi != 0 {
			zeroGuess = false
			break
		}
	}
	for {
		// (Re)start from the true residual r = b − A x.
		r := w.col(0)
		if zeroGuess {
			copy(r, b)
			zeroGuess = false
		} else {
			if err := a(r, x); err != nil {
				return res, fmt.Errorf("solver: GMRES: residual after %d iterations: linear operator: %w", res.Iterations, err)
			}
			res.Products++
			for i, bi := range b {
				r[i] = bi - r[i]
			}
		}
		beta := norm2(r)
		res.Residual = beta / bnorm
		if !finiteFloat(beta) {
			return fail("non-finite residual", true)
		}
		if res.Residual <= tol {
			res.Converged = true
			return res, nil
		}
		if res.Iterations >= maxIter {
			return fail("", false)
		}
		vecScale(1/beta, r)
		clear(w.g)
		w.g[0] = beta

		// Arnoldi steps of one cycle.
		j := 0 // number of columns of the reduced Hessenberg matrix
		breakdown, singular := false, false
		for j < m && res.Iterations < maxIter {
			vj, vn := w.col(j), w.col(j+1)
			if err := a(vn, vj); err != nil {
				return res, fmt.Errorf("solver: GMRES: iteration %d: linear operator: %w", res.Iterations+1, err)
			}
			res.Iterations++
			res.Products++
			hj := w.h[j*(m+1) : (j+1)*(m+1)]
			before := norm2(vn)
			if !finiteFloat(before) {
				return fail(fmt.Sprintf("non-finite operator value at iteration %d", res.Iterations), true)
			}
			for i := 0; i <= j; i++ {
				vi := w.col(i)
				hj[i] = dot(vn, vi)
				vecAddScaled(-hj[i], vi, vn)
			}
			after := norm2(vn)
			if after < before/math.Sqrt2 {
				for i := 0; i <= j; i++ {
					vi := w.col(i)
					c := dot(vn, vi)
					hj[i] += c
					vecAddScaled(-c, vi, vn)
				}
				after = norm2(vn)
			}
			hj[j+1] = after
			// A zero (to rounding) new vector means the Krylov subspace
			// is invariant under A: the least-squares solution is exact
			// on it.
			breakdown = after <= 0x1p-52*before
			if !breakdown {
				vecScale(1/after, vn)
			}
			for i := 0; i < j; i++ {
				hj[i], hj[i+1] = w.cs[i]*hj[i]+w.sn[i]*hj[i+1], -w.sn[i]*hj[i]+w.cs[i]*hj[i+1]
			}
			c, s, rho := givensRotation(hj[j], hj[j+1])
			if rho == 0 {
				// A v_j lies in the span of v_0 … v_{j−1}: the
				// operator is singular on the Krylov subspace.
				singular = true
				break
			}
			w.cs[j], w.sn[j] = c, s
			hj[j], hj[j+1] = rho, 0
			w.g[j+1] = -s * w.g[j]
			w.g[j] *= c
			j++
			res.Residual = math.Abs(w.g[j]) / bnorm
			if res.Residual <= tol || breakdown {
				break
			}
		}

		// x ← x + V_j y with H_j y = g, H_j upper triangular.
		for i := j - 1; i >= 0; i-- {
			sum := w.g[i]
			for k := i + 1; k < j; k++ {
				sum -= w.h[k*(m+1)+i] * w.y[k]
			}
			w.y[i] = sum / w.h[i*(m+1)+i]
		}
		for i := 0; i < j; i++ {
			vecAddScaled(w.y[i], w.col(i), x)
		}
		switch {
		case res.Residual <= tol:
			res.Converged = true
			return res, nil
		case singular || breakdown:
			return fail("the Krylov subspace became invariant before convergence: the operator is singular", false)
		case res.Iterations >= maxIter:
			return fail("", false)
		}
	}
}

// givensRotation returns c, s and r = √(a² + b²) with [c s; −s c] [a; b] = [r; 0]
// (c = 1, s = 0 when a = b = 0).
func givensRotation(a, b float64) (c, s, r float64) {
	if b == 0 {
		if a < 0 {
			return -1, 0, -a
		}
		return 1, 0, a
	}
	r = math.Hypot(a, b)
	return a / r, b / r, r
}

// vecAddScaled computes y += alpha x.
func vecAddScaled(alpha float64, x, y []float64) {
	for i, v := range x {
		y[i] += alpha * v
	}
}

// vecScale computes x *= alpha.
func vecScale(alpha float64, x []float64) {
	for i := range x {
		x[i] *= alpha
	}
}

func finiteFloat(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }
