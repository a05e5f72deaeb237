package solver

import (
	"fmt"
	"math"
	"slices"
)

// Ordering selects the fill-reducing ordering that FactorLU applies to the
// columns (and, as long as diagonal pivots are accepted, to the rows) of a
// matrix before factorising it.
type Ordering int

const (
	// MinDegree is approximate minimum degree on the pattern of A + Aᵀ
	// (see MinimumDegreeOrder). It is the default.
	MinDegree Ordering = iota
	// NaturalOrder keeps the given numbering.
	NaturalOrder
	// ReverseCuthillMcKee is the bandwidth-reducing ordering of
	// ReverseCuthillMcKeeOrder.
	ReverseCuthillMcKee
)

// String returns the name of the ordering.
func (o Ordering) String() string {
	switch o {
	case MinDegree:
		return "minimum degree"
	case NaturalOrder:
		return "natural"
	case ReverseCuthillMcKee:
		return "reverse Cuthill-McKee"
	}
	return fmt.Sprintf("Ordering(%d)", int(o))
}

// order computes the permutation selected by o for the square matrix a.
func (o Ordering) order(a *CSR) ([]int, error) { return o.orderScaled(a, nil) }

// orderScaled is order with the symmetric equilibration of a given (scale),
// or nil to have it computed when the ordering needs it.
func (o Ordering) orderScaled(a *CSR, scale []float64) ([]int, error) {
	switch o {
	case MinDegree:
		r, c := a.Dims()
		if r != c {
			return nil, notSquare(r, c)
		}
		return minimumDegreeScaled(a, true, scale), nil
	case NaturalOrder:
		r, c := a.Dims()
		if r != c {
			return nil, notSquare(r, c)
		}
		p := make([]int, r)
		for i := range p {
			p[i] = i
		}
		return p, nil
	case ReverseCuthillMcKee:
		return ReverseCuthillMcKeeOrder(a)
	}
	return nil, fmt.Errorf("solver: unknown ordering %d", int(o))
}

// symmetricPattern returns the adjacency structure of the graph of A + Aᵀ
// without self loops (neighbours of i are adj[ptr[i]:ptr[i+1]], sorted), and
// for each node whether its diagonal entry is absent or exactly zero.
func symmetricPattern(a *CSR) (ptr, adj []int, zeroDiag []bool) {
	n := a.rows
	tptr := make([]int, n+1)
	for _, j := range a.colIdx {
		tptr[j+1]++
	}
	for j := 0; j < n; j++ {
		tptr[j+1] += tptr[j]
	}
	next := append([]int(nil), tptr[:n]...)
	tidx := make([]int, len(a.colIdx))
	for i := 0; i < n; i++ {
		for p := a.rowPtr[i]; p < a.rowPtr[i+1]; p++ {
			j := a.colIdx[p]
			tidx[next[j]] = i
			next[j]++
		}
	}
	zeroDiag = make([]bool, n)
	ptr = make([]int, n+1)
	adj = make([]int, 0, 2*len(a.colIdx))
	for i := 0; i < n; i++ {
		zeroDiag[i] = true
		// Merge the sorted row i of A with the sorted row i of Aᵀ.
		r := a.colIdx[a.rowPtr[i]:a.rowPtr[i+1]]
		t := tidx[tptr[i]:tptr[i+1]]
		x, y := 0, 0
		for x < len(r) || y < len(t) {
			var j int
			switch {
			case y == len(t) || (x < len(r) && r[x] < t[y]):
				j = r[x]
				x++
			case x == len(r) || t[y] < r[x]:
				j = t[y]
				y++
			default:
				j = r[x]
				x++
				y++
			}
			if j == i {
				continue
			}
			adj = append(adj, j)
		}
		if p := a.Index(i, i); p >= 0 && a.val[p] != 0 {
			zeroDiag[i] = false
		}
		ptr[i+1] = len(adj)
	}
	return ptr, adj, zeroDiag
}

