package solver

import (
	"errors"
	"fmt"
	"sort"

	"gonum.org/v1/gonum/mat"
)

// ErrNotSquare is wrapped by the errors returned when a square matrix is
// required and a rectangular one is given; the message names the dimensions.
var ErrNotSquare = errors.New("solver: matrix is not square")

func notSquare(r, c int) error {
	return fmt.Errorf("%w: %d×%d", ErrNotSquare, r, c)
}

// COO is a sparse matrix in coordinate (triplet) form, used for assembly.
// Entries are appended with Add in any order; repeated (i, j) pairs are
// allowed and are summed by ToCSR.
type COO struct {
	rows, cols int
	ri, ci     []int
	v          []float64
}

// NewCOO returns an empty rows×cols triplet matrix with room for capacity
// entries. It panics if rows, cols or capacity is negative.
func NewCOO(rows, cols, capacity int) *COO {
	if rows < 0 || cols < 0 || capacity < 0 {
		panic(fmt.Sprintf("solver: negative COO size %d×%d capacity %d", rows, cols, capacity))
	}
	return &COO{
		rows: rows,
		cols: cols,
		ri:   make([]int, 0, capacity),
		ci:   make([]int, 0, capacity),
		v:    make([]float64, 0, capacity),
	}
}

// Dims returns the number of rows and columns of the matrix.
func (t *COO) Dims() (r, c int) { return t.rows, t.cols }

// Len returns the number of stored triplets, duplicates included.
func (t *COO) Len() int { return len(t.v) }

// Add appends the triplet (i, j, v). It panics if (i, j) is outside the
// matrix; assembly code that produces such an index has a bug.
func (t *COO) Add(i, j int, v float64) {
	if uint(i) >= uint(t.rows) || uint(j) >= uint(t.cols) {
		panic(fmt.Sprintf("solver: COO index (%d, %d) out of range for %d×%d matrix", i, j, t.rows, t.cols))
	}
	t.ri = append(t.ri, i)
	t.ci = append(t.ci, j)
	t.v = append(t.v, v)
}

// Reset removes all triplets but keeps the allocated memory.
func (t *COO) Reset() {
	t.ri = t.ri[:0]
	t.ci = t.ci[:0]
	t.v = t.v[:0]
}

// ToCSR returns the matrix in compressed sparse row form. Duplicate entries
// are summed; entries whose sum is zero are kept, so that the pattern depends
// only on the (i, j) pairs added. The receiver is not modified.
func (t *COO) ToCSR() *CSR {
	n := len(t.v)
	// Two stable counting sorts (by column, then by row) leave each row's
	// entries in increasing column order without a comparison sort.
	colCount := make([]int, t.cols+1)
	for _, j := range t.ci {
		colCount[j+1]++
	}
	for j := 0; j < t.cols; j++ {
		colCount[j+1] += colCount[j]
	}
	byCol := make([]int, n)
	next := append([]int(nil), colCount[:t.cols]...)
	for k, j := range t.ci {
		byCol[next[j]] = k
		next[j]++
	}
	rowCount := make([]int, t.rows+1)
	for _, i := range t.ri {
		rowCount[i+1]++
	}
	for i := 0; i < t.rows; i++ {
		rowCount[i+1] += rowCount[i]
	}
	order := make([]int, n)
	nextRow := append([]int(nil), rowCount[:t.rows]...)
	for _, k := range byCol {
		i := t.ri[k]
		order[nextRow[i]] = k
		nextRow[i]++
	}
	// Merge duplicates, which are now adjacent.
	rowPtr := make([]int, t.rows+1)
	colIdx := make([]int, 0, n)
	val := make([]float64, 0, n)
	for i := 0; i < t.rows; i++ {
		start := len(colIdx)
		for _, k := range order[rowCount[i]:rowCount[i+1]] {
			j := t.ci[k]
			if last := len(colIdx) - 1; last >= start && colIdx[last] == j {
				val[last] += t.v[k]
				continue
			}
			colIdx = append(colIdx, j)
			val = append(val, t.v[k])
		}
		rowPtr[i+1] = len(colIdx)
	}
	return &CSR{rows: t.rows, cols: t.cols, rowPtr: rowPtr, colIdx: colIdx, val: val}
}

