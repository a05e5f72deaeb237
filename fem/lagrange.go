package fem

// Continuous Lagrange P_k with equispaced nodes.

import (
	"fmt"

	"gonum.org/v1/gonum/mat"
)

// MaxLagrangeDegree is the largest degree accepted by NewLagrange.
const MaxLagrangeDegree = 10

// Lagrange is the continuous Lagrange element P_k, k >= 1, on the reference
// triangle, with nodes on the equispaced lattice {(i/k, j/k): i, j >= 0,
// i+j <= k}. Basis function m is the polynomial of P_k equal to 1 at node m
// and 0 at the others.
//
// Node order: the vertices (0,0), (1,0), (0,1); then the k-1 nodes of edge
// 0, of edge 1 and of edge 2, each ordered in the local edge direction (edge
// i from vertex (i+1)%3 to vertex (i+2)%3, Ordinal 0 nearest the first
// vertex); then the (k-1)(k-2)/2 interior nodes (i/k, j/k) ordered by j,
// then i, both increasing.
//
// The basis is computed as linear combinations of the orthonormal Dubiner
// basis by inverting the dual (Vandermonde) matrix V[i][j] = psi_j(node i).
//
// A Lagrange is immutable after construction and safe for concurrent use.
type Lagrange struct {
	k     int
	n     int
	nodes [][2]float64
	ents  []DofEntity
	// coef is n by n row-major: phi_m = sum_j coef[m*n+j] psi_j.
	coef []float64
	cond float64
}

var _ ScalarElement = (*Lagrange)(nil)

// NewLagrange returns the continuous Lagrange element P_k, 1 <= k <=
// MaxLagrangeDegree.
func NewLagrange(k int) (*Lagrange, error) {
	if k < 1 || k > MaxLagrangeDegree {
		return nil, fmt.Errorf("fem: Lagrange P_%d not available (want degree 1..%d)", k, MaxLagrangeDegree)
	}
	n := PolyDim(k)
	e := &Lagrange{k: k, n: n}
	e.nodes, e.ents = lagrangeNodes(k)

	// V[i][j] = psi_j(node i); basis coefficients C solve V^T C = I, so
	// that phi_m(node i) = sum_j C[m][j] V[i][j] = delta_mi.
	v := mat.NewDense(n, n, nil)
	row := make([]float64, n)
	for i, x := range e.nodes {
		DubinerValuesTo(row, k, x)
		v.SetRow(i, row)
	}
	c, cond, err := dualBasis(v, nil)
	if err != nil {
		return nil, fmt.Errorf("fem: Lagrange P_%d: %w", k, err)
	}
	e.coef = c
	e.cond = cond
	return e, nil
}

// lagrangeNodes returns the equispaced nodes of P_k in the documented order
// and the entity of each.
func lagrangeNodes(k int) ([][2]float64, []DofEntity) {
	verts := [3][2]float64{{0, 0}, {1, 0}, {0, 1}}
	var nodes [][2]float64
	var ents []DofEntity
	for v := 0; v < 3; v++ {
		nodes = append(nodes, verts[v])
		ents = append(ents, DofEntity{Kind: AtVertex, Index: v})
	}
	fk := float64(k)
	for ed := 0; ed < 3; ed++ {
		a, b := verts[(ed+1)%3], verts[(ed+2)%3]
		for j := 1; j < k; j++ {
			s := float64(j) / fk
			nodes = append(nodes, [2]float64{a[0] + s*(b[0]-a[0]), a[1] + s*(b[1]-a[1])})
			ents = append(ents, DofEntity{Kind: OnEdge, Index: ed, Ordinal: j - 1})
		}
	}
	m := 0
	for j := 1; j < k; j++ {
		for i := 1; i+j < k; i++ {
			nodes = append(nodes, [2]float64{float64(i) / fk, float64(j) / fk})
			ents = append(ents, DofEntity{Kind: Inside, Ordinal: m})
			m++
		}
	}
	return nodes, ents
}

// Degree returns k.
func (e *Lagrange) Degree() int { return e.k }

// Len returns (k+1)(k+2)/2.
func (e *Lagrange) Len() int { return e.n }

// Entities returns a new slice with the entity of each basis function.
func (e *Lagrange) Entities() []DofEntity { return append([]DofEntity(nil), e.ents...) }

// Nodes returns a new slice with the reference coordinates of the nodes, in
// the order of the basis functions.
func (e *Lagrange) Nodes() [][2]float64 { return append([][2]float64(nil), e.nodes...) }

// ValuesTo writes the values of the basis functions at x into dst, which
// must have length Len. It does not allocate.
func (e *Lagrange) ValuesTo(dst []float64, x [2]float64) {
	if len(dst) != e.n {
		panic(errShortDst)
	}
	var buf [maxScalarLen]float64
	psi := buf[:e.n]
	dubiner(psi, nil, e.k, x)
	combineTo(dst, e.coef, psi)
}

// GradientsTo writes the reference gradients of the basis functions at x
// into dst, which must have length Len. It does not allocate.
func (e *Lagrange) GradientsTo(dst [][2]float64, x [2]float64) {
	if len(dst) != e.n {
		panic(errShortDst)
	}
	var buf [maxScalarLen][2]float64
	g := buf[:e.n]
	dubiner(nil, g, e.k, x)
	for m := range dst {
		c := e.coef[m*e.n : (m+1)*e.n]
		var gx, gy float64
		for j, v := range c {
			gx += v * g[j][0]
			gy += v * g[j][1]
		}
		dst[m] = [2]float64{gx, gy}
	}
}

// DofsTo writes the nodal values f(node i) of the reference function f into
// dst, which must have length Len: the coefficients of the nodal
// interpolant.
func (e *Lagrange) DofsTo(dst []float64, f func(x [2]float64) float64) {
	if len(dst) != e.n {
		panic(errShortDst)
	}
	for i, x := range e.nodes {
		dst[i] = f(x)
	}
}

// DualCondition returns the 2-norm condition number of the dual matrix
// V[i][j] = psi_j(node i) of the nodes against the orthonormal basis.
func (e *Lagrange) DualCondition() float64 { return e.cond }

// combineTo sets dst[m] = sum_j coef[m*len(psi)+j] psi[j].
func combineTo(dst, coef, psi []float64) {
	np := len(psi)
	for m := range dst {
		c := coef[m*np : (m+1)*np]
		var s float64
		for j, v := range c {
			s += v * psi[j]
		}
		dst[m] = s
	}
}
