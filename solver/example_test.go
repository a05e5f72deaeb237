package solver_test

import (
	"fmt"
	"os"
	"strings"

	"mixwell/solver"
)

// The saddle-point matrix [2 0 1; 0 2 1; 1 1 0] with b = (1, 3, 0) has the
// solution x = (-1/2, 1/2, 2) (worked by hand: x1 + x2 = 0 and
// 2(x2 - x1) = 2).
func ExampleFactorLU() {
	t := solver.NewCOO(3, 3, 7)
	t.Add(0, 0, 2)
	t.Add(1, 1, 2)
	t.Add(0, 2, 1)
	t.Add(2, 0, 1)
	t.Add(1, 2, 1)
	t.Add(2, 1, 1)
	a := t.ToCSR()

	lu, err := solver.FactorLU(a, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	b := []float64{1, 3, 0}
	x := make([]float64, 3)
	if err := lu.SolveTo(x, b); err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("x = %.4f\n", x)
	fmt.Printf("residual below 1e-15: %v\n", solver.RelativeResidual(a, x, b) < 1e-15)
	// Output:
	// x = [-0.5000 0.5000 2.0000]
	// residual below 1e-15: true
}

func ExampleFactorLU_singular() {
	t := solver.NewCOO(2, 2, 2)
	t.Add(0, 0, 1)
	t.Add(1, 0, 1)
	_, err := solver.FactorLU(t.ToCSR(), nil)
	fmt.Println(err)
	// Output:
	// solver: matrix is structurally singular: column 1 (pivot step 1): no candidate pivot entry
}

func ExampleCOO_ToCSR() {
	t := solver.NewCOO(2, 3, 4)
	t.Add(1, 2, 5)
	t.Add(0, 1, 1)
	t.Add(1, 2, -2) // duplicates are summed
	t.Add(1, 0, 4)
	a := t.ToCSR()
	fmt.Println(a.RowPtr(), a.ColIndices(), a.Values())
	fmt.Println(a.At(1, 2), a.Index(1, 2), a.Index(0, 0))
	// Output:
	// [0 1 3] [1 0 2] [1 4 3]
	// 3 2 -1
}

func ExampleConjugateGradient() {
	// tridiag(-1, 2, -1) x = (1, 0, 1) has the solution x = (1, 1, 1).
	t := solver.NewCOO(3, 3, 7)
	for i := 0; i < 3; i++ {
		t.Add(i, i, 2)
		if i > 0 {
			t.Add(i, i-1, -1)
			t.Add(i-1, i, -1)
		}
	}
	x := make([]float64, 3) // initial guess, overwritten by the solution
	res, err := solver.ConjugateGradient(t.ToCSR(), []float64{1, 0, 1}, x, &solver.CGSettings{Jacobi: true})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("x = %.6f after %d iterations\n", x, res.Iterations)
	// Output:
	// x = [1.000000 1.000000 1.000000] after 2 iterations
}

func ExampleEquilibrateSymmetricTo() {
	// A badly scaled symmetric matrix [1e8 1e3; 1e3 1e-2].
	t := solver.NewCOO(2, 2, 4)
	t.Add(0, 0, 1e8)
	t.Add(0, 1, 1e3)
	t.Add(1, 0, 1e3)
	t.Add(1, 1, 1e-2)
	a := t.ToCSR()
	d := make([]float64, 2)
	if _, err := solver.EquilibrateSymmetricTo(d, a, &solver.EquilibrationSettings{Tolerance: 1e-6}); err != nil {
		fmt.Println(err)
		return
	}
	a.ScaleRowsCols(d, d) // a is now D A D
	fmt.Printf("%.3f\n", a.Values())
	// Output:
	// [1.000 1.000 1.000 1.000]
}

func ExampleMinimumDegreeOrder() {
	// The arrow matrix with its full row and column first: eliminating
	// node 0 first fills the whole matrix; minimum degree postpones it to
	// one of the last two steps, where it causes no fill.
	const n = 20
	t := solver.NewCOO(n, n, 3*n)
	for i := 0; i < n; i++ {
		t.Add(i, i, 4)
		if i > 0 {
			t.Add(0, i, 1)
			t.Add(i, 0, 1)
		}
	}
	a := t.ToCSR()
	perm, err := solver.MinimumDegreeOrder(a)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println("node 0 among the last two:", perm[n-1] == 0 || perm[n-2] == 0)
	for _, o := range []solver.Ordering{solver.NaturalOrder, solver.MinDegree} {
		lu, err := solver.FactorLU(a, &solver.LUSettings{Ordering: o})
		if err != nil {
			fmt.Println(err)
			return
		}
		fmt.Printf("%s: nnz(L) = %d\n", o, lu.Stats().NNZL)
	}
	// Output:
	// node 0 among the last two: true
	// natural: nnz(L) = 190
	// minimum degree: nnz(L) = 19
}

func ExampleReadMatrixMarket() {
	const text = `%%MatrixMarket matrix coordinate real symmetric
2 2 2
1 1 4
2 1 -1
`
	a, err := solver.ReadMatrixMarket(strings.NewReader(text))
	if err != nil {
		fmt.Println(err)
		return
	}
	if err := solver.WriteMatrixMarket(os.Stdout, a); err != nil {
		fmt.Println(err)
	}
	// Output:
	// %%MatrixMarket matrix coordinate real general
	// 2 2 3
	// 1 1 4
	// 1 2 -1
	// 2 1 -1
}
