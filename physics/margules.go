package physics

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// MargulesSolution is the closure of an incompressible non-ideal liquid
// solution whose activity coefficients follow the multicomponent two-suffix
// (symmetric) Margules model,
//
//	g^E/RT = sum_{i<j} A_ij x_i x_j,
//	ln gamma_k = sum_j A_kj x_j - (1/2) sum_ij A_ij x_i x_j,
//
// with A symmetric and A_ii = 0 (Margules 1895; Prausnitz, Lichtenthaler &
// de Azevedo, Molecular Thermodynamics of Fluid-Phase Equilibria, 3rd ed.,
// 1999, ch. 6, and Wohl's expansion there; for a binary ln gamma_1 =
// A x_2^2). The potentials are
//
//	mu_i = V_i (p - P_ref) + RT ln(gamma_i x_i),   sum_i x_i = 1,
//
// and c_i = x_i / sum_j x_j V_j as for IdealSolution. Gibbs–Duhem holds on
// the equation-of-state surface because the activity coefficients derive
// from an excess Gibbs energy, so sum_i x_i d ln gamma_i = 0.
//
// Given (mu, p) the closure solves for x and a scalar lambda
//
//	ln x_i + ln gamma_i(x) + lambda = (mu_i - V_i (p - P_ref))/RT,   sum_i x_i = 1,
//
// pointwise by a damped Newton iteration (see ConcentrationsTo) starting
// from the ideal solution. lambda = 0 on the surface; off it, lambda plays
// the part of the normalisation of IdealSolution. The constructor admits
// only coefficients for which the mixture is stable at every composition
// (smallest eigenvalue of A on the plane sum_i v_i = 0 above -2; for a
// binary A_12 < 2), which makes the solution unique: it is the minimiser of
// a strictly convex function on the simplex. (Proof of the bound: for
// sum_i v_i = 0 and x on the simplex, sum_i v_i^2/x_i >= (sum_i |v_i|)^2 >=
// 2 |v|^2, so the Hessian diag(1/x) + A is positive definite on the plane.)
type MargulesSolution struct {
	mix  *Mixture
	vol  []float64
	a    []float64 // A_ij, row-major n*n, symmetric, zero diagonal
	rt   float64
	pRef float64
}

// Settings of the pointwise Newton iteration of MargulesSolution.
const (
	margulesMaxIter    = 50
	margulesTol        = 1e-13 // residual, relative to 1 + max |b_i|
	margulesMaxHalving = 40
	// margulesMaxStack is the largest number of species whose Newton
	// workspace lives on the stack; larger mixtures allocate per call.
	margulesMaxStack = 8
)

// NewMargulesSolution returns the Margules closure for the species of mix
// with partial molar volumes volumes (m^3/mol in SI, positive), interaction
// coefficients interactions (A_ij = W_ij/RT, dimensionless, any finite value;
// unlisted pairs are 0), temperature through RT > 0 and reference pressure
// pRef. The error is a *DataError naming the species or pair at fault, or
// reporting coefficients that allow phase splitting.
func NewMargulesSolution(mix *Mixture, volumes []float64, interactions []Pair, RT, pRef float64) (*MargulesSolution, error) {
	if err := checkModelParams(RT, pRef, false); err != nil {
		return nil, err
	}
	if err := checkVolumes(mix, volumes); err != nil {
		return nil, err
	}
	n := mix.n
	a := make([]float64, n*n)
	if err := mix.fillPairs(a, interactions, "Margules coefficient", false); err != nil {
		return nil, err
	}
	if lmin := tangentMinEigenvalue(a, n); !(lmin > -2) {
		e := &DataError{Index: -1, Value: lmin,
			Reason: fmt.Sprintf("Margules coefficients allow phase splitting: the smallest eigenvalue of A on sum v = 0 is %.6g, it must exceed -2", lmin)}
		if n == 2 {
			e.Species = []string{mix.names[0], mix.names[1]}
			e.Value = a[1]
			e.Reason = fmt.Sprintf("Margules coefficient %g allows phase splitting; a stable binary needs A < 2", a[1])
		}
		return nil, e
	}
	return &MargulesSolution{mix: mix, vol: append([]float64(nil), volumes...), a: a, rt: RT, pRef: pRef}, nil
}

