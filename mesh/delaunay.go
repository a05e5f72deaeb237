package mesh

import (
	"cmp"
	"fmt"
	"math"
	"slices"
)

// This file holds the incremental constrained Delaunay triangulation used by
// Delaunay, ConstrainedDelaunay and Triangulate.
//
// Algorithms and sources:
//   - Vertices are inserted one at a time into a Delaunay triangulation of a
//     large enclosing triangle: the containing triangle is found by a
//     visibility walk (which terminates in Delaunay triangulations:
//     H. Edelsbrunner, "An acyclicity theorem for cell complexes in d
//     dimensions", Combinatorica 10, 1990), split into three (or the two
//     triangles of an edge into four), and the Delaunay property restored by
//     Lawson's edge flips (C. L. Lawson, 1977; de Berg, Cheong, van Kreveld
//     and Overmars, Computational Geometry, 3rd ed., 2008, section 9.3,
//     algorithms INSERTPOINT and LEGALIZEEDGE). The enclosing triangle
//     plays the role of de Berg et al.'s symbolic points p₋₁, p₋₂, p₋₃; it
//     is given real coordinates, which is harmless here because every
//     triangle touching it is removed at the end and every boundary edge
//     is enforced as a constraint.
//   - Vertices are inserted in the order of a Hilbert curve through their
//     bounding box, so that each walk starts near its goal (the spatial
//     ordering of N. Amenta, S. Choi and G. Rote, "Incremental
//     constructions con BRIO", SoCG 2003, without the random rounds).
//   - Segments are enforced afterwards by flipping the edges that cross
//     them (S. W. Sloan, "A fast algorithm for generating constrained
//     Delaunay triangulations", Computers & Structures 47(3):441–450,
//     1993): an edge that crosses the segment and is the diagonal of a
//     convex quadrilateral is flipped; one that is not is retried later.
//     Then Lawson flips restore the constrained Delaunay property, under
//     which no unconstrained edge has the opposite vertex of a neighbour
//     inside the circumcircle of its triangle (L. P. Chew, "Constrained
//     Delaunay triangulations", Algorithmica 4, 1989).
//   - Triangles outside the domain are removed by a flood fill from the
//     outer side of every segment that does not cross segments.
//
// All orientation and in-circle decisions use the exact predicates of
// predicates.go, so the combinatorial result does not depend on rounding.

// ctri is one triangle of the working triangulation.
type ctri struct {
	v   [3]int32 // counter-clockwise vertices; v[0] < 0 marks a deleted slot
	n   [3]int32 // n[i]: the neighbour across the edge opposite v[i], -1 if none
	seg [3]int32 // seg[i]: 1 + input segment containing the edge opposite v[i], 0 if none
}

// inputSegment is one boundary segment of the domain being triangulated.
type inputSegment struct {
	a, b        int32 // end vertices (internal numbers)
	tag         int
	poly, index int // polygon (-1 for the outer one) and segment number in it
	domainLeft  bool
}

// superVertices is the number of vertices of the enclosing triangle, which
// take internal numbers 0, 1, 2; the vertex numbered v in the output is
// internal vertex v + superVertices.
const superVertices = 3

// triangulation is a mutable constrained Delaunay triangulation.
type triangulation struct {
	pts  [][2]float64
	tris []ctri
	vtri []int32 // vtri[v]: some live triangle with vertex v, -1 if none

	segs []inputSegment
	// nInput is the number of input vertices, internal numbers
	// superVertices .. superVertices+nInput-1.
	nInput int
	// vseg[v] is the segment on which Steiner vertex v was inserted, -1
	// for input vertices and interior Steiner vertices.
	vseg []int32
	// inSegs[v-superVertices] lists the (at most two) segments at input
	// vertex v, -1 for none.
	inSegs [][2]int32

	stack []int32 // scratch for legalize
}

