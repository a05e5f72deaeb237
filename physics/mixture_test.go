package physics

import (
	"errors"
	"math"
	"slices"
	"strings"
	"testing"
)

// airCO2 returns a ternary N2/O2/CO2 gas mixture. The diffusivities are
// rounded values of the order of the binary gas diffusivities near 300 K and
// 1 atm (from memory); they serve as plausible data, not as reference
// values.
func airCO2(t testing.TB) *Mixture {
	t.Helper()
	mix, err := NewMixture(
		[]Species{{"N2", 28.0134e-3}, {"O2", 31.9988e-3}, {"CO2", 44.0095e-3}},
		[]Pair{{"N2", "O2", 2.1e-5}, {"N2", "CO2", 1.6e-5}, {"O2", "CO2", 1.6e-5}},
	)
	if err != nil {
		t.Fatal(err)
	}
	return mix
}

func TestNewMixtureErrors(t *testing.T) {
	two := []Species{{"A", 0.01}, {"B", 0.02}}
	three := []Species{{"A", 0.01}, {"B", 0.02}, {"C", 0.03}}
	full3 := []Pair{{"A", "B", 1e-5}, {"A", "C", 2e-5}, {"B", "C", 3e-5}}
	for _, tc := range []struct {
		name    string
		species []Species
		pairs   []Pair
		want    []string // substrings the message must contain
		names   []string // DataError.Species
	}{
		{"one species", []Species{{"A", 0.01}}, nil, []string{"at least 2 species, got 1"}, nil},
		{"no species", nil, nil, []string{"at least 2 species, got 0"}, nil},
		{"empty name", []Species{{"A", 0.01}, {"", 0.02}}, nil, []string{"species 1 has an empty name"}, nil},
		{"duplicate name", []Species{{"A", 0.01}, {"A", 0.02}}, nil, []string{`"A"`, "repeated"}, []string{"A"}},
		{"zero molar mass", []Species{{"A", 0.01}, {"B", 0}}, nil, []string{`"B"`, "molar mass 0"}, []string{"B"}},
		{"negative molar mass", []Species{{"A", -1}, {"B", 0.02}}, nil, []string{`"A"`, "molar mass -1"}, []string{"A"}},
		{"NaN molar mass", []Species{{"A", math.NaN()}, {"B", 0.02}}, nil, []string{`"A"`, "molar mass NaN"}, []string{"A"}},
		{"infinite molar mass", []Species{{"A", math.Inf(1)}, {"B", 0.02}}, nil, []string{`"A"`, "+Inf"}, []string{"A"}},
		{"missing pair", three, []Pair{{"A", "B", 1e-5}, {"A", "C", 2e-5}}, []string{`("B", "C")`, "missing"}, []string{"B", "C"}},
		{"no pairs", two, nil, []string{`("A", "B")`, "missing"}, []string{"A", "B"}},
		{"conflicting repeat", two, []Pair{{"A", "B", 1e-5}, {"A", "B", 2e-5}}, []string{`("A", "B")`, "twice", "1e-05", "2e-05"}, []string{"A", "B"}},
		{"conflicting orders", two, []Pair{{"A", "B", 1e-5}, {"B", "A", 1.1e-5}}, []string{`("B", "A")`, "twice"}, []string{"B", "A"}},
		{"zero diffusivity", two, []Pair{{"A", "B", 0}}, []string{`("A", "B")`, "diffusivity 0 is not positive"}, []string{"A", "B"}},
		{"negative diffusivity", three, append(slices.Clone(full3[:2]), Pair{"B", "C", -3e-5}), []string{`("B", "C")`, "-3e-05"}, []string{"B", "C"}},
		{"NaN diffusivity", two, []Pair{{"A", "B", math.NaN()}}, []string{`("A", "B")`, "not finite"}, []string{"A", "B"}},
		{"self pair", two, []Pair{{"A", "B", 1e-5}, {"A", "A", 1e-5}}, []string{`("A", "A")`, "itself"}, []string{"A", "A"}},
		{"unknown species", two, []Pair{{"A", "B", 1e-5}, {"A", "Z", 1e-5}}, []string{`("A", "Z")`, `unknown species "Z"`}, []string{"A", "Z"}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			mix, err := NewMixture(tc.species, tc.pairs)
			if err == nil {
				t.Fatalf("got mixture %v, want error", mix)
			}
			var de *DataError
			if !errors.As(err, &de) {
				t.Fatalf("error %v is a %T, want *DataError", err, err)
			}
			msg := err.Error()
			if !strings.HasPrefix(msg, "physics: ") {
				t.Errorf("message %q lacks the package prefix", msg)
			}
			for _, w := range tc.want {
				if !strings.Contains(msg, w) {
					t.Errorf("message %q does not contain %q", msg, w)
				}
			}
			if !slices.Equal(de.Species, tc.names) {
				t.Errorf("DataError.Species = %q, want %q", de.Species, tc.names)
			}
		})
	}
}

