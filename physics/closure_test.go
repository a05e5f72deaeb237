package physics

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/num/dual"
)

// Tolerances of the closure conformance suite.
const (
	jacobianTol   = 1e-12 // closure Jacobian against the dual-number derivative, max-norm relative
	valueTol      = 1e-13 // closure values against the reference model, max-norm relative
	gibbsDuhemTol = 1e-12 // |sum c_i dmu_i - dp| relative to sum |c_i dmu_i| + |dp|
	roundTripTol  = 1e-12 // x recovered from c(mu(x, p), p), relative per species
	symmetryTol   = 1e-12 // surface Jacobian C_mu + C_p c^T, max-norm relative
	potentialTol  = 1e-12 // PotentialsTo against the reference, relative to max(RT, |mu|)
	closureTrials = 25
)

// closureFixture is one closure under test with an independent reference
// implementation of its model in dual numbers.
type closureFixture struct {
	closure Closure
	species []string
	rt      float64
	// pressure draws an absolute pressure in the model's range; pScale is
	// the size of the pressure perturbations of the Gibbs–Duhem test.
	pressure func(rnd *rand.Rand) float64
	pScale   float64
	// conc is the forward map c(mu, p) and pot the consistent potentials
	// mu(x, p), both written out here independently of the package code.
	conc func(mu []dual.Number, p dual.Number) []dual.Number
	pot  func(x []dual.Number, p dual.Number) []dual.Number
	// allocFree says that ConcentrationsTo must not allocate.
	allocFree bool
}

func real64(v []dual.Number) []float64 {
	out := make([]float64, len(v))
	for i, d := range v {
		out[i] = d.Real
	}
	return out
}

func emag(v []dual.Number) []float64 {
	out := make([]float64, len(v))
	for i, d := range v {
		out[i] = d.Emag
	}
	return out
}

func seeds(v []float64) []dual.Number {
	out := make([]dual.Number, len(v))
	for i, r := range v {
		out[i] = dual.Number{Real: r}
	}
	return out
}

func maxAbs(v []float64) float64 {
	var m float64
	for _, x := range v {
		m = math.Max(m, math.Abs(x))
	}
	return m
}

func maxAbsDiff(a, b []float64) float64 {
	var m float64
	for i := range a {
		m = math.Max(m, math.Abs(a[i]-b[i]))
	}
	return m
}

