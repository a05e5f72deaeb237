package fem

import "math"

// ScalarErrors returns the L2 norm of u_h - u and the H1 semi-norm of
// u_h - u for the field with coefficients c in the scalar space s, using a
// triangle rule exact to quadDegree. grad may be nil, in which case the H1
// semi-norm is returned as 0.
func ScalarErrors(s *Space, c []float64, u func(x [2]float64) float64, grad func(x [2]float64) [2]float64, quadDegree int) (l2, h1 float64) {
	sq := NewScalarQuad(s.scalar, quadDegree)
	m := s.mesh
	n := sq.N
	for t := 0; t < m.NumTriangles(); t++ {
		a := ElementMap(m, t)
		sq.Reinit(&a)
		dofs := s.Dofs(t)
		for q := 0; q < sq.NQ; q++ {
			var v float64
			var g [2]float64
			for i := 0; i < n; i++ {
				ci := c[dofs[i]]
				v += ci * sq.Val[q*n+i]
				g[0] += ci * sq.Grad[q*n+i][0]
				g[1] += ci * sq.Grad[q*n+i][1]
			}
			d := v - u(sq.X[q])
			l2 += sq.W[q] * d * d
			if grad != nil {
				ge := grad(sq.X[q])
				dx, dy := g[0]-ge[0], g[1]-ge[1]
				h1 += sq.W[q] * (dx*dx + dy*dy)
			}
		}
	}
	return math.Sqrt(l2), math.Sqrt(h1)
}

// DivErrors returns the L2 norm of u_h - u and of div u_h - div u for the
// field with coefficients c in the H(div) space s. div may be nil.
func DivErrors(s *Space, c []float64, u func(x [2]float64) [2]float64, div func(x [2]float64) float64, quadDegree int) (l2, divL2 float64) {
	dq := NewDivQuad(s.div, quadDegree)
	m := s.mesh
	n := dq.N
	for t := 0; t < m.NumTriangles(); t++ {
		a := ElementMap(m, t)
		dq.Reinit(&a)
		dofs, signs := s.Dofs(t), s.Signs(t)
		for q := 0; q < dq.NQ; q++ {
			var v [2]float64
			var dv float64
			for i := 0; i < n; i++ {
				ci := c[dofs[i]] * signs[i]
				v[0] += ci * dq.Val[q*n+i][0]
				v[1] += ci * dq.Val[q*n+i][1]
				dv += ci * dq.Div[q*n+i]
			}
			ue := u(dq.X[q])
			dx, dy := v[0]-ue[0], v[1]-ue[1]
			l2 += dq.W[q] * (dx*dx + dy*dy)
			if div != nil {
				dd := dv - div(dq.X[q])
				divL2 += dq.W[q] * dd * dd
			}
		}
	}
	return math.Sqrt(l2), math.Sqrt(divL2)
}

// Integrate returns the integral over the mesh of the scalar field with
// coefficients c in s (for example to remove a mean value).
func Integrate(s *Space, c []float64) float64 {
	sq := NewScalarQuad(s.scalar, 2*s.scalar.Degree()+2)
	m := s.mesh
	n := sq.N
	var sum float64
	for t := 0; t < m.NumTriangles(); t++ {
		a := ElementMap(m, t)
		sq.Reinit(&a)
		dofs := s.Dofs(t)
		for q := 0; q < sq.NQ; q++ {
			var v float64
			for i := 0; i < n; i++ {
				v += c[dofs[i]] * sq.Val[q*n+i]
			}
			sum += sq.W[q] * v
		}
	}
	return sum
}

// Area returns the total area of the mesh of s.
func Area(s *Space) float64 {
	var sum float64
	for t := 0; t < s.mesh.NumTriangles(); t++ {
		a := ElementMap(s.mesh, t)
		sum += 0.5 * a.AbsDet()
	}
	return sum
}
