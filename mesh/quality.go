package mesh

import "math"

// Quality summarises the size and shape of the triangles of a mesh.
//
// The shape measure of a triangle with area A and edge lengths l0, l1, l2 is
//
//	q = 4√3 A / (l0² + l1² + l2²),
//
// which is 1 for an equilateral triangle, tends to 0 as the triangle
// degenerates and does not depend on size or orientation (common practice;
// see J. R. Shewchuk, "What is a good linear finite element?", 2002, for
// this and related measures).
type Quality struct {
	// Points, Edges, Triangles and BoundaryEdges count the entities.
	Points, Edges, Triangles, BoundaryEdges int

	// MinShape, MaxShape and MeanShape are the extremes and the mean of q.
	MinShape, MaxShape, MeanShape float64
	// MinAngle and MaxAngle are the extreme interior angles in degrees.
	MinAngle, MaxAngle float64
	// MinEdge and MaxEdge are the extreme edge lengths; MaxEdge is the mesh
	// size h.
	MinEdge, MaxEdge float64
	// Area is the total area (triangles of either orientation count
	// positive).
	Area float64
}

// shape returns the shape measure q of the triangle (a, b, c).
func shape(a, b, c [2]float64) float64 {
	s := sq(a, b) + sq(b, c) + sq(c, a)
	return 2 * math.Sqrt(3) * math.Abs(orient(a, b, c)) / s
}

// Shape returns the shape measure q of triangle t (see Quality).
func (m *Mesh) Shape(t int) float64 {
	tri := m.Triangles[t]
	return shape(m.Points[tri[0]], m.Points[tri[1]], m.Points[tri[2]])
}

// Quality returns size and shape statistics of m.
func (m *Mesh) Quality() Quality {
	q := Quality{
		Points:    len(m.Points),
		Edges:     len(m.Edges),
		Triangles: len(m.Triangles),
		MinShape:  math.Inf(1),
		MinAngle:  math.Inf(1),
		MinEdge:   math.Inf(1),
	}
	sum := 0.0
	for t, tri := range m.Triangles {
		var p [3][2]float64
		for i, v := range tri {
			p[i] = m.Points[v]
		}
		s := shape(p[0], p[1], p[2])
		q.MinShape = min(q.MinShape, s)
		q.MaxShape = max(q.MaxShape, s)
		sum += s
		q.Area += m.Area(t)
		for i := range 3 {
			// The angle at p[i] from the cross and dot products of its two
			// sides, accurate for angles near 0 and 180 degrees alike.
			a, b, c := p[i], p[(i+1)%3], p[(i+2)%3]
			ux, uy := b[0]-a[0], b[1]-a[1]
			wx, wy := c[0]-a[0], c[1]-a[1]
			ang := math.Atan2(math.Abs(ux*wy-uy*wx), ux*wx+uy*wy) * 180 / math.Pi
			q.MinAngle = min(q.MinAngle, ang)
			q.MaxAngle = max(q.MaxAngle, ang)
		}
	}
	q.MeanShape = sum / float64(len(m.Triangles))
	for e := range m.Edges {
		l := m.EdgeLength(e)
		q.MinEdge = min(q.MinEdge, l)
		q.MaxEdge = max(q.MaxEdge, l)
		if m.EdgeTriangles[e][1] < 0 {
			q.BoundaryEdges++
		}
	}
	return q
}
