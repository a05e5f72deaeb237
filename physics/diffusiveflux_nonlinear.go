package physics

import (
	"fmt"
	"math"
	"slices"
	"time"

	"mixwell/fem"
	"mixwell/solver"
)

// DiffusiveFluxSettings configures DiffusiveFlux.SolveNonlinear.
type DiffusiveFluxSettings struct {
	// Gas is the ideal-gas closure in the problem's scaled units (RT = 1).
	// The diffusive-flux step determines the n-1 relative potentials only;
	// the level comes from the equation of state, sum_i c_i = P0 + S p.
	Gas *IdealGas
	// Pressure0 is the absolute reference pressure in units of c_ref RT.
	Pressure0 float64
	// Initial is the uniform initial composition (mole fractions).
	Initial []float64
	// Tolerance on the relative fixed-point residual (default 1e-10),
	// MaxIterations (default 150) and Anderson Depth (default 20).
	Tolerance            float64
	MaxIterations, Depth int
	// Record, when set, receives every iteration's record. Its
	// MassAverage is 0: the mass-average constraint holds by
	// construction.
	Record func(IterationRecord)
}

// DiffusiveFluxReport describes a nonlinear diffusive-flux solve.
type DiffusiveFluxReport struct {
	Iterations int
	Converged  bool
	Residual   float64
	// Evaluations counts evaluations of the Picard map, the final one
	// from the converged state included.
	Evaluations int
	// History holds one record per iteration, as passed to
	// DiffusiveFluxSettings.Record.
	History []IterationRecord
	// EOSDefect is the largest |sum_i c_i / (P0 + S p) - 1| over the
	// quadrature points of the final state: zero to the level solve's
	// tolerance, since the level is taken from the equation of state.
	EOSDefect float64
}

// diffusiveState is the Picard state of the diffusive-flux iteration: the
// relative potentials m_1..m_{n-1}, L2-projected on the velocity space V,
// and the pressure in P. It evaluates the concentrations with the ideal
// gas, taking the level t = mu_n/M_n at every point from the equation of
// state.
type diffusiveState struct {
	d    *DiffusiveFlux
	gas  *IdealGas
	p0   float64
	x    []float64 // blocks m_1..m_{n-1} (V), then p (P)
	mq   []float64 // relative potentials at one point
	mu   []float64
	gm   [][2]float64
	eosD float64
}

func (st *diffusiveState) pressureBlock() []float64 {
	nV := st.d.V.Len()
	return st.x[st.d.r*nV:]
}

// concentrations writes c and grad c from the relative potentials m (with
// gradients gm) of the first n-1 species and the pressure p (gradient gp):
// mu_i = M_i (m_i + t), mu_n = M_n t, c_i = (P_ref/RT) exp(mu_i/RT), with
// the level t from the equation of state RT sum_i c_i = P0 + S p.
func (st *diffusiveState) concentrations(m []float64, gm [][2]float64, p float64, gp [2]float64, c []float64, gc [][2]float64) error {
	d := st.d
	n, r := d.n, d.r
	mass := d.prob.Mixture.mass
	S, rt, k := d.prob.S, st.gas.rt, st.gas.pRef/st.gas.rt
	target := st.p0 + S*p
	if !(target > 0) {
		return &StateError{Model: "ideal gas", Reason: fmt.Sprintf("absolute pressure %g is not positive", target)}
	}
	lnTarget := math.Log(target)
	rel := func(i int) float64 {
		if i < r {
			return m[i]
		}
		return 0
	}
	// g(t) = ln(RT sum_i c_i(t)) - ln(P0 + S p) is convex and increasing
	// in t, so Newton's method converges from any start.
	eval := func(t float64) (g, gt float64) {
		var sum, sumM float64
		for i := 0; i < n; i++ {
			e := k * math.Exp(mass[i]*(rel(i)+t)/rt)
			sum += e
			sumM += mass[i] * e
		}
		return math.Log(rt*sum) - lnTarget, sumM / (rt * sum)
	}
	t := 0.0
	for it := 0; ; it++ {
		g, gt := eval(t)
		if math.Abs(g) < 1e-14 {
			break
		}
		if it == 60 || math.IsNaN(g) {
			return &StateError{Model: "ideal gas", Reason: "the level of the potentials did not converge on the equation of state"}
		}
		t -= g / gt
	}
	var C, CM float64
	for i := 0; i < n; i++ {
		st.mu[i] = mass[i] * (rel(i) + t)
		c[i] = k * math.Exp(st.mu[i]/rt)
		C += c[i]
		CM += mass[i] * c[i]
	}
	if err := checkPositive("ideal gas", d.prob.Mixture.names, c); err != nil {
		return err
	}
	// grad t from g(t; m, p) = 0.
	gt := CM / (rt * C)
	gp0 := -S / target
	var gradT [2]float64
	for j := 0; j < r; j++ {
		f := mass[j] * c[j] / (rt * C)
		gradT[0] += f * gm[j][0]
		gradT[1] += f * gm[j][1]
	}
	gradT[0] = -(gradT[0] + gp0*gp[0]) / gt
	gradT[1] = -(gradT[1] + gp0*gp[1]) / gt
	for i := 0; i < n; i++ {
		var g [2]float64
		if i < r {
			g = gm[i]
		}
		f := c[i] * mass[i] / rt
		gc[i] = [2]float64{f * (g[0] + gradT[0]), f * (g[1] + gradT[1])}
	}
	if e := math.Abs(rt*C/target - 1); e > st.eosD {
		st.eosD = e
	}
	return nil
}

