package physics

import (
	"errors"
	"fmt"
	"math"

	"mixwell/fem"
)

// The outflow condition (formulation note, section 10 item 4).
//
// On an outflow edge the n normal fluxes J_i.n are unknowns. Species leave
// with the composition of the adjacent element: the diffusive flux is zero,
// linearised about the previous iterate (hats),
//
//	J_i.n = w^_i T + T^ sum_k (dw_i/dmu_k)^ (mu_k - mu^_k),   T = sum_j J_j.n,
//
// which is n-1 independent conditions per edge moment (the weights sum to
// one and their derivatives to zero). They are imposed in the weak sense
// against the edge's normal traces and replace the rows of all but one
// species. The remaining row is the Galerkin combination of the species
// rows in the direction the conditions leave free, J_i = P_i T with
// P_i = E^-1 W_i (E the edge mass matrix of the normal traces, W_i the one
// weighted with w^_i): in the continuum that is the test K_i = w_i K, in
// which the transport term vanishes (the kernel of the transport matrix)
// and the boundary datum states that the outgoing mixture is on the
// equation of state at the outlet pressure, through the boundary
// potentials
//
//	mu_i,b = F_i(mu_T),   F_i(mu) = mu_i(x(mu), P + S p_b),
//
// the potentials of the adjacent element's composition x(mu_T) at the
// outlet's thermodynamic pressure, linearised (no lag) about mu^. For the
// ideal gas dF_i/dmu_k = delta_ik - x_k; in general the Jacobian is taken by
// central differences of the closure. The outlet's velocity condition
// (normal traction, zero tangential velocity) is the traction condition
// with NoTangential.

// outflowEdge is an outflow edge seen from its triangle: the local edge,
// its length and outward normal, and the positions in the triangle's flux
// dofs of the basis functions with a normal trace on it.
type outflowEdge struct {
	t, local, edge, tag int
	length              float64
	normal              [2]float64
	dofs                []int
}

// outletData is the linearisation of the outflow condition about the
// previous iterate, per outflow edge o and edge quadrature point q (index
// o*nq+q; species index i, pairs i*n+k).
type outletData struct {
	ready bool
	// w are the mass fractions w^_i, a the derivatives dw_i/dmu_k.
	w, a []float64
	// dF is the Jacobian dF_i/dmu_k of the boundary potentials and cb the
	// constant part F_i(mu^) - sum_k dF_ik mu^_k.
	dF, cb []float64
	// mu are the previous potentials mu^_k; rho the density; total the
	// previous total normal mass flux T^; pb the outlet dynamic pressure.
	mu         []float64
	rho, total []float64
	pb         []float64
	// scratch holds the work arrays of outflowRows, reused across
	// assemblies.
	scratch outflowScratch
}

// outflowScratch is the reusable work space of outflowRows.
type outflowScratch struct {
	floats   scratchFloats
	piv      []int
	rows     [][]float64
	replaced []replacedRow
	sign     [1]float64
	rhs      [1]float64
	idx      [1]int
}

// replacedRow is a flux row of an outflow edge that replaces the row of
// the species' basis function a.
type replacedRow struct {
	species, a int
	row        []float64
	rhs        float64
}

// scratchFloats hands out zeroed slices from a buffer that is reset, not
// freed, between uses; once it has grown to the largest demand it
// allocates nothing.
type scratchFloats struct {
	buf  []float64
	used int
}

// take returns a zeroed slice of length k.
func (s *scratchFloats) take(k int) []float64 {
	if s.used+k > len(s.buf) {
		// A larger buffer; slices handed out earlier keep the old one.
		s.buf = make([]float64, max(2*len(s.buf), 2*k, 256))
		s.used = 0
	}
	r := s.buf[s.used : s.used+k : s.used+k]
	clear(r)
	s.used += k
	return r
}

// reset makes the whole buffer available again.
func (s *scratchFloats) reset() { s.used = 0 }

