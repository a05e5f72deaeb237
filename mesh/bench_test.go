package mesh

import (
	"bytes"
	"io"
	"testing"
)

// Sinks keep the compiler from discarding benchmarked work.
var (
	sinkMesh    *Mesh
	sinkSub     []SubPoint
	sinkQuality Quality
	sinkErr     error
)

// benchmarkRefine refines a right-diagonal rectangle of 2·nx·ny triangles
// once, giving 8·nx·ny.
func benchmarkRefine(b *testing.B, nx, ny int) {
	m := mustRectangle(b, 0, 0, 2, 1, nx, ny, RightDiagonal)
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		sinkMesh = Refine(m)
	}
}

func BenchmarkRefineRectangle64K(b *testing.B) { benchmarkRefine(b, 128, 64) }
func BenchmarkRefineRectangle1M(b *testing.B)  { benchmarkRefine(b, 500, 250) }

func BenchmarkNewRectangle1M(b *testing.B) {
	m := mustRectangle(b, 0, 0, 2, 1, 1000, 500, RightDiagonal)
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		sinkMesh, sinkErr = New(m.Points, m.Triangles)
	}
}

func BenchmarkBarycentricSplitRectangle1M(b *testing.B) {
	m := mustRectangle(b, 0, 0, 2, 1, 500, 333, RightDiagonal) // 333 000 -> 999 000
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		sinkMesh = BarycentricSplit(m)
	}
}

func BenchmarkSubdivideRectangle1M(b *testing.B) {
	m := mustRectangle(b, 0, 0, 2, 1, 250, 125, RightDiagonal) // 62 500 -> 1 000 000
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		sinkMesh, sinkSub = Subdivide(m, 4)
	}
}

func BenchmarkValidateRectangle1M(b *testing.B) {
	m := mustRectangle(b, 0, 0, 2, 1, 1000, 500, RightDiagonal)
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		sinkErr = m.Validate()
	}
}

func BenchmarkQualityRectangle1M(b *testing.B) {
	m := mustRectangle(b, 0, 0, 2, 1, 1000, 500, RightDiagonal)
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		sinkQuality = m.Quality()
	}
}

func BenchmarkPerturbRectangle1M(b *testing.B) {
	m := mustRectangle(b, 0, 0, 2, 1, 1000, 500, AlternatingDiagonal)
	rng := newRNG(1)
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		sinkMesh, sinkErr = Perturb(m, 0.3, rng)
	}
}

func BenchmarkWriteRectangle1M(b *testing.B) {
	m := mustRectangle(b, 0, 0, 2, 1, 1000, 500, RightDiagonal)
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		sinkErr = Write(io.Discard, m)
	}
}

func BenchmarkReadRectangle1M(b *testing.B) {
	m := mustRectangle(b, 0, 0, 2, 1, 1000, 500, RightDiagonal)
	var buf bytes.Buffer
	if err := Write(&buf, m); err != nil {
		b.Fatal(err)
	}
	data := buf.Bytes()
	b.SetBytes(int64(len(data)))
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		sinkMesh, sinkErr = Read(bytes.NewReader(data))
	}
}

func benchmarkWriteVTU(b *testing.B, write func(io.Writer, *Mesh, []Field, []Field) error) {
	m := mustRectangle(b, 0, 0, 2, 1, 1000, 500, RightDiagonal)
	v := Field{Name: "velocity", Components: 2, Data: make([]float64, 2*m.NumPoints())}
	for i, p := range m.Points {
		v.Data[2*i], v.Data[2*i+1] = p[1], -p[0]
	}
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		sinkErr = write(io.Discard, m, []Field{v}, nil)
	}
}

func BenchmarkWriteVTURectangle1M(b *testing.B)       { benchmarkWriteVTU(b, WriteVTU) }
func BenchmarkWriteVTUBinaryRectangle1M(b *testing.B) { benchmarkWriteVTU(b, WriteVTUBinary) }
