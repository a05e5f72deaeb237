package fem

import (
	"errors"
	"math"
	"sync"
	"testing"
)

// triangleMonomial returns int_T x^a y^b over the reference triangle,
// a! b! / (a+b+2)! (closed form of the Dirichlet integral, common
// practice), evaluated as 1 / ((a+b+1)(a+b+2) binom(a+b, a)).
func triangleMonomial(a, b int) float64 {
	binom := 1.0
	for i := 1; i <= b; i++ {
		binom *= float64(a+i) / float64(i)
	}
	n := float64(a + b)
	return 1 / ((n + 1) * (n + 2) * binom)
}

func TestTriangleMonomialFixture(t *testing.T) {
	const tol = 1e-15
	for _, tc := range []struct {
		a, b int
		want float64
	}{
		{0, 0, 0.5},      // area of the reference triangle
		{1, 0, 1.0 / 6},  // 1!/3!
		{1, 1, 1.0 / 24}, // 1!1!/4!
		{2, 0, 1.0 / 12}, // 2!/4!
		{2, 3, 2.0 * 6 / 5040},
	} {
		if got := triangleMonomial(tc.a, tc.b); math.Abs(got-tc.want) > tol*tc.want {
			t.Errorf("x^%d y^%d: got %v, want %v", tc.a, tc.b, got, tc.want)
		}
	}
}

func TestTriangleRuleMonomials(t *testing.T) {
	// Relative tolerance: positive weights and positive integrands, so
	// only rounding in the sum (about the number of points times eps).
	const tol = 1e-13
	for deg := 0; deg <= MaxQuadratureDegree; deg++ {
		r, err := NewTriangleRule(deg)
		if err != nil {
			t.Fatalf("degree %d: unexpected error %v", deg, err)
		}
		if r.Degree < deg {
			t.Errorf("degree %d: rule reports Degree %d", deg, r.Degree)
		}
		if len(r.Points) != len(r.Weights) {
			t.Fatalf("degree %d: %d points but %d weights", deg, len(r.Points), len(r.Weights))
		}
		for q, x := range r.Points {
			if !(x[0] > 0 && x[1] > 0 && x[0]+x[1] < 1) {
				t.Errorf("degree %d: point %d = %v not interior", deg, q, x)
			}
			if !(r.Weights[q] > 0) {
				t.Errorf("degree %d: weight %d = %v not positive", deg, q, r.Weights[q])
			}
		}
		// Powers x^a and y^b of every point, a, b <= Degree.
		d := r.Degree
		px := make([]float64, len(r.Points)*(d+1))
		py := make([]float64, len(r.Points)*(d+1))
		for q, x := range r.Points {
			px[q*(d+1)], py[q*(d+1)] = 1, 1
			for a := 1; a <= d; a++ {
				px[q*(d+1)+a] = px[q*(d+1)+a-1] * x[0]
				py[q*(d+1)+a] = py[q*(d+1)+a-1] * x[1]
			}
		}
		for n := 0; n <= d; n++ {
			for a := 0; a <= n; a++ {
				b := n - a
				var got float64
				for q := range r.Points {
					got += r.Weights[q] * px[q*(d+1)+a] * py[q*(d+1)+b]
				}
				want := triangleMonomial(a, b)
				if math.Abs(got-want) > tol*want {
					t.Errorf("degree %d rule, x^%d y^%d: got %.17g, want %.17g (rel. error %.2g)",
						deg, a, b, got, want, math.Abs(got-want)/want)
				}
			}
		}
	}
}

func TestTriangleRuleNotExactBeyondDegree(t *testing.T) {
	// The reported Degree is sharp: some monomial of degree Degree+1 is
	// integrated inexactly. This shows that the monomial test above can
	// detect a rule that is too weak.
	const tol = 1e-13
	for _, deg := range []int{1, 2, 3, 5, 7, 9} {
		r, _ := NewTriangleRule(deg)
		n := r.Degree + 1
		exact := true
		for a := 0; a <= n; a++ {
			var got float64
			for q, x := range r.Points {
				got += r.Weights[q] * math.Pow(x[0], float64(a)) * math.Pow(x[1], float64(n-a))
			}
			want := triangleMonomial(a, n-a)
			if math.Abs(got-want) > tol*want {
				exact = false
			}
		}
		if exact {
			t.Errorf("degree %d: rule of reported degree %d is exact at degree %d", deg, r.Degree, n)
		}
	}
}

