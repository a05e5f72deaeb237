package mesh

import (
	"maps"
	"math"
	"slices"
	"testing"
)

// tagCounts returns the number of boundary edges per tag.
func tagCounts(m *Mesh) map[int]int {
	c := make(map[int]int)
	for _, e := range m.BoundaryEdges(0) {
		c[m.EdgeTags[e]]++
	}
	return c
}

// barycentric returns the barycentric coordinates of p in triangle t.
func barycentric(m *Mesh, t int, p [2]float64) [3]float64 {
	tri := m.Triangles[t]
	a, b, c := m.Points[tri[0]], m.Points[tri[1]], m.Points[tri[2]]
	d := orient(a, b, c)
	return [3]float64{orient(p, b, c) / d, orient(a, p, c) / d, orient(a, b, p) / d}
}

// onSegment reports whether p lies on the segment ab within a relative
// tolerance.
func onSegment(p, a, b [2]float64, tol float64) bool {
	l2 := sq(a, b)
	if math.Abs(orient(a, b, p)) > tol*l2 {
		return false
	}
	s := ((p[0]-a[0])*(b[0]-a[0]) + (p[1]-a[1])*(b[1]-a[1])) / l2
	return s >= -tol && s <= 1+tol
}

func TestRefine(t *testing.T) {
	const (
		areaTol = 1e-13 // relative rounding of areas of halved edges
		geomTol = 1e-12 // relative rounding of midpoints
	)
	for _, f := range fixtures(t) {
		m := f.m
		r := Refine(m)
		if err := r.Validate(); err != nil {
			t.Fatalf("%s: %v", f.name, err)
		}
		checkAgainstNaive(t, f.name, r)
		// Closed forms of red refinement: one new point per edge, each edge
		// halved plus three interior edges per triangle, four children.
		V, E, T := m.NumPoints(), m.NumEdges(), m.NumTriangles()
		if r.NumPoints() != V+E || r.NumEdges() != 2*E+3*T || r.NumTriangles() != 4*T {
			t.Errorf("%s: V, E, T = %d, %d, %d; want %d, %d, %d", f.name, r.NumPoints(), r.NumEdges(), r.NumTriangles(), V+E, 2*E+3*T, 4*T)
		}
		if r.MixedOrientation != m.MixedOrientation || !maps.Equal(r.TagNames, m.TagNames) {
			t.Errorf("%s: orientation flag or tag names not kept", f.name)
		}
		if got, want := totalArea(r), totalArea(m); math.Abs(got-want) > areaTol*want {
			t.Errorf("%s: area %v, want %v", f.name, got, want)
		}
		for c := range r.Triangles {
			p := r.Parent[c]
			if p != c/4 {
				t.Fatalf("%s: Parent[%d] = %d, want %d", f.name, c, p, c/4)
			}
			// Every child has a quarter of its parent's signed area (so the
			// same orientation) and lies inside it.
			if got, want := r.SignedArea(c), m.SignedArea(p)/4; math.Abs(got-want) > areaTol*math.Abs(want) {
				t.Errorf("%s: child %d signed area %v, want %v", f.name, c, got, want)
			}
			for _, l := range barycentric(m, p, r.Centroid(c)) {
				if l < 0 {
					t.Errorf("%s: child %d centroid outside parent %d", f.name, c, p)
				}
			}
			// Child k < 3 holds local vertex k of its parent.
			if k := c % 4; k < 3 && r.Triangles[c][k] != m.Triangles[p][k] {
				t.Errorf("%s: child %d local vertex %d = %d, want parent's %d", f.name, c, k, r.Triangles[c][k], m.Triangles[p][k])
			}
		}
		// Boundary: each parent edge gives two children with its tag.
		want := tagCounts(m)
		for tag := range want {
			want[tag] *= 2
		}
		if got := tagCounts(r); !maps.Equal(got, want) {
			t.Errorf("%s: boundary edges per tag %v, want %v", f.name, got, want)
		}
		for _, e := range m.BoundaryEdges(0) {
			a, b := m.Edges[e][0], m.Edges[e][1]
			for _, end := range []int{a, b} {
				c, ok := r.EdgeBetween(end, V+e)
				if !ok || !r.IsBoundary(c) || r.EdgeTags[c] != m.EdgeTags[e] {
					t.Errorf("%s: half %d-%d of boundary edge %d: found %v, tag %d; want boundary edge with tag %d", f.name, end, V+e, e, ok, r.EdgeTags[c], m.EdgeTags[e])
				}
			}
			if !onSegment(r.Points[V+e], m.Points[a], m.Points[b], geomTol) {
				t.Errorf("%s: midpoint of edge %d off the edge", f.name, e)
			}
		}
		if !slices.Equal(r.Points[:V], m.Points) {
			t.Errorf("%s: refinement renumbered or moved the old points", f.name)
		}
	}
}

