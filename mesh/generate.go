package mesh

import (
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"strings"
)

// Diagonal selects how Rectangle splits each grid cell into triangles.
type Diagonal int

const (
	// RightDiagonal splits every cell along the diagonal from its lower left
	// to its upper right corner ("/"): two triangles per cell.
	RightDiagonal Diagonal = iota
	// LeftDiagonal splits every cell along the diagonal from its lower right
	// to its upper left corner ("\"): two triangles per cell.
	LeftDiagonal
	// AlternatingDiagonal uses "/" in cell (i, j) when i+j is even and "\"
	// otherwise, so that the diagonals of every 2×2 block of cells meet at
	// its centre: two triangles per cell, and no preferred direction.
	AlternatingDiagonal
	// CrossedDiagonals adds a vertex at the centre of every cell and splits
	// the cell into four triangles, one per side.
	CrossedDiagonals
)

var diagonalNames = [...]string{"right", "left", "alternating", "crossed"}

// String returns the name of d: "right", "left", "alternating" or "crossed".
func (d Diagonal) String() string {
	if d < 0 || int(d) >= len(diagonalNames) {
		return fmt.Sprintf("Diagonal(%d)", int(d))
	}
	return diagonalNames[d]
}

// DiagonalNames returns the names ParseDiagonal accepts, in the order of the
// Diagonal constants (for command line completion).
func DiagonalNames() []string { return slices.Clone(diagonalNames[:]) }

// ParseDiagonal returns the Diagonal with the given name (see String).
func ParseDiagonal(name string) (Diagonal, error) {
	for i, n := range diagonalNames {
		if n == name {
			return Diagonal(i), nil
		}
	}
	return 0, fmt.Errorf("mesh: unknown diagonal pattern %q; want one of %s", name, strings.Join(diagonalNames[:], ", "))
}

// Tags and names of the sides of a Rectangle mesh.
const (
	TagBottom = 1 // y = y0, named "bottom"
	TagRight  = 2 // x = x1, named "right"
	TagTop    = 3 // y = y1, named "top"
	TagLeft   = 4 // x = x0, named "left"
)

