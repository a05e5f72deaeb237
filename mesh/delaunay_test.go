package mesh

import (
	"math"
	"slices"
	"testing"
)

// emptyCircleViolations counts pairs (triangle, point) with the point
// strictly inside the triangle's circumcircle, by brute force with the
// exact predicate; visible, if not nil, restricts the count to points
// visible from the triangle.
func emptyCircleViolations(m *Mesh, visible func(t, v int) bool) int {
	bad := 0
	for t, tri := range m.Triangles {
		a, b, c := m.Points[tri[0]], m.Points[tri[1]], m.Points[tri[2]]
		for v, p := range m.Points {
			if v == tri[0] || v == tri[1] || v == tri[2] {
				continue
			}
			if inCircleSign(a, b, c, p) > 0 && (visible == nil || visible(t, v)) {
				bad++
			}
		}
	}
	return bad
}

// hullArea returns the area of the convex hull of the points, from the
// package's hull (checked independently by the Delaunay property: a
// triangulation of a non-convex region would miss hull triangles, and the
// area comparison would fail).
func hullArea(tb testing.TB, pts [][2]float64) float64 {
	tb.Helper()
	h, err := convexHull(pts)
	if err != nil {
		tb.Fatal(err)
	}
	poly := make([][2]float64, len(h))
	for i, v := range h {
		poly[i] = pts[v]
	}
	return polygonArea(poly)
}

// checkEuler checks V - E + T = 1 - holes.
func checkEuler(t *testing.T, name string, m *Mesh, holes int) {
	t.Helper()
	if got, want := m.NumPoints()-m.NumEdges()+m.NumTriangles(), 1-holes; got != want {
		t.Errorf("%s: V - E + T = %d - %d + %d = %d, want 1 - %d = %d", name, m.NumPoints(), m.NumEdges(), m.NumTriangles(), got, holes, want)
	}
}

func TestDelaunayPoints(t *testing.T) {
	const areaTol = 1e-12 // relative: sums of a few hundred rounded areas
	rng := newRNG(5)
	random := func(n int) [][2]float64 {
		p := make([][2]float64, n)
		for i := range p {
			p[i] = [2]float64{rng.Float64(), rng.Float64()}
		}
		return p
	}
	grid := func(n int, h float64) [][2]float64 {
		var p [][2]float64
		for j := range n {
			for i := range n {
				p = append(p, [2]float64{float64(i) * h, float64(j) * h})
			}
		}
		return p
	}
	clustered := func(n int) [][2]float64 {
		p := make([][2]float64, n)
		for i := range p {
			r := math.Pow(10, -6*rng.Float64())
			a := 2 * math.Pi * rng.Float64()
			p[i] = [2]float64{1 + r*math.Cos(a), 2 + r*math.Sin(a)}
		}
		return p
	}
	ring := append(regularPolygon(24, 1), [2]float64{0, 0}) // 24 cocircular points and the centre
	lineAndApex := [][2]float64{{0, 0}, {1, 0}, {2, 0}, {3, 0}, {4, 0}, {2, 1}}
	for _, c := range []struct {
		name string
		pts  [][2]float64
		// wantTris is the triangle count from Euler's formula when known:
		// T = 2n - h - 2 for n points of which h on the hull.
		wantTris int
	}{
		{"random 400", random(400), -1},
		{"grid 12x12 (cocircular)", grid(12, 1), 2*144 - 44 - 2},
		{"grid 9x9 step 0.1", grid(9, 0.1), 2*81 - 32 - 2},
		{"24-gon and centre (cocircular)", ring, 2*25 - 24 - 2},
		{"collinear base and apex", lineAndApex, 2*6 - 6 - 2},
		{"clustered 300", clustered(300), -1},
		{"triangle", [][2]float64{{0, 0}, {1, 0}, {0, 1}}, 1},
	} {
		m, err := Delaunay(c.pts)
		if err != nil {
			t.Errorf("%s: %v", c.name, err)
			continue
		}
		if err := m.Validate(); err != nil {
			t.Errorf("%s: invalid mesh: %v", c.name, err)
		}
		if m.NumPoints() != len(c.pts) || !slices.Equal(m.Points, c.pts) {
			t.Errorf("%s: points are not the input points", c.name)
		}
		if n := emptyCircleViolations(m, nil); n != 0 {
			t.Errorf("%s: %d points strictly inside circumcircles", c.name, n)
		}
		if c.wantTris >= 0 && m.NumTriangles() != c.wantTris {
			t.Errorf("%s: %d triangles, want %d", c.name, m.NumTriangles(), c.wantTris)
		}
		checkEuler(t, c.name, m, 0)
		if got, want := totalArea(m), hullArea(t, c.pts); math.Abs(got-want) > areaTol*want {
			t.Errorf("%s: area %.17g, want hull area %.17g", c.name, got, want)
		}
	}
}

