package fem

// ScalarAt returns the value and physical gradient on triangle t, at
// reference point xh, of the field with coefficients c in the scalar space s.
// It allocates; use ScalarQuad in loops.
func ScalarAt(s *Space, c []float64, t int, xh [2]float64) (float64, [2]float64) {
	n := s.nloc
	val := make([]float64, n)
	grad := make([][2]float64, n)
	s.scalar.ValuesTo(val, xh)
	s.scalar.GradientsTo(grad, xh)
	a := ElementMap(s.mesh, t)
	var v float64
	var g [2]float64
	for i, d := range s.Dofs(t) {
		v += c[d] * val[i]
		g[0] += c[d] * grad[i][0]
		g[1] += c[d] * grad[i][1]
	}
	return v, a.Gradient(g)
}

// DivAt returns the value and divergence on triangle t, at reference point
// xh, of the field with coefficients c in the H(div) space s. It allocates;
// use DivQuad in loops.
func DivAt(s *Space, c []float64, t int, xh [2]float64) ([2]float64, float64) {
	n := s.nloc
	val := make([][2]float64, n)
	div := make([]float64, n)
	s.div.ValuesTo(val, xh)
	s.div.DivergencesTo(div, xh)
	a := ElementMap(s.mesh, t)
	var v [2]float64
	var dv float64
	signs := s.Signs(t)
	for i, d := range s.Dofs(t) {
		ci := c[d] * signs[i]
		v[0] += ci * val[i][0]
		v[1] += ci * val[i][1]
		dv += ci * div[i]
	}
	return a.Piola(v), a.PiolaDivergence(dv)
}
