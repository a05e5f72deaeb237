package simulate

import (
	"fmt"
	"math"
	"sort"

	"mixwell/casefile"
	"mixwell/mesh"
)

// buildMesh returns the case's triangulation in metres with one boundary
// tag per boundary name (tags numbered from 1 in sorted name order).
func buildMesh(c *casefile.Case) (*mesh.Mesh, error) {
	g := c.Geometry
	var m *mesh.Mesh
	var err error
	switch g.Kind {
	case casefile.RectangleGeometry:
		m, err = rectangleMesh(g.Rectangle, g.Meshing)
	case casefile.PolygonGeometry:
		m, err = polygonMesh(g.Polygon, g.Meshing)
	case casefile.MeshFileGeometry:
		m = g.MeshFile.Mesh.Clone()
	default:
		err = fmt.Errorf("unknown geometry kind %q", g.Kind)
	}
	if err != nil {
		return nil, err
	}
	if g.Meshing.Refinements > 0 {
		m = mesh.RefineTimes(m, g.Meshing.Refinements)
	}
	return m, nil
}

// nameTags numbers the distinct names from 1 in sorted order.
func nameTags(names []string) map[string]int {
	uniq := append([]string(nil), names...)
	sort.Strings(uniq)
	tags := map[string]int{}
	for _, n := range uniq {
		if _, ok := tags[n]; !ok {
			tags[n] = len(tags) + 1
		}
	}
	return tags
}

// rectangleMesh meshes a rectangle: structured with alternating diagonals.
// Boundary layers on one side, or on two opposite sides, become extra rows
// (or columns) of geometrically growing thickness next to those sides,
// keeping the mesh structured; other combinations go to the quality mesher
// as a polygon with the same cell size.
func rectangleMesh(r *casefile.Rectangle, opt casefile.Meshing) (*mesh.Mesh, error) {
	if m, ok, err := gradedRectangle(r, opt); ok || err != nil {
		return m, err
	}
	if len(opt.Layers) > 0 {
		p := &casefile.Polygon{Outline: casefile.Loop{
			Points: [][2]float64{{r.X0, r.Y0}, {r.X1, r.Y0}, {r.X1, r.Y1}, {r.X0, r.Y1}},
			Names:  []string{r.Names[casefile.Bottom], r.Names[casefile.Right], r.Names[casefile.Top], r.Names[casefile.Left]},
		}}
		if opt.MaxArea == 0 && opt.CellSize == 0 {
			h := math.Min((r.X1-r.X0)/float64(r.NX), (r.Y1-r.Y0)/float64(r.NY))
			opt.CellSize = h
		}
		return polygonMesh(p, opt)
	}
	m, err := mesh.Rectangle(r.X0, r.Y0, r.X1, r.Y1, r.NX, r.NY, mesh.AlternatingDiagonal)
	if err != nil {
		return nil, err
	}
	tags := nameTags(r.Names[:])
	out := m.Clone()
	for e := range out.EdgeTags {
		if out.EdgeTags[e] != 0 {
			out.EdgeTags[e] = 0
		}
	}
	out.TagNames = map[int]string{}
	sides := [4]func(a, b [2]float64) bool{
		func(a, b [2]float64) bool { return a[1] == r.Y0 && b[1] == r.Y0 },
		func(a, b [2]float64) bool { return a[0] == r.X1 && b[0] == r.X1 },
		func(a, b [2]float64) bool { return a[1] == r.Y1 && b[1] == r.Y1 },
		func(a, b [2]float64) bool { return a[0] == r.X0 && b[0] == r.X0 },
	}
	for side, on := range sides {
		name := r.Names[side]
		for e, et := range out.EdgeTriangles {
			if et[1] >= 0 {
				continue
			}
			a, b := out.Points[out.Edges[e][0]], out.Points[out.Edges[e][1]]
			if on(a, b) {
				out.EdgeTags[e] = tags[name]
			}
		}
		out.TagNames[tags[name]] = name
	}
	if err := out.Validate(); err != nil {
		return nil, err
	}
	return out, nil
}

// polygonMesh meshes a polygon with holes by constrained Delaunay
// triangulation and quality refinement.
func polygonMesh(p *casefile.Polygon, opt casefile.Meshing) (*mesh.Mesh, error) {
	all := append([]string(nil), p.Outline.Names...)
	for _, h := range p.Holes {
		all = append(all, h.Names...)
	}
	tags := nameTags(all)
	d := &mesh.Domain{Outer: p.Outline.Points, TagNames: map[int]string{}}
	for _, n := range p.Outline.Names {
		d.OuterTags = append(d.OuterTags, tags[n])
	}
	for _, h := range p.Holes {
		d.Holes = append(d.Holes, h.Points)
		var ht []int
		for _, n := range h.Names {
			ht = append(ht, tags[n])
		}
		d.HoleTags = append(d.HoleTags, ht)
	}
	for n, t := range tags {
		d.TagNames[t] = n
	}
	q := &mesh.QualityOptions{MinAngle: opt.MinAngle, MaxArea: opt.MaxArea}
	if q.MaxArea == 0 && opt.CellSize > 0 {
		q.MaxArea = math.Sqrt(3) / 4 * opt.CellSize * opt.CellSize
	}
	for _, l := range opt.Layers {
		t, ok := tags[l.Boundary]
		if !ok {
			return nil, fmt.Errorf("boundary layer on %q: no such boundary", l.Boundary)
		}
		q.Layers = append(q.Layers, mesh.BoundaryLayer{Tag: t, First: l.First, Growth: l.Ratio, Layers: l.Count})
	}
	return mesh.Triangulate(d, q)
}