// testClosure is the conformance suite that every Closure passes: Jacobian
// against dual numbers, Gibbs–Duhem on random consistent states, round trip
// between potentials and composition, symmetry of the Jacobian along the
// equation-of-state surface (a Maxwell relation), nil Jacobian outputs, bad
// input, and allocations.
func testClosure(t *testing.T, name string, f closureFixture) {
	cl := f.closure
	n := cl.Len()
	rnd := rand.New(rand.NewPCG(11, uint64(n)))
	t.Run(name+"/jacobian", func(t *testing.T) {
		var worst, worstP, worstV float64
		for trial := 0; trial < closureTrials; trial++ {
			x := randomComposition(rnd, n, 1e-3)
			p := f.pressure(rnd)
			mu := make([]float64, n)
			if err := cl.PotentialsTo(mu, x, p); err != nil {
				t.Fatal(err)
			}
			if trial%2 == 1 { // off the equation-of-state surface
				for i := range mu {
					mu[i] += 0.3 * f.rt * rnd.NormFloat64()
				}
			}
			c := make([]float64, n)
			jmu := make([]float64, n*n)
			jp := make([]float64, n)
			if err := cl.ConcentrationsTo(c, jmu, jp, mu, p); err != nil {
				t.Fatalf("trial %d: %v", trial, err)
			}
			ref := make([]float64, n*n)
			var refC []float64
			for j := 0; j < n; j++ {
				dmu := seeds(mu)
				dmu[j].Emag = 1
				out := f.conc(dmu, dual.Number{Real: p})
				refC = real64(out)
				for i, d := range out {
					ref[i*n+j] = d.Emag
				}
			}
			refP := emag(f.conc(seeds(mu), dual.Number{Real: p, Emag: 1}))
			rv := maxAbsDiff(c, refC) / maxAbs(refC)
			r := maxAbsDiff(jmu, ref) / maxAbs(ref)
			rp := maxAbsDiff(jp, refP)
			if s := maxAbs(refP); s > 0 {
				rp /= s
			}
			worst, worstP, worstV = math.Max(worst, r), math.Max(worstP, rp), math.Max(worstV, rv)
			if rv > valueTol {
				t.Errorf("trial %d: c = %v, reference %v (relative %.2g)", trial, c, refC, rv)
			}
			if r > jacobianTol {
				t.Errorf("trial %d: dc/dmu differs from the dual-number derivative by %.2g relative\n got %v\nwant %v", trial, r, jmu, ref)
			}
			if rp > jacobianTol {
				t.Errorf("trial %d: dc/dp = %v, dual-number derivative %v (relative %.2g)", trial, jp, refP, rp)
			}
		}
		t.Logf("worst relative deviation from dual numbers: values %.2g, dc/dmu %.2g, dc/dp %.2g", worstV, worst, worstP)
	})

	t.Run(name+"/gibbs-duhem", func(t *testing.T) {
		var worstGD, worstRT, worstSym, worstPot float64
		for trial := 0; trial < closureTrials; trial++ {
			x := randomComposition(rnd, n, 1e-3)
			p := f.pressure(rnd)
			mu := make([]float64, n)
			if err := cl.PotentialsTo(mu, x, p); err != nil {
				t.Fatal(err)
			}
			// A random direction along the surface: dx with sum dx = 0, dp.
			dx := make([]float64, n)
			for i := range dx {
				dx[i] = x[i] * rnd.NormFloat64()
			}
			floats.AddConst(-floats.Sum(dx)/float64(n), dx)
			dp := f.pScale * rnd.NormFloat64()
			xd := seeds(x)
			for i := range xd {
				xd[i].Emag = dx[i]
			}
			refMu := f.pot(xd, dual.Number{Real: p, Emag: dp})
			muScale := math.Max(f.rt, maxAbs(mu))
			rpot := maxAbsDiff(mu, real64(refMu)) / muScale
			worstPot = math.Max(worstPot, rpot)
			if rpot > potentialTol {
				t.Errorf("trial %d: PotentialsTo = %v, reference %v", trial, mu, real64(refMu))
			}
			dmu := emag(refMu)

			c := make([]float64, n)
			jmu := make([]float64, n*n)
			jp := make([]float64, n)
			if err := cl.ConcentrationsTo(c, jmu, jp, mu, p); err != nil {
				t.Fatal(err)
			}
			var gd, scale float64
			for i := range c {
				gd += c[i] * dmu[i]
				scale += math.Abs(c[i] * dmu[i])
			}
			gd -= dp
			scale += math.Abs(dp)
			r := math.Abs(gd) / scale
			worstGD = math.Max(worstGD, r)
			if r > gibbsDuhemTol {
				t.Errorf("trial %d: sum c_i dmu_i - dp = %g (relative %.2g) at x = %v, p = %g", trial, gd, r, x, p)
			}

			// Round trip: the composition of c is x.
			cT := floats.Sum(c)
			for i := range c {
				ri := math.Abs(c[i]/cT-x[i]) / x[i]
				worstRT = math.Max(worstRT, ri)
				if ri > roundTripTol {
					t.Errorf("trial %d: x[%d] from c(mu(x,p),p) = %.16g, want %.16g", trial, i, c[i]/cT, x[i])
				}
			}

			// Maxwell relation: on the surface dc/dmu (total) = C_mu + C_p c^T is
			// the Hessian of P(mu), hence symmetric.
			sj := make([]float64, n*n)
			for i := 0; i < n; i++ {
				for j := 0; j < n; j++ {
					sj[i*n+j] = jmu[i*n+j] + jp[i]*c[j]
				}
			}
			var asym float64
			for i := 0; i < n; i++ {
				for j := 0; j < i; j++ {
					asym = math.Max(asym, math.Abs(sj[i*n+j]-sj[j*n+i]))
				}
			}
			rs := asym / maxAbs(sj)
			worstSym = math.Max(worstSym, rs)
			if rs > symmetryTol {
				t.Errorf("trial %d: surface Jacobian not symmetric: %.2g relative", trial, rs)
			}
		}
		t.Logf("worst: Gibbs–Duhem %.2g, round trip %.2g, surface-Jacobian asymmetry %.2g, potentials %.2g", worstGD, worstRT, worstSym, worstPot)
	})

	t.Run(name+"/nil-jacobian", func(t *testing.T) {
		x := randomComposition(rnd, n, 1e-2)
		p := f.pressure(rnd)
		mu := make([]float64, n)
		if err := cl.PotentialsTo(mu, x, p); err != nil {
			t.Fatal(err)
		}
		c1, c2, c3 := make([]float64, n), make([]float64, n), make([]float64, n)
		jmu, jp := make([]float64, n*n), make([]float64, n)
		for _, call := range []struct {
			c       []float64
			jmu, jp []float64
		}{{c1, jmu, jp}, {c2, nil, nil}, {c3, jmu, nil}} {
			if err := cl.ConcentrationsTo(call.c, call.jmu, call.jp, mu, p); err != nil {
				t.Fatal(err)
			}
		}
		if !floats.Equal(c1, c2) || !floats.Equal(c1, c3) {
			t.Errorf("concentrations depend on which Jacobians are requested: %v, %v, %v", c1, c2, c3)
		}
	})

	t.Run(name+"/bad-input", func(t *testing.T) {
		p := f.pressure(rnd)
		mu := make([]float64, n)
		x := make([]float64, n)
		for _, tc := range []struct {
			name string
			set  func()
			want string
		}{
			{"zero mole fraction", func() { x[0] += x[1]; x[1] = 0 }, fmt.Sprintf("%q", f.species[1])},
			{"negative mole fraction", func() { x[0] += x[1] + 0.1; x[1] = -0.1 }, fmt.Sprintf("%q", f.species[1])},
			{"sum not one", func() { x[0] += 0.1 }, "sum to"},
		} {
			for i := range x {
				x[i] = 1 / float64(n)
			}
			tc.set()
			err := cl.PotentialsTo(mu, x, p)
			var de *DataError
			if !errors.As(err, &de) || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("%s: x = %v: error %v, want a *DataError containing %s", tc.name, x, err, tc.want)
			}
		}
	})

	if f.allocFree {
		t.Run(name+"/allocs", func(t *testing.T) {
			x := randomComposition(rnd, n, 1e-2)
			p := f.pressure(rnd)
			mu := make([]float64, n)
			if err := cl.PotentialsTo(mu, x, p); err != nil {
				t.Fatal(err)
			}
			c, jmu, jp := make([]float64, n), make([]float64, n*n), make([]float64, n)
			if a := testing.AllocsPerRun(50, func() { _ = cl.ConcentrationsTo(c, jmu, jp, mu, p) }); a != 0 {
				t.Errorf("ConcentrationsTo allocates %v times per call, want 0", a)
			}
		})
	}
}

