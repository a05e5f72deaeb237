package verification

import (
	"math"
	"os"
	"strings"
	"testing"

	"mixwell/simulate"
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
	// The channel at a mean speed of 0.05 m/s (Peclet number 0.31), 4 and
	// 8 rows, degree 1, with both formulations (docs/augmentation.md, "The
	// two formulations over the Peclet number"). Diffusive-flux holds
	// v = sum J/rho exactly, so what is left of the mass-average defect
	// is the interpolation into total fluxes, and its patch flux settles:
	// measured 8.5189e-5 and 8.5311e-5 mol/(s m) (8.5325e-5 on 16 rows),
	// defect 8.0e-5 and 1.5e-5. Total-flux stays 6 % off v = sum J/rho on
	// both levels (7.2e-2, 6.4e-2; 6.1e-2 on 16 rows) and its patch flux,
	// 9.49e-5 and 9.53e-5, is 11 % above: the solution carries the
	// mass-average warning, and the check here is that it does.
	if testing.Short() {
		t.Skip("channel benchmark skipped in -short mode")
	}
	const speed = 0.05
	c, err := RunChannel(ChannelConfig{Degree: 1, Levels: 2, NoTruncation: true, MeanSpeed: speed, Formulation: "diffusive-flux"})
	if err != nil {
		t.Fatalf("diffusive-flux: %v", err)
	}
	b, err := RunChannel(ChannelConfig{Degree: 1, Levels: 2, NoTruncation: true, MeanSpeed: speed})
	if err != nil {
		t.Fatalf("total-flux: %v", err)
	}
	for _, st := range []*ChannelStudy{c, b} {
		t.Logf("%s: Peclet %.3g, iterations %v, balance %.2g, mass average %.3g, patch flux %.6g, warnings %d",
			st.Formulation, st.Peclet, st.Iterations, st.Balance, st.MassAverageLevels, st.PatchFlux, len(st.Warnings))
		for l, ok := range st.Converged {
			if !ok {
				t.Errorf("%s, %d rows: not converged", st.Formulation, st.Rows[l])
			}
		}
		if !(st.Balance < 1e-10) {
			t.Errorf("%s: species balance %.3g, want < 1e-10", st.Formulation, st.Balance)
		}
	}
	if math.Abs(c.Peclet-0.3125) > 1e-12 || c.Formulation != "diffusive-flux" || b.Formulation != "total-flux" {
		t.Errorf("Peclet numbers %g, %g, formulations %q, %q; want 0.3125, diffusive-flux and total-flux", c.Peclet, b.Peclet, c.Formulation, b.Formulation)
	}
	ma := c.MassAverageLevels
	if !(ma[1] < ma[0]) || !(ma[1] < 1e-4) {
		t.Errorf("diffusive-flux: mass-average defect %v, want it falling and below 1e-4", ma)
	}
	if !(c.PatchFluxChange < 5e-3) {
		t.Errorf("diffusive-flux: patch flux changes by %.3g between the levels, want < 5e-3", c.PatchFluxChange)
	}
	if len(c.Warnings) != 0 {
		t.Errorf("diffusive-flux: warnings %q, want none", c.Warnings)
	}
	// The total-flux solution is off, and says so on every level.
	// The warning is warranted: the patch flux is further off than the
	// limit (if this fails, total-flux has improved here and the
	// warning's wording and limit deserve a look).
	if off := b.PatchFlux[1]/c.PatchFlux[1] - 1; !(math.Abs(off) > simulate.MassAverageLimit) {
		t.Errorf("total-flux patch flux %.3g off the diffusive-flux one, within the warning's limit %g", off, simulate.MassAverageLimit)
	}
	if len(b.Warnings) != len(b.Rows) {
		t.Errorf("total-flux: %d warnings on %d levels (mass average %v), want one per level", len(b.Warnings), len(b.Rows), b.MassAverageLevels)
	}
	for _, w := range b.Warnings {
		if !strings.Contains(w, "mass-average defect") {
			t.Errorf("total-flux: warning %q does not name the mass-average defect", w)
		}
	}
}