// CSR is a sparse matrix in compressed sparse row form. The column indices
// of row i are colIdx[rowPtr[i]:rowPtr[i+1]], strictly increasing (sorted,
// no duplicates), with the matching values at the same positions.
//
// CSR implements mat.Matrix, so gonum code can read it (element access by
// At costs a binary search within the row).
type CSR struct {
	rows, cols int
	rowPtr     []int
	colIdx     []int
	val        []float64
}

var (
	_ mat.Matrix      = (*CSR)(nil)
	_ mat.NonZeroDoer = (*CSR)(nil)
	_ mat.Matrix      = (*CSC)(nil)
	_ mat.NonZeroDoer = (*CSC)(nil)
)

// NewCSR returns a rows×cols CSR matrix that takes ownership of rowPtr,
// colIdx and values. It returns an error naming the first violation of the
// storage invariants: len(rowPtr) == rows+1, rowPtr[0] == 0, rowPtr
// non-decreasing, len(colIdx) == len(values) == rowPtr[rows], every column
// index in [0, cols) and strictly increasing within its row.
func NewCSR(rows, cols int, rowPtr, colIdx []int, values []float64) (*CSR, error) {
	if err := checkCompressed("row", rows, cols, rowPtr, colIdx, values); err != nil {
		return nil, err
	}
	return &CSR{rows: rows, cols: cols, rowPtr: rowPtr, colIdx: colIdx, val: values}, nil
}

// checkCompressed validates compressed storage with major dimension n
// ("row" for CSR, "column" for CSC) and minor dimension m.
func checkCompressed(major string, n, m int, ptr, idx []int, val []float64) error {
	minor := "column"
	if major == "column" {
		minor = "row"
	}
	if n < 0 || m < 0 {
		return fmt.Errorf("solver: negative dimensions %d×%d", n, m)
	}
	if len(ptr) != n+1 {
		return fmt.Errorf("solver: %s pointer length %d, want %d", major, len(ptr), n+1)
	}
	if ptr[0] != 0 {
		return fmt.Errorf("solver: %s pointer starts at %d, want 0", major, ptr[0])
	}
	if len(idx) != ptr[n] || len(val) != ptr[n] {
		return fmt.Errorf("solver: %d %s indices and %d values, %s pointer says %d", len(idx), minor, len(val), major, ptr[n])
	}
	for i := 0; i < n; i++ {
		if ptr[i+1] < ptr[i] {
			return fmt.Errorf("solver: %s pointer decreases at %s %d", major, major, i)
		}
	}
	for i := 0; i < n; i++ {
		for p := ptr[i]; p < ptr[i+1]; p++ {
			j := idx[p]
			if j < 0 || j >= m {
				return fmt.Errorf("solver: %s index %d out of range [0, %d) in %s %d", minor, j, m, major, i)
			}
			if p > ptr[i] && j <= idx[p-1] {
				return fmt.Errorf("solver: %s indices of %s %d not strictly increasing at %s %d", minor, major, i, minor, j)
			}
		}
	}
	return nil
}

// Dims returns the number of rows and columns of the matrix.
func (m *CSR) Dims() (r, c int) { return m.rows, m.cols }

// NNZ returns the number of stored entries (explicit zeros included).
func (m *CSR) NNZ() int { return len(m.val) }

// RowPtr returns the row pointer slice, of length r+1. The slice is shared
// with the receiver and must not be modified.
func (m *CSR) RowPtr() []int { return m.rowPtr }

// ColIndices returns the column index slice. The slice is shared with the
// receiver and must not be modified.
func (m *CSR) ColIndices() []int { return m.colIdx }

// Values returns the value slice. The slice is shared with the receiver;
// changing its elements changes the matrix (the pattern stays the same).
func (m *CSR) Values() []float64 { return m.val }

