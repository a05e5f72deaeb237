package physics

import (
	"fmt"
	"math"

	"mixwell/fem"
	"mixwell/solver"
)

// ConcentrationUpdate selects how the Picard map turns the post-processed
// potentials into the next frozen concentrations (formulation note,
// section 4, step 4).
type ConcentrationUpdate int

const (
	// PotentialProjection L2-projects each post-processed potential onto
	// the continuous velocity-degree Lagrange space and evaluates the
	// closure there: c > 0 by construction (the default).
	PotentialProjection ConcentrationUpdate = iota
	// ConcentrationProjection L2-projects c_i(mu*, p) onto that space. It
	// can go negative; such values are clipped to a floor and counted.
	ConcentrationProjection
)

// String names the update.
func (u ConcentrationUpdate) String() string {
	if u == ConcentrationProjection {
		return "concentration"
	}
	return "potential"
}

// picard is the Picard map of a Discretisation: its state is the
// continuous P_{k+1} field of each species (the projected potential, or the
// projected concentration) followed by the pressure coefficients.
type picard struct {
	d       *Discretisation
	closure Closure
	p0      float64 // absolute reference pressure, thermodynamic units
	update  ConcentrationUpdate
	floor   float64

	massLU *solver.LU // mass matrix of the velocity space
	post   *fem.ScalarQuad
	postEl *fem.Discontinuous

	last    *Solution
	clipped int

	// work
	mu, c, dcdmu, dcdp []float64
	gmu                [][2]float64
	star               []float64 // DG_{k+1} coefficients, n blocks of U*.Len
	rhs                []float64
}

// stateLen returns the length of the Picard state.
func (pm *picard) stateLen() int {
	return pm.previousOffset() + pm.previousLen()
}

// outletOffset is where the total normal mass fluxes at the outflow edge
// quadrature points start in the state.
func (pm *picard) outletOffset() int { return pm.stefanOffset() + len(pm.d.stefan) }

// previousOffset is where the previous step's fluxes (n blocks of the
// flux space) and unshifted discontinuous potentials (n blocks) start in
// the state; they are there only with the linearised convection.
func (pm *picard) previousOffset() int { return pm.outletOffset() + len(pm.d.outflow)*pm.d.fe.NQ }

// previousLen is the length of the previous-step part of the state.
func (pm *picard) previousLen() int {
	if !pm.d.convection {
		return 0
	}
	return pm.d.n * (pm.d.F.Len() + pm.d.U.Len())
}

// stefanOffset is where the Stefan-wall normal velocities start in the
// state.
func (pm *picard) stefanOffset() int { return pm.d.n*pm.d.V.Len() + pm.d.P.Len() }

func newPicard(d *Discretisation, closure Closure, p0 float64, update ConcentrationUpdate, floor float64) (*picard, error) {
	if closure.Len() != d.n {
		return nil, fmt.Errorf("physics: closure has %d species, the problem %d", closure.Len(), d.n)
	}
	pm := &picard{d: d, closure: closure, p0: p0, update: update, floor: floor}
	el, err := fem.NewDiscontinuous(d.k + 1)
	if err != nil {
		return nil, err
	}
	pm.postEl = el
	pm.post = fem.NewScalarQuad(el, d.qdeg)
	// Mass matrix of the velocity space, factorised once.
	V := d.V
	nv := V.LocalLen()
	sys := fem.NewSystem(V.Len(), d.m.NumTriangles()*nv*nv)
	loc := make([]float64, nv*nv)
	for t := 0; t < d.m.NumTriangles(); t++ {
		af := fem.ElementMap(d.m, t)
		d.vq.Reinit(&af)
		clear(loc)
		for q := 0; q < d.vq.NQ; q++ {
			phi := d.vq.Val[q*nv : (q+1)*nv]
			for a := 0; a < nv; a++ {
				for b := 0; b < nv; b++ {
					loc[a*nv+b] += d.vq.W[q] * phi[a] * phi[b]
				}
			}
		}
		sys.AddMatrix(0, V.Dofs(t), nil, 0, V.Dofs(t), nil, loc)
	}
	M, _ := sys.Matrix()
	if pm.massLU, err = solver.FactorLU(M, nil); err != nil {
		return nil, fmt.Errorf("physics: factorising the mass matrix: %w", err)
	}
	n := d.n
	pm.mu = make([]float64, n)
	pm.c = make([]float64, n)
	pm.dcdmu = make([]float64, n*n)
	pm.dcdp = make([]float64, n)
	pm.gmu = make([][2]float64, n)
	pm.star = make([]float64, n*d.m.NumTriangles()*el.Len())
	pm.rhs = make([]float64, V.Len())
	return pm, nil
}