// collectOutflow lists the outflow edges and the flux dofs on each.
func (d *Discretisation) collectOutflow() error {
	p, m := d.prob, d.m
	ents := d.fluxEl.Entities()
	d.outflowOf = map[int][]int{}
	for _, t := range m.Tags() {
		bc := p.Boundary[t]
		if len(bc.Species) == 0 || bc.Species[0].Kind != SpeciesOutflow {
			continue
		}
		for _, e := range m.BoundaryEdges(t) {
			tri := m.EdgeTriangles[e][0]
			le, err := fem.LocalEdge(m, tri, e)
			if err != nil {
				return err
			}
			nrm, length := fem.OutwardNormal(m, e)
			oe := outflowEdge{t: tri, local: le, edge: e, tag: t, length: length, normal: nrm}
			for a, en := range ents {
				if en.Kind == fem.OnEdge && en.Index == le {
					oe.dofs = append(oe.dofs, a)
				}
			}
			if len(oe.dofs) == 0 {
				return fmt.Errorf("physics: outflow boundary %s: the flux element has no dofs on edge %d", tagLabel(m, t), e)
			}
			d.outflowOf[tri] = append(d.outflowOf[tri], len(d.outflow))
			d.outflow = append(d.outflow, oe)
		}
	}
	nq := d.fe.NQ
	no, n := len(d.outflow), d.n
	if no > 0 {
		d.out = outletData{
			w: make([]float64, no*nq*n), a: make([]float64, no*nq*n*n),
			dF: make([]float64, no*nq*n*n), cb: make([]float64, no*nq*n),
			mu: make([]float64, no*nq*n), rho: make([]float64, no*nq),
			total: make([]float64, no*nq), pb: make([]float64, no*nq),
		}
	}
	return nil
}

// HasOutflow reports whether the problem has outflow boundaries (which
// only the nonlinear iteration can solve).
func (d *Discretisation) HasOutflow() bool { return len(d.outflow) > 0 }

// errOutflowFrozen is returned by a frozen solve of a problem with outflow.
var errOutflowFrozen = errors.New("physics: outflow boundaries take the outgoing composition from the nonlinear iteration; a frozen solve cannot pose them (use SolveNonlinear, or give a composition)")

