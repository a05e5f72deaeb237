package main

import (
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"mixwell/casefile"
)

func TestDemoCaseIsOurs(t *testing.T) {
	data, err := demoFiles.ReadFile(demoCase)
	if err != nil {
		t.Fatal(err)
	}
	c, err := casefile.Parse(demoCase, data)
	if err != nil {
		t.Fatalf("the demonstration case does not parse: %v", err)
	}
	if len(c.Warnings) > 0 {
		t.Errorf("the demonstration case has warnings: %v", c.Warnings)
	}
	if c.Geometry.Kind != casefile.RectangleGeometry {
		t.Errorf("geometry %s, want a rectangle", c.Geometry.Kind)
	}
	if len(c.Species) != 3 {
		t.Errorf("%d species, want 3", len(c.Species))
	}
	// Only the boundary kinds the solver supports in this build.
	for _, b := range c.Boundaries {
		if b.Velocity.Kind == casefile.StefanWall || b.Species.Kind == casefile.Outflow {
			t.Errorf("boundary %s uses %s/%s", b.Name, b.Velocity.Kind, b.Species.Kind)
		}
	}
	if !strings.Contains(string(data), "invented") {
		t.Errorf("the demonstration case does not say that its data are invented")
	}
}

func TestDemoWritesIntoOut(t *testing.T) {
	dir := t.TempDir()
	t.Chdir(dir)
	out := filepath.Join(dir, "demo")
	stdout, stderr, err := execute(t, (&fakeLib{}).deps(), "demo", "--out", out, "--quiet")
	if err != nil {
		t.Fatalf("demo: %v\n%s", err, stderr)
	}
	want := []string{"case.yaml", "fields.vtu", "history.png", "probe-axis.csv", "probe-axis.png", "probe-section.csv",
		"probe-section.png", "summary.json", "velocity.png", "x_carrier.png", "x_heavy.png", "x_light.png"}
	if got := listDir(t, out); !slices.Equal(got, want) {
		t.Errorf("files %v, want %v", got, want)
	}
	if got := listDir(t, dir); !slices.Equal(got, []string{"demo"}) {
		t.Errorf("demo wrote outside --out: %v", got)
	}
	if !strings.Contains(stdout, "converged in") || !strings.Contains(stdout, "Caution:") {
		t.Errorf("stdout:\n%s", stdout)
	}
	copied, err := os.ReadFile(filepath.Join(out, "case.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	embedded, _ := demoFiles.ReadFile(demoCase)
	if string(copied) != string(embedded) {
		t.Errorf("case.yaml differs from the embedded case")
	}
	summary, err := os.ReadFile(filepath.Join(out, "summary.json"))
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(string(summary), `"case.yaml"`) {
		t.Errorf("summary.json does not list case.yaml among the files")
	}
}

func TestDemoShowCase(t *testing.T) {
	dir := t.TempDir()
	t.Chdir(dir)
	stdout, stderr, err := execute(t, (&fakeLib{}).deps(), "demo", "--show-case")
	if err != nil {
		t.Fatalf("demo --show-case: %v\n%s", err, stderr)
	}
	if _, err := casefile.Parse("shown.yaml", []byte(stdout)); err != nil {
		t.Errorf("the case shown does not parse: %v", err)
	}
	if got := listDir(t, dir); len(got) != 0 {
		t.Errorf("demo --show-case wrote files: %v", got)
	}
}
