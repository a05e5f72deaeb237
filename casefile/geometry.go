package casefile

import (
	"fmt"
	"math"
	"path/filepath"
	"regexp"
	"slices"
	"strings"

	"gopkg.in/yaml.v3"

	"mixwell/mesh"
)

// segment is a straight boundary piece in m.
type segment [2][2]float64

// geometryNames is what the boundary checks need from the geometry: the
// distinct boundary names and the segments of each.
type geometryNames struct {
	names    []string // sorted
	segments map[string][]segment
	// layers maps a boundary name to its grading (for warnings).
	layers map[string]bool
}

// has reports whether name is a boundary of the geometry.
func (g *geometryNames) has(name string) bool {
	_, ok := slices.BinarySearch(g.names, name)
	return ok
}

// boundaryNameRE is what a boundary name may look like in a rectangle or
// a polygon (mesh files have their own rule: one word).
var boundaryNameRE = regexp.MustCompile(`^[A-Za-z][A-Za-z0-9_-]{0,63}$`)

// maxPolygonPoints bounds the vertices of a polygon geometry (the checks
// are quadratic in it); larger domains belong in a mesh file.
const maxPolygonPoints = 5000

// geometry decodes the geometry section. It returns nil when the
// geometry is invalid (boundary checks are then skipped).
func (d *decoder) geometry(n *yaml.Node, dir string, open opener, g *Geometry) *geometryNames {
	const path = "geometry"
	m := d.mapping(n, path, []string{"rectangle", "polygon", "mesh_file", "mesh_unit", "meshing"})
	if m == nil {
		return nil
	}
	var shapes []string
	for _, k := range []string{"rectangle", "polygon", "mesh_file"} {
		if m.has(k) {
			shapes = append(shapes, k)
		}
	}
	if len(shapes) != 1 {
		if len(shapes) == 0 {
			d.fail(n, path, "give one of rectangle, polygon or mesh_file")
		} else {
			d.fail(n, path, "give only one of rectangle, polygon or mesh_file, got %s", strings.Join(shapes, " and "))
		}
		return nil
	}
	if u := m.get("mesh_unit"); u != nil && shapes[0] != "mesh_file" {
		d.fail(m.keyNode("mesh_unit"), join(path, "mesh_unit"), "used only with mesh_file")
	}
	var geo *geometryNames
	switch shapes[0] {
	case "rectangle":
		g.Kind = RectangleGeometry
		g.Rectangle, geo = d.rectangle(m.get("rectangle"))
	case "polygon":
		g.Kind = PolygonGeometry
		g.Polygon, geo = d.polygon(m.get("polygon"))
	case "mesh_file":
		g.Kind = MeshFileGeometry
		g.MeshFile, geo = d.meshFile(m.get("mesh_file"), m.get("mesh_unit"), dir, open)
	}
	if geo == nil {
		return nil
	}
	g.Names = geo.names
	if g.Kind == PolygonGeometry {
		g.Meshing.MinAngle = defaultMinAngle
	}
	if mn := m.get("meshing"); mn != nil {
		if !d.meshing(mn, g, geo) {
			return nil
		}
	}
	return geo
}

// defaultMinAngle is the default smallest angle of the polygon mesher in
// degrees; maxMinAngle the largest accepted. Both match the mesher's
// (mesh.DefaultMinAngle, mesh.MaxMinAngle).
const (
	defaultMinAngle = 25
	maxMinAngle     = 33.8
)

// boundaryName decodes a boundary name of a rectangle or polygon.
func (d *decoder) boundaryName(n *yaml.Node, path string) (string, bool) {
	s, ok := d.str(n, path)
	if !ok {
		return "", false
	}
	if !boundaryNameRE.MatchString(s) {
		d.fail(n, path, "boundary name %q: use a letter followed by letters, digits, _ and -, at most 64 characters", clip(s))
		return "", false
	}
	return s, true
}

