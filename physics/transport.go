package physics

import (
	"fmt"
	"math"
)

// TransportMatrixTo writes the Onsager transport matrix of the
// Onsager–Stefan–Maxwell relations at concentrations c into dst (n*n,
// row-major):
//
//	M_ij = -RT c_i c_j / (c_T D_ij)   (i != j),   M_ii = -sum_{j != i} M_ij,
//
// with c_T = sum_i c_i (formulation note, section 2; the Stefan–Maxwell
// relations of Taylor & Krishna, Multicomponent Mass Transfer, Wiley 1993,
// ch. 2, multiplied by c_T RT and written for species velocities). dst is
// exactly symmetric. The concentrations must be non-negative with a positive
// sum; this is not checked (see CheckConcentrations), because the function is
// called at every quadrature point. It does not allocate.
func (m *Mixture) TransportMatrixTo(dst, c []float64, RT float64) {
	n := m.n
	if len(dst) != n*n {
		panic(fmt.Sprintf("physics: TransportMatrixTo: dst has length %d, want %d", len(dst), n*n))
	}
	m.checkLen("TransportMatrixTo: c", len(c))
	var cT float64
	for _, ci := range c {
		cT += ci
	}
	f := RT / cT
	for i := 0; i < n; i++ {
		dst[i*n+i] = 0
	}
	for i := 0; i < n; i++ {
		fi := f * c[i]
		for j := i + 1; j < n; j++ {
			v := -fi * c[j] * m.invD[i*n+j]
			dst[i*n+j] = v
			dst[j*n+i] = v
			dst[i*n+i] -= v
			dst[j*n+j] -= v
		}
	}
}

// SpeciesVelocitiesTo solves the Onsager–Stefan–Maxwell relations for the
// species velocities at one point and along one coordinate direction:
// given concentrations c (all positive), driving forces
//
//	d_i = -c_i dmu_i/dx + w_i dp/dx
//
// and the mass-average velocity v, it writes into dst the velocities v_i with
//
//	sum_j M_ij v_j = d_i - defect   (i = 1..n),   sum_i rho_i v_i = rho v,
//
// where M is the transport matrix of TransportMatrixTo. Because M is singular
// with kernel span{(1,...,1)}, the relations fix the velocities only up to a
// common velocity, and the mass-average constraint closes them; they are
// solvable only if sum_i d_i = 0, which is the Gibbs–Duhem relation. The
// returned defect is sum_i d_i / n, the part of the driving forces that
// violates Gibbs–Duhem and that the solve removes; it is zero to rounding for
// consistent forces. Molar fluxes are N_i = c_i v_i, mass fluxes
// J_i = rho_i v_i, and v = 0 gives velocities relative to the mass average.
//
// The bordered system [M s1; s w^T 0] with s = max_i M_ii is solved by LU
// with partial pivoting. It allocates its workspace; it is meant for 1D
// reference solutions and tests. The error is a *DataError naming a species
// whose concentration is not positive, or a *StateError if the system is
// singular.
func (m *Mixture) SpeciesVelocitiesTo(dst, c, d []float64, RT, v float64) (defect float64, err error) {
	n := m.n
	m.checkLen("SpeciesVelocitiesTo: dst", len(dst))
	m.checkLen("SpeciesVelocitiesTo: c", len(c))
	m.checkLen("SpeciesVelocitiesTo: d", len(d))
	for i, ci := range c {
		if !(ci > 0) || math.IsInf(ci, 0) {
			return 0, &DataError{Species: []string{m.names[i]}, Index: i, Value: ci,
				Reason: fmt.Sprintf("concentration %g must be positive and finite for the species velocities to be defined", ci)}
		}
	}
	w := make([]float64, n)
	m.MassFractionsTo(w, c)
	mt := make([]float64, n*n)
	m.TransportMatrixTo(mt, c, RT)
	var s float64
	for i := 0; i < n; i++ {
		s = math.Max(s, mt[i*n+i])
	}
	// Bordered matrix, (n+1)×(n+1).
	k := n + 1
	a := make([]float64, k*k)
	b := make([]float64, k)
	for i := 0; i < n; i++ {
		copy(a[i*k:i*k+n], mt[i*n:i*n+n])
		a[i*k+n] = s
		a[n*k+i] = s * w[i]
		b[i] = d[i]
	}
	b[n] = s * v
	piv := make([]int, k)
	if !luFactor(a, k, piv) {
		return 0, &StateError{Model: "species velocities", Reason: "bordered Stefan–Maxwell system is singular"}
	}
	luSolve(a, k, piv, b)
	copy(dst, b[:n])
	return s * b[n], nil
}
