package solver

import (
	"errors"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/mat"
)

// gmresDenseOperator returns the product with a dense matrix as a
// LinearOperator.
func gmresDenseOperator(a *mat.Dense) LinearOperator {
	return func(dst, x []float64) error {
		mat.NewVecDense(len(dst), dst).MulVec(a, mat.NewVecDense(len(x), x))
		return nil
	}
}

// gmresRandomDense returns an n×n matrix shift·I + N/√n with N standard
// normal: its eigenvalues fill (asymptotically) the unit disc around shift
// (the circular law), so shift = 3 gives a well-conditioned nonsymmetric
// matrix and shift = 0 a hard one for GMRES.
func gmresRandomDense(rnd *rand.Rand, n int, shift float64) *mat.Dense {
	a := mat.NewDense(n, n, nil)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			a.Set(i, j, rnd.NormFloat64()/math.Sqrt(float64(n)))
		}
		a.Set(i, i, a.At(i, i)+shift)
	}
	return a
}

// gmresTrueResidual returns ‖b − A x‖₂ / ‖b‖₂.
func gmresTrueResidual(t *testing.T, a LinearOperator, b, x []float64) float64 {
	t.Helper()
	ax := make([]float64, len(x))
	if err := a(ax, x); err != nil {
		t.Fatal(err)
	}
	return floats.Distance(ax, b, 2) / floats.Norm(b, 2)
}

// gmresDenseSolve returns the solution of A x = b by gonum's LU solve.
func gmresDenseSolve(t *testing.T, a *mat.Dense, b []float64) []float64 {
	t.Helper()
	var x mat.VecDense
	if err := x.SolveVec(a, mat.NewVecDense(len(b), b)); err != nil {
		t.Fatal(err)
	}
	return x.RawVector().Data
}

func TestGMRESDense(t *testing.T) {
	// Reference: gonum's dense LU solve of the same system. The systems
	// are well conditioned, so the solutions agree to about the GMRES
	// tolerance.
	const tol = 1e-12
	const agree = 1e-9
	rnd := rand.New(rand.NewPCG(1, 2))
	cases := []struct {
		name     string
		n        int
		shift    float64
		restart  int
		maxIters int // upper bound on the iterations (0: none checked)
	}{
		// Full GMRES terminates in at most n steps (Saad and Schultz
		// 1986; exact arithmetic, but with reorthogonalised Gram–Schmidt
		// the bound holds in floating point here).
		{name: "well-conditioned n=40 full", n: 40, shift: 3, restart: 40, maxIters: 40},
		{name: "well-conditioned n=40 GMRES(8)", n: 40, shift: 3, restart: 8},
		{name: "eigenvalues around 0 n=30 full", n: 30, shift: 0, restart: 30, maxIters: 30},
		{name: "n=1", n: 1, shift: 3, restart: 5, maxIters: 1},
	}
	for _, c := range cases {
		a := gmresRandomDense(rnd, c.n, c.shift)
		b := make([]float64, c.n)
		for i := range b {
			b[i] = 2*rnd.Float64() - 1
		}
		want := gmresDenseSolve(t, a, b)
		op := gmresDenseOperator(a)
		x := make([]float64, c.n)
		res, err := GMRES(op, b, x, &GMRESSettings{Tolerance: tol, Restart: c.restart})
		if err != nil {
			t.Errorf("%s: %v", c.name, err)
			continue
		}
		if !res.Converged || res.Residual > tol {
			t.Errorf("%s: converged %v with residual %.3g, want ≤ %g", c.name, res.Converged, res.Residual, tol)
		}
		if c.maxIters > 0 && res.Iterations > c.maxIters {
			t.Errorf("%s: %d iterations, want at most %d", c.name, res.Iterations, c.maxIters)
		}
		if got := gmresTrueResidual(t, op, b, x); got > 100*tol {
			t.Errorf("%s: true relative residual %.3g, want ≤ %g", c.name, got, 100*tol)
		}
		if d := floats.Distance(x, want, 2) / floats.Norm(want, 2); d > agree {
			t.Errorf("%s: relative difference to the dense solve %.3g, want ≤ %g", c.name, d, agree)
		}
		t.Logf("%s: %d iterations, %d products, residual %.3g", c.name, res.Iterations, res.Products, res.Residual)
	}
}

// tridiagonalSolve solves the tridiagonal system (sub, diag, super) x = b
// by the Thomas algorithm (Gaussian elimination without pivoting, stable
// for diagonally dominant matrices).
func tridiagonalSolve(sub, diag, super float64, b []float64) []float64 {
	n := len(b)
	c := make([]float64, n)
	x := make([]float64, n)
	m := diag
	x[0] = b[0] / m
	for i := 1; i < n; i++ {
		c[i-1] = super / m
		m = diag - sub*c[i-1]
		x[i] = (b[i] - sub*x[i-1]) / m
	}
	for i := n - 2; i >= 0; i-- {
		x[i] -= c[i] * x[i+1]
	}
	return x
}