// MinimumDegreeOrder returns a fill-reducing symmetric ordering of the
// square matrix a: perm[k] is the index of the row and column eliminated
// k-th. It works on the pattern of A + Aᵀ, so it also serves unsymmetric
// matrices whose pattern is close to symmetric.
//
// The method is approximate minimum degree (P. R. Amestoy, T. A. Davis and
// I. S. Duff, "An approximate minimum degree ordering algorithm", SIAM J.
// Matrix Anal. Appl. 17(4), 886–905, 1996): elimination on a quotient graph
// with element absorption, approximate external degrees, indistinguishable
// (super)variable detection, mass elimination and aggressive absorption.
// Rows with more than max(16, 10·sqrt(n)) off-diagonal entries are treated
// as dense and placed last.
//
// Saddle-point safeguards: a node whose diagonal entry is absent or zero
// (a constraint, such as a pressure in [K Bᵀ; B 0]) is paired with a
// coupled node of nonzero diagonal, and the pair is ordered as one node,
// the partner first. Partners are chosen on the equilibrated matrix among
// the couplings whose 2×2 pivot would pass the threshold test (the
// geometric mean of the two entries measures a coupling, so that one-sided
// couplings of unsymmetric matrices do not count), and matched so as to
// avoid sets of pairs that close a cycle, which would make a discrete
// divergence block rank deficient (see saddlePairs in saddle_pairs.go).
// For K positive definite this keeps the leading blocks of the reordered matrix nonsingular and
// well conditioned, so the LU can keep to the ordering (taking each pair
// as a 2×2 pivot where needed, see LUStats.SwappedPairs); without it
// minimum degree eliminates low-degree constraints first, whose zero
// pivots force row interchanges and several times the fill. A constraint
// left without a partner is not chosen before one of its neighbours has
// been eliminated (R. Bridson, "An ordering method for the direct solution
// of saddle-point matrices", 2005); if only such nodes remain this is
// dropped. Both safeguards are void for matrices with a nonzero diagonal.
// The values of a are read only to choose the pairs.
func MinimumDegreeOrder(a *CSR) ([]int, error) {
	r, c := a.Dims()
	if r != c {
		return nil, notSquare(r, c)
	}
	return minimumDegree(a, true), nil
}

// Node states during minimum degree elimination.
const (
	mdVariable int8 = iota // principal variable not yet eliminated
	mdElement              // eliminated pivot acting as an element
	mdGone                 // absorbed element, or variable merged into another
	mdDense                // dense row, ordered last
)

// minimumDegree implements MinimumDegreeOrder; saddle switches the
// saddle-point safeguards (constraint pairs and deferral) on.
func minimumDegree(a *CSR, saddle bool) []int { return minimumDegreeScaled(a, saddle, nil) }

// minimumDegreeScaled is minimumDegree with the symmetric equilibration
// scale of a (EquilibrateSymmetricTo) given, or nil to compute it if a has
// constraints.
func minimumDegreeScaled(a *CSR, saddle bool, scale []float64) []int {
	n := a.rows
	ptr, adj, zeroDiag := symmetricPattern(a)
	follower := make([]int, n) // node emitted right after i, or -1
	for i := range follower {
		follower[i] = -1
	}
	weight := make([]int, n) // number of nodes a principal variable stands for
	deferred := make([]bool, n)
	if saddle {
		partner := saddlePairs(a, ptr, adj, zeroDiag, scale)
		for i, j := range partner {
			if j >= 0 && !zeroDiag[i] {
				follower[i] = j
			}
			deferred[i] = zeroDiag[i] && j < 0
		}
		ptr, adj = compressPairs(n, ptr, adj, follower, partner)
		for i := range weight {
			switch {
			case follower[i] >= 0:
				weight[i] = 2
			case partner[i] < 0:
				weight[i] = 1
			}
		}
	} else {
		for i := range weight {
			weight[i] = 1
		}
	}
	return minimumDegreeGraph(ptr, adj, weight, deferred, follower)
}

