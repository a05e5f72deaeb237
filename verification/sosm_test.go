package verification

import (
	"fmt"
	"math"
	"os"
	"strings"
	"testing"
)

// SOSM acceptance rule. The finest-pair rate must not fall more than
// rateTol below the rate of the formulation note's section 8 (corrected
// for the flux at S = O(1), see runSOSM). Rates above theory are
// pre-asymptotic super-convergence at the mesh sizes CI can afford: we
// measured finest-pair overshoots of up to 0.55 for k = 3, 4 (potential,
// pressure and flux L2 at h = 1/16) that shrink with refinement, so an
// overshoot only fails beyond sosmOvershootTol.
const (
	sosmOvershootTol    = 0.7
	sosmConservationTol = 1e-11
	sosmIterationLimit  = 40
)

// sosmStudyCases lists the SOSM studies that run in CI; the long ones run with
// MIXWELL_LONG=1. Levels start from h = 1/2.
func sosmStudyCases() []struct {
	cfg  Config
	long bool
} {
	type c = struct {
		cfg  Config
		long bool
	}
	sosm := func(flavour, variant string, n, k, levels int) Config {
		return Config{Problem: "sosm", Variant: variant, Flavour: flavour, Species: n, Degree: k, Levels: levels}
	}
	physical := func(cfg Config) Config { cfg.S = 1e-7; return cfg }
	diffusive := func(cfg Config) Config { cfg.Formulation = formulationDiffusive; return cfg }
	stefanWall := func(cfg Config) Config { cfg.StefanWall = true; return cfg }
	return []c{
		// Remedy (c), the diffusive-flux formulation, in the physical
		// regime (docs/augmentation.md): optimal rates without any
		// augmentation; with Scott–Vogelius every species is conserved
		// per element.
		{diffusive(physical(sosm("frozen", "bdm", 3, 1, 4))), false},
		{diffusive(physical(sosm("frozen", "bdm", 3, 2, 4))), false},
		{diffusive(physical(sosm("frozen", "bdm", 3, 3, 3))), false},
		{diffusive(physical(sosm("frozen", "scott-vogelius", 3, 2, 3))), false},
		{diffusive(physical(sosm("frozen", "rt", 3, 1, 4))), false},
		{diffusive(sosm("frozen", "bdm", 3, 1, 4)), false},
		// The bottom side as a Stefan wall with composition data, the
		// last species impermeable: the wall's constraint rows keep the
		// rates (measured k = 1: flux L2 3.02 / 3.08 / 2.98, velocity H1
		// 2.01; k = 2: 4.01 / 4.05 / 4.00, 3.01).
		{stefanWall(diffusive(physical(sosm("frozen", "bdm", 3, 1, 4)))), false},
		{stefanWall(diffusive(physical(sosm("frozen", "bdm", 3, 2, 4)))), false},
		// Physical regime of the frozen layer (S = 1e-7).
		{physical(sosm("frozen", "bdm", 3, 1, 4)), false},
		{physical(sosm("frozen", "bdm", 3, 2, 4)), false},
		{physical(sosm("frozen", "bdm", 3, 3, 3)), false},
		{sosm("frozen", "bdm", 3, 1, 5), false},
		{sosm("frozen", "bdm", 3, 2, 4), false},
		{sosm("frozen", "bdm", 3, 3, 3), false},
		{sosm("frozen", "bdm", 2, 4, 3), false},
		{sosm("frozen", "rt", 3, 1, 4), false},
		{sosm("frozen", "rt", 3, 2, 4), false},
		{sosm("frozen", "bdm", 4, 1, 4), false},
		{sosm("nonlinear", "bdm", 3, 1, 4), false},
		{sosm("nonlinear", "bdm", 3, 2, 3), false},
		{sosm("nonlinear", "bdm", 4, 1, 3), false},
		{sosm("nonlinear", "bdm", 2, 1, 4), false},
		{sosm("nonlinear", "rt", 3, 1, 4), false},
		{sosm("consistent", "bdm", 3, 1, 4), false},
		{sosm("consistent", "bdm", 3, 2, 4), true},
		{sosm("nonlinear", "bdm", 3, 3, 3), true},
		{sosm("nonlinear", "bdm", 2, 4, 3), true},
		{sosm("frozen", "bdm", 3, 3, 4), true},
		{sosm("frozen", "bdm", 2, 4, 4), true},
	}
}

