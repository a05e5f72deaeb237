package verification

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/num/dual"
	hd "gonum.org/v1/gonum/num/hyperdual"
)

// Manufactured solution of the coupled Stokes–Onsager–Stefan–Maxwell
// (SOSM) problem of formulation.md sections 2, 3 and 8, in the scaled units
// of section 1 with RT = 1, on the unit square. The discretisation solves,
// for species i = 1..n,
//
//	OSM:        -c_i grad mu_i + S w_i grad p + g_i = sum_j M_ij v_j,  v_j = J_j/rho_j
//	momentum:   -div(2 eta eps(v) + lambda (div v) I) + grad p = F
//	continuity: div J_i = M_i r_i
//	mass avg.:  v = sum_i J_i / rho
//
// with M_ij = -c_i c_j/(c_T D_ij) (i != j), M_ii = -sum_{j != i} M_ij. The
// sources g_i, F and r_i are the residuals of the exact fields, so that the
// fields below solve the problem exactly.
//
// Three flavours:
//
//   - "frozen": c_i, mu_i, p and J_i are independent smooth fields; v is
//     defined as sum J_i / rho, so the mass-average constraint holds exactly.
//     For verification layer (a) of section 8 (coefficients frozen at the
//     exact concentrations).
//   - "nonlinear": as frozen, but c_i = exp(mu_i), the scaled ideal-gas
//     closure of section 5 at reference pressure 1 (no pressure
//     dependence), so a solver that computes c from mu reproduces c.
//   - "consistent": a thermodynamically consistent ideal gas with no OSM
//     source: mole fractions x = softmax(s) of smooth logits s_i, total
//     concentration c_T = 1 + S p (thermodynamic pressure P_ref + p in
//     scaled units), c_i = x_i c_T, mu_i = ln c_i, and a smooth velocity v
//     that is not divergence-free. The species velocities solve
//     sum_j M_ij v_j = d_i = S w_i grad p - c_i grad mu_i (singular; the
//     d_i sum to S grad p - grad c_T = 0) closed by sum_j rho_j v_j = rho v,
//     so g_i vanishes to rounding.
//
// Every field is built from the elementary waves of sosmTerm, which are
// neither polynomial nor symmetric, so no finite element space reproduces
// them. Derivatives are exact to rounding: the elementary fields are
// evaluated in hyper-dual arithmetic (gonum num/hyperdual; Fike & Alonso,
// AIAA 2011-886) with two seeded directions, once for the mixed pair (x, y)
// and once each for (x, x) and (y, y), which yields value, gradient and
// Hessian; compositions (v = sum J/rho, c = exp(mu), the softmax) are
// carried out in the same arithmetic, and the species-velocity solve of the
// consistent flavour in dual arithmetic (num/dual).

// sosmMaxSpecies bounds the number of species. at works on fixed-size
// arrays of this length on the stack so that it does not allocate.
const sosmMaxSpecies = 6

// sosmFlavour selects the manufactured solution; see above.
type sosmFlavour int

const (
	sosmFrozen sosmFlavour = iota
	sosmNonlinear
	sosmConsistent
)

// sosmFlavourNames are the names accepted by newSOSMExact, indexed by
// sosmFlavour.
var sosmFlavourNames = [...]string{"frozen", "nonlinear", "consistent"}

func (f sosmFlavour) String() string { return sosmFlavourNames[f] }

// sosmTerm is the elementary wave
//
//	amp sin(k . x + phase) exp(g . x),
//
// a travelling sine with an exponential envelope.
type sosmTerm struct {
	amp   float64
	k     [2]float64
	phase float64
	g     [2]float64
}

// sosmField is base + the sum of two elementary waves.
type sosmField struct {
	base  float64
	terms [2]sosmTerm
}

