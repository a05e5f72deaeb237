package verification

import (
	"bytes"
	"fmt"
	"math"
	"strings"
	"testing/fstest"
	"time"

	"mixwell/casefile"
	"mixwell/mesh"
	"mixwell/physics"
	"mixwell/simulate"
)

// The flow-through channel benchmark (our own invented scenario): a
// straight microchannel of height H = 100 µm and length 4 H carries three
// gases, A (18 g/mol), B (28 g/mol) and C (44 g/mol), in at the left with a
// parabolic profile (mean speed 1 m/s, so U H / D_BC = 6.25) and a fixed
// composition. The walls are no-slip and impermeable except a patch of the
// bottom wall, from x = H to 2 H, that holds A at a fixed mole fraction
// (a surface that releases A, posed as a Stefan wall: its normal velocity
// carries the mass it releases), with B and C not crossing it. The mixture
// leaves through an outflow boundary on the right. Nothing here is a
// measurement: the numbers check the discretisation, not a material.

// Channel benchmark constants (SI).
const (
	channelHeight = 1e-4
	channelLength = 4 // in heights
	channelSpeed  = 1.0
	channelDmin   = 1.6e-5
	// channelTemperature (K) and channelPressure (Pa) are the case's
	// temperature and reference pressure.
	channelTemperature = 298.15
	channelPressure    = 101325.0
	// channelGrading is the default exponent of the power grading toward
	// the patch ends and the bottom wall (see channelLines).
	channelGrading = 3.0
	// channelWindow is the width, in heights, of the graded window on each
	// side of a patch end and above the bottom wall.
	channelWindow = 0.5
)

// ChannelConfig selects one channel benchmark.
type ChannelConfig struct {
	// Degree is the degree k of the pressure and potential spaces.
	Degree int
	// Levels is the number of meshes, each with twice the cells per
	// direction of the previous one.
	Levels int
	// Coarse is the number of cell rows across the height on the coarsest
	// mesh (0: 4).
	Coarse int
	// Method is the nonlinear iteration ("anderson", "picard",
	// "newton-krylov"; empty: anderson).
	Method string
	// MaxIterations bounds the nonlinear iterations per level (0: 150).
	MaxIterations int
	// Progress, when not nil, is told about each solve as it starts.
	Progress func(what string, unknowns int)
	// NoTruncation leaves out the longer channel (Truncation stays 0).
	NoTruncation bool
	// Grading is the exponent of the power grading toward the patch ends
	// and the bottom wall (0: 3; 1: a uniform grid).
	Grading float64
	// MeanSpeed is the mean inflow speed in m/s (0: 1 m/s).
	MeanSpeed float64
	// Thermodynamics is the closure, ideal-gas or ideal-gas-at-pressure
	// (empty: ideal-gas; docs/outflow.md compares the two).
	Thermodynamics string
	// SpeciesAugmentation is the one-sided species augmentation beta
	// (0: the case default, physics.FlowThroughSpeciesAugmentation here;
	// negative: none, remedy (a) of docs/augmentation.md).
	SpeciesAugmentation float64
	// Formulation is the case's discretisation.formulation (empty: the
	// case default, total-flux).
	Formulation string
	// Inlet is how the mixture enters: VelocityInlet (empty: the
	// default) or MassFluxInlet.
	Inlet string
}

// The inlets of the channel benchmark.
const (
	// VelocityInlet gives a parabolic velocity of the mean speed and the
	// species fluxes J_i.n = rho_i,in v.n of the inflow composition
	// (convective-inflow). Where diffusion reaches the inlet, the density
	// there differs from the inflow's, and the two data contradict
	// v = sum J/rho: each formulation puts the contradiction somewhere
	// else (docs/augmentation.md).
	VelocityInlet = "velocity"
	// MassFluxInlet gives the species mass fluxes of the inflow
	// composition at the mean speed with a parabolic profile, on a Stefan
	// wall, whose normal velocity sum J.n / rho follows: consistent with
	// v = sum J/rho at any Peclet number, the no-slip corners included.
	MassFluxInlet = "mass-flux"
)

