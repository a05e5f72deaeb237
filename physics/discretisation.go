package physics

import (
	"fmt"
	"math"
	"sort"
	"strings"

	"mixwell/fem"
	"mixwell/mesh"
	"mixwell/solver"
)

// Block numbers of the unknown vector in a Discretisation's layout:
// velocity components, pressure, then the n species fluxes J_i, then the n
// potentials mu_i.
const (
	blockVX = 0
	blockVY = 1
	blockP  = 2
	blockJ0 = 3
)

// Discretisation is the mixed finite element discretisation of a Problem
// (formulation note, sections 3 and 8): continuous P_{k+1} velocity,
// continuous (Taylor–Hood) or discontinuous (Scott–Vogelius) P_k pressure,
// BDM_{k+1} or RT_k species mass fluxes and discontinuous P_k potentials.
// It owns the sparsity pattern, the essential data and the element tables,
// all built once, and re-assembles the augmented system for every set of
// frozen concentrations. Not safe for concurrent use.
type Discretisation struct {
	prob *Problem
	n, k int
	m    *mesh.Mesh

	// mixedSpaces holds the elements, the spaces V, P, F, U (velocity
	// component, pressure, flux, potential) and the quadrature tables.
	mixedSpaces
	lay *fem.Layout
	sys *fem.PatternSystem

	// pinnedP is the pressure unknown fixed to remove the constant
	// pressure mode, or -1; pinnedMu[i] likewise for mu_i.
	pinnedP  int
	pinnedMu []int
	// hasPotential[i] reports a boundary that fixes the level of mu_i: a
	// potential (composition) boundary or an outflow.
	hasPotential []bool
	// outflow lists the outflow edges; outflowOf maps a triangle to its
	// entries in outflow; out holds the outlet linearisation of the
	// current step (outflow.go).
	// pressureRule reports that the pressure is pinned although some
	// species has potential data: p_b on potential boundaries is then the
	// previous iterate's pressure trace.
	pressureRule bool
	// convection reports the linearised treatment of the species
	// velocities (Problem.Convection).
	convection bool
	outflow    []outflowEdge
	outflowOf  map[int][]int
	out        outletData
	// edgeCond lists, per triangle with boundary edges, the local edges
	// with natural data.
	bnd []boundaryEdge
	// relativeTri marks the triangles with a boundary edge whose species
	// potential data are relative to the level (SpeciesCondition.Relative).
	relativeTri map[int]bool

	// given marks velocity unknowns with given values while the essential
	// data are collected.
	given map[int]bool
	// stefan lists the velocity unknowns of Stefan walls whose normal
	// value the nonlinear iteration sets.
	stefan []stefanDof

	lu *solver.LU
	w  assemblyWork
	// convActive reports whether the last assembly had non-zero
	// linearised-convection blocks, luActive whether the factorisation's
	// ordering was computed with them: the first Picard step has none
	// (no previous flux), and an ordering chosen for those values pivots
	// badly once the blocks fill in, so it is recomputed then.
	convActive, luActive bool
}

// stefanDof is the normal velocity unknown of a Stefan-wall node: the global
// unknown, the triangle and reference point of its node, and the outward
// normal (a coordinate direction, sign included).
type stefanDof struct {
	global int
	t      int
	xh     [2]float64
	normal [2]float64
	// tag is the Stefan wall's boundary tag.
	tag int
}

// boundaryEdge is a boundary edge seen from its triangle.
type boundaryEdge struct {
	t, local, edge int
	tag            int
	normal         [2]float64
}

// NewDiscretisation builds the spaces, the essential data and the sparsity
// pattern of p. The error names the tag, species or field at fault.
func NewDiscretisation(p *Problem) (*Discretisation, error) {
	if err := p.validate(); err != nil {
		return nil, err
	}
	k, n := p.Degree, p.Mixture.Len()
	d := &Discretisation{prob: p, n: n, k: k, m: p.Mesh, pinnedP: -1}
	var err error
	if d.mixedSpaces, err = newMixedSpaces(p); err != nil {
		return nil, err
	}
	spaces := []*fem.Space{d.V, d.V, d.P}
	for i := 0; i < n; i++ {
		spaces = append(spaces, d.F)
	}
	for i := 0; i < n; i++ {
		spaces = append(spaces, d.U)
	}
	d.lay = fem.NewLayout(spaces...)
	d.convection = p.linearisedConvection()
	d.sys = fem.NewPatternSystem(d.lay.Len())
	if err := d.fixEssential(); err != nil {
		return nil, err
	}
	d.couple()
	d.sys.Build()
	d.w = newAssemblyWork(d)
	return d, nil
}

// Layout returns the layout of the unknown vector: blocks vx, vy, p, J_1..J_n,
// mu_1..mu_n.
func (d *Discretisation) Layout() *fem.Layout { return d.lay }