// rectangle decodes an axis-parallel rectangle.
func (d *decoder) rectangle(n *yaml.Node) (*Rectangle, *geometryNames) {
	const path = "geometry.rectangle"
	m := d.mapping(n, path, []string{"x0", "y0", "x1", "y1", "nx", "ny", "names"})
	if m == nil {
		return nil, nil
	}
	r := &Rectangle{Names: SideNames}
	ok := true
	coord := func(key string, dst *float64, required bool) {
		v := m.get(key)
		if v == nil {
			if required {
				d.require(m, key, "give the coordinates x0, y0 (default 0) and x1, y1 of the corners")
				ok = false
			}
			return
		}
		x, good := d.quantity(v, join(path, key), kindLength)
		*dst, ok = x, ok && good
	}
	coord("x0", &r.X0, false)
	coord("y0", &r.Y0, false)
	coord("x1", &r.X1, true)
	coord("y1", &r.Y1, true)
	if ok && !(r.X1 > r.X0) {
		d.fail(m.get("x1"), join(path, "x1"), "x1 = %g must exceed x0 = %g", r.X1, r.X0)
		ok = false
	}
	if ok && !(r.Y1 > r.Y0) {
		d.fail(m.get("y1"), join(path, "y1"), "y1 = %g must exceed y0 = %g", r.Y1, r.Y0)
		ok = false
	}
	for _, key := range []string{"nx", "ny"} {
		v := d.require(m, key, "give the number of cells nx and ny")
		if v == nil {
			ok = false
			continue
		}
		k, good := d.integer(v, join(path, key), 1, 100000)
		ok = ok && good
		if key == "nx" {
			r.NX = k
		} else {
			r.NY = k
		}
	}
	if nn := m.get("names"); nn != nil {
		nm := d.mapping(nn, join(path, "names"), SideNames[:])
		if nm == nil {
			ok = false
		} else {
			for _, e := range nm.entries {
				name, good := d.boundaryName(e.vNode, join(nm.path, e.key))
				if !good {
					ok = false
					continue
				}
				r.Names[slices.Index(SideNames[:], e.key)] = name
			}
		}
	}
	if !ok {
		return nil, nil
	}
	corners := [4][2]float64{{r.X0, r.Y0}, {r.X1, r.Y0}, {r.X1, r.Y1}, {r.X0, r.Y1}}
	geo := &geometryNames{segments: map[string][]segment{}, layers: map[string]bool{}}
	for s, name := range r.Names {
		geo.segments[name] = append(geo.segments[name], segment{corners[s], corners[(s+1)%4]})
	}
	geo.names = sortedKeys(geo.segments)
	return r, geo
}

func sortedKeys[V any](m map[string]V) []string {
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	slices.Sort(keys)
	return keys
}

// loopNodes keeps the YAML nodes of a loop's points for messages.
type loopNodes struct {
	path  string
	node  *yaml.Node
	nodes []*yaml.Node // one per point
	paths []string     // one per point
}

// polygon decodes a polygon with holes and checks the self-evident
// faults: fewer than 3 vertices, repeated points, zero area, crossing
// segments, holes outside the outline or inside each other.
func (d *decoder) polygon(n *yaml.Node) (*Polygon, *geometryNames) {
	const path = "geometry.polygon"
	m := d.mapping(n, path, []string{"outline", "holes"})
	if m == nil {
		return nil, nil
	}
	p := &Polygon{}
	var loops []Loop
	var nodes []loopNodes
	on := d.require(m, "outline", "give the outer boundary as a list of runs (name and points)")
	if on == nil {
		return nil, nil
	}
	lp, ln, ok := d.loop(on, join(path, "outline"))
	loops, nodes = append(loops, lp), append(nodes, ln)
	if hn := m.get("holes"); hn != nil {
		items, good := d.sequence(hn, join(path, "holes"), "loops (each a list of runs)")
		ok = ok && good
		for i, it := range items {
			lp, ln, good := d.loop(it, index(join(path, "holes"), i))
			ok = ok && good
			loops, nodes = append(loops, lp), append(nodes, ln)
		}
	}
	if !ok {
		return nil, nil
	}
	total := 0
	for _, l := range loops {
		total += len(l.Points)
	}
	if total > maxPolygonPoints {
		d.fail(n, path, "%d vertices; a polygon may have at most %d (use a mesh file for larger domains)", total, maxPolygonPoints)
		return nil, nil
	}
	if !d.checkLoops(loops, nodes) {
		return nil, nil
	}
	p.Outline, p.Holes = loops[0], loops[1:]
	geo := &geometryNames{segments: map[string][]segment{}, layers: map[string]bool{}}
	for _, l := range loops {
		for i, name := range l.Names {
			a, b := l.Points[i], l.Points[(i+1)%len(l.Points)]
			geo.segments[name] = append(geo.segments[name], segment{a, b})
		}
	}
	geo.names = sortedKeys(geo.segments)
	return p, geo
}

