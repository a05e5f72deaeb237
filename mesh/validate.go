package mesh

import (
	"fmt"
)

// Validate checks every invariant listed in the documentation of Mesh and
// returns an error describing the first violation found, naming the point,
// triangle, edge or tag at fault. It does not rebuild the topology: it checks
// the stored fields against each other, so it also catches fields edited by
// hand. Its cost is O(V + T + E).
func (m *Mesh) Validate() error {
	nv, nt, ne := len(m.Points), len(m.Triangles), len(m.Edges)
	switch {
	case nv == 0:
		return fmt.Errorf("mesh: no points")
	case nt == 0:
		return fmt.Errorf("mesh: no triangles")
	case len(m.TriangleEdges) != nt:
		return fmt.Errorf("mesh: %d triangles but %d rows of TriangleEdges", nt, len(m.TriangleEdges))
	case len(m.EdgeTriangles) != ne:
		return fmt.Errorf("mesh: %d edges but %d rows of EdgeTriangles", ne, len(m.EdgeTriangles))
	case len(m.EdgeTags) != ne:
		return fmt.Errorf("mesh: %d edges but %d edge tags", ne, len(m.EdgeTags))
	case m.Parent != nil && len(m.Parent) != nt:
		return fmt.Errorf("mesh: %d triangles but %d parent entries", nt, len(m.Parent))
	case m.TagNames == nil:
		return fmt.Errorf("mesh: TagNames is nil; use an empty map")
	}

	for v, p := range m.Points {
		if msg := pointProblem(p); msg != "" {
			return fmt.Errorf("mesh: point %d %s", v, msg)
		}
	}
	used := make([]bool, nv)
	for t, tri := range m.Triangles {
		if msg := triangleProblem(m.Points, tri, m.MixedOrientation); msg != "" {
			return fmt.Errorf("mesh: triangle %d (vertices %d %d %d) %s", t, tri[0], tri[1], tri[2], msg)
		}
		used[tri[0]], used[tri[1]], used[tri[2]] = true, true, true
	}
	for v, u := range used {
		if !u {
			return fmt.Errorf("mesh: point %d is a vertex of no triangle", v)
		}
	}
	for t, p := range m.Parent {
		if p < 0 {
			return fmt.Errorf("mesh: triangle %d has parent %d; parents are triangle indices >= 0", t, p)
		}
	}

	for e, ed := range m.Edges {
		if ed[0] < 0 || ed[1] >= nv || ed[0] >= ed[1] {
			return fmt.Errorf("mesh: edge %d = %d-%d: want 0 <= low < high < %d", e, ed[0], ed[1], nv)
		}
		if e > 0 {
			p := m.Edges[e-1]
			if !(p[0] < ed[0] || p[0] == ed[0] && p[1] < ed[1]) {
				return fmt.Errorf("mesh: edge %d = %d-%d follows edge %d = %d-%d: edges must be distinct and in lexicographic order", e, ed[0], ed[1], e-1, p[0], p[1])
			}
		}
	}

	// Every local edge names the right global edge, and that edge lists the
	// triangle; count how often each edge is named.
	count := make([]int8, ne)
	for t, tri := range m.Triangles {
		for i, e := range m.TriangleEdges[t] {
			if e < 0 || e >= ne {
				return fmt.Errorf("mesh: triangle %d local edge %d = %d is out of range: %d edges", t, i, e, ne)
			}
			a, b := tri[(i+1)%3], tri[(i+2)%3]
			if b < a {
				a, b = b, a
			}
			if m.Edges[e] != [2]int{a, b} {
				return fmt.Errorf("mesh: triangle %d local edge %d is edge %d = %d-%d, but the side opposite local vertex %d is %d-%d", t, i, e, m.Edges[e][0], m.Edges[e][1], i, a, b)
			}
			if et := m.EdgeTriangles[e]; et[0] != t && et[1] != t {
				return fmt.Errorf("mesh: triangle %d has edge %d, but the edge's triangles are %d and %d", t, e, et[0], et[1])
			}
			if count[e] == 2 {
				return fmt.Errorf("mesh: edge %d = %d-%d belongs to more than two triangles", e, a, b)
			}
			count[e]++
		}
	}

	for e, et := range m.EdgeTriangles {
		ed := m.Edges[e]
		tag := m.EdgeTags[e]
		if et[0] < 0 || et[0] >= nt {
			return fmt.Errorf("mesh: edge %d first triangle %d is out of range: %d triangles", e, et[0], nt)
		}
		if et[1] < 0 {
			if et[1] != -1 || count[e] != 1 {
				return fmt.Errorf("mesh: boundary edge %d = %d-%d: second triangle %d, named by %d triangles; want -1 and 1", e, ed[0], ed[1], et[1], count[e])
			}
			if tag <= 0 {
				return fmt.Errorf("mesh: boundary edge %d = %d-%d has tag %d; boundary tags must be positive", e, ed[0], ed[1], tag)
			}
			continue
		}
		if et[1] >= nt || et[0] >= et[1] || count[e] != 2 {
			return fmt.Errorf("mesh: interior edge %d = %d-%d: triangles %d and %d, named by %d triangles; want two distinct triangles in increasing order", e, ed[0], ed[1], et[0], et[1], count[e])
		}
		if tag != 0 {
			return fmt.Errorf("mesh: interior edge %d = %d-%d has tag %d; interior edges have tag 0", e, ed[0], ed[1], tag)
		}
		c0 := m.opposite(et[0], e)
		c1 := m.opposite(et[1], e)
		d0 := orient(m.Points[ed[0]], m.Points[ed[1]], m.Points[c0])
		d1 := orient(m.Points[ed[0]], m.Points[ed[1]], m.Points[c1])
		if !(d0 > 0 && d1 < 0 || d0 < 0 && d1 > 0) {
			return fmt.Errorf("mesh: triangles %d and %d overlap: both lie on the same side of their common edge %d = %d-%d", et[0], et[1], e, ed[0], ed[1])
		}
	}

	names := make(map[string]int, len(m.TagNames))
	for tag, name := range m.TagNames {
		if tag <= 0 {
			return fmt.Errorf("mesh: tag name %q belongs to tag %d; tags must be positive", name, tag)
		}
		if name == "" {
			return fmt.Errorf("mesh: tag %d has an empty name; delete the entry instead", tag)
		}
		if err := checkTagName(nil, tag, name); err != nil {
			return err
		}
		if other, ok := names[name]; ok {
			return fmt.Errorf("mesh: tags %d and %d have the same name %q", min(tag, other), max(tag, other), name)
		}
		names[name] = tag
	}
	return nil
}

// opposite returns the vertex of triangle t opposite its edge e.
func (m *Mesh) opposite(t, e int) int {
	for i, f := range m.TriangleEdges[t] {
		if f == e {
			return m.Triangles[t][i]
		}
	}
	panic(fmt.Sprintf("mesh: internal error: triangle %d has no edge %d", t, e))
}
