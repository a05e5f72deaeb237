package casefile_test

import (
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"mixwell/casefile"
)

// baseCase is a small valid case that the table below breaks one way at a
// time. Its data are invented.
const baseCase = `title: test case
temperature: 300 K
reference_pressure: 1 bar
species:
  - name: A
    molar_mass: 2 g/mol
  - name: B
    molar_mass: 32 g/mol
  - name: C
    molar_mass: 28 g/mol
diffusivities:
  A: {B: 6e-5 m^2/s, C: 7e-5 m^2/s}
  B: {C: 2e-5 m^2/s}
thermodynamics: ideal-gas
viscosity: 1.8e-5 Pa s
geometry:
  rectangle: {x1: 1 cm, y1: 2 cm, nx: 4, ny: 8, names: {left: wall, right: wall}}
boundaries:
  bottom:
    velocity: stefan-wall
    species:
      type: composition
      mole_fractions: {A: 0.5, B: 0.3, C: 0.2}
      impermeable: [C]
  top:
    velocity: {type: open, pressure: 0}
    species:
      type: composition
      mole_fractions: {A: 0.1, B: 0.1, C: 0.8}
  wall:
    velocity: slip
`

// polygonGeometry replaces the rectangle of baseCase by a polygon with the
// same boundary names.
const polygonGeometry = `  polygon:
    outline:
      - {name: bottom, points: [[0, 0]]}
      - {name: wall, points: [[1, 0]]}
      - {name: top, points: [[1, 1]]}
      - {name: wall, points: [[0, 1]]}
  meshing: {cell_size: 0.1}`

const rectLine = "  rectangle: {x1: 1 cm, y1: 2 cm, nx: 4, ny: 8, names: {left: wall, right: wall}}"

// lineCol returns the 1-based line and column of the first occurrence of
// sub in s, or 0, 0.
func lineCol(s, sub string) (int, int) {
	i := strings.Index(s, sub)
	if i < 0 {
		return 0, 0
	}
	line := strings.Count(s[:i], "\n") + 1
	return line, i - strings.LastIndex(s[:i], "\n")
}

func TestParseValidBase(t *testing.T) {
	for _, tc := range []struct{ name, text string }{
		{"rectangle", baseCase},
		{"polygon", strings.Replace(baseCase, rectLine, polygonGeometry, 1)},
	} {
		c, err := casefile.Parse("case.yaml", []byte(tc.text))
		if err != nil {
			t.Fatalf("%s: unexpected error:\n%v", tc.name, err)
		}
		if len(c.Warnings) != 0 {
			t.Errorf("%s: unexpected warnings %v", tc.name, c.Warnings)
		}
	}
}

