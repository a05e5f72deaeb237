package mesh

import (
	"fmt"
	"maps"
	"math"
	"slices"
	"sort"
	"strings"
)

// DefaultTag is the tag New gives to every boundary edge before any call to
// TagBoundary.
const DefaultTag = 1

// degenerateTol is the relative degeneracy threshold: a triangle with signed
// double area d and squared edge lengths l0², l1², l2² is degenerate when
// |d| <= degenerateTol·(l0²+l1²+l2²). The ratio |d|/(l0²+l1²+l2²) is the
// shape measure q divided by 2√3, so the threshold is independent of scale and
// admits aspect ratios up to about 1e11, far beyond anything a solver can use,
// while rejecting triangles whose orientation is decided by rounding (the
// rounding error of d is a few ulps of l², i.e. about 1e-16 relative).
const degenerateTol = 1e-12

// Mesh is a conforming triangulation of a polygonal domain in the plane.
//
// Invariants established by New and kept by every function of this package
// that returns a *Mesh (Validate checks all of them):
//   - Points[v] are vertex coordinates (finite); every point is a vertex of at
//     least one triangle.
//   - Triangles[t] are three distinct vertex indices. Triangles are
//     counter-clockwise and non-degenerate unless MixedOrientation is set, in
//     which case they are non-degenerate of either orientation.
//   - Edges[e] = {a, b} with a < b: every edge has one global orientation,
//     from the lower to the higher vertex number. Edges are numbered in
//     increasing lexicographic order of (a, b), so EdgeBetween is a binary
//     search and the numbering depends only on Triangles.
//   - TriangleEdges[t][i] is the global edge opposite local vertex i, so local
//     edge 0 joins local vertices 1 and 2, edge 1 joins 2 and 0, edge 2 joins
//     0 and 1.
//   - EdgeTriangles[e] = {t0, t1}: the triangles sharing edge e with t0 < t1,
//     and t1 = -1 on the boundary. No edge is shared by more than two
//     triangles, and the two triangles of an interior edge lie on opposite
//     sides of it (no fold).
//   - EdgeTags[e] is 0 for interior edges and a positive tag for boundary
//     edges; TagNames maps tags to names (never nil, may be empty; names are
//     single words and distinct).
//   - Parent is nil or has one entry per triangle (see its documentation).
//
// A Mesh owns all its slices and its map; functions of this package never
// modify a mesh passed to them, except the methods documented as doing so
// (TagBoundary).
type Mesh struct {
	Points        [][2]float64
	Triangles     [][3]int
	Edges         [][2]int
	TriangleEdges [][3]int
	EdgeTriangles [][2]int
	EdgeTags      []int
	TagNames      map[int]string

	// Parent, when not nil, gives for every triangle t the index Parent[t] of
	// the triangle of the source mesh that contains it. It is set by Refine,
	// RefineTimes (relative to the original mesh), BarycentricSplit,
	// Subdivide and SubdivideBroken, and copied by Perturb,
	// PermuteLocalVertices and Clone. It is nil for meshes made by New,
	// Rectangle and Read, and the text format does not store it.
	Parent []int

	// MixedOrientation records that triangles may be clockwise. It is set
	// only by PermuteLocalVertices (and by Read for files that declare
	// "orientation mixed"), whose meshes deliberately break the
	// counter-clockwise convention so that code depending on orientation
	// signs (Piola maps, outward normals) can be tested on clockwise
	// triangles. Validate then accepts either orientation. Meshes derived
	// from such a mesh (Refine, BarycentricSplit, Subdivide, Perturb) keep
	// every triangle's orientation and the flag.
	MixedOrientation bool
}

// NumPoints returns the number of vertices.
func (m *Mesh) NumPoints() int { return len(m.Points) }

// NumTriangles returns the number of triangles.
func (m *Mesh) NumTriangles() int { return len(m.Triangles) }

// NumEdges returns the number of edges.
func (m *Mesh) NumEdges() int { return len(m.Edges) }