// Dual-number helpers for the reference models.
func dadd(a, b dual.Number) dual.Number           { return dual.Add(a, b) }
func dsub(a, b dual.Number) dual.Number           { return dual.Sub(a, b) }
func dmul(a, b dual.Number) dual.Number           { return dual.Mul(a, b) }
func ddiv(a, b dual.Number) dual.Number           { return dual.Mul(a, dual.Inv(b)) }
func dscale(f float64, a dual.Number) dual.Number { return dual.Scale(f, a) }
func dsum(v []dual.Number) dual.Number {
	var s dual.Number
	for _, d := range v {
		s = dadd(s, d)
	}
	return s
}

// Reference models, written from the formulas of the closures' documentation.

func refIdealGasConc(rt, pRef float64) func([]dual.Number, dual.Number) []dual.Number {
	return func(mu []dual.Number, p dual.Number) []dual.Number {
		c := make([]dual.Number, len(mu))
		for i := range mu {
			c[i] = dscale(pRef/rt, dual.Exp(dscale(1/rt, mu[i])))
		}
		return c
	}
}

func refIdealGasPot(rt, pRef float64) func([]dual.Number, dual.Number) []dual.Number {
	return func(x []dual.Number, p dual.Number) []dual.Number {
		mu := make([]dual.Number, len(x))
		for i := range x {
			mu[i] = dscale(rt, dual.Log(dscale(1/pRef, dmul(x[i], p))))
		}
		return mu
	}
}

func refIdealGasAtPressureConc(rt float64) func([]dual.Number, dual.Number) []dual.Number {
	return func(mu []dual.Number, p dual.Number) []dual.Number {
		a := make([]dual.Number, len(mu))
		for i := range mu {
			a[i] = dual.Exp(dscale(1/rt, mu[i]))
		}
		s := dsum(a)
		for i := range a {
			a[i] = dscale(1/rt, dmul(ddiv(a[i], s), p))
		}
		return a
	}
}

// refSolutionPot returns mu_i = V_i (p - P_ref) + RT (ln x_i + ln gamma_i(x))
// for the Margules matrix a (nil: ideal solution).
func refSolutionPot(vol []float64, a [][]float64, rt, pRef float64) func([]dual.Number, dual.Number) []dual.Number {
	return func(x []dual.Number, p dual.Number) []dual.Number {
		mu := make([]dual.Number, len(x))
		lg := refLnGamma(a, x)
		for i := range x {
			mu[i] = dadd(dscale(vol[i], dsub(p, dual.Number{Real: pRef})), dscale(rt, dadd(dual.Log(x[i]), lg[i])))
		}
		return mu
	}
}