func (st *diffusiveState) atQuad(t, q int, x [2]float64, c []float64, gc [][2]float64) error {
	d := st.d
	nV := d.V.Len()
	vd := d.V.Dofs(t)
	for i := 0; i < d.r; i++ {
		st.mq[i], st.gm[i] = d.vq.FieldAt(q, st.x[i*nV:(i+1)*nV], vd)
	}
	p, gp := d.pq.FieldAt(q, st.pressureBlock(), d.P.Dofs(t))
	return st.concentrations(st.mq, st.gm, p, gp, c, gc)
}

func (st *diffusiveState) at(t int, x [2]float64, c []float64, gc [][2]float64) error {
	d := st.d
	nV := d.V.Len()
	af := fem.ElementMap(d.m, t)
	xh := af.Reference(x)
	m := make([]float64, d.r)
	for i := 0; i < d.r; i++ {
		m[i], st.gm[i] = fem.ScalarAt(d.V, st.x[i*nV:(i+1)*nV], t, xh)
	}
	p, gp := fem.ScalarAt(d.P, st.pressureBlock(), t, xh)
	return st.concentrations(m, st.gm, p, gp, c, gc)
}

// SolveNonlinear solves the steady problem with the diffusive-flux
// formulation and the ideal gas by Anderson-accelerated Picard iteration.
// The state is the relative potentials, L2-projected on the velocity space,
// and the pressure; each step freezes the concentrations they imply on the
// equation of state, solves the linear step and projects its relative
// potentials. The post-processing of formulation note section 4 is not
// applied. The returned solution is the step from the final state, and it
// keeps that state (its frozen field), so that the concentrations of the
// step remain available (TotalFlux).
func (d *DiffusiveFlux) SolveNonlinear(s *DiffusiveFluxSettings) (*DiffusiveFluxSolution, *DiffusiveFluxReport, error) {
	if s == nil || s.Gas == nil || len(s.Initial) != d.n || !(s.Pressure0 > 0) {
		return nil, nil, fmt.Errorf("physics: SolveNonlinear needs the ideal gas, a positive reference pressure and an initial composition of %d species", d.n)
	}
	nV, nP, r := d.V.Len(), d.P.Len(), d.r
	mass := d.prob.Mixture.mass
	st := &diffusiveState{d: d, gas: s.Gas, p0: s.Pressure0, mq: make([]float64, d.r), mu: make([]float64, d.n), gm: make([][2]float64, d.n)}
	x0 := make([]float64, r*nV+nP)
	last := d.n - 1
	for i := 0; i < r; i++ {
		// On the equation of state at P0: mu_i = RT ln(x_i P0 / P_ref).
		rt, pr := s.Gas.rt, s.Gas.pRef
		mi := rt*math.Log(s.Initial[i]*s.Pressure0/pr)/mass[i] - rt*math.Log(s.Initial[last]*s.Pressure0/pr)/mass[last]
		for a := 0; a < nV; a++ {
			x0[i*nV+a] = mi
		}
	}
	proj, err := newMassProjector(d.V, d.U)
	if err != nil {
		return nil, nil, err
	}
	// With flux or outflow data on the whole boundary the constant of each
	// relative potential is a null mode of the step, and the frozen
	// outgoing composition carries no information about it: the level is
	// fixed by the species balance instead (levelByBalance).
	var lv *levelByBalance
	if len(d.levelSpecies) > 0 {
		if lv, err = newLevelByBalance(d, st); err != nil {
			return nil, nil, err
		}
	}
	var sol *DiffusiveFluxSolution
	g := func(dst, x []float64) error {
		st.x = x
		st.eosD = 0
		var err error
		sol, err = d.solveField(st)
		if err != nil {
			return err
		}
		for i := 0; i < r; i++ {
			if err := proj.projectDG(dst[i*nV:(i+1)*nV], sol.RelativePotential(i)); err != nil {
				return err
			}
		}
		copy(dst[r*nV:], sol.Pressure())
		if lv != nil {
			// The step's inflow, with its own frozen state (st.x = x).
			if err := lv.setTarget(sol); err != nil {
				return err
			}
			return lv.fix(dst, sol)
		}
		return nil
	}
	set := &solver.FixedPointSettings{Method: solver.Anderson, Tolerance: s.Tolerance, MaxIterations: s.MaxIterations, Depth: s.Depth}
	if set.Tolerance == 0 {
		set.Tolerance = 1e-10
	}
	if set.MaxIterations == 0 {
		set.MaxIterations = 150
	}
	if set.Depth == 0 {
		set.Depth = 20
	}
	rep := &DiffusiveFluxReport{}
	start := time.Now()
	set.Record = func(r solver.FixedPointRecord) {
		rec := IterationRecord{Iteration: r.Iteration, Residual: r.Residual, Change: r.Change, Elapsed: time.Since(start)}
		rep.History = append(rep.History, rec)
		if s.Record != nil {
			s.Record(rec)
		}
	}
	res, ferr := solver.SolveFixedPoint(g, x0, set)
	if res != nil {
		rep.Iterations, rep.Converged, rep.Residual = res.Iterations, res.Converged, res.Residual
		rep.Evaluations = res.Evaluations + 1
		// Solve once more from the final state, so that the solution and
		// the reported defect belong to it. The state keeps a copy of
		// it: the solution's frozen field refers to the state.
		final := slices.Clone(res.X)
		dst := make([]float64, len(final))
		if err := g(dst, final); err != nil {
			return nil, rep, err
		}
		rep.EOSDefect = st.eosD
	}
	if ferr != nil {
		return sol, rep, ferr
	}
	return sol, rep, nil
}