// loop decodes a list of runs {name, points}.
func (d *decoder) loop(n *yaml.Node, path string) (Loop, loopNodes, bool) {
	var l Loop
	ln := loopNodes{path: path, node: n}
	runs, ok := d.sequence(n, path, "runs (name and points)")
	if !ok {
		return l, ln, false
	}
	if len(runs) == 0 {
		d.fail(n, path, "empty loop; a loop needs at least 3 points")
		return l, ln, false
	}
	for i, r := range runs {
		rp := index(path, i)
		m := d.mapping(r, rp, []string{"name", "points"})
		if m == nil {
			ok = false
			continue
		}
		var name string
		if nn := d.require(m, "name", "give the boundary name of the segments that start at these points"); nn != nil {
			var good bool
			name, good = d.boundaryName(nn, join(rp, "name"))
			ok = ok && good
		} else {
			ok = false
		}
		pn := d.require(m, "points", "give the points [x, y] at which the run's segments start")
		if pn == nil {
			ok = false
			continue
		}
		pts, good := d.sequence(pn, join(rp, "points"), "points [x, y]")
		if !good {
			ok = false
			continue
		}
		if len(pts) == 0 {
			d.fail(pn, join(rp, "points"), "a run needs at least one point")
			ok = false
		}
		if len(l.Points)+len(pts) > maxPolygonPoints {
			d.fail(pn, join(rp, "points"), "too many points; a polygon may have at most %d", maxPolygonPoints)
			return l, ln, false
		}
		for j, pt := range pts {
			v, good := d.vector(pt, index(join(rp, "points"), j), kindLength)
			ok = ok && good
			l.Points = append(l.Points, v)
			l.Names = append(l.Names, name)
			ln.nodes = append(ln.nodes, pt)
			ln.paths = append(ln.paths, index(join(rp, "points"), j))
		}
	}
	if ok && len(l.Points) < 3 {
		d.fail(n, path, "%d point%s; a loop needs at least 3", len(l.Points), plural(len(l.Points)))
		ok = false
	}
	return l, ln, ok
}

// checkLoops checks decoded loops (the first is the outline).
func (d *decoder) checkLoops(loops []Loop, nodes []loopNodes) bool {
	// Scale for the tolerances: the diameter of the bounding box.
	lo, hi := [2]float64{math.Inf(1), math.Inf(1)}, [2]float64{math.Inf(-1), math.Inf(-1)}
	for _, l := range loops {
		for _, p := range l.Points {
			for k := range 2 {
				lo[k], hi[k] = math.Min(lo[k], p[k]), math.Max(hi[k], p[k])
			}
		}
	}
	diam := math.Hypot(hi[0]-lo[0], hi[1]-lo[1])
	tol := 1e-12 * diam
	type ref struct{ loop, point int }
	var all []ref
	for li, l := range loops {
		for pi := range l.Points {
			all = append(all, ref{li, pi})
		}
	}
	// Repeated points, within any loop or across loops.
	for a := range all {
		pa := loops[all[a].loop].Points[all[a].point]
		for b := a + 1; b < len(all); b++ {
			pb := loops[all[b].loop].Points[all[b].point]
			if math.Hypot(pa[0]-pb[0], pa[1]-pb[1]) <= tol {
				na, nb := nodes[all[a].loop], nodes[all[b].loop]
				d.fail(nb.nodes[all[b].point], nb.paths[all[b].point], "point (%g, %g) repeats %s (line %d)",
					pb[0], pb[1], na.paths[all[a].point], na.nodes[all[a].point].Line)
				return false
			}
		}
	}
	// Zero area.
	for li, l := range loops {
		if a := signedArea(l.Points); math.Abs(a) <= 1e-12*diam*diam {
			d.fail(nodes[li].node, nodes[li].path, "the loop encloses no area")
			return false
		}
	}
	// Crossing or touching segments (adjacent segments share one vertex
	// and may only fold back onto each other).
	type seg struct{ loop, i int }
	var segs []seg
	for li, l := range loops {
		for i := range l.Points {
			segs = append(segs, seg{li, i})
		}
	}
	ends := func(s seg) ([2]float64, [2]float64) {
		l := loops[s.loop]
		return l.Points[s.i], l.Points[(s.i+1)%len(l.Points)]
	}
	for a := range segs {
		a0, a1 := ends(segs[a])
		for b := a + 1; b < len(segs); b++ {
			b0, b1 := ends(segs[b])
			sa, sb := segs[a], segs[b]
			nl := len(loops[sa.loop].Points)
			adjacent := sa.loop == sb.loop && ((sa.i+1)%nl == sb.i || (sb.i+1)%nl == sa.i)
			var bad bool
			if adjacent {
				bad = foldsBack(a0, a1, b0, b1)
			} else {
				bad = segmentsMeet(a0, a1, b0, b1)
			}
			if bad {
				na, nb := nodes[sa.loop], nodes[sb.loop]
				d.fail(nb.nodes[sb.i], nb.paths[sb.i], "the segment from (%.6g, %.6g) to (%.6g, %.6g) meets the segment from (%.6g, %.6g) to (%.6g, %.6g) that starts at %s (line %d); the boundary must not cross or touch itself",
					b0[0], b0[1], b1[0], b1[1], a0[0], a0[1], a1[0], a1[1], na.paths[sa.i], na.nodes[sa.i].Line)
				return false
			}
		}
	}
	// Holes inside the outline and outside each other (with no crossings,
	// one vertex decides).
	for h := 1; h < len(loops); h++ {
		p := loops[h].Points[0]
		if !inside(p, loops[0].Points) {
			d.fail(nodes[h].node, nodes[h].path, "the hole lies outside the outline")
			return false
		}
		for o := 1; o < len(loops); o++ {
			if o != h && inside(p, loops[o].Points) {
				d.fail(nodes[h].node, nodes[h].path, "the hole lies inside the hole %s", nodes[o].path)
				return false
			}
		}
	}
	return true
}

