package mesh

import (
	"fmt"
	"math"
	"slices"
)

// Defaults and limits of QualityOptions.
const (
	// DefaultMinAngle is the minimum angle, in degrees, Triangulate aims
	// for when QualityOptions.MinAngle is 0.
	DefaultMinAngle = 25.0
	// MaxMinAngle is the largest minimum angle Triangulate accepts.
	// Delaunay refinement with concentric-shell segment splitting is proved
	// to terminate for minimum angles up to arcsin(1/(2√2)) ≈ 20.7 degrees
	// (for domains whose input angles are at least 60 degrees; Shewchuk
	// 2002, see Triangulate); in practice it terminates up to about 33
	// degrees, and above that it usually runs until the Steiner point limit.
	MaxMinAngle = 33.8
	// DefaultMaxSteiner is the Steiner point limit when
	// QualityOptions.MaxSteiner is 0.
	DefaultMaxSteiner = 4_000_000
)

// QualityOptions control Triangulate. The zero value (or nil) asks for
// DefaultMinAngle, no area bound, no grading and DefaultMaxSteiner.
type QualityOptions struct {
	// MinAngle is the smallest angle, in degrees, that refinement aims for:
	// 0 < MinAngle <= MaxMinAngle, or 0 for DefaultMinAngle.
	MinAngle float64
	// MaxArea, if positive, bounds the area of every triangle.
	MaxArea float64
	// Layers grade the mesh toward tagged boundary segments.
	Layers []BoundaryLayer
	// MaxSteiner, if positive, limits the number of points refinement may
	// add; Triangulate fails when it would add more. 0 means
	// DefaultMaxSteiner.
	MaxSteiner int
}