// stateField freezes the concentrations of a Picard state. When dc is not
// nil, concentrationsTo also writes dc_i/dmu_j at every point (index
// (q*n+i)*n+j).
type stateField struct {
	pm *picard
	x  []float64
	dc []float64
}

// edgePressure returns the state's pressure at point q of the edge rule on
// local edge le of triangle t.
func (sf stateField) edgePressure(t, le, q int) float64 {
	d := sf.pm.d
	pd := d.P.Dofs(t)
	np := len(pd)
	pc := sf.x[d.n*d.V.Len():]
	var v float64
	for a := 0; a < np; a++ {
		v += pc[pd[a]] * d.pe.Value[le][q*np+a]
	}
	return v
}

// edgePotentialsTo writes the state's potentials at point q of the edge
// rule on local edge le of triangle t into dst: the previous step's
// discontinuous potentials where the state carries them (linearised
// convection), else the continuous projection Pi mu* the concentrations
// are built from.
func (sf stateField) edgePotentialsTo(dst []float64, t, le, q int) {
	d := sf.pm.d
	if d.convection {
		nF, nU := d.F.Len(), d.U.Len()
		base := sf.x[sf.pm.previousOffset()+d.n*nF:]
		ud := d.U.Dofs(t)
		nm := len(ud)
		val := d.ue.Value[le][q*nm : (q+1)*nm]
		for i := range dst[:d.n] {
			blk := base[i*nU : (i+1)*nU]
			var v float64
			for a, g := range ud {
				v += blk[g] * val[a]
			}
			dst[i] = v
		}
		return
	}
	vd := d.V.Dofs(t)
	nv, nV := len(vd), d.V.Len()
	val := d.ve.Value[le][q*nv : (q+1)*nv]
	for i := range dst[:d.n] {
		blk := sf.x[i*nV : (i+1)*nV]
		var v float64
		for a, g := range vd {
			v += blk[g] * val[a]
		}
		dst[i] = v
	}
}

// previousTo writes the previous step's species velocities J^_j/rho^_j
// (rho^_j from the frozen concentrations c at the triangle rule's points)
// and discontinuous potentials mu^_j at the points of triangle t, whose
// rule d.vq/d.fq/d.uq must be set up for t.
func (sf stateField) previousTo(vhat [][2]float64, muhat []float64, t int, c []float64) {
	pm := sf.pm
	d := pm.d
	n := d.n
	nF, nU := d.F.Len(), d.U.Len()
	base := sf.x[pm.previousOffset():]
	fd, fs, ud := d.F.Dofs(t), d.F.Signs(t), d.U.Dofs(t)
	nf, nm := len(fd), len(ud)
	for q := 0; q < d.vq.NQ; q++ {
		fv := d.fq.Val[q*nf : (q+1)*nf]
		chi := d.uq.Val[q*nm : (q+1)*nm]
		for j := 0; j < n; j++ {
			jc := base[j*nF : (j+1)*nF]
			var v [2]float64
			for b := 0; b < nf; b++ {
				co := fs[b] * jc[fd[b]]
				v[0] += co * fv[b][0]
				v[1] += co * fv[b][1]
			}
			rj := d.prob.Mixture.mass[j] * c[q*n+j]
			vhat[q*n+j] = [2]float64{v[0] / rj, v[1] / rj}
			uc := base[n*nF+j*nU : n*nF+(j+1)*nU]
			var mv float64
			for s := 0; s < nm; s++ {
				mv += uc[ud[s]] * chi[s]
			}
			muhat[q*n+j] = mv
		}
	}
}

