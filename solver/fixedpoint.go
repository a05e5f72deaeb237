package solver

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"strings"
	"time"
)

// FixedPointMap evaluates the map G at x into dst (len(dst) == len(x)). It
// must not keep x or dst, and x and dst never share memory. An error stops
// SolveFixedPoint, which returns it wrapped in a *MapError.
type FixedPointMap func(dst, x []float64) error

// FixedPointMethod selects the iteration of SolveFixedPoint.
type FixedPointMethod int

const (
	// Anderson is Anderson acceleration of the (damped) Picard iteration,
	// with a bounded history and safeguards. It is the default.
	Anderson FixedPointMethod = iota
	// Picard is the plain fixed-point iteration x ← x + β (G(x) − x),
	// damped when the mixing parameter β is below one.
	Picard
	// NewtonKrylov is the inexact Newton method on F(x) = x − G(x): each
	// step solves (I − G'(x)) s = −F(x) by GMRES with directional
	// differences of G and is globalised by a backtracking line search.
	NewtonKrylov
)

var fixedPointMethodNames = [...]string{
	Anderson:     "anderson",
	Picard:       "picard",
	NewtonKrylov: "newton-krylov",
}

// String returns the name of the method, as accepted by
// ParseFixedPointMethod: "anderson", "picard" or "newton-krylov".
func (m FixedPointMethod) String() string {
	if m >= 0 && int(m) < len(fixedPointMethodNames) {
		return fixedPointMethodNames[m]
	}
	return fmt.Sprintf("FixedPointMethod(%d)", int(m))
}

// FixedPointMethodNames returns the names of all methods, default first,
// for help texts and shell completion.
func FixedPointMethodNames() []string {
	return slices.Clone(fixedPointMethodNames[:])
}

// ParseFixedPointMethod returns the method with the given name (ignoring
// case and surrounding space). The error for an unknown name lists the
// allowed ones.
func ParseFixedPointMethod(s string) (FixedPointMethod, error) {
	t := strings.ToLower(strings.TrimSpace(s))
	for i, name := range fixedPointMethodNames {
		if t == name {
			return FixedPointMethod(i), nil
		}
	}
	return 0, fmt.Errorf("solver: unknown fixed-point method %q: want one of %s", s, strings.Join(fixedPointMethodNames[:], ", "))
}

// FixedPointSettings controls SolveFixedPoint. A nil pointer, or a zero
// field, selects the documented default. Fields that do not apply to the
// selected method are ignored.
//
// Residual. All methods judge convergence by the same relative residual
//
//	r(x) = Norm(x − G(x)) / Norm(x)
//
// (the absolute Norm(x − G(x)) when Norm(x) is zero) and stop when
// r(x) ≤ Tolerance. The measure is relative to the iterate, which suits
// unknowns bounded away from zero such as concentrations; for a map whose
// fixed point is the origin, shift the unknowns.
type FixedPointSettings struct {
	// Method is the iteration (default Anderson).
	Method FixedPointMethod
	// Tolerance on the relative residual r(x) (default 1e-10).
	Tolerance float64
	// MaxIterations bounds the number of iterations (default 100). For
	// Picard and Anderson an iteration is one evaluation of G (plus the
	// evaluation at the initial guess), so at most MaxIterations+1
	// evaluations are made; for NewtonKrylov it is one Newton step, which
	// costs one evaluation per GMRES iteration and per line-search trial.
	MaxIterations int
	// Depth is the number of previous differences kept by Anderson
	// acceleration (default 10). It is capped at the dimension of x.
	Depth int
	// Damping is the mixing parameter β in (0, 1] of Picard and Anderson
	// (default 1, no damping).
	Damping float64
	// Norm measures vectors for the residual and change of the iterates
	// (default: the Euclidean norm divided by √n, a root mean square).
	Norm func(x []float64) float64
	// Record, if not nil, is called once after every iteration.
	Record func(FixedPointRecord)

	// MaxCondition bounds the condition of the Anderson least-squares
	// problem: after each update of the history, the oldest differences
	// are dropped while the 1-norm condition number of R D⁻¹ exceeds it,
	// where ΔF = Q R and D scales the columns of R to unit norm (default
	// 1e10).
	MaxCondition float64
	// RestartGrowth is the Anderson restart safeguard: when the absolute
	// residual Norm(x − G(x)) of a new iterate exceeds RestartGrowth times
	// the smallest one since the last restart, the history is cleared
	// (the iterate is kept) and the next step is a plain damped Picard
	// step (default 100; must exceed 1; +Inf disables it).
	RestartGrowth float64
	// DivergenceFactor stops Picard and Anderson, reporting divergence,
	// when the absolute residual Norm(x − G(x)) exceeds DivergenceFactor
	// times the smallest one so far (default 1e6; must exceed 1; +Inf
	// disables it). The absolute residual is used because the relative
	// one can stay bounded while the iterates grow without bound.
	DivergenceFactor float64

	// KrylovRestart is the restart length of GMRES in each Newton–Krylov
	// step (default 30, capped at the dimension of x).
	KrylovRestart int
	// MaxKrylovIterations bounds the GMRES iterations, and so the
	// directional differences, of one Newton–Krylov step (default 60). A
	// step that does not reach its forcing term is used all the same.
	MaxKrylovIterations int
	// ForcingTerm, when positive, is a fixed relative tolerance η < 1 for
	// the GMRES solve of each Newton step. Zero selects the adaptive choice
	// 2 of Eisenstat and Walker (see SolveFixedPoint).
	ForcingTerm float64
	// DifferenceStep is the relative size δ of the directional
	// differences: G'(x) v ≈ (G(x + h v) − G(x)) / h with
	// h = δ ‖x‖₂ / ‖v‖₂ (h = δ / ‖v‖₂ when x = 0). Default √ε ≈ 1.49e-8,
	// with ε the float64 machine epsilon.
	DifferenceStep float64
	// MaxBacktracks bounds the halvings of the Newton step in the line
	// search (default 20).
	MaxBacktracks int
}

