package physics

import (
	"fmt"
	"math"
	"sort"
	"strings"

	"mixwell/fem"
	"mixwell/mesh"
)

// FluxFamily selects the H(div) element of the species mass fluxes.
type FluxFamily int

const (
	// BDMFlux is Brezzi–Douglas–Marini BDM_{k+1} (the default): the flux
	// converges one order faster in L2 than with RT.
	BDMFlux FluxFamily = iota
	// RTFlux is Raviart–Thomas of index k (divergence in P_k).
	RTFlux
)

// String returns "bdm" or "rt".
func (f FluxFamily) String() string {
	if f == RTFlux {
		return "rt"
	}
	return "bdm"
}

// PressureFamily selects the velocity–pressure pair.
type PressureFamily int

const (
	// TaylorHood is continuous P_{k+1} velocity with continuous P_k
	// pressure (the default).
	TaylorHood PressureFamily = iota
	// ScottVogelius is continuous P_{k+1} velocity with discontinuous P_k
	// pressure; it is inf-sup stable on barycentrically refined meshes
	// (mesh.BarycentricSplit) and makes the discrete velocity's divergence
	// exactly that of the frozen mass-average constraint.
	ScottVogelius
)

// String returns "taylor-hood" or "scott-vogelius".
func (p PressureFamily) String() string {
	if p == ScottVogelius {
		return "scott-vogelius"
	}
	return "taylor-hood"
}

// VelocityKind is the kind of a velocity boundary condition (formulation
// note, section 7).
type VelocityKind int

const (
	// VelocityGiven prescribes the velocity (a no-slip wall, a moving wall
	// or an inflow profile): essential.
	VelocityGiven VelocityKind = iota
	// VelocitySlip prescribes v.n = 0 with zero tangential traction
	// (symmetry line or slip wall). Supported on segments parallel to a
	// coordinate axis.
	VelocitySlip
	// VelocityTraction prescribes the traction (tau(v) - p I) n: an open
	// boundary. Natural.
	VelocityTraction
	// VelocityStefan is a wall that exchanges mass (an evaporating,
	// dissolving or absorbing surface): tangential velocity 0, normal
	// velocity sum_i J_i.n / rho (formulation note, section 10 item 3).
	// The normal velocity is part of the nonlinear iteration's state; a
	// frozen solve keeps it at 0. Supported on segments parallel to a
	// coordinate axis.
	VelocityStefan
)

// String names the kind.
func (k VelocityKind) String() string {
	switch k {
	case VelocityGiven:
		return "given velocity"
	case VelocitySlip:
		return "slip"
	case VelocityTraction:
		return "traction"
	case VelocityStefan:
		return "Stefan wall"
	}
	return fmt.Sprintf("VelocityKind(%d)", int(k))
}

// SpeciesKind is the kind of a species boundary condition (formulation
// note, section 7).
type SpeciesKind int

const (
	// SpeciesFlux prescribes the outward normal mass flux J_i.n (zero for
	// an impermeable boundary; rho_i v.n for convective inflow):
	// essential, on the normal moments of the flux space.
	SpeciesFlux SpeciesKind = iota
	// SpeciesPotential prescribes the chemical potential mu_i (from a
	// composition through the closure): natural.
	SpeciesPotential
	// SpeciesOutflow lets the species leave with the composition of the
	// adjacent element (formulation note, section 10 item 4): zero
	// diffusive flux, linearised about the previous iterate, and the
	// outgoing mixture on the equation of state at the outlet pressure.
	// Every species of a tag must have it, on a traction (open) boundary,
	// and only the nonlinear iteration can solve it.
	SpeciesOutflow
)

// String names the kind.
func (k SpeciesKind) String() string {
	switch k {
	case SpeciesFlux:
		return "flux"
	case SpeciesPotential:
		return "potential"
	case SpeciesOutflow:
		return "outflow"
	}
	return fmt.Sprintf("SpeciesKind(%d)", int(k))
}