func TestParseErrors(t *testing.T) {
	poly := func(outline string) [2]string {
		return [2]string{rectLine, "  polygon:\n    outline:\n" + outline + "\n  meshing: {cell_size: 0.1}"}
	}
	for _, tc := range []struct {
		name string
		edit [][2]string // replacements applied to baseCase, in order
		at   string      // text at the reported line (and column, if col)
		col  bool
		path string
		msg  string
	}{
		{name: "unknown key", edit: [][2]string{{"temperature: 300 K", "temperature: 300 K\ntemprature: 3"}},
			at: "temprature", col: true, path: "temprature", msg: `unknown key "temprature" (did you mean "temperature"?); allowed: title, temperature,`},
		{name: "repeated key", edit: [][2]string{{"reference_pressure: 1 bar", "reference_pressure: 1 bar\nreference_pressure: 2 bar"}},
			at: "reference_pressure: 2 bar", col: true, path: "reference_pressure", msg: `key "reference_pressure" repeated (first at line 3)`},
		{name: "molar mass unit", edit: [][2]string{{"molar_mass: 32 g/mol", "molar_mass: 32 m"}},
			at: "32 m", col: true, path: "species[1].molar_mass", msg: `unit "m" has dimension length, want mass/amount (e.g. kg/mol)`},
		{name: "negative molar mass", edit: [][2]string{{"molar_mass: 28 g/mol", "molar_mass: -28 g/mol"}},
			at: "-28 g/mol", col: true, path: "species[2].molar_mass", msg: "-28 g/mol (-0.028 in SI units) is not positive"},
		{name: "zero diffusivity", edit: [][2]string{{"B: {C: 2e-5 m^2/s}", "B: {C: 0}"}},
			at: "C: 0}", path: "diffusivities.B.C", msg: "0 is not positive"},
		{name: "diffusivity unit", edit: [][2]string{{"C: 2e-5 m^2/s}", "C: 2e-5 m/s}"}},
			at: "2e-5 m/s", col: true, path: "diffusivities.B.C", msg: `unit "m/s" has dimension length/time, want length^2/time (e.g. m^2/s)`},
		{name: "missing pair", edit: [][2]string{{"  B: {C: 2e-5 m^2/s}\n", ""}},
			at: "  A: {B:", path: "diffusivities", msg: "Stefan–Maxwell diffusivity missing for the pair (B, C)"},
		{name: "self pair", edit: [][2]string{{"B: {C: 2e-5 m^2/s}", "B: {C: 2e-5 m^2/s, B: 1e-5}"}},
			at: "B: 1e-5", path: "diffusivities.B.B", msg: "a pair needs two different species"},
		{name: "pair of unknown species", edit: [][2]string{{"B: {C: 2e-5 m^2/s}", "B: {C: 2e-5 m^2/s, D: 1e-5}"}},
			at: "D: 1e-5", col: true, path: "diffusivities.B.D", msg: `unknown species "D"; the species are A, B, C`},
		{name: "conflicting pair", edit: [][2]string{{"B: {C: 2e-5 m^2/s}", "B: {C: 2e-5 m^2/s, A: 5e-5}"}},
			at: "5e-5", col: true, path: "diffusivities.B.A", msg: "given twice with different values"},
		{name: "one species", edit: [][2]string{{"  - name: B\n    molar_mass: 32 g/mol\n  - name: C\n    molar_mass: 28 g/mol\n", ""}},
			at: "  - name: A", path: "species", msg: "at least 2 species, got 1"},
		{name: "repeated species", edit: [][2]string{{"- name: C", "- name: B"}},
			at: "B\n    molar_mass: 28", col: true, path: "species[2].name", msg: `species "B" repeated (also species[1])`},
		{name: "unknown species in composition", edit: [][2]string{{"{A: 0.5, B: 0.3, C: 0.2}", "{A: 0.5, B: 0.3, X: 0.2}"}},
			at: "X: 0.2", col: true, path: "boundaries.bottom.species.mole_fractions.X", msg: `unknown species "X"`},
		{name: "composition sum", edit: [][2]string{{"{A: 0.1, B: 0.1, C: 0.8}", "{A: 0.1, B: 0.1, C: 0.7}"}},
			at: "{A: 0.1, B: 0.1, C: 0.7}", col: true, path: "boundaries.top.species.mole_fractions", msg: `mole fractions on boundary "top" sum to 0.9, not 1`},
		{name: "negative mole fraction", edit: [][2]string{{"{A: 0.1, B: 0.1, C: 0.8}", "{A: -0.1, B: 0.3, C: 0.8}"}},
			at: "-0.1", col: true, path: "boundaries.top.species.mole_fractions.A", msg: "-0.1 is negative"},
		{name: "unknown boundary", edit: [][2]string{{"  wall:\n    velocity: slip", "  wall:\n    velocity: slip\n  side:\n    velocity: slip"}},
			at: "side:", col: true, path: "boundaries.side", msg: `no boundary "side" in the geometry; its boundaries are bottom, top, wall`},
		{name: "boundary without condition", edit: [][2]string{{"  wall:\n    velocity: slip\n", ""}},
			at: "  bottom:", path: "boundaries", msg: "no condition for the boundary wall of the geometry"},
		{name: "outflow everywhere", edit: [][2]string{
			{"velocity: stefan-wall", "velocity: open"}, {"    species:\n      type: composition\n      mole_fractions: {A: 0.5, B: 0.3, C: 0.2}\n      impermeable: [C]", "    species: outflow"},
			{"    species:\n      type: composition\n      mole_fractions: {A: 0.1, B: 0.1, C: 0.8}", "    species: outflow"},
			{"    velocity: slip", "    velocity: open\n    species: outflow"}},
			at: "  bottom:", path: "boundaries", msg: "species outflow on every boundary"},
		{name: "composition for every species on a stefan-wall", edit: [][2]string{{"C: 0.2}\n      impermeable: [C]", "C: 0.2}"}},
			at: "      type: composition\n      mole_fractions: {A: 0.5", path: "boundaries.bottom.species", msg: "leave its normal velocity undetermined"},
		{name: "outflow on a wall", edit: [][2]string{{"    velocity: slip", "    velocity: slip\n    species: outflow"}},
			at: "outflow", col: true, path: "boundaries.wall.species", msg: "outflow needs velocity type open, got slip"},
		{name: "convective inflow on an open boundary", edit: [][2]string{{"      type: composition\n      mole_fractions: {A: 0.1", "      type: convective-inflow\n      mole_fractions: {A: 0.1"}},
			at: "type: convective-inflow", path: "boundaries.top.species", msg: "convective-inflow needs velocity type inflow"},
		{name: "degC for a pressure", edit: [][2]string{{"reference_pressure: 1 bar", "reference_pressure: 20 degC"}},
			at: "20 degC", col: true, path: "reference_pressure", msg: "temperature scale, allowed only for absolute temperatures"},
		{name: "degC in a product", edit: [][2]string{{"temperature: 300 K", "temperature: 300 degC s"}},
			at: "300 degC s", col: true, path: "temperature", msg: "cannot be combined with other units"},
		{name: "ambiguous denominator", edit: [][2]string{{"reference_pressure: 1 bar", "reference_pressure: 1 kg/m s^2"}},
			at: "1 kg/m s^2", col: true, path: "reference_pressure", msg: "write the whole denominator in parentheses"},
		{name: "unknown unit", edit: [][2]string{{"reference_pressure: 1 bar", "reference_pressure: 1 psi"}},
			at: "1 psi", col: true, path: "reference_pressure", msg: `unknown symbol "psi"`},
		{name: "missing temperature", edit: [][2]string{{"temperature: 300 K\n", ""}},
			at: "title:", path: "temperature", msg: "missing; give the temperature"},
		{name: "degree out of range", edit: [][2]string{{"viscosity: 1.8e-5 Pa s", "viscosity: 1.8e-5 Pa s\ndiscretisation: {degree: 5}"}},
			at: "5}", col: true, path: "discretisation.degree", msg: "5 is out of range; want 1 to 4"},
		{name: "misspelt flux family", edit: [][2]string{{"viscosity: 1.8e-5 Pa s", "viscosity: 1.8e-5 Pa s\ndiscretisation: {flux: bdn}"}},
			at: "bdn", col: true, path: "discretisation.flux", msg: `"bdn" is not one of bdm, rt (did you mean "bdm"?)`},
		{name: "misspelt formulation", edit: [][2]string{{"viscosity: 1.8e-5 Pa s", "viscosity: 1.8e-5 Pa s\ndiscretisation: {formulation: difusive-flux}"}},
			at: "difusive-flux", col: true, path: "discretisation.formulation", msg: `"difusive-flux" is not one of total-flux, diffusive-flux (did you mean "diffusive-flux"?)`},
		{name: "unknown formulation", edit: [][2]string{{"viscosity: 1.8e-5 Pa s", "viscosity: 1.8e-5 Pa s\ndiscretisation:\n  degree: 1\n  formulation: mixed"}},
			at: "mixed", col: true, path: "discretisation.formulation", msg: `"mixed" is not one of total-flux, diffusive-flux`},
		{name: "formulation as a list", edit: [][2]string{{"viscosity: 1.8e-5 Pa s", "viscosity: 1.8e-5 Pa s\ndiscretisation: {formulation: [total-flux]}"}},
			at: "[total-flux]", col: true, path: "discretisation.formulation", msg: "want one of total-flux, diffusive-flux, got a list"},
		{name: "key not used by velocity type", edit: [][2]string{{"velocity: {type: open, pressure: 0}", "velocity: {type: open, speed: 1}"}},
			at: "speed", col: true, path: "boundaries.top.velocity.speed", msg: `key "speed" is not used by velocity type open; allowed: type, pressure`},
		{name: "inflow without speed", edit: [][2]string{{"velocity: {type: open, pressure: 0}", "velocity: inflow"}},
			at: "inflow", col: true, path: "boundaries.top.velocity", msg: "an inflow needs mean_speed or vector"},
		{name: "flux without basis", edit: [][2]string{{"    velocity: slip", "    velocity: slip\n    species: {type: flux, fluxes: {A: 1}}"}},
			at: "{type: flux", col: true, path: "boundaries.wall.species.basis", msg: "say whether the fluxes are molar"},
		{name: "mass flux with molar unit", edit: [][2]string{{"    velocity: slip", "    velocity: slip\n    species: {type: flux, basis: mass, fluxes: {A: 1 mol/(m^2 s)}}"}},
			at: "1 mol/(m^2 s)", col: true, path: "boundaries.wall.species.fluxes.A", msg: "want mass/(length^2 time) (e.g. kg/(m^2 s))"},
		{name: "ideal solution without a volume", edit: [][2]string{{"thermodynamics: ideal-gas", "thermodynamics: {model: ideal-solution, molar_volumes: {A: 1e-5, B: 2e-5}}"}},
			at: "{A: 1e-5", col: true, path: "thermodynamics.molar_volumes", msg: "missing for species C"},
		{name: "interactions for ideal gas", edit: [][2]string{{"thermodynamics: ideal-gas", "thermodynamics: {model: ideal-gas, interactions: {A: {B: 1}}}"}},
			at: "interactions", col: true, path: "thermodynamics.interactions", msg: "not used by the model ideal-gas"},
		{name: "wilke without a species", edit: [][2]string{{"viscosity: 1.8e-5 Pa s", "viscosity: {model: wilke, pure: {A: 1e-5, C: 2e-5}}"}},
			at: "{A: 1e-5", col: true, path: "viscosity.pure", msg: "missing for species B"},
		{name: "layers do not fit", edit: [][2]string{{rectLine, rectLine + "\n  meshing: {layers: {top: {first: 1 mm, ratio: 2, count: 5}}}"}},
			at: "top: {first", col: true, path: "geometry.meshing.layers.top", msg: "m thick in total, not less than the extent 0.02 m"},
		{name: "layers on unknown boundary", edit: [][2]string{{rectLine, rectLine + "\n  meshing: {layers: {lid: {first: 1 mm, ratio: 1.1, count: 2}}}"}},
			at: "lid:", col: true, path: "geometry.meshing.layers.lid", msg: `no boundary "lid" in the geometry; its boundaries are bottom, top, wall`},
		{name: "cell size for a rectangle", edit: [][2]string{{rectLine, rectLine + "\n  meshing: {cell_size: 1 mm}"}},
			at: "cell_size", col: true, path: "geometry.meshing.cell_size", msg: "not used for a rectangle"},
		{name: "empty rectangle", edit: [][2]string{{"x1: 1 cm", "x1: 0"}},
			at: "0, y1", col: true, path: "geometry.rectangle.x1", msg: "x1 = 0 must exceed x0 = 0"},
		{name: "two shapes", edit: [][2]string{{rectLine, rectLine + "\n  mesh_file: x.mesh"}},
			at: "  rectangle:", path: "geometry", msg: "give only one of rectangle, polygon or mesh_file, got rectangle and mesh_file"},
		{name: "polygon with two points", edit: [][2]string{poly("      - {name: bottom, points: [[0, 0], [1, 0]]}")},
			at: "      - {name: bottom", path: "geometry.polygon.outline", msg: "2 points; a loop needs at least 3"},
		{name: "polygon with a repeated point", edit: [][2]string{poly("      - {name: bottom, points: [[0, 0], [1, 0], [1, 1], [1, 0]]}")},
			at: "[1, 0]]}", col: true, path: "geometry.polygon.outline[0].points[3]", msg: "point (1, 0) repeats geometry.polygon.outline[0].points[1] (line 19)"},
		{name: "crossing polygon", edit: [][2]string{poly("      - {name: bottom, points: [[0, 0], [2, 0], [0, 1], [1, 1]]}")},
			at: "[1, 1]]}", col: true, path: "geometry.polygon.outline[0].points[3]", msg: "that starts at geometry.polygon.outline[0].points[1] (line 19); the boundary must not cross or touch itself"},
		{name: "hole outside", edit: [][2]string{poly("      - {name: bottom, points: [[0, 0], [1, 0], [1, 1], [0, 1]]}\n    holes:\n      - [{name: top, points: [[2, 2], [3, 2], [3, 3]]}]")},
			at: "      - [{name: top", path: "geometry.polygon.holes[0]", msg: "the hole lies outside the outline"},
		{name: "parabolic inflow on a bent boundary", edit: [][2]string{
			poly("      - {name: bottom, points: [[0, 0], [1, 0]]}\n      - {name: top, points: [[1, 1], [0.5, 1.5]]}\n      - {name: wall, points: [[0, 1]]}"),
			{"velocity: {type: open, pressure: 0}", "velocity: {type: inflow, profile: parabolic, mean_speed: 1 mm/s}"},
			{"      type: composition\n      mole_fractions: {A: 0.1", "      type: convective-inflow\n      mole_fractions: {A: 0.1"}},
			at: "{type: inflow", col: true, path: "boundaries.top.velocity", msg: "a parabolic inflow needs a straight boundary"},
		{name: "parabolic fluxes on a bent boundary", edit: [][2]string{
			poly("      - {name: bottom, points: [[0, 0], [1, 0]]}\n      - {name: top, points: [[1, 1], [0.5, 1.5]]}\n      - {name: wall, points: [[0, 1]]}"),
			{"velocity: {type: open, pressure: 0}\n    species:\n      type: composition\n      mole_fractions: {A: 0.1, B: 0.1, C: 0.8}", "velocity: stefan-wall\n    species: {type: flux, basis: mass, profile: parabolic, fluxes: {A: -1 g/(m^2 s)}}"}},
			at: "{type: flux", col: true, path: "boundaries.top.species", msg: "parabolic fluxes need a straight boundary"},
		{name: "unknown flux profile", edit: [][2]string{{"    velocity: slip", "    velocity: slip\n    species: {type: flux, basis: mass, profile: cubic, fluxes: {A: 0}}"}},
			at: "cubic", col: true, path: "boundaries.wall.species.profile", msg: `"cubic" is not one of uniform, parabolic`},
		{name: "cell size and max area", edit: [][2]string{{rectLine, polygonGeometry}, {"  meshing: {cell_size: 0.1}", "  meshing: {cell_size: 0.1, max_area: 1e-3}"}},
			at: "max_area", col: true, path: "geometry.meshing.max_area", msg: "give cell_size or max_area, not both"},
		{name: "min angle too large", edit: [][2]string{{rectLine, polygonGeometry}, {"{cell_size: 0.1}", "{cell_size: 0.1, min_angle: 40}"}},
			at: "40}", col: true, path: "geometry.meshing.min_angle", msg: "40 degrees is too large"},
		{name: "floor too large", edit: [][2]string{{"viscosity: 1.8e-5 Pa s", "viscosity: 1.8e-5 Pa s\nsolver: {mole_fraction_floor: 0.4}"}},
			at: "0.4}", col: true, path: "solver.mole_fraction_floor", msg: "3 species times the floor must stay below 1"},
		{name: "species augmentation word", edit: [][2]string{{"viscosity: 1.8e-5 Pa s", "viscosity: 1.8e-5 Pa s\nsolver: {species_augmentation: often}"}},
			at: "often}", col: true, path: "solver.species_augmentation", msg: `"often" is neither auto nor a number >= 0`},
		{name: "negative species augmentation", edit: [][2]string{{"viscosity: 1.8e-5 Pa s", "viscosity: 1.8e-5 Pa s\nsolver: {species_augmentation: -1}"}},
			at: "-1}", col: true, path: "solver.species_augmentation", msg: "-1 is negative"},
		{name: "unknown method", edit: [][2]string{{"viscosity: 1.8e-5 Pa s", "viscosity: 1.8e-5 Pa s\nsolver: {method: newton}"}},
			at: "newton}", col: true, path: "solver.method", msg: `"newton" is not one of anderson, picard, newton-krylov`},
		{name: "probe of zero length", edit: [][2]string{{"viscosity: 1.8e-5 Pa s", "viscosity: 1.8e-5 Pa s\noutput: {probes: [{name: p, from: [0, 0], to: [0 m, 0 mm]}]}"}},
			at: "[0 m, 0 mm]", col: true, path: "output.probes[0].to", msg: "the end point equals the start point"},
		{name: "unknown field", edit: [][2]string{{"viscosity: 1.8e-5 Pa s", "viscosity: 1.8e-5 Pa s\noutput: {fields: [velocity, vorticity]}"}},
			at: "vorticity", col: true, path: "output.fields[1]", msg: `"vorticity" is not one of mole-fraction,`},
		{name: "no composition anywhere", edit: [][2]string{
			{"    species:\n      type: composition\n      mole_fractions: {A: 0.5, B: 0.3, C: 0.2}\n      impermeable: [C]\n", ""},
			{"    species:\n      type: composition\n      mole_fractions: {A: 0.1, B: 0.1, C: 0.8}\n", ""}},
			at: "title:", path: "initial.mole_fractions", msg: "no boundary gives a composition"},
		{name: "alias", edit: [][2]string{{"temperature: 300 K", "temperature: &t 300 K\ntitle2: *t"}},
			at: "*t", col: true, msg: "aliases (*t) are not supported"},
		{name: "list instead of mapping", edit: [][2]string{{"viscosity: 1.8e-5 Pa s", "viscosity: [1, 2]"}},
			at: "[1, 2]", col: true, path: "viscosity", msg: "want a mapping with keys model, value, pure, bulk, got a list"},
		{name: "empty value", edit: [][2]string{{"temperature: 300 K", "temperature:"}},
			at: "temperature:", path: "temperature", msg: "got an empty value"},
		{name: "integer with a fraction", edit: [][2]string{{"nx: 4", "nx: 4.5"}},
			at: "4.5", col: true, path: "geometry.rectangle.nx", msg: `want an integer, got "4.5"`},
	} {
		text := baseCase
		for _, e := range tc.edit {
			if !strings.Contains(text, e[0]) {
				t.Fatalf("%s: edit target %q not in the case", tc.name, e[0])
			}
			text = strings.Replace(text, e[0], e[1], 1)
		}
		line, col := lineCol(text, tc.at)
		if line == 0 {
			t.Fatalf("%s: %q not in the edited case", tc.name, tc.at)
		}
		_, err := casefile.Parse("case.yaml", []byte(text))
		if err == nil {
			t.Errorf("%s: no error", tc.name)
			continue
		}
		var first *casefile.Error
		if !errors.As(err, &first) {
			t.Errorf("%s: error %T is not a *casefile.Error", tc.name, err)
			continue
		}
		var hit *casefile.Error
		for _, e := range err.(casefile.Errors) {
			if strings.Contains(e.Message, tc.msg) {
				hit = e
				break
			}
		}
		if hit == nil {
			t.Errorf("%s: no error says %q; got:\n%v", tc.name, tc.msg, err)
			continue
		}
		if hit.File != "case.yaml" || hit.Line != line || (tc.col && hit.Column != col) || hit.Path != tc.path {
			t.Errorf("%s: got %s:%d:%d path %q, want line %d (column %d, checked %v) path %q\n%v",
				tc.name, hit.File, hit.Line, hit.Column, hit.Path, line, col, tc.col, tc.path, err)
		}
		want := fmt.Sprintf("case.yaml:%d:", line)
		if s := hit.Error(); !strings.HasPrefix(s, want) || (tc.path != "" && !strings.Contains(s, " "+tc.path+": ")) {
			t.Errorf("%s: Error() = %q, want prefix %q and the path %q", tc.name, s, want, tc.path)
		}
	}
}

