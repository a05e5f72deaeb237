package physics

import (
	"math"

	"mixwell/fem"
	"mixwell/mesh"
)

// Diagnostics are the checks a run reports after a solve (formulation note,
// sections 3, 8 and 9), in the problem's scaled units.
type Diagnostics struct {
	// MassAverage is ||v - sum_i J_i/rho||_L2 relative to the largest of
	// ||v||_L2 and ||J_i/rho||_L2 (see MassAverageResidual).
	MassAverage float64
	// Conservation is the largest element defect
	// |int_T div J_i - M_i int_T r_i| over triangles and species, relative
	// to the largest flux through an element's boundary, estimated as
	// (int_T |J_i| dx) |dT| / |T| (absolute when every flux is zero).
	Conservation float64
	// BoundaryFlux[tag][i] is the outward mass flux of species i through
	// the boundary segment with that tag, int J_i . n ds.
	BoundaryFlux map[int][]float64
	// Production[i] is M_i int r_i dx, the mass produced inside.
	Production []float64
	// Balance is the largest |sum_tags BoundaryFlux[tag][i] - Production[i]|
	// relative to the largest boundary flux of any species (absolute when
	// every flux is zero).
	Balance float64
}

// Diagnose computes the diagnostics of sol.
func (d *Discretisation) Diagnose(sol *Solution) Diagnostics {
	p, n, m := d.prob, d.n, d.m
	w := &d.w
	nf := w.nf
	dg := Diagnostics{
		MassAverage:  d.MassAverageResidual(sol),
		BoundaryFlux: make(map[int][]float64),
		Production:   make([]float64, n),
	}
	var worst, scale float64
	r := make([]float64, n)
	divs := make([]float64, n)
	prods := make([]float64, n)
	sizes := make([]float64, n)
	for t := 0; t < m.NumTriangles(); t++ {
		af := fem.ElementMap(m, t)
		d.fq.Reinit(&af)
		fd, fs := d.F.Dofs(t), d.F.Signs(t)
		clear(divs)
		clear(prods)
		clear(sizes)
		for q := 0; q < d.fq.NQ; q++ {
			W := d.fq.W[q]
			clear(r)
			if p.Source != nil && p.Source.Production != nil {
				p.Source.Production(r, d.fq.X[q])
			}
			dv := d.fq.Div[q*nf : (q+1)*nf]
			fv := d.fq.Val[q*nf : (q+1)*nf]
			for i := 0; i < n; i++ {
				jc := sol.Flux(i)
				var v float64
				var jv [2]float64
				for b := 0; b < nf; b++ {
					c := fs[b] * jc[fd[b]]
					v += c * dv[b]
					jv[0] += c * fv[b][0]
					jv[1] += c * fv[b][1]
				}
				divs[i] += W * v
				prods[i] += W * p.Mixture.mass[i] * r[i]
				sizes[i] += W * math.Hypot(jv[0], jv[1])
			}
		}
		perArea := trianglePerimeter(m, t) / (0.5 * af.AbsDet())
		for i := 0; i < n; i++ {
			worst = math.Max(worst, math.Abs(divs[i]-prods[i]))
			scale = math.Max(scale, sizes[i]*perArea)
			dg.Production[i] += prods[i]
		}
	}
	dg.Conservation = worst
	if scale > 0 {
		dg.Conservation /= scale
	}
	for _, tag := range m.Tags() {
		dg.BoundaryFlux[tag] = make([]float64, n)
	}
	trace := make([]float64, d.fe.NQ)
	for _, be := range d.bnd {
		for i := 0; i < n; i++ {
			d.edgeNormalFlux(trace, be.t, be.local, sol.Flux(i))
			var v float64
			for q, tq := range trace {
				v += d.fe.W[q] * tq
			}
			dg.BoundaryFlux[be.tag][i] += v
		}
	}
	// The balance is relative to the largest boundary flux of any species,
	// so that a species with (nearly) no flux does not divide by rounding.
	var big float64
	for _, f := range dg.BoundaryFlux {
		for _, v := range f {
			big = math.Max(big, math.Abs(v))
		}
	}
	for i := 0; i < n; i++ {
		var total float64
		for _, f := range dg.BoundaryFlux {
			total += f[i]
		}
		def := math.Abs(total - dg.Production[i])
		if big > 0 {
			def /= big
		}
		dg.Balance = math.Max(dg.Balance, def)
	}
	return dg
}