// signedArea is the shoelace area, positive for counter-clockwise loops.
func signedArea(pts [][2]float64) float64 {
	var a float64
	for i, p := range pts {
		q := pts[(i+1)%len(pts)]
		a += p[0]*q[1] - q[0]*p[1]
	}
	return a / 2
}

// orient is twice the signed area of the triangle (a, b, c).
func orient(a, b, c [2]float64) float64 {
	return (b[0]-a[0])*(c[1]-a[1]) - (b[1]-a[1])*(c[0]-a[0])
}

// onSegment reports whether c, collinear with a and b, lies within their
// bounding box.
func onSegment(a, b, c [2]float64) bool {
	return math.Min(a[0], b[0]) <= c[0] && c[0] <= math.Max(a[0], b[0]) &&
		math.Min(a[1], b[1]) <= c[1] && c[1] <= math.Max(a[1], b[1])
}

// segmentsMeet reports whether the closed segments [a0, a1] and [b0, b1]
// have a point in common (the classical orientation test, e.g. Cormen et
// al., Introduction to Algorithms, 3rd ed., section 33.1).
func segmentsMeet(a0, a1, b0, b1 [2]float64) bool {
	d1, d2 := orient(b0, b1, a0), orient(b0, b1, a1)
	d3, d4 := orient(a0, a1, b0), orient(a0, a1, b1)
	if ((d1 > 0 && d2 < 0) || (d1 < 0 && d2 > 0)) && ((d3 > 0 && d4 < 0) || (d3 < 0 && d4 > 0)) {
		return true
	}
	return (d1 == 0 && onSegment(b0, b1, a0)) || (d2 == 0 && onSegment(b0, b1, a1)) ||
		(d3 == 0 && onSegment(a0, a1, b0)) || (d4 == 0 && onSegment(a0, a1, b1))
}

// foldsBack reports whether two adjacent segments overlap beyond their
// shared vertex: collinear and pointing back.
func foldsBack(a0, a1, b0, b1 [2]float64) bool {
	// Put the shared vertex first in both.
	switch {
	case a1 == b0:
		a0, a1 = a1, a0
	case b1 == a0:
		b0, b1 = b1, b0
	}
	u := [2]float64{a1[0] - a0[0], a1[1] - a0[1]}
	v := [2]float64{b1[0] - b0[0], b1[1] - b0[1]}
	cross := u[0]*v[1] - u[1]*v[0]
	dot := u[0]*v[0] + u[1]*v[1]
	return math.Abs(cross) <= 1e-12*math.Hypot(u[0], u[1])*math.Hypot(v[0], v[1]) && dot > 0
}

