package simulate

import (
	"errors"
	"fmt"
	"math"
	"time"

	"mixwell/casefile"
	"mixwell/fem"
	"mixwell/physics"
	"mixwell/solver"
)

// Solve runs the nonlinear iteration of the case's solver settings. record,
// when not nil, receives every iteration. When the iteration does not
// converge, Solve returns the outcome of the last iterate together with the
// error.
func (s *Setup) Solve(record func(physics.IterationRecord)) (*Outcome, error) {
	if s.DiffusiveFlux != nil {
		return s.solveDiffusiveFlux(record)
	}
	c := s.Case
	meth, err := method(c.Solver.Method)
	if err != nil {
		return nil, fmt.Errorf("%s: solver: %w", c.Source, err)
	}
	update := physics.PotentialProjection
	if c.Solver.Update == "concentration" {
		update = physics.ConcentrationProjection
	}
	start := time.Now()
	init := append([]float64(nil), s.initial...)
	sol, rep, serr := s.Discretisation.SolveNonlinear(&physics.NonlinearSettings{
		Closure:       s.Closure,
		Pressure0:     s.pressure,
		Initial:       func(_ [2]float64, mu []float64) { copy(mu, init) },
		Method:        meth,
		Update:        update,
		Tolerance:     c.Solver.Tolerance,
		MaxIterations: c.Solver.MaxIterations,
		Depth:         c.Solver.AndersonDepth,
		Record:        record,
	})
	if sol == nil {
		if serr == nil {
			serr = fmt.Errorf("no solution")
		}
		return nil, serr
	}
	o := &Outcome{Setup: s, Solution: sol, Report: rep, Elapsed: time.Since(start)}
	if rep != nil {
		o.Converged, o.Iterations, o.Residual = rep.Converged, rep.Iterations, rep.Residual
	}
	o.summarise()
	return o, serr
}

// solveDiffusiveFlux runs the nonlinear iteration of the diffusive-flux
// formulation (physics.DiffusiveFlux.SolveNonlinear) with the case's
// tolerance, iteration limit and Anderson depth, from the reference
// composition, and converts its solution into the total-flux layout of
// s.Discretisation, on which the outcome is built as for the total-flux
// formulation.
func (s *Setup) solveDiffusiveFlux(record func(physics.IterationRecord)) (*Outcome, error) {
	c := s.Case
	gas, ok := s.Closure.(*physics.IdealGas)
	if !ok {
		// Prepare refuses any other closure with this formulation.
		return nil, fmt.Errorf("%s: discretisation.formulation: diffusive-flux needs the ideal gas", c.Source)
	}
	x0, err := s.referenceComposition()
	if err != nil {
		return nil, fmt.Errorf("%s: initial composition: %w", c.Source, err)
	}
	start := time.Now()
	sol, rep, serr := s.DiffusiveFlux.SolveNonlinear(&physics.DiffusiveFluxSettings{
		Gas:           gas,
		Pressure0:     s.pressure,
		Initial:       x0,
		Tolerance:     c.Solver.Tolerance,
		MaxIterations: c.Solver.MaxIterations,
		Depth:         c.Solver.AndersonDepth,
		Record:        record,
	})
	if serr != nil {
		serr = fmt.Errorf("diffusive-flux formulation: %w", serr)
	}
	if sol == nil {
		if serr == nil {
			serr = fmt.Errorf("diffusive-flux formulation: no solution")
		}
		return nil, serr
	}
	tf, err := sol.TotalFlux(s.Discretisation)
	if err != nil {
		return nil, errors.Join(serr, err)
	}
	o := &Outcome{Setup: s, Solution: tf, Elapsed: time.Since(start)}
	if rep != nil {
		// The iteration updates the state through the (relative)
		// potentials projected onto the velocity space, the potential
		// update of the total-flux iteration.
		o.Report = &physics.NonlinearReport{
			Method:      solver.Anderson.String(),
			Update:      physics.PotentialProjection.String(),
			Converged:   rep.Converged,
			Iterations:  rep.Iterations,
			Evaluations: rep.Evaluations,
			Residual:    rep.Residual,
			History:     rep.History,
		}
		o.Converged, o.Iterations, o.Residual = rep.Converged, rep.Iterations, rep.Residual
	}
	o.summarise()
	return o, serr
}