func TestRefinePreservesShape(t *testing.T) {
	// Red refinement splits a triangle into four triangles similar to it
	// (midpoint theorem), so every shape statistic is unchanged and every
	// length halves (closed form). Tolerance: rounding, growing slowly with
	// the number of levels.
	const tol = 1e-12
	base, err := Perturb(mustRectangle(t, 0, 0, 1, 1, 6, 5, CrossedDiagonals), 0.45, newRNG(11))
	if err != nil {
		t.Fatal(err)
	}
	q0 := base.Quality()
	m := base
	for level := 1; level <= 4; level++ {
		m = Refine(m)
		q := m.Quality()
		scale := math.Pow(2, -float64(level))
		for _, c := range []struct {
			name      string
			got, want float64
		}{
			{"MinShape", q.MinShape, q0.MinShape},
			{"MaxShape", q.MaxShape, q0.MaxShape},
			{"MeanShape", q.MeanShape, q0.MeanShape},
			{"MinAngle", q.MinAngle, q0.MinAngle},
			{"MaxAngle", q.MaxAngle, q0.MaxAngle},
			{"MaxEdge", q.MaxEdge, q0.MaxEdge * scale},
			{"MinEdge", q.MinEdge, q0.MinEdge * scale},
			{"Area", q.Area, q0.Area},
		} {
			if math.Abs(c.got-c.want) > tol*math.Abs(c.want) {
				t.Errorf("level %d: %s = %v, want %v", level, c.name, c.got, c.want)
			}
		}
	}
}

func TestRefineTimes(t *testing.T) {
	m := mustRectangle(t, 0, 0, 1, 1, 2, 3, AlternatingDiagonal).PermuteLocalVertices(newRNG(2))
	for n := range 4 {
		r := RefineTimes(m, n)
		if err := r.Validate(); err != nil {
			t.Fatalf("n = %d: %v", n, err)
		}
		// T·4^n triangles (closed form).
		if want := m.NumTriangles() << (2 * n); r.NumTriangles() != want {
			t.Errorf("n = %d: %d triangles, want %d", n, r.NumTriangles(), want)
		}
		// Parent refers to the original mesh: contiguous blocks of 4^n.
		for c, p := range r.Parent {
			if p != c>>(2*n) {
				t.Fatalf("n = %d: Parent[%d] = %d, want %d", n, c, p, c>>(2*n))
			}
			if (r.SignedArea(c) > 0) != (m.SignedArea(p) > 0) {
				t.Errorf("n = %d: child %d has another orientation than parent %d", n, c, p)
			}
		}
	}
	if r := RefineTimes(m, 0); !slices.Equal(r.Points, m.Points) || !slices.Equal(r.Triangles, m.Triangles) {
		t.Error("RefineTimes(m, 0) is not a copy of m")
	}
}

