package fem

// Raviart–Thomas elements RT_k on the reference triangle (Raviart & Thomas,
// A mixed finite element method for 2nd order elliptic problems, Lecture
// Notes in Math. 606 (1977) 292–315; Boffi, Brezzi & Fortin, Mixed Finite
// Element Methods and Applications, Springer 2013, Chapter 2).

import (
	"fmt"

	"gonum.org/v1/gonum/mat"
)

// MaxRaviartThomasIndex is the largest index k accepted by NewRaviartThomas.
const MaxRaviartThomasIndex = 8

// RaviartThomas is the Raviart–Thomas element RT_k of index k >= 0 on the
// reference triangle: the space P_k^2 + x P_k of dimension (k+1)(k+3), whose
// divergence lies in P_k and whose normal component on each edge lies in
// P_k.
//
// Prime basis: (psi_j, 0) and (0, psi_j) for the Dubiner functions psi_j of
// degree at most k, and x psi_j for those of degree exactly k (their leading
// homogeneous parts span the homogeneous polynomials of degree k).
//
// Degrees of freedom, in this order (see DivElement): for edges 0, 1, 2 the
// k+1 normal moments against the Legendre polynomials L_0..L_k on [0,1];
// then the k(k+1) interior moments int_T u . q_m dx against q_m = (psi_j, 0)
// for j = 0..PolyDim(k-1)-1, followed by q_m = (0, psi_j) in the same order.
// The basis is dual to them. DofsTo integrates with rules exact to degree
// max(2k+10, 18).
//
// A RaviartThomas is immutable after construction and safe for concurrent
// use.
type RaviartThomas struct {
	b *hdivBasis
}

var _ DivElement = (*RaviartThomas)(nil)

// NewRaviartThomas returns the Raviart–Thomas element of index k,
// 0 <= k <= MaxRaviartThomasIndex (RT_0 is the lowest-order element).
func NewRaviartThomas(k int) (*RaviartThomas, error) {
	if k < 0 || k > MaxRaviartThomasIndex {
		return nil, fmt.Errorf("fem: Raviart–Thomas RT_%d not available (want index 0..%d)", k, MaxRaviartThomasIndex)
	}
	m := k + 1
	np := PolyDim(m)
	nk := PolyDim(k)
	n := (k + 1) * (k + 3)
	s := mat.NewDense(n, 2*np, nil)
	for j := 0; j < nk; j++ {
		s.Set(j, j, 1)
		s.Set(nk+j, np+j, 1)
	}
	row := 2 * nk
	xFactor := func(x [2]float64) float64 { return x[0] }
	yFactor := func(x [2]float64) float64 { return x[1] }
	for j := PolyDim(k - 1); j < nk; j++ {
		c, err := projectTimesLinear(j, k, xFactor, yFactor)
		if err != nil {
			return nil, err
		}
		s.SetRow(row, c)
		row++
	}
	var tests []vectorTest
	for _, kind := range []int{testX, testY} {
		for j := 0; j < PolyDim(k-1); j++ {
			tests = append(tests, vectorTest{j: j, kind: kind})
		}
	}
	b, err := newHdivBasis(k, m, s, k-1, tests, dofRuleDegree(m))
	if err != nil {
		return nil, fmt.Errorf("fem: Raviart–Thomas RT_%d: %w", k, err)
	}
	return &RaviartThomas{b: b}, nil
}

// Degree returns the index k: divergences lie in P_k.
func (e *RaviartThomas) Degree() int { return e.b.index }

// Len returns (k+1)(k+3).
func (e *RaviartThomas) Len() int { return e.b.n }

// Entities returns a new slice with the entity of each basis function: k+1
// OnEdge functions per edge (Ordinal j for the moment against L_j), then
// k(k+1) Inside functions.
func (e *RaviartThomas) Entities() []DofEntity { return append([]DofEntity(nil), e.b.ents...) }

// ValuesTo writes the values of the basis functions at x into dst, which
// must have length Len. It does not allocate.
func (e *RaviartThomas) ValuesTo(dst [][2]float64, x [2]float64) { e.b.valuesTo(dst, x) }

// DivergencesTo writes the reference divergences of the basis functions at
// x into dst, which must have length Len. It does not allocate.
func (e *RaviartThomas) DivergencesTo(dst []float64, x [2]float64) { e.b.divergencesTo(dst, x) }

// DofsTo applies the degrees of freedom to the reference field u and writes
// the Len results into dst.
func (e *RaviartThomas) DofsTo(dst []float64, u func(x [2]float64) [2]float64) {
	e.b.dofsTo(dst, u)
}

// DualCondition returns the 2-norm condition number of the dual matrix
// (degrees of freedom applied to the prime basis).
func (e *RaviartThomas) DualCondition() float64 { return e.b.cond }
