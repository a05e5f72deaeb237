package mesh

import (
	"math"
	"slices"
	"strings"
	"testing"
)

func TestNewCounts(t *testing.T) {
	tri := [][2]float64{{0, 0}, {1, 0}, {0, 1}}
	square := [][2]float64{{0, 0}, {1, 0}, {1, 1}, {0, 1}}
	centred := [][2]float64{{0, 0}, {1, 0}, {1, 1}, {0, 1}, {0.5, 0.5}}
	// A triangle at scale 1e-20, far from the origin: degeneracy is relative.
	tiny := [][2]float64{{1e3, 1e3}, {1e3 + 1e-10, 1e3}, {1e3, 1e3 + 1e-10}}
	// Counts are closed forms: V - E + T = 1 for a disc (Euler), and every
	// edge of a single triangle is a boundary edge.
	for _, tc := range []struct {
		name             string
		points           [][2]float64
		tris             [][3]int
		wantE, wantBound int
	}{
		{"one triangle", tri, [][3]int{{0, 1, 2}}, 3, 3},
		{"one triangle rotated", tri, [][3]int{{2, 0, 1}}, 3, 3},
		{"square", square, [][3]int{{0, 1, 2}, {0, 2, 3}}, 5, 4},
		{"square with centre", centred, [][3]int{{0, 1, 4}, {1, 2, 4}, {2, 3, 4}, {3, 0, 4}}, 8, 4},
		{"tiny far from origin", tiny, [][3]int{{0, 1, 2}}, 3, 3},
	} {
		m, err := New(tc.points, tc.tris)
		if err != nil {
			t.Errorf("%s: %v", tc.name, err)
			continue
		}
		if err := m.Validate(); err != nil {
			t.Errorf("%s: Validate: %v", tc.name, err)
		}
		if m.NumPoints() != len(tc.points) || m.NumTriangles() != len(tc.tris) || m.NumEdges() != tc.wantE {
			t.Errorf("%s: V, T, E = %d, %d, %d; want %d, %d, %d", tc.name, m.NumPoints(), m.NumTriangles(), m.NumEdges(), len(tc.points), len(tc.tris), tc.wantE)
		}
		if got := len(m.BoundaryEdges(0)); got != tc.wantBound {
			t.Errorf("%s: %d boundary edges, want %d", tc.name, got, tc.wantBound)
		}
		if v, e, tr := m.NumPoints(), m.NumEdges(), m.NumTriangles(); v-e+tr != 1 {
			t.Errorf("%s: V - E + T = %d, want 1", tc.name, v-e+tr)
		}
		for _, e := range m.BoundaryEdges(0) {
			if m.EdgeTags[e] != DefaultTag {
				t.Errorf("%s: boundary edge %d has tag %d, want DefaultTag", tc.name, e, m.EdgeTags[e])
			}
		}
		if len(m.TagNames) != 0 || m.TagNames == nil || m.Parent != nil || m.MixedOrientation {
			t.Errorf("%s: TagNames %v, Parent %v, MixedOrientation %v; want empty, nil, false", tc.name, m.TagNames, m.Parent, m.MixedOrientation)
		}
		checkAgainstNaive(t, tc.name, m)
	}
}

func TestNewTopologyFixtures(t *testing.T) {
	for _, f := range fixtures(t) {
		if err := f.m.Validate(); err != nil {
			t.Errorf("%s: %v", f.name, err)
		}
		checkAgainstNaive(t, f.name, f.m)
	}
	// A ring has one hole: V - E + T = 0 (Euler's formula), 12 outer and 4
	// inner boundary edges (counted by hand).
	r := ringMesh(t)
	if v, e, tr := r.NumPoints(), r.NumEdges(), r.NumTriangles(); v != 16 || e != 32 || tr != 16 {
		t.Errorf("ring: V, E, T = %d, %d, %d; want 16, 32, 16", v, e, tr)
	}
	if got := len(r.BoundaryEdges(0)); got != 16 {
		t.Errorf("ring: %d boundary edges, want 16", got)
	}
}

