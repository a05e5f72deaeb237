package fem

import (
	"fmt"
	"math"

	"mixwell/mesh"
)

// OutwardNormal returns the outward unit normal of boundary edge e (the
// normal pointing away from its only triangle) and the edge's length.
func OutwardNormal(m *mesh.Mesh, e int) (n [2]float64, length float64) {
	a, b := m.Points[m.Edges[e][0]], m.Points[m.Edges[e][1]]
	dx, dy := b[0]-a[0], b[1]-a[1]
	length = math.Hypot(dx, dy)
	n = [2]float64{dy / length, -dx / length}
	t := m.EdgeTriangles[e][0]
	tri := m.Triangles[t]
	for _, v := range tri {
		if v != m.Edges[e][0] && v != m.Edges[e][1] {
			p := m.Points[v]
			if (p[0]-a[0])*n[0]+(p[1]-a[1])*n[1] > 0 {
				n[0], n[1] = -n[0], -n[1]
			}
		}
	}
	return n, length
}

// BoundaryValues returns the degrees of freedom of the continuous Lagrange
// space s that lie on boundary edges carrying one of tags, with the value
// of f at each one's node (the nodal interpolant restricted to the
// boundary). A node shared by edges of two listed tags appears once. The
// error names a tag that no boundary edge carries, or a space that is not a
// Lagrange space.
func BoundaryValues(s *Space, tags []int, f func(x [2]float64) float64) (dofs []int, values []float64, err error) {
	el, ok := s.scalar.(*Lagrange)
	if !ok {
		return nil, nil, fmt.Errorf("fem: BoundaryValues needs a Lagrange space, have %T", s.scalar)
	}
	edges, err := taggedEdges(s.mesh, tags)
	if err != nil {
		return nil, nil, err
	}
	m := s.mesh
	ents := el.Entities()
	nodes := el.Nodes()
	seen := make(map[int]bool)
	for _, e := range edges {
		t := m.EdgeTriangles[e][0]
		i, err := LocalEdge(m, t, e)
		if err != nil {
			return nil, nil, err
		}
		af := ElementMap(m, t)
		gd := s.Dofs(t)
		for a, d := range ents {
			on := d.Kind == OnEdge && d.Index == i ||
				d.Kind == AtVertex && d.Index != i
			if !on || seen[gd[a]] {
				continue
			}
			seen[gd[a]] = true
			dofs = append(dofs, gd[a])
			values = append(values, f(af.Point(nodes[a])))
		}
	}
	return dofs, values, nil
}

// BoundaryNormalMoments returns the normal-moment degrees of freedom of the
// H(div) space s on boundary edges carrying one of tags, with the values
// that interpolate the outward normal component g(x, n) (n the outward unit
// normal of the edge): the edge moments of the field g n, so that the
// interpolant's normal trace is the L2 projection of g on each edge. The
// error names a tag that no boundary edge carries.
func BoundaryNormalMoments(s *Space, tags []int, g func(x, n [2]float64) float64) (dofs []int, values []float64, err error) {
	if s.div == nil {
		return nil, nil, fmt.Errorf("fem: BoundaryNormalMoments needs an H(div) space")
	}
	edges, err := taggedEdges(s.mesh, tags)
	if err != nil {
		return nil, nil, err
	}
	m := s.mesh
	ents := s.div.Entities()
	loc := make([]float64, s.nloc)
	for _, e := range edges {
		t := m.EdgeTriangles[e][0]
		i, err := LocalEdge(m, t, e)
		if err != nil {
			return nil, nil, err
		}
		n, _ := OutwardNormal(m, e)
		af := ElementMap(m, t)
		s.div.DofsTo(loc, func(xh [2]float64) [2]float64 {
			x := af.Point(xh)
			gn := g(x, n)
			return af.InversePiola([2]float64{gn * n[0], gn * n[1]})
		})
		gd, sg := s.Dofs(t), s.Signs(t)
		for a, d := range ents {
			if d.Kind == OnEdge && d.Index == i {
				dofs = append(dofs, gd[a])
				values = append(values, sg[a]*loc[a])
			}
		}
	}
	return dofs, values, nil
}

// taggedEdges lists the boundary edges carrying one of tags, or an error
// naming a tag that no boundary edge carries.
func taggedEdges(m *mesh.Mesh, tags []int) ([]int, error) {
	want := make(map[int]bool, len(tags))
	for _, t := range tags {
		want[t] = true
	}
	found := make(map[int]bool, len(tags))
	var out []int
	for e, tag := range m.EdgeTags {
		if tag != 0 && want[tag] && m.IsBoundary(e) {
			found[tag] = true
			out = append(out, e)
		}
	}
	for _, t := range tags {
		if !found[t] {
			return nil, fmt.Errorf("fem: no boundary edge carries tag %d (tags present: %v)", t, boundaryTags(m))
		}
	}
	return out, nil
}