// FixedPointRecord describes one iteration of SolveFixedPoint.
type FixedPointRecord struct {
	// Iteration counts from 1.
	Iteration int
	// Residual is the relative residual r(x) = Norm(x − G(x)) / Norm(x) of
	// the new iterate (see FixedPointSettings).
	Residual float64
	// Change is Norm(x_new − x_old) / Norm(x_new).
	Change float64
	// Evaluations is the cumulative number of evaluations of G, including
	// the one at the initial guess.
	Evaluations int
	// Restarted reports that the Anderson history was cleared in this
	// iteration: because the residual grew (FixedPointSettings.RestartGrowth),
	// or because the map failed at the extrapolated point, in which case
	// the iteration took the plain step x + β (G(x) − x) instead.
	Restarted bool
	// Depth is the number of history columns the Anderson step used (zero
	// for Picard and Newton–Krylov, and for the first Anderson step and the
	// one after a restart).
	Depth int
	// KrylovIterations is the number of GMRES iterations of the
	// Newton–Krylov step (zero for the other methods).
	KrylovIterations int
	// StepLength is the fraction λ of the Newton step accepted by the line
	// search (one for the other methods).
	StepLength float64
	// Elapsed is the time since SolveFixedPoint started.
	Elapsed time.Duration
}

// FixedPointResult reports the outcome of SolveFixedPoint.
type FixedPointResult struct {
	// Method is the iteration used.
	Method FixedPointMethod
	// X is the current iterate: the solution when Converged, otherwise the
	// last accepted iterate (a copy of x0 if no iteration completed). It is
	// never a trial point at which G failed or returned non-finite values.
	X []float64
	// Converged reports Residual ≤ Tolerance.
	Converged bool
	// Iterations is the number of completed iterations.
	Iterations int
	// Evaluations is the total number of evaluations of G.
	Evaluations int
	// Residual is the relative residual r(X) (see FixedPointSettings).
	Residual float64
	// InitialResidual is r(x0).
	InitialResidual float64
	// History holds one record per completed iteration, as passed to
	// FixedPointSettings.Record.
	History []FixedPointRecord
}

// ConvergenceError reports an iterative solver that stopped without
// meeting its tolerance. SolveFixedPoint returns it together with the
// result so far; GMRES returns it with Method "gmres".
type ConvergenceError struct {
	// Method names the iteration: a FixedPointMethod name or "gmres".
	Method string
	// Iterations is the number of completed iterations.
	Iterations int
	// Residual is the last relative residual of an accepted iterate, and
	// Tolerance the one required.
	Residual, Tolerance float64
	// Diverged reports that the residual grew beyond
	// FixedPointSettings.DivergenceFactor times its smallest value.
	Diverged bool
	// NotFinite reports that a NaN or an infinity appeared (in the values
	// of G, or in a GMRES vector).
	NotFinite bool
	// Detail, if not empty, explains further.
	Detail string
}

// Error implements the error interface.
func (e *ConvergenceError) Error() string {
	var msg string
	switch {
	case e.NotFinite:
		msg = fmt.Sprintf("solver: %s stopped after %d iterations: non-finite value (NaN or ±Inf); last relative residual %.3g", e.Method, e.Iterations, e.Residual)
	case e.Diverged:
		msg = fmt.Sprintf("solver: %s diverged after %d iterations: relative residual %.3g", e.Method, e.Iterations, e.Residual)
	default:
		msg = fmt.Sprintf("solver: %s did not converge in %d iterations: relative residual %.3g > tolerance %.3g", e.Method, e.Iterations, e.Residual, e.Tolerance)
	}
	if e.Detail != "" {
		msg += ": " + e.Detail
	}
	return msg
}

