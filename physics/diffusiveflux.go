package physics

import (
	"fmt"
	"math"
	"slices"

	"gonum.org/v1/gonum/mat"

	"mixwell/fem"
	"mixwell/mesh"
	"mixwell/solver"
)

// The diffusive-flux formulation (formulation note, section 10 item 2,
// remedy (c)).
//
// The unknowns are the velocity v and pressure p, the diffusive mass fluxes
// j_i = J_i - w_i rho v of the first n-1 species (j_n = -sum_{i<n} j_i, so
// that the total flux sum J_i is rho v by construction) and the n-1 relative
// mass potentials m_i = mu_i/M_i - mu_n/M_n, in the spaces of Discretisation.
// Testing OSM row i with K_i/rho_i, where K_n = -sum_{i<n} K_i, removes the
// pressure and the convective part: the transport matrix annihilates a
// common velocity (M 1 = 0), and w_i grad p . K_i/rho_i sums to
// grad p . sum K_i / rho = 0. With frozen concentrations, one step reads:
//
//	int 2 eta eps(v):eps(u) + lambda div v div u - int p div u = l(u)
//	-int q div(rho v)                                        = -int q sum_i M_i r_i
//	sum_{i,j<n} int A_ij j_j.K_i - sum_{i<n} int m_i div K_i = sum_{i<n} int h_i.K_i - boundary
//	-int nu_i (div j_i + div(rho_i v))                       = -int nu_i M_i r_i   (i < n)
//
// with A = P^T diag(1/rho) M diag(1/rho) P (P appends the row -1^T, so A_ij
// = B_ij - B_in - B_nj + B_nn, B_ij = M_ij/(rho_i rho_j)), h_i = g_i/rho_i -
// g_n/rho_n (manufactured sources), and on a potential boundary the term
// -int m_i,b K_i.n. Neither the group S nor an augmentation appears: the
// mass-average constraint holds identically, and the species rows no
// longer see the pressure. The price is a non-symmetric system (the
// convection couples v into the continuity rows, the density into the mass
// row) and that species n, whose balance is the total mass row minus the
// others, is conserved element by element only when the pressure test
// space holds the element indicators (Scott–Vogelius); with Taylor–Hood its
// element defects converge but do not vanish.
//
// SolveFrozen solves one step with frozen concentrations (the measurement
// of docs/augmentation.md); SolveNonlinear iterates with the ideal gas,
// taking the level of the potentials from the equation of state. Outflow is
// zero diffusive flux, j_i.n = 0, essential. Slip walls fix v.n = 0. A
// Stefan wall takes either flux data for every species (an inlet of given
// mass fluxes; its normal velocity sum_i J_i.n / rho is set from the frozen
// density) or composition data with one impermeable species l (an
// evaporating or dissolving surface). There the relative potentials of all
// species are imposed, the impermeable one's included, and the normal
// velocity is an unknown: the rows of its unknowns state
// J_l.n = j_l.n + rho_l v.n = g_l, projected on the velocity trace, in place
// of the momentum balance, whose normal traction becomes a reaction. The
// count closes: n-1 natural potential data and one constraint fix the n-1
// normal diffusive fluxes and v.n. Two or more impermeable species would
// need their wall potentials as unknowns and are rejected by name, as are
// boundaries that otherwise mix flux and potential data.

// Block numbers of a DiffusiveFlux layout: vx, vy, p, then j_1..j_{n-1},
// then m_1..m_{n-1}.
const dfBlockJ0 = 3

// DiffusiveFlux is the diffusive-flux discretisation of a
// Problem (remedy (c) of docs/augmentation.md): Taylor–Hood or
// Scott–Vogelius velocity and pressure, BDM or RT diffusive fluxes of n-1
// species and discontinuous relative potentials. The sparsity pattern and
// the set of essential unknowns are built once. Not safe for concurrent use.
type DiffusiveFlux struct {
	prob *Problem
	n, r int // species, independent fluxes r = n-1
	k    int
	m    *mesh.Mesh

	// mixedSpaces holds the elements, the spaces V, P, F, U (velocity
	// component, pressure, diffusive flux, relative potential) and the
	// quadrature tables.
	mixedSpaces
	lay *fem.Layout
	sys *fem.PatternSystem

	// fluxTags lists the tags with flux data, potentialTags those with
	// potential data.
	fluxTags, potentialTags []int
	// stefan lists the Stefan walls with flux data for every species (an
	// inlet of given mass fluxes, or a wall with given exchange), whose
	// normal velocity sum_i J_i.n / rho each solve sets from the frozen
	// density.
	stefan []dfStefan
	// pinnedP and pinnedM are the unknowns fixed to remove constant modes
	// (-1: none).
	pinnedP int
	pinnedM []int
	// lu keeps the ordering and symbolic analysis between solves.
	lu *solver.LU
	// wallLambda maps, for each Stefan wall with two impermeable species,
	// the flux unknowns of its edges to the wall multipliers that follow
	// the layout's unknowns (nWall of them; see addWallConstraints).
	wallLambda map[int]map[int]int
	nWall      int
	// levelSpecies lists the species whose relative potential is pinned
	// in one element, its constant being set by the species balance in
	// the nonlinear iteration (all of them when no boundary gives a
	// composition; see wallLevelSpecies for the other case).
	levelSpecies []int
	// wallLevel marks the case of wallLevelSpecies: the pinned value
	// follows the frozen state (pinWallLevel), and the step's pinned
	// potential keeps it.
	wallLevel bool
}

// dfStefan is a Stefan wall of the diffusive-flux discretisation: its tag,
// the velocity component normal to it, the outward normal, the unknowns
// of that component that it sets or constrains (corners held by a given
// velocity excluded), and its impermeable species.
type dfStefan struct {
	tag    int
	comp   int
	normal [2]float64
	dofs   map[int]bool
	// wall lists the impermeable species of a wall with composition data
	// (one or two); it is empty for a wall with flux data for every
	// species.
	wall []int
	// edges holds, per wall edge of a wall with composition data, what
	// the elimination of its constraint needs (wallRows).
	edges []wallEdge
}

// wallEdge is one edge of a Stefan wall with composition data: the edge,
// its triangle and local edge, the local flux unknowns with a normal trace
// on it (eb), the local free normal-velocity unknowns with a trace on it
// (va), and the links from the constrained flux rows to the velocity rows
// (link[a][b] for va[a], eb[b]).
type wallEdge struct {
	e, t, le int
	eb, va   []int
	link     [][]int
}

// wallRows sets up the constraint of the Stefan wall sw with composition
// data. With l its (first) impermeable species, J_l.n = j_l.n + rho_l v.n
// = g_l is imposed in the normal-trace space T of the fluxes on the wall:
// the rows of the flux unknowns of species l on the wall (of the first
// species when l is the last, whose flux is -sum_{i<n} j_i) state it, in
// place of their potential conditions. The normal velocity on the wall is
// then tied to those fluxes, and its rows are the potential conditions
// tested in the constrained direction: the row of velocity unknown a is
// sum_b c_ab (row of flux unknown b), where sum_b c_ab psi_b is the L2
// projection on T of rho_l phi_a (the links, set each assembly by
// setWallLinks). The momentum balance of the normal velocity is dropped:
// the wall's normal traction is a reaction. When l is the last species,
// the admissible directions with the velocity held also keep sum_i j_i.n
// = 0, so the flux rows of the other species on the wall receive minus the
// rows of the first (links of multiple -1).
func (d *DiffusiveFlux) wallRows(sw *dfStefan) error {
	m := d.m
	off := d.lay.Offset
	blk := sw.wall[0]
	if blk == d.r {
		blk = 0
	}
	nv, nf := d.ve.N, d.fe.N
	for _, e := range m.BoundaryEdges(sw.tag) {
		t := m.EdgeTriangles[e][0]
		le, err := fem.LocalEdge(m, t, e)
		if err != nil {
			return err
		}
		vd, fd := d.V.Dofs(t), d.F.Dofs(t)
		we := wallEdge{e: e, t: t, le: le}
		// Basis functions whose trace on the edge vanishes (to rounding)
		// are left out.
		var big float64
		for _, v := range d.fe.Normal[le] {
			big = math.Max(big, math.Abs(v))
		}
		for b := 0; b < nf; b++ {
			for q := 0; q < d.fe.NQ; q++ {
				if math.Abs(d.fe.Normal[le][q*nf+b]) > 1e-10*big {
					we.eb = append(we.eb, b)
					break
				}
			}
		}
		for a := 0; a < nv; a++ {
			if !sw.dofs[vd[a]] {
				continue
			}
			for q := 0; q < d.ve.NQ; q++ {
				if math.Abs(d.ve.Value[le][q*nv+a]) > 1e-10 {
					we.va = append(we.va, a)
					break
				}
			}
		}
		for _, b := range we.eb {
			row := off(dfBlockJ0+blk) + fd[b]
			if d.sys.Fixed(row) {
				return fmt.Errorf("physics: Stefan wall %s: a flux unknown on it is held by other data", tagLabel(m, sw.tag))
			}
			d.sys.Replace(row)
			if sw.wall[0] == d.r {
				for i := 1; i < d.r; i++ {
					k := d.sys.Link(row, off(dfBlockJ0+i)+fd[b])
					d.sys.SetLink(k, -1)
				}
			}
		}
		we.link = make([][]int, len(we.va))
		for ia, a := range we.va {
			for _, b := range we.eb {
				we.link[ia] = append(we.link[ia], d.sys.Link(off(dfBlockJ0+blk)+fd[b], off(blockVX+sw.comp)+vd[a]))
			}
		}
		sw.edges = append(sw.edges, we)
	}
	return nil
}