// newTriangulation returns the triangulation of the enclosing triangle of
// pts, with pts registered as (not yet inserted) input vertices.
func newTriangulation(pts [][2]float64) *triangulation {
	lo, hi := pts[0], pts[0]
	for _, p := range pts {
		lo = [2]float64{min(lo[0], p[0]), min(lo[1], p[1])}
		hi = [2]float64{max(hi[0], p[0]), max(hi[1], p[1])}
	}
	cx, cy := (lo[0]+hi[0])/2, (lo[1]+hi[1])/2
	span := max(hi[0]-lo[0], hi[1]-lo[1])
	if span == 0 {
		span = 1
	}
	// An equilateral-ish triangle whose inscribed circle (radius 25·span)
	// contains the bounding box with a wide margin.
	r := 50 * span
	tr := &triangulation{
		pts: make([][2]float64, 0, superVertices+len(pts)),
	}
	tr.pts = append(tr.pts,
		[2]float64{cx - r*math.Sqrt(3), cy - r},
		[2]float64{cx + r*math.Sqrt(3), cy - r},
		[2]float64{cx, cy + 2*r})
	tr.pts = append(tr.pts, pts...)
	tr.nInput = len(pts)
	tr.vtri = make([]int32, len(tr.pts))
	for i := range tr.vtri {
		tr.vtri[i] = -1
	}
	tr.vseg = make([]int32, len(tr.pts))
	for i := range tr.vseg {
		tr.vseg[i] = -1
	}
	tr.inSegs = make([][2]int32, len(pts))
	for i := range tr.inSegs {
		tr.inSegs[i] = [2]int32{-1, -1}
	}
	tr.tris = append(tr.tris, ctri{v: [3]int32{0, 1, 2}, n: [3]int32{-1, -1, -1}})
	tr.vtri[0], tr.vtri[1], tr.vtri[2] = 0, 0, 0
	return tr
}

// isInput reports whether v is an input vertex.
func (tr *triangulation) isInput(v int32) bool {
	return v >= superVertices && int(v) < superVertices+tr.nInput
}

// addVertex appends a Steiner vertex and returns its number.
func (tr *triangulation) addVertex(p [2]float64, seg int32) int32 {
	v := int32(len(tr.pts))
	tr.pts = append(tr.pts, p)
	tr.vtri = append(tr.vtri, -1)
	tr.vseg = append(tr.vseg, seg)
	return v
}

// setTri stores triangle t and points its vertices at it.
func (tr *triangulation) setTri(t int32, c ctri) {
	tr.tris[t] = c
	for _, v := range c.v {
		tr.vtri[v] = t
	}
}

// newTri appends a triangle slot and returns its number.
func (tr *triangulation) newTri() int32 {
	tr.tris = append(tr.tris, ctri{})
	return int32(len(tr.tris) - 1)
}

// replaceNeighbour makes triangle nb, if any, point at now instead of was.
func (tr *triangulation) replaceNeighbour(nb, was, now int32) {
	if nb < 0 {
		return
	}
	n := &tr.tris[nb].n
	for i := range 3 {
		if n[i] == was {
			n[i] = now
			return
		}
	}
	panic(fmt.Sprintf("mesh: internal error: triangle %d is not a neighbour of %d", was, nb))
}

// indexOf returns the local index of vertex v in triangle t, or -1.
func (tr *triangulation) indexOf(t, v int32) int {
	tv := &tr.tris[t].v
	switch v {
	case tv[0]:
		return 0
	case tv[1]:
		return 1
	case tv[2]:
		return 2
	}
	return -1
}

// neighbourIndex returns the local index i of triangle t with n[i] = u.
func (tr *triangulation) neighbourIndex(t, u int32) int {
	n := &tr.tris[t].n
	switch u {
	case n[0]:
		return 0
	case n[1]:
		return 1
	case n[2]:
		return 2
	}
	panic(fmt.Sprintf("mesh: internal error: triangle %d is not a neighbour of %d", u, t))
}

// flip replaces the edge opposite local vertex k of triangle t, shared with
// triangle u, by the other diagonal of their quadrilateral. With t = (a, b,
// c) (a = v[k]) and u = (d, c, b), the results are t = (a, b, d) and u =
// (d, c, a); a keeps local index 0 in t and 2 in u.
func (tr *triangulation) flip(t int32, k int) {
	T := tr.tris[t]
	u := T.n[k]
	U := tr.tris[u]
	j := tr.neighbourIndex(u, t)
	k1, k2 := (k+1)%3, (k+2)%3
	j1, j2 := (j+1)%3, (j+2)%3
	a, b, c, d := T.v[k], T.v[k1], T.v[k2], U.v[j]
	nAB, sAB := T.n[k2], T.seg[k2]
	nCA, sCA := T.n[k1], T.seg[k1]
	nBD, sBD := U.n[j1], U.seg[j1]
	nDC, sDC := U.n[j2], U.seg[j2]
	tr.setTri(t, ctri{v: [3]int32{a, b, d}, n: [3]int32{nBD, u, nAB}, seg: [3]int32{sBD, 0, sAB}})
	tr.setTri(u, ctri{v: [3]int32{d, c, a}, n: [3]int32{nCA, t, nDC}, seg: [3]int32{sCA, 0, sDC}})
	tr.replaceNeighbour(nBD, u, t)
	tr.replaceNeighbour(nCA, t, u)
}

