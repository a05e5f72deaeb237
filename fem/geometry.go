package fem

import "mixwell/mesh"

// Affine is the affine map F(xh) = Origin + J xh from the reference triangle
// onto one mesh triangle. Det is the signed Jacobian determinant: negative
// when the triangle's local vertex order is clockwise.
type Affine struct {
	Origin [2]float64
	J      [2][2]float64 // J[r][c]: row r, column c; columns are the edge vectors P1-P0, P2-P0
	InvJ   [2][2]float64
	Det    float64
}

// ElementMap returns the affine map of triangle t of m.
func ElementMap(m *mesh.Mesh, t int) Affine {
	tri := m.Triangles[t]
	p0, p1, p2 := m.Points[tri[0]], m.Points[tri[1]], m.Points[tri[2]]
	var a Affine
	a.Origin = p0
	a.J = [2][2]float64{
		{p1[0] - p0[0], p2[0] - p0[0]},
		{p1[1] - p0[1], p2[1] - p0[1]},
	}
	a.Det = a.J[0][0]*a.J[1][1] - a.J[0][1]*a.J[1][0]
	if a.Det == 0 {
		panic("fem: degenerate triangle")
	}
	inv := 1 / a.Det
	a.InvJ = [2][2]float64{
		{a.J[1][1] * inv, -a.J[0][1] * inv},
		{-a.J[1][0] * inv, a.J[0][0] * inv},
	}
	return a
}

// Point maps the reference point xh to the physical triangle.
func (a *Affine) Point(xh [2]float64) [2]float64 {
	return [2]float64{
		a.Origin[0] + a.J[0][0]*xh[0] + a.J[0][1]*xh[1],
		a.Origin[1] + a.J[1][0]*xh[0] + a.J[1][1]*xh[1],
	}
}

// AbsDet returns |det J|, the ratio of physical to reference area.
func (a *Affine) AbsDet() float64 {
	if a.Det < 0 {
		return -a.Det
	}
	return a.Det
}

// Gradient maps a reference gradient to the physical gradient J^{-T} gh.
func (a *Affine) Gradient(gh [2]float64) [2]float64 {
	return [2]float64{
		a.InvJ[0][0]*gh[0] + a.InvJ[1][0]*gh[1],
		a.InvJ[0][1]*gh[0] + a.InvJ[1][1]*gh[1],
	}
}

// Piola applies the contravariant Piola map J uh / det J (signed determinant)
// to a reference vector.
func (a *Affine) Piola(uh [2]float64) [2]float64 {
	inv := 1 / a.Det
	return [2]float64{
		(a.J[0][0]*uh[0] + a.J[0][1]*uh[1]) * inv,
		(a.J[1][0]*uh[0] + a.J[1][1]*uh[1]) * inv,
	}
}

// PiolaDivergence maps a reference divergence to the physical divergence of
// the Piola-mapped field: div u = div_h uh / det J.
func (a *Affine) PiolaDivergence(dh float64) float64 { return dh / a.Det }

// InversePiola pulls a physical vector back to the reference triangle:
// det J J^{-1} u.
func (a *Affine) InversePiola(u [2]float64) [2]float64 {
	return [2]float64{
		a.Det * (a.InvJ[0][0]*u[0] + a.InvJ[0][1]*u[1]),
		a.Det * (a.InvJ[1][0]*u[0] + a.InvJ[1][1]*u[1]),
	}
}

// Reference maps a physical point back to reference coordinates:
// J^{-1} (x - Origin).
func (a *Affine) Reference(x [2]float64) [2]float64 {
	d := [2]float64{x[0] - a.Origin[0], x[1] - a.Origin[1]}
	return [2]float64{
		a.InvJ[0][0]*d[0] + a.InvJ[0][1]*d[1],
		a.InvJ[1][0]*d[0] + a.InvJ[1][1]*d[1],
	}
}