// refLnGamma is the two-suffix Margules ln gamma_k = sum_j A_kj x_j -
// sum_{i<j} A_ij x_i x_j (zero when a is nil).
func refLnGamma(a [][]float64, x []dual.Number) []dual.Number {
	n := len(x)
	lg := make([]dual.Number, n)
	if a == nil {
		return lg
	}
	var q dual.Number
	for i := 0; i < n; i++ {
		for j := i + 1; j < n; j++ {
			q = dadd(q, dscale(a[i][j], dmul(x[i], x[j])))
		}
	}
	for k := 0; k < n; k++ {
		var s dual.Number
		for j := 0; j < n; j++ {
			s = dadd(s, dscale(a[k][j], x[j]))
		}
		lg[k] = dsub(s, q)
	}
	return lg
}

func refIdealSolutionConc(vol []float64, rt, pRef float64) func([]dual.Number, dual.Number) []dual.Number {
	return func(mu []dual.Number, p dual.Number) []dual.Number {
		n := len(mu)
		a := make([]dual.Number, n)
		for i := range mu {
			a[i] = dual.Exp(dscale(1/rt, dsub(mu[i], dscale(vol[i], dsub(p, dual.Number{Real: pRef})))))
		}
		s := dsum(a)
		var vm dual.Number
		for i := range a {
			a[i] = ddiv(a[i], s)
			vm = dadd(vm, dscale(vol[i], a[i]))
		}
		for i := range a {
			a[i] = ddiv(a[i], vm)
		}
		return a
	}
}

// refMargulesConc solves ln x_i + ln gamma_i(x) + lambda = b_i, sum x = 1 by
// Newton's method in (x, lambda) carried out in dual arithmetic (the package
// iterates in ln x with a line search), then returns c = x / sum x_j V_j.
func refMargulesConc(vol []float64, a [][]float64, rt, pRef float64) func([]dual.Number, dual.Number) []dual.Number {
	return func(mu []dual.Number, p dual.Number) []dual.Number {
		n := len(mu)
		b := make([]dual.Number, n)
		x := make([]dual.Number, n)
		br := make([]float64, n)
		for i := range mu {
			b[i] = dscale(1/rt, dsub(mu[i], dscale(vol[i], dsub(p, dual.Number{Real: pRef}))))
			br[i] = b[i].Real
		}
		xr := make([]float64, n)
		softmaxTo(xr, br)
		for i := range x {
			x[i] = dual.Number{Real: xr[i]}
		}
		var lam dual.Number
		extra := 0
		for it := 0; it < 200 && extra < 4; it++ {
			lg := refLnGamma(a, x)
			k := n + 1
			jac := make([]dual.Number, k*k)
			rhs := make([]dual.Number, k)
			var res float64
			for i := 0; i < n; i++ {
				f := dsub(dadd(dadd(dual.Log(x[i]), lg[i]), lam), b[i])
				rhs[i] = dscale(-1, f)
				res = math.Max(res, math.Abs(f.Real))
				for j := 0; j < n; j++ {
					// d ln gamma_i / d x_j = A_ij - sum_k A_jk x_k
					var s dual.Number
					for kk := 0; kk < n; kk++ {
						s = dadd(s, dscale(a[j][kk], x[kk]))
					}
					jac[i*k+j] = dsub(dual.Number{Real: a[i][j]}, s)
				}
				jac[i*k+i] = dadd(jac[i*k+i], dual.Inv(x[i]))
				jac[i*k+n] = dual.Number{Real: 1}
				jac[n*k+i] = dual.Number{Real: 1}
			}
			fs := dsub(dsum(x), dual.Number{Real: 1})
			rhs[n] = dscale(-1, fs)
			res = math.Max(res, math.Abs(fs.Real))
			if res < 1e-14*(1+maxAbs(br)) {
				extra++
			}
			d := dualSolve(jac, rhs, k)
			t := 1.0
			for {
				ok := true
				for i := 0; i < n; i++ {
					if x[i].Real+t*d[i].Real <= 0 {
						ok = false
					}
				}
				if ok {
					break
				}
				t /= 2
			}
			for i := 0; i < n; i++ {
				x[i] = dadd(x[i], dscale(t, d[i]))
			}
			lam = dadd(lam, dscale(t, d[n]))
		}
		var vm dual.Number
		for i := range x {
			vm = dadd(vm, dscale(vol[i], x[i]))
		}
		c := make([]dual.Number, n)
		for i := range x {
			c[i] = ddiv(x[i], vm)
		}
		return c
	}
}

