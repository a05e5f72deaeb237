package fem

// Conformance suite for the reference elements: one function per kind of
// element (scalar, H(div)) checks everything the contract of element.go
// promises, and is run against every family and degree.

import (
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"sync"
	"testing"
)

// scalarUnderTest is a scalar element with degrees of freedom.
type scalarUnderTest interface {
	ScalarElement
	DofsTo(dst []float64, f func(x [2]float64) float64)
	DualCondition() float64
}

// divUnderTest is an H(div) element with its unisolvence check.
type divUnderTest interface {
	DivElement
	DualCondition() float64
}

// Tolerances of the conformance suite.
const (
	// tolDual bounds |dof_i(phi_m) - delta_im|.
	tolDual = 1e-11
	// tolReproduce bounds the error of interpolating a polynomial of
	// the space, relative to its size.
	tolReproduce = 1e-11
	// tolDerivative bounds gradients and divergences against exact
	// differentiation along lines, relative to the basis size.
	tolDerivative = 1e-9
	// tolCommute bounds div(interpolant) - projection(div u).
	tolCommute = 1e-12
	// maxCondition is the largest acceptable dual condition number.
	maxCondition = 1e12
)

func scalarElements(t *testing.T) []scalarUnderTest {
	var out []scalarUnderTest
	for k := 1; k <= MaxLagrangeDegree; k++ {
		e, err := NewLagrange(k)
		if err != nil {
			t.Fatalf("NewLagrange(%d): %v", k, err)
		}
		out = append(out, e)
	}
	for k := 0; k <= MaxDiscontinuousDegree; k++ {
		e, err := NewDiscontinuous(k)
		if err != nil {
			t.Fatalf("NewDiscontinuous(%d): %v", k, err)
		}
		out = append(out, e)
	}
	return out
}

func divElements(t *testing.T) []divUnderTest {
	var out []divUnderTest
	for k := 0; k <= MaxRaviartThomasIndex; k++ {
		e, err := NewRaviartThomas(k)
		if err != nil {
			t.Fatalf("NewRaviartThomas(%d): %v", k, err)
		}
		out = append(out, e)
	}
	for k := 1; k <= MaxBDMDegree; k++ {
		e, err := NewBDM(k)
		if err != nil {
			t.Fatalf("NewBDM(%d): %v", k, err)
		}
		out = append(out, e)
	}
	return out
}

func elementName(e any) string {
	switch e := e.(type) {
	case *Lagrange:
		return fmt.Sprintf("Lagrange P%d", e.Degree())
	case *Discontinuous:
		return fmt.Sprintf("DG P%d", e.Degree())
	case *RaviartThomas:
		return fmt.Sprintf("RT%d", e.Degree())
	case *BDM:
		return fmt.Sprintf("BDM%d", e.Degree())
	}
	return fmt.Sprintf("%T", e)
}

func TestScalarElements(t *testing.T) {
	for _, e := range scalarElements(t) {
		t.Run(elementName(e), func(t *testing.T) { testScalarElement(t, e) })
	}
}

func TestDivElements(t *testing.T) {
	for _, e := range divElements(t) {
		t.Run(elementName(e), func(t *testing.T) { testDivElement(t, e) })
	}
}

func TestElementConstructorErrors(t *testing.T) {
	for _, tc := range []struct {
		name string
		err  error
	}{
		{"Lagrange P0", func() error { _, err := NewLagrange(0); return err }()},
		{"Lagrange too high", func() error { _, err := NewLagrange(MaxLagrangeDegree + 1); return err }()},
		{"DG P-1", func() error { _, err := NewDiscontinuous(-1); return err }()},
		{"DG too high", func() error { _, err := NewDiscontinuous(MaxDiscontinuousDegree + 1); return err }()},
		{"RT-1", func() error { _, err := NewRaviartThomas(-1); return err }()},
		{"RT too high", func() error { _, err := NewRaviartThomas(MaxRaviartThomasIndex + 1); return err }()},
		{"BDM0", func() error { _, err := NewBDM(0); return err }()},
		{"BDM too high", func() error { _, err := NewBDM(MaxBDMDegree + 1); return err }()},
	} {
		if tc.err == nil {
			t.Errorf("%s: got nil error", tc.name)
		}
	}
}

