package casefile

import (
	"cmp"
	"fmt"
	"slices"
	"strings"
)

// Position is a place in a case file: 1-based line and column, both zero
// when the position is unknown.
type Position struct {
	File         string
	Line, Column int
}

// String returns "file:line:column", "file:line" when the column is
// unknown, or "file" when the line is unknown.
func (p Position) String() string {
	switch {
	case p.Line == 0:
		return p.File
	case p.Column == 0:
		return fmt.Sprintf("%s:%d", p.File, p.Line)
	}
	return fmt.Sprintf("%s:%d:%d", p.File, p.Line, p.Column)
}

// Error is one fault in a case file. Path is the key path of the value at
// fault, e.g. "boundaries.inlet.species" or "species[1].molar_mass" (empty
// for faults of the whole file).
type Error struct {
	Position
	Path    string
	Message string
}

// Error returns "file:line:col: path: message".
func (e *Error) Error() string {
	var b strings.Builder
	b.WriteString(e.Position.String())
	b.WriteString(": ")
	if e.Path != "" {
		b.WriteString(e.Path)
		b.WriteString(": ")
	}
	b.WriteString(e.Message)
	return b.String()
}

// MaxErrors is the largest number of errors Parse and Load report. Checks
// continue after the first error where the remaining data do not depend on
// the faulty value, so one run shows several independent faults; checks
// that depend on a faulty section (e.g. diffusivities on the species list)
// are skipped.
const MaxErrors = 10

// Errors is the list of faults found in a case file, sorted by position.
// Parse and Load return a non-empty Errors as their error; errors.As with a
// **Error target finds the first.
type Errors []*Error

// Error prints one fault per line.
func (es Errors) Error() string {
	lines := make([]string, len(es))
	for i, e := range es {
		lines[i] = e.Error()
	}
	return strings.Join(lines, "\n")
}

// Unwrap returns the faults, for errors.Is and errors.As.
func (es Errors) Unwrap() []error {
	out := make([]error, len(es))
	for i, e := range es {
		out[i] = e
	}
	return out
}

// sortErrors orders faults by line and column (stable for equal positions).
func sortErrors(es []*Error) {
	slices.SortStableFunc(es, func(a, b *Error) int {
		if c := cmp.Compare(a.Line, b.Line); c != 0 {
			return c
		}
		return cmp.Compare(a.Column, b.Column)
	})
}

// Warning is a suspicious but admissible datum, e.g. composition data for
// every species on a no-slip wall.
type Warning struct {
	Position
	Path    string
	Message string
}

// String returns "file:line:col: path: message".
func (w Warning) String() string {
	e := Error(w)
	return e.Error()
}
