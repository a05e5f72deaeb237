package fem

// Quadrature on the reference interval and the reference triangle.
//
// Gauss–Jacobi rules are computed by the Golub–Welsch method: the nodes are
// the eigenvalues of the symmetric tridiagonal Jacobi matrix of the
// three-term recurrence (Golub & Welsch, Calculation of Gauss quadrature
// rules, Math. Comp. 23 (1969) 221–230). Each node is then polished by Newton
// steps on the orthonormal recurrence, and the weights are taken as
// Christoffel numbers w = 1 / sum_{j<n} p_j(x)^2 of the orthonormal
// polynomials (Gautschi, Orthogonal Polynomials: Computation and
// Approximation, Oxford 2004, Chapters 1 and 3), which is accurate to a
// few units in the last place and keeps every weight positive.
//
// Rules on the reference triangle (0,0), (1,0), (0,1) are, for low degree,
// fully symmetric rules with positive weights and interior points, and
// otherwise collapsed (conical product) rules: Gauss–Legendre in the
// collapsed coordinate xi = (2x+y-1)/(1-y) times Gauss–Jacobi with weight
// (1-t)^1 in t = 2y-1, which absorbs the Jacobian of the collapse (Stroud,
// Approximate Calculation of Multiple Integrals, 1971, conical product
// formulas; Duffy, SIAM J. Numer. Anal. 19 (1982) 1260–1262; Karniadakis &
// Sherwin, Spectral/hp Element Methods for CFD, 2nd ed. 2005, Chapter 4). Rules are cached per degree and shared; the cache is safe for
// concurrent use.

import (
	"fmt"
	"math"
	"sort"
	"sync"

	"gonum.org/v1/gonum/mat"
)

// MaxQuadratureDegree is the largest polynomial degree for which
// NewEdgeRule and NewTriangleRule build a rule.
const MaxQuadratureDegree = 60

// GaussJacobi returns the nodes x (ascending) and positive weights w of the
// n-point Gauss–Jacobi rule on [-1,1] for the weight (1-x)^alpha (1+x)^beta:
//
//	int_{-1}^{1} (1-x)^alpha (1+x)^beta f(x) dx = sum_i w[i] f(x[i])
//
// for every polynomial f of degree at most 2n-1. It panics if n < 1 or if
// alpha or beta is not greater than -1. The slices are newly allocated.
func GaussJacobi(n int, alpha, beta float64) (x, w []float64) {
	if n < 1 {
		panic("fem: GaussJacobi needs at least one node")
	}
	if !(alpha > -1) || !(beta > -1) {
		panic("fem: GaussJacobi needs alpha, beta > -1")
	}
	ab := alpha + beta
	// Recurrence coefficients of the monic Jacobi polynomials
	// pi_{j+1} = (x - a_j) pi_j - b_j pi_{j-1} (Gautschi 2004, Chapter 1).
	a := make([]float64, n)
	sb := make([]float64, n+1) // sb[j] = sqrt(b_j), j = 1..n
	a[0] = (beta - alpha) / (ab + 2)
	for j := 1; j < n; j++ {
		fj := float64(j)
		a[j] = (beta*beta - alpha*alpha) / ((2*fj + ab) * (2*fj + ab + 2))
	}
	for j := 1; j <= n; j++ {
		fj := float64(j)
		var bj float64
		if j == 1 {
			// The general formula has the factor (1+alpha+beta) in
			// numerator and denominator; cancel it (it vanishes for
			// alpha+beta = -1).
			bj = 4 * (1 + alpha) * (1 + beta) / ((2 + ab) * (2 + ab) * (3 + ab))
		} else {
			bj = 4 * fj * (fj + alpha) * (fj + beta) * (fj + ab) /
				((2*fj + ab) * (2*fj + ab) * (2*fj + ab + 1) * (2*fj + ab - 1))
		}
		sb[j] = math.Sqrt(bj)
	}
	mu0 := math.Pow(2, ab+1) * math.Gamma(alpha+1) * math.Gamma(beta+1) / math.Gamma(ab+2)

	x = make([]float64, n)
	if n == 1 {
		x[0] = a[0]
	} else {
		jm := mat.NewSymDense(n, nil)
		for j := 0; j < n; j++ {
			jm.SetSym(j, j, a[j])
			if j+1 < n {
				jm.SetSym(j, j+1, sb[j+1])
			}
		}
		var eig mat.EigenSym
		if !eig.Factorize(jm, false) {
			panic("fem: Gauss–Jacobi eigenvalue computation did not converge")
		}
		eig.Values(x)
		sort.Float64s(x)
	}

	// p evaluates the orthonormal p_n, its derivative, and sum_{j<n} p_j^2.
	p := func(z float64) (pn, dpn, sum float64) {
		pm, dpm := 0.0, 0.0
		pc, dpc := 1/math.Sqrt(mu0), 0.0
		for j := 0; j < n; j++ {
			sum += pc * pc
			pnext := ((z-a[j])*pc - sb[j]*pm) / sb[j+1]
			dnext := (pc + (z-a[j])*dpc - sb[j]*dpm) / sb[j+1]
			pm, dpm = pc, dpc
			pc, dpc = pnext, dnext
		}
		return pc, dpc, sum
	}
	w = make([]float64, n)
	for i := range x {
		// Newton polish; the eigenvalue is already accurate to about
		// machine precision, so reject any step that is not tiny.
		for it := 0; it < 2; it++ {
			pn, dpn, _ := p(x[i])
			if dpn == 0 {
				break
			}
			dx := pn / dpn
			if math.Abs(dx) > 1e-8 {
				break
			}
			x[i] -= dx
		}
		_, _, sum := p(x[i])
		w[i] = 1 / sum
	}
	if alpha == beta {
		// Enforce the exact symmetry of the rule.
		for i := 0; i < n/2; i++ {
			j := n - 1 - i
			xs := (x[j] - x[i]) / 2
			ws := (w[i] + w[j]) / 2
			x[i], x[j] = -xs, xs
			w[i], w[j] = ws, ws
		}
		if n%2 == 1 {
			x[n/2] = 0
		}
	}
	return x, w
}

