package solver_test

import (
	"math/rand/v2"
	"testing"

	"mixwell/fem"
	"mixwell/mesh"
	"mixwell/solver"
)

// The fixtures of this file assemble finite element saddle-point systems
// with package fem. fem imports solver, so they live in the external test
// package.

// mixedPoissonMatrix returns the matrix of the dual mixed Poisson problem
//
//	[ M  Bᵀ ]   (σ, τ) − (u, div τ)
//	[ B  0  ]   −(div σ, v)
//
// with Raviart–Thomas RT_k fluxes and discontinuous DG_k potentials on the
// unit square split into 2·cells² triangles with alternating diagonals,
// assembled as in verification/mixedpoisson.go (natural boundary
// condition on the potential, so the matrix is nonsingular). It also
// returns the number of flux unknowns, which come first.
func mixedPoissonMatrix(tb testing.TB, k, cells int) (a *solver.CSR, nflux int) {
	tb.Helper()
	flux, err := fem.NewRaviartThomas(k)
	if err != nil {
		tb.Fatal(err)
	}
	pot, err := fem.NewDiscontinuous(k)
	if err != nil {
		tb.Fatal(err)
	}
	m, err := mesh.Rectangle(0, 0, 1, 1, cells, cells, mesh.AlternatingDiagonal)
	if err != nil {
		tb.Fatal(err)
	}
	S := fem.NewDivSpace(m, flux)
	U := fem.NewScalarSpace(m, pot)
	lay := fem.NewLayout(S, U)
	ns, nu := S.LocalLen(), U.LocalLen()
	sys := fem.NewSystem(lay.Len(), m.NumTriangles()*(ns+nu)*(ns+nu))
	qdeg := 2*k + 2
	dq := fem.NewDivQuad(flux, qdeg)
	uq := fem.NewScalarQuad(pot, qdeg)
	mss := make([]float64, ns*ns)
	bsu := make([]float64, ns*nu)
	bus := make([]float64, nu*ns)
	for t := 0; t < m.NumTriangles(); t++ {
		af := fem.ElementMap(m, t)
		dq.Reinit(&af)
		uq.Reinit(&af)
		clear(mss)
		clear(bsu)
		for q := 0; q < dq.NQ; q++ {
			w := dq.W[q]
			val := dq.Val[q*ns : (q+1)*ns]
			div := dq.Div[q*ns : (q+1)*ns]
			phi := uq.Val[q*nu : (q+1)*nu]
			for i := 0; i < ns; i++ {
				for j := 0; j < ns; j++ {
					mss[i*ns+j] += w * (val[i][0]*val[j][0] + val[i][1]*val[j][1])
				}
				for j := 0; j < nu; j++ {
					bsu[i*nu+j] -= w * div[i] * phi[j]
				}
			}
		}
		for i := 0; i < ns; i++ {
			for j := 0; j < nu; j++ {
				bus[j*ns+i] = bsu[i*nu+j]
			}
		}
		sd, ss := S.Dofs(t), S.Signs(t)
		ud := U.Dofs(t)
		so, uo := lay.Offset(0), lay.Offset(1)
		sys.AddMatrix(so, sd, ss, so, sd, ss, mss)
		sys.AddMatrix(so, sd, ss, uo, ud, nil, bsu)
		sys.AddMatrix(uo, ud, nil, so, sd, ss, bus)
	}
	a, _ = sys.Matrix()
	return a, S.Len()
}