// VelocityCondition is the velocity condition of one boundary tag.
type VelocityCondition struct {
	Kind VelocityKind
	// Velocity is the prescribed velocity for VelocityGiven; nil means
	// zero (a no-slip wall). For VelocityStefan the diffusive-flux
	// formulation takes its tangential component as the wall's tangential
	// velocity (nil: zero), which manufactured solutions need; the
	// total-flux formulation ignores it there.
	Velocity func(x [2]float64) [2]float64
	// Traction is the prescribed traction (tau(v) - p I) n for
	// VelocityTraction, given the outward unit normal n; nil means zero.
	// An open boundary at dynamic pressure p_b has traction -p_b n.
	Traction func(x, n [2]float64) [2]float64
	// NoTangential, with VelocityTraction, also fixes the tangential
	// velocity to zero, so that only the normal traction is natural: the
	// outlet condition of formulation note section 10 item 4c, under which
	// developed flow leaves without flaring. Axis-parallel segments only.
	NoTangential bool
}

// SpeciesCondition is the condition on one species at one boundary tag.
type SpeciesCondition struct {
	Kind SpeciesKind
	// Flux is the outward normal mass flux J_i.n for SpeciesFlux, given the
	// outward unit normal n; nil means zero (impermeable).
	Flux func(x, n [2]float64) float64
	// Potential is the chemical potential mu_i for SpeciesPotential.
	Potential func(x [2]float64) float64
	// Relative, for SpeciesPotential under a LevelInvariant closure in
	// the nonlinear iteration, imposes Potential plus the level L of the
	// potentials at the boundary, linearised about the previous iterate:
	// mu_i,b = Potential + L(mu^) + sum_k dL_k (mu_k - mu^_k). A
	// composition that gives only some species then fixes their mole
	// fractions, not their potentials' absolute values, which a level
	// invariant closure cannot see (docs/outflow.md). Some other boundary
	// (full composition, or outflow) must fix the level.
	Relative bool
}

// BoundaryCondition holds every condition of one boundary tag.
type BoundaryCondition struct {
	Velocity VelocityCondition
	// Species holds one condition per species, in mixture order.
	Species []SpeciesCondition
	// Pressure is the dynamic pressure p_b that enters the natural
	// condition of the species with potential data on this tag (the
	// boundary term (p_b/rho - mu_b/M_i) K_i.n); nil means 0, the
	// reference pressure (formulation note, section 7).
	Pressure func(x [2]float64) float64
}

// Source holds volume sources, used by manufactured solutions (a physical
// case has none beyond gravity and reactions).
type Source struct {
	// Force is a momentum source per unit volume added to rho g.
	Force func(x [2]float64) [2]float64
	// Production writes the molar production rates r_i into dst.
	Production func(dst []float64, x [2]float64)
	// Residual writes the Onsager–Stefan–Maxwell source g_i of each species
	// into dst (formulation note, section 3).
	Residual func(dst [][2]float64, x [2]float64)
}

// Problem is the dimensionless steady Stokes–Onsager–Stefan–Maxwell problem
// (formulation note, sections 1–3 and 7) on a tagged mesh: every quantity is
// in the scaled units of section 1 with RT = 1, so the pressure and
// augmentation terms of the species rows carry the group S.
type Problem struct {
	Mesh *mesh.Mesh
	// Mixture holds the scaled molar masses and diffusivities.
	Mixture *Mixture
	// Degree k >= 1 of the pressure and potential spaces.
	Degree   int
	Flux     FluxFamily
	Pressure PressureFamily
	// S is eta_ref D_ref / (L^2 c_ref RT).
	S float64
	// Viscosity is the scaled shear viscosity model; BulkViscosity the
	// scaled bulk viscosity zeta (lambda = zeta - 2 eta / 3).
	Viscosity     ViscosityModel
	BulkViscosity float64
	// Augmentation is gamma in units of eta_ref / L^2; zero means 1.
	Augmentation float64
	// SpeciesAugmentation is beta, the one-sided consistent augmentation
	// + beta int (sum_j J_j/rho - v) . K_i/rho added to every species row
	// (formulation note, section 10 item 2), in the units of the transport
	// term. It gives the species rows an O(1) control of the total flux
	// that the symmetric augmentation gives only at size gamma S. Zero
	// means none; the system is then symmetric. Cases and studies use
	// FlowThroughSpeciesAugmentation or ClosedSpeciesAugmentation unless
	// told otherwise.
	SpeciesAugmentation float64
	// Gravity is the body force per unit mass.
	Gravity [2]float64
	// Boundary maps every boundary tag of the mesh to its conditions.
	Boundary map[int]BoundaryCondition
	// Source holds optional volume sources (nil: none).
	Source *Source
	// Inventory holds, per species, the amount in the domain (scaled: in
	// units of c_ref L^2, per unit depth) that fixes the potential level of
	// a species with no potential boundary (formulation note, section 6);
	// nil when no species needs it. Entries of species with potential
	// boundaries are ignored.
	Inventory []float64
	// QuadratureDegree is the degree of the triangle rule; zero means
	// 2(k+1)+4.
	QuadratureDegree int
	// Convection selects how the nonlinear iteration treats the species
	// velocities J_j/rho_j of the transport term (see ConvectionTreatment).
	Convection ConvectionTreatment
}