// MapError reports an error returned by the map G of SolveFixedPoint.
type MapError struct {
	// Method is the name of the iteration.
	Method string
	// Iteration is the iteration during which G failed (zero: at the
	// initial guess).
	Iteration int
	// Evaluation is the number of the failed evaluation, counting from 1.
	Evaluation int
	// Err is the error returned by G.
	Err error
}

// Error implements the error interface.
func (e *MapError) Error() string {
	return fmt.Sprintf("solver: %s iteration %d: evaluation %d of the map: %v", e.Method, e.Iteration, e.Evaluation, e.Err)
}

// Unwrap returns the error of the map.
func (e *MapError) Unwrap() error { return e.Err }

// errNotFinite marks non-finite values of G inside one solve; it never
// leaves SolveFixedPoint.
var errNotFinite = errors.New("solver: non-finite value of the map")

// Constants of the Newton–Krylov method.
const (
	// Eisenstat–Walker choice 2: η_k = γ (‖F_k‖/‖F_{k−1}‖)^α with γ = 0.9,
	// α = 2 and the safeguards below, as recommended by Kelley (1995),
	// Chapter 6 (values from memory).
	forcingGamma = 0.9
	forcingAlpha = 2
	forcingMax   = 0.9
	// forcingInitial is η_0, the value used in Eisenstat and Walker's
	// experiments (from memory).
	forcingInitial = 0.5
	// armijo is α of the sufficient-decrease condition
	// ‖F(x + λ s)‖ ≤ (1 − α λ) ‖F(x)‖ (Kelley 1995, Chapter 8; value
	// from memory).
	armijo = 1e-4
)

// fixedPointConfig is FixedPointSettings with the defaults filled in.
type fixedPointConfig struct {
	method        FixedPointMethod
	tol           float64
	maxIter       int
	depth         int
	beta          float64
	norm          func([]float64) float64
	record        func(FixedPointRecord)
	maxCond       float64
	restartGrowth float64
	divergence    float64
	krylovRestart int
	maxKrylov     int
	forcing       float64
	diffStep      float64
	maxBacktracks int
}

func settingError(field string, value any, want string) error {
	return fmt.Errorf("solver: FixedPointSettings.%s = %v: %s", field, value, want)
}

// configure validates s and fills in the defaults.
func configure(s *FixedPointSettings) (fixedPointConfig, error) {
	c := fixedPointConfig{
		method:        Anderson,
		tol:           1e-10,
		maxIter:       100,
		depth:         10,
		beta:          1,
		norm:          rmsNorm,
		maxCond:       1e10,
		restartGrowth: 100,
		divergence:    1e6,
		krylovRestart: 30,
		maxKrylov:     60,
		diffStep:      math.Sqrt(0x1p-52),
		maxBacktracks: 20,
	}
	if s == nil {
		return c, nil
	}
	if s.Method < 0 || int(s.Method) >= len(fixedPointMethodNames) {
		return c, settingError("Method", s.Method, "unknown method")
	}
	c.method = s.Method
	switch {
	case s.Tolerance < 0 || !finiteFloat(s.Tolerance):
		return c, settingError("Tolerance", s.Tolerance, "must be finite and positive (zero for the default)")
	case s.Tolerance > 0:
		c.tol = s.Tolerance
	}
	switch {
	case s.MaxIterations < 0:
		return c, settingError("MaxIterations", s.MaxIterations, "must not be negative")
	case s.MaxIterations > 0:
		c.maxIter = s.MaxIterations
	}
	switch {
	case s.Depth < 0:
		return c, settingError("Depth", s.Depth, "must not be negative")
	case s.Depth > 0:
		c.depth = s.Depth
	}
	switch {
	case !(s.Damping >= 0 && s.Damping <= 1):
		return c, settingError("Damping", s.Damping, "must be in (0, 1] (zero for the default 1)")
	case s.Damping > 0:
		c.beta = s.Damping
	}
	if s.Norm != nil {
		c.norm = s.Norm
	}
	c.record = s.Record
	switch {
	case s.MaxCondition == 0:
	case !(s.MaxCondition >= 1):
		return c, settingError("MaxCondition", s.MaxCondition, "must be at least 1")
	default:
		c.maxCond = s.MaxCondition
	}
	switch {
	case s.RestartGrowth == 0:
	case !(s.RestartGrowth > 1):
		return c, settingError("RestartGrowth", s.RestartGrowth, "must exceed 1")
	default:
		c.restartGrowth = s.RestartGrowth
	}
	switch {
	case s.DivergenceFactor == 0:
	case !(s.DivergenceFactor > 1):
		return c, settingError("DivergenceFactor", s.DivergenceFactor, "must exceed 1")
	default:
		c.divergence = s.DivergenceFactor
	}
	switch {
	case s.KrylovRestart < 0:
		return c, settingError("KrylovRestart", s.KrylovRestart, "must not be negative")
	case s.KrylovRestart > 0:
		c.krylovRestart = s.KrylovRestart
	}
	switch {
	case s.MaxKrylovIterations < 0:
		return c, settingError("MaxKrylovIterations", s.MaxKrylovIterations, "must not be negative")
	case s.MaxKrylovIterations > 0:
		c.maxKrylov = s.MaxKrylovIterations
	}
	if !(s.ForcingTerm >= 0 && s.ForcingTerm < 1) {
		return c, settingError("ForcingTerm", s.ForcingTerm, "must be in [0, 1)")
	}
	c.forcing = s.ForcingTerm
	switch {
	case s.DifferenceStep < 0 || !finiteFloat(s.DifferenceStep):
		return c, settingError("DifferenceStep", s.DifferenceStep, "must be finite and positive (zero for the default)")
	case s.DifferenceStep > 0:
		c.diffStep = s.DifferenceStep
	}
	switch {
	case s.MaxBacktracks < 0:
		return c, settingError("MaxBacktracks", s.MaxBacktracks, "must not be negative")
	case s.MaxBacktracks > 0:
		c.maxBacktracks = s.MaxBacktracks
	}
	return c, nil
}

