package simulate

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"sort"
	"strings"

	"mixwell/casefile"
	"mixwell/fem"
	"mixwell/mesh"
	"mixwell/physics"
	"mixwell/solver"
)

// Prepare builds the mesh, chooses the scales and poses the scaled problem
// of case c. Errors name the case file position and the boundary or field at
// fault where there is one.
func Prepare(c *casefile.Case) (*Setup, error) {
	n := len(c.Species)
	sp := make([]physics.Species, n)
	for i, s := range c.Species {
		sp[i] = physics.Species{Name: s.Name, MolarMass: s.MolarMass}
	}
	pairs := make([]physics.Pair, len(c.Diffusivities))
	for i, p := range c.Diffusivities {
		pairs[i] = physics.Pair{A: p.A, B: p.B, Value: p.Value}
	}
	mix, err := physics.NewMixture(sp, pairs)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", c.Source, err)
	}
	m, err := buildMesh(c)
	if err != nil {
		return nil, fmt.Errorf("%s: geometry: %w", c.Source, err)
	}
	s := &Setup{Case: c, Mesh: m, mix: mix, tagOf: map[string]int{}}
	for tag, name := range m.TagNames {
		s.tagOf[name] = tag
	}
	if err := s.chooseScales(); err != nil {
		return nil, err
	}
	if err := s.pose(); err != nil {
		return nil, err
	}
	return s, nil
}

// RT returns the gas constant times the case temperature (J/mol).
func (s *Setup) RT() float64 { return physics.GasConstant * s.Case.Temperature }

// floorComposition raises zero mole fractions to the case's floor and
// renormalises.
func (s *Setup) floorComposition(x []float64) ([]float64, error) {
	xmin := s.Case.Solver.MoleFractionFloor
	if xmin == 0 {
		xmin = 1e-6
	}
	out := make([]float64, len(x))
	_, err := s.mix.FloorMoleFractionsTo(out, x, xmin)
	return out, err
}

// referenceComposition is the initial composition when given, else the mean
// of the boundary compositions, else equal parts.
func (s *Setup) referenceComposition() ([]float64, error) {
	c := s.Case
	n := len(c.Species)
	if c.Initial.MoleFractions != nil {
		return s.floorComposition(c.Initial.MoleFractions)
	}
	mean := make([]float64, n)
	count := 0
	for _, b := range c.Boundaries {
		if b.Species.MoleFractions != nil {
			for i, x := range b.Species.MoleFractions {
				mean[i] += x
			}
			count++
		}
	}
	if count == 0 {
		for i := range mean {
			mean[i] = 1 / float64(n)
		}
		return mean, nil
	}
	for i := range mean {
		mean[i] /= float64(count)
	}
	return s.floorComposition(mean)
}

// siViscosity returns the SI viscosity model of the case.
func (s *Setup) siViscosity() (physics.ViscosityModel, error) {
	v := s.Case.Viscosity
	if v.Model == casefile.Wilke {
		w, err := physics.NewWilkeViscosity(s.mix, v.Pure)
		if err != nil {
			return nil, fmt.Errorf("%s: viscosity: %w", s.Case.Source, err)
		}
		return w, nil
	}
	return physics.ConstantViscosity(v.Value), nil
}

// chooseScales picks the scales from the reference state.
func (s *Setup) chooseScales() error {
	c := s.Case
	x, err := s.referenceComposition()
	if err != nil {
		return fmt.Errorf("%s: reference composition: %w", c.Source, err)
	}
	RT := s.RT()
	cT := c.Pressure / RT
	if v := c.Thermodynamics.MolarVolumes; v != nil {
		var vm float64
		for i, xi := range x {
			vm += xi * v[i]
		}
		cT = 1 / vm
	}
	visc, err := s.siViscosity()
	if err != nil {
		return err
	}
	lo, hi := s.Mesh.Points[0], s.Mesh.Points[0]
	for _, p := range s.Mesh.Points {
		lo = [2]float64{math.Min(lo[0], p[0]), math.Min(lo[1], p[1])}
		hi = [2]float64{math.Max(hi[0], p[0]), math.Max(hi[1], p[1])}
	}
	var speed float64
	for _, b := range c.Boundaries {
		speed = math.Max(speed, math.Abs(b.Velocity.MeanSpeed))
		speed = math.Max(speed, math.Abs(b.Velocity.Speed))
		speed = math.Max(speed, math.Hypot(b.Velocity.Vector[0], b.Velocity.Vector[1]))
	}
	sc, err := physics.ChooseScales(s.mix, physics.ReferenceState{
		Length: math.Max(hi[0]-lo[0], hi[1]-lo[1]), MoleFractions: x,
		TotalConcentration: cT, RT: RT, Viscosity: visc, Speed: speed,
	})
	if err != nil {
		return fmt.Errorf("%s: scales: %w", c.Source, err)
	}
	s.Scales = sc
	return nil
}

