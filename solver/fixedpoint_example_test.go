package solver_test

import (
	"errors"
	"fmt"
	"math"

	"mixwell/solver"
)

// The fixed point of cos is the Dottie number 0.7390851332151607… (well
// known). Every method finds it from x0 = 1.
func ExampleSolveFixedPoint() {
	cos := func(dst, x []float64) error {
		dst[0] = math.Cos(x[0])
		return nil
	}
	for _, name := range solver.FixedPointMethodNames() {
		m, err := solver.ParseFixedPointMethod(name)
		if err != nil {
			fmt.Println(err)
			return
		}
		s := &solver.FixedPointSettings{Method: m, Tolerance: 1e-12}
		res, err := solver.SolveFixedPoint(cos, []float64{1}, s)
		if err != nil {
			fmt.Println(err)
			return
		}
		fmt.Printf("%-13s x = %.12f converged: %v, residual below tolerance: %v\n", m, res.X[0], res.Converged, res.Residual <= s.Tolerance)
	}
	// Output:
	// anderson      x = 0.739085133215 converged: true, residual below tolerance: true
	// picard        x = 0.739085133215 converged: true, residual below tolerance: true
	// newton-krylov x = 0.739085133215 converged: true, residual below tolerance: true
}

// Plain Picard iteration of the rotation-like map G(x) = (1 − 1.5 y,
// 1.5 x) (eigenvalues ±1.5i) diverges, and the error says so; Anderson
// acceleration converges to the fixed point (4/13, 6/13) (solved by hand:
// x = 1 − 1.5 y and y = 1.5 x give 3.25 x = 1).
func ExampleSolveFixedPoint_divergence() {
	rotate := func(dst, x []float64) error {
		dst[0] = 1 - 1.5*x[1]
		dst[1] = 1.5 * x[0]
		return nil
	}
	_, err := solver.SolveFixedPoint(rotate, []float64{1, 1}, &solver.FixedPointSettings{Method: solver.Picard})
	var ce *solver.ConvergenceError
	if errors.As(err, &ce) {
		fmt.Printf("picard: diverged %v\n", ce.Diverged)
	}
	res, err := solver.SolveFixedPoint(rotate, []float64{1, 1}, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%v: x = %.4f\n", res.Method, res.X)
	// Output:
	// picard: diverged true
	// anderson: x = [0.3077 0.4615]
}

// GMRES solves a small nonsymmetric system given as a function: here
// [2 1; 0 3] x = (4, 3), whose solution is (3/2, 1). Full GMRES ends in at
// most n = 2 iterations.
func ExampleGMRES() {
	a := func(dst, x []float64) error {
		dst[0] = 2*x[0] + x[1]
		dst[1] = 3 * x[1]
		return nil
	}
	x := make([]float64, 2)
	res, err := solver.GMRES(a, []float64{4, 3}, x, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("x = %.6f after %d iterations, converged: %v\n", x, res.Iterations, res.Converged)
	// Output:
	// x = [1.500000 1.000000] after 2 iterations, converged: true
}
