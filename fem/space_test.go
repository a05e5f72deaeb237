package fem

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"mixwell/mesh"
)

// randomMesh returns a perturbed 4x3 mesh of [0,1.3]x[0,1] whose triangles
// have randomly permuted local vertex order (about half clockwise), so edges
// are met in both directions and with both signs of det J.
func randomMesh(t *testing.T, seed uint64) *mesh.Mesh {
	t.Helper()
	rng := rand.New(rand.NewPCG(seed, 17))
	m, err := mesh.Rectangle(0, 0, 1.3, 1, 4, 3, mesh.AlternatingDiagonal)
	if err != nil {
		t.Fatal(err)
	}
	m, err = mesh.Perturb(m, 0.25, rng)
	if err != nil {
		t.Fatal(err)
	}
	return m.PermuteLocalVertices(rng)
}

// sidePoints returns, for an interior edge e, points along it and their
// reference coordinates in both adjacent triangles.
func sidePoints(m *mesh.Mesh, e int, ss []float64) (x [][2]float64, r0, r1 [][2]float64) {
	p, q := m.Points[m.Edges[e][0]], m.Points[m.Edges[e][1]]
	a0 := ElementMap(m, m.EdgeTriangles[e][0])
	a1 := ElementMap(m, m.EdgeTriangles[e][1])
	for _, s := range ss {
		pt := [2]float64{p[0] + s*(q[0]-p[0]), p[1] + s*(q[1]-p[1])}
		x = append(x, pt)
		r0 = append(r0, a0.Reference(pt))
		r1 = append(r1, a1.Reference(pt))
	}
	return
}

func TestNormalContinuityDivSpaces(t *testing.T) {
	// H(div) conformity: the normal component of every field in an RT or BDM
	// space is continuous across interior edges (Boffi, Brezzi & Fortin
	// 2013, sec. 2.3). Checked with random coefficients on a perturbed mesh
	// with mixed local orientations.
	const tol = 1e-11
	m := randomMesh(t, 1)
	ss := []float64{0.1, 0.37, 0.5, 0.81}
	rng := rand.New(rand.NewPCG(2, 3))
	type ctor struct {
		name string
		make func(k int) (DivElement, error)
		ks   []int
	}
	for _, c := range []ctor{
		{"RT", func(k int) (DivElement, error) { return NewRaviartThomas(k) }, []int{0, 1, 2, 3, 4, 5}},
		{"BDM", func(k int) (DivElement, error) { return NewBDM(k) }, []int{1, 2, 3, 4, 5, 6}},
	} {
		for _, k := range c.ks {
			el, err := c.make(k)
			if err != nil {
				t.Fatal(err)
			}
			s := NewDivSpace(m, el)
			coef := make([]float64, s.Len())
			for i := range coef {
				coef[i] = rng.NormFloat64()
			}
			var worst, scale float64
			for e := range m.Edges {
				if m.EdgeTriangles[e][1] < 0 {
					continue
				}
				p, q := m.Points[m.Edges[e][0]], m.Points[m.Edges[e][1]]
				n := [2]float64{q[1] - p[1], -(q[0] - p[0])}
				xs, r0, r1 := sidePoints(m, e, ss)
				for i := range xs {
					u0, _ := DivAt(s, coef, m.EdgeTriangles[e][0], r0[i])
					u1, _ := DivAt(s, coef, m.EdgeTriangles[e][1], r1[i])
					jump := (u0[0]-u1[0])*n[0] + (u0[1]-u1[1])*n[1]
					worst = math.Max(worst, math.Abs(jump))
					scale = math.Max(scale, math.Abs(u0[0]*n[0]+u0[1]*n[1]))
				}
			}
			if worst > tol*scale {
				t.Errorf("%s_%d: largest normal jump %.3g, scale %.3g", c.name, k, worst, scale)
			}
		}
	}
}

func TestLagrangeContinuity(t *testing.T) {
	// C0 conformity of Lagrange spaces (common practice): the value of a
	// random field agrees from both sides of every interior edge.
	const tol = 1e-12
	m := randomMesh(t, 5)
	ss := []float64{0.13, 0.5, 0.77}
	rng := rand.New(rand.NewPCG(4, 5))
	for k := 1; k <= 6; k++ {
		el, err := NewLagrange(k)
		if err != nil {
			t.Fatal(err)
		}
		s := NewScalarSpace(m, el)
		coef := make([]float64, s.Len())
		for i := range coef {
			coef[i] = rng.NormFloat64()
		}
		var worst float64
		for e := range m.Edges {
			if m.EdgeTriangles[e][1] < 0 {
				continue
			}
			xs, r0, r1 := sidePoints(m, e, ss)
			for i := range xs {
				v0, _ := ScalarAt(s, coef, m.EdgeTriangles[e][0], r0[i])
				v1, _ := ScalarAt(s, coef, m.EdgeTriangles[e][1], r1[i])
				worst = math.Max(worst, math.Abs(v0-v1))
			}
		}
		if worst > tol {
			t.Errorf("P%d: largest jump %.3g", k, worst)
		}
	}
}

