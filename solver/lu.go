package solver

import (
	"errors"
	"fmt"
	"math"
	"time"
)

// DefaultPivotThreshold is the threshold τ used by FactorLU when the
// settings leave it zero.
const DefaultPivotThreshold = 0.1

// Scaling selects the diagonal scaling FactorLU applies before pivoting.
type Scaling int

const (
	// SymmetricScaling factorises D A D, with D the symmetric Ruiz
	// equilibration of EquilibrateSymmetricTo, and undoes the scaling in
	// the solves. Pivot decisions then compare entries of similar size, so
	// that diagonal pivots of saddle-point matrices pass the threshold test
	// even when the blocks carry different physical scales. It is the
	// default.
	SymmetricScaling Scaling = iota
	// NoScaling factorises A as given.
	NoScaling
)

// LUSettings controls FactorLU. A nil pointer means the defaults.
type LUSettings struct {
	// Ordering is the fill-reducing column ordering (default MinDegree).
	Ordering Ordering
	// Scaling is the diagonal scaling applied before factorising (default
	// SymmetricScaling).
	Scaling Scaling
	// PivotThreshold τ in (0, 1]: the diagonal entry (in the permuted
	// order) is kept as pivot when its magnitude is at least τ times the
	// largest magnitude among the candidates of its column; otherwise the
	// column is postponed (delayed pivots, see LU) or, when it cannot
	// wait, the candidate within that bound whose row comes first in the
	// column ordering is taken. τ = 1 is partial pivoting; smaller τ keeps
	// more diagonal pivots. Zero means DefaultPivotThreshold. (The
	// saddle-point pairing of MinimumDegree judges pairs against
	// DefaultPivotThreshold.)
	PivotThreshold float64
	// NoDelayedPivots switches delayed pivots off: a column whose diagonal
	// fails the threshold test then takes an off-diagonal pivot at once
	// instead of waiting for its diagonal to grow (see LU). It is there
	// for comparisons: on species systems of Stefan-tube cases (6 897 to
	// 68 879 unknowns) delayed pivots gave 1.1 to 17 times less fill and
	// residuals near 1e-15, where without them one factorisation grew
	// entries to a residual of 1e34 (our measurements).
	NoDelayedPivots bool
}

// LUStats describes a factorisation.
type LUStats struct {
	N    int // order of the matrix
	NNZA int // stored entries of A
	// NNZL counts the entries of L strictly below the unit diagonal and
	// NNZU the entries of U including its diagonal, so that
	// NNZL + NNZU = nnz(L + U).
	NNZL, NNZU int
	// OffDiagonalPivots counts the columns whose pivot was not the
	// diagonal entry of the permuted matrix.
	OffDiagonalPivots int
	// SwappedPairs counts the consecutive steps k, k+1 pivoted crosswise:
	// column k on the diagonal row of column k+1 and the other way round,
	// a 2×2 block pivot that keeps to the ordering (typically a
	// constraint and its partner in a saddle-point ordering). Both
	// columns also count in OffDiagonalPivots, so the pivots that left the
	// ordering number OffDiagonalPivots − 2·SwappedPairs.
	SwappedPairs int
	// DelayedColumns counts the columns whose elimination was postponed
	// at least once because their diagonal failed the threshold test, and
	// Delays the postponements; each costs one more sparse triangular solve
	// of the column (see LU).
	DelayedColumns, Delays int
	// OrderTime is the time spent computing the column ordering and
	// FactorTime the time of the last numerical factorisation.
	OrderTime, FactorTime time.Duration
}

// SingularError reports a matrix that cannot be factorised: at pivot step
// Step, column Column (original numbering) had no usable pivot. The matrix
// is structurally singular when no candidate entry existed at all, and
// numerically singular when all candidates were zero.
type SingularError struct {
	Column     int
	Step       int
	Structural bool
}

// Error implements the error interface.
func (e *SingularError) Error() string {
	kind := "numerically"
	why := "all candidate pivots are zero"
	if e.Structural {
		kind = "structurally"
		why = "no candidate pivot entry"
	}
	return fmt.Sprintf("solver: matrix is %s singular: column %d (pivot step %d): %s", kind, e.Column, e.Step, why)
}

