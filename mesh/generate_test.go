package mesh

import (
	"math"
	"slices"
	"testing"
)

func TestRectangleCounts(t *testing.T) {
	const areaTol = 1e-14 // relative rounding of a sum of O(T) areas
	for _, d := range []Diagonal{RightDiagonal, LeftDiagonal, AlternatingDiagonal, CrossedDiagonals} {
		for _, sz := range [][2]int{{1, 1}, {1, 3}, {4, 1}, {5, 3}, {8, 8}} {
			nx, ny := sz[0], sz[1]
			x0, y0, x1, y1 := -0.3, 0.1, 1.7, 0.4
			m := mustRectangle(t, x0, y0, x1, y1, nx, ny, d)
			name := d.String() + " " + string(rune('0'+nx)) + "x" + string(rune('0'+ny))
			// Closed forms: (nx+1)(ny+1) grid points plus one centre per cell
			// when crossed; 2 or 4 triangles per cell; E from Euler's formula
			// V - E + T = 1 for a disc.
			wantV, wantT := (nx+1)*(ny+1), 2*nx*ny
			if d == CrossedDiagonals {
				wantV, wantT = wantV+nx*ny, 4*nx*ny
			}
			wantE := wantV + wantT - 1
			if m.NumPoints() != wantV || m.NumTriangles() != wantT || m.NumEdges() != wantE {
				t.Errorf("%s: V, T, E = %d, %d, %d; want %d, %d, %d", name, m.NumPoints(), m.NumTriangles(), m.NumEdges(), wantV, wantT, wantE)
			}
			if err := m.Validate(); err != nil {
				t.Errorf("%s: %v", name, err)
			}
			checkAgainstNaive(t, name, m)
			if got := len(m.BoundaryEdges(0)); got != 2*(nx+ny) {
				t.Errorf("%s: %d boundary edges, want 2(nx+ny) = %d", name, got, 2*(nx+ny))
			}
			if got, want := totalArea(m), (x1-x0)*(y1-y0); math.Abs(got-want) > areaTol*want {
				t.Errorf("%s: area %v, want %v", name, got, want)
			}
			for t2 := range m.Triangles {
				if m.SignedArea(t2) <= 0 {
					t.Errorf("%s: triangle %d not counter-clockwise", name, t2)
				}
			}
			// Each side: its count of edges, its name, and end points exactly
			// on its line (the generator sets those coordinates exactly).
			for _, side := range []struct {
				tag   int
				name  string
				n     int
				coord int
				value float64
			}{
				{TagBottom, "bottom", nx, 1, y0},
				{TagRight, "right", ny, 0, x1},
				{TagTop, "top", nx, 1, y1},
				{TagLeft, "left", ny, 0, x0},
			} {
				es := m.BoundaryEdges(side.tag)
				if len(es) != side.n {
					t.Errorf("%s: %d %s edges, want %d", name, len(es), side.name, side.n)
				}
				if tag, err := m.TagByName(side.name); err != nil || tag != side.tag {
					t.Errorf("%s: TagByName(%q) = %d, %v; want %d", name, side.name, tag, err, side.tag)
				}
				for _, e := range es {
					for _, v := range m.Edges[e] {
						if p := m.Points[v]; p[side.coord] != side.value {
							t.Errorf("%s: %s edge %d has point %v off the line", name, side.name, e, p)
						}
					}
				}
			}
		}
	}
}

func TestRectangleDiagonals(t *testing.T) {
	// Count the edges that are neither horizontal nor vertical by the sign
	// of their slope. Per cell (by construction of each pattern): one "/" for
	// right, one "\" for left, "/" in the cells with i+j even for
	// alternating, and two half-diagonals of each slope for crossed.
	const nx, ny = 5, 3
	for _, tc := range []struct {
		d                Diagonal
		wantUp, wantDown int
	}{
		{RightDiagonal, nx * ny, 0},
		{LeftDiagonal, 0, nx * ny},
		{AlternatingDiagonal, 8, 7}, // 8 of the 15 cells have i+j even
		{CrossedDiagonals, 2 * nx * ny, 2 * nx * ny},
	} {
		m := mustRectangle(t, 0, 0, nx, ny, nx, ny, tc.d)
		up, down := 0, 0
		for e := range m.Edges {
			a, b := m.Points[m.Edges[e][0]], m.Points[m.Edges[e][1]]
			s := (b[0] - a[0]) * (b[1] - a[1])
			switch {
			case s > 0:
				up++
			case s < 0:
				down++
			}
		}
		if up != tc.wantUp || down != tc.wantDown {
			t.Errorf("%v: %d rising and %d falling diagonals, want %d and %d", tc.d, up, down, tc.wantUp, tc.wantDown)
		}
	}
}