// TestDualConditionTable logs the condition numbers of the dual matrices
// (the unisolvence check) of every family and degree.
func TestDualConditionTable(t *testing.T) {
	var b strings.Builder
	fmt.Fprintf(&b, "\n%-14s %6s %12s\n", "element", "dim", "cond(dual)")
	log := func(name string, n int, c float64) {
		fmt.Fprintf(&b, "%-14s %6d %12.4g\n", name, n, c)
		if !(c < maxCondition) {
			t.Errorf("%s: dual condition number %g, want < %g", name, c, maxCondition)
		}
	}
	for _, e := range scalarElements(t) {
		log(elementName(e), e.Len(), e.DualCondition())
	}
	for _, e := range divElements(t) {
		log(elementName(e), e.Len(), e.DualCondition())
	}
	t.Log(b.String())
}

// randomDubiner returns a polynomial of degree k with random coefficients
// over the Dubiner basis, its value and its gradient.
func randomDubiner(rnd *rand.Rand, k int) (f func([2]float64) float64, grad func([2]float64) [2]float64) {
	n := PolyDim(k)
	c := make([]float64, n)
	for i := range c {
		c[i] = rnd.NormFloat64()
	}
	f = func(x [2]float64) float64 {
		psi := make([]float64, n)
		DubinerValuesTo(psi, k, x)
		var s float64
		for i, p := range psi {
			s += c[i] * p
		}
		return s
	}
	grad = func(x [2]float64) [2]float64 {
		g := make([][2]float64, n)
		DubinerGradientsTo(g, k, x)
		var s [2]float64
		for i, p := range g {
			s[0] += c[i] * p[0]
			s[1] += c[i] * p[1]
		}
		return s
	}
	return f, grad
}

// checkEntities checks the counts and ordering of the entities: for each
// entity kind the number of functions per entity, with Ordinals numbering
// the functions of an entity consecutively from 0.
func checkEntities(t *testing.T, ents []DofEntity, perVertex, perEdge, inside int) {
	t.Helper()
	count := map[[2]int]int{}
	for i, d := range ents {
		key := [2]int{int(d.Kind), d.Index}
		if d.Ordinal != count[key] {
			t.Errorf("entity %d = %+v: Ordinal %d, want %d", i, d, d.Ordinal, count[key])
		}
		count[key]++
		switch d.Kind {
		case AtVertex, OnEdge:
			if d.Index < 0 || d.Index > 2 {
				t.Errorf("entity %d = %+v: bad Index", i, d)
			}
		case Inside:
			if d.Index != 0 {
				t.Errorf("entity %d = %+v: Inside with Index %d", i, d, d.Index)
			}
		}
	}
	for i := 0; i < 3; i++ {
		if got := count[[2]int{int(AtVertex), i}]; got != perVertex {
			t.Errorf("vertex %d owns %d functions, want %d", i, got, perVertex)
		}
		if got := count[[2]int{int(OnEdge), i}]; got != perEdge {
			t.Errorf("edge %d owns %d functions, want %d", i, got, perEdge)
		}
	}
	if got := count[[2]int{int(Inside), 0}]; got != inside {
		t.Errorf("interior owns %d functions, want %d", got, inside)
	}
}

