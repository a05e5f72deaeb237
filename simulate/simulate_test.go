package simulate

import (
	"math"
	"os"
	"strings"
	"testing"

	"mixwell/casefile"
	"mixwell/physics"
)

func TestBinaryEvaporationClosedForm(t *testing.T) {
	// Diffusion of A through stagnant B (Bird, Stewart & Lightfoot,
	// Transport Phenomena, 2nd ed., 2002, section 18.2):
	// N_A = (c D_AB / L) ln((1 - x_A,L)/(1 - x_A,0)), c = P/(R T).
	// Tolerance 0.1 % (the acceptance rule of the validation issue).
	const tol = 1e-3
	c, err := casefile.Load("../testdata/cases/binary-evaporation.yaml")
	if err != nil {
		t.Fatal(err)
	}
	s, err := Prepare(c)
	if err != nil {
		t.Fatal(err)
	}
	o, err := s.Solve(nil)
	if err != nil {
		t.Fatal(err)
	}
	const (
		P, T, D, L, W = 100e3, 300.0, 1e-5, 0.1, 2e-3
		x0, xL        = 0.6, 0.1
	)
	cT := P / (physics.GasConstant * T)
	want := cT * D / L * math.Log((1-xL)/(1-x0))
	got := o.BoundaryFlux["mouth"][0].Molar / W
	if d := math.Abs(got-want) / want; !(d < tol) {
		t.Errorf("N_A = %.8g mol/(m^2 s), closed form %.8g: relative difference %.3g", got, want, d)
	}
	// B is stagnant, and what leaves the top enters at the bottom.
	if b := o.BoundaryFlux["mouth"][1].Molar / W; !(math.Abs(b) < 1e-6*want) {
		t.Errorf("N_B = %.3g at the mouth, want 0", b)
	}
	if in := -o.BoundaryFlux["surface"][0].Molar / W; math.Abs(in-got) > 1e-10*want {
		t.Errorf("A enters at %.10g and leaves at %.10g", in, got)
	}
	t.Logf("N_A = %.8g (closed form %.8g, rel. %.2g), %d iterations, balance %.2g, mass average %.2g",
		got, want, math.Abs(got-want)/want, o.Iterations, o.SpeciesBalance, o.MassAverage)
}

func TestPrepareRejectsUnimplementedConditions(t *testing.T) {
	for _, tc := range []struct{ name, from, to, want string }{
		{"stefan wall", "    velocity: open\n    species:\n      type: composition\n      mole_fractions: {A: 0.6, B: 0.4}", "    velocity: stefan-wall\n    species:\n      type: composition\n      mole_fractions: {A: 0.6, B: 0.4}", "boundaries.surface: stefan-wall"},
		{"outflow", "    species: {type: composition, mole_fractions: {A: 0.1, B: 0.9}}", "    species: outflow", "boundaries.mouth: outflow"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			data := mustRead(t, "../testdata/cases/binary-evaporation.yaml")
			if !strings.Contains(data, tc.from) {
				t.Fatalf("test case text not found")
			}
			c, err := casefile.Parse("case.yaml", []byte(strings.Replace(data, tc.from, tc.to, 1)))
			if err != nil {
				t.Fatal(err)
			}
			_, err = Prepare(c)
			if err == nil || !strings.Contains(err.Error(), tc.want) || !strings.Contains(err.Error(), "case.yaml:") {
				t.Errorf("error %v, want one naming the file and %q", err, tc.want)
			}
		})
	}
}

func mustRead(t *testing.T, path string) string {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}