func TestRectangleErrors(t *testing.T) {
	for _, tc := range []struct {
		name           string
		x0, y0, x1, y1 float64
		nx, ny         int
		d              Diagonal
		want           string
	}{
		{"empty x", 1, 0, 1, 1, 2, 2, RightDiagonal, "x0 < x1"},
		{"reversed y", 0, 1, 1, 0, 2, 2, RightDiagonal, "y0 < y1"},
		{"NaN corner", 0, 0, math.NaN(), 1, 2, 2, RightDiagonal, "non-finite"},
		{"no cells", 0, 0, 1, 1, 0, 2, RightDiagonal, "0 x 2 cells"},
		{"negative cells", 0, 0, 1, 1, 3, -1, RightDiagonal, "3 x -1"},
		{"bad pattern", 0, 0, 1, 1, 2, 2, Diagonal(9), "pattern 9"},
		{"cells below rounding", 1, 0, 1 + 4e-15, 1, 2, 2, RightDiagonal, "degenerate"},
	} {
		_, err := Rectangle(tc.x0, tc.y0, tc.x1, tc.y1, tc.nx, tc.ny, tc.d)
		wantError(t, tc.name, err, tc.want)
	}
}

func TestParseDiagonal(t *testing.T) {
	for i, name := range DiagonalNames() {
		d, err := ParseDiagonal(name)
		if err != nil || d != Diagonal(i) || d.String() != name {
			t.Errorf("ParseDiagonal(%q) = %v, %v; want %d", name, d, err, i)
		}
	}
	_, err := ParseDiagonal("diagonal")
	wantError(t, "unknown", err, `"diagonal"`, "right, left, alternating, crossed")
	if got := Diagonal(7).String(); got != "Diagonal(7)" {
		t.Errorf("Diagonal(7).String() = %q", got)
	}
}

func TestPerturb(t *testing.T) {
	const (
		amount = 0.4
		// Displacements are computed as r·sqrt(u)·(cos, sin): relative
		// rounding of a few ulps.
		moveTol = 1e-12
	)
	base := mustRectangle(t, 0, 0, 2, 1, 12, 7, AlternatingDiagonal)
	// A second tag on part of the bottom: the vertex where it meets the rest
	// of the bottom (x = 1) must stay fixed.
	if err := base.TagBoundary(5, "inlet", func(a, b [2]float64) bool { return a[1] == 0 && b[1] == 0 && max(a[0], b[0]) <= 1 }); err != nil {
		t.Fatal(err)
	}
	mixed := base.PermuteLocalVertices(newRNG(4))
	for _, tc := range []struct {
		name string
		m    *Mesh
	}{{"ccw", base}, {"mixed", mixed}} {
		m := tc.m
		p, err := Perturb(m, amount, newRNG(5))
		if err != nil {
			t.Fatal(err)
		}
		if err := p.Validate(); err != nil {
			t.Fatalf("%s: %v", tc.name, err)
		}
		if !slices.Equal(p.Triangles, m.Triangles) || !slices.Equal(p.Edges, m.Edges) ||
			!slices.Equal(p.EdgeTags, m.EdgeTags) || p.MixedOrientation != m.MixedOrientation {
			t.Errorf("%s: Perturb changed the topology or tags", tc.name)
		}
		h := make([]float64, m.NumPoints())
		for v := range h {
			h[v] = math.Inf(1)
		}
		for e, ed := range m.Edges {
			h[ed[0]] = min(h[ed[0]], m.EdgeLength(e))
			h[ed[1]] = min(h[ed[1]], m.EdgeLength(e))
		}
		onBoundary := make([]bool, m.NumPoints())
		for _, e := range m.BoundaryEdges(0) {
			onBoundary[m.Edges[e][0]], onBoundary[m.Edges[e][1]] = true, true
		}
		moved, interior := 0, 0
		for v, q := range p.Points {
			o := m.Points[v]
			d := math.Hypot(q[0]-o[0], q[1]-o[1])
			if d > amount*h[v]*(1+moveTol) {
				t.Errorf("%s: point %d moved %v > %v", tc.name, v, d, amount*h[v])
			}
			if !onBoundary[v] {
				interior++
				if d > 0 {
					moved++
				}
				continue
			}
			// Boundary points stay on their side, exactly (they move along
			// an axis-parallel tangent (±1, 0) or (0, ±1)).
			onX := o[0] == 0 || o[0] == 2
			onY := o[1] == 0 || o[1] == 1
			switch {
			case onX && onY, o == [2]float64{1, 0}: // corners and the tag junction
				if q != o {
					t.Errorf("%s: fixed point %d moved from %v to %v", tc.name, v, o, q)
				}
			case onX && q[0] != o[0], onY && q[1] != o[1]:
				t.Errorf("%s: boundary point %d left its side: %v -> %v", tc.name, v, o, q)
			}
		}
		// Nearly every interior vertex finds an acceptable move within four
		// tries at amount 0.4 (observed: all).
		if moved < interior*9/10 {
			t.Errorf("%s: %d of %d interior points moved", tc.name, moved, interior)
		}
		for tr := range m.Triangles {
			if (p.SignedArea(tr) > 0) != (m.SignedArea(tr) > 0) {
				t.Errorf("%s: triangle %d changed orientation", tc.name, tr)
			}
			if p.Shape(tr) < 0.5*m.Shape(tr) {
				t.Errorf("%s: triangle %d shape %v < half of %v", tc.name, tr, p.Shape(tr), m.Shape(tr))
			}
		}
		// All triangles of the base mesh are right isosceles (q = √3/2); a
		// random perturbation must make some worse.
		if got, orig := p.Quality().MinShape, m.Quality().MinShape; got >= 0.99*orig {
			t.Errorf("%s: minimum shape %v after perturbation, %v before: nothing moved noticeably", tc.name, got, orig)
		}
		// The area of the domain is unchanged: boundary points stay on the
		// straight sides (tolerance: rounding of the sum).
		if got := totalArea(p); math.Abs(got-2) > 1e-13 {
			t.Errorf("%s: area %v, want 2", tc.name, got)
		}
	}

	// Same seed, same mesh; another seed, another mesh.
	p1, _ := Perturb(base, amount, newRNG(5))
	p2, _ := Perturb(base, amount, newRNG(5))
	p3, _ := Perturb(base, amount, newRNG(6))
	if !slices.Equal(p1.Points, p2.Points) {
		t.Error("Perturb with equal seeds gave different meshes")
	}
	if slices.Equal(p1.Points, p3.Points) {
		t.Error("Perturb with different seeds gave the same mesh")
	}
	p0, _ := Perturb(base, 0, newRNG(5))
	if !slices.Equal(p0.Points, base.Points) {
		t.Error("Perturb with amount 0 moved points")
	}

	for _, a := range []float64{-0.1, 1, 2, math.NaN()} {
		_, err := Perturb(base, a, newRNG(1))
		wantError(t, "amount", err, "0 <= amount < 1")
	}
}