// dualSolve solves the k×k system a z = b in dual arithmetic by Gaussian
// elimination with partial pivoting on the real parts.
func dualSolve(a, b []dual.Number, k int) []dual.Number {
	a = append([]dual.Number(nil), a...)
	b = append([]dual.Number(nil), b...)
	for c := 0; c < k; c++ {
		p := c
		for i := c + 1; i < k; i++ {
			if math.Abs(a[i*k+c].Real) > math.Abs(a[p*k+c].Real) {
				p = i
			}
		}
		for j := 0; j < k; j++ {
			a[c*k+j], a[p*k+j] = a[p*k+j], a[c*k+j]
		}
		b[c], b[p] = b[p], b[c]
		for i := c + 1; i < k; i++ {
			l := ddiv(a[i*k+c], a[c*k+c])
			for j := c; j < k; j++ {
				a[i*k+j] = dsub(a[i*k+j], dmul(l, a[c*k+j]))
			}
			b[i] = dsub(b[i], dmul(l, b[c]))
		}
	}
	z := make([]dual.Number, k)
	for i := k - 1; i >= 0; i-- {
		s := b[i]
		for j := i + 1; j < k; j++ {
			s = dsub(s, dmul(a[i*k+j], z[j]))
		}
		z[i] = ddiv(s, a[i*k+i])
	}
	return z
}

// Case data for the closure tests.
const (
	pAtm = 101325.0 // Pa
)

// liquidMixture returns n liquid species with plausible partial molar volumes
// (m^3/mol; water 1.8e-5, ethanol 5.8e-5 from memory, the others invented).
func liquidMixture(t testing.TB, n int) (*Mixture, []float64) {
	t.Helper()
	names := []string{"water", "ethanol", "glycerol", "acetone"}
	mass := []float64{18.015e-3, 46.07e-3, 92.09e-3, 58.08e-3}
	vol := []float64{1.8e-5, 5.8e-5, 7.3e-5, 7.4e-5}
	sp := make([]Species, n)
	var pairs []Pair
	for i := 0; i < n; i++ {
		sp[i] = Species{names[i], mass[i]}
		for j := 0; j < i; j++ {
			pairs = append(pairs, Pair{names[j], names[i], 1e-9})
		}
	}
	mix, err := NewMixture(sp, pairs)
	if err != nil {
		t.Fatal(err)
	}
	return mix, vol[:n]
}

func gasPressure(rnd *rand.Rand) float64    { return pAtm * (0.5 + 1.5*rnd.Float64()) }
func liquidPressure(rnd *rand.Rand) float64 { return pAtm * (1 + 100*rnd.Float64()) }

// margulesTernary holds A_ij for the ternary tests (invented, stable:
// smallest tangential eigenvalue above -2).
var margulesTernary = [][]float64{{0, 1.2, -0.8}, {1.2, 0, 0.5}, {-0.8, 0.5, 0}}

func margulesPairs(mix *Mixture, a [][]float64) []Pair {
	var pairs []Pair
	for i := range a {
		for j := i + 1; j < len(a); j++ {
			pairs = append(pairs, Pair{mix.Name(i), mix.Name(j), a[i][j]})
		}
	}
	return pairs
}

func TestClosures(t *testing.T) {
	gas := airCO2(t)
	gasNames := []string{"N2", "O2", "CO2"}

	ig, err := NewIdealGas(gas, rt300, pAtm)
	if err != nil {
		t.Fatal(err)
	}
	testClosure(t, "ideal gas", closureFixture{
		closure: ig, species: gasNames, rt: rt300, pressure: gasPressure, pScale: 0.1 * pAtm,
		conc: refIdealGasConc(rt300, pAtm), pot: refIdealGasPot(rt300, pAtm), allocFree: true,
	})

	igp, err := NewIdealGasAtPressure(gas, rt300, pAtm)
	if err != nil {
		t.Fatal(err)
	}
	testClosure(t, "ideal gas at pressure", closureFixture{
		closure: igp, species: gasNames, rt: rt300, pressure: gasPressure, pScale: 0.1 * pAtm,
		conc: refIdealGasAtPressureConc(rt300), pot: refIdealGasPot(rt300, pAtm), allocFree: true,
	})

	for _, n := range []int{2, 4} {
		liq, vol := liquidMixture(t, n)
		is, err := NewIdealSolution(liq, vol, rt300, pAtm)
		if err != nil {
			t.Fatal(err)
		}
		names := make([]string, n)
		for i := range names {
			names[i] = liq.Name(i)
		}
		testClosure(t, fmt.Sprintf("ideal solution n=%d", n), closureFixture{
			closure: is, species: names, rt: rt300, pressure: liquidPressure, pScale: 1e6,
			conc: refIdealSolutionConc(vol, rt300, pAtm), pot: refSolutionPot(vol, nil, rt300, pAtm), allocFree: true,
		})
	}

	for _, tc := range []struct {
		name string
		a    [][]float64
	}{
		{"Margules binary", [][]float64{{0, 1.5}, {1.5, 0}}},
		{"Margules binary negative", [][]float64{{0, -2.5}, {-2.5, 0}}},
		{"Margules ternary", margulesTernary},
	} {
		n := len(tc.a)
		liq, vol := liquidMixture(t, n)
		ms, err := NewMargulesSolution(liq, vol, margulesPairs(liq, tc.a), rt300, pAtm)
		if err != nil {
			t.Fatal(err)
		}
		names := make([]string, n)
		for i := range names {
			names[i] = liq.Name(i)
		}
		testClosure(t, tc.name, closureFixture{
			closure: ms, species: names, rt: rt300, pressure: liquidPressure, pScale: 1e6,
			conc: refMargulesConc(vol, tc.a, rt300, pAtm), pot: refSolutionPot(vol, tc.a, rt300, pAtm), allocFree: true,
		})
	}
}

