package fem

import (
	"math"
	"testing"
)

func TestScalarQuadFieldAt(t *testing.T) {
	// P2 interpolates f = 1 + 2x - 3y + x y exactly (common practice:
	// Lagrange P2 reproduces quadratics), so FieldAt must give f and its
	// gradient (2 + y, -3 + x) at every quadrature point to rounding.
	const tol = 1e-12
	m := randomMesh(t, 3)
	el, err := NewLagrange(2)
	if err != nil {
		t.Fatal(err)
	}
	s := NewScalarSpace(m, el)
	coeffs := make([]float64, s.Len())
	InterpolateScalar(coeffs, s, func(x [2]float64) float64 { return 1 + 2*x[0] - 3*x[1] + x[0]*x[1] })
	q := NewScalarQuad(el, 4)
	for tr := 0; tr < m.NumTriangles(); tr++ {
		a := ElementMap(m, tr)
		q.Reinit(&a)
		for k := 0; k < q.NQ; k++ {
			x := q.X[k]
			v, g := q.FieldAt(k, coeffs, s.Dofs(tr))
			want := 1 + 2*x[0] - 3*x[1] + x[0]*x[1]
			if math.Abs(v-want) > tol || math.Abs(g[0]-(2+x[1])) > tol || math.Abs(g[1]-(-3+x[0])) > tol {
				t.Fatalf("triangle %d point %d: value %g grad %v, want %g (%g, %g)", tr, k, v, g, want, 2+x[1], -3+x[0])
			}
		}
	}
}
