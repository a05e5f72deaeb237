package solver

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/mat"
)

// dottie is the unique real solution of x = cos x, the Dottie number
// (well known; value from memory, and checked below: cos(dottie) = dottie
// to rounding).
const dottie = 0.7390851332151607

// fixedPointProblem is a map G with a known fixed point.
type fixedPointProblem struct {
	name string
	g    FixedPointMap
	x0   []float64
	// want is the fixed point; when nil, errorOf measures the error.
	want    []float64
	errorOf func(x []float64) float64
}

// solutionError returns the relative error of x.
func (p fixedPointProblem) solutionError(x []float64) float64 {
	if p.want == nil {
		return p.errorOf(x)
	}
	return floats.Distance(x, p.want, 2) / floats.Norm(p.want, 2)
}

// linearProblem returns G(x) = A x + b and its fixed point (I − A)⁻¹ b by
// gonum's dense solve.
func linearProblem(t *testing.T, name string, a *mat.Dense, rnd *rand.Rand) fixedPointProblem {
	t.Helper()
	n, _ := a.Dims()
	b := make([]float64, n)
	for i := range b {
		b[i] = 2*rnd.Float64() - 1
	}
	var ima mat.Dense
	ima.Sub(identityDense(n), a)
	want := gmresDenseSolve(t, &ima, b)
	x0 := make([]float64, n)
	for i := range x0 {
		x0[i] = 1
	}
	return fixedPointProblem{
		name: name,
		g: func(dst, x []float64) error {
			mat.NewVecDense(n, dst).MulVec(a, mat.NewVecDense(n, x))
			floats.Add(dst, b)
			return nil
		},
		x0:   x0,
		want: want,
	}
}

// identityDense returns the n×n identity matrix.
func identityDense(n int) *mat.Dense {
	m := mat.NewDense(n, n, nil)
	for i := 0; i < n; i++ {
		m.Set(i, i, 1)
	}
	return m
}

// fpRandomOrthogonal returns the Q factor of a Gaussian matrix.
func fpRandomOrthogonal(rnd *rand.Rand, n int) *mat.Dense {
	m := mat.NewDense(n, n, nil)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			m.Set(i, j, rnd.NormFloat64())
		}
	}
	var qr mat.QR
	qr.Factorize(m)
	var q mat.Dense
	qr.QTo(&q)
	return &q
}

// gaussianContraction returns a random n×n matrix scaled to spectral norm
// 0.6, so that Picard iteration contracts by at least 0.6 per step (its
// spectral radius is much smaller, about 0.1 for the seed used).
func gaussianContraction(rnd *rand.Rand, n int) *mat.Dense {
	a := mat.NewDense(n, n, nil)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			a.Set(i, j, rnd.NormFloat64())
		}
	}
	a.Scale(0.6/mat.Norm(a, 2), a)
	return a
}

// symmetricContraction returns A = Q Λ Qᵀ with Q random orthogonal and the
// eigenvalues Λ evenly spaced in [−0.5, 0.75]: Picard contracts by 0.75
// per step, and GMRES-like acceleration should do much better.
func symmetricContraction(rnd *rand.Rand, n int) *mat.Dense {
	d := mat.NewDense(n, n, nil)
	for i := 0; i < n; i++ {
		d.Set(i, i, -0.5+1.25*float64(i)/float64(n-1))
	}
	q := fpRandomOrthogonal(rnd, n)
	var a mat.Dense
	a.Product(q, d, q.T())
	return &a
}

// rotationDominated returns A = Q D Qᵀ with Q random orthogonal and D block
// diagonal with 2×2 blocks r [cos θ −sin θ; sin θ cos θ], r in [1.3, 1.6]
// and θ in π/2 ± 0.2: eigenvalues r e^{±iθ}, nearly imaginary, of modulus
// above one (so Picard diverges) and away from 1 (so I − A is
// nonsingular). It mimics the dominant eigenvalues of dG reported in the
// formulation note, Section 4. n must be even.
func rotationDominated(rnd *rand.Rand, n int) *mat.Dense {
	d := mat.NewDense(n, n, nil)
	for k := 0; k < n; k += 2 {
		r := 1.3 + 0.3*rnd.Float64()
		th := math.Pi/2 + 0.4*(rnd.Float64()-0.5)
		c, s := r*math.Cos(th), r*math.Sin(th)
		d.Set(k, k, c)
		d.Set(k, k+1, -s)
		d.Set(k+1, k, s)
		d.Set(k+1, k+1, c)
	}
	q := fpRandomOrthogonal(rnd, n)
	var a mat.Dense
	a.Product(q, d, q.T())
	return &a
}