// edgeNormalFlux writes into dst, at each edge quadrature point q, the
// outward normal component of the flux field with coefficients coef on the
// local edge of triangle t, times the edge length (so that sum_q W_q dst[q]
// is the flux through the edge). The Piola map makes the normal trace of
// each basis function constant along the physical edge up to this length
// factor, with the sign of the map's determinant.
func (d *Discretisation) edgeNormalFlux(dst []float64, t, local int, coef []float64) {
	nf := d.F.LocalLen()
	sgn := 1.0
	if af := fem.ElementMap(d.m, t); af.Det < 0 {
		sgn = -1
	}
	fd, fs := d.F.Dofs(t), d.F.Signs(t)
	N := d.fe.Normal[local]
	for q := range dst[:d.fe.NQ] {
		var v float64
		for b := 0; b < nf; b++ {
			v += N[q*nf+b] * fs[b] * coef[fd[b]]
		}
		dst[q] = sgn * v
	}
}

// MassAverageResidual returns ||v - sum_i J_i/rho||_L2 relative to the
// largest of ||v||_L2 and ||J_i/rho||_L2 over the species (absolute when all
// vanish), with rho from the frozen concentrations of sol. The species
// terms keep the measure meaningful where the mixture barely moves while
// its species diffuse.
func (d *Discretisation) MassAverageResidual(sol *Solution) float64 {
	defect, v, species := d.MassAverageNorms(sol)
	den := math.Max(v, species)
	if den == 0 {
		return defect
	}
	return defect / den
}

// MassAverageNorms returns ||v - sum_i J_i/rho||_L2, ||v||_L2 and the
// largest ||J_i/rho||_L2 over the species, with rho from the frozen
// concentrations of sol (NaN when sol has none).
func (d *Discretisation) MassAverageNorms(sol *Solution) (defect, velocity, species float64) {
	nan := math.NaN()
	if sol.frozen == nil {
		return nan, nan, nan
	}
	m, n := d.m, d.n
	w := &d.w
	nv, nf := w.nv, w.nf
	vx, vy := sol.Velocity(0), sol.Velocity(1)
	var num, den float64
	spec := make([]float64, n) // ||J_i/rho||^2
	for t := 0; t < m.NumTriangles(); t++ {
		af := fem.ElementMap(m, t)
		d.vq.Reinit(&af)
		d.pq.Reinit(&af)
		d.fq.Reinit(&af)
		if err := sol.frozen.concentrationsTo(w.c, w.gc, t, &af, 0); err != nil {
			return nan, nan, nan
		}
		vd, fd, fs := d.V.Dofs(t), d.F.Dofs(t), d.F.Signs(t)
		for q := 0; q < d.vq.NQ; q++ {
			var v [2]float64
			phi := d.vq.Val[q*nv : (q+1)*nv]
			for a := 0; a < nv; a++ {
				v[0] += vx[vd[a]] * phi[a]
				v[1] += vy[vd[a]] * phi[a]
			}
			var rho float64
			for i := 0; i < n; i++ {
				rho += d.prob.Mixture.mass[i] * w.c[q*n+i]
			}
			e := v
			fv := d.fq.Val[q*nf : (q+1)*nf]
			W := d.vq.W[q]
			for i := 0; i < n; i++ {
				jc := sol.Flux(i)
				var ji [2]float64
				for b := 0; b < nf; b++ {
					co := fs[b] * jc[fd[b]] / rho
					ji[0] += co * fv[b][0]
					ji[1] += co * fv[b][1]
				}
				e[0] -= ji[0]
				e[1] -= ji[1]
				spec[i] += W * (ji[0]*ji[0] + ji[1]*ji[1])
			}
			num += W * (e[0]*e[0] + e[1]*e[1])
			den += W * (v[0]*v[0] + v[1]*v[1])
		}
	}
	var sp float64
	for _, v := range spec {
		sp = math.Max(sp, v)
	}
	return math.Sqrt(num), math.Sqrt(den), math.Sqrt(sp)
}

// trianglePerimeter returns the perimeter of triangle t of m.
func trianglePerimeter(m *mesh.Mesh, t int) float64 {
	tri := m.Triangles[t]
	var l float64
	for a := 0; a < 3; a++ {
		p, q := m.Points[tri[a]], m.Points[tri[(a+1)%3]]
		l += math.Hypot(q[0]-p[0], q[1]-p[1])
	}
	return l
}
