package solver

import (
	"math/rand/v2"
	"testing"
)

// Sinks keep results alive so the compiler cannot drop the work.
var (
	sinkLU    *LU
	sinkFloat float64
	sinkPerm  []int
)

// Saddle-point sizes: MAC grids of 40×40 (4 720 unknowns) and 260×260
// (202 280 unknowns) cells.
const (
	saddleSmall = 40
	saddleLarge = 260
)

func benchFactorSaddle(b *testing.B, cells int) {
	a, _ := macStokes(cells)
	b.ReportAllocs()
	var st LUStats
	for b.Loop() {
		f, err := FactorLU(a, nil)
		if err != nil {
			b.Fatal(err)
		}
		sinkLU = f
		st = f.Stats()
	}
	b.ReportMetric(float64(st.NNZL+st.NNZU), "nnz(L+U)")
	b.ReportMetric(float64(st.N), "unknowns")
}

func BenchmarkFactorLUSaddleSmall(b *testing.B) { benchFactorSaddle(b, saddleSmall) }

func BenchmarkFactorLUSaddleLarge(b *testing.B) {
	if testing.Short() {
		b.Skip("large factorisation skipped in short mode")
	}
	benchFactorSaddle(b, saddleLarge)
}

func BenchmarkRefactorLUSaddleSmall(b *testing.B) {
	a, _ := macStokes(saddleSmall)
	f, err := FactorLU(a, nil)
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	for b.Loop() {
		if err := f.Refactor(a); err != nil {
			b.Fatal(err)
		}
	}
	sinkLU = f
}

func benchSolveSaddle(b *testing.B, cells int) {
	a, _ := macStokes(cells)
	f, err := FactorLU(a, nil)
	if err != nil {
		b.Fatal(err)
	}
	rhs := randomVector(rand.New(rand.NewPCG(1, 1)), a.rows)
	x := make([]float64, a.rows)
	b.ReportAllocs()
	for b.Loop() {
		if err := f.SolveTo(x, rhs); err != nil {
			b.Fatal(err)
		}
	}
	sinkFloat = x[0]
}

func BenchmarkSolveLUSaddleSmall(b *testing.B) { benchSolveSaddle(b, saddleSmall) }

func BenchmarkSolveLUSaddleLarge(b *testing.B) {
	if testing.Short() {
		b.Skip("large factorisation skipped in short mode")
	}
	benchSolveSaddle(b, saddleLarge)
}

func BenchmarkMinimumDegreeOrderSaddleLarge(b *testing.B) {
	a, _ := macStokes(saddleLarge)
	b.ReportAllocs()
	for b.Loop() {
		p, err := MinimumDegreeOrder(a)
		if err != nil {
			b.Fatal(err)
		}
		sinkPerm = p
	}
}

func benchMulVec(b *testing.B, m int) {
	a := laplace2D(m)
	x := randomVector(rand.New(rand.NewPCG(2, 2)), m*m)
	y := make([]float64, m*m)
	b.ReportAllocs()
	for b.Loop() {
		a.MulVecTo(y, x)
	}
	sinkFloat = y[0]
}

// BenchmarkMulVecCSRLaplace100 and ...500: 5-point Laplacians with 10⁴ and
// 2.5·10⁵ unknowns.
func BenchmarkMulVecCSRLaplace100(b *testing.B) { benchMulVec(b, 100) }
func BenchmarkMulVecCSRLaplace500(b *testing.B) { benchMulVec(b, 500) }

func BenchmarkConjugateGradientLaplace100(b *testing.B) {
	a := laplace2D(100)
	rhs := randomVector(rand.New(rand.NewPCG(3, 3)), a.rows)
	x := make([]float64, a.rows)
	b.ReportAllocs()
	for b.Loop() {
		clear(x)
		if _, err := ConjugateGradient(a, rhs, x, &CGSettings{Jacobi: true}); err != nil {
			b.Fatal(err)
		}
	}
	sinkFloat = x[0]
}