func (sf stateField) concentrationsTo(c []float64, gradc [][2]float64, t int, af *fem.Affine, set int) error {
	pm := sf.pm
	d := pm.d
	n := d.n
	nV := d.V.Len()
	vd, pd := d.V.Dofs(t), d.P.Dofs(t)
	pc := sf.x[n*nV:]
	nv, np := len(vd), len(pd)
	var nq int
	var vval, pval []float64
	var vgrad, pgrad [][2]float64
	if set == 0 {
		nq = d.vq.NQ
		vval, vgrad, pval, pgrad = d.vq.Val, d.vq.Grad, d.pq.Val, d.pq.Grad
	} else {
		nq = d.ve.NQ
		vval, pval = d.ve.Value[set-1], d.pe.Value[set-1]
	}
	S := d.prob.S
	for q := 0; q < nq; q++ {
		var pv float64
		var gp [2]float64
		for a := 0; a < np; a++ {
			co := pc[pd[a]]
			pv += co * pval[q*np+a]
			if pgrad != nil {
				gp[0] += co * pgrad[q*np+a][0]
				gp[1] += co * pgrad[q*np+a][1]
			}
		}
		for i := 0; i < n; i++ {
			blk := sf.x[i*nV : (i+1)*nV]
			var v float64
			var g [2]float64
			for a := 0; a < nv; a++ {
				co := blk[vd[a]]
				v += co * vval[q*nv+a]
				if vgrad != nil {
					g[0] += co * vgrad[q*nv+a][0]
					g[1] += co * vgrad[q*nv+a][1]
				}
			}
			pm.mu[i] = v
			pm.gmu[i] = g
		}
		cq := c[q*n : (q+1)*n]
		gq := gradc[q*n : (q+1)*n]
		if pm.update == ConcentrationProjection {
			for i := 0; i < n; i++ {
				cq[i] = pm.mu[i]
				gq[i] = pm.gmu[i]
				if cq[i] < pm.floor {
					cq[i] = pm.floor
					gq[i] = [2]float64{}
					pm.clipped++
				}
			}
			if sf.dc != nil {
				// No potentials in this update: the convection stays lagged.
				clear(sf.dc[q*n*n : (q+1)*n*n])
			}
			continue
		}
		if err := pm.closure.ConcentrationsTo(cq, pm.dcdmu, pm.dcdp, pm.mu, pm.p0+S*pv); err != nil {
			return err
		}
		if sf.dc != nil {
			copy(sf.dc[q*n*n:(q+1)*n*n], pm.dcdmu)
		}
		for i := 0; i < n; i++ {
			g := [2]float64{pm.dcdp[i] * S * gp[0], pm.dcdp[i] * S * gp[1]}
			for j := 0; j < n; j++ {
				g[0] += pm.dcdmu[i*n+j] * pm.gmu[j][0]
				g[1] += pm.dcdmu[i*n+j] * pm.gmu[j][1]
			}
			gq[i] = g
		}
	}
	return nil
}

// apply evaluates the Picard map: dst = G(x).
func (pm *picard) apply(dst, x []float64) error {
	d := pm.d
	// The solution keeps its frozen field: copy the state, which the
	// iteration may overwrite.
	fr := stateField{pm: pm, x: append([]float64(nil), x...)}
	pm.clipped = 0
	so := pm.stefanOffset()
	for k, sd := range d.stefan {
		c := 0
		if sd.normal[1] != 0 {
			c = 1
		}
		d.sys.Fix(sd.global, x[so+k]*sd.normal[c])
	}
	if len(d.outflow) > 0 {
		if pm.update == ConcentrationProjection {
			return fmt.Errorf("physics: outflow boundaries need the potential update")
		}
		if err := pm.setOutlet(fr.x, fr.x[pm.outletOffset():]); err != nil {
			return err
		}
	}
	A, b, err := d.assemble(fr)
	if err != nil {
		return err
	}
	y, res, err := d.solveLinear(A, b)
	if err != nil {
		return err
	}
	if d.convection {
		// The unshifted potentials, so that a fixed point compares like
		// with like (the level shifts below are not part of the step).
		base := dst[pm.previousOffset():]
		nF, nU := d.F.Len(), d.U.Len()
		for i := 0; i < d.n; i++ {
			copy(base[i*nF:(i+1)*nF], d.lay.Block(y, blockJ0+i))
			copy(base[d.n*nF+i*nU:d.n*nF+(i+1)*nU], d.lay.Block(y, blockJ0+d.n+i))
		}
	}
	sol := &Solution{d: d, X: y, LinearResidual: res, frozen: fr}
	d.restoreLevels(sol)
	if err := pm.applyInventory(sol, fr.x); err != nil {
		return err
	}
	pm.last = sol
	if err := pm.postProcess(sol, fr); err != nil {
		return err
	}
	// Project mu* (or c(mu*, p)) onto the velocity space.
	n, nV := d.n, d.V.Len()
	for i := 0; i < n; i++ {
		pm.projectStar(dst[i*nV:(i+1)*nV], i, sol)
	}
	copy(dst[n*nV:], sol.Pressure())
	if err := pm.stefanVelocities(dst[pm.stefanOffset():], sol, x); err != nil {
		return err
	}
	d.outletTotals(dst[pm.outletOffset():], sol)
	return nil
}

