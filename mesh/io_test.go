package mesh

import (
	"bytes"
	"errors"
	"io/fs"
	"maps"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"
)

// sameMesh reports the first difference between the stored parts of two
// meshes. Coordinates must be identical: Write uses the shortest decimal
// form that reads back to the same float64 (strconv guarantees it), so the
// tolerance of a round trip is zero.
func sameMesh(a, b *Mesh) string {
	switch {
	case !slices.Equal(a.Points, b.Points):
		return "points"
	case !slices.Equal(a.Triangles, b.Triangles):
		return "triangles"
	case !slices.Equal(a.Edges, b.Edges):
		return "edges"
	case !slices.Equal(a.TriangleEdges, b.TriangleEdges):
		return "triangle edges"
	case !slices.Equal(a.EdgeTriangles, b.EdgeTriangles):
		return "edge triangles"
	case !slices.Equal(a.EdgeTags, b.EdgeTags):
		return "edge tags"
	case !maps.Equal(a.TagNames, b.TagNames):
		return "tag names"
	case a.MixedOrientation != b.MixedOrientation:
		return "orientation flag"
	}
	return ""
}

func TestWriteReadRoundTrip(t *testing.T) {
	cases := fixtures(t)
	tagged := mustRectangle(t, 0, 0, 1, 1, 4, 4, RightDiagonal)
	if err := tagged.TagBoundary(12, "hot_wall", func(a, b [2]float64) bool { return a[0] == 0 && b[1] <= 0.5 }); err != nil {
		t.Fatal(err)
	}
	cases = append(cases, struct {
		name string
		m    *Mesh
	}{"retagged", tagged}, struct {
		name string
		m    *Mesh
	}{"refined perturbed", Refine(cases[5].m)})
	for _, f := range cases {
		var buf bytes.Buffer
		if err := Write(&buf, f.m); err != nil {
			t.Fatalf("%s: Write: %v", f.name, err)
		}
		r, err := Read(&buf)
		if err != nil {
			t.Fatalf("%s: Read: %v", f.name, err)
		}
		if d := sameMesh(f.m, r); d != "" {
			t.Errorf("%s: round trip changed the %s", f.name, d)
		}
		if r.Parent != nil {
			t.Errorf("%s: Read set Parent", f.name)
		}
	}
}

func TestReadAccepts(t *testing.T) {
	// Comments, blank lines, tabs, tag lines before the boundary section,
	// partial boundary section (other edges get DefaultTag).
	const text = `# a unit square
mixwell-mesh 1   # header

orientation ccw
points 4
0 0
1	0
1 1   # upper right
0 1
triangles 2
0 1 2
0 2 3
tag 5 bottom
tag 2 right_side
boundary 2
1 0 5
2 1 2
`
	m, err := Read(strings.NewReader(text))
	if err != nil {
		t.Fatal(err)
	}
	if err := m.Validate(); err != nil {
		t.Fatal(err)
	}
	// Counted by hand: 4 boundary edges, 0-1 tagged 5, 1-2 tagged 2, the
	// other two DefaultTag.
	if got, want := tagCounts(m), map[int]int{5: 1, 2: 1, DefaultTag: 2}; !maps.Equal(got, want) {
		t.Errorf("tags %v, want %v", got, want)
	}
	if tag, err := m.TagByName("right_side"); err != nil || tag != 2 {
		t.Errorf("TagByName(right_side) = %d, %v", tag, err)
	}
}

