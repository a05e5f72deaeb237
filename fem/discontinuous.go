package fem

// Discontinuous P_k: the orthonormal Dubiner basis itself.

import (
	"fmt"

	"gonum.org/v1/gonum/mat"
)

// MaxDiscontinuousDegree is the largest degree accepted by NewDiscontinuous.
const MaxDiscontinuousDegree = 12

// Discontinuous is the discontinuous element P_k on the reference triangle.
// Its basis is the orthonormal Dubiner basis of P_k (see DubinerValuesTo),
// hierarchical in the degree, so the reference mass matrix is the identity.
// Every function belongs to the triangle alone (Inside), Ordinal i being
// basis function i.
//
// Its degrees of freedom are the moments int_T f psi_i dx, which for the
// orthonormal basis are the coefficients of the L2 projection onto P_k.
//
// A Discontinuous is immutable after construction and safe for concurrent
// use.
type Discontinuous struct {
	k    int
	n    int
	ents []DofEntity
	// Dof evaluation: rule points and weights*psi_i(x_q), row-major n by nq.
	pts     [][2]float64
	moments []float64
	cond    float64
}

var _ ScalarElement = (*Discontinuous)(nil)

// NewDiscontinuous returns the discontinuous P_k element, 0 <= k <=
// MaxDiscontinuousDegree. Its DofsTo uses a triangle rule exact to degree
// max(2k+8, 18).
func NewDiscontinuous(k int) (*Discontinuous, error) {
	if k < 0 || k > MaxDiscontinuousDegree {
		return nil, fmt.Errorf("fem: discontinuous P_%d not available (want degree 0..%d)", k, MaxDiscontinuousDegree)
	}
	n := PolyDim(k)
	e := &Discontinuous{k: k, n: n, ents: make([]DofEntity, n)}
	for i := range e.ents {
		e.ents[i] = DofEntity{Kind: Inside, Ordinal: i}
	}
	rule, err := NewTriangleRule(dofRuleDegree(k))
	if err != nil {
		return nil, err
	}
	nq := len(rule.Points)
	e.pts = rule.Points
	e.moments = make([]float64, n*nq)
	psi := make([]float64, n)
	for q, x := range rule.Points {
		DubinerValuesTo(psi, k, x)
		for i, v := range psi {
			e.moments[i*nq+q] = rule.Weights[q] * v
		}
	}
	// Dual matrix D[i][j] = int psi_i psi_j, the identity up to rounding.
	d := mat.NewDense(n, n, nil)
	for q, x := range rule.Points {
		DubinerValuesTo(psi, k, x)
		for i := 0; i < n; i++ {
			for j := 0; j < n; j++ {
				d.Set(i, j, d.At(i, j)+e.moments[i*nq+q]*psi[j])
			}
		}
	}
	e.cond = mat.Cond(d, 2)
	if !(e.cond < maxDualCondition) {
		return nil, fmt.Errorf("fem: discontinuous P_%d: dual matrix condition number %g", k, e.cond)
	}
	return e, nil
}

// Degree returns k.
func (e *Discontinuous) Degree() int { return e.k }

// Len returns (k+1)(k+2)/2.
func (e *Discontinuous) Len() int { return e.n }

// Entities returns a new slice: every function is Inside with Ordinal equal
// to its index.
func (e *Discontinuous) Entities() []DofEntity { return append([]DofEntity(nil), e.ents...) }

// ValuesTo writes the values of the basis functions at x into dst, which
// must have length Len. It does not allocate.
func (e *Discontinuous) ValuesTo(dst []float64, x [2]float64) {
	if len(dst) != e.n {
		panic(errShortDst)
	}
	dubiner(dst, nil, e.k, x)
}

// GradientsTo writes the reference gradients of the basis functions at x
// into dst, which must have length Len. It does not allocate.
func (e *Discontinuous) GradientsTo(dst [][2]float64, x [2]float64) {
	if len(dst) != e.n {
		panic(errShortDst)
	}
	dubiner(nil, dst, e.k, x)
}

// DofsTo writes the moments int_T f psi_i dx of the reference function f
// into dst, which must have length Len: the coefficients of the L2
// projection of f onto P_k. The integrals use a triangle rule exact to
// degree max(2k+8, 18).
func (e *Discontinuous) DofsTo(dst []float64, f func(x [2]float64) float64) {
	if len(dst) != e.n {
		panic(errShortDst)
	}
	nq := len(e.pts)
	for i := range dst {
		dst[i] = 0
	}
	for q, x := range e.pts {
		v := f(x)
		for i := range dst {
			dst[i] += e.moments[i*nq+q] * v
		}
	}
}

// DualCondition returns the 2-norm condition number of the dual matrix
// (degrees of freedom applied to the prime basis); for this element it is
// the Gram matrix of the orthonormal basis, so 1 up to rounding.
func (e *Discontinuous) DualCondition() float64 { return e.cond }