// applyInventory shifts the potentials of the species without potential
// boundaries (returned with zero mean by the linear solve) so that each
// species' amount int c_i(mu + s, P + S p) equals its inventory
// (formulation note, section 6). The shifts s solve that small nonlinear
// system by Newton's method with the Jacobian int dc_i/dmu_j; for the
// ideal gas one step gives s_i = ln(N_i / int c_i) exactly.
func (pm *picard) applyInventory(sol *Solution, x []float64) error {
	d := pm.d
	p, n, m := d.prob, d.n, d.m
	var pinned []int
	for i, g := range d.pinnedMu {
		if g >= 0 {
			pinned = append(pinned, i)
		}
	}
	if len(pinned) == 0 {
		return nil
	}
	if len(p.Inventory) != n {
		return fmt.Errorf("physics: species %q has no potential boundary and no inventory (formulation note, section 6)", p.Mixture.Name(pinned[0]))
	}
	np := len(pinned)
	shift := make([]float64, np)
	f := make([]float64, np)
	jac := make([]float64, np*np)
	piv := make([]int, np)
	nm, npr := d.U.LocalLen(), d.P.LocalLen()
	mu := make([]float64, n)
	c := make([]float64, n)
	dc := make([]float64, n*n)
	pc := sol.Pressure()
	for it := 0; it < 50; it++ {
		clear(f)
		clear(jac)
		for t := 0; t < m.NumTriangles(); t++ {
			af := fem.ElementMap(m, t)
			d.uq.Reinit(&af)
			ud, pd := d.U.Dofs(t), d.P.Dofs(t)
			for q := 0; q < d.uq.NQ; q++ {
				for i := 0; i < n; i++ {
					uc := sol.Potential(i)
					var v float64
					for a := 0; a < nm; a++ {
						v += uc[ud[a]] * d.uq.Val[q*nm+a]
					}
					mu[i] = v
				}
				for k, i := range pinned {
					mu[i] += shift[k]
				}
				var pv float64
				for a := 0; a < npr; a++ {
					pv += pc[pd[a]] * d.pq.Val[q*npr+a]
				}
				if err := pm.closure.ConcentrationsTo(c, dc, nil, mu, pm.p0+p.S*pv); err != nil {
					return err
				}
				W := d.uq.W[q]
				for k, i := range pinned {
					f[k] += W * c[i]
					for l, j := range pinned {
						jac[k*np+l] += W * dc[i*n+j]
					}
				}
			}
		}
		var worst float64
		for k, i := range pinned {
			f[k] -= p.Inventory[i]
			worst = math.Max(worst, math.Abs(f[k])/p.Inventory[i])
		}
		if worst < 1e-13 {
			break
		}
		if !luFactor(jac, np, piv) {
			return fmt.Errorf("physics: inventory: the amounts do not fix the potential levels (singular Jacobian)")
		}
		luSolve(jac, np, piv, f)
		for k := range shift {
			shift[k] -= f[k]
		}
		if it == 49 {
			return fmt.Errorf("physics: inventory: Newton iteration did not converge (relative defect %.3g)", worst)
		}
	}
	one := make([]float64, d.U.Len())
	fem.InterpolateScalar(one, d.U, func([2]float64) float64 { return 1 })
	for k, i := range pinned {
		uc := sol.Potential(i)
		for g := range uc {
			uc[g] += shift[k] * one[g]
		}
	}
	return nil
}

// initialStefanVelocities sets, in the initial state x, the normal velocity
// of every node of a Stefan wall with flux data for every species (an
// inlet of given mass fluxes) to sum_i g_i / rho of the data g_i and the
// initial density, in place of 0, so that the first step does not hold
// the velocity at 0 where the data bring mass in. Nodes of Stefan walls
// with composition data keep 0.
func (pm *picard) initialStefanVelocities(x []float64, initial func(x [2]float64, mu []float64)) error {
	d := pm.d
	n := d.n
	mu := make([]float64, n)
	c := make([]float64, n)
	so := pm.stefanOffset()
	for k, sd := range d.stefan {
		bc := d.prob.Boundary[sd.tag]
		if !fluxInlet(bc) {
			continue
		}
		af := fem.ElementMap(d.m, sd.t)
		xp := af.Point(sd.xh)
		initial(xp, mu)
		if err := pm.closure.ConcentrationsTo(c, nil, nil, mu, pm.p0); err != nil {
			return err
		}
		var rho, jn float64
		for i, sc := range bc.Species {
			rho += d.prob.Mixture.mass[i] * c[i]
			jn += sc.Flux(xp, sd.normal)
		}
		x[so+k] = jn / rho
	}
	return nil
}

