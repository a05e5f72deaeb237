package verification

import (
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"strings"
	"testing"
)

// Tests of the manufactured SOSM solution (sosmexact.go). The derivatives
// are checked against an independent evaluation: complex-step
// differentiation (Squire & Trapp, SIAM Review 40, 1998; Martins, Sturdza &
// Alonso, ACM TOMS 29, 2003) of the same formulas written again here in
// complex forward-mode arithmetic (value and gradient, sosmCS). A step
// h = 1e-30 along axis a gives d_a f = Im f(x + i h e_a) / h exact to
// rounding, and applied to the forward-mode gradient it gives second
// derivatives. The consistent flavour's species velocities are solved here
// in complex arithmetic with the FIRST OSM row replaced by the mass-average
// condition (the code under test replaces the last), and with the driving
// force written as c_i grad mu_i (the code under test uses grad c_i).

const (
	sosmIdentityTol   = 1e-12 // OSM identity, relative to the sum of |terms|
	sosmMassAvgTol    = 1e-13 // v = sum J / rho, relative
	sosmDerivTol      = 1e-12 // against complex step, relative (absolute below 1)
	sosmSourceTol     = 1e-12 // consistent: |g_i|, sum d_i, Gibbs–Duhem, relative to the terms
	sosmClosureTol    = 1e-14 // c = exp(mu), mu = ln c, c_T = 1 + S p, r = div J / M
	sosmFDTol         = 1e-6  // central differences, sanity check only
	sosmComplexStep   = 1e-30
	sosmFDStep        = 1e-5
	sosmRandomPoints  = 40
	sosmPositiveNodes = 101 // grid nodes per side for the positivity check
)

type sosmCase struct {
	name        string
	flavour     string
	n           int
	S, eta, lam float64
}

// sosmCases: every flavour for n = 2, 3, 4 with O(1) groups (verification
// layer (a) of formulation.md section 8), plus n = 6 at the physical group
// S = 1e-7 (layer (b)). The values of S, eta and lambda are our own choice;
// eta + lambda > 0 as newSOSMExact requires.
func sosmCases() []sosmCase {
	var cs []sosmCase
	for _, f := range sosmFlavourNames {
		for n := 2; n <= 4; n++ {
			cs = append(cs, sosmCase{name: fmt.Sprintf("%s/n=%d", f, n), flavour: f, n: n, S: 0.8, eta: 1.3, lam: -0.4})
		}
		cs = append(cs, sosmCase{name: f + "/n=6/S=1e-7", flavour: f, n: 6, S: 1e-7, eta: 1, lam: 0.5})
	}
	return cs
}

func (tc sosmCase) exact(t testing.TB) *sosmExact {
	t.Helper()
	mass, diff := sosmDefaultData(tc.n)
	e, err := newSOSMExact(tc.flavour, tc.n, mass, diff, tc.S, tc.eta, tc.lam)
	if err != nil {
		t.Fatalf("%s: %v", tc.name, err)
	}
	return e
}

func sosmRandomPoint(rng *rand.Rand) [2]float64 { return [2]float64{rng.Float64(), rng.Float64()} }

// sosmRelErr is |got - want| / max(1, |want|).
func sosmRelErr(got, want float64) float64 {
	return math.Abs(got-want) / math.Max(1, math.Abs(want))
}

// sosmMax records the largest error of each named quantity and reports it.
type sosmMax map[string]float64

func (m sosmMax) add(name string, err float64) {
	if cur, ok := m[name]; !ok || err > cur || math.IsNaN(err) {
		m[name] = err
	}
}

func (m sosmMax) check(t *testing.T, caseName string, tol float64) {
	t.Helper()
	for name, err := range m {
		if !(err <= tol) {
			t.Errorf("%s: %s: max error %.3g, want <= %.0e", caseName, name, err, tol)
		}
	}
}

func (m sosmMax) String() string {
	var b strings.Builder
	for _, name := range []string{"C", "GradC", "Mu", "GradMu", "P", "GradP", "V", "GradV", "J", "DivJ", "F",
		"osm", "massavg", "r", "G", "sumd", "gibbsduhem", "gradcT", "closure"} {
		if err, ok := m[name]; ok {
			fmt.Fprintf(&b, " %s=%.1e", name, err)
		}
	}
	return b.String()
}

