package fem

import "testing"

var (
	sinkValues [][2]float64
	sinkScalar []float64
)

func benchmarkScalar(b *testing.B, e ScalarElement, grad bool) {
	vals := make([]float64, e.Len())
	grads := make([][2]float64, e.Len())
	x := [2]float64{0.21, 0.34}
	b.ReportAllocs()
	for b.Loop() {
		if grad {
			e.GradientsTo(grads, x)
		} else {
			e.ValuesTo(vals, x)
		}
	}
	sinkScalar, sinkValues = vals, grads
}

func benchmarkDiv(b *testing.B, e DivElement, div bool) {
	vals := make([][2]float64, e.Len())
	divs := make([]float64, e.Len())
	x := [2]float64{0.21, 0.34}
	b.ReportAllocs()
	for b.Loop() {
		if div {
			e.DivergencesTo(divs, x)
		} else {
			e.ValuesTo(vals, x)
		}
	}
	sinkScalar, sinkValues = divs, vals
}

func mustLagrange(b *testing.B, k int) *Lagrange {
	e, err := NewLagrange(k)
	if err != nil {
		b.Fatal(err)
	}
	return e
}

func mustRT(b *testing.B, k int) *RaviartThomas {
	e, err := NewRaviartThomas(k)
	if err != nil {
		b.Fatal(err)
	}
	return e
}

func mustBDM(b *testing.B, k int) *BDM {
	e, err := NewBDM(k)
	if err != nil {
		b.Fatal(err)
	}
	return e
}

func BenchmarkValuesToLagrange2(b *testing.B)    { benchmarkScalar(b, mustLagrange(b, 2), false) }
func BenchmarkGradientsToLagrange2(b *testing.B) { benchmarkScalar(b, mustLagrange(b, 2), true) }
func BenchmarkValuesToLagrange4(b *testing.B)    { benchmarkScalar(b, mustLagrange(b, 4), false) }
func BenchmarkGradientsToLagrange4(b *testing.B) { benchmarkScalar(b, mustLagrange(b, 4), true) }

func BenchmarkValuesToDiscontinuous3(b *testing.B) {
	e, _ := NewDiscontinuous(3)
	benchmarkScalar(b, e, false)
}

func BenchmarkValuesToRaviartThomas1(b *testing.B)      { benchmarkDiv(b, mustRT(b, 1), false) }
func BenchmarkDivergencesToRaviartThomas1(b *testing.B) { benchmarkDiv(b, mustRT(b, 1), true) }
func BenchmarkValuesToBDM2(b *testing.B)                { benchmarkDiv(b, mustBDM(b, 2), false) }
func BenchmarkDivergencesToBDM2(b *testing.B)           { benchmarkDiv(b, mustBDM(b, 2), true) }
func BenchmarkValuesToBDM4(b *testing.B)                { benchmarkDiv(b, mustBDM(b, 4), false) }

func BenchmarkDofsToBDM2(b *testing.B) {
	e := mustBDM(b, 2)
	dofs := make([]float64, e.Len())
	u := func(x [2]float64) [2]float64 { return [2]float64{x[0] * x[1], 1 - x[0]} }
	b.ReportAllocs()
	for b.Loop() {
		e.DofsTo(dofs, u)
	}
	sinkScalar = dofs
}

func BenchmarkNewBDM3(b *testing.B) {
	b.ReportAllocs()
	for b.Loop() {
		mustBDM(b, 3)
	}
}

func BenchmarkNewTriangleRuleCached8(b *testing.B) {
	b.ReportAllocs()
	var n int
	for b.Loop() {
		r, _ := NewTriangleRule(8)
		n += len(r.Points)
	}
	_ = n
}