// Row returns views of the column indices and values of row i. The slices
// are shared with the receiver.
func (m *CSR) Row(i int) (cols []int, vals []float64) {
	if uint(i) >= uint(m.rows) {
		panic(fmt.Sprintf("solver: row %d out of range [0, %d)", i, m.rows))
	}
	lo, hi := m.rowPtr[i], m.rowPtr[i+1]
	return m.colIdx[lo:hi:hi], m.val[lo:hi:hi]
}

// Index returns the position of entry (i, j) in the value slice, or -1 if
// (i, j) is not in the pattern. The search is binary within row i. Together
// with Zero and AddAt it lets an assembler refill a fixed pattern without
// allocating.
func (m *CSR) Index(i, j int) int {
	if uint(i) >= uint(m.rows) || uint(j) >= uint(m.cols) {
		panic(fmt.Sprintf("solver: index (%d, %d) out of range for %d×%d matrix", i, j, m.rows, m.cols))
	}
	lo, hi := m.rowPtr[i], m.rowPtr[i+1]
	p := lo + sort.SearchInts(m.colIdx[lo:hi], j)
	if p < hi && m.colIdx[p] == j {
		return p
	}
	return -1
}

// At returns the element (i, j); entries outside the pattern are zero.
func (m *CSR) At(i, j int) float64 {
	p := m.Index(i, j)
	if p < 0 {
		return 0
	}
	return m.val[p]
}

// AddAt adds v to the value stored at position pos, as returned by Index.
func (m *CSR) AddAt(pos int, v float64) { m.val[pos] += v }

// SetAt sets the value stored at position pos, as returned by Index.
func (m *CSR) SetAt(pos int, v float64) { m.val[pos] = v }

// Zero sets every stored value to zero and keeps the pattern.
func (m *CSR) Zero() {
	for k := range m.val {
		m.val[k] = 0
	}
}

// T returns the transpose as a *CSC that shares the receiver's memory (the
// CSR arrays of A are the CSC arrays of Aᵀ).
func (m *CSR) T() mat.Matrix {
	return &CSC{rows: m.cols, cols: m.rows, colPtr: m.rowPtr, rowIdx: m.colIdx, val: m.val}
}

// DoNonZero calls fn for every stored entry, row by row.
func (m *CSR) DoNonZero(fn func(i, j int, v float64)) {
	for i := 0; i < m.rows; i++ {
		for p := m.rowPtr[i]; p < m.rowPtr[i+1]; p++ {
			fn(i, m.colIdx[p], m.val[p])
		}
	}
}

// Clone returns a deep copy of the matrix.
func (m *CSR) Clone() *CSR {
	return &CSR{
		rows:   m.rows,
		cols:   m.cols,
		rowPtr: append([]int(nil), m.rowPtr...),
		colIdx: append([]int(nil), m.colIdx...),
		val:    append([]float64(nil), m.val...),
	}
}

// SamePattern reports whether m and b have the same dimensions and the same
// stored positions.
func (m *CSR) SamePattern(b *CSR) bool {
	if m.rows != b.rows || m.cols != b.cols || len(m.colIdx) != len(b.colIdx) {
		return false
	}
	for i, v := range m.rowPtr {
		if b.rowPtr[i] != v {
			return false
		}
	}
	for k, v := range m.colIdx {
		if b.colIdx[k] != v {
			return false
		}
	}
	return true
}

func checkNoAlias(dst, x []float64) {
	if len(dst) > 0 && len(x) > 0 && &dst[0] == &x[0] {
		panic("solver: dst and x must not share memory")
	}
}

// MulVecTo computes dst = A x. It panics if len(x) != c, len(dst) != r or
// dst and x share memory.
func (m *CSR) MulVecTo(dst, x []float64) {
	if len(x) != m.cols || len(dst) != m.rows {
		panic(fmt.Sprintf("solver: MulVecTo length mismatch: matrix %d×%d, len(x) = %d, len(dst) = %d", m.rows, m.cols, len(x), len(dst)))
	}
	checkNoAlias(dst, x)
	for i := 0; i < m.rows; i++ {
		var s float64
		lo, hi := m.rowPtr[i], m.rowPtr[i+1]
		idx := m.colIdx[lo:hi]
		val := m.val[lo:hi]
		for k, j := range idx {
			s += val[k] * x[j]
		}
		dst[i] = s
	}
}