func TestDelaunayErrors(t *testing.T) {
	for _, c := range []struct {
		name string
		pts  [][2]float64
		want []string
	}{
		{"too few", [][2]float64{{0, 0}, {1, 0}}, []string{"at least 3 points, got 2"}},
		{"collinear", [][2]float64{{0, 0}, {1, 1}, {2, 2}, {3, 3}}, []string{"all 4 points are collinear"}},
		{"duplicate", [][2]float64{{0, 0}, {1, 0}, {0, 1}, {1, 0}}, []string{"points 1 and 3 coincide", "(1, 0)"}},
		{"infinite", [][2]float64{{0, 0}, {1, 0}, {math.Inf(1), 1}}, []string{"point 2", "not finite"}},
	} {
		_, err := Delaunay(c.pts)
		wantError(t, c.name, err, c.want...)
	}
}

// TestConstrainedDelaunay checks the constrained Delaunay property with
// respect to visibility on random star-shaped polygons with holes: no
// vertex that is visible from inside a triangle lies strictly inside its
// circumcircle. It also checks segments, tags, area and Euler's formula.
func TestConstrainedDelaunay(t *testing.T) {
	const areaTol = 1e-12 // relative
	rng := newRNG(9)
	type named struct {
		name string
		d    *Domain
	}
	var domains []named
	for trial := range 25 {
		n := 10 + rng.IntN(50)
		angles := make([]float64, n)
		for i := range angles {
			angles[i] = 2 * math.Pi * (float64(i) + 0.8*rng.Float64()) / float64(n)
		}
		outer := make([][2]float64, n)
		tags := make([]int, n)
		for i, a := range angles {
			r := 1 + 2*rng.Float64()
			outer[i] = [2]float64{r * math.Cos(a), r * math.Sin(a)}
			tags[i] = 1 + rng.IntN(3)
		}
		d := &Domain{Outer: outer, OuterTags: tags}
		// Up to two small holes near the centre, one of them thin.
		if trial%3 != 0 {
			d.Holes = append(d.Holes, [][2]float64{{-0.5, -0.1}, {-0.1, -0.1}, {-0.3, 0.3 * rng.Float64()}})
		}
		if trial%2 == 0 {
			d.Holes = append(d.Holes, [][2]float64{{0.1, 0}, {0.6, 0.01}, {0.6, 0.05}, {0.1, 0.03}})
		}
		domains = append(domains, named{"random domain " + string(rune('A'+trial)), d})
	}
	// A comb: one long bottom segment under teeth whose tips come close
	// to it, so that it crosses many Delaunay edges.
	comb := [][2]float64{{0, 0}, {12, 0}, {12, 1}}
	for i := 11; i >= 0; i-- {
		comb = append(comb, [2]float64{float64(i) + 0.5, 0.05 + 0.05*rng.Float64()}, [2]float64{float64(i), 1})
	}
	domains = append(domains, named{"comb", &Domain{Outer: comb}})
	for _, c := range domains {
		name, d := c.name, c.d
		m, err := ConstrainedDelaunay(d)
		if err != nil {
			t.Errorf("%s: %v", name, err)
			continue
		}
		if err := m.Validate(); err != nil {
			t.Errorf("%s: %v", name, err)
		}
		if m.NumPoints() != d.NumSegments() {
			t.Errorf("%s: %d points, want the %d domain vertices (no Steiner points)", name, m.NumPoints(), d.NumSegments())
		}
		segs := domainSegments(d)
		visible := func(tri, v int) bool {
			c := m.Centroid(tri)
			p := m.Points[v]
			for _, s := range segs {
				if s.a == p || s.b == p {
					continue // the sight line ends on this segment's end
				}
				if segmentsIntersect(c, p, s.a, s.b) {
					return false
				}
			}
			return true
		}
		if k := emptyCircleViolations(m, visible); k != 0 {
			t.Errorf("%s: %d visible vertices strictly inside circumcircles", name, k)
		}
		if got, want := totalArea(m), d.Area(); math.Abs(got-want) > areaTol*want {
			t.Errorf("%s: area %.17g, want %.17g", name, got, want)
		}
		checkEuler(t, name, m, len(d.Holes))
		checkSegments(t, name, d, m)
	}
}

