package results

import (
	"math"
	"time"

	"mixwell/physics"
)

// Summary is the content of summary.json. Quantities are in SI units;
// boundary fluxes and production are per metre of depth. Non-finite
// numbers are written as null.
type Summary struct {
	// Program names the program and its version, e.g. "mixwell v0.2.0".
	Program string `json:"program"`
	// Case is the case file as named on the command line; CaseSHA256 the
	// SHA-256 of its bytes (hex), when known.
	Case       string `json:"case"`
	CaseSHA256 string `json:"case_sha256,omitempty"`
	Title      string `json:"title"`

	// Converged reports whether the nonlinear iteration reached its
	// tolerance; when false, every file shows the last iterate.
	Converged  bool   `json:"converged"`
	Iterations int    `json:"iterations"`
	Residual   Number `json:"residual"`  // final relative fixed-point residual
	Tolerance  Number `json:"tolerance"` // the case's solver.tolerance
	Unknowns   int    `json:"unknowns"`  // degrees of freedom of one linear solve

	// Species lists the species names in case order.
	Species []string `json:"species"`
	// BoundaryFlux maps boundary name -> species name -> integrated outward
	// flux through that boundary.
	BoundaryFlux map[string]map[string]Flux `json:"boundary_flux"`
	// NetOutflow is the sum of BoundaryFlux over the boundaries, per
	// species; with no production it vanishes up to SpeciesBalance.
	NetOutflow map[string]Flux `json:"net_outflow"`
	// Production is the mass of each species produced inside, kg/(s m).
	Production map[string]Number `json:"production"`
	// SpeciesBalance is the largest relative defect of boundary outflow
	// against production over the species.
	SpeciesBalance Number `json:"species_balance"`
	// MassAverageResidual is ||v - sum_i J_i/rho|| / ||v|| (L2 norms;
	// absolute, in scaled units, when v = 0).
	MassAverageResidual Number `json:"mass_average_residual"`
	// ElementConservation is the largest element-wise species conservation
	// defect |int_T div J_i - M_i int_T r_i|, relative to the largest flux
	// through an element's boundary (physics.Diagnostics.Conservation).
	ElementConservation Number `json:"element_conservation"`
	// WallPressureApproximation is the largest |p| M_i / (rho R T) on
	// boundaries with composition data: the size of the approximation
	// p_b = 0 there (formulation note, section 7).
	WallPressureApproximation Number `json:"wall_pressure_approximation"`

	Method Method     `json:"method"`
	Mesh   MeshInfo   `json:"mesh"`
	VTU    VTUInfo    `json:"vtu"`
	Scales ScalesInfo `json:"scales"`
	Groups Groups     `json:"groups"`

	TimingSeconds Timing `json:"timing_seconds"`
	// PeakMemoryBytes is the memory high-water mark; PeakMemoryMeasure
	// says how it was measured (see PeakMemory).
	PeakMemoryBytes   uint64 `json:"peak_memory_bytes"`
	PeakMemoryMeasure string `json:"peak_memory_measure"`

	// Units gives the unit of every output array and column, by name.
	Units map[string]string `json:"units"`
	// History is the record of the nonlinear iteration.
	History []Iteration `json:"history"`
	// Files lists the files of this run in the output directory,
	// summary.json included.
	Files []string `json:"files"`
	// Warnings are the case's warnings and those of writing (probe points
	// left out, figures not drawn).
	Warnings []string `json:"warnings"`
}

// Flux is an integrated normal flux per metre of depth.
type Flux struct {
	Molar Number `json:"molar"` // mol/(s m)
	Mass  Number `json:"mass"`  // kg/(s m)
}

