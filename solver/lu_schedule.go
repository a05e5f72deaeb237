package solver

// columnSchedule decides which column the left-looking factorisation
// eliminates next: the columns of the ordering in turn, except that a
// column whose diagonal pivot failed may be postponed until an ancestor in
// the elimination tree has been eliminated (delayed pivots, see LU).
type columnSchedule struct {
	order  []int // the column ordering followed
	next   int   // order[next] is the next column of the ordering
	forced bool  // take order[next] before any released column
	// Released columns, retried before the ordering continues, and columns
	// without a remaining ancestor, retried once at the very end.
	ready, last         []int
	readyHead, lastHead int
	remaining           int // columns not yet eliminated

	delay bool  // postponing allowed
	tree  []int // elimination tree by column (-1 for a root), built on first use
	done  []bool
	// Columns waiting for column w: waitHead[w], then waitNext[...];
	// waitOn[c] is the ancestor c waits for (-1 before its first delay).
	waitHead, waitNext, waitOn []int
	retries                    []int
	final                      []bool // retried at the end: no further delay

	delayedColumns, delays int
}

func newColumnSchedule(order []int, delay bool) *columnSchedule {
	n := len(order)
	s := &columnSchedule{order: order, remaining: n, delay: delay}
	if delay {
		s.done = make([]bool, n)
		s.waitHead = make([]int, n)
		s.waitNext = make([]int, n)
		s.waitOn = make([]int, n)
		s.retries = make([]int, n)
		s.final = make([]bool, n)
		for i := range s.waitHead {
			s.waitHead[i] = -1
			s.waitOn[i] = -1
		}
	}
	return s
}

// take returns the column to eliminate next. It must only be called while
// columns remain; then one is available: a column not yet eliminated is
// ahead in the ordering, released, on the end list, or waiting for an
// ancestor, and the highest ancestor on a chain of waits is in one of the
// other states.
func (s *columnSchedule) take() int {
	switch {
	case s.forced:
		s.forced = false
	case s.readyHead < len(s.ready):
		c := s.ready[s.readyHead]
		s.readyHead++
		return c
	case s.next == len(s.order):
		c := s.last[s.lastHead]
		s.lastHead++
		return c
	}
	c := s.order[s.next]
	s.next++
	return c
}

// peek returns the next column of the ordering, or -1 after the last.
func (s *columnSchedule) peek() int {
	if s.next < len(s.order) {
		return s.order[s.next]
	}
	return -1
}

// takeNextFirst makes take return the next column of the ordering.
func (s *columnSchedule) takeNextFirst() { s.forced = true }

// eliminated records that column c has been eliminated and releases the
// columns that waited for it.
func (s *columnSchedule) eliminated(c int) {
	s.remaining--
	if !s.delay {
		return
	}
	s.done[c] = true
	for w := s.waitHead[c]; w >= 0; w = s.waitNext[w] {
		s.ready = append(s.ready, w)
	}
	s.waitHead[c] = -1
}

// postpone queues column c, just taken, to be retried later, and reports
// whether it did. It does not when delays are off, when c is the last
// column left, and when c was already retried at the end. The elimination
// tree of a (whose CSC form is ac) in the followed ordering is built on
// the first call.
func (s *columnSchedule) postpone(c int, a *CSR, ac *CSC) bool {
	if !s.delay || s.final[c] || s.remaining <= 1 {
		return false
	}
	if s.tree == nil {
		s.tree = orderedEliminationTree(a, ac, s.order)
	}
	// Climb 1, 2, 4, ... levels above the ancestor waited for last time,
	// then past ancestors already eliminated.
	w := s.waitOn[c]
	if w < 0 {
		w = c
	}
	for up := 1 << min(s.retries[c], 30); up > 0 && w >= 0; up-- {
		w = s.tree[w]
	}
	for w >= 0 && s.done[w] {
		w = s.tree[w]
	}
	if s.retries[c] == 0 {
		s.delayedColumns++
	}
	s.retries[c]++
	s.delays++
	if w < 0 {
		s.final[c] = true
		s.last = append(s.last, c)
		return true
	}
	s.waitOn[c] = w
	s.waitNext[c] = s.waitHead[w]
	s.waitHead[w] = c
	return true
}

// orderedEliminationTree returns the elimination tree of the pattern of
// A + Aᵀ with rows and columns taken in the given order: parent[j] is the
// column whose elimination first follows that of column j and couples to
// it, or -1 for a root. ac is a in compressed columns. The algorithm is
// J. W. H. Liu's with path compression ("The role of elimination trees in
// sparse factorization", SIAM J. Matrix Anal. Appl. 11(1), 134–172, 1990),
// fed with the entries of both triangles of A + Aᵀ; it takes time nearly
// linear in nnz(A).
func orderedEliminationTree(a *CSR, ac *CSC, order []int) []int {
	n := len(order)
	pos := make([]int, n)
	for k, j := range order {
		pos[j] = k
	}
	parent := make([]int, n)   // by position
	ancestor := make([]int, n) // compressed path to the current root
	link := func(r, k int) {
		for r >= 0 && r < k {
			up := ancestor[r]
			ancestor[r] = k
			if up < 0 {
				parent[r] = k
				return
			}
			r = up
		}
	}
	for k, j := range order {
		parent[k], ancestor[k] = -1, -1
		for p := ac.colPtr[j]; p < ac.colPtr[j+1]; p++ {
			link(pos[ac.rowIdx[p]], k)
		}
		for p := a.rowPtr[j]; p < a.rowPtr[j+1]; p++ {
			link(pos[a.colIdx[p]], k)
		}
	}
	tree := make([]int, n)
	for k, j := range order {
		if parent[k] < 0 {
			tree[j] = -1
		} else {
			tree[j] = order[parent[k]]
		}
	}
	return tree
}