// TestErrorFormat pins the printed form of an error.
func TestErrorFormat(t *testing.T) {
	text := strings.Replace(baseCase, "molar_mass: 32 g/mol", "molar_mass: 32 m", 1)
	_, err := casefile.Parse("case.yaml", []byte(text))
	const want = `case.yaml:8:17: species[1].molar_mass: unit "m" has dimension length, want mass/amount (e.g. kg/mol)`
	if err == nil || err.Error() != want {
		t.Errorf("got  %v\nwant %s", err, want)
	}
}

func TestParseSeveralErrors(t *testing.T) {
	text := strings.Replace(baseCase, "reference_pressure: 1 bar", "reference_pressure: 1 m", 1)
	text = strings.Replace(text, "nx: 4", "nx: 0", 1)
	text = strings.Replace(text, "velocity: slip", "velocity: sliding", 1)
	_, err := casefile.Parse("case.yaml", []byte(text))
	var es casefile.Errors
	if !errors.As(err, &es) {
		t.Fatalf("got %v, want casefile.Errors", err)
	}
	var paths []string
	for _, e := range es {
		paths = append(paths, e.Path)
	}
	want := []string{"reference_pressure", "geometry.rectangle.nx", "boundaries.wall.velocity"}
	if !slices.Equal(paths, want) {
		t.Errorf("paths %q, want %q (in file order)\n%v", paths, want, err)
	}
}