// testScalarElement is the conformance suite of scalar elements.
func testScalarElement(t *testing.T, e scalarUnderTest) {
	k := e.Degree()
	n := e.Len()
	rnd := rand.New(rand.NewPCG(uint64(k), 11))

	// Dimension of P_k: (k+1)(k+2)/2 (closed form, common practice).
	if want := (k + 1) * (k + 2) / 2; n != want {
		t.Fatalf("Len = %d, want %d", n, want)
	}
	ents := e.Entities()
	if len(ents) != n {
		t.Fatalf("len(Entities) = %d, want %d", len(ents), n)
	}
	switch e.(type) {
	case *Lagrange:
		checkEntities(t, ents, 1, k-1, (k-1)*(k-2)/2)
	case *Discontinuous:
		checkEntities(t, ents, 0, 0, n)
	}

	if c := e.DualCondition(); !(c >= 1 && c < maxCondition) {
		t.Errorf("DualCondition = %g, want in [1, %g)", c, maxCondition)
	}

	// Duality: the degrees of freedom of basis function m are e_m.
	vals := make([]float64, n)
	dofs := make([]float64, n)
	for m := 0; m < n; m++ {
		e.DofsTo(dofs, func(x [2]float64) float64 {
			e.ValuesTo(vals, x)
			return vals[m]
		})
		for i, d := range dofs {
			want := 0.0
			if i == m {
				want = 1
			}
			if math.Abs(d-want) > tolDual {
				t.Errorf("dof %d of basis function %d: got %.3g, want %v", i, m, d, want)
			}
		}
	}

	// The space is P_k: interpolation reproduces random polynomials of
	// degree k, values and gradients.
	grads := make([][2]float64, n)
	for trial := 0; trial < 3; trial++ {
		f, gf := randomDubiner(rnd, k)
		e.DofsTo(dofs, f)
		for _, x := range testPoints(rnd, 20) {
			e.ValuesTo(vals, x)
			e.GradientsTo(grads, x)
			var v float64
			var g [2]float64
			for i, d := range dofs {
				v += d * vals[i]
				g[0] += d * grads[i][0]
				g[1] += d * grads[i][1]
			}
			wantV, wantG := f(x), gf(x)
			scale := 1 + math.Abs(wantV) + math.Hypot(wantG[0], wantG[1])
			if math.Abs(v-wantV) > tolReproduce*scale {
				t.Errorf("interpolant of a P_%d polynomial at %v: got %v, want %v", k, x, v, wantV)
			}
			if math.Abs(g[0]-wantG[0]) > tolReproduce*scale || math.Abs(g[1]-wantG[1]) > tolReproduce*scale {
				t.Errorf("gradient of the interpolant at %v: got %v, want %v", x, g, wantG)
			}
		}
	}

	// Gradients against exact differentiation of the values along lines.
	for _, x := range testPoints(rnd, 5) {
		e.GradientsTo(grads, x)
		for i := 0; i < n; i++ {
			var scale float64
			f := func(z [2]float64) float64 {
				e.ValuesTo(vals, z)
				scale = math.Max(scale, math.Abs(vals[i]))
				return vals[i]
			}
			want := [2]float64{
				polyDerivative(f, x, [2]float64{1, 0}, k, 0.5),
				polyDerivative(f, x, [2]float64{0, 1}, k, 0.5),
			}
			for c := 0; c < 2; c++ {
				if math.Abs(grads[i][c]-want[c]) > tolDerivative*(1+scale) {
					t.Errorf("gradient %d at %v, component %d: got %v, want %v", i, x, c, grads[i][c], want[c])
				}
			}
		}
	}

	switch e := e.(type) {
	case *Lagrange:
		testLagrange(t, e)
	case *Discontinuous:
		testDiscontinuous(t, e)
	}
}

