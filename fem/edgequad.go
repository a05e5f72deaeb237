package fem

import (
	"fmt"
	"math"

	"mixwell/mesh"
)

var refVertices = [3][2]float64{{0, 0}, {1, 0}, {0, 1}}

// RefEdgeEnds returns the reference start and end points of local edge i in
// its local direction (from vertex (i+1)%3 to vertex (i+2)%3).
func RefEdgeEnds(i int) (start, end [2]float64) {
	return refVertices[(i+1)%3], refVertices[(i+2)%3]
}

// LocalEdge returns the local number (0, 1, 2) of global edge e in triangle
// t, or an error if t does not contain e.
func LocalEdge(m *mesh.Mesh, t, e int) (int, error) {
	for i, g := range m.TriangleEdges[t] {
		if g == e {
			return i, nil
		}
	}
	return 0, fmt.Errorf("fem: triangle %d does not contain edge %d", t, e)
}

// EdgeQuad tabulates basis traces on the three local edges of the reference
// triangle at the points of a Gauss–Legendre rule on [0,1] (the edge
// parameter s in the local direction). For a scalar element it holds values;
// for an H(div) element it holds normal traces u.nu_i, with nu_i the rotated
// local reference edge vector of DivElement's documentation.
//
// On a physical triangle with affine map a, the outward normal flux of the
// Piola-mapped function j through local edge i is
//
//	int_e u_j . n ds = sign(det J) sum_q W[q] Normal[i][q*N+j]
//
// (the rotated, mapped edge vector points outward on counter-clockwise
// triangles and inward on clockwise ones), and a scalar trace integrates as
// int_e v ds = |e| sum_q W[q] v(s_q).
type EdgeQuad struct {
	N, NQ int
	// S and W are the rule's points and weights on [0,1].
	S, W []float64
	// Ref[i][q] is the reference point of parameter S[q] on local edge i.
	Ref [3][][2]float64
	// Value[i][q*N+j] is scalar basis function j at Ref[i][q] (scalar
	// elements only).
	Value [3][]float64
	// Normal[i][q*N+j] is the normal trace of H(div) basis function j at
	// Ref[i][q] (H(div) elements only).
	Normal [3][]float64
}

func newEdgeRule(npts int) (e *EdgeQuad) {
	s, w := GaussLegendre(npts)
	e = &EdgeQuad{NQ: npts, S: s, W: w}
	for i := 0; i < 3; i++ {
		a, b := RefEdgeEnds(i)
		e.Ref[i] = make([][2]float64, npts)
		for q, sq := range s {
			e.Ref[i][q] = [2]float64{a[0] + sq*(b[0]-a[0]), a[1] + sq*(b[1]-a[1])}
		}
	}
	return e
}

// NewScalarEdgeQuad tabulates the traces of e with an npts-point rule (exact
// for polynomials of degree 2 npts - 1 along the edge).
func NewScalarEdgeQuad(el ScalarElement, npts int) *EdgeQuad {
	e := newEdgeRule(npts)
	e.N = el.Len()
	for i := 0; i < 3; i++ {
		e.Value[i] = make([]float64, npts*e.N)
		for q, x := range e.Ref[i] {
			el.ValuesTo(e.Value[i][q*e.N:(q+1)*e.N], x)
		}
	}
	return e
}

// NewDivEdgeQuad tabulates the normal traces of el with an npts-point rule.
func NewDivEdgeQuad(el DivElement, npts int) *EdgeQuad {
	e := newEdgeRule(npts)
	e.N = el.Len()
	vals := make([][2]float64, e.N)
	for i := 0; i < 3; i++ {
		a, b := RefEdgeEnds(i)
		nu := [2]float64{b[1] - a[1], -(b[0] - a[0])}
		e.Normal[i] = make([]float64, npts*e.N)
		for q, x := range e.Ref[i] {
			el.ValuesTo(vals, x)
			for j, v := range vals {
				e.Normal[i][q*e.N+j] = v[0]*nu[0] + v[1]*nu[1]
			}
		}
	}
	return e
}

// EdgeLength returns the physical length of local edge i of triangle t.
func EdgeLength(m *mesh.Mesh, t, i int) float64 {
	tri := m.Triangles[t]
	p, q := m.Points[tri[(i+1)%3]], m.Points[tri[(i+2)%3]]
	return math.Hypot(q[0]-p[0], q[1]-p[1])
}
