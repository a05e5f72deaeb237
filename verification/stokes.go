package verification

import (
	"fmt"
	"math"

	"mixwell/fem"
	"mixwell/mesh"
)

func init() {
	register(&problem{
		name:     "stokes",
		variants: []string{"taylor-hood", "scott-vogelius"},
		degrees: func(v string) []int {
			if v == "scott-vogelius" {
				return []int{1, 2, 3}
			}
			return []int{1, 2, 3, 4}
		},
		run: runStokes,
	})
}

// stokesBump returns b(t) = sin(t + 1/2) exp(a t) and its first three
// derivatives (Leibniz rule, our own derivation; checked against hyper-dual
// automatic differentiation in manufactured_test.go).
func stokesBump(t, a float64) [4]float64 {
	sn, cs := math.Sincos(t + 0.5)
	p := [4]float64{sn, cs, -sn, -cs}
	e := math.Exp(a * t)
	// d^n (p e) = sum_k C(n,k) p^(k) a^(n-k) e
	return [4]float64{
		p[0] * e,
		(p[1] + a*p[0]) * e,
		(p[2] + 2*a*p[1] + a*a*p[0]) * e,
		(p[3] + 3*a*p[2] + 3*a*a*p[1] + a*a*a*p[0]) * e,
	}
}

// The Stokes manufactured solution: velocity u = curl psi = (d_y psi,
// -d_x psi) of the stream function psi = X(x) Y(y), X = bump(x, 1),
// Y = bump(y, -0.5), so u is divergence-free, smooth and without symmetry,
// with non-zero Dirichlet data on the boundary of the unit square; pressure
// p = cos(pi x) exp(y), of zero mean. With viscosity 1 the load is
// f = -div(2 eps(u)) + grad p = -Laplace u + grad p.
func stokesVelocity(x [2]float64) [2]float64 {
	X, Y := stokesBump(x[0], 1), stokesBump(x[1], -0.5)
	return [2]float64{X[0] * Y[1], -X[1] * Y[0]}
}

func stokesVelocityGrad(x [2]float64) [2][2]float64 {
	X, Y := stokesBump(x[0], 1), stokesBump(x[1], -0.5)
	return [2][2]float64{
		{X[1] * Y[1], X[0] * Y[2]},
		{-X[2] * Y[0], -X[1] * Y[1]},
	}
}

func stokesPressure(x [2]float64) float64 { return math.Cos(math.Pi*x[0]) * math.Exp(x[1]) }

func stokesLoad(x [2]float64) [2]float64 {
	X, Y := stokesBump(x[0], 1), stokesBump(x[1], -0.5)
	lap := [2]float64{X[2]*Y[1] + X[0]*Y[3], -(X[3]*Y[0] + X[1]*Y[2])}
	e := math.Exp(x[1])
	gp := [2]float64{-math.Pi * math.Sin(math.Pi*x[0]) * e, math.Cos(math.Pi*x[0]) * e}
	return [2]float64{-lap[0] + gp[0], -lap[1] + gp[1]}
}

// runStokes solves -div(2 eps(u)) + grad p = f, div u = 0 with u = u_exact
// (nodal interpolant) on the boundary, by Taylor–Hood P_{k+1}/P_k or Scott–Vogelius P_{k+1}/DG_k on
// barycentrically refined meshes. Expected rates (Boffi, Brezzi & Fortin
// 2013, ch. 8; John, Finite Element Methods for Incompressible Flow
// Problems, 2016, ch. 4): velocity H1 and pressure L2 k+1, velocity L2 k+2.
func runStokes(cfg Config, progress func(level, unknowns int)) (*Study, error) {
	k := cfg.Degree
	vel, err := fem.NewLagrange(k + 1)
	if err != nil {
		return nil, err
	}
	var pres fem.ScalarElement
	if cfg.Variant == "scott-vogelius" {
		pres, err = fem.NewDiscontinuous(k)
	} else {
		pres, err = fem.NewLagrange(k)
	}
	if err != nil {
		return nil, err
	}
	// Scott–Vogelius studies use "/" diagonals: the alternating pattern has
	// macro vertices where four edges lie on two lines (singular vertices);
	// the barycentric split removes the singularity, but on those meshes we
	// measured a much longer pre-asymptotic range (pressure rate 1.78 at
	// h = 1/16 against 1.91 with "/" diagonals).
	pattern := mesh.AlternatingDiagonal
	if cfg.Variant == "scott-vogelius" {
		pattern = mesh.RightDiagonal
	}
	meshes, kind, err := meshLevels(cfg, 2, pattern)
	if err != nil {
		return nil, err
	}
	st := &Study{
		Problem: "stokes", Variant: cfg.Variant, Degree: k, Mesh: kind,
		Errors:   map[string][]float64{"velocity_H1": nil, "velocity_L2": nil, "pressure_L2": nil},
		Expected: map[string]float64{"velocity_H1": float64(k + 1), "velocity_L2": float64(k + 2), "pressure_L2": float64(k + 1)},
	}
	qdeg := 2*(k+1) + 4
	for l, macro := range meshes {
		m := macro
		if cfg.Variant == "scott-vogelius" {
			m = mesh.BarycentricSplit(macro)
		}
		x, lay, res, err := solveStokes(m, vel, pres, qdeg)
		if err != nil {
			return nil, fmt.Errorf("verification: stokes level %d: %w", l, err)
		}
		V, P := lay.Space(0), lay.Space(2)
		ux, uy, p := lay.Block(x, 0), lay.Block(x, 1), lay.Block(x, 2)
		lx, hx := fem.ScalarErrors(V, ux,
			func(x [2]float64) float64 { return stokesVelocity(x)[0] },
			func(x [2]float64) [2]float64 { return stokesVelocityGrad(x)[0] }, qdeg)
		ly, hy := fem.ScalarErrors(V, uy,
			func(x [2]float64) float64 { return stokesVelocity(x)[1] },
			func(x [2]float64) [2]float64 { return stokesVelocityGrad(x)[1] }, qdeg)
		mean := fem.Integrate(P, p) / fem.Area(P)
		lp, _ := fem.ScalarErrors(P, p, func(x [2]float64) float64 { return stokesPressure(x) + mean }, nil, qdeg)
		st.Errors["velocity_H1"] = append(st.Errors["velocity_H1"], hypot(hx, hy))
		st.Errors["velocity_L2"] = append(st.Errors["velocity_L2"], hypot(lx, ly))
		st.Errors["pressure_L2"] = append(st.Errors["pressure_L2"], lp)
		// h is that of the macro mesh, so that Scott–Vogelius studies are
		// comparable with Taylor–Hood ones.
		st.H = append(st.H, macro.MaxEdgeLength())
		st.Unknowns = append(st.Unknowns, lay.Len())
		st.Residuals = append(st.Residuals, res)
		if progress != nil {
			progress(l, st.Unknowns[l])
		}
	}
	return st, nil
}