// rmsNorm is ‖x‖₂ / √n.
func rmsNorm(x []float64) float64 {
	if len(x) == 0 {
		return 0
	}
	return norm2(x) / math.Sqrt(float64(len(x)))
}

// SolveFixedPoint finds a fixed point x = G(x) of g starting from x0, which
// is not modified. Nil settings mean the defaults of FixedPointSettings,
// whose documentation also defines the residual and the stopping test.
//
// Picard iterates x ← x + β f(x) with f(x) = G(x) − x.
//
// Anderson acceleration follows H. F. Walker and P. Ni, "Anderson
// acceleration for fixed-point iterations", SIAM J. Numer. Anal. 49(4),
// 1715–1735, 2011 (the "type II" form, after D. G. Anderson, J. ACM 12,
// 1965). With the last m_k differences ΔX = [Δx_{k−m_k} … Δx_{k−1}] and
// ΔF = [Δf_{k−m_k} … Δf_{k−1}] (Δx_i = x_{i+1} − x_i, Δf_i = f_{i+1} − f_i)
// it solves the least-squares problem γ = argmin ‖f_k − ΔF γ‖₂ and steps to
//
//	x_{k+1} = x_k − ΔX γ + β (f_k − ΔF γ).
//
// ΔF is kept as a thin QR factorisation updated as in Walker and Ni: a new
// column by modified Gram–Schmidt (reorthogonalised once when it loses more
// than a factor √2 of its norm), the oldest column removed by Givens
// rotations, so that an iteration costs O(n m) operations besides the
// evaluation of G and allocates nothing. Safeguards: the history never
// exceeds min(Depth, n) columns; the oldest columns are dropped while the
// least-squares problem is ill-conditioned (MaxCondition); the history is
// cleared when the residual grows (RestartGrowth). On a linear map with
// β = 1 and an unbounded history the iterates are those of GMRES applied to
// x − G(x) = 0, passed through G (shown by Walker and Ni), so the iteration
// ends in at most n + 1 steps in exact arithmetic.
//
// Newton–Krylov is the inexact Newton method on F(x) = x − G(x) as in C. T.
// Kelley, "Iterative Methods for Linear and Nonlinear Equations", SIAM 1995,
// Chapters 6 and 8 (Newton–GMRES; chapter numbers from memory). Each step
// solves (I − G'(x)) s = −F(x) by GMRES (see GMRES) to the relative
// tolerance η_k, with the Jacobian-vector products
// v − (G(x + h v) − G(x)) / h (h as in DifferenceStep, after Kelley's
// forward-difference directional derivative). η_k is fixed (ForcingTerm) or
// chosen by choice 2 of S. C. Eisenstat and H. F. Walker, "Choosing the
// forcing terms in an inexact Newton method", SIAM J. Sci. Comput. 17(1),
// 16–32, 1996: η_0 = 0.5, η_k = 0.9 (‖F_k‖/‖F_{k−1}‖)², not below
// 0.9 η²_{k−1} when that exceeds 0.1, at most 0.9, and not below
// 0.5 Tolerance / r(x_k), which avoids solving more accurately than the
// stopping test needs (safeguards as in Kelley, Chapter 6, from memory). The
// step is then shortened by halving λ until
// ‖F(x + λ s)‖₂ ≤ (1 − 10⁻⁴ λ) ‖F(x)‖₂ (Armijo's rule; a trial point where G
// is not finite counts as a failed trial). The line search uses the
// Euclidean norm, for which the GMRES step is a descent direction; Norm is
// used for the stopping test only.
//
// Errors: an error of G is returned as a *MapError (carrying the iteration
// and the evaluation number) wrapping it. Failure to converge within
// MaxIterations, divergence, non-finite values of G (outside a line-search
// trial) and a failed line search return a *ConvergenceError. In every
// case the result so far is returned too, with History, so that callers
// can report it; it is nil only for invalid settings or an empty x0.
// SolveFixedPoint panics if g is nil.
func SolveFixedPoint(g FixedPointMap, x0 []float64, s *FixedPointSettings) (*FixedPointResult, error) {
	if g == nil {
		panic("solver: SolveFixedPoint: nil map")
	}
	cfg, err := configure(s)
	if err != nil {
		return nil, err
	}
	if len(x0) == 0 {
		return nil, errors.New("solver: SolveFixedPoint: empty initial guess")
	}
	run := &fixedPointRun{
		cfg:   cfg,
		g:     g,
		start: time.Now(),
		res: &FixedPointResult{
			Method:  cfg.method,
			History: make([]FixedPointRecord, 0, min(cfg.maxIter, 256)),
		},
	}
	if cfg.method == NewtonKrylov {
		err = run.newtonKrylov(x0)
	} else {
		err = run.anderson(x0)
	}
	return run.res, err
}

