package physics

import (
	"errors"
	"math"
	"math/rand/v2"
	"strings"
	"testing"
)

func TestWilkeViscosity(t *testing.T) {
	const (
		closedTol = 1e-14 // closed-form limits
		bookTol   = 1e-3  // textbook value given to four figures
	)
	// Identical species: Phi_ij = 1 for all i, j, so eta = sum x_i eta_0 = eta_0 (closed form).
	same, err := NewMixture([]Species{{"A", 0.028}, {"B", 0.028}, {"C", 0.028}},
		[]Pair{{"A", "B", 1e-5}, {"A", "C", 1e-5}, {"B", "C", 1e-5}})
	if err != nil {
		t.Fatal(err)
	}
	w, err := NewWilkeViscosity(same, []float64{1.8e-5, 1.8e-5, 1.8e-5})
	if err != nil {
		t.Fatal(err)
	}
	rnd := rand.New(rand.NewPCG(7, 8))
	for trial := 0; trial < 10; trial++ {
		x := randomComposition(rnd, 3, 1e-3)
		if got := w.Viscosity(x); math.Abs(got-1.8e-5) > closedTol*1.8e-5 {
			t.Errorf("identical species at x = %v: eta = %.16g, want 1.8e-5", x, got)
		}
	}

	// Bird, Stewart & Lightfoot, Transport Phenomena, 2nd ed., Example 1.4-2
	// (from memory): CO2/O2/N2 at 293 K and 1 atm, x = 0.133/0.039/0.828,
	// pure viscosities 1462/2031/1754 x 1e-7 g/(cm s); Wilke's rule gives
	// 1714 x 1e-7 g/(cm s) (1 g/(cm s) = 0.1 Pa s).
	air, err := NewMixture([]Species{{"CO2", 44.01e-3}, {"O2", 32.00e-3}, {"N2", 28.02e-3}},
		[]Pair{{"CO2", "O2", 1.6e-5}, {"CO2", "N2", 1.6e-5}, {"O2", "N2", 2.1e-5}})
	if err != nil {
		t.Fatal(err)
	}
	pure := []float64{1462e-8, 2031e-8, 1754e-8}
	wa, err := NewWilkeViscosity(air, pure)
	if err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		name string
		x    []float64
		want float64
		tol  float64
	}{
		{"BSL example 1.4-2", []float64{0.133, 0.039, 0.828}, 1714e-8, bookTol},
		{"pure CO2", []float64{1, 0, 0}, pure[0], closedTol}, // Phi_ii = 1 (closed form)
		{"pure O2", []float64{0, 1, 0}, pure[1], closedTol},
		{"pure N2", []float64{0, 0, 1}, pure[2], closedTol},
	} {
		got := wa.Viscosity(tc.x)
		if r := math.Abs(got-tc.want) / tc.want; r > tc.tol {
			t.Errorf("%s: eta = %.6g Pa s, want %.6g (relative %.2g)", tc.name, got, tc.want, r)
		} else {
			t.Logf("%s: eta = %.6g Pa s, relative deviation %.2g", tc.name, got, r)
		}
	}
	if a := testing.AllocsPerRun(50, func() { _ = wa.Viscosity([]float64{0.133, 0.039, 0.828}) }); a != 0 {
		t.Errorf("Viscosity allocates %v times per call", a)
	}

	// Bad input names the species.
	for _, tc := range []struct {
		name string
		pure []float64
		want string
	}{
		{"negative", []float64{1e-5, -1e-5, 1e-5}, `species "O2": pure-species viscosity -1e-05`},
		{"NaN", []float64{math.NaN(), 1e-5, 1e-5}, `species "CO2"`},
		{"too few", []float64{1e-5, 1e-5}, "2 pure-species viscosities given for 3 species"},
	} {
		_, err := NewWilkeViscosity(air, tc.pure)
		var de *DataError
		if !errors.As(err, &de) || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: error %v, want a *DataError containing %q", tc.name, err, tc.want)
		}
	}
}

func TestConstantViscosity(t *testing.T) {
	if got := ConstantViscosity(1e-3).Viscosity([]float64{0.3, 0.7}); got != 1e-3 {
		t.Errorf("ConstantViscosity = %g, want 1e-3", got)
	}
}