// Triangulate returns a quality triangulation of the domain: the
// constrained Delaunay triangulation of its vertices and segments (see
// ConstrainedDelaunay), refined by inserting Steiner points until every
// triangle has
//   - no angle smaller than MinAngle (except near small input angles, see
//     below),
//   - area at most MaxArea (if set),
//   - longest edge at most the size asked for by the boundary layers (if
//     any; see BoundaryLayer).
//
// The result is a constrained Delaunay triangulation of the domain, holes
// removed, in which no boundary edge is encroached. Points 0 .. n-1 are the domain's vertices (Outer first, then the
// holes, each in its given order); Steiner points follow in the order they
// were inserted. Every boundary segment is the union of boundary edges,
// which carry the segment's tag; TagNames is a copy of the domain's. The
// output is deterministic: it depends only on the domain and the options.
//
// # Algorithm
//
// Delaunay refinement after L. P. Chew ("Guaranteed-quality triangular
// meshes", Cornell TR 89-983, 1989) and J. Ruppert ("A Delaunay refinement
// algorithm for quality 2-dimensional mesh generation", J. Algorithms
// 18:548–585, 1995), in the form analysed by J. R. Shewchuk ("Delaunay
// refinement algorithms for triangular mesh generation", Comput. Geom.
// Theory Appl. 22:21–74, 2002):
//
//  1. A boundary subsegment is encroached when a vertex visible from it
//     lies strictly inside its diametral circle; encroached subsegments are
//     split first, always.
//  2. A triangle that is too large or whose smallest angle is below
//     MinAngle is split by inserting a point inside its circumcircle: the
//     circumcentre, or for a skinny triangle the off-centre of A. Üngör
//     (LATIN 2004) when that lies nearer its shortest edge. If the point
//     would encroach subsegments (or lies beyond one), those subsegments
//     are split instead and the triangle is retried. Skinny triangles are
//     processed worst first, then triangles that are only too large, in
//     the order they arose.
//  3. A subsegment is split at its midpoint if both or neither of its ends
//     are domain vertices. If exactly one is, it is split at a distance
//     from that vertex which is a power of two (between 1/3 and 2/3 of the
//     length): Ruppert's concentric circular shells, which stop two
//     segments meeting at a small angle from splitting each other without
//     end.
//  4. Near a domain vertex whose two segments meet at less than 60 degrees
//     inside the domain, a skinny triangle is left alone when its shortest
//     edge joins the two segments at equal distances from the vertex (it is
//     on a shell and its small angle is forced by the input angle;
//     Shewchuk 2002, section on small input angles, from memory).
//
// Guarantees: refinement terminates and every angle is at least MinAngle
// when MinAngle <= 20.7 degrees and every input angle is at least 60 degrees
// (Shewchuk 2002; Üngör 2004 for off-centres). Up to MaxMinAngle it
// terminates in practice: in our tests on random spiky polygons it always
// did. With smaller input angles, angles below MinAngle remain only in
// triangles near those vertices (rule 4; the input angle itself cannot be
// improved, and the smallest angle there can be slightly below it), and
// MaxSteiner stops any runaway refinement with an error. Area and size
// bounds always hold.
//
// Triangulate returns an error if the domain is invalid (Domain.Validate),
// if an option is out of range, or if refinement would exceed MaxSteiner
// points or create edges shorter than about 1e-12 times the domain's
// diameter.
func Triangulate(d *Domain, opts *QualityOptions) (*Mesh, error) {
	if err := d.Validate(); err != nil {
		return nil, err
	}
	var o QualityOptions
	if opts != nil {
		o = *opts
	}
	if o.MinAngle == 0 {
		o.MinAngle = DefaultMinAngle
	}
	if !(o.MinAngle > 0 && o.MinAngle <= MaxMinAngle) {
		return nil, fmt.Errorf("mesh: minimum angle %g degrees is not allowed: want 0 < MinAngle <= %g "+
			"(Delaunay refinement is guaranteed to terminate up to about 20.7 degrees and in practice reaches about 33)", o.MinAngle, MaxMinAngle)
	}
	if !(o.MaxArea >= 0) || math.IsInf(o.MaxArea, 0) {
		return nil, fmt.Errorf("mesh: maximum area %g is not allowed: want a finite number >= 0 (0 for no bound)", o.MaxArea)
	}
	if o.MaxSteiner < 0 {
		return nil, fmt.Errorf("mesh: Steiner point limit %d is not allowed: want >= 0 (0 for the default %d)", o.MaxSteiner, DefaultMaxSteiner)
	}
	if o.MaxSteiner == 0 {
		o.MaxSteiner = DefaultMaxSteiner
	}
	hasTag := func(tag int) bool {
		for p := -1; p < len(d.Holes); p++ {
			for i := range d.polygon(p) {
				if d.segmentTag(p, i) == tag {
					return true
				}
			}
		}
		return false
	}
	for i, l := range o.Layers {
		if err := l.check(i, hasTag); err != nil {
			return nil, err
		}
	}

	tr, err := buildCDT(d)
	if err != nil {
		return nil, err
	}
	r := newRefiner(tr, &o)
	if err := r.run(); err != nil {
		return nil, err
	}
	return tr.buildMesh(d.TagNames)
}

// queuedTriangle is a triangle waiting for refinement; it is stale when its
// slot no longer holds the same vertices.
type queuedTriangle struct {
	key float64 // sin² of the smallest angle: the worst triangle comes first
	seq uint64  // insertion number, to break ties deterministically
	t   int32
	v   [3]int32
}

// less orders the queue of bad triangles.
func (q *queuedTriangle) less(o *queuedTriangle) bool {
	return q.key < o.key || q.key == o.key && q.seq < o.seq
}

// pushTri queues triangle t with the given key: in the heap of skinny
// triangles, or, if it is not skinny, at the end of the size queue.
func (r *refiner) pushTri(t int32, key float64) {
	r.seq++
	if key >= r.sin2 {
		r.sizeQ = append(r.sizeQ, queuedTriangle{key: key, seq: r.seq, t: t, v: r.tr.tris[t].v})
		return
	}
	h := append(r.triQ, queuedTriangle{key: key, seq: r.seq, t: t, v: r.tr.tris[t].v})
	for i := len(h) - 1; i > 0; {
		p := (i - 1) / 2
		if !h[i].less(&h[p]) {
			break
		}
		h[i], h[p] = h[p], h[i]
		i = p
	}
	r.triQ = h
}