// insertInTriangle splits triangle t into three at the new vertex p, which
// must lie strictly inside it, and restores the (constrained) Delaunay
// property by flips.
func (tr *triangulation) insertInTriangle(t, p int32) {
	T := tr.tris[t]
	a, b, c := T.v[0], T.v[1], T.v[2]
	t1, t2 := tr.newTri(), tr.newTri()
	tr.setTri(t, ctri{v: [3]int32{p, b, c}, n: [3]int32{T.n[0], t1, t2}, seg: [3]int32{T.seg[0], 0, 0}})
	tr.setTri(t1, ctri{v: [3]int32{p, c, a}, n: [3]int32{T.n[1], t2, t}, seg: [3]int32{T.seg[1], 0, 0}})
	tr.setTri(t2, ctri{v: [3]int32{p, a, b}, n: [3]int32{T.n[2], t, t1}, seg: [3]int32{T.seg[2], 0, 0}})
	tr.replaceNeighbour(T.n[1], t, t1)
	tr.replaceNeighbour(T.n[2], t, t2)
	tr.legalize(p, t, t1, t2)
}

// insertOnEdge splits the edge opposite local vertex k of triangle t, and
// the triangle on its other side if any, at the new vertex p, which must lie
// on that edge; the halves of a constrained edge stay constrained. Then it
// restores the (constrained) Delaunay property by flips.
func (tr *triangulation) insertOnEdge(t int32, k int, p int32) {
	T := tr.tris[t]
	k1, k2 := (k+1)%3, (k+2)%3
	a, b, c := T.v[k], T.v[k1], T.v[k2]
	sBC := T.seg[k]
	u := T.n[k]
	tB := tr.newTri()
	if u < 0 {
		tr.setTri(t, ctri{v: [3]int32{a, b, p}, n: [3]int32{-1, tB, T.n[k2]}, seg: [3]int32{sBC, 0, T.seg[k2]}})
		tr.setTri(tB, ctri{v: [3]int32{a, p, c}, n: [3]int32{-1, T.n[k1], t}, seg: [3]int32{sBC, T.seg[k1], 0}})
		tr.replaceNeighbour(T.n[k1], t, tB)
		tr.legalize(p, t, tB)
		return
	}
	U := tr.tris[u]
	j := tr.neighbourIndex(u, t)
	j1, j2 := (j+1)%3, (j+2)%3
	d := U.v[j]
	uB := tr.newTri()
	tr.setTri(t, ctri{v: [3]int32{a, b, p}, n: [3]int32{uB, tB, T.n[k2]}, seg: [3]int32{sBC, 0, T.seg[k2]}})
	tr.setTri(tB, ctri{v: [3]int32{a, p, c}, n: [3]int32{u, T.n[k1], t}, seg: [3]int32{sBC, T.seg[k1], 0}})
	tr.setTri(u, ctri{v: [3]int32{d, c, p}, n: [3]int32{tB, uB, U.n[j2]}, seg: [3]int32{sBC, 0, U.seg[j2]}})
	tr.setTri(uB, ctri{v: [3]int32{d, p, b}, n: [3]int32{t, U.n[j1], u}, seg: [3]int32{sBC, U.seg[j1], 0}})
	tr.replaceNeighbour(T.n[k1], t, tB)
	tr.replaceNeighbour(U.n[j1], u, uB)
	tr.legalize(p, t, tB, u, uB)
}

// legalize restores the constrained Delaunay property after the insertion
// of vertex p, whose new triangles are given: Lawson's flips of the edges
// opposite p (de Berg et al., section 9.3, LEGALIZEEDGE). Every triangle
// made by a flip again has p as a vertex, so the triangles changed by an
// insertion are exactly those around p at the end.
func (tr *triangulation) legalize(p int32, ts ...int32) {
	st := append(tr.stack[:0], ts...)
	for len(st) > 0 {
		t := st[len(st)-1]
		st = st[:len(st)-1]
		k := tr.indexOf(t, p)
		T := &tr.tris[t]
		u := T.n[k]
		if u < 0 || T.seg[k] != 0 {
			continue
		}
		d := tr.tris[u].v[tr.neighbourIndex(u, t)]
		if inCircleSign(tr.pts[T.v[0]], tr.pts[T.v[1]], tr.pts[T.v[2]], tr.pts[d]) > 0 {
			tr.flip(t, k)
			st = append(st, t, u)
		}
	}
	tr.stack = st
}