// LU is a sparse LU factorisation P (D A D) Q = L U with L unit lower
// triangular, U upper triangular, D the diagonal equilibration (the
// identity with NoScaling), Q the fill-reducing column ordering and P the
// row permutation chosen by threshold partial pivoting.
//
// The factorisation is left-looking: column k of L and U comes from a
// sparse triangular solve with the first k columns of L, whose nonzero
// pattern is found beforehand by depth-first search in the graph of L (J. R.
// Gilbert and T. Peierls, "Sparse partial pivoting in time proportional to
// arithmetic operations", SIAM J. Sci. Stat. Comput. 9(5), 862–874, 1988),
// with the symmetric pruning of Eisenstat and Liu to shorten the searches.
//
// Delayed pivots: when the diagonal entry of a column fails the threshold
// test, the column is not forced onto an off-diagonal pivot (a row
// interchange with a row far ahead in the ordering, which breaks the
// symmetric structure the ordering was computed for, takes the diagonal
// row of a later column and so starts a cascade of further interchanges).
// Instead its elimination is postponed, row and column together, until its
// diagonal has had the chance to grow: in the elimination tree of the
// pattern of A + Aᵀ in the column ordering (J. W. H. Liu, "The role of
// elimination trees in sparse factorization", SIAM J. Matrix Anal. Appl.
// 11(1), 134–172, 1990), the first later column whose elimination updates
// the diagonal of column j is its parent, so j is retried right after its
// parent has been eliminated, then after the ancestor two levels further
// up, then four, and so on (the doubling keeps the number of retries
// logarithmic in the height of the tree). A column without a remaining
// ancestor is retried at the end, and then takes an off-diagonal pivot if
// it still must. This is the delayed pivoting of multifrontal methods for
// symmetric indefinite matrices (I. S. Duff and J. K. Reid, "The
// multifrontal solution of indefinite sparse symmetric linear equations",
// ACM Trans. Math. Softw. 9(3), 302–325, 1983, where a failed pivot moves to
// the parent front), carried over to a left-looking factorisation, in
// which a postponed column has not yet changed anything and can simply be
// solved again later. The diagonal pivots then still satisfy the threshold
// test, so the stability bound is that of threshold pivoting. Two kinds of
// columns take an off-diagonal pivot at once: those whose diagonal row was
// already taken by another column, and the first column of a constraint
// pair of the ordering whose candidate row is the diagonal row of the next
// column, when the pair passes the threshold test as a 2×2 block pivot (a
// look-ahead solve of the next column tells; the pair is then pivoted
// crosswise, LUStats.SwappedPairs). The
// column ordering actually used, delays included, is kept for Refactor
// and reported by ColumnOrder.
//
// An LU may be used by several goroutines at once for solves; Refactor must
// not run concurrently with anything else on the same LU.
type LU struct {
	n       int
	tau     float64
	noDelay bool      // LUSettings.NoDelayedPivots
	scale   []float64 // diagonal scaling D, or nil
	doScale bool
	q       []int // q[k]: column of A eliminated at step k
	p       []int // p[k]: row of A pivotal at step k
	// L strictly below the diagonal, by columns; row indices are steps.
	lptr, lidx []int
	lval       []float64
	// lprune[s] ends the part of column s of L that the depth-first search
	// must follow (symmetric pruning); lptr[s+1] when not pruned.
	lprune []int
	// U strictly above the diagonal, by columns; row indices are steps.
	uptr, uidx []int
	uval       []float64
	udiag      []float64

	stats LUStats
	// err is non-nil when the last factorisation failed; the factors are
	// then unusable.
	err error
}