// Len returns the number of unknowns.
func (d *Discretisation) Len() int { return d.lay.Len() }

// Problem returns the problem being discretised.
func (d *Discretisation) Problem() *Problem { return d.prob }

// fixEssential fixes the essential unknowns: prescribed velocities, slip
// components, prescribed normal fluxes, and one unknown of each field whose
// constant is a null mode (formulation note, section 6).
func (d *Discretisation) fixEssential() error {
	p, m, n := d.prob, d.m, d.n
	tags := m.Tags()
	allVelocityEssential := true
	d.hasPotential = make([]bool, n)
	// Slip first, so that a given velocity takes precedence at corners
	// (formulation note, section 10 item 7).
	for _, t := range tags {
		bc := p.Boundary[t]
		tangential := bc.Velocity.Kind == VelocityTraction && bc.Velocity.NoTangential
		if bc.Velocity.Kind != VelocitySlip && !tangential {
			continue
		}
		c, err := slipComponent(m, t)
		if err != nil {
			return err
		}
		if tangential {
			c = 1 - c // fix the tangential component of an outlet
		}
		dofs, err := d.V.BoundaryDofs(t)
		if err != nil {
			return err
		}
		for _, g := range dofs {
			d.sys.Fix(d.lay.Offset(blockVX+c)+g, 0)
		}
	}
	// Stefan walls next: tangential component 0, normal component set by
	// the iteration; a given velocity overrides them at shared corners.
	stefanAt := map[int]stefanDof{}
	tangential := map[int]bool{}
	for _, t := range tags {
		bc := p.Boundary[t]
		if bc.Velocity.Kind != VelocityStefan {
			continue
		}
		if err := d.collectStefan(t, stefanAt, tangential); err != nil {
			return err
		}
	}
	// At a corner of a Stefan wall a node's normal component on one side
	// is tangential on the other: it stays 0 (corner precedence).
	for g := range tangential {
		delete(stefanAt, g)
	}
	for _, t := range tags {
		bc := p.Boundary[t]
		switch bc.Velocity.Kind {
		case VelocityTraction:
			allVelocityEssential = false
		case VelocityGiven:
			if d.given == nil {
				d.given = map[int]bool{}
			}
			if err := d.fixGivenVelocity(d.sys, d.lay, t, bc.Velocity.Velocity, func(g int) { d.given[g] = true }); err != nil {
				return err
			}
		}
		for i, sc := range bc.Species {
			if sc.Kind == SpeciesPotential || sc.Kind == SpeciesOutflow {
				d.hasPotential[i] = true
				continue
			}
			g := sc.Flux
			dofs, vals, err := fem.BoundaryNormalMoments(d.F, []int{t}, func(x, nrm [2]float64) float64 {
				if g == nil {
					return 0
				}
				return g(x, nrm)
			})
			if err != nil {
				return err
			}
			for a, gd := range dofs {
				d.sys.Fix(d.lay.Offset(blockJ0+i)+gd, vals[a])
			}
		}
	}
	for g, sd := range stefanAt {
		if v := d.sys.FixedValue(g); v == 0 && !d.givenAt(g) {
			d.stefan = append(d.stefan, sd)
		}
	}
	sort.Slice(d.stefan, func(a, b int) bool { return d.stefan[a].global < d.stefan[b].global })
	d.given = nil
	if err := d.checkCompatibility(); err != nil {
		return err
	}
	// Null modes. A constant potential of a species with flux data on the
	// whole boundary, and a constant pressure when moreover the velocity
	// is essential everywhere and no species has potential data, are
	// exact null modes: fix one unknown (the constant mode of the first
	// triangle for a discontinuous space) and restore the level after the
	// solve.
	anyPotential := false
	d.pinnedMu = make([]int, n)
	for i := 0; i < n; i++ {
		d.pinnedMu[i] = -1
		if d.hasPotential[i] {
			anyPotential = true
			continue
		}
		g := d.lay.Offset(blockJ0+n+i) + d.U.Dofs(0)[0]
		d.sys.Fix(g, 0)
		d.pinnedMu[i] = g
	}
	// With no traction boundary the pressure level is fixed only through
	// the O(S) terms when some species has potential data (formulation
	// note, section 10 item 5): pin it too, report it with zero mean, and
	// let the nonlinear iteration take p_b on potential boundaries from
	// the previous iterate's pressure trace (pressureRule).
	if allVelocityEssential {
		g := d.lay.Offset(blockP) + d.P.Dofs(0)[0]
		d.sys.Fix(g, 0)
		d.pinnedP = g
		d.pressureRule = anyPotential
	}
	if err := d.collectOutflow(); err != nil {
		return err
	}
	// Boundary edges with natural data.
	for _, t := range tags {
		for _, e := range m.BoundaryEdges(t) {
			tri := m.EdgeTriangles[e][0]
			le, err := fem.LocalEdge(m, tri, e)
			if err != nil {
				return err
			}
			nrm, _ := fem.OutwardNormal(m, e)
			d.bnd = append(d.bnd, boundaryEdge{t: tri, local: le, edge: e, tag: t, normal: nrm})
			for _, sc := range d.prob.Boundary[t].Species {
				if sc.Kind == SpeciesPotential && sc.Relative {
					if d.relativeTri == nil {
						d.relativeTri = map[int]bool{}
					}
					d.relativeTri[tri] = true
				}
			}
		}
	}
	return nil
}

