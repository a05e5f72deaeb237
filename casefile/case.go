package casefile

import "mixwell/mesh"

// Case is a validated case: every number in SI units, every per-species
// slice in the order of Species, every name checked against the species and
// the geometry. Load and Parse fill every field, defaults included.
type Case struct {
	// Source is the case file as named to Load or Parse.
	Source string
	// Title is a free one-line description ("" when not given).
	Title string

	// Temperature T in K (uniform).
	Temperature float64
	// Pressure is the reference pressure P_ref in Pa (absolute); the
	// solver's pressure unknown is the dynamic part p, and thermodynamic
	// models see P_ref + p.
	Pressure float64

	// Species are the components, at least two, in file order.
	Species []Species
	// Diffusivities holds the Stefan–Maxwell diffusivity D_ij in m^2/s of
	// every unordered pair exactly once, ordered by (i, j), i < j, in
	// species order; A is species i and B species j.
	Diffusivities []Pair

	Thermodynamics Thermodynamics
	Viscosity      Viscosity
	// Gravity is the body force per unit mass f in m/s^2 (default 0).
	Gravity [2]float64

	Geometry       Geometry
	Discretisation Discretisation
	// Boundaries holds one condition per boundary name of the geometry,
	// sorted by name.
	Boundaries []Boundary
	Initial    Initial
	Solver     Solver
	Output     Output

	// Warnings lists admissible but suspicious data, in file order.
	Warnings []Warning
}

// Species is one component.
type Species struct {
	Name string
	// MolarMass M_i in kg/mol, positive.
	MolarMass float64
}

// Pair is a coefficient of an unordered pair of species: a Stefan–Maxwell
// diffusivity (m^2/s) or a Margules coefficient (dimensionless).
type Pair struct {
	A, B  string
	Value float64
}

// ThermoModel names a thermodynamic closure c(mu, p) (formulation note,
// section 5).
type ThermoModel string

// Thermodynamic models.
const (
	// IdealGas: c_i = (P_ref/RT) exp(mu_i/RT).
	IdealGas ThermoModel = "ideal-gas"
	// IdealGasAtPressure: mole fractions from the potentials, total
	// concentration from the pressure, c_T = (P_ref + p)/RT (section 10
	// item 6).
	IdealGasAtPressure ThermoModel = "ideal-gas-at-pressure"
	// IdealSolution: incompressible ideal liquid with partial molar
	// volumes.
	IdealSolution ThermoModel = "ideal-solution"
	// Margules: incompressible liquid with two-suffix Margules activity
	// coefficients.
	Margules ThermoModel = "margules"
)

// Thermodynamics is the thermodynamic model and its data.
type Thermodynamics struct {
	Model ThermoModel
	// MolarVolumes are the partial molar volumes V_i in m^3/mol, one per
	// species (ideal-solution and margules; nil otherwise).
	MolarVolumes []float64
	// Interactions are the Margules coefficients A_ij = W_ij/RT
	// (dimensionless) of the pairs listed in the file, ordered as
	// Case.Diffusivities; unlisted pairs are 0 (margules only).
	Interactions []Pair
}

// ViscosityModel names a shear viscosity model.
type ViscosityModel string

// Viscosity models.
const (
	// ConstantViscosity: eta independent of composition.
	ConstantViscosity ViscosityModel = "constant"
	// Wilke: Wilke's mixing rule from pure-species viscosities.
	Wilke ViscosityModel = "wilke"
)

// Viscosity is the shear and bulk viscosity.
type Viscosity struct {
	Model ViscosityModel
	// Value is the shear viscosity eta in Pa s (constant model; 0
	// otherwise).
	Value float64
	// Pure are the pure-species viscosities in Pa s, one per species
	// (wilke model; nil otherwise).
	Pure []float64
	// Bulk is the bulk viscosity zeta in Pa s (default 0); lambda = zeta -
	// 2 eta/3.
	Bulk float64
}

// GeometryKind names how the domain is given.
type GeometryKind string

// Geometry kinds.
const (
	RectangleGeometry GeometryKind = "rectangle"
	PolygonGeometry   GeometryKind = "polygon"
	MeshFileGeometry  GeometryKind = "mesh-file"
)

// Geometry is the domain and the meshing controls. Exactly one of
// Rectangle, Polygon and MeshFile is non-nil, as Kind says.
type Geometry struct {
	Kind      GeometryKind
	Rectangle *Rectangle
	Polygon   *Polygon
	MeshFile  *MeshFile
	Meshing   Meshing
	// Names lists the distinct boundary names of the geometry, sorted.
	Names []string
}