func TestSOSMExactOSMIdentity(t *testing.T) {
	for _, tc := range sosmCases() {
		e := tc.exact(t)
		pt := e.newPoint()
		rng := rand.New(rand.NewPCG(1, 2))
		errs := sosmMax{}
		for k := 0; k < sosmRandomPoints; k++ {
			x := sosmRandomPoint(rng)
			e.at(pt, x)
			n := tc.n
			var rho, cT float64
			for i := 0; i < n; i++ {
				rho += e.mass[i] * pt.C[i]
				cT += pt.C[i]
			}
			// Full transport matrix, M_ij = -c_i c_j / (c_T D_ij), M_ii = -sum_{j != i} M_ij.
			M := make([][]float64, n)
			for i := range M {
				M[i] = make([]float64, n)
				for j := 0; j < n; j++ {
					if j != i {
						M[i][j] = -pt.C[i] * pt.C[j] / (cT * sosmTestDiff(n, i, j))
						M[i][i] -= M[i][j]
					}
				}
			}
			for a := 0; a < 2; a++ {
				var sumJ, scale float64
				for i := 0; i < n; i++ {
					sumJ += pt.J[i][a]
					scale += math.Abs(pt.J[i][a])
				}
				errs.add("massavg", math.Abs(pt.V[a]-sumJ/rho)/(scale/rho))
				for i := 0; i < n; i++ {
					w := e.mass[i] * pt.C[i] / rho
					terms := []float64{-pt.C[i] * pt.GradMu[i][a], tc.S * w * pt.GradP[a], pt.G[i][a]}
					for j := 0; j < n; j++ {
						terms = append(terms, -M[i][j]*pt.J[j][a]/(e.mass[j]*pt.C[j]))
					}
					var res, scale float64
					for _, v := range terms {
						res += v
						scale += math.Abs(v)
					}
					errs.add("osm", math.Abs(res)/scale)
				}
			}
			for i := 0; i < n; i++ {
				errs.add("r", math.Abs(pt.R[i]*e.mass[i]-pt.DivJ[i])/math.Max(1, math.Abs(pt.DivJ[i])))
			}
		}
		t.Logf("%s:%v", tc.name, errs)
		for name, tol := range map[string]float64{"osm": sosmIdentityTol, "massavg": sosmMassAvgTol, "r": sosmClosureTol} {
			if !(errs[name] <= tol) {
				t.Errorf("%s: %s: max error %.3g, want <= %.0e", tc.name, name, errs[name], tol)
			}
		}
	}
}

// sosmTestDiff returns D_ij of the data the tests pass to newSOSMExact, so
// that the checks do not read the transport data back from the code under
// test.
func sosmTestDiff(n, i, j int) float64 {
	_, diff := sosmDefaultData(n)
	return diff[i*n+j]
}

func TestSOSMExactPositive(t *testing.T) {
	// c_i > 0 on a grid including the boundary of the unit square, for
	// every flavour and every supported n; also p > 0, which the
	// construction promises (p >= 0.2).
	for _, f := range sosmFlavourNames {
		for n := 2; n <= sosmMaxSpecies; n++ {
			name := fmt.Sprintf("%s/n=%d", f, n)
			tc := sosmCase{name: name, flavour: f, n: n, S: 0.8, eta: 1, lam: 0}
			e := tc.exact(t)
			pt := e.newPoint()
			minC, minP := math.Inf(1), math.Inf(1)
			for iy := 0; iy < sosmPositiveNodes; iy++ {
				for ix := 0; ix < sosmPositiveNodes; ix++ {
					x := [2]float64{float64(ix) / (sosmPositiveNodes - 1), float64(iy) / (sosmPositiveNodes - 1)}
					e.at(pt, x)
					for _, c := range pt.C {
						minC = math.Min(minC, c)
					}
					minP = math.Min(minP, pt.P)
				}
			}
			t.Logf("%s: min c = %.3f, min p = %.3f", name, minC, minP)
			if !(minC > 0) || !(minP > 0) {
				t.Errorf("%s: min c = %g, min p = %g, want both positive", name, minC, minP)
			}
		}
	}
}