func TestReadErrors(t *testing.T) {
	const head = "mixwell-mesh 1\npoints 4\n0 0\n1 0\n1 1\n0 1\ntriangles 2\n0 1 2\n0 2 3\n" // lines 1-9
	for _, tc := range []struct {
		name, text string
		want       []string
	}{
		{"empty", "", []string{"line 1", "end of file", "header"}},
		{"not a mesh", "hello 1\n", []string{"line 1", "not a mesh file"}},
		{"version", "# c\nmixwell-mesh 2\n", []string{"line 2", "version \"2\""}},
		{"bad orientation", "mixwell-mesh 1\norientation sideways\n", []string{"line 2", "orientation mixed"}},
		{"missing points", "mixwell-mesh 1\ntriangles 1\n", []string{"line 2", `"triangles"`, `"points"`}},
		{"bad count", "mixwell-mesh 1\npoints many\n", []string{"line 2", `"many"`, "non-negative integer"}},
		{"too few points", "mixwell-mesh 1\npoints 2\n", []string{"line 2", "at least 3"}},
		{"short point", "mixwell-mesh 1\npoints 3\n0 0\n1\n", []string{"line 4", "point 1", "got 1 fields"}},
		{"bad number", "mixwell-mesh 1\npoints 3\n0 0\n1 x\n", []string{"line 4", `"x"`, "point 1"}},
		{"infinite", "mixwell-mesh 1\npoints 3\n0 0\n1 inf\n", []string{"line 4", "point 1", "not finite"}},
		{"truncated points", "mixwell-mesh 1\npoints 3\n0 0\n1 0\n", []string{"line 5", "end of file", "point 2 of 3"}},
		{"no triangles", "mixwell-mesh 1\npoints 3\n0 0\n1 0\n0 1\ntriangles 0\n", []string{"line 6", "at least one"}},
		{"triangle fields", "mixwell-mesh 1\npoints 3\n0 0\n1 0\n0 1\ntriangles 1\n0 1\n", []string{"line 7", "3 integers", "triangle 0"}},
		{"triangle not int", "mixwell-mesh 1\npoints 3\n0 0\n1 0\n0 1\ntriangles 1\n0 1 2.5\n", []string{"line 7", `"2.5"`}},
		{"index range", "mixwell-mesh 1\npoints 3\n0 0\n1 0\n0 1\ntriangles 1\n0 1 3\n", []string{"line 7", "out of range", "0..2"}},
		{"clockwise", "mixwell-mesh 1\npoints 3\n0 0\n1 0\n0 1\n# c\ntriangles 1\n0 2 1\n", []string{"line 8", "clockwise", "orientation mixed"}},
		{"degenerate", "mixwell-mesh 1\npoints 3\n0 0\n1 0\n2 0\ntriangles 1\n0 1 2\n", []string{"line 7", "degenerate"}},
		{"unused point", "mixwell-mesh 1\npoints 4\n0 0\n1 0\n0 1\n5 5\ntriangles 1\n0 1 2\n", []string{"point 3", "no triangle"}},
		{"three on an edge", "mixwell-mesh 1\npoints 5\n0 0\n1 0\n0 1\n1 -1\n0.5 2\ntriangles 3\n0 1 2\n\n1 0 3\n0 1 4\n",
			[]string{"lines 9, 11, 12", "edge 0-1", "shared by 3"}},
		{"unknown keyword", head + "color red\n", []string{"line 10", `"color"`, `"boundary", "tag"`}},
		{"not an edge", head + "boundary 1\n1 3 2\n", []string{"line 11", "1-3 is not an edge"}},
		{"interior edge", head + "boundary 1\n0 2 2\n", []string{"line 11", "interior"}},
		{"zero tag", head + "boundary 1\n0 1 0\n", []string{"line 11", "tag 0"}},
		{"edge twice", head + "boundary 2\n0 1 2\n1 0 3\n", []string{"line 12", "listed twice"}},
		{"boundary truncated", head + "boundary 2\n0 1 2\n", []string{"line 12", "end of file", "boundary edge 1 of 2"}},
		{"two boundary sections", head + "boundary 0\nboundary 0\n", []string{"line 11", "second"}},
		{"tag fields", head + "tag 3\n", []string{"line 10", "tag NUMBER NAME"}},
		{"tag number", head + "tag zero wall\n", []string{"line 10", `"zero"`}},
		{"tag named twice", head + "tag 3 wall\ntag 3 door\n", []string{"line 11", "named twice"}},
		{"name used twice", head + "tag 3 wall\ntag 4 wall\n", []string{"line 11", "already used by tag 3"}},
		{"long line", "mixwell-mesh 1\n" + strings.Repeat("x", 2<<20), []string{"line 2 is longer than"}},
	} {
		m, err := Read(strings.NewReader(tc.text))
		wantError(t, tc.name, err, tc.want...)
		if m != nil {
			t.Errorf("%s: got a mesh with the error", tc.name)
		}
	}
}

func TestWriteFileAtomic(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "square.mesh")
	m := mustRectangle(t, 0, 0, 1, 1, 3, 3, AlternatingDiagonal)
	if err := WriteFile(path, m); err != nil {
		t.Fatal(err)
	}
	r, err := ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	if d := sameMesh(m, r); d != "" {
		t.Errorf("file round trip changed the %s", d)
	}
	before, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	if fi, err := os.Stat(path); err != nil || fi.Mode().Perm() != 0o644 {
		t.Errorf("file mode %v, %v; want 0644", fi.Mode(), err)
	}

	// A failing write (invalid mesh) leaves the old file complete and no
	// temporary file behind.
	bad := m.Clone()
	bad.EdgeTags[0], bad.EdgeTags[1] = -1, -1
	wantError(t, "invalid mesh", WriteFile(path, bad), path, "invalid")
	after, err := os.ReadFile(path)
	if err != nil || !bytes.Equal(before, after) {
		t.Errorf("failed WriteFile changed the existing file (err %v)", err)
	}
	entries, _ := os.ReadDir(dir)
	if len(entries) != 1 {
		names := []string{}
		for _, e := range entries {
			names = append(names, e.Name())
		}
		t.Errorf("directory holds %v, want only square.mesh", names)
	}

	if err := WriteFile(filepath.Join(dir, "missing", "x.mesh"), m); !errors.Is(err, fs.ErrNotExist) {
		t.Errorf("WriteFile into a missing directory: %v, want ErrNotExist", err)
	}
	if _, err := ReadFile(filepath.Join(dir, "none.mesh")); !errors.Is(err, fs.ErrNotExist) {
		t.Errorf("ReadFile of a missing file: %v, want ErrNotExist", err)
	}
	broken := filepath.Join(dir, "broken.mesh")
	os.WriteFile(broken, []byte("mixwell-mesh 1\npoints x\n"), 0o644)
	_, err = ReadFile(broken)
	wantError(t, "broken file", err, broken, "line 2")
}

func TestWriteInvalid(t *testing.T) {
	m := mustRectangle(t, 0, 0, 1, 1, 2, 2, RightDiagonal)
	m.Triangles[0][0], m.Triangles[0][1] = m.Triangles[0][1], m.Triangles[0][0]
	var buf bytes.Buffer
	wantError(t, "clockwise", Write(&buf, m), "triangle 0")
	if buf.Len() != 0 {
		t.Errorf("Write wrote %d bytes of an invalid mesh", buf.Len())
	}
}
