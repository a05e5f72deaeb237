package physics

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/mat"
)

// rt300 is R T at 300 K in J/mol.
const rt300 = GasConstant * 300

// randomMixture returns a mixture of n species with molar masses in
// [2, 200] g/mol and diffusivities log-uniform in [1e-6, 1e-4] m^2/s.
func randomMixture(t testing.TB, rnd *rand.Rand, n int) *Mixture {
	t.Helper()
	sp := make([]Species, n)
	for i := range sp {
		sp[i] = Species{Name: fmt.Sprintf("S%d", i), MolarMass: 2e-3 + 0.198*rnd.Float64()}
	}
	var pairs []Pair
	for i := 0; i < n; i++ {
		for j := i + 1; j < n; j++ {
			pairs = append(pairs, Pair{sp[i].Name, sp[j].Name, math.Pow(10, -6+2*rnd.Float64())})
		}
	}
	mix, err := NewMixture(sp, pairs)
	if err != nil {
		t.Fatal(err)
	}
	return mix
}

// randomComposition returns mole fractions whose unnormalised weights are
// log-uniform in [lo, 1].
func randomComposition(rnd *rand.Rand, n int, lo float64) []float64 {
	x := make([]float64, n)
	for i := range x {
		x[i] = math.Exp(math.Log(lo) * rnd.Float64())
	}
	floats.Scale(1/floats.Sum(x), x)
	return x
}

func TestTransportMatrixProperties(t *testing.T) {
	const (
		rowTol    = 1e-14 // |row sum| relative to max_i M_ii
		formTol   = 1e-14 // v^T M v against the closed form, relative to sum_ij |v_i M_ij v_j|
		kernelTol = 1e-14 // smallest |eigenvalue| relative to the largest
		vecTol    = 1e-10 // 1 - |cos| between the null vector and (1,...,1)
		trials    = 20
	)
	rnd := rand.New(rand.NewPCG(1, 2))
	var worstRow, worstForm, worstKernel, worstVec float64
	minGap := math.Inf(1)
	for n := 2; n <= 6; n++ {
		mix := randomMixture(t, rnd, n)
		m := make([]float64, n*n)
		for trial := 0; trial < trials; trial++ {
			cT := math.Pow(10, -1+5*rnd.Float64()) // 0.1 .. 1e4 mol/m^3
			x := randomComposition(rnd, n, 1e-5)
			c := make([]float64, n)
			floats.ScaleTo(c, cT, x)
			mix.TransportMatrixTo(m, c, rt300)
			name := fmt.Sprintf("n=%d trial %d", n, trial)

			var diag float64
			for i := 0; i < n; i++ {
				diag = math.Max(diag, m[i*n+i])
				for j := 0; j < n; j++ {
					if m[i*n+j] != m[j*n+i] {
						t.Fatalf("%s: M[%d][%d] = %g != M[%d][%d] = %g", name, i, j, m[i*n+j], j, i, m[j*n+i])
					}
				}
			}
			for i := 0; i < n; i++ {
				r := math.Abs(floats.Sum(m[i*n:i*n+n])) / diag
				worstRow = math.Max(worstRow, r)
				if r > rowTol {
					t.Errorf("%s: row %d sums to %g relative", name, i, r)
				}
			}

			// Closed form: v^T M v = sum_{i<j} RT c_i c_j (v_i - v_j)^2 / (c_T D_ij).
			v := make([]float64, n)
			for i := range v {
				v[i] = rnd.NormFloat64()
			}
			var want float64
			for i := 0; i < n; i++ {
				for j := i + 1; j < n; j++ {
					d := v[i] - v[j]
					want += rt300 * c[i] * c[j] * d * d / (cT * mix.Diffusivity(i, j))
				}
			}
			mv := make([]float64, n)
			mat.NewVecDense(n, mv).MulVec(mat.NewDense(n, n, m), mat.NewVecDense(n, v))
			got := floats.Dot(v, mv)
			var size float64
			for i := 0; i < n; i++ {
				for j := 0; j < n; j++ {
					size += math.Abs(v[i] * m[i*n+j] * v[j])
				}
			}
			r := math.Abs(got-want) / size
			worstForm = math.Max(worstForm, r)
			if r > formTol {
				t.Errorf("%s: v^T M v = %g, want %g", name, got, want)
			}

			// Spectrum: one zero eigenvalue with eigenvector (1,...,1), the rest positive.
			var es mat.EigenSym
			if !es.Factorize(mat.NewSymDense(n, m), true) {
				t.Fatalf("%s: eigendecomposition failed", name)
			}
			ev := es.Values(nil)
			lmax := ev[n-1]
			k := ev[0] / lmax
			worstKernel = math.Max(worstKernel, math.Abs(k))
			if math.Abs(k) > kernelTol {
				t.Errorf("%s: smallest eigenvalue %g relative to largest", name, k)
			}
			gap := ev[1] / lmax
			minGap = math.Min(minGap, gap)
			if !(gap > 0) {
				t.Errorf("%s: second smallest eigenvalue %g is not positive: kernel is not one-dimensional", name, ev[1])
			}
			var q mat.Dense
			es.VectorsTo(&q)
			var dot float64
			for i := 0; i < n; i++ {
				dot += q.At(i, 0)
			}
			cosErr := 1 - math.Abs(dot)/math.Sqrt(float64(n))
			worstVec = math.Max(worstVec, cosErr)
			if cosErr > vecTol {
				t.Errorf("%s: null vector not parallel to (1,...,1): 1-|cos| = %g", name, cosErr)
			}
		}
	}
	t.Logf("worst: row sum %.2g, quadratic form %.2g, kernel eigenvalue %.2g, null vector %.2g; smallest relative gap lambda_2/lambda_max %.2g",
		worstRow, worstForm, worstKernel, worstVec, minGap)
}

