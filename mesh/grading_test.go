package mesh

import (
	"math"
	"testing"
)

func TestBoundaryLayerThickness(t *testing.T) {
	const tol = 1e-14 // relative
	for _, c := range []struct {
		l    BoundaryLayer
		want float64 // closed form First·(Growth^L - 1)/(Growth - 1)
	}{
		{BoundaryLayer{Tag: 1, First: 1e-3, Growth: 2, Layers: 4}, 1e-3 * 15},
		{BoundaryLayer{Tag: 1, First: 0.5, Growth: 1, Layers: 3}, 1.5},
		{BoundaryLayer{Tag: 1, First: 1e-6, Growth: 1 / 0.3, Layers: 10}, 1e-6 * (math.Pow(1/0.3, 10) - 1) / (1/0.3 - 1)},
	} {
		if got := c.l.Thickness(); math.Abs(got-c.want) > tol*c.want {
			t.Errorf("%+v: thickness %.17g, want %.17g", c.l, got, c.want)
		}
		// h at the inner edge of layer k is the thickness of layer k.
		for k := 1; k <= c.l.Layers; k++ {
			inner := BoundaryLayer{Tag: 1, First: c.l.First, Growth: c.l.Growth, Layers: k - 1}
			d := 0.0
			if k > 1 {
				d = inner.Thickness()
			}
			want := c.l.First * math.Pow(c.l.Growth, float64(k-1))
			if got := c.l.Size(d); math.Abs(got-want) > 1e-12*want {
				t.Errorf("%+v: size at the inner edge of layer %d is %g, want %g", c.l, k, got, want)
			}
		}
		if got := c.l.Size(1.0001 * c.want); !math.IsInf(got, 1) {
			t.Errorf("%+v: size beyond the layers %g, want +Inf", c.l, got)
		}
	}
}

// TestBoundaryLayerGrading meshes the unit square graded toward its bottom
// side and checks, layer by layer, that the triangles follow the geometric
// law: a triangle whose nearest vertex lies in layer k (distance in
// [d_{k-1}, d_k)) has longest edge at most Growth·h_k, h_k = First·Growth^(k-1)
// (guaranteed: the bound is h(d) < h(d_k) = h_{k+1}) and at least h_k/2
// (observed, not guaranteed: refinement stops once a triangle is small
// enough, and splitting roughly halves sizes). Triangles near the ends of
// the side, where the graded region is rounded, are skipped. The minimum
// angle must hold everywhere.
func TestBoundaryLayerGrading(t *testing.T) {
	const lowFactor = 0.5 // observed minimum about 0.6
	const upTol = 1e-9    // relative, rounding
	for _, c := range []struct {
		name     string
		layer    BoundaryLayer
		minAngle float64
	}{
		{"growth 1.5", BoundaryLayer{Tag: 1, First: 1e-3, Growth: 1.5, Layers: 10}, 30},
		{"growth 2", BoundaryLayer{Tag: 1, First: 2e-4, Growth: 2, Layers: 8}, 28},
		{"growth 1.2", BoundaryLayer{Tag: 1, First: 2e-3, Growth: 1.2, Layers: 12}, 25},
		{"growth 1/0.3", BoundaryLayer{Tag: 1, First: 1e-3, Growth: 1 / 0.3, Layers: 4}, 25},
		{"uniform", BoundaryLayer{Tag: 1, First: 5e-3, Growth: 1, Layers: 4}, 30},
	} {
		d := &Domain{Outer: [][2]float64{{0, 0}, {1, 0}, {1, 1}, {0, 1}}, OuterTags: []int{1, 2, 2, 2}}
		m, err := Triangulate(d, &QualityOptions{MinAngle: c.minAngle, Layers: []BoundaryLayer{c.layer}})
		if err != nil {
			t.Errorf("%s: %v", c.name, err)
			continue
		}
		if err := m.Validate(); err != nil {
			t.Errorf("%s: invalid mesh: %v", c.name, err)
		}
		if q := m.Quality(); q.MinAngle < c.minAngle-1e-9 {
			t.Errorf("%s: minimum angle %.4f, want >= %g", c.name, q.MinAngle, c.minAngle)
		}
		L := c.layer
		edges := make([]float64, L.Layers+1) // d_0 .. d_L
		for k := 1; k <= L.Layers; k++ {
			edges[k] = BoundaryLayer{Tag: 1, First: L.First, Growth: L.Growth, Layers: k}.Thickness()
		}
		count := make([]int, L.Layers)
		lo := make([]float64, L.Layers)
		hi := make([]float64, L.Layers)
		for k := range lo {
			lo[k] = math.Inf(1)
		}
		for tr, tri := range m.Triangles {
			if c := m.Centroid(tr); c[0] < 0.2 || c[0] > 0.8 {
				continue
			}
			dist := math.Inf(1)
			for _, v := range tri {
				dist = min(dist, m.Points[v][1])
			}
			k := 0
			for k < L.Layers && dist >= edges[k+1] {
				k++
			}
			if k == L.Layers {
				continue
			}
			s := m.Diameter(tr)
			count[k]++
			lo[k] = min(lo[k], s)
			hi[k] = max(hi[k], s)
		}
		for k := range L.Layers {
			hk := L.First * math.Pow(L.Growth, float64(k))
			if count[k] == 0 {
				t.Errorf("%s: no triangle in layer %d", c.name, k+1)
				continue
			}
			if hi[k] > L.Growth*hk*(1+upTol) {
				t.Errorf("%s: layer %d: longest edge %.4g = %.3f h_k, want <= growth·h_k = %.3f h_k", c.name, k+1, hi[k], hi[k]/hk, L.Growth)
			}
			if lo[k] < lowFactor*hk {
				t.Errorf("%s: layer %d: a triangle of size %.4g = %.3f h_k, want >= %g h_k", c.name, k+1, lo[k], lo[k]/hk, lowFactor)
			}
		}
		t.Logf("%s: %d triangles; layer 1: %d triangles of size %.3f..%.3f h_1", c.name, m.NumTriangles(), count[0], lo[0]/L.First, hi[0]/L.First)
	}
}