// tangentMinEigenvalue returns the smallest eigenvalue of the symmetric n×n
// matrix a restricted to the plane sum_i v_i = 0: that of P A P + beta 11^T/n
// with P = I - 11^T/n and beta large enough to lift the direction (1,...,1)
// out of the way.
func tangentMinEigenvalue(a []float64, n int) float64 {
	var beta float64 = 4
	for _, v := range a {
		beta += math.Abs(v)
	}
	p := mat.NewDense(n, n, nil)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			v := -1 / float64(n)
			if i == j {
				v++
			}
			p.Set(i, j, v)
		}
	}
	var pa, pap mat.Dense
	pa.Mul(p, mat.NewDense(n, n, a))
	pap.Mul(&pa, p)
	s := mat.NewSymDense(n, nil)
	for i := 0; i < n; i++ {
		for j := i; j < n; j++ {
			s.SetSym(i, j, 0.5*(pap.At(i, j)+pap.At(j, i))+beta/float64(n))
		}
	}
	var e mat.EigenSym
	if !e.Factorize(s, false) {
		return math.NaN()
	}
	return e.Values(nil)[0]
}

// Len returns the number of species.
func (s *MargulesSolution) Len() int { return s.mix.n }

// lnGammaTo writes ln gamma_k(x) into dst and (A x) into ax.
func (s *MargulesSolution) lnGammaTo(dst, ax, x []float64) {
	n := s.mix.n
	var q float64
	for i := 0; i < n; i++ {
		var v float64
		for j := 0; j < n; j++ {
			v += s.a[i*n+j] * x[j]
		}
		ax[i] = v
		q += x[i] * v
	}
	for i := range dst {
		dst[i] = ax[i] - 0.5*q
	}
}

// margulesWork is the workspace of one Newton solve.
type margulesWork struct {
	b, x, ax, r, xt, axt, rt []float64 // length n
	d                        []float64 // length n+1
	jac                      []float64 // (n+1)^2
	piv                      []int     // n+1
}

// margulesWorkLen is the number of float64 values a workspace for n species
// needs: seven vectors of length n, one of length n+1 and the bordered
// matrix.
func margulesWorkLen(n int) int { return 7*n + (n + 1) + (n+1)*(n+1) }

// makeMargulesWork carves the workspace for n species out of buf and piv, or
// allocates it when they are too short. It returns a value so that a
// caller's stack buffers stay on the stack.
func makeMargulesWork(n int, buf []float64, piv []int) (w margulesWork) {
	k := n + 1
	if len(buf) < margulesWorkLen(n) || len(piv) < k {
		buf = make([]float64, margulesWorkLen(n))
		piv = make([]int, k)
	}
	w.piv = piv[:k]
	w.b, buf = buf[:n:n], buf[n:]
	w.x, buf = buf[:n:n], buf[n:]
	w.ax, buf = buf[:n:n], buf[n:]
	w.r, buf = buf[:n:n], buf[n:]
	w.xt, buf = buf[:n:n], buf[n:]
	w.axt, buf = buf[:n:n], buf[n:]
	w.rt, buf = buf[:n:n], buf[n:]
	w.d, buf = buf[:k:k], buf[k:]
	w.jac = buf[: k*k : k*k]
	return w
}

// stationarity writes A x into ax and the residual of the optimality
// conditions r_i = ln x_i + (A x)_i - b_i + nu into r, and returns max |r_i|.
func (s *MargulesSolution) stationarity(r, ax, x, b []float64, nu float64) float64 {
	n := s.mix.n
	var m float64
	for i := 0; i < n; i++ {
		var v float64
		for j := 0; j < n; j++ {
			v += s.a[i*n+j] * x[j]
		}
		ax[i] = v
		r[i] = math.Log(x[i]) + v - b[i] + nu
		m = math.Max(m, math.Abs(r[i]))
	}
	return m
}

// objective returns phi(x) = sum_i x_i ln x_i + (1/2) x.A x - b.x, the
// (scaled) Gibbs energy whose minimiser on the simplex is the solution.
// ax must hold A x.
func objective(x, ax, b []float64) float64 {
	var f float64
	for i, xi := range x {
		f += xi*math.Log(xi) + 0.5*xi*ax[i] - b[i]*xi
	}
	return f
}

// kkt writes the bordered Newton matrix of the optimality conditions at x,
// in the relative step dy = dx/x, into w.jac and factorises it: rows i < n
// are delta_ij + A_ij x_j with 1 in the multiplier column; row n is
// (x_1..x_n, 0), which keeps sum_i x_i fixed.
func (s *MargulesSolution) kkt(x []float64, w *margulesWork) bool {
	n := s.mix.n
	k := n + 1
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			w.jac[i*k+j] = s.a[i*n+j] * x[j]
		}
		w.jac[i*k+i]++
		w.jac[i*k+n] = 1
		w.jac[n*k+i] = x[i]
	}
	w.jac[n*k+n] = 0
	return luFactor(w.jac, k, w.piv)
}

