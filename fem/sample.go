package fem

import "mixwell/mesh"

// SampleScalarTo writes into dst (length len(pts)) the values of the field
// with coefficients c in the scalar space s at the points of a
// sub-triangulation made by mesh.Subdivide or mesh.SubdivideBroken of the
// space's mesh. With a subdivision of degree n >= the element degree, the
// piecewise-linear picture on the sub-triangulation interpolates the field at
// its Lagrange nodes, so higher-degree fields look right in a viewer. Use
// SubdivideBroken for discontinuous fields.
func SampleScalarTo(dst []float64, s *Space, c []float64, pts []mesh.SubPoint) {
	if s.scalar == nil {
		panic("fem: SampleScalarTo on an H(div) space")
	}
	if len(dst) != len(pts) {
		panic("fem: SampleScalarTo destination length mismatch")
	}
	val := make([]float64, s.nloc)
	for k, p := range pts {
		s.scalar.ValuesTo(val, p.Ref)
		var v float64
		for i, d := range s.Dofs(p.Triangle) {
			v += c[d] * val[i]
		}
		dst[k] = v
	}
}

// SampleDivTo writes into dst (length 2 len(pts), interleaved x and y) the
// values of the field with coefficients c in the H(div) space s at the points
// of a sub-triangulation (use mesh.SubdivideBroken: only normal components
// are continuous).
func SampleDivTo(dst []float64, s *Space, c []float64, pts []mesh.SubPoint) {
	if s.div == nil {
		panic("fem: SampleDivTo on a scalar space")
	}
	if len(dst) != 2*len(pts) {
		panic("fem: SampleDivTo destination length mismatch")
	}
	val := make([][2]float64, s.nloc)
	for k, p := range pts {
		s.div.ValuesTo(val, p.Ref)
		var v [2]float64
		signs := s.Signs(p.Triangle)
		for i, d := range s.Dofs(p.Triangle) {
			ci := c[d] * signs[i]
			v[0] += ci * val[i][0]
			v[1] += ci * val[i][1]
		}
		a := ElementMap(s.mesh, p.Triangle)
		u := a.Piola(v)
		dst[2*k], dst[2*k+1] = u[0], u[1]
	}
}