// TestIdealGasClosedForms checks the ideal-gas relations directly: at
// mu = PotentialsTo(x, p) the concentrations are x p/RT, the thermodynamic
// pressure is p, and IdealGasAtPressure agrees with IdealGas (closed forms
// of the model definitions).
func TestIdealGasClosedForms(t *testing.T) {
	const tol = 1e-14
	gas := airCO2(t)
	ig, _ := NewIdealGas(gas, rt300, pAtm)
	igp, _ := NewIdealGasAtPressure(gas, rt300, pAtm)
	rnd := rand.New(rand.NewPCG(5, 6))
	for trial := 0; trial < 10; trial++ {
		x := randomComposition(rnd, 3, 1e-6)
		p := gasPressure(rnd)
		mu := make([]float64, 3)
		if err := ig.PotentialsTo(mu, x, p); err != nil {
			t.Fatal(err)
		}
		c, c2 := make([]float64, 3), make([]float64, 3)
		_ = ig.ConcentrationsTo(c, nil, nil, mu, p)
		_ = igp.ConcentrationsTo(c2, nil, nil, mu, p)
		for i := range c {
			want := x[i] * p / rt300
			if math.Abs(c[i]-want) > tol*want || math.Abs(c2[i]-want) > tol*want {
				t.Errorf("trial %d: c[%d] = %g (ideal gas), %g (at pressure), want x p/RT = %g", trial, i, c[i], c2[i], want)
			}
		}
		if got := ig.Pressure(mu); math.Abs(got-p) > tol*p {
			t.Errorf("trial %d: Pressure = %.16g, want %.16g", trial, got, p)
		}
	}
	// Overflow is a StateError naming the species.
	c := make([]float64, 3)
	err := ig.ConcentrationsTo(c, nil, nil, []float64{0, 1e7, 0}, pAtm)
	var se *StateError
	if !errors.As(err, &se) || se.Species != "O2" {
		t.Errorf("overflow: error %v, want a *StateError naming O2", err)
	}
	if err := igp.ConcentrationsTo(c, nil, nil, []float64{0, 0, 0}, -1); !errors.As(err, &se) {
		t.Errorf("negative pressure: error %v, want a *StateError", err)
	}
	if err := ig.PotentialsTo(c, []float64{0.2, 0.3, 0.5}, 0); !errors.As(err, &se) {
		t.Errorf("zero pressure: error %v, want a *StateError", err)
	}
}

// TestMargulesClosedForms checks the binary two-suffix Margules law
// ln gamma_1 = A x_2^2, ln gamma_2 = A x_1^2 (Prausnitz et al. 1999, ch. 6)
// through PotentialsTo, and that the Newton solve reproduces x at states
// far from the ideal start.
func TestMargulesClosedForms(t *testing.T) {
	const tol = 1e-12
	liq, vol := liquidMixture(t, 2)
	const a = 1.7
	ms, err := NewMargulesSolution(liq, vol, []Pair{{"ethanol", "water", a}}, rt300, pAtm)
	if err != nil {
		t.Fatal(err)
	}
	is, _ := NewIdealSolution(liq, vol, rt300, pAtm)
	for _, x1 := range []float64{1e-8, 0.1, 0.5, 0.9, 1 - 1e-8} {
		x := []float64{x1, 1 - x1}
		p := 3e6
		mu, mi := make([]float64, 2), make([]float64, 2)
		if err := ms.PotentialsTo(mu, x, p); err != nil {
			t.Fatal(err)
		}
		_ = is.PotentialsTo(mi, x, p)
		want := []float64{a * x[1] * x[1], a * x[0] * x[0]}
		for i := range mu {
			if got := (mu[i] - mi[i]) / rt300; math.Abs(got-want[i]) > tol {
				t.Errorf("x1 = %g: ln gamma_%d = %.15g, want %.15g", x1, i+1, got, want[i])
			}
		}
		c := make([]float64, 2)
		if err := ms.ConcentrationsTo(c, nil, nil, mu, p); err != nil {
			t.Fatal(err)
		}
		// Closed form: c_i = x_i / (x_1 V_1 + x_2 V_2).
		vm := x[0]*vol[0] + x[1]*vol[1]
		for i := range c {
			if w := x[i] / vm; math.Abs(c[i]-w) > tol*w {
				t.Errorf("x1 = %g: c[%d] = %.16g, want %.16g", x1, i, c[i], w)
			}
		}
	}
}