// sosmCS is a value and its gradient with complex entries: forward-mode
// differentiation in complex arithmetic, for the complex-step reference.
type sosmCS struct {
	v complex128
	d [2]complex128
}

func sosmCSConst(a float64) sosmCS { return sosmCS{v: complex(a, 0)} }

func sosmCSAdd(a, b sosmCS) sosmCS {
	return sosmCS{a.v + b.v, [2]complex128{a.d[0] + b.d[0], a.d[1] + b.d[1]}}
}

func sosmCSScale(s float64, a sosmCS) sosmCS {
	k := complex(s, 0)
	return sosmCS{k * a.v, [2]complex128{k * a.d[0], k * a.d[1]}}
}

func sosmCSMul(a, b sosmCS) sosmCS {
	return sosmCS{a.v * b.v, [2]complex128{a.d[0]*b.v + a.v*b.d[0], a.d[1]*b.v + a.v*b.d[1]}}
}

func sosmCSDiv(a, b sosmCS) sosmCS {
	q := a.v / b.v
	return sosmCS{q, [2]complex128{(a.d[0] - q*b.d[0]) / b.v, (a.d[1] - q*b.d[1]) / b.v}}
}

// csChain applies a function with value f and derivative df at a.v.
func sosmCSChain(a sosmCS, f, df complex128) sosmCS {
	return sosmCS{f, [2]complex128{df * a.d[0], df * a.d[1]}}
}

func sosmCSSin(a sosmCS) sosmCS { return sosmCSChain(a, cmplx.Sin(a.v), cmplx.Cos(a.v)) }

func sosmCSExp(a sosmCS) sosmCS { e := cmplx.Exp(a.v); return sosmCSChain(a, e, e) }

func sosmCSLog(a sosmCS) sosmCS { return sosmCSChain(a, cmplx.Log(a.v), 1/a.v) }

// csField evaluates base + sum amp sin(k . x + phase) exp(g . x).
func sosmCSField(f *sosmField, x, y sosmCS) sosmCS {
	s := sosmCSConst(f.base)
	for _, t := range f.terms {
		arg := sosmCSAdd(sosmCSAdd(sosmCSScale(t.k[0], x), sosmCSScale(t.k[1], y)), sosmCSConst(t.phase))
		env := sosmCSExp(sosmCSAdd(sosmCSScale(t.g[0], x), sosmCSScale(t.g[1], y)))
		s = sosmCSAdd(s, sosmCSScale(t.amp, sosmCSMul(sosmCSSin(arg), env)))
	}
	return s
}

// sosmCSFields are the fields at a complex point.
type sosmCSFields struct {
	c, mu []sosmCS
	p     sosmCS
	v     [2]sosmCS
	J     [][2]complex128
}

