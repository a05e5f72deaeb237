package atomicfile

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
)

// Write writes the file at path through write: it creates a temporary file
// in the same directory, lets write fill it through a buffer, flushes and
// syncs it, gives it mode 0644 and renames it over path. On any failure the
// temporary file is removed, path is left as it was (an existing file keeps
// its content), and the error reads "writing PATH: cause", naming the
// target, never the temporary file.
func Write(path string, write func(w io.Writer) error) (err error) {
	dir, base := filepath.Split(path)
	if base == "" {
		return fmt.Errorf("writing %s: no file name", path)
	}
	if dir == "" {
		dir = "."
	}
	f, err := os.CreateTemp(dir, "."+base+".tmp-*")
	if err != nil {
		return fmt.Errorf("writing %s: %w", path, pathFree(err))
	}
	tmp := f.Name()
	defer func() {
		if err != nil {
			f.Close() // may be closed already; the first error is the one reported
			os.Remove(tmp)
			err = fmt.Errorf("writing %s: %w", path, pathFree(err))
		}
	}()
	bw := bufio.NewWriterSize(f, 1<<16)
	if err = write(bw); err != nil {
		return err
	}
	if err = bw.Flush(); err != nil {
		return err
	}
	if err = f.Chmod(0o644); err != nil {
		return err
	}
	if err = f.Sync(); err != nil {
		return err
	}
	if err = f.Close(); err != nil {
		return err
	}
	return os.Rename(tmp, path)
}

// pathFree strips the file names from an *os.PathError or *os.LinkError,
// whose paths would name the temporary file, and keeps the cause.
func pathFree(err error) error {
	var pe *os.PathError
	if errors.As(err, &pe) {
		return pe.Err
	}
	var le *os.LinkError
	if errors.As(err, &le) {
		return le.Err
	}
	return err
}
