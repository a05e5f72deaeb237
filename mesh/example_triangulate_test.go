package mesh_test

import (
	"fmt"
	"log"

	"mixwell/mesh"
)

func ExampleTriangulate() {
	// An L-shaped channel: inlet on the top of the upper arm, outlet on
	// the right of the lower arm, walls elsewhere.
	d := &mesh.Domain{
		Outer:     [][2]float64{{0, 0}, {2, 0}, {2, 1}, {1, 1}, {1, 2}, {0, 2}},
		OuterTags: []int{1, 2, 1, 1, 3, 1},
		TagNames:  map[int]string{1: "wall", 2: "outlet", 3: "inlet"},
	}
	m, err := mesh.Triangulate(d, &mesh.QualityOptions{MinAngle: 30, MaxArea: 0.01})
	if err != nil {
		log.Fatal(err)
	}
	q := m.Quality()
	maxArea := 0.0
	for t := range m.Triangles {
		maxArea = max(maxArea, m.Area(t))
	}
	fmt.Println("valid:", m.Validate() == nil)
	fmt.Printf("area: %.12f\n", q.Area)
	fmt.Println("min angle >= 30:", q.MinAngle >= 30)
	fmt.Println("max area <= 0.01:", maxArea <= 0.01)
	fmt.Println("300 to 1000 triangles:", q.Triangles >= 300 && q.Triangles <= 1000)
	for _, tag := range m.Tags() {
		length := 0.0
		for _, e := range m.BoundaryEdges(tag) {
			length += m.EdgeLength(e)
		}
		fmt.Printf("tag %d %-6s length %.12f\n", tag, m.TagNames[tag], length)
	}
	// Output:
	// valid: true
	// area: 3.000000000000
	// min angle >= 30: true
	// max area <= 0.01: true
	// 300 to 1000 triangles: true
	// tag 1 wall   length 6.000000000000
	// tag 2 outlet length 1.000000000000
	// tag 3 inlet  length 1.000000000000
}

func ExampleBoundaryLayer() {
	// A square graded toward its bottom side (tag 1): ten layers, the first
	// 1e-3 thick, each 1.5 times thicker than the one before.
	d := &mesh.Domain{
		Outer:     [][2]float64{{0, 0}, {1, 0}, {1, 1}, {0, 1}},
		OuterTags: []int{1, 2, 2, 2},
	}
	layer := mesh.BoundaryLayer{Tag: 1, First: 1e-3, Growth: 1.5, Layers: 10}
	fmt.Printf("graded region: %.6f thick\n", layer.Thickness())
	fmt.Printf("target sizes at distances 0, 0.001, 0.0025: %.6f %.6f %.6f\n", layer.Size(0), layer.Size(0.001), layer.Size(0.0025))
	m, err := mesh.Triangulate(d, &mesh.QualityOptions{MinAngle: 30, Layers: []mesh.BoundaryLayer{layer}})
	if err != nil {
		log.Fatal(err)
	}
	// Longest edge of the triangles touching the bottom side.
	longest := 0.0
	for _, e := range m.BoundaryEdges(1) {
		longest = max(longest, m.Diameter(m.EdgeTriangles[e][0]))
	}
	fmt.Println("bottom triangles no larger than 1e-3:", longest <= 1e-3)
	fmt.Println("min angle >= 30:", m.Quality().MinAngle >= 30)
	// Output:
	// graded region: 0.113330 thick
	// target sizes at distances 0, 0.001, 0.0025: 0.001000 0.001500 0.002250
	// bottom triangles no larger than 1e-3: true
	// min angle >= 30: true
}

func ExampleDelaunay() {
	// The Delaunay triangulation of a 3×3 grid: 8 triangles (Euler: 2n-h-2
	// for n = 9 points, h = 8 of them on the hull).
	var pts [][2]float64
	for j := range 3 {
		for i := range 3 {
			pts = append(pts, [2]float64{float64(i), float64(j)})
		}
	}
	m, err := mesh.Delaunay(pts)
	if err != nil {
		log.Fatal(err)
	}
	fmt.Println("triangles:", m.NumTriangles(), "boundary edges:", len(m.BoundaryEdges(0)))
	_, err = mesh.Delaunay([][2]float64{{0, 0}, {1, 1}, {2, 2}})
	fmt.Println(err)
	// Output:
	// triangles: 8 boundary edges: 8
	// mesh: all 3 points are collinear
}

func ExampleDomain_Validate() {
	bowTie := &mesh.Domain{Outer: [][2]float64{{0, 0}, {1, 1}, {1, 0}, {0, 1}}}
	fmt.Println(bowTie.Validate())
	// Output:
	// mesh: outer polygon segment 0 (0, 0)-(1, 1) and outer polygon segment 2 (1, 0)-(0, 1) cross or touch; polygons must be simple and disjoint
}