func TestNewMixtureValid(t *testing.T) {
	// Both orders and an exact repeat are accepted.
	mix, err := NewMixture(
		[]Species{{"A", 0.01}, {"B", 0.02}, {"C", 0.03}},
		[]Pair{{"A", "B", 1e-5}, {"C", "A", 2e-5}, {"B", "C", 3e-5}, {"B", "A", 1e-5}},
	)
	if err != nil {
		t.Fatal(err)
	}
	if mix.Len() != 3 {
		t.Errorf("Len = %d, want 3", mix.Len())
	}
	for _, tc := range []struct {
		a, b string
		want float64 // as given above
	}{
		{"A", "B", 1e-5}, {"B", "A", 1e-5}, {"A", "C", 2e-5}, {"C", "A", 2e-5}, {"B", "C", 3e-5}, {"C", "B", 3e-5},
	} {
		i, _ := mix.Index(tc.a)
		j, _ := mix.Index(tc.b)
		if got := mix.Diffusivity(i, j); got != tc.want {
			t.Errorf("D(%s,%s) = %g, want %g", tc.a, tc.b, got, tc.want)
		}
	}
	if _, ok := mix.Index("Z"); ok {
		t.Error("Index found unknown species Z")
	}
	if s := mix.Species(2); s.Name != "C" || s.MolarMass != 0.03 {
		t.Errorf("Species(2) = %+v, want {C 0.03}", s)
	}
}

func TestCompositionChecks(t *testing.T) {
	mix := airCO2(t)
	for _, tc := range []struct {
		name  string
		check func([]float64) error
		v     []float64
		want  string // substring; "" means no error
	}{
		{"x valid", mix.CheckMoleFractions, []float64{0.7, 0.2, 0.1}, ""},
		{"x valid within 1e-9", mix.CheckMoleFractions, []float64{0.7, 0.2, 0.1 + 5e-10}, ""},
		{"x sum off", mix.CheckMoleFractions, []float64{0.7, 0.2, 0.1 + 2e-9}, "sum to 1.000000002"},
		{"x negative", mix.CheckMoleFractions, []float64{0.8, 0.3, -0.1}, `species "CO2": mole fraction -0.1`},
		{"x NaN", mix.CheckMoleFractions, []float64{math.NaN(), 0.3, 0.7}, `species "N2"`},
		{"c valid", mix.CheckConcentrations, []float64{30, 10, 0}, ""},
		{"c negative", mix.CheckConcentrations, []float64{30, -1e-3, 1}, `species "O2": concentration -0.001`},
		{"c zero total", mix.CheckConcentrations, []float64{0, 0, 0}, "total concentration is zero"},
	} {
		err := tc.check(tc.v)
		switch {
		case tc.want == "" && err != nil:
			t.Errorf("%s: unexpected error %v", tc.name, err)
		case tc.want != "" && err == nil:
			t.Errorf("%s: no error, want one containing %q", tc.name, tc.want)
		case tc.want != "" && !strings.Contains(err.Error(), tc.want):
			t.Errorf("%s: error %q does not contain %q", tc.name, err, tc.want)
		}
	}
}