// NewDiffusiveFlux builds the spaces, the essential set and the sparsity
// pattern of p for the diffusive-flux formulation. The error names the tag
// or condition that the formulation does not support.
func NewDiffusiveFlux(p *Problem) (*DiffusiveFlux, error) {
	if err := p.validate(); err != nil {
		return nil, err
	}
	k, n := p.Degree, p.Mixture.Len()
	d := &DiffusiveFlux{prob: p, n: n, r: n - 1, k: k, m: p.Mesh, pinnedP: -1}
	var err error
	if d.mixedSpaces, err = newMixedSpaces(p); err != nil {
		return nil, err
	}
	spaces := []*fem.Space{d.V, d.V, d.P}
	for i := 0; i < d.r; i++ {
		spaces = append(spaces, d.F)
	}
	for i := 0; i < d.r; i++ {
		spaces = append(spaces, d.U)
	}
	d.lay = fem.NewLayout(spaces...)
	if err := d.numberWallMultipliers(); err != nil {
		return nil, err
	}
	d.sys = fem.NewPatternSystem(d.lay.Len() + d.nWall)
	if err := d.fixEssential(); err != nil {
		return nil, err
	}
	d.couple()
	d.sys.Build()
	return d, nil
}

// Layout returns the layout of the unknown vector: vx, vy, p, j_1..j_{n-1},
// m_1..m_{n-1}.
func (d *DiffusiveFlux) Layout() *fem.Layout { return d.lay }

// Len returns the number of unknowns.
func (d *DiffusiveFlux) Len() int { return d.lay.Len() + d.nWall }

// fixEssential sorts the tags into flux and potential data, fixes the
// velocity data and declares the normal moments of the diffusive fluxes on
// flux boundaries essential (their values depend on the frozen state and
// are set by each solve).
func (d *DiffusiveFlux) fixEssential() error {
	p, m := d.prob, d.m
	allVelocityEssential := true
	// Velocity unknowns held by given velocities win at corners.
	given := map[int]bool{}
	for _, t := range m.Tags() {
		if p.Boundary[t].Velocity.Kind == VelocityGiven {
			dofs, err := d.V.BoundaryDofs(t)
			if err != nil {
				return err
			}
			for _, g := range dofs {
				given[g] = true
			}
		}
	}
	for _, t := range m.Tags() {
		bc := p.Boundary[t]
		kind := bc.Species[0].Kind
		var wall []int // the impermeable species of a Stefan wall with composition data
		if bc.Velocity.Kind == VelocityStefan {
			var err error
			if wall, err = d.compositionWall(t); err != nil {
				return err
			}
			if len(wall) > 0 {
				kind = SpeciesPotential
			}
		}
		for i, sc := range bc.Species {
			if sc.Relative {
				return fmt.Errorf("physics: boundary %s, species %q: relative potential data are not built for the diffusive-flux formulation", tagLabel(m, t), p.Mixture.Name(i))
			}
			if sc.Kind != kind && !slices.Contains(wall, i) {
				return fmt.Errorf("physics: boundary %s mixes flux and potential data (species %q has %s, %q has %s); the diffusive-flux formulation needs one kind for every species of a boundary, except on a Stefan wall with composition data and one or two impermeable species",
					tagLabel(m, t), p.Mixture.Name(0), bc.Species[0].Kind, p.Mixture.Name(i), sc.Kind)
			}
		}
		switch bc.Velocity.Kind {
		case VelocityGiven:
			if err := d.fixGivenVelocity(d.sys, d.lay, t, bc.Velocity.Velocity, nil); err != nil {
				return err
			}
		case VelocitySlip:
			// v.n = 0; the tangential traction vanishes (natural).
			if err := d.fixComponent(t, false, given); err != nil {
				return err
			}
		case VelocityTraction:
			if bc.Velocity.NoTangential {
				if err := d.fixComponent(t, true, nil); err != nil {
					return err
				}
			}
			allVelocityEssential = false
		case VelocityStefan:
			// With flux data for every species the normal velocity
			// sum_i J_i.n / rho is fixed by each solve from the frozen
			// density. With composition data and one impermeable species
			// l, the normal velocity is an unknown tied to that species'
			// diffusive flux by J_l.n = j_l.n + rho_l v.n = (data): the
			// rows of the normal velocity unknowns state this constraint
			// (addWallConstraints) in place of the momentum balance, whose
			// normal traction is then a reaction.
			c, err := slipComponent(m, t)
			if err != nil {
				return err
			}
			nrm, _ := fem.OutwardNormal(m, m.BoundaryEdges(t)[0])
			dofs, err := d.V.BoundaryDofs(t)
			if err != nil {
				return err
			}
			// The tangential velocity is 0, or the tangential component
			// of bc.Velocity.Velocity when given (manufactured solutions).
			tangent := map[int]float64{}
			if vel := bc.Velocity.Velocity; vel != nil {
				tdofs, vals, err := fem.BoundaryValues(d.V, []int{t}, func(x [2]float64) float64 { return vel(x)[1-c] })
				if err != nil {
					return err
				}
				for a, g := range tdofs {
					tangent[g] = vals[a]
				}
			}
			sw := dfStefan{tag: t, comp: c, normal: nrm, dofs: map[int]bool{}, wall: wall}
			for _, g := range dofs {
				if given[g] {
					continue
				}
				d.sys.Fix(d.lay.Offset(blockVX+1-c)+g, tangent[g])
				if len(wall) > 0 {
					d.sys.Replace(d.lay.Offset(blockVX+c) + g)
				} else {
					d.sys.Fix(d.lay.Offset(blockVX+c)+g, 0)
				}
				sw.dofs[g] = true
			}
			if len(wall) > 0 {
				if err := d.wallRows(&sw); err != nil {
					return err
				}
			}
			d.stefan = append(d.stefan, sw)
		default:
			return fmt.Errorf("physics: boundary %s: the %s condition is not built for the diffusive-flux formulation (given velocity, slip, traction, or a Stefan wall)", tagLabel(m, t), bc.Velocity.Kind)
		}
		if kind == SpeciesPotential {
			d.potentialTags = append(d.potentialTags, t)
			continue
		}
		// Flux data fix j_i.n = J_i.n - rho_i v.n, which needs v.n known;
		// outflow fixes j_i.n = 0 (zero diffusive flux).
		if kind != SpeciesOutflow && bc.Velocity.Kind == VelocityTraction {
			return fmt.Errorf("physics: boundary %s has species flux data on an open (traction) boundary; the diffusive-flux formulation needs the velocity given there", tagLabel(m, t))
		}
		d.fluxTags = append(d.fluxTags, t)
		dofs, _, err := fem.BoundaryNormalMoments(d.F, []int{t}, func(x, nrm [2]float64) float64 { return 0 })
		if err != nil {
			return err
		}
		for i := 0; i < d.r; i++ {
			for _, g := range dofs {
				d.sys.Fix(d.lay.Offset(dfBlockJ0+i)+g, 0)
			}
		}
	}
	d.levelSpecies = nil
	if len(d.potentialTags) == 0 {
		for i := 0; i < d.r; i++ {
			d.levelSpecies = append(d.levelSpecies, i)
		}
	} else if p := d.wallLevelSpecies(); p >= 0 {
		d.levelSpecies = []int{p}
		d.wallLevel = true
	}
	d.pinnedM = make([]int, d.r)
	for i := range d.pinnedM {
		d.pinnedM[i] = -1
	}
	for _, i := range d.levelSpecies {
		g := d.lay.Offset(dfBlockJ0+d.r+i) + d.U.Dofs(0)[0]
		d.sys.Fix(g, 0)
		d.pinnedM[i] = g
	}
	if allVelocityEssential {
		g := d.lay.Offset(blockP) + d.P.Dofs(0)[0]
		d.sys.Fix(g, 0)
		d.pinnedP = g
	}
	return nil
}

