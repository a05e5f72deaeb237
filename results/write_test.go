package results

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"encoding/xml"
	"image/png"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"
	"time"

	"mixwell/casefile"
	"mixwell/mesh"
	"mixwell/physics"
	"mixwell/simulate"
)

// tinyCase is a valid two-species case on a 1 cm x 2 cm rectangle.
const tinyCase = `title: tiny box
temperature: 300 K
reference_pressure: 100 kPa
species:
  - {name: A, molar_mass: 4 g/mol}
  - {name: B, molar_mass: 40 g/mol}
diffusivities:
  A: {B: 2e-5 m^2/s}
thermodynamics: ideal-gas-at-pressure
viscosity: 2e-5 Pa s
geometry:
  rectangle: {x1: 1 cm, y1: 2 cm, nx: 2, ny: 3}
discretisation: {degree: 1}
boundaries:
  bottom:
    velocity: open
    species: {type: composition, mole_fractions: {A: 0.8, B: 0.2}}
  top:
    velocity: open
    species: {type: composition, mole_fractions: {A: 0.1, B: 0.9}}
  left: {velocity: wall}
  right: {velocity: wall}
`

const probes = `output:
  probes:
    - {name: centre, from: [5 mm, 0], to: [5 mm, 2 cm], points: 11}
    - {name: across, from: [0, 1.8 cm], to: [1 cm, 1.8 cm], points: 5}
`

func parseCase(t *testing.T, text string) *casefile.Case {
	t.Helper()
	c, err := casefile.Parse("tiny.yaml", []byte(text))
	if err != nil {
		t.Fatalf("test case does not parse: %v", err)
	}
	return c
}

// fakeFields stands in for a solved case: analytic fields on the mesh
// (our own choice, affine in x and y so that every sampling path can be
// checked exactly), and an optional hole of points that are not located.
type fakeFields struct {
	m       *mesh.Mesh
	species int
	hole    func(x [2]float64) bool
}

func (f *fakeFields) NewPoint() *simulate.Point {
	n := f.species
	return &simulate.Point{C: make([]float64, n), Mu: make([]float64, n), MoleFraction: make([]float64, n),
		MassFraction: make([]float64, n), J: make([][2]float64, n), N: make([][2]float64, n), Diffusive: make([][2]float64, n)}
}

// fakeX is the mole fraction of the first species at x: 0.8 at y = 0,
// 0.1 at y = 2 cm.
func fakeX(x [2]float64) float64 { return 0.8 - 35*x[1] }

func (f *fakeFields) SampleTo(pt *simulate.Point, t int, xh [2]float64) {
	tri := f.m.Triangles[t]
	a, b, c := f.m.Points[tri[0]], f.m.Points[tri[1]], f.m.Points[tri[2]]
	var x [2]float64
	for k := range 2 {
		x[k] = a[k] + xh[0]*(b[k]-a[k]) + xh[1]*(c[k]-a[k])
	}
	pt.X = x
	pt.V = [2]float64{1e-3 * x[1], -1e-3 * x[0]}
	pt.P = 100 * x[0]
	pt.Rho = 1 + x[0]
	for i := range f.species {
		xi := fakeX(x)
		if i > 0 {
			xi = (1 - fakeX(x)) / float64(f.species-1)
		}
		pt.MoleFraction[i] = xi
		pt.MassFraction[i] = xi / 2
		pt.C[i] = 40 * xi
		pt.Mu[i] = 1000 * x[1]
		pt.J[i] = [2]float64{float64(i), x[0]}
		pt.N[i] = [2]float64{x[1], float64(i)}
		pt.Diffusive[i] = [2]float64{-x[0], -x[1]}
	}
}