// givenAt reports whether velocity unknown g has a given value.
func (d *Discretisation) givenAt(g int) bool { return d.given[g] }

// collectStefan fixes the velocity unknowns on the Stefan wall with tag t,
// edge by edge (each parallel to a coordinate axis): the tangential
// component to 0, recorded in tangential, and the normal one to 0 for now,
// recorded in at.
func (d *Discretisation) collectStefan(t int, at map[int]stefanDof, tangential map[int]bool) error {
	m := d.m
	ents := d.velEl.Entities()
	nodes := d.velEl.Nodes()
	for _, e := range m.BoundaryEdges(t) {
		tri := m.EdgeTriangles[e][0]
		le, err := fem.LocalEdge(m, tri, e)
		if err != nil {
			return err
		}
		nrm, _ := fem.OutwardNormal(m, e)
		c := 0
		if math.Abs(nrm[0]) < 1e-12 {
			c = 1
		}
		gd := d.V.Dofs(tri)
		for a, en := range ents {
			on := en.Kind == fem.OnEdge && en.Index == le || en.Kind == fem.AtVertex && en.Index != le
			if !on {
				continue
			}
			gt := d.lay.Offset(blockVX+1-c) + gd[a]
			d.sys.Fix(gt, 0)
			tangential[gt] = true
			g := d.lay.Offset(blockVX+c) + gd[a]
			d.sys.Fix(g, 0)
			if _, seen := at[g]; !seen {
				var n [2]float64
				n[c] = math.Copysign(1, nrm[c])
				at[g] = stefanDof{global: g, t: tri, xh: nodes[a], normal: n, tag: t}
			}
		}
	}
	return nil
}

// compatibilityTol is the relative mismatch between the net prescribed
// boundary flux of a species without potential data and its production
// above which the data are rejected (formulation note, section 6).
const compatibilityTol = 1e-8

// checkCompatibility rejects flux data that cannot hold: a species with
// flux data on the whole boundary must leave as much mass through it as its
// production makes, int_Gamma J_i.n = M_i int r_i.
func (d *Discretisation) checkCompatibility() error {
	p, m, n := d.prob, d.m, d.n
	rule, err := fem.NewEdgeRule(2*d.k + 8)
	if err != nil {
		return err
	}
	for i := 0; i < n; i++ {
		if d.hasPotential[i] {
			continue
		}
		perTag := make(map[int]float64)
		var net, scale float64
		for _, e := range m.BoundaryEdges(0) {
			tag := m.EdgeTags[e]
			g := p.Boundary[tag].Species[i].Flux
			if g == nil {
				continue
			}
			nrm, length := fem.OutwardNormal(m, e)
			a, b := m.Points[m.Edges[e][0]], m.Points[m.Edges[e][1]]
			for q, s := range rule.Points {
				x := [2]float64{a[0] + s*(b[0]-a[0]), a[1] + s*(b[1]-a[1])}
				v := rule.Weights[q] * length * g(x, nrm)
				perTag[tag] += v
				net += v
				scale += math.Abs(v)
			}
		}
		var prod float64
		if p.Source != nil && p.Source.Production != nil {
			r := make([]float64, n)
			for t := 0; t < m.NumTriangles(); t++ {
				af := fem.ElementMap(m, t)
				d.vq.Reinit(&af)
				for q := 0; q < d.vq.NQ; q++ {
					clear(r)
					p.Source.Production(r, d.vq.X[q])
					prod += d.vq.W[q] * p.Mixture.mass[i] * r[i]
				}
			}
		}
		scale = math.Max(scale, math.Abs(prod))
		if math.Abs(net-prod) > compatibilityTol*math.Max(scale, 1e-300) && math.Abs(net-prod) > 0 {
			tags := make([]int, 0, len(perTag))
			for t := range perTag {
				tags = append(tags, t)
			}
			sort.Ints(tags)
			var parts []string
			for _, t := range tags {
				parts = append(parts, fmt.Sprintf("%s: %.6g", tagLabel(m, t), perTag[t]))
			}
			return fmt.Errorf("physics: species %q has flux data on the whole boundary, but the net outward flux %.6g (%s) does not equal its production %.6g: the data are incompatible (give a composition somewhere, or fix the fluxes)",
				p.Mixture.Name(i), net, strings.Join(parts, ", "), prod)
		}
	}
	return nil
}