// FactorLU computes the sparse LU factorisation of the square matrix a with
// the ordering and pivoting of s (nil means defaults). It returns an error
// if a is not square, has a non-finite value, or is singular (a
// *SingularError naming the column). a is not modified and not retained.
func FactorLU(a *CSR, s *LUSettings) (*LU, error) {
	r, c := a.Dims()
	if r != c {
		return nil, notSquare(r, c)
	}
	var set LUSettings
	if s != nil {
		set = *s
	}
	if set.PivotThreshold == 0 {
		set.PivotThreshold = DefaultPivotThreshold
	}
	if !(set.PivotThreshold > 0 && set.PivotThreshold <= 1) {
		return nil, fmt.Errorf("solver: pivot threshold %v outside (0, 1]", set.PivotThreshold)
	}
	if set.Scaling != SymmetricScaling && set.Scaling != NoScaling {
		return nil, fmt.Errorf("solver: unknown scaling %d", int(set.Scaling))
	}
	if err := checkFinite(a); err != nil {
		return nil, err
	}
	f := &LU{n: r, tau: set.PivotThreshold, noDelay: set.NoDelayedPivots, doScale: set.Scaling == SymmetricScaling}
	// The equilibration serves both the pairing of the saddle-point
	// ordering and the factorisation: compute it once (its time counts as
	// factorisation time, as in Refactor).
	start := time.Now()
	var scale []float64
	if f.doScale {
		scale = make([]float64, r)
		symmetricScaling(scale, a, 30, 1e-2)
	}
	scaleTime := time.Since(start)
	start = time.Now()
	q, err := set.Ordering.orderScaled(a, scale)
	if err != nil {
		return nil, err
	}
	f.q = q
	f.stats.OrderTime = time.Since(start)
	if err := f.factorScaled(a, scale); err != nil {
		return nil, err
	}
	f.stats.FactorTime += scaleTime
	return f, nil
}

// Refactor recomputes the factorisation for a new matrix of the same order,
// starting from the column ordering of the last successful factorisation,
// delays included (pivoting and delaying are done afresh).
// The ordering was chosen for the pattern of the first matrix; a matrix
// with another pattern is still factorised correctly but may fill in more.
// On error the LU is unusable until a later Refactor succeeds.
func (f *LU) Refactor(a *CSR) error {
	r, c := a.Dims()
	if r != c {
		return notSquare(r, c)
	}
	if r != f.n {
		return fmt.Errorf("solver: Refactor: matrix order %d, factorisation order %d", r, f.n)
	}
	return f.factor(a)
}

// Stats returns statistics of the last factorisation.
func (f *LU) Stats() LUStats { return f.stats }

// ColumnOrder returns a copy of the column ordering: step k eliminated
// column ColumnOrder()[k] of A.
func (f *LU) ColumnOrder() []int { return append([]int(nil), f.q...) }

// checkFinite returns an error naming the first non-finite entry of a.
func checkFinite(a *CSR) error {
	for i := 0; i < a.rows; i++ {
		for p := a.rowPtr[i]; p < a.rowPtr[i+1]; p++ {
			if v := a.val[p]; math.IsNaN(v) || math.IsInf(v, 0) {
				return fmt.Errorf("solver: non-finite value %v at (%d, %d)", v, i, a.colIdx[p])
			}
		}
	}
	return nil
}

// factor computes the numerical factorisation of a with the column ordering
// f.q.
func (f *LU) factor(a *CSR) error { return f.factorScaled(a, nil) }