func (f *fakeFields) Locate(x [2]float64) (int, [2]float64, bool) {
	if f.hole != nil && f.hole(x) {
		return 0, [2]float64{}, false
	}
	const tol = 1e-12
	for t, tri := range f.m.Triangles {
		a, b, c := f.m.Points[tri[0]], f.m.Points[tri[1]], f.m.Points[tri[2]]
		det := (b[0]-a[0])*(c[1]-a[1]) - (c[0]-a[0])*(b[1]-a[1])
		xi := ((x[0]-a[0])*(c[1]-a[1]) - (c[0]-a[0])*(x[1]-a[1])) / det
		eta := ((b[0]-a[0])*(x[1]-a[1]) - (x[0]-a[0])*(b[1]-a[1])) / det
		if xi >= -tol && eta >= -tol && xi+eta <= 1+tol {
			return t, [2]float64{xi, eta}, true
		}
	}
	return 0, [2]float64{}, false
}

// fakeRun returns a run of c with fake fields on c's rectangle.
func fakeRun(t *testing.T, c *casefile.Case, hole func([2]float64) bool) *Run {
	t.Helper()
	r := c.Geometry.Rectangle
	m, err := mesh.Rectangle(r.X0, r.Y0, r.X1, r.Y1, r.NX, r.NY, mesh.RightDiagonal)
	if err != nil {
		t.Fatal(err)
	}
	o := &simulate.Outcome{
		Setup: &simulate.Setup{Case: c, Mesh: m, Scales: physics.Scales{Length: 0.02, Concentration: 40,
			Diffusivity: 2e-5, RT: 2494, Viscosity: 2e-5, Density: 1}},
		Converged:  true,
		Iterations: 2,
		Residual:   3e-11,
		Report: &physics.NonlinearReport{Method: "anderson", Update: "potential", Converged: true, Iterations: 2,
			History: []physics.IterationRecord{
				{Iteration: 1, Residual: 1e-3, Change: 1e-2, MassAverage: 1e-4, Elapsed: time.Millisecond},
				{Iteration: 2, Residual: 3e-11, Change: 1e-9, MassAverage: 1e-6, Elapsed: 2 * time.Millisecond},
			}},
		BoundaryFlux: map[string][]simulate.Flux{
			"top":    {{Molar: 1e-6, Mass: 4e-9}, {Molar: -1e-6, Mass: -4e-8}},
			"bottom": {{Molar: -1e-6, Mass: -4e-9}, {Molar: 1e-6, Mass: 4e-8}},
			"left":   {{}, {}},
			"right":  {{}, {}},
		},
		Production:     []float64{0, 0},
		SpeciesBalance: 1e-14,
		MassAverage:    1e-6,
		WallPressure:   math.NaN(), // written as null
	}
	return &Run{Outcome: o, Fields: &fakeFields{m: m, species: len(c.Species), hole: hole}, Unknowns: 123,
		Program: "mixwell test", Memory: &PeakMemory{}, Warnings: []string{"a case warning"}}
}

func TestWriteFiles(t *testing.T) {
	c := parseCase(t, tinyCase+probes)
	dir := filepath.Join(t.TempDir(), "new", "out")
	sum, err := Write(dir, fakeRun(t, c, nil))
	if err != nil {
		t.Fatalf("Write: %v", err)
	}
	want := []string{"fields.vtu", "history.png", "probe-across.csv", "probe-across.png", "probe-centre.csv",
		"probe-centre.png", "summary.json", "velocity.png", "x_A.png", "x_B.png"}
	if got := listDir(t, dir); !slices.Equal(got, want) {
		t.Errorf("files %v, want %v", got, want)
	}
	files := slices.Sorted(slices.Values(sum.Files))
	if !slices.Equal(files, want) {
		t.Errorf("summary lists files %v, want %v", files, want)
	}
	for _, name := range want {
		if !strings.HasSuffix(name, ".png") {
			continue
		}
		data, err := os.ReadFile(filepath.Join(dir, name))
		if err != nil {
			t.Fatal(err)
		}
		if _, err := png.Decode(bytes.NewReader(data)); err != nil {
			t.Errorf("%s does not decode as PNG: %v", name, err)
		}
	}
}