func sosmEvalCS(e *sosmExact, z [2]complex128) sosmCSFields {
	n := e.n
	x := sosmCS{v: z[0], d: [2]complex128{1, 0}}
	y := sosmCS{v: z[1], d: [2]complex128{0, 1}}
	f := sosmCSFields{c: make([]sosmCS, n), mu: make([]sosmCS, n), J: make([][2]complex128, n)}
	f.p = sosmCSField(&e.pres, x, y)
	switch e.flavour {
	case sosmFrozen, sosmNonlinear:
		var rho sosmCS
		var sum [2]sosmCS
		for i := 0; i < n; i++ {
			f.mu[i] = sosmCSField(&e.pot[i], x, y)
			if e.flavour == sosmFrozen {
				f.c[i] = sosmCSField(&e.conc[i], x, y)
			} else {
				f.c[i] = sosmCSExp(f.mu[i])
			}
			rho = sosmCSAdd(rho, sosmCSScale(e.mass[i], f.c[i]))
			for a := 0; a < 2; a++ {
				J := sosmCSField(&e.flux[i][a], x, y)
				f.J[i][a] = J.v
				sum[a] = sosmCSAdd(sum[a], J)
			}
		}
		for a := 0; a < 2; a++ {
			f.v[a] = sosmCSDiv(sum[a], rho)
		}
	case sosmConsistent:
		cT := sosmCSAdd(sosmCSConst(1), sosmCSScale(e.S, f.p))
		var den sosmCS
		ex := make([]sosmCS, n)
		for i := 0; i < n; i++ {
			ex[i] = sosmCSExp(sosmCSField(&e.logit[i], x, y))
			den = sosmCSAdd(den, ex[i])
		}
		var rho complex128
		for i := 0; i < n; i++ {
			f.c[i] = sosmCSMul(sosmCSDiv(ex[i], den), cT)
			f.mu[i] = sosmCSLog(f.c[i])
			rho += complex(e.mass[i], 0) * f.c[i].v
		}
		for a := 0; a < 2; a++ {
			f.v[a] = sosmCSField(&e.vel[a], x, y)
		}
		// Row 0: sum_j rho_j v_j = rho v; rows 1..n-1: OSM rows
		// sum_j M_ij v_j = S w_i grad p - c_i grad mu_i.
		_, diff := sosmDefaultData(n)
		var ctot complex128
		for i := 0; i < n; i++ {
			ctot += f.c[i].v
		}
		A := make([][]complex128, n)
		B := make([][2]complex128, n)
		for i := range A {
			A[i] = make([]complex128, n)
		}
		for j := 0; j < n; j++ {
			A[0][j] = complex(e.mass[j], 0) * f.c[j].v
		}
		B[0] = [2]complex128{rho * f.v[0].v, rho * f.v[1].v}
		for i := 1; i < n; i++ {
			for j := 0; j < n; j++ {
				if j != i {
					m := -f.c[i].v * f.c[j].v / (ctot * complex(diff[i*n+j], 0))
					A[i][j] = m
					A[i][i] -= m
				}
			}
			w := complex(e.mass[i], 0) * f.c[i].v / rho
			for a := 0; a < 2; a++ {
				B[i][a] = complex(e.S, 0)*w*f.p.d[a] - f.c[i].v*f.mu[i].d[a]
			}
		}
		sosmSolveComplex(A, B)
		for j := 0; j < n; j++ {
			rj := complex(e.mass[j], 0) * f.c[j].v
			f.J[j] = [2]complex128{rj * B[j][0], rj * B[j][1]}
		}
	}
	return f
}

// sosmSolveComplex solves A X = B in place (B overwritten) by Gaussian
// elimination with partial pivoting on |A_ik| (Golub & Van Loan, sec. 3.4).
func sosmSolveComplex(A [][]complex128, B [][2]complex128) {
	n := len(A)
	for k := 0; k < n; k++ {
		piv := k
		for i := k + 1; i < n; i++ {
			if cmplx.Abs(A[i][k]) > cmplx.Abs(A[piv][k]) {
				piv = i
			}
		}
		A[k], A[piv] = A[piv], A[k]
		B[k], B[piv] = B[piv], B[k]
		for i := k + 1; i < n; i++ {
			f := A[i][k] / A[k][k]
			for j := k; j < n; j++ {
				A[i][j] -= f * A[k][j]
			}
			B[i][0] -= f * B[k][0]
			B[i][1] -= f * B[k][1]
		}
	}
	for k := n - 1; k >= 0; k-- {
		for r := 0; r < 2; r++ {
			s := B[k][r]
			for j := k + 1; j < n; j++ {
				s -= A[k][j] * B[j][r]
			}
			B[k][r] = s / A[k][k]
		}
	}
}