func TestPermuteLocalVertices(t *testing.T) {
	m := mustRectangle(t, 0, 0, 1, 1, 20, 20, CrossedDiagonals) // 1600 triangles
	p := m.PermuteLocalVertices(newRNG(7))
	if !p.MixedOrientation || m.MixedOrientation {
		t.Errorf("MixedOrientation: copy %v, original %v; want true, false", p.MixedOrientation, m.MixedOrientation)
	}
	if err := p.Validate(); err != nil {
		t.Fatal(err)
	}
	if !slices.Equal(p.Points, m.Points) || !slices.Equal(p.Edges, m.Edges) ||
		!slices.Equal(p.EdgeTriangles, m.EdgeTriangles) || !slices.Equal(p.EdgeTags, m.EdgeTags) {
		t.Error("PermuteLocalVertices changed points, edges or tags")
	}
	cw := 0
	for tr, tri := range p.Triangles {
		a, b := slices.Clone(tri[:]), slices.Clone(m.Triangles[tr][:])
		slices.Sort(a)
		slices.Sort(b)
		if !slices.Equal(a, b) {
			t.Errorf("triangle %d: vertices %v, want a permutation of %v", tr, tri, m.Triangles[tr])
		}
		// Local edge i still opposite local vertex i.
		for i, e := range p.TriangleEdges[tr] {
			if slices.Contains(p.Edges[e][:], tri[i]) {
				t.Errorf("triangle %d: local edge %d = %v contains local vertex %d", tr, i, p.Edges[e], tri[i])
			}
		}
		if p.SignedArea(tr) < 0 {
			cw++
		}
	}
	// Half the permutations are odd: cw ~ Binomial(1600, 1/2), standard
	// deviation 20; accept five deviations.
	if cw < 700 || cw > 900 {
		t.Errorf("%d of 1600 triangles clockwise, want about 800", cw)
	}
	checkAgainstNaive(t, "permuted", p)
	_, err := New(p.Points, p.Triangles)
	wantError(t, "New on permuted", err, "clockwise")
}
