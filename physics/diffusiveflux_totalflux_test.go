package physics

import (
	"math"
	"strings"
	"testing"

	"mixwell/fem"
)

// elementDefects returns, per species, the largest element balance defect
// |int_T div J_i,h - M_i int_T r_i| of a total-flux solution, relative to
// the largest flux through an element's boundary (the measure of
// Diagnose.Conservation, species by species).
func elementDefects(d *Discretisation, sol *Solution) []float64 {
	n, nf := d.n, d.F.LocalLen()
	worst := make([]float64, n)
	scale := make([]float64, n)
	r := make([]float64, n)
	for t := 0; t < d.m.NumTriangles(); t++ {
		af := fem.ElementMap(d.m, t)
		d.fq.Reinit(&af)
		fd, fs := d.F.Dofs(t), d.F.Signs(t)
		perArea := trianglePerimeter(d.m, t) / (0.5 * af.AbsDet())
		for i := 0; i < n; i++ {
			jc := sol.Flux(i)
			var div, prod, size float64
			for q := 0; q < d.fq.NQ; q++ {
				W := d.fq.W[q]
				clear(r)
				if src := d.prob.Source; src != nil && src.Production != nil {
					src.Production(r, d.fq.X[q])
				}
				var dv float64
				var jv [2]float64
				for b := 0; b < nf; b++ {
					c := fs[b] * jc[fd[b]]
					dv += c * d.fq.Div[q*nf+b]
					jv[0] += c * d.fq.Val[q*nf+b][0]
					jv[1] += c * d.fq.Val[q*nf+b][1]
				}
				div += W * dv
				prod += W * d.prob.Mixture.mass[i] * r[i]
				size += W * math.Hypot(jv[0], jv[1])
			}
			worst[i] = math.Max(worst[i], math.Abs(div-prod))
			scale[i] = math.Max(scale[i], size*perArea)
		}
	}
	for i := range worst {
		worst[i] /= scale[i]
	}
	return worst
}