// Method describes the discretisation and the nonlinear solver.
type Method struct {
	// Formulation is the choice of species unknowns that produced the
	// results: "total-flux" or "diffusive-flux" (the case's
	// discretisation.formulation).
	Formulation string `json:"formulation"`
	// Nonlinear is the iteration (anderson, picard, newton-krylov) and
	// Update the concentration update of the Picard map.
	Nonlinear     string `json:"nonlinear"`
	Update        string `json:"update"`
	AndersonDepth int    `json:"anderson_depth,omitempty"`
	// Evaluations counts evaluations of the Picard map.
	Evaluations int `json:"evaluations"`
	// Degree is k of the pressure and potential spaces; the velocity has
	// degree k+1.
	Degree         int    `json:"degree"`
	Pair           string `json:"pair"`
	Flux           string `json:"flux"`
	Quadrature     int    `json:"quadrature"` // 0: the solver's default
	Thermodynamics string `json:"thermodynamics"`
	Viscosity      string `json:"viscosity"`
	// SpeciesAugmentation (beta) and Augmentation (gamma) are those of the
	// total-flux formulation; null with the diffusive-flux formulation,
	// which has neither.
	SpeciesAugmentation Number `json:"species_augmentation"`
	Augmentation        Number `json:"augmentation"`
	MoleFractionFloor   Number `json:"mole_fraction_floor"`
}

// MeshInfo describes the mesh of the solve.
type MeshInfo struct {
	Vertices  int    `json:"vertices"`
	Triangles int    `json:"triangles"`
	H         Number `json:"h"` // longest edge, m
}

// VTUInfo describes the sub-triangulation of fields.vtu.
type VTUInfo struct {
	Subdivision int `json:"subdivision"`
	// Vertices is "broken" (every triangle its own vertices: discontinuous
	// fields shown with their jumps) or "merged".
	Vertices  string `json:"vertices"`
	Points    int    `json:"points"`
	Triangles int    `json:"triangles"`
}

// ScalesInfo are the reference values of the scaled problem (SI).
type ScalesInfo struct {
	Length        Number `json:"length"`        // m
	Concentration Number `json:"concentration"` // mol/m^3
	Diffusivity   Number `json:"diffusivity"`   // m^2/s
	RT            Number `json:"rt"`            // J/mol
	Viscosity     Number `json:"viscosity"`     // Pa s
	Density       Number `json:"density"`       // kg/m^3
	Speed         Number `json:"speed"`         // m/s, 0 without imposed flow
	Velocity      Number `json:"velocity"`      // D_ref/L, m/s
	Pressure      Number `json:"pressure"`      // eta_ref v_ref/L, Pa
}

// Groups are the dimensionless groups.
type Groups struct {
	S       Number `json:"S"`       // eta_ref D_ref / (L^2 c_ref RT)
	Peclet  Number `json:"peclet"`  // U L / D_ref
	Schmidt Number `json:"schmidt"` // eta_ref / (rho_ref D_ref)
}

// Timing is the wall time of each stage in seconds.
type Timing struct {
	Load    Number `json:"load"`
	Prepare Number `json:"prepare"`
	Solve   Number `json:"solve"`
	// Write is the time to write every file but summary.json.
	Write Number `json:"write"`
	Total Number `json:"total"`
}

// Iteration is one row of the iteration history.
type Iteration struct {
	Iteration      int    `json:"iteration"`
	Residual       Number `json:"residual"`
	Change         Number `json:"change"`
	MassAverage    Number `json:"mass_average"`
	Clipped        int    `json:"clipped"`
	ElapsedSeconds Number `json:"elapsed_seconds"`
}

// IterationOf converts an iteration record.
func IterationOf(r physics.IterationRecord) Iteration {
	return Iteration{
		Iteration:      r.Iteration,
		Residual:       Number(r.Residual),
		Change:         Number(r.Change),
		MassAverage:    Number(r.MassAverage),
		Clipped:        r.Clipped,
		ElapsedSeconds: seconds(r.Elapsed),
	}
}

func seconds(d time.Duration) Number { return Number(d.Seconds()) }

func scalesInfo(s physics.Scales) (ScalesInfo, Groups) {
	return ScalesInfo{
			Length:        Number(s.Length),
			Concentration: Number(s.Concentration),
			Diffusivity:   Number(s.Diffusivity),
			RT:            Number(s.RT),
			Viscosity:     Number(s.Viscosity),
			Density:       Number(s.Density),
			Speed:         Number(s.Speed),
			Velocity:      Number(s.Velocity()),
			Pressure:      Number(s.Pressure()),
		}, Groups{
			S:       Number(s.S()),
			Peclet:  Number(s.Peclet()),
			Schmidt: Number(s.Schmidt()),
		}
}

// finite reports whether x is neither NaN nor infinite.
func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }
