package solver

import (
	"errors"
	"math"
	"math/rand/v2"
	"strings"
	"testing"
)

func TestConjugateGradientLaplace(t *testing.T) {
	// Reference: the sparse LU solution of the same system (checked
	// against gonum's dense LU in TestFactorLUAgainstDense).
	const (
		cgTol    = 1e-10
		agreeTol = 1e-8 // cgTol times a condition number of ~1e3 (m = 50)
	)
	const m = 50
	a := laplace2D(m)
	n := m * m
	rnd := rand.New(rand.NewPCG(31, 32))
	b := randomVector(rnd, n)
	f, err := FactorLU(a, nil)
	if err != nil {
		t.Fatal(err)
	}
	want := make([]float64, n)
	if err := f.SolveTo(want, b); err != nil {
		t.Fatal(err)
	}
	// Variable diagonal so that Jacobi has something to do: A + diag(s).
	shifted := a.Clone()
	for i := 0; i < n; i++ {
		shifted.AddAt(shifted.Index(i, i), 100*float64(i%7))
	}
	fs, err := FactorLU(shifted, nil)
	if err != nil {
		t.Fatal(err)
	}
	wantShifted := make([]float64, n)
	if err := fs.SolveTo(wantShifted, b); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		name   string
		a      *CSR
		want   []float64
		jacobi bool
	}{
		{"laplace", a, want, false},
		{"laplace_jacobi", a, want, true},
		{"shifted", shifted, wantShifted, false},
		{"shifted_jacobi", shifted, wantShifted, true},
	} {
		x := make([]float64, n)
		res, err := ConjugateGradient(c.a, b, x, &CGSettings{Tolerance: cgTol, Jacobi: c.jacobi})
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		if res.Residual > cgTol {
			t.Errorf("%s: residual %.3g > %.3g", c.name, res.Residual, cgTol)
		}
		if d := relDiff(x, c.want); d > agreeTol {
			t.Errorf("%s: differs from LU by %.3g > %.3g", c.name, d, agreeTol)
		}
		// CG on the m×m Laplacian needs O(m) iterations (condition number
		// ~ (2(m+1)/π)², common practice); 4m is generous.
		if res.Iterations > 4*m {
			t.Errorf("%s: %d iterations, more than %d", c.name, res.Iterations, 4*m)
		}
		t.Logf("%s: %d iterations, residual %.3g", c.name, res.Iterations, res.Residual)
	}

	// A good initial guess converges at once.
	x := append([]float64(nil), want...)
	res, err := ConjugateGradient(a, b, x, nil)
	if err != nil || res.Iterations > 1 {
		t.Errorf("exact initial guess: %d iterations, error %v", res.Iterations, err)
	}
}

func TestConjugateGradientErrors(t *testing.T) {
	a := laplace2D(10)
	b := make([]float64, 100)
	b[0] = 1
	_, err := ConjugateGradient(a, b, make([]float64, 100), &CGSettings{MaxIterations: 3})
	var nc *NotConvergedError
	if !errors.As(err, &nc) || nc.Iterations != 3 {
		t.Errorf("iteration limit: error %v, want NotConvergedError after 3 iterations", err)
	}
	// Indefinite: the negated Laplacian.
	neg := a.Clone()
	for i := range neg.Values() {
		neg.Values()[i] *= -1
	}
	if _, err := ConjugateGradient(neg, b, make([]float64, 100), nil); err == nil || !strings.Contains(err.Error(), "non-positive curvature") {
		t.Errorf("indefinite matrix: error %v", err)
	}
	if _, err := ConjugateGradient(neg, b, make([]float64, 100), &CGSettings{Jacobi: true}); err == nil || !strings.Contains(err.Error(), "diagonal entry 0 is -4") {
		t.Errorf("negative diagonal with Jacobi: error %v", err)
	}
	if _, err := ConjugateGradient(NewCOO(2, 3, 0).ToCSR(), nil, nil, nil); !errors.Is(err, ErrNotSquare) {
		t.Errorf("non-square: error %v", err)
	}
	// b = 0: the solution is 0 and the absolute residual is reported.
	x := []float64{1, 2, 3}
	res, err := ConjugateGradient(tridiag(3), []float64{0, 0, 0}, x, nil)
	if err != nil || math.Abs(x[0])+math.Abs(x[1])+math.Abs(x[2]) > 1e-10 {
		t.Errorf("zero right-hand side: x = %v, residual %v, error %v", x, res.Residual, err)
	}
}