// New returns the mesh with the given vertex coordinates and triangles
// (vertex indices, 0-based). It copies its arguments.
//
// New checks that every coordinate is finite, that every vertex index is in
// range and appears at most once per triangle, that every triangle is
// non-degenerate (twice its area exceeds 1e-12 times the sum of its squared
// edge lengths) and counter-clockwise, that every point is used by some
// triangle, that no edge is shared by more than two triangles and that two
// triangles sharing an edge lie on opposite sides of it. The error names the
// first offending point, triangle or edge.
//
// New numbers the edges, orients them from the lower to the higher vertex
// number, and gives every boundary edge the tag DefaultTag. TagNames is empty
// and Parent is nil.
func New(points [][2]float64, triangles [][3]int) (*Mesh, error) {
	return newMesh(slices.Clone(points), slices.Clone(triangles), false)
}

// newMesh is New without the copies; it takes ownership of its arguments.
// With mixed set it accepts clockwise triangles.
func newMesh(points [][2]float64, triangles [][3]int, mixed bool) (*Mesh, error) {
	if len(points) == 0 {
		return nil, fmt.Errorf("mesh: no points")
	}
	if len(triangles) == 0 {
		return nil, fmt.Errorf("mesh: no triangles")
	}
	for v, p := range points {
		if msg := pointProblem(p); msg != "" {
			return nil, fmt.Errorf("mesh: point %d %s", v, msg)
		}
	}
	used := make([]bool, len(points))
	for t, tri := range triangles {
		if msg := triangleProblem(points, tri, mixed); msg != "" {
			return nil, fmt.Errorf("mesh: triangle %d (vertices %d %d %d) %s", t, tri[0], tri[1], tri[2], msg)
		}
		used[tri[0]], used[tri[1]], used[tri[2]] = true, true, true
	}
	if v := slices.Index(used, false); v >= 0 {
		return nil, fmt.Errorf("mesh: point %d (%g, %g) is a vertex of no triangle; every point must be used", v, points[v][0], points[v][1])
	}
	return assemble(points, triangles, mixed)
}

// assemble builds the topology of checked points and triangles and gives
// every boundary edge DefaultTag.
func assemble(points [][2]float64, triangles [][3]int, mixed bool) (*Mesh, error) {
	edges, triEdges, edgeTris, err := buildTopology(points, triangles)
	if err != nil {
		return nil, err
	}
	tags := make([]int, len(edges))
	for e, et := range edgeTris {
		if et[1] < 0 {
			tags[e] = DefaultTag
		}
	}
	return &Mesh{
		Points:           points,
		Triangles:        triangles,
		Edges:            edges,
		TriangleEdges:    triEdges,
		EdgeTriangles:    edgeTris,
		EdgeTags:         tags,
		TagNames:         make(map[int]string),
		MixedOrientation: mixed,
	}, nil
}

// mustAssemble is assemble for triangulations derived from a valid mesh, for
// which topology errors mean the source mesh broke its invariants.
func mustAssemble(op string, points [][2]float64, triangles [][3]int, mixed bool) *Mesh {
	m, err := assemble(points, triangles, mixed)
	if err != nil {
		panic(fmt.Sprintf("mesh: %s: source mesh is invalid (check it with Validate): %v", op, err))
	}
	return m
}

// pointProblem describes what is wrong with a point, or returns "".
func pointProblem(p [2]float64) string {
	if math.IsNaN(p[0]) || math.IsNaN(p[1]) || math.IsInf(p[0], 0) || math.IsInf(p[1], 0) {
		return fmt.Sprintf("(%g, %g) is not finite", p[0], p[1])
	}
	return ""
}

// triangleProblem describes what is wrong with one triangle, or returns "".
// With mixed set clockwise triangles are allowed.
func triangleProblem(points [][2]float64, tri [3]int, mixed bool) string {
	n := len(points)
	for i, v := range tri {
		if v < 0 || v >= n {
			return fmt.Sprintf("has local vertex %d = %d out of range: %d points allow 0..%d", i, v, n, n-1)
		}
	}
	if tri[0] == tri[1] || tri[0] == tri[2] {
		return fmt.Sprintf("repeats vertex %d; the three vertices must be distinct", tri[0])
	}
	if tri[1] == tri[2] {
		return fmt.Sprintf("repeats vertex %d; the three vertices must be distinct", tri[1])
	}
	a, b, c := points[tri[0]], points[tri[1]], points[tri[2]]
	d := orient(a, b, c)
	s := sq(b, c) + sq(c, a) + sq(a, b)
	if !(math.Abs(d) > degenerateTol*s) {
		return fmt.Sprintf("is degenerate: twice its area is %g, relative to the sum of squared edge lengths %g; the ratio must exceed %g", d, s, degenerateTol)
	}
	if d < 0 && !mixed {
		return fmt.Sprintf("is clockwise (inverted): signed area %g; triangles must be counter-clockwise", d/2)
	}
	return ""
}