// Default values of Problem.SpeciesAugmentation, chosen by measurement
// (docs/augmentation.md). In a flow-through case (an outflow boundary) the
// augmentation's residual, beta times the mass-average defect, accumulates
// along the flow and makes the total concentration drift from the equation
// of state (docs/outflow.md); a smaller beta cuts that drift several times
// and still meets the mass-average threshold of the channel benchmark. In
// closed and species-driven cases nothing accumulates, and beta = 1 gives
// the manufactured studies their optimal rates on the coarsest meshes.
const (
	FlowThroughSpeciesAugmentation = 0.3
	ClosedSpeciesAugmentation      = 1.0
)

// ConvectionTreatment selects how a Picard step treats the density rho_j
// in the species velocities J_j/rho_j of the transport term.
type ConvectionTreatment int

const (
	// ConvectionAuto linearises when the problem has an outflow boundary
	// or a given non-zero velocity somewhere (a flow-through case), and
	// lags otherwise.
	ConvectionAuto ConvectionTreatment = iota
	// ConvectionLagged freezes rho_j at the previous iterate: the
	// classical staggered step, in which the composition carried by the
	// flow is that of the previous iterate. Its contraction degrades as
	// the Peclet number grows.
	ConvectionLagged
	// ConvectionLinearised linearises 1/rho_j(mu) about the previous
	// iterate, J_j/rho_j ~ J_j/rho^_j - (J^_j/rho^_j) sum_k
	// (dc_j/dmu_k / c^_j)(mu_k - mu^_k), with the previous flux J^ and
	// discontinuous potential mu^ carried in the iteration's state: the
	// step then transports the new composition. At a fixed point the added
	// term vanishes, so the discrete solution is the same.
	ConvectionLinearised
)

// String names the treatment.
func (c ConvectionTreatment) String() string {
	switch c {
	case ConvectionLagged:
		return "lagged"
	case ConvectionLinearised:
		return "linearised"
	}
	return "auto"
}

// linearisedConvection resolves ConvectionAuto.
func (p *Problem) linearisedConvection() bool {
	switch p.Convection {
	case ConvectionLagged:
		return false
	case ConvectionLinearised:
		return true
	}
	for _, bc := range p.Boundary {
		if len(bc.Species) > 0 && bc.Species[0].Kind == SpeciesOutflow {
			return true
		}
		if bc.Velocity.Kind == VelocityGiven && bc.Velocity.Velocity != nil {
			return true
		}
	}
	return false
}

// gamma returns the augmentation parameter with its default.
func (p *Problem) gamma() float64 {
	if p.Augmentation == 0 {
		return 1
	}
	return p.Augmentation
}