func TestTriangleRuleErrors(t *testing.T) {
	for _, deg := range []int{-1, MaxQuadratureDegree + 1} {
		_, err := NewTriangleRule(deg)
		var de *DegreeError
		if !errors.As(err, &de) || de.Degree != deg {
			t.Errorf("NewTriangleRule(%d): got error %v, want *DegreeError", deg, err)
		}
		_, err = NewEdgeRule(deg)
		if !errors.As(err, &de) || de.Degree != deg {
			t.Errorf("NewEdgeRule(%d): got error %v, want *DegreeError", deg, err)
		}
	}
}

func TestQuadratureCacheConcurrent(t *testing.T) {
	var wg sync.WaitGroup
	got := make([]TriangleRule, 8)
	for g := range got {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for deg := 0; deg <= 20; deg++ {
				r, err := NewTriangleRule(deg)
				if err != nil {
					t.Errorf("degree %d: %v", deg, err)
					return
				}
				if _, err := NewEdgeRule(deg); err != nil {
					t.Errorf("edge degree %d: %v", deg, err)
					return
				}
				if deg == 20 {
					got[g] = r
				}
			}
		}()
	}
	wg.Wait()
	for g := range got {
		if &got[g].Weights[0] != &got[0].Weights[0] {
			t.Errorf("goroutine %d got a different copy of the cached rule", g)
		}
	}
}

func TestGaussLegendreMonomials(t *testing.T) {
	// int_0^1 x^m dx = 1/(m+1) (closed form).
	const tol = 1e-14
	for n := 1; n <= 30; n++ {
		x, w := GaussLegendre(n)
		for m := 0; m <= 2*n-1; m++ {
			var got float64
			for i := range x {
				got += w[i] * math.Pow(x[i], float64(m))
			}
			want := 1 / float64(m+1)
			if math.Abs(got-want) > tol*want {
				t.Errorf("n=%d, x^%d: got %.17g, want %.17g", n, m, got, want)
			}
		}
	}
}

func TestGaussLegendreClosedForm(t *testing.T) {
	const tol = 1e-15
	s3, s15 := math.Sqrt(3), math.Sqrt(15)
	for _, tc := range []struct {
		n    int
		x, w []float64
	}{
		// Nodes (1 -+ 1/sqrt 3)/2 and 1/2 -+ sqrt(15)/10, weights 1/2 and
		// 5/18, 4/9: the classical rules on [-1,1] mapped to [0,1]
		// (Abramowitz & Stegun, Table 25.4).
		{1, []float64{0.5}, []float64{1}},
		{2, []float64{(1 - 1/s3) / 2, (1 + 1/s3) / 2}, []float64{0.5, 0.5}},
		{3, []float64{0.5 - s15/10, 0.5, 0.5 + s15/10}, []float64{5.0 / 18, 4.0 / 9, 5.0 / 18}},
	} {
		x, w := GaussLegendre(tc.n)
		for i := range tc.x {
			if math.Abs(x[i]-tc.x[i]) > tol || math.Abs(w[i]-tc.w[i]) > tol {
				t.Errorf("n=%d, node %d: got (%v, %v), want (%v, %v)", tc.n, i, x[i], w[i], tc.x[i], tc.w[i])
			}
		}
	}
}