// massFluxInlet returns the case text of the mass-flux inlet at the mean
// speed (m/s): J_i.n = -c x_i M_i U on average, parabolic across the
// inlet, with c = P/(R T) the concentration of the inflow composition
// x = (0.1, 0.6, 0.3) at the reference pressure.
func massFluxInlet(speed float64) string {
	c := channelPressure / (physics.GasConstant * channelTemperature)
	return fmt.Sprintf(`  inlet:
    velocity: stefan-wall
    species: {type: flux, basis: mass, profile: parabolic, fluxes: {A: %.10g kg/(m^2 s), B: %.10g kg/(m^2 s), C: %.10g kg/(m^2 s)}}
`, -c*0.1*0.018*speed, -c*0.6*0.028*speed, -c*0.3*0.044*speed)
}

// ChannelStudy is the result of a channel benchmark.
type ChannelStudy struct {
	Problem string `json:"problem"`
	Degree  int    `json:"degree"`
	// Thermodynamics is the closure used.
	Thermodynamics string `json:"thermodynamics"`
	// Formulation is the flux unknowns: total-flux (remedy (b) of
	// docs/augmentation.md, with Beta) or diffusive-flux (remedy (c)).
	Formulation string `json:"formulation"`
	// Inlet is VelocityInlet or MassFluxInlet.
	Inlet string `json:"inlet"`
	// Beta is the one-sided species augmentation used (0: none).
	Beta   float64 `json:"beta"`
	Peclet float64 `json:"peclet"`
	S      float64 `json:"S"`
	// Rows holds the cell rows across the height per level, H the cell
	// size relative to the height.
	Rows     []int     `json:"rows"`
	H        []float64 `json:"h"`
	Unknowns []int     `json:"unknowns"`
	// Iterations and Converged are per level.
	Iterations []int  `json:"iterations"`
	Converged  []bool `json:"converged"`
	// Balance is the largest relative species balance defect over the
	// levels.
	Balance float64 `json:"balance"`
	// MassAverage is ||v - sum J/rho|| / ||v|| on the finest level, and
	// MassAverageLevels the same per level.
	MassAverage       float64   `json:"mass_average"`
	MassAverageLevels []float64 `json:"mass_average_levels"`
	// Truncation is the largest mole-fraction difference, over the common
	// part, between the channel and the same channel 1.5 times longer
	// (on the finest level).
	Truncation float64 `json:"truncation"`
	// PatchFlux is the molar flux of A released by the patch per level,
	// mol/(s m) per metre of depth; PatchFluxChange the relative change
	// between the two finest levels.
	PatchFlux       []float64 `json:"patch_flux"`
	PatchFluxChange float64   `json:"patch_flux_change"`
	// OutletA is the mean outgoing mole fraction of A on each level
	// (flux-weighted).
	OutletA []float64 `json:"outlet_mole_fraction_A"`
	// EOSDefect is, on each level, the largest |ln(sum_j exp(mu_j/RT)
	// P/(P + p))| over the channel: the level of the potentials against
	// the ideal-gas equation of state. With ideal-gas it is
	// ln(R T c_T / (P + p)), the drift of the total concentration; with
	// ideal-gas-at-pressure c_T stays on the equation of state and the
	// drift is in this level alone. The augmentation's residual enters the
	// sum of the OSM rows (the Gibbs–Duhem relation) and accumulates along
	// the flow (docs/outflow.md).
	EOSDefect []float64 `json:"eos_defect"`
	// Warnings are the solution warnings of each level, prefixed with its
	// rows (simulate.Outcome.Warnings).
	Warnings []string `json:"warnings,omitempty"`
	// Seconds is the wall time per level (without the truncation run).
	Seconds []float64 `json:"seconds"`
}