func TestClosureConstructorErrors(t *testing.T) {
	liq, vol := liquidMixture(t, 3)
	gas := airCO2(t)
	for _, tc := range []struct {
		name string
		make func() error
		want string
	}{
		{"gas RT zero", func() error { _, err := NewIdealGas(gas, 0, pAtm); return err }, "RT = 0"},
		{"gas pRef negative", func() error { _, err := NewIdealGasAtPressure(gas, rt300, -1); return err }, "reference pressure -1"},
		{"volume missing", func() error { _, err := NewIdealSolution(liq, vol[:2], rt300, pAtm); return err }, "2 partial molar volumes given for 3 species"},
		{"volume negative", func() error {
			_, err := NewIdealSolution(liq, []float64{1e-5, -1e-5, 1e-5}, rt300, pAtm)
			return err
		}, `species "ethanol": partial molar volume -1e-05`},
		{"Margules unknown species", func() error {
			_, err := NewMargulesSolution(liq, vol, []Pair{{"water", "benzene", 1}}, rt300, pAtm)
			return err
		}, `unknown species "benzene"`},
		{"Margules self pair", func() error {
			_, err := NewMargulesSolution(liq, vol, []Pair{{"water", "water", 1}}, rt300, pAtm)
			return err
		}, "itself"},
		{"Margules conflicting", func() error {
			_, err := NewMargulesSolution(liq, vol, []Pair{{"water", "ethanol", 1}, {"ethanol", "water", 0.5}}, rt300, pAtm)
			return err
		}, `pair ("ethanol", "water"): Margules coefficient given twice`},
		{"Margules binary unstable", func() error {
			bin, v2 := liquidMixture(t, 2)
			_, err := NewMargulesSolution(bin, v2, []Pair{{"water", "ethanol", 2.1}}, rt300, pAtm)
			return err
		}, `pair ("water", "ethanol"): Margules coefficient 2.1 allows phase splitting`},
		{"Margules ternary unstable", func() error {
			_, err := NewMargulesSolution(liq, vol, []Pair{{"water", "ethanol", 3}, {"water", "glycerol", 3}, {"ethanol", "glycerol", -1}}, rt300, pAtm)
			return err
		}, "allow phase splitting"},
	} {
		err := tc.make()
		var de *DataError
		if !errors.As(err, &de) || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: error %v, want a *DataError containing %q", tc.name, err, tc.want)
		}
	}
}

// TestMargulesNewtonRobust drives the pointwise Newton iteration to the
// edges of its range: a binary close to the critical coefficient A = 2,
// trace compositions, and potentials far off the equation-of-state surface.
func TestMargulesNewtonRobust(t *testing.T) {
	const tol = 1e-10 // recovered mole fraction, relative
	for _, tc := range []struct {
		name string
		a    [][]float64
	}{
		{"binary A=1.999", [][]float64{{0, 1.999}, {1.999, 0}}},
		{"binary A=-20", [][]float64{{0, -20}, {-20, 0}}},
		{"ternary", margulesTernary},
		{"ternary near critical", [][]float64{{0, 1.9, 1.9}, {1.9, 0, 1.9}, {1.9, 1.9, 0}}},
	} {
		n := len(tc.a)
		liq, vol := liquidMixture(t, n)
		ms, err := NewMargulesSolution(liq, vol, margulesPairs(liq, tc.a), rt300, pAtm)
		if err != nil {
			t.Fatal(err)
		}
		rnd := rand.New(rand.NewPCG(9, uint64(n)))
		c, mu := make([]float64, n), make([]float64, n)
		jmu, jp := make([]float64, n*n), make([]float64, n)
		for trial := 0; trial < 200; trial++ {
			x := randomComposition(rnd, n, 1e-12)
			p := liquidPressure(rnd)
			if err := ms.PotentialsTo(mu, x, p); err != nil {
				t.Fatal(err)
			}
			if err := ms.ConcentrationsTo(c, jmu, jp, mu, p); err != nil {
				t.Fatalf("%s: x = %v: %v", tc.name, x, err)
			}
			cT := floats.Sum(c)
			for i := range x {
				if r := math.Abs(c[i]/cT-x[i]) / x[i]; r > tol {
					t.Errorf("%s: x = %v: recovered x[%d] = %.16g (relative %.2g)", tc.name, x, i, c[i]/cT, r)
				}
			}
			for i := range mu {
				mu[i] += 100 * rt300 * rnd.NormFloat64() // far off the surface
			}
			if err := ms.ConcentrationsTo(c, jmu, jp, mu, p); err != nil {
				t.Errorf("%s: off-surface state mu = %v: %v", tc.name, mu, err)
			}
		}
	}
}