func TestNewErrors(t *testing.T) {
	unit := [][2]float64{{0, 0}, {1, 0}, {0, 1}, {1, 1}}
	for _, tc := range []struct {
		name   string
		points [][2]float64
		tris   [][3]int
		want   []string
	}{
		{"no points", nil, [][3]int{{0, 1, 2}}, []string{"no points"}},
		{"no triangles", unit, nil, []string{"no triangles"}},
		{"index too large", unit, [][3]int{{0, 1, 2}, {1, 4, 2}}, []string{"triangle 1", "4 out of range", "0..3"}},
		{"negative index", unit, [][3]int{{0, 1, -1}}, []string{"triangle 0", "-1 out of range"}},
		{"repeated vertex", unit, [][3]int{{0, 1, 2}, {1, 3, 1}}, []string{"triangle 1", "repeats vertex 1"}},
		{"collinear", [][2]float64{{0, 0}, {1, 1}, {2, 2}}, [][3]int{{0, 1, 2}}, []string{"triangle 0", "degenerate"}},
		// Height 1e-13 on a unit base: relative area 5e-14 < 1e-12.
		{"nearly collinear", [][2]float64{{0, 0}, {1, 0}, {0.5, 1e-13}}, [][3]int{{0, 1, 2}}, []string{"triangle 0", "degenerate"}},
		{"clockwise", unit, [][3]int{{0, 1, 3}, {0, 2, 3}}, []string{"triangle 1 (vertices 0 2 3)", "clockwise"}},
		{"three triangles on one edge",
			[][2]float64{{0, 0}, {1, 0}, {0, 1}, {1, -1}, {0.5, 2}},
			[][3]int{{0, 1, 2}, {1, 0, 3}, {0, 1, 4}},
			[]string{"edge 0-1", "shared by 3 triangles", "[0 1 2]"}},
		{"overlap across an edge",
			[][2]float64{{0, 0}, {1, 0}, {0, 1}, {0.3, 0.3}},
			[][3]int{{0, 1, 2}, {0, 1, 3}},
			[]string{"triangles 0 and 1 overlap", "edge 0-1"}},
		{"duplicate triangle", unit[:3], [][3]int{{0, 1, 2}, {1, 2, 0}}, []string{"overlap"}},
		{"unused point", unit, [][3]int{{0, 1, 2}}, []string{"point 3", "no triangle"}},
		{"NaN coordinate", [][2]float64{{0, 0}, {math.NaN(), 0}, {0, 1}}, [][3]int{{0, 1, 2}}, []string{"point 1", "not finite"}},
		{"infinite coordinate", [][2]float64{{0, 0}, {1, 0}, {0, math.Inf(1)}}, [][3]int{{0, 1, 2}}, []string{"point 2", "not finite"}},
	} {
		m, err := New(tc.points, tc.tris)
		wantError(t, tc.name, err, tc.want...)
		if m != nil {
			t.Errorf("%s: got a mesh with the error", tc.name)
		}
	}
}

func TestNewCopiesInput(t *testing.T) {
	pts := [][2]float64{{0, 0}, {1, 0}, {0, 1}}
	tris := [][3]int{{0, 1, 2}}
	m, err := New(pts, tris)
	if err != nil {
		t.Fatal(err)
	}
	pts[1] = [2]float64{5, 5}
	tris[0] = [3]int{0, 2, 1}
	if m.Points[1] != [2]float64{1, 0} || m.Triangles[0] != [3]int{0, 1, 2} {
		t.Errorf("New shares memory with its arguments: points %v, triangles %v", m.Points, m.Triangles)
	}
}

func TestValidateDetectsCorruption(t *testing.T) {
	// Every mutation breaks one invariant; Validate must name it.
	for _, tc := range []struct {
		name   string
		mutate func(m *Mesh)
		want   string
	}{
		{"clockwise triangle", func(m *Mesh) { tr := m.Triangles[3]; m.Triangles[3] = [3]int{tr[1], tr[0], tr[2]} }, "triangle 3"},
		{"swapped local edges", func(m *Mesh) { te := &m.TriangleEdges[2]; te[0], te[1] = te[1], te[0] }, "triangle 2 local edge 0"},
		{"edge out of order", func(m *Mesh) { m.Edges[4], m.Edges[5] = m.Edges[5], m.Edges[4] }, "lexicographic"},
		{"edge reversed", func(m *Mesh) { m.Edges[1] = [2]int{m.Edges[1][1], m.Edges[1][0]} }, "edge 1"},
		{"interior edge tagged", func(m *Mesh) {
			for e, et := range m.EdgeTriangles {
				if et[1] >= 0 {
					m.EdgeTags[e] = 7
					return
				}
			}
		}, "interior edges have tag 0"},
		{"boundary edge untagged", func(m *Mesh) { m.EdgeTags[m.BoundaryEdges(0)[0]] = 0 }, "boundary tags must be positive"},
		{"edge triangles swapped", func(m *Mesh) {
			for e, et := range m.EdgeTriangles {
				if et[1] >= 0 {
					m.EdgeTriangles[e] = [2]int{et[1], et[0]}
					return
				}
			}
		}, "increasing order"},
		{"boundary edge claims two triangles", func(m *Mesh) { e := m.BoundaryEdges(0)[0]; m.EdgeTriangles[e][1] = 5 }, "edge"},
		{"missing tag map", func(m *Mesh) { m.TagNames = nil }, "TagNames"},
		{"tag name with space", func(m *Mesh) { m.TagNames[1] = "two words" }, "one word"},
		{"duplicate tag name", func(m *Mesh) { m.TagNames[1] = "top" }, "same name"},
		{"parent length", func(m *Mesh) { m.Parent = []int{0} }, "parent"},
		{"NaN point", func(m *Mesh) { m.Points[3][0] = math.NaN() }, "point 3"},
		{"short tags", func(m *Mesh) { m.EdgeTags = m.EdgeTags[1:] }, "edge tags"},
		{"point moved across", func(m *Mesh) { m.Points[5] = [2]float64{5, 5} }, "triangle"},
	} {
		m := mustRectangle(t, 0, 0, 1, 1, 3, 2, RightDiagonal)
		if err := m.Validate(); err != nil {
			t.Fatalf("%s: fresh mesh invalid: %v", tc.name, err)
		}
		tc.mutate(m)
		wantError(t, tc.name, m.Validate(), tc.want)
	}
}

