package physics

import (
	"fmt"

	"mixwell/fem"
)

// The conversion of a nonlinear diffusive-flux solution (remedy (c)) into
// the total-flux layout of Discretisation, so that one set of diagnostics,
// sampling and output serves both formulations.
//
// Velocity and pressure are the same fields in the same spaces. The total
// mass fluxes are
//
//	J_i = j_i + Pi_F(rho_i v)   (i < n),    J_n = -sum_{i<n} j_i + Pi_F(rho_n v),
//
// with rho_i the partial densities of the final state (the concentrations
// the last step was solved with) and Pi_F the canonical H(div)
// interpolation (normal moments on the edges, interior moments), computed
// element by element with the element's own degrees of freedom. The
// commuting property div Pi_F w = P_k div w (Brezzi & Fortin, Mixed and
// Hybrid Finite Element Methods, 1991, section III.3) makes the element
// balance of J_i,h for i < n that of the continuity rows of the step,
// -int_T nu (div j_i + div(rho_i v)) = -int_T nu M_i r_i, up to the
// quadrature of div(rho_i v) in the assembly (rho_i is not a polynomial).
// Where rho_i v jumps across an edge (the discontinuous Scott–Vogelius
// pressure enters the density through the equation of state) the edge
// moments are the mean of the two sides.
//
// The potentials are mu_i = M_i (m_i + t), mu_n = M_n t, with the
// relative potentials m_i of the step and the level t from the equation of
// state of the ideal gas at each point, L2-projected element by element
// onto the discontinuous space. When no boundary gives a composition the
// step determines m_i only up to a constant, which the iteration fixes in
// its state (levelByBalance); the step's m_i are then shifted by the
// difference of the means of the state's and the step's m_i. At a fixed
// point the state is the projection of the step's m_i plus that constant,
// and projections onto the velocity space keep the mean, so the shift is
// the constant; with composition data it vanishes to the iteration's
// tolerance.

// TotalFlux converts s, a solution of DiffusiveFlux.SolveNonlinear, into a
// solution of the total-flux discretisation t of the same problem: the
// same mesh, degree, element families and mixture (checked; the error
// says what differs). Velocity and pressure are copied; the total mass
// fluxes J_i = j_i + rho_i v, with J_n = -sum_{i<n} j_i + rho_n v, are
// interpolated into t's flux space with the partial densities of the
// final state; the potentials mu_i = M_i (m_i + t), mu_n = M_n t, with the
// level t from the equation of state, are L2-projected element by element
// onto t's potential space. The returned solution's frozen concentrations
// are those of the final state, so that t.Diagnose and
// t.MassAverageResidual measure the converted fields against them. A
// solution of SolveFrozen has no equation of state for the level and is
// refused.
func (s *DiffusiveFluxSolution) TotalFlux(t *Discretisation) (*Solution, error) {
	st, ok := s.field.(*diffusiveState)
	if !ok {
		return nil, fmt.Errorf("physics: TotalFlux needs a solution of DiffusiveFlux.SolveNonlinear: a frozen step has no equation of state for the level of the potentials")
	}
	if err := s.matchSpaces(t); err != nil {
		return nil, err
	}
	d := s.d
	n := d.n
	ev := newDFPointEval(s, st)
	area := fem.Area(d.U)
	nV := d.V.Len()
	for i := 0; i < d.r; i++ {
		ev.shift[i] = (fem.Integrate(d.V, st.x[i*nV:(i+1)*nV]) - fem.Integrate(d.U, s.RelativePotential(i))) / area
	}
	out := &Solution{d: t, X: make([]float64, t.Len()), LinearResidual: s.LinearResidual,
		frozen: &diffusiveFrozen{d: t, ev: newDFPointEval(s, st)}}
	copy(out.Velocity(0), s.Velocity(0))
	copy(out.Velocity(1), s.Velocity(1))
	copy(out.Pressure(), s.Pressure())
	if err := ev.convectiveFluxesTo(out); err != nil {
		return nil, err
	}
	for i := 0; i < d.r; i++ {
		j := s.DiffusiveFlux(i)
		Ji, Jn := out.Flux(i), out.Flux(n-1)
		for g, v := range j {
			Ji[g] += v
			Jn[g] -= v
		}
	}
	if err := ev.potentialsTo(out); err != nil {
		return nil, err
	}
	return out, nil
}