// outflowRows replaces, on triangle t, the rows of the flux dofs on its
// outflow edges by the outflow conditions: for each edge, the weak
// zero-diffusive-flux conditions of all species but the one with the
// largest mass fraction, and the Galerkin total-flux row in that species'
// place. It reads and clears those rows of the element blocks in d.w, which
// the caller then scatters as usual.
func (d *Discretisation) outflowRows(t int, af *fem.Affine) error {
	if !d.out.ready {
		return errOutflowFrozen
	}
	p, n := d.prob, d.n
	w := &d.w
	nv, np, nf, nm := w.nv, w.np, w.nf, w.nm
	nq := d.fe.NQ
	S := p.S
	sgn := 1.0
	if af.Det < 0 {
		sgn = -1
	}
	L := 2*nv + np + n*nf + n*nm
	colP := 2 * nv
	colJ := func(j int) int { return 2*nv + np + j*nf }
	colU := func(k int) int { return 2*nv + np + n*nf + k*nm }
	off := d.lay.Offset
	vd, pd, fd, ud := d.V.Dofs(t), d.P.Dofs(t), d.F.Dofs(t), d.U.Dofs(t)
	fs := d.F.Signs(t)
	ws := &d.out.scratch
	ws.floats.reset()
	take := ws.floats.take
	out := ws.replaced[:0]
	for _, o := range d.outflowOf[t] {
		oe := d.outflow[o]
		le, nl := oe.local, len(oe.dofs)
		N := d.fe.Normal[le]
		chi := d.ue.Value[le]
		// The original rows of every species on this edge, with the
		// boundary potential term of the total-flux datum added.
		rows := ws.rows[:0]
		rhs := take(n * nl)
		for i := 0; i < n; i++ {
			invM := 1 / p.Mixture.mass[i]
			for l, a := range oe.dofs {
				r := take(L)
				for c := 0; c < 2; c++ {
					copy(r[c*nv:(c+1)*nv], w.jv[c][a*nv:(a+1)*nv])
				}
				copy(r[colP:colP+np], w.jp[a*np:(a+1)*np])
				for j := 0; j < n; j++ {
					copy(r[colJ(j):colJ(j)+nf], w.jj[i*n+j][a*nf:(a+1)*nf])
				}
				for s := 0; s < nm; s++ {
					r[colU(i)+s] = w.ju[a*nm+s] * invM
				}
				if d.convection {
					for k := 0; k < n; k++ {
						for s := 0; s < nm; s++ {
							r[colU(k)+s] += w.juk[i*n+k][a*nm+s]
						}
					}
				}
				b := w.fj[i][a]
				// Boundary term -int (S p_b/rho - mu_i,b/M_i) K.n moved
				// to the left for its unknown part sum_k dF_ik mu_k.
				for q := 0; q < nq; q++ {
					pq := o*nq + q
					f := sgn * d.fe.W[q] * N[q*nf+a]
					if f == 0 {
						continue
					}
					for k := 0; k < n; k++ {
						g := f * d.out.dF[(pq*n+i)*n+k] * invM
						if g == 0 {
							continue
						}
						for s := 0; s < nm; s++ {
							r[colU(k)+s] += g * chi[q*nm+s]
						}
					}
					b += f * (S*d.out.pb[pq]/d.out.rho[pq] - d.out.cb[pq*n+i]*invM)
				}
				rows = append(rows, r) // index i*nl+l
				rhs[i*nl+l] = b
			}
		}
		// Edge mass matrices E and W_i of the normal traces.
		ws.rows = rows
		E := take(nl * nl)
		Wi := take(n * nl * nl)
		heavy, best := 0, -1.0
		for i := 0; i < n; i++ {
			var mean float64
			for q := 0; q < nq; q++ {
				mean += d.fe.W[q] * d.out.w[(o*nq+q)*n+i]
			}
			if mean > best {
				heavy, best = i, mean
			}
		}
		for m, am := range oe.dofs {
			for l, al := range oe.dofs {
				for q := 0; q < nq; q++ {
					v := d.fe.W[q] * N[q*nf+am] * N[q*nf+al]
					E[m*nl+l] += v
					for i := 0; i < n; i++ {
						Wi[(i*nl+m)*nl+l] += v * d.out.w[(o*nq+q)*n+i]
					}
				}
			}
		}
		// P_i = E^-1 W_i.
		Elu := take(nl * nl)
		copy(Elu, E)
		if cap(ws.piv) < nl {
			ws.piv = make([]int, nl)
		}
		piv := ws.piv[:nl]
		if !luFactor(Elu, nl, piv) {
			return fmt.Errorf("physics: outflow edge %d: singular edge mass matrix", oe.edge)
		}
		P := take(n * nl * nl)
		col := take(nl)
		for i := 0; i < n; i++ {
			for l := 0; l < nl; l++ {
				for m := 0; m < nl; m++ {
					col[m] = Wi[(i*nl+m)*nl+l]
				}
				luSolve(Elu, nl, piv, col)
				for m := 0; m < nl; m++ {
					P[(i*nl+m)*nl+l] = col[m]
				}
			}
		}
		for m, am := range oe.dofs {
			// The total-flux row: sum_i sum_l P_i[l][m] row_i^l.
			tr := take(L)
			var tb float64
			for i := 0; i < n; i++ {
				for l := 0; l < nl; l++ {
					c := P[(i*nl+l)*nl+m]
					if c == 0 {
						continue
					}
					for x, v := range rows[i*nl+l] {
						tr[x] += c * v
					}
					tb += c * rhs[i*nl+l]
				}
			}
			out = append(out, replacedRow{species: heavy, a: am, row: tr, rhs: tb})
			// The zero-diffusive-flux conditions of the other species.
			diag := E[m*nl+m]
			for i := 0; i < n; i++ {
				if i == heavy {
					continue
				}
				r := take(L)
				var b float64
				for l, al := range oe.dofs {
					r[colJ(i)+al] += E[m*nl+l] / diag
					for j := 0; j < n; j++ {
						r[colJ(j)+al] -= Wi[(i*nl+m)*nl+l] / diag
					}
				}
				for q := 0; q < nq; q++ {
					pq := o*nq + q
					f := -sgn * oe.length * d.fe.W[q] * d.out.total[pq] * N[q*nf+am] / diag
					if f == 0 {
						continue
					}
					for k := 0; k < n; k++ {
						g := f * d.out.a[(pq*n+i)*n+k]
						for s := 0; s < nm; s++ {
							r[colU(k)+s] += g * chi[q*nm+s]
						}
						b += g * d.out.mu[pq*n+k]
					}
				}
				out = append(out, replacedRow{species: i, a: am, row: r, rhs: b})
			}
		}
		// Clear the original rows; the shared blocks (velocity, pressure
		// and potential columns) carry the same row for every species,
		// and every species' row of these dofs is replaced.
		for _, a := range oe.dofs {
			for c := 0; c < 2; c++ {
				clear(w.jv[c][a*nv : (a+1)*nv])
			}
			clear(w.jp[a*np : (a+1)*np])
			clear(w.ju[a*nm : (a+1)*nm])
			for i := 0; i < n; i++ {
				for j := 0; j < n; j++ {
					clear(w.jj[i*n+j][a*nf : (a+1)*nf])
					if d.convection {
						clear(w.juk[i*n+j][a*nm : (a+1)*nm])
					}
				}
				w.fj[i][a] = 0
			}
		}
	}
	ws.replaced = out
	sign, idx, one := ws.sign[:], ws.idx[:], ws.rhs[:]
	for _, r := range out {
		idx[0] = fd[r.a]
		sign[0] = fs[r.a]
		row := off(blockJ0 + r.species)
		for c := 0; c < 2; c++ {
			d.sys.AddMatrix(row, idx, sign, off(blockVX+c), vd, nil, r.row[c*nv:(c+1)*nv])
		}
		d.sys.AddMatrix(row, idx, sign, off(blockP), pd, nil, r.row[colP:colP+np])
		for j := 0; j < n; j++ {
			d.sys.AddMatrix(row, idx, sign, off(blockJ0+j), fd, fs, r.row[colJ(j):colJ(j)+nf])
			d.sys.AddMatrix(row, idx, sign, off(blockJ0+n+j), ud, nil, r.row[colU(j):colU(j)+nm])
		}
		one[0] = r.rhs
		d.sys.AddVector(row, idx, sign, one)
	}
	return nil
}

