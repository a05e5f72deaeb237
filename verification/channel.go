package verification

import (
	"bytes"
	"fmt"
	"math"
	"sort"
	"strings"
	"testing/fstest"
	"time"

	"mixwell/casefile"
	"mixwell/mesh"
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
	// channelGrading is the number of geometric grading steps toward the
	// patch ends and the bottom wall.
	channelGrading = 3
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
}

// ChannelStudy is the result of a channel benchmark.
type ChannelStudy struct {
	Problem string  `json:"problem"`
	Degree  int     `json:"degree"`
	Peclet  float64 `json:"peclet"`
	S       float64 `json:"S"`
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
	// Seconds is the wall time per level (without the truncation run).
	Seconds []float64 `json:"seconds"`
}

// channelCase returns the case text and its in-memory mesh for a channel of
// the given length (in heights) with rows cell rows across the height.
func channelCase(cfg ChannelConfig, rows int, length float64) (*casefile.Case, error) {
	H := channelHeight
	h := H / float64(rows)
	nx := int(math.Round(length * float64(rows)))
	// A tensor grid of square cells of side h, graded geometrically
	// (ratio 2, channelGrading steps down to h/2^steps) toward the patch
	// ends, where the flux of A is singular (the condition switches from
	// impermeable to fixed composition), and toward the bottom wall, where
	// the released gas forms a layer.
	var xs, ys []float64
	for i := 0; i <= nx; i++ {
		xs = append(xs, float64(i)*h)
	}
	for j := 0; j <= rows; j++ {
		ys = append(ys, float64(j)*h)
	}
	for k := 1; k <= channelGrading; k++ {
		d := h / float64(int(1)<<k)
		xs = append(xs, H-d, H+d, 2*H-d, 2*H+d)
		ys = append(ys, d)
	}
	xs, ys = uniqueSorted(xs, 1e-9*H), uniqueSorted(ys, 1e-9*H)
	xs[len(xs)-1], ys[len(ys)-1] = length*H, H
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
	method := cfg.Method
	if method == "" {
		method = "anderson"
	}
	maxIt := cfg.MaxIterations
	if maxIt == 0 {
		maxIt = 150
	}
	text := fmt.Sprintf(`title: flow-through channel benchmark (invented data)
temperature: 298.15 K
reference_pressure: 101325 Pa
species:
  - {name: A, molar_mass: 18 g/mol}
  - {name: B, molar_mass: 28 g/mol}
  - {name: C, molar_mass: 44 g/mol}
diffusivities:
  A: {B: 2.5e-5 m^2/s, C: 1.9e-5 m^2/s}
  B: {C: 1.6e-5 m^2/s}
thermodynamics: ideal-gas
viscosity: 1.8e-5 Pa s
geometry:
  mesh_file: channel.mesh
discretisation: {degree: %d}
boundaries:
  inlet:
    velocity: {type: inflow, profile: parabolic, mean_speed: %g m/s}
    species: {type: convective-inflow, mole_fractions: {A: 0.1, B: 0.6, C: 0.3}}
  outlet:
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
`, cfg.Degree, channelSpeed, method, maxIt)
	if method != "anderson" {
		text = strings.Replace(text, "  anderson_depth: 20\n", "", 1)
	}
	fsys := fstest.MapFS{"channel.mesh": {Data: buf.Bytes()}}
	return casefile.ParseFS("channel.yaml", []byte(text), fsys)
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
	coarse := cfg.Coarse
	if coarse == 0 {
		coarse = 4
	}
	st := &ChannelStudy{Problem: "channel", Degree: cfg.Degree, Peclet: channelSpeed * channelHeight / channelDmin}
	var finest *simulate.Outcome
	for l := 0; l < cfg.Levels; l++ {
		rows := coarse << l
		start := time.Now()
		o, err := solveChannel(cfg, rows, channelLength)
		if o == nil {
			return nil, err
		}
		st.S = o.Setup.Scales.S()
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

// largestMoleFractionDifference samples both solutions on a grid over
// [0, length] x [0, height] and returns the largest mole-fraction
// difference.
func largestMoleFractionDifference(a, b *simulate.Outcome, length, height float64) float64 {
	pa, pb := a.NewPoint(), b.NewPoint()
	var worst float64
	const nx, ny = 80, 20
	for i := 0; i <= nx; i++ {
		for j := 0; j <= ny; j++ {
			x := [2]float64{length * (0.001 + 0.998*float64(i)/nx), height * (0.001 + 0.998*float64(j)/ny)}
			ta, xa, oka := a.Locate(x)
			tb, xb, okb := b.Locate(x)
			if !oka || !okb {
				continue
			}
			a.SampleTo(pa, ta, xa)
			b.SampleTo(pb, tb, xb)
			for s := range pa.MoleFraction {
				worst = math.Max(worst, math.Abs(pa.MoleFraction[s]-pb.MoleFraction[s]))
			}
		}
	}
	return worst
}

// uniqueSorted sorts a and drops entries within tol of their predecessor
// (grading points that coincide with grid lines or with each other).
func uniqueSorted(a []float64, tol float64) []float64 {
	sort.Float64s(a)
	out := a[:1]
	for _, v := range a[1:] {
		if v-out[len(out)-1] > tol {
			out = append(out, v)
		}
	}
	return out
}