func TestBarycentricSplit(t *testing.T) {
	const tol = 1e-13 // relative rounding of centroids and areas
	for _, f := range fixtures(t) {
		m := f.m
		s := BarycentricSplit(m)
		if err := s.Validate(); err != nil {
			t.Fatalf("%s: %v", f.name, err)
		}
		checkAgainstNaive(t, f.name, s)
		// Closed forms: one centroid and three new edges per triangle,
		// three children.
		V, E, T := m.NumPoints(), m.NumEdges(), m.NumTriangles()
		if s.NumPoints() != V+T || s.NumEdges() != E+3*T || s.NumTriangles() != 3*T {
			t.Errorf("%s: V, E, T = %d, %d, %d; want %d, %d, %d", f.name, s.NumPoints(), s.NumEdges(), s.NumTriangles(), V+T, E+3*T, 3*T)
		}
		if got, want := totalArea(s), totalArea(m); math.Abs(got-want) > tol*want {
			t.Errorf("%s: area %v, want %v", f.name, got, want)
		}
		if !maps.Equal(tagCounts(s), tagCounts(m)) || !maps.Equal(s.TagNames, m.TagNames) {
			t.Errorf("%s: boundary tags %v, want %v", f.name, tagCounts(s), tagCounts(m))
		}
		for _, e := range m.BoundaryEdges(0) {
			c, ok := s.EdgeBetween(m.Edges[e][0], m.Edges[e][1])
			if !ok || s.EdgeTags[c] != m.EdgeTags[e] {
				t.Errorf("%s: boundary edge %v lost or retagged", f.name, m.Edges[e])
			}
		}
		for c, tri := range s.Triangles {
			p, i := c/3, c%3
			if s.Parent[c] != p {
				t.Fatalf("%s: Parent[%d] = %d, want %d", f.name, c, s.Parent[c], p)
			}
			// Child i: the parent's local edge i, then the centroid; a third
			// of the parent's signed area (median property, closed form).
			pt := m.Triangles[p]
			if tri[0] != pt[(i+1)%3] || tri[1] != pt[(i+2)%3] || tri[2] != V+p {
				t.Errorf("%s: child %d = %v; want parent edge %d and centroid %d", f.name, c, tri, i, V+p)
			}
			if got, want := s.SignedArea(c), m.SignedArea(p)/3; math.Abs(got-want) > tol*math.Abs(want) {
				t.Errorf("%s: child %d signed area %v, want %v", f.name, c, got, want)
			}
		}
	}
}

func TestSubdivide(t *testing.T) {
	const tol = 1e-13 // relative rounding of affine maps
	for _, f := range fixtures(t) {
		m := f.m
		V, E, T := m.NumPoints(), m.NumEdges(), m.NumTriangles()
		for n := 1; n <= 4; n++ {
			s, sub := Subdivide(m, n)
			if err := s.Validate(); err != nil {
				t.Fatalf("%s, n = %d: %v", f.name, n, err)
			}
			// Closed forms: n-1 points per edge, (n-1)(n-2)/2 inside each
			// triangle, n² sub-triangles, Euler's formula for the edges.
			wantV := V + (n-1)*E + (n-1)*(n-2)/2*T
			wantT := n * n * T
			wantE := E*n + T*3*n*(n-1)/2
			if s.NumPoints() != wantV || s.NumTriangles() != wantT || s.NumEdges() != wantE || len(sub) != wantV {
				t.Errorf("%s, n = %d: V, T, E, SubPoints = %d, %d, %d, %d; want %d, %d, %d, %d", f.name, n, s.NumPoints(), s.NumTriangles(), s.NumEdges(), len(sub), wantV, wantT, wantE, wantV)
			}
			checkSubPoints(t, f.name, m, s, sub, n, tol)
			if got, want := totalArea(s), totalArea(m); math.Abs(got-want) > tol*want {
				t.Errorf("%s, n = %d: area %v, want %v", f.name, n, got, want)
			}
			want := tagCounts(m)
			for tag := range want {
				want[tag] *= n
			}
			if got := tagCounts(s); !maps.Equal(got, want) {
				t.Errorf("%s, n = %d: boundary edges per tag %v, want %v", f.name, n, got, want)
			}
			// Merged: no two vertices at the same place.
			pts := slices.Clone(s.Points)
			slices.SortFunc(pts, func(a, b [2]float64) int {
				if a[0] != b[0] {
					return cmpFloat(a[0], b[0])
				}
				return cmpFloat(a[1], b[1])
			})
			for i := 1; i < len(pts); i++ {
				if sq(pts[i], pts[i-1]) < tol*tol {
					t.Errorf("%s, n = %d: two vertices at %v", f.name, n, pts[i])
					break
				}
			}
			if n == 2 && (s.NumPoints() != Refine(m).NumPoints() || s.NumEdges() != Refine(m).NumEdges()) {
				t.Errorf("%s: Subdivide(m, 2) and Refine(m) differ in counts", f.name)
			}
		}
	}
}