// sosmReference evaluates the fields and their derivatives at x by complex
// steps along both axes; it fills a sosmPoint (G and R are left zero).
func sosmReference(e *sosmExact, x [2]float64, eta, lambda float64) *sosmPoint {
	n := e.n
	ref := e.newPoint()
	h := sosmComplexStep
	var hess [2][2][2]float64 // hess[c][a][b] = d_a d_b v_c
	for a := 0; a < 2; a++ {
		z := [2]complex128{complex(x[0], 0), complex(x[1], 0)}
		z[a] += complex(0, h)
		f := sosmEvalCS(e, z)
		for i := 0; i < n; i++ {
			ref.C[i], ref.Mu[i] = real(f.c[i].v), real(f.mu[i].v)
			ref.GradC[i][a] = imag(f.c[i].v) / h
			ref.GradMu[i][a] = imag(f.mu[i].v) / h
			ref.J[i] = [2]float64{real(f.J[i][0]), real(f.J[i][1])}
			ref.DivJ[i] += imag(f.J[i][a]) / h
		}
		ref.P, ref.GradP[a] = real(f.p.v), imag(f.p.v)/h
		for c := 0; c < 2; c++ {
			ref.V[c] = real(f.v[c].v)
			ref.GradV[c][a] = imag(f.v[c].v) / h
			for b := 0; b < 2; b++ {
				hess[c][a][b] = imag(f.v[c].d[b]) / h
			}
		}
	}
	for a := 0; a < 2; a++ {
		ddiv := hess[0][a][0] + hess[1][a][1]
		lap := hess[a][0][0] + hess[a][1][1]
		ref.F[a] = -eta*(lap+ddiv) - lambda*ddiv + ref.GradP[a]
	}
	return ref
}

// sosmCompare records the errors of got against want in errs.
func sosmCompare(errs sosmMax, got, want *sosmPoint) {
	for i := range got.C {
		errs.add("C", sosmRelErr(got.C[i], want.C[i]))
		errs.add("Mu", sosmRelErr(got.Mu[i], want.Mu[i]))
		errs.add("DivJ", sosmRelErr(got.DivJ[i], want.DivJ[i]))
		for a := 0; a < 2; a++ {
			errs.add("GradC", sosmRelErr(got.GradC[i][a], want.GradC[i][a]))
			errs.add("GradMu", sosmRelErr(got.GradMu[i][a], want.GradMu[i][a]))
			errs.add("J", sosmRelErr(got.J[i][a], want.J[i][a]))
		}
	}
	errs.add("P", sosmRelErr(got.P, want.P))
	for a := 0; a < 2; a++ {
		errs.add("GradP", sosmRelErr(got.GradP[a], want.GradP[a]))
		errs.add("V", sosmRelErr(got.V[a], want.V[a]))
		errs.add("F", sosmRelErr(got.F[a], want.F[a]))
		for b := 0; b < 2; b++ {
			errs.add("GradV", sosmRelErr(got.GradV[a][b], want.GradV[a][b]))
		}
	}
}

func TestSOSMExactDerivatives(t *testing.T) {
	for _, tc := range sosmCases() {
		e := tc.exact(t)
		pt := e.newPoint()
		rng := rand.New(rand.NewPCG(3, 4))
		errs := sosmMax{}
		for k := 0; k < sosmRandomPoints; k++ {
			x := sosmRandomPoint(rng)
			e.at(pt, x)
			sosmCompare(errs, pt, sosmReference(e, x, tc.eta, tc.lam))
		}
		t.Logf("%s:%v", tc.name, errs)
		errs.check(t, tc.name, sosmDerivTol)
	}
}