// couple declares the non-zero blocks on every triangle.
func (d *DiffusiveFlux) couple() {
	off := d.lay.Offset
	r := d.r
	for t := 0; t < d.m.NumTriangles(); t++ {
		vd, pd, fd, ud := d.V.Dofs(t), d.P.Dofs(t), d.F.Dofs(t), d.U.Dofs(t)
		coupleStokes(d.sys, off, vd, pd)
		for c := 0; c < 2; c++ {
			for i := 0; i < r; i++ {
				d.sys.Couple(off(dfBlockJ0+r+i), ud, off(blockVX+c), vd)
			}
		}
		for i := 0; i < r; i++ {
			for j := 0; j < r; j++ {
				d.sys.Couple(off(dfBlockJ0+i), fd, off(dfBlockJ0+j), fd)
			}
			d.sys.Couple(off(dfBlockJ0+r+i), ud, off(dfBlockJ0+i), fd)
			d.sys.Couple(off(dfBlockJ0+i), fd, off(dfBlockJ0+r+i), ud)
		}
	}
	// The wall constraints of Stefan walls with composition data tie the
	// normal velocity to the diffusive fluxes; the velocity rows receive
	// their pattern through the links (wallRows).
	for _, sw := range d.stefan {
		if len(sw.wall) == 0 {
			continue
		}
		lam := d.wallLambda[sw.tag]
		for _, e := range d.m.BoundaryEdges(sw.tag) {
			t := d.m.EdgeTriangles[e][0]
			vd, fd := d.V.Dofs(t), d.F.Dofs(t)
			// The constraint rows (wallRows) see the normal velocity.
			blk := sw.wall[0]
			if blk == r {
				blk = 0
			}
			d.sys.Couple(off(dfBlockJ0+blk), fd, off(blockVX+sw.comp), vd)
			if lam == nil {
				continue
			}
			var ld []int
			for _, g := range fd {
				if l, ok := lam[g]; ok {
					ld = append(ld, l)
				}
			}
			d.sys.Couple(0, ld, off(blockVX+sw.comp), vd)
			for i := 0; i < r; i++ {
				d.sys.Couple(0, ld, off(dfBlockJ0+i), fd)
				d.sys.Couple(off(dfBlockJ0+i), fd, 0, ld)
			}
		}
	}
}

// diffusiveField supplies the frozen concentrations of one step.
type diffusiveField interface {
	// atQuad writes c and grad c at quadrature point q (physical point x)
	// of triangle t; the discretisation's triangle tables are set for t.
	atQuad(t, q int, x [2]float64, c []float64, gc [][2]float64) error
	// at writes c and grad c at the physical point x of triangle t (it may
	// allocate).
	at(t int, x [2]float64, c []float64, gc [][2]float64) error
}

// positionField freezes concentrations given as a function of position.
type positionField func(x [2]float64, c []float64, gradc [][2]float64)

func (f positionField) atQuad(t, q int, x [2]float64, c []float64, gc [][2]float64) error {
	f(x, c, gc)
	return nil
}

func (f positionField) at(t int, x [2]float64, c []float64, gc [][2]float64) error {
	f(x, c, gc)
	return nil
}

// DiffusiveFluxSolution is the result of one frozen diffusive-flux step.
type DiffusiveFluxSolution struct {
	d *DiffusiveFlux
	// X is the coefficient vector (blocks vx, vy, p, j_1..j_{n-1},
	// m_1..m_{n-1}).
	X []float64
	// LinearResidual is the relative residual of the linear solve.
	LinearResidual float64
	field          diffusiveField
}

// Velocity returns the coefficients of velocity component c in d.V.
func (s *DiffusiveFluxSolution) Velocity(c int) []float64 { return s.d.lay.Block(s.X, blockVX+c) }

// Pressure returns the pressure coefficients in d.P.
func (s *DiffusiveFluxSolution) Pressure() []float64 { return s.d.lay.Block(s.X, blockP) }

// DiffusiveFlux returns the coefficients of j_i in d.F, i < n-1.
func (s *DiffusiveFluxSolution) DiffusiveFlux(i int) []float64 {
	return s.d.lay.Block(s.X, dfBlockJ0+i)
}

// RelativePotential returns the coefficients of m_i = mu_i/M_i - mu_n/M_n
// in d.U, i < n-1.
func (s *DiffusiveFluxSolution) RelativePotential(i int) []float64 {
	return s.d.lay.Block(s.X, dfBlockJ0+s.d.r+i)
}

// SolveFrozen assembles and solves one step with the concentrations (and
// their gradients) given by conc, a function of position. A second call
// refactorises the same pattern, keeping the first call's ordering.
func (d *DiffusiveFlux) SolveFrozen(conc func(x [2]float64, c []float64, gradc [][2]float64)) (*DiffusiveFluxSolution, error) {
	return d.solveField(positionField(conc))
}

// solveField assembles and solves one step with the concentrations of f.
func (d *DiffusiveFlux) solveField(f diffusiveField) (*DiffusiveFluxSolution, error) {
	if err := d.setFluxData(f); err != nil {
		return nil, err
	}
	d.pinWallLevel(f)
	A, b, err := d.assemble(f)
	if err != nil {
		return nil, err
	}
	x := make([]float64, len(b))
	kept := d.lu != nil
	res, err := d.factorAndSolve(x, A, b, kept)
	if kept && (err != nil || math.IsNaN(res) || res > 1e-6) {
		// The pivot sequence kept from an earlier matrix may not suit
		// this one (the wall rows change with the state): factorise
		// afresh.
		res, err = d.factorAndSolve(x, A, b, false)
	}
	if err != nil {
		return nil, err
	}
	if math.IsNaN(res) || res > 1e-6 {
		return nil, fmt.Errorf("physics: diffusive-flux linear solve inaccurate: relative residual %.3g", res)
	}
	s := &DiffusiveFluxSolution{d: d, X: x, LinearResidual: res, field: f}
	if d.pinnedP >= 0 {
		shiftMean(d.P, s.Pressure())
	}
	for i, g := range d.pinnedM {
		if g >= 0 && !d.wallLevel {
			shiftMean(d.U, s.RelativePotential(i))
		}
	}
	return s, nil
}

// factorAndSolve factorises A, reusing the kept ordering and pivot
// sequence when refactor is set and with a fresh analysis otherwise, and
// solves A x = b with two steps of iterative refinement. It returns the
// relative residual.
func (d *DiffusiveFlux) factorAndSolve(x []float64, A *solver.CSR, b []float64, refactor bool) (float64, error) {
	var err error
	if refactor {
		err = d.lu.Refactor(A)
	} else {
		d.lu, err = solver.FactorLU(A, nil)
	}
	if err != nil {
		d.lu = nil
		return 0, fmt.Errorf("physics: factorising the diffusive-flux system (%d unknowns, %d non-zeros): %w", len(b), A.NNZ(), err)
	}
	res, err := d.lu.SolveRefinedTo(x, A, b, 2)
	if err != nil {
		return 0, fmt.Errorf("physics: solving the diffusive-flux system: %w", err)
	}
	return res, nil
}

// LUStats returns the statistics of the last factorisation (zero before
// the first solve).
func (d *DiffusiveFlux) LUStats() solver.LUStats {
	if d.lu == nil {
		return solver.LUStats{}
	}
	return d.lu.Stats()
}