// dottieProblem is x = cos x.
func dottieProblem() fixedPointProblem {
	return fixedPointProblem{
		name: "x = cos x",
		g: func(dst, x []float64) error {
			dst[0] = math.Cos(x[0])
			return nil
		},
		x0:   []float64{1},
		want: []float64{dottie},
	}
}

// burdenFairesProblem is the three-dimensional fixed-point example of R. L.
// Burden and J. D. Faires, "Numerical Analysis", Section 10.1 (from
// memory), with the initial guess used there. Its fixed point
// (1/2, 0, −π/6) is exact, as substitution shows: cos 0 / 3 + 1/6 = 1/2,
// √(1/4 − 1/2 + 1.06)/9 − 0.1 = 0.9/9 − 0.1 = 0 and
// −e⁰/20 − (10π − 3)/60 = −π/6.
func burdenFairesProblem() fixedPointProblem {
	return fixedPointProblem{
		name: "Burden–Faires 3-D",
		g: func(dst, x []float64) error {
			dst[0] = math.Cos(x[1]*x[2])/3 + 1.0/6
			dst[1] = math.Sqrt(x[0]*x[0]+math.Sin(x[2])+1.06)/9 - 0.1
			dst[2] = -math.Exp(-x[0]*x[1])/20 - (10*math.Pi-3)/60
			return nil
		},
		x0:   []float64{0.1, 0.1, -0.1},
		want: []float64{0.5, 0, -math.Pi / 6},
	}
}

// chandrasekharProblem is the Chandrasekhar H-equation with parameter c,
// discretised by the composite midpoint rule on N nodes μ_i = (i − ½)/N as
// in C. T. Kelley, "Iterative Methods for Linear and Nonlinear Equations",
// SIAM 1995, Section 5.6 (from memory), in fixed-point form
//
//	H_i = 1 / (1 − (c/2N) Σ_j μ_i H_j / (μ_i + μ_j)).
//
// No closed form of H is known, but its mean is: multiplying the equation
// by its denominator, averaging over i and symmetrising the double sum
// (μ_i/(μ_i+μ_j) + μ_j/(μ_i+μ_j) = 1) gives m = 1 + (c/4) m² for the mean
// m, whose root continuous from m = 1 at c = 0 is m = 2(1 − √(1 − c))/c
// (our own derivation, exact for the discrete equations). The error measure
// is the relative error of the mean.
func chandrasekharProblem(c float64, n int) fixedPointProblem {
	mu := make([]float64, n)
	for i := range mu {
		mu[i] = (float64(i) + 0.5) / float64(n)
	}
	mean := 2 * (1 - math.Sqrt(1-c)) / c
	x0 := make([]float64, n)
	for i := range x0 {
		x0[i] = 1
	}
	return fixedPointProblem{
		name: fmt.Sprintf("Chandrasekhar H c=%g N=%d", c, n),
		g: func(dst, x []float64) error {
			for i, mi := range mu {
				var s float64
				for j, mj := range mu {
					s += mi * x[j] / (mi + mj)
				}
				dst[i] = 1 / (1 - c/(2*float64(n))*s)
			}
			return nil
		},
		x0: x0,
		errorOf: func(x []float64) float64 {
			return math.Abs(floats.Sum(x)/float64(len(x))-mean) / mean
		},
	}
}

// countingMap wraps g and counts its evaluations.
func countingMap(g FixedPointMap, calls *int) FixedPointMap {
	return func(dst, x []float64) error {
		*calls++
		return g(dst, x)
	}
}

func TestDottieNumber(t *testing.T) {
	// The reference value itself: cos(dottie) = dottie to rounding.
	const tol = 2e-16
	if d := math.Abs(math.Cos(dottie) - dottie); d > tol {
		t.Errorf("|cos(dottie) − dottie| = %g, want ≤ %g", d, tol)
	}
}