// randomPoly returns a random polynomial of total degree k with its gradient.
func randomPoly(rng *rand.Rand, k int) (func([2]float64) float64, func([2]float64) [2]float64) {
	type term struct {
		a, b int
		c    float64
	}
	var terms []term
	for a := 0; a <= k; a++ {
		for b := 0; a+b <= k; b++ {
			terms = append(terms, term{a, b, rng.NormFloat64()})
		}
	}
	pow := func(x float64, n int) float64 {
		if n < 0 {
			return 0
		}
		return math.Pow(x, float64(n))
	}
	f := func(x [2]float64) float64 {
		var s float64
		for _, t := range terms {
			s += t.c * pow(x[0], t.a) * pow(x[1], t.b)
		}
		return s
	}
	g := func(x [2]float64) [2]float64 {
		var g [2]float64
		for _, t := range terms {
			g[0] += t.c * float64(t.a) * pow(x[0], t.a-1) * pow(x[1], t.b)
			g[1] += t.c * float64(t.b) * pow(x[0], t.a) * pow(x[1], t.b-1)
		}
		return g
	}
	return f, g
}

func TestInterpolationReproducesPolynomials(t *testing.T) {
	// The canonical interpolant is a projection onto the space, so it
	// reproduces every polynomial the space contains (common practice):
	// P_k for Lagrange and DG P_k, P_k^2 for RT_k and BDM_k.
	const tol = 1e-11
	m := randomMesh(t, 9)
	rng := rand.New(rand.NewPCG(6, 7))
	for k := 0; k <= 6; k++ {
		f, g := randomPoly(rng, k)
		if k >= 1 {
			el, _ := NewLagrange(k)
			s := NewScalarSpace(m, el)
			c := make([]float64, s.Len())
			InterpolateScalar(c, s, f)
			l2, h1 := ScalarErrors(s, c, f, g, 2*k+2)
			if l2 > tol || h1 > tol*10 {
				t.Errorf("Lagrange P%d: L2 %.3g H1 %.3g", k, l2, h1)
			}
		}
		dg, _ := NewDiscontinuous(k)
		s := NewScalarSpace(m, dg)
		c := make([]float64, s.Len())
		InterpolateScalar(c, s, f)
		if l2, _ := ScalarErrors(s, c, f, nil, 2*k+2); l2 > tol {
			t.Errorf("DG P%d: L2 %.3g", k, l2)
		}
		f2, _ := randomPoly(rng, k)
		u := func(x [2]float64) [2]float64 { return [2]float64{f(x), f2(x)} }
		var divs []DivElement
		if k <= 5 {
			rt, _ := NewRaviartThomas(k)
			divs = append(divs, rt)
		}
		if k >= 1 {
			bdm, _ := NewBDM(k)
			divs = append(divs, bdm)
		}
		for _, el := range divs {
			s := NewDivSpace(m, el)
			c := make([]float64, s.Len())
			InterpolateDiv(c, s, u)
			if l2, _ := DivErrors(s, c, u, nil, 2*k+2); l2 > tol {
				t.Errorf("%T degree %d: L2 %.3g", el, k, l2)
			}
		}
	}
}

func TestCommutingDiagram(t *testing.T) {
	// div(Pi_h u) = Pi_DG(div u) for the canonical H(div) interpolant
	// (Boffi, Brezzi & Fortin 2013, Prop. 2.5.2): RT_k with DG_k, BDM_k with
	// DG_{k-1}, on random meshes. The field is a random polynomial three
	// degrees above the space, so it is not in the space, and every moment
	// is integrated exactly: the identity must then hold to rounding.
	const tol = 1e-10
	rng := rand.New(rand.NewPCG(8, 9))
	for seed := uint64(1); seed <= 3; seed++ {
		m := randomMesh(t, 10+seed)
		type pair struct {
			name string
			el   DivElement
			dg   int
		}
		var pairs []pair
		for k := 0; k <= 5; k++ {
			rt, _ := NewRaviartThomas(k)
			pairs = append(pairs, pair{fmt.Sprintf("RT_%d", k), rt, k})
			bdm, _ := NewBDM(k + 1)
			pairs = append(pairs, pair{fmt.Sprintf("BDM_%d", k+1), bdm, k})
		}
		for _, p := range pairs {
			f1, g1 := randomPoly(rng, p.dg+3)
			f2, g2 := randomPoly(rng, p.dg+3)
			u := func(x [2]float64) [2]float64 { return [2]float64{f1(x), f2(x)} }
			divu := func(x [2]float64) float64 { return g1(x)[0] + g2(x)[1] }
			s := NewDivSpace(m, p.el)
			c := make([]float64, s.Len())
			InterpolateDiv(c, s, u)
			dg, _ := NewDiscontinuous(p.dg)
			d := NewScalarSpace(m, dg)
			pd := make([]float64, d.Len())
			InterpolateScalar(pd, d, divu)
			// Compare div(Pi u) with the DG projection at quadrature points.
			sq := NewScalarQuad(dg, 2*p.dg+4)
			var worst, scale float64
			for tri := 0; tri < m.NumTriangles(); tri++ {
				for _, xh := range sq.RefPoints() {
					_, dv := DivAt(s, c, tri, xh)
					pv, _ := ScalarAt(d, pd, tri, xh)
					worst = math.Max(worst, math.Abs(dv-pv))
					scale = math.Max(scale, math.Abs(pv))
				}
			}
			if worst > tol*scale {
				t.Errorf("seed %d %s: max |div Pi u - Pi div u| = %.3g (scale %.3g)", seed, p.name, worst, scale)
			}
		}
	}
}