// GaussLegendre returns the nodes x (ascending) and positive weights w of the
// n-point Gauss–Legendre rule on [0,1], exact for polynomials of degree at
// most 2n-1; the weights sum to 1. It panics if n < 1. The slices are newly
// allocated.
func GaussLegendre(n int) (x, w []float64) {
	x, w = GaussJacobi(n, 0, 0)
	for i := range x {
		x[i] = (1 + x[i]) / 2
		w[i] /= 2
	}
	// Nodes mirrored about 1/2 stay exactly symmetric.
	for i := 0; i < n/2; i++ {
		x[n-1-i] = 1 - x[i]
	}
	return x, w
}

// EdgeRule is a quadrature rule on the reference interval [0,1], used on
// triangle edges through the edge parametrisation x(s) = a + s (b - a):
//
//	int_0^1 f(s) ds ~ sum_q Weights[q] f(Points[q]).
//
// Rules returned by NewEdgeRule are shared by all callers and must not be
// modified.
type EdgeRule struct {
	// Points are the nodes in (0,1), ascending.
	Points []float64
	// Weights are positive and sum to 1.
	Weights []float64
	// Degree is the largest degree d such that the rule is exact for all
	// polynomials of degree at most d.
	Degree int
}

// TriangleRule is a quadrature rule on the reference triangle with vertices
// (0,0), (1,0), (0,1):
//
//	int_T f dx ~ sum_q Weights[q] f(Points[q]).
//
// Rules returned by NewTriangleRule are shared by all callers and must not be
// modified.
type TriangleRule struct {
	// Points lie in the interior of the reference triangle.
	Points [][2]float64
	// Weights are positive and sum to 1/2, the area of the triangle.
	Weights []float64
	// Degree is the largest total degree d such that the rule is exact for
	// all polynomials of total degree at most d (at least the degree asked
	// for).
	Degree int
}

// DegreeError reports a quadrature degree outside [0, MaxQuadratureDegree].
type DegreeError struct {
	// Rule names the kind of rule ("edge" or "triangle").
	Rule string
	// Degree is the degree asked for.
	Degree int
}

// Error implements the error interface.
func (e *DegreeError) Error() string {
	return fmt.Sprintf("fem: %s quadrature of degree %d not available (want 0..%d)", e.Rule, e.Degree, MaxQuadratureDegree)
}

var quadratureCache struct {
	sync.Mutex
	edge map[int]EdgeRule
	tri  map[int]TriangleRule
}

// NewEdgeRule returns the Gauss–Legendre rule on [0,1] with the fewest points
// that is exact for polynomials of degree at most degree. Rules are computed
// once per degree and shared; NewEdgeRule is safe for concurrent use. It
// returns a *DegreeError if degree is negative or above MaxQuadratureDegree.
func NewEdgeRule(degree int) (EdgeRule, error) {
	if degree < 0 || degree > MaxQuadratureDegree {
		return EdgeRule{}, &DegreeError{Rule: "edge", Degree: degree}
	}
	c := &quadratureCache
	c.Lock()
	defer c.Unlock()
	if r, ok := c.edge[degree]; ok {
		return r, nil
	}
	n := degree/2 + 1
	x, w := GaussLegendre(n)
	r := EdgeRule{Points: x, Weights: w, Degree: 2*n - 1}
	if c.edge == nil {
		c.edge = make(map[int]EdgeRule)
	}
	c.edge[degree] = r
	return r, nil
}