// setFluxData sets the essential normal moments j_i.n = J_i.n - rho_i v.n on
// flux boundaries with the frozen partial densities, and j_i.n = 0 on
// outflow boundaries (species leave with the composition of their element).
func (d *DiffusiveFlux) setFluxData(f diffusiveField) error {
	p, n, m := d.prob, d.n, d.m
	c := make([]float64, n)
	gc := make([][2]float64, n)
	for _, t := range d.fluxTags {
		bc := p.Boundary[t]
		edges := m.BoundaryEdges(t)
		// triangleAt returns the triangle whose boundary edge of tag t
		// holds the edge point x.
		triangleAt := func(x [2]float64) int {
			best, bestD := -1, math.Inf(1)
			for _, e := range edges {
				a, b := m.Points[m.Edges[e][0]], m.Points[m.Edges[e][1]]
				ex, ey := b[0]-a[0], b[1]-a[1]
				s := ((x[0]-a[0])*ex + (x[1]-a[1])*ey) / (ex*ex + ey*ey)
				s = math.Max(0, math.Min(1, s))
				if dd := math.Hypot(a[0]+s*ex-x[0], a[1]+s*ey-x[1]); dd < bestD {
					best, bestD = m.EdgeTriangles[e][0], dd
				}
			}
			return best
		}
		stefan := bc.Velocity.Kind == VelocityStefan
		// total returns sum_k J_k.n and the frozen density at x.
		total := func(x, nrm [2]float64) (float64, float64, error) {
			if err := f.at(triangleAt(x), x, c, gc); err != nil {
				return 0, 0, err
			}
			var T, rho float64
			for k := 0; k < n; k++ {
				if g := bc.Species[k].Flux; g != nil {
					T += g(x, nrm)
				}
				rho += p.Mixture.mass[k] * c[k]
			}
			return T, rho, nil
		}
		if stefan {
			// Normal velocity sum_k J_k.n / rho at the velocity nodes.
			sw := d.stefanOf(t)
			var bad error
			dofs, vals, err := fem.BoundaryValues(d.V, []int{t}, func(x [2]float64) float64 {
				T, rho, err := total(x, sw.normal)
				if err != nil && bad == nil {
					bad = err
				}
				return T / rho * sw.normal[sw.comp]
			})
			if err != nil {
				return err
			}
			if bad != nil {
				return bad
			}
			for a, g := range dofs {
				if sw.dofs[g] {
					d.sys.Fix(d.lay.Offset(blockVX+sw.comp)+g, vals[a])
				}
			}
		}
		for i := 0; i < d.r; i++ {
			sp := i
			g, vel := bc.Species[i].Flux, bc.Velocity.Velocity
			if bc.Species[i].Kind == SpeciesOutflow {
				g, vel = nil, nil
			}
			var value func(x, nrm [2]float64) (float64, error)
			if stefan {
				// j_i.n = J_i.n - w_i sum_k J_k.n.
				value = func(x, nrm [2]float64) (float64, error) {
					var jn float64
					if g != nil {
						jn = g(x, nrm)
					}
					T, rho, err := total(x, nrm)
					return jn - p.Mixture.mass[sp]*c[sp]/rho*T, err
				}
			} else {
				// j_i.n = J_i.n - rho_i v.n.
				value = func(x, nrm [2]float64) (float64, error) {
					var jn float64
					if g != nil {
						jn = g(x, nrm)
					}
					if vel == nil {
						return jn, nil
					}
					if err := f.at(triangleAt(x), x, c, gc); err != nil {
						return jn, err
					}
					if !(c[sp] > 0) {
						return jn, &StateError{Model: "frozen state", Species: p.Mixture.Name(sp),
							Reason: fmt.Sprintf("concentration %g at (%g, %g) on boundary %s is not positive", c[sp], x[0], x[1], tagLabel(d.m, t))}
					}
					v := vel(x)
					return jn - p.Mixture.mass[sp]*c[sp]*(v[0]*nrm[0]+v[1]*nrm[1]), nil
				}
			}
			if err := d.fixFluxMoments(i, t, value); err != nil {
				return err
			}
		}
	}
	return nil
}

// fixFluxMoments sets the essential normal moments of j_i on the boundary
// with tag t to those of value; the first error value reports wins.
func (d *DiffusiveFlux) fixFluxMoments(i, t int, value func(x, nrm [2]float64) (float64, error)) error {
	var bad error
	dofs, vals, err := fem.BoundaryNormalMoments(d.F, []int{t}, func(x, nrm [2]float64) float64 {
		if bad != nil {
			return 0
		}
		v, err := value(x, nrm)
		bad = err
		return v
	})
	if err != nil {
		return err
	}
	if bad != nil {
		return bad
	}
	for a, g := range dofs {
		d.sys.Fix(d.lay.Offset(dfBlockJ0+i)+g, vals[a])
	}
	return nil
}

// stefanOf returns the Stefan wall with tag t.
func (d *DiffusiveFlux) stefanOf(t int) *dfStefan {
	for i := range d.stefan {
		if d.stefan[i].tag == t {
			return &d.stefan[i]
		}
	}
	return nil
}

// fixComponent sets to zero, on the straight axis-parallel boundary with
// tag t, the velocity component normal to it (or tangential to it, when
// tangential is set), leaving out the unknowns in skip.
func (d *DiffusiveFlux) fixComponent(t int, tangential bool, skip map[int]bool) error {
	c, err := slipComponent(d.m, t)
	if err != nil {
		return err
	}
	if tangential {
		c = 1 - c
	}
	dofs, err := d.V.BoundaryDofs(t)
	if err != nil {
		return err
	}
	for _, g := range dofs {
		if !skip[g] {
			d.sys.Fix(d.lay.Offset(blockVX+c)+g, 0)
		}
	}
	return nil
}

// compositionWall classifies the species data of the Stefan wall with tag
// t. It returns nil when every species has flux data (an inlet of given
// mass fluxes, or a wall of given exchange), and the impermeable species
// (one or two) when the others have potential data (an evaporating or
// dissolving surface). An impermeable species needs flux data (its
// exchange, usually none) and also the potential that the wall composition
// gives it. With one, the diffusive-flux formulation imposes the relative
// potentials of all species there; with two, their split at the wall is an
// unknown (a wall multiplier), and the given potentials serve only to fix
// the sum of their mole fractions. Other mixes are errors naming the wall.
func (d *DiffusiveFlux) compositionWall(t int) ([]int, error) {
	bc, mix := d.prob.Boundary[t], d.prob.Mixture
	var flux []int
	potential := 0
	for i, sc := range bc.Species {
		switch sc.Kind {
		case SpeciesFlux:
			flux = append(flux, i)
		case SpeciesPotential:
			potential++
		default:
			return nil, fmt.Errorf("physics: Stefan wall %s: species %q has %s data; a Stefan wall takes flux or composition data", tagLabel(d.m, t), mix.Name(i), sc.Kind)
		}
	}
	switch {
	case potential == 0:
		return nil, nil
	case len(flux) == 0:
		return nil, fmt.Errorf("physics: Stefan wall %s has composition data for every species; the diffusive-flux formulation needs an impermeable species there, whose balance sets the wall velocity", tagLabel(d.m, t))
	case len(flux) > 2:
		return nil, fmt.Errorf("physics: Stefan wall %s has %d species with flux data beside composition data; the diffusive-flux formulation builds one or two impermeable species there", tagLabel(d.m, t), len(flux))
	}
	for _, l := range flux {
		if bc.Species[l].Potential == nil {
			return nil, fmt.Errorf("physics: Stefan wall %s: the impermeable species %q needs the potential that the wall composition gives it (SpeciesCondition.Potential) for the diffusive-flux formulation", tagLabel(d.m, t), mix.Name(l))
		}
	}
	return flux, nil
}

// wallLevelSpecies returns, when every composition boundary is a Stefan
// wall with two impermeable species, one of those species other than the
// last (-1 otherwise). Then the frozen step has a null mode: a shift of the
// relative potential of the two impermeable species, with the multiplier
// and the others' potentials following, which the species balance fixes
// only through the frozen state. The relative potential of the species
// returned is pinned in one element, and the nonlinear iteration sets its
// constant by that species' balance (levelByBalance), as it sets all
// constants when no boundary gives a composition. (Pinning a multiplier
// instead was tried on a mixing channel with such a patch: it converged,
// but the dropped equation let the second impermeable species through the
// wall, 1.4 to 2.7 % of the released flux.)
func (d *DiffusiveFlux) wallLevelSpecies() int {
	p := -1
	for _, t := range d.potentialTags {
		if d.wallLambda[t] == nil {
			return -1
		}
		if p < 0 {
			for _, sw := range d.stefan {
				if sw.tag == t {
					p = sw.wall[0]
					if p == d.r {
						p = sw.wall[1]
					}
				}
			}
		}
	}
	return p
}

// pinWallLevel sets, in the case of wallLevelSpecies, the pinned
// coefficient (the constant mode of element 0) of the pinned species'
// relative potential to that of the frozen state, so that a step keeps the
// state's level along its null mode and the species balance alone moves it
// (levelByBalance). Unlike a shift of the step's solution, which would move
// only one part of the null mode (the multiplier and the other potentials
// follow it), the pin selects a solution of the step. A frozen field
// without a state keeps 0.
func (d *DiffusiveFlux) pinWallLevel(f diffusiveField) {
	st, ok := f.(*diffusiveState)
	if !d.wallLevel || !ok {
		return
	}
	p := d.levelSpecies[0]
	nV := d.V.Len()
	m := st.x[p*nV : (p+1)*nV]
	af := fem.ElementMap(d.m, 0)
	d.vq.Reinit(&af)
	vd := d.V.Dofs(0)
	var integral, area float64
	for q := 0; q < d.vq.NQ; q++ {
		v, _ := d.vq.FieldAt(q, m, vd)
		integral += d.vq.W[q] * v
		area += d.vq.W[q]
	}
	psi := make([]float64, d.U.LocalLen())
	d.potEl.ValuesTo(psi, [2]float64{1.0 / 3, 1.0 / 3})
	d.sys.Fix(d.pinnedM[p], integral/area/psi[0])
}

// numberWallMultipliers numbers, after the layout's unknowns, one wall
// multiplier per flux unknown on the edges of every Stefan wall with two
// impermeable species: its basis functions are the normal traces of those
// flux basis functions, so that it spans the normal traces of the flux
// space on the wall.
func (d *DiffusiveFlux) numberWallMultipliers() error {
	for _, t := range d.m.Tags() {
		if d.prob.Boundary[t].Velocity.Kind != VelocityStefan {
			continue
		}
		wall, err := d.compositionWall(t)
		if err != nil {
			return err
		}
		if len(wall) != 2 {
			continue
		}
		dofs, _, err := fem.BoundaryNormalMoments(d.F, []int{t}, func(x, nrm [2]float64) float64 { return 0 })
		if err != nil {
			return err
		}
		if d.wallLambda == nil {
			d.wallLambda = map[int]map[int]int{}
		}
		lam := map[int]int{}
		for _, g := range dofs {
			lam[g] = d.lay.Len() + d.nWall
			d.nWall++
		}
		d.wallLambda[t] = lam
	}
	return nil
}

