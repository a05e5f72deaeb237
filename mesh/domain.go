package mesh

import (
	"cmp"
	"fmt"
	"math"
	"slices"
)

// Domain is a polygonal domain with holes, whose boundary segments carry
// tags: the input of Triangulate and ConstrainedDelaunay.
//
// Every polygon is a closed chain of at least three distinct vertices in
// either orientation; the segment i of a polygon with n vertices runs from
// vertex i to vertex (i+1) mod n. The polygons must be simple and disjoint:
// no two segments may cross or touch, except consecutive segments of one
// polygon at their common vertex. Every hole must lie inside Outer, and no
// hole inside another. Consecutive collinear segments are allowed (a vertex
// on a straight side, for example to end a tagged part of a side).
//
// The zero value is not a valid domain; Validate reports what is wrong.
type Domain struct {
	// Outer is the outer boundary.
	Outer [][2]float64
	// Holes are the polygons removed from the inside of Outer.
	Holes [][][2]float64

	// OuterTags[i] is the positive tag of outer segment i. A nil slice
	// gives every outer segment DefaultTag.
	OuterTags []int
	// HoleTags[h][i] is the positive tag of segment i of hole h. A nil
	// slice, or a nil entry for a hole, gives the segments concerned
	// DefaultTag.
	HoleTags [][]int

	// TagNames names tags, as in Mesh.TagNames (may be nil). The names are
	// copied into the meshes made from the domain.
	TagNames map[int]string
}

// polygonName returns "outer polygon" for p = -1 and "hole h" for p = h.
func polygonName(p int) string {
	if p < 0 {
		return "outer polygon"
	}
	return fmt.Sprintf("hole %d", p)
}

// polygon returns polygon p of d: Outer for p = -1, Holes[p] otherwise.
func (d *Domain) polygon(p int) [][2]float64 {
	if p < 0 {
		return d.Outer
	}
	return d.Holes[p]
}

// segmentTag returns the tag of segment i of polygon p.
func (d *Domain) segmentTag(p, i int) int {
	var tags []int
	if p < 0 {
		tags = d.OuterTags
	} else if p < len(d.HoleTags) {
		tags = d.HoleTags[p]
	}
	if tags == nil {
		return DefaultTag
	}
	return tags[i]
}

// domainSegment is one boundary segment of a domain, for validation.
type domainSegment struct {
	poly, index int // polygon (-1 for Outer) and segment index in it
	a, b        [2]float64
	n           int // number of vertices of the polygon
}

func (s domainSegment) String() string {
	return fmt.Sprintf("%s segment %d (%g, %g)-(%g, %g)", polygonName(s.poly), s.index, s.a[0], s.a[1], s.b[0], s.b[1])
}

// adjacent reports whether s and t are consecutive segments of one polygon;
// which returns the vertex they share: true for s.b = t.a.
func (s domainSegment) adjacent(t domainSegment) (ok, sEndsAtT bool) {
	if s.poly != t.poly {
		return false, false
	}
	if (s.index+1)%s.n == t.index {
		return true, true
	}
	if (t.index+1)%t.n == s.index {
		return true, false
	}
	return false, false
}

