package solver

import "math"

// pairCoupling is the fraction of its strongest coupling that a constraint
// must have with a neighbour to be paired with it. Measured on the scaled
// matrix; see saddlePairs. It is sqrt(DefaultPivotThreshold), rounded (it
// was 0.1 before delayed pivots; see saddlePairs for the measurements).
const pairCoupling = 0.32

// saddlePairs matches the constraint nodes of a (zero or absent diagonal)
// to distinct coupled nodes with a nonzero diagonal, returning partner[c] =
// v and partner[v] = c, or -1 for unmatched nodes. ptr and adj are the
// graph of A + Aᵀ and zeroDiag marks the constraints (symmetricPattern); d
// is the symmetric Ruiz scaling of a, computed here when nil.
//
// Ordering v immediately before c makes the 2×2 block [a_vv b; b 0] the
// pivot of the pair. For the factorisation to keep to the ordering two
// things are needed, and the matching is built for both:
//
//  1. Each pair must be numerically sound on its own: after v is
//     eliminated c has the diagonal −b²/a_vv, which must pass the
//     threshold test against the other entries of its column. Pairs are
//     therefore chosen on the symmetrically equilibrated matrix D A D
//     (Ruiz scaling, as in the factorisation). The coupling b of c and v
//     is the geometric mean sqrt(|(DAD)_cv|·|(DAD)_vc|), the size that
//     enters the pivot −a_cv·a_vc/a_vv, so that unsymmetric matrices are
//     judged right: in the species systems of package physics the
//     mass-constraint row of a pressure couples to the fluxes at full
//     size, while the flux rows see the pressure only through the group
//     S ≈ 1e-13 (formulation note, section 1). Taking the larger entry, as
//     a symmetric view would, paired 595 of the 599 pressures of a
//     Stefan-tube system with an interior flux, pairs whose 2×2 block is
//     singular to working precision. With best the largest coupling of c,
//     v qualifies when the pair's pivot passes the threshold test against
//     it, b²/|a_vv| ≥ τ·best (τ = DefaultPivotThreshold), and when b ≥
//     pairCoupling·best = sqrt(τ)·best, the same test for a_vv as large as
//     best. Finite element matrices store many couplings that are zero up
//     to rounding (for example the mean of a discontinuous potential
//     against the divergence of an interior flux bubble, which vanishes by
//     the divergence theorem); a pattern-only matching happily pairs across
//     them, and every such pair costs an off-diagonal pivot. A constraint
//     whose couplings are all weak against the diagonals of its neighbours,
//     such as the pressure of those Stefan-tube systems (b ≈ 0.05 beside
//     a_vv ≈ 1 after scaling, the pressure rows being dominated by their
//     flux couplings), stays unpaired and is deferred: its diagonal grows
//     as its neighbours are eliminated. Measured on Stefan-tube systems,
//     with delayed pivots in the factorisation (6 897 / 12 983 / 68 059
//     unknowns, nnz(L+U); our measurements): the pairCoupling test alone
//     with 0.1 gave 1.21M / 1.57M / 16.1M and with 0.32 0.47M / 2.12M /
//     16.4M; both tests with 0.32 give 0.40M / 1.42M / 15.4M.
//  2. The pairs must be sound together: with B the constraint rows, every
//     set S of pairs that is eliminated first needs B restricted to the
//     constraints of S and their partners to be nonsingular. A matching
//     along a cycle of cells of a discrete divergence violates this. If c
//     is only ever matched to a v whose other coupled constraints are all
//     matched already, B restricted to the pairs is triangular in matching
//     order, and every such restriction is nonsingular.
//
// Condition 2 cannot always hold (a dense element block of constraints and
// interior unknowns has none), so the matching is greedy: it repeatedly
// takes the unmatched constraint whose best free partner has the fewest
// other unmatched constraints (its deficiency), ties going to the partner
// of smaller degree (the pair's merged adjacency, and so the fill, grows
// least) and then to the stronger coupling. Constraints with a private
// partner (a face next to a pinned pressure, a boundary flux of a cell)
// are matched first, matching grows from them like a breadth-first forest
// (each match lowers the deficiency of its neighbours' partners to zero),
// and dense element blocks are matched internally before their remaining
// constraints are joined to the forest. This is the compressed 2×2
// ordering of I. S. Duff and S. Pralet, "Strategies for scaling and
// pivoting for sparse symmetric indefinite problems", SIAM J. Matrix Anal.
// Appl. 27(2), 2005 (pairs of a numerical matching of the scaled matrix
// ordered as single nodes), with our own greedy matching in place of
// their maximum weight matching so that the pairs also satisfy condition
// 2; the deficiency rule plays the role of the degree-one rule of R. M.
// Karp and M. Sipser, "Maximum matchings in sparse random graphs", FOCS
// 1981 (reference details from memory).
//
// Constraints without a significant free neighbour stay unmatched and are
// deferred by the ordering (Bridson's rule, see MinimumDegreeOrder).
func saddlePairs(a *CSR, ptr, adj []int, zeroDiag []bool, d []float64) []int {
	n := a.rows
	partner := make([]int, n)
	for i := range partner {
		partner[i] = -1
	}
	nc := 0
	for _, z := range zeroDiag {
		if z {
			nc++
		}
	}
	if nc == 0 {
		return partner
	}
	if d == nil {
		d = make([]float64, n)
		symmetricScaling(d, a, 30, 1e-2)
	}

	// Significant couplings, constraint → candidates (cptr, cadj, cw) and
	// candidate → constraints (vptr, vadj).
	cptr := make([]int, n+1)
	var cadj []int
	var cw []float64
	var cand []int
	var candW []float64
	for c := 0; c < n; c++ {
		if zeroDiag[c] {
			cand, candW = cand[:0], candW[:0]
			best := 0.0
			for _, v := range adj[ptr[c]:ptr[c+1]] {
				if zeroDiag[v] {
					continue
				}
				// The pair's pivot after v is −a_cv·a_vc/a_vv: weigh the
				// coupling by the geometric mean of its two entries
				// (exactly |a_cv| when they are equal).
				var wcv, wvc float64
				if p := a.Index(c, v); p >= 0 {
					wcv = math.Abs(a.val[p])
				}
				if p := a.Index(v, c); p >= 0 {
					wvc = math.Abs(a.val[p])
				}
				w := wcv
				if wvc != wcv {
					w = math.Sqrt(wcv) * math.Sqrt(wvc)
				}
				w *= d[c] * d[v]
				if !(w > 0) || math.IsInf(w, 0) {
					continue // zero, or not finite: FactorLU reports those
				}
				cand = append(cand, v)
				candW = append(candW, w)
				best = math.Max(best, w)
			}
			for t, v := range cand {
				b := candW[t]
				avv := 0.0
				if p := a.Index(v, v); p >= 0 {
					avv = math.Abs(a.val[p]) * d[v] * d[v]
				}
				if b >= pairCoupling*best && b*b >= DefaultPivotThreshold*avv*best {
					cadj = append(cadj, v)
					cw = append(cw, b/best)
				}
			}
		}
		cptr[c+1] = len(cadj)
	}
	vptr := make([]int, n+1)
	for _, v := range cadj {
		vptr[v+1]++
	}
	for i := 0; i < n; i++ {
		vptr[i+1] += vptr[i]
	}
	vadj := make([]int, len(cadj))
	fill := append([]int(nil), vptr[:n]...)
	for c := 0; c < n; c++ {
		for _, v := range cadj[cptr[c]:cptr[c+1]] {
			vadj[fill[v]] = c
			fill[v]++
		}
	}
	// open[v]: unmatched constraints significantly coupled to v.
	open := make([]int, n)
	for v := 0; v < n; v++ {
		open[v] = vptr[v+1] - vptr[v]
	}

	// best returns the free partner of c with least deficiency, ties to the
	// partner of smaller degree (the pair's merged adjacency, and so the
	// fill, grows least) and then to the stronger coupling; v = -1 if c
	// has no free partner.
	best := func(c int) (v int, e pairEntry) {
		v = -1
		for t := cptr[c]; t < cptr[c+1]; t++ {
			u := cadj[t]
			if partner[u] >= 0 {
				continue
			}
			eu := pairEntry{def: open[u] - 1, deg: ptr[u+1] - ptr[u], w: cw[t], c: c}
			if v < 0 || eu.before(e) {
				v, e = u, eu
			}
		}
		return v, e
	}
	key := make([]int, n) // deficiency of the newest heap entry of c
	var h pairHeap
	for c := 0; c < n; c++ {
		if !zeroDiag[c] {
			continue
		}
		if v, e := best(c); v >= 0 {
			key[c] = e.def
			h.push(e)
		}
	}
	for len(h) > 0 {
		old := h.pop()
		c := old.c
		if partner[c] >= 0 {
			continue
		}
		v, e := best(c)
		if v < 0 {
			continue // no free partner left: c stays unmatched
		}
		if old.before(e) {
			// The entry was stale (its partner was taken): queue anew.
			key[c] = e.def
			h.push(e)
			continue
		}
		partner[c], partner[v] = v, c
		for _, u := range cadj[cptr[c]:cptr[c+1]] {
			open[u]--
			if partner[u] >= 0 {
				continue
			}
			du := open[u] - 1
			for _, c2 := range vadj[vptr[u]:vptr[u+1]] {
				if partner[c2] < 0 && c2 != c && du < key[c2] {
					_, e2 := best(c2)
					key[c2] = e2.def
					h.push(e2)
				}
			}
		}
	}
	return partner
}