// Rectangle returns a structured mesh of the rectangle [x0, x1] × [y0, y1]
// with nx × ny equal cells, each split into triangles by the given pattern.
//
// Grid vertex (i, j), 0 <= i <= nx, 0 <= j <= ny, is point j(nx+1)+i at
// (x0 + i(x1-x0)/nx, y0 + j(y1-y0)/ny); vertices on the sides x = x1 and
// y = y1 get those coordinates exactly. With CrossedDiagonals the centre of
// cell (i, j) is point (nx+1)(ny+1) + j·nx + i. Triangles are listed cell by
// cell in the same row-major order.
//
// The boundary edges are tagged TagBottom, TagRight, TagTop and TagLeft, named
// "bottom", "right", "top" and "left".
func Rectangle(x0, y0, x1, y1 float64, nx, ny int, pattern Diagonal) (*Mesh, error) {
	for _, c := range []float64{x0, y0, x1, y1} {
		if math.IsNaN(c) || math.IsInf(c, 0) {
			return nil, fmt.Errorf("mesh: rectangle [%g, %g] x [%g, %g] has a non-finite corner", x0, x1, y0, y1)
		}
	}
	if !(x1 > x0) || !(y1 > y0) {
		return nil, fmt.Errorf("mesh: rectangle [%g, %g] x [%g, %g] is empty: want x0 < x1 and y0 < y1", x0, x1, y0, y1)
	}
	if nx < 1 || ny < 1 {
		return nil, fmt.Errorf("mesh: rectangle with %d x %d cells: want at least 1 x 1", nx, ny)
	}
	if pattern < RightDiagonal || pattern > CrossedDiagonals {
		return nil, fmt.Errorf("mesh: unknown diagonal pattern %d", int(pattern))
	}
	if float64(nx)*float64(ny) > 1<<29 {
		return nil, fmt.Errorf("mesh: rectangle with %d x %d cells is too large", nx, ny)
	}
	ng := (nx + 1) * (ny + 1)
	nPoints, perCell := ng, 2
	if pattern == CrossedDiagonals {
		nPoints += nx * ny
		perCell = 4
	}
	coord := func(c0, c1 float64, i, n int) float64 {
		if i == n {
			return c1
		}
		return c0 + float64(i)*(c1-c0)/float64(n)
	}
	points := make([][2]float64, nPoints)
	for j := 0; j <= ny; j++ {
		y := coord(y0, y1, j, ny)
		for i := 0; i <= nx; i++ {
			points[j*(nx+1)+i] = [2]float64{coord(x0, x1, i, nx), y}
		}
	}
	tris := make([][3]int, 0, perCell*nx*ny)
	for j := range ny {
		for i := range nx {
			p00 := j*(nx+1) + i
			p10, p01, p11 := p00+1, p00+nx+1, p00+nx+2
			d := pattern
			if d == AlternatingDiagonal {
				d = RightDiagonal
				if (i+j)%2 == 1 {
					d = LeftDiagonal
				}
			}
			switch d {
			case RightDiagonal:
				tris = append(tris, [3]int{p00, p10, p11}, [3]int{p00, p11, p01})
			case LeftDiagonal:
				tris = append(tris, [3]int{p00, p10, p01}, [3]int{p10, p11, p01})
			case CrossedDiagonals:
				c := ng + j*nx + i
				points[c] = [2]float64{
					(points[p00][0] + points[p10][0]) / 2,
					(points[p00][1] + points[p01][1]) / 2,
				}
				tris = append(tris,
					[3]int{p00, p10, c}, [3]int{p10, p11, c},
					[3]int{p11, p01, c}, [3]int{p01, p00, c})
			}
		}
	}
	m, err := newMesh(points, tris, false)
	if err != nil {
		// Reached only when the cells are so small relative to the
		// coordinates that rounding makes triangles degenerate.
		return nil, fmt.Errorf("mesh: rectangle [%g, %g] x [%g, %g] with %d x %d cells: %w", x0, x1, y0, y1, nx, ny, err)
	}
	// Classify boundary edges by grid index, not by coordinates, so that the
	// tags are exact.
	for e, ed := range m.Edges {
		if m.EdgeTriangles[e][1] >= 0 {
			continue
		}
		ia, ja := ed[0]%(nx+1), ed[0]/(nx+1)
		ib, jb := ed[1]%(nx+1), ed[1]/(nx+1)
		switch {
		case ja == 0 && jb == 0:
			m.EdgeTags[e] = TagBottom
		case ia == nx && ib == nx:
			m.EdgeTags[e] = TagRight
		case ja == ny && jb == ny:
			m.EdgeTags[e] = TagTop
		case ia == 0 && ib == 0:
			m.EdgeTags[e] = TagLeft
		default:
			panic(fmt.Sprintf("mesh: internal error: boundary edge %d-%d is on no side", ed[0], ed[1]))
		}
	}
	m.TagNames[TagBottom] = "bottom"
	m.TagNames[TagRight] = "right"
	m.TagNames[TagTop] = "top"
	m.TagNames[TagLeft] = "left"
	return m, nil
}

// Perturbation limits.
const (
	// perturbTries is how often Perturb tries to move one vertex, halving
	// the radius each time, before leaving it in place.
	perturbTries = 4
	// perturbKeep is the fraction of its original shape measure every
	// triangle keeps under Perturb.
	perturbKeep = 0.5
	// collinearTol is the relative tolerance under which two boundary edges
	// at a vertex count as one straight segment: |sin angle| <= collinearTol.
	collinearTol = 1e-12
)

