package atomicfile

import (
	"errors"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// listDir returns the names in dir.
func listDir(t *testing.T, dir string) []string {
	t.Helper()
	entries, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	var names []string
	for _, e := range entries {
		names = append(names, e.Name())
	}
	return names
}

func TestWrite(t *testing.T) {
	boom := errors.New("boom")
	for _, tc := range []struct {
		name        string
		existing    string // content of the target before, "" for none
		dirAsTarget bool   // the target is a directory: the rename fails
		write       func(w io.Writer) error
		wantErr     bool
		want        string // content of the target after ("" for absent)
	}{
		{name: "new file", write: func(w io.Writer) error { _, err := io.WriteString(w, "hello\n"); return err },
			want: "hello\n"},
		{name: "replaces", existing: "old", write: func(w io.Writer) error { _, err := io.WriteString(w, "new"); return err },
			want: "new"},
		{name: "writer fails, no file", write: func(w io.Writer) error { io.WriteString(w, "partial"); return boom },
			wantErr: true},
		{name: "writer fails, old content kept", existing: "old",
			write: func(w io.Writer) error { io.WriteString(w, "partial"); return boom }, wantErr: true, want: "old"},
		{name: "rename fails", dirAsTarget: true,
			write: func(w io.Writer) error { _, err := io.WriteString(w, "x"); return err }, wantErr: true},
	} {
		t.Run(tc.name, func(t *testing.T) {
			dir := t.TempDir()
			path := filepath.Join(dir, "out.txt")
			if tc.existing != "" {
				if err := os.WriteFile(path, []byte(tc.existing), 0o644); err != nil {
					t.Fatal(err)
				}
			}
			if tc.dirAsTarget {
				if err := os.Mkdir(path, 0o755); err != nil {
					t.Fatal(err)
				}
				// A non-empty directory cannot be replaced by a file.
				if err := os.WriteFile(filepath.Join(path, "keep"), nil, 0o644); err != nil {
					t.Fatal(err)
				}
			}
			err := Write(path, tc.write)
			if (err != nil) != tc.wantErr {
				t.Fatalf("Write error = %v, want error %v", err, tc.wantErr)
			}
			if err != nil && !strings.Contains(err.Error(), path) {
				t.Errorf("error %q does not name the path %s", err, path)
			}
			if tc.want == "" && !tc.dirAsTarget {
				if _, err := os.Stat(path); !errors.Is(err, os.ErrNotExist) {
					t.Errorf("target exists after failure (stat: %v)", err)
				}
			} else if tc.want != "" {
				got, err := os.ReadFile(path)
				if err != nil || string(got) != tc.want {
					t.Errorf("target holds %q (%v), want %q", got, err, tc.want)
				}
			}
			for _, n := range listDir(t, dir) {
				if strings.Contains(n, ".tmp-") {
					t.Errorf("temporary file %s left behind", n)
				}
			}
			if tc.want != "" {
				fi, err := os.Stat(path)
				if err == nil && fi.Mode().Perm() != 0o644 {
					t.Errorf("mode %v, want 0644", fi.Mode().Perm())
				}
			}
		})
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