// summarise fills the diagnostics in SI units.
func (o *Outcome) summarise() {
	s := o.Setup
	sc := s.Scales
	d := s.Discretisation
	dg := d.Diagnose(o.Solution)
	o.Diagnostics = dg
	back := d.OutflowBackflow(o.Solution)
	for _, tag := range s.Mesh.Tags() {
		r, ok := back[tag]
		switch {
		case !ok || !(r > 1e-8):
		case math.IsInf(r, 1):
			o.Warnings = append(o.Warnings, fmt.Sprintf("boundary %s: the mixture enters through this outflow boundary on balance; outflow gives no composition for what enters: make it an inflow, or give a composition there",
				s.Mesh.TagNames[tag]))
		default:
			o.Warnings = append(o.Warnings, fmt.Sprintf("boundary %s: the mixture enters through part of this outflow boundary (largest inward mass flux %.3g times the mean outward one); outflow gives no composition for what enters: lengthen the domain past the recirculation or give a composition there",
				s.Mesh.TagNames[tag], r))
		}
	}
	o.SpeciesBalance = dg.Balance
	o.MassAverage = dg.MassAverage
	if w := massAverageWarning(s.Formulation, dg.MassAverage); w != "" {
		o.Warnings = append(o.Warnings, w)
	}
	perDepth := sc.MassFlux() * sc.Length // scaled flux per scaled depth -> kg/(s m)
	o.BoundaryFlux = map[string][]Flux{}
	for tag, f := range dg.BoundaryFlux {
		name := s.Mesh.TagNames[tag]
		out := make([]Flux, len(f))
		for i, v := range f {
			mass := v * perDepth
			out[i] = Flux{Mass: mass, Molar: mass / s.mix.MolarMass(i)}
		}
		o.BoundaryFlux[name] = out
	}
	o.Production = make([]float64, len(dg.Production))
	for i, v := range dg.Production {
		o.Production[i] = v * perDepth
	}
	// Size of the wall-pressure approximation on composition boundaries.
	var pmax float64
	pc := o.Solution.Pressure()
	for tag, bc := range s.Problem.Boundary {
		if len(bc.Species) == 0 || bc.Species[0].Kind != physics.SpeciesPotential || bc.Velocity.Kind == physics.VelocityTraction {
			continue
		}
		dofs, err := d.P.BoundaryDofs(tag)
		if err != nil {
			continue
		}
		for _, g := range dofs {
			pmax = math.Max(pmax, math.Abs(pc[g]))
		}
	}
	var mmax float64
	for i := 0; i < s.mix.Len(); i++ {
		mmax = math.Max(mmax, s.mix.MolarMass(i))
	}
	o.WallPressure = pmax * sc.Pressure() * mmax / (sc.Density * s.RT())
}

// NewPoint returns a Point sized for the case's species.
func (o *Outcome) NewPoint() *Point {
	n := o.Setup.mix.Len()
	return &Point{
		C: make([]float64, n), Mu: make([]float64, n),
		MoleFraction: make([]float64, n), MassFraction: make([]float64, n),
		J: make([][2]float64, n), N: make([][2]float64, n), Diffusive: make([][2]float64, n),
	}
}