// factorScaled is factor with the equilibration of a already computed
// (scale, used when f.doScale), or nil to compute it.
func (f *LU) factorScaled(a *CSR, scale []float64) (err error) {
	start := time.Now()
	f.err = nil
	defer func() {
		if err != nil {
			f.err = err
		}
	}()
	n := f.n
	if err := checkFinite(a); err != nil {
		return err
	}
	ac := a.ToCSC()
	if f.doScale {
		f.scale = resizeFloats(f.scale, n)
		if scale != nil {
			copy(f.scale, scale)
		} else {
			symmetricScaling(f.scale, a, 30, 1e-2)
		}
		for j := 0; j < n; j++ {
			for p := ac.colPtr[j]; p < ac.colPtr[j+1]; p++ {
				ac.val[p] *= f.scale[ac.rowIdx[p]] * f.scale[j]
			}
		}
	}

	// Capacity guess: reuse what a previous factorisation needed.
	guess := max(2*ac.NNZ(), 4*n)
	if cap(f.lidx) > guess {
		guess = cap(f.lidx)
	}
	f.lptr = resizeInts(f.lptr, n+1)
	f.lprune = resizeInts(f.lprune, n)
	f.uptr = resizeInts(f.uptr, n+1)
	f.lidx = f.lidx[:0]
	f.lval = f.lval[:0]
	f.uidx = f.uidx[:0]
	f.uval = f.uval[:0]
	if cap(f.lidx) < guess {
		f.lidx = make([]int, 0, guess)
		f.lval = make([]float64, 0, guess)
	}
	if cap(f.uidx) < guess {
		f.uidx = make([]int, 0, guess)
		f.uval = make([]float64, 0, guess)
	}
	f.udiag = resizeFloats(f.udiag, n)
	f.p = resizeInts(f.p, n)

	pinv := make([]int, n) // step at which row i became pivotal, or -1
	for i := range pinv {
		pinv[i] = -1
	}
	x := make([]float64, n) // dense accumulator, indexed by row of A
	reach := make([]int, n) // reach[top:] holds the pattern in topological order
	// Second accumulator and pattern, for the look-ahead of pairPivotSound.
	x2 := make([]float64, n)
	reach2 := make([]int, n)
	w := columnWork{mark: make([]int, n), stack: make([]int, n), cursor: make([]int, n)}
	offDiag, swapped := 0, 0
	qinv := make([]int, n) // position of each column in the ordering followed
	for k, j := range f.q {
		qinv[j] = k
	}
	// The columns are taken from the ordering f.q, except that postponed
	// columns are queued again (see LU); q records the order of
	// elimination, which replaces f.q on success.
	sch := newColumnSchedule(f.q, !f.noDelay)
	q := make([]int, n)

	for k := 0; k < n; k++ {
		col := sch.take()
		top := f.solveColumn(&w, ac, col, pinv, x, reach)

		// Pivot choice among the rows not yet pivotal.
		piv := -1
		maxAbs := 0.0
		candidates := 0
		finite := true
		for _, i := range reach[top:] {
			if pinv[i] >= 0 {
				continue
			}
			candidates++
			v := math.Abs(x[i])
			if math.IsNaN(v) || math.IsInf(v, 0) {
				finite = false
			}
			if piv < 0 || v > maxAbs {
				piv, maxAbs = i, v
			}
		}
		if candidates == 0 || maxAbs == 0 || !finite {
			for _, i := range reach[top:] {
				x[i] = 0
			}
			if !finite {
				return fmt.Errorf("solver: pivot candidates of column %d (pivot step %d) overflowed to a non-finite value", col, k)
			}
			return &SingularError{Column: col, Step: k, Structural: candidates == 0}
		}
		// Threshold pivoting: the diagonal entry if it passes the test.
		// Otherwise, if the candidate that passes and comes earliest in the
		// column ordering is the diagonal row of the next column of the
		// ordering, as for a pair (v, c) of the saddle-point ordering whose
		// v fails the test, that row, provided column c can then take row
		// v (pairPivotSound): the pair is pivoted as a 2×2 block through
		// its off-diagonal entries, with no fill outside the pair's own
		// rows. Otherwise the column is postponed (delayed
		// pivots, see LU) and, when it cannot be, takes that earliest
		// candidate, the pivot row the ordering's fill estimate assumed
		// nearest to now. Any candidate within the threshold keeps the
		// stability bound of threshold pivoting (entry growth at most
		// 1 + 1/τ per step); the
		// freedom to choose among them is there for sparsity (I. S. Duff,
		// A. M. Erisman and J. K. Reid, "Direct Methods for Sparse
		// Matrices", Oxford, 1986, on threshold pivoting, where the
		// choice is by Markowitz count). Choosing by ordering position
		// is our own, cheap in a left-looking factorisation where the
		// Markowitz counts of the active submatrix are not at hand.
		if pinv[col] < 0 && w.mark[col] == w.stamp && x[col] != 0 && math.Abs(x[col]) >= f.tau*maxAbs {
			piv = col
		} else {
			lim := f.tau * maxAbs
			first := n
			for _, i := range reach[top:] {
				if pinv[i] < 0 && qinv[i] < first && math.Abs(x[i]) >= lim {
					piv, first = i, qinv[i]
				}
			}
			if k > 0 && f.p[k-1] == col {
				// Second column of a 2×2 pair pivot: take the diagonal
				// row of the first, which pairPivotSound found to pass.
				if v := q[k-1]; pinv[v] < 0 && x[v] != 0 && math.Abs(x[v]) >= lim {
					piv = v
				}
			}
			pairNext := piv == sch.peek() && (f.noDelay || f.pairPivotSound(&w, ac, col, piv, pinv, x, reach[top:], x2, reach2))
			if !pairNext && pinv[col] < 0 && sch.postpone(col, a, ac) {
				// Retry the column later; it has changed nothing yet.
				for _, i := range reach[top:] {
					x[i] = 0
				}
				k--
				continue
			}
			offDiag++
			if pairNext {
				// First column of a 2×2 pair pivot: the partner column
				// must come next, before any released column.
				sch.takeNextFirst()
			}
			if k > 0 && piv == q[k-1] && f.p[k-1] == col {
				swapped++
			}
		}
		pivot := x[piv]

		// Store column k of U (rows already pivotal) and of L (the others,
		// divided by the pivot), and clear the accumulator.
		f.lptr[k] = len(f.lidx)
		f.uptr[k] = len(f.uidx)
		for _, i := range reach[top:] {
			if s := pinv[i]; s >= 0 {
				f.uidx = append(f.uidx, s)
				f.uval = append(f.uval, x[i])
			} else if i != piv {
				f.lidx = append(f.lidx, i)
				f.lval = append(f.lval, x[i]/pivot)
			}
			x[i] = 0
		}
		f.lptr[k+1] = len(f.lidx)
		f.uptr[k+1] = len(f.uidx)
		f.udiag[k] = pivot
		f.p[k] = piv
		pinv[piv] = k
		q[k] = col
		sch.eliminated(col)
		f.lprune[k] = f.lptr[k+1]

		// Symmetric pruning (S. C. Eisenstat and J. W. H. Liu, "Exploiting
		// structural symmetry in unsymmetric sparse symbolic factorization",
		// SIAM J. Matrix Anal. Appl. 13(1), 1992): if U(s, k) and L(piv, s)
		// are both nonzero, every row of L(:, s) not yet pivotal is also in
		// L(:, k), so later searches need only the pivotal rows of L(:, s).
		for t := f.uptr[k]; t < f.uptr[k+1]; t++ {
			s := f.uidx[t]
			lo, hi := f.lptr[s], f.lptr[s+1]
			if f.lprune[s] != hi {
				continue // already pruned
			}
			found := false
			for _, r := range f.lidx[lo:hi] {
				if r == piv {
					found = true
					break
				}
			}
			if !found {
				continue
			}
			// Move the pivotal rows to the front.
			front := lo
			for c := lo; c < hi; c++ {
				if pinv[f.lidx[c]] >= 0 {
					f.lidx[front], f.lidx[c] = f.lidx[c], f.lidx[front]
					f.lval[front], f.lval[c] = f.lval[c], f.lval[front]
					front++
				}
			}
			f.lprune[s] = front
		}
	}
	// Renumber the rows of L from rows of A to pivot steps.
	for t, i := range f.lidx {
		f.lidx[t] = pinv[i]
	}
	copy(f.q, q)
	f.stats = LUStats{
		N:                 n,
		NNZA:              a.NNZ(),
		NNZL:              len(f.lidx),
		NNZU:              len(f.uidx) + n,
		OffDiagonalPivots: offDiag,
		SwappedPairs:      swapped,
		DelayedColumns:    sch.delayedColumns,
		Delays:            sch.delays,
		OrderTime:         f.stats.OrderTime,
		FactorTime:        time.Since(start),
	}
	return nil
}