// eval returns the field at (x, y) in hyper-dual arithmetic. The arguments
// of Sin and Exp are linear in (x, y), so their E1E2 parts vanish (this also
// makes gonum's special case hyperdual.Sin(0), which drops the E1E2 part of
// its argument, harmless).
func (f *sosmField) eval(x, y hd.Number) hd.Number {
	s := hd.Number{Real: f.base}
	for i := range f.terms {
		t := &f.terms[i]
		arg := hd.Add(hd.Add(hd.Scale(t.k[0], x), hd.Scale(t.k[1], y)), hd.Number{Real: t.phase})
		env := hd.Exp(hd.Add(hd.Scale(t.g[0], x), hd.Scale(t.g[1], y)))
		s = hd.Add(s, hd.Scale(t.amp, hd.Mul(hd.Sin(arg), env)))
	}
	return s
}

// Field families: each family draws its own wave parameters (sosmWave).
const (
	sosmFamConc = iota
	sosmFamPotFrozen
	sosmFamPotNonlinear
	sosmFamPressure
	sosmFamFluxX
	sosmFamFluxY
	sosmFamLogit
	sosmFamVelocity
)

// sosmWave returns wave number term (0 or 1) of species (or component)
// index in the given family, with amplitude amp. The parameters are our own
// choice: additive (Weyl) sequences of the fractional parts of irrational
// multiples of u = 1 + index + 6 term + 13 family, which is distinct for
// every (family, index < 6, term < 2), so that no two fields share a wave:
//
//	k_x in [0.9, 3.0], k_y in [-1.8, 1.8], phase in [0, 2 pi),
//	g_x, g_y in [-0.2, 0.2].
//
// On the unit square the envelope exp(g . x) lies in [exp(-0.4), exp(0.4)],
// which the positivity bounds of newSOSMExact use.
func sosmWave(family, index, term int, amp float64) sosmTerm {
	u := float64(1 + index + 6*term + 13*family)
	frac := func(z float64) float64 { return z - math.Floor(z) }
	return sosmTerm{
		amp: amp,
		k: [2]float64{
			0.9 + 2.1*frac(u*0.6180339887498949),   // golden ratio - 1
			-1.8 + 3.6*frac(u*0.41421356237309503), // sqrt 2 - 1
		},
		phase: 2 * math.Pi * frac(u*0.7320508075688772), // sqrt 3 - 1
		g: [2]float64{
			-0.2 + 0.4*frac(u*0.2360679774997898), // sqrt 5 - 2
			-0.2 + 0.4*frac(u*0.6457513110645907), // sqrt 7 - 2
		},
	}
}

// sosmMakeField returns base + a0 wave0 + a1 wave1 of the family.
func sosmMakeField(family, index int, base, a0, a1 float64) sosmField {
	return sosmField{base: base, terms: [2]sosmTerm{
		sosmWave(family, index, 0, a0),
		sosmWave(family, index, 1, a1),
	}}
}

// sosmExact is the manufactured SOSM solution. It is immutable after
// construction and safe for concurrent use; at writes only into the
// caller's sosmPoint.
type sosmExact struct {
	flavour     sosmFlavour
	n           int
	mass        [sosmMaxSpecies]float64
	invDiff     [sosmMaxSpecies][sosmMaxSpecies]float64 // 1/D_ij, i != j
	S           float64
	eta, lambda float64

	conc  [sosmMaxSpecies]sosmField    // frozen: c_i
	pot   [sosmMaxSpecies]sosmField    // frozen, nonlinear: mu_i
	flux  [sosmMaxSpecies][2]sosmField // frozen, nonlinear: J_i
	logit [sosmMaxSpecies]sosmField    // consistent: x = softmax(logit)
	vel   [2]sosmField                 // consistent: v
	pres  sosmField                    // all: p
}

