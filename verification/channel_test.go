package verification

import (
	"math"
	"os"
	"strings"
	"testing"
)

// TestChannelFlowThrough runs the flow-through channel benchmark (an
// invented scenario, see channel.go): parabolic inflow of three gases at
// U H / D_BC = 6.25 and S = 2.2e-8, a patch of the bottom wall that
// releases A (Stefan wall, fixed x_A), outflow on the right, on tensor
// grids power-graded (exponent 3) toward the patch ends.
//
// CI runs degree 1 on 4 and 8 rows. Measured (2026-12-02, beta auto =
// 0.3): 34 and 36 Anderson iterations, ||v - sum J/rho|| / ||v|| 6.8e-3
// and 2.6e-3, patch flux 8.806e-4 and 8.944e-4 mol/(s m) (change 1.5 %).
// MIXWELL_LONG=1 runs the acceptance levels of the flow-through issue
// (degrees 1 and 2 on 4, 8, 16 rows) with its
// thresholds: balance < 1e-10, mass average < 1e-3 and falling,
// truncation < 2e-3, patch flux change < 1 %. Measured at degree 1: mass
// average 6.8e-3, 2.6e-3, 9.4e-4; truncation 8.5e-4; patch flux change
// 0.42 %; 34, 36, 41 iterations; balance 8.6e-15; about 10 minutes on one
// core. With beta = 1 the degree-2 patch flux changed by 1.09 % and
// missed the threshold (docs/augmentation.md).
func TestChannelFlowThrough(t *testing.T) {
	type check struct {
		degree, coarse, levels int
		massAverage, change    float64 // upper bounds
		truncation             bool
	}
	cases := []check{{degree: 1, coarse: 4, levels: 2, massAverage: 3e-3, change: 5e-2}}
	if os.Getenv("MIXWELL_LONG") != "" {
		cases = []check{
			{degree: 1, coarse: 4, levels: 3, massAverage: 1e-3, change: 1e-2, truncation: true},
			{degree: 2, coarse: 4, levels: 3, massAverage: 1e-3, change: 1e-2, truncation: true},
		}
	} else if testing.Short() {
		t.Skip("channel benchmark skipped in -short mode")
	}
	for _, c := range cases {
		st, err := RunChannel(ChannelConfig{Degree: c.degree, Levels: c.levels, Coarse: c.coarse, NoTruncation: !c.truncation})
		if err != nil {
			t.Fatalf("degree %d: %v", c.degree, err)
		}
		t.Logf("degree %d: rows %v, unknowns %v, iterations %v, balance %.2g, mass average %.3g, patch flux %.6g (change %.3g), truncation %.3g",
			c.degree, st.Rows, st.Unknowns, st.Iterations, st.Balance, st.MassAverageLevels, st.PatchFlux, st.PatchFluxChange, st.Truncation)
		for l, ok := range st.Converged {
			if !ok {
				t.Errorf("degree %d, %d rows: not converged in %d iterations", c.degree, st.Rows[l], st.Iterations[l])
			}
		}
		if !(st.Balance < 1e-10) {
			t.Errorf("degree %d: species balance %.3g, want < 1e-10", c.degree, st.Balance)
		}
		ma := st.MassAverageLevels
		for l := 1; l < len(ma); l++ {
			if !(ma[l] < ma[l-1]) {
				t.Errorf("degree %d: mass-average defect does not fall: %v", c.degree, ma)
			}
		}
		if !(st.MassAverage < c.massAverage) {
			t.Errorf("degree %d: mass-average defect %.3g on the finest level, want < %g", c.degree, st.MassAverage, c.massAverage)
		}
		if !(st.PatchFluxChange < c.change) || math.IsNaN(st.PatchFluxChange) {
			t.Errorf("degree %d: patch flux changes by %.3g between the finest levels, want < %g", c.degree, st.PatchFluxChange, c.change)
		}
		if c.truncation && !(st.Truncation < 2e-3) {
			t.Errorf("degree %d: truncation %.3g, want < 2e-3", c.degree, st.Truncation)
		}
	}
}