// outletTotals writes the total outward normal mass flux sum_i J_i.n of sol
// at every outflow edge quadrature point (index o*nq+q) into dst.
func (d *Discretisation) outletTotals(dst []float64, sol *Solution) {
	nq := d.fe.NQ
	trace := make([]float64, nq)
	for o, oe := range d.outflow {
		tot := dst[o*nq : (o+1)*nq]
		clear(tot)
		for i := 0; i < d.n; i++ {
			d.edgeNormalFlux(trace, oe.t, oe.local, sol.Flux(i))
			for q, v := range trace {
				tot[q] += v / oe.length
			}
		}
	}
}

// setOutlet computes the outlet linearisation from the previous iterate:
// the projected potentials mu^ and pressure of the Picard state x and the
// total normal fluxes total (index o*nq+q).
func (pm *picard) setOutlet(x, total []float64) error {
	d := pm.d
	p, n := d.prob, d.n
	nq := d.fe.NQ
	nV := d.V.Len()
	pc := x[n*nV : n*nV+d.P.Len()]
	out := &d.out
	copy(out.total, total)
	mu := make([]float64, n)
	c := make([]float64, n)
	dc := make([]float64, n*n)
	F := make([]float64, n)
	Fp := make([]float64, n)
	Fm := make([]float64, n)
	nv, npr := d.V.LocalLen(), d.P.LocalLen()
	for o, oe := range d.outflow {
		vd, pd := d.V.Dofs(oe.t), d.P.Dofs(oe.t)
		vval, pval := d.ve.Value[oe.local], d.pe.Value[oe.local]
		bc := p.Boundary[oe.tag]
		af := fem.ElementMap(d.m, oe.t)
		for q := 0; q < nq; q++ {
			pq := o*nq + q
			for i := 0; i < n; i++ {
				blk := x[i*nV : (i+1)*nV]
				var v float64
				for a := 0; a < nv; a++ {
					v += blk[vd[a]] * vval[q*nv+a]
				}
				mu[i] = v
			}
			var ph float64
			for a := 0; a < npr; a++ {
				ph += pc[pd[a]] * pval[q*npr+a]
			}
			pabs := pm.p0 + p.S*ph
			if err := pm.closure.ConcentrationsTo(c, dc, nil, mu, pabs); err != nil {
				return err
			}
			var rho float64
			for i := 0; i < n; i++ {
				rho += p.Mixture.mass[i] * c[i]
			}
			out.rho[pq] = rho
			copy(out.mu[pq*n:(pq+1)*n], mu)
			for i := 0; i < n; i++ {
				wi := p.Mixture.mass[i] * c[i] / rho
				out.w[pq*n+i] = wi
				for k := 0; k < n; k++ {
					var s float64
					for j := 0; j < n; j++ {
						s += p.Mixture.mass[j] * dc[j*n+k]
					}
					out.a[(pq*n+i)*n+k] = (p.Mixture.mass[i]*dc[i*n+k] - wi*s) / rho
				}
			}
			pb := 0.0
			if bc.Pressure != nil {
				pb = bc.Pressure(af.Point(d.fe.Ref[oe.local][q]))
			}
			out.pb[pq] = pb
			pout := pm.p0 + p.S*pb
			if err := pm.boundaryPotentials(F, mu, pabs, pout, c); err != nil {
				return err
			}
			// Central differences of F in each potential.
			for k := 0; k < n; k++ {
				h := 1e-5 * math.Max(1, math.Abs(mu[k]))
				save := mu[k]
				mu[k] = save + h
				if err := pm.boundaryPotentials(Fp, mu, pabs, pout, c); err != nil {
					return err
				}
				mu[k] = save - h
				if err := pm.boundaryPotentials(Fm, mu, pabs, pout, c); err != nil {
					return err
				}
				mu[k] = save
				for i := 0; i < n; i++ {
					out.dF[(pq*n+i)*n+k] = (Fp[i] - Fm[i]) / (2 * h)
				}
			}
			for i := 0; i < n; i++ {
				cb := F[i]
				for k := 0; k < n; k++ {
					cb -= out.dF[(pq*n+i)*n+k] * mu[k]
				}
				out.cb[pq*n+i] = cb
			}
		}
	}
	out.ready = true
	return nil
}