// orient returns twice the signed area of the triangle (a, b, c), positive
// when counter-clockwise.
func orient(a, b, c [2]float64) float64 {
	return (b[0]-a[0])*(c[1]-a[1]) - (b[1]-a[1])*(c[0]-a[0])
}

// sq returns the squared distance between a and b.
func sq(a, b [2]float64) float64 {
	dx, dy := b[0]-a[0], b[1]-a[1]
	return dx*dx + dy*dy
}

// topoError is an error in how triangles fit together. It names the
// triangles involved so that Read can report their lines.
type topoError struct {
	tris []int
	msg  string
}

func (e *topoError) Error() string { return "mesh: " + e.msg }

// refMask extracts the triangle-edge reference 3t+i from a packed entry.
const refMask = 1<<32 - 1

// buildTopology numbers the edges of a triangulation in lexicographic order of
// their (low, high) vertex pairs and returns the edges, the edge opposite
// every local vertex and the triangles of every edge.
//
// It buckets the 3T triangle sides by their lower vertex (counting sort,
// O(V+T)) and sorts each bucket by the higher vertex, O(T log d) for vertex
// degree d, so the work is O(V + T log T) in the worst case and linear for
// meshes of bounded degree. Triangles must have distinct in-range vertices.
func buildTopology(points [][2]float64, tris [][3]int) (edges [][2]int, triEdges [][3]int, edgeTris [][2]int, err error) {
	nv, nt := len(points), len(tris)
	if uint64(nv) >= 1<<31 || uint64(nt)*3 >= 1<<32 {
		panic(fmt.Sprintf("mesh: %d points and %d triangles exceed the supported size", nv, nt))
	}
	start := make([]int, nv+1)
	for _, tri := range tris {
		start[min(tri[1], tri[2])+1]++
		start[min(tri[2], tri[0])+1]++
		start[min(tri[0], tri[1])+1]++
	}
	for v := range nv {
		start[v+1] += start[v]
	}
	next := slices.Clone(start[:nv])
	// An entry packs the higher vertex (upper 32 bits) and the reference
	// 3t+i of local edge i of triangle t (lower 32 bits), so sorting entries
	// sorts by higher vertex, then by triangle.
	ent := make([]uint64, 3*nt)
	for t, tri := range tris {
		for i := range 3 {
			a, b := tri[(i+1)%3], tri[(i+2)%3]
			if b < a {
				a, b = b, a
			}
			ent[next[a]] = uint64(b)<<32 | uint64(3*t+i)
			next[a]++
		}
	}
	for v := range nv {
		sortSmall(ent[start[v]:start[v+1]])
	}

	// Euler's formula V - E + T = 1 - holes makes V+T a close estimate.
	edges = make([][2]int, 0, nv+nt)
	edgeTris = make([][2]int, 0, nv+nt)
	triEdges = make([][3]int, nt)
	for a := range nv {
		s := ent[start[a]:start[a+1]]
		for j := 0; j < len(s); {
			b := int(s[j] >> 32)
			k := j + 1
			for k < len(s) && int(s[k]>>32) == b {
				k++
			}
			r0 := int(s[j] & refMask)
			t0 := r0 / 3
			switch k - j {
			case 1:
				edgeTris = append(edgeTris, [2]int{t0, -1})
			case 2:
				r1 := int(s[j+1] & refMask)
				t1 := r1 / 3
				// Local edge i is opposite local vertex i.
				d0 := orient(points[a], points[b], points[tris[t0][r0%3]])
				d1 := orient(points[a], points[b], points[tris[t1][r1%3]])
				if !(d0 > 0 && d1 < 0 || d0 < 0 && d1 > 0) {
					return nil, nil, nil, &topoError{
						tris: []int{t0, t1},
						msg:  fmt.Sprintf("triangles %d and %d overlap: both lie on the same side of their common edge %d-%d", t0, t1, a, b),
					}
				}
				edgeTris = append(edgeTris, [2]int{t0, t1})
			default:
				ts := make([]int, 0, k-j)
				for _, x := range s[j:k] {
					ts = append(ts, int(x&refMask)/3)
				}
				return nil, nil, nil, &topoError{
					tris: ts,
					msg:  fmt.Sprintf("edge %d-%d is shared by %d triangles %v; at most two triangles may share an edge", a, b, k-j, ts),
				}
			}
			e := len(edges)
			edges = append(edges, [2]int{a, b})
			for _, x := range s[j:k] {
				r := int(x & refMask)
				triEdges[r/3][r%3] = e
			}
			j = k
		}
	}
	return edges, triEdges, edgeTris, nil
}

