package results

import (
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"sort"
	"strconv"
	"time"

	"mixwell/casefile"
	"mixwell/mesh"
	"mixwell/plotting"
	"mixwell/simulate"
)

// Run is a solved case ready to be written.
type Run struct {
	// Outcome holds the numbers of summary.json; its Setup gives the case
	// (Setup.Case), the mesh in metres (Setup.Mesh) and the scales.
	Outcome *simulate.Outcome
	// Fields evaluates the solution; usually Outcome itself.
	Fields Sampler
	// Unknowns is the size of one linear solve (Setup.Unknowns).
	Unknowns int
	// Program names the program and version for summary.json.
	Program string
	// CaseSHA256 is the hex SHA-256 of the case file's bytes, or "".
	CaseSHA256 string
	// Load, Prepare and Solve are the wall times of those stages.
	Load, Prepare, Solve time.Duration
	// Memory, when not nil, is the peak memory tracked so far; Write
	// samples it further.
	Memory *PeakMemory
	// Warnings are recorded in summary.json before those of writing
	// (usually the case's warnings).
	Warnings []string
	// Files names files the caller has written into the output directory
	// for this run (such as a copy of the case); summary.json lists them
	// first.
	Files []string
}

// Files written by Write besides the per-probe and per-species ones.
const (
	FieldsFile  = "fields.vtu"
	SummaryFile = "summary.json"
	VelocityMap = "velocity.png"
	HistoryPlot = "history.png"
)

// ProbeFile names the CSV file of a probe.
func ProbeFile(probe string) string { return "probe-" + probe + ".csv" }

// ProbePlot names the profile figure of a probe.
func ProbePlot(probe string) string { return "probe-" + probe + ".png" }

// MoleFractionMap names the colour map of a species' mole fraction.
func MoleFractionMap(species string) string { return "x_" + species + ".png" }

// Figure sizes and sampling: the colour maps sample mapSamples points
// along the longer side of the bounding box and the arrows arrowSamples.
const (
	mapSamples   = 200
	arrowSamples = 22
	minSamples   = 8
)

