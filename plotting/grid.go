package plotting

import (
	"fmt"
	"math"
)

// Grid is a scalar field sampled on a regular grid: Values[j*NX+i] is the
// value at (X0 + i*DX, Y0 + j*DY) for 0 <= i < NX, 0 <= j < NY. NaN (and
// ±Inf) marks a point without a value, such as one outside the domain; it
// is drawn blank. Lengths are in the unit named by MapOptions.LengthUnit.
type Grid struct {
	NX, NY int     // number of samples along x and y
	X0, Y0 float64 // position of sample (0, 0)
	DX, DY float64 // spacing of samples, both > 0
	Values []float64
}

// At returns the value of sample (i, j). It panics if (i, j) is outside
// the grid.
func (g Grid) At(i, j int) float64 {
	if i < 0 || i >= g.NX || j < 0 || j >= g.NY {
		panic(fmt.Sprintf("plotting: sample (%d, %d) outside %d×%d grid", i, j, g.NX, g.NY))
	}
	return g.Values[j*g.NX+i]
}

// check returns an error, naming the grid by what, when g is empty or
// malformed.
func (g Grid) check(what string) error {
	if g.NX <= 0 || g.NY <= 0 || len(g.Values) == 0 {
		return fmt.Errorf("%s is empty (NX=%d, NY=%d, %d values)", what, g.NX, g.NY, len(g.Values))
	}
	if g.NX > len(g.Values) || g.NY > len(g.Values) || g.NX*g.NY != len(g.Values) {
		return fmt.Errorf("%s has %d values, want NX*NY = %d*%d", what, len(g.Values), g.NX, g.NY)
	}
	if !(g.DX > 0) || !(g.DY > 0) || math.IsInf(g.DX, 0) || math.IsInf(g.DY, 0) {
		return fmt.Errorf("%s has spacing DX=%g, DY=%g, want both positive and finite", what, g.DX, g.DY)
	}
	x0, x1, y0, y1 := g.extent()
	for _, v := range [...]float64{x0, x1, y0, y1} {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return fmt.Errorf("%s does not lie in a finite rectangle (X0=%g, Y0=%g)", what, g.X0, g.Y0)
		}
	}
	return nil
}

// extent returns the rectangle covered by the cells of g: each sample owns a
// DX×DY cell centred on it.
func (g Grid) extent() (xmin, xmax, ymin, ymax float64) {
	return g.X0 - 0.5*g.DX, g.X0 + (float64(g.NX)-0.5)*g.DX,
		g.Y0 - 0.5*g.DY, g.Y0 + (float64(g.NY)-0.5)*g.DY
}

// finiteRange returns the least and the greatest finite value of g and
// whether there is any.
func (g Grid) finiteRange() (lo, hi float64, ok bool) {
	lo, hi = math.Inf(1), math.Inf(-1)
	for _, v := range g.Values {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			continue
		}
		lo, hi = math.Min(lo, v), math.Max(hi, v)
		ok = true
	}
	return lo, hi, ok
}

// sameLattice reports whether a and b have the same samples at the same
// points.
func sameLattice(a, b Grid) bool {
	return a.NX == b.NX && a.NY == b.NY && a.X0 == b.X0 && a.Y0 == b.Y0 && a.DX == b.DX && a.DY == b.DY
}