// popTri removes and returns the first triangle of the queue.
func (r *refiner) popTri() queuedTriangle {
	h := r.triQ
	top := h[0]
	n := len(h) - 1
	h[0] = h[n]
	h = h[:n]
	for i := 0; ; {
		c := 2*i + 1
		if c >= n {
			break
		}
		if c+1 < n && h[c+1].less(&h[c]) {
			c++
		}
		if !h[c].less(&h[i]) {
			break
		}
		h[i], h[c] = h[c], h[i]
		i = c
	}
	r.triQ = h
	return top
}

// refiner holds the state of Delaunay refinement.
type refiner struct {
	tr *triangulation

	sin2     float64 // sin² of the minimum angle
	maxArea2 float64 // twice the maximum area, +Inf for none
	layers   []layerField

	segQ   [][2]int32       // subsegments to split, by end vertices
	triQ   []queuedTriangle // skinny triangles: a binary heap, worst first
	seq    uint64
	sizeQ  []queuedTriangle // triangles that are only too large: first in, first out
	sizeAt int

	maxSteiner, steiner int
	minLen2             float64 // squared length below which no subsegment is split

	// smallAngle[v-superVertices] reports an input vertex whose segments
	// meet at less than 60 degrees inside the domain.
	smallAngle []bool

	buf   []int32
	mark  []uint32 // visit stamps for the cavity search
	stamp uint32
	enc   [][2]int32
}

func newRefiner(tr *triangulation, o *QualityOptions) *refiner {
	s := math.Sin(o.MinAngle * math.Pi / 180)
	r := &refiner{
		tr:         tr,
		sin2:       s * s,
		maxArea2:   math.Inf(1),
		maxSteiner: o.MaxSteiner,
	}
	if o.MaxArea > 0 {
		r.maxArea2 = 2 * o.MaxArea
	}
	for _, l := range o.Layers {
		var segs [][2][2]float64
		for _, sg := range tr.segs {
			if sg.tag == l.Tag {
				segs = append(segs, [2][2]float64{tr.pts[sg.a], tr.pts[sg.b]})
			}
		}
		r.layers = append(r.layers, newLayerField(l, segs))
	}
	lo, hi := tr.pts[superVertices], tr.pts[superVertices]
	for _, p := range tr.pts[superVertices:] {
		lo = [2]float64{min(lo[0], p[0]), min(lo[1], p[1])}
		hi = [2]float64{max(hi[0], p[0]), max(hi[1], p[1])}
	}
	diam2 := sq(lo, hi)
	r.minLen2 = diam2 * 1e-24 // (1e-12 × diameter)²

	// Interior angle at every input vertex: the angle swept
	// counter-clockwise from the outgoing to the incoming segment, with
	// segments directed so that the domain lies on their left.
	r.smallAngle = make([]bool, tr.nInput)
	for i, ss := range tr.inSegs {
		if ss[0] < 0 || ss[1] < 0 {
			continue
		}
		v := int32(i + superVertices)
		in, out := tr.segs[ss[0]], tr.segs[ss[1]]
		var prev, next int32
		if in.domainLeft {
			prev, next = in.a, out.b
		} else {
			prev, next = out.b, in.a
		}
		p, q, c := tr.pts[prev], tr.pts[next], tr.pts[v]
		ang := math.Atan2(p[1]-c[1], p[0]-c[0]) - math.Atan2(q[1]-c[1], q[0]-c[0])
		if ang < 0 {
			ang += 2 * math.Pi
		}
		r.smallAngle[i] = ang < math.Pi/3
	}
	return r
}

