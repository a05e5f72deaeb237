package main

import (
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strings"
	"testing"
)

// tinyCase is a valid case that solves in well under a second: two
// species on a 1 cm x 2 cm rectangle of 3 x 6 cells, degree 1, open at
// the bottom and top with compositions, walls at the sides. (On 2 x 3
// cells its mass-average defect, 2.3e-2, draws the solution warning of
// simulate.MassAverageLimit; on 3 x 6 it is 5.6e-3, and the run is clean.)
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
  rectangle: {x1: 1 cm, y1: 2 cm, nx: 3, ny: 6}
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

// tinyProbe is the output section of tinyCase with one probe line.
const tinyProbe = `output:
  probes:
    - {name: centre, from: [5 mm, 0], to: [5 mm, 2 cm], points: 11}
`

// writeCase writes text as case.yaml into a new temporary directory and
// returns its path.
func writeCase(t *testing.T, text string) string {
	t.Helper()
	path := filepath.Join(t.TempDir(), "case.yaml")
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

// badCases are case files with faults, each with what the error line must
// contain (after the case file's path). position is a regular expression
// for the file:line:col that must follow "Error: ".
var badCases = []struct {
	name     string
	text     string
	position string   // regexp of what follows "Error: <path>"
	want     []string // substrings of the error line
}{
	{"unknown key", strings.Replace(tinyCase, "{degree: 1}", "{degre: 1}", 1),
		`^:13:18: discretisation\.degre: `, []string{`unknown key "degre"`, `"degree"`}},
	{"wrong unit", strings.Replace(tinyCase, "4 g/mol", "4 m", 1),
		`^:5:\d+: species\[0\]\.molar_mass: `, []string{`"m"`}},
	{"unknown boundary", tinyCase + "  west: {velocity: wall}\n",
		`^:23:3: boundaries\.west: `, []string{`no boundary "west"`}},
	{"probe outside the domain", tinyCase + "output:\n  probes:\n    - {name: far, from: [5, 0], to: [5, 20]}\n",
		`^:25:\d+: output\.probes\[0\]\.from: `, []string{`probe "far"`, "outside the domain"}},
}

func TestCheckRejectsBadCases(t *testing.T) {
	for _, tc := range badCases {
		t.Run(tc.name, func(t *testing.T) {
			path := writeCase(t, tc.text)
			stdout, stderr, err := execute(t, (&fakeLib{}).deps(), "check", path)
			if err == nil {
				t.Fatalf("check succeeded on a bad case; stdout:\n%s", stdout)
			}
			line := errorLine(t, stderr)
			rest, ok := strings.CutPrefix(line, "Error: "+path)
			if !ok || !regexp.MustCompile(tc.position).MatchString(rest) {
				t.Errorf("error line %q does not name %s followed by %s", line, path, tc.position)
			}
			for _, w := range tc.want {
				if !strings.Contains(line, w) {
					t.Errorf("error line %q lacks %q", line, w)
				}
			}
			if strings.Contains(stdout+stderr, "Usage:") {
				t.Errorf("usage shown for a bad case file:\n%s%s", stdout, stderr)
			}
			if got := listDir(t, filepath.Dir(path)); len(got) != 1 {
				t.Errorf("check wrote files: %v", got)
			}
		})
	}
}

func TestCheckListsEveryFault(t *testing.T) {
	text := strings.Replace(tinyCase, "4 g/mol", "4 m", 1)
	text = strings.Replace(text, "300 K", "300 Pa", 1)
	path := writeCase(t, text)
	_, stderr, err := execute(t, (&fakeLib{}).deps(), "check", path)
	if err == nil {
		t.Fatal("check succeeded on a case with two faults")
	}
	line := errorLine(t, stderr)
	if !strings.HasPrefix(line, "Error: "+path+":2:") {
		t.Errorf("error line %q does not name the first fault (line 2)", line)
	}
	if !strings.Contains(stderr, "\n"+path+":5:") {
		t.Errorf("second fault (line 5) not listed:\n%s", stderr)
	}
}

func TestCheckMissingFile(t *testing.T) {
	path := filepath.Join(t.TempDir(), "nosuch.yaml")
	_, stderr, err := execute(t, (&fakeLib{}).deps(), "check", path)
	if err == nil {
		t.Fatal("check succeeded on a missing file")
	}
	if line := errorLine(t, stderr); !strings.Contains(line, path) || !strings.Contains(line, "cannot read") {
		t.Errorf("error line %q does not say that %s cannot be read", line, path)
	}
}

func TestCheckDescribesCase(t *testing.T) {
	for _, tc := range []struct {
		name string
		text string
		want []string // substrings of stdout
	}{
		{"tiny", tinyCase + tinyProbe, []string{"case ", "2 species: A (4 g/mol), B (40 g/mol)", "unknowns", "S = ",
			"mesh: ", "ready to run", "no warnings"}},
		// The case reader warns about composition data for every species
		// on a no-slip wall (docs/case-format.md).
		{"warning", strings.Replace(tinyCase, "  left: {velocity: wall}",
			"  left: {velocity: wall, species: {type: composition, mole_fractions: {A: 0.5, B: 0.5}}}", 1),
			[]string{"1 warning", "case.yaml:"}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			path := writeCase(t, tc.text)
			stdout, stderr, err := execute(t, (&fakeLib{}).deps(), "check", path)
			if err != nil {
				t.Fatalf("check: %v\n%s", err, stderr)
			}
			for _, w := range tc.want {
				if !strings.Contains(stdout, w) {
					t.Errorf("stdout lacks %q:\n%s", w, stdout)
				}
			}
			if got := listDir(t, filepath.Dir(path)); len(got) != 1 {
				t.Errorf("check wrote files: %v", got)
			}
		})
	}
}

