package mesh_test

import (
	"bytes"
	"fmt"
	"log"
	"math/rand/v2"
	"os"
	"strings"

	"mixwell/mesh"
)

func ExampleRectangle() {
	m, err := mesh.Rectangle(0, 0, 2, 1, 4, 2, mesh.AlternatingDiagonal)
	if err != nil {
		log.Fatal(err)
	}
	fmt.Println("points, edges, triangles:", m.NumPoints(), m.NumEdges(), m.NumTriangles())
	for _, tag := range m.Tags() {
		fmt.Printf("tag %d %-6s %d edges\n", tag, m.TagNames[tag], len(m.BoundaryEdges(tag)))
	}
	fmt.Printf("h = %.4f\n", m.MaxEdgeLength())
	// Output:
	// points, edges, triangles: 15 30 16
	// tag 1 bottom 4 edges
	// tag 2 right  2 edges
	// tag 3 top    4 edges
	// tag 4 left   2 edges
	// h = 0.7071
}

func ExampleNew() {
	// The unit square as two counter-clockwise triangles.
	points := [][2]float64{{0, 0}, {1, 0}, {1, 1}, {0, 1}}
	m, err := mesh.New(points, [][3]int{{0, 1, 2}, {0, 2, 3}})
	if err != nil {
		log.Fatal(err)
	}
	for e, ed := range m.Edges {
		fmt.Println("edge", e, ed, "triangles", m.EdgeTriangles[e], "tag", m.EdgeTags[e])
	}
	fmt.Println("triangle 1 local edges:", m.TriangleEdges[1])

	// A clockwise triangle is an error.
	_, err = mesh.New(points, [][3]int{{0, 1, 2}, {0, 3, 2}})
	fmt.Println(err)
	// Output:
	// edge 0 [0 1] triangles [0 -1] tag 1
	// edge 1 [0 2] triangles [0 1] tag 0
	// edge 2 [0 3] triangles [1 -1] tag 1
	// edge 3 [1 2] triangles [0 -1] tag 1
	// edge 4 [2 3] triangles [1 -1] tag 1
	// triangle 1 local edges: [4 2 1]
	// mesh: triangle 1 (vertices 0 3 2) is clockwise (inverted): signed area -0.5; triangles must be counter-clockwise
}

func ExampleMesh_TagBoundary() {
	m, err := mesh.Rectangle(0, 0, 4, 1, 8, 2, mesh.RightDiagonal)
	if err != nil {
		log.Fatal(err)
	}
	// An inlet on the first quarter of the bottom side.
	inlet := func(a, b [2]float64) bool { return a[1] == 0 && b[1] == 0 && max(a[0], b[0]) <= 1 }
	if err := m.TagBoundary(5, "inlet", inlet); err != nil {
		log.Fatal(err)
	}
	tag, err := m.TagByName("inlet")
	if err != nil {
		log.Fatal(err)
	}
	fmt.Println("inlet edges:", m.BoundaryEdges(tag), "bottom edges:", len(m.BoundaryEdges(mesh.TagBottom)))
	_, err = m.TagByName("outlet")
	fmt.Println(err)
	// Output:
	// inlet edges: [0 3] bottom edges: 6
	// mesh: no boundary tag named "outlet"; known names: bottom, inlet, left, right, top
}

func ExampleRefine() {
	m, err := mesh.Rectangle(0, 0, 1, 1, 1, 1, mesh.RightDiagonal)
	if err != nil {
		log.Fatal(err)
	}
	for range 3 {
		m = mesh.Refine(m)
		q := m.Quality()
		fmt.Printf("T = %3d  E = %3d  h = %.4f  min angle %.0f\n", q.Triangles, q.Edges, q.MaxEdge, q.MinAngle)
	}
	// Output:
	// T =   8  E =  16  h = 0.7071  min angle 45
	// T =  32  E =  56  h = 0.3536  min angle 45
	// T = 128  E = 208  h = 0.1768  min angle 45
}

func ExampleBarycentricSplit() {
	m, err := mesh.Rectangle(0, 0, 1, 1, 2, 2, mesh.RightDiagonal)
	if err != nil {
		log.Fatal(err)
	}
	s := mesh.BarycentricSplit(m)
	fmt.Println("triangles:", m.NumTriangles(), "->", s.NumTriangles())
	fmt.Println("children of triangle 0:", s.Triangles[0:3], "parent", s.Parent[0:3])
	// Output:
	// triangles: 8 -> 24
	// children of triangle 0: [[1 4 9] [4 0 9] [0 1 9]] parent [0 0 0]
}

func ExamplePerturb() {
	m, err := mesh.Rectangle(0, 0, 1, 1, 8, 8, mesh.CrossedDiagonals)
	if err != nil {
		log.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(1, 2))
	p, err := mesh.Perturb(m, 0.3, rng)
	if err != nil {
		log.Fatal(err)
	}
	q0, q := m.Quality(), p.Quality()
	fmt.Println("valid:", p.Validate() == nil)
	fmt.Println("shape kept above half:", q.MinShape >= q0.MinShape/2)
	fmt.Printf("area: %.12f\n", q.Area)
	// Output:
	// valid: true
	// shape kept above half: true
	// area: 1.000000000000
}