// location describes where a point lies in the triangulation.
type location struct {
	t      int32 // the triangle containing the point
	edge   int   // local index of the edge of t the point lies on, or -1
	vertex int32 // the vertex the point coincides with, or -1
}

// classify returns the location of p in triangle t, which must contain it
// (no orientation negative).
func (tr *triangulation) classify(t int32, p [2]float64) location {
	T := &tr.tris[t]
	loc := location{t: t, edge: -1, vertex: -1}
	zeros := 0
	for i := range 3 {
		if p == tr.pts[T.v[i]] {
			loc.vertex = T.v[i]
			return loc
		}
		if orientSign(tr.pts[T.v[(i+1)%3]], tr.pts[T.v[(i+2)%3]], p) == 0 {
			loc.edge = i
			zeros++
		}
	}
	if zeros > 1 {
		// Collinear with two edges but equal to no vertex: impossible for a
		// non-degenerate triangle and exact predicates.
		panic("mesh: internal error: point on two edges of a triangle")
	}
	return loc
}

// locate finds the triangle containing p by a visibility walk from triangle
// start: step into the neighbour across any edge that has p strictly on its
// far side. It must only be used while the triangulation is Delaunay (before
// segments are inserted), where such walks terminate. p must lie inside the
// enclosing triangle.
func (tr *triangulation) locate(p [2]float64, start int32) location {
	t := start
	for steps := 0; ; steps++ {
		if steps > 4*len(tr.tris)+16 {
			panic("mesh: internal error: point location does not terminate")
		}
		T := &tr.tris[t]
		moved := false
		// Rotate the first edge tried so that the walk does not favour one
		// direction (deterministically).
		for r := range 3 {
			i := (r + steps) % 3
			if orientSign(tr.pts[T.v[(i+1)%3]], tr.pts[T.v[(i+2)%3]], p) < 0 {
				if T.n[i] < 0 {
					panic("mesh: internal error: point outside the enclosing triangle")
				}
				t = T.n[i]
				moved = true
				break
			}
		}
		if !moved {
			return tr.classify(t, p)
		}
	}
}

// insertInitial inserts input vertex v into the unconstrained Delaunay
// triangulation. It returns the vertex v coincides with, or -1.
func (tr *triangulation) insertInitial(v int32, start int32) int32 {
	loc := tr.locate(tr.pts[v], start)
	switch {
	case loc.vertex >= 0:
		return loc.vertex
	case loc.edge >= 0:
		tr.insertOnEdge(loc.t, loc.edge, v)
	default:
		tr.insertInTriangle(loc.t, v)
	}
	return -1
}

// star appends to dst the live triangles around vertex v: first
// counter-clockwise from vtri[v], then, if that meets the boundary,
// clockwise.
func (tr *triangulation) star(dst []int32, v int32) []int32 {
	t0 := tr.vtri[v]
	t := t0
	for {
		dst = append(dst, t)
		k := tr.indexOf(t, v)
		t = tr.tris[t].n[(k+1)%3]
		if t == t0 {
			return dst
		}
		if t < 0 {
			break
		}
	}
	t = t0
	for {
		k := tr.indexOf(t, v)
		t = tr.tris[t].n[(k+2)%3]
		if t < 0 {
			return dst
		}
		dst = append(dst, t)
	}
}

// findEdge returns a triangle with the edge ab and the local index of that
// edge, or -1, -1. The triangle returned has the edge directed a→b
// (counter-clockwise) when there is one.
func (tr *triangulation) findEdge(a, b int32) (int32, int) {
	var buf [32]int32
	other, otherI := int32(-1), -1
	for _, t := range tr.star(buf[:0], a) {
		k := tr.indexOf(t, a)
		v := &tr.tris[t].v
		if v[(k+1)%3] == b {
			return t, (k + 2) % 3
		}
		if v[(k+2)%3] == b {
			other, otherI = t, (k+1)%3
		}
	}
	return other, otherI
}

