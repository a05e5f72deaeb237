package solver_test

import (
	"testing"

	"mixwell/solver"
)

// Sinks keep benchmark results alive.
var (
	sinkSaddleLU   *solver.LU
	sinkSaddlePerm []int
)

// Mesh sizes of the finite element benchmarks: the unit square in
// 2·32² = 2048 triangles.
const benchCells = 32

func benchFactorFEM(b *testing.B, a *solver.CSR) {
	b.ReportAllocs()
	var st solver.LUStats
	for b.Loop() {
		f, err := solver.FactorLU(a, nil)
		if err != nil {
			b.Fatal(err)
		}
		sinkSaddleLU = f
		st = f.Stats()
	}
	b.ReportMetric(float64(st.NNZL+st.NNZU), "nnz(L+U)")
	b.ReportMetric(float64(st.OffDiagonalPivots), "offdiag")
	b.ReportMetric(float64(st.SwappedPairs), "swapped")
	b.ReportMetric(float64(st.N), "unknowns")
}

// BenchmarkFactorLUMixedPoissonRT2 factorises the RT2 × DG2 mixed Poisson
// matrix on 2048 triangles (33 984 unknowns).
func BenchmarkFactorLUMixedPoissonRT2(b *testing.B) {
	a, _ := mixedPoissonMatrix(b, 2, benchCells)
	benchFactorFEM(b, a)
}

// BenchmarkFactorLUMixedPoissonRT4 factorises the RT4 × DG4 mixed Poisson
// matrix on 2048 triangles (87 360 unknowns).
func BenchmarkFactorLUMixedPoissonRT4(b *testing.B) {
	a, _ := mixedPoissonMatrix(b, 4, benchCells)
	benchFactorFEM(b, a)
}

// BenchmarkFactorLUTaylorHoodP2P1 factorises the P2/P1 Taylor–Hood Stokes
// matrix on 2·44² = 3872 triangles (17 867 unknowns, the size of the
// finest verification level).
func BenchmarkFactorLUTaylorHoodP2P1(b *testing.B) {
	benchFactorFEM(b, taylorHoodMatrix(b, 1, 44))
}

// BenchmarkMinimumDegreeOrderMixedPoissonRT4 times the ordering alone.
func BenchmarkMinimumDegreeOrderMixedPoissonRT4(b *testing.B) {
	a, _ := mixedPoissonMatrix(b, 4, benchCells)
	b.ReportAllocs()
	for b.Loop() {
		p, err := solver.MinimumDegreeOrder(a)
		if err != nil {
			b.Fatal(err)
		}
		sinkSaddlePerm = p
	}
}

// BenchmarkFactorLUSpeciesTube factorises the species–Stokes matrix of
// saddle_tube_test.go (k = 2, two species) on the mesher's mesh of the
// tube, 401 triangles (21 278 unknowns). Before delayed pivots and the
// pairing by sound geometric-mean couplings: 10.8 s per factorisation,
// nnz(L+U) 13.5M, 3 553 off-diagonal pivots; after: 1.0 s, 4.16M, 192
// (96 swapped pairs). Our measurements on two cores.
func BenchmarkFactorLUSpeciesTube(b *testing.B) {
	a := speciesStokesMatrix(b, tubeMesh(b, 0.05, 0.004), 2, 2)
	benchFactorFEM(b, a)
}