func TestTransportMatrixAllocs(t *testing.T) {
	mix := airCO2(t)
	m := make([]float64, 9)
	c := []float64{30, 8, 2}
	if a := testing.AllocsPerRun(100, func() { mix.TransportMatrixTo(m, c, rt300) }); a != 0 {
		t.Errorf("TransportMatrixTo allocates %v times per call, want 0", a)
	}
}

// idealGasForces returns the driving forces d_i = -c_i grad mu_i + w_i grad p
// of an ideal gas with mu_i = RT ln(x_i P/P_ref) and mechanical pressure
// equal to the thermodynamic one: -c_i RT (grad x_i/x_i + grad P/P) +
// w_i grad P = -c_T RT grad x_i + (w_i - x_i) grad P.
func idealGasForces(mix *Mixture, x, gradX []float64, cT, gradP float64) (c, d []float64) {
	n := len(x)
	c = make([]float64, n)
	w := make([]float64, n)
	d = make([]float64, n)
	floats.ScaleTo(c, cT, x)
	mix.MassFractionsTo(w, c)
	for i := range d {
		d[i] = -cT*rt300*gradX[i] + (w[i]-x[i])*gradP
	}
	return c, d
}

// TestFickBinaryIdealGas checks that the OSM relations of a binary ideal gas
// at uniform pressure reduce to Fick's law relative to the molar-average
// velocity with coefficient D_12 (common practice; Bird, Stewart & Lightfoot,
// Transport Phenomena, 2nd ed., §17.9 and §24.2; Taylor & Krishna 1993,
// ch. 2). Derivation: row 1 reads
//
//	RT c_1 c_2 (v_1 - v_2)/(c_T D_12) = -c_1 grad mu_1 = -c_T RT grad x_1,
//
// so x_1 x_2 (v_1 - v_2) = -D_12 grad x_1 and
// N_1 - x_1 (N_1 + N_2) = c_T x_1 x_2 (v_1 - v_2) = -c_T D_12 grad x_1, exactly
// for a binary. In the dilute limit x_1 -> 0 with the mass-average velocity
// at rest, N_1 + N_2 = N_1 (1 - M_1/M_2) by sum rho_i v_i = 0, so
// N_1 = -c_T D_12 grad x_1 / (1 - x_1 (1 - M_1/M_2)) = -c_T D_12 grad x_1
// (1 + O(x_1)): Fick's first law to first order.
func TestFickBinaryIdealGas(t *testing.T) {
	const (
		fickTol = 1e-11 // relative; the binary relation is exact
	)
	mix, err := NewMixture([]Species{{"H2O", 18.015e-3}, {"air", 28.96e-3}}, []Pair{{"H2O", "air", 2.6e-5}})
	if err != nil {
		t.Fatal(err)
	}
	d12 := mix.Diffusivity(0, 1)
	cT := 101325 / rt300
	for _, tc := range []struct {
		name  string
		x1    float64
		gradX float64 // 1/m
		v     float64 // mass-average velocity, m/s
	}{
		{"dilute at rest", 1e-6, 3e-6, 0},
		{"dilute moving", 1e-4, -2e-3, 0.02},
		{"moderate", 0.05, 1.5, 0},
		{"concentrated moving", 0.6, -4, -0.1},
	} {
		t.Run(tc.name, func(t *testing.T) {
			x := []float64{tc.x1, 1 - tc.x1}
			c, d := idealGasForces(mix, x, []float64{tc.gradX, -tc.gradX}, cT, 0)
			v := make([]float64, 2)
			defect, err := mix.SpeciesVelocitiesTo(v, c, d, rt300, tc.v)
			if err != nil {
				t.Fatal(err)
			}
			n1, n2 := c[0]*v[0], c[1]*v[1]
			got := n1 - tc.x1*(n1+n2)
			want := -cT * d12 * tc.gradX // Fick's law, closed form above
			if r := math.Abs(got-want) / math.Abs(want); r > fickTol {
				t.Errorf("N1 - x1 (N1+N2) = %.15g, want -c_T D12 grad x1 = %.15g (relative %.2g)", got, want, r)
			} else {
				t.Logf("relative deviation from Fick %.2g, Gibbs–Duhem defect relative to |d| %.2g", r, math.Abs(defect)/math.Abs(d[0]))
			}
			if tc.v == 0 && tc.x1 <= 1e-4 {
				// Dilute limit: N1 itself is Fick's flux to first order in x1.
				first := math.Abs(n1-want) / math.Abs(want)
				bound := 2 * tc.x1 * math.Abs(1-mix.MolarMass(0)/mix.MolarMass(1)) // from the closed form, with margin 2
				if first > bound {
					t.Errorf("dilute N1 = %g differs from -c_T D12 grad x1 = %g by %.2g relative, want <= %.2g", n1, want, first, bound)
				}
			}
		})
	}
}

