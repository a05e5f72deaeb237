package mesh

import "fmt"

// SubPoint locates a vertex of a subdivided mesh in the source mesh.
type SubPoint struct {
	// Triangle is a triangle of the source mesh containing the vertex.
	Triangle int
	// Ref holds the reference coordinates (xi, eta) of the vertex in
	// Triangle, in that triangle's local vertex order:
	// x = (1-xi-eta)·x0 + xi·x1 + eta·x2, so the barycentric coordinates are
	// (1-xi-eta, xi, eta). They are multiples of 1/n.
	Ref [2]float64
}

// latticeIndex numbers the points (i, j), i, j >= 0, i+j <= n, of the
// degree-n lattice of a triangle row by row.
func latticeIndex(i, j, n int) int { return j*(n+1) - j*(j-1)/2 + i }

// subTriangles calls f with the lattice corners of the n² sub-triangles of
// the degree-n lattice, each with the orientation of the parent: "upward"
// (i, j), (i+1, j), (i, j+1) and "downward" (i+1, j), (i+1, j+1), (i, j+1).
func subTriangles(n int, f func(a, b, c [2]int)) {
	for j := range n {
		for i := 0; i+j < n; i++ {
			f([2]int{i, j}, [2]int{i + 1, j}, [2]int{i, j + 1})
			if i+j <= n-2 {
				f([2]int{i + 1, j}, [2]int{i + 1, j + 1}, [2]int{i, j + 1})
			}
		}
	}
}

// Subdivide returns the mesh in which every triangle of m is split into n²
// similar triangles by the lattice of points with reference coordinates
// (i/n, j/n), and for every vertex of it a triangle of m and the reference
// coordinates there. It is meant for output: a field of degree at most n on
// every triangle of m, evaluated at the returned SubPoints, is represented by
// piecewise linear interpolation on the result with no loss at the vertices.
//
// Vertices at the same place are merged: vertices of m keep their indices,
// then come the n-1 points of every edge e of m (in the edge's global
// direction, points V + e(n-1) + k), then the (n-1)(n-2)/2 interior points of
// every triangle. This suits continuous fields. A discontinuous field
// evaluated at a shared vertex takes its value from the one triangle named in
// SubPoint; use SubdivideBroken to see both sides of a jump.
//
// Sub-triangles of triangle t of m are n²t .. n²t+n²-1, with t's orientation;
// Parent[k] = k / n². Sub-edges of a boundary edge inherit its tag; TagNames
// and MixedOrientation are kept. Subdivide panics if n < 1 or m does not
// satisfy the invariants checked by Validate.
func Subdivide(m *Mesh, n int) (*Mesh, []SubPoint) {
	if n < 1 {
		panic(fmt.Sprintf("mesh: Subdivide: n = %d, want n >= 1", n))
	}
	nv, ne, nt := len(m.Points), len(m.Edges), len(m.Triangles)
	perEdge, perTri := n-1, (n-1)*(n-2)/2
	total := nv + ne*perEdge + nt*perTri
	pts := make([][2]float64, total)
	sub := make([]SubPoint, total)
	done := make([]bool, total)
	copy(pts, m.Points)
	for e, ed := range m.Edges {
		a, b := m.Points[ed[0]], m.Points[ed[1]]
		for k := 1; k < n; k++ {
			s := float64(k) / float64(n)
			pts[nv+e*perEdge+k-1] = [2]float64{a[0] + s*(b[0]-a[0]), a[1] + s*(b[1]-a[1])}
		}
	}

	local := make([]int, (n+1)*(n+2)/2)
	tris := make([][3]int, 0, n*n*nt)
	next := nv + ne*perEdge
	for t, tri := range m.Triangles {
		te := m.TriangleEdges[t]
		local[latticeIndex(0, 0, n)] = tri[0]
		local[latticeIndex(n, 0, n)] = tri[1]
		local[latticeIndex(0, n, n)] = tri[2]
		for k := 1; k < n; k++ {
			// Local edge i runs from local vertex i+1 to i+2.
			along := [3][2]int{{n - k, k}, {0, n - k}, {k, 0}}
			for i := range 3 {
				e := te[i]
				g := nv + e*perEdge + k - 1
				if m.Edges[e][0] != tri[(i+1)%3] {
					g = nv + e*perEdge + n - 1 - k
				}
				local[latticeIndex(along[i][0], along[i][1], n)] = g
			}
		}
		for j := 1; j < n; j++ {
			for i := 1; i+j < n; i++ {
				g := next
				next++
				a, b, c := m.Points[tri[0]], m.Points[tri[1]], m.Points[tri[2]]
				xi, eta := float64(i)/float64(n), float64(j)/float64(n)
				pts[g] = [2]float64{
					a[0] + xi*(b[0]-a[0]) + eta*(c[0]-a[0]),
					a[1] + xi*(b[1]-a[1]) + eta*(c[1]-a[1]),
				}
				local[latticeIndex(i, j, n)] = g
			}
		}
		for j := 0; j <= n; j++ {
			for i := 0; i+j <= n; i++ {
				g := local[latticeIndex(i, j, n)]
				if !done[g] {
					done[g] = true
					sub[g] = SubPoint{Triangle: t, Ref: [2]float64{float64(i) / float64(n), float64(j) / float64(n)}}
				}
			}
		}
		subTriangles(n, func(a, b, c [2]int) {
			tris = append(tris, [3]int{
				local[latticeIndex(a[0], a[1], n)],
				local[latticeIndex(b[0], b[1], n)],
				local[latticeIndex(c[0], c[1], n)],
			})
		})
	}

	out := mustAssemble("Subdivide", pts, tris, m.MixedOrientation)
	for e, tag := range m.EdgeTags {
		if tag == 0 {
			continue
		}
		prev := m.Edges[e][0]
		for k := 1; k <= n; k++ {
			cur := m.Edges[e][1]
			if k < n {
				cur = nv + e*perEdge + k - 1
			}
			out.EdgeTags[out.mustEdge(prev, cur)] = tag
			prev = cur
		}
	}
	out.TagNames = cloneNames(m.TagNames)
	out.Parent = parentsOf(nt, n*n)
	return out, sub
}