// channelCase returns the case text and its in-memory mesh for a channel of
// the given length (in heights) with rows cell rows across the height.
func channelCase(cfg ChannelConfig, rows int, length float64) (*casefile.Case, error) {
	H := channelHeight
	beta := cfg.Grading
	if beta == 0 {
		beta = channelGrading
	}
	xs := channelLines([]float64{0, 1, 2, length}, []bool{false, true, true, false}, rows, beta)
	ys := channelLines([]float64{0, 1}, []bool{true, false}, rows, beta)
	for i := range xs {
		xs[i] *= H
	}
	for i := range ys {
		ys[i] *= H
	}
	r, err := mesh.Rectangle(0, 0, float64(len(xs)-1), float64(len(ys)-1), len(xs)-1, len(ys)-1, mesh.RightDiagonal)
	if err != nil {
		return nil, err
	}
	pts := make([][2]float64, len(r.Points))
	for i, p := range r.Points {
		pts[i] = [2]float64{xs[int(math.Round(p[0]))], ys[int(math.Round(p[1]))]}
	}
	m, err := mesh.New(pts, r.Triangles)
	if err != nil {
		return nil, err
	}
	eps := 1e-9 * H
	bottom := func(a, b [2]float64) bool { return a[1] < eps && b[1] < eps }
	onPatch := func(a, b [2]float64) bool {
		return bottom(a, b) && math.Min(a[0], b[0]) > H-eps && math.Max(a[0], b[0]) < 2*H+eps
	}
	tags := []struct {
		name string
		on   func(a, b [2]float64) bool
	}{
		{"wall", func(a, b [2]float64) bool { return true }},
		{"inlet", func(a, b [2]float64) bool { return a[0] < eps && b[0] < eps }},
		{"outlet", func(a, b [2]float64) bool { return a[0] > length*H-eps && b[0] > length*H-eps }},
		{"patch", onPatch},
	}
	for k, tg := range tags {
		if err := m.TagBoundary(k+1, tg.name, tg.on); err != nil {
			return nil, err
		}
	}
	var buf bytes.Buffer
	if err := mesh.Write(&buf, m); err != nil {
		return nil, err
	}
	speed := cfg.MeanSpeed
	if speed == 0 {
		speed = channelSpeed
	}
	thermo := cfg.Thermodynamics
	if thermo == "" {
		thermo = "ideal-gas"
	}
	method := cfg.Method
	if method == "" {
		method = "anderson"
	}
	maxIt := cfg.MaxIterations
	if maxIt == 0 {
		maxIt = 150
	}
	var formulation string
	if cfg.Formulation != "" {
		formulation = ", formulation: " + cfg.Formulation
	}
	inlet := fmt.Sprintf(`  inlet:
    velocity: {type: inflow, profile: parabolic, mean_speed: %g m/s}
    species: {type: convective-inflow, mole_fractions: {A: 0.1, B: 0.6, C: 0.3}}
`, speed)
	if cfg.Inlet == MassFluxInlet {
		inlet = massFluxInlet(speed)
	}
	text := fmt.Sprintf(`title: flow-through channel benchmark (invented data)
temperature: %g K
reference_pressure: %g Pa
species:
  - {name: A, molar_mass: 18 g/mol}
  - {name: B, molar_mass: 28 g/mol}
  - {name: C, molar_mass: 44 g/mol}
diffusivities:
  A: {B: 2.5e-5 m^2/s, C: 1.9e-5 m^2/s}
  B: {C: 1.6e-5 m^2/s}
thermodynamics: %s
viscosity: 1.8e-5 Pa s
geometry:
  mesh_file: channel.mesh
discretisation: {degree: %d%s}
boundaries:
%s  outlet:
    velocity: {type: open, pressure: 0 Pa}
    species: outflow
  patch:
    velocity: stefan-wall
    species: {type: composition, mole_fractions: {A: 0.4, B: 0.4, C: 0.2}, impermeable: [B, C]}
  wall:
    velocity: wall
    species: impermeable
initial:
  mole_fractions: {A: 0.1, B: 0.6, C: 0.3}
solver:
  method: %s
  anderson_depth: 20
  max_iterations: %d
  tolerance: 1e-10
`, channelTemperature, channelPressure, thermo, cfg.Degree, formulation, inlet, method, maxIt)
	if method != "anderson" {
		text = strings.Replace(text, "  anderson_depth: 20\n", "", 1)
	}
	switch b := cfg.SpeciesAugmentation; {
	case b < 0:
		text += "  species_augmentation: 0\n"
	case b > 0:
		text += fmt.Sprintf("  species_augmentation: %g\n", b)
	}
	fsys := fstest.MapFS{"channel.mesh": {Data: buf.Bytes()}}
	return casefile.ParseFS("channel.yaml", []byte(text), fsys)
}