// newSOSMExact returns the manufactured solution of the given flavour
// ("frozen", "nonlinear" or "consistent") for n species, 2 <= n <= 6, with
// molar masses mass[i] > 0, diffusivities diff[i*n+j] = diff[j*n+i] > 0
// (i != j; the diagonal is not used, symmetry is required to 1e-12
// relative and the upper triangle is used), the group S > 0, shear
// viscosity eta > 0 and second viscosity lambda with eta + lambda > 0 (in
// two dimensions 2 eta eps:eps + lambda (tr eps)^2 = 2 eta |dev eps|^2 +
// (eta + lambda) (tr eps)^2, our own derivation, so this is what keeps the
// viscous form coercive). All quantities are dimensionless.
//
// Field values, our own choice (sosmWave gives the waves W; |W| <= exp(0.4)
// on the unit square):
//
//	frozen:     c_i  = 1 + 0.3 W + 0.15 W                 (c_i >= 0.32)
//	            mu_i = -0.2 i + 0.5 W + 0.3 W
//	nonlinear:  mu_i = -0.15 i + 0.35 W + 0.2 W, c_i = exp(mu_i)
//	both:       J_i  = (0.4 - 0.1 i, -0.2 + 0.15 i) + 0.5 W + 0.3 W (per component)
//	            v    = sum_i J_i / rho
//	consistent: s_i  = -0.1 i + 0.4 W + 0.25 W,  x = softmax(s)
//	            v    = (0.5, -0.3) + 0.6 W + 0.35 W (per component)
//	all:        p    = 0.8 + 0.25 W + 0.15 W             (p >= 0.2)
//
// with species numbered from i = 0. p > 0 keeps c_T = 1 + S p >= 1 in the
// consistent flavour for every S > 0.
func newSOSMExact(flavour string, n int, mass, diff []float64, S, eta, lambda float64) (*sosmExact, error) {
	e := &sosmExact{flavour: -1, n: n, S: S, eta: eta, lambda: lambda}
	for f, name := range sosmFlavourNames {
		if name == flavour {
			e.flavour = sosmFlavour(f)
		}
	}
	if e.flavour < 0 {
		return nil, fmt.Errorf("verification: unknown SOSM flavour %q (want one of %q)", flavour, sosmFlavourNames[:])
	}
	if n < 2 || n > sosmMaxSpecies {
		return nil, fmt.Errorf("verification: SOSM solution for %d species: want 2 <= n <= %d", n, sosmMaxSpecies)
	}
	if len(mass) != n {
		return nil, fmt.Errorf("verification: SOSM solution: %d molar masses for %d species", len(mass), n)
	}
	if len(diff) != n*n {
		return nil, fmt.Errorf("verification: SOSM solution: %d diffusivities for %d species, want %d", len(diff), n, n*n)
	}
	for i, m := range mass {
		if !(m > 0) || math.IsInf(m, 1) {
			return nil, fmt.Errorf("verification: SOSM solution: molar mass of species %d is %g, want positive and finite", i, m)
		}
		e.mass[i] = m
	}
	for i := 0; i < n; i++ {
		for j := i + 1; j < n; j++ {
			d, dt := diff[i*n+j], diff[j*n+i]
			if !(d > 0) || math.IsInf(d, 1) {
				return nil, fmt.Errorf("verification: SOSM solution: diffusivity D_%d%d = %g, want positive and finite", i, j, d)
			}
			if !(math.Abs(d-dt) <= 1e-12*d) {
				return nil, fmt.Errorf("verification: SOSM solution: diffusivities not symmetric: D_%d%d = %g, D_%d%d = %g", i, j, d, j, i, dt)
			}
			e.invDiff[i][j] = 1 / d
			e.invDiff[j][i] = 1 / d
		}
	}
	if !(S > 0) || math.IsInf(S, 1) {
		return nil, fmt.Errorf("verification: SOSM solution: group S = %g, want positive and finite", S)
	}
	if !(eta > 0) || math.IsInf(eta, 1) {
		return nil, fmt.Errorf("verification: SOSM solution: viscosity eta = %g, want positive and finite", eta)
	}
	if math.IsInf(lambda, 0) || !(eta+lambda > 0) {
		return nil, fmt.Errorf("verification: SOSM solution: second viscosity lambda = %g with eta = %g: want eta + lambda > 0 (coercivity in 2D)", lambda, eta)
	}

	e.pres = sosmMakeField(sosmFamPressure, 0, 0.8, 0.25, 0.15)
	switch e.flavour {
	case sosmFrozen, sosmNonlinear:
		for i := 0; i < n; i++ {
			fi := float64(i)
			if e.flavour == sosmFrozen {
				e.conc[i] = sosmMakeField(sosmFamConc, i, 1, 0.3, 0.15)
				e.pot[i] = sosmMakeField(sosmFamPotFrozen, i, -0.2*fi, 0.5, 0.3)
			} else {
				e.pot[i] = sosmMakeField(sosmFamPotNonlinear, i, -0.15*fi, 0.35, 0.2)
			}
			e.flux[i][0] = sosmMakeField(sosmFamFluxX, i, 0.4-0.1*fi, 0.5, 0.3)
			e.flux[i][1] = sosmMakeField(sosmFamFluxY, i, -0.2+0.15*fi, 0.5, 0.3)
		}
	case sosmConsistent:
		for i := 0; i < n; i++ {
			e.logit[i] = sosmMakeField(sosmFamLogit, i, -0.1*float64(i), 0.4, 0.25)
		}
		e.vel[0] = sosmMakeField(sosmFamVelocity, 0, 0.5, 0.6, 0.35)
		e.vel[1] = sosmMakeField(sosmFamVelocity, 1, -0.3, 0.6, 0.35)
	}
	return e, nil
}