func TestParseSyntaxErrors(t *testing.T) {
	for _, tc := range []struct {
		name, text string
		prefix     string
		msg        string
	}{
		{"empty", "", "case.yaml: ", "empty case file"},
		{"only comments", "# nothing\n", "case.yaml: ", "empty case file"},
		{"bad indentation", "title: x\n  temperature: 3\n", "case.yaml:2", "YAML syntax"},
		{"two documents", baseCase + "---\ntitle: y\n", "case.yaml:", "a second YAML document"},
		{"not a mapping", "- 1\n- 2\n", "case.yaml:1:1: ", "want a mapping with keys title"},
	} {
		_, err := casefile.Parse("case.yaml", []byte(tc.text))
		if err == nil || !strings.HasPrefix(err.Error(), tc.prefix) || !strings.Contains(err.Error(), tc.msg) {
			t.Errorf("%s: got %v, want prefix %q and %q", tc.name, err, tc.prefix, tc.msg)
		}
	}
}

func TestParseWarnings(t *testing.T) {
	for _, tc := range []struct {
		name string
		edit [2]string
		at   string
		path string
		msg  string
	}{
		{"composition on a no-slip wall", [2]string{"velocity: stefan-wall\n    species:\n      type: composition\n      mole_fractions: {A: 0.5, B: 0.3, C: 0.2}\n      impermeable: [C]", "velocity: wall\n    species:\n      type: composition\n      mole_fractions: {A: 0.5, B: 0.3, C: 0.2}"},
			"      type: composition\n      mole_fractions: {A: 0.5", "boundaries.bottom.species", "describe a reservoir, not a wall"},
		{"zero mole fraction without layers", [2]string{"{A: 0.1, B: 0.1, C: 0.8}", "{A: 0, B: 0.2, C: 0.8}"},
			"      type: composition\n      mole_fractions: {A: 0,", "boundaries.top.species", "mole fraction 0 for A: the solver raises it to 1e-06"},
		{"anderson depth with picard", [2]string{"viscosity: 1.8e-5 Pa s", "viscosity: 1.8e-5 Pa s\nsolver: {method: picard, anderson_depth: 4}"},
			"4}", "solver.anderson_depth", "used only by method anderson"},
		{"sloped slip", [2]string{rectLine, strings.Replace(polygonGeometry, "[[0, 1]]", "[[0.5, 1]]", 1)},
			"    velocity: slip", "boundaries.wall.velocity", "slip only on axis-parallel segments"},
	} {
		text := strings.Replace(baseCase, tc.edit[0], tc.edit[1], 1)
		if text == baseCase {
			t.Fatalf("%s: edit target not found", tc.name)
		}
		c, err := casefile.Parse("case.yaml", []byte(text))
		if err != nil {
			t.Fatalf("%s: %v", tc.name, err)
		}
		line, _ := lineCol(text, tc.at)
		if len(c.Warnings) != 1 {
			t.Fatalf("%s: got %d warnings %v, want 1", tc.name, len(c.Warnings), c.Warnings)
		}
		w := c.Warnings[0]
		if w.Line != line || w.Path != tc.path || !strings.Contains(w.Message, tc.msg) {
			t.Errorf("%s: got %s, want line %d path %q message containing %q", tc.name, w, line, tc.path, tc.msg)
		}
		if !strings.HasPrefix(w.String(), fmt.Sprintf("case.yaml:%d:", line)) {
			t.Errorf("%s: String() = %q lacks file:line", tc.name, w)
		}
	}
}