// pairPivotSound reports whether the 2×2 pivot of a constraint pair
// passes the threshold test: column v (whose values and pattern at the
// current step are xv and patV) is to be pivoted on row c, the diagonal row
// of column c, which comes next; after that step column c must be able to
// take row v. It solves for column c now, as the next step would (into x2
// and reach2, which it leaves zero), applies the update of the step on
// row c, and tests the entry of row v against the other candidates.
func (f *LU) pairPivotSound(w *columnWork, ac *CSC, v, c int, pinv []int, xv []float64, patV []int, x2 []float64, reach2 []int) bool {
	top := f.solveColumn(w, ac, c, pinv, x2, reach2)
	patC := reach2[top:]
	// After the step, column c holds x2 − xv·(x2[c]/xv[c]) on the rows not
	// pivotal, row c excepted.
	m := x2[c] / xv[c]
	entry := x2[v] - xv[v]*m
	maxAbs := 0.0
	for _, i := range patC {
		if pinv[i] < 0 && i != c {
			maxAbs = math.Max(maxAbs, math.Abs(x2[i]-xv[i]*m))
		}
	}
	for _, i := range patV {
		if pinv[i] < 0 && i != c {
			maxAbs = math.Max(maxAbs, math.Abs(x2[i]-xv[i]*m))
		}
	}
	for _, i := range patC {
		x2[i] = 0
	}
	return entry != 0 && math.Abs(entry) >= f.tau*maxAbs
}

