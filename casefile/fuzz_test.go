package casefile

import (
	"errors"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"testing"
	"testing/fstest"
)

// FuzzParse feeds arbitrary bytes to the parser: it must never panic, and
// it must return either a case or a non-empty list of at most MaxErrors
// positioned errors. Mesh files are served from memory (the cavity mesh of
// the examples), so the fuzzer cannot reach the file system.
func FuzzParse(f *testing.F) {
	files, _ := filepath.Glob(filepath.Join("..", "testdata", "cases", "*.yaml"))
	for _, name := range files {
		data, err := os.ReadFile(name)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(data)
	}
	f.Add([]byte("temperature: 1 ((m))^2\n"))
	f.Add([]byte("a: &x [1]\nb: *x\n"))
	f.Add([]byte("species: [{name: A, molar_mass: 1 g/mol}, {name: A}]\n"))
	mesh, err := os.ReadFile(filepath.Join("..", "testdata", "cases", "cavity.mesh"))
	if err != nil {
		f.Fatal(err)
	}
	fsys := fstest.MapFS{"cavity.mesh": {Data: mesh}}
	open := func(p string) (io.ReadCloser, error) {
		if !fs.ValidPath(p) {
			return nil, fs.ErrNotExist
		}
		return fsys.Open(p)
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		c, err := parse("case.yaml", data, open)
		if err == nil {
			if c == nil {
				t.Fatal("nil case without error")
			}
			_ = c.Summary()
			return
		}
		var es Errors
		if !errors.As(err, &es) || len(es) == 0 || len(es) > MaxErrors {
			t.Fatalf("error %T with %d entries: %v", err, len(es), err)
		}
		for _, e := range es {
			if e.File != "case.yaml" {
				t.Fatalf("error without the file name: %v", e)
			}
		}
	})
}