// channelLines returns the grid lines, in heights, of a tensor grid with
// rows cells per height, through the breakpoints bp (increasing, each an
// integer number of heights apart so that grid lines fall on them). Near
// each breakpoint marked singular the lines are power-graded: within
// channelWindow of it they sit at distances w (i/m)^beta, i = 0..m, where
// m is the number of uniform cells the window would hold. Grading of this
// kind toward a point singularity r^lambda restores the convergence rate
// lost on uniform grids once beta exceeds about (rate wanted)/lambda
// (common practice for corner singularities since Babuska's graded meshes;
// the exponent here was chosen by measurement, docs/outflow.md). With
// beta = 1 the grid is uniform. The number of lines equals that of the
// uniform grid, so grading costs no unknowns.
func channelLines(bp []float64, singular []bool, rows int, beta float64) []float64 {
	m := int(math.Round(channelWindow * float64(rows)))
	if m < 1 {
		m = 1
	}
	w := float64(m) / float64(rows)
	lines := []float64{bp[0]}
	for s := 0; s+1 < len(bp); s++ {
		a, b := bp[s], bp[s+1]
		n := int(math.Round((b - a) * float64(rows)))
		for i := 1; i <= n; i++ {
			t := a + float64(i)*(b-a)/float64(n)
			// Distances to the two ends of the segment, graded where the
			// end is singular and within the window.
			if da := t - a; singular[s] && da < w-1e-12 {
				t = a + w*math.Pow(da/w, beta)
			} else if db := b - t; singular[s+1] && db < w-1e-12 {
				t = b - w*math.Pow(db/w, beta)
			}
			lines = append(lines, t)
		}
		lines[len(lines)-1] = b
	}
	return lines
}

// solveChannel prepares and solves one channel.
func solveChannel(cfg ChannelConfig, rows int, length float64) (*simulate.Outcome, error) {
	c, err := channelCase(cfg, rows, length)
	if err != nil {
		return nil, err
	}
	s, err := simulate.Prepare(c)
	if err != nil {
		return nil, err
	}
	if cfg.Progress != nil {
		cfg.Progress(fmt.Sprintf("channel, %g heights, %d rows", length, rows), s.Unknowns())
	}
	o, err := s.Solve(nil)
	if err != nil {
		return o, err
	}
	return o, nil
}

// RunChannel runs the channel benchmark.
func RunChannel(cfg ChannelConfig) (*ChannelStudy, error) {
	if cfg.Degree < 1 || cfg.Degree > 4 {
		return nil, fmt.Errorf("verification: channel degree %d outside 1..4", cfg.Degree)
	}
	if cfg.Levels < 2 {
		return nil, fmt.Errorf("verification: channel needs at least 2 levels, got %d", cfg.Levels)
	}
	switch cfg.Formulation {
	case "", string(casefile.TotalFlux):
	case string(casefile.DiffusiveFlux):
		if cfg.SpeciesAugmentation != 0 {
			return nil, fmt.Errorf("verification: channel: the diffusive-flux formulation needs no species augmentation, but beta %g is given", cfg.SpeciesAugmentation)
		}
	default:
		return nil, fmt.Errorf("verification: channel: unknown formulation %q (valid: %s, %s)", cfg.Formulation, casefile.TotalFlux, casefile.DiffusiveFlux)
	}
	switch cfg.Inlet {
	case "", VelocityInlet, MassFluxInlet:
	default:
		return nil, fmt.Errorf("verification: channel: unknown inlet %q (valid: %s, %s)", cfg.Inlet, VelocityInlet, MassFluxInlet)
	}
	if cfg.MeanSpeed < 0 || math.IsNaN(cfg.MeanSpeed) || math.IsInf(cfg.MeanSpeed, 0) {
		return nil, fmt.Errorf("verification: channel: mean speed %g m/s is not positive and finite", cfg.MeanSpeed)
	}
	coarse := cfg.Coarse
	if coarse == 0 {
		coarse = 4
	}
	st := &ChannelStudy{Problem: "channel", Degree: cfg.Degree, Peclet: channelSpeed * channelHeight / channelDmin, Thermodynamics: cfg.Thermodynamics,
		Formulation: cfg.Formulation}
	if st.Formulation == "" {
		st.Formulation = string(casefile.TotalFlux)
	}
	st.Inlet = cfg.Inlet
	if st.Inlet == "" {
		st.Inlet = VelocityInlet
	}
	if st.Thermodynamics == "" {
		st.Thermodynamics = "ideal-gas"
	}
	if cfg.MeanSpeed != 0 {
		st.Peclet = cfg.MeanSpeed * channelHeight / channelDmin
	}
	var finest *simulate.Outcome
	for l := 0; l < cfg.Levels; l++ {
		rows := coarse << l
		start := time.Now()
		o, err := solveChannel(cfg, rows, channelLength)
		if o == nil {
			return nil, err
		}
		st.S = o.Setup.Scales.S()
		st.Beta = o.Setup.Problem.SpeciesAugmentation
		if st.Formulation == string(casefile.DiffusiveFlux) {
			st.Beta = 0 // set by the case, but not used
		}
		st.Rows = append(st.Rows, rows)
		st.H = append(st.H, 1/float64(rows))
		st.Unknowns = append(st.Unknowns, o.Setup.Unknowns())
		st.Iterations = append(st.Iterations, o.Iterations)
		st.Converged = append(st.Converged, o.Converged && err == nil)
		st.Balance = math.Max(st.Balance, o.SpeciesBalance)
		ma := massAverageOverVelocity(o)
		st.MassAverageLevels = append(st.MassAverageLevels, ma)
		st.MassAverage = ma
		st.PatchFlux = append(st.PatchFlux, -o.BoundaryFlux["patch"][0].Molar)
		out := o.BoundaryFlux["outlet"]
		var tot float64
		for _, f := range out {
			tot += f.Molar
		}
		st.OutletA = append(st.OutletA, out[0].Molar/tot)
		st.EOSDefect = append(st.EOSDefect, equationOfStateDefect(o, channelLength*channelHeight, channelHeight))
		for _, w := range o.Warnings {
			st.Warnings = append(st.Warnings, fmt.Sprintf("%d rows: %s", rows, w))
		}
		st.Seconds = append(st.Seconds, time.Since(start).Seconds())
		finest = o
	}
	k := len(st.PatchFlux) - 1
	st.PatchFluxChange = math.Abs(st.PatchFlux[k]-st.PatchFlux[k-1]) / math.Abs(st.PatchFlux[k])
	if cfg.NoTruncation {
		return st, nil
	}
	long, err := solveChannel(cfg, st.Rows[k], 1.5*channelLength)
	if long == nil {
		return nil, err
	}
	if !long.Converged {
		return st, fmt.Errorf("verification: the longer channel did not converge: %v", err)
	}
	st.Truncation = largestMoleFractionDifference(finest, long, channelLength*channelHeight, channelHeight)
	return st, nil
}