func TestCaseArgsMisuse(t *testing.T) {
	for _, tc := range []struct {
		name string
		args []string
		want string
	}{
		{"check without case", []string{"check"}, "give the case file"},
		{"check with two cases", []string{"check", "a.yaml", "b.yaml"}, "got 2 arguments"},
		{"run without case", []string{"run", "--out", "x"}, "give the case file"},
		{"run without out", []string{"run", "a.yaml"}, `"out" not set`},
		{"run with empty out", []string{"run", "a.yaml", "--out", ""}, "--out needs a directory"},
		{"run quiet and json", []string{"run", "a.yaml", "--out", "x", "--quiet", "--log-json"}, "none of the others"},
		{"demo with argument", []string{"demo", "extra"}, `unknown command "extra"`},
	} {
		t.Run(tc.name, func(t *testing.T) {
			dir := t.TempDir()
			t.Chdir(dir)
			stdout, stderr, err := execute(t, (&fakeLib{}).deps(), tc.args...)
			if err == nil {
				t.Fatalf("%v succeeded", tc.args)
			}
			if line := errorLine(t, stderr); !strings.Contains(line, tc.want) {
				t.Errorf("error line %q lacks %q", line, tc.want)
			}
			if !strings.Contains(stdout+stderr, "Usage:") {
				t.Errorf("no usage text after misuse:\n%s%s", stdout, stderr)
			}
			if got := listDir(t, dir); len(got) != 0 {
				t.Errorf("files written after misuse: %v", got)
			}
		})
	}
}

// listDir returns the names in dir.
func listDir(t *testing.T, dir string) []string {
	t.Helper()
	entries, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	var names []string
	for _, e := range entries {
		names = append(names, e.Name())
	}
	return names
}

func TestRootListsCaseCommands(t *testing.T) {
	stdout, _, err := execute(t, (&fakeLib{}).deps(), "--help")
	if err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"check", "run", "demo"} {
		if !strings.Contains(stdout, "  "+want+" ") {
			t.Errorf("root help does not list %q:\n%s", want, stdout)
		}
	}
}

func TestCaseCommandCompletion(t *testing.T) {
	for _, tc := range []struct {
		name string
		args []string
		want []string // lines of the completion output
	}{
		// Directive 8 filters files by extension, 16 offers directories
		// (cobra.ShellCompDirectiveFilterFileExt, FilterDirs).
		{"run case", []string{"run", ""}, []string{"yaml", "yml", ":8"}},
		{"check case", []string{"check", ""}, []string{"yaml", "yml", ":8"}},
		{"run second argument", []string{"run", "a.yaml", ""}, []string{":4"}},
		{"run out", []string{"run", "a.yaml", "--out", ""}, []string{":16"}},
		{"demo out", []string{"demo", "--out", ""}, []string{":16"}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			stdout, _, err := execute(t, (&fakeLib{}).deps(), append([]string{"__complete"}, tc.args...)...)
			if err != nil {
				t.Fatal(err)
			}
			lines := strings.Split(strings.TrimSpace(stdout), "\n")
			for _, w := range tc.want {
				if !slices.Contains(lines, w) {
					t.Errorf("completion %v gave %q, want a line %q", tc.args, lines, w)
				}
			}
		})
	}
}