// boundaryPotentials writes F(mu) = mu(x(mu, p), pout) into dst: the
// potentials of the composition that mu has at pressure p, moved to the
// outlet pressure pout on the equation of state. c is scratch.
func (pm *picard) boundaryPotentials(dst, mu []float64, p, pout float64, c []float64) error {
	if err := pm.closure.ConcentrationsTo(c, nil, nil, mu, p); err != nil {
		return err
	}
	var cT float64
	for _, v := range c {
		cT += v
	}
	for i := range c {
		c[i] /= cT
	}
	return pm.closure.PotentialsTo(dst, c, pout)
}

// initialOutletTotals writes a first guess of the total normal mass flux at
// the outflow quadrature points into x's outlet block: the mass that the
// other boundaries' data bring in, spread evenly over the outflow length.
// When every species has flux data on every other boundary, that mass is
// exact (the sum of the prescribed species fluxes); otherwise it is the
// prescribed volume inflow times the initial density at the outlet, plus
// the mass that Stefan walls with flux data for every species bring in.
// The first step needs T^ != 0: with T^ = 0 the outflow conditions do not
// see the potentials, whose levels are then undetermined (an inlet of given
// mass fluxes next to a composition boundary, counted as no inflow, sent
// the levels of two species to -3426 and 6850 RT in the first step of the
// channel benchmark).
func (pm *picard) initialOutletTotals(x []float64) error {
	d := pm.d
	p, m := d.prob, d.m
	if len(d.outflow) == 0 {
		return nil
	}
	rule, err := fem.NewEdgeRule(2*d.k + 8)
	if err != nil {
		return err
	}
	allFlux := true
	// massIn is the mass all flux data bring in, massStefan the part of it
	// that enters through Stefan walls with flux data for every species
	// (inlets of given mass fluxes, whose velocity is not given).
	var massIn, massStefan, volIn, outLength float64
	for _, e := range m.BoundaryEdges(0) {
		bc := p.Boundary[m.EdgeTags[e]]
		nrm, length := fem.OutwardNormal(m, e)
		if bc.Species[0].Kind == SpeciesOutflow {
			outLength += length
			continue
		}
		stefanData := fluxInlet(bc)
		a, b := m.Points[m.Edges[e][0]], m.Points[m.Edges[e][1]]
		for q, s := range rule.Points {
			xq := [2]float64{a[0] + s*(b[0]-a[0]), a[1] + s*(b[1]-a[1])}
			W := rule.Weights[q] * length
			if bc.Velocity.Kind == VelocityGiven && bc.Velocity.Velocity != nil {
				v := bc.Velocity.Velocity(xq)
				volIn -= W * (v[0]*nrm[0] + v[1]*nrm[1])
			}
			for _, sc := range bc.Species {
				switch {
				case sc.Kind != SpeciesFlux:
					allFlux = false
				case sc.Flux != nil:
					f := W * sc.Flux(xq, nrm)
					massIn -= f
					if stefanData {
						massStefan -= f
					}
				}
			}
		}
	}
	if err := pm.setOutlet(x, x[pm.outletOffset():]); err != nil {
		return err
	}
	d.out.ready = false
	tot := x[pm.outletOffset():pm.previousOffset()]
	for pq := range tot {
		t := (volIn*d.out.rho[pq] + massStefan) / outLength
		if allFlux {
			t = massIn / outLength
		}
		tot[pq] = t
	}
	return nil
}

// OutflowBackflow returns, for every outflow tag, the largest inward total
// normal mass flux on it relative to the mean outward one (0 when the
// mixture leaves everywhere): an outflow boundary through which the mixture
// enters has no composition data for what enters, and the result there is
// not to be trusted.
func (d *Discretisation) OutflowBackflow(sol *Solution) map[int]float64 {
	if len(d.outflow) == 0 {
		return nil
	}
	nq := d.fe.NQ
	tot := make([]float64, len(d.outflow)*nq)
	d.outletTotals(tot, sol)
	worst := map[int]float64{}
	mean := map[int]float64{}
	length := map[int]float64{}
	for o, oe := range d.outflow {
		for q := 0; q < nq; q++ {
			t := tot[o*nq+q]
			mean[oe.tag] += d.fe.W[q] * oe.length * t
			worst[oe.tag] = math.Max(worst[oe.tag], -t)
		}
		length[oe.tag] += oe.length
	}
	out := map[int]float64{}
	for tag, w := range worst {
		m := mean[tag] / length[tag]
		switch {
		case w <= 0:
			out[tag] = 0
		case m > 0:
			out[tag] = w / m
		default:
			out[tag] = math.Inf(1)
		}
	}
	return out
}