// massAverageOverVelocity returns ||v - sum J/rho|| / ||v||.
func massAverageOverVelocity(o *simulate.Outcome) float64 {
	defect, v, _ := o.Setup.Discretisation.MassAverageNorms(o.Solution)
	return defect / v
}

// channelSample calls f at the points of a grid over the interior of
// [0, length] x [0, height] that lie in the mesh.
func channelSample(o *simulate.Outcome, length, height float64, f func(x [2]float64, pt *simulate.Point)) {
	pt := o.NewPoint()
	const nx, ny = 80, 20
	for i := 0; i <= nx; i++ {
		for j := 0; j <= ny; j++ {
			x := [2]float64{length * (0.001 + 0.998*float64(i)/nx), height * (0.001 + 0.998*float64(j)/ny)}
			if t, xh, ok := o.Locate(x); ok {
				o.SampleTo(pt, t, xh)
				f(x, pt)
			}
		}
	}
}

// equationOfStateDefect returns the largest |ln(sum_j exp(mu_j/RT) P/(P +
// p))| over a sampling grid (p the gauge pressure).
func equationOfStateDefect(o *simulate.Outcome, length, height float64) float64 {
	const T, P = channelTemperature, channelPressure
	RT := physics.GasConstant * T
	var worst float64
	channelSample(o, length, height, func(_ [2]float64, pt *simulate.Point) {
		var sum float64
		for _, mu := range pt.Mu {
			sum += math.Exp(mu / RT)
		}
		worst = math.Max(worst, math.Abs(math.Log(sum*P/(P+pt.P))))
	})
	return worst
}

// largestMoleFractionDifference samples both solutions on a grid over
// [0, length] x [0, height] and returns the largest mole-fraction
// difference.
func largestMoleFractionDifference(a, b *simulate.Outcome, length, height float64) float64 {
	pb := b.NewPoint()
	var worst float64
	channelSample(a, length, height, func(x [2]float64, pa *simulate.Point) {
		tb, xb, ok := b.Locate(x)
		if !ok {
			return
		}
		b.SampleTo(pb, tb, xb)
		for s := range pa.MoleFraction {
			worst = math.Max(worst, math.Abs(pa.MoleFraction[s]-pb.MoleFraction[s]))
		}
	})
	return worst
}