func TestChannelLines(t *testing.T) {
	// Power grading toward the patch ends: as many lines as the uniform
	// grid, increasing, through every breakpoint, with the first spacing
	// next to a singular breakpoint w (1/m)^beta (w = m/rows the window,
	// m its uniform cell count), and uniform spacing away from them.
	for _, tc := range []struct {
		rows int
		beta float64
	}{{4, 3}, {8, 2}, {16, 3}, {2, 1}} {
		xs := channelLines([]float64{0, 1, 2, 4}, []bool{false, true, true, false}, tc.rows, tc.beta)
		if len(xs) != 4*tc.rows+1 {
			t.Errorf("rows %d: %d lines, want %d", tc.rows, len(xs), 4*tc.rows+1)
			continue
		}
		for i := 1; i < len(xs); i++ {
			if !(xs[i] > xs[i-1]) {
				t.Fatalf("rows %d: lines not increasing at %d: %v", tc.rows, i, xs)
			}
		}
		for _, b := range []int{0, tc.rows, 2 * tc.rows, 4 * tc.rows} {
			if xs[b] != float64(b)/float64(tc.rows) {
				t.Errorf("rows %d: line %d at %g, want breakpoint %g", tc.rows, b, xs[b], float64(b)/float64(tc.rows))
			}
		}
		m := math.Round(channelWindow * float64(tc.rows))
		w := m / float64(tc.rows)
		want := w * math.Pow(1/m, tc.beta)
		for _, d := range []float64{xs[tc.rows+1] - xs[tc.rows], xs[tc.rows] - xs[tc.rows-1], xs[2*tc.rows] - xs[2*tc.rows-1]} {
			if math.Abs(d-want) > 1e-12 {
				t.Errorf("rows %d, beta %g: spacing at a patch end %g, want %g", tc.rows, tc.beta, d, want)
			}
		}
		if d := xs[4*tc.rows] - xs[4*tc.rows-1]; math.Abs(d-1/float64(tc.rows)) > 1e-12 {
			t.Errorf("rows %d: spacing at the outlet %g, want uniform %g", tc.rows, d, 1/float64(tc.rows))
		}
	}
}

func TestChannelPatchHoldsItsMoleFraction(t *testing.T) {
	// The patch gives x_A = 0.4 with B and C impermeable. Under
	// ideal-gas-at-pressure in a flow-through case the datum is imposed
	// relative to the potentials' level (physics.SpeciesCondition.Relative),
	// so the wall mole fraction must be 0.4 up to the weak imposition on
	// 4 rows. Measured (2026-12-02): 0.4009 at x = 1.5 H. With the
	// absolute datum it was 0.366 (0.344 in the 6-height channel), and
	// with the plain ideal gas 0.390 (docs/outflow.md).
	if testing.Short() {
		t.Skip("short mode")
	}
	o, err := solveChannel(ChannelConfig{Degree: 1, Thermodynamics: "ideal-gas-at-pressure"}, 4, channelLength)
	if err != nil {
		t.Fatal(err)
	}
	pt := o.NewPoint()
	for _, xf := range []float64{1.25, 1.5, 1.75} {
		x := [2]float64{xf * channelHeight, 1e-6 * channelHeight}
		tri, xh, ok := o.Locate(x)
		if !ok {
			t.Fatalf("point %v not in the mesh", x)
		}
		o.SampleTo(pt, tri, xh)
		if d := math.Abs(pt.MoleFraction[0] - 0.4); !(d < 3e-3) {
			t.Errorf("x_A = %.5f at x = %g H on the patch, want 0.4 within 3e-3", pt.MoleFraction[0], xf)
		}
		t.Logf("x_A = %.5f at x = %g H", pt.MoleFraction[0], xf)
	}
}