// assemble builds the frozen diffusive-flux system.
func (d *DiffusiveFlux) assemble(f diffusiveField) (*solver.CSR, []float64, error) {
	p, n, r, m := d.prob, d.n, d.r, d.m
	mix := p.Mixture
	off := d.lay.Offset
	nv, np, nf, nm := d.V.LocalLen(), d.P.LocalLen(), d.F.LocalLen(), d.U.LocalLen()
	// Element buffers, allocated once per assembly.
	var vv [2][2][]float64
	var vp, pv, fv [2][]float64
	uv := make([][2][]float64, r)
	for c := 0; c < 2; c++ {
		for e := 0; e < 2; e++ {
			vv[c][e] = make([]float64, nv*nv)
		}
		vp[c] = make([]float64, nv*np)
		pv[c] = make([]float64, np*nv)
		fv[c] = make([]float64, nv)
		for i := 0; i < r; i++ {
			uv[i][c] = make([]float64, nm*nv)
		}
	}
	fp := make([]float64, np)
	jj := make([][]float64, r*r)
	for i := range jj {
		jj[i] = make([]float64, nf*nf)
	}
	uj := make([]float64, nm*nf)
	ju := make([]float64, nf*nm)
	fj := make([][]float64, r)
	fu := make([][]float64, r)
	for i := 0; i < r; i++ {
		fj[i] = make([]float64, nf)
		fu[i] = make([]float64, nm)
	}
	gram := make([]float64, nf*nf)
	cq := make([]float64, n)
	gq := make([][2]float64, n)
	x := make([]float64, n)
	mm := make([]float64, n*n)
	bb := make([]float64, n*n)
	rr := make([]float64, n)
	gg := make([][2]float64, n)
	rhoi := make([]float64, n)
	d.sys.Reset()
	if err := d.setWallLinks(f); err != nil {
		return nil, nil, err
	}
	for t := 0; t < m.NumTriangles(); t++ {
		af := fem.ElementMap(m, t)
		d.vq.Reinit(&af)
		d.pq.Reinit(&af)
		d.uq.Reinit(&af)
		d.fq.Reinit(&af)
		for c := 0; c < 2; c++ {
			for e := 0; e < 2; e++ {
				clear(vv[c][e])
			}
			clear(vp[c])
			clear(pv[c])
			clear(fv[c])
			for i := 0; i < r; i++ {
				clear(uv[i][c])
			}
		}
		clear(fp)
		for i := range jj {
			clear(jj[i])
		}
		clear(uj)
		for i := 0; i < r; i++ {
			clear(fj[i])
			clear(fu[i])
		}
		for q := 0; q < d.vq.NQ; q++ {
			W := d.vq.W[q]
			xq := d.vq.X[q]
			if err := f.atQuad(t, q, xq, cq, gq); err != nil {
				return nil, nil, fmt.Errorf("physics: triangle %d: %w", t, err)
			}
			var rho, cT float64
			var grho [2]float64
			for i, ci := range cq {
				if !(ci > 0) {
					return nil, nil, &StateError{Model: "frozen state", Species: mix.Name(i),
						Reason: fmt.Sprintf("concentration %g at (%g, %g) in triangle %d is not positive", ci, xq[0], xq[1], t)}
				}
				Mi := mix.mass[i]
				rhoi[i] = Mi * ci
				rho += rhoi[i]
				grho[0] += Mi * gq[i][0]
				grho[1] += Mi * gq[i][1]
				cT += ci
			}
			for i := range cq {
				x[i] = cq[i] / cT
			}
			eta := p.Viscosity.Viscosity(x)
			lam := p.BulkViscosity - 2*eta/3
			mix.TransportMatrixTo(mm, cq, 1)
			for i := 0; i < n; i++ {
				for j := 0; j < n; j++ {
					bb[i*n+j] = mm[i*n+j] / (rhoi[i] * rhoi[j])
				}
			}
			var force [2]float64
			clear(rr)
			clear(gg)
			if p.Source != nil {
				if p.Source.Force != nil {
					force = p.Source.Force(xq)
				}
				if p.Source.Production != nil {
					p.Source.Production(rr, xq)
				}
				if p.Source.Residual != nil {
					p.Source.Residual(gg, xq)
				}
			}
			force[0] += rho * p.Gravity[0]
			force[1] += rho * p.Gravity[1]
			var massProd float64
			for i := 0; i < n; i++ {
				massProd += mix.mass[i] * rr[i]
			}
			phi := d.vq.Val[q*nv : (q+1)*nv]
			gphi := d.vq.Grad[q*nv : (q+1)*nv]
			psi := d.pq.Val[q*np : (q+1)*np]
			chi := d.uq.Val[q*nm : (q+1)*nm]
			fvq := d.fq.Val[q*nf : (q+1)*nf]
			fdiv := d.fq.Div[q*nf : (q+1)*nf]
			addViscous(&vv, W, eta, lam, 0, phi, gphi)
			for a := 0; a < nv; a++ {
				ga := gphi[a]
				fv[0][a] += W * force[0] * phi[a]
				fv[1][a] += W * force[1] * phi[a]
				// Momentum: -p div u; total mass: -q div(rho v).
				for s := 0; s < np; s++ {
					vp[0][a*np+s] -= W * psi[s] * ga[0]
					vp[1][a*np+s] -= W * psi[s] * ga[1]
					pv[0][s*nv+a] -= W * psi[s] * (rho*ga[0] + phi[a]*grho[0])
					pv[1][s*nv+a] -= W * psi[s] * (rho*ga[1] + phi[a]*grho[1])
				}
				// Convection in the continuity rows: -nu div(rho_i v).
				for i := 0; i < r; i++ {
					Mi := mix.mass[i]
					gri := [2]float64{Mi * gq[i][0], Mi * gq[i][1]}
					for s := 0; s < nm; s++ {
						uv[i][0][s*nv+a] -= W * chi[s] * (rhoi[i]*ga[0] + gri[0]*phi[a])
						uv[i][1][s*nv+a] -= W * chi[s] * (rhoi[i]*ga[1] + gri[1]*phi[a])
					}
				}
			}
			for s := 0; s < np; s++ {
				fp[s] -= W * psi[s] * massProd
			}
			for a := 0; a < nf; a++ {
				for b := a; b < nf; b++ {
					v := W * (fvq[a][0]*fvq[b][0] + fvq[a][1]*fvq[b][1])
					gram[a*nf+b] = v
					gram[b*nf+a] = v
				}
			}
			last := n - 1
			for i := 0; i < r; i++ {
				for j := 0; j < r; j++ {
					coef := bb[i*n+j] - bb[i*n+last] - bb[last*n+j] + bb[last*n+last]
					blk := jj[i*r+j]
					for ab, gv := range gram {
						blk[ab] += coef * gv
					}
				}
				h := [2]float64{gg[i][0]/rhoi[i] - gg[last][0]/rhoi[last], gg[i][1]/rhoi[i] - gg[last][1]/rhoi[last]}
				if h != [2]float64{} {
					for a := 0; a < nf; a++ {
						fj[i][a] += W * (h[0]*fvq[a][0] + h[1]*fvq[a][1])
					}
				}
				if rr[i] != 0 {
					for s := 0; s < nm; s++ {
						fu[i][s] -= W * chi[s] * mix.mass[i] * rr[i]
					}
				}
			}
			for s := 0; s < nm; s++ {
				f := -W * chi[s]
				for b := 0; b < nf; b++ {
					uj[s*nf+b] += f * fdiv[b]
				}
			}
		}
		d.boundaryTerms(t, &af, fv, fj)
		transposeTo(ju, uj, nm, nf)
		vd, pd, fd, ud := d.V.Dofs(t), d.P.Dofs(t), d.F.Dofs(t), d.U.Dofs(t)
		fs := d.F.Signs(t)
		for c := 0; c < 2; c++ {
			for e := 0; e < 2; e++ {
				d.sys.AddMatrix(off(blockVX+c), vd, nil, off(blockVX+e), vd, nil, vv[c][e])
			}
			d.sys.AddMatrix(off(blockVX+c), vd, nil, off(blockP), pd, nil, vp[c])
			d.sys.AddMatrix(off(blockP), pd, nil, off(blockVX+c), vd, nil, pv[c])
			d.sys.AddVector(off(blockVX+c), vd, nil, fv[c])
			for i := 0; i < r; i++ {
				d.sys.AddMatrix(off(dfBlockJ0+r+i), ud, nil, off(blockVX+c), vd, nil, uv[i][c])
			}
		}
		d.sys.AddVector(off(blockP), pd, nil, fp)
		for i := 0; i < r; i++ {
			for j := 0; j < r; j++ {
				d.sys.AddMatrix(off(dfBlockJ0+i), fd, fs, off(dfBlockJ0+j), fd, fs, jj[i*r+j])
			}
			d.sys.AddMatrix(off(dfBlockJ0+r+i), ud, nil, off(dfBlockJ0+i), fd, fs, uj)
			d.sys.AddMatrix(off(dfBlockJ0+i), fd, fs, off(dfBlockJ0+r+i), ud, nil, ju)
			d.sys.AddVector(off(dfBlockJ0+i), fd, fs, fj[i])
			d.sys.AddVector(off(dfBlockJ0+r+i), ud, nil, fu[i])
		}
	}
	if err := d.addWallConstraints(f); err != nil {
		return nil, nil, err
	}
	A, b := d.sys.Matrix()
	return A, b, nil
}