// TestLevelInvariantClosures checks LevelTo against its definition: the
// concentrations do not change when a constant is added to every
// potential, the level moves by that constant, it is zero at the
// potentials of PotentialsTo, and its gradient is the mole fractions (a
// consequence of L = RT ln sum_j a_j, checked by central differences).
func TestLevelInvariantClosures(t *testing.T) {
	gas := airCO2(t)
	igp, err := NewIdealGasAtPressure(gas, rt300, pAtm)
	if err != nil {
		t.Fatal(err)
	}
	liq, vol := liquidMixture(t, 3)
	is, err := NewIdealSolution(liq, vol, rt300, pAtm)
	if err != nil {
		t.Fatal(err)
	}
	ms, err := NewMargulesSolution(liq, vol, margulesPairs(liq, margulesTernary), rt300, pAtm)
	if err != nil {
		t.Fatal(err)
	}
	x := []float64{0.2, 0.5, 0.3}
	for _, tc := range []struct {
		name string
		c    Closure
		p    float64
	}{{"ideal gas at pressure", igp, 1.2 * pAtm}, {"ideal solution", is, 3e6}, {"Margules", ms, 3e6}} {
		li := tc.c.(LevelInvariant)
		mu := make([]float64, 3)
		if err := tc.c.PotentialsTo(mu, x, tc.p); err != nil {
			t.Fatal(err)
		}
		dL := make([]float64, 3)
		if l := li.LevelTo(dL, mu, tc.p); math.Abs(l) > 1e-9*rt300 {
			t.Errorf("%s: level %g at the equation-of-state potentials, want 0", tc.name, l)
		}
		for k, want := range x {
			if math.Abs(dL[k]-want) > 1e-12 {
				t.Errorf("%s: dL/dmu_%d = %.15g, want x = %g", tc.name, k, dL[k], want)
			}
		}
		const s = 0.7 * rt300
		c0, c1 := make([]float64, 3), make([]float64, 3)
		shifted := []float64{mu[0] + s, mu[1] + s, mu[2] + s}
		if err := tc.c.ConcentrationsTo(c0, nil, nil, mu, tc.p); err != nil {
			t.Fatal(err)
		}
		if err := tc.c.ConcentrationsTo(c1, nil, nil, shifted, tc.p); err != nil {
			t.Fatal(err)
		}
		for k := range c0 {
			if math.Abs(c1[k]-c0[k]) > 1e-12*c0[k] {
				t.Errorf("%s: c_%d changes from %g to %g with the level", tc.name, k, c0[k], c1[k])
			}
		}
		if l := li.LevelTo(dL, shifted, tc.p); math.Abs(l-s) > 1e-9*rt300 {
			t.Errorf("%s: level %g after a shift of %g", tc.name, l, s)
		}
		// Central differences of L at a point off the surface.
		mu2 := []float64{mu[0] - 0.3*rt300, mu[1] + 0.1*rt300, mu[2]}
		li.LevelTo(dL, mu2, tc.p)
		for k := range mu2 {
			h := 1e-5 * rt300
			up, dn := slices.Clone(mu2), slices.Clone(mu2)
			up[k] += h
			dn[k] -= h
			scratch := make([]float64, 3)
			fd := (li.LevelTo(scratch, up, tc.p) - li.LevelTo(scratch, dn, tc.p)) / (2 * h)
			if math.Abs(fd-dL[k]) > 1e-7 {
				t.Errorf("%s: dL/dmu_%d = %.10g, central difference %.10g", tc.name, k, dL[k], fd)
			}
		}
	}
}