func TestSolveFixedPoint(t *testing.T) {
	// Convergence is judged by the relative residual; the solution error is
	// then at most about Tolerance · ‖(I − G')⁻¹‖, so agree allows a
	// factor 100 over the tolerance.
	const tol = 1e-10
	const agree = 1e-8
	rnd := rand.New(rand.NewPCG(7, 8))
	const nRot = 20
	contract := linearProblem(t, "linear, Gaussian, ‖A‖₂ = 0.6, n=30", gaussianContraction(rnd, 30), rnd)
	symmetric := linearProblem(t, "linear, symmetric, eigenvalues in [-0.5, 0.75], n=30", symmetricContraction(rnd, 30), rnd)
	rotation := linearProblem(t, "linear, eigenvalues ≈ ±1.5i, n=20", rotationDominated(rnd, nRot), rnd)
	dot := dottieProblem()
	bf := burdenFairesProblem()
	hEq := chandrasekharProblem(0.9, 100)

	cases := []struct {
		problem fixedPointProblem
		s       FixedPointSettings
		// maxIterations, when positive, bounds the iterations.
		maxIterations int
		// diverges: the method must fail with a ConvergenceError marked
		// Diverged.
		diverges bool
	}{
		{problem: contract, s: FixedPointSettings{Method: Picard}},
		{problem: contract, s: FixedPointSettings{Method: Anderson}},
		{problem: contract, s: FixedPointSettings{Method: NewtonKrylov}},
		{problem: symmetric, s: FixedPointSettings{Method: Picard}},
		{problem: symmetric, s: FixedPointSettings{Method: Anderson}},
		{problem: symmetric, s: FixedPointSettings{Method: NewtonKrylov}},

		// Spectral radius > 1: plain Picard must be reported as
		// diverging, not hidden.
		{problem: rotation, s: FixedPointSettings{Method: Picard}, diverges: true},
		// Anderson with full depth on a linear problem of dimension n
		// ends in at most n + 1 steps in exact arithmetic (Walker and Ni
		// 2011, via the equivalence with GMRES); allow one more for
		// rounding.
		{problem: rotation, s: FixedPointSettings{Method: Anderson, Depth: nRot}, maxIterations: nRot + 2},
		{problem: rotation, s: FixedPointSettings{Method: Anderson}},
		{problem: rotation, s: FixedPointSettings{Method: NewtonKrylov}},

		{problem: dot, s: FixedPointSettings{Method: Picard}},
		{problem: dot, s: FixedPointSettings{Method: Anderson}},
		{problem: dot, s: FixedPointSettings{Method: NewtonKrylov}},
		{problem: bf, s: FixedPointSettings{Method: Picard}},
		{problem: bf, s: FixedPointSettings{Method: Anderson}},
		{problem: bf, s: FixedPointSettings{Method: NewtonKrylov}},
		{problem: hEq, s: FixedPointSettings{Method: Picard}},
		{problem: hEq, s: FixedPointSettings{Method: Anderson}},
		{problem: hEq, s: FixedPointSettings{Method: NewtonKrylov}},
	}
	for _, c := range cases {
		name := fmt.Sprintf("%s, %v", c.problem.name, c.s.Method)
		if c.s.Depth > 0 {
			name += fmt.Sprintf(" depth %d", c.s.Depth)
		}
		x0 := slices.Clone(c.problem.x0)
		calls := 0
		s := c.s
		s.Tolerance = tol
		res, err := SolveFixedPoint(countingMap(c.problem.g, &calls), x0, &s)
		if res == nil {
			t.Fatalf("%s: nil result, error %v", name, err)
		}
		if !slices.Equal(x0, c.problem.x0) {
			t.Errorf("%s: x0 was modified", name)
		}
		if res.Evaluations != calls {
			t.Errorf("%s: Evaluations = %d, but G was called %d times", name, res.Evaluations, calls)
		}
		if len(res.History) != res.Iterations {
			t.Errorf("%s: %d history records for %d iterations", name, len(res.History), res.Iterations)
		}
		if c.diverges {
			var ce *ConvergenceError
			if !errors.As(err, &ce) || !ce.Diverged || res.Converged || ce.Method != c.s.Method.String() {
				t.Errorf("%s: converged %v, error %v; want a ConvergenceError marked Diverged", name, res.Converged, err)
			}
			t.Logf("%s: stopped as diverged after %d iterations, %d evaluations: %v", name, res.Iterations, res.Evaluations, err)
			continue
		}
		if err != nil {
			t.Errorf("%s: %v", name, err)
			continue
		}
		if !res.Converged || res.Residual > tol {
			t.Errorf("%s: converged %v with residual %.3g, want ≤ %g", name, res.Converged, res.Residual, tol)
		}
		if c.maxIterations > 0 && res.Iterations > c.maxIterations {
			t.Errorf("%s: %d iterations, want at most %d", name, res.Iterations, c.maxIterations)
		}
		if e := c.problem.solutionError(res.X); e > agree {
			t.Errorf("%s: relative error %.3g, want ≤ %g", name, e, agree)
		}
		t.Logf("%s: %d iterations, %d evaluations, residual %.3g", name, res.Iterations, res.Evaluations, res.Residual)
	}
}

