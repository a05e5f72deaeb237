package physics

import (
	"mixwell/fem"
	"mixwell/mesh"
)

// mixedSpaces holds what the total-flux (Discretisation) and diffusive-flux
// (DiffusiveFlux) discretisations share: the elements of section 8 of the
// formulation note, their spaces on the mesh and the quadrature tables.
type mixedSpaces struct {
	velEl  *fem.Lagrange
	presEl fem.ScalarElement
	fluxEl fem.DivElement
	potEl  *fem.Discontinuous

	// V, P, F, U are the velocity-component, pressure, flux and potential
	// spaces.
	V, P, F, U *fem.Space

	vq, pq, uq     *fem.ScalarQuad
	fq             *fem.DivQuad
	ve, pe, fe, ue *fem.EdgeQuad
	qdeg           int
}

// newMixedSpaces builds the elements of p's degree and families:
// continuous P_{k+1} velocity, continuous (Taylor–Hood) or discontinuous
// (Scott–Vogelius) P_k pressure, BDM_{k+1} or RT_k fluxes and discontinuous
// P_k potentials, with triangle rules of degree p.QuadratureDegree (0:
// 2(k+1)+4) and (k+4)-point edge rules.
func newMixedSpaces(p *Problem) (mixedSpaces, error) {
	var s mixedSpaces
	k := p.Degree
	var err error
	if s.velEl, err = fem.NewLagrange(k + 1); err != nil {
		return s, err
	}
	if p.Pressure == ScottVogelius {
		s.presEl, err = fem.NewDiscontinuous(k)
	} else {
		s.presEl, err = fem.NewLagrange(k)
	}
	if err != nil {
		return s, err
	}
	if p.Flux == RTFlux {
		s.fluxEl, err = fem.NewRaviartThomas(k)
	} else {
		s.fluxEl, err = fem.NewBDM(k + 1)
	}
	if err != nil {
		return s, err
	}
	if s.potEl, err = fem.NewDiscontinuous(k); err != nil {
		return s, err
	}
	m := p.Mesh
	s.V = fem.NewScalarSpace(m, s.velEl)
	s.P = fem.NewScalarSpace(m, s.presEl)
	s.F = fem.NewDivSpace(m, s.fluxEl)
	s.U = fem.NewScalarSpace(m, s.potEl)
	s.qdeg = p.QuadratureDegree
	if s.qdeg == 0 {
		s.qdeg = 2*(k+1) + 4
	}
	s.vq = fem.NewScalarQuad(s.velEl, s.qdeg)
	s.pq = fem.NewScalarQuad(s.presEl, s.qdeg)
	s.uq = fem.NewScalarQuad(s.potEl, s.qdeg)
	s.fq = fem.NewDivQuad(s.fluxEl, s.qdeg)
	npts := k + 4
	s.ve = fem.NewScalarEdgeQuad(s.velEl, npts)
	s.pe = fem.NewScalarEdgeQuad(s.presEl, npts)
	s.fe = fem.NewDivEdgeQuad(s.fluxEl, npts)
	s.ue = fem.NewScalarEdgeQuad(s.potEl, npts)
	return s, nil
}

// fixGivenVelocity fixes both velocity components on the boundary with tag
// t to f (nil: zero) in sys, the components being blocks blockVX and
// blockVY of lay, and calls mark, if not nil, with each fixed unknown.
func (s *mixedSpaces) fixGivenVelocity(sys *fem.PatternSystem, lay *fem.Layout, t int, f func(x [2]float64) [2]float64, mark func(g int)) error {
	for c := 0; c < 2; c++ {
		comp := c
		dofs, vals, err := fem.BoundaryValues(s.V, []int{t}, func(x [2]float64) float64 {
			if f == nil {
				return 0
			}
			return f(x)[comp]
		})
		if err != nil {
			return err
		}
		for a, g := range dofs {
			sys.Fix(lay.Offset(blockVX+c)+g, vals[a])
			if mark != nil {
				mark(lay.Offset(blockVX+c) + g)
			}
		}
	}
	return nil
}

// addViscous adds W times the viscous form 2 eta eps(v):eps(u) + lambda
// div v div u (plus mass times u.v) at one quadrature point to the four
// velocity blocks vv[c][e], given the basis gradients gphi and values phi
// of the nv velocity basis functions.
func addViscous(vv *[2][2][]float64, W, eta, lam, mass float64, phi []float64, gphi [][2]float64) {
	nv := len(gphi)
	for a := 0; a < nv; a++ {
		ga := gphi[a]
		for b := 0; b < nv; b++ {
			gb := gphi[b]
			gg := ga[0]*gb[0] + ga[1]*gb[1]
			m := mass * phi[a] * phi[b]
			for c := 0; c < 2; c++ {
				for e := 0; e < 2; e++ {
					val := eta*ga[e]*gb[c] + lam*ga[c]*gb[e]
					if c == e {
						val += eta*gg + m
					}
					vv[c][e][a*nv+b] += W * val
				}
			}
		}
	}
}

// addTraction adds the traction data of boundary edge e (local edge le of
// the triangle mapped by af) to the velocity load vectors fv, if the
// boundary condition bc is an open boundary with data.
func (s *mixedSpaces) addTraction(fv *[2][]float64, m *mesh.Mesh, bc BoundaryCondition, e, le int, af *fem.Affine) {
	if bc.Velocity.Kind != VelocityTraction || bc.Velocity.Traction == nil {
		return
	}
	nrm, length := fem.OutwardNormal(m, e)
	nv := s.ve.N
	vals := s.ve.Value[le]
	for q := 0; q < s.ve.NQ; q++ {
		tr := bc.Velocity.Traction(af.Point(s.ve.Ref[le][q]), nrm)
		f := length * s.ve.W[q]
		for a := 0; a < nv; a++ {
			fv[0][a] += f * tr[0] * vals[q*nv+a]
			fv[1][a] += f * tr[1] * vals[q*nv+a]
		}
	}
}

// coupleStokes declares, in sys, the Stokes blocks of one triangle with
// velocity unknowns vd and pressure unknowns pd: each velocity component
// with both components and the pressure, and the pressure with both
// components; off gives the offset of a layout block. Both discretisations
// declare them.
func coupleStokes(sys *fem.PatternSystem, off func(int) int, vd, pd []int) {
	for c := 0; c < 2; c++ {
		for e := 0; e < 2; e++ {
			sys.Couple(off(blockVX+c), vd, off(blockVX+e), vd)
		}
		sys.Couple(off(blockVX+c), vd, off(blockP), pd)
		sys.Couple(off(blockP), pd, off(blockVX+c), vd)
	}
}