// Side indices of a rectangle, counter-clockwise from the bottom.
const (
	Bottom = iota
	Right
	Top
	Left
)

// SideNames are the default names of the sides of a rectangle, indexed by
// Bottom, Right, Top, Left.
var SideNames = [4]string{"bottom", "right", "top", "left"}

// Rectangle is the axis-parallel rectangle [X0, X1] x [Y0, Y1] (m) meshed
// with NX x NY cells (each split into triangles by the mesh generator).
type Rectangle struct {
	X0, Y0, X1, Y1 float64
	NX, NY         int
	// Names are the boundary names of the sides, indexed by Bottom,
	// Right, Top, Left; several sides may share a name.
	Names [4]string
}

// Polygon is a polygonal domain with polygonal holes, for the mesher.
type Polygon struct {
	Outline Loop
	Holes   []Loop
}

// Loop is a closed polygon: segment i joins Points[i] to Points[i+1] (the
// last one back to Points[0]) and is named Names[i]. The orientation is as
// given in the file (either); loops do not cross and have no repeated
// points.
type Loop struct {
	// Points in m.
	Points [][2]float64
	// Names has one boundary name per segment (len(Points)).
	Names []string
}

// MeshFile is a mesh read from a file in the mesh package's text format.
type MeshFile struct {
	// Path is the file's path, resolved against the case file's directory.
	Path string
	// Mesh is the mesh read by Load or Parse, coordinates in m, its
	// boundary tags named.
	Mesh *mesh.Mesh
}

// Meshing holds the meshing controls.
type Meshing struct {
	// MaxArea is the largest triangle area in m^2 for the polygon mesher;
	// 0 means no area bound (only the angle bound refines), and it is 0
	// for other geometries. A cell_size h in the file gives MaxArea =
	// (sqrt 3/4) h^2, the area of the equilateral triangle of side h.
	MaxArea float64
	// CellSize is the cell_size in m as given (0 when max_area was given
	// or for other geometries).
	CellSize float64
	// MinAngle is the smallest angle the polygon mesher aims for, in
	// degrees (default 25; 0 for other geometries).
	MinAngle float64
	// Refinements is the number of uniform refinements after meshing
	// (default 0); each divides every triangle into four.
	Refinements int
	// Layers are the boundary-layer gradings, sorted by boundary name.
	Layers []Grading
}

// Grading grades the mesh geometrically toward a named boundary: Count
// layers of thicknesses First, First*Ratio, First*Ratio^2, ... (m) starting
// at the boundary. In a rectangle they are the first Count rows (or
// columns) of cells next to each side with that name, and the remaining
// cells across share the rest of the extent equally.
type Grading struct {
	Boundary string
	First    float64
	Ratio    float64
	Count    int
}

// FluxFamily names the H(div) element of the species fluxes.
type FluxFamily string

// Flux families.
const (
	BDM FluxFamily = "bdm"
	RT  FluxFamily = "rt"
)

// PairFamily names the velocity–pressure pair.
type PairFamily string

// Velocity–pressure pairs.
const (
	TaylorHood    PairFamily = "taylor-hood"
	ScottVogelius PairFamily = "scott-vogelius"
)

// Formulation names the choice of species unknowns (formulation note,
// section 10 item 2).
type Formulation string

// Formulations.
const (
	// TotalFlux: the n total mass fluxes J_i and the n potentials mu_i,
	// with the mass-average constraint imposed by augmentation (remedy (b)
	// of docs/augmentation.md).
	TotalFlux Formulation = "total-flux"
	// DiffusiveFlux: the n-1 diffusive mass fluxes j_i = J_i - rho_i v
	// and n-1 relative mass potentials, so that sum_i J_i = rho v holds
	// by construction (remedy (c)); built for the ideal gas only.
	DiffusiveFlux Formulation = "diffusive-flux"
)

// Discretisation selects the finite element spaces (formulation note,
// section 8) and the formulation.
type Discretisation struct {
	// Degree k of the pressure and potential spaces, 1..4 (default 2).
	Degree int
	// Flux is the flux family (default bdm).
	Flux FluxFamily
	// Pair is the velocity–pressure pair (default taylor-hood).
	Pair PairFamily
	// Quadrature is the degree of the triangle quadrature rule; 0 (the
	// default) means the solver's default for the degree.
	Quadrature int
	// Formulation is the choice of species unknowns (default TotalFlux).
	Formulation Formulation
	// FormulationPos is where the formulation is written in the case
	// file (zero when it is not given), for messages of later stages.
	FormulationPos Position
}