// hilbertOrder returns the indices of pts sorted along a Hilbert curve
// through their bounding box (ties by index, so the order is deterministic).
// The curve index is computed by the usual quadrant recursion (from memory:
// at each level the quadrant gives two bits, and the coordinates are
// reflected or swapped so that the sub-square is traversed in the same
// pattern).
func hilbertOrder(pts [][2]float64) []int32 {
	const bits = 16
	const n = 1 << bits
	lo, hi := pts[0], pts[0]
	for _, p := range pts {
		lo = [2]float64{min(lo[0], p[0]), min(lo[1], p[1])}
		hi = [2]float64{max(hi[0], p[0]), max(hi[1], p[1])}
	}
	span := max(hi[0]-lo[0], hi[1]-lo[1])
	if span == 0 {
		span = 1
	}
	keys := make([]uint64, len(pts))
	for i, p := range pts {
		x := uint32(min(float64(n-1), (p[0]-lo[0])/span*n))
		y := uint32(min(float64(n-1), (p[1]-lo[1])/span*n))
		var d uint64
		for s := uint32(n / 2); s > 0; s /= 2 {
			var rx, ry uint32
			if x&s != 0 {
				rx = 1
			}
			if y&s != 0 {
				ry = 1
			}
			d += uint64(s) * uint64(s) * uint64((3*rx)^ry)
			if ry == 0 {
				if rx == 1 {
					x, y = n-1-x, n-1-y
				}
				x, y = y, x
			}
		}
		keys[i] = d
	}
	order := make([]int32, len(pts))
	for i := range order {
		order[i] = int32(i)
	}
	slices.SortFunc(order, func(i, j int32) int {
		if c := cmp.Compare(keys[i], keys[j]); c != 0 {
			return c
		}
		return cmp.Compare(i, j)
	})
	return order
}

// insertAllInput inserts every input vertex in Hilbert order. It returns an
// error naming two input vertices (output numbering) that coincide.
func (tr *triangulation) insertAllInput() error {
	order := hilbertOrder(tr.pts[superVertices:])
	last := int32(0)
	for _, i := range order {
		v := i + superVertices
		if w := tr.insertInitial(v, last); w >= 0 {
			return fmt.Errorf("mesh: points %d and %d coincide at (%g, %g)", min(v, w)-superVertices, max(v, w)-superVertices, tr.pts[v][0], tr.pts[v][1])
		}
		last = tr.vtri[v]
	}
	return nil
}