// domainSegments lists the segments of a domain with their tags.
func domainSegments(d *Domain) []domainSegment {
	var s []domainSegment
	for p := -1; p < len(d.Holes); p++ {
		poly := d.polygon(p)
		for i := range poly {
			s = append(s, domainSegment{poly: p, index: i, a: poly[i], b: poly[(i+1)%len(poly)], n: len(poly)})
		}
	}
	return s
}

// checkSegments checks that every segment of d is the union of a chain of
// boundary edges of m carrying the segment's tag, from the segment's first
// vertex to its last, and that the boundary edges are exactly these (the
// total boundary length equals the perimeter). It relies on the numbering
// of Triangulate: the domain's vertices come first.
func checkSegments(t *testing.T, name string, d *Domain, m *Mesh) {
	t.Helper()
	const lineTol = 1e-12 // relative distance of an edge end from its segment's line
	const lengthTol = 1e-12
	// Boundary neighbours of every vertex.
	nbr := make([][]int, m.NumPoints())
	for _, e := range m.BoundaryEdges(0) {
		a, b := m.Edges[e][0], m.Edges[e][1]
		nbr[a] = append(nbr[a], e)
		nbr[b] = append(nbr[b], e)
	}
	base := 0
	perimeter, chained := 0.0, 0.0
	for p := -1; p < len(d.Holes); p++ {
		poly := d.polygon(p)
		for i := range poly {
			va, vb := base+i, base+(i+1)%len(poly)
			pa, pb := poly[i], poly[(i+1)%len(poly)]
			if m.Points[va] != pa || m.Points[vb] != pb {
				t.Fatalf("%s: mesh points %d, %d are not %s vertices %d, %d", name, va, vb, polygonName(p), i, (i+1)%len(poly))
			}
			l := math.Sqrt(sq(pa, pb))
			perimeter += l
			tag := d.segmentTag(p, i)
			// Walk from va toward vb along boundary edges that stay on the
			// segment and move forward.
			v, walked, steps := va, 0.0, 0
			for v != vb {
				next := -1
				for _, e := range nbr[v] {
					w := m.Edges[e][0] + m.Edges[e][1] - v
					pw := m.Points[w]
					if math.Abs(orient(pa, pb, pw)) > lineTol*l*l {
						continue
					}
					if (pw[0]-m.Points[v][0])*(pb[0]-pa[0])+(pw[1]-m.Points[v][1])*(pb[1]-pa[1]) <= 0 {
						continue
					}
					next = e
					break
				}
				if next < 0 || steps > m.NumEdges() {
					t.Errorf("%s: %s segment %d is not a chain of boundary edges (stuck at vertex %d)", name, polygonName(p), i, v)
					break
				}
				if got := m.EdgeTags[next]; got != tag {
					t.Errorf("%s: %s segment %d: edge %d has tag %d, want %d", name, polygonName(p), i, next, got, tag)
				}
				walked += m.EdgeLength(next)
				v = m.Edges[next][0] + m.Edges[next][1] - v
				steps++
			}
			if math.Abs(walked-l) > lengthTol*l {
				t.Errorf("%s: %s segment %d: edges add up to length %.17g, want %.17g", name, polygonName(p), i, walked, l)
			}
			chained += walked
		}
		base += len(poly)
	}
	total := 0.0
	for _, e := range m.BoundaryEdges(0) {
		total += m.EdgeLength(e)
	}
	if math.Abs(total-perimeter) > lengthTol*perimeter {
		t.Errorf("%s: boundary edges have total length %.17g, want the perimeter %.17g", name, total, perimeter)
	}
	for tag, n := range d.TagNames {
		if m.TagNames[tag] != n {
			t.Errorf("%s: tag %d named %q, want %q", name, tag, m.TagNames[tag], n)
		}
	}
}