// VelocityKind names a velocity boundary condition (formulation note,
// sections 7 and 10).
type VelocityKind string

// Velocity boundary conditions.
const (
	// Wall: v = 0, or v = Speed t on a moving wall.
	Wall VelocityKind = "wall"
	// Inflow: a given uniform or parabolic profile, or a given vector.
	Inflow VelocityKind = "inflow"
	// Slip: v.n = 0, zero tangential traction (symmetry line).
	Slip VelocityKind = "slip"
	// Open: tangential velocity 0 and normal traction -p_b (section 10
	// item 4c).
	Open VelocityKind = "open"
	// StefanWall: tangential velocity 0, normal velocity sum_i J_i.n / rho
	// (section 10 item 3).
	StefanWall VelocityKind = "stefan-wall"
)

// Profile names the shape of an inflow.
type Profile string

// Inflow profiles.
const (
	Uniform   Profile = "uniform"
	Parabolic Profile = "parabolic"
)

// VelocityBC is the velocity condition of one boundary.
type VelocityBC struct {
	Kind VelocityKind
	// Speed is the tangential speed of a moving wall in m/s, along t =
	// (-n_y, n_x) with n the outward normal (counter-clockwise around the
	// domain); 0 for a fixed wall.
	Speed float64
	// Profile is the inflow profile (default uniform).
	Profile Profile
	// MeanSpeed is the mean inflow speed in m/s, positive into the domain
	// (inflow given by a speed; 0 when Vector is used).
	MeanSpeed float64
	// Vector is a uniform inflow velocity in m/s (inflow given by a
	// vector; HasVector is then true).
	Vector    [2]float64
	HasVector bool
	// Pressure is the dynamic pressure p_b in Pa of an open boundary
	// (default 0, the reference pressure).
	Pressure float64
}

// SpeciesKind names a species boundary condition (formulation note,
// sections 7 and 10).
type SpeciesKind string

// Species boundary conditions.
const (
	// Impermeable: J_i.n = 0 for every species (the default).
	Impermeable SpeciesKind = "impermeable"
	// Flux: a given outward normal flux per species.
	Flux SpeciesKind = "flux"
	// ConvectiveInflow: J_i.n = rho_i,b v.n from the inflow velocity and
	// the composition MoleFractions.
	ConvectiveInflow SpeciesKind = "convective-inflow"
	// Composition: mu_i = mu_i(x_b, p_b) from MoleFractions.
	Composition SpeciesKind = "composition"
	// Outflow: zero diffusive flux, species leave with the adjacent
	// composition (section 10 item 4).
	Outflow SpeciesKind = "outflow"
)

// FluxBasis says whether species fluxes are molar or mass fluxes.
type FluxBasis string

// Flux bases.
const (
	MolarBasis FluxBasis = "molar"
	MassBasis  FluxBasis = "mass"
)

// SpeciesBC is the species condition of one boundary.
type SpeciesBC struct {
	Kind SpeciesKind
	// Basis says how Fluxes are given (flux only).
	Basis FluxBasis
	// Fluxes are the outward normal fluxes, one per species, in
	// mol/(m^2 s) (molar basis: N_i.n) or kg/(m^2 s) (mass basis: J_i.n);
	// species not listed in the file have 0 (flux only). The mass flux is
	// J_i.n = M_i N_i.n.
	Fluxes []float64
	// Profile is how the fluxes vary along the boundary (flux only):
	// Uniform, or Parabolic, where Fluxes are the means and each flux is
	// 6 t (1 - t) times its mean, t the position along the (straight)
	// boundary, vanishing at its ends like the velocity next to no-slip
	// walls: an inlet of given mass fluxes into a channel.
	Profile Profile
	// MoleFractions is the composition, one per species, summing to one
	// within 1e-9; zeros are kept (the solver raises them to
	// Solver.MoleFractionFloor) (convective-inflow and composition only).
	MoleFractions []float64
	// Impermeable marks, per species, the species of a composition
	// boundary that do not cross it (zero normal flux instead of the
	// composition), e.g. air at the surface of an evaporating liquid in
	// which it does not dissolve; nil when none (composition only).
	Impermeable []bool
}