// fixedPointRun is the state shared by the iterations of one solve.
type fixedPointRun struct {
	cfg       fixedPointConfig
	g         FixedPointMap
	res       *FixedPointResult
	start     time.Time
	iteration int // the iteration in progress, for error reports
}

// eval computes dst = G(x), counting the evaluation. It returns a
// *MapError for an error of G and errNotFinite for NaN or ±Inf values.
func (r *fixedPointRun) eval(dst, x []float64) error {
	r.res.Evaluations++
	if err := r.g(dst, x); err != nil {
		return &MapError{Method: r.cfg.method.String(), Iteration: r.iteration, Evaluation: r.res.Evaluations, Err: err}
	}
	for _, v := range dst {
		if !finiteFloat(v) {
			return errNotFinite
		}
	}
	return nil
}

// relative returns num / den, or num when den is zero.
func relative(num, den float64) float64 {
	if den == 0 {
		return num
	}
	return num / den
}

// failure converts an error of eval into the error SolveFixedPoint returns.
func (r *fixedPointRun) failure(err error) error {
	if errors.Is(err, errNotFinite) {
		return r.stop(true, false, fmt.Sprintf("the map returned NaN or ±Inf at evaluation %d", r.res.Evaluations))
	}
	return err
}

// stop returns a *ConvergenceError describing the current state.
func (r *fixedPointRun) stop(notFinite, diverged bool, detail string) error {
	return &ConvergenceError{
		Method:     r.cfg.method.String(),
		Iterations: r.res.Iterations,
		Residual:   r.res.Residual,
		Tolerance:  r.cfg.tol,
		Diverged:   diverged,
		NotFinite:  notFinite,
		Detail:     detail,
	}
}

// finish records a completed iteration.
func (r *fixedPointRun) finish(rec FixedPointRecord) {
	r.res.Iterations = rec.Iteration
	rec.Evaluations = r.res.Evaluations
	rec.Elapsed = time.Since(r.start)
	r.res.Residual = rec.Residual
	r.res.History = append(r.res.History, rec)
	if r.cfg.record != nil {
		r.cfg.record(rec)
	}
}