// couple declares the non-zero blocks of the augmented system on every
// triangle.
func (d *Discretisation) couple() {
	n := d.n
	off := d.lay.Offset
	for t := 0; t < d.m.NumTriangles(); t++ {
		vd, pd, fd, ud := d.V.Dofs(t), d.P.Dofs(t), d.F.Dofs(t), d.U.Dofs(t)
		coupleStokes(d.sys, off, vd, pd)
		for c := 0; c < 2; c++ {
			for j := 0; j < n; j++ {
				d.sys.Couple(off(blockVX+c), vd, off(blockJ0+j), fd)
				d.sys.Couple(off(blockJ0+j), fd, off(blockVX+c), vd)
			}
		}
		for i := 0; i < n; i++ {
			d.sys.Couple(off(blockP), pd, off(blockJ0+i), fd)
			d.sys.Couple(off(blockJ0+i), fd, off(blockP), pd)
			for j := 0; j < n; j++ {
				d.sys.Couple(off(blockJ0+i), fd, off(blockJ0+j), fd)
			}
			d.sys.Couple(off(blockJ0+n+i), ud, off(blockJ0+i), fd)
			d.sys.Couple(off(blockJ0+i), fd, off(blockJ0+n+i), ud)
			// The outflow rows of a species, and with the linearised
			// convection every row, couple to every potential.
			if d.convection || len(d.outflowOf[t]) > 0 || d.relativeTri[t] {
				for k := 0; k < n; k++ {
					d.sys.Couple(off(blockJ0+i), fd, off(blockJ0+n+k), ud)
				}
			}
		}
	}
}

// frozenField supplies the frozen concentrations of one linear step: c and
// grad c at the points of a point set of triangle t (set 0: the triangle
// rule; set 1+i: the edge rule on local edge i, where only c is needed).
// Index q*n+i is species i at point q.
type frozenField interface {
	concentrationsTo(c []float64, gradc [][2]float64, t int, af *fem.Affine, set int) error
}

// exactField freezes concentrations given as functions of position.
type exactField struct {
	d  *Discretisation
	fn func(x [2]float64, c []float64, gradc [][2]float64)
}

func (e exactField) concentrationsTo(c []float64, gradc [][2]float64, t int, af *fem.Affine, set int) error {
	n := e.d.n
	pts := e.d.refPoints(set)
	for q, xh := range pts {
		e.fn(af.Point(xh), c[q*n:(q+1)*n], gradc[q*n:(q+1)*n])
	}
	return nil
}

// refPoints returns the reference points of a point set.
func (d *Discretisation) refPoints(set int) [][2]float64 {
	if set == 0 {
		return d.vq.RefPoints()
	}
	return d.ve.Ref[set-1]
}

// assemblyWork holds the element buffers of the assembly.
type assemblyWork struct {
	nv, np, nf, nm, nq int
	vv                 [2][2][]float64
	vj, jv             [2][]float64
	pv, vp             [2][]float64
	pj, jp             []float64
	jj                 [][]float64
	uj, ju             []float64
	fv                 [2][]float64
	fj, fu             [][]float64
	c                  []float64
	gc                 [][2]float64
	ce                 []float64
	gce                [][2]float64
	mm                 []float64
	x                  []float64
	r                  []float64
	g                  [][2]float64
	gram               []float64
	gsign              []float64
	// Linearised convection: dc_j/dmu_k, previous species velocities and
	// potentials at the quadrature points, and the flux–potential blocks.
	dcq   []float64
	vhat  [][2]float64
	muhat []float64
	juk   [][]float64
	// mub and dl hold the boundary potentials and the level's gradient at
	// one edge point (relative potential data).
	mub, dl []float64
}