// sortSmall sorts s in increasing order: insertion sort for the short
// buckets of typical meshes, the library sort otherwise.
func sortSmall(s []uint64) {
	if len(s) > 16 {
		slices.Sort(s)
		return
	}
	for i := 1; i < len(s); i++ {
		x := s[i]
		j := i
		for j > 0 && s[j-1] > x {
			s[j] = s[j-1]
			j--
		}
		s[j] = x
	}
}

// Clone returns a deep copy of m.
func (m *Mesh) Clone() *Mesh {
	tn := maps.Clone(m.TagNames)
	if tn == nil {
		tn = make(map[int]string)
	}
	return &Mesh{
		Points:           slices.Clone(m.Points),
		Triangles:        slices.Clone(m.Triangles),
		Edges:            slices.Clone(m.Edges),
		TriangleEdges:    slices.Clone(m.TriangleEdges),
		EdgeTriangles:    slices.Clone(m.EdgeTriangles),
		EdgeTags:         slices.Clone(m.EdgeTags),
		TagNames:         tn,
		Parent:           slices.Clone(m.Parent),
		MixedOrientation: m.MixedOrientation,
	}
}

// EdgeBetween returns the index of the edge joining vertices a and b (in
// either order) and whether there is one. It is a binary search, O(log E).
func (m *Mesh) EdgeBetween(a, b int) (int, bool) {
	if b < a {
		a, b = b, a
	}
	e := sort.Search(len(m.Edges), func(e int) bool {
		ed := m.Edges[e]
		return ed[0] > a || ed[0] == a && ed[1] >= b
	})
	if e < len(m.Edges) && m.Edges[e] == [2]int{a, b} {
		return e, true
	}
	return -1, false
}

// mustEdge is EdgeBetween for edges known to exist.
func (m *Mesh) mustEdge(a, b int) int {
	e, ok := m.EdgeBetween(a, b)
	if !ok {
		panic(fmt.Sprintf("mesh: internal error: no edge %d-%d", a, b))
	}
	return e
}

// IsBoundary reports whether edge e lies on the boundary.
func (m *Mesh) IsBoundary(e int) bool { return m.EdgeTriangles[e][1] < 0 }

// TagBoundary gives the tag to every boundary edge for which on returns true
// when called with the edge's end points (in the edge's global orientation).
// If name is not empty it becomes the tag's name: a single word without
// spaces or '#', not used by another tag. A tag keeps its name when name is
// empty, and a named tag cannot be renamed. TagBoundary modifies m.
//
// It returns an error, and leaves m unchanged, if tag is not positive, the
// name is not allowed, or on selects no boundary edge.
func (m *Mesh) TagBoundary(tag int, name string, on func(a, b [2]float64) bool) error {
	if on == nil {
		panic("mesh: TagBoundary: nil predicate")
	}
	if tag <= 0 {
		return fmt.Errorf("mesh: boundary tag %d is not allowed: tags must be positive (0 marks interior edges)", tag)
	}
	if err := checkTagName(m.TagNames, tag, name); err != nil {
		return err
	}
	var sel []int
	for e, ed := range m.Edges {
		if m.EdgeTriangles[e][1] < 0 && on(m.Points[ed[0]], m.Points[ed[1]]) {
			sel = append(sel, e)
		}
	}
	if len(sel) == 0 {
		return fmt.Errorf("mesh: tagging boundary %d %q: the predicate selected none of the %d boundary edges", tag, name, m.countBoundary())
	}
	for _, e := range sel {
		m.EdgeTags[e] = tag
	}
	if name != "" {
		if m.TagNames == nil {
			m.TagNames = make(map[int]string)
		}
		m.TagNames[tag] = name
	}
	return nil
}