// sosmPoint holds every exact field and source at one point. Slices have
// one entry per species; newPoint allocates them.
type sosmPoint struct {
	C      []float64    // c_i
	GradC  [][2]float64 // grad c_i
	Mu     []float64    // mu_i
	GradMu [][2]float64 // grad mu_i
	P      float64
	GradP  [2]float64
	V      [2]float64    // mass-average velocity
	GradV  [2][2]float64 // GradV[a][b] = d v_a / d x_b
	J      [][2]float64  // mass fluxes J_i
	DivJ   []float64
	R      []float64    // r_i = div J_i / M_i
	G      [][2]float64 // OSM source g_i (zero to rounding for "consistent")
	F      [2]float64   // momentum source per unit volume
}

// newPoint returns a sosmPoint sized for e.
func (e *sosmExact) newPoint() *sosmPoint {
	n := e.n
	return &sosmPoint{
		C: make([]float64, n), GradC: make([][2]float64, n),
		Mu: make([]float64, n), GradMu: make([][2]float64, n),
		J: make([][2]float64, n), DivJ: make([]float64, n),
		R: make([]float64, n), G: make([][2]float64, n),
	}
}

// sosmJet is the value, gradient and Hessian of a scalar field at a point.
type sosmJet struct {
	v float64
	g [2]float64
	h [2][2]float64
}

// take stores the parts of q, a hyper-dual value seeded with E1 along axis
// a and E2 along axis b.
func (j *sosmJet) take(q hd.Number, a, b int) {
	j.v = q.Real
	j.g[a] = q.E1mag
	j.g[b] = q.E2mag
	j.h[a][b] = q.E1E2mag
	j.h[b][a] = q.E1E2mag
}

// sosmPasses are the seeded direction pairs: the first gives value,
// gradient and mixed derivative, the others the pure second derivatives.
var sosmPasses = [3][2]int{{0, 1}, {0, 0}, {1, 1}}