// trialPoint writes x exp(t dy), renormalised to sum one, into xt. To first
// order in t this is x (1 + t dy), because sum_i x_i dy_i = 0.
func trialPoint(xt, x, dy []float64, t float64) {
	for i := range xt {
		xt[i] = math.Log(x[i]) + t*dy[i]
	}
	softmaxTo(xt, xt)
}

// LevelTo implements LevelInvariant: L = RT lambda, the multiplier of the
// type documentation, which the potentials of PotentialsTo make zero;
// dL/dmu_k = x_k, because sum_i x_i d ln gamma_i = 0 (Gibbs–Duhem for the
// excess part) and sum_i dx_i = 0. It returns NaN when the mole fractions
// cannot be computed. It does not allocate for up to 8 species.
func (s *MargulesSolution) LevelTo(dL, mu []float64, p float64) float64 {
	n := s.mix.n
	if err := s.ConcentrationsTo(dL, nil, nil, mu, p); err != nil {
		return math.NaN()
	}
	var cT float64
	for _, c := range dL[:n] {
		cT += c
	}
	for i := range dL[:n] {
		dL[i] /= cT
	}
	var lg, ax []float64
	if n <= margulesMaxStack {
		var b1, b2 [margulesMaxStack]float64
		lg, ax = b1[:n], b2[:n]
	} else {
		lg, ax = make([]float64, n), make([]float64, n)
	}
	s.lnGammaTo(lg, ax, dL[:n])
	dp := p - s.pRef
	var lambda float64
	for i, x := range dL[:n] {
		lambda += x * ((mu[i]-s.vol[i]*dp)/s.rt - math.Log(x) - lg[i])
	}
	return s.rt * lambda
}

