package atomicfile

import (
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func TestWriteReplacesWholeFile(t *testing.T) {
	path := filepath.Join(t.TempDir(), "out.txt")
	if err := os.WriteFile(path, []byte("old"), 0o600); err != nil {
		t.Fatal(err)
	}
	if err := Write(path, func(w io.Writer) error { _, err := fmt.Fprint(w, "new"); return err }); err != nil {
		t.Fatal(err)
	}
	got, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	if string(got) != "new" {
		t.Errorf("content %q, want %q", got, "new")
	}
	fi, err := os.Stat(path)
	if err != nil {
		t.Fatal(err)
	}
	if fi.Mode().Perm() != 0o644 {
		t.Errorf("mode %v, want 0644", fi.Mode().Perm())
	}
}

func TestWriteFailureKeepsOldFile(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "out.txt")
	if err := os.WriteFile(path, []byte("old"), 0o644); err != nil {
		t.Fatal(err)
	}
	boom := errors.New("boom")
	err := Write(path, func(w io.Writer) error {
		fmt.Fprint(w, "half")
		return boom
	})
	if !errors.Is(err, boom) || !strings.Contains(err.Error(), "writing "+path) {
		t.Errorf("error %v, want one that wraps %v and names %s", err, boom, path)
	}
	got, _ := os.ReadFile(path)
	if string(got) != "old" {
		t.Errorf("content after a failed write %q, want %q", got, "old")
	}
	entries, _ := os.ReadDir(dir)
	if len(entries) != 1 {
		t.Errorf("directory holds %d entries after a failed write, want 1 (no temporary file left)", len(entries))
	}
}

func TestWriteNamesTargetNotTemporary(t *testing.T) {
	// A missing directory: the error must name the target path and not the
	// temporary file's name.
	path := filepath.Join(t.TempDir(), "missing", "out.txt")
	err := Write(path, func(w io.Writer) error { return nil })
	if err == nil {
		t.Fatal("no error")
	}
	if !strings.Contains(err.Error(), "writing "+path) || strings.Contains(err.Error(), ".tmp-") {
		t.Errorf("error %q should name %s and not the temporary file", err, path)
	}
	if err := Write(t.TempDir()+string(filepath.Separator), func(w io.Writer) error { return nil }); err == nil || !strings.Contains(err.Error(), "no file name") {
		t.Errorf("a directory as target gave %v, want a no-file-name error", err)
	}
}