func testLagrange(t *testing.T, e *Lagrange) {
	const tol = 1e-12
	k, n := e.Degree(), e.Len()
	nodes := e.Nodes()
	ents := e.Entities()
	verts := [3][2]float64{{0, 0}, {1, 0}, {0, 1}}

	// Node positions follow the entities: vertices, edges in the local
	// edge direction, interior strictly inside the lattice.
	for i, d := range ents {
		x := nodes[i]
		switch d.Kind {
		case AtVertex:
			if x != verts[d.Index] {
				t.Errorf("node %d = %v, want vertex %v", i, x, verts[d.Index])
			}
		case OnEdge:
			a, b := verts[(d.Index+1)%3], verts[(d.Index+2)%3]
			s := float64(d.Ordinal+1) / float64(k)
			want := [2]float64{a[0] + s*(b[0]-a[0]), a[1] + s*(b[1]-a[1])}
			if math.Abs(x[0]-want[0]) > tol || math.Abs(x[1]-want[1]) > tol {
				t.Errorf("node %d (edge %d, ordinal %d) = %v, want %v", i, d.Index, d.Ordinal, x, want)
			}
		case Inside:
			if !(x[0] > 0 && x[1] > 0 && x[0]+x[1] < 1) {
				t.Errorf("interior node %d = %v not interior", i, x)
			}
		}
	}

	// Nodal property and partition of unity.
	vals := make([]float64, n)
	grads := make([][2]float64, n)
	for j, x := range nodes {
		e.ValuesTo(vals, x)
		for i, v := range vals {
			want := 0.0
			if i == j {
				want = 1
			}
			if math.Abs(v-want) > tol {
				t.Errorf("phi_%d(node %d) = %v, want %v", i, j, v, want)
			}
		}
	}
	rnd := rand.New(rand.NewPCG(uint64(k), 12))
	for _, x := range testPoints(rnd, 10) {
		e.ValuesTo(vals, x)
		e.GradientsTo(grads, x)
		// Rounding scales with the Lebesgue function sum |phi_i|, large
		// for equispaced nodes of high degree outside the triangle, and
		// for gradients with sum |grad phi_i|.
		var s, leb, gleb float64
		var g [2]float64
		for i := range vals {
			s += vals[i]
			leb += math.Abs(vals[i])
			g[0] += grads[i][0]
			g[1] += grads[i][1]
			gleb += math.Hypot(grads[i][0], grads[i][1])
		}
		if math.Abs(s-1) > tol*leb || math.Abs(g[0]) > tol*gleb || math.Abs(g[1]) > tol*gleb {
			t.Errorf("at %v: sum phi = %v, sum grad phi = %v, want 1 and 0", x, s, g)
		}
	}

	// Continuity: on edge i only the functions of that edge and of its
	// two vertices are nonzero, so traces match across shared edges.
	for i := 0; i < 3; i++ {
		a, b := verts[(i+1)%3], verts[(i+2)%3]
		for _, s := range []float64{0.1234, 0.5, 0.9} {
			e.ValuesTo(vals, [2]float64{a[0] + s*(b[0]-a[0]), a[1] + s*(b[1]-a[1])})
			for m, d := range ents {
				onEdge := (d.Kind == OnEdge && d.Index == i) ||
					(d.Kind == AtVertex && d.Index != i)
				if !onEdge && math.Abs(vals[m]) > 1e3*tol {
					t.Errorf("phi_%d (%+v) = %v on edge %d at s=%v, want 0", m, d, vals[m], i, s)
				}
			}
		}
	}
}

func testDiscontinuous(t *testing.T, e *Discontinuous) {
	const tol = 1e-13
	k, n := e.Degree(), e.Len()
	r, err := NewTriangleRule(2 * k)
	if err != nil {
		t.Fatal(err)
	}
	vals := make([]float64, n)
	gram := make([]float64, n*n)
	for q, x := range r.Points {
		e.ValuesTo(vals, x)
		for i := range vals {
			for j := range vals {
				gram[i*n+j] += r.Weights[q] * vals[i] * vals[j]
			}
		}
	}
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			want := 0.0
			if i == j {
				want = 1
			}
			if math.Abs(gram[i*n+j]-want) > tol {
				t.Errorf("int phi_%d phi_%d = %v, want %v", i, j, gram[i*n+j], want)
			}
		}
	}
}

// vectorField is a vector field with its divergence.
type vectorField struct {
	u   func([2]float64) [2]float64
	div func([2]float64) float64
}