// scaledViscosity divides an SI viscosity model by the reference value.
type scaledViscosity struct {
	m   physics.ViscosityModel
	ref float64
}

func (v scaledViscosity) Viscosity(x []float64) float64 { return v.m.Viscosity(x) / v.ref }

// pose builds the scaled problem and its discretisation.
func (s *Setup) pose() error {
	c, sc := s.Case, s.Scales
	n := len(c.Species)
	smix := s.mix.Scaled(sc)
	s.pressure = c.Pressure / sc.ThermodynamicPressure()
	var err error
	vols := make([]float64, n)
	for i := range vols {
		if c.Thermodynamics.MolarVolumes != nil {
			vols[i] = c.Thermodynamics.MolarVolumes[i] * sc.Concentration
		}
	}
	switch c.Thermodynamics.Model {
	case casefile.IdealGas:
		s.Closure, err = physics.NewIdealGas(smix, 1, s.pressure)
	case casefile.IdealGasAtPressure:
		s.Closure, err = physics.NewIdealGasAtPressure(smix, 1, s.pressure)
	case casefile.IdealSolution:
		s.Closure, err = physics.NewIdealSolution(smix, vols, 1, s.pressure)
	case casefile.Margules:
		inter := make([]physics.Pair, len(c.Thermodynamics.Interactions))
		for i, p := range c.Thermodynamics.Interactions {
			inter[i] = physics.Pair{A: p.A, B: p.B, Value: p.Value}
		}
		s.Closure, err = physics.NewMargulesSolution(smix, vols, inter, 1, s.pressure)
	default:
		err = fmt.Errorf("unknown thermodynamic model %q", c.Thermodynamics.Model)
	}
	if err != nil {
		return fmt.Errorf("%s: thermodynamics: %w", c.Source, err)
	}
	if err := s.checkFormulation(); err != nil {
		return err
	}
	visc, err := s.siViscosity()
	if err != nil {
		return err
	}
	// The scaled mesh.
	sm := s.Mesh.Clone()
	for i := range sm.Points {
		sm.Points[i][0] /= sc.Length
		sm.Points[i][1] /= sc.Length
	}
	if c.Discretisation.Pair == casefile.ScottVogelius {
		sm = mesh.BarycentricSplit(sm)
		s.Mesh = mesh.BarycentricSplit(s.Mesh)
	}
	ref, err := s.referenceComposition()
	if err != nil {
		return err
	}
	s.initial = make([]float64, n)
	if err := s.Closure.PotentialsTo(s.initial, ref, s.pressure); err != nil {
		return fmt.Errorf("%s: initial composition: %w", c.Source, err)
	}
	fg := sc.Density * sc.Length * sc.Length / (sc.Viscosity * sc.Velocity())
	p := &physics.Problem{
		Mesh: sm, Mixture: smix, Degree: c.Discretisation.Degree, S: sc.S(),
		Viscosity:           scaledViscosity{visc, sc.Viscosity},
		BulkViscosity:       c.Viscosity.Bulk / sc.Viscosity,
		Augmentation:        c.Solver.Augmentation,
		SpeciesAugmentation: c.Solver.SpeciesAugmentation,
		Gravity:             [2]float64{c.Gravity[0] * fg, c.Gravity[1] * fg},
		Boundary:            map[int]physics.BoundaryCondition{},
		QuadratureDegree:    c.Discretisation.Quadrature,
	}
	if c.Discretisation.Flux == casefile.RT {
		p.Flux = physics.RTFlux
	}
	if c.Discretisation.Pair == casefile.ScottVogelius {
		p.Pressure = physics.ScottVogelius
	}
	// In a flow-through case (an outflow boundary, whose equation-of-state
	// datum fixes the potentials' level) under a level-invariant closure,
	// a composition with impermeable species is imposed relative to the
	// level, which drifts along the flow (docs/outflow.md). Species-driven
	// cases keep the absolute datum: there the drift is negligible and the
	// absolute datum was the more accurate (Stefan tube at degree 1: flux
	// error 2.9e-6 against 2.3e-5).
	_, levelInvariant := s.Closure.(physics.LevelInvariant)
	flowThrough := false
	for _, b := range c.Boundaries {
		flowThrough = flowThrough || b.Species.Kind == casefile.Outflow
	}
	s.relativeComposition = levelInvariant && flowThrough
	p.SpeciesAugmentation = SpeciesAugmentation(c)
	for _, b := range c.Boundaries {
		tag, ok := s.tagOf[b.Name]
		if !ok {
			return fmt.Errorf("%s:%d: boundaries.%s: no boundary of the mesh has this name", c.Source, b.Pos.Line, b.Name)
		}
		bc, err := s.boundary(sm, tag, b)
		if err != nil {
			return fmt.Errorf("%s:%d: boundaries.%s: %w", c.Source, b.Pos.Line, b.Name, err)
		}
		p.Boundary[tag] = bc
	}
	// A species without composition data anywhere has its potential level
	// fixed by its inventory (formulation note, section 6): the case's
	// inventory, or the fill composition times the volume.
	var area float64
	for t := range sm.Triangles {
		area += sm.Area(t)
	}
	for i := 0; i < n; i++ {
		has := false
		for _, bc := range p.Boundary {
			has = has || bc.Species[i].Kind == physics.SpeciesPotential || bc.Species[i].Kind == physics.SpeciesOutflow
		}
		if has {
			continue
		}
		if p.Inventory == nil {
			p.Inventory = make([]float64, n)
		}
		switch {
		case c.Initial.Inventory != nil && c.Initial.Inventory[i] > 0:
			p.Inventory[i] = c.Initial.Inventory[i] / (sc.Concentration * sc.Length * sc.Length)
		case c.Initial.MoleFractions != nil:
			conc := make([]float64, n)
			if err := s.Closure.ConcentrationsTo(conc, nil, nil, s.initial, s.pressure); err != nil {
				return fmt.Errorf("%s: initial composition: %w", c.Source, err)
			}
			p.Inventory[i] = conc[i] * area
		default:
			return fmt.Errorf("%s: species %q has no composition boundary, so its amount must be given: add initial.inventory or initial.mole_fractions", c.Source, c.Species[i].Name)
		}
		if !(p.Inventory[i] > 0) {
			return fmt.Errorf("%s: species %q has no composition boundary and a zero inventory", c.Source, c.Species[i].Name)
		}
	}
	s.Problem = p
	d, err := physics.NewDiscretisation(p)
	if err != nil {
		return fmt.Errorf("%s: %w", c.Source, err)
	}
	s.Discretisation = d
	if s.Formulation == casefile.DiffusiveFlux {
		if s.DiffusiveFlux, err = physics.NewDiffusiveFlux(p); err != nil {
			return fmt.Errorf("%s: %w", c.Source, err)
		}
	}
	return nil
}

