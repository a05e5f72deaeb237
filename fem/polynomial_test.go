package fem

import (
	"math"
	"math/rand/v2"
	"testing"
)

// randomTrianglePoint returns a uniformly distributed point of the reference
// triangle.
func randomTrianglePoint(rnd *rand.Rand) [2]float64 {
	x, y := rnd.Float64(), rnd.Float64()
	if x+y > 1 {
		x, y = 1-x, 1-y
	}
	return [2]float64{x, y}
}

// testPoints returns the vertices, edge midpoints, the centroid, two points
// outside the triangle (the basis is a polynomial everywhere) and n random
// interior points.
func testPoints(rnd *rand.Rand, n int) [][2]float64 {
	pts := [][2]float64{
		{0, 0}, {1, 0}, {0, 1}, {0.5, 0.5}, {0, 0.5}, {0.5, 0}, {1.0 / 3, 1.0 / 3},
		{-0.2, 1.1}, {0.7, 0.6},
	}
	for i := 0; i < n; i++ {
		pts = append(pts, randomTrianglePoint(rnd))
	}
	return pts
}

func TestDubinerOrthonormal(t *testing.T) {
	const tol = 1e-13
	for k := 0; k <= 16; k++ {
		r, err := NewTriangleRule(2 * k)
		if err != nil {
			t.Fatal(err)
		}
		n := PolyDim(k)
		gram := make([]float64, n*n)
		psi := make([]float64, n)
		for q, x := range r.Points {
			DubinerValuesTo(psi, k, x)
			for i := range psi {
				for j := range psi {
					gram[i*n+j] += r.Weights[q] * psi[i] * psi[j]
				}
			}
		}
		var worst float64
		for i := 0; i < n; i++ {
			for j := 0; j < n; j++ {
				want := 0.0
				if i == j {
					want = 1
				}
				worst = math.Max(worst, math.Abs(gram[i*n+j]-want))
			}
		}
		if worst > tol {
			t.Errorf("degree %d: max |G - I| = %.3g, want <= %g", k, worst, tol)
		}
	}
}

func TestDubinerClosedForm(t *testing.T) {
	// Low-degree functions from the defining formula (our own
	// derivation): psi_00 = sqrt 2, psi_10 = 2 sqrt 3 (2x+y-1),
	// psi_01 = 2 (3y-1), psi_20 = sqrt 30 ((2x+y-1)^2 * 3/2 - (1-y)^2/2).
	const tol = 1e-14
	rnd := rand.New(rand.NewPCG(1, 2))
	for _, x := range testPoints(rnd, 10) {
		s, b := 2*x[0]+x[1]-1, 1-x[1]
		want := map[[2]int]float64{
			{0, 0}: math.Sqrt2,
			{1, 0}: 2 * math.Sqrt(3) * s,
			{0, 1}: 2 * (3*x[1] - 1),
			{2, 0}: math.Sqrt(30) * (1.5*s*s - 0.5*b*b),
		}
		psi := make([]float64, PolyDim(2))
		DubinerValuesTo(psi, 2, x)
		for pq, w := range want {
			if got := psi[DubinerIndex(pq[0], pq[1])]; math.Abs(got-w) > tol*(1+math.Abs(w)) {
				t.Errorf("psi_%d%d(%v): got %v, want %v", pq[0], pq[1], x, got, w)
			}
		}
	}
}

func TestDubinerHierarchical(t *testing.T) {
	// The basis of degree k is the prefix of the basis of degree k+1.
	const tol = 0 // the same recurrence, so identical results
	rnd := rand.New(rand.NewPCG(3, 4))
	for _, x := range testPoints(rnd, 5) {
		big := make([]float64, PolyDim(12))
		DubinerValuesTo(big, 12, x)
		for k := 0; k < 12; k++ {
			small := make([]float64, PolyDim(k))
			DubinerValuesTo(small, k, x)
			for i := range small {
				if math.Abs(small[i]-big[i]) > tol {
					t.Errorf("x=%v, k=%d, i=%d: got %v, want %v", x, k, i, small[i], big[i])
				}
			}
		}
	}
}