// TestDiluteTraceBlanc checks the multicomponent dilute limit: a trace
// species 1 in a solvent mixture of fixed composition ratio diffuses by
// Fick's law with the effective diffusivity of Blanc's law,
// 1/D_1m = sum_{j>1} x'_j / D_1j with x'_j the solvent-free mole fractions
// (Taylor & Krishna 1993, ch. 1-2; Poling, Prausnitz & O'Connell, The
// Properties of Gases and Liquids, 5th ed., 2001, §11-7). Derivation: row 1
// reads sum_j x_1 x_j (v_1 - v_j)/D_1j = -grad x_1; with the solvent moving
// as one (v_j = u) this is x_1 (v_1 - u) sum_j x_j/D_1j = -grad x_1, and
// u is the molar-average velocity up to O(x_1). The relation holds to first
// order in x_1.
func TestDiluteTraceBlanc(t *testing.T) {
	const x1 = 1e-7
	const tol = 1e-5 // O(x1) with a generous constant
	mix, err := NewMixture(
		[]Species{{"He", 4.0026e-3}, {"N2", 28.0134e-3}, {"CO2", 44.0095e-3}},
		[]Pair{{"He", "N2", 7.0e-5}, {"He", "CO2", 5.8e-5}, {"N2", "CO2", 1.6e-5}},
	)
	if err != nil {
		t.Fatal(err)
	}
	cT := 101325 / rt300
	g := 2.0 // grad x_1, 1/m
	xs := []float64{0.3, 0.7}
	x := []float64{x1, (1 - x1) * xs[0], (1 - x1) * xs[1]}
	// Solvent ratio fixed: grad x_j = -g x'_j.
	c, d := idealGasForces(mix, x, []float64{g, -g * xs[0], -g * xs[1]}, cT, 0)
	v := make([]float64, 3)
	if _, err := mix.SpeciesVelocitiesTo(v, c, d, rt300, 0); err != nil {
		t.Fatal(err)
	}
	var nT float64
	for i := range v {
		nT += c[i] * v[i]
	}
	got := c[0]*v[0] - x1*nT
	invD := xs[0]/mix.Diffusivity(0, 1) + xs[1]/mix.Diffusivity(0, 2)
	want := -cT * g / invD // Blanc's law
	r := math.Abs(got-want) / math.Abs(want)
	t.Logf("trace flux relative to Blanc's law: %.2g at x1 = %g", r, x1)
	if r > tol {
		t.Errorf("trace flux %g, want %g from Blanc's law (relative %.2g)", got, want, r)
	}
}