// setWallLinks sets, before an assembly, the multiples of the links of
// every Stefan wall with composition data (wallRows): on each wall edge,
// c_a = G^{-1} h_a with G_bb' = int psi_b psi_b' and h_ab = int psi_b
// rho_l phi_a, psi_b the normal traces of the edge's flux basis functions,
// rho_l the frozen partial density of the (first) impermeable species.
func (d *DiffusiveFlux) setWallLinks(f diffusiveField) error {
	m, mix := d.m, d.prob.Mixture
	nv, nf := d.ve.N, d.fe.N
	c := make([]float64, d.n)
	gc := make([][2]float64, d.n)
	for _, sw := range d.stefan {
		l := -1
		if len(sw.wall) > 0 {
			l = sw.wall[0]
		}
		for _, we := range sw.edges {
			ne := len(we.eb)
			_, length := fem.OutwardNormal(m, we.e)
			af := fem.ElementMap(m, we.t)
			sgn := 1.0
			if af.Det < 0 {
				sgn = -1
			}
			fs := d.F.Signs(we.t)
			G := mat.NewDense(ne, ne, nil)
			H := mat.NewDense(ne, max(len(we.va), 1), nil)
			for q := 0; q < d.ve.NQ; q++ {
				xq := af.Point(d.ve.Ref[we.le][q])
				if err := f.at(we.t, xq, c, gc); err != nil {
					return fmt.Errorf("physics: Stefan wall %s: %w", tagLabel(m, sw.tag), err)
				}
				if !(c[l] > 0) {
					return &StateError{Model: "frozen state", Species: mix.Name(l),
						Reason: fmt.Sprintf("concentration %g at (%g, %g) on Stefan wall %s is not positive", c[l], xq[0], xq[1], tagLabel(m, sw.tag))}
				}
				rhoL := mix.mass[l] * c[l]
				w := d.ve.W[q]
				nt := d.fe.Normal[we.le][q*nf : (q+1)*nf]
				phi := d.ve.Value[we.le][q*nv : (q+1)*nv]
				for ib, b := range we.eb {
					pb := fs[b] * nt[b]
					for jb, b2 := range we.eb {
						G.Set(ib, jb, G.At(ib, jb)+w*pb*fs[b2]*nt[b2]/length)
					}
					for ia, a := range we.va {
						H.Set(ib, ia, H.At(ib, ia)+w*sgn*pb*rhoL*phi[a])
					}
				}
			}
			var C mat.Dense
			if err := C.Solve(G, H); err != nil {
				return fmt.Errorf("physics: Stefan wall %s: the normal traces on edge %d: %w", tagLabel(m, sw.tag), we.e, err)
			}
			for ia := range we.va {
				for ib := range we.eb {
					d.sys.SetLink(we.link[ia][ib], C.At(ib, ia))
				}
			}
		}
	}
	return nil
}

// addWallConstraints writes the constraint rows of Stefan walls with
// composition data (wallRows): with l the (first) impermeable species, c
// the normal component and n_c = +-1 its outward normal, the row of wall
// flux unknown b is
//
//	int_wall psi_b (j_l.n + rho_l n_c v_c) ds = int_wall psi_b g_l ds,
//
// the species' exchange J_l.n = g_l (usually 0) in the normal-trace space,
// with rho_l frozen; j_n = -sum_{i<n} j_i when l is the last species.
//
// With two impermeable species l1, l2, their split at the wall is unknown:
// the wall multiplier lambda = mu_l2/M_l2 - mu_l1/M_l1 (in the normal-trace
// space of the fluxes) takes its place, with J_l2.n = g_l2 tested by that
// space as its equation. The given potentials of the other species fix
// x_l1 + x_l2 = X on the ideal-gas equation of state at the reference
// pressure, and the wall potentials of l1, l2 follow from lambda,
// linearised about the split of the frozen state. The potential terms
// -int m_i,b K_i.n of such a wall are added here, not in boundaryTerms.
func (d *DiffusiveFlux) addWallConstraints(f diffusiveField) error {
	m, mix := d.m, d.prob.Mixture
	off := d.lay.Offset
	nv, nf, n, r := d.ve.N, d.fe.N, d.n, d.r
	last := n - 1
	c := make([]float64, n)
	gc := make([][2]float64, n)
	cst, coef := make([]float64, n), make([]float64, n)
	for _, sw := range d.stefan {
		if len(sw.wall) == 0 {
			continue
		}
		bc := d.prob.Boundary[sw.tag]
		l := sw.wall[0]
		blk := l
		if blk == r {
			blk = 0
		}
		g := bc.Species[l].Flux
		lam := d.wallLambda[sw.tag]
		var st *diffusiveState
		if lam != nil {
			var ok bool
			if st, ok = f.(*diffusiveState); !ok {
				return fmt.Errorf("physics: Stefan wall %s has two impermeable species; its wall potentials need the ideal gas of the nonlinear solve, not a frozen field", tagLabel(m, sw.tag))
			}
		}
		for _, we := range sw.edges {
			t, le, e := we.t, we.le, we.e
			af := fem.ElementMap(m, t)
			sgn := 1.0
			if af.Det < 0 {
				sgn = -1
			}
			nrm, length := fem.OutwardNormal(m, e)
			nc := nrm[sw.comp]
			vd, fd, fs := d.V.Dofs(t), d.F.Dofs(t), d.F.Signs(t)
			ne := len(we.eb)
			rows, rsg := make([]int, ne), make([]float64, ne)
			for k, b := range we.eb {
				rows[k], rsg[k] = fd[b], fs[b]
			}
			cv := make([]float64, ne*nv) // constraint rows, velocity columns
			cj := make([]float64, ne*nf) // constraint rows, flux columns
			cr := make([]float64, ne)    // constraint right-hand side
			// The wall multipliers of this edge: global numbers, local
			// flux basis positions, signs.
			var ld, lp []int
			var ls []float64
			for b, gf := range fd {
				if k, ok := lam[gf]; ok {
					ld, lp, ls = append(ld, k), append(lp, b), append(ls, fs[b])
				}
			}
			nl := len(ld)
			lv := make([]float64, nl*nv) // multiplier rows, velocity columns
			lj := make([]float64, nl*nf) // multiplier rows, flux columns
			jl := make([][]float64, r)   // flux rows, multiplier columns
			lr := make([]float64, nl)    // multiplier right-hand side
			fr := make([][]float64, r)   // flux right-hand sides
			for i := 0; i < r; i++ {
				jl[i] = make([]float64, nf*nl)
				fr[i] = make([]float64, nf)
			}
			for q := 0; q < d.ve.NQ; q++ {
				xq := af.Point(d.ve.Ref[le][q])
				if err := f.at(t, xq, c, gc); err != nil {
					return fmt.Errorf("physics: Stefan wall %s: %w", tagLabel(m, sw.tag), err)
				}
				for _, k := range sw.wall {
					if !(c[k] > 0) {
						return &StateError{Model: "frozen state", Species: mix.Name(k),
							Reason: fmt.Sprintf("concentration %g at (%g, %g) on Stefan wall %s is not positive", c[k], xq[0], xq[1], tagLabel(m, sw.tag))}
					}
				}
				rhoL := mix.mass[l] * c[l]
				var gl float64
				if g != nil {
					gl = g(xq, nrm)
				}
				w := d.ve.W[q]
				phi := d.ve.Value[le][q*nv : (q+1)*nv]
				nt := d.fe.Normal[le][q*nf : (q+1)*nf]
				for k, b := range we.eb {
					psi := nt[b] // times sgn / length: the trace's value
					for a := 0; a < nv; a++ {
						cv[k*nv+a] += w * sgn * psi * rhoL * nc * phi[a]
					}
					for a := 0; a < nf; a++ {
						cj[k*nf+a] += w * psi * nt[a] / length
					}
					cr[k] += w * sgn * psi * gl
				}
				if lam == nil {
					continue
				}
				if err := d.wallPotentials(st, bc, sw.wall, xq, c, cst, coef); err != nil {
					return fmt.Errorf("physics: Stefan wall %s: %w", tagLabel(m, sw.tag), err)
				}
				l2 := sw.wall[1]
				rho2 := mix.mass[l2] * c[l2]
				var g2 float64
				if g2f := bc.Species[l2].Flux; g2f != nil {
					g2 = g2f(xq, nrm)
				}
				for k, b := range lp {
					psi := nt[b]
					for a := 0; a < nv; a++ {
						lv[k*nv+a] += w * sgn * psi * rho2 * nc * phi[a]
					}
					for a := 0; a < nf; a++ {
						lj[k*nf+a] += w * psi * nt[a] / length
					}
					lr[k] += w * sgn * psi * g2
					for i := 0; i < r; i++ {
						cf := coef[i] - coef[last]
						for a := 0; a < nf; a++ {
							jl[i][a*nl+k] += w * cf * nt[a] * psi / length
						}
					}
				}
				for i := 0; i < r; i++ {
					mb := cst[i] - cst[last]
					for a := 0; a < nf; a++ {
						fr[i][a] -= sgn * w * mb * nt[a]
					}
				}
			}
			boff := off(dfBlockJ0 + blk)
			d.sys.AddReplacement(boff, rows, rsg, off(blockVX+sw.comp), vd, nil, cv)
			if l < r {
				d.sys.AddReplacement(boff, rows, rsg, off(dfBlockJ0+l), fd, fs, cj)
			} else {
				for k := range cj {
					cj[k] = -cj[k]
				}
				for i := 0; i < r; i++ {
					d.sys.AddReplacement(boff, rows, rsg, off(dfBlockJ0+i), fd, fs, cj)
				}
			}
			for k, row := range rows {
				d.sys.AddReplacementRHS(boff+row, rsg[k]*cr[k])
			}
			if lam == nil {
				continue
			}
			l2 := sw.wall[1]
			d.sys.AddMatrix(0, ld, ls, off(blockVX+sw.comp), vd, nil, lv)
			if l2 < r {
				d.sys.AddMatrix(0, ld, ls, off(dfBlockJ0+l2), fd, fs, lj)
			} else {
				for k := range lj {
					lj[k] = -lj[k]
				}
				for i := 0; i < r; i++ {
					d.sys.AddMatrix(0, ld, ls, off(dfBlockJ0+i), fd, fs, lj)
				}
			}
			d.sys.AddVector(0, ld, ls, lr)
			for i := 0; i < r; i++ {
				d.sys.AddMatrix(off(dfBlockJ0+i), fd, fs, 0, ld, ls, jl[i])
				d.sys.AddVector(off(dfBlockJ0+i), fd, fs, fr[i])
			}
		}
	}
	return nil
}