func TestWriteSummaryJSON(t *testing.T) {
	c := parseCase(t, tinyCase+probes)
	dir := t.TempDir()
	if _, err := Write(dir, fakeRun(t, c, nil)); err != nil {
		t.Fatalf("Write: %v", err)
	}
	data, err := os.ReadFile(filepath.Join(dir, SummaryFile))
	if err != nil {
		t.Fatal(err)
	}
	var got map[string]any
	if err := json.Unmarshal(data, &got); err != nil {
		t.Fatalf("summary.json does not parse: %v\n%s", err, data)
	}
	for _, key := range []string{"program", "case", "title", "converged", "iterations", "residual", "tolerance",
		"unknowns", "species", "boundary_flux", "net_outflow", "production", "species_balance",
		"mass_average_residual", "element_conservation", "wall_pressure_approximation", "method", "mesh", "vtu",
		"scales", "groups", "timing_seconds", "peak_memory_bytes", "peak_memory_measure", "units", "history",
		"files", "warnings"} {
		if _, ok := got[key]; !ok {
			t.Errorf("summary.json lacks key %q", key)
		}
	}
	if got["converged"] != true || got["iterations"] != 2.0 || got["unknowns"] != 123.0 {
		t.Errorf("converged, iterations, unknowns = %v, %v, %v; want true, 2, 123", got["converged"], got["iterations"], got["unknowns"])
	}
	if m, _ := got["method"].(map[string]any); m == nil || m["formulation"] != "total-flux" {
		t.Errorf("method %v, want formulation total-flux", got["method"])
	}
	if got["wall_pressure_approximation"] != nil {
		t.Errorf("NaN written as %v, want null", got["wall_pressure_approximation"])
	}
	if mem, _ := got["peak_memory_bytes"].(float64); !(mem > 0) {
		t.Errorf("peak_memory_bytes = %v, want positive", got["peak_memory_bytes"])
	}
	var sum Summary
	if err := json.Unmarshal(data, &struct {
		BoundaryFlux *map[string]map[string]Flux `json:"boundary_flux"`
		NetOutflow   *map[string]Flux            `json:"net_outflow"`
		Timing       *Timing                     `json:"timing_seconds"`
		Groups       *Groups                     `json:"groups"`
		VTU          *VTUInfo                    `json:"vtu"`
	}{&sum.BoundaryFlux, &sum.NetOutflow, &sum.TimingSeconds, &sum.Groups, &sum.VTU}); err != nil {
		t.Fatal(err)
	}
	const tol = 1e-15 // values copied through JSON, shortest round-trip form
	if f := sum.BoundaryFlux["top"]["B"]; math.Abs(float64(f.Molar)+1e-6) > tol || math.Abs(float64(f.Mass)+4e-8) > tol {
		t.Errorf("boundary_flux.top.B = %+v, want molar -1e-6, mass -4e-8", f)
	}
	if f := sum.NetOutflow["A"]; math.Abs(float64(f.Molar)) > tol {
		t.Errorf("net_outflow.A = %+v, want 0", f)
	}
	// S = eta D / (L^2 c RT) from the fake scales (our own arithmetic).
	if s, want := float64(sum.Groups.S), 2e-5*2e-5/(0.02*0.02*40*2494); math.Abs(s-want) > 1e-12*want {
		t.Errorf("groups.S = %g, want %g", s, want)
	}
	if sum.TimingSeconds.Total < sum.TimingSeconds.Write {
		t.Errorf("timing total %g < write %g", sum.TimingSeconds.Total, sum.TimingSeconds.Write)
	}
	// Degree 1 gives subdivision 2 by default: 12 triangles of 6 own
	// vertices each, as most fields are discontinuous.
	if sum.VTU.Vertices != "broken" || sum.VTU.Points != 72 || sum.VTU.Triangles != 48 {
		t.Errorf("vtu = %+v, want broken, 72 points, 48 triangles", sum.VTU)
	}
}

