package results

import (
	"fmt"
	"math"

	"mixwell/casefile"
	"mixwell/mesh"
	"mixwell/plotting"
	"mixwell/simulate"
)

// locate finds x in the mesh. A point exactly on the boundary may be
// missed by a point location with a strict inside test; it is then looked
// up once more a tiny distance (1e-9 of the domain size) toward inner, a
// point inside, and reported at its own place.
func locate(f Sampler, x, inner [2]float64, size float64) (int, [2]float64, bool) {
	if t, xh, ok := f.Locate(x); ok {
		return t, xh, true
	}
	dx, dy := inner[0]-x[0], inner[1]-x[1]
	d := math.Hypot(dx, dy)
	if !(d > 0) {
		return 0, [2]float64{}, false
	}
	eps := 1e-9 * size / d
	return f.Locate([2]float64{x[0] + eps*dx, x[1] + eps*dy})
}

// bounds returns the bounding box of the mesh's vertices.
func bounds(m *mesh.Mesh) (lo, hi [2]float64) {
	lo = [2]float64{math.Inf(1), math.Inf(1)}
	hi = [2]float64{math.Inf(-1), math.Inf(-1)}
	for _, p := range m.Points {
		for k := range 2 {
			lo[k] = math.Min(lo[k], p[k])
			hi[k] = math.Max(hi[k], p[k])
		}
	}
	return lo, hi
}

// CheckProbes returns an error naming the first probe of c that leaves the
// bounding box of m (with a relative margin of 1e-9 of its size): such a
// probe is a mistake (a unit, a sign), and it is cheap to find before a
// long solve. Points inside the box but outside the domain are found only
// when the probe is sampled, and left out with a warning.
func CheckProbes(c *casefile.Case, m *mesh.Mesh) error {
	lo, hi := bounds(m)
	tol := 1e-9 * math.Max(hi[0]-lo[0], hi[1]-lo[1])
	for i, p := range c.Output.Probes {
		for _, end := range []struct {
			key string
			x   [2]float64
			pos casefile.Position
		}{{"from", p.From, p.FromPos}, {"to", p.To, p.ToPos}} {
			x := end.x
			if x[0] < lo[0]-tol || x[0] > hi[0]+tol || x[1] < lo[1]-tol || x[1] > hi[1]+tol {
				where := end.pos
				if where.File == "" {
					where = casefile.Position{File: c.Source}
				}
				return fmt.Errorf("%s: output.probes[%d].%s: probe %q: point (%g, %g) m lies outside the domain, which spans [%g, %g] x [%g, %g] m",
					where, i, end.key, p.Name, x[0], x[1], lo[0], hi[0], lo[1], hi[1])
			}
		}
	}
	return nil
}

// probeSample is a probe sampled at its points inside the domain.
type probeSample struct {
	probe  casefile.Probe
	s      []float64 // distance from the start, m
	x      [][2]float64
	points []*simulate.Point
	left   int // points outside the domain, left out
}

func sampleProbe(f Sampler, p casefile.Probe, size float64) probeSample {
	ps := probeSample{probe: p}
	dx, dy := p.To[0]-p.From[0], p.To[1]-p.From[1]
	length := math.Hypot(dx, dy)
	mid := [2]float64{p.From[0] + dx/2, p.From[1] + dy/2}
	for k := range p.Points {
		a := float64(k) / float64(p.Points-1)
		x := [2]float64{p.From[0] + a*dx, p.From[1] + a*dy}
		if k == p.Points-1 {
			x = p.To
		}
		t, xh, ok := locate(f, x, mid, size)
		if !ok {
			ps.left++
			continue
		}
		pt := f.NewPoint()
		f.SampleTo(pt, t, xh)
		ps.s = append(ps.s, a*length)
		ps.x = append(ps.x, x)
		ps.points = append(ps.points, pt)
	}
	return ps
}

// mapGrid holds the mole fractions and the velocity sampled on a regular
// grid over the bounding box of the mesh, at the centres of nx x ny equal
// cells; NaN marks points outside the domain.
type mapGrid struct {
	nx, ny int
	x0, y0 float64     // first sample point, m
	dx, dy float64     // spacing, m
	x      [][]float64 // x[i][k]: mole fraction of species i at sample k
	vx, vy []float64
}

// gridShape returns the numbers of cells along x and y for a box of
// width w and height h: long cells along the longer side, the other in
// proportion, at least lo.
func gridShape(w, h float64, long, lo int) (nx, ny int) {
	if w >= h {
		return long, max(lo, int(math.Round(float64(long)*h/w)))
	}
	return max(lo, int(math.Round(float64(long)*w/h))), long
}

// sampleGrid samples f at the centres of the cells of an nx x ny grid over
// the box [lo, hi].
func sampleGrid(f Sampler, species int, lo, hi [2]float64, nx, ny int) mapGrid {
	g := mapGrid{nx: nx, ny: ny, dx: (hi[0] - lo[0]) / float64(nx), dy: (hi[1] - lo[1]) / float64(ny)}
	g.x0, g.y0 = lo[0]+g.dx/2, lo[1]+g.dy/2
	nan := func() []float64 {
		v := make([]float64, nx*ny)
		for k := range v {
			v[k] = math.NaN()
		}
		return v
	}
	g.x = make([][]float64, species)
	for i := range g.x {
		g.x[i] = nan()
	}
	g.vx, g.vy = nan(), nan()
	pt := f.NewPoint()
	for j := range ny {
		for i := range nx {
			x := [2]float64{g.x0 + float64(i)*g.dx, g.y0 + float64(j)*g.dy}
			t, xh, ok := f.Locate(x)
			if !ok {
				continue
			}
			f.SampleTo(pt, t, xh)
			k := j*nx + i
			for s := range species {
				g.x[s][k] = pt.MoleFraction[s]
			}
			g.vx[k], g.vy[k] = pt.V[0], pt.V[1]
		}
	}
	return g
}

// grid returns values on g as a plotting grid, coordinates multiplied by
// scale (to the length unit of the figure).
func (g mapGrid) grid(values []float64, scale float64) plotting.Grid {
	return plotting.Grid{NX: g.nx, NY: g.ny, X0: g.x0 * scale, Y0: g.y0 * scale,
		DX: g.dx * scale, DY: g.dy * scale, Values: values}
}

// vtuData samples the quantities at the vertices of the sub-triangulation
// and returns the sub-mesh, its point fields and whether it is broken.
func vtuData(c *casefile.Case, m *mesh.Mesh, f Sampler, qs []quantity) (*mesh.Mesh, []mesh.Field, bool) {
	n := max(1, c.Output.Subdivision)
	broken := !continuousOnly(c)
	var sub *mesh.Mesh
	var at []mesh.SubPoint
	if broken {
		sub, at = mesh.SubdivideBroken(m, n)
	} else {
		sub, at = mesh.Subdivide(m, n)
	}
	fields := make([]mesh.Field, len(qs))
	for k, q := range qs {
		fields[k] = mesh.Field{Name: q.name, Components: q.components, Data: make([]float64, q.components*len(at))}
	}
	pt := f.NewPoint()
	for v, sp := range at {
		f.SampleTo(pt, sp.Triangle, sp.Ref)
		for k, q := range qs {
			nc := q.components
			q.get(pt, fields[k].Data[nc*v:nc*v+nc])
		}
	}
	return sub, fields, broken
}
