package physics

import (
	"fmt"
	"strings"
)

// DataError reports invalid species, pair, composition or scale data. It
// names the species or pair at fault.
type DataError struct {
	// Species holds the offending species: one name, two names for a
	// pair, or none when the fault concerns the data as a whole.
	Species []string
	// Index is the position of the offending entry in the input list,
	// or -1 when not applicable.
	Index int
	// Value is the offending number, or NaN when not applicable.
	Value float64
	// Reason says what is wrong.
	Reason string
}

// Error implements the error interface.
func (e *DataError) Error() string {
	var b strings.Builder
	b.WriteString("physics: ")
	switch len(e.Species) {
	case 0:
	case 1:
		fmt.Fprintf(&b, "species %q: ", e.Species[0])
	default:
		fmt.Fprintf(&b, "pair (%q, %q): ", e.Species[0], e.Species[1])
	}
	b.WriteString(e.Reason)
	return b.String()
}

// StateError reports a point at which a closure or a pointwise solve cannot
// be evaluated: a non-physical argument, an overflow, or a Newton iteration
// that did not converge.
type StateError struct {
	// Model names the closure or function, e.g. "ideal gas".
	Model string
	// Species is the offending species, or "" when not applicable.
	Species string
	// Iterations is the number of Newton iterations taken (0 if none).
	Iterations int
	// Residual is the final residual norm of an iteration (0 if none).
	Residual float64
	// Reason says what is wrong.
	Reason string
}

// Error implements the error interface.
func (e *StateError) Error() string {
	var b strings.Builder
	fmt.Fprintf(&b, "physics: %s: ", e.Model)
	if e.Species != "" {
		fmt.Fprintf(&b, "species %q: ", e.Species)
	}
	b.WriteString(e.Reason)
	if e.Iterations > 0 {
		fmt.Fprintf(&b, " (after %d iterations, residual %.3g)", e.Iterations, e.Residual)
	}
	return b.String()
}