// checkFormulation records the case's formulation and checks that the
// diffusive-flux formulation gets what it is built for: the plain ideal
// gas (the level of its potentials comes from the equation of state) and
// the Anderson iteration of the potentials (physics.DiffusiveFlux.
// SolveNonlinear). Errors name the case file, the position of
// discretisation.formulation and the field at odds with it.
func (s *Setup) checkFormulation() error {
	c := s.Case
	s.Formulation = c.Discretisation.Formulation
	if s.Formulation == "" {
		s.Formulation = casefile.TotalFlux
	}
	if s.Formulation != casefile.DiffusiveFlux {
		return nil
	}
	at := c.Discretisation.FormulationPos
	if at.File == "" {
		at.File = c.Source
	}
	if _, ok := s.Closure.(*physics.IdealGas); !ok {
		return fmt.Errorf("%s: discretisation.formulation: diffusive-flux is built only for the ideal gas (thermodynamics: %s), but thermodynamics is %s; use formulation total-flux for other models",
			at, casefile.IdealGas, c.Thermodynamics.Model)
	}
	if m := c.Solver.Method; m != "" && m != casefile.Anderson {
		return fmt.Errorf("%s: discretisation.formulation: diffusive-flux iterates with solver.method %s only, but solver.method is %s",
			at, casefile.Anderson, m)
	}
	if u := c.Solver.Update; u != "" && u != casefile.PotentialUpdate {
		return fmt.Errorf("%s: discretisation.formulation: diffusive-flux updates the state through the potentials (solver.update %s) only, but solver.update is %s",
			at, casefile.PotentialUpdate, u)
	}
	return nil
}