func TestSOSMExactFiniteDifference(t *testing.T) {
	// Sanity check only: second-order central differences of at() itself
	// (error ~ h^2 f''' + eps/h ~ 1e-9); the Hessian for F is the difference
	// of GradV.
	for _, tc := range sosmCases() {
		e := tc.exact(t)
		pt, pp, pm := e.newPoint(), e.newPoint(), e.newPoint()
		fd := e.newPoint()
		rng := rand.New(rand.NewPCG(5, 6))
		errs := sosmMax{}
		h := sosmFDStep
		for k := 0; k < sosmRandomPoints/4; k++ {
			x := sosmRandomPoint(rng)
			e.at(pt, x)
			var hess [2][2][2]float64 // hess[c][a][b] = d_a d_b v_c
			clear(fd.DivJ)
			for a := 0; a < 2; a++ {
				xp, xm := x, x
				xp[a] += h
				xm[a] -= h
				e.at(pp, xp)
				e.at(pm, xm)
				d := func(fp, fm float64) float64 { return (fp - fm) / (2 * h) }
				for i := 0; i < tc.n; i++ {
					fd.GradC[i][a] = d(pp.C[i], pm.C[i])
					fd.GradMu[i][a] = d(pp.Mu[i], pm.Mu[i])
					fd.DivJ[i] += d(pp.J[i][a], pm.J[i][a])
				}
				fd.GradP[a] = d(pp.P, pm.P)
				for c := 0; c < 2; c++ {
					fd.GradV[c][a] = d(pp.V[c], pm.V[c])
					for b := 0; b < 2; b++ {
						hess[c][a][b] = d(pp.GradV[c][b], pm.GradV[c][b])
					}
				}
			}
			for a := 0; a < 2; a++ {
				ddiv := hess[0][a][0] + hess[1][a][1]
				lap := hess[a][0][0] + hess[a][1][1]
				fd.F[a] = -tc.eta*(lap+ddiv) - tc.lam*ddiv + fd.GradP[a]
			}
			for i := 0; i < tc.n; i++ {
				errs.add("DivJ", sosmRelErr(pt.DivJ[i], fd.DivJ[i]))
				for a := 0; a < 2; a++ {
					errs.add("GradC", sosmRelErr(pt.GradC[i][a], fd.GradC[i][a]))
					errs.add("GradMu", sosmRelErr(pt.GradMu[i][a], fd.GradMu[i][a]))
				}
			}
			for a := 0; a < 2; a++ {
				errs.add("GradP", sosmRelErr(pt.GradP[a], fd.GradP[a]))
				errs.add("F", sosmRelErr(pt.F[a], fd.F[a]))
				for b := 0; b < 2; b++ {
					errs.add("GradV", sosmRelErr(pt.GradV[a][b], fd.GradV[a][b]))
				}
			}
		}
		t.Logf("%s:%v", tc.name, errs)
		errs.check(t, tc.name, sosmFDTol)
	}
}

func TestSOSMExactClosures(t *testing.T) {
	// Flavour-specific identities, from the construction:
	//   nonlinear:  c_i = exp(mu_i), grad c_i = c_i grad mu_i;
	//   consistent: mu_i = ln c_i, c_T = 1 + S p, g_i = 0, sum_i d_i = 0 with
	//               d_i = S w_i grad p - c_i grad mu_i, and Gibbs–Duhem
	//               sum_i c_i grad mu_i = grad c_T = S grad p.
	for _, tc := range sosmCases() {
		if tc.flavour == "frozen" {
			continue
		}
		e := tc.exact(t)
		pt := e.newPoint()
		rng := rand.New(rand.NewPCG(7, 8))
		errs := sosmMax{}
		for k := 0; k < sosmRandomPoints; k++ {
			e.at(pt, sosmRandomPoint(rng))
			n := tc.n
			var rho, cT float64
			var gradCT [2]float64
			for i := 0; i < n; i++ {
				rho += e.mass[i] * pt.C[i]
				cT += pt.C[i]
				gradCT[0] += pt.GradC[i][0]
				gradCT[1] += pt.GradC[i][1]
			}
			for i := 0; i < n; i++ {
				errs.add("closure", math.Abs(pt.Mu[i]-math.Log(pt.C[i]))/math.Max(1, math.Abs(pt.Mu[i])))
				for a := 0; a < 2; a++ {
					errs.add("closure", sosmRelErr(pt.GradC[i][a], pt.C[i]*pt.GradMu[i][a]))
				}
			}
			if tc.flavour != "consistent" {
				continue
			}
			errs.add("closure", sosmRelErr(cT, 1+tc.S*pt.P))
			for a := 0; a < 2; a++ {
				var sumD, sumAbsD, gd, gdScale float64
				for i := 0; i < n; i++ {
					w := e.mass[i] * pt.C[i] / rho
					di := tc.S*w*pt.GradP[a] - pt.C[i]*pt.GradMu[i][a]
					sumD += di
					sumAbsD += math.Abs(tc.S*w*pt.GradP[a]) + math.Abs(pt.C[i]*pt.GradMu[i][a])
					gd += pt.C[i] * pt.GradMu[i][a]
					gdScale += math.Abs(pt.C[i] * pt.GradMu[i][a])
					// Scale of OSM row i: its terms other than g_i.
					scale := math.Abs(pt.C[i]*pt.GradMu[i][a]) + math.Abs(tc.S*w*pt.GradP[a])
					vi := pt.J[i][a] / (e.mass[i] * pt.C[i])
					for j := 0; j < n; j++ {
						if j != i {
							vj := pt.J[j][a] / (e.mass[j] * pt.C[j])
							scale += pt.C[i] * pt.C[j] / (cT * sosmTestDiff(n, i, j)) * (math.Abs(vi) + math.Abs(vj))
						}
					}
					errs.add("G", math.Abs(pt.G[i][a])/scale)
				}
				errs.add("sumd", math.Abs(sumD)/sumAbsD)
				errs.add("gibbsduhem", math.Abs(gd-gradCT[a])/gdScale)
				errs.add("gradcT", math.Abs(gradCT[a]-tc.S*pt.GradP[a])/math.Max(gdScale, 1e-300))
			}
		}
		t.Logf("%s:%v", tc.name, errs)
		if !(errs["closure"] <= sosmClosureTol) {
			t.Errorf("%s: closure: max error %.3g, want <= %.0e", tc.name, errs["closure"], sosmClosureTol)
		}
		for _, name := range []string{"G", "sumd", "gibbsduhem", "gradcT"} {
			if err, ok := errs[name]; ok && !(err <= sosmSourceTol) {
				t.Errorf("%s: %s: max error %.3g, want <= %.0e", tc.name, name, err, sosmSourceTol)
			}
		}
	}
}