// TestParseDefaults checks the documented defaults on the minimal base
// case.
func TestParseDefaults(t *testing.T) {
	c, err := casefile.Parse("case.yaml", []byte(baseCase))
	if err != nil {
		t.Fatal(err)
	}
	wantSolver := casefile.Solver{Method: casefile.Anderson, Tolerance: 1e-10, MaxIterations: 60, AndersonDepth: 10,
		SpeciesAugmentation: casefile.AutoSpeciesAugmentation, Augmentation: 1, Update: casefile.PotentialUpdate, MoleFractionFloor: 1e-6}
	if c.Solver != wantSolver {
		t.Errorf("solver defaults %+v, want %+v", c.Solver, wantSolver)
	}
	wantDisc := casefile.Discretisation{Degree: 2, Flux: casefile.BDM, Pair: casefile.TaylorHood, Formulation: casefile.TotalFlux}
	if c.Discretisation != wantDisc {
		t.Errorf("discretisation defaults %+v, want %+v", c.Discretisation, wantDisc)
	}
	if !slices.Equal(c.Output.Fields, casefile.AllFields) || c.Output.Subdivision != 3 || len(c.Output.Probes) != 0 {
		t.Errorf("output defaults %+v", c.Output)
	}
	if c.Gravity != [2]float64{} || c.Viscosity.Bulk != 0 || c.Viscosity.Model != casefile.ConstantViscosity {
		t.Errorf("gravity %v, viscosity %+v", c.Gravity, c.Viscosity)
	}
	wall := c.Boundary("wall")
	if wall == nil || wall.Species.Kind != casefile.Impermeable || wall.Velocity.Kind != casefile.Slip {
		t.Errorf("wall %+v, want slip and impermeable by default", wall)
	}
	if top := c.Boundary("top"); top == nil || top.Velocity.Pressure != 0 {
		t.Errorf("top %+v", top)
	}
	r := c.Geometry.Rectangle
	if r == nil || r.X0 != 0 || r.Y0 != 0 || r.Names != [4]string{"bottom", "wall", "top", "wall"} {
		t.Errorf("rectangle %+v", r)
	}
	if !slices.Equal(c.Geometry.Names, []string{"bottom", "top", "wall"}) {
		t.Errorf("names %q", c.Geometry.Names)
	}
	p, err := casefile.Parse("case.yaml", []byte(strings.Replace(baseCase, rectLine, polygonGeometry, 1)))
	if err != nil {
		t.Fatal(err)
	}
	// Equilateral triangle of side 0.1: area sqrt(3)/4 * 0.01 (closed form).
	const tol = 1e-15
	if m := p.Geometry.Meshing; m.MinAngle != 25 || math.Abs(m.MaxArea-math.Sqrt(3)/4*0.01) > tol || m.Refinements != 0 {
		t.Errorf("polygon meshing defaults %+v", m)
	}
}