func ExampleMesh_PermuteLocalVertices() {
	m, err := mesh.Rectangle(0, 0, 1, 1, 10, 10, mesh.RightDiagonal)
	if err != nil {
		log.Fatal(err)
	}
	p := m.PermuteLocalVertices(rand.New(rand.NewPCG(1, 2)))
	cw := 0
	for t := range p.Triangles {
		if p.SignedArea(t) < 0 {
			cw++
		}
	}
	fmt.Println("mixed:", p.MixedOrientation, "valid:", p.Validate() == nil, "some clockwise:", cw > 0 && cw < p.NumTriangles())
	// Output:
	// mixed: true valid: true some clockwise: true
}

func ExampleWrite() {
	m, err := mesh.Rectangle(0, 0, 1, 0.5, 1, 1, mesh.RightDiagonal)
	if err != nil {
		log.Fatal(err)
	}
	if err := mesh.Write(os.Stdout, m); err != nil {
		log.Fatal(err)
	}
	// Output:
	// mixwell-mesh 1
	// # 4 points, 2 triangles, 5 edges, 4 boundary edges
	// points 4
	// 0 0
	// 1 0
	// 0 0.5
	// 1 0.5
	// triangles 2
	// 0 1 3
	// 0 3 2
	// boundary 4
	// 0 1 1
	// 0 2 4
	// 1 3 2
	// 2 3 3
	// tag 1 bottom
	// tag 2 right
	// tag 3 top
	// tag 4 left
}

func ExampleRead() {
	const text = `mixwell-mesh 1
points 3
0 0
1 0
0 1
triangles 1
0 1 2
boundary 1
1 2 7   # the hypotenuse
tag 7 slope
`
	m, err := mesh.Read(strings.NewReader(text))
	if err != nil {
		log.Fatal(err)
	}
	fmt.Println("tags:", m.Tags(), "names:", m.TagNames)
	_, err = mesh.Read(strings.NewReader("mixwell-mesh 1\npoints 3\n0 0\n1 0\n0 one\n"))
	fmt.Println(err)
	// Output:
	// tags: [1 7] names: map[7:slope]
	// mesh: line 5: coordinate "one" of point 2 is not a number
}

func ExampleSubdivide() {
	m, err := mesh.Rectangle(0, 0, 1, 1, 1, 1, mesh.RightDiagonal)
	if err != nil {
		log.Fatal(err)
	}
	// Output points for a quadratic field: one per quadratic node.
	s, sub := mesh.Subdivide(m, 2)
	fmt.Println("points:", s.NumPoints(), "triangles:", s.NumTriangles())
	for v := range s.Points {
		fmt.Printf("point %d at %v is triangle %d at %v\n", v, s.Points[v], sub[v].Triangle, sub[v].Ref)
	}
	// Output:
	// points: 9 triangles: 8
	// point 0 at [0 0] is triangle 0 at [0 0]
	// point 1 at [1 0] is triangle 0 at [1 0]
	// point 2 at [0 1] is triangle 1 at [0 1]
	// point 3 at [1 1] is triangle 0 at [0 1]
	// point 4 at [0.5 0] is triangle 0 at [0.5 0]
	// point 5 at [0 0.5] is triangle 1 at [0 0.5]
	// point 6 at [0.5 0.5] is triangle 0 at [0 0.5]
	// point 7 at [1 0.5] is triangle 0 at [0.5 0.5]
	// point 8 at [0.5 1] is triangle 1 at [0.5 0.5]
}

func ExampleWriteVTU() {
	m, err := mesh.Rectangle(0, 0, 1, 1, 1, 1, mesh.RightDiagonal)
	if err != nil {
		log.Fatal(err)
	}
	speed := mesh.Field{Name: "velocity", Components: 2, Data: []float64{0, 0, 1, 0, 0, 1, 1, 1}}
	var buf bytes.Buffer
	if err := mesh.WriteVTU(&buf, m, []mesh.Field{speed}, nil); err != nil {
		log.Fatal(err)
	}
	lines := strings.Split(buf.String(), "\n")
	fmt.Println(strings.Join(lines[:10], "\n"))
	// Output:
	// <?xml version="1.0"?>
	// <VTKFile type="UnstructuredGrid" version="1.0" byte_order="LittleEndian" header_type="UInt64">
	//   <UnstructuredGrid>
	//     <Piece NumberOfPoints="4" NumberOfCells="2">
	//       <PointData>
	//         <DataArray type="Float64" Name="velocity" NumberOfComponents="3" format="ascii">
	//           0 0 0
	//           1 0 0
	//           0 1 0
	//           1 1 0
}
