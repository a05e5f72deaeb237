package mesh

import "testing"

// benchmarkTriangulateSquareHole meshes the unit square minus [1/4, 3/4]²
// (area 3/4) with the default minimum angle and the given area bound, and
// reports the number of triangles.
func benchmarkTriangulateSquareHole(b *testing.B, maxArea float64) {
	d := squareHole()
	opts := &QualityOptions{MaxArea: maxArea}
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		sinkMesh, sinkErr = Triangulate(d, opts)
	}
	b.StopTimer()
	if sinkErr != nil {
		b.Fatal(sinkErr)
	}
	b.ReportMetric(float64(sinkMesh.NumTriangles()), "triangles")
}

func BenchmarkTriangulateSquareHole10k(b *testing.B)  { benchmarkTriangulateSquareHole(b, 1.2e-4) }
func BenchmarkTriangulateSquareHole100k(b *testing.B) { benchmarkTriangulateSquareHole(b, 1.2e-5) }

func BenchmarkDelaunayRandom10k(b *testing.B) {
	rng := newRNG(3)
	pts := make([][2]float64, 10000)
	for i := range pts {
		pts[i] = [2]float64{rng.Float64(), rng.Float64()}
	}
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		sinkMesh, sinkErr = Delaunay(pts)
	}
	b.StopTimer()
	if sinkErr != nil {
		b.Fatal(sinkErr)
	}
	b.ReportMetric(float64(sinkMesh.NumTriangles()), "triangles")
}