func newAssemblyWork(d *Discretisation) assemblyWork {
	n := d.n
	w := assemblyWork{nv: d.V.LocalLen(), np: d.P.LocalLen(), nf: d.F.LocalLen(), nm: d.U.LocalLen(), nq: d.vq.NQ}
	nv, np, nf, nm := w.nv, w.np, w.nf, w.nm
	for c := 0; c < 2; c++ {
		for e := 0; e < 2; e++ {
			w.vv[c][e] = make([]float64, nv*nv)
		}
		w.vj[c] = make([]float64, nv*nf)
		w.jv[c] = make([]float64, nf*nv)
		w.pv[c] = make([]float64, np*nv)
		w.vp[c] = make([]float64, nv*np)
		w.fv[c] = make([]float64, nv)
	}
	w.pj = make([]float64, np*nf)
	w.jp = make([]float64, nf*np)
	w.jj = make([][]float64, n*n)
	for i := range w.jj {
		w.jj[i] = make([]float64, nf*nf)
	}
	w.uj = make([]float64, nm*nf)
	w.ju = make([]float64, nf*nm)
	w.fj = make([][]float64, n)
	w.fu = make([][]float64, n)
	for i := 0; i < n; i++ {
		w.fj[i] = make([]float64, nf)
		w.fu[i] = make([]float64, nm)
	}
	nqe := d.ve.NQ
	w.c = make([]float64, w.nq*n)
	w.gc = make([][2]float64, w.nq*n)
	w.ce = make([]float64, nqe*n)
	w.gce = make([][2]float64, nqe*n)
	w.mm = make([]float64, n*n)
	w.x = make([]float64, n)
	w.r = make([]float64, n)
	w.g = make([][2]float64, n)
	w.gram = make([]float64, nf*nf)
	w.gsign = make([]float64, nf)
	if d.convection || d.relativeTri != nil {
		w.juk = make([][]float64, n*n)
		for i := range w.juk {
			w.juk[i] = make([]float64, nf*nm)
		}
		w.mub = make([]float64, n)
		w.dl = make([]float64, n)
	}
	if d.convection {
		w.dcq = make([]float64, w.nq*n*n)
		w.vhat = make([][2]float64, w.nq*n)
		w.muhat = make([]float64, w.nq*n)
	}
	return w
}