func TestSOSMConvergence(t *testing.T) {
	long := os.Getenv("MIXWELL_LONG") != ""
	for _, tc := range sosmStudyCases() {
		cfg := tc.cfg
		name := fmt.Sprintf("%s/%s/n=%d/k=%d/levels=%d/S=%g/%s", cfg.Flavour, cfg.Variant, cfg.Species, cfg.Degree, cfg.Levels, cfg.S, orDefault(cfg.Formulation, formulationTotal))
		if cfg.StefanWall {
			name += "/stefan-wall"
		}
		t.Run(name, func(t *testing.T) {
			if tc.long && !long {
				t.Skip("long study: set MIXWELL_LONG=1")
			}
			if testing.Short() && cfg.Degree > 1 {
				t.Skip("short mode runs k = 1 only")
			}
			s, err := Run(cfg, nil)
			if err != nil {
				t.Fatal(err)
			}
			checkSOSMStudy(t, s)
		})
	}
}

func checkSOSMStudy(t *testing.T, s *Study) {
	t.Helper()
	for _, norm := range s.Norms() {
		got, want := s.Rates[norm], s.Expected[norm]
		upper := want + sosmOvershootTol
		if s.Variant == "bdm" && s.S > 1e-2 && s.Formulation != formulationDiffusive && strings.HasPrefix(norm, "flux_L2") {
			// At S = O(1) the BDM flux is polluted by the pressure error
			// only asymptotically (runSOSM): on affordable meshes its rate
			// lies between k+1 and k+2 (measured 2.80 for n = 4, k = 1).
			upper = want + 1 + rateTol
		}
		if got < want-rateTol || got > upper {
			t.Errorf("%s: finest-pair rate %.3f, want >= %.2f and <= %.2f (pair rates %.3f, errors %.3g)",
				norm, got, want-rateTol, upper, s.PairRates[norm], s.Errors[norm])
		}
	}
	for l, c := range s.Conservation {
		if !(c < sosmConservationTol) {
			t.Errorf("level %d: element conservation defect %.3g, want < %g", l, c, sosmConservationTol)
		}
	}
	// The last species of the diffusive-flux formulation is balanced
	// through the total mass row: exactly per element with Scott–Vogelius,
	// with a defect that falls under refinement with Taylor–Hood (measured
	// 2.0e-3, 1.2e-4, 6.6e-6, 3.9e-7 at k = 1, S = 1e-7).
	for l, c := range s.ConservationLast {
		if s.Variant == "scott-vogelius" {
			if !(c < sosmConservationTol) {
				t.Errorf("level %d: last species' element conservation defect %.3g with Scott–Vogelius, want < %g", l, c, sosmConservationTol)
			}
		} else if l > 0 && !(c < s.ConservationLast[l-1]/4) {
			t.Errorf("level %d: last species' element conservation defect %.3g does not fall below a quarter of %.3g", l, c, s.ConservationLast[l-1])
		}
	}
	if s.Formulation == formulationDiffusive && len(s.ConservationLast) != len(s.H) {
		t.Errorf("diffusive-flux study reports the last species' conservation on %d of %d levels", len(s.ConservationLast), len(s.H))
	}
	for l, r := range s.Residuals {
		if !(r < residualTol) {
			t.Errorf("level %d: LU relative residual %.3g, want < %g", l, r, residualTol)
		}
	}
	for l, it := range s.Iterations {
		if it >= sosmIterationLimit {
			t.Errorf("level %d: %d nonlinear iterations, want < %d", l, it, sosmIterationLimit)
		}
	}
	// The mass-average defect must fall with refinement.
	for l := 1; l < len(s.MassAverage); l++ {
		if !(s.MassAverage[l] < s.MassAverage[l-1]) {
			t.Errorf("mass-average defect %.3g on level %d does not fall below %.3g on level %d", s.MassAverage[l], l, s.MassAverage[l-1], l-1)
		}
	}
}

func TestSOSMBrokenDiscretisationFails(t *testing.T) {
	// The verification must be able to fail: with the sign of the boundary
	// potential flipped (sosmBreak) the frozen study's errors must stop
	// converging. Measured: potential and flux errors stay O(1).
	sosmBreak = true
	defer func() { sosmBreak = false }()
	s, err := Run(Config{Problem: "sosm", Flavour: "frozen", Species: 3, Degree: 1, Levels: 3}, nil)
	if err != nil {
		t.Fatal(err)
	}
	collapsed := 0
	for _, norm := range []string{"potential_L2_s1", "flux_Hdiv_s1", "velocity_H1"} {
		if r := s.Rates[norm]; r < s.Expected[norm]-1 {
			collapsed++
		}
		t.Logf("%s: rate %.3f (expected %.0f), errors %.3g", norm, s.Rates[norm], s.Expected[norm], s.Errors[norm])
	}
	if collapsed == 0 {
		t.Errorf("flipping the boundary term did not collapse any rate")
	}
}