// matchSpaces reports whether t discretises the problem of s with the same
// spaces, so that coefficient vectors carry over block by block.
func (s *DiffusiveFluxSolution) matchSpaces(t *Discretisation) error {
	d := s.d
	if t == nil {
		return fmt.Errorf("physics: TotalFlux needs a total-flux discretisation, got nil")
	}
	elem := func(e interface{ Degree() int }) string { return fmt.Sprintf("%T of degree %d", e, e.Degree()) }
	switch {
	case t.m != d.m:
		return fmt.Errorf("physics: TotalFlux: the total-flux discretisation is on another mesh than the diffusive-flux one")
	case t.n != d.n:
		return fmt.Errorf("physics: TotalFlux: the total-flux discretisation has %d species, the diffusive-flux one %d", t.n, d.n)
	case t.k != d.k:
		return fmt.Errorf("physics: TotalFlux: the total-flux discretisation has degree %d, the diffusive-flux one %d", t.k, d.k)
	case elem(t.presEl) != elem(d.presEl):
		return fmt.Errorf("physics: TotalFlux: pressure elements differ (%s against %s)", elem(t.presEl), elem(d.presEl))
	case elem(t.fluxEl) != elem(d.fluxEl):
		return fmt.Errorf("physics: TotalFlux: flux elements differ (%s against %s)", elem(t.fluxEl), elem(d.fluxEl))
	case t.V.Len() != d.V.Len() || t.P.Len() != d.P.Len() || t.F.Len() != d.F.Len() || t.U.Len() != d.U.Len():
		return fmt.Errorf("physics: TotalFlux: the spaces have different dimensions (V %d/%d, P %d/%d, F %d/%d, U %d/%d)",
			t.V.Len(), d.V.Len(), t.P.Len(), d.P.Len(), t.F.Len(), d.F.Len(), t.U.Len(), d.U.Len())
	}
	for i := 0; i < d.n; i++ {
		if a, b := t.prob.Mixture.mass[i], d.prob.Mixture.mass[i]; a != b {
			return fmt.Errorf("physics: TotalFlux: species %q has molar mass %g in the total-flux problem and %g in the diffusive-flux one",
				d.prob.Mixture.Name(i), a, b)
		}
	}
	return nil
}

// dfPointEval evaluates the fields of a nonlinear diffusive-flux solution
// at reference points of one triangle at a time: the state's
// concentrations, the velocity, and the potentials of the step. It keeps
// its own basis buffers and does not allocate per point. Not safe for
// concurrent use.
type dfPointEval struct {
	s  *DiffusiveFluxSolution
	st *diffusiveState

	tri int
	af  fem.Affine

	vval, pval, uval    []float64
	vgrad, pgrad, ugrad [][2]float64
	m                   []float64    // relative potentials at a point
	gm                  [][2]float64 // their gradients
	shift               []float64    // the constants the step's m_i lack
	c                   []float64
	gc                  [][2]float64
}

func newDFPointEval(s *DiffusiveFluxSolution, st *diffusiveState) *dfPointEval {
	d := s.d
	nv, np, nu := d.V.LocalLen(), d.P.LocalLen(), d.U.LocalLen()
	return &dfPointEval{
		s: s, st: st, tri: -1,
		vval: make([]float64, nv), vgrad: make([][2]float64, nv),
		pval: make([]float64, np), pgrad: make([][2]float64, np),
		uval: make([]float64, nu), ugrad: make([][2]float64, nu),
		m: make([]float64, d.r), gm: make([][2]float64, d.r), shift: make([]float64, d.r),
		c: make([]float64, d.n), gc: make([][2]float64, d.n),
	}
}

// on makes t the current triangle.
func (e *dfPointEval) on(t int) {
	if e.tri != t {
		e.tri = t
		e.af = fem.ElementMap(e.s.d.m, t)
	}
}

// scalar returns the value and physical gradient at xh of the current
// triangle of the field with coefficients c in sp, whose basis values and
// reference gradients at xh are val and grad.
func (e *dfPointEval) scalar(sp *fem.Space, c, val []float64, grad [][2]float64) (float64, [2]float64) {
	var v float64
	var g [2]float64
	for a, dof := range sp.Dofs(e.tri) {
		v += c[dof] * val[a]
		g[0] += c[dof] * grad[a][0]
		g[1] += c[dof] * grad[a][1]
	}
	return v, e.af.Gradient(g)
}

// stateAt writes the concentrations of the final state and their gradients
// at the reference point xh of triangle t.
func (e *dfPointEval) stateAt(t int, xh [2]float64, c []float64, gc [][2]float64) error {
	e.on(t)
	d, st := e.s.d, e.st
	d.velEl.ValuesTo(e.vval, xh)
	d.velEl.GradientsTo(e.vgrad, xh)
	d.presEl.ValuesTo(e.pval, xh)
	d.presEl.GradientsTo(e.pgrad, xh)
	nV := d.V.Len()
	for i := 0; i < d.r; i++ {
		e.m[i], e.gm[i] = e.scalar(d.V, st.x[i*nV:(i+1)*nV], e.vval, e.vgrad)
	}
	p, gp := e.scalar(d.P, st.pressureBlock(), e.pval, e.pgrad)
	return st.concentrations(e.m, e.gm, p, gp, c, gc)
}

// velocityAt returns the velocity of the step at xh of the current
// triangle; stateAt must have tabulated the velocity basis at xh.
func (e *dfPointEval) velocityAt() [2]float64 {
	vx, _ := e.scalar(e.s.d.V, e.s.Velocity(0), e.vval, e.vgrad)
	vy, _ := e.scalar(e.s.d.V, e.s.Velocity(1), e.vval, e.vgrad)
	return [2]float64{vx, vy}
}