// run refines until no subsegment is encroached and no triangle is bad.
func (r *refiner) run() error {
	tr := r.tr
	for t := range tr.tris {
		if tr.tris[t].v[0] >= 0 {
			r.examine(int32(t))
		}
	}
	for {
		if n := len(r.segQ); n > 0 {
			s := r.segQ[0]
			r.segQ = r.segQ[1:]
			if err := r.splitSubsegment(s[0], s[1]); err != nil {
				return err
			}
			continue
		}
		if len(r.triQ) > 0 || r.sizeAt < len(r.sizeQ) {
			var q queuedTriangle
			if len(r.triQ) > 0 {
				q = r.popTri()
			} else {
				q = r.sizeQ[r.sizeAt]
				r.sizeAt++
				if r.sizeAt > 1024 && 2*r.sizeAt > len(r.sizeQ) {
					r.sizeQ = r.sizeQ[:copy(r.sizeQ, r.sizeQ[r.sizeAt:])]
					r.sizeAt = 0
				}
			}
			if tr.tris[q.t].v != q.v {
				continue
			}
			if err := r.splitTriangle(q.t); err != nil {
				return err
			}
			continue
		}
		return nil
	}
}

// examine queues triangle t if it is bad, and queues every subsegment of t
// that is encroached by t's opposite vertex.
func (r *refiner) examine(t int32) {
	tr := r.tr
	T := &tr.tris[t]
	if skinny, large, key := r.bad(t); skinny || large {
		r.pushTri(t, key)
	}
	for i := range 3 {
		if T.seg[i] == 0 {
			continue
		}
		a, b := T.v[(i+1)%3], T.v[(i+2)%3]
		if encroaches(tr.pts[a], tr.pts[b], tr.pts[T.v[i]]) {
			r.segQ = append(r.segQ, [2]int32{a, b})
		}
	}
}

// encroaches reports whether p lies strictly inside the diametral circle
// of the segment ab, that is, sees it at an angle above 90 degrees.
func encroaches(a, b, p [2]float64) bool {
	return (a[0]-p[0])*(b[0]-p[0])+(a[1]-p[1])*(b[1]-p[1]) < 0
}

// bad reports whether triangle t has an angle below the minimum (skinny)
// or exceeds a size bound (large), and returns the square of the sine of
// its smallest angle as the queue key.
func (r *refiner) bad(t int32) (skinny, large bool, key float64) {
	tr := r.tr
	v := tr.tris[t].v
	p := [3][2]float64{tr.pts[v[0]], tr.pts[v[1]], tr.pts[v[2]]}
	l := [3]float64{sq(p[1], p[2]), sq(p[2], p[0]), sq(p[0], p[1])}
	a2 := orient(p[0], p[1], p[2]) // twice the area, positive
	lmax := max(l[0], l[1], l[2])
	lmid := l[0] + l[1] + l[2] - lmax - min(l[0], l[1], l[2])
	// The smallest angle lies between the two longest edges, so its sine
	// is a2/(lmid·lmax)^½.
	key = a2 * a2 / (lmid * lmax)
	skinny = key < r.sin2
	large = a2 > r.maxArea2
	if !large {
		for i := range r.layers {
			h := r.layers[i].target(p)
			if lmax > h*h {
				large = true
				break
			}
		}
	}
	return skinny, large, key
}

// circumcentre returns the centre of the circle through a, b and c,
// computed relative to a.
func circumcentre(a, b, c [2]float64) [2]float64 {
	bx, by := b[0]-a[0], b[1]-a[1]
	cx, cy := c[0]-a[0], c[1]-a[1]
	b2, c2 := bx*bx+by*by, cx*cx+cy*cy
	d := 2 * (bx*cy - by*cx)
	return [2]float64{a[0] + (cy*b2-by*c2)/d, a[1] + (bx*c2-cx*b2)/d}
}