// Validate checks the domain and returns an error naming the polygon and
// the segment (or vertex) at fault: a polygon with fewer than three
// vertices, a coordinate that is not finite, a segment of zero length, a
// repeated point, segments that cross, touch or overlap, a hole outside the outer polygon or inside another
// hole, a tag slice of the wrong length, a tag that is not positive, or a
// tag name that is not allowed.
//
// The intersection test sorts the segments by their left ends and compares
// only segments whose x-ranges overlap, so it is fast for ordinary domains
// and O(n²) only for pathological ones. All decisions use exact orientation
// predicates.
func (d *Domain) Validate() error {
	if d == nil {
		return fmt.Errorf("mesh: nil domain")
	}
	if len(d.HoleTags) > len(d.Holes) {
		return fmt.Errorf("mesh: domain has %d holes but tags for %d", len(d.Holes), len(d.HoleTags))
	}
	var segs []domainSegment
	type vertexRef struct {
		p    [2]float64
		poly int
		i    int
	}
	var verts []vertexRef
	for p := -1; p < len(d.Holes); p++ {
		poly := d.polygon(p)
		name := polygonName(p)
		if len(poly) < 3 {
			return fmt.Errorf("mesh: %s has %d vertices; a polygon needs at least 3", name, len(poly))
		}
		var tags []int
		if p < 0 {
			tags = d.OuterTags
		} else if p < len(d.HoleTags) {
			tags = d.HoleTags[p]
		}
		if tags != nil && len(tags) != len(poly) {
			return fmt.Errorf("mesh: %s has %d segments but %d tags", name, len(poly), len(tags))
		}
		for i, v := range poly {
			if msg := pointProblem(v); msg != "" {
				return fmt.Errorf("mesh: %s vertex %d %s", name, i, msg)
			}
			if tags != nil && tags[i] <= 0 {
				return fmt.Errorf("mesh: %s segment %d has tag %d; boundary tags must be positive", name, i, tags[i])
			}
			if w := poly[(i+1)%len(poly)]; w == v {
				return fmt.Errorf("mesh: %s segment %d from vertex %d to vertex %d has zero length: both are (%g, %g)", name, i, i, (i+1)%len(poly), v[0], v[1])
			}
			verts = append(verts, vertexRef{v, p, i})
			segs = append(segs, domainSegment{poly: p, index: i, a: v, b: poly[(i+1)%len(poly)], n: len(poly)})
		}
	}
	for tag, name := range d.TagNames {
		if tag <= 0 {
			return fmt.Errorf("mesh: domain tag name %q belongs to tag %d; tags must be positive", name, tag)
		}
		if name == "" {
			return fmt.Errorf("mesh: domain tag %d has an empty name", tag)
		}
		if err := checkTagName(nil, tag, name); err != nil {
			return err
		}
	}
	if err := checkDistinctNames(d.TagNames); err != nil {
		return err
	}

	// Repeated points: sort by coordinates, compare neighbours.
	slices.SortFunc(verts, func(x, y vertexRef) int {
		if c := cmp.Compare(x.p[0], y.p[0]); c != 0 {
			return c
		}
		if c := cmp.Compare(x.p[1], y.p[1]); c != 0 {
			return c
		}
		if c := cmp.Compare(x.poly, y.poly); c != 0 {
			return c
		}
		return cmp.Compare(x.i, y.i)
	})
	for k := 1; k < len(verts); k++ {
		u, v := verts[k-1], verts[k]
		if u.p == v.p {
			return fmt.Errorf("mesh: repeated point (%g, %g): %s vertex %d and %s vertex %d", u.p[0], u.p[1], polygonName(u.poly), u.i, polygonName(v.poly), v.i)
		}
	}

	if err := checkCrossings(segs); err != nil {
		return err
	}

	// With no crossings, a polygon lies inside another if and only if one of
	// its vertices does.
	for h, hole := range d.Holes {
		if !insidePolygon(hole[0], d.Outer) {
			return fmt.Errorf("mesh: hole %d lies outside the outer polygon (its vertex 0 (%g, %g) is outside)", h, hole[0][0], hole[0][1])
		}
		for g, other := range d.Holes {
			if g != h && insidePolygon(hole[0], other) {
				return fmt.Errorf("mesh: hole %d lies inside hole %d; holes must not be nested", h, g)
			}
		}
	}
	return nil
}

// checkDistinctNames reports two tags with the same name.
func checkDistinctNames(names map[int]string) error {
	tags := make([]int, 0, len(names))
	for tag := range names {
		tags = append(tags, tag)
	}
	slices.Sort(tags)
	for i, t := range tags {
		for _, u := range tags[i+1:] {
			if names[t] == names[u] {
				return fmt.Errorf("mesh: domain tags %d and %d have the same name %q", t, u, names[t])
			}
		}
	}
	return nil
}

// checkCrossings reports the first pair of segments that cross, touch or
// overlap, other than consecutive segments meeting at their common vertex.
// Candidate pairs come from a sweep over x: segments sorted by left end, each
// compared with the later ones whose left end is not right of its right end.
func checkCrossings(segs []domainSegment) error {
	order := make([]int, len(segs))
	for i := range order {
		order[i] = i
	}
	lo := func(s domainSegment) float64 { return min(s.a[0], s.b[0]) }
	hi := func(s domainSegment) float64 { return max(s.a[0], s.b[0]) }
	slices.SortFunc(order, func(i, j int) int {
		if c := cmp.Compare(lo(segs[i]), lo(segs[j])); c != 0 {
			return c
		}
		return cmp.Compare(i, j)
	})
	// Report pairs in input order so that the message does not depend on
	// the sweep: find the first offending pair (i, j) in lexicographic order.
	best := [2]int{-1, -1}
	for k, i := range order {
		s := segs[i]
		for _, j := range order[k+1:] {
			t := segs[j]
			if lo(t) > hi(s) {
				break
			}
			if segmentsConflict(s, t) {
				p := [2]int{min(i, j), max(i, j)}
				if best[0] < 0 || p[0] < best[0] || p[0] == best[0] && p[1] < best[1] {
					best = p
				}
			}
		}
	}
	if best[0] < 0 {
		return nil
	}
	s, t := segs[best[0]], segs[best[1]]
	if ok, _ := s.adjacent(t); ok {
		return fmt.Errorf("mesh: %s and %s overlap: the polygon folds back on itself", s, t)
	}
	return fmt.Errorf("mesh: %s and %s cross or touch; polygons must be simple and disjoint", s, t)
}

