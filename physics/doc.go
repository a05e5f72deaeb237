// Package physics holds the pointwise physics of mixwell: species data and
// Stefan–Maxwell diffusivities, the Onsager transport matrix of the
// Onsager–Stefan–Maxwell (OSM) equations, thermodynamic closures that give
// concentrations from chemical potentials and pressure, mixture viscosity,
// and the reference scales that make the coupled Stokes–OSM problem
// dimensionless; and the coupled problem itself: the augmented mixed
// discretisation of steady Stokes flow with Onsager–Stefan–Maxwell
// diffusion (Problem, Discretisation), its Picard map and nonlinear solve,
// and the diagnostics of a solution. It is the layer that brings mesh, fem
// and solver together.
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
// # The coupled discretisation
//
// A Problem is posed in the scaled units of Scales (RT = 1; Mixture.Scaled
// gives the scaled species data; the mesh is in units of Scales.Length).
// NewDiscretisation builds the spaces of formulation note section 8 —
// continuous P_{k+1} velocity, continuous (Taylor–Hood) or discontinuous
// (Scott–Vogelius) P_k pressure, BDM_{k+1} or RT_k mass fluxes J_i and
// discontinuous P_k potentials mu_i — and lays the unknowns out as vx, vy,
// p, J_1..J_n, mu_1..mu_n (Discretisation.Layout). The sparsity pattern,
// the essential data and the element tables are built once; every
// assembly refills the same pattern, so the LU factorisation keeps its
// symbolic analysis from one nonlinear iteration to the next.
//
// The assembled rows are those of the augmented weak form of section 3,
// with two changes of scale and one addition:
//
//   - The species rows are in the units of the transport term; there the
//     pressure coupling and the symmetric augmentation carry the group S.
//   - The momentum and mass-constraint rows are divided by S, so every
//     block is of unit size except the physical O(S) pressure coupling of
//     the species rows. (Left symmetric, the system spans 1/S ~ 1e13; the
//     threshold pivots of the sparse LU then failed by the thousand and the
//     factors grew ten-fold at S = 1e-7.)
//   - Problem.SpeciesAugmentation beta adds the consistent one-sided term
//     beta int (sum_j J_j/rho - v) . K_i/rho to every species row (section
//     10 item 2). It gives the species rows an O(1) control of the total
//     flux, which the symmetric augmentation gives only at size gamma S.
//     Measured on the frozen manufactured problem at S = 1e-7 (k = 1, three
//     species, h = 1/16): without it the BDM flux converged at rate 2.0
//     instead of 3 and ||v - sum J/rho|| / ||v|| was 6.4e-3; with beta = 1
//     the rate was 3.0 and the defect 1.5e-5. It also makes the Picard map
//     contractive (see SolveNonlinear). The system is then non-symmetric,
//     which the sparse LU handles. Flow-through cases take the smaller
//     FlowThroughSpeciesAugmentation, because there its residual
//     accumulates along the flow (docs/augmentation.md).
//
// Boundary conditions are given per boundary tag (BoundaryCondition):
// velocity given, slip (axis-parallel segments) or traction; per species a
// normal mass flux (essential) or a potential (natural). A constant
// potential of a species with flux data everywhere, and a constant pressure
// when moreover the velocity is essential everywhere, are null modes: one
// unknown is fixed and the field returned with zero mean. Flux data for a
// species with no potential boundary must balance its production; they are
// checked before solving.
//
// SolveNonlinear iterates the Picard map of section 4: freeze the
// concentrations, solve, post-process each potential element by element
// into P_{k+1} (mean kept, gradient fitted to the OSM row), L2-project it
// onto the continuous velocity space and evaluate the closure there (or
// project the concentrations, as an option). The fixed point is
// accelerated by Anderson mixing (default), or iterated plainly, or solved
// by Newton–Krylov (solver.SolveFixedPoint).
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
