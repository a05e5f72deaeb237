package fem

import (
	"fmt"

	"mixwell/solver"
)

// scalarDofs is implemented by scalar elements that can apply their degrees
// of freedom to a function on the reference triangle: point values for
// Lagrange elements, moments against the orthonormal basis (the L2
// projection coefficients) for discontinuous elements.
type scalarDofs interface {
	DofsTo(dst []float64, f func(x [2]float64) float64)
}

// InterpolateScalar writes into dst (length s.Len()) the canonical
// interpolant of f: nodal values for a Lagrange space, the element-wise L2
// projection for a discontinuous space (the affine map scales the mass
// matrix uniformly, so the reference projection coefficients carry over).
func InterpolateScalar(dst []float64, s *Space, f func(x [2]float64) float64) {
	if s.scalar == nil {
		panic("fem: InterpolateScalar on an H(div) space")
	}
	if len(dst) != s.n {
		panic("fem: InterpolateScalar destination length mismatch")
	}
	el, ok := s.scalar.(scalarDofs)
	if !ok {
		panic(fmt.Sprintf("fem: element %T cannot apply its degrees of freedom", s.scalar))
	}
	m := s.mesh
	loc := make([]float64, s.nloc)
	for t := 0; t < m.NumTriangles(); t++ {
		a := ElementMap(m, t)
		el.DofsTo(loc, func(xh [2]float64) float64 { return f(a.Point(xh)) })
		for i, d := range s.Dofs(t) {
			dst[d] = loc[i]
		}
	}
}

// InterpolateDiv writes into dst (length s.Len()) the canonical interpolant
// of the vector field u into the H(div) space s: on each triangle u is pulled
// back by the inverse Piola map, the reference degrees of freedom are
// applied, and the signs turn local into global values. Edge moments agree
// from both sides for a continuous u, so div(Pi u) is the L2 projection of
// div u onto the divergence space (the commuting diagram).
func InterpolateDiv(dst []float64, s *Space, u func(x [2]float64) [2]float64) {
	if s.div == nil {
		panic("fem: InterpolateDiv on a scalar space")
	}
	if len(dst) != s.n {
		panic("fem: InterpolateDiv destination length mismatch")
	}
	m := s.mesh
	loc := make([]float64, s.nloc)
	for t := 0; t < m.NumTriangles(); t++ {
		a := ElementMap(m, t)
		s.div.DofsTo(loc, func(xh [2]float64) [2]float64 {
			return a.InversePiola(u(a.Point(xh)))
		})
		signs := s.Signs(t)
		for i, d := range s.Dofs(t) {
			dst[d] = signs[i] * loc[i]
		}
	}
}

// ProjectL2 returns the global L2 projection of f onto the scalar space s,
// solving the mass-matrix system with conjugate gradients.
func ProjectL2(s *Space, f func(x [2]float64) float64) ([]float64, error) {
	if s.scalar == nil {
		return nil, fmt.Errorf("fem: ProjectL2 needs a scalar space")
	}
	e := s.scalar
	n := e.Len()
	pts, w := quadratureRule(2*e.Degree() + 8)
	tab := Tabulate(e, pts)
	m := s.mesh
	sys := NewSystem(s.n, m.NumTriangles()*n*n)
	loc := make([]float64, n*n)
	vec := make([]float64, n)
	for t := 0; t < m.NumTriangles(); t++ {
		a := ElementMap(m, t)
		ad := a.AbsDet()
		for i := range loc {
			loc[i] = 0
		}
		for i := range vec {
			vec[i] = 0
		}
		for q, xh := range pts {
			wq := w[q] * ad
			v := tab.Values[q*n : (q+1)*n]
			fx := f(a.Point(xh)) * wq
			for i := 0; i < n; i++ {
				vec[i] += fx * v[i]
				for j := 0; j < n; j++ {
					loc[i*n+j] += wq * v[i] * v[j]
				}
			}
		}
		dofs := s.Dofs(t)
		sys.AddMatrix(0, dofs, nil, 0, dofs, nil, loc)
		sys.AddVector(0, dofs, nil, vec)
	}
	A, b := sys.Matrix()
	x := make([]float64, s.n)
	if _, err := solver.ConjugateGradient(A, b, x, &solver.CGSettings{Tolerance: 1e-14, MaxIterations: 10 * s.n, Jacobi: true}); err != nil {
		return nil, fmt.Errorf("fem: L2 projection: %w", err)
	}
	return x, nil
}