// TestMetresAndMillimetres checks that the same case written in metres and
// in millimetres gives the same SI data.
func TestMetresAndMillimetres(t *testing.T) {
	mm := strings.Replace(baseCase, rectLine, "  rectangle: {x1: 10 mm, y1: 20 mm, nx: 4, ny: 8, names: {left: wall, right: wall}}", 1)
	mm = strings.Replace(mm, "A: {B: 6e-5 m^2/s, C: 7e-5 m^2/s}", "A: {B: 60 mm^2/s, C: 70 mm^2/s}", 1)
	m := strings.Replace(baseCase, rectLine, "  rectangle: {x1: 0.01, y1: 0.02, nx: 4, ny: 8, names: {left: wall, right: wall}}", 1)
	a, err := casefile.Parse("mm.yaml", []byte(mm))
	if err != nil {
		t.Fatal(err)
	}
	b, err := casefile.Parse("m.yaml", []byte(m))
	if err != nil {
		t.Fatal(err)
	}
	const tol = 1e-15 // relative; one rounding of the unit scale
	close := func(x, y float64) bool { return math.Abs(x-y) <= tol*math.Abs(y) }
	ra, rb := a.Geometry.Rectangle, b.Geometry.Rectangle
	if !close(ra.X1, rb.X1) || !close(ra.Y1, rb.Y1) {
		t.Errorf("rectangle %+v vs %+v", ra, rb)
	}
	for i := range a.Diffusivities {
		if !close(a.Diffusivities[i].Value, b.Diffusivities[i].Value) {
			t.Errorf("diffusivity %d: %g vs %g", i, a.Diffusivities[i].Value, b.Diffusivities[i].Value)
		}
	}
}

