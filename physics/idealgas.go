package physics

import (
	"fmt"
	"math"
)

// IdealGas is the ideal-gas closure
//
//	c_i = (P_ref/RT) exp(mu_i/RT),
//
// with the chemical potential of each species measured from the pure species
// at (P_ref, T), so that mu_i = RT ln(x_i P/P_ref) (the ideal-gas chemical
// potential of any thermodynamics text, e.g. Prausnitz, Lichtenthaler & de
// Azevedo, Molecular Thermodynamics of Fluid-Phase Equilibria, 3rd ed., 1999).
// The concentrations depend on the potentials only: dc/dp = 0, and the
// pressure argument is ignored. The thermodynamic pressure is
// P(mu) = RT c_T(mu) (see Pressure); Gibbs–Duhem, dP = sum_i c_i dmu_i,
// holds for every mu because dP/dmu_i = c_i exactly.
type IdealGas struct {
	mix  *Mixture
	rt   float64
	pRef float64
}

// NewIdealGas returns the ideal-gas closure for the species of mix at
// temperature T given through RT (J/mol in SI) and reference pressure pRef
// (Pa in SI), both positive and finite; the error is a *DataError.
func NewIdealGas(mix *Mixture, RT, pRef float64) (*IdealGas, error) {
	if err := checkModelParams(RT, pRef, true); err != nil {
		return nil, err
	}
	return &IdealGas{mix: mix, rt: RT, pRef: pRef}, nil
}

// Len returns the number of species.
func (g *IdealGas) Len() int { return g.mix.n }

// ConcentrationsTo implements Closure: c_i = (P_ref/RT) exp(mu_i/RT),
// dc_i/dmu_j = delta_ij c_i/RT, dc/dp = 0. p is not used. It does not
// allocate.
func (g *IdealGas) ConcentrationsTo(c, dcdmu, dcdp, mu []float64, p float64) error {
	n := g.mix.n
	checkClosureArgs(n, c, dcdmu, dcdp, mu)
	k := g.pRef / g.rt
	for i, m := range mu {
		c[i] = k * math.Exp(m/g.rt)
	}
	if err := checkPositive("ideal gas", g.mix.names, c); err != nil {
		return err
	}
	if dcdmu != nil {
		clear(dcdmu)
		for i := 0; i < n; i++ {
			dcdmu[i*n+i] = c[i] / g.rt
		}
	}
	if dcdp != nil {
		clear(dcdp)
	}
	return nil
}

// PotentialsTo implements Closure: mu_i = RT ln(x_i p / P_ref). p must be
// positive.
func (g *IdealGas) PotentialsTo(mu, x []float64, p float64) error {
	return idealGasPotentials(g.mix, g.rt, g.pRef, "ideal gas", mu, x, p)
}

// Pressure returns the thermodynamic pressure P(mu) = RT c_T(mu) =
// P_ref sum_i exp(mu_i/RT) at which the potentials mu are consistent.
func (g *IdealGas) Pressure(mu []float64) float64 {
	g.mix.checkLen("Pressure: mu", len(mu))
	var s float64
	for _, m := range mu {
		s += math.Exp(m / g.rt)
	}
	return g.pRef * s
}

func idealGasPotentials(mix *Mixture, rt, pRef float64, model string, mu, x []float64, p float64) error {
	checkPotentialArgs(mix.n, mu, x)
	if err := checkComposition(mix.names, x, true); err != nil {
		return err
	}
	if !(p > 0) || math.IsInf(p, 0) {
		return &StateError{Model: model, Reason: fmt.Sprintf("pressure %g is not positive and finite", p)}
	}
	lp := math.Log(p / pRef)
	for i, xi := range x {
		mu[i] = rt * (math.Log(xi) + lp)
	}
	return nil
}

// IdealGasAtPressure is the ideal-gas closure that takes the composition from
// the potentials and the total concentration from the pressure argument:
//
//	x_i = a_i / sum_j a_j,   a_i = exp(mu_i/RT),   c_i = x_i p/RT.
//
// On the equation-of-state surface p = P_ref sum_j a_j it equals IdealGas;
// off it, it keeps c_T = p/RT at its equation-of-state value, which the
// formulation note (section 10, item 6) recommends for building the
// coefficients of the Picard iteration. The concentrations do not change
// when the same constant is added to every potential. Gibbs–Duhem:
// sum_i c_i dmu_i = p d ln(sum_j a_j), which equals dp along the surface.
type IdealGasAtPressure struct {
	mix  *Mixture
	rt   float64
	pRef float64
}

// NewIdealGasAtPressure returns the closure for the species of mix at
// temperature T given through RT and reference pressure pRef (the pressure
// of the pure-species reference states of the potentials), both positive and
// finite; the error is a *DataError.
func NewIdealGasAtPressure(mix *Mixture, RT, pRef float64) (*IdealGasAtPressure, error) {
	if err := checkModelParams(RT, pRef, true); err != nil {
		return nil, err
	}
	return &IdealGasAtPressure{mix: mix, rt: RT, pRef: pRef}, nil
}

// Len returns the number of species.
func (g *IdealGasAtPressure) Len() int { return g.mix.n }

// ConcentrationsTo implements Closure: c_i = x_i(mu) p/RT,
// dc_i/dmu_j = (p/RT^2) x_i (delta_ij - x_j), dc_i/dp = x_i/RT. p must be
// positive. It does not allocate.
func (g *IdealGasAtPressure) ConcentrationsTo(c, dcdmu, dcdp, mu []float64, p float64) error {
	n := g.mix.n
	checkClosureArgs(n, c, dcdmu, dcdp, mu)
	if !(p > 0) || math.IsInf(p, 0) {
		return &StateError{Model: "ideal gas at pressure", Reason: fmt.Sprintf("pressure %g is not positive and finite", p)}
	}
	for i, m := range mu {
		c[i] = m / g.rt
	}
	softmaxTo(c, c) // c holds x now
	cT := p / g.rt
	if dcdmu != nil {
		f := cT / g.rt
		for i := 0; i < n; i++ {
			for j := 0; j < n; j++ {
				dcdmu[i*n+j] = -f * c[i] * c[j]
			}
			dcdmu[i*n+i] += f * c[i]
		}
	}
	if dcdp != nil {
		for i := 0; i < n; i++ {
			dcdp[i] = c[i] / g.rt
		}
	}
	for i := range c {
		c[i] *= cT
	}
	return checkPositive("ideal gas at pressure", g.mix.names, c)
}

// LevelTo implements LevelInvariant: L = RT (ln sum_j exp(mu_j/RT) -
// ln(p/P_ref)), dL/dmu_k = x_k(mu).
func (g *IdealGasAtPressure) LevelTo(dL, mu []float64, p float64) float64 {
	for i, m := range mu {
		dL[i] = m / g.rt
	}
	lse := softmaxTo(dL, dL)
	return g.rt * (lse - math.Log(p/g.pRef))
}

// PotentialsTo implements Closure: mu_i = RT ln(x_i p / P_ref). p must be
// positive.
func (g *IdealGasAtPressure) PotentialsTo(mu, x []float64, p float64) error {
	return idealGasPotentials(g.mix, g.rt, g.pRef, "ideal gas at pressure", mu, x, p)
}