// inside reports whether p lies inside the polygon (even–odd rule).
func inside(p [2]float64, poly [][2]float64) bool {
	in := false
	for i, a := range poly {
		b := poly[(i+1)%len(poly)]
		if (a[1] > p[1]) != (b[1] > p[1]) {
			x := a[0] + (p[1]-a[1])*(b[0]-a[0])/(b[1]-a[1])
			if p[0] < x {
				in = !in
			}
		}
	}
	return in
}

// meshFile reads the mesh file named by n and collects its tag names.
func (d *decoder) meshFile(n, unit *yaml.Node, dir string, open opener) (*MeshFile, *geometryNames) {
	const path = "geometry.mesh_file"
	name, ok := d.str(n, path)
	if !ok {
		return nil, nil
	}
	scale := 1.0
	if unit != nil {
		s, ok := d.scalar(unit, "geometry.mesh_unit", "a length unit, e.g. mm")
		if !ok {
			return nil, nil
		}
		if numberRE.FindStringIndex(strings.TrimSpace(s)) == nil {
			s = "1 " + s
		}
		u := *unit
		u.Value = s
		if scale, ok = d.positive(&u, "geometry.mesh_unit", kindLength); !ok {
			return nil, nil
		}
	}
	p := name
	if !filepath.IsAbs(p) {
		p = filepath.Join(dir, p)
	}
	f, err := open(p)
	if err != nil {
		d.fail(n, path, "cannot open the mesh file: %v", err)
		return nil, nil
	}
	msh, err := mesh.Read(f)
	f.Close()
	if err != nil {
		d.fail(n, path, "reading %s: %v", p, err)
		return nil, nil
	}
	if scale != 1 {
		for i := range msh.Points {
			msh.Points[i][0] *= scale
			msh.Points[i][1] *= scale
		}
	}
	geo := &geometryNames{segments: map[string][]segment{}, layers: map[string]bool{}}
	var unnamed []string
	for _, tag := range msh.Tags() {
		tn, ok := msh.TagNames[tag]
		if !ok {
			unnamed = append(unnamed, fmt.Sprint(tag))
			continue
		}
		for _, e := range msh.BoundaryEdges(tag) {
			ed := msh.Edges[e]
			geo.segments[tn] = append(geo.segments[tn], segment{msh.Points[ed[0]], msh.Points[ed[1]]})
		}
	}
	if len(unnamed) > 0 {
		verb := "has"
		if len(unnamed) > 1 {
			verb = "have"
		}
		d.fail(n, path, "%s: boundary tag%s %s %s no name; boundary conditions refer to names (add lines \"tag NUMBER NAME\" to the mesh file)",
			p, plural(len(unnamed)), strings.Join(unnamed, ", "), verb)
		return nil, nil
	}
	geo.names = sortedKeys(geo.segments)
	return &MeshFile{Path: p, Mesh: msh}, geo
}

// meshing decodes the meshing controls for the geometry kind in g.
func (d *decoder) meshing(n *yaml.Node, g *Geometry, geo *geometryNames) bool {
	const path = "geometry.meshing"
	m := d.mapping(n, path, []string{"cell_size", "max_area", "min_angle", "refinements", "layers"})
	if m == nil {
		return false
	}
	ms := &g.Meshing
	nerr := len(d.errs)
	switch g.Kind {
	case RectangleGeometry:
		d.restrict(m, []string{"refinements", "layers"}, "for a rectangle (its cells are set by nx and ny)")
	case MeshFileGeometry:
		d.restrict(m, []string{"refinements"}, "for a mesh file (it is already meshed)")
	case PolygonGeometry:
		cs, ma := m.get("cell_size"), m.get("max_area")
		switch {
		case cs != nil && ma != nil:
			d.fail(m.keyNode("max_area"), join(path, "max_area"), "give cell_size or max_area, not both")
		case cs != nil:
			if h, ok := d.positive(cs, join(path, "cell_size"), kindLength); ok {
				ms.CellSize = h
				ms.MaxArea = math.Sqrt(3) / 4 * h * h
			}
		case ma != nil:
			ms.MaxArea, _ = d.positive(ma, join(path, "max_area"), kindArea)
		}
		if a := m.get("min_angle"); a != nil {
			if v, ok := d.positive(a, join(path, "min_angle"), kindNumber); ok {
				if v > maxMinAngle {
					d.fail(a, join(path, "min_angle"), "%g degrees is too large; the mesher cannot promise more than %g", v, maxMinAngle)
				}
				ms.MinAngle = v
			}
		}
	}
	if r := m.get("refinements"); r != nil {
		ms.Refinements, _ = d.integer(r, join(path, "refinements"), 0, 8)
	}
	if ln := m.get("layers"); ln != nil && g.Kind != MeshFileGeometry {
		d.layers(ln, join(path, "layers"), g, geo)
	}
	return len(d.errs) == nerr
}