func TestGaussJacobiChebyshev(t *testing.T) {
	// Gauss–Chebyshev rules have closed forms (Abramowitz & Stegun,
	// Section 25.4): for (1-x^2)^(-1/2) the nodes are
	// cos((2i-1) pi / 2n) with weights pi/n; for (1-x^2)^(1/2) the nodes
	// are cos(i pi/(n+1)) with weights pi/(n+1) sin^2(i pi/(n+1)).
	const (
		tolX = 2e-15 // absolute, nodes
		// relative, weights: a one-ulp node error changes the
		// Christoffel number near the endpoints by up to a few 1e-14
		// for this singular weight (n >= 22).
		tolW = 3e-14
	)
	for n := 1; n <= 25; n++ {
		x, w := GaussJacobi(n, -0.5, -0.5)
		for i := 1; i <= n; i++ {
			wantX := -math.Cos(float64(2*i-1) * math.Pi / float64(2*n))
			wantW := math.Pi / float64(n)
			if math.Abs(x[i-1]-wantX) > tolX || math.Abs(w[i-1]-wantW) > tolW*wantW {
				t.Errorf("first kind, n=%d, node %d: got (%.17g, %.17g), want (%.17g, %.17g)",
					n, i, x[i-1], w[i-1], wantX, wantW)
			}
		}
		x, w = GaussJacobi(n, 0.5, 0.5)
		for i := 1; i <= n; i++ {
			th := float64(i) * math.Pi / float64(n+1)
			wantX := -math.Cos(th)
			wantW := math.Pi / float64(n+1) * math.Sin(th) * math.Sin(th)
			if math.Abs(x[i-1]-wantX) > tolX || math.Abs(w[i-1]-wantW) > tolW*wantW {
				t.Errorf("second kind, n=%d, node %d: got (%.17g, %.17g), want (%.17g, %.17g)",
					n, i, x[i-1], w[i-1], wantX, wantW)
			}
		}
	}
}

func TestGaussJacobiMoments(t *testing.T) {
	// int_{-1}^{1} (1-x)^a (1+x)^b ((1+x)/2)^m dx
	//   = 2^(a+b+1) B(a+1, b+m+1)  (closed form, Beta integral).
	const tol = 1e-13
	beta := func(p, q float64) float64 {
		lp, _ := math.Lgamma(p)
		lq, _ := math.Lgamma(q)
		lpq, _ := math.Lgamma(p + q)
		return math.Exp(lp + lq - lpq)
	}
	for _, ab := range [][2]float64{{0, 0}, {1, 0}, {2, 0}, {0, 1}, {3, 1.5}, {0.5, -0.5}, {-0.7, 4}} {
		a, b := ab[0], ab[1]
		for n := 1; n <= 20; n++ {
			x, w := GaussJacobi(n, a, b)
			for m := 0; m <= 2*n-1; m++ {
				var got float64
				for i := range x {
					got += w[i] * math.Pow((1+x[i])/2, float64(m))
				}
				want := math.Pow(2, a+b+1) * beta(a+1, b+float64(m)+1)
				if math.Abs(got-want) > tol*want {
					t.Errorf("alpha=%v beta=%v n=%d m=%d: got %.17g, want %.17g", a, b, n, m, got, want)
				}
			}
		}
	}
}

func TestEdgeRule(t *testing.T) {
	const tol = 1e-14
	for deg := 0; deg <= MaxQuadratureDegree; deg++ {
		r, err := NewEdgeRule(deg)
		if err != nil {
			t.Fatalf("degree %d: %v", deg, err)
		}
		if r.Degree < deg {
			t.Errorf("degree %d: rule reports Degree %d", deg, r.Degree)
		}
		for m := 0; m <= r.Degree; m++ {
			var got float64
			for q, s := range r.Points {
				got += r.Weights[q] * math.Pow(s, float64(m))
			}
			if want := 1 / float64(m+1); math.Abs(got-want) > tol*want {
				t.Errorf("degree %d, s^%d: got %v, want %v", deg, m, got, want)
			}
		}
	}
}

func BenchmarkGaussJacobiPoints20(b *testing.B) {
	b.ReportAllocs()
	var sink float64
	for b.Loop() {
		x, _ := GaussJacobi(20, 1, 0)
		sink += x[0]
	}
	_ = sink
}