func TestEdgeBetween(t *testing.T) {
	for _, f := range fixtures(t) {
		m := f.m
		for e, ed := range m.Edges {
			for _, p := range [][2]int{ed, {ed[1], ed[0]}} {
				if got, ok := m.EdgeBetween(p[0], p[1]); !ok || got != e {
					t.Errorf("%s: EdgeBetween(%d, %d) = %d, %v; want %d, true", f.name, p[0], p[1], got, ok, e)
				}
			}
		}
		// Two vertices of one triangle are joined; a vertex and itself never.
		if _, ok := m.EdgeBetween(0, 0); ok {
			t.Errorf("%s: EdgeBetween(0, 0) found an edge", f.name)
		}
		if _, ok := m.EdgeBetween(0, m.NumPoints()+3); ok {
			t.Errorf("%s: EdgeBetween(0, out of range) found an edge", f.name)
		}
	}
}

func TestTagBoundary(t *testing.T) {
	m := mustRectangle(t, 0, 0, 4, 1, 4, 1, RightDiagonal)
	// Split the bottom (4 edges) into "inlet" x <= 1 (1 edge) and the rest.
	onInlet := func(a, b [2]float64) bool { return a[1] == 0 && b[1] == 0 && max(a[0], b[0]) <= 1 }
	if err := m.TagBoundary(7, "inlet", onInlet); err != nil {
		t.Fatal(err)
	}
	if got := m.BoundaryEdges(7); len(got) != 1 {
		t.Errorf("inlet: %d edges, want 1", len(got))
	}
	if got := m.BoundaryEdges(TagBottom); len(got) != 3 {
		t.Errorf("bottom: %d edges, want 3", len(got))
	}
	if got, want := m.Tags(), []int{1, 2, 3, 4, 7}; !slices.Equal(got, want) {
		t.Errorf("Tags() = %v, want %v", got, want)
	}
	if tag, err := m.TagByName("inlet"); err != nil || tag != 7 {
		t.Errorf("TagByName(inlet) = %d, %v; want 7", tag, err)
	}
	// The same tag again without a name keeps the name.
	if err := m.TagBoundary(7, "", func(a, b [2]float64) bool { return a[0] == 4 && b[0] == 4 }); err != nil {
		t.Errorf("retag without name: %v", err)
	}
	if m.TagNames[7] != "inlet" || len(m.BoundaryEdges(7)) != 2 || len(m.BoundaryEdges(TagRight)) != 0 {
		t.Errorf("after retagging right: name %q, %d edges tagged 7, %d right", m.TagNames[7], len(m.BoundaryEdges(7)), len(m.BoundaryEdges(TagRight)))
	}
	if got, want := m.Tags(), []int{1, 3, 4, 7}; !slices.Equal(got, want) {
		t.Errorf("Tags() = %v, want %v", got, want)
	}
	if err := m.Validate(); err != nil {
		t.Error(err)
	}

	all := func(a, b [2]float64) bool { return true }
	for _, tc := range []struct {
		name string
		tag  int
		tagN string
		on   func(a, b [2]float64) bool
		want []string
	}{
		{"zero tag", 0, "", all, []string{"tag 0", "positive"}},
		{"negative tag", -2, "", all, []string{"tag -2"}},
		{"nothing selected", 9, "far", func(a, b [2]float64) bool { return a[0] > 100 }, []string{"selected none", "10 boundary edges"}},
		{"name with space", 9, "side wall", all, []string{"one word"}},
		{"name with hash", 9, "a#b", all, []string{"one word"}},
		{"name taken", 9, "top", all, []string{"already used by tag 3"}},
		{"rename", 7, "outlet", all, []string{"already named \"inlet\""}},
	} {
		before := slices.Clone(m.EdgeTags)
		wantError(t, tc.name, m.TagBoundary(tc.tag, tc.tagN, tc.on), tc.want...)
		if !slices.Equal(before, m.EdgeTags) {
			t.Errorf("%s: failed TagBoundary changed the tags", tc.name)
		}
	}

	_, err := m.TagByName("wall")
	wantError(t, "unknown name", err, `"wall"`, "bottom, inlet, left, right, top")
	_, err = mustRectangle(t, 0, 0, 1, 1, 1, 1, RightDiagonal).Clone().TagByName("x")
	if err == nil {
		t.Error("TagByName on a rectangle found \"x\"")
	}
	n, _ := New([][2]float64{{0, 0}, {1, 0}, {0, 1}}, [][3]int{{0, 1, 2}})
	_, err = n.TagByName("x")
	wantError(t, "no names", err, "no named tags")
}