func TestDiffusiveFluxTotalFlux(t *testing.T) {
	// The conversion of a nonlinear diffusive-flux solution into the
	// total-flux layout, on the mixing channel with the mass-flux inlet
	// (16 x 4 cells, k = 1), with the total-flux discretisation of the
	// same problem. Checked:
	//   - the element balances of the first n-1 species: the commuting
	//     interpolation reproduces the continuity rows of the step, up to
	//     the assembly's quadrature of div(rho_i v) (rho_i is not a
	//     polynomial); the domain balance of Diagnose likewise;
	//   - the outward mass flows of every species through every boundary
	//     against DiffusiveFluxSolution.BoundaryMassFlow;
	//   - the concentrations that the converted potentials give through
	//     the closure against those of the final state. They differ by the
	//     projections (the state holds m_i projected onto the velocity
	//     space, the conversion mu_i projected onto the discontinuous
	//     space), which is O(h^(k+1)).
	// Measured: element defects 2.2e-14 and 1.1e-13 (the last species,
	// not conserved element by element with Taylor–Hood, 8.1e-4, as for
	// DiffusiveFluxSolution.Conservation); domain balance 1.3e-13; flows
	// within 9.9e-14 of the largest; concentrations within 8.1e-3
	// relative (at the inlet corner), 8.7e-4 root mean square, and 3.6e-3
	// and 2.2e-4 on 32 x 8 cells (a factor 4 in the mean: second order);
	// the iteration records one history row per iteration.
	const (
		elementTol = 1e-11 // element defects of the species i < n
		balanceTol = 1e-11 // Diagnose's domain balance
		flowTol    = 1e-12 // boundary flows, relative to the largest
		concTol    = 2e-2  // concentrations, largest relative difference
		concRMSTol = 2e-3  // concentrations, root-mean-square relative difference
	)
	prob, gas, mean := mixingChannel(t, 16, 4, 5, 1e-7, true)
	dc, err := NewDiffusiveFlux(prob)
	if err != nil {
		t.Fatal(err)
	}
	var records int
	sol, rep, err := dc.SolveNonlinear(&DiffusiveFluxSettings{Gas: gas, Pressure0: 1, Initial: mean,
		Record: func(IterationRecord) { records++ }})
	if err != nil {
		t.Fatal(err)
	}
	if records != rep.Iterations || len(rep.History) != rep.Iterations || rep.Evaluations <= rep.Iterations {
		t.Errorf("%d records, %d in the history, %d evaluations for %d iterations; want one record per iteration and more evaluations than iterations",
			records, len(rep.History), rep.Evaluations, rep.Iterations)
	}
	td, err := NewDiscretisation(prob)
	if err != nil {
		t.Fatal(err)
	}
	conv, err := sol.TotalFlux(td)
	if err != nil {
		t.Fatal(err)
	}
	defects := elementDefects(td, conv)
	for i := 0; i < 2; i++ {
		if !(defects[i] < elementTol) {
			t.Errorf("species %d: element defect %.3g, want < %g", i, defects[i], elementTol)
		}
	}
	dg := td.Diagnose(conv)
	if !(dg.Balance < balanceTol) {
		t.Errorf("domain balance %.3g, want < %g", dg.Balance, balanceTol)
	}
	var big, worstFlow float64
	for _, tag := range prob.Mesh.Tags() {
		for _, v := range dg.BoundaryFlux[tag] {
			big = math.Max(big, math.Abs(v))
		}
	}
	for _, tag := range prob.Mesh.Tags() {
		want, err := sol.BoundaryMassFlow(tag)
		if err != nil {
			t.Fatal(err)
		}
		for i, w := range want {
			got := dg.BoundaryFlux[tag][i]
			e := math.Abs(got-w) / big
			worstFlow = math.Max(worstFlow, e)
			if !(e < flowTol) {
				t.Errorf("boundary %d, species %d: converted flow %.12g, diffusive-flux %.12g", tag, i, got, w)
			}
		}
	}
	// Concentrations at four points inside every triangle.
	st := sol.field.(*diffusiveState)
	n := prob.Mixture.Len()
	mu := make([]float64, n)
	cConv := make([]float64, n)
	cState := make([]float64, n)
	gc := make([][2]float64, n)
	var worstC, sumSq float64
	var count int
	for tri := 0; tri < prob.Mesh.NumTriangles(); tri++ {
		af := fem.ElementMap(prob.Mesh, tri)
		for _, xh := range [][2]float64{{1.0 / 3, 1.0 / 3}, {0.1, 0.2}, {0.7, 0.15}, {0.2, 0.75}} {
			for i := 0; i < n; i++ {
				mu[i], _ = fem.ScalarAt(td.U, conv.Potential(i), tri, xh)
			}
			p, _ := fem.ScalarAt(td.P, conv.Pressure(), tri, xh)
			if err := gas.ConcentrationsTo(cConv, nil, nil, mu, 1+prob.S*p); err != nil {
				t.Fatal(err)
			}
			if err := st.at(tri, af.Point(xh), cState, gc); err != nil {
				t.Fatal(err)
			}
			for i := 0; i < n; i++ {
				e := math.Abs(cConv[i]-cState[i]) / cState[i]
				worstC = math.Max(worstC, e)
				sumSq += e * e
				count++
			}
		}
	}
	rms := math.Sqrt(sumSq / float64(count))
	if !(worstC < concTol) || !(rms < concRMSTol) {
		t.Errorf("concentrations from the converted potentials differ from the state's by %.3g relative (%.3g root mean square), want < %g (%g)",
			worstC, rms, concTol, concRMSTol)
	}
	t.Logf("%d iterations; element defects %.2g %.2g %.2g; domain balance %.2g; flows within %.2g; concentrations within %.2g (rms %.2g); mass average %.2g",
		rep.Iterations, defects[0], defects[1], defects[2], dg.Balance, worstFlow, worstC, rms, dg.MassAverage)
}

func TestDiffusiveFluxTotalFluxRefuses(t *testing.T) {
	// TotalFlux needs a nonlinear solution and matching spaces.
	prob, gas, mean := mixingChannel(t, 4, 2, 5, 1e-7, true)
	dc, err := NewDiffusiveFlux(prob)
	if err != nil {
		t.Fatal(err)
	}
	sol, _, err := dc.SolveNonlinear(&DiffusiveFluxSettings{Gas: gas, Pressure0: 1, Initial: mean})
	if err != nil {
		t.Fatal(err)
	}
	other, _, _ := mixingChannel(t, 4, 2, 5, 1e-7, true)
	degree2 := *prob
	degree2.Degree = 2
	rt := *prob
	rt.Flux = RTFlux
	for _, tc := range []struct {
		name string
		prob *Problem
		want string
	}{
		{"another mesh", other, "another mesh"},
		{"another degree", &degree2, "degree 2"},
		{"another flux family", &rt, "flux elements differ"},
	} {
		td, err := NewDiscretisation(tc.prob)
		if err != nil {
			t.Fatal(err)
		}
		if _, err := sol.TotalFlux(td); err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: error %v, want one saying %q", tc.name, err, tc.want)
		}
	}
	frozen, err := dc.SolveFrozen(func(x [2]float64, c []float64, gc [][2]float64) {
		copy(c, []float64{0.4, 0.4, 0.2})
		clear(gc)
	})
	if err != nil {
		t.Fatal(err)
	}
	td, err := NewDiscretisation(prob)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := frozen.TotalFlux(td); err == nil || !strings.Contains(err.Error(), "SolveNonlinear") {
		t.Errorf("frozen step: error %v, want one naming SolveNonlinear", err)
	}
}