// ConcentrationsTo implements Closure. It does not allocate for up to 8
// species. The error is a *StateError if the Newton iteration fails.
//
// The mole fractions minimise the strictly convex function
// phi(x) = sum_i x_i ln x_i + (1/2) x.A x - b.x on the simplex, with
// b_i = (mu_i - V_i (p - P_ref))/RT; its optimality conditions
// ln x_i + (A x)_i - b_i + nu = 0 are the equations of the type
// documentation with lambda = nu + (1/2) x.A x. Newton's method for them
// in y = ln x, moving along x(t) = x exp(t dy)/Z(t) (which stays on the
// simplex and starts in the Newton direction dx = x dy, a descent direction
// of phi) with a backtracking line search, converges from the
// ideal-solution start (damped Newton with an Armijo test; Nocedal & Wright,
// Numerical Optimization, 2nd ed., 2006, §§3.1 and 18.1). A step is
// accepted on sufficient decrease of phi or of the residual, because phi
// cannot resolve the decrease near the solution or when only trace species
// are still off.
func (s *MargulesSolution) ConcentrationsTo(c, dcdmu, dcdp, mu []float64, p float64) error {
	n := s.mix.n
	checkClosureArgs(n, c, dcdmu, dcdp, mu)
	var buf [7*margulesMaxStack + (margulesMaxStack+1)*(margulesMaxStack+2)]float64
	var pbuf [margulesMaxStack + 1]int
	w := makeMargulesWork(n, buf[:], pbuf[:])
	const model = "Margules solution"

	dp := p - s.pRef
	bmax := 0.0
	for i, m := range mu {
		w.b[i] = (m - s.vol[i]*dp) / s.rt
		if math.IsNaN(w.b[i]) || math.IsInf(w.b[i], 0) {
			return &StateError{Model: model, Species: s.mix.names[i], Reason: "potential or pressure not finite"}
		}
		bmax = math.Max(bmax, math.Abs(w.b[i]))
	}
	// Ideal-solution start.
	nu := softmaxTo(w.x, w.b)
	res := s.stationarity(w.r, w.ax, w.x, w.b, nu)
	phi := objective(w.x, w.ax, w.b)
	tol := margulesTol * (1 + bmax)
	it := 0
	for ; res > tol; it++ {
		if it == margulesMaxIter {
			return &StateError{Model: model, Iterations: it, Residual: res, Reason: "Newton iteration for the mole fractions did not converge"}
		}
		if !s.kkt(w.x, &w) {
			return &StateError{Model: model, Iterations: it, Residual: res, Reason: "singular Newton matrix"}
		}
		for i, v := range w.r {
			w.d[i] = -v
		}
		w.d[n] = 0
		luSolve(w.jac, n+1, w.piv, w.d)
		t := 1.0
		var slope float64 // d phi/dt at t = 0, negative
		for i, di := range w.d[:n] {
			slope += w.r[i] * w.x[i] * di
		}
		accepted := false
		for h := 0; h < margulesMaxHalving; h++ {
			trialPoint(w.xt, w.x, w.d[:n], t)
			nut := nu + t*w.d[n]
			rest := s.stationarity(w.rt, w.axt, w.xt, w.b, nut)
			phit := objective(w.xt, w.axt, w.b)
			// Armijo decrease of phi, or a decrease of the residual:
			// phi does not resolve the decrease near the solution or
			// when the species still off are present in traces only.
			if phit <= phi+1e-4*t*slope || rest <= (1-1e-4*t)*res {
				copy(w.x, w.xt)
				copy(w.ax, w.axt)
				copy(w.r, w.rt)
				nu, res, phi, accepted = nut, rest, phit, true
				break
			}
			t /= 2
		}
		if !accepted {
			if res <= 16*tol {
				break // stagnation at rounding level
			}
			return &StateError{Model: model, Iterations: it + 1, Residual: res, Reason: "line search failed in the Newton iteration for the mole fractions"}
		}
	}
	// One polishing step takes the residual from the tolerance to rounding
	// level (quadratic convergence); it is kept only if it does not
	// increase the residual.
	if s.kkt(w.x, &w) {
		for i, v := range w.r {
			w.d[i] = -v
		}
		w.d[n] = 0
		luSolve(w.jac, n+1, w.piv, w.d)
		trialPoint(w.xt, w.x, w.d[:n], 1)
		if rest := s.stationarity(w.rt, w.axt, w.xt, w.b, nu+w.d[n]); rest <= res {
			copy(w.x, w.xt)
			res = rest
		}
	}
	var vm float64
	for i, xi := range w.x {
		vm += xi * s.vol[i]
	}
	for i, xi := range w.x {
		c[i] = xi / vm
	}
	if err := checkPositive(model, s.mix.names, c); err != nil {
		return err
	}
	if dcdmu == nil && dcdp == nil {
		return nil
	}
	// Implicit differentiation at the solution: K (dy, dnu) = (db, 0),
	// db = e_j/RT for mu_j and -V/RT for p; dx = x dy,
	// dc_i = (dx_i - c_i sum_k V_k dx_k)/V_m.
	if !s.kkt(w.x, &w) {
		return &StateError{Model: model, Iterations: it, Residual: res, Reason: "singular Jacobian at the solution"}
	}
	column := func(j int) {
		var vdx float64
		for k := 0; k < n; k++ {
			w.d[k] *= w.x[k] // now dx_k
			vdx += s.vol[k] * w.d[k]
		}
		for i := 0; i < n; i++ {
			v := (w.d[i] - c[i]*vdx) / vm
			if j < 0 {
				dcdp[i] = v
			} else {
				dcdmu[i*n+j] = v
			}
		}
	}
	if dcdmu != nil {
		for j := 0; j < n; j++ {
			clear(w.d)
			w.d[j] = 1 / s.rt
			luSolve(w.jac, n+1, w.piv, w.d)
			column(j)
		}
	}
	if dcdp != nil {
		for k := 0; k < n; k++ {
			w.d[k] = -s.vol[k] / s.rt
		}
		w.d[n] = 0
		luSolve(w.jac, n+1, w.piv, w.d)
		column(-1)
	}
	return nil
}

// PotentialsTo implements Closure: mu_i = V_i (p - P_ref) +
// RT (ln x_i + ln gamma_i(x)). Any finite p is allowed. It allocates a
// small workspace.
func (s *MargulesSolution) PotentialsTo(mu, x []float64, p float64) error {
	n := s.mix.n
	checkPotentialArgs(n, mu, x)
	if err := checkComposition(s.mix.names, x, true); err != nil {
		return err
	}
	if math.IsNaN(p) || math.IsInf(p, 0) {
		return &StateError{Model: "Margules solution", Reason: "pressure is not finite"}
	}
	lg := make([]float64, n)
	ax := make([]float64, n)
	s.lnGammaTo(lg, ax, x)
	dp := p - s.pRef
	for i, xi := range x {
		mu[i] = s.vol[i]*dp + s.rt*(math.Log(xi)+lg[i])
	}
	return nil
}