// compressPairs returns the graph in which each pair (v, follower[v]) is
// represented by v alone, carrying the union of both adjacencies; the
// followers become isolated absent nodes.
func compressPairs(n int, ptr, adj, follower, partner []int) (cptr, cadj []int) {
	rep := func(x int) int {
		if p := partner[x]; p >= 0 && follower[p] == x {
			return p
		}
		return x
	}
	mark := make([]int, n)
	for i := range mark {
		mark[i] = -1
	}
	cptr = make([]int, n+1)
	cadj = make([]int, 0, len(adj))
	for i := 0; i < n; i++ {
		if rep(i) == i {
			mark[i] = i
			add := func(x int) {
				for _, j := range adj[ptr[x]:ptr[x+1]] {
					if r := rep(j); mark[r] != i {
						mark[r] = i
						cadj = append(cadj, r)
					}
				}
			}
			add(i)
			if f := follower[i]; f >= 0 {
				add(f)
			}
		}
		cptr[i+1] = len(cadj)
	}
	return cptr, cadj
}

// minimumDegreeGraph orders the graph with adjacency lists
// adj[ptr[i]:ptr[i+1]] (symmetric, no self loops). Node i stands for
// weight[i] nodes of the matrix (0: i is represented by another node); a
// node with deferred[i] set is not chosen before it is adjacent to an
// element; follower[i] >= 0 is emitted right after i.
func minimumDegreeGraph(ptr, adj []int, weight []int, deferred []bool, follower []int) []int {
	n := len(weight)
	state := make([]int8, n)
	vars := make([][]int, n)    // variable neighbours of a variable
	elems := make([][]int, n)   // element neighbours of a variable
	members := make([][]int, n) // variables of an element
	degree := make([]int, n)    // approximate external degree
	esize := make([]int, n)     // total weight of the variables of an element
	chainNext := make([]int, n) // nodes represented by a supervariable
	chainLast := make([]int, n)
	perm := make([]int, 0, n)

	denseLimit := max(16, int(10*math.Sqrt(float64(n))))
	var denseNodes []int
	for i := 0; i < n; i++ {
		chainNext[i] = -1
		chainLast[i] = i
		if weight[i] == 0 {
			state[i] = mdGone
		} else if ptr[i+1]-ptr[i] > denseLimit {
			state[i] = mdDense
			denseNodes = append(denseNodes, i)
		}
	}
	remaining := 0
	for i := 0; i < n; i++ {
		if state[i] != mdVariable {
			continue
		}
		remaining += weight[i]
		v := adj[ptr[i]:ptr[i+1]:ptr[i+1]]
		k := 0
		d := 0
		for _, j := range v {
			if state[j] != mdDense {
				v[k] = j
				k++
				d += weight[j]
			}
		}
		vars[i] = v[:k]
		degree[i] = d
	}

	// Degree buckets: doubly linked lists threaded through next and prev,
	// bucketOf[i] = -1 when i is in no bucket.
	head := make([]int, n+1)
	next := make([]int, n)
	prev := make([]int, n)
	bucketOf := make([]int, n)
	for d := range head {
		head[d] = -1
	}
	minDeg := 0
	insert := func(i, d int) {
		bucketOf[i] = d
		prev[i] = -1
		next[i] = head[d]
		if head[d] >= 0 {
			prev[head[d]] = i
		}
		head[d] = i
		if d < minDeg {
			minDeg = d
		}
	}
	remove := func(i int) {
		d := bucketOf[i]
		if d < 0 {
			return
		}
		if prev[i] >= 0 {
			next[prev[i]] = next[i]
		} else {
			head[d] = next[i]
		}
		if next[i] >= 0 {
			prev[next[i]] = prev[i]
		}
		bucketOf[i] = -1
	}
	for i := 0; i < n; i++ {
		bucketOf[i] = -1
		if state[i] != mdVariable || deferred[i] {
			continue
		}
		insert(i, degree[i])
	}

	emit := func(i int) {
		for x := i; x >= 0; x = chainNext[x] {
			perm = append(perm, x)
			if f := follower[x]; f >= 0 {
				perm = append(perm, f)
			}
		}
	}

	lpMark := make([]int, n) // lpMark[i] == stamp: i is the pivot or in its element
	cmpMark := make([]int, n)
	stamp, cmpStamp := 0, 0
	overlap := make([]int, n) // |L_e \ L_p| during one step, -1 when unset
	for i := range overlap {
		overlap[i] = -1
	}
	ext := make([]int, n)
	hash := make([]int, n)
	var lp, touched []int

	for remaining > 0 {
		for minDeg <= n && head[minDeg] < 0 {
			minDeg++
		}
		if minDeg > n {
			// Only deferred constraint nodes are left: release them.
			for i := 0; i < n; i++ {
				if deferred[i] && state[i] == mdVariable && weight[i] > 0 {
					deferred[i] = false
					insert(i, degree[i])
				}
			}
			continue
		}
		p := head[minDeg]
		remove(p)

		// Form the new element L_p from the variable neighbours of p and
		// the variables of the elements adjacent to p, which it absorbs.
		stamp++
		lpMark[p] = stamp
		lp = lp[:0]
		for _, j := range vars[p] {
			if state[j] == mdVariable && weight[j] > 0 && lpMark[j] != stamp {
				lpMark[j] = stamp
				lp = append(lp, j)
			}
		}
		for _, e := range elems[p] {
			if state[e] != mdElement {
				continue
			}
			for _, j := range members[e] {
				if state[j] == mdVariable && weight[j] > 0 && lpMark[j] != stamp {
					lpMark[j] = stamp
					lp = append(lp, j)
				}
			}
			state[e] = mdGone
			members[e] = nil
		}
		vars[p], elems[p] = nil, nil
		state[p] = mdElement
		emit(p)
		remaining -= weight[p]
		size := 0
		for _, i := range lp {
			size += weight[i]
			remove(i)
		}

		// overlap[e] = |L_e \ L_p| (weighted) for every element e adjacent
		// to a variable of L_p (ADD96, section 3).
		touched = touched[:0]
		for _, i := range lp {
			for _, e := range elems[i] {
				if state[e] != mdElement {
					continue
				}
				if overlap[e] < 0 {
					overlap[e] = esize[e]
					touched = append(touched, e)
				}
				overlap[e] -= weight[i]
			}
		}
		// Aggressive absorption: an element whose variables all lie in
		// L_p adds nothing and is absorbed into p.
		for _, e := range touched {
			if overlap[e] == 0 {
				state[e] = mdGone
				members[e] = nil
			}
		}

		// Prune the lists of the variables in L_p, bound their external
		// degrees, and eliminate at once the variables adjacent to p only
		// (mass elimination).
		kept := lp[:0]
		for _, i := range lp {
			h := p
			degE := 0
			el := elems[i][:0]
			for _, e := range elems[i] {
				if state[e] == mdElement {
					el = append(el, e)
					degE += overlap[e]
					h += e
				}
			}
			el = append(el, p)
			elems[i] = el
			degA := 0
			vl := vars[i][:0]
			for _, j := range vars[i] {
				if state[j] == mdVariable && weight[j] > 0 && lpMark[j] != stamp {
					vl = append(vl, j)
					degA += weight[j]
					h += j
				}
			}
			vars[i] = vl
			if len(vl) == 0 && len(el) == 1 {
				emit(i)
				remaining -= weight[i]
				size -= weight[i]
				state[i] = mdGone
				weight[i] = 0
				vars[i], elems[i] = nil, nil
				continue
			}
			ext[i] = degA + degE
			hash[i] = h
			kept = append(kept, i)
		}
		lp = kept

		// Merge indistinguishable variables (same element and variable
		// lists): they would be eliminated together anyway.
		slices.SortFunc(lp, func(x, y int) int { return hash[x] - hash[y] })
		for s := 0; s < len(lp); {
			t := s + 1
			for t < len(lp) && hash[lp[t]] == hash[lp[s]] {
				t++
			}
			for x := s; x < t-1; x++ {
				i := lp[x]
				if weight[i] == 0 {
					continue
				}
				cmpStamp++
				for _, e := range elems[i] {
					cmpMark[e] = cmpStamp
				}
				for _, j := range vars[i] {
					cmpMark[j] = cmpStamp
				}
				for y := x + 1; y < t; y++ {
					j := lp[y]
					if weight[j] == 0 || len(elems[j]) != len(elems[i]) || len(vars[j]) != len(vars[i]) {
						continue
					}
					same := true
					for _, e := range elems[j] {
						if cmpMark[e] != cmpStamp {
							same = false
							break
						}
					}
					for _, v := range vars[j] {
						if !same {
							break
						}
						if cmpMark[v] != cmpStamp {
							same = false
						}
					}
					if !same {
						continue
					}
					weight[i] += weight[j]
					weight[j] = 0
					state[j] = mdGone
					vars[j], elems[j] = nil, nil
					chainNext[chainLast[i]] = j
					chainLast[i] = chainLast[j]
				}
			}
			s = t
		}

		// Store the element and reinsert its variables with their new
		// approximate external degrees.
		mem := make([]int, 0, len(lp))
		for _, i := range lp {
			if weight[i] > 0 {
				mem = append(mem, i)
			}
		}
		members[p] = mem
		esize[p] = size
		for _, i := range mem {
			d := ext[i] + size - weight[i]
			d = min(d, degree[i]+size-weight[i], remaining-weight[i])
			d = max(d, 0)
			degree[i] = d
			deferred[i] = false
			insert(i, d)
		}
		for _, e := range touched {
			overlap[e] = -1
		}
	}
	for _, i := range denseNodes {
		emit(i)
	}
	if len(perm) != n {
		panic(fmt.Sprintf("solver: minimum degree produced %d of %d indices", len(perm), n))
	}
	return perm
}