func TestMeshFile(t *testing.T) {
	dir := t.TempDir()
	const square = "mixwell-mesh 1\npoints 4\n0 0\n1 0\n1 1\n0 1\ntriangles 2\n0 1 2\n0 2 3\n"
	named := square + "boundary 4\n0 1 1\n1 2 2\n2 3 2\n3 0 2\ntag 1 bottom\ntag 2 rest\n"
	write := func(name, text string) {
		if err := os.WriteFile(filepath.Join(dir, name), []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	write("named.mesh", named)
	write("unnamed.mesh", square)
	boundaries := `boundaries:
  bottom:
    velocity: stefan-wall
    species: {type: composition, mole_fractions: {A: 0.5, B: 0.3, C: 0.2}, impermeable: [C]}
  rest:
    velocity: slip
`
	head := baseCase[:strings.Index(baseCase, "geometry:")]
	good := head + "geometry:\n  mesh_file: named.mesh\n  mesh_unit: cm\n" + boundaries
	c, err := casefile.Parse(filepath.Join(dir, "case.yaml"), []byte(good))
	if err != nil {
		t.Fatal(err)
	}
	mf := c.Geometry.MeshFile
	if mf == nil || mf.Mesh.NumTriangles() != 2 || mf.Mesh.Points[2] != [2]float64{0.01, 0.01} {
		t.Fatalf("mesh file %+v", mf)
	}
	if !slices.Equal(c.Geometry.Names, []string{"bottom", "rest"}) {
		t.Errorf("names %q", c.Geometry.Names)
	}
	for _, tc := range []struct{ name, file, msg string }{
		{"missing file", "absent.mesh", "cannot open the mesh file"},
		{"unnamed tag", "unnamed.mesh", "boundary tag 1 has no name"},
	} {
		text := strings.Replace(good, "named.mesh", tc.file, 1)
		_, err := casefile.Parse(filepath.Join(dir, "case.yaml"), []byte(text))
		line, col := lineCol(text, tc.file)
		want := fmt.Sprintf("case.yaml:%d:%d: geometry.mesh_file: ", line, col)
		if err == nil || !strings.Contains(err.Error(), want) || !strings.Contains(err.Error(), tc.msg) {
			t.Errorf("%s: got %v, want %q and %q", tc.name, err, want, tc.msg)
		}
	}
}

func TestLoadMissingFile(t *testing.T) {
	_, err := casefile.Load(filepath.Join(t.TempDir(), "absent.yaml"))
	var e *casefile.Error
	if !errors.As(err, &e) || !strings.Contains(e.File, "absent.yaml") {
		t.Errorf("got %v", err)
	}
}

func TestParseWarnsAboutClosuresInFlowThrough(t *testing.T) {
	// docs/outflow.md: with an outflow boundary, ideal-gas lets the total
	// concentration drift; ideal-gas-at-pressure does not.
	outflow := [2]string{"    species:\n      type: composition\n      mole_fractions: {A: 0.1, B: 0.1, C: 0.8}", "    species: outflow"}
	partial := [2]string{"      impermeable: [C]", "      impermeable: [B, C]"}
	normalised := [2]string{"thermodynamics: ideal-gas\n", "thermodynamics: ideal-gas-at-pressure\n"}
	for _, tc := range []struct {
		name  string
		edits [][2]string
		at    string // text at the warning's line ("" for no warning)
		path  string
		msg   string
	}{
		{"ideal gas with outflow", [][2]string{outflow}, "    species: outflow", "boundaries.top.species", "total concentration can drift"},
		{"ideal gas with outflow and partial composition", [][2]string{outflow, partial}, "    species: outflow", "boundaries.top.species", "total concentration can drift"},
		{"normalised with outflow and partial composition", [][2]string{outflow, partial, normalised}, "", "", ""},
		{"ideal gas without outflow", [][2]string{partial}, "", "", ""},
	} {
		text := baseCase
		for _, e := range tc.edits {
			if !strings.Contains(text, e[0]) {
				t.Fatalf("%s: edit target %q not found", tc.name, e[0])
			}
			text = strings.Replace(text, e[0], e[1], 1)
		}
		c, err := casefile.Parse("case.yaml", []byte(text))
		if err != nil {
			t.Fatalf("%s: %v", tc.name, err)
		}
		if tc.at == "" {
			if len(c.Warnings) != 0 {
				t.Errorf("%s: warnings %v, want none", tc.name, c.Warnings)
			}
			continue
		}
		line, _ := lineCol(text, tc.at)
		if len(c.Warnings) != 1 {
			t.Fatalf("%s: got %d warnings %v, want 1", tc.name, len(c.Warnings), c.Warnings)
		}
		if w := c.Warnings[0]; w.Line != line || w.Path != tc.path || !strings.Contains(w.Message, tc.msg) {
			t.Errorf("%s: got %s, want line %d path %q message containing %q", tc.name, w, line, tc.path, tc.msg)
		}
	}
}

// TestParseFormulation checks the values of discretisation.formulation and
// that the position of the key's value is kept for later messages.
func TestParseFormulation(t *testing.T) {
	for _, tc := range []struct {
		name, text string
		want       casefile.Formulation
		at         string // where the value is written; "" when not given
	}{
		{"default", baseCase, casefile.TotalFlux, ""},
		{"total-flux", strings.Replace(baseCase, "viscosity: 1.8e-5 Pa s", "viscosity: 1.8e-5 Pa s\ndiscretisation: {degree: 1, formulation: total-flux}", 1),
			casefile.TotalFlux, "total-flux}"},
		{"diffusive-flux", strings.Replace(baseCase, "viscosity: 1.8e-5 Pa s", "viscosity: 1.8e-5 Pa s\ndiscretisation:\n  formulation: diffusive-flux", 1),
			casefile.DiffusiveFlux, "diffusive-flux"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			c, err := casefile.Parse("case.yaml", []byte(tc.text))
			if err != nil {
				t.Fatal(err)
			}
			if got := c.Discretisation.Formulation; got != tc.want {
				t.Errorf("formulation %q, want %q", got, tc.want)
			}
			var line, col int
			if tc.at != "" {
				line, col = lineCol(tc.text, tc.at)
			}
			if p := c.Discretisation.FormulationPos; p.Line != line || p.Column != col || (line > 0 && p.File != "case.yaml") {
				t.Errorf("formulation position %v, want case.yaml:%d:%d", p, line, col)
			}
			if !strings.Contains(c.Summary(), string(tc.want)+" formulation") {
				t.Errorf("summary does not name the formulation %s:\n%s", tc.want, c.Summary())
			}
		})
	}
}

func TestParseFluxProfile(t *testing.T) {
	// Flux data are uniform unless profile: parabolic is given, where the
	// fluxes are the means over the boundary.
	for _, tc := range []struct {
		name, species string
		want          casefile.Profile
	}{
		{"default", "{type: flux, basis: mass, fluxes: {A: -1 g/(m^2 s)}}", casefile.Uniform},
		{"uniform", "{type: flux, basis: mass, profile: uniform, fluxes: {A: -1 g/(m^2 s)}}", casefile.Uniform},
		{"parabolic", "{type: flux, basis: molar, profile: parabolic, fluxes: {A: -1 mol/(m^2 s), B: -2 mol/(m^2 s)}}", casefile.Parabolic},
	} {
		t.Run(tc.name, func(t *testing.T) {
			text := strings.Replace(baseCase, "    velocity: {type: open, pressure: 0}\n    species:\n      type: composition\n      mole_fractions: {A: 0.1, B: 0.1, C: 0.8}",
				"    velocity: stefan-wall\n    species: "+tc.species, 1)
			c, err := casefile.Parse("case.yaml", []byte(text))
			if err != nil {
				t.Fatal(err)
			}
			for _, b := range c.Boundaries {
				if b.Name != "top" {
					continue
				}
				if b.Species.Kind != casefile.Flux || b.Species.Profile != tc.want {
					t.Errorf("top: species %s with profile %q, want flux with %q", b.Species.Kind, b.Species.Profile, tc.want)
				}
				return
			}
			t.Error("no boundary top")
		})
	}
}
