package fem

import (
	"mixwell/solver"
)

// PatternSystem is a linear system whose sparsity pattern and set of
// essential (fixed) unknowns are decided once and whose values are
// re-assembled many times, as in a nonlinear iteration that refactorises
// the same pattern at every step (so that the symbolic work of the sparse
// direct solver can be kept: solver.LU.Refactor needs an identical
// pattern).
//
// Use it in two phases. First declare every element coupling with Couple
// and every essential unknown with Fix, then call Build. Afterwards, for
// each assembly: Reset, AddMatrix and AddVector element by element, then
// Matrix. Fixed unknowns are eliminated symmetrically as in System: their
// rows and columns hold only a unit diagonal, and their values times the
// eliminated columns move to the right-hand side. Fixed values may change
// between assemblies (SetValue), the fixed set may not.
type PatternSystem struct {
	n     int
	fixed []bool
	value []float64
	// replaced marks the rows whose element contributions are dropped in
	// favour of AddReplacement (Replace).
	replaced []bool
	// links[i] lists the rows that receive a multiple of every element
	// contribution to row i (Link); linkC holds the multiples.
	links  map[int][]int
	linkTo []int
	linkC  []float64
	pat    *solver.COO
	a      *solver.CSR
	rhs    []float64
}

// NewPatternSystem returns an empty n by n pattern system in its
// declaration phase.
func NewPatternSystem(n int) *PatternSystem {
	return &PatternSystem{
		n:        n,
		fixed:    make([]bool, n),
		value:    make([]float64, n),
		replaced: make([]bool, n),
		pat:      solver.NewCOO(n, n, 0),
		rhs:      make([]float64, n),
	}
}

// Len returns the number of unknowns.
func (s *PatternSystem) Len() int { return s.n }

// Fix declares unknown i essential with value v. During the declaration
// phase it adds i to the fixed set; afterwards i must already be fixed and
// only its value changes.
func (s *PatternSystem) Fix(i int, v float64) {
	if s.a != nil && !s.fixed[i] {
		panic("fem: PatternSystem.Fix of a new unknown after Build")
	}
	s.fixed[i] = true
	s.value[i] = v
}

// Fixed reports whether unknown i is fixed.
func (s *PatternSystem) Fixed(i int) bool { return s.fixed[i] }

// FixedValue returns the value of fixed unknown i.
func (s *PatternSystem) FixedValue(i int) float64 { return s.value[i] }

// Replace declares, in the declaration phase, that the equation of unknown
// i is not the one the elements assemble: AddMatrix, AddVector and AddRHS
// skip row i, and only AddReplacement and AddReplacementRHS write it. This
// states a constraint in place of a Galerkin row, for example a normal
// velocity tied to a boundary flux. The unknown itself stays free, and its
// column is assembled as usual. An unknown that is also fixed stays fixed.
func (s *PatternSystem) Replace(i int) {
	if s.a != nil {
		panic("fem: PatternSystem.Replace after Build")
	}
	s.replaced[i] = true
}

// Link declares, in the declaration phase, that every element
// contribution to row from (AddMatrix, AddVector, AddRHS; whether or not
// from is replaced) is also added to row to, times a multiple set with
// SetLink (initially 0). It returns the link's number. Build extends the
// pattern of row to by that of row from. A row that receives links may not
// send any. Links express the elimination of a constraint: when
// unknowns of one kind are tied to unknowns of another, the rows of the
// latter are combinations of the rows of the former.
func (s *PatternSystem) Link(from, to int) int {
	if s.a != nil {
		panic("fem: PatternSystem.Link after Build")
	}
	if s.links == nil {
		s.links = map[int][]int{}
	}
	k := len(s.linkTo)
	s.links[from] = append(s.links[from], k)
	s.linkTo = append(s.linkTo, to)
	s.linkC = append(s.linkC, 0)
	return k
}

// SetLink sets the multiple of link k; it keeps its value from one
// assembly to the next.
func (s *PatternSystem) SetLink(k int, c float64) { s.linkC[k] = c }

// Couple declares that rows rowOff+rows[a] and columns colOff+cols[b] may
// hold entries. Call it in the declaration phase for every element block
// that AddMatrix will later add.
func (s *PatternSystem) Couple(rowOff int, rows []int, colOff int, cols []int) {
	if s.a != nil {
		panic("fem: PatternSystem.Couple after Build")
	}
	for _, r := range rows {
		for _, c := range cols {
			s.pat.Add(rowOff+r, colOff+c, 0)
		}
	}
}

// Build ends the declaration phase: it drops couplings of fixed unknowns,
// adds the diagonal of every row, and fixes the pattern.
func (s *PatternSystem) Build() {
	if s.a != nil {
		panic("fem: PatternSystem.Build called twice")
	}
	full := s.pat.ToCSR()
	s.pat = nil
	keep := solver.NewCOO(s.n, s.n, full.NNZ()+s.n)
	ptr, idx := full.RowPtr(), full.ColIndices()
	for from, ks := range s.links {
		for _, k := range ks {
			to := s.linkTo[k]
			if len(s.links[to]) > 0 {
				panic("fem: PatternSystem.Link to a row that sends links")
			}
			if s.fixed[to] {
				continue
			}
			for p := ptr[from]; p < ptr[from+1]; p++ {
				if j := idx[p]; !s.fixed[j] {
					keep.Add(to, j, 0)
				}
			}
		}
	}
	for i := 0; i < s.n; i++ {
		keep.Add(i, i, 0)
		if s.fixed[i] {
			continue
		}
		for p := ptr[i]; p < ptr[i+1]; p++ {
			if j := idx[p]; j != i && !s.fixed[j] {
				keep.Add(i, j, 0)
			}
		}
	}
	s.a = keep.ToCSR()
}