// polyDerivative returns the derivative at x along dir of f, a polynomial
// of degree at most deg along lines: f is interpolated at 2m Chebyshev
// extreme points (m chosen so that 2m-1 >= deg) on the segment x + t dir,
// t in [-r, r], and the interpolant is differentiated exactly at t = 0 (not
// a node) with the barycentric derivative formula (Berrut & Trefethen,
// Barycentric Lagrange interpolation, SIAM Review 46 (2004) 501–517). No
// truncation error: only rounding, amplified by about deg^2/r.
func polyDerivative(f func([2]float64) float64, x, dir [2]float64, deg int, r float64) float64 {
	n := deg + 1
	if n%2 == 0 {
		n++ // an odd index range keeps t = 0 off the nodes
	}
	var num, den, p float64
	ts := make([]float64, n+1)
	ws := make([]float64, n+1)
	fs := make([]float64, n+1)
	for i := 0; i <= n; i++ {
		ts[i] = r * math.Cos(float64(i)*math.Pi/float64(n))
		ws[i] = 1
		if i%2 == 1 {
			ws[i] = -1
		}
		if i == 0 || i == n {
			ws[i] /= 2
		}
		fs[i] = f([2]float64{x[0] + ts[i]*dir[0], x[1] + ts[i]*dir[1]})
	}
	for i := range ts {
		c := ws[i] / (0 - ts[i])
		num += c * fs[i]
		den += c
	}
	p = num / den
	num = 0
	for i := range ts {
		c := ws[i] / (0 - ts[i])
		num += c * (p - fs[i]) / (0 - ts[i])
	}
	return num / den
}

func TestPolyDerivativeFixture(t *testing.T) {
	// d/dx of x^5 y^2 at (0.3, 0.7) is 5 x^4 y^2 (closed form).
	const tol = 1e-13
	f := func(z [2]float64) float64 { return math.Pow(z[0], 5) * z[1] * z[1] }
	got := polyDerivative(f, [2]float64{0.3, 0.7}, [2]float64{1, 0}, 7, 0.5)
	want := 5 * math.Pow(0.3, 4) * 0.49
	if math.Abs(got-want) > tol {
		t.Errorf("got %v, want %v", got, want)
	}
}

func TestDubinerGradients(t *testing.T) {
	// Independent check: exact differentiation of the values along lines
	// (polyDerivative). The collapsed vertex (0,1) is among the points;
	// the lines leave the triangle there, which is fine for polynomials.
	const tol = 1e-10 // relative to the largest value on the lines
	rnd := rand.New(rand.NewPCG(5, 6))
	for _, k := range []int{0, 1, 2, 5, 9, 12} {
		n := PolyDim(k)
		grad := make([][2]float64, n)
		psi := make([]float64, n)
		for _, x := range testPoints(rnd, 10) {
			DubinerGradientsTo(grad, k, x)
			for i := 0; i < n; i++ {
				var scale float64
				f := func(z [2]float64) float64 {
					DubinerValuesTo(psi, k, z)
					scale = math.Max(scale, math.Abs(psi[i]))
					return psi[i]
				}
				want := [2]float64{
					polyDerivative(f, x, [2]float64{1, 0}, k, 0.5),
					polyDerivative(f, x, [2]float64{0, 1}, k, 0.5),
				}
				for c := 0; c < 2; c++ {
					if math.Abs(grad[i][c]-want[c]) > tol*(1+scale) {
						t.Errorf("k=%d, i=%d, x=%v, component %d: got %.15g, want %.15g", k, i, x, c, grad[i][c], want[c])
					}
				}
			}
		}
	}
}

