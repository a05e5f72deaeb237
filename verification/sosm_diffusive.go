package verification

import (
	"fmt"
	"math"

	"mixwell/physics"
)

// Names of the flux unknowns of the sosm problem (Config.Formulation).
const (
	formulationTotal     = "total-flux"
	formulationDiffusive = "diffusive-flux"
)

// solveDiffusiveLevel solves the frozen manufactured problem prob with the
// diffusive-flux formulation (remedy (c) of docs/augmentation.md) and
// appends its errors, unknowns, residual and conservation defect to st. The
// relative potentials m_i = mu_i/M_i - mu_n/M_n take the place of the
// potentials, and the total flux J_i = j_i + rho_i v of every species is
// measured, so that the flux errors compare with the total-flux runs.
func solveDiffusiveLevel(st *Study, prob *physics.Problem, ex *sosmExact, k int) error {
	n := prob.Mixture.Len()
	d, err := physics.NewDiffusiveFlux(prob)
	if err != nil {
		return err
	}
	pt := ex.newPoint()
	sol, err := d.SolveFrozen(func(x [2]float64, c []float64, gradc [][2]float64) {
		ex.at(pt, x)
		copy(c, pt.C)
		copy(gradc, pt.GradC)
	})
	if err != nil {
		return err
	}
	ept := ex.newPoint()
	e := sol.Errors(func(x [2]float64) ([2]float64, [2][2]float64, float64, [][2]float64, []float64, []float64) {
		ex.at(ept, x)
		return ept.V, ept.GradV, ept.P, ept.J, ept.DivJ, ept.Mu
	}, 2*(k+1)+6)
	add := func(name string, v float64) { st.Errors[name] = append(st.Errors[name], v) }
	add("velocity_H1", e.VelocityH1)
	add("velocity_L2", e.VelocityL2)
	add("pressure_L2", e.Pressure)
	var worst float64
	cons := sol.Conservation()
	for i := 0; i < n; i++ {
		add(fmt.Sprintf("flux_L2_s%d", i+1), e.Flux[i])
		add(fmt.Sprintf("flux_Hdiv_s%d", i+1), math.Hypot(e.Flux[i], e.FluxDiv[i]))
		if i < n-1 {
			add(fmt.Sprintf("relative_potential_L2_s%d", i+1), e.Potential[i])
		}
		if i < n-1 {
			worst = math.Max(worst, cons[i])
		}
	}
	st.ConservationLast = append(st.ConservationLast, cons[n-1])
	st.Iterations = append(st.Iterations, 1)
	st.Conservation = append(st.Conservation, worst)
	st.Unknowns = append(st.Unknowns, d.Len())
	st.Residuals = append(st.Residuals, sol.LinearResidual)
	return nil
}