// Write writes every output of r into dir, creating dir (and its parents)
// when missing, and returns the summary it wrote to summary.json. The
// files are those of the package comment, each written atomically, the
// summary last. On error the files written so far remain, complete, and
// no temporary file is left.
func Write(dir string, r *Run) (*Summary, error) {
	start := time.Now()
	if r == nil || r.Outcome == nil || r.Outcome.Setup == nil || r.Outcome.Setup.Case == nil ||
		r.Outcome.Setup.Mesh == nil || r.Fields == nil {
		panic("results: Write needs an Outcome with its Setup's Case and Mesh, and Fields")
	}
	c, m := r.Outcome.Setup.Case, r.Outcome.Setup.Mesh
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return nil, fmt.Errorf("creating the output directory: %w", err)
	}
	sum := newSummary(r)
	sample := func() {
		if r.Memory != nil {
			r.Memory.Sample()
		}
	}
	warn := func(format string, args ...any) {
		sum.Warnings = append(sum.Warnings, fmt.Sprintf(format, args...))
	}
	wrote := func(name string) { sum.Files = append(sum.Files, name) }

	// Fields on the sub-triangulation.
	qs := quantities(c)
	if len(qs) > 0 {
		sub, fields, broken := vtuData(c, m, r.Fields, qs)
		sample()
		sum.VTU = VTUInfo{Subdivision: max(1, c.Output.Subdivision), Vertices: "merged",
			Points: sub.NumPoints(), Triangles: sub.NumTriangles()}
		if broken {
			sum.VTU.Vertices = "broken"
		}
		err := WriteFileAtomic(filepath.Join(dir, FieldsFile), func(w io.Writer) error {
			return mesh.WriteVTUBinary(w, sub, fields, nil)
		})
		if err != nil {
			return nil, err
		}
		wrote(FieldsFile)
	}

	lo, hi := bounds(m)
	size := math.Max(hi[0]-lo[0], hi[1]-lo[1])

	// Probes: data, then profiles.
	for _, p := range c.Output.Probes {
		ps := sampleProbe(r.Fields, p, size)
		if ps.left > 0 {
			warn("probe %s: %d of %d points lie outside the domain and are left out", p.Name, ps.left, p.Points)
		}
		if err := WriteFileAtomic(filepath.Join(dir, ProbeFile(p.Name)), func(w io.Writer) error {
			return writeProbeCSV(w, ps, qs)
		}); err != nil {
			return nil, err
		}
		wrote(ProbeFile(p.Name))
		if len(ps.s) == 0 {
			warn("probe %s: no point lies in the domain; %s not drawn", p.Name, ProbePlot(p.Name))
			continue
		}
		unit, scale := lengthUnit(ps.s[len(ps.s)-1])
		series := make([]plotting.Series, len(c.Species))
		for i, sp := range c.Species {
			v := make([]float64, len(ps.points))
			for k, pt := range ps.points {
				v[k] = pt.MoleFraction[i]
			}
			series[i] = plotting.Series{Name: sp.Name, Values: v}
		}
		s := make([]float64, len(ps.s))
		for k, d := range ps.s {
			s[k] = d * scale
		}
		err := plotting.Profiles(filepath.Join(dir, ProbePlot(p.Name)), s, series, plotting.LineOptions{
			Title:  "mole fractions along probe " + p.Name,
			XLabel: fmt.Sprintf("s (%s): distance from (%.4g, %.4g) %s", unit, p.From[0]*scale, p.From[1]*scale, unit),
			YLabel: "mole fraction",
		})
		if err != nil {
			warn("%s not drawn: %v", ProbePlot(p.Name), err)
		} else {
			wrote(ProbePlot(p.Name))
		}
	}

	// Maps of the mole fractions and the velocity.
	unit, scale := lengthUnit(size)
	w, h := hi[0]-lo[0], hi[1]-lo[1]
	nx, ny := gridShape(w, h, mapSamples, minSamples)
	g := sampleGrid(r.Fields, len(c.Species), lo, hi, nx, ny)
	sample()
	width, height := mapSize(w, h)
	for i, sp := range c.Species {
		name := MoleFractionMap(sp.Name)
		err := plotting.ColourMap(filepath.Join(dir, name), g.grid(g.x[i], scale), plotting.MapOptions{
			Title: "mole fraction of " + sp.Name, Unit: "mole fraction", LengthUnit: unit,
			Width: width, Height: height,
		})
		if err != nil {
			warn("%s not drawn: %v", name, err)
			continue
		}
		wrote(name)
	}
	speed := make([]float64, len(g.vx))
	for k := range speed {
		speed[k] = math.Hypot(g.vx[k], g.vy[k])
	}
	ax, ay := gridShape(w, h, arrowSamples, 3)
	arrows := sampleGrid(r.Fields, len(c.Species), lo, hi, ax, ay)
	err := plotting.VectorMap(filepath.Join(dir, VelocityMap), g.grid(speed, scale),
		arrows.grid(arrows.vx, scale), arrows.grid(arrows.vy, scale), plotting.MapOptions{
			Title: "velocity", Unit: "speed (m/s)", LengthUnit: unit, Width: width, Height: height,
		})
	if err != nil {
		warn("%s not drawn: %v", VelocityMap, err)
	} else {
		wrote(VelocityMap)
	}

	// The iteration history.
	if len(sum.History) > 0 {
		its := make([]int, len(sum.History))
		series := []plotting.Series{{Name: "residual"}, {Name: "change"}, {Name: "mass-average defect"}}
		for k, it := range sum.History {
			its[k] = it.Iteration
			series[0].Values = append(series[0].Values, float64(it.Residual))
			series[1].Values = append(series[1].Values, float64(it.Change))
			series[2].Values = append(series[2].Values, float64(it.MassAverage))
		}
		err := plotting.History(filepath.Join(dir, HistoryPlot), its, series, plotting.LineOptions{
			Title: fmt.Sprintf("%s iteration (tolerance %g)", sum.Method.Nonlinear, float64(sum.Tolerance)),
		})
		if err != nil {
			warn("%s not drawn: %v", HistoryPlot, err)
		} else {
			wrote(HistoryPlot)
		}
	} else {
		warn("no iteration recorded; %s not drawn", HistoryPlot)
	}

	sample()
	if r.Memory != nil {
		sum.PeakMemoryBytes = r.Memory.Bytes()
	}
	sum.TimingSeconds.Write = seconds(time.Since(start))
	sum.TimingSeconds.Total = sum.TimingSeconds.Load + sum.TimingSeconds.Prepare +
		sum.TimingSeconds.Solve + sum.TimingSeconds.Write
	wrote(SummaryFile)
	if err := WriteFileAtomic(filepath.Join(dir, SummaryFile), func(w io.Writer) error {
		enc := json.NewEncoder(w)
		enc.SetIndent("", "  ")
		return enc.Encode(sum)
	}); err != nil {
		return nil, err
	}
	return sum, nil
}