// at fills pt with every field and source at x. It does not allocate. It
// panics if pt was not made by e.newPoint (wrong number of species).
func (e *sosmExact) at(pt *sosmPoint, x [2]float64) {
	n := e.n
	if len(pt.C) != n || len(pt.GradC) != n || len(pt.Mu) != n || len(pt.GradMu) != n ||
		len(pt.J) != n || len(pt.DivJ) != n || len(pt.R) != n || len(pt.G) != n {
		panic(fmt.Sprintf("verification: sosmExact.at: point not sized for %d species", n))
	}
	var (
		c, mu [sosmMaxSpecies]sosmJet
		flux  [sosmMaxSpecies][2]sosmJet
		p     sosmJet
		v     [2]sosmJet
	)
	for pass, ab := range sosmPasses {
		a, b := ab[0], ab[1]
		X, Y := hd.Number{Real: x[0]}, hd.Number{Real: x[1]}
		if a == 0 {
			X.E1mag = 1
		} else {
			Y.E1mag = 1
		}
		if b == 0 {
			X.E2mag = 1
		} else {
			Y.E2mag = 1
		}
		switch e.flavour {
		case sosmFrozen, sosmNonlinear:
			// Only c and J enter v = sum J / rho, whose Hessian the
			// momentum source needs; mu and p need their gradients only.
			var rho hd.Number
			var sum [2]hd.Number
			for i := 0; i < n; i++ {
				var ci hd.Number
				if e.flavour == sosmFrozen {
					ci = e.conc[i].eval(X, Y)
					if pass == 0 {
						mu[i].take(e.pot[i].eval(X, Y), a, b)
					}
				} else {
					mi := e.pot[i].eval(X, Y)
					mu[i].take(mi, a, b)
					ci = hd.Exp(mi)
				}
				c[i].take(ci, a, b)
				rho = hd.Add(rho, hd.Scale(e.mass[i], ci))
				for d := 0; d < 2; d++ {
					jd := e.flux[i][d].eval(X, Y)
					flux[i][d].take(jd, a, b)
					sum[d] = hd.Add(sum[d], jd)
				}
			}
			if pass == 0 {
				p.take(e.pres.eval(X, Y), a, b)
			}
			inv := hd.Inv(rho)
			for d := 0; d < 2; d++ {
				v[d].take(hd.Mul(sum[d], inv), a, b)
			}
		case sosmConsistent:
			// The right-hand side of the species-velocity system holds
			// grad p and grad c; its derivatives need their Hessians.
			P := e.pres.eval(X, Y)
			p.take(P, a, b)
			cT := hd.Add(hd.Number{Real: 1}, hd.Scale(e.S, P))
			var ex [sosmMaxSpecies]hd.Number
			var sum hd.Number
			for i := 0; i < n; i++ {
				ex[i] = hd.Exp(e.logit[i].eval(X, Y))
				sum = hd.Add(sum, ex[i])
			}
			scale := hd.Mul(cT, hd.Inv(sum)) // c_i = x_i c_T = exp(s_i) c_T / sum exp(s_k)
			for i := 0; i < n; i++ {
				ci := hd.Mul(ex[i], scale)
				c[i].take(ci, a, b)
				mu[i].take(hd.Log(ci), a, b)
			}
			for d := 0; d < 2; d++ {
				v[d].take(e.vel[d].eval(X, Y), a, b)
			}
		}
	}

	for i := 0; i < n; i++ {
		pt.C[i], pt.GradC[i] = c[i].v, c[i].g
		pt.Mu[i], pt.GradMu[i] = mu[i].v, mu[i].g
	}
	pt.P, pt.GradP = p.v, p.g
	for a := 0; a < 2; a++ {
		pt.V[a], pt.GradV[a] = v[a].v, v[a].g
	}

	// Momentum source: div(2 eps(v))_a = Lap v_a + d_a div v, so
	// F_a = -eta (Lap v_a + d_a div v) - lambda d_a div v + d_a p.
	for a := 0; a < 2; a++ {
		ddiv := v[0].h[0][a] + v[1].h[1][a]
		lap := v[a].h[0][0] + v[a].h[1][1]
		pt.F[a] = -e.eta*(lap+ddiv) - e.lambda*ddiv + p.g[a]
	}

	if e.flavour == sosmConsistent {
		e.consistentFluxes(pt, &c, &p, &v)
	} else {
		for i := 0; i < n; i++ {
			pt.J[i] = [2]float64{flux[i][0].v, flux[i][1].v}
			pt.DivJ[i] = flux[i][0].g[0] + flux[i][1].g[1]
		}
	}
	for i := 0; i < n; i++ {
		pt.R[i] = pt.DivJ[i] / e.mass[i]
	}

	// OSM source g_i = sum_j M_ij v_j + c_i grad mu_i - S w_i grad p, with
	// sum_j M_ij v_j = sum_{j != i} c_i c_j (v_i - v_j) / (c_T D_ij)
	// (M_ii = -sum_{j != i} M_ij).
	var vs [sosmMaxSpecies][2]float64
	var rho, cT float64
	for i := 0; i < n; i++ {
		rhoI := e.mass[i] * pt.C[i]
		rho += rhoI
		cT += pt.C[i]
		vs[i] = [2]float64{pt.J[i][0] / rhoI, pt.J[i][1] / rhoI}
	}
	for i := 0; i < n; i++ {
		w := e.mass[i] * pt.C[i] / rho
		for a := 0; a < 2; a++ {
			var s float64
			for j := 0; j < n; j++ {
				if j != i {
					s += pt.C[i] * pt.C[j] * e.invDiff[i][j] * (vs[i][a] - vs[j][a])
				}
			}
			pt.G[i][a] = s/cT + pt.C[i]*pt.GradMu[i][a] - e.S*w*pt.GradP[a]
		}
	}
}