// gradedRectangle builds a structured rectangle whose rows (or columns)
// next to the sides named by boundary layers have thicknesses first,
// first*ratio, ..., first*ratio^(count-1), counted from the side, followed by
// the rectangle's own uniform cells over the rest. It reports ok = false when
// the layers do not fit that pattern (none, or on adjacent sides).
func gradedRectangle(r *casefile.Rectangle, opt casefile.Meshing) (*mesh.Mesh, bool, error) {
	if len(opt.Layers) == 0 {
		return nil, false, nil
	}
	side := map[string][]int{}
	for s, name := range r.Names {
		side[name] = append(side[name], s)
	}
	var layerAt [4]*casefile.Grading
	for i := range opt.Layers {
		l := &opt.Layers[i]
		for _, s := range side[l.Boundary] {
			layerAt[s] = l
		}
	}
	vertical := layerAt[casefile.Bottom] != nil || layerAt[casefile.Top] != nil
	horizontal := layerAt[casefile.Left] != nil || layerAt[casefile.Right] != nil
	if vertical && horizontal {
		return nil, false, nil
	}
	// Line positions along the graded direction, from lo to hi.
	lines := func(lo, hi float64, n int, start, end *casefile.Grading) ([]float64, error) {
		var a, b []float64
		total := 0.0
		if start != nil {
			t := start.First
			for k := 0; k < start.Count; k++ {
				a = append(a, t)
				total += t
				t *= start.Ratio
			}
		}
		if end != nil {
			t := end.First
			for k := 0; k < end.Count; k++ {
				b = append(b, t)
				total += t
				t *= end.Ratio
			}
		}
		if total >= hi-lo {
			return nil, fmt.Errorf("boundary layers %.4g m thick do not fit in %.4g m", total, hi-lo)
		}
		h := (hi - lo - total) / float64(n)
		pos := []float64{lo}
		x := lo
		for _, t := range a {
			x += t
			pos = append(pos, x)
		}
		for k := 0; k < n; k++ {
			x += h
			pos = append(pos, x)
		}
		for k := len(b) - 1; k >= 0; k-- {
			x += b[k]
			pos = append(pos, x)
		}
		pos[len(pos)-1] = hi
		return pos, nil
	}
	var xs, ys []float64
	var err error
	if vertical {
		ys, err = lines(r.Y0, r.Y1, r.NY, layerAt[casefile.Bottom], layerAt[casefile.Top])
		for k := 0; k <= r.NX; k++ {
			xs = append(xs, r.X0+(r.X1-r.X0)*float64(k)/float64(r.NX))
		}
	} else {
		xs, err = lines(r.X0, r.X1, r.NX, layerAt[casefile.Left], layerAt[casefile.Right])
		for k := 0; k <= r.NY; k++ {
			ys = append(ys, r.Y0+(r.Y1-r.Y0)*float64(k)/float64(r.NY))
		}
	}
	if err != nil {
		return nil, true, err
	}
	nx, ny := len(xs)-1, len(ys)-1
	flat := *r
	flat.X0, flat.Y0, flat.X1, flat.Y1, flat.NX, flat.NY = 0, 0, float64(nx), float64(ny), nx, ny
	m, err := rectangleMesh(&flat, casefile.Meshing{})
	if err != nil {
		return nil, true, err
	}
	// Every point lies on a grid line: map index coordinates to positions.
	for i, p := range m.Points {
		m.Points[i] = [2]float64{xs[int(math.Round(p[0]))], ys[int(math.Round(p[1]))]}
	}
	if err := m.Validate(); err != nil {
		return nil, true, err
	}
	return m, true, nil
}

// BuildMesh returns the triangulation of case c in metres, with one boundary
// tag per boundary name (Mesh.TagNames), as Prepare builds it (before any
// barycentric split of a Scott–Vogelius case).
func BuildMesh(c *casefile.Case) (*mesh.Mesh, error) {
	m, err := buildMesh(c)
	if err != nil {
		return nil, fmt.Errorf("%s: geometry: %w", c.Source, err)
	}
	return m, nil
}