// solveStokes assembles and solves the Stokes system on m with velocity
// element vel (both components) and pressure element pres. One pressure
// unknown is fixed to 0 to remove the constant null mode.
func solveStokes(m *mesh.Mesh, vel, pres fem.ScalarElement, qdeg int) ([]float64, *fem.Layout, float64, error) {
	V := fem.NewScalarSpace(m, vel)
	P := fem.NewScalarSpace(m, pres)
	lay := fem.NewLayout(V, V, P)
	nv, np := V.LocalLen(), P.LocalLen()
	sys := fem.NewSystem(lay.Len(), m.NumTriangles()*(2*nv+np)*(2*nv+np))
	bd, err := V.BoundaryDofs(m.Tags()...)
	if err != nil {
		return nil, nil, 0, err
	}
	ux := make([]float64, V.Len())
	uy := make([]float64, V.Len())
	fem.InterpolateScalar(ux, V, func(x [2]float64) float64 { return stokesVelocity(x)[0] })
	fem.InterpolateScalar(uy, V, func(x [2]float64) float64 { return stokesVelocity(x)[1] })
	for _, d := range bd {
		sys.Fix(lay.Offset(0)+d, ux[d])
		sys.Fix(lay.Offset(1)+d, uy[d])
	}
	sys.Fix(lay.Offset(2)+P.Dofs(0)[0], 0)
	vq := fem.NewScalarQuad(vel, qdeg)
	pq := fem.NewScalarQuad(pres, qdeg)
	var a [2][2][]float64 // a[c][d]: velocity component c rows, d columns
	var b [2][]float64    // b[c]: pressure rows, velocity component c columns
	var bt [2][]float64
	var f [2][]float64
	for c := 0; c < 2; c++ {
		for d := 0; d < 2; d++ {
			a[c][d] = make([]float64, nv*nv)
		}
		b[c] = make([]float64, np*nv)
		bt[c] = make([]float64, nv*np)
		f[c] = make([]float64, nv)
	}
	for t := 0; t < m.NumTriangles(); t++ {
		af := fem.ElementMap(m, t)
		vq.Reinit(&af)
		pq.Reinit(&af)
		for c := 0; c < 2; c++ {
			for d := 0; d < 2; d++ {
				clear(a[c][d])
			}
			clear(b[c])
			clear(f[c])
		}
		for q := 0; q < vq.NQ; q++ {
			w := vq.W[q]
			g := vq.Grad[q*nv : (q+1)*nv]
			v := vq.Val[q*nv : (q+1)*nv]
			ps := pq.Val[q*np : (q+1)*np]
			load := stokesLoad(vq.X[q])
			for i := 0; i < nv; i++ {
				f[0][i] += w * load[0] * v[i]
				f[1][i] += w * load[1] * v[i]
				for j := 0; j < nv; j++ {
					// 2 eps(phi_j e_d) : eps(phi_i e_c) =
					// delta_cd grad phi_i . grad phi_j + d_d phi_i d_c phi_j
					gg := g[i][0]*g[j][0] + g[i][1]*g[j][1]
					for c := 0; c < 2; c++ {
						for d := 0; d < 2; d++ {
							val := g[i][d] * g[j][c]
							if c == d {
								val += gg
							}
							a[c][d][i*nv+j] += w * val
						}
					}
				}
				for r := 0; r < np; r++ {
					// -q div u
					b[0][r*nv+i] -= w * ps[r] * g[i][0]
					b[1][r*nv+i] -= w * ps[r] * g[i][1]
				}
			}
		}
		vd, pd := V.Dofs(t), P.Dofs(t)
		for c := 0; c < 2; c++ {
			for i := 0; i < nv; i++ {
				for r := 0; r < np; r++ {
					bt[c][i*np+r] = b[c][r*nv+i]
				}
			}
			for d := 0; d < 2; d++ {
				sys.AddMatrix(lay.Offset(c), vd, nil, lay.Offset(d), vd, nil, a[c][d])
			}
			sys.AddMatrix(lay.Offset(2), pd, nil, lay.Offset(c), vd, nil, b[c])
			sys.AddMatrix(lay.Offset(c), vd, nil, lay.Offset(2), pd, nil, bt[c])
			sys.AddVector(lay.Offset(c), vd, nil, f[c])
		}
	}
	A, rhs := sys.Matrix()
	x, res, err := fem.Solve(A, rhs)
	if err != nil {
		return nil, nil, 0, err
	}
	return x, lay, res, nil
}

func hypot(a, b float64) float64 { return math.Hypot(a, b) }