// assemble builds the augmented system of section 3 with the
// concentrations of fr frozen. The matrix and right-hand side belong to the
// pattern system.
func (d *Discretisation) assemble(fr frozenField) (*solver.CSR, []float64, error) {
	p, n, m := d.prob, d.n, d.m
	w := &d.w
	nv, np, nf, nm := w.nv, w.np, w.nf, w.nm
	S, gam, beta := p.S, p.gamma(), p.SpeciesAugmentation
	mix := p.Mixture
	off := d.lay.Offset
	d.sys.Reset()
	d.convActive = false
	for t := 0; t < m.NumTriangles(); t++ {
		af := fem.ElementMap(m, t)
		d.vq.Reinit(&af)
		d.pq.Reinit(&af)
		d.uq.Reinit(&af)
		d.fq.Reinit(&af)
		sf, conv := fr.(stateField)
		conv = conv && d.convection
		if conv {
			sf.dc = w.dcq
			fr = sf
		}
		if err := fr.concentrationsTo(w.c, w.gc, t, &af, 0); err != nil {
			return nil, nil, fmt.Errorf("physics: triangle %d: %w", t, err)
		}
		if conv {
			sf.previousTo(w.vhat, w.muhat, t, w.c)
			for _, v := range w.vhat {
				if v != [2]float64{} {
					d.convActive = true
					break
				}
			}
		}
		useJuk := conv || d.relativeTri[t]
		if useJuk {
			for i := range w.juk {
				clear(w.juk[i])
			}
		}
		for c := 0; c < 2; c++ {
			for e := 0; e < 2; e++ {
				clear(w.vv[c][e])
			}
			clear(w.vj[c])
			clear(w.jv[c])
			clear(w.pv[c])
			clear(w.fv[c])
		}
		clear(w.pj)
		for i := range w.jj {
			clear(w.jj[i])
		}
		clear(w.uj)
		for i := 0; i < n; i++ {
			clear(w.fj[i])
			clear(w.fu[i])
		}
		for q := 0; q < d.vq.NQ; q++ {
			W := d.vq.W[q]
			cq := w.c[q*n : (q+1)*n]
			gq := w.gc[q*n : (q+1)*n]
			var rho float64
			var grho [2]float64
			var cT float64
			for i, ci := range cq {
				if !(ci > 0) {
					return nil, nil, &StateError{Model: "frozen state", Species: mix.Name(i),
						Reason: fmt.Sprintf("concentration %g at (%g, %g) in triangle %d is not positive", ci, d.vq.X[q][0], d.vq.X[q][1], t)}
				}
				Mi := mix.mass[i]
				rho += Mi * ci
				grho[0] += Mi * gq[i][0]
				grho[1] += Mi * gq[i][1]
				cT += ci
			}
			for i := range cq {
				w.x[i] = cq[i] / cT
			}
			eta := p.Viscosity.Viscosity(w.x)
			lam := p.BulkViscosity - 2*eta/3
			mix.TransportMatrixTo(w.mm, cq, 1)
			xq := d.vq.X[q]
			var force [2]float64
			if p.Source != nil && p.Source.Force != nil {
				force = p.Source.Force(xq)
			}
			force[0] += rho * p.Gravity[0]
			force[1] += rho * p.Gravity[1]
			clear(w.r)
			clear(w.g)
			if p.Source != nil && p.Source.Production != nil {
				p.Source.Production(w.r, xq)
			}
			if p.Source != nil && p.Source.Residual != nil {
				p.Source.Residual(w.g, xq)
			}
			phi := d.vq.Val[q*nv : (q+1)*nv]
			gphi := d.vq.Grad[q*nv : (q+1)*nv]
			psi := d.pq.Val[q*np : (q+1)*np]
			chi := d.uq.Val[q*nm : (q+1)*nm]
			fv := d.fq.Val[q*nf : (q+1)*nf]
			fdiv := d.fq.Div[q*nf : (q+1)*nf]
			// The momentum and mass-constraint rows are divided by S (their
			// weight in the species units of the transport term), so that
			// every block is of unit size except the physical O(S)
			// pressure coupling of the species rows: the pivots of the
			// sparse LU then compare entries of like size, also at S = 1e-13.
			sw := W
			// Velocity–velocity: 2 eta eps:eps + lambda div div + gamma u.v.
			addViscous(&w.vv, sw, eta, lam, gam, phi, gphi)
			for a := 0; a < nv; a++ {
				ga := gphi[a]
				w.fv[0][a] += sw * force[0] * phi[a]
				w.fv[1][a] += sw * force[1] * phi[a]
				// Velocity–flux: -gamma u . J_j / rho (same for every j),
				// and flux–velocity -(S gamma + beta) K_i . v / rho.
				for b := 0; b < nf; b++ {
					f := -sw * gam * phi[a] / rho
					w.vj[0][a*nf+b] += f * fv[b][0]
					w.vj[1][a*nf+b] += f * fv[b][1]
					f = -W * (S*gam + beta) * phi[a] / rho
					w.jv[0][b*nv+a] += f * fv[b][0]
					w.jv[1][b*nv+a] += f * fv[b][1]
				}
				// Pressure–velocity: -q div v.
				for r := 0; r < np; r++ {
					w.pv[0][r*nv+a] -= sw * psi[r] * ga[0]
					w.pv[1][r*nv+a] -= sw * psi[r] * ga[1]
				}
			}
			// Pressure–flux: q div(J/rho) = q (div J / rho - J . grad rho / rho^2);
			// its transpose in the species rows carries the factor S.
			for r := 0; r < np; r++ {
				f := sw * psi[r] / rho
				for b := 0; b < nf; b++ {
					w.pj[r*nf+b] += f * (fdiv[b] - (fv[b][0]*grho[0]+fv[b][1]*grho[1])/rho)
				}
			}
			// Flux–flux: M_ij / (rho_i rho_j) + S gamma / rho^2.
			for a := 0; a < nf; a++ {
				for b := a; b < nf; b++ {
					v := W * (fv[a][0]*fv[b][0] + fv[a][1]*fv[b][1])
					w.gram[a*nf+b] = v
					w.gram[b*nf+a] = v
				}
			}
			aug := (S*gam + beta) / (rho * rho)
			for i := 0; i < n; i++ {
				ri := mix.mass[i] * cq[i]
				for j := 0; j < n; j++ {
					rj := mix.mass[j] * cq[j]
					coef := w.mm[i*n+j]/(ri*rj) + aug
					blk := w.jj[i*n+j]
					for ab, g := range w.gram {
						blk[ab] += coef * g
					}
				}
				// Sources: g_i . K_i / rho_i and -nu_i r_i.
				gi := w.g[i]
				if gi != [2]float64{} {
					for a := 0; a < nf; a++ {
						w.fj[i][a] += W * (gi[0]*fv[a][0] + gi[1]*fv[a][1]) / ri
					}
				}
				if w.r[i] != 0 {
					for s := 0; s < nm; s++ {
						w.fu[i][s] -= W * chi[s] * w.r[i]
					}
				}
			}
			// Linearised species velocities: row i gains
			// -sum_j M_ij/rho_i (v^_j . K_i) sum_k (dc_j/dmu_k / c_j)(mu_k - mu^_k).
			if conv {
				dcq := w.dcq[q*n*n : (q+1)*n*n]
				vh := w.vhat[q*n : (q+1)*n]
				muh := w.muhat[q*n : (q+1)*n]
				// The previous total flux T^ = sum_j rho^_j v^_j.
				var That [2]float64
				for j := 0; j < n; j++ {
					rj := mix.mass[j] * cq[j]
					That[0] += rj * vh[j][0]
					That[1] += rj * vh[j][1]
				}
				for i := 0; i < n; i++ {
					ri := mix.mass[i] * cq[i]
					for k := 0; k < n; k++ {
						// g = sum_j M_ij/rho_i v^_j dc_jk / c_j (a vector),
						// plus the augmentation's (S gamma + beta) T^
						// drho/dmu_k / rho^3 from 1/rho in sum_j J_j/rho.
						var g [2]float64
						var drho float64
						for j := 0; j < n; j++ {
							f := w.mm[i*n+j] / ri * dcq[j*n+k] / cq[j]
							g[0] += f * vh[j][0]
							g[1] += f * vh[j][1]
							drho += mix.mass[j] * dcq[j*n+k]
						}
						f := (S*gam + beta) * drho / (rho * rho * rho)
						g[0] += f * That[0]
						g[1] += f * That[1]
						if g == [2]float64{} {
							continue
						}
						blk := w.juk[i*n+k]
						for a := 0; a < nf; a++ {
							f := -W * (g[0]*fv[a][0] + g[1]*fv[a][1])
							for s := 0; s < nm; s++ {
								blk[a*nm+s] += f * chi[s]
							}
							w.fj[i][a] += f * muh[k]
						}
					}
				}
			}
			// Potential–flux: -nu div K (the 1/M_i is applied per species).
			for s := 0; s < nm; s++ {
				f := -W * chi[s]
				for b := 0; b < nf; b++ {
					w.uj[s*nf+b] += f * fdiv[b]
				}
			}
		}
		if err := d.boundaryTerms(fr, t, &af); err != nil {
			return nil, nil, err
		}
		transposeTo(w.jp, w.pj, np, nf)
		for i := range w.jp {
			w.jp[i] *= S
		}
		transposeTo(w.ju, w.uj, nm, nf)
		// Scatter.
		vd, pd, fd, ud := d.V.Dofs(t), d.P.Dofs(t), d.F.Dofs(t), d.U.Dofs(t)
		fs := d.F.Signs(t)
		if len(d.outflowOf[t]) > 0 {
			if err := d.outflowRows(t, &af); err != nil {
				return nil, nil, err
			}
		}
		for c := 0; c < 2; c++ {
			for e := 0; e < 2; e++ {
				d.sys.AddMatrix(off(blockVX+c), vd, nil, off(blockVX+e), vd, nil, w.vv[c][e])
			}
			transposeTo(w.vp[c], w.pv[c], np, nv)
			d.sys.AddMatrix(off(blockP), pd, nil, off(blockVX+c), vd, nil, w.pv[c])
			d.sys.AddMatrix(off(blockVX+c), vd, nil, off(blockP), pd, nil, w.vp[c])
			for j := 0; j < n; j++ {
				d.sys.AddMatrix(off(blockVX+c), vd, nil, off(blockJ0+j), fd, fs, w.vj[c])
				d.sys.AddMatrix(off(blockJ0+j), fd, fs, off(blockVX+c), vd, nil, w.jv[c])
			}
			d.sys.AddVector(off(blockVX+c), vd, nil, w.fv[c])
		}
		for i := 0; i < n; i++ {
			d.sys.AddMatrix(off(blockP), pd, nil, off(blockJ0+i), fd, fs, w.pj)
			d.sys.AddMatrix(off(blockJ0+i), fd, fs, off(blockP), pd, nil, w.jp)
			for j := 0; j < n; j++ {
				d.sys.AddMatrix(off(blockJ0+i), fd, fs, off(blockJ0+j), fd, fs, w.jj[i*n+j])
			}
			inv := 1 / mix.mass[i]
			scaleInto(w.gram[:nm*nf], w.uj, inv) // reuse gram as scratch
			d.sys.AddMatrix(off(blockJ0+n+i), ud, nil, off(blockJ0+i), fd, fs, w.gram[:nm*nf])
			scaleInto(w.gram[:nf*nm], w.ju, inv)
			d.sys.AddMatrix(off(blockJ0+i), fd, fs, off(blockJ0+n+i), ud, nil, w.gram[:nf*nm])
			if useJuk {
				for k := 0; k < n; k++ {
					d.sys.AddMatrix(off(blockJ0+i), fd, fs, off(blockJ0+n+k), ud, nil, w.juk[i*n+k])
				}
			}
			d.sys.AddVector(off(blockJ0+i), fd, fs, w.fj[i])
			d.sys.AddVector(off(blockJ0+n+i), ud, nil, w.fu[i])
		}
	}
	A, b := d.sys.Matrix()
	return A, b, nil
}