func TestGeometryHelpers(t *testing.T) {
	const tol = 1e-15 // rounding of a few operations on numbers of order 1
	// Triangle (0,0), (3,0), (0,4): area 6, sides 3, 4, 5, centroid (1, 4/3)
	// (closed form).
	m, err := New([][2]float64{{0, 0}, {3, 0}, {0, 4}}, [][3]int{{0, 1, 2}})
	if err != nil {
		t.Fatal(err)
	}
	p := m.PermuteLocalVertices(newRNG(3))
	for _, tc := range []struct {
		name      string
		got, want float64
	}{
		{"SignedArea", m.SignedArea(0), 6},
		{"Area", m.Area(0), 6},
		{"Diameter", m.Diameter(0), 5},
		{"Centroid x", m.Centroid(0)[0], 1},
		{"Centroid y", m.Centroid(0)[1], 4.0 / 3},
		{"EdgeLength 0-1", m.EdgeLength(m.mustEdge(0, 1)), 3},
		{"EdgeLength 1-2", m.EdgeLength(m.mustEdge(1, 2)), 5},
		{"MaxEdgeLength", m.MaxEdgeLength(), 5},
		{"Area permuted", p.Area(0), 6},
		{"|SignedArea| permuted", math.Abs(p.SignedArea(0)), 6},
	} {
		if math.Abs(tc.got-tc.want) > tol*math.Abs(tc.want) {
			t.Errorf("%s = %v, want %v", tc.name, tc.got, tc.want)
		}
	}
}

func TestClone(t *testing.T) {
	m := mustRectangle(t, 0, 0, 1, 1, 2, 2, RightDiagonal)
	c := m.Clone()
	c.Points[0][0] = 9
	c.EdgeTags[c.BoundaryEdges(0)[0]] = 9
	c.TagNames[9] = "nine"
	c.Triangles[0][0] = 1
	if m.Points[0][0] != 0 || m.EdgeTags[m.BoundaryEdges(0)[0]] == 9 || m.TagNames[9] != "" || m.Triangles[0][0] != 0 {
		t.Error("Clone shares memory with the original")
	}
}

func TestPanics(t *testing.T) {
	m := mustRectangle(t, 0, 0, 1, 1, 2, 2, RightDiagonal)
	broken := m.Clone()
	broken.TriangleEdges[0] = broken.TriangleEdges[1] // local edges of another triangle
	for _, tc := range []struct {
		name string
		f    func()
		want string
	}{
		{"RefineTimes negative", func() { RefineTimes(m, -1) }, "mesh: RefineTimes: n = -1"},
		{"Subdivide zero", func() { Subdivide(m, 0) }, "mesh: Subdivide: n = 0"},
		{"SubdivideBroken zero", func() { SubdivideBroken(m, 0) }, "mesh: SubdivideBroken: n = 0"},
		{"Perturb nil rng", func() { Perturb(m, 0.1, nil) }, "mesh: Perturb: nil random source"},
		{"Permute nil rng", func() { m.PermuteLocalVertices(nil) }, "mesh: PermuteLocalVertices: nil random source"},
		{"nil predicate", func() { m.Clone().TagBoundary(2, "", nil) }, "mesh: TagBoundary: nil predicate"},
		{"Refine invalid", func() { Refine(broken) }, "mesh: Refine: source mesh is invalid"},
	} {
		func() {
			defer func() {
				r := recover()
				s, _ := r.(string)
				if r == nil || !strings.HasPrefix(s, tc.want) {
					t.Errorf("%s: panic %v, want one starting %q", tc.name, r, tc.want)
				}
			}()
			tc.f()
		}()
	}
}