// newSummary fills the summary from the outcome; files, warnings of
// writing, memory and the write time are added by Write.
func newSummary(r *Run) *Summary {
	o := r.Outcome
	c, m := o.Setup.Case, o.Setup.Mesh
	s := &Summary{
		Program:                   r.Program,
		Case:                      c.Source,
		CaseSHA256:                r.CaseSHA256,
		Title:                     c.Title,
		Converged:                 o.Converged,
		Iterations:                o.Iterations,
		Residual:                  Number(o.Residual),
		Tolerance:                 Number(c.Solver.Tolerance),
		Unknowns:                  r.Unknowns,
		BoundaryFlux:              map[string]map[string]Flux{},
		NetOutflow:                map[string]Flux{},
		Production:                map[string]Number{},
		SpeciesBalance:            Number(o.SpeciesBalance),
		MassAverageResidual:       Number(o.MassAverage),
		ElementConservation:       Number(o.Diagnostics.Conservation),
		WallPressureApproximation: Number(o.WallPressure),
		Method: Method{
			Formulation:         string(formulation(o)),
			Nonlinear:           string(c.Solver.Method),
			Update:              string(c.Solver.Update),
			Degree:              c.Discretisation.Degree,
			Pair:                string(c.Discretisation.Pair),
			Flux:                string(c.Discretisation.Flux),
			Quadrature:          c.Discretisation.Quadrature,
			Thermodynamics:      string(c.Thermodynamics.Model),
			Viscosity:           string(c.Viscosity.Model),
			SpeciesAugmentation: Number(speciesAugmentation(o)),
			Augmentation:        Number(c.Solver.Augmentation),
			MoleFractionFloor:   Number(c.Solver.MoleFractionFloor),
		},
		Mesh: MeshInfo{Vertices: m.NumPoints(), Triangles: m.NumTriangles(), H: Number(m.MaxEdgeLength())},
		TimingSeconds: Timing{
			Load:    seconds(r.Load),
			Prepare: seconds(r.Prepare),
			Solve:   seconds(r.Solve),
		},
		PeakMemoryMeasure: PeakMemoryMeasure,
		Units:             fieldUnits,
		History:           []Iteration{},
		Files:             append([]string{}, r.Files...),
		Warnings:          append([]string{}, r.Warnings...),
	}
	if c.Solver.Method == casefile.Anderson {
		s.Method.AndersonDepth = c.Solver.AndersonDepth
	}
	if formulation(o) == casefile.DiffusiveFlux {
		// Neither augmentation enters the diffusive-flux formulation:
		// written as null.
		s.Method.SpeciesAugmentation = Number(math.NaN())
		s.Method.Augmentation = Number(math.NaN())
	}
	s.Scales, s.Groups = scalesInfo(o.Setup.Scales)
	for _, sp := range c.Species {
		s.Species = append(s.Species, sp.Name)
	}
	net := make([]Flux, len(c.Species))
	// Sum in name order, so that the net outflow's rounding is the same
	// from run to run.
	names := make([]string, 0, len(o.BoundaryFlux))
	for name := range o.BoundaryFlux {
		names = append(names, name)
	}
	sort.Strings(names)
	for _, name := range names {
		fl := o.BoundaryFlux[name]
		per := map[string]Flux{}
		for i, f := range fl {
			if i >= len(c.Species) {
				break
			}
			per[c.Species[i].Name] = Flux{Molar: Number(f.Molar), Mass: Number(f.Mass)}
			net[i].Molar += Number(f.Molar)
			net[i].Mass += Number(f.Mass)
		}
		s.BoundaryFlux[name] = per
	}
	for i, sp := range c.Species {
		s.NetOutflow[sp.Name] = net[i]
		if i < len(o.Production) {
			s.Production[sp.Name] = Number(o.Production[i])
		}
	}
	if rep := o.Report; rep != nil {
		if rep.Method != "" {
			s.Method.Nonlinear = rep.Method
		}
		if rep.Update != "" {
			s.Method.Update = rep.Update
		}
		s.Method.Evaluations = rep.Evaluations
		for _, it := range rep.History {
			s.History = append(s.History, IterationOf(it))
		}
	}
	return s
}