// randomVectorPoly returns a vector field with random Dubiner coefficients
// of degree k in each component and, if rt is true, an added
// x * (random polynomial of degree exactly k), so that it lies in RT_k.
func randomVectorPoly(rnd *rand.Rand, k int, rt bool) vectorField {
	fx, gx := randomDubiner(rnd, k)
	fy, gy := randomDubiner(rnd, k)
	h := func([2]float64) float64 { return 0 }
	gh := func([2]float64) [2]float64 { return [2]float64{} }
	if rt {
		h, gh = randomDubiner(rnd, k)
	}
	return vectorField{
		u: func(x [2]float64) [2]float64 {
			hv := h(x)
			return [2]float64{fx(x) + x[0]*hv, fy(x) + x[1]*hv}
		},
		div: func(x [2]float64) float64 {
			// div(x h) = 2 h + x . grad h in two dimensions.
			g := gh(x)
			return gx(x)[0] + gy(x)[1] + 2*h(x) + x[0]*g[0] + x[1]*g[1]
		},
	}
}

// testDivElement is the conformance suite of H(div) elements.
func testDivElement(t *testing.T, e divUnderTest) {
	k := e.Degree()
	n := e.Len()
	rnd := rand.New(rand.NewPCG(uint64(k), 21))

	// Closed forms (common practice): dim RT_k = (k+1)(k+3) with
	// divergence in P_k, dim BDM_k = (k+1)(k+2) with divergence in
	// P_{k-1}; both have k+1 normal moments per edge, so the rest are
	// interior: k(k+1) for RT_k and (k-1)(k+1) for BDM_k.
	var wantLen, divDeg, polyDeg, inside int
	var rt bool
	switch e.(type) {
	case *RaviartThomas:
		wantLen, divDeg, polyDeg, inside, rt = (k+1)*(k+3), k, k+1, k*(k+1), true
	case *BDM:
		wantLen, divDeg, polyDeg, inside = (k+1)*(k+2), k-1, k, (k-1)*(k+1)
	default:
		t.Fatalf("unknown element %T", e)
	}
	if n != wantLen {
		t.Fatalf("Len = %d, want %d", n, wantLen)
	}
	ents := e.Entities()
	if len(ents) != n {
		t.Fatalf("len(Entities) = %d, want %d", len(ents), n)
	}
	checkEntities(t, ents, 0, k+1, inside)
	for i, d := range ents {
		// The documented order: edge functions first, edge by edge.
		if i < 3*(k+1) && (d.Kind != OnEdge || d.Index != i/(k+1) || d.Ordinal != i%(k+1)) {
			t.Errorf("entity %d = %+v, want edge %d ordinal %d", i, d, i/(k+1), i%(k+1))
		}
	}
	if c := e.DualCondition(); !(c >= 1 && c < maxCondition) {
		t.Errorf("DualCondition = %g, want in [1, %g)", c, maxCondition)
	}

	// Duality.
	vals := make([][2]float64, n)
	divs := make([]float64, n)
	dofs := make([]float64, n)
	for m := 0; m < n; m++ {
		e.DofsTo(dofs, func(x [2]float64) [2]float64 {
			e.ValuesTo(vals, x)
			return vals[m]
		})
		for i, d := range dofs {
			want := 0.0
			if i == m {
				want = 1
			}
			if math.Abs(d-want) > tolDual {
				t.Errorf("dof %d of basis function %d: got %.3g, want %v", i, m, d, want)
			}
		}
	}

	// Divergence against exact differentiation of the values.
	for _, x := range testPoints(rnd, 5) {
		e.DivergencesTo(divs, x)
		for i := 0; i < n; i++ {
			var scale float64
			comp := func(c int) func([2]float64) float64 {
				return func(z [2]float64) float64 {
					e.ValuesTo(vals, z)
					scale = math.Max(scale, math.Hypot(vals[i][0], vals[i][1]))
					return vals[i][c]
				}
			}
			want := polyDerivative(comp(0), x, [2]float64{1, 0}, polyDeg, 0.5) +
				polyDerivative(comp(1), x, [2]float64{0, 1}, polyDeg, 0.5)
			if math.Abs(divs[i]-want) > tolDerivative*(1+scale) {
				t.Errorf("divergence %d at %v: got %v, want %v", i, x, divs[i], want)
			}
		}
	}

	// Divergences lie in P_divDeg: the L2 projection onto P_divDeg leaves
	// no remainder (rule exact for the squared divergence).
	rule, err := NewTriangleRule(2 * polyDeg)
	if err != nil {
		t.Fatal(err)
	}
	np := PolyDim(divDeg)
	psi := make([]float64, np)
	for i := 0; i < n; i++ {
		coef := make([]float64, np)
		var norm2 float64
		for q, x := range rule.Points {
			e.DivergencesTo(divs, x)
			DubinerValuesTo(psi, divDeg, x)
			for j, p := range psi {
				coef[j] += rule.Weights[q] * divs[i] * p
			}
			norm2 += rule.Weights[q] * divs[i] * divs[i]
		}
		var proj2 float64
		for _, c := range coef {
			proj2 += c * c
		}
		// ||div||^2 = ||projection||^2 + ||remainder||^2.
		if rem := norm2 - proj2; rem > 1e-20+1e-12*norm2 {
			t.Errorf("basis function %d: divergence has remainder %.3g (norm^2 %.3g) outside P_%d", i, rem, norm2, divDeg)
		}
	}

	// Normal traces: on edge i the normal component of every function not
	// owned by edge i vanishes pointwise (its k+1 moments against P_k
	// vanish and the trace lies in P_k), so the space is H(div)-conforming.
	for i := 0; i < 3; i++ {
		a, tv := refEdge(i)
		nu := [2]float64{tv[1], -tv[0]}
		for _, s := range []float64{0, 0.1234, 0.5, 0.9, 1} {
			e.ValuesTo(vals, [2]float64{a[0] + s*tv[0], a[1] + s*tv[1]})
			for m, d := range ents {
				if d.Kind == OnEdge && d.Index == i {
					continue
				}
				if vn := vals[m][0]*nu[0] + vals[m][1]*nu[1]; math.Abs(vn) > 1e-10 {
					t.Errorf("function %d (%+v) has normal component %v on edge %d at s=%v", m, d, vn, i, s)
				}
			}
		}
	}

	// The space contains P_k^2 (and for RT_k also x P_k): interpolation
	// reproduces random fields.
	for trial := 0; trial < 3; trial++ {
		f := randomVectorPoly(rnd, k, rt && trial > 0)
		e.DofsTo(dofs, f.u)
		for _, x := range testPoints(rnd, 20) {
			e.ValuesTo(vals, x)
			e.DivergencesTo(divs, x)
			var u [2]float64
			var dv float64
			for m, d := range dofs {
				u[0] += d * vals[m][0]
				u[1] += d * vals[m][1]
				dv += d * divs[m]
			}
			want, wantDiv := f.u(x), f.div(x)
			scale := 1 + math.Hypot(want[0], want[1]) + math.Abs(wantDiv)
			if math.Hypot(u[0]-want[0], u[1]-want[1]) > tolReproduce*scale {
				t.Errorf("trial %d: interpolant at %v = %v, want %v", trial, x, u, want)
			}
			if math.Abs(dv-wantDiv) > tolReproduce*scale {
				t.Errorf("trial %d: divergence of the interpolant at %v = %v, want %v", trial, x, dv, wantDiv)
			}
		}
	}

	// Commuting diagram (Boffi, Brezzi & Fortin 2013, Chapter 2): for a
	// smooth field the divergence of the canonical interpolant is the L2
	// projection onto P_divDeg of the divergence.
	u := func(x [2]float64) [2]float64 {
		return [2]float64{math.Sin(x[0] + 2*x[1]), math.Exp(x[0] * x[1])}
	}
	divU := func(x [2]float64) float64 {
		return math.Cos(x[0]+2*x[1]) + x[0]*math.Exp(x[0]*x[1])
	}
	e.DofsTo(dofs, u)
	fine, err := NewTriangleRule(40)
	if err != nil {
		t.Fatal(err)
	}
	want := make([]float64, np)
	got := make([]float64, np)
	for q, x := range fine.Points {
		DubinerValuesTo(psi, divDeg, x)
		e.DivergencesTo(divs, x)
		var dv float64
		for m, d := range dofs {
			dv += d * divs[m]
		}
		du := divU(x)
		for j, p := range psi {
			want[j] += fine.Weights[q] * du * p
			got[j] += fine.Weights[q] * dv * p
		}
	}
	var worst float64
	for j := range want {
		worst = math.Max(worst, math.Abs(got[j]-want[j]))
		if math.Abs(got[j]-want[j]) > tolCommute {
			t.Errorf("commuting diagram, coefficient %d of div: got %.16g, want %.16g (diff %.2g)", j, got[j], want[j], got[j]-want[j])
		}
	}
	t.Logf("commuting diagram: max coefficient error %.2g", worst)
}