// ReverseCuthillMcKeeOrder returns a bandwidth-reducing symmetric ordering
// of the square matrix a (perm[k] is the index placed k-th), computed on the
// pattern of A + Aᵀ: breadth-first search from a pseudo-peripheral node of
// each connected component, neighbours visited by increasing degree (E.
// Cuthill and J. McKee, 1969), and the result reversed (A. George, 1971).
// The start node is found by the iteration of N. E. Gibbs, W. G. Poole and
// P. K. Stockmeyer (SIAM J. Numer. Anal. 13, 1976) as described in A. George
// and J. W. H. Liu, "Computer Solution of Large Sparse Positive Definite
// Systems" (1981), section 4.3.
func ReverseCuthillMcKeeOrder(a *CSR) ([]int, error) {
	n, c := a.Dims()
	if n != c {
		return nil, notSquare(n, c)
	}
	ptr, adj, _ := symmetricPattern(a)
	deg := func(i int) int { return ptr[i+1] - ptr[i] }
	visited := make([]bool, n)
	level := make([]int, n)
	perm := make([]int, 0, n)
	queue := make([]int, 0, n)
	seen := make([]int, n) // seen[i] == search: i reached by the current search
	search := 0

	// bfs returns the nodes reachable from root in breadth-first order and
	// the number of levels, without marking them visited. The returned slice
	// is overwritten by the next call.
	bfs := func(root int) (nodes []int, depth int) {
		queue = queue[:0]
		queue = append(queue, root)
		search++
		seen[root] = search
		level[root] = 0
		for h := 0; h < len(queue); h++ {
			i := queue[h]
			for _, j := range adj[ptr[i]:ptr[i+1]] {
				if seen[j] != search && !visited[j] {
					seen[j] = search
					level[j] = level[i] + 1
					queue = append(queue, j)
				}
			}
		}
		return queue, level[queue[len(queue)-1]] + 1
	}

	for s := 0; s < n; s++ {
		if visited[s] {
			continue
		}
		// Pseudo-peripheral start node of the component of s.
		root := s
		nodes, depth := bfs(root)
		for {
			best := -1
			last := level[nodes[len(nodes)-1]]
			for _, i := range nodes {
				if level[i] == last && (best < 0 || deg(i) < deg(best)) {
					best = i
				}
			}
			nodes2, depth2 := bfs(best)
			if depth2 <= depth {
				break
			}
			root, nodes, depth = best, nodes2, depth2
		}
		// Cuthill–McKee numbering of the component.
		start := len(perm)
		perm = append(perm, root)
		visited[root] = true
		for h := start; h < len(perm); h++ {
			i := perm[h]
			first := len(perm)
			for _, j := range adj[ptr[i]:ptr[i+1]] {
				if !visited[j] {
					visited[j] = true
					perm = append(perm, j)
				}
			}
			slices.SortStableFunc(perm[first:], func(x, y int) int { return deg(x) - deg(y) })
		}
	}
	slices.Reverse(perm)
	return perm, nil
}