// fluxInlet reports whether bc is a Stefan wall with flux data for every
// species and no wall potentials: an inlet (or outlet) of given mass
// fluxes, whose normal velocity follows from the data.
func fluxInlet(bc BoundaryCondition) bool {
	if bc.Velocity.Kind != VelocityStefan {
		return false
	}
	for _, sc := range bc.Species {
		if sc.Kind != SpeciesFlux || sc.Flux == nil || sc.Potential != nil {
			return false
		}
	}
	return true
}

// stefanVelocities writes the outward normal velocity sum_i J_i.n / rho of
// every Stefan-wall node, with J from sol and rho from the state x.
func (pm *picard) stefanVelocities(dst []float64, sol *Solution, x []float64) error {
	d := pm.d
	n, nV := d.n, d.V.Len()
	mu := make([]float64, n)
	c := make([]float64, n)
	for k, sd := range d.stefan {
		for i := 0; i < n; i++ {
			mu[i], _ = fem.ScalarAt(d.V, x[i*nV:(i+1)*nV], sd.t, sd.xh)
		}
		p, _ := fem.ScalarAt(d.P, x[n*nV:n*nV+d.P.Len()], sd.t, sd.xh)
		if err := pm.closure.ConcentrationsTo(c, nil, nil, mu, pm.p0+d.prob.S*p); err != nil {
			return err
		}
		var rho, jn float64
		for i := 0; i < n; i++ {
			rho += d.prob.Mixture.mass[i] * c[i]
			j, _ := fem.DivAt(d.F, sol.Flux(i), sd.t, sd.xh)
			jn += j[0]*sd.normal[0] + j[1]*sd.normal[1]
		}
		dst[k] = jn / rho
	}
	return nil
}

// postProcess computes, element by element, mu_i* in P_{k+1} with the
// element mean of mu_i and the gradient fitted in least squares to the OSM
// row solved for the gradient,
//
//	grad mu_i = (S w_i grad p - sum_j M_ij J_j / rho_j + g_i) / c_i,
//
// with the frozen coefficients (formulation note, section 4, step 3; in the
// spirit of Stenberg, "Postprocessing schemes for some mixed finite
// elements", RAIRO M2AN 25 (1991)).
func (pm *picard) postProcess(sol *Solution, fr frozenField) error {
	d := pm.d
	p, n, m := d.prob, d.n, d.m
	w := &d.w
	nq := d.vq.NQ
	ne := pm.postEl.Len()
	nm, nf, np := w.nm, w.nf, w.np
	kmat := make([]float64, (ne-1)*(ne-1))
	rhs := make([]float64, (ne-1)*n)
	piv := make([]int, ne-1)
	jq := make([][2]float64, n)
	pc := sol.Pressure()
	for t := 0; t < m.NumTriangles(); t++ {
		af := fem.ElementMap(m, t)
		d.vq.Reinit(&af)
		d.pq.Reinit(&af)
		d.uq.Reinit(&af)
		d.fq.Reinit(&af)
		pm.post.Reinit(&af)
		if err := fr.concentrationsTo(w.c, w.gc, t, &af, 0); err != nil {
			return err
		}
		clear(kmat)
		clear(rhs)
		fd, fs, pd, ud := d.F.Dofs(t), d.F.Signs(t), d.P.Dofs(t), d.U.Dofs(t)
		means := make([]float64, n)
		var area float64
		for q := 0; q < nq; q++ {
			W := d.vq.W[q]
			area += W
			cq := w.c[q*n : (q+1)*n]
			var rho float64
			for i, ci := range cq {
				rho += p.Mixture.mass[i] * ci
			}
			p.Mixture.TransportMatrixTo(w.mm, cq, 1)
			var gp [2]float64
			for a := 0; a < np; a++ {
				g := d.pq.Grad[q*np+a]
				gp[0] += pc[pd[a]] * g[0]
				gp[1] += pc[pd[a]] * g[1]
			}
			fv := d.fq.Val[q*nf : (q+1)*nf]
			for j := 0; j < n; j++ {
				jc := sol.Flux(j)
				var v [2]float64
				for b := 0; b < nf; b++ {
					co := fs[b] * jc[fd[b]]
					v[0] += co * fv[b][0]
					v[1] += co * fv[b][1]
				}
				jq[j] = v
			}
			clear(w.g)
			if p.Source != nil && p.Source.Residual != nil {
				p.Source.Residual(w.g, d.vq.X[q])
			}
			chi := d.uq.Val[q*nm : (q+1)*nm]
			gpost := pm.post.Grad[q*ne : (q+1)*ne]
			for b := 1; b < ne; b++ {
				for c := 1; c < ne; c++ {
					kmat[(b-1)*(ne-1)+c-1] += W * (gpost[b][0]*gpost[c][0] + gpost[b][1]*gpost[c][1])
				}
			}
			for i := 0; i < n; i++ {
				wi := p.Mixture.mass[i] * cq[i] / rho
				gi := [2]float64{p.S*wi*gp[0] + w.g[i][0], p.S*wi*gp[1] + w.g[i][1]}
				for j := 0; j < n; j++ {
					rj := p.Mixture.mass[j] * cq[j]
					gi[0] -= w.mm[i*n+j] * jq[j][0] / rj
					gi[1] -= w.mm[i*n+j] * jq[j][1] / rj
				}
				gi[0] /= cq[i]
				gi[1] /= cq[i]
				for c := 1; c < ne; c++ {
					rhs[i*(ne-1)+c-1] += W * (gi[0]*gpost[c][0] + gi[1]*gpost[c][1])
				}
				uc := sol.Potential(i)
				var mv float64
				for s := 0; s < nm; s++ {
					mv += uc[ud[s]] * chi[s]
				}
				means[i] += W * mv
			}
		}
		if !luFactor(kmat, ne-1, piv) {
			return fmt.Errorf("physics: post-processing: singular gradient matrix on triangle %d", t)
		}
		// The constant Dubiner function has the value phi0 on every
		// triangle, and the others have zero mean.
		phi0 := pm.post.Val[0]
		for i := 0; i < n; i++ {
			coef := pm.star[(i*m.NumTriangles()+t)*ne : (i*m.NumTriangles()+t+1)*ne]
			r := rhs[i*(ne-1) : (i+1)*(ne-1)]
			luSolve(kmat, ne-1, piv, r)
			coef[0] = means[i] / area / phi0
			copy(coef[1:], r)
		}
	}
	return nil
}