// wallPotentials writes, at the point x of a Stefan wall with two
// impermeable species l1, l2 (wall), the wall potentials mu_i/M_i =
// cst[i] + coef[i] lambda of every species as functions of the wall
// multiplier lambda = mu_l2/M_l2 - mu_l1/M_l1, linearised about the split
// of the frozen concentrations c. On the ideal-gas equation of state at the
// reference pressure P0, mu_i = RT ln(x_i P0/P_ref): the other species'
// given potentials fix their mole fractions and X = x_l1 + x_l2; lambda
// fixes the split, and d x_l1/d lambda follows from differentiating lambda.
func (d *DiffusiveFlux) wallPotentials(st *diffusiveState, bc BoundaryCondition, wall []int, x [2]float64, c, cst, coef []float64) error {
	mass := d.prob.Mixture.mass
	rt, pr, p0 := st.gas.rt, st.gas.pRef, st.p0
	X := 1.0
	for i, sc := range bc.Species {
		if slices.Contains(wall, i) {
			continue
		}
		mu := sc.Potential(x)
		cst[i], coef[i] = mu/mass[i], 0
		X -= pr / p0 * math.Exp(mu/rt)
	}
	if !(X > 0) {
		return fmt.Errorf("the given mole fractions at (%g, %g) sum to %g, leaving nothing for the impermeable species", x[0], x[1], 1-X)
	}
	l1, l2 := wall[0], wall[1]
	x1 := X * c[l1] / (c[l1] + c[l2])
	x2 := X - x1
	phi1 := rt * math.Log(x1*p0/pr) / mass[l1]
	phi2 := rt * math.Log(x2*p0/pr) / mass[l2]
	lambda := phi2 - phi1
	dx1 := -1 / (rt * (1/(mass[l2]*x2) + 1/(mass[l1]*x1))) // d x1 / d lambda
	a1 := rt / (mass[l1] * x1) * dx1
	a2 := -rt / (mass[l2] * x2) * dx1
	cst[l1], coef[l1] = phi1-a1*lambda, a1
	cst[l2], coef[l2] = phi2-a2*lambda, a2
	return nil
}

// boundaryTerms adds the traction on open boundaries and the relative
// potential term -m_i,b K_i.n, m_i,b = mu_i,b/M_i - mu_n,b/M_n, on potential
// boundaries of triangle t.
func (d *DiffusiveFlux) boundaryTerms(t int, af *fem.Affine, fv [2][]float64, fj [][]float64) {
	m, p := d.m, d.prob
	nf := d.F.LocalLen()
	last := d.n - 1
	for le, e := range m.TriangleEdges[t] {
		if !m.IsBoundary(e) {
			continue
		}
		bc := p.Boundary[m.EdgeTags[e]]
		d.addTraction(&fv, m, bc, e, le, af)
		if !slices.Contains(d.potentialTags, m.EdgeTags[e]) || d.wallLambda[m.EdgeTags[e]] != nil {
			continue
		}
		sgn := 1.0
		if af.Det < 0 {
			sgn = -1
		}
		nt := d.fe.Normal[le]
		for q := 0; q < d.fe.NQ; q++ {
			xq := af.Point(d.fe.Ref[le][q])
			mun := bc.Species[last].Potential(xq) / p.Mixture.mass[last]
			for i := 0; i < d.r; i++ {
				mb := bc.Species[i].Potential(xq)/p.Mixture.mass[i] - mun
				v := -sgn * d.fe.W[q] * mb
				for a := 0; a < nf; a++ {
					fj[i][a] += v * nt[q*nf+a]
				}
			}
		}
	}
}

// DiffusiveFluxErrors holds the errors of a frozen diffusive-flux solution
// against exact fields, in the L2 norm unless named otherwise.
type DiffusiveFluxErrors struct {
	VelocityL2, VelocityH1, Pressure float64
	// Flux and FluxDiv are, per species (all n), the errors of the total
	// mass flux J_i,h = j_i,h + rho_i v_h and of its divergence.
	Flux, FluxDiv []float64
	// Potential is, per independent species i < n-1, the error of the
	// relative potential m_i.
	Potential []float64
}

// DiffusiveFluxExact gives the exact fields at a point: velocity and its
// gradient (grad[a][b] = d v_a / d x_b), pressure, mass fluxes J_i and
// their divergences, and potentials mu_i.
type DiffusiveFluxExact func(x [2]float64) (v [2]float64, grad [2][2]float64, p float64, J [][2]float64, divJ []float64, mu []float64)

