package casefile_test

import (
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"mixwell/casefile"
)

// TestExampleCases loads every example case under testdata/cases: each must
// load without error or warning and print a summary.
func TestExampleCases(t *testing.T) {
	files, err := filepath.Glob(filepath.Join("..", "testdata", "cases", "*.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	if len(files) < 4 {
		t.Fatalf("found %d example cases, want at least 4", len(files))
	}
	for _, f := range files {
		c, err := casefile.Load(f)
		if err != nil {
			t.Errorf("%s:\n%v", f, err)
			continue
		}
		if len(c.Warnings) != 0 {
			t.Errorf("%s: warnings %v", f, c.Warnings)
		}
		if s := c.Summary(); !strings.Contains(s, c.Source) || !strings.Contains(s, string(c.Thermodynamics.Model)) {
			t.Errorf("%s: summary lacks the source or the model:\n%s", f, s)
		}
	}
}

// TestStefanTubeCase checks that the Stefan-tube example carries the
// published check values in SI units.
func TestStefanTubeCase(t *testing.T) {
	c, err := casefile.Load(filepath.Join("..", "testdata", "cases", "stefan-tube.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	// Carty & Schrodt, as tabulated by Taylor & Krishna, Multicomponent Mass
	// Transfer, Wiley, 1993: T = 328.5 K, P = 99.4 kPa, path 0.238 m,
	// interface x1 = 0.319, x2 = 0.528, D12 = 8.48e-6, D13 = 13.72e-6,
	// D23 = 19.91e-6 m^2/s.
	const tol = 1e-15 // relative: the unit conversion rounds once
	for _, tc := range []struct {
		name      string
		got, want float64
	}{
		{"T", c.Temperature, 328.5},
		{"P", c.Pressure, 99.4e3},
		{"length", c.Geometry.Rectangle.Y1 - c.Geometry.Rectangle.Y0, 0.238},
		{"D12", c.Diffusivities[0].Value, 8.48e-6},
		{"D13", c.Diffusivities[1].Value, 13.72e-6},
		{"D23", c.Diffusivities[2].Value, 19.91e-6},
		{"x1", c.Boundary("surface").Species.MoleFractions[0], 0.319},
		{"x2", c.Boundary("surface").Species.MoleFractions[1], 0.528},
		{"x3", c.Boundary("surface").Species.MoleFractions[2], 1 - 0.319 - 0.528},
	} {
		if math.Abs(tc.got-tc.want) > tol*math.Abs(tc.want)+1e-15 {
			t.Errorf("%s: got %.17g, want %.17g", tc.name, tc.got, tc.want)
		}
	}
	if p := c.Diffusivities[2]; p.A != "methanol" || p.B != "air" {
		t.Errorf("third pair is (%s, %s), want (methanol, air)", p.A, p.B)
	}
}

// TestDocumentedExample parses the complete example of docs/case-format.md,
// so that the documentation stays a valid case.
func TestDocumentedExample(t *testing.T) {
	doc, err := os.ReadFile(filepath.Join("..", "docs", "case-format.md"))
	if err != nil {
		t.Fatal(err)
	}
	s := string(doc)
	i := strings.Index(s, "```yaml\ntitle:")
	if i < 0 {
		t.Fatal("no complete example (a yaml block starting with title:) in docs/case-format.md")
	}
	s = s[i+len("```yaml\n"):]
	s = s[:strings.Index(s, "```")]
	c, err := casefile.Parse("case-format.md", []byte(s))
	if err != nil {
		t.Fatal(err)
	}
	if len(c.Warnings) != 0 {
		t.Errorf("warnings %v", c.Warnings)
	}
	// The example is the Stefan-tube case file from its title on.
	file, err := os.ReadFile(filepath.Join("..", "testdata", "cases", "stefan-tube.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	f := string(file)
	if k := strings.Index(f, "title:"); k < 0 || f[k:] != s {
		t.Error("the complete example of docs/case-format.md differs from testdata/cases/stefan-tube.yaml (from title: on)")
	}
}