// boundaryTerms adds the natural boundary data of triangle t's boundary
// edges to the element vectors: the traction on open boundaries and the
// potential term (S p_b / rho - mu_b / M_i) K_i . n of species with
// potential data.
func (d *Discretisation) boundaryTerms(fr frozenField, t int, af *fem.Affine) error {
	m := d.m
	tri := m.TriangleEdges[t]
	w := &d.w
	p, n := d.prob, d.n
	nf, nm := w.nf, w.nm
	for le, e := range tri {
		if !m.IsBoundary(e) {
			continue
		}
		tag := m.EdgeTags[e]
		bc := p.Boundary[tag]
		d.addTraction(&w.fv, m, bc, e, le, af)
		any := false
		for _, sc := range bc.Species {
			if sc.Kind == SpeciesPotential {
				any = true
			}
		}
		if !any {
			continue
		}
		if err := fr.concentrationsTo(w.ce, w.gce, t, af, 1+le); err != nil {
			return fmt.Errorf("physics: triangle %d, edge %d: %w", t, e, err)
		}
		sgn := 1.0
		if af.Det < 0 {
			sgn = -1
		}
		nt := d.fe.Normal[le]
		for q := 0; q < d.fe.NQ; q++ {
			xq := af.Point(d.fe.Ref[le][q])
			var rho float64
			for i := 0; i < n; i++ {
				rho += p.Mixture.mass[i] * w.ce[q*n+i]
			}
			pb := 0.0
			if bc.Pressure != nil {
				pb = bc.Pressure(xq)
			}
			if sf, ok := fr.(stateField); ok && d.pressureRule {
				pb = sf.edgePressure(t, le, q)
			}
			// Relative data: the level L of the previous iterate's
			// potentials here and its gradient.
			var level float64
			relative := false
			if sf, ok := fr.(stateField); ok && d.relativeTri[t] {
				if li, ok := sf.pm.closure.(LevelInvariant); ok {
					sf.edgePotentialsTo(w.mub, t, le, q)
					level = li.LevelTo(w.dl, w.mub, sf.pm.p0)
					for k := 0; k < n; k++ {
						level -= w.dl[k] * w.mub[k]
					}
					relative = true
				}
			}
			chi := d.ue.Value[le][q*nm : (q+1)*nm]
			for i, sc := range bc.Species {
				if sc.Kind != SpeciesPotential {
					continue
				}
				invM := 1 / p.Mixture.mass[i]
				mub := sc.Potential(xq)
				if relative && sc.Relative {
					// mu_i,b = Potential + L^ - sum_k dL_k mu^_k (data)
					// + sum_k dL_k mu_k (unknown, moved to the left).
					mub += level
					for k := 0; k < n; k++ {
						blk := w.juk[i*n+k]
						for a := 0; a < nf; a++ {
							f := sgn * d.fe.W[q] * nt[q*nf+a] * w.dl[k] * invM
							for s := 0; s < nm; s++ {
								blk[a*nm+s] += f * chi[s]
							}
						}
					}
				}
				v := sgn * d.fe.W[q] * (p.S*pb/rho - mub*invM)
				for a := 0; a < nf; a++ {
					w.fj[i][a] += v * nt[q*nf+a]
				}
			}
		}
	}
	return nil
}

