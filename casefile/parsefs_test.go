package casefile

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
	"testing/fstest"
)

func TestParseFSReadsMeshFilesFromMemory(t *testing.T) {
	dir := filepath.Join("..", "testdata", "cases")
	text, err := os.ReadFile(filepath.Join(dir, "cavity.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	meshText, err := os.ReadFile(filepath.Join(dir, "cavity.mesh"))
	if err != nil {
		t.Fatal(err)
	}
	fromDisk, err := Load(filepath.Join(dir, "cavity.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	c, err := ParseFS("cavity.yaml", text, fstest.MapFS{"cavity.mesh": {Data: meshText}})
	if err != nil {
		t.Fatal(err)
	}
	got, want := c.Geometry.MeshFile.Mesh, fromDisk.Geometry.MeshFile.Mesh
	if got.NumTriangles() != want.NumTriangles() || got.NumPoints() != want.NumPoints() {
		t.Errorf("mesh from memory has %d triangles and %d points, from disk %d and %d",
			got.NumTriangles(), got.NumPoints(), want.NumTriangles(), want.NumPoints())
	}
	// A mesh file that the file system does not hold is an error at the key.
	_, err = ParseFS("cavity.yaml", text, fstest.MapFS{})
	if err == nil || !strings.Contains(err.Error(), "geometry.mesh_file") || !strings.Contains(err.Error(), "cavity.yaml:") {
		t.Errorf("missing mesh file: error %v, want one naming cavity.yaml and geometry.mesh_file", err)
	}
}
