package results

import (
	"io"
	"mixwell/atomicfile"
)

// WriteFileAtomic writes the file at path through write: it creates a
// temporary file in the same directory, lets write fill it, flushes and
// syncs it, and renames it over path. On any failure the temporary file is
// removed and path is untouched (an existing file keeps its content). The
// file gets mode 0644.
func WriteFileAtomic(path string, write func(w io.Writer) error) error {
	return atomicfile.Write(path, write)
}