// anderson runs Anderson acceleration, or Picard iteration (no history).
func (r *fixedPointRun) anderson(x0 []float64) error {
	cfg := r.cfg
	n := len(x0)
	var hist *andersonHistory
	if cfg.method == Anderson {
		hist = newAndersonHistory(n, min(cfg.depth, n), cfg.maxCond)
	}
	beta := cfg.beta
	x := slices.Clone(x0)
	g := make([]float64, n)
	f := make([]float64, n)
	xNew := make([]float64, n)
	gNew := make([]float64, n)
	fNew := make([]float64, n)
	d := make([]float64, n)
	r.res.X = x

	if err := r.eval(g, x); err != nil {
		r.res.Residual = math.NaN()
		r.res.InitialResidual = math.NaN()
		return r.failure(err)
	}
	for i := range f {
		f[i] = g[i] - x[i]
	}
	fAbs := cfg.norm(f)
	r.res.Residual = relative(fAbs, cfg.norm(x))
	r.res.InitialResidual = r.res.Residual
	if r.res.Residual <= cfg.tol {
		r.res.Converged = true
		return nil
	}
	smallest := fAbs  // smallest absolute residual, for divergence
	reference := fAbs // smallest since the last restart, for restarts
	for k := 1; k <= cfg.maxIter; k++ {
		r.iteration = k
		depth := 0
		if hist != nil && hist.k > 0 {
			depth = hist.k
			hist.extrapolate(xNew, x, f, beta)
		} else {
			for i := range xNew {
				xNew[i] = x[i] + beta*f[i]
			}
		}
		fallback := false
		if err := r.eval(gNew, xNew); err != nil {
			if depth == 0 {
				return r.failure(err)
			}
			// The extrapolated point lies outside the map's domain (a
			// state the model cannot represent, say) or makes it return
			// NaN: clear the history and take the plain step from x,
			// whose result G(x) the map has produced itself.
			hist.clear()
			depth, fallback = 0, true
			for i := range xNew {
				xNew[i] = x[i] + beta*f[i]
			}
			if err := r.eval(gNew, xNew); err != nil {
				return r.failure(err)
			}
		}
		for i := range fNew {
			fNew[i] = gNew[i] - xNew[i]
			d[i] = xNew[i] - x[i]
		}
		xNorm := cfg.norm(xNew)
		fAbs = cfg.norm(fNew)
		rec := FixedPointRecord{
			Iteration:  k,
			Residual:   relative(fAbs, xNorm),
			Change:     relative(cfg.norm(d), xNorm),
			Depth:      depth,
			StepLength: 1,
		}
		if !finiteFloat(fAbs) || !finiteFloat(xNorm) {
			return r.stop(true, false, "non-finite norm of the iterate or residual")
		}
		converged := rec.Residual <= cfg.tol
		if fallback {
			rec.Restarted = true
			reference = fAbs
			hist.push(d, fNew, f)
		} else if !converged && hist != nil && fAbs > cfg.restartGrowth*reference {
			rec.Restarted = true
			hist.clear()
			reference = fAbs
		} else if hist != nil {
			hist.push(d, fNew, f)
		}
		smallest = min(smallest, fAbs)
		reference = min(reference, fAbs)
		x, xNew = xNew, x
		g, gNew = gNew, g
		f, fNew = fNew, f
		r.res.X = x
		r.finish(rec)
		if converged {
			r.res.Converged = true
			break
		}
		if fAbs > cfg.divergence*smallest {
			return r.stop(false, true, fmt.Sprintf("residual Norm(x − G(x)) = %.3g exceeds DivergenceFactor = %g times its smallest value %.3g", fAbs, cfg.divergence, smallest))
		}
	}
	if !r.res.Converged {
		return r.stop(false, false, "")
	}
	return nil
}

// andersonHistory holds the differences of the last iterates of Anderson
// acceleration: ΔF = Q R as a thin QR factorisation (Q n×k with orthonormal
// columns, R k×k upper triangular) and ΔX, oldest column first. Matrices
// are column-major with leading dimension n (Q, ΔX) or m (R).
type andersonHistory struct {
	n, m    int // dimension and maximal number of columns
	k       int // columns in use
	q, dx   []float64
	r       []float64
	c, gam  []float64 // Qᵀ f and the least-squares coefficients γ
	inv     []float64 // R⁻¹, for the condition number
	maxCond float64
}

func newAndersonHistory(n, m int, maxCond float64) *andersonHistory {
	return &andersonHistory{
		n: n, m: m,
		q:       make([]float64, n*m),
		dx:      make([]float64, n*m),
		r:       make([]float64, m*m),
		c:       make([]float64, m),
		gam:     make([]float64, m),
		inv:     make([]float64, m*m),
		maxCond: maxCond,
	}
}

func (h *andersonHistory) qcol(j int) []float64  { return h.q[j*h.n : (j+1)*h.n] }
func (h *andersonHistory) dxcol(j int) []float64 { return h.dx[j*h.n : (j+1)*h.n] }

// clear empties the history.
func (h *andersonHistory) clear() { h.k = 0 }

// extrapolate sets dst = x − ΔX γ + β (f − ΔF γ), with γ minimising
// ‖f − ΔF γ‖₂: R γ = Qᵀ f and ΔF γ = Q Qᵀ f.
func (h *andersonHistory) extrapolate(dst, x, f []float64, beta float64) {
	k, m := h.k, h.m
	for j := 0; j < k; j++ {
		h.c[j] = dot(h.qcol(j), f)
	}
	for i := k - 1; i >= 0; i-- {
		sum := h.c[i]
		for j := i + 1; j < k; j++ {
			sum -= h.r[j*m+i] * h.gam[j]
		}
		h.gam[i] = sum / h.r[i*m+i]
	}
	for i := range dst {
		dst[i] = x[i] + beta*f[i]
	}
	for j := 0; j < k; j++ {
		a, b := beta*h.c[j], h.gam[j]
		q, dx := h.qcol(j), h.dxcol(j)
		for i := range dst {
			dst[i] -= a*q[i] + b*dx[i]
		}
	}
}