func TestSOSMExactNonTrivial(t *testing.T) {
	// Each flavour must exercise what it is meant to test, or a sign error
	// there would go unseen: frozen and nonlinear have an O(1) OSM source
	// g_i and a non-constant total concentration c_T; consistent has a
	// velocity that is not divergence-free. Thresholds 0.1 are our own
	// choice (the fields are O(1)).
	for _, f := range sosmFlavourNames {
		e := sosmCase{name: f, flavour: f, n: 3, S: 0.8, eta: 1, lam: 0}.exact(t)
		pt := e.newPoint()
		var g, gradCT, div float64
		for _, x := range [][2]float64{{0.3, 0.6}, {0.8, 0.1}, {0.5, 0.5}} {
			e.at(pt, x)
			var gc [2]float64
			for i := range pt.G {
				g = math.Max(g, math.Hypot(pt.G[i][0], pt.G[i][1]))
				gc[0] += pt.GradC[i][0]
				gc[1] += pt.GradC[i][1]
			}
			gradCT = math.Max(gradCT, math.Hypot(gc[0], gc[1]))
			div = math.Max(div, math.Abs(pt.GradV[0][0]+pt.GradV[1][1]))
		}
		if f != "consistent" && !(g > 0.1 && gradCT > 0.1) {
			t.Errorf("%s: max |g_i| = %g, max |grad c_T| = %g, want both O(1)", f, g, gradCT)
		}
		if !(div > 0.1) {
			t.Errorf("%s: max |div v| = %g, want O(1)", f, div)
		}
	}
}

func TestSOSMExactAllocs(t *testing.T) {
	for _, f := range sosmFlavourNames {
		for _, n := range []int{2, 4, 6} {
			e := sosmCase{flavour: f, n: n, S: 0.8, eta: 1, lam: 0}.exact(t)
			pt := e.newPoint()
			x := [2]float64{0.37, 0.61}
			if allocs := testing.AllocsPerRun(100, func() { e.at(pt, x) }); allocs != 0 {
				t.Errorf("%s/n=%d: at allocates %g times per call, want 0", f, n, allocs)
			}
		}
	}
}