// SampleTo writes every field at the reference point xh of triangle t into
// pt. Concentrations follow from the discrete potentials and pressure by the
// closure. A state at which the closure fails gives NaN concentrations.
func (o *Outcome) SampleTo(pt *Point, t int, xh [2]float64) {
	s := o.Setup
	d, sc, sol := s.Discretisation, s.Scales, o.Solution
	n := s.mix.Len()
	af := fem.ElementMap(s.Mesh, t)
	x := af.Point(xh)
	pt.X = x
	vx, _ := fem.ScalarAt(d.V, sol.Velocity(0), t, xh)
	vy, _ := fem.ScalarAt(d.V, sol.Velocity(1), t, xh)
	p, _ := fem.ScalarAt(d.P, sol.Pressure(), t, xh)
	pt.V = [2]float64{vx * sc.Velocity(), vy * sc.Velocity()}
	pt.P = p * sc.Pressure()
	mu := make([]float64, n)
	for i := 0; i < n; i++ {
		mu[i], _ = fem.ScalarAt(d.U, sol.Potential(i), t, xh)
		pt.Mu[i] = mu[i] * s.RT()
	}
	c := make([]float64, n)
	if err := s.Closure.ConcentrationsTo(c, nil, nil, mu, s.pressure+sc.S()*p); err != nil {
		for i := range c {
			c[i] = math.NaN()
		}
	}
	var cT, rho float64
	for i := 0; i < n; i++ {
		pt.C[i] = c[i] * sc.Concentration
		cT += pt.C[i]
		rho += pt.C[i] * s.mix.MolarMass(i)
	}
	pt.Rho = rho
	for i := 0; i < n; i++ {
		pt.MoleFraction[i] = pt.C[i] / cT
		pt.MassFraction[i] = pt.C[i] * s.mix.MolarMass(i) / rho
		j, _ := fem.DivAt(d.F, sol.Flux(i), t, xh)
		J := [2]float64{j[0] * sc.MassFlux(), j[1] * sc.MassFlux()}
		pt.J[i] = J
		M := s.mix.MolarMass(i)
		pt.N[i] = [2]float64{J[0] / M, J[1] / M}
		ri := pt.C[i] * M
		pt.Diffusive[i] = [2]float64{J[0] - ri*pt.V[0], J[1] - ri*pt.V[1]}
	}
}

// Locate returns the triangle of the SI mesh that contains x (metres) and
// the reference coordinates of x in it.
func (o *Outcome) Locate(x [2]float64) (t int, xh [2]float64, ok bool) {
	s := o.Setup
	if s.locator == nil {
		s.locator = newLocator(s.Mesh)
	}
	return s.locator.find(x)
}

// MassAverageLimit is the mass-average defect ||v - sum J/rho|| (relative
// to the largest of ||v|| and ||J_i/rho||) above which a solution carries
// a warning. On the channel benchmark of docs/augmentation.md, at a Peclet
// number of 0.31, the inlet that gives both the velocity and the species
// fluxes left the total-flux formulation a defect of 6 % that did not fall
// with the mesh, and the two formulations' released fluxes 12 % apart;
// with parabolic mass fluxes on a Stefan wall instead the defect fell
// (2.0e-2, 6.7e-3 on 4 and 8 rows) and the two agreed within 0.18 %.
const MassAverageLimit = 1e-2

// massAverageWarning returns the warning for a solution of the given
// formulation with mass-average defect ma, or "" below MassAverageLimit.
func massAverageWarning(f casefile.Formulation, ma float64) string {
	if !(ma > MassAverageLimit) {
		return ""
	}
	if f == casefile.DiffusiveFlux {
		return fmt.Sprintf("the mass-average defect of the fields converted to total fluxes is %.2g (above %g); in this formulation it is an interpolation error: refine the mesh", ma, MassAverageLimit)
	}
	return fmt.Sprintf("the mass-average defect ||v - sum J/rho|| is %.2g (above %g): the velocity departs from the mass-average velocity of the species fluxes by that fraction. Refine the mesh; if the defect does not fall, check the boundary data: an inflow with both a velocity and convective-inflow fluxes contradicts v = sum J/rho wherever diffusion changes the density at the inlet (slow flow): give such an inflow as species mass fluxes on a stefan-wall instead (with profile: parabolic where it meets no-slip walls)", ma, MassAverageLimit)
}
