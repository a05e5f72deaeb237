package mesh

import (
	"math"
	"testing"
)

// Test domains with closed-form areas, shared by the triangulation tests.

// lShape is the L-shaped hexagon [0,2]×[0,2] minus (1,2]×(1,2], area 3,
// with every segment tagged by its index plus one.
func lShape() *Domain {
	return &Domain{
		Outer:     [][2]float64{{0, 0}, {2, 0}, {2, 1}, {1, 1}, {1, 2}, {0, 2}},
		OuterTags: []int{1, 2, 3, 4, 5, 6},
		TagNames:  map[int]string{1: "bottom", 5: "top"},
	}
}

// squareHole is the unit square minus the square [1/4, 3/4]², area 3/4. The
// hole is given clockwise and tagged 7.
func squareHole() *Domain {
	return &Domain{
		Outer:    [][2]float64{{0, 0}, {1, 0}, {1, 1}, {0, 1}},
		Holes:    [][][2]float64{{{0.25, 0.25}, {0.25, 0.75}, {0.75, 0.75}, {0.75, 0.25}}},
		HoleTags: [][]int{{7, 7, 7, 7}},
	}
}

// twoHoles is [0,3]×[0,2] (clockwise) minus the rectangle [0.5,1.2]×[0.5,1.5]
// (area 0.7) and the triangle (1.8,0.5), (2.5,0.6), (2.5,1.5) (area 0.315):
// area 6 - 0.7 - 0.315 = 4.985.
func twoHoles() *Domain {
	return &Domain{
		Outer: [][2]float64{{0, 0}, {0, 2}, {3, 2}, {3, 0}},
		Holes: [][][2]float64{
			{{0.5, 0.5}, {1.2, 0.5}, {1.2, 1.5}, {0.5, 1.5}},
			{{1.8, 0.5}, {2.5, 0.6}, {2.5, 1.5}},
		},
		OuterTags: []int{1, 2, 3, 4},
		HoleTags:  [][]int{nil, {5, 6, 5}},
	}
}

// regularPolygon returns the regular n-gon with circumradius r centred at
// the origin; its area is (n/2) r² sin(2π/n).
func regularPolygon(n int, r float64) [][2]float64 {
	p := make([][2]float64, n)
	for i := range p {
		a := 2 * math.Pi * float64(i) / float64(n)
		p[i] = [2]float64{r * math.Cos(a), r * math.Sin(a)}
	}
	return p
}

// cone is the circular sector of radius 1 and opening deg degrees with apex
// at the origin, its arc replaced by n chords: an input angle of deg degrees
// at vertex 0 and angles above 90 degrees elsewhere. Its area is
// (n/2) sin(deg/n) (n triangles from the apex).
func cone(deg float64, n int) *Domain {
	poly := [][2]float64{{0, 0}}
	for i := 0; i <= n; i++ {
		a := deg * math.Pi / 180 * float64(i) / float64(n)
		poly = append(poly, [2]float64{math.Cos(a), math.Sin(a)})
	}
	return &Domain{Outer: poly}
}

func TestDomainArea(t *testing.T) {
	const tol = 1e-14 // relative; rounding of a few shoelace terms
	for _, c := range []struct {
		name string
		d    *Domain
		want float64
	}{
		{"L-shape", lShape(), 3},                             // closed form
		{"square with hole", squareHole(), 0.75},             // 1 - 1/4
		{"two holes", twoHoles(), 4.985},                     // 6 - 0.7 - 0.315
		{"12-gon", &Domain{Outer: regularPolygon(12, 1)}, 3}, // 6 sin 30° = 3
		{"cone 15", cone(15, 4), 2 * math.Sin(15*math.Pi/180/4)},
	} {
		if got := c.d.Area(); math.Abs(got-c.want) > tol*c.want {
			t.Errorf("%s: area %.17g, want %.17g", c.name, got, c.want)
		}
		if err := c.d.Validate(); err != nil {
			t.Errorf("%s: %v", c.name, err)
		}
	}
}

