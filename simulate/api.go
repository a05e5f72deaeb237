// Package simulate turns a case (package casefile) into a solved problem:
// it builds the mesh in SI units, chooses the scales, poses the scaled
// Stokes–Onsager–Stefan–Maxwell problem (package physics), runs the
// nonlinear solve of the formulation the case chooses (total or diffusive
// fluxes) and gives the results back in SI units, in the total-flux layout
// whichever formulation solved: fields at any point of any triangle,
// boundary fluxes per named boundary and species, balances and the
// iteration history. Writing files is left to callers.
package simulate

import (
	"time"

	"mixwell/casefile"
	"mixwell/mesh"
	"mixwell/physics"
)

// Setup is a case ready to solve.
type Setup struct {
	// Case is the case read from file.
	Case *casefile.Case
	// Mesh is the triangulation in metres; its boundary tags carry the
	// case's boundary names (Mesh.TagNames).
	Mesh *mesh.Mesh
	// Scales are the reference values of the scaled problem.
	Scales physics.Scales
	// Problem is the scaled problem and Discretisation its discretisation.
	// Outcomes are always given on Discretisation (the total-flux layout),
	// whichever formulation solved the case.
	Problem        *physics.Problem
	Discretisation *physics.Discretisation
	// Formulation is the case's discretisation.formulation. With
	// casefile.DiffusiveFlux, DiffusiveFlux is the discretisation that
	// Solve iterates, and its solution is converted to Discretisation's
	// layout (physics.DiffusiveFluxSolution.TotalFlux); it is nil
	// otherwise.
	Formulation   casefile.Formulation
	DiffusiveFlux *physics.DiffusiveFlux
	// Closure is the scaled thermodynamic closure.
	Closure physics.Closure

	mix      *physics.Mixture // SI
	pressure float64          // reference pressure, scaled thermodynamic units
	// relativeComposition: compositions with impermeable species are
	// imposed relative to the potentials' level
	// (physics.SpeciesCondition.Relative).
	relativeComposition bool
	initial             []float64 // initial potentials (scaled), uniform
	tagOf               map[string]int
	locator             *locator
}

// Flux is the integrated outward flux of one species through one boundary,
// per metre of depth.
type Flux struct {
	Molar float64 // mol/(s m)
	Mass  float64 // kg/(s m)
}

// Outcome is the result of Setup.Solve, in SI units.
type Outcome struct {
	Setup *Setup
	// Solution is the scaled discrete solution.
	Solution *physics.Solution
	// Report is the nonlinear iteration record.
	Report     *physics.NonlinearReport
	Converged  bool
	Iterations int
	// Residual is the final relative fixed-point residual.
	Residual float64
	// Diagnostics are in scaled units (relative quantities are unit-free).
	Diagnostics physics.Diagnostics
	// BoundaryFlux maps a boundary name to the flux of each species
	// (mixture order), outward positive.
	BoundaryFlux map[string][]Flux
	// Production is the mass produced inside per species, kg/(s m).
	Production []float64
	// SpeciesBalance is the largest relative species balance defect.
	SpeciesBalance float64
	// MassAverage is ||v - sum J/rho|| relative to the largest of ||v|| and ||J_i/rho|| (physics.Discretisation.MassAverageResidual).
	MassAverage float64
	// WallPressure is the largest |p| M_i / (rho R T) on boundaries with
	// composition data (formulation note, section 7): the size of the
	// approximation p_b = 0 there.
	WallPressure float64
	// Elapsed is the wall time of the solve.
	Elapsed time.Duration
	// Warnings are findings about the solution that the case data could
	// not show (for example inflow through an outflow boundary).
	Warnings []string
}

// Point holds every field at one point, in SI units: position (m),
// velocity (m/s), dynamic pressure (Pa), and per species (mixture order)
// concentration (mol/m^3), chemical potential (J/mol, relative to the pure
// species at the reference pressure), mole and mass fraction, mass flux
// J_i (kg/(m^2 s)), molar flux N_i (mol/(m^2 s)) and diffusive mass flux
// J_i - rho_i v (kg/(m^2 s)); and the density (kg/m^3).
type Point struct {
	X            [2]float64
	V            [2]float64
	P            float64
	Rho          float64
	C, Mu        []float64
	MoleFraction []float64
	MassFraction []float64
	J, N         [][2]float64
	Diffusive    [][2]float64
}