// splitTriangle refines the bad triangle t (rule 2 of Triangulate).
func (r *refiner) splitTriangle(t int32) error {
	tr := r.tr
	skinny, large, key := r.bad(t)
	if !skinny && !large {
		return nil
	}
	if !large && r.forcedByInputAngle(t) {
		return nil
	}
	v := tr.tris[t].v
	a, b, c := tr.pts[v[0]], tr.pts[v[1]], tr.pts[v[2]]
	cc := circumcentre(a, b, c)
	if math.IsNaN(cc[0]) || math.IsNaN(cc[1]) || math.IsInf(cc[0], 0) || math.IsInf(cc[1], 0) {
		return r.cannotSplit(t, large)
	}
	if skinny && !large {
		cc = r.offCentre(t, cc)
	}
	q := [2]float64{(a[0] + b[0] + c[0]) / 3, (a[1] + b[1] + c[1]) / 3}
	tc, edge, blocked := tr.walkTo(t, q, cc)
	if tc < 0 {
		return r.cannotSplit(t, large)
	}
	if blocked {
		T := &tr.tris[tc]
		r.segQ = append(r.segQ, [2]int32{T.v[(edge+1)%3], T.v[(edge+2)%3]})
		r.pushTri(t, key)
		return nil
	}
	if enc := r.encroachedBy(tc, cc); len(enc) > 0 {
		r.segQ = append(r.segQ, enc...)
		r.pushTri(t, key)
		return nil
	}
	loc := tr.classify(tc, cc)
	if loc.vertex >= 0 || loc.edge >= 0 && tr.tris[tc].seg[loc.edge] != 0 {
		return r.cannotSplit(t, large) // not expected after the encroachment test
	}
	if err := r.countSteiner(); err != nil {
		return err
	}
	p := tr.addVertex(cc, -1)
	if loc.edge >= 0 {
		tr.insertOnEdge(tc, loc.edge, p)
	} else {
		tr.insertInTriangle(tc, p)
	}
	r.afterInsert(p)
	return nil
}

// offCentre returns the point refinement inserts for the skinny triangle
// t with circumcentre cc: the off-centre of A. Üngör ("Off-centers: a new
// type of Steiner points for computing size-optimal quality-guaranteed
// Delaunay triangulations", LATIN 2004, LNCS 2976), if it is nearer the
// shortest edge than cc, else cc.
//
// The off-centre lies on the perpendicular bisector of the shortest edge pq
// (length l, midpoint m), on the side of cc, where the isosceles triangle
// it forms with pq has its apex angle equal to the minimum angle: at the
// distance l(β + (β² - 1/4)^½) from m, with β = 1/(2 sin MinAngle) the
// bound on circumradius over shortest edge. We take the distance 0.1%
// shorter, so that the new triangle pq-off is safely not skinny itself.
// Off-centres give fewer Steiner points than circumcentres and, in our
// experience, let refinement reach higher minimum angles.
func (r *refiner) offCentre(t int32, cc [2]float64) [2]float64 {
	tr := r.tr
	v := tr.tris[t].v
	best, bl := 0, math.Inf(1)
	for i := range 3 {
		if l := sq(tr.pts[v[(i+1)%3]], tr.pts[v[(i+2)%3]]); l < bl {
			best, bl = i, l
		}
	}
	p, q := tr.pts[v[(best+1)%3]], tr.pts[v[(best+2)%3]]
	m := [2]float64{(p[0] + q[0]) / 2, (p[1] + q[1]) / 2}
	dc := math.Sqrt(sq(m, cc))
	l := math.Sqrt(bl)
	beta := 1 / (2 * math.Sqrt(r.sin2))
	doff := 0.999 * l * (beta + math.Sqrt(beta*beta-0.25))
	if !(doff < dc) {
		return cc
	}
	s := doff / dc
	return [2]float64{m[0] + s*(cc[0]-m[0]), m[1] + s*(cc[1]-m[1])}
}

// cannotSplit handles a triangle whose new point cannot be inserted (a
// degenerate circumcentre, a failed walk, or a point on an existing
// vertex), which exact predicates and the encroachment rules should
// prevent: a skinny triangle is left as it is, but a triangle above a size
// bound is an error, so that the bounds are never silently broken.
func (r *refiner) cannotSplit(t int32, large bool) error {
	if !large {
		return nil
	}
	v := r.tr.tris[t].v
	p := [3][2]float64{r.tr.pts[v[0]], r.tr.pts[v[1]], r.tr.pts[v[2]]}
	return fmt.Errorf("mesh: refinement cannot split the triangle %v %v %v, which exceeds a size bound; the geometry may be too close to degenerate", p[0], p[1], p[2])
}