// TestTabulate checks that the tables hold exactly what the elements
// evaluate.
func TestTabulate(t *testing.T) {
	r, err := NewTriangleRule(6)
	if err != nil {
		t.Fatal(err)
	}
	lag, _ := NewLagrange(3)
	st := Tabulate(lag, r.Points)
	vals := make([]float64, lag.Len())
	grads := make([][2]float64, lag.Len())
	for q, x := range r.Points {
		lag.ValuesTo(vals, x)
		lag.GradientsTo(grads, x)
		for i := range vals {
			if st.ValuesAt(q)[i] != vals[i] || st.GradientsAt(q)[i] != grads[i] {
				t.Errorf("Lagrange P3 table at point %d, function %d differs", q, i)
			}
		}
	}
	bdm, _ := NewBDM(2)
	dt := TabulateDiv(bdm, r.Points)
	vv := make([][2]float64, bdm.Len())
	dv := make([]float64, bdm.Len())
	for q, x := range r.Points {
		bdm.ValuesTo(vv, x)
		bdm.DivergencesTo(dv, x)
		for i := range vv {
			if dt.ValuesAt(q)[i] != vv[i] || dt.DivergencesAt(q)[i] != dv[i] {
				t.Errorf("BDM2 table at point %d, function %d differs", q, i)
			}
		}
	}
}