// NewTriangleRule returns a rule on the reference triangle exact for all
// polynomials of total degree at most degree, with positive weights and
// interior points. Degrees 0 and 1 use the centroid, degree 2 the symmetric
// three-point rule, degrees 4 and 5 Radon's symmetric seven-point rule; all
// other degrees use the collapsed Gauss–Jacobi product rule with n^2 points,
// n = degree/2 + 1. Rules are computed once per degree and shared;
// NewTriangleRule is safe for concurrent use. It returns a *DegreeError if
// degree is negative or above MaxQuadratureDegree.
func NewTriangleRule(degree int) (TriangleRule, error) {
	if degree < 0 || degree > MaxQuadratureDegree {
		return TriangleRule{}, &DegreeError{Rule: "triangle", Degree: degree}
	}
	c := &quadratureCache
	c.Lock()
	defer c.Unlock()
	if r, ok := c.tri[degree]; ok {
		return r, nil
	}
	var r TriangleRule
	switch degree {
	case 0, 1:
		r = TriangleRule{
			Points:  [][2]float64{{1.0 / 3, 1.0 / 3}},
			Weights: []float64{0.5},
			Degree:  1,
		}
	case 2:
		r = triangleRule2()
	case 4, 5:
		r = triangleRule5()
	default:
		r = collapsedTriangleRule(degree/2 + 1)
	}
	if c.tri == nil {
		c.tri = make(map[int]TriangleRule)
	}
	c.tri[degree] = r
	return r, nil
}

// triangleRule2 is the symmetric three-point rule of degree 2 with the
// points (1/6,1/6), (2/3,1/6), (1/6,2/3) and equal weights (Strang & Fix, An
// Analysis of the Finite Element Method, 1973).
func triangleRule2() TriangleRule {
	return TriangleRule{
		Points:  [][2]float64{{1.0 / 6, 1.0 / 6}, {2.0 / 3, 1.0 / 6}, {1.0 / 6, 2.0 / 3}},
		Weights: []float64{1.0 / 6, 1.0 / 6, 1.0 / 6},
		Degree:  2,
	}
}

// triangleRule5 is Radon's symmetric seven-point rule of degree 5 (Radon,
// Zur mechanischen Kubatur, Monatsh. Math. 52 (1948) 286–300; Stroud 1971,
// formula T2:5-1): the centroid with weight 9/40 and two orbits of three
// points (a, a), (1-2a, a), (a, 1-2a) with a = (6 -+ sqrt 15)/21 and weights
// (155 -+ sqrt 15)/1200, all relative to the area.
func triangleRule5() TriangleRule {
	s15 := math.Sqrt(15)
	r := TriangleRule{Degree: 5}
	add := func(a, w float64) {
		r.Points = append(r.Points, [2]float64{a, a}, [2]float64{1 - 2*a, a}, [2]float64{a, 1 - 2*a})
		r.Weights = append(r.Weights, w/2, w/2, w/2)
	}
	r.Points = append(r.Points, [2]float64{1.0 / 3, 1.0 / 3})
	r.Weights = append(r.Weights, 9.0/80)
	add((6-s15)/21, (155-s15)/1200)
	add((6+s15)/21, (155+s15)/1200)
	return r
}

// collapsedTriangleRule returns the n by n collapsed product rule, exact for
// total degree 2n-1: with Gauss–Legendre (xi_i, u_i) and Gauss–Jacobi
// (t_j, v_j) for the weight (1-t) on [-1,1],
//
//	y = (1+t_j)/2,  x = (1+xi_i)/2 (1-y),  weight u_i v_j / 8,
//
// since dx dy = (1-t)/8 dxi dt.
func collapsedTriangleRule(n int) TriangleRule {
	xi, u := GaussJacobi(n, 0, 0)
	t, v := GaussJacobi(n, 1, 0)
	r := TriangleRule{
		Points:  make([][2]float64, 0, n*n),
		Weights: make([]float64, 0, n*n),
		Degree:  2*n - 1,
	}
	for j := range t {
		y := (1 + t[j]) / 2
		for i := range xi {
			r.Points = append(r.Points, [2]float64{(1 + xi[i]) / 2 * (1 - y), y})
			r.Weights = append(r.Weights, u[i]*v[j]/8)
		}
	}
	return r
}