// countSteiner counts one more Steiner point against the limit.
func (r *refiner) countSteiner() error {
	r.steiner++
	if r.steiner > r.maxSteiner {
		return fmt.Errorf("mesh: refinement needs more than %d Steiner points (MaxSteiner); raise the limit, or relax MinAngle, MaxArea or the boundary layers", r.maxSteiner)
	}
	return nil
}

// afterInsert examines the triangles around the new vertex p: all the
// triangles the insertion made.
func (r *refiner) afterInsert(p int32) {
	r.buf = r.tr.star(r.buf[:0], p)
	for _, t := range r.buf {
		r.examine(t)
	}
}

// encroachedBy returns the subsegments on the boundary of the cavity of
// point p (the connected set of triangles, from tc, whose circumcircles
// contain p, not crossing segments) whose diametral circles contain p:
// the subsegments p would encroach if it were inserted.
func (r *refiner) encroachedBy(tc int32, p [2]float64) [][2]int32 {
	tr := r.tr
	if len(r.mark) < len(tr.tris) {
		r.mark = append(r.mark, make([]uint32, len(tr.tris)-len(r.mark))...)
	}
	r.stamp++
	if r.stamp == 0 {
		clear(r.mark)
		r.stamp = 1
	}
	enc := r.enc[:0]
	st := append(r.buf[:0], tc)
	r.mark[tc] = r.stamp
	for len(st) > 0 {
		t := st[len(st)-1]
		st = st[:len(st)-1]
		T := &tr.tris[t]
		for i := range 3 {
			a, b := T.v[(i+1)%3], T.v[(i+2)%3]
			if T.seg[i] != 0 || T.n[i] < 0 {
				if encroaches(tr.pts[a], tr.pts[b], p) {
					enc = append(enc, [2]int32{a, b})
				}
				continue
			}
			u := T.n[i]
			if r.mark[u] == r.stamp {
				continue
			}
			r.mark[u] = r.stamp
			U := &tr.tris[u]
			if inCircleSign(tr.pts[U.v[0]], tr.pts[U.v[1]], tr.pts[U.v[2]], p) > 0 {
				st = append(st, u)
			}
		}
	}
	r.buf = st
	r.enc = enc
	return enc
}

// splitSubsegment splits the subsegment ab, if it still exists (rules 1
// and 3 of Triangulate).
func (r *refiner) splitSubsegment(a, b int32) error {
	tr := r.tr
	t, i := tr.findEdge(a, b)
	if t < 0 {
		return nil
	}
	seg := tr.tris[t].seg[i] - 1
	if seg < 0 {
		panic("mesh: internal error: queued edge is not a subsegment")
	}
	p := r.splitPoint(a, b)
	pa, pb := tr.pts[a], tr.pts[b]
	if min(sq(pa, p), sq(p, pb)) < r.minLen2 {
		s := tr.segs[seg]
		return fmt.Errorf("mesh: refinement would split %s segment %d near (%g, %g) into pieces shorter than 1e-12 times the domain's size; the input angles or boundary layers may be too small", polygonName(s.poly), s.index, p[0], p[1])
	}
	if err := r.countSteiner(); err != nil {
		return err
	}
	v := tr.addVertex(p, seg)
	tr.insertOnEdge(t, i, v)
	r.afterInsert(v)
	return nil
}

// splitPoint returns where the subsegment ab is split: its midpoint, or,
// if exactly one of a and b is an input vertex o, the point on ab at the
// distance 2^k from o with 2^k the largest power of two not above 2/3 of
// the length (so the split lies between 1/3 and 2/3 of the way).
func (r *refiner) splitPoint(a, b int32) [2]float64 {
	tr := r.tr
	pa, pb := tr.pts[a], tr.pts[b]
	if tr.isInput(a) == tr.isInput(b) {
		return [2]float64{(pa[0] + pb[0]) / 2, (pa[1] + pb[1]) / 2}
	}
	if tr.isInput(b) {
		pa, pb = pb, pa
	}
	l := math.Sqrt(sq(pa, pb))
	_, exp := math.Frexp(2 * l / 3) // 2l/3 = f·2^exp with 1/2 <= f < 1
	s := math.Ldexp(1, exp-1) / l
	return [2]float64{pa[0] + s*(pb[0]-pa[0]), pa[1] + s*(pb[1]-pa[1])}
}