// insertSegment enforces segment s (index si) as an edge of the
// triangulation by Sloan's flips, then restores the constrained Delaunay
// property. An input vertex lying in the interior of the segment is an
// error.
func (tr *triangulation) insertSegment(si int) error {
	s := tr.segs[si]
	a, b := s.a, s.b
	mark := int32(si + 1)
	if t, i := tr.findEdge(a, b); t >= 0 {
		tr.markEdge(t, i, mark)
		return nil
	}
	pa, pb := tr.pts[a], tr.pts[b]

	// Collect the edges crossed by ab, walking from a. Each crossed edge is
	// stored as (right, left) relative to the directed line a→b.
	var crossing [][2]int32
	var buf [32]int32
	var t int32 = -1
	var right, left int32
	for _, u := range tr.star(buf[:0], a) {
		k := tr.indexOf(u, a)
		v := tr.tris[u].v
		x, y := v[(k+1)%3], v[(k+2)%3]
		ox := orientSign(pa, pb, tr.pts[x])
		oy := orientSign(pa, pb, tr.pts[y])
		for _, w := range [2]int32{x, y} {
			pw := tr.pts[w]
			if orientSign(pa, pb, pw) == 0 && (pw[0]-pa[0])*(pb[0]-pa[0])+(pw[1]-pa[1])*(pb[1]-pa[1]) > 0 {
				return vertexOnSegmentError(tr, s, w)
			}
		}
		if ox < 0 && oy > 0 {
			t, right, left = u, x, y
			break
		}
	}
	if t < 0 {
		panic("mesh: internal error: no triangle at the start of a segment")
	}
	for {
		crossing = append(crossing, [2]int32{right, left})
		u := tr.neighbourAcross(t, right, left)
		apex := tr.apexAcross(u, right, left)
		if apex == b {
			break
		}
		o := orientSign(pa, pb, tr.pts[apex])
		if o == 0 {
			return vertexOnSegmentError(tr, s, apex)
		}
		if o < 0 {
			right = apex
		} else {
			left = apex
		}
		t = u
	}

	// Sloan's flipping loop.
	var made [][2]int32
	for iter := 0; len(crossing) > 0; iter++ {
		if iter > 100*len(tr.tris)+1000 {
			panic("mesh: internal error: segment insertion does not terminate")
		}
		e := crossing[0]
		crossing = crossing[1:]
		t, i := tr.findEdge(e[0], e[1])
		if t < 0 {
			panic("mesh: internal error: crossing edge vanished")
		}
		T := tr.tris[t]
		u := T.n[i]
		x := T.v[i]
		y := tr.tris[u].v[tr.neighbourIndex(u, t)]
		px, py := tr.pts[x], tr.pts[y]
		o0 := orientSign(px, py, tr.pts[e[0]])
		o1 := orientSign(px, py, tr.pts[e[1]])
		if !(o0 > 0 && o1 < 0 || o0 < 0 && o1 > 0) {
			crossing = append(crossing, e) // not convex: later
			continue
		}
		tr.flip(t, i)
		ox, oy := orientSign(pa, pb, px), orientSign(pa, pb, py)
		if x != a && x != b && y != a && y != b && (ox > 0 && oy < 0 || ox < 0 && oy > 0) {
			crossing = append(crossing, [2]int32{x, y})
		} else {
			made = append(made, [2]int32{x, y})
		}
	}
	t, i := tr.findEdge(a, b)
	if t < 0 {
		panic("mesh: internal error: segment missing after insertion")
	}
	tr.markEdge(t, i, mark)

	// Restore the constrained Delaunay property: Lawson flips of the new
	// edges and of the edges next to every flipped one.
	for len(made) > 0 {
		e := made[len(made)-1]
		made = made[:len(made)-1]
		t, i := tr.findEdge(e[0], e[1])
		if t < 0 {
			continue
		}
		T := tr.tris[t]
		u := T.n[i]
		if u < 0 || T.seg[i] != 0 {
			continue
		}
		y := tr.tris[u].v[tr.neighbourIndex(u, t)]
		if inCircleSign(tr.pts[T.v[0]], tr.pts[T.v[1]], tr.pts[T.v[2]], tr.pts[y]) > 0 {
			x := T.v[i]
			tr.flip(t, i)
			// The quadrilateral x, e0, y, e1 now has diagonal xy; check
			// its four sides.
			made = append(made, [2]int32{x, e[0]}, [2]int32{e[0], y}, [2]int32{y, e[1]}, [2]int32{e[1], x})
		}
	}
	return nil
}

// vertexOnSegmentError reports input vertex w lying inside segment s, which
// Domain.Validate excludes (it cannot happen for Delaunay's hull).
func vertexOnSegmentError(tr *triangulation, s inputSegment, w int32) error {
	p := tr.pts[w]
	return fmt.Errorf("mesh: point %d (%g, %g) lies on %s segment %d", w-superVertices, p[0], p[1], polygonName(s.poly), s.index)
}

// neighbourAcross returns the neighbour of t across its edge xy.
func (tr *triangulation) neighbourAcross(t, x, y int32) int32 {
	v := tr.tris[t].v
	for i := range 3 {
		if v[i] != x && v[i] != y {
			return tr.tris[t].n[i]
		}
	}
	panic("mesh: internal error: degenerate triangle")
}

// apexAcross returns the vertex of triangle u that is neither x nor y.
func (tr *triangulation) apexAcross(u, x, y int32) int32 {
	v := tr.tris[u].v
	for i := range 3 {
		if v[i] != x && v[i] != y {
			return v[i]
		}
	}
	panic("mesh: internal error: degenerate triangle")
}

// markEdge marks the edge opposite local vertex i of t, on both sides.
func (tr *triangulation) markEdge(t int32, i int, mark int32) {
	tr.tris[t].seg[i] = mark
	if u := tr.tris[t].n[i]; u >= 0 {
		tr.tris[u].seg[tr.neighbourIndex(u, t)] = mark
	}
}

