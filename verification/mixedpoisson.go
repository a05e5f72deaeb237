package verification

import (
	"fmt"

	"mixwell/fem"
	"mixwell/mesh"
)

func init() {
	register(&problem{
		name:     "mixed-poisson",
		variants: []string{"rt", "bdm"},
		degrees:  func(string) []int { return []int{0, 1, 2, 3, 4} },
		run:      runMixedPoisson,
	})
}

// runMixedPoisson solves sigma = -grad u, div sigma = f with u = g on the
// whole boundary (a natural condition) in the dual mixed form
//
//	(sigma, tau) - (u, div tau) = -<g, tau.n>
//	-(div sigma, v)             = -(f, v)
//
// with RT_k x DG_k or BDM_{k+1} x DG_k. Expected rates (Boffi, Brezzi &
// Fortin 2013, sec. 7.1): ||u||_L2, ||div sigma||_L2 k+1; ||sigma||_L2 k+1
// for RT_k and k+2 for BDM_{k+1}.
func runMixedPoisson(cfg Config, progress func(level, unknowns int)) (*Study, error) {
	k := cfg.Degree
	var flux fem.DivElement
	var err error
	fluxRate := float64(k + 1)
	if cfg.Variant == "rt" {
		flux, err = fem.NewRaviartThomas(k)
	} else {
		flux, err = fem.NewBDM(k + 1)
		fluxRate = float64(k + 2)
	}
	if err != nil {
		return nil, err
	}
	pot, err := fem.NewDiscontinuous(k)
	if err != nil {
		return nil, err
	}
	meshes, kind, err := meshLevels(cfg, 2, mesh.AlternatingDiagonal)
	if err != nil {
		return nil, err
	}
	st := &Study{
		Problem: "mixed-poisson", Variant: cfg.Variant, Degree: k, Mesh: kind,
		Errors: map[string][]float64{"flux_L2": nil, "flux_div": nil, "flux_Hdiv": nil, "potential_L2": nil},
		Expected: map[string]float64{
			"flux_L2": fluxRate, "flux_div": float64(k + 1), "flux_Hdiv": float64(k + 1), "potential_L2": float64(k + 1),
		},
	}
	exactFlux := func(x [2]float64) [2]float64 {
		g := poissonGrad(x)
		return [2]float64{-g[0], -g[1]}
	}
	qdeg := 2*k + 6
	for l, m := range meshes {
		S := fem.NewDivSpace(m, flux)
		U := fem.NewScalarSpace(m, pot)
		lay := fem.NewLayout(S, U)
		ns, nu := S.LocalLen(), U.LocalLen()
		sys := fem.NewSystem(lay.Len(), m.NumTriangles()*(ns+nu)*(ns+nu))
		dq := fem.NewDivQuad(flux, qdeg)
		uq := fem.NewScalarQuad(pot, qdeg)
		eq := fem.NewDivEdgeQuad(flux, k+4)
		mss := make([]float64, ns*ns)
		bsu := make([]float64, ns*nu)
		bus := make([]float64, nu*ns)
		fs := make([]float64, ns)
		fu := make([]float64, nu)
		for t := 0; t < m.NumTriangles(); t++ {
			a := fem.ElementMap(m, t)
			dq.Reinit(&a)
			uq.Reinit(&a)
			clear(mss)
			clear(bsu)
			clear(fs)
			clear(fu)
			for q := 0; q < dq.NQ; q++ {
				w := dq.W[q]
				val := dq.Val[q*ns : (q+1)*ns]
				div := dq.Div[q*ns : (q+1)*ns]
				phi := uq.Val[q*nu : (q+1)*nu]
				f := poissonSource(dq.X[q]) * w
				for i := 0; i < ns; i++ {
					for j := 0; j < ns; j++ {
						mss[i*ns+j] += w * (val[i][0]*val[j][0] + val[i][1]*val[j][1])
					}
					for j := 0; j < nu; j++ {
						bsu[i*nu+j] -= w * div[i] * phi[j]
					}
				}
				for j := 0; j < nu; j++ {
					fu[j] -= f * phi[j]
				}
			}
			for i := 0; i < ns; i++ {
				for j := 0; j < nu; j++ {
					bus[j*ns+i] = bsu[i*nu+j]
				}
			}
			// Boundary term -<g, tau.n> on boundary edges of this triangle.
			sgn := 1.0
			if a.Det < 0 {
				sgn = -1
			}
			for i, e := range m.TriangleEdges[t] {
				if m.EdgeTriangles[e][1] >= 0 {
					continue
				}
				for q := 0; q < eq.NQ; q++ {
					g := poissonExact(a.Point(eq.Ref[i][q]))
					tr := eq.Normal[i][q*ns : (q+1)*ns]
					for j := 0; j < ns; j++ {
						fs[j] -= sgn * eq.W[q] * g * tr[j]
					}
				}
			}
			sd, ss := S.Dofs(t), S.Signs(t)
			ud := U.Dofs(t)
			so, uo := lay.Offset(0), lay.Offset(1)
			sys.AddMatrix(so, sd, ss, so, sd, ss, mss)
			sys.AddMatrix(so, sd, ss, uo, ud, nil, bsu)
			sys.AddMatrix(uo, ud, nil, so, sd, ss, bus)
			sys.AddVector(so, sd, ss, fs)
			sys.AddVector(uo, ud, nil, fu)
		}
		A, b := sys.Matrix()
		x, res, err := fem.Solve(A, b)
		if err != nil {
			return nil, fmt.Errorf("verification: mixed-poisson level %d: %w", l, err)
		}
		fl2, fdiv := fem.DivErrors(S, lay.Block(x, 0), exactFlux, poissonSource, qdeg)
		ul2, _ := fem.ScalarErrors(U, lay.Block(x, 1), poissonExact, nil, qdeg)
		st.Errors["flux_L2"] = append(st.Errors["flux_L2"], fl2)
		st.Errors["flux_div"] = append(st.Errors["flux_div"], fdiv)
		st.Errors["flux_Hdiv"] = append(st.Errors["flux_Hdiv"], hypot(fl2, fdiv))
		st.Errors["potential_L2"] = append(st.Errors["potential_L2"], ul2)
		st.H = append(st.H, m.MaxEdgeLength())
		st.Unknowns = append(st.Unknowns, lay.Len())
		st.Residuals = append(st.Residuals, res)
		if progress != nil {
			progress(l, st.Unknowns[l])
		}
	}
	return st, nil
}