// TestEvaluationDoesNotAllocate guards the promise that evaluation can be
// used in assembly loops.
func TestEvaluationDoesNotAllocate(t *testing.T) {
	x := [2]float64{0.2, 0.3}
	for _, e := range scalarElements(t) {
		vals := make([]float64, e.Len())
		grads := make([][2]float64, e.Len())
		if a := testing.AllocsPerRun(10, func() { e.ValuesTo(vals, x); e.GradientsTo(grads, x) }); a != 0 {
			t.Errorf("%s: %v allocations per evaluation", elementName(e), a)
		}
	}
	for _, e := range divElements(t) {
		vals := make([][2]float64, e.Len())
		divs := make([]float64, e.Len())
		if a := testing.AllocsPerRun(10, func() { e.ValuesTo(vals, x); e.DivergencesTo(divs, x) }); a != 0 {
			t.Errorf("%s: %v allocations per evaluation", elementName(e), a)
		}
	}
}

// TestElementsConcurrent evaluates shared elements from several goroutines
// (run with -race to check that evaluation is free of shared scratch).
func TestElementsConcurrent(t *testing.T) {
	lag, err := NewLagrange(3)
	if err != nil {
		t.Fatal(err)
	}
	bdm, err := NewBDM(2)
	if err != nil {
		t.Fatal(err)
	}
	want := make([]float64, lag.Len())
	lag.ValuesTo(want, [2]float64{0.3, 0.3})
	var wg sync.WaitGroup
	for g := 0; g < 4; g++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			vals := make([]float64, lag.Len())
			vv := make([][2]float64, bdm.Len())
			dofs := make([]float64, bdm.Len())
			for i := 0; i < 200; i++ {
				lag.ValuesTo(vals, [2]float64{0.3, 0.3})
				bdm.ValuesTo(vv, [2]float64{0.1, 0.2})
				bdm.DofsTo(dofs, func(x [2]float64) [2]float64 { return x })
				for j := range vals {
					if vals[j] != want[j] {
						t.Errorf("goroutine %d: value %d = %v, want %v", g, j, vals[j], want[j])
						return
					}
				}
			}
		}()
	}
	wg.Wait()
}
