// Package physics holds the pointwise physics of mixwell: species data and
// Stefan–Maxwell diffusivities, the Onsager transport matrix of the
// Onsager–Stefan–Maxwell (OSM) equations, thermodynamic closures that give
// concentrations from chemical potentials and pressure, mixture viscosity,
// and the reference scales that make the coupled Stokes–OSM problem
// dimensionless. It is the layer that later brings mesh, fem and solver
// together; the code in this package so far needs none of them.
//
// # Units
//
// Constructors take SI data: molar masses in kg/mol, diffusivities in m^2/s,
// viscosities in Pa s, concentrations in mol/m^3, pressures in Pa, chemical
// potentials and RT in J/mol. The pointwise functions (TransportMatrixTo,
// the closures) are unit-agnostic: they are correct in any consistent set of
// units, in particular in the scaled units of Scales, where RT = 1, c is
// measured in Scales.Concentration and pressure in the thermodynamic unit
// Scales.ThermodynamicPressure = c_ref RT. Mixture.Scaled converts the
// species data to those units.
//
// # The transport matrix
//
// For concentrations c_i > 0 with total c_T, the OSM relations read
//
//	-c_i grad mu_i + w_i grad p = sum_j M_ij v_j,
//	M_ij = -RT c_i c_j / (c_T D_ij) (i != j),   M_ii = -sum_{j != i} M_ij,
//
// (Taylor & Krishna, Multicomponent Mass Transfer, Wiley 1993, ch. 2, written
// in the symmetric Onsager form). M is symmetric, its rows sum to zero and
// v^T M v = sum_{i<j} RT c_i c_j (v_i - v_j)^2 / (c_T D_ij) >= 0, so M is
// positive semidefinite with kernel span{(1,...,1)} when every c_i > 0.
// Summing the rows gives the Gibbs–Duhem relation sum_i c_i grad mu_i =
// grad p, which a consistent closure satisfies.
//
// # Closures and the pressure argument
//
// A Closure gives c_i(mu_1..mu_n, p) and optionally its Jacobian. The
// pressure argument p is always the absolute pressure. The solver's pressure
// unknown is the dynamic part; it calls the closures with p_ref + p, where
// p_ref is the case's reference pressure (formulation note, section 6).
//
// Thermodynamically, at fixed temperature the state of a single phase is
// fixed by the n potentials: the equation of state is a surface p = P(mu) in
// the (n+1)-dimensional space of (mu, p), and the Gibbs–Duhem relation says
// dP = sum_i c_i dmu_i on it. A closure defines c on the whole space; on the
// equation-of-state surface it must reproduce the model, and along any path
// on the surface sum_i c_i dmu_i = dp must hold. Off the surface the closure
// is an extension that the coupled problem does not visit at convergence:
// summing the OSM rows enforces sum_i c_i grad mu_i = grad p, which keeps a
// state that starts on the surface on it. Closure.PotentialsTo maps a
// composition and a pressure to the point of the surface above them, which
// is how boundary data and tests obtain consistent states. Per model:
//
//   - IdealGas: c_i = (P_ref/RT) exp(mu_i/RT) depends on mu only (dc/dp = 0);
//     the surface is p = RT c_T(mu) = P_ref sum_i exp(mu_i/RT), and
//     dP/dmu_i = c_i exactly, so Gibbs–Duhem holds for every mu.
//   - IdealGasAtPressure: x from the potentials, c_T from the pressure
//     (c_i = x_i(mu) p/RT). It equals IdealGas on the surface and keeps c_T
//     at its equation-of-state value even when the discrete potentials drift
//     off the surface (formulation note, section 10 item 6). It is invariant
//     under mu -> mu + s(1,...,1), so the common level of the potentials is
//     not fixed by c.
//   - IdealSolution (incompressible ideal liquid): the consistent law is
//     mu_i = V_i (p - P_ref) + RT ln x_i with sum_i x_i = 1, i.e. the surface
//     sum_i exp((mu_i - V_i (p - P_ref))/RT) = 1. The closure normalises
//     a_i = exp((mu_i - V_i (p - P_ref))/RT) to x_i = a_i / sum_j a_j and sets
//     c_T = 1/sum_j x_j V_j. On the surface sum_i x_i dmu_i = V_m dp + RT
//     sum_i dx_i = V_m dp, which is Gibbs–Duhem. Off the surface,
//     d ln sum_j a_j = V_m (sum_i c_i dmu_i - dp)/RT, so the OSM sum keeps
//     the state on the surface.
//   - MargulesSolution: as IdealSolution with RT ln x_i replaced by
//     RT ln(gamma_i x_i), where ln gamma_i follows from a two-suffix Margules
//     excess Gibbs energy; sum_i x_i d ln gamma_i = 0 makes it consistent.
//
// # Errors
//
// Invalid data return a *DataError that names the species or pair at fault;
// a state at which a closure cannot be evaluated returns a *StateError.
// Wrong slice lengths are programmer errors and panic with a "physics:"
// prefix.
//
// # Memory
//
// A Mixture, the closures and WilkeViscosity are immutable after
// construction and may be shared between goroutines. Functions ending in To
// write into the caller's dst and do not allocate, except where a doc
// comment says otherwise; no function modifies its other arguments.
package physics