func TestSolveFixedPointRecord(t *testing.T) {
	const tol = 1e-12
	p := burdenFairesProblem()
	for _, m := range []FixedPointMethod{Picard, Anderson, NewtonKrylov} {
		var recs []FixedPointRecord
		s := &FixedPointSettings{Method: m, Tolerance: tol, Record: func(r FixedPointRecord) { recs = append(recs, r) }}
		res, err := SolveFixedPoint(p.g, p.x0, s)
		if err != nil {
			t.Errorf("%v: %v", m, err)
			continue
		}
		if !res.Converged || res.Residual > tol {
			t.Errorf("%v: converged %v with residual %.3g, want ≤ %g", m, res.Converged, res.Residual, tol)
		}
		if len(recs) != res.Iterations || !slices.Equal(recs, res.History) {
			t.Errorf("%v: %d Record calls for %d iterations, or records differ from History", m, len(recs), res.Iterations)
			continue
		}
		prev := 1 // the evaluation at x0
		for i, r := range recs {
			if r.Iteration != i+1 || r.Evaluations <= prev {
				t.Errorf("%v: record %d: Iteration %d, Evaluations %d after %d; want iteration %d and more evaluations", m, i, r.Iteration, r.Evaluations, prev, i+1)
			}
			prev = r.Evaluations
			if !(r.StepLength > 0 && r.StepLength <= 1) || r.Change < 0 {
				t.Errorf("%v: record %d: StepLength %g, Change %g", m, i, r.StepLength, r.Change)
			}
		}
		last := recs[len(recs)-1]
		if last.Residual != res.Residual || last.Evaluations != res.Evaluations {
			t.Errorf("%v: last record %+v does not match the result (residual %g, %d evaluations)", m, last, res.Residual, res.Evaluations)
		}
	}
}

func TestSolveFixedPointConvergedInitialGuess(t *testing.T) {
	for _, m := range []FixedPointMethod{Picard, Anderson, NewtonKrylov} {
		res, err := SolveFixedPoint(dottieProblem().g, []float64{dottie}, &FixedPointSettings{Method: m})
		if err != nil || !res.Converged || res.Iterations != 0 || res.Evaluations != 1 || len(res.History) != 0 {
			t.Errorf("%v: got %+v, %v; want converged after 1 evaluation and 0 iterations", m, res, err)
		}
	}
}

func TestAndersonSafeguards(t *testing.T) {
	rnd := rand.New(rand.NewPCG(9, 10))
	rotation := linearProblem(t, "rotation", rotationDominated(rnd, 20), rnd)

	t.Run("restart on growth", func(t *testing.T) {
		// The first (Picard) step on this map increases the residual,
		// by up to |λ| ≈ 1.6; a restart threshold of 1.01 must trigger,
		// and the step after a restart uses no history.
		res, _ := SolveFixedPoint(rotation.g, rotation.x0, &FixedPointSettings{RestartGrowth: 1.01, MaxIterations: 30})
		restarts := 0
		for i, r := range res.History {
			if !r.Restarted {
				continue
			}
			restarts++
			if i+1 < len(res.History) && res.History[i+1].Depth != 0 {
				t.Errorf("iteration %d after a restart used %d history columns, want 0", i+2, res.History[i+1].Depth)
			}
		}
		if restarts == 0 {
			t.Error("no restart recorded")
		}
	})
	t.Run("conditioning drops columns", func(t *testing.T) {
		// With MaxCondition = 1 any second column makes R D⁻¹ non-
		// orthogonal (condition > 1), so at most one column survives.
		res, _ := SolveFixedPoint(rotation.g, rotation.x0, &FixedPointSettings{MaxCondition: 1, MaxIterations: 10})
		for _, r := range res.History {
			if r.Depth > 1 {
				t.Errorf("iteration %d used %d history columns, want at most 1", r.Iteration, r.Depth)
			}
		}
	})
	t.Run("iteration limit", func(t *testing.T) {
		p := chandrasekharProblem(0.9, 50)
		res, err := SolveFixedPoint(p.g, p.x0, &FixedPointSettings{MaxIterations: 2})
		var ce *ConvergenceError
		if !errors.As(err, &ce) || ce.Diverged || ce.NotFinite || ce.Iterations != 2 || res.Converged || len(res.History) != 2 || ce.Residual != res.Residual {
			t.Errorf("got %+v, %v; want a plain ConvergenceError after 2 iterations", res, err)
		}
	})
}

