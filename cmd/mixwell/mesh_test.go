package main

import (
	"path/filepath"
	"strings"
	"testing"

	"mixwell/mesh"
)

func TestMeshReportsAndExports(t *testing.T) {
	// The tiny case is a 2 x 3 rectangle with alternating diagonals: 12
	// vertices, 12 triangles, 10 boundary edges, area 2e-4 m^2; right
	// angles of 90 degrees and 45-degree angles (geometry of the grid).
	path := writeCase(t, tinyCase)
	dir := filepath.Dir(path)
	out, vtu := filepath.Join(dir, "box.mesh"), filepath.Join(dir, "box.vtu")
	stdout, stderr, err := execute(t, (&fakeLib{}).deps(), "mesh", path, "--out", out, "--vtu", vtu)
	if err != nil {
		t.Fatalf("%v\n%s", err, stderr)
	}
	for _, want := range []string{"28 vertices, 36 triangles", "(18 on the boundary)", "area 0.0002 m^2", "bottom 3, left 6, right 6, top 3", "wrote " + out, "wrote " + vtu} {
		if !strings.Contains(stdout, want) {
			t.Errorf("output lacks %q:\n%s", want, stdout)
		}
	}
	m, err := mesh.ReadFile(out)
	if err != nil {
		t.Fatalf("reading the exported mesh: %v", err)
	}
	if m.NumTriangles() != 36 || len(m.TagNames) != 4 {
		t.Errorf("exported mesh has %d triangles and %d named tags, want 36 and 4", m.NumTriangles(), len(m.TagNames))
	}
}

func TestMeshRejectsBadCase(t *testing.T) {
	path := writeCase(t, strings.Replace(tinyCase, "nx: 3", "nx: 0", 1))
	_, stderr, err := execute(t, (&fakeLib{}).deps(), "mesh", path)
	if err == nil {
		t.Fatal("accepted a rectangle with no cells")
	}
	if line := errorLine(t, stderr); !strings.Contains(line, path+":") || !strings.Contains(line, "nx") {
		t.Errorf("error line %q does not name the file and the key", line)
	}
}

func TestMeshInspectsAMeshFile(t *testing.T) {
	// testdata/cases/cavity.mesh is a 10 x 10 square (file units) cut into
	// four triangles round its centre: 5 vertices, 4 boundary edges, area
	// 100, angles 45 and 90 degrees.
	stdout, stderr, err := execute(t, (&fakeLib{}).deps(), "mesh", filepath.Join("..", "..", "testdata", "cases", "cavity.mesh"))
	if err != nil {
		t.Fatalf("%v\n%s", err, stderr)
	}
	for _, want := range []string{"5 vertices, 4 triangles", "(4 on the boundary)", "area 100 square file units", "angles 45.00 to 90.00 degrees", "bottom 1, left 1, lid 1, right 1"} {
		if !strings.Contains(stdout, want) {
			t.Errorf("output lacks %q:\n%s", want, stdout)
		}
	}
}

func TestMeshExportNamesTheTarget(t *testing.T) {
	path := writeCase(t, tinyCase)
	target := filepath.Join(t.TempDir(), "absent", "box.mesh")
	_, stderr, err := execute(t, (&fakeLib{}).deps(), "mesh", path, "--out", target)
	if err == nil {
		t.Fatal("wrote into a directory that does not exist")
	}
	if line := errorLine(t, stderr); !strings.Contains(line, "writing "+target) || strings.Contains(line, ".tmp-") {
		t.Errorf("error line %q should name %s and not the temporary file", line, target)
	}
}