// consistentFluxes solves the OSM rows for the species velocities of the
// consistent flavour and stores J_j = rho_j v_j and div J_j in pt.
//
// The transport matrix M is singular with kernel (1, .., 1), and the
// driving forces d_i = S w_i grad p - c_i grad mu_i sum to zero, so the last
// OSM row is replaced by the mass-average condition sum_j rho_j v_j = rho v.
// The result is non-singular: any n-1 rows of M span its row space, the
// orthogonal complement of (1, .., 1), and rho . (1, .., 1) = rho != 0. For
// each direction e the system is assembled in dual arithmetic with
// derivative parts d/dx_e (taken from the jets), so the solution carries
// d v_j / dx_e exactly. For the ideal gas c_i grad mu_i = grad c_i.
func (e *sosmExact) consistentFluxes(pt *sosmPoint, c *[sosmMaxSpecies]sosmJet, p *sosmJet, v *[2]sosmJet) {
	n := e.n
	for i := 0; i < n; i++ {
		pt.DivJ[i] = 0
	}
	for dir := 0; dir < 2; dir++ {
		var (
			A          [sosmMaxSpecies][sosmMaxSpecies]dual.Number
			B          [sosmMaxSpecies][2]dual.Number
			cd, rhoI   [sosmMaxSpecies]dual.Number
			rho, cTot  dual.Number
			gradP, vel [2]dual.Number
		)
		for i := 0; i < n; i++ {
			cd[i] = dual.Number{Real: c[i].v, Emag: c[i].g[dir]}
			rhoI[i] = dual.Scale(e.mass[i], cd[i])
			rho = dual.Add(rho, rhoI[i])
			cTot = dual.Add(cTot, cd[i])
		}
		for a := 0; a < 2; a++ {
			gradP[a] = dual.Number{Real: p.g[a], Emag: p.h[a][dir]}
			vel[a] = dual.Number{Real: v[a].v, Emag: v[a].g[dir]}
		}
		invRho, invCT := dual.Inv(rho), dual.Inv(cTot)
		for i := 0; i < n-1; i++ {
			var diag dual.Number
			for j := 0; j < n; j++ {
				if j == i {
					continue
				}
				m := dual.Scale(-e.invDiff[i][j], dual.Mul(dual.Mul(cd[i], cd[j]), invCT))
				A[i][j] = m
				diag = dual.Sub(diag, m)
			}
			A[i][i] = diag
			w := dual.Mul(rhoI[i], invRho)
			for a := 0; a < 2; a++ {
				gc := dual.Number{Real: c[i].g[a], Emag: c[i].h[a][dir]}
				B[i][a] = dual.Sub(dual.Scale(e.S, dual.Mul(w, gradP[a])), gc)
			}
		}
		for j := 0; j < n; j++ {
			A[n-1][j] = rhoI[j]
		}
		for a := 0; a < 2; a++ {
			B[n-1][a] = dual.Mul(rho, vel[a])
		}
		sosmSolveDual(&A, &B, n)
		for j := 0; j < n; j++ {
			for a := 0; a < 2; a++ {
				J := dual.Mul(rhoI[j], B[j][a])
				if dir == 0 {
					pt.J[j][a] = J.Real
				}
				if a == dir {
					pt.DivJ[j] += J.Emag
				}
			}
		}
	}
}