// taylorHoodMatrix returns the Stokes matrix of P_{k+1}/P_k Taylor–Hood
// elements (−div 2ε(u) + ∇p, −div u) on the unit square with 2·cells²
// triangles, homogeneous Dirichlet velocity (unit rows and columns) and
// one pressure unknown pinned, as in verification/stokes.go.
func taylorHoodMatrix(tb testing.TB, k, cells int) *solver.CSR {
	tb.Helper()
	vel, err := fem.NewLagrange(k + 1)
	if err != nil {
		tb.Fatal(err)
	}
	pres, err := fem.NewLagrange(k)
	if err != nil {
		tb.Fatal(err)
	}
	m, err := mesh.Rectangle(0, 0, 1, 1, cells, cells, mesh.AlternatingDiagonal)
	if err != nil {
		tb.Fatal(err)
	}
	V := fem.NewScalarSpace(m, vel)
	P := fem.NewScalarSpace(m, pres)
	lay := fem.NewLayout(V, V, P)
	nv, np := V.LocalLen(), P.LocalLen()
	sys := fem.NewSystem(lay.Len(), m.NumTriangles()*(2*nv+np)*(2*nv+np))
	bd, err := V.BoundaryDofs(m.Tags()...)
	if err != nil {
		tb.Fatal(err)
	}
	for _, d := range bd {
		sys.Fix(lay.Offset(0)+d, 0)
		sys.Fix(lay.Offset(1)+d, 0)
	}
	sys.Fix(lay.Offset(2)+P.Dofs(0)[0], 0)
	qdeg := 2*(k+1) + 1
	vq := fem.NewScalarQuad(vel, qdeg)
	pq := fem.NewScalarQuad(pres, qdeg)
	var av [2][2][]float64
	var bv, btv [2][]float64
	for c := 0; c < 2; c++ {
		for d := 0; d < 2; d++ {
			av[c][d] = make([]float64, nv*nv)
		}
		bv[c] = make([]float64, np*nv)
		btv[c] = make([]float64, nv*np)
	}
	for t := 0; t < m.NumTriangles(); t++ {
		af := fem.ElementMap(m, t)
		vq.Reinit(&af)
		pq.Reinit(&af)
		for c := 0; c < 2; c++ {
			for d := 0; d < 2; d++ {
				clear(av[c][d])
			}
			clear(bv[c])
		}
		for q := 0; q < vq.NQ; q++ {
			w := vq.W[q]
			g := vq.Grad[q*nv : (q+1)*nv]
			ps := pq.Val[q*np : (q+1)*np]
			for i := 0; i < nv; i++ {
				for j := 0; j < nv; j++ {
					gg := g[i][0]*g[j][0] + g[i][1]*g[j][1]
					for c := 0; c < 2; c++ {
						for d := 0; d < 2; d++ {
							v := g[i][d] * g[j][c]
							if c == d {
								v += gg
							}
							av[c][d][i*nv+j] += w * v
						}
					}
				}
				for r := 0; r < np; r++ {
					bv[0][r*nv+i] -= w * ps[r] * g[i][0]
					bv[1][r*nv+i] -= w * ps[r] * g[i][1]
				}
			}
		}
		vd, pd := V.Dofs(t), P.Dofs(t)
		for c := 0; c < 2; c++ {
			for i := 0; i < nv; i++ {
				for r := 0; r < np; r++ {
					btv[c][i*np+r] = bv[c][r*nv+i]
				}
			}
			for d := 0; d < 2; d++ {
				sys.AddMatrix(lay.Offset(c), vd, nil, lay.Offset(d), vd, nil, av[c][d])
			}
			sys.AddMatrix(lay.Offset(2), pd, nil, lay.Offset(c), vd, nil, bv[c])
			sys.AddMatrix(lay.Offset(c), vd, nil, lay.Offset(2), pd, nil, btv[c])
		}
	}
	a, _ := sys.Matrix()
	return a
}

// randomRHS returns a seeded right-hand side of length n.
func randomRHS(n int, seed uint64) []float64 {
	rng := rand.New(rand.NewPCG(seed, 0x5add1e))
	b := make([]float64, n)
	for i := range b {
		b[i] = rng.NormFloat64()
	}
	return b
}