func TestSOSMPlainPicardReported(t *testing.T) {
	// Plain Picard is kept as an option and its behaviour is measured, not
	// hidden. With the one-sided species augmentation (beta = 1, the
	// default) it converges on the nonlinear manufactured case in about
	// as many iterations as Anderson (measured 12, 12, 12, 11 against 11,
	// 11, 11, 10 for k = 1, h = 1/2..1/16). Without it the Picard map is
	// not a contraction (formulation note, section 4) and the iteration
	// fails; Newton–Krylov converges in 5 steps.
	base := Config{Problem: "sosm", Flavour: "nonlinear", Species: 3, Degree: 1, Levels: 2, MaxIterations: 39}
	for _, method := range []string{"anderson", "picard", "newton-krylov"} {
		cfg := base
		cfg.Method = method
		s, err := Run(cfg, nil)
		if err != nil {
			t.Errorf("%s with beta = 1: %v", method, err)
			continue
		}
		t.Logf("%s: iterations per level %v", method, s.Iterations)
	}
	bare := base
	bare.Method = "picard"
	bare.Beta = -1
	if _, err := Run(bare, nil); err == nil {
		t.Errorf("plain Picard without the species augmentation converged; section 4 of the formulation note says it should not")
	} else {
		t.Logf("plain Picard without beta: %v", err)
	}
}

func TestSOSMRatesNeedSpeciesAugmentation(t *testing.T) {
	// Formulation note, section 10 item 2: at physical S the symmetric
	// augmentation alone leaves the total flux weakly controlled. Frozen
	// layer at S = 1e-7, k = 1, h = 1/2..1/16; measured flux L2 finest-pair
	// rate 2.04 without beta (theory 3) and 3.01 with beta = 1, mass-average
	// defect 6.4e-3 against 1.5e-5.
	if testing.Short() {
		t.Skip("short mode")
	}
	cfg := Config{Problem: "sosm", Flavour: "frozen", Species: 3, Degree: 1, Levels: 4, S: 1e-7}
	with, err := Run(cfg, nil)
	if err != nil {
		t.Fatal(err)
	}
	checkSOSMStudy(t, with)
	cfg.Beta = -1
	cfg.Levels = 3
	without, err := Run(cfg, nil)
	if err != nil {
		t.Fatal(err)
	}
	r := without.Rates["flux_L2_s1"]
	if !(r < with.Expected["flux_L2_s1"]-0.5) {
		t.Errorf("without beta the flux L2 rate is %.3f; expected it to fall short of %.0f (the weak total-flux control of section 10)", r, with.Expected["flux_L2_s1"])
	}
	last := len(without.MassAverage) - 1
	if !(without.MassAverage[last] > 10*with.MassAverage[last]) {
		t.Errorf("mass-average defect without beta %.3g, with %.3g: expected a clear gap", without.MassAverage[last], with.MassAverage[last])
	}
}

func TestSOSMClockwiseTrianglesSameErrors(t *testing.T) {
	// Formulation note, section 10 item 1: with the signed Piola map and
	// global edge orientation, permuting the local vertex order (about half
	// the triangles clockwise) must not change the discrete solution beyond
	// quadrature: the triangle rule is not symmetric, so a permuted triangle
	// integrates the non-polynomial coefficients and sources at other
	// points. Measured: errors agree to 6.4e-7 relative or better (k = 2);
	// a missing sign(det) would change them at O(1).
	const tol = 1e-5
	for _, tc := range []struct {
		S           float64
		formulation string
	}{{1, ""}, {1e-7, ""}, {1e-7, formulationDiffusive}} {
		S := tc.S
		cfg := Config{Problem: "sosm", Flavour: "frozen", Species: 3, Degree: 2, Levels: 2, S: S, Formulation: tc.formulation}
		ccw, err := Run(cfg, nil)
		if err != nil {
			t.Fatal(err)
		}
		cfg.Clockwise = true
		cfg.Seed = 3
		cw, err := Run(cfg, nil)
		if err != nil {
			t.Fatal(err)
		}
		for _, norm := range ccw.Norms() {
			for l := range ccw.Errors[norm] {
				a, b := ccw.Errors[norm][l], cw.Errors[norm][l]
				if math.Abs(a-b) > tol*math.Abs(a) {
					t.Errorf("S = %g %s, %s, level %d: error %.12g counter-clockwise, %.12g permuted", S, tc.formulation, norm, l, a, b)
				}
			}
		}
	}
}
