package simulate

import (
	"math"

	"mixwell/fem"
	"mixwell/mesh"
)

// locator finds the triangle that contains a point with a uniform grid of
// buckets over the mesh's bounding box; each bucket lists the triangles
// whose bounding boxes meet it.
type locator struct {
	m        *mesh.Mesh
	lo       [2]float64
	cell     [2]float64
	nx, ny   int
	buckets  [][]int
	tol      float64
	inverses []fem.Affine
}

func newLocator(m *mesh.Mesh) *locator {
	l := &locator{m: m}
	lo, hi := m.Points[0], m.Points[0]
	for _, p := range m.Points {
		lo = [2]float64{math.Min(lo[0], p[0]), math.Min(lo[1], p[1])}
		hi = [2]float64{math.Max(hi[0], p[0]), math.Max(hi[1], p[1])}
	}
	nt := m.NumTriangles()
	side := int(math.Ceil(math.Sqrt(float64(nt)/2))) + 1
	l.nx, l.ny = side, side
	l.lo = lo
	l.cell = [2]float64{(hi[0] - lo[0]) / float64(side), (hi[1] - lo[1]) / float64(side)}
	l.tol = 1e-10
	l.buckets = make([][]int, side*side)
	l.inverses = make([]fem.Affine, nt)
	for t := 0; t < nt; t++ {
		l.inverses[t] = fem.ElementMap(m, t)
		tri := m.Triangles[t]
		blo, bhi := m.Points[tri[0]], m.Points[tri[0]]
		for _, v := range tri[1:] {
			p := m.Points[v]
			blo = [2]float64{math.Min(blo[0], p[0]), math.Min(blo[1], p[1])}
			bhi = [2]float64{math.Max(bhi[0], p[0]), math.Max(bhi[1], p[1])}
		}
		i0, j0 := l.index(blo)
		i1, j1 := l.index(bhi)
		for j := j0; j <= j1; j++ {
			for i := i0; i <= i1; i++ {
				l.buckets[j*l.nx+i] = append(l.buckets[j*l.nx+i], t)
			}
		}
	}
	return l
}

func (l *locator) index(x [2]float64) (int, int) {
	i := int(math.Floor((x[0] - l.lo[0]) / l.cell[0]))
	j := int(math.Floor((x[1] - l.lo[1]) / l.cell[1]))
	return min(max(i, 0), l.nx-1), min(max(j, 0), l.ny-1)
}

// find returns a triangle containing x (within a relative tolerance, so
// that points on edges and on the boundary are found) and the reference
// coordinates of x there.
func (l *locator) find(x [2]float64) (int, [2]float64, bool) {
	i, j := l.index(x)
	if x[0] < l.lo[0]-l.tol*l.cell[0]*float64(l.nx) || x[1] < l.lo[1]-l.tol*l.cell[1]*float64(l.ny) {
		return -1, [2]float64{}, false
	}
	best, bestOut := -1, math.Inf(1)
	var bestRef [2]float64
	for _, t := range l.buckets[j*l.nx+i] {
		r := l.inverses[t].Reference(x)
		// Largest violation of the reference triangle's inequalities.
		out := math.Max(math.Max(-r[0], -r[1]), r[0]+r[1]-1)
		if out < bestOut {
			best, bestOut, bestRef = t, out, r
		}
	}
	if best < 0 || bestOut > 1e-9 {
		return -1, [2]float64{}, false
	}
	return best, bestRef, true
}