// segmentOf returns the end points and outward normal of the straight
// boundary with the given tag in the scaled mesh, or an error when its
// edges are not on one straight line.
func segmentOf(m *mesh.Mesh, tag int) (a, b, nrm [2]float64, err error) {
	edges := m.BoundaryEdges(tag)
	if len(edges) == 0 {
		return a, b, nrm, fmt.Errorf("no edges")
	}
	first := true
	for _, e := range edges {
		en, _ := fem.OutwardNormal(m, e)
		if first {
			nrm, first = en, false
			a, b = m.Points[m.Edges[e][0]], m.Points[m.Edges[e][1]]
		}
		if math.Abs(en[0]*nrm[1]-en[1]*nrm[0]) > 1e-9 || en[0]*nrm[0]+en[1]*nrm[1] < 0 {
			return a, b, nrm, fmt.Errorf("the boundary is not straight")
		}
		for _, v := range m.Edges[e] {
			p := m.Points[v]
			// Keep a and b the extreme points along the tangent t.
			t := [2]float64{-nrm[1], nrm[0]}
			sa := (p[0]-a[0])*t[0] + (p[1]-a[1])*t[1]
			if sa < 0 {
				a = p
			}
			sb := (p[0]-b[0])*t[0] + (p[1]-b[1])*t[1]
			if sb > 0 {
				b = p
			}
		}
	}
	return a, b, nrm, nil
}