// massProjector L2-projects fields of a discontinuous space u onto a
// continuous scalar space s on the same mesh, with the mass matrix
// factorised and both spaces tabulated once.
type massProjector struct {
	s, u   *fem.Space
	lu     *solver.LU
	mat    *solver.CSR
	sq, uq *fem.ScalarQuad
	rhs    []float64
}

func newMassProjector(s, u *fem.Space) (*massProjector, error) {
	el := s.Scalar()
	deg := 2*el.Degree() + 2
	q := fem.NewScalarQuad(el, deg)
	sys := fem.NewSystem(s.Len(), 0)
	m := s.Mesh()
	nl := s.LocalLen()
	loc := make([]float64, nl*nl)
	for t := 0; t < m.NumTriangles(); t++ {
		af := fem.ElementMap(m, t)
		q.Reinit(&af)
		clear(loc)
		for k := 0; k < q.NQ; k++ {
			for a := 0; a < nl; a++ {
				for b := 0; b < nl; b++ {
					loc[a*nl+b] += q.W[k] * q.Val[k*nl+a] * q.Val[k*nl+b]
				}
			}
		}
		sys.AddMatrix(0, s.Dofs(t), nil, 0, s.Dofs(t), nil, loc)
	}
	A, _ := sys.Matrix()
	lu, err := solver.FactorLU(A, nil)
	if err != nil {
		return nil, fmt.Errorf("physics: factorising the mass matrix: %w", err)
	}
	return &massProjector{s: s, u: u, lu: lu, mat: A, sq: q, uq: fem.NewScalarQuad(u.Scalar(), deg), rhs: make([]float64, s.Len())}, nil
}

