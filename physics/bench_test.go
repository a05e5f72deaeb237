package physics

import (
	"math/rand/v2"
	"testing"
)

var (
	benchSinkF   float64
	benchSinkErr error
)

func benchmarkTransportMatrix(b *testing.B, n int) {
	rnd := rand.New(rand.NewPCG(1, 1))
	mix := randomMixture(b, rnd, n)
	c := randomComposition(rnd, n, 1e-2)
	m := make([]float64, n*n)
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		mix.TransportMatrixTo(m, c, rt300)
	}
	benchSinkF = m[0]
}

func BenchmarkTransportMatrixMixture3(b *testing.B) { benchmarkTransportMatrix(b, 3) }
func BenchmarkTransportMatrixMixture6(b *testing.B) { benchmarkTransportMatrix(b, 6) }

// benchmarkClosure times ConcentrationsTo with the full Jacobian at a
// consistent state.
func benchmarkClosure(b *testing.B, cl Closure, p float64) {
	n := cl.Len()
	rnd := rand.New(rand.NewPCG(2, 2))
	x := randomComposition(rnd, n, 1e-2)
	mu := make([]float64, n)
	if err := cl.PotentialsTo(mu, x, p); err != nil {
		b.Fatal(err)
	}
	c, jmu, jp := make([]float64, n), make([]float64, n*n), make([]float64, n)
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		benchSinkErr = cl.ConcentrationsTo(c, jmu, jp, mu, p)
	}
	benchSinkF = c[0]
}

func BenchmarkConcentrationsIdealGas3(b *testing.B) {
	g, _ := NewIdealGas(airCO2(b), rt300, pAtm)
	benchmarkClosure(b, g, pAtm)
}

func BenchmarkConcentrationsIdealSolution4(b *testing.B) {
	mix, vol := liquidMixture(b, 4)
	s, _ := NewIdealSolution(mix, vol, rt300, pAtm)
	benchmarkClosure(b, s, 2*pAtm)
}

func BenchmarkConcentrationsMargules3(b *testing.B) {
	mix, vol := liquidMixture(b, 3)
	s, err := NewMargulesSolution(mix, vol, margulesPairs(mix, margulesTernary), rt300, pAtm)
	if err != nil {
		b.Fatal(err)
	}
	benchmarkClosure(b, s, 2*pAtm)
}

func BenchmarkViscosityWilke3(b *testing.B) {
	w, _ := NewWilkeViscosity(airCO2(b), []float64{1.754e-5, 2.031e-5, 1.462e-5})
	x := []float64{0.7, 0.2, 0.1}
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		benchSinkF = w.Viscosity(x)
	}
}