// Reset zeros the matrix values and the right-hand side for a new assembly.
func (s *PatternSystem) Reset() {
	if s.a == nil {
		panic("fem: PatternSystem.Reset before Build")
	}
	s.a.Zero()
	clear(s.rhs)
}

// AddMatrix adds the dense element matrix local (row-major, len(rows) by
// len(cols)) at rows rowOff+rows[a] and columns colOff+cols[b], each entry
// multiplied by rowSigns[a]*colSigns[b] (nil signs mean +1). The block must
// have been declared with Couple.
func (s *PatternSystem) AddMatrix(rowOff int, rows []int, rowSigns []float64, colOff int, cols []int, colSigns []float64, local []float64) {
	s.add(false, rowOff, rows, rowSigns, colOff, cols, colSigns, local)
}

// AddReplacement adds like AddMatrix, but only into rows declared with
// Replace; entries for any other row are skipped.
func (s *PatternSystem) AddReplacement(rowOff int, rows []int, rowSigns []float64, colOff int, cols []int, colSigns []float64, local []float64) {
	s.add(true, rowOff, rows, rowSigns, colOff, cols, colSigns, local)
}

// add adds local into the rows whose replaced flag equals replacement.
func (s *PatternSystem) add(replacement bool, rowOff int, rows []int, rowSigns []float64, colOff int, cols []int, colSigns []float64, local []float64) {
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
		if !replacement {
			for _, k := range s.links[gi] {
				if c := s.linkC[k]; c != 0 {
					s.addRow(s.linkTo[k], c*sr, colOff, cols, colSigns, local[a*nc:(a+1)*nc])
				}
			}
		}
		if s.replaced[gi] != replacement {
			continue
		}
		s.addRow(gi, sr, colOff, cols, colSigns, local[a*nc:(a+1)*nc])
	}
}

// addRow adds f times the element row local at row gi.
func (s *PatternSystem) addRow(gi int, f float64, colOff int, cols []int, colSigns []float64, local []float64) {
	if s.fixed[gi] {
		return
	}
	ptr, idx := s.a.RowPtr(), s.a.ColIndices()
	val := s.a.Values()
	lo, hi := ptr[gi], ptr[gi+1]
	row := idx[lo:hi]
	for b, c := range cols {
		v := local[b]
		if v == 0 {
			continue
		}
		if colSigns != nil {
			v *= colSigns[b]
		}
		v *= f
		gj := colOff + c
		if s.fixed[gj] {
			s.rhs[gi] -= v * s.value[gj]
			continue
		}
		p := searchInts(row, gj)
		if p < 0 {
			panic("fem: PatternSystem.AddMatrix outside the declared pattern")
		}
		val[lo+p] += v
	}
}

// searchInts returns the position of v in the sorted slice a, or -1.
func searchInts(a []int, v int) int {
	lo, hi := 0, len(a)
	for lo < hi {
		m := int(uint(lo+hi) >> 1)
		if a[m] < v {
			lo = m + 1
		} else {
			hi = m
		}
	}
	if lo < len(a) && a[lo] == v {
		return lo
	}
	return -1
}

// AddVector adds the element vector local into the right-hand side at
// rowOff+rows[a], multiplied by rowSigns[a] (nil means +1). Rows of fixed
// unknowns are skipped.
func (s *PatternSystem) AddVector(rowOff int, rows []int, rowSigns []float64, local []float64) {
	for a, r := range rows {
		v := local[a]
		if rowSigns != nil {
			v *= rowSigns[a]
		}
		s.AddRHS(rowOff+r, v)
	}
}

// AddRHS adds v to the right-hand side of unknown i (ignored when fixed or
// replaced).
func (s *PatternSystem) AddRHS(i int, v float64) {
	if s.fixed[i] {
		return
	}
	for _, k := range s.links[i] {
		if to := s.linkTo[k]; !s.fixed[to] {
			s.rhs[to] += s.linkC[k] * v
		}
	}
	if !s.replaced[i] {
		s.rhs[i] += v
	}
}

// AddReplacementRHS adds v to the right-hand side of row i if it is
// replaced and not fixed (ignored otherwise).
func (s *PatternSystem) AddReplacementRHS(i int, v float64) {
	if s.replaced[i] && !s.fixed[i] {
		s.rhs[i] += v
	}
}

// Matrix completes the current assembly and returns the matrix and the
// right-hand side. Both are owned by the system: the next Reset overwrites
// them, and the matrix keeps its pattern (pointer and index slices) from one
// assembly to the next.
func (s *PatternSystem) Matrix() (*solver.CSR, []float64) {
	if s.a == nil {
		panic("fem: PatternSystem.Matrix before Build")
	}
	ptr, idx := s.a.RowPtr(), s.a.ColIndices()
	val := s.a.Values()
	for i, f := range s.fixed {
		if f {
			val[ptr[i]+searchInts(idx[ptr[i]:ptr[i+1]], i)] = 1
			s.rhs[i] = s.value[i]
		}
	}
	return s.a, s.rhs
}
