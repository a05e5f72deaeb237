package results_test

import (
	"fmt"
	"io"
	"os"
	"path/filepath"

	"mixwell/results"
)

func ExampleWriteFileAtomic() {
	dir, err := os.MkdirTemp("", "results-example")
	if err != nil {
		fmt.Println(err)
		return
	}
	defer os.RemoveAll(dir)
	path := filepath.Join(dir, "note.txt")

	// A failing writer leaves nothing behind.
	err = results.WriteFileAtomic(path, func(w io.Writer) error {
		io.WriteString(w, "half a line")
		return fmt.Errorf("disk on fire")
	})
	fmt.Println(err != nil)
	entries, _ := os.ReadDir(dir)
	fmt.Println(len(entries), "files")

	// A complete one replaces the file in one step.
	err = results.WriteFileAtomic(path, func(w io.Writer) error {
		_, err := io.WriteString(w, "complete\n")
		return err
	})
	data, _ := os.ReadFile(path)
	fmt.Print(err, " ", string(data))
	// Output:
	// true
	// 0 files
	// <nil> complete
}
