package physics

import (
	"fmt"
	"math"
)

// Closure is a thermodynamic model at fixed temperature: it gives the molar
// concentrations as functions of the chemical potentials and the absolute
// pressure, c_i = c_i(mu_1..mu_n, p) (formulation note, section 5). See the
// package documentation for how the dynamic pressure enters and for what
// Gibbs–Duhem means for each model.
type Closure interface {
	// Len returns the number of species n.
	Len() int

	// ConcentrationsTo writes c_i(mu, p) into c (length n) and, when the
	// slices are not nil, the Jacobian dc_i/dmu_j into dcdmu (n*n,
	// row-major, row i) and dc_i/dp into dcdp (length n). p is the
	// absolute pressure. It returns a *StateError when the state cannot
	// be evaluated.
	ConcentrationsTo(c, dcdmu, dcdp, mu []float64, p float64) error

	// PotentialsTo writes into mu the chemical potentials of the
	// thermodynamically consistent state with mole fractions x (all
	// positive, summing to one) and absolute pressure p: the point of the
	// equation-of-state surface above (x, p). It returns a *DataError
	// naming the species at fault for bad mole fractions, or a
	// *StateError for a pressure outside the model's range.
	PotentialsTo(mu, x []float64, p float64) error
}

// LevelInvariant is implemented by closures whose concentrations do not
// change when the same constant is added to every potential (those that
// normalise the mole fractions implied by the potentials). Their potentials
// have a level that the concentrations cannot see, and a composition
// boundary that gives the potentials of only some species must impose them
// relative to that level (SpeciesCondition.Relative).
type LevelInvariant interface {
	// LevelTo returns the level L(mu, p) of the potentials mu at absolute
	// pressure p: L(mu + s, p) = L(mu, p) + s for every constant s, and
	// L = 0 at the potentials PotentialsTo gives for (x, p). It writes
	// dL/dmu_k into dL (length n), which sums to one. It does not allocate.
	LevelTo(dL, mu []float64, p float64) float64
}

var (
	_ LevelInvariant = (*IdealGasAtPressure)(nil)
	_ LevelInvariant = (*IdealSolution)(nil)
	_ LevelInvariant = (*MargulesSolution)(nil)
)

var (
	_ Closure = (*IdealGas)(nil)
	_ Closure = (*IdealGasAtPressure)(nil)
	_ Closure = (*IdealSolution)(nil)
	_ Closure = (*MargulesSolution)(nil)
)

// checkClosureArgs panics unless the slices have the lengths a closure of n
// species requires; dcdmu and dcdp may be nil.
func checkClosureArgs(n int, c, dcdmu, dcdp, mu []float64) {
	if len(c) != n || len(mu) != n {
		panic(fmt.Sprintf("physics: ConcentrationsTo: len(c) = %d, len(mu) = %d, want %d", len(c), len(mu), n))
	}
	if dcdmu != nil && len(dcdmu) != n*n {
		panic(fmt.Sprintf("physics: ConcentrationsTo: len(dcdmu) = %d, want %d", len(dcdmu), n*n))
	}
	if dcdp != nil && len(dcdp) != n {
		panic(fmt.Sprintf("physics: ConcentrationsTo: len(dcdp) = %d, want %d", len(dcdp), n))
	}
}

// checkPotentialArgs panics unless mu and x have length n.
func checkPotentialArgs(n int, mu, x []float64) {
	if len(mu) != n || len(x) != n {
		panic(fmt.Sprintf("physics: PotentialsTo: len(mu) = %d, len(x) = %d, want %d", len(mu), len(x), n))
	}
}

// checkModelParams validates RT and a reference pressure.
func checkModelParams(RT, pRef float64, pRefPositive bool) error {
	if !(RT > 0) || math.IsInf(RT, 0) {
		return &DataError{Index: -1, Value: RT, Reason: fmt.Sprintf("RT = %g is not positive and finite", RT)}
	}
	if math.IsNaN(pRef) || math.IsInf(pRef, 0) || (pRefPositive && pRef <= 0) {
		return &DataError{Index: -1, Value: pRef, Reason: fmt.Sprintf("reference pressure %g is not positive and finite", pRef)}
	}
	return nil
}

// checkVolumes validates partial molar volumes, one per species.
func checkVolumes(mix *Mixture, volumes []float64) error {
	if len(volumes) != mix.n {
		return &DataError{Index: -1, Value: float64(len(volumes)),
			Reason: fmt.Sprintf("%d partial molar volumes given for %d species", len(volumes), mix.n)}
	}
	for i, v := range volumes {
		if !(v > 0) || math.IsInf(v, 0) {
			return &DataError{Species: []string{mix.names[i]}, Index: i, Value: v,
				Reason: fmt.Sprintf("partial molar volume %g is not positive and finite", v)}
		}
	}
	return nil
}

// softmaxTo writes x_i = exp(b_i) / sum_j exp(b_j) into x, shifting by the
// largest b_i so that nothing overflows, and returns log sum_j exp(b_j). x
// may be b.
func softmaxTo(x, b []float64) (lse float64) {
	bmax := math.Inf(-1)
	for _, v := range b {
		bmax = math.Max(bmax, v)
	}
	var s float64
	for i, v := range b {
		x[i] = math.Exp(v - bmax)
		s += x[i]
	}
	for i := range x {
		x[i] /= s
	}
	return bmax + math.Log(s)
}

// checkPositive returns a *StateError naming the first species whose value
// in c is not positive and finite (after an overflow or underflow).
func checkPositive(model string, names []string, c []float64) error {
	for i, ci := range c {
		if !(ci > 0) || math.IsInf(ci, 0) {
			return &StateError{Model: model, Species: names[i],
				Reason: fmt.Sprintf("concentration %g is not positive and finite: potential outside the representable range", ci)}
		}
	}
	return nil
}
