package fem

import (
	"fmt"
	"sort"

	"mixwell/mesh"
)

// Space is a finite element space on a mesh: one reference element, and for
// every triangle the global numbers of its local basis functions and the
// signs that turn local into global basis functions.
//
// Global numbering: vertex functions first (vertex v, position i -> v*nv+i),
// then edge functions (edge e, global ordinal j -> offset + e*ne + j), then
// interior functions (triangle t, ordinal j -> offset + t*ni + j).
//
// Edge functions are numbered along the global edge orientation (low to high
// vertex number). For Lagrange elements an edge traversed against that
// orientation reverses the order of its nodes. For H(div) elements it flips
// the sign of moment j by (-1)^(j+1): the normal reverses and the Legendre
// weight L_j(1-s) = (-1)^j L_j(s). Signs are nil for scalar spaces.
type Space struct {
	mesh   *mesh.Mesh
	scalar ScalarElement
	div    DivElement
	nloc   int
	dofs   []int     // nloc per triangle
	signs  []float64 // nloc per triangle, nil for scalar spaces
	n      int

	perVertex, perEdge, perInside int
	edgeOffset, insideOffset      int
}

// NewScalarSpace builds the space of e on m. Functions attached to vertices
// and edges are shared between triangles (a continuous space); interior
// functions belong to one triangle.
func NewScalarSpace(m *mesh.Mesh, e ScalarElement) *Space {
	s := &Space{mesh: m, scalar: e}
	s.build(e.Entities(), false)
	return s
}

// NewDivSpace builds the H(div)-conforming space of e on m with the
// contravariant Piola map.
func NewDivSpace(m *mesh.Mesh, e DivElement) *Space {
	s := &Space{mesh: m, div: e}
	s.build(e.Entities(), true)
	return s
}

func (s *Space) build(ents []DofEntity, signed bool) {
	m := s.mesh
	s.nloc = len(ents)
	for _, d := range ents {
		switch d.Kind {
		case AtVertex:
			if d.Index == 0 {
				s.perVertex++
			}
		case OnEdge:
			if d.Index == 0 {
				s.perEdge++
			}
		case Inside:
			s.perInside++
		}
	}
	s.edgeOffset = s.perVertex * m.NumPoints()
	s.insideOffset = s.edgeOffset + s.perEdge*m.NumEdges()
	s.n = s.insideOffset + s.perInside*m.NumTriangles()
	nt := m.NumTriangles()
	s.dofs = make([]int, nt*s.nloc)
	if signed {
		s.signs = make([]float64, nt*s.nloc)
	}
	for t := 0; t < nt; t++ {
		tri := m.Triangles[t]
		dofs := s.dofs[t*s.nloc : (t+1)*s.nloc]
		for i, d := range ents {
			sign := 1.0
			switch d.Kind {
			case AtVertex:
				dofs[i] = tri[d.Index]*s.perVertex + d.Ordinal
			case OnEdge:
				e := m.TriangleEdges[t][d.Index]
				start, end := tri[(d.Index+1)%3], tri[(d.Index+2)%3]
				j := d.Ordinal
				if start > end {
					if signed {
						if j%2 == 0 {
							sign = -1
						}
					} else {
						j = s.perEdge - 1 - j
					}
				}
				dofs[i] = s.edgeOffset + e*s.perEdge + j
			case Inside:
				dofs[i] = s.insideOffset + t*s.perInside + d.Ordinal
			}
			if signed {
				s.signs[t*s.nloc+i] = sign
			}
		}
	}
}

// Mesh returns the mesh of the space.
func (s *Space) Mesh() *mesh.Mesh { return s.mesh }

// Len returns the number of global degrees of freedom.
func (s *Space) Len() int { return s.n }

// LocalLen returns the number of basis functions on one triangle.
func (s *Space) LocalLen() int { return s.nloc }

// Scalar returns the reference element of a scalar space, nil otherwise.
func (s *Space) Scalar() ScalarElement { return s.scalar }

// Div returns the reference element of an H(div) space, nil otherwise.
func (s *Space) Div() DivElement { return s.div }

// Dofs returns the global numbers of the basis functions of triangle t. The
// slice aliases the space's storage and must not be modified.
func (s *Space) Dofs(t int) []int { return s.dofs[t*s.nloc : (t+1)*s.nloc] }

// Signs returns the signs of the basis functions of triangle t (global basis
// function = sign * Piola-mapped local basis function), or nil for scalar
// spaces. The slice aliases the space's storage and must not be modified.
func (s *Space) Signs(t int) []float64 {
	if s.signs == nil {
		return nil
	}
	return s.signs[t*s.nloc : (t+1)*s.nloc]
}

// BoundaryDofs returns, sorted and without repetition, the degrees of freedom
// attached to boundary edges carrying one of the given tags: their vertex and
// edge functions for a continuous scalar space, their edge functions for an
// H(div) space (the normal moments). It returns an error naming any tag that
// no boundary edge carries.
func (s *Space) BoundaryDofs(tags ...int) ([]int, error) {
	m := s.mesh
	want := make(map[int]bool, len(tags))
	for _, t := range tags {
		want[t] = true
	}
	found := make(map[int]bool, len(tags))
	set := make(map[int]struct{})
	for e, tag := range m.EdgeTags {
		if tag == 0 || !want[tag] {
			continue
		}
		found[tag] = true
		if s.perVertex > 0 {
			for _, v := range m.Edges[e] {
				for i := 0; i < s.perVertex; i++ {
					set[v*s.perVertex+i] = struct{}{}
				}
			}
		}
		for j := 0; j < s.perEdge; j++ {
			set[s.edgeOffset+e*s.perEdge+j] = struct{}{}
		}
	}
	for _, t := range tags {
		if !found[t] {
			return nil, fmt.Errorf("fem: no boundary edge carries tag %d (tags present: %v)", t, boundaryTags(m))
		}
	}
	out := make([]int, 0, len(set))
	for d := range set {
		out = append(out, d)
	}
	sort.Ints(out)
	return out, nil
}

// EdgeDofs returns the global degrees of freedom that live on edge e in the
// global edge order (edge functions only, not vertex functions).
func (s *Space) EdgeDofs(e int) []int {
	out := make([]int, s.perEdge)
	for j := range out {
		out[j] = s.edgeOffset + e*s.perEdge + j
	}
	return out
}

func boundaryTags(m *mesh.Mesh) []int {
	seen := map[int]bool{}
	var out []int
	for _, t := range m.EdgeTags {
		if t != 0 && !seen[t] {
			seen[t] = true
			out = append(out, t)
		}
	}
	sort.Ints(out)
	return out
}