// writeProbeCSV writes the header s,x,y,<columns> and one row per
// sampled point.
func writeProbeCSV(w io.Writer, ps probeSample, qs []quantity) error {
	cw := csv.NewWriter(w)
	header := []string{"s", "x", "y"}
	width := 0
	for _, q := range qs {
		header = append(header, q.columns...)
		width += q.components
	}
	if err := cw.Write(header); err != nil {
		return err
	}
	row := make([]string, len(header))
	vals := make([]float64, width)
	for k, pt := range ps.points {
		row[0] = formatFloat(ps.s[k])
		row[1] = formatFloat(ps.x[k][0])
		row[2] = formatFloat(ps.x[k][1])
		off := 0
		for _, q := range qs {
			q.get(pt, vals[off:off+q.components])
			off += q.components
		}
		for j, v := range vals {
			row[3+j] = formatFloat(v)
		}
		if err := cw.Write(row); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// formatFloat writes v with 15 significant digits, more than any field
// is accurate to and few enough that 0.014 does not print as
// 0.013999999999999999; NaN and infinities as NaN, +Inf, -Inf.
func formatFloat(v float64) string { return strconv.FormatFloat(v, 'g', 15, 64) }

// lengthUnit picks the unit of the figure axes for a length scale of size
// metres, and the factor from metres to it.
func lengthUnit(size float64) (string, float64) {
	switch {
	case size < 1e-3:
		return "µm", 1e6
	case size < 0.2:
		return "mm", 1e3
	}
	return "m", 1
}

// mapSize returns the picture size in pixels of a map of a w x h box: the
// map (with equal scales) fits a plot area of about 640 x 520 pixels, plus
// room for the title, axes and the colour bar.
func mapSize(w, h float64) (width, height int) {
	const areaW, areaH, padW, padH = 640.0, 520.0, 220.0, 130.0
	s := math.Min(areaW/w, areaH/h)
	width = int(math.Round(math.Max(w*s, 240) + padW))
	height = int(math.Round(math.Max(h*s, 160) + padH))
	return width, height
}

// speciesAugmentation is the beta the solve used: the prepared problem's,
// or, for an outcome built without one, the case's with "auto" resolved
// as the solve would.
// formulation returns the formulation that produced o: the setup's, or
// the case's when the setup does not say.
func formulation(o *simulate.Outcome) casefile.Formulation {
	if f := o.Setup.Formulation; f != "" {
		return f
	}
	if f := o.Setup.Case.Discretisation.Formulation; f != "" {
		return f
	}
	return casefile.TotalFlux
}

func speciesAugmentation(o *simulate.Outcome) float64 {
	if o.Setup.Problem != nil {
		return o.Setup.Problem.SpeciesAugmentation
	}
	return simulate.SpeciesAugmentation(o.Setup.Case)
}