// removeOutside deletes the triangles outside the domain: a flood fill,
// which does not cross segments, from the triangle on the outer side of
// every segment. It then detaches the remaining triangles from the deleted
// ones and resets the vertex-to-triangle pointers.
func (tr *triangulation) removeOutside() {
	out := make([]bool, len(tr.tris))
	var queue []int32
	for si, s := range tr.segs {
		// The outer side of a→b is its right when the domain is on its left.
		x, y := s.a, s.b
		if s.domainLeft {
			x, y = y, x
		}
		t, i := tr.findEdge(x, y)
		if t < 0 || tr.tris[t].v[(i+1)%3] != x {
			panic(fmt.Sprintf("mesh: internal error: segment %d is not an edge", si))
		}
		if !out[t] {
			out[t] = true
			queue = append(queue, t)
		}
	}
	for len(queue) > 0 {
		t := queue[len(queue)-1]
		queue = queue[:len(queue)-1]
		T := &tr.tris[t]
		for i := range 3 {
			if u := T.n[i]; u >= 0 && T.seg[i] == 0 && !out[u] {
				out[u] = true
				queue = append(queue, u)
			}
		}
	}
	for t := range tr.tris {
		if out[t] {
			continue
		}
		T := &tr.tris[t]
		for i := range 3 {
			if u := T.n[i]; u >= 0 && out[u] {
				T.n[i] = -1
			}
		}
	}
	for t := range tr.tris {
		if out[t] {
			tr.tris[t] = ctri{v: [3]int32{-1, -1, -1}, n: [3]int32{-1, -1, -1}}
		}
	}
	for v := range tr.vtri {
		tr.vtri[v] = -1
	}
	for t := range tr.tris {
		if tr.tris[t].v[0] >= 0 {
			for _, v := range tr.tris[t].v {
				tr.vtri[v] = int32(t)
			}
		}
	}
}

// buildMesh returns the live triangles as a *Mesh: the vertices are
// renumbered without the enclosing triangle's, every boundary edge gets the
// tag of its segment (DefaultTag for boundary edges on no segment), and
// TagNames is a copy of names.
func (tr *triangulation) buildMesh(names map[int]string) (*Mesh, error) {
	pts := slices.Clone(tr.pts[superVertices:])
	var tris [][3]int
	for _, T := range tr.tris {
		if T.v[0] < 0 {
			continue
		}
		tris = append(tris, [3]int{int(T.v[0]) - superVertices, int(T.v[1]) - superVertices, int(T.v[2]) - superVertices})
	}
	m, err := newMesh(pts, tris, false)
	if err != nil {
		return nil, err
	}
	for _, T := range tr.tris {
		if T.v[0] < 0 {
			continue
		}
		for i, s := range T.seg {
			if s == 0 {
				continue
			}
			a, b := int(T.v[(i+1)%3])-superVertices, int(T.v[(i+2)%3])-superVertices
			m.EdgeTags[m.mustEdge(a, b)] = tr.segs[s-1].tag
		}
	}
	m.TagNames = cloneNames(names)
	return m, nil
}

// domainTriangulation registers the vertices and segments of a validated domain:
// vertex numbers follow Outer, then the holes in order.
func domainTriangulation(d *Domain) *triangulation {
	var pts [][2]float64
	for p := -1; p < len(d.Holes); p++ {
		pts = append(pts, d.polygon(p)...)
	}
	tr := newTriangulation(pts)
	base := int32(superVertices)
	for p := -1; p < len(d.Holes); p++ {
		poly := d.polygon(p)
		n := int32(len(poly))
		ccw := polygonCCW(poly)
		for i := range n {
			si := int32(len(tr.segs))
			tr.segs = append(tr.segs, inputSegment{
				a: base + i, b: base + (i+1)%n,
				tag:  d.segmentTag(p, int(i)),
				poly: p, index: int(i),
				domainLeft: ccw == (p < 0),
			})
			tr.inSegs[base+i-superVertices][1] = si       // leaves vertex i
			tr.inSegs[base+(i+1)%n-superVertices][0] = si // enters vertex i+1
		}
		base += n
	}
	return tr
}

// buildCDT returns the constrained Delaunay triangulation of a validated
// domain, with the triangles outside it removed.
func buildCDT(d *Domain) (*triangulation, error) {
	tr := domainTriangulation(d)
	if err := tr.insertAllInput(); err != nil {
		return nil, err
	}
	for si := range tr.segs {
		if err := tr.insertSegment(si); err != nil {
			return nil, err
		}
	}
	tr.removeOutside()
	return tr, nil
}

