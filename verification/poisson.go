package verification

import (
	"fmt"
	"math"

	"mixwell/fem"
	"mixwell/mesh"
)

// The Poisson manufactured solution u = exp(x) sin(pi y + 0.3) on the unit
// square, smooth and without symmetry; f = -Laplace u = (pi^2 - 1) u (our
// own derivation, checked in poisson_test.go against finite differences).
func poissonExact(x [2]float64) float64 { return math.Exp(x[0]) * math.Sin(math.Pi*x[1]+0.3) }

func poissonGrad(x [2]float64) [2]float64 {
	e := math.Exp(x[0])
	return [2]float64{e * math.Sin(math.Pi*x[1]+0.3), math.Pi * e * math.Cos(math.Pi*x[1]+0.3)}
}

func poissonSource(x [2]float64) float64 { return (math.Pi*math.Pi - 1) * poissonExact(x) }

func init() {
	register(&problem{
		name:    "poisson",
		degrees: func(string) []int { return []int{1, 2, 3, 4, 5} },
		run:     runPoisson,
	})
}

// runPoisson solves -Laplace u = f with Dirichlet data on Lagrange P_k.
// Expected rates (common practice, e.g. Brenner & Scott, ch. 0 and 5):
// H1 semi-norm k, L2 k+1.
func runPoisson(cfg Config, progress func(level, unknowns int)) (*Study, error) {
	k := cfg.Degree
	meshes, kind, err := meshLevels(cfg, 2, mesh.AlternatingDiagonal)
	if err != nil {
		return nil, err
	}
	el, err := fem.NewLagrange(k)
	if err != nil {
		return nil, err
	}
	st := &Study{
		Problem: "poisson", Degree: k, Mesh: kind,
		Errors:   map[string][]float64{"u_L2": nil, "u_H1": nil},
		Expected: map[string]float64{"u_L2": float64(k + 1), "u_H1": float64(k)},
	}
	for l, m := range meshes {
		s := fem.NewScalarSpace(m, el)
		sys := fem.NewSystem(s.Len(), m.NumTriangles()*s.LocalLen()*s.LocalLen())
		bd, err := s.BoundaryDofs(m.Tags()...)
		if err != nil {
			return nil, err
		}
		ui := make([]float64, s.Len())
		fem.InterpolateScalar(ui, s, poissonExact)
		for _, d := range bd {
			sys.Fix(d, ui[d])
		}
		sq := fem.NewScalarQuad(el, 2*k+4)
		n := sq.N
		loc := make([]float64, n*n)
		vec := make([]float64, n)
		for t := 0; t < m.NumTriangles(); t++ {
			a := fem.ElementMap(m, t)
			sq.Reinit(&a)
			clear(loc)
			clear(vec)
			for q := 0; q < sq.NQ; q++ {
				w := sq.W[q]
				f := poissonSource(sq.X[q]) * w
				g := sq.Grad[q*n : (q+1)*n]
				v := sq.Val[q*n : (q+1)*n]
				for i := 0; i < n; i++ {
					vec[i] += f * v[i]
					for j := 0; j < n; j++ {
						loc[i*n+j] += w * (g[i][0]*g[j][0] + g[i][1]*g[j][1])
					}
				}
			}
			dofs := s.Dofs(t)
			sys.AddMatrix(0, dofs, nil, 0, dofs, nil, loc)
			sys.AddVector(0, dofs, nil, vec)
		}
		A, b := sys.Matrix()
		x, res, err := fem.Solve(A, b)
		if err != nil {
			return nil, fmt.Errorf("verification: poisson level %d: %w", l, err)
		}
		l2, h1 := fem.ScalarErrors(s, x, poissonExact, poissonGrad, 2*k+6)
		st.Errors["u_L2"] = append(st.Errors["u_L2"], l2)
		st.Errors["u_H1"] = append(st.Errors["u_H1"], h1)
		st.H = append(st.H, m.MaxEdgeLength())
		st.Unknowns = append(st.Unknowns, s.Len())
		st.Residuals = append(st.Residuals, res)
		if progress != nil {
			progress(l, st.Unknowns[l])
		}
	}
	return st, nil
}