// coupledMatrix returns a symmetric saddle-point matrix [A Bᵀ; B 0] of the
// kind of the coupled multi-field models: A is block diagonal with a
// P2 vector Laplacian for a continuous velocity u (homogeneous Dirichlet
// rows and columns) and mass matrices for two H(div) fluxes σ₁ ∈ RT_k and
// σ₂ ∈ BDM_{k+1}; B couples them to a continuous P1 pressure p (one
// unknown pinned) through −(p, div u) − (p, div σ₁) and to two DG_k
// potentials φ₁, φ₂ through −(φᵢ, div σᵢ). The blocks carry the scales
// 1, 10⁻⁴ and 10³ (velocity, σ₁, σ₂) and 10² (φ₂), so that only a scaled
// matrix has comparable entries.
func coupledMatrix(tb testing.TB, k, cells int) *solver.CSR {
	tb.Helper()
	vel, err := fem.NewLagrange(2)
	if err != nil {
		tb.Fatal(err)
	}
	pres, err := fem.NewLagrange(1)
	if err != nil {
		tb.Fatal(err)
	}
	rt, err := fem.NewRaviartThomas(k)
	if err != nil {
		tb.Fatal(err)
	}
	bdm, err := fem.NewBDM(k + 1)
	if err != nil {
		tb.Fatal(err)
	}
	dg, err := fem.NewDiscontinuous(k)
	if err != nil {
		tb.Fatal(err)
	}
	m, err := mesh.Rectangle(0, 0, 1, 1, cells, cells, mesh.AlternatingDiagonal)
	if err != nil {
		tb.Fatal(err)
	}
	V := fem.NewScalarSpace(m, vel)
	P := fem.NewScalarSpace(m, pres)
	S1 := fem.NewDivSpace(m, rt)
	S2 := fem.NewDivSpace(m, bdm)
	F1 := fem.NewScalarSpace(m, dg)
	F2 := fem.NewScalarSpace(m, dg)
	lay := fem.NewLayout(V, V, S1, S2, P, F1, F2)
	const (
		ux, uy, s1, s2, pp, f1, f2 = 0, 1, 2, 3, 4, 5, 6
	)
	scale := [7]float64{1, 1, 1e-4, 1e3, 1, 1, 1e2}
	loc := 2*V.LocalLen() + S1.LocalLen() + S2.LocalLen() + P.LocalLen() + 2*F1.LocalLen()
	sys := fem.NewSystem(lay.Len(), m.NumTriangles()*loc*loc)
	bd, err := V.BoundaryDofs(m.Tags()...)
	if err != nil {
		tb.Fatal(err)
	}
	for _, d := range bd {
		sys.Fix(lay.Offset(ux)+d, 0)
		sys.Fix(lay.Offset(uy)+d, 0)
	}
	sys.Fix(lay.Offset(pp)+P.Dofs(0)[0], 0)
	qdeg := 2*k + 4
	vq := fem.NewScalarQuad(vel, qdeg)
	pq := fem.NewScalarQuad(pres, qdeg)
	dq := [2]*fem.DivQuad{fem.NewDivQuad(rt, qdeg), fem.NewDivQuad(bdm, qdeg)}
	fq := fem.NewScalarQuad(dg, qdeg)
	sp := [2]*fem.Space{S1, S2}
	nv, np, nf := V.LocalLen(), P.LocalLen(), F1.LocalLen()
	// add assembles ∑_q w f(q, i, j) into block (r, c) and, if sym, its
	// transpose into (c, r).
	add := func(t, r, c int, nr, nc int, sym bool, f func(q, i, j int) float64, nq int, w []float64) {
		local := make([]float64, nr*nc)
		for q := 0; q < nq; q++ {
			for i := 0; i < nr; i++ {
				for j := 0; j < nc; j++ {
					local[i*nc+j] += w[q] * f(q, i, j)
				}
			}
		}
		dofs := func(b int) ([]int, []float64) {
			switch b {
			case ux, uy:
				return V.Dofs(t), nil
			case s1, s2:
				s := sp[b-s1]
				return s.Dofs(t), s.Signs(t)
			case pp:
				return P.Dofs(t), nil
			}
			return F1.Dofs(t), nil
		}
		rd, rs := dofs(r)
		cd, cs := dofs(c)
		sys.AddMatrix(lay.Offset(r), rd, rs, lay.Offset(c), cd, cs, local)
		if sym {
			lt := make([]float64, nc*nr)
			for i := 0; i < nr; i++ {
				for j := 0; j < nc; j++ {
					lt[j*nr+i] = local[i*nc+j]
				}
			}
			sys.AddMatrix(lay.Offset(c), cd, cs, lay.Offset(r), rd, rs, lt)
		}
	}
	for t := 0; t < m.NumTriangles(); t++ {
		af := fem.ElementMap(m, t)
		vq.Reinit(&af)
		pq.Reinit(&af)
		fq.Reinit(&af)
		dq[0].Reinit(&af)
		dq[1].Reinit(&af)
		nq := vq.NQ
		for c := 0; c < 2; c++ {
			b := ux + c
			add(t, b, b, nv, nv, false, func(q, i, j int) float64 {
				g := vq.Grad[q*nv:]
				return scale[b] * (g[i][0]*g[j][0] + g[i][1]*g[j][1])
			}, nq, vq.W)
			add(t, pp, b, np, nv, true, func(q, i, j int) float64 {
				return -pq.Val[q*np+i] * vq.Grad[q*nv+j][c]
			}, nq, vq.W)
		}
		for s := 0; s < 2; s++ {
			d := dq[s]
			ns := sp[s].LocalLen()
			b := s1 + s
			add(t, b, b, ns, ns, false, func(q, i, j int) float64 {
				v := d.Val[q*ns:]
				return scale[b] * (v[i][0]*v[j][0] + v[i][1]*v[j][1])
			}, nq, d.W)
			add(t, f1+s, b, nf, ns, true, func(q, i, j int) float64 {
				return -scale[f1+s] * fq.Val[q*nf+i] * d.Div[q*ns+j]
			}, nq, d.W)
		}
		add(t, pp, s1, np, S1.LocalLen(), true, func(q, i, j int) float64 {
			return -pq.Val[q*np+i] * dq[0].Div[q*S1.LocalLen()+j]
		}, nq, dq[0].W)
	}
	a, _ := sys.Matrix()
	return a
}