// Errors measures s against the exact fields with a triangle rule exact to
// quadDegree. It returns nil when the frozen state cannot be evaluated.
func (s *DiffusiveFluxSolution) Errors(exact DiffusiveFluxExact, quadDegree int) *DiffusiveFluxErrors {
	d := s.d
	n, r := d.n, d.r
	mix := d.prob.Mixture
	vq := fem.NewScalarQuad(d.velEl, quadDegree)
	pq := fem.NewScalarQuad(d.presEl, quadDegree)
	uq := fem.NewScalarQuad(d.potEl, quadDegree)
	fq := fem.NewDivQuad(d.fluxEl, quadDegree)
	nv, np, nf, nm := vq.N, pq.N, fq.N, uq.N
	out := &DiffusiveFluxErrors{
		Flux: make([]float64, n), FluxDiv: make([]float64, n),
		Potential: make([]float64, r),
	}
	c := make([]float64, n)
	gc := make([][2]float64, n)
	jh := make([][2]float64, n)
	djh := make([]float64, n)
	vx, vy, pr := s.Velocity(0), s.Velocity(1), s.Pressure()
	for t := 0; t < d.m.NumTriangles(); t++ {
		af := fem.ElementMap(d.m, t)
		vq.Reinit(&af)
		pq.Reinit(&af)
		uq.Reinit(&af)
		fq.Reinit(&af)
		vd, pd, fd, ud := d.V.Dofs(t), d.P.Dofs(t), d.F.Dofs(t), d.U.Dofs(t)
		fs := d.F.Signs(t)
		for q := 0; q < vq.NQ; q++ {
			W, xq := vq.W[q], vq.X[q]
			var v [2]float64
			var gv [2][2]float64
			for a := 0; a < nv; a++ {
				cx, cy := vx[vd[a]], vy[vd[a]]
				v[0] += cx * vq.Val[q*nv+a]
				v[1] += cy * vq.Val[q*nv+a]
				for b := 0; b < 2; b++ {
					gv[0][b] += cx * vq.Grad[q*nv+a][b]
					gv[1][b] += cy * vq.Grad[q*nv+a][b]
				}
			}
			var ph float64
			for a := 0; a < np; a++ {
				ph += pr[pd[a]] * pq.Val[q*np+a]
			}
			ve, gve, pe, Je, divJe, mue := exact(xq)
			dv := [2]float64{v[0] - ve[0], v[1] - ve[1]}
			out.VelocityL2 += W * (dv[0]*dv[0] + dv[1]*dv[1])
			for a := 0; a < 2; a++ {
				for b := 0; b < 2; b++ {
					e := gv[a][b] - gve[a][b]
					out.VelocityH1 += W * e * e
				}
			}
			out.Pressure += W * (ph - pe) * (ph - pe)
			// Diffusive fluxes of the independent species, then j_n.
			jh[r], djh[r] = [2]float64{}, 0
			for i := 0; i < r; i++ {
				coef := s.DiffusiveFlux(i)
				var jv [2]float64
				var dj float64
				for a := 0; a < nf; a++ {
					ci := coef[fd[a]] * fs[a]
					jv[0] += ci * fq.Val[q*nf+a][0]
					jv[1] += ci * fq.Val[q*nf+a][1]
					dj += ci * fq.Div[q*nf+a]
				}
				jh[i], djh[i] = jv, dj
				jh[r][0] -= jv[0]
				jh[r][1] -= jv[1]
				djh[r] -= dj
				mu := s.RelativePotential(i)
				var mh float64
				for a := 0; a < nm; a++ {
					mh += mu[ud[a]] * uq.Val[q*nm+a]
				}
				e := mh - (mue[i]/mix.mass[i] - mue[r]/mix.mass[r])
				out.Potential[i] += W * e * e
			}
			if err := s.field.at(t, xq, c, gc); err != nil {
				return nil
			}
			divv := gv[0][0] + gv[1][1]
			for i := 0; i < n; i++ {
				Mi := mix.mass[i]
				ri := Mi * c[i]
				J := [2]float64{jh[i][0] + ri*v[0], jh[i][1] + ri*v[1]}
				divJ := djh[i] + ri*divv + Mi*(gc[i][0]*v[0]+gc[i][1]*v[1])
				ex, ey := J[0]-Je[i][0], J[1]-Je[i][1]
				out.Flux[i] += W * (ex*ex + ey*ey)
				out.FluxDiv[i] += W * (divJ - divJe[i]) * (divJ - divJe[i])
			}
		}
	}
	out.VelocityL2 = math.Sqrt(out.VelocityL2)
	out.VelocityH1 = math.Sqrt(out.VelocityH1)
	out.Pressure = math.Sqrt(out.Pressure)
	for i := 0; i < n; i++ {
		out.Flux[i] = math.Sqrt(out.Flux[i])
		out.FluxDiv[i] = math.Sqrt(out.FluxDiv[i])
	}
	for i := range out.Potential {
		out.Potential[i] = math.Sqrt(out.Potential[i])
	}
	return out
}

// Conservation returns, per species, the largest element balance defect
// |int_T (div J_i,h - M_i r_i)| of the total flux J_i,h = j_i,h + rho_i v_h,
// relative to the largest flux through an element, (int_T |J_i,h|)
// |dT|/|T| (the measure of Diagnose). The
// integrals use the assembly's triangle rule, so the defect is that of the
// discrete equations: rounding for the first n-1 species; for the last one,
// exact only when the pressure space holds the element indicators. It
// returns nil when the frozen state cannot be evaluated.
func (s *DiffusiveFluxSolution) Conservation() []float64 {
	d := s.d
	n, r := d.n, d.r
	mix := d.prob.Mixture
	nv, nf := d.V.LocalLen(), d.F.LocalLen()
	c := make([]float64, n)
	gc := make([][2]float64, n)
	prod := make([]float64, n)
	djh := make([]float64, n)
	jh := make([][2]float64, n)
	size := make([]float64, n)
	defect := make([]float64, n)
	scale := make([]float64, n)
	worst := make([]float64, n)
	vx, vy := s.Velocity(0), s.Velocity(1)
	for t := 0; t < d.m.NumTriangles(); t++ {
		af := fem.ElementMap(d.m, t)
		d.vq.Reinit(&af)
		d.pq.Reinit(&af)
		d.fq.Reinit(&af)
		vd, fd, fs := d.V.Dofs(t), d.F.Dofs(t), d.F.Signs(t)
		clear(defect)
		clear(size)
		for q := 0; q < d.vq.NQ; q++ {
			W, xq := d.vq.W[q], d.vq.X[q]
			var v [2]float64
			var divv float64
			for a := 0; a < nv; a++ {
				cx, cy := vx[vd[a]], vy[vd[a]]
				v[0] += cx * d.vq.Val[q*nv+a]
				v[1] += cy * d.vq.Val[q*nv+a]
				divv += cx*d.vq.Grad[q*nv+a][0] + cy*d.vq.Grad[q*nv+a][1]
			}
			djh[r], jh[r] = 0, [2]float64{}
			for i := 0; i < r; i++ {
				coef := s.DiffusiveFlux(i)
				var dj float64
				var jv [2]float64
				for a := 0; a < nf; a++ {
					co := coef[fd[a]] * fs[a]
					dj += co * d.fq.Div[q*nf+a]
					jv[0] += co * d.fq.Val[q*nf+a][0]
					jv[1] += co * d.fq.Val[q*nf+a][1]
				}
				djh[i], jh[i] = dj, jv
				djh[r] -= dj
				jh[r][0] -= jv[0]
				jh[r][1] -= jv[1]
			}
			if err := s.field.atQuad(t, q, xq, c, gc); err != nil {
				return nil
			}
			clear(prod)
			if src := d.prob.Source; src != nil && src.Production != nil {
				src.Production(prod, xq)
			}
			for i := 0; i < n; i++ {
				Mi := mix.mass[i]
				divJ := djh[i] + Mi*c[i]*divv + Mi*(gc[i][0]*v[0]+gc[i][1]*v[1])
				defect[i] += W * (divJ - Mi*prod[i])
				size[i] += W * math.Hypot(jh[i][0]+Mi*c[i]*v[0], jh[i][1]+Mi*c[i]*v[1])
			}
		}
		perArea := trianglePerimeter(d.m, t) / (0.5 * af.AbsDet())
		for i := 0; i < n; i++ {
			worst[i] = math.Max(worst[i], math.Abs(defect[i]))
			scale[i] = math.Max(scale[i], size[i]*perArea)
		}
	}
	for i := 0; i < n; i++ {
		if scale[i] > 0 {
			worst[i] /= scale[i]
		}
	}
	return worst
}

// BoundaryMassFlow returns, per species, the outward mass flow through the
// boundary with tag t, int (j_i,h + rho_i v_h).n, with the frozen density
// of the step (j_n = -sum of the others). It returns an error when the
// frozen state cannot be evaluated.
func (s *DiffusiveFluxSolution) BoundaryMassFlow(t int) ([]float64, error) {
	d, m := s.d, s.d.m
	n, r := d.n, d.r
	rule, w := fem.GaussLegendre(d.k + 4)
	c := make([]float64, n)
	gc := make([][2]float64, n)
	flow := make([]float64, n)
	for _, e := range m.BoundaryEdges(t) {
		tri := m.EdgeTriangles[e][0]
		af := fem.ElementMap(m, tri)
		nrm, length := fem.OutwardNormal(m, e)
		a, b := m.Points[m.Edges[e][0]], m.Points[m.Edges[e][1]]
		for q, sq := range rule {
			xq := [2]float64{a[0] + sq*(b[0]-a[0]), a[1] + sq*(b[1]-a[1])}
			xh := af.Reference(xq)
			ux, _ := fem.ScalarAt(d.V, s.Velocity(0), tri, xh)
			uy, _ := fem.ScalarAt(d.V, s.Velocity(1), tri, xh)
			if err := s.field.at(tri, xq, c, gc); err != nil {
				return nil, err
			}
			vn := ux*nrm[0] + uy*nrm[1]
			f := w[q] * length
			var jlast float64
			for i := 0; i < n; i++ {
				var jn float64
				if i < r {
					jv, _ := fem.DivAt(d.F, s.DiffusiveFlux(i), tri, xh)
					jn = jv[0]*nrm[0] + jv[1]*nrm[1]
					jlast -= jn
				} else {
					jn = jlast
				}
				flow[i] += f * (jn + d.prob.Mixture.mass[i]*c[i]*vn)
			}
		}
	}
	return flow, nil
}