// boundary translates the conditions of one named boundary into the scaled
// problem's conditions.
func (s *Setup) boundary(sm *mesh.Mesh, tag int, b casefile.Boundary) (physics.BoundaryCondition, error) {
	c, sc := s.Case, s.Scales
	n := len(c.Species)
	var bc physics.BoundaryCondition
	vel := b.Velocity
	var inflowNormal func(x [2]float64) float64 // scaled v.n of an inflow
	switch vel.Kind {
	case casefile.Wall:
		bc.Velocity.Kind = physics.VelocityGiven
		if vel.Speed != 0 {
			_, _, nrm, err := segmentOf(sm, tag)
			if err != nil {
				return bc, fmt.Errorf("a moving wall must be straight: %v", err)
			}
			u := vel.Speed / sc.Velocity()
			v := [2]float64{-nrm[1] * u, nrm[0] * u}
			bc.Velocity.Velocity = func([2]float64) [2]float64 { return v }
		}
	case casefile.Inflow:
		bc.Velocity.Kind = physics.VelocityGiven
		if vel.HasVector {
			v := [2]float64{vel.Vector[0] / sc.Velocity(), vel.Vector[1] / sc.Velocity()}
			bc.Velocity.Velocity = func([2]float64) [2]float64 { return v }
			_, _, nrm, err := segmentOf(sm, tag)
			if err != nil {
				return bc, fmt.Errorf("an inflow must be straight: %v", err)
			}
			vn := v[0]*nrm[0] + v[1]*nrm[1]
			inflowNormal = func([2]float64) float64 { return vn }
			break
		}
		a, bb, nrm, err := segmentOf(sm, tag)
		if err != nil {
			return bc, fmt.Errorf("an inflow must be straight: %v", err)
		}
		u := vel.MeanSpeed / sc.Velocity()
		shape := func([2]float64) float64 { return 1 }
		if vel.Profile == casefile.Parabolic {
			shape = parabolicShape(a, bb)
		}
		speed := func(x [2]float64) float64 { return u * shape(x) }
		bc.Velocity.Velocity = func(x [2]float64) [2]float64 {
			w := speed(x)
			return [2]float64{-w * nrm[0], -w * nrm[1]}
		}
		inflowNormal = func(x [2]float64) float64 { return -speed(x) }
	case casefile.Slip:
		bc.Velocity.Kind = physics.VelocitySlip
	case casefile.Open:
		bc.Velocity.Kind = physics.VelocityTraction
		// Tangential velocity 0 with normal traction -p_b where the
		// boundary is axis-parallel (formulation note, section 10 item
		// 4c); the full traction -p_b n elsewhere.
		if _, _, nrm, err := segmentOf(sm, tag); err == nil && (math.Abs(nrm[0]) < 1e-12 || math.Abs(nrm[1]) < 1e-12) {
			bc.Velocity.NoTangential = true
		}
		pb, err := s.openPressure(sm, tag, vel.Pressure/sc.Pressure())
		if err != nil {
			return bc, err
		}
		bc.Velocity.Traction = func(x, nrm [2]float64) [2]float64 { p := pb(x); return [2]float64{-p * nrm[0], -p * nrm[1]} }
		bc.Pressure = pb
	case casefile.StefanWall:
		bc.Velocity.Kind = physics.VelocityStefan
	default:
		return bc, fmt.Errorf("unknown velocity condition %q", vel.Kind)
	}
	bc.Species = make([]physics.SpeciesCondition, n)
	spc := b.Species
	switch spc.Kind {
	case casefile.Impermeable, "":
		for i := range bc.Species {
			bc.Species[i] = physics.SpeciesCondition{Kind: physics.SpeciesFlux}
		}
	case casefile.Flux:
		shape := func([2]float64) float64 { return 1 }
		if spc.Profile == casefile.Parabolic {
			a, bb, _, err := segmentOf(sm, tag)
			if err != nil {
				return bc, fmt.Errorf("parabolic fluxes need a straight boundary: %v", err)
			}
			shape = parabolicShape(a, bb)
		}
		for i := range bc.Species {
			f := spc.Fluxes[i]
			if spc.Basis == casefile.MolarBasis {
				f *= c.Species[i].MolarMass
			}
			f /= sc.MassFlux()
			bc.Species[i] = physics.SpeciesCondition{Kind: physics.SpeciesFlux, Flux: func(x, _ [2]float64) float64 { return f * shape(x) }}
		}
	case casefile.ConvectiveInflow:
		if inflowNormal == nil {
			return bc, errors.New("convective-inflow needs an inflow velocity condition on the same boundary")
		}
		x, err := s.floorComposition(spc.MoleFractions)
		if err != nil {
			return bc, err
		}
		mu := make([]float64, n)
		conc := make([]float64, n)
		if err := s.Closure.PotentialsTo(mu, x, s.pressure); err != nil {
			return bc, err
		}
		if err := s.Closure.ConcentrationsTo(conc, nil, nil, mu, s.pressure); err != nil {
			return bc, err
		}
		for i := range bc.Species {
			rhoI := s.scaledMass(i) * conc[i]
			bc.Species[i] = physics.SpeciesCondition{Kind: physics.SpeciesFlux, Flux: func(x, _ [2]float64) float64 { return rhoI * inflowNormal(x) }}
		}
	case casefile.Composition:
		x, err := s.floorComposition(spc.MoleFractions)
		if err != nil {
			return bc, err
		}
		mu := make([]float64, n)
		if err := s.Closure.PotentialsTo(mu, x, s.pressure); err != nil {
			return bc, err
		}
		for i := range bc.Species {
			if spc.Impermeable != nil && spc.Impermeable[i] {
				// Impermeable: zero flux. The potential the composition
				// gives it is kept for the diffusive-flux formulation,
				// whose Stefan walls need it; the total-flux one reads
				// potentials of potential data only.
				v := mu[i]
				bc.Species[i] = physics.SpeciesCondition{Kind: physics.SpeciesFlux, Potential: func([2]float64) float64 { return v }}
				continue
			}
			v := mu[i]
			bc.Species[i] = physics.SpeciesCondition{Kind: physics.SpeciesPotential, Potential: func([2]float64) float64 { return v },
				Relative: s.relativeComposition && slices.Contains(spc.Impermeable, true)}
		}
	case casefile.Outflow:
		if bc.Velocity.Kind != physics.VelocityTraction {
			return bc, errors.New("outflow needs velocity type open")
		}
		for i := range bc.Species {
			bc.Species[i] = physics.SpeciesCondition{Kind: physics.SpeciesOutflow}
		}
	default:
		return bc, fmt.Errorf("unknown species condition %q", spc.Kind)
	}
	return bc, nil
}

// scaledMass returns the scaled molar mass of species i.
func (s *Setup) scaledMass(i int) float64 { return s.mix.MolarMass(i) / s.Scales.MolarMass() }

// Unknowns returns the number of unknowns of the discrete system that is
// solved: that of the diffusive-flux formulation when the case chooses it.
func (s *Setup) Unknowns() int {
	if s.DiffusiveFlux != nil {
		return s.DiffusiveFlux.Len()
	}
	return s.Discretisation.Len()
}