// Perturb returns a copy of m whose vertices have been moved at random, for
// testing on unstructured meshes. The topology, tags, Parent and orientation
// flag are unchanged.
//
// Each vertex v is moved in turn, in increasing order, by a random
// displacement of length at most amount·h_v, where h_v is the shortest edge
// at v in m and 0 <= amount < 1: uniformly in a disc for interior vertices,
// and uniformly along the boundary line for a boundary vertex whose two
// boundary edges are collinear and carry the same tag. Other boundary
// vertices (corners, ends of tagged segments, vertices where the boundary
// touches itself) stay fixed, so boundary segments stay straight and keep
// their end points and tags.
//
// A move is accepted only if every triangle at v keeps its orientation and at
// least half of its original shape measure q (see Quality). Otherwise the
// radius is halved and a new displacement drawn, up to four times, after
// which the vertex stays in place. The result is therefore always valid, and
// its minimum shape measure is at least half that of m.
//
// The same rng state gives the same result. Perturb returns an error if
// amount is outside [0, 1).
func Perturb(m *Mesh, amount float64, rng *rand.Rand) (*Mesh, error) {
	if rng == nil {
		panic("mesh: Perturb: nil random source")
	}
	if !(amount >= 0 && amount < 1) {
		return nil, fmt.Errorf("mesh: perturbation amount %g is not allowed: want 0 <= amount < 1 (a fraction of the shortest edge at each vertex)", amount)
	}
	out := m.Clone()
	pts := out.Points
	nv := len(pts)

	h := make([]float64, nv)
	for v := range h {
		h[v] = math.Inf(1)
	}
	// Boundary neighbours: for a vertex with exactly two boundary edges,
	// the other end of each and their tags.
	nb := make([]int, nv)
	bn := make([][2]int, nv)
	bt := make([][2]int, nv)
	for e, ed := range m.Edges {
		l := math.Sqrt(sq(pts[ed[0]], pts[ed[1]]))
		h[ed[0]] = min(h[ed[0]], l)
		h[ed[1]] = min(h[ed[1]], l)
		if m.EdgeTriangles[e][1] >= 0 {
			continue
		}
		for k, v := range ed {
			if nb[v] < 2 {
				bn[v][nb[v]] = ed[1-k]
				bt[v][nb[v]] = m.EdgeTags[e]
			}
			nb[v]++
		}
	}

	start, vt := vertexTriangles(m)
	q0 := make([]float64, len(m.Triangles))
	for t, tri := range m.Triangles {
		q0[t] = shape(pts[tri[0]], pts[tri[1]], pts[tri[2]])
	}
	accept := func(v int, c [2]float64) bool {
		for _, t := range vt[start[v]:start[v+1]] {
			var p [3][2]float64
			for i, w := range m.Triangles[t] {
				p[i] = pts[w]
				if w == v {
					p[i] = c
				}
			}
			d := orient(p[0], p[1], p[2])
			if (d > 0) != (m.SignedArea(t) > 0) || d == 0 {
				return false
			}
			if shape(p[0], p[1], p[2]) < perturbKeep*q0[t] {
				return false
			}
		}
		return true
	}

	for v := range nv {
		p := pts[v]
		var tangent [2]float64
		switch nb[v] {
		case 0:
		case 2:
			a, b := pts[bn[v][0]], pts[bn[v][1]]
			ux, uy := a[0]-p[0], a[1]-p[1]
			wx, wy := b[0]-p[0], b[1]-p[1]
			la, lb := math.Hypot(ux, uy), math.Hypot(wx, wy)
			if bt[v][0] != bt[v][1] || ux*wx+uy*wy >= 0 || math.Abs(ux*wy-uy*wx) > collinearTol*la*lb {
				continue
			}
			l := math.Hypot(b[0]-a[0], b[1]-a[1])
			tangent = [2]float64{(b[0] - a[0]) / l, (b[1] - a[1]) / l}
		default:
			continue
		}
		r := amount * h[v]
		for range perturbTries {
			var c [2]float64
			if nb[v] == 0 {
				rho := r * math.Sqrt(rng.Float64())
				phi := 2 * math.Pi * rng.Float64()
				c = [2]float64{p[0] + rho*math.Cos(phi), p[1] + rho*math.Sin(phi)}
			} else {
				s := r * (2*rng.Float64() - 1)
				c = [2]float64{p[0] + s*tangent[0], p[1] + s*tangent[1]}
			}
			if accept(v, c) {
				pts[v] = c
				break
			}
			r /= 2
		}
	}
	return out, nil
}

// vertexTriangles returns the triangles at every vertex in compressed form:
// the triangles at v are tris[start[v]:start[v+1]], in increasing order.
func vertexTriangles(m *Mesh) (start, tris []int) {
	start = make([]int, len(m.Points)+1)
	for _, tri := range m.Triangles {
		for _, v := range tri {
			start[v+1]++
		}
	}
	for v := range len(m.Points) {
		start[v+1] += start[v]
	}
	next := make([]int, len(m.Points))
	copy(next, start)
	tris = make([]int, 3*len(m.Triangles))
	for t, tri := range m.Triangles {
		for _, v := range tri {
			tris[next[v]] = t
			next[v]++
		}
	}
	return start, tris
}
