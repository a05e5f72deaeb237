package mesh

import (
	"fmt"
	"maps"
	"math/rand/v2"
)

// Refine returns the uniform red refinement of m: every triangle is split
// into four by the midpoints of its edges.
//
// The points of m keep their indices; the midpoint of edge e of m is point
// NumPoints()+e. Triangle t = (v0, v1, v2) of m, whose local edge i has
// midpoint m_i, becomes triangles 4t+k:
//
//	4t+0 = (v0, m2, m1), 4t+1 = (m2, v1, m0), 4t+2 = (m1, m0, v2), 4t+3 = (m0, m1, m2),
//
// so child k < 3 holds local vertex k of its parent, and every child has its
// parent's orientation. All four children are similar to the parent (the
// middle one rotated by 180 degrees), so refinement preserves every shape
// measure and angle exactly (up to rounding) and halves the mesh size. The
// halves of a boundary edge inherit its tag; TagNames and MixedOrientation
// are kept, and Parent[4t+k] = t.
//
// Counts: V' = V + E, E' = 2E + 3T, T' = 4T. Refine panics if m does not
// satisfy the invariants checked by Validate.
func Refine(m *Mesh) *Mesh {
	nv := len(m.Points)
	pts := make([][2]float64, nv+len(m.Edges))
	copy(pts, m.Points)
	for e, ed := range m.Edges {
		a, b := m.Points[ed[0]], m.Points[ed[1]]
		pts[nv+e] = [2]float64{(a[0] + b[0]) / 2, (a[1] + b[1]) / 2}
	}
	tris := make([][3]int, 4*len(m.Triangles))
	for t, v := range m.Triangles {
		te := m.TriangleEdges[t]
		m0, m1, m2 := nv+te[0], nv+te[1], nv+te[2]
		tris[4*t+0] = [3]int{v[0], m2, m1}
		tris[4*t+1] = [3]int{m2, v[1], m0}
		tris[4*t+2] = [3]int{m1, m0, v[2]}
		tris[4*t+3] = [3]int{m0, m1, m2}
	}
	out := mustAssemble("Refine", pts, tris, m.MixedOrientation)
	for e, tag := range m.EdgeTags {
		if tag == 0 {
			continue
		}
		ed := m.Edges[e]
		out.EdgeTags[out.mustEdge(ed[0], nv+e)] = tag
		out.EdgeTags[out.mustEdge(ed[1], nv+e)] = tag
	}
	out.TagNames = cloneNames(m.TagNames)
	out.Parent = parentsOf(len(m.Triangles), 4)
	return out
}

// RefineTimes applies Refine n >= 0 times. Parent of the result refers to the
// triangles of m: Parent[t] is the triangle of m containing triangle t (the
// identity for n = 0, in which case the result is a copy of m).
func RefineTimes(m *Mesh, n int) *Mesh {
	if n < 0 {
		panic(fmt.Sprintf("mesh: RefineTimes: n = %d, want n >= 0", n))
	}
	out := m.Clone()
	out.Parent = make([]int, len(m.Triangles))
	for t := range out.Parent {
		out.Parent[t] = t
	}
	for range n {
		r := Refine(out)
		for t, p := range r.Parent {
			r.Parent[t] = out.Parent[p]
		}
		out = r
	}
	return out
}

// BarycentricSplit returns the barycentric (Alfeld) refinement of m: every
// triangle is split into three by its centroid (P. Alfeld, "A trivariate
// Clough–Tocher scheme for tetrahedral data", CAGD 1, 1984; in 2D the
// Clough–Tocher split). Scott–Vogelius elements are stable on such meshes
// (Arnold and Qin 1992 for degree 2, Guzmán and Neilan 2018 in general).
//
// The points of m keep their indices; the centroid of triangle t is point
// NumPoints()+t. Triangle t = (v0, v1, v2) with centroid c becomes triangles
// 3t+i:
//
//	3t+0 = (v1, v2, c), 3t+1 = (v2, v0, c), 3t+2 = (v0, v1, c),
//
// so child i holds the parent's local edge i (as its own local edge 2) and has
// the parent's orientation. Boundary edges are unchanged and keep their tags;
// TagNames and MixedOrientation are kept, and Parent[3t+i] = t.
//
// Counts: V' = V + T, E' = E + 3T, T' = 3T. BarycentricSplit panics if m does
// not satisfy the invariants checked by Validate.
func BarycentricSplit(m *Mesh) *Mesh {
	nv := len(m.Points)
	pts := make([][2]float64, nv+len(m.Triangles))
	copy(pts, m.Points)
	tris := make([][3]int, 3*len(m.Triangles))
	for t, v := range m.Triangles {
		c := nv + t
		pts[c] = m.Centroid(t)
		tris[3*t+0] = [3]int{v[1], v[2], c}
		tris[3*t+1] = [3]int{v[2], v[0], c}
		tris[3*t+2] = [3]int{v[0], v[1], c}
	}
	out := mustAssemble("BarycentricSplit", pts, tris, m.MixedOrientation)
	for e, tag := range m.EdgeTags {
		if tag != 0 {
			out.EdgeTags[out.mustEdge(m.Edges[e][0], m.Edges[e][1])] = tag
		}
	}
	out.TagNames = cloneNames(m.TagNames)
	out.Parent = parentsOf(len(m.Triangles), 3)
	return out
}

// localPerms lists the permutations of three local vertices; the first three
// are even (keep the orientation), the last three odd (reverse it).
var localPerms = [6][3]int{{0, 1, 2}, {1, 2, 0}, {2, 0, 1}, {0, 2, 1}, {2, 1, 0}, {1, 0, 2}}

// PermuteLocalVertices returns a copy of m in which the local vertex order of
// every triangle is replaced by one of the six permutations, chosen uniformly
// at random: about half of the triangles become clockwise.
//
// This deliberately breaks the counter-clockwise convention, to test code
// whose signs depend on orientation (signed Jacobians, Piola maps, outward
// normals, global edge directions): a correct discretisation gives the same
// answer on m and on the result. The result has MixedOrientation set, which
// makes Validate accept clockwise triangles.
//
// New local vertex i is old local vertex p[i], and TriangleEdges is permuted
// the same way, so local edge i is still opposite local vertex i. Points,
// Edges (with their global orientation), EdgeTriangles, EdgeTags, TagNames
// and Parent are unchanged.
func (m *Mesh) PermuteLocalVertices(rng *rand.Rand) *Mesh {
	if rng == nil {
		panic("mesh: PermuteLocalVertices: nil random source")
	}
	out := m.Clone()
	for t, tri := range m.Triangles {
		te := m.TriangleEdges[t]
		p := localPerms[rng.IntN(len(localPerms))]
		out.Triangles[t] = [3]int{tri[p[0]], tri[p[1]], tri[p[2]]}
		out.TriangleEdges[t] = [3]int{te[p[0]], te[p[1]], te[p[2]]}
	}
	out.MixedOrientation = true
	return out
}

func cloneNames(names map[int]string) map[int]string {
	if names == nil {
		return make(map[int]string)
	}
	return maps.Clone(names)
}

// parentsOf returns Parent for a mesh made of n children per triangle of a
// mesh with nt triangles, numbered n·t+k.
func parentsOf(nt, n int) []int {
	p := make([]int, nt*n)
	for t := range nt {
		for k := range n {
			p[n*t+k] = t
		}
	}
	return p
}