// potentialsAt writes into mu the potentials mu_i = M_i (m_i + t), mu_n =
// M_n t of the step at the reference point xh of triangle t, with m_i
// shifted by e.shift and the level t from the equation of state at the
// step's pressure.
func (e *dfPointEval) potentialsAt(t int, xh [2]float64, mu []float64) error {
	e.on(t)
	d, st := e.s.d, e.st
	d.potEl.ValuesTo(e.uval, xh)
	d.potEl.GradientsTo(e.ugrad, xh)
	d.presEl.ValuesTo(e.pval, xh)
	d.presEl.GradientsTo(e.pgrad, xh)
	for i := 0; i < d.r; i++ {
		e.m[i], e.gm[i] = e.scalar(d.U, e.s.RelativePotential(i), e.uval, e.ugrad)
		e.m[i] += e.shift[i]
	}
	p, gp := e.scalar(d.P, e.s.Pressure(), e.pval, e.pgrad)
	// The level solve records its defect on the state; the report of the
	// solve is already written, so keep the state's record unchanged.
	defect := st.eosD
	err := st.concentrations(e.m, e.gm, p, gp, e.c, e.gc)
	st.eosD = defect
	if err != nil {
		return err
	}
	copy(mu, st.mu)
	return nil
}

// convectiveFluxesTo writes Pi_F(rho_i v) of every species into the flux
// blocks of out: each triangle applies its flux degrees of freedom to
// rho_i v on it, and an edge moment is the mean of its triangles' values.
func (e *dfPointEval) convectiveFluxesTo(out *Solution) error {
	d := e.s.d
	n, m := d.n, d.m
	F, el := out.d.F, out.d.F.Div()
	mass := d.prob.Mixture.mass
	count := make([]float64, F.Len())
	loc := make([]float64, F.LocalLen())
	// rho_i v at the points of the current triangle, shared by the species.
	cache := map[[2]float64][]float64{}
	var bad error
	at := func(t int, xh [2]float64) []float64 {
		if v, ok := cache[xh]; ok {
			return v
		}
		vals := make([]float64, 2*n)
		if err := e.stateAt(t, xh, e.c, e.gc); err != nil {
			if bad == nil {
				bad = fmt.Errorf("physics: TotalFlux: triangle %d: %w", t, err)
			}
			return vals
		}
		v := e.velocityAt()
		for i := 0; i < n; i++ {
			rho := mass[i] * e.c[i]
			vals[2*i], vals[2*i+1] = rho*v[0], rho*v[1]
		}
		cache[xh] = vals
		return vals
	}
	for t := 0; t < m.NumTriangles(); t++ {
		clear(cache)
		e.on(t)
		dofs, signs := F.Dofs(t), F.Signs(t)
		for i := 0; i < n; i++ {
			el.DofsTo(loc, func(xh [2]float64) [2]float64 {
				vals := at(t, xh)
				return e.af.InversePiola([2]float64{vals[2*i], vals[2*i+1]})
			})
			if bad != nil {
				return bad
			}
			J := out.Flux(i)
			for a, g := range dofs {
				J[g] += signs[a] * loc[a]
			}
		}
		for _, g := range dofs {
			count[g]++
		}
	}
	for i := 0; i < n; i++ {
		J := out.Flux(i)
		for g := range J {
			J[g] /= count[g]
		}
	}
	return nil
}

// potentialsTo writes the L2 projections of the potentials onto the
// discontinuous space into the potential blocks of out.
func (e *dfPointEval) potentialsTo(out *Solution) error {
	d := e.s.d
	n := d.n
	U := out.d.U
	loc := make([]float64, U.LocalLen())
	cache := map[[2]float64][]float64{}
	var bad error
	for t := 0; t < d.m.NumTriangles(); t++ {
		clear(cache)
		for i := 0; i < n; i++ {
			d.potEl.DofsTo(loc, func(xh [2]float64) float64 {
				mu, ok := cache[xh]
				if !ok {
					mu = make([]float64, n)
					if err := e.potentialsAt(t, xh, mu); err != nil && bad == nil {
						bad = fmt.Errorf("physics: TotalFlux: potentials in triangle %d: %w", t, err)
					}
					cache[xh] = mu
				}
				return mu[i]
			})
			if bad != nil {
				return bad
			}
			blk := out.Potential(i)
			for a, g := range U.Dofs(t) {
				blk[g] = loc[a]
			}
		}
	}
	return nil
}

// diffusiveFrozen gives a converted solution the concentrations of the
// final diffusive-flux state as its frozen field.
type diffusiveFrozen struct {
	d  *Discretisation
	ev *dfPointEval
}

func (f *diffusiveFrozen) concentrationsTo(c []float64, gradc [][2]float64, t int, af *fem.Affine, set int) error {
	n := f.d.n
	for q, xh := range f.d.refPoints(set) {
		g := f.ev.gc
		if gradc != nil {
			g = gradc[q*n : (q+1)*n]
		}
		if err := f.ev.stateAt(t, xh, c[q*n:(q+1)*n], g); err != nil {
			return err
		}
	}
	return nil
}