// ConstrainedDelaunay returns the constrained Delaunay triangulation of the
// domain, with no points added: its vertices are the domain's (Outer first,
// then the holes, each in its given order), every boundary segment is an
// edge whose tag is the segment's, and no vertex visible from the inside of
// a triangle lies strictly inside that triangle's circumcircle. Ties between
// cocircular vertices are broken deterministically. Its triangles may be
// arbitrarily thin; use Triangulate for a mesh with quality guarantees.
//
// It returns an error if the domain is invalid (see Domain.Validate), or if
// a triangle is so thin that New rejects it.
func ConstrainedDelaunay(d *Domain) (*Mesh, error) {
	if err := d.Validate(); err != nil {
		return nil, err
	}
	tr, err := buildCDT(d)
	if err != nil {
		return nil, err
	}
	return tr.buildMesh(d.TagNames)
}

// Delaunay returns the Delaunay triangulation of the convex hull of the
// points: no point lies strictly inside the circumcircle of any triangle.
// Point v of the mesh is points[v]. For cocircular points the triangulation
// is not unique; ties are broken deterministically. Boundary edges get
// DefaultTag.
//
// The convex hull, including points lying on it, is computed by Andrew's
// monotone chain (A. M. Andrew, Inf. Process. Lett. 9, 1979) with exact
// orientation tests; its edges are then enforced as segments, which does
// not change the triangulation (hull edges are Delaunay) but makes the
// boundary exact.
//
// It returns an error if there are fewer than three points, if a point is
// not finite, if two points coincide, if all points are collinear, or if a
// triangle is so thin that New rejects it.
func Delaunay(points [][2]float64) (*Mesh, error) {
	if len(points) < 3 {
		return nil, fmt.Errorf("mesh: Delaunay needs at least 3 points, got %d", len(points))
	}
	for v, p := range points {
		if msg := pointProblem(p); msg != "" {
			return nil, fmt.Errorf("mesh: point %d %s", v, msg)
		}
	}
	hull, err := convexHull(points)
	if err != nil {
		return nil, err
	}
	tr := newTriangulation(points)
	n := int32(len(hull))
	for i := range n {
		a, b := hull[i]+superVertices, hull[(i+1)%n]+superVertices
		si := int32(len(tr.segs))
		tr.segs = append(tr.segs, inputSegment{a: a, b: b, tag: DefaultTag, poly: -1, index: int(i), domainLeft: true})
		tr.inSegs[a-superVertices][1] = si
		tr.inSegs[b-superVertices][0] = si
	}
	if err := tr.insertAllInput(); err != nil {
		return nil, err
	}
	for si := range tr.segs {
		if err := tr.insertSegment(si); err != nil {
			return nil, err
		}
	}
	tr.removeOutside()
	return tr.buildMesh(nil)
}

// convexHull returns the indices of the points on the boundary of their
// convex hull, counter-clockwise, including points in the interior of hull
// edges. It reports coincident and all-collinear points.
func convexHull(points [][2]float64) ([]int32, error) {
	order := make([]int32, len(points))
	for i := range order {
		order[i] = int32(i)
	}
	slices.SortFunc(order, func(i, j int32) int {
		p, q := points[i], points[j]
		if c := cmp.Compare(p[0], q[0]); c != 0 {
			return c
		}
		if c := cmp.Compare(p[1], q[1]); c != 0 {
			return c
		}
		return cmp.Compare(i, j)
	})
	for k := 1; k < len(order); k++ {
		if points[order[k-1]] == points[order[k]] {
			p := points[order[k]]
			return nil, fmt.Errorf("mesh: points %d and %d coincide at (%g, %g)", order[k-1], order[k], p[0], p[1])
		}
	}
	// Keep collinear points: pop only on strict clockwise turns.
	chain := func(idx []int32) []int32 {
		var h []int32
		for _, i := range idx {
			for len(h) >= 2 && orientSign(points[h[len(h)-2]], points[h[len(h)-1]], points[i]) < 0 {
				h = h[:len(h)-1]
			}
			h = append(h, i)
		}
		return h
	}
	lower := chain(order)
	rev := slices.Clone(order)
	slices.Reverse(rev)
	upper := chain(rev)
	if len(lower) == len(points) && len(upper) == len(points) {
		return nil, fmt.Errorf("mesh: all %d points are collinear", len(points))
	}
	hull := append(lower[:len(lower)-1], upper[:len(upper)-1]...)
	return hull, nil
}
