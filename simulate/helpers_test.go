package simulate

import (
	"os"
	"strings"
	"testing"

	"mixwell/casefile"
)

// mustRead returns the text of the file at path.
func mustRead(t *testing.T, path string) string {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}

// editedCase returns the case file at path with each edit (old text, new
// text) applied once. A missing old text fails the test, so that a test
// never runs the unedited case by mistake.
func editedCase(t *testing.T, path string, edits ...[2]string) string {
	t.Helper()
	data := mustRead(t, path)
	for _, e := range edits {
		if !strings.Contains(data, e[0]) {
			t.Fatalf("%s: text %q not found", path, e[0])
		}
		data = strings.Replace(data, e[0], e[1], 1)
	}
	return data
}

// prepared parses data as the case file named path and prepares it.
func prepared(t *testing.T, path, data string) *Setup {
	t.Helper()
	c, err := casefile.Parse(path, []byte(data))
	if err != nil {
		t.Fatal(err)
	}
	s, err := Prepare(c)
	if err != nil {
		t.Fatal(err)
	}
	return s
}

// solved parses, prepares and solves the case text data (named path) and
// fails the test unless the solve succeeds.
func solved(t *testing.T, path, data string) (*Setup, *Outcome) {
	t.Helper()
	s := prepared(t, path, data)
	o, err := s.Solve(nil)
	if err != nil {
		t.Fatal(err)
	}
	return s, o
}

// checkCleanRun fails the test unless the run converged, closed every
// species balance to 1e-10 and gave no warnings.
func checkCleanRun(t *testing.T, o *Outcome) {
	t.Helper()
	if !o.Converged {
		t.Fatalf("not converged in %d iterations", o.Iterations)
	}
	if !(o.SpeciesBalance < 1e-10) {
		t.Errorf("species balance %.3g, want < 1e-10", o.SpeciesBalance)
	}
	if len(o.Warnings) > 0 {
		t.Errorf("warnings %q, want none", o.Warnings)
	}
}
