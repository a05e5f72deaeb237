package fem

// ScalarQuad holds a scalar element's basis at the points of a triangle
// quadrature rule: reference values once, physical gradients, points and
// weights refilled per triangle by Reinit without allocating. Index q*N+i is
// basis function i at point q. Not safe for concurrent use; make one per
// goroutine.
type ScalarQuad struct {
	N, NQ int
	tab   *ScalarTable
	w     []float64
	// Val holds the basis values (they do not change under the affine map).
	Val []float64
	// Grad holds the physical gradients on the current triangle.
	Grad [][2]float64
	// X holds the physical quadrature points on the current triangle.
	X [][2]float64
	// W holds the physical quadrature weights (reference weight times |det J|).
	W []float64
}

// NewScalarQuad tabulates e at a triangle rule exact to the given degree.
func NewScalarQuad(e ScalarElement, degree int) *ScalarQuad {
	pts, w := quadratureRule(degree)
	t := Tabulate(e, pts)
	return &ScalarQuad{
		N: t.Len, NQ: len(pts), tab: t, w: w, Val: t.Values,
		Grad: make([][2]float64, len(t.Gradients)),
		X:    make([][2]float64, len(pts)),
		W:    make([]float64, len(pts)),
	}
}

// RefPoints returns the reference quadrature points.
func (s *ScalarQuad) RefPoints() [][2]float64 { return s.tab.Points }

// FieldAt returns the value and gradient at point q of the current
// triangle of the field with global coefficients coeffs, the triangle's
// degrees of freedom being dofs (Space.Dofs).
func (s *ScalarQuad) FieldAt(q int, coeffs []float64, dofs []int) (v float64, g [2]float64) {
	n := s.N
	val, grad := s.Val[q*n:(q+1)*n], s.Grad[q*n:(q+1)*n]
	for a, d := range dofs {
		c := coeffs[d]
		v += c * val[a]
		g[0] += c * grad[a][0]
		g[1] += c * grad[a][1]
	}
	return v, g
}

// Reinit maps the tabulated data onto the triangle with affine map a.
func (s *ScalarQuad) Reinit(a *Affine) {
	ad := a.AbsDet()
	for q, xh := range s.tab.Points {
		s.X[q] = a.Point(xh)
		s.W[q] = s.w[q] * ad
	}
	for k, g := range s.tab.Gradients {
		s.Grad[k] = a.Gradient(g)
	}
}

// DivQuad holds an H(div) element's basis at the points of a triangle rule:
// reference data once, the Piola-mapped values and divergences per triangle
// (without the global signs, which the assembler applies).
type DivQuad struct {
	N, NQ int
	tab   *DivTable
	w     []float64
	// Val holds the Piola-mapped values on the current triangle.
	Val [][2]float64
	// Div holds the physical divergences on the current triangle.
	Div []float64
	// X holds the physical quadrature points.
	X [][2]float64
	// W holds the physical quadrature weights.
	W []float64
}

// NewDivQuad tabulates e at a triangle rule exact to the given degree.
func NewDivQuad(e DivElement, degree int) *DivQuad {
	pts, w := quadratureRule(degree)
	t := TabulateDiv(e, pts)
	return &DivQuad{
		N: t.Len, NQ: len(pts), tab: t, w: w,
		Val: make([][2]float64, len(t.Values)),
		Div: make([]float64, len(t.Divergences)),
		X:   make([][2]float64, len(pts)),
		W:   make([]float64, len(pts)),
	}
}

// Reinit maps the tabulated data onto the triangle with affine map a.
func (d *DivQuad) Reinit(a *Affine) {
	ad := a.AbsDet()
	for q, xh := range d.tab.Points {
		d.X[q] = a.Point(xh)
		d.W[q] = d.w[q] * ad
	}
	for k, v := range d.tab.Values {
		d.Val[k] = a.Piola(v)
		d.Div[k] = a.PiolaDivergence(d.tab.Divergences[k])
	}
}

// quadratureRule returns the points and weights of the shared triangle rule
// exact to the given degree. It panics on a degree outside the supported
// range, which callers derive from element degrees (a programmer error).
func quadratureRule(degree int) ([][2]float64, []float64) {
	r, err := NewTriangleRule(degree)
	if err != nil {
		panic("fem: " + err.Error())
	}
	return r.Points, r.Weights
}