// projectStar writes into dst the L2 projection onto the velocity space of
// mu_i* (potential update) or of c_i(mu*, p) (concentration update).
func (pm *picard) projectStar(dst []float64, i int, sol *Solution) {
	d := pm.d
	m, n := d.m, d.n
	nv := d.V.LocalLen()
	ne := pm.postEl.Len()
	np := d.P.LocalLen()
	clear(pm.rhs)
	pc := sol.Pressure()
	for t := 0; t < m.NumTriangles(); t++ {
		af := fem.ElementMap(m, t)
		d.vq.Reinit(&af)
		vd, pd := d.V.Dofs(t), d.P.Dofs(t)
		for q := 0; q < d.vq.NQ; q++ {
			var val float64
			if pm.update == ConcentrationProjection {
				for j := 0; j < n; j++ {
					coef := pm.star[(j*m.NumTriangles()+t)*ne : (j*m.NumTriangles()+t+1)*ne]
					var v float64
					for b, cb := range coef {
						v += cb * pm.post.Val[q*ne+b]
					}
					pm.mu[j] = v
				}
				var pv float64
				for a := 0; a < np; a++ {
					pv += pc[pd[a]] * d.pq.Val[q*np+a]
				}
				if err := pm.closure.ConcentrationsTo(pm.c, nil, nil, pm.mu, pm.p0+d.prob.S*pv); err != nil {
					val = math.NaN()
				} else {
					val = pm.c[i]
				}
			} else {
				coef := pm.star[(i*m.NumTriangles()+t)*ne : (i*m.NumTriangles()+t+1)*ne]
				for b, cb := range coef {
					val += cb * pm.post.Val[q*ne+b]
				}
			}
			f := d.vq.W[q] * val
			phi := d.vq.Val[q*nv : (q+1)*nv]
			for a := 0; a < nv; a++ {
				pm.rhs[vd[a]] += f * phi[a]
			}
		}
	}
	if err := pm.massLU.SolveTo(dst, pm.rhs); err != nil {
		panic(fmt.Sprintf("physics: mass-matrix solve: %v", err))
	}
}