func TestDubinerGradientAtCollapsedVertex(t *testing.T) {
	// At the collapsed vertex (0,1), where s = 2x+y-1 = 0 and b = 1-y = 0,
	// Q_p = b^p P_p(s/b) has zero gradient for p >= 2 (every term has
	// degree p >= 2 in s, b), and Q_1 = s has gradient (2,1). With
	// P_q^(a,0)(1) = binom(q+a, q) (Abramowitz & Stegun, Chapter 22) the
	// gradient of psi_1q at (0,1) is sqrt(6 (q+2)) binom(q+3, q) (2,1)
	// (our own derivation from the defining formula).
	const tol = 1e-12 // relative
	const k = 12
	g := make([][2]float64, PolyDim(k))
	DubinerGradientsTo(g, k, [2]float64{0, 1})
	for p := 1; p <= k; p++ {
		for q := 0; p+q <= k; q++ {
			var want [2]float64
			if p == 1 {
				binom := float64((q + 1) * (q + 2) * (q + 3) / 6)
				c := math.Sqrt(6*float64(q+2)) * binom
				want = [2]float64{2 * c, c}
			}
			got := g[DubinerIndex(p, q)]
			scale := 1 + math.Abs(want[0])
			if math.Abs(got[0]-want[0]) > tol*scale || math.Abs(got[1]-want[1]) > tol*scale {
				t.Errorf("psi_%d,%d: got %v, want %v", p, q, got, want)
			}
		}
	}
}

func TestLegendreUnit(t *testing.T) {
	// L_j(1) = 1, L_j(0) = (-1)^j and int_0^1 L_i L_j = delta_ij/(2j+1)
	// (closed forms for the shifted Legendre polynomials).
	const tol = 1e-14
	const k = 15
	l := make([]float64, k+1)
	legendreUnitTo(l, 1)
	for j, v := range l {
		if math.Abs(v-1) > tol {
			t.Errorf("L_%d(1) = %v, want 1", j, v)
		}
	}
	legendreUnitTo(l, 0)
	for j, v := range l {
		want := 1.0
		if j%2 == 1 {
			want = -1
		}
		if math.Abs(v-want) > tol {
			t.Errorf("L_%d(0) = %v, want %v", j, v, want)
		}
	}
	x, w := GaussLegendre(k + 1)
	gram := make([]float64, (k+1)*(k+1))
	for q := range x {
		legendreUnitTo(l, x[q])
		for i := range l {
			for j := range l {
				gram[i*(k+1)+j] += w[q] * l[i] * l[j]
			}
		}
	}
	for i := 0; i <= k; i++ {
		for j := 0; j <= k; j++ {
			want := 0.0
			if i == j {
				want = 1 / float64(2*j+1)
			}
			if math.Abs(gram[i*(k+1)+j]-want) > tol {
				t.Errorf("int L_%d L_%d = %v, want %v", i, j, gram[i*(k+1)+j], want)
			}
		}
	}
}

func BenchmarkDubinerValuesToDegree6(b *testing.B) {
	dst := make([]float64, PolyDim(6))
	x := [2]float64{0.2, 0.3}
	b.ReportAllocs()
	for b.Loop() {
		DubinerValuesTo(dst, 6, x)
	}
	sinkFloat = dst[0]
}

func BenchmarkDubinerGradientsToDegree6(b *testing.B) {
	dst := make([][2]float64, PolyDim(6))
	x := [2]float64{0.2, 0.3}
	b.ReportAllocs()
	for b.Loop() {
		DubinerGradientsTo(dst, 6, x)
	}
	sinkFloat = dst[0][0]
}

var sinkFloat float64

func TestScratchBound(t *testing.T) {
	// Element evaluation uses stack arrays of maxScalarLen entries: the
	// largest Dubiner basis any element evaluates must fit.
	for _, tc := range []struct {
		name string
		deg  int
	}{
		{"Lagrange", MaxLagrangeDegree},
		{"Raviart–Thomas", MaxRaviartThomasIndex + 1},
		{"BDM", MaxBDMDegree},
	} {
		if n := PolyDim(tc.deg); n > maxScalarLen {
			t.Errorf("%s: PolyDim(%d) = %d exceeds maxScalarLen = %d", tc.name, tc.deg, n, maxScalarLen)
		}
	}
}