// columnWork holds the buffers of the sparse triangular solves of one
// factorisation.
type columnWork struct {
	mark   []int // mark[i] == stamp: row i visited by the current solve
	stack  []int // depth-first search stack of rows
	cursor []int // next child position per stack level
	stamp  int
}

// solveColumn solves L x = A(:, col) with the columns of L computed so far
// (pinv maps rows to their pivot steps, -1 if not yet pivotal). The
// pattern of x is left in reach[top:] in topological order and its values
// in x, which must be zero outside it on entry.
func (f *LU) solveColumn(w *columnWork, ac *CSC, col int, pinv []int, x []float64, reach []int) (top int) {
	w.stamp++
	stamp, mark, stack, cursor := w.stamp, w.mark, w.stack, w.cursor
	rows := ac.rowIdx[ac.colPtr[col]:ac.colPtr[col+1]]
	vals := ac.val[ac.colPtr[col]:ac.colPtr[col+1]]

	// Symbolic step: the rows reachable from the pattern of A(:, col)
	// in the graph of L, in topological order (Gilbert & Peierls,
	// section 3).
	top = f.n
	for _, r0 := range rows {
		if mark[r0] == stamp {
			continue
		}
		mark[r0] = stamp
		depth := 0
		stack[0] = r0
		cursor[0] = -1
		for depth >= 0 {
			i := stack[depth]
			s := pinv[i]
			if cursor[depth] < 0 {
				if s < 0 {
					// Not yet pivotal: no outgoing edges.
					depth--
					top--
					reach[top] = i
					continue
				}
				cursor[depth] = f.lptr[s]
			}
			end := f.lprune[s] // s < k: column s is complete
			descended := false
			for c := cursor[depth]; c < end; c++ {
				j := f.lidx[c]
				if mark[j] == stamp {
					continue
				}
				mark[j] = stamp
				cursor[depth] = c + 1
				depth++
				stack[depth] = j
				cursor[depth] = -1
				descended = true
				break
			}
			if !descended {
				depth--
				top--
				reach[top] = i
			}
		}
	}

	// Numeric step: sparse triangular solve L x = A(:, col).
	for t, r0 := range rows {
		x[r0] = vals[t]
	}
	for _, j := range reach[top:] {
		s := pinv[j]
		if s < 0 {
			continue
		}
		if xj := x[j]; xj != 0 {
			f.subtractColumnL(x, s, xj)
		}
	}
	return top
}

// subtractColumnL sets x -= a L(:, s) over the stored entries of column s
// of L (below the unit diagonal): the column update of both the numeric
// factorisation and the forward substitution.
func (f *LU) subtractColumnL(x []float64, s int, a float64) {
	lo, hi := f.lptr[s], f.lptr[s+1]
	idx := f.lidx[lo:hi]
	val := f.lval[lo:hi]
	for t, r := range idx {
		x[r] -= val[t] * a
	}
}

func resizeInts(s []int, n int) []int {
	if cap(s) >= n {
		return s[:n]
	}
	return make([]int, n)
}

func resizeFloats(s []float64, n int) []float64 {
	if cap(s) >= n {
		return s[:n]
	}
	return make([]float64, n)
}

// errInvalid wraps the cause of a failed factorisation for later solves.
var errInvalid = errors.New("solver: LU factorisation is not valid")

func (f *LU) checkSolve(dst, b []float64) error {
	if len(b) != f.n || len(dst) != f.n {
		panic(fmt.Sprintf("solver: solve length mismatch: order %d, len(b) = %d, len(dst) = %d", f.n, len(b), len(dst)))
	}
	if f.err != nil {
		return fmt.Errorf("%w: %v", errInvalid, f.err)
	}
	return nil
}

