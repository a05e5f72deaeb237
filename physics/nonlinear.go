package physics

import (
	"errors"
	"fmt"
	"math"
	"time"

	"mixwell/fem"
	"mixwell/solver"
)

// NonlinearSettings controls SolveNonlinear. Zero fields take the
// documented defaults.
type NonlinearSettings struct {
	// Closure gives c(mu, p) in the problem's scaled units (RT = 1).
	Closure Closure
	// Pressure0 is the absolute reference pressure in the thermodynamic
	// unit c_ref RT; the closure sees Pressure0 + S p.
	Pressure0 float64
	// Initial writes the initial potentials mu_i at x into mu (required).
	Initial func(x [2]float64, mu []float64)
	// Method is the fixed-point iteration (default Anderson).
	Method solver.FixedPointMethod
	// Update is the concentration update (default PotentialProjection).
	Update ConcentrationUpdate
	// Floor is the concentration floor of ConcentrationProjection
	// (default 1e-8 in scaled units).
	Floor float64
	// Tolerance on the relative fixed-point residual (default 1e-10).
	Tolerance float64
	// MaxIterations (default 60) and Anderson Depth (default 10).
	MaxIterations, Depth int
	// Record, when set, receives every iteration's record.
	Record func(IterationRecord)
}

// IterationRecord describes one nonlinear iteration.
type IterationRecord struct {
	Iteration int
	// Residual is the relative fixed-point residual ||x - G(x)|| / ||x||
	// (root-mean-square norms over the state).
	Residual float64
	// Change is the relative change of the state in this iteration.
	Change float64
	// MassAverage is ||v - sum_i J_i / rho||_L2 / ||v||_L2 of the last
	// linear solve (absolute when v = 0).
	MassAverage float64
	// Clipped counts concentration values raised to the floor in the last
	// map evaluation (ConcentrationProjection only).
	Clipped int
	// Elapsed is the time since the start of the solve.
	Elapsed time.Duration
}

// NonlinearReport is the record of a nonlinear solve.
type NonlinearReport struct {
	Method      string
	Update      string
	Converged   bool
	Iterations  int
	Evaluations int
	Residual    float64
	History     []IterationRecord
}

// SolveNonlinear solves the nonlinear discrete problem by the Picard map of
// the formulation note, section 4, accelerated as s.Method says. It returns
// the solution of the last map evaluation, the report, and an error when
// the iteration did not converge (the solution and report are returned
// then too, so callers can show the history).
func (d *Discretisation) SolveNonlinear(s *NonlinearSettings) (*Solution, *NonlinearReport, error) {
	if s == nil || s.Closure == nil || s.Initial == nil {
		return nil, nil, fmt.Errorf("physics: SolveNonlinear needs a closure and initial potentials")
	}
	floor := s.Floor
	if floor == 0 {
		floor = 1e-8
	}
	pm, err := newPicard(d, s.Closure, s.Pressure0, s.Update, floor)
	if err != nil {
		return nil, nil, err
	}
	n, nV := d.n, d.V.Len()
	x0 := make([]float64, pm.stateLen())
	mu := make([]float64, n)
	cc := make([]float64, n)
	for i := 0; i < n; i++ {
		comp := i
		blk := x0[i*nV : (i+1)*nV]
		var ferr error
		fem.InterpolateScalar(blk, d.V, func(x [2]float64) float64 {
			s.Initial(x, mu)
			if s.Update == ConcentrationProjection {
				if err := s.Closure.ConcentrationsTo(cc, nil, nil, mu, s.Pressure0); err != nil {
					ferr = err
				}
				return cc[comp]
			}
			return mu[comp]
		})
		if ferr != nil {
			return nil, nil, fmt.Errorf("physics: initial state: %w", ferr)
		}
	}
	if err := pm.initialStefanVelocities(x0, s.Initial); err != nil {
		return nil, nil, fmt.Errorf("physics: initial state: %w", err)
	}
	if err := pm.initialOutletTotals(x0); err != nil {
		return nil, nil, fmt.Errorf("physics: initial state: %w", err)
	}
	tol := s.Tolerance
	if tol == 0 {
		tol = 1e-10
	}
	maxIt := s.MaxIterations
	if maxIt == 0 {
		maxIt = 60
	}
	depth := s.Depth
	if depth == 0 {
		depth = 10
	}
	rep := &NonlinearReport{Method: s.Method.String(), Update: s.Update.String()}
	start := time.Now()
	fps := &solver.FixedPointSettings{
		Method:        s.Method,
		Tolerance:     tol,
		MaxIterations: maxIt,
		Depth:         depth,
		Norm:          rmsNorm,
		Record: func(r solver.FixedPointRecord) {
			rec := IterationRecord{Iteration: r.Iteration, Residual: r.Residual, Change: r.Change,
				Clipped: pm.clipped, Elapsed: time.Since(start)}
			if pm.last != nil {
				rec.MassAverage = d.MassAverageResidual(pm.last)
			}
			rep.History = append(rep.History, rec)
			if s.Record != nil {
				s.Record(rec)
			}
		},
	}
	res, ferr := solver.SolveFixedPoint(pm.apply, x0, fps)
	if res == nil {
		return nil, rep, ferr
	}
	rep.Converged = res.Converged
	rep.Iterations = res.Iterations
	rep.Evaluations = res.Evaluations
	rep.Residual = res.Residual
	// The solution belonging to the final state: one more map evaluation.
	gx := make([]float64, len(res.X))
	if err := pm.apply(gx, res.X); err != nil {
		return nil, rep, err
	}
	if ferr != nil {
		var ce *solver.ConvergenceError
		if errors.As(ferr, &ce) {
			return pm.last, rep, fmt.Errorf("physics: nonlinear iteration (%s) did not converge: %w", rep.Method, ferr)
		}
		return pm.last, rep, ferr
	}
	return pm.last, rep, nil
}

// rmsNorm is the root-mean-square norm.
func rmsNorm(x []float64) float64 {
	var s float64
	for _, v := range x {
		s += v * v
	}
	return math.Sqrt(s / float64(max(len(x), 1)))
}
