package mesh

import (
	"math/rand/v2"
	"slices"
	"strings"
	"testing"
)

// newRNG returns the seeded random source of the tests, so that failures
// reproduce.
func newRNG(seed uint64) *rand.Rand { return rand.New(rand.NewPCG(seed, 0x6d6978)) }

// mustRectangle is Rectangle for arguments known to be valid.
func mustRectangle(tb testing.TB, x0, y0, x1, y1 float64, nx, ny int, d Diagonal) *Mesh {
	tb.Helper()
	m, err := Rectangle(x0, y0, x1, y1, nx, ny, d)
	if err != nil {
		tb.Fatalf("Rectangle(%g, %g, %g, %g, %d, %d, %v): %v", x0, y0, x1, y1, nx, ny, d, err)
	}
	return m
}

// ringMesh returns the 3×3 right-diagonal grid on [0,3]² without the two
// triangles of its middle cell: a square ring with one hole, 16 points, 16
// triangles and 32 edges (V - E + T = 0 for one hole: Euler's formula).
func ringMesh(tb testing.TB) *Mesh {
	tb.Helper()
	r := mustRectangle(tb, 0, 0, 3, 3, 3, 3, RightDiagonal)
	var tris [][3]int
	for t, tri := range r.Triangles {
		if t/2 != 4 { // cell (1, 1) is cell 4 in row-major order
			tris = append(tris, tri)
		}
	}
	m, err := New(r.Points, tris)
	if err != nil {
		tb.Fatalf("ring mesh: %v", err)
	}
	return m
}

// fixtures returns small valid meshes of every kind the package makes,
// including perturbed and mixed-orientation ones.
func fixtures(tb testing.TB) []struct {
	name string
	m    *Mesh
} {
	tb.Helper()
	rng := newRNG(1)
	pert, err := Perturb(mustRectangle(tb, -1, 0, 2, 1.5, 5, 4, AlternatingDiagonal), 0.3, rng)
	if err != nil {
		tb.Fatal(err)
	}
	return []struct {
		name string
		m    *Mesh
	}{
		{"right 3x2", mustRectangle(tb, 0, 0, 1, 1, 3, 2, RightDiagonal)},
		{"left 2x3", mustRectangle(tb, 0, 0, 2, 1, 2, 3, LeftDiagonal)},
		{"alternating 4x4", mustRectangle(tb, 0, 0, 1, 1, 4, 4, AlternatingDiagonal)},
		{"crossed 3x2", mustRectangle(tb, 1, 1, 2, 3, 3, 2, CrossedDiagonals)},
		{"ring", ringMesh(tb)},
		{"perturbed alternating 5x4", pert},
		{"permuted crossed 3x3", mustRectangle(tb, 0, 0, 1, 1, 3, 3, CrossedDiagonals).PermuteLocalVertices(rng)},
		{"permuted perturbed", pert.PermuteLocalVertices(rng)},
	}
}

// checkAgainstNaive compares the topology of m with one built by a plain map
// from vertex pairs to triangle sides, an implementation independent of the
// package's bucket sort.
func checkAgainstNaive(t *testing.T, name string, m *Mesh) {
	t.Helper()
	sides := make(map[[2]int][][2]int) // pair -> (triangle, local edge)
	for tri, v := range m.Triangles {
		for i := range 3 {
			a, b := v[(i+1)%3], v[(i+2)%3]
			if b < a {
				a, b = b, a
			}
			sides[[2]int{a, b}] = append(sides[[2]int{a, b}], [2]int{tri, i})
		}
	}
	keys := make([][2]int, 0, len(sides))
	for k := range sides {
		keys = append(keys, k)
	}
	slices.SortFunc(keys, func(x, y [2]int) int {
		if x[0] != y[0] {
			return x[0] - y[0]
		}
		return x[1] - y[1]
	})
	if !slices.Equal(keys, m.Edges) {
		t.Fatalf("%s: edges differ from the naive construction: got %d edges, want %d", name, len(m.Edges), len(keys))
	}
	for e, k := range keys {
		s := sides[k]
		want := [2]int{s[0][0], -1}
		if len(s) == 2 {
			want[1] = s[1][0]
		}
		if m.EdgeTriangles[e] != want {
			t.Errorf("%s: edge %d %v: triangles %v, want %v", name, e, k, m.EdgeTriangles[e], want)
		}
		for _, ti := range s {
			if got := m.TriangleEdges[ti[0]][ti[1]]; got != e {
				t.Errorf("%s: triangle %d local edge %d = %d, want %d", name, ti[0], ti[1], got, e)
			}
		}
	}
}

// wantError fails unless err is non-nil and contains every substring.
func wantError(t *testing.T, name string, err error, subs ...string) {
	t.Helper()
	if err == nil {
		t.Errorf("%s: no error, want one containing %q", name, subs)
		return
	}
	for _, s := range subs {
		if !strings.Contains(err.Error(), s) {
			t.Errorf("%s: error %q does not contain %q", name, err, s)
		}
	}
}

// totalArea sums the areas of the triangles of m.
func totalArea(m *Mesh) float64 {
	a := 0.0
	for t := range m.Triangles {
		a += m.Area(t)
	}
	return a
}
