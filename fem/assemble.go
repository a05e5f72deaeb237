package fem

import (
	"fmt"

	"mixwell/solver"
)

// Layout places several spaces one after another in one vector of unknowns
// (a product space): block b occupies [Offset(b), Offset(b)+Space(b).Len()).
type Layout struct {
	spaces  []*Space
	offsets []int
	n       int
}

// NewLayout concatenates the given spaces in order. A space may appear more
// than once (for example the two components of a Lagrange vector field).
func NewLayout(spaces ...*Space) *Layout {
	l := &Layout{spaces: spaces, offsets: make([]int, len(spaces))}
	for i, s := range spaces {
		l.offsets[i] = l.n
		l.n += s.Len()
	}
	return l
}

// Len returns the total number of unknowns.
func (l *Layout) Len() int { return l.n }

// Offset returns the first global number of block b.
func (l *Layout) Offset(b int) int { return l.offsets[b] }

// Space returns the space of block b.
func (l *Layout) Space(b int) *Space { return l.spaces[b] }

// Block returns the part of x that belongs to block b (aliasing x).
func (l *Layout) Block(x []float64, b int) []float64 {
	return x[l.offsets[b] : l.offsets[b]+l.spaces[b].Len()]
}

// System collects a sparse linear system element by element, with essential
// (fixed-value) degrees of freedom eliminated symmetrically: a fixed unknown
// keeps a unit row and column, and its value times the column is moved to the
// right-hand side. Fix every essential unknown before adding matrices.
type System struct {
	n      int
	fixed  []bool
	value  []float64
	coo    *solver.COO
	rhs    []float64
	closed bool
}

// NewSystem returns an empty n by n system. capacity is a hint for the
// number of element-matrix entries that will be added.
func NewSystem(n, capacity int) *System {
	return &System{
		n:     n,
		fixed: make([]bool, n),
		value: make([]float64, n),
		coo:   solver.NewCOO(n, n, capacity),
		rhs:   make([]float64, n),
	}
}

// Len returns the number of unknowns.
func (s *System) Len() int { return s.n }

// Fix prescribes the value of unknown i (an essential condition).
func (s *System) Fix(i int, v float64) {
	if s.closed {
		panic("fem: Fix after Matrix")
	}
	s.fixed[i] = true
	s.value[i] = v
}

// Fixed reports whether unknown i is fixed.
func (s *System) Fixed(i int) bool { return s.fixed[i] }

// AddMatrix adds the dense element matrix local (row-major, len(rows) by
// len(cols)) into the rows rowOff+rows[a] and columns colOff+cols[b], each
// entry multiplied by rowSigns[a]*colSigns[b] (nil signs mean +1).
func (s *System) AddMatrix(rowOff int, rows []int, rowSigns []float64, colOff int, cols []int, colSigns []float64, local []float64) {
	nc := len(cols)
	if len(local) != len(rows)*nc {
		panic("fem: element matrix size mismatch")
	}
	for a, r := range rows {
		gi := rowOff + r
		if s.fixed[gi] {
			continue
		}
		sr := 1.0
		if rowSigns != nil {
			sr = rowSigns[a]
		}
		for b, c := range cols {
			v := local[a*nc+b]
			if v == 0 {
				continue
			}
			if colSigns != nil {
				v *= colSigns[b]
			}
			v *= sr
			gj := colOff + c
			if s.fixed[gj] {
				s.rhs[gi] -= v * s.value[gj]
				continue
			}
			s.coo.Add(gi, gj, v)
		}
	}
}

// AddVector adds the element vector local into the right-hand side at
// rowOff+rows[a], multiplied by rowSigns[a] (nil means +1).
func (s *System) AddVector(rowOff int, rows []int, rowSigns []float64, local []float64) {
	for a, r := range rows {
		gi := rowOff + r
		if s.fixed[gi] {
			continue
		}
		v := local[a]
		if rowSigns != nil {
			v *= rowSigns[a]
		}
		s.rhs[gi] += v
	}
}

// Matrix closes the system and returns the assembled matrix (duplicates
// summed) and right-hand side. Fixed unknowns get a unit diagonal and their
// value on the right. The system cannot be added to afterwards.
func (s *System) Matrix() (*solver.CSR, []float64) {
	if s.closed {
		panic("fem: Matrix called twice")
	}
	s.closed = true
	for i, f := range s.fixed {
		if f {
			s.coo.Add(i, i, 1)
			s.rhs[i] = s.value[i]
		}
	}
	return s.coo.ToCSR(), s.rhs
}

// Solve factorises a and solves a x = b with the sparse direct solver,
// returning x and the relative residual ||a x - b|| / ||b||.
func Solve(a *solver.CSR, b []float64) ([]float64, float64, error) {
	lu, err := solver.FactorLU(a, nil)
	if err != nil {
		return nil, 0, fmt.Errorf("fem: factorising the system: %w", err)
	}
	x := make([]float64, len(b))
	if err := lu.SolveTo(x, b); err != nil {
		return nil, 0, fmt.Errorf("fem: solving the system: %w", err)
	}
	return x, solver.RelativeResidual(a, x, b), nil
}