func TestGMRESRestartedTridiagonal(t *testing.T) {
	// tridiag(-1, 4, -2) is strictly diagonally dominant and nonsymmetric;
	// its symmetric part tridiag(-1.5, 4, -1.5) is positive definite
	// (eigenvalues ≥ 4 − 2·1.5 = 1 by Gershgorin), so restarted GMRES
	// converges for every restart length (S. C. Eisenstat, H. C. Elman and
	// M. H. Schultz, SIAM J. Numer. Anal. 20, 1983; from memory).
	// Reference: the Thomas algorithm on the same system.
	const n = 200
	const sub, diag, super = -1.0, 4.0, -2.0
	const tol = 1e-10
	const agree = 1e-8
	op := func(dst, x []float64) error {
		for i := range dst {
			v := diag * x[i]
			if i > 0 {
				v += sub * x[i-1]
			}
			if i < n-1 {
				v += super * x[i+1]
			}
			dst[i] = v
		}
		return nil
	}
	rnd := rand.New(rand.NewPCG(3, 4))
	b := make([]float64, n)
	for i := range b {
		b[i] = 2*rnd.Float64() - 1
	}
	want := tridiagonalSolve(sub, diag, super, b)
	for _, restart := range []int{2, 5, 20} {
		x := make([]float64, n)
		res, err := GMRES(op, b, x, &GMRESSettings{Tolerance: tol, Restart: restart})
		if err != nil {
			t.Errorf("GMRES(%d): %v", restart, err)
			continue
		}
		if got := gmresTrueResidual(t, op, b, x); got > 10*tol {
			t.Errorf("GMRES(%d): true relative residual %.3g, want ≤ %g", restart, got, 10*tol)
		}
		if d := floats.Distance(x, want, 2) / floats.Norm(want, 2); d > agree {
			t.Errorf("GMRES(%d): relative difference to the Thomas solve %.3g, want ≤ %g", restart, d, agree)
		}
		t.Logf("GMRES(%d): %d iterations, %d products", restart, res.Iterations, res.Products)
	}
}

func TestGMRESEdgeCases(t *testing.T) {
	identity := func(dst, x []float64) error { copy(dst, x); return nil }
	errOp := errors.New("operator failed")

	t.Run("zero right-hand side", func(t *testing.T) {
		x := []float64{1, 2, 3}
		res, err := GMRES(identity, make([]float64, 3), x, nil)
		if err != nil || !res.Converged || res.Iterations != 0 {
			t.Errorf("got %+v, %v; want converged in 0 iterations", res, err)
		}
		if floats.Norm(x, 2) != 0 {
			t.Errorf("x = %v, want zero", x)
		}
	})
	t.Run("exact initial guess", func(t *testing.T) {
		b := []float64{1, 2, 3}
		x := []float64{1, 2, 3}
		res, err := GMRES(identity, b, x, nil)
		if err != nil || !res.Converged || res.Iterations != 0 || res.Products != 1 {
			t.Errorf("got %+v, %v; want converged after 0 iterations and 1 product", res, err)
		}
	})
	t.Run("iteration limit", func(t *testing.T) {
		rnd := rand.New(rand.NewPCG(5, 6))
		a := gmresRandomDense(rnd, 30, 0)
		b := make([]float64, 30)
		b[0] = 1
		res, err := GMRES(gmresDenseOperator(a), b, make([]float64, 30), &GMRESSettings{MaxIterations: 3})
		var ce *ConvergenceError
		if !errors.As(err, &ce) || ce.Method != "gmres" || ce.Iterations != 3 || res.Converged {
			t.Errorf("got %+v, %v; want a gmres ConvergenceError after 3 iterations", res, err)
		}
	})
	t.Run("operator error", func(t *testing.T) {
		calls := 0
		op := func(dst, x []float64) error {
			calls++
			if calls == 2 {
				return errOp
			}
			copy(dst, x)
			dst[0] += x[1]
			return nil
		}
		_, err := GMRES(op, []float64{1, 1}, make([]float64, 2), nil)
		if !errors.Is(err, errOp) || !strings.Contains(err.Error(), "iteration 2") {
			t.Errorf("error %v, want the operator error at iteration 2", err)
		}
	})
	t.Run("NaN", func(t *testing.T) {
		op := func(dst, x []float64) error {
			copy(dst, x)
			dst[1] = math.NaN()
			return nil
		}
		_, err := GMRES(op, []float64{1, 1}, make([]float64, 2), nil)
		var ce *ConvergenceError
		if !errors.As(err, &ce) || !ce.NotFinite {
			t.Errorf("error %v, want a ConvergenceError with NotFinite", err)
		}
	})
	t.Run("singular", func(t *testing.T) {
		// A = diag(1, 0), b = (0, 1) is not in the range of A: the
		// Krylov space span{b} is invariant (A b = 0).
		op := func(dst, x []float64) error {
			dst[0], dst[1] = x[0], 0
			return nil
		}
		_, err := GMRES(op, []float64{0, 1}, make([]float64, 2), nil)
		var ce *ConvergenceError
		if !errors.As(err, &ce) || !strings.Contains(err.Error(), "singular") {
			t.Errorf("error %v, want a ConvergenceError naming a singular operator", err)
		}
	})
	t.Run("length mismatch panics", func(t *testing.T) {
		defer func() {
			if recover() == nil {
				t.Error("no panic")
			}
		}()
		GMRES(identity, make([]float64, 2), make([]float64, 3), nil)
	})
}