// Boundary is the condition on one named boundary.
type Boundary struct {
	Name     string
	Velocity VelocityBC
	Species  SpeciesBC
	// Pos is where the boundary's entry starts in the case file, for
	// messages of later stages.
	Pos Position
}

// Initial is the initial (fill) state.
type Initial struct {
	// MoleFractions is the uniform fill composition, one per species, or
	// nil when not given (the solver then starts from the boundary
	// compositions).
	MoleFractions []float64
	// Inventory is the amount of each species in the domain per unit
	// depth, in mol/m, or 0 for species not listed; nil when not given
	// (the fill composition then fixes it).
	Inventory []float64
}

// Method names the nonlinear iteration (formulation note, section 4).
type Method string

// Nonlinear methods.
const (
	Anderson     Method = "anderson"
	Picard       Method = "picard"
	NewtonKrylov Method = "newton-krylov"
)

// Update names the concentration update of the Picard map.
type Update string

// Concentration updates.
const (
	// PotentialUpdate: project the post-processed potentials, evaluate the
	// closure (positivity-preserving; the default).
	PotentialUpdate Update = "potential"
	// ConcentrationUpdate: project the concentrations, clip to a floor.
	ConcentrationUpdate Update = "concentration"
)

// Solver holds the nonlinear solver settings.
type Solver struct {
	Method Method // default anderson
	// Tolerance on the relative residual (default 1e-10).
	Tolerance     float64
	MaxIterations int // default 60
	// AndersonDepth is the Anderson mixing depth (default 10).
	AndersonDepth int
	// SpeciesAugmentation is beta of the one-sided augmentation, in units
	// of the transport term (0 switches it off), or AutoSpeciesAugmentation
	// (the default) to let the solver choose it from the boundary data.
	SpeciesAugmentation float64
	// Augmentation is gamma of the symmetric augmentation (default 1, in
	// units of eta_ref/L^2; positive).
	Augmentation float64
	Update       Update // default potential
	// MoleFractionFloor is x_min (default 1e-6).
	MoleFractionFloor float64
}

// Field names an output field.
type Field string

// Output fields (formulation note, section 9).
const (
	FieldVelocity      Field = "velocity"
	FieldPressure      Field = "pressure"
	FieldMassFlux      Field = "mass-flux"
	FieldMolarFlux     Field = "molar-flux"
	FieldDiffusiveFlux Field = "diffusive-flux"
	FieldPotential     Field = "potential"
	FieldConcentration Field = "concentration"
	FieldMoleFraction  Field = "mole-fraction"
	FieldMassFraction  Field = "mass-fraction"
	FieldDensity       Field = "density"
)

// AutoSpeciesAugmentation is the value of Solver.SpeciesAugmentation that
// leaves beta to the solver: physics.FlowThroughSpeciesAugmentation when
// the case has an outflow boundary, physics.ClosedSpeciesAugmentation
// otherwise (the key's default, written "auto").
const AutoSpeciesAugmentation = -1.0

// AllFields lists every output field, the default selection, in the order
// of the output files' columns: mole fractions, concentrations,
// potentials, velocity, pressure and molar fluxes first, then mass fluxes,
// diffusive fluxes, mass fractions and density.
var AllFields = []Field{FieldMoleFraction, FieldConcentration, FieldPotential,
	FieldVelocity, FieldPressure, FieldMolarFlux, FieldMassFlux,
	FieldDiffusiveFlux, FieldMassFraction, FieldDensity}

// Output selects what a run writes.
type Output struct {
	// Fields to write (default AllFields), in file order.
	Fields []Field
	// Subdivision is the level n of the sub-triangulation on which the VTU
	// file shows the fields: every triangle is cut into n^2 (default the
	// velocity degree k+1).
	Subdivision int
	Probes      []Probe
}

// Probe is a line along which fields are sampled at Points equally spaced
// points from From to To (m).
type Probe struct {
	Name     string
	From, To [2]float64
	Points   int
	// FromPos and ToPos are where the end points are written in the case
	// file, for messages of later stages.
	FromPos, ToPos Position
}

// SpeciesIndex returns the position of the named species, or -1.
func (c *Case) SpeciesIndex(name string) int {
	for i, s := range c.Species {
		if s.Name == name {
			return i
		}
	}
	return -1
}

// Boundary returns the condition of the named boundary, or nil.
func (c *Case) Boundary(name string) *Boundary {
	for i := range c.Boundaries {
		if c.Boundaries[i].Name == name {
			return &c.Boundaries[i]
		}
	}
	return nil
}