// push appends the differences Δx = d and Δf = fNew − fOld, dropping the
// oldest column when the history is full and then while the least-squares
// problem is too ill-conditioned.
func (h *andersonHistory) push(d, fNew, fOld []float64) {
	if h.m == 0 {
		return
	}
	if h.k == h.m {
		h.dropOldest()
	}
	k, m := h.k, h.m
	copy(h.dxcol(k), d)
	v := h.qcol(k)
	for i := range v {
		v[i] = fNew[i] - fOld[i]
	}
	rk := h.r[k*m : k*m+m]
	clear(rk)
	before := norm2(v)
	for i := 0; i < k; i++ {
		qi := h.qcol(i)
		rk[i] = dot(v, qi)
		vecAddScaled(-rk[i], qi, v)
	}
	after := norm2(v)
	if after < before/math.Sqrt2 {
		// One reorthogonalisation pass (criterion of Daniel, Gragg,
		// Kaufman and Stewart, Math. Comp. 30, 1976; from memory).
		for i := 0; i < k; i++ {
			qi := h.qcol(i)
			c := dot(v, qi)
			rk[i] += c
			vecAddScaled(-c, qi, v)
		}
		after = norm2(v)
	}
	if after <= 0x1p-52*before || before == 0 {
		// Δf lies in the span of the history (or is zero): keeping it
		// would make R singular, and the conditioning test would then
		// drop every older column before it. Leave the history as is.
		return
	}
	vecScale(1/after, v)
	rk[k] = after
	h.k++
	for h.k > 0 && h.condition() > h.maxCond {
		h.dropOldest()
	}
}

// dropOldest removes the first column of ΔF = Q R and of ΔX. Removing it
// leaves R upper Hessenberg; Givens rotations G_j restore the triangle and
// Q absorbs their transposes (as in Walker and Ni 2011; G. H. Golub and
// C. F. Van Loan, "Matrix Computations", 3rd ed., Section 12.5 on updating
// QR factorisations, from memory).
func (h *andersonHistory) dropOldest() {
	k, m, n := h.k, h.m, h.n
	for j := 0; j < k-1; j++ {
		copy(h.r[j*m:j*m+k], h.r[(j+1)*m:(j+1)*m+k])
	}
	clear(h.r[(k-1)*m : (k-1)*m+m])
	for j := 0; j < k-1; j++ {
		c, s, rho := givensRotation(h.r[j*m+j], h.r[j*m+j+1])
		h.r[j*m+j], h.r[j*m+j+1] = rho, 0
		for l := j + 1; l < k-1; l++ {
			a, b := h.r[l*m+j], h.r[l*m+j+1]
			h.r[l*m+j], h.r[l*m+j+1] = c*a+s*b, -s*a+c*b
		}
		qj, qj1 := h.qcol(j), h.qcol(j+1)
		for i := range qj {
			a, b := qj[i], qj1[i]
			qj[i], qj1[i] = c*a+s*b, -s*a+c*b
		}
	}
	copy(h.dx[:(k-1)*n], h.dx[n:k*n])
	h.k--
}

// condition returns the 1-norm condition number of R D⁻¹, with D the
// diagonal of the column norms of R (equal to those of ΔF), or +Inf when R
// is singular. Scaling the columns makes the measure blind to the natural
// decrease of the differences as the iteration converges. The inverse is
// computed exactly: k is small.
func (h *andersonHistory) condition() float64 {
	k, m := h.k, h.m
	var normR float64 // ‖R D⁻¹‖₁
	for j := 0; j < k; j++ {
		col := h.r[j*m : j*m+j+1]
		if col[j] == 0 {
			return math.Inf(1)
		}
		var s1 float64
		for _, v := range col {
			s1 += math.Abs(v)
		}
		normR = max(normR, s1/norm2(col))
	}
	// Columns of R⁻¹ by back substitution; ‖D R⁻¹‖₁.
	var normInv float64
	for j := 0; j < k; j++ {
		inv := h.inv[j*m : j*m+k]
		clear(inv)
		inv[j] = 1 / h.r[j*m+j]
		for i := j - 1; i >= 0; i-- {
			var sum float64
			for l := i + 1; l <= j; l++ {
				sum += h.r[l*m+i] * inv[l]
			}
			inv[i] = -sum / h.r[i*m+i]
		}
		var s1 float64
		for i := 0; i <= j; i++ {
			s1 += norm2(h.r[i*m:i*m+i+1]) * math.Abs(inv[i])
		}
		normInv = max(normInv, s1)
	}
	return normR * normInv
}