// validate checks the problem data and returns an error that names the tag,
// species or field at fault.
func (p *Problem) validate() error {
	if p.Mesh == nil || p.Mixture == nil {
		return fmt.Errorf("physics: problem needs a mesh and a mixture")
	}
	if p.Degree < 1 || p.Degree > 6 {
		return fmt.Errorf("physics: degree %d outside the supported range 1..6", p.Degree)
	}
	if !(p.S > 0) || math.IsInf(p.S, 0) {
		return fmt.Errorf("physics: group S = %g is not positive and finite", p.S)
	}
	if p.Viscosity == nil {
		return fmt.Errorf("physics: problem has no viscosity model")
	}
	if p.SpeciesAugmentation < 0 || math.IsNaN(p.SpeciesAugmentation) {
		return fmt.Errorf("physics: species augmentation beta = %g is negative", p.SpeciesAugmentation)
	}
	if p.Augmentation < 0 {
		return fmt.Errorf("physics: augmentation gamma = %g is negative", p.Augmentation)
	}
	n := p.Mixture.Len()
	tags := p.Mesh.Tags()
	var missing []string
	for _, t := range tags {
		bc, ok := p.Boundary[t]
		if !ok {
			missing = append(missing, tagLabel(p.Mesh, t))
			continue
		}
		if len(bc.Species) != n {
			return fmt.Errorf("physics: boundary %s has %d species conditions for %d species", tagLabel(p.Mesh, t), len(bc.Species), n)
		}
		switch bc.Velocity.Kind {
		case VelocityGiven:
		case VelocityTraction:
			if bc.Velocity.NoTangential {
				if _, err := slipComponent(p.Mesh, t); err != nil {
					return err
				}
			}
		case VelocitySlip:
			if _, err := slipComponent(p.Mesh, t); err != nil {
				return err
			}
		case VelocityStefan:
			if err := axisParallelEdges(p.Mesh, t); err != nil {
				return err
			}
		default:
			return fmt.Errorf("physics: boundary %s: unknown velocity condition %d", tagLabel(p.Mesh, t), int(bc.Velocity.Kind))
		}
		outflow := 0
		for _, sc := range bc.Species {
			if sc.Kind == SpeciesOutflow {
				outflow++
			}
		}
		if outflow > 0 && outflow < n {
			return fmt.Errorf("physics: boundary %s: outflow must hold for every species or none (%d of %d have it)", tagLabel(p.Mesh, t), outflow, n)
		}
		if outflow > 0 && bc.Velocity.Kind != VelocityTraction {
			return fmt.Errorf("physics: boundary %s: outflow needs a traction (open) velocity condition, got %s", tagLabel(p.Mesh, t), bc.Velocity.Kind)
		}
		for i, sc := range bc.Species {
			switch sc.Kind {
			case SpeciesFlux, SpeciesOutflow:
			case SpeciesPotential:
				if sc.Potential == nil {
					return fmt.Errorf("physics: boundary %s, species %q: potential condition without data", tagLabel(p.Mesh, t), p.Mixture.Name(i))
				}
			default:
				return fmt.Errorf("physics: boundary %s, species %q: unknown condition %d", tagLabel(p.Mesh, t), p.Mixture.Name(i), int(sc.Kind))
			}
		}
	}
	if len(missing) > 0 {
		return fmt.Errorf("physics: no boundary condition for %s (every boundary tag needs velocity and species conditions)", strings.Join(missing, ", "))
	}
	var extra []int
	have := make(map[int]bool, len(tags))
	for _, t := range tags {
		have[t] = true
	}
	for t := range p.Boundary {
		if !have[t] {
			extra = append(extra, t)
		}
	}
	if len(extra) > 0 {
		sort.Ints(extra)
		return fmt.Errorf("physics: boundary conditions given for tags %v that no boundary edge carries (tags present: %v)", extra, tags)
	}
	return nil
}

// tagLabel names a tag for messages: its name and number when named.
func tagLabel(m *mesh.Mesh, t int) string {
	if name, ok := m.TagNames[t]; ok && name != "" {
		return fmt.Sprintf("%q (tag %d)", name, t)
	}
	return fmt.Sprintf("tag %d", t)
}

// slipComponent returns the velocity component normal to the straight,
// axis-parallel boundary segment with tag t (0 for a vertical segment, 1 for
// a horizontal one), or an error naming the tag.
func slipComponent(m *mesh.Mesh, t int) (int, error) {
	comp := -1
	for _, e := range m.BoundaryEdges(t) {
		n, _ := fem.OutwardNormal(m, e)
		c := -1
		switch {
		case math.Abs(n[1]) < 1e-12:
			c = 0
		case math.Abs(n[0]) < 1e-12:
			c = 1
		}
		if c < 0 || comp >= 0 && c != comp {
			return 0, fmt.Errorf("physics: slip or Stefan-wall boundary %s is not a straight segment parallel to a coordinate axis (sloped or curved ones are not supported)", tagLabel(m, t))
		}
		comp = c
	}
	if comp < 0 {
		return 0, fmt.Errorf("physics: slip boundary %s has no edges", tagLabel(m, t))
	}
	return comp, nil
}

// axisParallelEdges returns an error naming tag t unless each of its edges
// is parallel to a coordinate axis (a Stefan wall may turn corners, as
// round a rectangular block).
func axisParallelEdges(m *mesh.Mesh, t int) error {
	for _, e := range m.BoundaryEdges(t) {
		n, _ := fem.OutwardNormal(m, e)
		if math.Abs(n[0]) > 1e-12 && math.Abs(n[1]) > 1e-12 {
			return fmt.Errorf("physics: Stefan-wall boundary %s has an edge not parallel to a coordinate axis (sloped or curved Stefan walls are not supported)", tagLabel(m, t))
		}
	}
	return nil
}