// MulVecTransTo computes dst = Aᵀ x. It panics if len(x) != r,
// len(dst) != c or dst and x share memory.
func (m *CSR) MulVecTransTo(dst, x []float64) {
	if len(x) != m.rows || len(dst) != m.cols {
		panic(fmt.Sprintf("solver: MulVecTransTo length mismatch: matrix %d×%d, len(x) = %d, len(dst) = %d", m.rows, m.cols, len(x), len(dst)))
	}
	checkNoAlias(dst, x)
	for j := range dst {
		dst[j] = 0
	}
	for i := 0; i < m.rows; i++ {
		xi := x[i]
		for p := m.rowPtr[i]; p < m.rowPtr[i+1]; p++ {
			dst[m.colIdx[p]] += m.val[p] * xi
		}
	}
}

// transposeArrays converts compressed storage with major dimension n and
// minor dimension mdim into the compressed storage of the transpose. The
// minor indices of the result are sorted because the input is scanned in
// increasing major order.
func transposeArrays(n, mdim int, ptr, idx []int, val []float64) (tptr, tidx []int, tval []float64) {
	tptr = make([]int, mdim+1)
	for _, j := range idx {
		tptr[j+1]++
	}
	for j := 0; j < mdim; j++ {
		tptr[j+1] += tptr[j]
	}
	next := append([]int(nil), tptr[:mdim]...)
	tidx = make([]int, len(idx))
	tval = make([]float64, len(idx))
	for i := 0; i < n; i++ {
		for p := ptr[i]; p < ptr[i+1]; p++ {
			q := next[idx[p]]
			tidx[q] = i
			tval[q] = val[p]
			next[idx[p]]++
		}
	}
	return tptr, tidx, tval
}

// Transpose returns Aᵀ as a new CSR matrix.
func (m *CSR) Transpose() *CSR {
	p, i, v := transposeArrays(m.rows, m.cols, m.rowPtr, m.colIdx, m.val)
	return &CSR{rows: m.cols, cols: m.rows, rowPtr: p, colIdx: i, val: v}
}

// ToCSC returns the same matrix in compressed sparse column form, in new
// memory.
func (m *CSR) ToCSC() *CSC {
	p, i, v := transposeArrays(m.rows, m.cols, m.rowPtr, m.colIdx, m.val)
	return &CSC{rows: m.rows, cols: m.cols, colPtr: p, rowIdx: i, val: v}
}

// Diagonal returns a new slice holding the diagonal of the matrix (length
// min(r, c)); diagonal entries outside the pattern are zero.
func (m *CSR) Diagonal() []float64 {
	n := min(m.rows, m.cols)
	d := make([]float64, n)
	for i := 0; i < n; i++ {
		if p := m.Index(i, i); p >= 0 {
			d[i] = m.val[p]
		}
	}
	return d
}

// ScaleRowsCols replaces each stored a_ij by r[i]·a_ij·c[j]. A nil r or c
// means no scaling on that side. It panics on a length mismatch.
func (m *CSR) ScaleRowsCols(r, c []float64) {
	if (r != nil && len(r) != m.rows) || (c != nil && len(c) != m.cols) {
		panic(fmt.Sprintf("solver: ScaleRowsCols length mismatch: matrix %d×%d, len(r) = %d, len(c) = %d", m.rows, m.cols, len(r), len(c)))
	}
	for i := 0; i < m.rows; i++ {
		ri := 1.0
		if r != nil {
			ri = r[i]
		}
		for p := m.rowPtr[i]; p < m.rowPtr[i+1]; p++ {
			if c != nil {
				m.val[p] *= ri * c[m.colIdx[p]]
			} else {
				m.val[p] *= ri
			}
		}
	}
}