// SubdivideBroken is Subdivide without merging: every triangle of m gets its
// own (n+1)(n+2)/2 vertices, numbered (n+1)(n+2)/2·t + latticeIndex, so the
// SubPoints of a triangle's vertices all name that triangle and a
// discontinuous field can be written with the values of each side. The
// result is a valid mesh made of one connected piece per triangle of m:
// sub-edges on boundary edges of m inherit their tags, and those on interior
// edges of m, now boundary edges too, get DefaultTag.
func SubdivideBroken(m *Mesh, n int) (*Mesh, []SubPoint) {
	if n < 1 {
		panic(fmt.Sprintf("mesh: SubdivideBroken: n = %d, want n >= 1", n))
	}
	nt := len(m.Triangles)
	np := (n + 1) * (n + 2) / 2
	pts := make([][2]float64, np*nt)
	sub := make([]SubPoint, np*nt)
	tris := make([][3]int, 0, n*n*nt)
	for t, tri := range m.Triangles {
		a, b, c := m.Points[tri[0]], m.Points[tri[1]], m.Points[tri[2]]
		for j := 0; j <= n; j++ {
			for i := 0; i+j <= n; i++ {
				g := np*t + latticeIndex(i, j, n)
				xi, eta := float64(i)/float64(n), float64(j)/float64(n)
				switch {
				case i == 0 && j == 0:
					pts[g] = a
				case i == n:
					pts[g] = b
				case j == n:
					pts[g] = c
				default:
					pts[g] = [2]float64{
						a[0] + xi*(b[0]-a[0]) + eta*(c[0]-a[0]),
						a[1] + xi*(b[1]-a[1]) + eta*(c[1]-a[1]),
					}
				}
				sub[g] = SubPoint{Triangle: t, Ref: [2]float64{xi, eta}}
			}
		}
		subTriangles(n, func(p, q, r [2]int) {
			tris = append(tris, [3]int{
				np*t + latticeIndex(p[0], p[1], n),
				np*t + latticeIndex(q[0], q[1], n),
				np*t + latticeIndex(r[0], r[1], n),
			})
		})
	}
	out := mustAssemble("SubdivideBroken", pts, tris, m.MixedOrientation)
	for t := range m.Triangles {
		for i, e := range m.TriangleEdges[t] {
			tag := m.EdgeTags[e]
			if tag == 0 {
				continue
			}
			// Lattice points of local edge i, from local vertex i+1 to i+2.
			prev := -1
			for k := 0; k <= n; k++ {
				var l int
				switch i {
				case 0:
					l = latticeIndex(n-k, k, n)
				case 1:
					l = latticeIndex(0, n-k, n)
				case 2:
					l = latticeIndex(k, 0, n)
				}
				cur := np*t + l
				if prev >= 0 {
					out.EdgeTags[out.mustEdge(prev, cur)] = tag
				}
				prev = cur
			}
		}
	}
	out.TagNames = cloneNames(m.TagNames)
	out.Parent = parentsOf(nt, n*n)
	return out, sub
}