func TestAndersonHistoryQR(t *testing.T) {
	// Invariants of the updated factorisation: Q R equals the stored
	// differences ΔF (kept here separately), QᵀQ = I, R upper triangular,
	// ΔX in order; checked after every push, through several drops.
	const tol = 1e-13
	const n, m = 12, 4
	rnd := rand.New(rand.NewPCG(11, 12))
	h := newAndersonHistory(n, m, 1e10)
	var dfs, dxs [][]float64
	zero := make([]float64, n)
	for step := 0; step < 10; step++ {
		df := make([]float64, n)
		dx := make([]float64, n)
		for i := range df {
			df[i] = rnd.NormFloat64() * math.Pow(10, -float64(step)) // shrinking, as when converging
			dx[i] = rnd.NormFloat64()
		}
		h.push(dx, df, zero)
		dfs = append(dfs, df)
		dxs = append(dxs, dx)
		if len(dfs) > m {
			dfs, dxs = dfs[1:], dxs[1:]
		}
		if h.k != len(dfs) {
			t.Fatalf("step %d: %d columns, want %d", step, h.k, len(dfs))
		}
		for j := 0; j < h.k; j++ {
			qr := make([]float64, n)
			for i := 0; i <= j; i++ {
				vecAddScaled(h.r[j*m+i], h.qcol(i), qr)
			}
			if d := floats.Distance(qr, dfs[j], 2) / floats.Norm(dfs[j], 2); d > tol {
				t.Errorf("step %d column %d: ‖QR − ΔF‖/‖ΔF‖ = %.3g, want ≤ %g", step, j, d, tol)
			}
			if !slices.Equal(h.dxcol(j), dxs[j]) {
				t.Errorf("step %d: ΔX column %d out of order", step, j)
			}
			for i := 0; i < h.k; i++ {
				want := 0.0
				if i == j {
					want = 1
				}
				if d := math.Abs(dot(h.qcol(i), h.qcol(j)) - want); d > tol {
					t.Errorf("step %d: (QᵀQ)[%d,%d] off by %.3g", step, i, j, d)
				}
				if i > j && h.r[j*m+i] != 0 {
					t.Errorf("step %d: R[%d,%d] = %g below the diagonal", step, i, j, h.r[j*m+i])
				}
			}
		}
	}
}

func TestNewtonKrylovLineSearch(t *testing.T) {
	// From x0 = 3 the full Newton step for x − cos x = 0 lands at
	// 3 − (3 − cos 3)/(1 + sin 3) ≈ −0.50, where this map is NaN; the
	// line search must reject that trial and take λ = 1/2 (x ≈ 1.25,
	// where |F| ≈ 0.94 < |F(3)| ≈ 3.99).
	g := func(dst, x []float64) error {
		if x[0] < -0.2 {
			dst[0] = math.NaN()
			return nil
		}
		dst[0] = math.Cos(x[0])
		return nil
	}
	const tol = 1e-10
	res, err := SolveFixedPoint(g, []float64{3}, &FixedPointSettings{Method: NewtonKrylov, Tolerance: tol})
	if err != nil {
		t.Fatal(err)
	}
	if got := res.History[0].StepLength; got != 0.5 {
		t.Errorf("first step length %g, want 0.5", got)
	}
	if d := math.Abs(res.X[0] - dottie); d > 10*tol {
		t.Errorf("x = %.16g, want %.16g", res.X[0], dottie)
	}
}