func TestNewSOSMExactErrors(t *testing.T) {
	mass, diff := sosmDefaultData(3)
	asym := append([]float64(nil), diff...)
	asym[0*3+1] *= 1.01
	zeroD := append([]float64(nil), diff...)
	zeroD[1*3+2], zeroD[2*3+1] = 0, 0
	badMass := []float64{1, -1, 1}
	for _, tc := range []struct {
		name             string
		flavour          string
		n                int
		mass, diff       []float64
		S, eta, lambda   float64
		wantErrSubstring string
	}{
		{"unknown flavour", "linear", 3, mass, diff, 1, 1, 0, "unknown SOSM flavour"},
		{"one species", "frozen", 1, mass[:1], diff[:1], 1, 1, 0, "1 species"},
		{"seven species", "frozen", 7, mass, diff, 1, 1, 0, "7 species"},
		{"mass length", "frozen", 3, mass[:2], diff, 1, 1, 0, "2 molar masses"},
		{"diff length", "frozen", 3, mass, diff[:4], 1, 1, 0, "4 diffusivities"},
		{"negative mass", "frozen", 3, badMass, diff, 1, 1, 0, "molar mass of species 1"},
		{"zero diffusivity", "consistent", 3, mass, zeroD, 1, 1, 0, "D_12 = 0"},
		{"asymmetric", "nonlinear", 3, mass, asym, 1, 1, 0, "not symmetric"},
		{"zero S", "frozen", 3, mass, diff, 0, 1, 0, "group S"},
		{"NaN S", "frozen", 3, mass, diff, math.NaN(), 1, 0, "group S"},
		{"negative eta", "frozen", 3, mass, diff, 1, -1, 0, "viscosity eta"},
		{"lambda = -eta", "frozen", 3, mass, diff, 1, 1, -1, "second viscosity"},
		{"NaN lambda", "frozen", 3, mass, diff, 1, 1, math.NaN(), "second viscosity"},
	} {
		_, err := newSOSMExact(tc.flavour, tc.n, tc.mass, tc.diff, tc.S, tc.eta, tc.lambda)
		if err == nil || !strings.Contains(err.Error(), tc.wantErrSubstring) {
			t.Errorf("%s: error %v, want one containing %q", tc.name, err, tc.wantErrSubstring)
		}
	}
	// Admissible: eta + lambda > 0 with lambda < 0 (lambda = zeta - 2 eta / 3
	// with zeta = 0).
	if _, err := newSOSMExact("frozen", 3, mass, diff, 1, 1.5, -1); err != nil {
		t.Errorf("lambda = -2 eta / 3: unexpected error %v", err)
	}
}

func TestSOSMExactDefaultData(t *testing.T) {
	// The invented data: positive masses, symmetric diffusivities in
	// [0.5, 2] (our own choice, sosmDefaultData), nested in n.
	_, full := sosmDefaultData(sosmMaxSpecies)
	for n := 2; n <= sosmMaxSpecies; n++ {
		mass, diff := sosmDefaultData(n)
		if len(mass) != n || len(diff) != n*n {
			t.Fatalf("n=%d: lengths %d, %d", n, len(mass), len(diff))
		}
		for i := 0; i < n; i++ {
			if !(mass[i] > 0) {
				t.Errorf("n=%d: mass[%d] = %g", n, i, mass[i])
			}
			for j := 0; j < n; j++ {
				d := diff[i*n+j]
				if i == j {
					continue
				}
				if d != diff[j*n+i] || d < 0.5 || d > 2 || d != full[i*sosmMaxSpecies+j] {
					t.Errorf("n=%d: D_%d%d = %g, D_%d%d = %g", n, i, j, d, j, i, diff[j*n+i])
				}
			}
		}
	}
}

var sosmSink float64

func BenchmarkSOSMExactAt(b *testing.B) {
	for _, f := range sosmFlavourNames {
		for _, n := range []int{2, 4, 6} {
			b.Run(fmt.Sprintf("%s/n=%d", f, n), func(b *testing.B) {
				e := sosmCase{flavour: f, n: n, S: 0.8, eta: 1.3, lam: -0.4}.exact(b)
				pt := e.newPoint()
				x := [2]float64{0.37, 0.61}
				b.ReportAllocs()
				b.ResetTimer()
				for b.Loop() {
					e.at(pt, x)
					sosmSink += pt.F[0]
				}
			})
		}
	}
}