// CSC is a sparse matrix in compressed sparse column form. The row indices
// of column j are rowIdx[colPtr[j]:colPtr[j+1]], strictly increasing, with
// the matching values at the same positions. CSC implements mat.Matrix.
type CSC struct {
	rows, cols int
	colPtr     []int
	rowIdx     []int
	val        []float64
}

// NewCSC returns a rows×cols CSC matrix that takes ownership of colPtr,
// rowIdx and values, after checking the storage invariants (see NewCSR with
// the roles of rows and columns exchanged).
func NewCSC(rows, cols int, colPtr, rowIdx []int, values []float64) (*CSC, error) {
	if err := checkCompressed("column", cols, rows, colPtr, rowIdx, values); err != nil {
		return nil, err
	}
	return &CSC{rows: rows, cols: cols, colPtr: colPtr, rowIdx: rowIdx, val: values}, nil
}

// Dims returns the number of rows and columns of the matrix.
func (m *CSC) Dims() (r, c int) { return m.rows, m.cols }

// NNZ returns the number of stored entries (explicit zeros included).
func (m *CSC) NNZ() int { return len(m.val) }

// ColPtr returns the column pointer slice, of length c+1, shared with the
// receiver; it must not be modified.
func (m *CSC) ColPtr() []int { return m.colPtr }

// RowIndices returns the row index slice, shared with the receiver; it must
// not be modified.
func (m *CSC) RowIndices() []int { return m.rowIdx }

// Values returns the value slice, shared with the receiver.
func (m *CSC) Values() []float64 { return m.val }

// Col returns views of the row indices and values of column j.
func (m *CSC) Col(j int) (rows []int, vals []float64) {
	if uint(j) >= uint(m.cols) {
		panic(fmt.Sprintf("solver: column %d out of range [0, %d)", j, m.cols))
	}
	lo, hi := m.colPtr[j], m.colPtr[j+1]
	return m.rowIdx[lo:hi:hi], m.val[lo:hi:hi]
}

// At returns the element (i, j); entries outside the pattern are zero.
func (m *CSC) At(i, j int) float64 {
	if uint(i) >= uint(m.rows) || uint(j) >= uint(m.cols) {
		panic(fmt.Sprintf("solver: index (%d, %d) out of range for %d×%d matrix", i, j, m.rows, m.cols))
	}
	lo, hi := m.colPtr[j], m.colPtr[j+1]
	p := lo + sort.SearchInts(m.rowIdx[lo:hi], i)
	if p < hi && m.rowIdx[p] == i {
		return m.val[p]
	}
	return 0
}

// T returns the transpose as a *CSR sharing the receiver's memory.
func (m *CSC) T() mat.Matrix {
	return &CSR{rows: m.cols, cols: m.rows, rowPtr: m.colPtr, colIdx: m.rowIdx, val: m.val}
}

// DoNonZero calls fn for every stored entry, column by column.
func (m *CSC) DoNonZero(fn func(i, j int, v float64)) {
	for j := 0; j < m.cols; j++ {
		for p := m.colPtr[j]; p < m.colPtr[j+1]; p++ {
			fn(m.rowIdx[p], j, m.val[p])
		}
	}
}

// MulVecTo computes dst = A x. It panics on a length mismatch or if dst and
// x share memory.
func (m *CSC) MulVecTo(dst, x []float64) {
	m.T().(*CSR).MulVecTransTo(dst, x)
}

// MulVecTransTo computes dst = Aᵀ x. It panics on a length mismatch or if
// dst and x share memory.
func (m *CSC) MulVecTransTo(dst, x []float64) {
	m.T().(*CSR).MulVecTo(dst, x)
}

// ToCSR returns the same matrix in compressed sparse row form, in new memory.
func (m *CSC) ToCSR() *CSR {
	p, i, v := transposeArrays(m.cols, m.rows, m.colPtr, m.rowIdx, m.val)
	return &CSR{rows: m.rows, cols: m.cols, rowPtr: p, colIdx: i, val: v}
}