func TestWriteProbeCSV(t *testing.T) {
	c := parseCase(t, tinyCase+probes)
	dir := t.TempDir()
	if _, err := Write(dir, fakeRun(t, c, nil)); err != nil {
		t.Fatalf("Write: %v", err)
	}
	f, err := os.Open(filepath.Join(dir, "probe-centre.csv"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	rows, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	header := "s,x,y,x_A,x_B,c_A,c_B,mu_A,mu_B,vx,vy,p,N_A_x,N_A_y,N_B_x,N_B_y,J_A_x,J_A_y,J_B_x,J_B_y," +
		"j_A_x,j_A_y,j_B_x,j_B_y,w_A,w_B,density"
	if got := strings.Join(rows[0], ","); got != header {
		t.Errorf("header\n%s\nwant\n%s", got, header)
	}
	if len(rows) != 12 {
		t.Fatalf("%d rows, want header and 11 points", len(rows))
	}
	col := func(row []string, name string) float64 {
		k := slices.Index(rows[0], name)
		v, err := strconv.ParseFloat(row[k], 64)
		if err != nil {
			t.Fatalf("column %s: %v", name, err)
		}
		return v
	}
	const tol = 1e-12 // affine fields sampled exactly up to rounding
	for k, row := range rows[1:] {
		y := 0.002 * float64(k)
		if s := col(row, "s"); math.Abs(s-y) > tol {
			t.Errorf("row %d: s = %g, want %g", k, s, y)
		}
		if x := col(row, "x"); math.Abs(x-0.005) > tol {
			t.Errorf("row %d: x = %g, want 0.005", k, x)
		}
		if xa := col(row, "x_A"); math.Abs(xa-fakeX([2]float64{0.005, y})) > tol {
			t.Errorf("row %d: x_A = %g, want %g", k, xa, fakeX([2]float64{0.005, y}))
		}
		if vx := col(row, "vx"); math.Abs(vx-1e-3*y) > tol {
			t.Errorf("row %d: vx = %g, want %g", k, vx, 1e-3*y)
		}
	}
}

func TestWriteProbeColumnsFollowFields(t *testing.T) {
	for _, tc := range []struct {
		name, fields string
		header       string
		vtu          string // vertices of fields.vtu
	}{
		{"velocity and pressure", "[pressure, velocity]", "s,x,y,vx,vy,p", "merged"},
		{"fractions", "[mass-fraction, mole-fraction]", "s,x,y,x_A,x_B,w_A,w_B", "broken"},
		{"density and potential", "[density, potential]", "s,x,y,mu_A,mu_B,density", "broken"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			c := parseCase(t, tinyCase+strings.Replace(probes, "output:\n", "output:\n  fields: "+tc.fields+"\n", 1))
			dir := t.TempDir()
			sum, err := Write(dir, fakeRun(t, c, nil))
			if err != nil {
				t.Fatalf("Write: %v", err)
			}
			data, err := os.ReadFile(filepath.Join(dir, "probe-across.csv"))
			if err != nil {
				t.Fatal(err)
			}
			if got, _, _ := strings.Cut(string(data), "\n"); got != tc.header {
				t.Errorf("header %q, want %q", got, tc.header)
			}
			if sum.VTU.Vertices != tc.vtu {
				t.Errorf("fields.vtu vertices %q, want %q", sum.VTU.Vertices, tc.vtu)
			}
			names := vtuArrayNames(t, filepath.Join(dir, FieldsFile))
			var want []string
			for _, col := range strings.Split(tc.header, ",")[3:] {
				switch {
				case col == "vx":
					want = append(want, "velocity")
				case col == "p":
					want = append(want, "pressure")
				case col != "vy":
					want = append(want, col)
				}
			}
			if !slices.Equal(names, want) {
				t.Errorf("fields.vtu arrays %v, want %v", names, want)
			}
		})
	}
}

// vtuArrayNames returns the names of the point data arrays of a .vtu
// file.
func vtuArrayNames(t *testing.T, path string) []string {
	t.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	// The XML part ends where the raw appended data start.
	if i := bytes.Index(data, []byte("<AppendedData")); i >= 0 {
		data = append(data[:i:i], []byte("</VTKFile>")...)
	}
	var doc struct {
		Piece struct {
			PointData struct {
				Arrays []struct {
					Name string `xml:"Name,attr"`
				} `xml:"DataArray"`
			} `xml:"PointData"`
		} `xml:"UnstructuredGrid>Piece"`
	}
	if err := xml.Unmarshal(data, &doc); err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	var names []string
	for _, a := range doc.Piece.PointData.Arrays {
		names = append(names, a.Name)
	}
	return names
}

func TestWriteProbeOutsideDomain(t *testing.T) {
	c := parseCase(t, tinyCase+probes)
	// A hole over the upper half of the centre line: 5 of its 11 points
	// (y = 12 mm .. 20 mm) are not located; the "across" probe at y = 18
	// mm lies in it entirely.
	hole := func(x [2]float64) bool { return x[1] > 0.011 }
	dir := t.TempDir()
	sum, err := Write(dir, fakeRun(t, c, hole))
	if err != nil {
		t.Fatalf("Write: %v", err)
	}
	data, err := os.ReadFile(filepath.Join(dir, "probe-centre.csv"))
	if err != nil {
		t.Fatal(err)
	}
	if rows := strings.Count(string(data), "\n"); rows != 1+6 {
		t.Errorf("probe-centre.csv has %d lines, want header and 6 points", rows)
	}
	joined := strings.Join(sum.Warnings, "\n")
	for _, want := range []string{"a case warning", "probe centre: 5 of 11 points lie outside", "probe across: no point lies in the domain"} {
		if !strings.Contains(joined, want) {
			t.Errorf("warnings lack %q:\n%s", want, joined)
		}
	}
	if _, err := os.Stat(filepath.Join(dir, "probe-across.png")); err == nil {
		t.Errorf("probe-across.png drawn without points")
	}
}

func TestCheckProbes(t *testing.T) {
	for _, tc := range []struct {
		name, probe string
		want        string // "" for no error
	}{
		{"inside", "{name: a, from: [0, 0], to: [1 cm, 2 cm]}", ""},
		{"on the edge", "{name: a, from: [1 cm, 0], to: [1 cm, 2 cm]}", ""},
		{"millimetres taken as metres", "{name: wrong, from: [5, 0], to: [5, 20]}", `output.probes[0].from: probe "wrong": point (5, 0) m lies outside`},
		{"end outside", "{name: b, from: [0, 0], to: [0, 3 cm]}", `output.probes[0].to: probe "b"`},
	} {
		t.Run(tc.name, func(t *testing.T) {
			c := parseCase(t, tinyCase+"output:\n  probes:\n    - "+tc.probe+"\n")
			r := c.Geometry.Rectangle
			m, err := mesh.Rectangle(r.X0, r.Y0, r.X1, r.Y1, r.NX, r.NY, mesh.RightDiagonal)
			if err != nil {
				t.Fatal(err)
			}
			err = CheckProbes(c, m)
			switch {
			case tc.want == "" && err != nil:
				t.Errorf("CheckProbes: %v, want no error", err)
			case tc.want != "" && (err == nil || !strings.Contains(err.Error(), tc.want)):
				t.Errorf("CheckProbes: %v, want an error containing %q", err, tc.want)
			}
		})
	}
}

func TestNumberJSON(t *testing.T) {
	for _, tc := range []struct {
		x    float64
		want string
	}{
		{1.5, "1.5"}, {1e-300, "1e-300"}, {math.NaN(), "null"}, {math.Inf(-1), "null"}, {0, "0"},
	} {
		got, err := json.Marshal(Number(tc.x))
		if err != nil || string(got) != tc.want {
			t.Errorf("Number(%g) encodes as %s (%v), want %s", tc.x, got, err, tc.want)
		}
	}
}
