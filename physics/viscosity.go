package physics

import (
	"fmt"
	"math"
)

// ViscosityModel gives the shear viscosity of a mixture (Pa s in SI) at
// fixed temperature as a function of the mole fractions.
type ViscosityModel interface {
	// Viscosity returns the shear viscosity at mole fractions x.
	Viscosity(x []float64) float64
}

var (
	_ ViscosityModel = ConstantViscosity(0)
	_ ViscosityModel = (*WilkeViscosity)(nil)
)

// ConstantViscosity is a viscosity that does not depend on composition. Its
// value should be positive; ChooseScales rejects one that is not.
type ConstantViscosity float64

// Viscosity returns v; x is not used.
func (v ConstantViscosity) Viscosity(x []float64) float64 { return float64(v) }

// WilkeViscosity is Wilke's mixing rule for the viscosity of a dilute gas
// mixture from the pure-species viscosities eta_i and molar masses M_i
// (C. R. Wilke, J. Chem. Phys. 18, 517 (1950); Bird, Stewart & Lightfoot,
// Transport Phenomena, 2nd ed., 2002, eqs. 1.4-15 and 1.4-16):
//
//	eta = sum_i x_i eta_i / sum_j x_j Phi_ij,
//	Phi_ij = (1/sqrt 8) (1 + M_i/M_j)^(-1/2) [1 + (eta_i/eta_j)^(1/2) (M_j/M_i)^(1/4)]^2.
//
// Phi_ii = 1, so a pure species gets its own viscosity. The pure
// viscosities belong to the (fixed) temperature of the case.
type WilkeViscosity struct {
	n    int
	pure []float64
	phi  []float64 // Phi_ij, row-major n*n
}

// NewWilkeViscosity returns Wilke's rule for the species of mix with the
// pure-species viscosities pure (Pa s in SI, one per species, positive and
// finite). The error is a *DataError naming the species at fault.
func NewWilkeViscosity(mix *Mixture, pure []float64) (*WilkeViscosity, error) {
	n := mix.n
	if len(pure) != n {
		return nil, &DataError{Index: -1, Value: float64(len(pure)),
			Reason: fmt.Sprintf("%d pure-species viscosities given for %d species", len(pure), n)}
	}
	for i, v := range pure {
		if !(v > 0) || math.IsInf(v, 0) {
			return nil, &DataError{Species: []string{mix.names[i]}, Index: i, Value: v,
				Reason: fmt.Sprintf("pure-species viscosity %g is not positive and finite", v)}
		}
	}
	w := &WilkeViscosity{n: n, pure: append([]float64(nil), pure...), phi: make([]float64, n*n)}
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			mi, mj := mix.mass[i], mix.mass[j]
			q := 1 + math.Sqrt(pure[i]/pure[j])*math.Sqrt(math.Sqrt(mj/mi))
			w.phi[i*n+j] = q * q / (math.Sqrt(8) * math.Sqrt(1+mi/mj))
		}
	}
	return w, nil
}

// Viscosity returns Wilke's mixture viscosity at mole fractions x. It does
// not allocate.
func (w *WilkeViscosity) Viscosity(x []float64) float64 {
	if len(x) != w.n {
		panic(fmt.Sprintf("physics: WilkeViscosity: len(x) = %d, want %d", len(x), w.n))
	}
	var eta float64
	for i := 0; i < w.n; i++ {
		if x[i] == 0 {
			continue
		}
		var den float64
		for j := 0; j < w.n; j++ {
			den += x[j] * w.phi[i*w.n+j]
		}
		eta += x[i] * w.pure[i] / den
	}
	return eta
}