// forcedByInputAngle reports a skinny triangle whose shortest edge joins
// two segments that meet at a small input angle, at equal distances from
// the vertex where they meet (rule 4 of Triangulate): its small angle is
// dictated by the input, and splitting it would only start a cascade of
// ever smaller triangles toward that vertex.
func (r *refiner) forcedByInputAngle(t int32) bool {
	tr := r.tr
	v := tr.tris[t].v
	best, bl := 0, math.Inf(1)
	for i := range 3 {
		if l := sq(tr.pts[v[(i+1)%3]], tr.pts[v[(i+2)%3]]); l < bl {
			best, bl = i, l
		}
	}
	u, w := v[(best+1)%3], v[(best+2)%3]
	us, ws := r.segmentsAt(u), r.segmentsAt(w)
	for _, su := range us {
		if su < 0 {
			continue
		}
		for _, sw := range ws {
			if sw < 0 || sw == su {
				continue
			}
			o := commonEnd(tr.segs[su], tr.segs[sw])
			if o < 0 || o == u || o == w || !r.smallAngle[o-superVertices] {
				continue
			}
			du := math.Sqrt(sq(tr.pts[o], tr.pts[u]))
			dw := math.Sqrt(sq(tr.pts[o], tr.pts[w]))
			if math.Abs(du-dw) <= 1e-6*max(du, dw) {
				return true
			}
		}
	}
	return false
}

// segmentsAt returns the segments vertex v lies on (-1 entries for none).
func (r *refiner) segmentsAt(v int32) [2]int32 {
	tr := r.tr
	if tr.isInput(v) {
		return tr.inSegs[v-superVertices]
	}
	return [2]int32{tr.vseg[v], -1}
}

// commonEnd returns the vertex two segments share, or -1.
func commonEnd(s, t inputSegment) int32 {
	switch {
	case s.a == t.a || s.a == t.b:
		return s.a
	case s.b == t.a || s.b == t.b:
		return s.b
	}
	return -1
}

// walkTo follows the straight line from q, a point in triangle t, to p. It
// returns the triangle containing p (edge -1, blocked false), or the
// triangle and local edge of the first segment or boundary edge the line
// must cross (blocked true). It returns t = -1 if the walk fails, which
// exact predicates should prevent.
func (tr *triangulation) walkTo(t int32, q, p [2]float64) (tc int32, edge int, blocked bool) {
	for steps := 0; steps <= len(tr.tris)+16; steps++ {
		T := &tr.tris[t]
		var out [3]bool
		n := 0
		for i := range 3 {
			if orientSign(tr.pts[T.v[(i+1)%3]], tr.pts[T.v[(i+2)%3]], p) < 0 {
				out[i] = true
				n++
			}
		}
		exit := -1
		switch n {
		case 0:
			return t, -1, false
		case 1:
			exit = slices.Index(out[:], true)
		default:
			// Two edges face p; they share vertex v[k]. Leave through the
			// one the line q→p crosses: edge (k+1) joins v[k+2] and v[k].
			k := slices.Index(out[:], false)
			ok := orientSign(q, p, tr.pts[T.v[k]])
			o2 := orientSign(q, p, tr.pts[T.v[(k+2)%3]])
			if ok == 0 || (ok > 0) != (o2 > 0) {
				exit = (k + 1) % 3
			} else {
				exit = (k + 2) % 3
			}
		}
		if T.n[exit] < 0 || T.seg[exit] != 0 {
			return t, exit, true
		}
		t = T.n[exit]
	}
	return -1, -1, false
}