// newtonKrylov runs the inexact Newton–GMRES method on F(x) = x − G(x).
func (r *fixedPointRun) newtonKrylov(x0 []float64) error {
	cfg := r.cfg
	n := len(x0)
	x := slices.Clone(x0)
	g := make([]float64, n)
	fx := make([]float64, n) // F(x) = x − G(x)
	rhs := make([]float64, n)
	step := make([]float64, n)
	xt := make([]float64, n) // trial point
	gt := make([]float64, n)
	ft := make([]float64, n)
	xp := make([]float64, n) // differencing point
	gp := make([]float64, n)
	r.res.X = x

	if err := r.eval(g, x); err != nil {
		r.res.Residual = math.NaN()
		r.res.InitialResidual = math.NaN()
		return r.failure(err)
	}
	for i := range fx {
		fx[i] = x[i] - g[i]
	}
	r.res.Residual = relative(cfg.norm(fx), cfg.norm(x))
	r.res.InitialResidual = r.res.Residual
	if r.res.Residual <= cfg.tol {
		r.res.Converged = true
		return nil
	}
	fn2 := norm2(fx)
	xn2 := norm2(x)
	// Jacobian-vector product of F by a forward difference of G (after
	// Kelley 1995, Chapter 6: h = δ ‖x‖ / ‖v‖, a relative perturbation δ
	// of x).
	jacobian := func(dst, v []float64) error {
		vn := norm2(v)
		if vn == 0 {
			clear(dst)
			return nil
		}
		h := cfg.diffStep / vn
		if xn2 > 0 {
			h *= xn2
		}
		for i := range xp {
			xp[i] = x[i] + h*v[i]
		}
		if err := r.eval(gp, xp); err != nil {
			return err
		}
		for i := range dst {
			dst[i] = v[i] - (gp[i]-g[i])/h
		}
		return nil
	}
	work := newGMRESWork(n, min(cfg.krylovRestart, n))
	eta := cfg.forcing
	if eta == 0 {
		eta = forcingInitial
	}
	for k := 1; k <= cfg.maxIter; k++ {
		r.iteration = k
		for i := range rhs {
			rhs[i] = -fx[i]
		}
		clear(step)
		lin, err := work.solve(jacobian, rhs, step, eta, cfg.maxKrylov)
		if err != nil {
			var me *MapError
			var ce *ConvergenceError
			switch {
			case errors.As(err, &me):
				return me
			case errors.Is(err, errNotFinite):
				return r.stop(true, false, fmt.Sprintf("in a directional difference of GMRES iteration %d", lin.Iterations+1))
			case errors.As(err, &ce) && ce.NotFinite:
				return r.stop(true, false, "in GMRES: "+ce.Error())
			case errors.As(err, &ce):
				// An inexact step is still a descent direction when
				// GMRES reduced its residual; the line search decides.
			default:
				return err
			}
		}
		// Backtracking line search (Armijo's rule, step halving).
		lambda := 1.0
		accepted := false
		var ftn float64
		for t := 0; t <= cfg.maxBacktracks; t++ {
			for i := range xt {
				xt[i] = x[i] + lambda*step[i]
			}
			err := r.eval(gt, xt)
			if err == nil {
				for i := range ft {
					ft[i] = xt[i] - gt[i]
				}
				ftn = norm2(ft)
				if ftn <= (1-armijo*lambda)*fn2 {
					accepted = true
					break
				}
			} else if !errors.Is(err, errNotFinite) {
				return err
			}
			lambda /= 2
		}
		if !accepted {
			return r.stop(false, false, fmt.Sprintf("line search failed at Newton step %d: no sufficient decrease after %d halvings of the step (GMRES relative residual %.3g)", k, cfg.maxBacktracks, lin.Residual))
		}
		for i := range step {
			step[i] *= lambda
		}
		xNorm := cfg.norm(xt)
		rec := FixedPointRecord{
			Iteration:        k,
			Residual:         relative(cfg.norm(ft), xNorm),
			Change:           relative(cfg.norm(step), xNorm),
			KrylovIterations: lin.Iterations,
			StepLength:       lambda,
		}
		x, xt = xt, x
		g, gt = gt, g
		fx, ft = ft, fx
		xn2 = norm2(x)
		r.res.X = x
		r.finish(rec)
		if rec.Residual <= cfg.tol {
			r.res.Converged = true
			return nil
		}
		// Forcing term for the next step.
		if cfg.forcing > 0 {
			eta = cfg.forcing
		} else {
			prev := eta
			eta = forcingGamma * math.Pow(ftn/fn2, forcingAlpha)
			if safe := forcingGamma * prev * prev; safe > 0.1 {
				eta = max(eta, safe)
			}
			eta = min(forcingMax, max(eta, 0.5*cfg.tol/rec.Residual))
		}
		fn2 = ftn
	}
	return r.stop(false, false, "")
}