// segmentsConflict reports whether two boundary segments intersect other
// than at the common vertex of consecutive segments.
func segmentsConflict(s, t domainSegment) bool {
	if ok, sFirst := s.adjacent(t); ok {
		// Share exactly one vertex v; they conflict only if collinear and
		// pointing the same way from v (overlap). A triangle's three
		// segments are pairwise adjacent, which is handled the same way.
		var v, p, q [2]float64
		if sFirst {
			v, p, q = s.b, s.a, t.b
		} else {
			v, p, q = s.a, s.b, t.a
		}
		if orientSign(p, v, q) != 0 {
			return false
		}
		return (p[0]-v[0])*(q[0]-v[0])+(p[1]-v[1])*(q[1]-v[1]) > 0
	}
	return segmentsIntersect(s.a, s.b, t.a, t.b)
}

// segmentsIntersect reports whether the closed segments ab and cd have a
// point in common (exact).
func segmentsIntersect(a, b, c, d [2]float64) bool {
	o1 := orientSign(a, b, c)
	o2 := orientSign(a, b, d)
	o3 := orientSign(c, d, a)
	o4 := orientSign(c, d, b)
	if (o1 > 0 && o2 < 0 || o1 < 0 && o2 > 0) && (o3 > 0 && o4 < 0 || o3 < 0 && o4 > 0) {
		return true
	}
	return o1 == 0 && onClosedSegment(a, b, c) || o2 == 0 && onClosedSegment(a, b, d) ||
		o3 == 0 && onClosedSegment(c, d, a) || o4 == 0 && onClosedSegment(c, d, b)
}

// onSegment reports whether p, known to be collinear with a and b, lies on
// the closed segment ab.
func onClosedSegment(a, b, p [2]float64) bool {
	return min(a[0], b[0]) <= p[0] && p[0] <= max(a[0], b[0]) &&
		min(a[1], b[1]) <= p[1] && p[1] <= max(a[1], b[1])
}

// insidePolygon reports whether p lies strictly inside the polygon, by the
// crossing number with a horizontal ray (exact). p must not lie on the
// polygon's boundary.
func insidePolygon(p [2]float64, poly [][2]float64) bool {
	in := false
	for i, a := range poly {
		b := poly[(i+1)%len(poly)]
		// Half-open rule in y so that a vertex at height p[1] counts once.
		if (a[1] > p[1]) != (b[1] > p[1]) {
			// The edge crosses the ray's line; is the crossing right of p?
			o := orientSign(a, b, p)
			if b[1] > a[1] && o > 0 || b[1] < a[1] && o < 0 {
				in = !in
			}
		}
	}
	return in
}

// polygonCCW reports whether a simple polygon is counter-clockwise, from
// the exact orientation at its lowest (then leftmost) vertex, where the
// polygon is convex.
func polygonCCW(poly [][2]float64) bool {
	k := 0
	for i, p := range poly {
		if p[1] < poly[k][1] || p[1] == poly[k][1] && p[0] < poly[k][0] {
			k = i
		}
	}
	n := len(poly)
	prev, next := poly[(k+n-1)%n], poly[(k+1)%n]
	return orientSign(prev, poly[k], next) > 0
}

// polygonArea returns the (positive) area of a simple polygon by the shoelace
// formula, with coordinates taken relative to the first vertex to limit
// cancellation.
func polygonArea(poly [][2]float64) float64 {
	o := poly[0]
	s := 0.0
	for i := 1; i+1 < len(poly); i++ {
		s += orient(o, poly[i], poly[i+1])
	}
	return math.Abs(s) / 2
}

// Area returns the area of the domain: the area of Outer minus the areas of
// the holes. It assumes a valid domain.
func (d *Domain) Area() float64 {
	a := polygonArea(d.Outer)
	for _, h := range d.Holes {
		a -= polygonArea(h)
	}
	return a
}

// NumSegments returns the number of boundary segments (equal to the number
// of vertices).
func (d *Domain) NumSegments() int {
	n := len(d.Outer)
	for _, h := range d.Holes {
		n += len(h)
	}
	return n
}