func TestFloorMoleFractions(t *testing.T) {
	const tol = 1e-15
	mix := airCO2(t)
	for _, tc := range []struct {
		name    string
		x       []float64
		xMin    float64
		want    []float64 // closed form: floored entries at xMin, the rest scaled by (1 - k xMin)/sum(rest)
		floored []int
	}{
		{"nothing to floor", []float64{0.5, 0.3, 0.2}, 0, []float64{0.5, 0.3, 0.2}, nil},
		{"default floor", []float64{0.8, 0.2, 0}, 0, []float64{0.8 * (1 - 1e-6), 0.2 * (1 - 1e-6), 1e-6}, []int{2}},
		{"two floored", []float64{0, 1, 0}, 1e-3, []float64{1e-3, 1 - 2e-3, 1e-3}, []int{0, 2}},
		{"below but non-zero", []float64{0.9995, 0.0004, 0.0001}, 1e-3, []float64{1 - 2e-3, 1e-3, 1e-3}, []int{1, 2}},
		// First pass floors CO2 and scales O2 = 1.0005e-3 by 1-1e-3 to below 1e-3: a second pass floors it.
		{"cascade", []float64{0.9989995, 1.0005e-3, 0}, 1e-3, []float64{1 - 2e-3, 1e-3, 1e-3}, []int{1, 2}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			got := make([]float64, 3)
			fl, err := mix.FloorMoleFractionsTo(got, tc.x, tc.xMin)
			if err != nil {
				t.Fatal(err)
			}
			if !slices.Equal(fl, tc.floored) {
				t.Errorf("floored = %v, want %v", fl, tc.floored)
			}
			var sum float64
			for i := range got {
				sum += got[i]
				if math.Abs(got[i]-tc.want[i]) > tol {
					t.Errorf("x[%d] = %.17g, want %.17g", i, got[i], tc.want[i])
				}
			}
			if math.Abs(sum-1) > tol {
				t.Errorf("sum = %.17g, want 1", sum)
			}
		})
	}
	// In place, and bad input.
	x := []float64{1, 0, 0}
	if _, err := mix.FloorMoleFractionsTo(x, x, 0); err != nil || x[1] != DefaultMoleFractionFloor {
		t.Errorf("in place: x = %v, err = %v", x, err)
	}
	dst := make([]float64, 3)
	for _, tc := range []struct {
		name string
		x    []float64
		xMin float64
		want string
	}{
		{"negative x", []float64{1.1, -0.1, 0}, 0, `species "O2"`},
		{"sum not one", []float64{0.5, 0.2, 0}, 0, "sum to 0.7"},
		{"negative floor", []float64{1, 0, 0}, -1e-6, "floor -1e-06"},
		{"floor too large", []float64{1, 0, 0}, 0.4, "floor 0.4"},
	} {
		if _, err := mix.FloorMoleFractionsTo(dst, tc.x, tc.xMin); err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: error %v, want one containing %q", tc.name, err, tc.want)
		}
	}
}

func TestMassFractions(t *testing.T) {
	const tol = 1e-15
	mix, err := NewMixture([]Species{{"A", 0.002}, {"B", 0.032}}, []Pair{{"A", "B", 1e-5}})
	if err != nil {
		t.Fatal(err)
	}
	w := make([]float64, 2)
	rho := mix.MassFractionsTo(w, []float64{16, 1})
	// Closed form: rho = 16*0.002 + 1*0.032 = 0.064, w = (0.5, 0.5).
	if math.Abs(rho-0.064) > tol || math.Abs(w[0]-0.5) > tol || math.Abs(w[1]-0.5) > tol {
		t.Errorf("rho = %g, w = %v; want 0.064, [0.5 0.5]", rho, w)
	}
}

func TestGasConstant(t *testing.T) {
	// CODATA 2018 prints R = 8.314 462 618... J/(mol K); N_A k = 8.31446261815324 exactly.
	const tol = 1e-15
	if got := GasConstant; math.Abs(got-8.31446261815324) > tol*8.3 {
		t.Errorf("GasConstant = %.17g, want 8.31446261815324", got)
	}
	if got := GasConstant; math.Abs(got-8.314462618)/8.314462618 > 1e-10 {
		t.Errorf("GasConstant = %.17g disagrees with the printed CODATA value 8.314462618", got)
	}
}
