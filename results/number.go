package results

import (
	"math"
	"strconv"
)

// Number is a float64 that encodes as JSON null when it is NaN or
// infinite (JSON has no such numbers), for the last iterate of a
// diverging iteration.
type Number float64

// MarshalJSON writes the shortest representation that reads back
// exactly, or null.
func (x Number) MarshalJSON() ([]byte, error) {
	f := float64(x)
	if math.IsNaN(f) || math.IsInf(f, 0) {
		return []byte("null"), nil
	}
	return strconv.AppendFloat(nil, f, 'g', -1, 64), nil
}