func cmpFloat(a, b float64) int {
	switch {
	case a < b:
		return -1
	case a > b:
		return 1
	}
	return 0
}

// checkSubPoints checks that every vertex of s is the image of its SubPoint
// in m, that Parent names the triangle containing every child, and that the
// children keep their parent's orientation.
func checkSubPoints(t *testing.T, name string, m, s *Mesh, sub []SubPoint, n int, tol float64) {
	t.Helper()
	h := m.MaxEdgeLength()
	for v, sp := range sub {
		tri := m.Triangles[sp.Triangle]
		a, b, c := m.Points[tri[0]], m.Points[tri[1]], m.Points[tri[2]]
		xi, eta := sp.Ref[0], sp.Ref[1]
		x := [2]float64{
			(1-xi-eta)*a[0] + xi*b[0] + eta*c[0],
			(1-xi-eta)*a[1] + xi*b[1] + eta*c[1],
		}
		if math.Sqrt(sq(x, s.Points[v])) > tol*h {
			t.Errorf("%s, n = %d: vertex %d at %v, its SubPoint maps to %v", name, n, v, s.Points[v], x)
		}
		if i, j := xi*float64(n), eta*float64(n); i != math.Round(i) || j != math.Round(j) || i+j > float64(n) || i < 0 || j < 0 {
			t.Errorf("%s, n = %d: vertex %d has reference coordinates %v, not on the lattice", name, n, v, sp.Ref)
		}
	}
	for c, p := range s.Parent {
		if p != c/(n*n) {
			t.Fatalf("%s, n = %d: Parent[%d] = %d, want %d", name, n, c, p, c/(n*n))
		}
		if (s.SignedArea(c) > 0) != (m.SignedArea(p) > 0) {
			t.Errorf("%s, n = %d: child %d orientation differs from parent %d", name, n, c, p)
		}
		for _, l := range barycentric(m, p, s.Centroid(c)) {
			if l < 0 {
				t.Errorf("%s, n = %d: child %d outside parent %d", name, n, c, p)
			}
		}
	}
}

func TestSubdivideBroken(t *testing.T) {
	const tol = 1e-13 // relative rounding of affine maps
	for _, f := range fixtures(t) {
		m := f.m
		T := m.NumTriangles()
		for n := 1; n <= 3; n++ {
			s, sub := SubdivideBroken(m, n)
			if err := s.Validate(); err != nil {
				t.Fatalf("%s, n = %d: %v", f.name, n, err)
			}
			np := (n + 1) * (n + 2) / 2
			// Closed forms: separate lattices; 3n(n+1)/2 edges per lattice.
			if s.NumPoints() != np*T || s.NumTriangles() != n*n*T || s.NumEdges() != 3*n*(n+1)/2*T {
				t.Errorf("%s, n = %d: V, T, E = %d, %d, %d; want %d, %d, %d", f.name, n, s.NumPoints(), s.NumTriangles(), s.NumEdges(), np*T, n*n*T, 3*n*(n+1)/2*T)
			}
			checkSubPoints(t, f.name+" broken", m, s, sub, n, tol)
			for v, sp := range sub {
				if sp.Triangle != v/np {
					t.Errorf("%s, n = %d: vertex %d belongs to triangle %d, want %d", f.name, n, v, sp.Triangle, v/np)
				}
			}
			// Edges on the boundary of m keep their tags; the others get
			// DefaultTag.
			want := tagCounts(m)
			for tag := range want {
				want[tag] *= n
			}
			want[DefaultTag] += 2 * n * (m.NumEdges() - len(m.BoundaryEdges(0)))
			if got := tagCounts(s); !maps.Equal(got, want) {
				t.Errorf("%s, n = %d: boundary edges per tag %v, want %v", f.name, n, got, want)
			}
		}
	}
}