// Describe summarises the mesh, the unknowns and the scales.
func (s *Setup) Describe() string {
	var b strings.Builder
	m := s.Mesh
	fmt.Fprintf(&b, "mesh: %d vertices, %d triangles, largest edge %.4g m\n", m.NumPoints(), m.NumTriangles(), m.MaxEdgeLength())
	names := make([]string, 0, len(s.tagOf))
	for name := range s.tagOf {
		names = append(names, name)
	}
	sort.Strings(names)
	for _, name := range names {
		fmt.Fprintf(&b, "  boundary %-16s %d edges\n", name, len(m.BoundaryEdges(s.tagOf[name])))
	}
	k := s.Case.Discretisation.Degree
	fmt.Fprintf(&b, "discretisation: degree %d (velocity P%d, pressure P%d, fluxes %s, potentials DG%d), %s formulation, %d unknowns\n",
		k, k+1, k, s.Problem.Flux, k, s.Formulation, s.Unknowns())
	b.WriteString(s.Scales.String())
	fmt.Fprintf(&b, "\n  %-24s %-8s = %.6e\n", "pressure scales ratio", "p/cRT", s.Scales.Pressure()/s.Scales.ThermodynamicPressure())
	return b.String()
}

// method converts the case's method name.
func method(m casefile.Method) (solver.FixedPointMethod, error) {
	if m == "" {
		return solver.Anderson, nil
	}
	return solver.ParseFixedPointMethod(string(m))
}

// openPressure returns the scaled dynamic pressure along the open boundary
// with the given tag: the case's value p0 at the boundary's midpoint
// (length-weighted mean of its edge midpoints) and, under gravity, the
// hydrostatic variation rho_0 g.(x - x_mid) with the density rho_0 of the
// initial composition, so that a vertical outlet does not contradict the
// hydrostatic pressure that gravity builds.
func (s *Setup) openPressure(m *mesh.Mesh, tag int, p0 float64) (func([2]float64) float64, error) {
	fg := s.Scales.Density * s.Scales.Length * s.Scales.Length / (s.Scales.Viscosity * s.Scales.Velocity())
	g := [2]float64{s.Case.Gravity[0] * fg, s.Case.Gravity[1] * fg}
	if g == [2]float64{} {
		return func([2]float64) float64 { return p0 }, nil
	}
	var mid [2]float64
	var length float64
	for _, e := range m.BoundaryEdges(tag) {
		a, b := m.Points[m.Edges[e][0]], m.Points[m.Edges[e][1]]
		l := math.Hypot(b[0]-a[0], b[1]-a[1])
		mid[0] += l * (a[0] + b[0]) / 2
		mid[1] += l * (a[1] + b[1]) / 2
		length += l
	}
	mid[0] /= length
	mid[1] /= length
	n := len(s.initial)
	conc := make([]float64, n)
	if err := s.Closure.ConcentrationsTo(conc, nil, nil, s.initial, s.pressure); err != nil {
		return nil, err
	}
	var rho float64
	for i, ci := range conc {
		rho += s.scaledMass(i) * ci
	}
	return func(x [2]float64) float64 {
		return p0 + rho*(g[0]*(x[0]-mid[0])+g[1]*(x[1]-mid[1]))
	}, nil
}

// SpeciesAugmentation returns the one-sided species augmentation beta that
// a solve of c uses: the case's value, or for "auto"
// (casefile.AutoSpeciesAugmentation) physics.FlowThroughSpeciesAugmentation
// when some boundary has the outflow species condition, where the
// augmentation's residual accumulates along the flow, and
// physics.ClosedSpeciesAugmentation otherwise (docs/augmentation.md).
func SpeciesAugmentation(c *casefile.Case) float64 {
	if c.Solver.SpeciesAugmentation >= 0 {
		return c.Solver.SpeciesAugmentation
	}
	for _, b := range c.Boundaries {
		if b.Species.Kind == casefile.Outflow {
			return physics.FlowThroughSpeciesAugmentation
		}
	}
	return physics.ClosedSpeciesAugmentation
}

// parabolicShape returns the parabolic profile of mean 1 along the straight
// boundary from a to b: 6 t (1 - t), t the position of x projected on the
// boundary (0 at a, 1 at b). Inflow velocities and flux data share it.
func parabolicShape(a, b [2]float64) func(x [2]float64) float64 {
	l2 := (b[0]-a[0])*(b[0]-a[0]) + (b[1]-a[1])*(b[1]-a[1])
	return func(x [2]float64) float64 {
		t := ((x[0]-a[0])*(b[0]-a[0]) + (x[1]-a[1])*(b[1]-a[1])) / l2
		return 6 * t * (1 - t)
	}
}