func TestDomainValidateErrors(t *testing.T) {
	sq := func() [][2]float64 { return [][2]float64{{0, 0}, {4, 0}, {4, 4}, {0, 4}} }
	for _, c := range []struct {
		name string
		d    *Domain
		want []string
	}{
		{"nil outer", &Domain{}, []string{"outer polygon has 0 vertices"}},
		{"two vertices", &Domain{Outer: [][2]float64{{0, 0}, {1, 0}}}, []string{"outer polygon has 2 vertices", "at least 3"}},
		{"hole with two vertices", &Domain{Outer: sq(), Holes: [][][2]float64{{{1, 1}, {2, 2}}}}, []string{"hole 0 has 2 vertices"}},
		{"not finite", &Domain{Outer: [][2]float64{{0, 0}, {1, 0}, {math.NaN(), 1}}}, []string{"outer polygon vertex 2", "not finite"}},
		{"zero-length segment", &Domain{Outer: [][2]float64{{0, 0}, {1, 0}, {1, 0}, {0, 1}}}, []string{"outer polygon segment 1", "zero length"}},
		{"closing segment zero", &Domain{Outer: [][2]float64{{0, 0}, {1, 0}, {0, 1}, {0, 0}}}, []string{"outer polygon segment 3", "zero length"}},
		{"duplicate vertex", &Domain{Outer: [][2]float64{{0, 0}, {2, 0}, {1, 1}, {2, 2}, {0, 2}, {1, 1}}},
			[]string{"repeated point (1, 1)", "outer polygon vertex 2", "outer polygon vertex 5"}},
		{"hole repeats an outer vertex", &Domain{Outer: sq(), Holes: [][][2]float64{{{4, 4}, {2, 3}, {3, 2}}}},
			[]string{"repeated point (4, 4)", "outer polygon vertex 2", "hole 0 vertex 0"}},
		{"bow-tie", &Domain{Outer: [][2]float64{{0, 0}, {1, 1}, {1, 0}, {0, 1}}},
			[]string{"outer polygon segment 0", "outer polygon segment 2", "cross"}},
		{"folds back", &Domain{Outer: [][2]float64{{0, 0}, {2, 0}, {1, 0}, {1, 1}}},
			[]string{"outer polygon segment 0", "outer polygon segment 1", "overlap"}},
		{"vertex touches segment", &Domain{Outer: [][2]float64{{0, 0}, {4, 0}, {4, 4}, {2, 0}, {0, 4}}},
			[]string{"outer polygon segment 0", "outer polygon segment 2", "touch"}},
		{"hole crosses outer", &Domain{Outer: sq(), Holes: [][][2]float64{{{3, 1}, {5, 1}, {5, 2}, {3, 2}}}},
			[]string{"outer polygon segment 1", "hole 0 segment 0", "cross"}},
		{"hole touches outer", &Domain{Outer: sq(), Holes: [][][2]float64{{{4, 1}, {3, 2}, {3, 1}}}},
			[]string{"outer polygon segment 1", "hole 0 segment 0", "touch"}},
		{"holes cross", &Domain{Outer: sq(), Holes: [][][2]float64{{{1, 1}, {3, 1}, {3, 2}, {1, 2}}, {{2, 0.5}, {2.5, 0.5}, {2.5, 3}}}},
			[]string{"hole 0 segment 0", "hole 1 segment 1"}},
		{"hole outside", &Domain{Outer: sq(), Holes: [][][2]float64{{{5, 5}, {6, 5}, {6, 6}}}}, []string{"hole 0 lies outside the outer polygon"}},
		{"hole around outer", &Domain{Outer: sq(), Holes: [][][2]float64{{{-1, -1}, {5, -1}, {5, 5}, {-1, 5}}}}, []string{"hole 0 lies outside"}},
		{"nested holes", &Domain{Outer: sq(), Holes: [][][2]float64{{{1, 1}, {3, 1}, {3, 3}, {1, 3}}, {{1.5, 1.5}, {2.5, 1.5}, {2, 2.5}}}},
			[]string{"hole 1 lies inside hole 0"}},
		{"tag count", &Domain{Outer: sq(), OuterTags: []int{1, 2}}, []string{"outer polygon has 4 segments but 2 tags"}},
		{"zero tag", &Domain{Outer: sq(), Holes: [][][2]float64{{{1, 1}, {2, 1}, {2, 2}}}, HoleTags: [][]int{{3, 0, 3}}},
			[]string{"hole 0 segment 1 has tag 0", "positive"}},
		{"negative tag", &Domain{Outer: sq(), OuterTags: []int{1, 2, -3, 4}}, []string{"outer polygon segment 2 has tag -3"}},
		{"too many hole tag slices", &Domain{Outer: sq(), HoleTags: [][]int{{1}}}, []string{"0 holes but tags for 1"}},
		{"bad tag name", &Domain{Outer: sq(), TagNames: map[int]string{1: "two words"}}, []string{"two words", "not allowed"}},
		{"same names", &Domain{Outer: sq(), TagNames: map[int]string{1: "wall", 2: "wall"}}, []string{"tags 1 and 2", "wall"}},
	} {
		wantError(t, c.name, c.d.Validate(), c.want...)
		_, err := Triangulate(c.d, nil)
		wantError(t, c.name+" (Triangulate)", err, c.want...)
	}
	var nilDomain *Domain
	wantError(t, "nil domain", nilDomain.Validate(), "nil domain")
}

func TestDomainValidAccepts(t *testing.T) {
	for _, c := range []struct {
		name string
		d    *Domain
	}{
		{"collinear vertices on a side", &Domain{Outer: [][2]float64{{0, 0}, {1, 0}, {2, 0}, {2, 1}, {0, 1}}}},
		{"clockwise outer, counter-clockwise hole", &Domain{Outer: [][2]float64{{0, 0}, {0, 3}, {3, 3}, {3, 0}}, Holes: [][][2]float64{{{1, 1}, {2, 1}, {2, 2}}}}},
		{"triangle", &Domain{Outer: [][2]float64{{0, 0}, {1, 0}, {0, 1}}}},
		{"hole near boundary", &Domain{Outer: [][2]float64{{0, 0}, {1, 0}, {1, 1}, {0, 1}}, Holes: [][][2]float64{{{1e-9, 0.5}, {0.5, 1e-9}, {0.5, 0.5}}}}},
	} {
		if err := c.d.Validate(); err != nil {
			t.Errorf("%s: %v", c.name, err)
		}
	}
}
