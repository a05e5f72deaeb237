package physics

import (
	"math"
)

// IdealSolution is the closure of an incompressible ideal liquid solution
// with constant partial molar volumes V_i. The consistent model is
//
//	mu_i = V_i (p - P_ref) + RT ln x_i,   sum_i x_i = 1,
//	c_T = 1/V_m,   V_m = sum_i x_i V_i,   c_i = x_i c_T,
//
// with potentials measured from the pure species at (P_ref, T) (ideal
// solution with pressure-independent volumes; e.g. Prausnitz, Lichtenthaler
// & de Azevedo, Molecular Thermodynamics of Fluid-Phase Equilibria, 3rd ed.,
// 1999). Given mu and p the closure forms
//
//	a_i = exp((mu_i - V_i (p - P_ref))/RT),   x_i = a_i / sum_j a_j,
//
// and returns c_i = x_i / sum_j x_j V_j. Derivation of its consistency: on
// the equation-of-state surface sum_j a_j = 1 the normalisation does nothing
// and sum_i x_i dmu_i = V_m dp + RT sum_i dx_i = V_m dp, i.e.
// sum_i c_i dmu_i = dp (Gibbs–Duhem). Off the surface,
// d ln sum_j a_j = V_m (sum_i c_i dmu_i - dp)/RT, so wherever the
// Onsager–Stefan–Maxwell rows enforce Gibbs–Duhem the state stays on the
// surface. Adding a constant to every potential at fixed p leaves c unchanged;
// the level is fixed by the surface, i.e. by the pressure.
//
// The Jacobian is dc_i/dmu_j = (c_i delta_ij - c_i c_j V_j)/RT and
// dc_i/dp = -c_i (V_i - sum_j c_j V_j^2)/RT (c_j V_j is the volume fraction
// of species j); dc/dp vanishes when all V_i are equal.
type IdealSolution struct {
	mix  *Mixture
	vol  []float64
	rt   float64
	pRef float64
}

// NewIdealSolution returns the incompressible ideal-solution closure for the
// species of mix with partial molar volumes volumes (m^3/mol in SI, one per
// species, positive), temperature through RT > 0 and reference pressure pRef
// (any finite value). The error is a *DataError naming the species at fault.
func NewIdealSolution(mix *Mixture, volumes []float64, RT, pRef float64) (*IdealSolution, error) {
	if err := checkModelParams(RT, pRef, false); err != nil {
		return nil, err
	}
	if err := checkVolumes(mix, volumes); err != nil {
		return nil, err
	}
	return &IdealSolution{mix: mix, vol: append([]float64(nil), volumes...), rt: RT, pRef: pRef}, nil
}

// Len returns the number of species.
func (s *IdealSolution) Len() int { return s.mix.n }

// LevelTo implements LevelInvariant: L = RT ln sum_j a_j with
// a_j = exp((mu_j - V_j (p - P_ref))/RT), dL/dmu_k = x_k(mu, p).
func (s *IdealSolution) LevelTo(dL, mu []float64, p float64) float64 {
	dp := p - s.pRef
	for i, m := range mu {
		dL[i] = (m - s.vol[i]*dp) / s.rt
	}
	return s.rt * softmaxTo(dL, dL)
}

// ConcentrationsTo implements Closure. It does not allocate.
func (s *IdealSolution) ConcentrationsTo(c, dcdmu, dcdp, mu []float64, p float64) error {
	n := s.mix.n
	checkClosureArgs(n, c, dcdmu, dcdp, mu)
	dp := p - s.pRef
	for i, m := range mu {
		c[i] = (m - s.vol[i]*dp) / s.rt
	}
	softmaxTo(c, c) // c holds x now
	var vm float64
	for i, xi := range c {
		vm += xi * s.vol[i]
	}
	for i := range c {
		c[i] /= vm
	}
	if err := checkPositive("ideal solution", s.mix.names, c); err != nil {
		return err
	}
	if dcdmu != nil {
		for i := 0; i < n; i++ {
			f := c[i] / s.rt
			for j := 0; j < n; j++ {
				dcdmu[i*n+j] = -f * c[j] * s.vol[j]
			}
			dcdmu[i*n+i] += f
		}
	}
	if dcdp != nil {
		var vbar float64
		for j, cj := range c {
			vbar += cj * s.vol[j] * s.vol[j]
		}
		for i, ci := range c {
			dcdp[i] = -ci * (s.vol[i] - vbar) / s.rt
		}
	}
	return nil
}

// PotentialsTo implements Closure: mu_i = V_i (p - P_ref) + RT ln x_i. Any
// finite p is allowed.
func (s *IdealSolution) PotentialsTo(mu, x []float64, p float64) error {
	checkPotentialArgs(s.mix.n, mu, x)
	if err := checkComposition(s.mix.names, x, true); err != nil {
		return err
	}
	if math.IsNaN(p) || math.IsInf(p, 0) {
		return &StateError{Model: "ideal solution", Reason: "pressure is not finite"}
	}
	dp := p - s.pRef
	for i, xi := range x {
		mu[i] = s.vol[i]*dp + s.rt*math.Log(xi)
	}
	return nil
}