func TestSolveFixedPointErrors(t *testing.T) {
	errMap := errors.New("map failed")
	methods := []FixedPointMethod{Picard, Anderson, NewtonKrylov}
	bf := burdenFairesProblem()

	t.Run("map error", func(t *testing.T) {
		for _, m := range methods {
			// The map fails from its third evaluation on. Anderson's
			// third evaluation is its first extrapolated point, after
			// which it retries the plain step: the error comes from the
			// fourth.
			calls := 0
			g := func(dst, x []float64) error {
				calls++
				if calls >= 3 {
					return errMap
				}
				return bf.g(dst, x)
			}
			want := 3
			if m == Anderson {
				want = 4
			}
			res, err := SolveFixedPoint(g, bf.x0, &FixedPointSettings{Method: m})
			var me *MapError
			if !errors.Is(err, errMap) || !errors.As(err, &me) || me.Evaluation != want || me.Method != m.String() || me.Iteration < 1 {
				t.Errorf("%v: error %v, want a MapError for evaluation %d wrapping the map's error", m, err, want)
			}
			if res == nil || res.X == nil {
				t.Errorf("%v: no result returned with the error", m)
			}
		}
	})
	t.Run("NaN", func(t *testing.T) {
		for _, m := range methods {
			calls := 0
			g := func(dst, x []float64) error {
				calls++
				if err := bf.g(dst, x); err != nil {
					return err
				}
				if calls >= 2 {
					dst[1] = math.NaN()
				}
				return nil
			}
			res, err := SolveFixedPoint(g, bf.x0, &FixedPointSettings{Method: m})
			var ce *ConvergenceError
			if !errors.As(err, &ce) || !ce.NotFinite || res.Converged {
				t.Errorf("%v: error %v, want a ConvergenceError marked NotFinite", m, err)
				continue
			}
			for _, v := range res.X {
				if math.IsNaN(v) {
					t.Errorf("%v: returned iterate %v contains NaN", m, res.X)
				}
			}
		}
	})
	t.Run("settings", func(t *testing.T) {
		cases := []struct {
			s     FixedPointSettings
			field string
		}{
			{FixedPointSettings{Method: 7}, "Method"},
			{FixedPointSettings{Method: -1}, "Method"},
			{FixedPointSettings{Tolerance: -1}, "Tolerance"},
			{FixedPointSettings{Tolerance: math.NaN()}, "Tolerance"},
			{FixedPointSettings{MaxIterations: -1}, "MaxIterations"},
			{FixedPointSettings{Depth: -1}, "Depth"},
			{FixedPointSettings{Damping: 1.5}, "Damping"},
			{FixedPointSettings{Damping: -0.5}, "Damping"},
			{FixedPointSettings{Damping: math.NaN()}, "Damping"},
			{FixedPointSettings{MaxCondition: 0.5}, "MaxCondition"},
			{FixedPointSettings{RestartGrowth: 1}, "RestartGrowth"},
			{FixedPointSettings{DivergenceFactor: 0.5}, "DivergenceFactor"},
			{FixedPointSettings{KrylovRestart: -1}, "KrylovRestart"},
			{FixedPointSettings{MaxKrylovIterations: -1}, "MaxKrylovIterations"},
			{FixedPointSettings{ForcingTerm: 1}, "ForcingTerm"},
			{FixedPointSettings{DifferenceStep: -1e-8}, "DifferenceStep"},
			{FixedPointSettings{MaxBacktracks: -1}, "MaxBacktracks"},
		}
		for _, c := range cases {
			res, err := SolveFixedPoint(bf.g, bf.x0, &c.s)
			if err == nil || res != nil || !strings.Contains(err.Error(), "FixedPointSettings."+c.field) {
				t.Errorf("%s: got %v, %v; want an error naming the field", c.field, res, err)
			}
		}
	})
	t.Run("empty initial guess", func(t *testing.T) {
		if _, err := SolveFixedPoint(bf.g, nil, nil); err == nil {
			t.Error("no error")
		}
	})
}

func TestParseFixedPointMethod(t *testing.T) {
	for _, m := range []FixedPointMethod{Anderson, Picard, NewtonKrylov} {
		got, err := ParseFixedPointMethod(strings.ToUpper(m.String()))
		if err != nil || got != m {
			t.Errorf("%v: parsed %v, %v", m, got, err)
		}
	}
	if names := FixedPointMethodNames(); !slices.Equal(names, []string{"anderson", "picard", "newton-krylov"}) {
		t.Errorf("names %v", names)
	}
	_, err := ParseFixedPointMethod("secant")
	if err == nil || !strings.Contains(err.Error(), "anderson, picard, newton-krylov") {
		t.Errorf("error %v, want the list of allowed names", err)
	}
	if got := FixedPointMethod(9).String(); got != "FixedPointMethod(9)" {
		t.Errorf("String of an invalid method = %q", got)
	}
}