func TestChannelLowPeclet(t *testing.T) {
	// The channel at a mean speed of 0.05 m/s (Peclet number 0.31), degree
	// 1 (docs/augmentation.md, "Slow flow and the inlet"). Diffusion then
	// reaches the inlet (x_A at its centre rises from the inflow's 0.1 to
	// 0.31), so the default inlet, which gives both the velocity and the
	// species fluxes, contradicts v = sum J/rho: the total-flux solution
	// must say so (measured mass-average defect 0.11 and 0.072 on 2 and 4
	// rows). The mass-flux inlet (parabolic species mass fluxes on a
	// Stefan wall) is consistent, and there the two formulations must
	// agree: measured patch flux 9.6859e-5 / 9.7375e-5 (total-flux, 18 / 22
	// iterations, defect 2.0e-2 / 6.7e-3) against 9.7356e-5 / 9.7554e-5
	// mol/(s m) (diffusive-flux, 15 / 20, defect 9.9e-5 / 1.9e-5) on 4 / 8
	// rows, 0.18 % apart on 8. Before the total-flux iteration counted the
	// mass such an inlet brings in when it guesses the first outflow, its
	// first step left the potential levels of B and C undetermined and it
	// failed at once.
	if testing.Short() {
		t.Skip("channel benchmark skipped in -short mode")
	}
	const speed = 0.05
	v, err := RunChannel(ChannelConfig{Degree: 1, Levels: 2, Coarse: 2, NoTruncation: true, MeanSpeed: speed})
	if err != nil {
		t.Fatalf("velocity inlet: %v", err)
	}
	t.Logf("velocity inlet, total-flux: Peclet %.3g, mass average %.3g, patch flux %.6g", v.Peclet, v.MassAverageLevels, v.PatchFlux)
	if math.Abs(v.Peclet-0.3125) > 1e-12 || v.Inlet != VelocityInlet || v.Formulation != "total-flux" {
		t.Errorf("Peclet number %g, inlet %q, formulation %q; want 0.3125, %q, total-flux", v.Peclet, v.Inlet, v.Formulation, VelocityInlet)
	}
	if len(v.Warnings) != len(v.Rows) {
		t.Errorf("velocity inlet: %d warnings on %d levels (mass average %v), want one per level", len(v.Warnings), len(v.Rows), v.MassAverageLevels)
	}
	for _, w := range v.Warnings {
		if !strings.Contains(w, "mass-average defect") || !strings.Contains(w, "convective-inflow") {
			t.Errorf("velocity inlet: warning %q names neither the defect nor the inlet data", w)
		}
	}

	c, err := RunChannel(ChannelConfig{Degree: 1, Levels: 2, NoTruncation: true, MeanSpeed: speed, Inlet: MassFluxInlet, Formulation: "diffusive-flux"})
	if err != nil {
		t.Fatalf("mass-flux inlet, diffusive-flux: %v", err)
	}
	b, err := RunChannel(ChannelConfig{Degree: 1, Levels: 2, NoTruncation: true, MeanSpeed: speed, Inlet: MassFluxInlet})
	if err != nil {
		t.Fatalf("mass-flux inlet, total-flux: %v", err)
	}
	for _, st := range []*ChannelStudy{c, b} {
		t.Logf("mass-flux inlet, %s: iterations %v, balance %.2g, mass average %.3g, patch flux %.6g",
			st.Formulation, st.Iterations, st.Balance, st.MassAverageLevels, st.PatchFlux)
		for l, ok := range st.Converged {
			if !ok {
				t.Errorf("%s, %d rows: not converged", st.Formulation, st.Rows[l])
			}
		}
		if st.Inlet != MassFluxInlet {
			t.Errorf("%s: inlet %q", st.Formulation, st.Inlet)
		}
		// Diffusive-flux sets the inlet's normal velocity sum J.n / rho
		// from the state's density, so its balance closes only to the
		// iteration's tolerance, 1e-10 (measured 2.1e-10, against 3.7e-15
		// for total-flux, whose fluxes are the unknowns).
		if limit := map[string]float64{"total-flux": 1e-10, "diffusive-flux": 1e-9}[st.Formulation]; !(st.Balance < limit) {
			t.Errorf("%s: species balance %.3g, want < %g", st.Formulation, st.Balance, limit)
		}
		if ma := st.MassAverageLevels; !(ma[1] < ma[0]/2) {
			t.Errorf("%s: mass-average defect %v, want it at least halved", st.Formulation, ma)
		}
	}
	if c.Beta != 0 || b.Beta != 0.3 {
		t.Errorf("beta %g (diffusive-flux) and %g (total-flux), want 0 (not used) and 0.3 (flow-through default)", c.Beta, b.Beta)
	}
	if !(c.MassAverage < 1e-4) || len(c.Warnings) != 0 {
		t.Errorf("diffusive-flux: mass-average defect %.3g, warnings %q; want < 1e-4 and none", c.MassAverage, c.Warnings)
	}
	if d := math.Abs(b.PatchFlux[1]/c.PatchFlux[1] - 1); !(d < 5e-3) {
		t.Errorf("patch flux %.6g (total-flux) against %.6g (diffusive-flux): %.3g apart, want < 5e-3", b.PatchFlux[1], c.PatchFlux[1], d)
	}
}