// SolveTo solves A x = b with the factorisation and stores x in dst. dst
// and b may be the same slice. It panics if their lengths differ from the
// order of A, and returns an error if the last factorisation failed.
func (f *LU) SolveTo(dst, b []float64) error {
	if err := f.checkSolve(dst, b); err != nil {
		return err
	}
	y := make([]float64, f.n)
	for k, i := range f.p {
		y[k] = b[i]
	}
	if f.scale != nil {
		for k, i := range f.p {
			y[k] *= f.scale[i]
		}
	}
	// L y = P b, column-oriented forward substitution.
	for k := 0; k < f.n; k++ {
		if yk := y[k]; yk != 0 {
			f.subtractColumnL(y, k, yk)
		}
	}
	// U z = y, column-oriented back substitution.
	for k := f.n - 1; k >= 0; k-- {
		y[k] /= f.udiag[k]
		yk := y[k]
		if yk == 0 {
			continue
		}
		lo, hi := f.uptr[k], f.uptr[k+1]
		idx := f.uidx[lo:hi]
		val := f.uval[lo:hi]
		for t, r := range idx {
			y[r] -= val[t] * yk
		}
	}
	for k, j := range f.q {
		dst[j] = y[k]
	}
	if f.scale != nil {
		for j, d := range f.scale {
			dst[j] *= d
		}
	}
	return nil
}

// SolveTransTo solves Aᵀ x = b with the factorisation and stores x in dst.
// dst and b may be the same slice. Errors and panics are as for SolveTo.
func (f *LU) SolveTransTo(dst, b []float64) error {
	if err := f.checkSolve(dst, b); err != nil {
		return err
	}
	// Aᵀ = Q Uᵀ Lᵀ P, so Uᵀ Lᵀ (P x) = Qᵀ b.
	y := make([]float64, f.n)
	for k, j := range f.q {
		y[k] = b[j]
	}
	if f.scale != nil {
		for k, j := range f.q {
			y[k] *= f.scale[j]
		}
	}
	// Uᵀ z = y: row k of Uᵀ is column k of U.
	for k := 0; k < f.n; k++ {
		s := y[k]
		for t := f.uptr[k]; t < f.uptr[k+1]; t++ {
			s -= f.uval[t] * y[f.uidx[t]]
		}
		y[k] = s / f.udiag[k]
	}
	// Lᵀ w = z.
	for k := f.n - 1; k >= 0; k-- {
		s := y[k]
		for t := f.lptr[k]; t < f.lptr[k+1]; t++ {
			s -= f.lval[t] * y[f.lidx[t]]
		}
		y[k] = s
	}
	for k, i := range f.p {
		dst[i] = y[k]
	}
	if f.scale != nil {
		for i, d := range f.scale {
			dst[i] *= d
		}
	}
	return nil
}

// RelativeResidual returns ‖A x − b‖₂ / ‖b‖₂, or ‖A x‖₂ when b is zero.
// It panics on a length mismatch.
func RelativeResidual(a *CSR, x, b []float64) float64 {
	r := make([]float64, len(b))
	a.MulVecTo(r, x)
	var num, den float64
	for i, bi := range b {
		d := r[i] - bi
		num += d * d
		den += bi * bi
	}
	if den == 0 {
		return math.Sqrt(num)
	}
	return math.Sqrt(num / den)
}

// SolveRefinedTo solves A x = b like SolveTo and then improves x by up to
// maxSteps steps of iterative refinement (r = b − A x, solve A d = r,
// x ← x + d; J. H. Wilkinson, "Rounding Errors in Algebraic Processes",
// 1963), stopping early when the relative residual no longer halves. a must
// be the matrix that was factorised. It returns the final relative residual
// ‖b − A x‖₂ / ‖b‖₂. dst and b must not share memory.
func (f *LU) SolveRefinedTo(dst []float64, a *CSR, b []float64, maxSteps int) (float64, error) {
	checkNoAlias(dst, b)
	if err := f.SolveTo(dst, b); err != nil {
		return math.NaN(), err
	}
	res := RelativeResidual(a, dst, b)
	r := make([]float64, f.n)
	for step := 0; step < maxSteps && res > 0; step++ {
		a.MulVecTo(r, dst)
		for i := range r {
			r[i] = b[i] - r[i]
		}
		if err := f.SolveTo(r, r); err != nil {
			return res, err
		}
		for i := range dst {
			dst[i] += r[i]
		}
		next := RelativeResidual(a, dst, b)
		if next > res/2 {
			if next > res {
				// Undo a step that made things worse.
				for i := range dst {
					dst[i] -= r[i]
				}
			} else {
				res = next
			}
			break
		}
		res = next
	}
	return res, nil
}