// projectDG writes into dst the L2 projection of the field with
// coefficients c in the discontinuous space.
func (p *massProjector) projectDG(dst, c []float64) error {
	m := p.s.Mesh()
	clear(p.rhs)
	nl, nu := p.s.LocalLen(), p.u.LocalLen()
	for t := 0; t < m.NumTriangles(); t++ {
		af := fem.ElementMap(m, t)
		p.sq.Reinit(&af)
		p.uq.Reinit(&af)
		vd, ud := p.s.Dofs(t), p.u.Dofs(t)
		for k := 0; k < p.sq.NQ; k++ {
			var v float64
			for a := 0; a < nu; a++ {
				v += c[ud[a]] * p.uq.Val[k*nu+a]
			}
			for a := 0; a < nl; a++ {
				p.rhs[vd[a]] += p.sq.W[k] * v * p.sq.Val[k*nl+a]
			}
		}
	}
	_, err := p.lu.SolveRefinedTo(dst, p.mat, p.rhs, 1)
	return err
}

// levelByBalance fixes the constants of the relative potentials that no
// boundary datum fixes (DiffusiveFlux.levelSpecies: all of them when no
// boundary gives a composition, one when the only compositions are on
// Stefan walls with two impermeable species): after each step it shifts
// those projected m_i by constants s so that each such species leaves
// through the outflow boundaries as much as the step brings in through the
// others, int_out M_i c_i(m + s, p) v.n = -int_in (j_i.n + rho_i v.n),
// solved by Newton's method with a difference Jacobian (by a bracketed
// secant for one species). (The role that section 10 item 4a of the
// formulation note gives the linearised outgoing composition.)
type levelByBalance struct {
	d       *DiffusiveFlux
	st      *diffusiveState
	target  []float64 // outward flow each species must have through the outflow
	outTags []int     // outflow boundaries
	inTags  []int     // the others
}

func newLevelByBalance(d *DiffusiveFlux, st *diffusiveState) (*levelByBalance, error) {
	lv := &levelByBalance{d: d, st: st, target: make([]float64, d.n)}
	for _, t := range d.m.Tags() {
		if d.prob.Boundary[t].Species[0].Kind == SpeciesOutflow {
			lv.outTags = append(lv.outTags, t)
		} else {
			lv.inTags = append(lv.inTags, t)
		}
	}
	if len(lv.outTags) == 0 {
		return nil, fmt.Errorf("physics: the diffusive-flux iteration needs a composition boundary or an outflow boundary to fix the level of the potentials")
	}
	return lv, nil
}

// setTarget sets the outflow each species must have: what the step sol
// brings in through the other boundaries, with the step's frozen density,
// so that with the outflow the balance of the whole domain, and so of the
// element whose potential is pinned, closes.
func (lv *levelByBalance) setTarget(sol *DiffusiveFluxSolution) error {
	clear(lv.target)
	for _, t := range lv.inTags {
		flow, err := sol.BoundaryMassFlow(t)
		if err != nil {
			return err
		}
		for i, f := range flow {
			lv.target[i] -= f
		}
	}
	return nil
}

// outflow writes into f[k] the outward flow of species d.levelSpecies[k]
// through the outflow boundaries for the state x and the velocity of sol,
// minus its target.
func (lv *levelByBalance) outflow(f []float64, x []float64, sol *DiffusiveFluxSolution) error {
	save := lv.st.x
	lv.st.x = x
	defer func() { lv.st.x = save }()
	for k, i := range lv.d.levelSpecies {
		f[k] = -lv.target[i]
	}
	for _, t := range lv.outTags {
		flow, err := sol.BoundaryMassFlow(t)
		if err != nil {
			return err
		}
		for k, i := range lv.d.levelSpecies {
			f[k] += flow[i]
		}
	}
	return nil
}