// sinkFixedPoint keeps benchmark results alive.
var sinkFixedPoint *FixedPointResult

// BenchmarkAndersonLinear1000 solves x = b + 0.5 x_{i−1} + 0.4 x_{i+1}
// (a nonsymmetric contraction with ‖A‖∞ = 0.9 on 1000 unknowns) by
// Anderson acceleration with the default settings; the map is cheap, so the
// benchmark measures the cost of the acceleration itself.
func BenchmarkAndersonLinear1000(b *testing.B) {
	const n = 1000
	rnd := rand.New(rand.NewPCG(13, 14))
	rhs := make([]float64, n)
	for i := range rhs {
		rhs[i] = 1 + rnd.Float64()
	}
	g := func(dst, x []float64) error {
		for i := range dst {
			v := rhs[i]
			if i > 0 {
				v += 0.5 * x[i-1]
			}
			if i < n-1 {
				v += 0.4 * x[i+1]
			}
			dst[i] = v
		}
		return nil
	}
	x0 := make([]float64, n)
	b.ReportAllocs()
	var res *FixedPointResult
	for b.Loop() {
		var err error
		res, err = SolveFixedPoint(g, x0, nil)
		if err != nil {
			b.Fatal(err)
		}
	}
	sinkFixedPoint = res
	b.ReportMetric(float64(res.Iterations), "iterations")
}

func TestFixedPointAllocations(t *testing.T) {
	// Once the buffers are sized, Picard and Anderson iterations allocate
	// nothing: the allocations of a solve do not depend on the number of
	// iterations. The norm (offset by one, so that the residual stays above
	// 1e-3) puts the tolerance out of reach: every run uses all its
	// iterations.
	p := chandrasekharProblem(0.9, 20)
	norm := func(x []float64) float64 { return floats.Norm(x, 2) + 1 }
	for _, m := range []FixedPointMethod{Picard, Anderson} {
		allocs := func(iterations int) float64 {
			s := &FixedPointSettings{Method: m, Tolerance: 1e-3, MaxIterations: iterations, Norm: norm}
			return testing.AllocsPerRun(5, func() {
				SolveFixedPoint(p.g, p.x0, s)
			})
		}
		if few, many := allocs(5), allocs(60); few != many {
			t.Errorf("%v: %g allocations for 5 iterations, %g for 60", m, few, many)
		}
	}
}

func TestAndersonFallsBackWhenExtrapolationLeavesTheDomain(t *testing.T) {
	// A map defined only at the initial guess and at its own outputs (as a
	// model that cannot represent an arbitrary state): every extrapolated
	// Anderson point fails, and the iteration must fall back to the plain
	// step and converge like Picard iteration, G(x) = x/2 + (1, 2, 3),
	// fixed point (2, 4, 6), contraction 1/2: about 35 steps to 1e-10.
	own := map[[3]float64]bool{{0, 0, 0}: true}
	g := func(dst, x []float64) error {
		if !own[[3]float64(x)] {
			return errors.New("state outside the model's range")
		}
		for i := range dst {
			dst[i] = x[i]/2 + float64(i+1)
		}
		own[[3]float64(dst)] = true
		return nil
	}
	res, err := SolveFixedPoint(g, []float64{0, 0, 0}, &FixedPointSettings{Method: Anderson, Depth: 5})
	if err != nil {
		t.Fatal(err)
	}
	for i, want := range []float64{2, 4, 6} {
		if math.Abs(res.X[i]-want) > 1e-8 {
			t.Errorf("x[%d] = %.12g, want %g", i, res.X[i], want)
		}
	}
	var fallbacks int
	for _, rec := range res.History {
		if rec.Restarted {
			fallbacks++
		}
	}
	if fallbacks == 0 || res.Iterations > 40 {
		t.Errorf("%d iterations, %d fallbacks: want convergence like Picard (about 35) with fallbacks", res.Iterations, fallbacks)
	}
	t.Logf("%d iterations, %d evaluations, %d fallbacks", res.Iterations, res.Evaluations, fallbacks)
}