func TestQuality(t *testing.T) {
	const tol = 1e-14 // rounding of a few operations
	s3 := math.Sqrt(3)
	for _, tc := range []struct {
		name   string
		points [][2]float64
		want   Quality
	}{
		// Closed forms: equilateral q = 1 and angles 60; right isosceles with
		// legs 1: q = 4√3(1/2)/4 = √3/2, angles 45 and 90; the 30-60-90
		// triangle with sides 1, √3, 2: q = 4√3(√3/2)/8 = 3/4.
		{"equilateral", [][2]float64{{0, 0}, {1, 0}, {0.5, s3 / 2}}, Quality{
			Points: 3, Edges: 3, Triangles: 1, BoundaryEdges: 3,
			MinShape: 1, MaxShape: 1, MeanShape: 1, MinAngle: 60, MaxAngle: 60, MinEdge: 1, MaxEdge: 1, Area: s3 / 4}},
		{"right isosceles", [][2]float64{{0, 0}, {1, 0}, {0, 1}}, Quality{
			Points: 3, Edges: 3, Triangles: 1, BoundaryEdges: 3,
			MinShape: s3 / 2, MaxShape: s3 / 2, MeanShape: s3 / 2, MinAngle: 45, MaxAngle: 90, MinEdge: 1, MaxEdge: math.Sqrt2, Area: 0.5}},
		{"30-60-90", [][2]float64{{0, 0}, {s3, 0}, {0, 1}}, Quality{
			Points: 3, Edges: 3, Triangles: 1, BoundaryEdges: 3,
			MinShape: 0.75, MaxShape: 0.75, MeanShape: 0.75, MinAngle: 30, MaxAngle: 90, MinEdge: 1, MaxEdge: 2, Area: s3 / 2}},
	} {
		m, err := New(tc.points, [][3]int{{0, 1, 2}})
		if err != nil {
			t.Fatal(err)
		}
		for _, mm := range []*Mesh{m, m.PermuteLocalVertices(newRNG(9)), Refine(m)} {
			q := mm.Quality()
			w := tc.want
			if mm.NumTriangles() == 4 { // refined: same shapes, half lengths
				w.Points, w.Edges, w.Triangles, w.BoundaryEdges = 6, 9, 4, 6
				w.MinEdge, w.MaxEdge = w.MinEdge/2, w.MaxEdge/2
			}
			if q.Points != w.Points || q.Edges != w.Edges || q.Triangles != w.Triangles || q.BoundaryEdges != w.BoundaryEdges {
				t.Errorf("%s: counts %+v, want %+v", tc.name, q, w)
			}
			for _, c := range [][3]any{
				{"MinShape", q.MinShape, w.MinShape}, {"MaxShape", q.MaxShape, w.MaxShape}, {"MeanShape", q.MeanShape, w.MeanShape},
				{"MinAngle", q.MinAngle, w.MinAngle}, {"MaxAngle", q.MaxAngle, w.MaxAngle},
				{"MinEdge", q.MinEdge, w.MinEdge}, {"MaxEdge", q.MaxEdge, w.MaxEdge}, {"Area", q.Area, w.Area},
			} {
				got, want := c[1].(float64), c[2].(float64)
				if math.Abs(got-want) > tol*want {
					t.Errorf("%s (%d triangles): %s = %v, want %v", tc.name, mm.NumTriangles(), c[0], got, want)
				}
			}
			if h := mm.MaxEdgeLength(); math.Abs(h-w.MaxEdge) > tol*w.MaxEdge {
				t.Errorf("%s: MaxEdgeLength = %v, want %v", tc.name, h, w.MaxEdge)
			}
		}
	}
}