// pairEntry is a constraint c waiting to be matched, with the deficiency,
// degree and coupling of its best partner when it was queued.
type pairEntry struct {
	def, deg int
	w        float64
	c        int
}

// before reports whether e is matched before f: smaller deficiency, then
// smaller partner degree, then stronger coupling, then smaller index.
func (e pairEntry) before(f pairEntry) bool {
	switch {
	case e.def != f.def:
		return e.def < f.def
	case e.deg != f.deg:
		return e.deg < f.deg
	case e.w != f.w:
		return e.w > f.w
	}
	return e.c < f.c
}

// pairHeap is a binary min-heap of entries under before (typed, so that
// pushing does not allocate).
type pairHeap []pairEntry

func (h *pairHeap) push(e pairEntry) {
	*h = append(*h, e)
	q := *h
	for i := len(q) - 1; i > 0; {
		up := (i - 1) / 2
		if !q[i].before(q[up]) {
			break
		}
		q[i], q[up] = q[up], q[i]
		i = up
	}
}

func (h *pairHeap) pop() pairEntry {
	q := *h
	top := q[0]
	last := len(q) - 1
	q[0] = q[last]
	q = q[:last]
	for i := 0; ; {
		m := i
		if l := 2*i + 1; l < len(q) && q[l].before(q[m]) {
			m = l
		}
		if r := 2*i + 2; r < len(q) && q[r].before(q[m]) {
			m = r
		}
		if m == i {
			break
		}
		q[i], q[m] = q[m], q[i]
		i = m
	}
	*h = q
	return top
}