// sosmSolveDual overwrites b with the solution of a x = b for the leading
// n x n block of a and both columns of b, by Gaussian elimination with
// partial pivoting on the real parts (Golub & Van Loan, Matrix
// Computations, 4th ed., sec. 3.4.2). In dual arithmetic the derivative
// parts of the result are the exact derivative of the solution (forward-mode
// differentiation of the algorithm; the pivot order is locally constant).
// a is destroyed.
func sosmSolveDual(a *[sosmMaxSpecies][sosmMaxSpecies]dual.Number, b *[sosmMaxSpecies][2]dual.Number, n int) {
	for k := 0; k < n; k++ {
		piv := k
		for i := k + 1; i < n; i++ {
			if math.Abs(a[i][k].Real) > math.Abs(a[piv][k].Real) {
				piv = i
			}
		}
		if a[piv][k].Real == 0 {
			panic(fmt.Sprintf("verification: singular species-velocity system at column %d", k))
		}
		a[k], a[piv] = a[piv], a[k]
		b[k], b[piv] = b[piv], b[k]
		inv := dual.Inv(a[k][k])
		for i := k + 1; i < n; i++ {
			f := dual.Mul(a[i][k], inv)
			for j := k + 1; j < n; j++ {
				a[i][j] = dual.Sub(a[i][j], dual.Mul(f, a[k][j]))
			}
			for r := 0; r < 2; r++ {
				b[i][r] = dual.Sub(b[i][r], dual.Mul(f, b[k][r]))
			}
		}
	}
	for k := n - 1; k >= 0; k-- {
		inv := dual.Inv(a[k][k])
		for r := 0; r < 2; r++ {
			s := b[k][r]
			for j := k + 1; j < n; j++ {
				s = dual.Sub(s, dual.Mul(a[k][j], b[j][r]))
			}
			b[k][r] = dual.Mul(s, inv)
		}
	}
}

// sosmDefaultData returns invented O(1) dimensionless molar masses and
// symmetric Stefan–Maxwell diffusivities (between 0.5 and 2; diagonal 0,
// unused) for n species, 2 <= n <= 6. They are our own choice, not data of
// any real mixture: distinct values so that no two species are
// interchangeable. It panics for other n.
func sosmDefaultData(n int) (mass, diff []float64) {
	if n < 2 || n > sosmMaxSpecies {
		panic(fmt.Sprintf("verification: sosmDefaultData: %d species, want 2 <= n <= %d", n, sosmMaxSpecies))
	}
	masses := [sosmMaxSpecies]float64{1.0, 1.6, 0.7, 2.2, 1.3, 0.9}
	// Upper triangle D_ij, i < j, row by row.
	upper := [...]float64{
		1.0, 0.6, 1.4, 0.8, 1.9, // D_01 .. D_05
		1.2, 0.5, 1.7, 0.9, // D_12 .. D_15
		2.0, 0.7, 1.1, // D_23 .. D_25
		1.5, 0.65, // D_34, D_35
		1.25, // D_45
	}
	mass = append([]float64(nil), masses[:n]...)
	diff = make([]float64, n*n)
	k := 0
	for i := 0; i < sosmMaxSpecies; i++ {
		for j := i + 1; j < sosmMaxSpecies; j++ {
			if i < n && j < n {
				diff[i*n+j] = upper[k]
				diff[j*n+i] = upper[k]
			}
			k++
		}
	}
	return mass, diff
}
