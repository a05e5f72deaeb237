package fem_test

import (
	"fmt"
	"math"

	"mixwell/fem"
)

func ExampleNewTriangleRule() {
	// Integrate x^2 y over the reference triangle: 2! 1! / 5! = 1/60.
	r, err := fem.NewTriangleRule(3)
	if err != nil {
		panic(err)
	}
	var sum float64
	for q, x := range r.Points {
		sum += r.Weights[q] * x[0] * x[0] * x[1]
	}
	fmt.Printf("points %d, degree %d, integral %.15f (1/60 = %.15f)\n", len(r.Points), r.Degree, sum, 1.0/60)
	// Output:
	// points 4, degree 3, integral 0.016666666666667 (1/60 = 0.016666666666667)
}

func ExampleGaussLegendre() {
	x, w := fem.GaussLegendre(2)
	fmt.Printf("nodes %.6f %.6f, weights %.1f %.1f\n", x[0], x[1], w[0], w[1])
	// Output:
	// nodes 0.211325 0.788675, weights 0.5 0.5
}

func ExampleGaussJacobi() {
	// Gauss–Chebyshev: weight (1-x^2)^(-1/2), nodes cos((2i-1) pi / 2n).
	x, w := fem.GaussJacobi(3, -0.5, -0.5)
	for i := range x {
		fmt.Printf("%.6f %.6f\n", x[i], w[i]/math.Pi)
	}
	// Output:
	// -0.866025 0.333333
	// 0.000000 0.333333
	// 0.866025 0.333333
}

func ExampleDubinerValuesTo() {
	// The constant of the orthonormal basis is sqrt 2, since the
	// reference triangle has area 1/2; the linear functions are
	// 2 sqrt 3 (2x+y-1) and 2 (3y-1).
	psi := make([]float64, fem.PolyDim(1))
	fem.DubinerValuesTo(psi, 1, [2]float64{0.25, 0.25})
	fmt.Printf("%.6f %.6f %.6f\n", psi[0], psi[1], psi[2])
	// Output:
	// 1.414214 -0.866025 -0.500000
}

func ExampleNewLagrange() {
	e, err := fem.NewLagrange(2)
	if err != nil {
		panic(err)
	}
	for i, x := range e.Nodes() {
		fmt.Println(x, e.Entities()[i])
	}
	// Output:
	// [0 0] {0 0 0}
	// [1 0] {0 1 0}
	// [0 1] {0 2 0}
	// [0.5 0.5] {1 0 0}
	// [0 0.5] {1 1 0}
	// [0.5 0] {1 2 0}
}

func ExampleNewRaviartThomas() {
	// The lowest-order Raviart–Thomas functions on the reference
	// triangle, evaluated at the centroid, and their divergences.
	e, err := fem.NewRaviartThomas(0)
	if err != nil {
		panic(err)
	}
	x := [2]float64{1.0 / 3, 1.0 / 3}
	vals := make([][2]float64, e.Len())
	divs := make([]float64, e.Len())
	e.ValuesTo(vals, x)
	e.DivergencesTo(divs, x)
	for i := range vals {
		fmt.Printf("(%.4f, %.4f) div %.4f\n", vals[i][0], vals[i][1], divs[i])
	}
	// Output:
	// (0.3333, 0.3333) div 2.0000
	// (-0.6667, 0.3333) div 2.0000
	// (0.3333, -0.6667) div 2.0000
}

func ExampleNewBDM() {
	e, err := fem.NewBDM(2)
	if err != nil {
		panic(err)
	}
	// Interpolate a field of P_2^2 and evaluate it back: exact.
	u := func(x [2]float64) [2]float64 { return [2]float64{x[0] * x[1], 1 - x[0]*x[0]} }
	dofs := make([]float64, e.Len())
	e.DofsTo(dofs, u)
	vals := make([][2]float64, e.Len())
	x := [2]float64{0.2, 0.5}
	e.ValuesTo(vals, x)
	var v [2]float64
	for i, d := range dofs {
		v[0] += d * vals[i][0]
		v[1] += d * vals[i][1]
	}
	fmt.Printf("len %d, interpolant (%.6f, %.6f), field (%.6f, %.6f)\n", e.Len(), v[0], v[1], u(x)[0], u(x)[1])
	// Output:
	// len 12, interpolant (0.100000, 0.960000), field (0.100000, 0.960000)
}

func ExampleTabulate() {
	r, err := fem.NewTriangleRule(2)
	if err != nil {
		panic(err)
	}
	e, err := fem.NewLagrange(1)
	if err != nil {
		panic(err)
	}
	tab := fem.Tabulate(e, r.Points)
	fmt.Printf("%.4f\n", tab.ValuesAt(0))
	for _, g := range tab.GradientsAt(0) {
		// Round away signs of zero so the output is portable.
		fmt.Printf("(%.4f, %.4f) ", math.Round(g[0]*1e4)/1e4+0, math.Round(g[1]*1e4)/1e4+0)
	}
	fmt.Println()
	// Output:
	// [0.6667 0.1667 0.1667]
	// (-1.0000, -1.0000) (1.0000, 0.0000) (0.0000, 1.0000)
}