// fix shifts the relative-potential blocks of x so that the balance holds.
func (lv *levelByBalance) fix(x []float64, sol *DiffusiveFluxSolution) error {
	d := lv.d
	nV := d.V.Len()
	r := len(d.levelSpecies)
	f := make([]float64, r)
	fp := make([]float64, r)
	jac := make([]float64, r*r)
	shift := func(k int, s float64) {
		i := d.levelSpecies[k]
		blk := x[i*nV : (i+1)*nV]
		for a := range blk {
			blk[a] += s
		}
	}
	var scale float64
	for _, i := range d.levelSpecies {
		scale = math.Max(scale, math.Abs(lv.target[i]))
	}
	if scale == 0 {
		scale = 1
	}
	if r == 1 {
		return lv.fixOne(x, sol, shift, scale)
	}
	for it := 0; it < 30; it++ {
		if err := lv.outflow(f, x, sol); err != nil {
			return err
		}
		var worst float64
		for _, v := range f {
			worst = math.Max(worst, math.Abs(v))
		}
		if worst < 1e-13*scale {
			return nil
		}
		const h = 1e-7
		for k := 0; k < r; k++ {
			shift(k, h)
			if err := lv.outflow(fp, x, sol); err != nil {
				return err
			}
			shift(k, -h)
			for i := 0; i < r; i++ {
				jac[i*r+k] = (fp[i] - f[i]) / h
			}
		}
		piv := make([]int, r)
		if !luFactor(jac, r, piv) {
			return fmt.Errorf("physics: fixing the level of the potentials by the species balance: singular Jacobian")
		}
		ds := append([]float64(nil), f...)
		luSolve(jac, r, piv, ds)
		for k := 0; k < r; k++ {
			shift(k, -ds[k])
		}
	}
	return fmt.Errorf("physics: the species balance that fixes the level of the potentials did not converge")
}

// fixOne is fix for one species, whose outflow increases with the shift
// of its relative potential: the shift is bracketed by doubling steps from
// 0 and then found by the Illinois variant of regula falsi, which keeps the
// bracket (a Newton step from a state whose outflow is saturated, far from
// the balance, has a vanishing slope).
func (lv *levelByBalance) fixOne(x []float64, sol *DiffusiveFluxSolution, shift func(k int, s float64), scale float64) error {
	f := make([]float64, 1)
	at := 0.0
	eval := func(s float64) (float64, error) {
		shift(0, s-at)
		at = s
		err := lv.outflow(f, x, sol)
		return f[0], err
	}
	a, fa := 0.0, 0.0
	var err error
	if fa, err = eval(0); err != nil {
		return err
	}
	if math.Abs(fa) < 1e-13*scale {
		return nil
	}
	// The outflow grows with the shift: search against the sign of fa.
	dir := -1.0
	if fa < 0 {
		dir = 1
	}
	b, fb := a, fa
	for step := 0.25; ; step *= 2 {
		if step > 64 {
			shift(0, -at)
			return fmt.Errorf("physics: fixing the level of the potentials by the species balance: no shift within %g brings the outflow of species %q to its inflow", 64.0, lv.d.prob.Mixture.Name(lv.d.levelSpecies[0]))
		}
		b = dir * step
		if fb, err = eval(b); err != nil {
			return err
		}
		if math.Signbit(fb) != math.Signbit(fa) {
			break
		}
		a, fa = b, fb
	}
	side := 0
	for it := 0; it < 200; it++ {
		c := (a*fb - b*fa) / (fb - fa)
		fc, err := eval(c)
		if err != nil {
			return err
		}
		if math.Abs(fc) < 1e-13*scale || math.Abs(b-a) < 1e-14*math.Max(1, math.Abs(c)) {
			return nil
		}
		if math.Signbit(fc) == math.Signbit(fb) {
			b, fb = c, fc
			if side == -1 {
				fa /= 2
			}
			side = -1
		} else {
			a, fa = c, fc
			if side == 1 {
				fb /= 2
			}
			side = 1
		}
	}
	return fmt.Errorf("physics: the species balance that fixes the level of the potentials did not converge")
}