// transposeTo writes the transpose of the r by c row-major matrix a into dst.
func transposeTo(dst, a []float64, r, c int) {
	for i := 0; i < r; i++ {
		for j := 0; j < c; j++ {
			dst[j*r+i] = a[i*c+j]
		}
	}
}

// scaleInto writes s*a into dst.
func scaleInto(dst, a []float64, s float64) {
	for i, v := range a {
		dst[i] = s * v
	}
}

// LUStats returns the statistics of the last factorisation (zero before
// the first solve).
func (d *Discretisation) LUStats() solver.LUStats {
	if d.lu == nil {
		return solver.LUStats{}
	}
	return d.lu.Stats()
}

// solveLinear factorises (or refactorises, keeping the symbolic analysis)
// and solves the assembled system, returning the solution and the relative
// residual.
func (d *Discretisation) solveLinear(A *solver.CSR, b []float64) ([]float64, float64, error) {
	var err error
	if d.lu != nil && d.convActive && !d.luActive {
		d.lu = nil
	}
	d.luActive = d.convActive
	if d.lu == nil {
		d.lu, err = solver.FactorLU(A, nil)
	} else {
		err = d.lu.Refactor(A)
	}
	if err != nil {
		d.lu = nil
		return nil, 0, fmt.Errorf("physics: factorising the SOSM system (%d unknowns, %d non-zeros): %w", len(b), A.NNZ(), err)
	}
	x := make([]float64, len(b))
	res, err := d.lu.SolveRefinedTo(x, A, b, 2)
	if err != nil {
		return nil, 0, fmt.Errorf("physics: solving the SOSM system: %w", err)
	}
	if math.IsNaN(res) || res > 1e-6 {
		return nil, res, fmt.Errorf("physics: SOSM linear solve inaccurate: relative residual %.3g", res)
	}
	return x, res, nil
}