func TestSpeciesVelocities(t *testing.T) {
	const (
		resTol = 1e-11 // ||M v - (d - defect)|| relative to ||d|| + |defect| n
		conTol = 1e-11 // mass-average constraint, relative to sum |rho_i v_i|
	)
	rnd := rand.New(rand.NewPCG(3, 4))
	for n := 2; n <= 5; n++ {
		mix := randomMixture(t, rnd, n)
		for trial := 0; trial < 10; trial++ {
			x := randomComposition(rnd, n, 1e-3)
			c := make([]float64, n)
			floats.ScaleTo(c, 40, x)
			d := make([]float64, n)
			for i := range d {
				d[i] = 1e4 * rnd.NormFloat64()
			}
			consistent := trial%2 == 0
			wantDefect := floats.Sum(d) / float64(n)
			if consistent {
				floats.AddConst(-wantDefect, d) // Gibbs–Duhem: sum d = 0
				wantDefect = 0
			}
			vm := 0.01 * rnd.NormFloat64()
			v := make([]float64, n)
			defect, err := mix.SpeciesVelocitiesTo(v, c, d, rt300, vm)
			if err != nil {
				t.Fatal(err)
			}
			name := fmt.Sprintf("n=%d trial %d", n, trial)
			if math.Abs(defect-wantDefect) > resTol*floats.Norm(d, 2) {
				t.Errorf("%s: defect %g, want sum(d)/n = %g", name, defect, wantDefect)
			}
			m := make([]float64, n*n)
			mix.TransportMatrixTo(m, c, rt300)
			mv := make([]float64, n)
			mat.NewVecDense(n, mv).MulVec(mat.NewDense(n, n, m), mat.NewVecDense(n, v))
			for i := range mv {
				mv[i] -= d[i] - defect
			}
			if r := floats.Norm(mv, 2) / floats.Norm(d, 2); r > resTol {
				t.Errorf("%s: relative residual of the OSM rows %g", name, r)
			}
			var rhov, scale, rho float64
			for i := range v {
				ri := mix.MolarMass(i) * c[i]
				rho += ri
				rhov += ri * v[i]
				scale += math.Abs(ri * v[i])
			}
			if r := math.Abs(rhov-rho*vm) / scale; r > conTol {
				t.Errorf("%s: sum rho_i v_i = %g, want rho v = %g", name, rhov, rho*vm)
			}
		}
	}
	// Bad input: a species with zero concentration.
	mix := airCO2(t)
	_, err := mix.SpeciesVelocitiesTo(make([]float64, 3), []float64{1, 0, 1}, make([]float64, 3), rt300, 0)
	var de *DataError
	if !errors.As(err, &de) || !strings.Contains(err.Error(), `"O2"`) {
		t.Errorf("zero concentration: error %v, want a *DataError naming O2", err)
	}
}
