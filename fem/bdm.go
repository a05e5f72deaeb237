package fem

// Brezzi–Douglas–Marini elements BDM_k on the reference triangle (Brezzi,
// Douglas & Marini, Two families of mixed finite elements for second order
// elliptic problems, Numer. Math. 47 (1985) 217–235; Boffi, Brezzi & Fortin,
// Mixed Finite Element Methods and Applications, Springer 2013, Chapter 2).

import (
	"fmt"

	"gonum.org/v1/gonum/mat"
)

// MaxBDMDegree is the largest degree k accepted by NewBDM.
const MaxBDMDegree = 9

// BDM is the Brezzi–Douglas–Marini element BDM_k, k >= 1, on the reference
// triangle: the full space P_k^2 of dimension (k+1)(k+2), whose divergence
// lies in P_{k-1} and whose normal component on each edge lies in P_k.
//
// Prime basis: (psi_j, 0) and (0, psi_j) for the Dubiner functions psi_j of
// degree at most k.
//
// Degrees of freedom, in this order (see DivElement): for edges 0, 1, 2 the
// k+1 normal moments against the Legendre polynomials L_0..L_k on [0,1];
// then the (k-1)(k+1) interior moments int_T u . q_m dx against a basis of
// the first-kind Nédélec space P_{k-2}^2 + (-y, x) P_{k-2}: q_m = (psi_j, 0)
// for j = 0..PolyDim(k-2)-1, then (0, psi_j) in the same order, then
// (-y, x) psi_j for the psi_j of degree exactly k-2. With this choice the
// canonical interpolant commutes with the L2 projection onto P_{k-1}
// (div of the interpolant = projection of the divergence), and the interior
// test space is invariant under affine pull-back with the covariant map. The
// basis is dual to the degrees of freedom. DofsTo integrates with rules
// exact to degree max(2k+8, 18).
//
// A BDM is immutable after construction and safe for concurrent use.
type BDM struct {
	b *hdivBasis
}

var _ DivElement = (*BDM)(nil)

// NewBDM returns the Brezzi–Douglas–Marini element of degree k,
// 1 <= k <= MaxBDMDegree.
func NewBDM(k int) (*BDM, error) {
	if k < 1 || k > MaxBDMDegree {
		return nil, fmt.Errorf("fem: Brezzi–Douglas–Marini BDM_%d not available (want degree 1..%d)", k, MaxBDMDegree)
	}
	np := PolyDim(k)
	n := 2 * np
	s := mat.NewDense(n, n, nil)
	for j := 0; j < n; j++ {
		s.Set(j, j, 1)
	}
	var tests []vectorTest
	for _, kind := range []int{testX, testY} {
		for j := 0; j < PolyDim(k-2); j++ {
			tests = append(tests, vectorTest{j: j, kind: kind})
		}
	}
	for j := PolyDim(k - 3); j < PolyDim(k-2); j++ {
		tests = append(tests, vectorTest{j: j, kind: testRot})
	}
	b, err := newHdivBasis(k, k, s, k-2, tests, dofRuleDegree(k))
	if err != nil {
		return nil, fmt.Errorf("fem: Brezzi–Douglas–Marini BDM_%d: %w", k, err)
	}
	return &BDM{b: b}, nil
}

// Degree returns k: the space is P_k^2, divergences lie in P_{k-1}.
func (e *BDM) Degree() int { return e.b.index }

// Len returns (k+1)(k+2).
func (e *BDM) Len() int { return e.b.n }

// Entities returns a new slice with the entity of each basis function: k+1
// OnEdge functions per edge (Ordinal j for the moment against L_j), then
// (k-1)(k+1) Inside functions.
func (e *BDM) Entities() []DofEntity { return append([]DofEntity(nil), e.b.ents...) }

// ValuesTo writes the values of the basis functions at x into dst, which
// must have length Len. It does not allocate.
func (e *BDM) ValuesTo(dst [][2]float64, x [2]float64) { e.b.valuesTo(dst, x) }

// DivergencesTo writes the reference divergences of the basis functions at
// x into dst, which must have length Len. It does not allocate.
func (e *BDM) DivergencesTo(dst []float64, x [2]float64) { e.b.divergencesTo(dst, x) }

// DofsTo applies the degrees of freedom to the reference field u and writes
// the Len results into dst.
func (e *BDM) DofsTo(dst []float64, u func(x [2]float64) [2]float64) { e.b.dofsTo(dst, u) }

// DualCondition returns the 2-norm condition number of the dual matrix
// (degrees of freedom applied to the prime basis).
func (e *BDM) DualCondition() float64 { return e.b.cond }