// layers decodes the boundary-layer gradings.
func (d *decoder) layers(n *yaml.Node, path string, g *Geometry, geo *geometryNames) {
	m := d.mapping(n, path, nil)
	if m == nil {
		return
	}
	for _, e := range m.entries {
		lp := join(path, e.key)
		if !geo.has(e.key) {
			d.fail(e.kNode, lp, "no boundary %q in the geometry; its boundaries are %s", clip(e.key), strings.Join(geo.names, ", "))
			continue
		}
		lm := d.mapping(e.vNode, lp, []string{"first", "ratio", "count"})
		if lm == nil {
			continue
		}
		l := Grading{Boundary: e.key}
		ok := true
		if v := d.require(lm, "first", "give the thickness of the layer at the boundary"); v != nil {
			var good bool
			l.First, good = d.positive(v, join(lp, "first"), kindLength)
			ok = ok && good
		} else {
			ok = false
		}
		if v := d.require(lm, "ratio", "give the growth ratio of successive layers (>= 1)"); v != nil {
			r, good := d.quantity(v, join(lp, "ratio"), kindNumber)
			if good && (r < 1 || r > 10) {
				d.fail(v, join(lp, "ratio"), "ratio %g is out of range; want 1 to 10 (layers grow away from the boundary)", r)
				good = false
			}
			l.Ratio, ok = r, ok && good
		} else {
			ok = false
		}
		if v := d.require(lm, "count", "give the number of layers"); v != nil {
			var good bool
			l.Count, good = d.integer(v, join(lp, "count"), 1, 100)
			ok = ok && good
		} else {
			ok = false
		}
		if !ok {
			continue
		}
		geo.layers[e.key] = true
		g.Meshing.Layers = append(g.Meshing.Layers, l)
	}
	slices.SortFunc(g.Meshing.Layers, func(a, b Grading) int { return strings.Compare(a.Boundary, b.Boundary) })
	if g.Kind == RectangleGeometry {
		d.rectangleLayers(m, path, g)
	}
}

// thickness is the total thickness of a grading.
func (l Grading) thickness() float64 {
	if l.Ratio == 1 {
		return l.First * float64(l.Count)
	}
	return l.First * (math.Pow(l.Ratio, float64(l.Count)) - 1) / (l.Ratio - 1)
}

// rectangleLayers checks that the gradings of opposite sides fit in the
// rectangle and leave at least one uniform row (or column) of cells.
func (d *decoder) rectangleLayers(m *mapping, path string, g *Geometry) {
	r := g.Rectangle
	var count [4]int
	var thick [4]float64
	var key [4]string
	for _, l := range g.Meshing.Layers {
		for s, name := range r.Names {
			if name == l.Boundary {
				count[s], thick[s], key[s] = l.Count, l.thickness(), l.Boundary
			}
		}
	}
	check := func(a, b int, cells int, extent float64, across string) {
		if count[a]+count[b] == 0 {
			return
		}
		k := key[a]
		if k == "" {
			k = key[b]
		}
		if count[a]+count[b] >= cells {
			d.fail(m.keyNode(k), join(path, k), "%d graded layers on the %s and %s sides need more than the %d cells across (%s); raise %s",
				count[a]+count[b], SideNames[a], SideNames[b], cells, across, across)
			return
		}
		if t := thick[a] + thick[b]; !(t < extent) {
			d.fail(m.keyNode(k), join(path, k), "graded layers on the %s and %s sides are %g m thick in total, not less than the extent %g m",
				SideNames[a], SideNames[b], t, extent)
		}
	}
	check(Bottom, Top, r.NY, r.Y1-r.Y0, "ny")
	check(Left, Right, r.NX, r.X1-r.X0, "nx")
}