// checkTagName checks that name may be given to tag in names.
func checkTagName(names map[int]string, tag int, name string) error {
	if name == "" {
		return nil
	}
	if strings.ContainsAny(name, " \t\r\n\v\f#") || !isPrintable(name) {
		return fmt.Errorf("mesh: tag name %q is not allowed: a name is one word without spaces, '#' or control characters", name)
	}
	if old, ok := names[tag]; ok && old != name {
		return fmt.Errorf("mesh: tag %d is already named %q; cannot rename it %q", tag, old, name)
	}
	for t, n := range names {
		if n == name && t != tag {
			return fmt.Errorf("mesh: tag name %q is already used by tag %d", name, t)
		}
	}
	return nil
}

func isPrintable(s string) bool {
	for _, r := range s {
		if r < 0x20 || r == 0x7f || r == 0xfffd {
			return false
		}
	}
	return true
}

func (m *Mesh) countBoundary() int {
	n := 0
	for _, et := range m.EdgeTriangles {
		if et[1] < 0 {
			n++
		}
	}
	return n
}

// BoundaryEdges returns, in increasing order, the boundary edges with the
// given tag; with tag 0 it returns all boundary edges.
func (m *Mesh) BoundaryEdges(tag int) []int {
	var es []int
	for e, et := range m.EdgeTriangles {
		if et[1] < 0 && (tag == 0 || m.EdgeTags[e] == tag) {
			es = append(es, e)
		}
	}
	return es
}

// Tags returns the distinct tags of the boundary edges in increasing order.
// Names in TagNames for tags that no edge carries are not included.
func (m *Mesh) Tags() []int {
	seen := make(map[int]bool)
	var tags []int
	for _, tag := range m.EdgeTags {
		if tag != 0 && !seen[tag] {
			seen[tag] = true
			tags = append(tags, tag)
		}
	}
	slices.Sort(tags)
	return tags
}

// TagByName returns the tag with the given name. The error lists the known
// names.
func (m *Mesh) TagByName(name string) (int, error) {
	var known []string
	for tag, n := range m.TagNames {
		if n == name {
			return tag, nil
		}
		known = append(known, n)
	}
	if len(known) == 0 {
		return 0, fmt.Errorf("mesh: no boundary tag named %q: the mesh has no named tags", name)
	}
	slices.Sort(known)
	return 0, fmt.Errorf("mesh: no boundary tag named %q; known names: %s", name, strings.Join(known, ", "))
}

// SignedArea returns the signed area of triangle t: positive when it is
// counter-clockwise.
func (m *Mesh) SignedArea(t int) float64 {
	tri := m.Triangles[t]
	return orient(m.Points[tri[0]], m.Points[tri[1]], m.Points[tri[2]]) / 2
}

// Area returns the area of triangle t (positive for either orientation).
func (m *Mesh) Area(t int) float64 { return math.Abs(m.SignedArea(t)) }

// Diameter returns the diameter of triangle t, its longest edge length.
func (m *Mesh) Diameter(t int) float64 {
	tri := m.Triangles[t]
	a, b, c := m.Points[tri[0]], m.Points[tri[1]], m.Points[tri[2]]
	return math.Sqrt(max(sq(a, b), sq(b, c), sq(c, a)))
}

// Centroid returns the centroid of triangle t.
func (m *Mesh) Centroid(t int) [2]float64 {
	tri := m.Triangles[t]
	a, b, c := m.Points[tri[0]], m.Points[tri[1]], m.Points[tri[2]]
	return [2]float64{(a[0] + b[0] + c[0]) / 3, (a[1] + b[1] + c[1]) / 3}
}

// EdgeLength returns the length of edge e.
func (m *Mesh) EdgeLength(e int) float64 {
	ed := m.Edges[e]
	return math.Sqrt(sq(m.Points[ed[0]], m.Points[ed[1]]))
}

// MaxEdgeLength returns the mesh size h, the length of the longest edge.
func (m *Mesh) MaxEdgeLength() float64 {
	h := 0.0
	for _, ed := range m.Edges {
		h = max(h, sq(m.Points[ed[0]], m.Points[ed[1]]))
	}
	return math.Sqrt(h)
}
