package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"image/png"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"
	"time"

	"mixwell/physics"
)

// tinyFiles are the files a run of tinyCase + tinyProbe writes.
var tinyFiles = []string{"fields.vtu", "history.png", "probe-centre.csv", "probe-centre.png", "summary.json",
	"velocity.png", "x_A.png", "x_B.png"}

func TestRunRejectsBadCases(t *testing.T) {
	for _, tc := range badCases {
		t.Run(tc.name, func(t *testing.T) {
			path := writeCase(t, tc.text)
			out := filepath.Join(filepath.Dir(path), "out")
			stdout, stderr, err := execute(t, (&fakeLib{terminal: true}).deps(), "run", path, "--out", out)
			if err == nil {
				t.Fatalf("run succeeded on a bad case; stdout:\n%s", stdout)
			}
			line := errorLine(t, stderr)
			if !strings.HasPrefix(line, "Error: "+path+":") {
				t.Errorf("error line %q does not start with the case file %s", line, path)
			}
			for _, w := range tc.want {
				if !strings.Contains(line, w) {
					t.Errorf("error line %q lacks %q", line, w)
				}
			}
			if strings.Count(stderr, "\n") != 1 {
				t.Errorf("stderr has more than the error line:\n%s", stderr)
			}
			if strings.Contains(stdout+stderr, "Usage:") {
				t.Errorf("usage shown for a bad case file")
			}
			if got := listDir(t, filepath.Dir(path)); !slices.Equal(got, []string{"case.yaml"}) {
				t.Errorf("run wrote files for a bad case: %v", got)
			}
		})
	}
}

func TestRunCountsFurtherFaults(t *testing.T) {
	text := strings.Replace(tinyCase, "4 g/mol", "4 m", 1)
	text = strings.Replace(text, "300 K", "300 Pa", 1)
	path := writeCase(t, text)
	_, stderr, err := execute(t, (&fakeLib{}).deps(), "run", path, "--out", filepath.Join(filepath.Dir(path), "out"))
	if err == nil {
		t.Fatal("run succeeded on a case with two faults")
	}
	line := errorLine(t, stderr)
	for _, w := range []string{path + ":2:", "and 1 more fault", "mixwell check " + path} {
		if !strings.Contains(line, w) {
			t.Errorf("error line %q lacks %q", line, w)
		}
	}
}

func TestRunOutIsAFile(t *testing.T) {
	path := writeCase(t, tinyCase)
	out := filepath.Join(filepath.Dir(path), "taken")
	if err := os.WriteFile(out, []byte("x"), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, dir := range []string{out, filepath.Join(out, "below")} {
		_, stderr, err := execute(t, (&fakeLib{}).deps(), "run", path, "--out", dir)
		if err == nil {
			t.Fatalf("run --out %s succeeded", dir)
		}
		if line := errorLine(t, stderr); !strings.Contains(line, "is not a directory") {
			t.Errorf("error line %q does not say the path is not a directory", line)
		}
	}
}

func TestRunWritesOutputs(t *testing.T) {
	path := writeCase(t, tinyCase+tinyProbe)
	out := filepath.Join(filepath.Dir(path), "results", "tiny")
	stdout, stderr, err := execute(t, (&fakeLib{}).deps(), "run", path, "--out", out)
	if err != nil {
		t.Fatalf("run: %v\n%s", err, stderr)
	}
	if stderr != "" {
		t.Errorf("stderr not empty without a terminal:\n%s", stderr)
	}
	if got := listDir(t, out); !slices.Equal(got, tinyFiles) {
		t.Errorf("files %v, want %v", got, tinyFiles)
	}
	for _, w := range []string{"converged in ", "outward molar flux", "bottom", "(net)", "wrote 8 files to " + out,
		"Caution: these results are model predictions", "licensed professional practice"} {
		if !strings.Contains(stdout, w) {
			t.Errorf("stdout lacks %q:\n%s", w, stdout)
		}
	}

	data, err := os.ReadFile(filepath.Join(out, "summary.json"))
	if err != nil {
		t.Fatal(err)
	}
	var sum map[string]any
	if err := json.Unmarshal(data, &sum); err != nil {
		t.Fatalf("summary.json: %v", err)
	}
	for _, key := range []string{"converged", "iterations", "residual", "unknowns", "boundary_flux", "species_balance",
		"mass_average_residual", "wall_pressure_approximation", "timing_seconds", "peak_memory_bytes", "scales",
		"groups", "method", "history", "files", "case_sha256"} {
		if _, ok := sum[key]; !ok {
			t.Errorf("summary.json lacks %q", key)
		}
	}
	if sum["converged"] != true {
		t.Errorf("converged = %v, want true", sum["converged"])
	}
	flux, _ := sum["boundary_flux"].(map[string]any)
	for _, b := range []string{"bottom", "top", "left", "right"} {
		per, _ := flux[b].(map[string]any)
		a, _ := per["A"].(map[string]any)
		if _, ok := a["molar"].(float64); !ok {
			t.Errorf("boundary_flux.%s.A.molar missing: %v", b, flux[b])
		}
		if _, ok := a["mass"].(float64); !ok {
			t.Errorf("boundary_flux.%s.A.mass missing: %v", b, flux[b])
		}
	}

	csv, err := os.ReadFile(filepath.Join(out, "probe-centre.csv"))
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(string(csv)), "\n")
	const header = "s,x,y,x_A,x_B,c_A,c_B,mu_A,mu_B,vx,vy,p,N_A_x,N_A_y,N_B_x,N_B_y,J_A_x,J_A_y,J_B_x,J_B_y," +
		"j_A_x,j_A_y,j_B_x,j_B_y,w_A,w_B,density"
	if lines[0] != header {
		t.Errorf("probe header\n%s\nwant\n%s", lines[0], header)
	}
	if len(lines) != 12 {
		t.Errorf("probe file has %d lines, want header and 11 points", len(lines))
	}
	// The first point lies on the bottom boundary, where the mole
	// fraction of A is 0.8 (tinyCase). The condition holds weakly; on this
	// coarse mesh the trace is within 3e-5 of it (measured), so 1e-3
	// leaves room.
	first := strings.Split(lines[1], ",")
	if got, want := first[slices.Index(strings.Split(header, ","), "x_A")], 0.8; !near(got, want, 1e-3) {
		t.Errorf("x_A at the bottom = %s, want %g", got, want)
	}

	for _, name := range tinyFiles {
		if !strings.HasSuffix(name, ".png") {
			continue
		}
		data, err := os.ReadFile(filepath.Join(out, name))
		if err != nil {
			t.Fatal(err)
		}
		if _, err := png.Decode(bytes.NewReader(data)); err != nil {
			t.Errorf("%s: %v", name, err)
		}
	}
}

// near reports whether the decimal s is within tol of want.
func near(s string, want, tol float64) bool {
	var v float64
	if _, err := fmt.Sscan(s, &v); err != nil {
		return false
	}
	return v-want <= tol && want-v <= tol
}

func TestRunProgress(t *testing.T) {
	for _, tc := range []struct {
		name     string
		terminal bool
		flags    []string
		table    bool // an iteration table on stderr
		json     bool // JSON lines on stderr
	}{
		{"terminal", true, nil, true, false},
		{"terminal, quiet", true, []string{"--quiet"}, false, false},
		{"pipe", false, nil, false, false},
		{"pipe, json", false, []string{"--log-json"}, false, true},
		{"terminal, json", true, []string{"--log-json"}, false, true},
	} {
		t.Run(tc.name, func(t *testing.T) {
			path := writeCase(t, tinyCase)
			out := filepath.Join(filepath.Dir(path), "out")
			args := append([]string{"run", path, "--out", out}, tc.flags...)
			stdout, stderr, err := execute(t, (&fakeLib{terminal: tc.terminal}).deps(), args...)
			if err != nil {
				t.Fatalf("run: %v\n%s", err, stderr)
			}
			if !strings.Contains(stdout, "converged in") {
				t.Errorf("no result summary on stdout:\n%s", stdout)
			}
			if got := strings.Contains(stderr, progressHeader); got != tc.table {
				t.Errorf("table on stderr: %v, want %v:\n%s", got, tc.table, stderr)
			}
			var objects int
			for _, line := range strings.Split(strings.TrimSpace(stderr), "\n") {
				if !strings.HasPrefix(line, "{") {
					continue
				}
				var rec map[string]any
				if err := json.Unmarshal([]byte(line), &rec); err != nil {
					t.Errorf("log line %q: %v", line, err)
					continue
				}
				for _, key := range []string{"iteration", "residual", "change", "mass_average", "clipped", "elapsed_seconds"} {
					if _, ok := rec[key]; !ok {
						t.Errorf("log line %q lacks %q", line, key)
					}
				}
				objects++
			}
			if (objects > 0) != tc.json {
				t.Errorf("%d JSON lines on stderr, want some: %v:\n%s", objects, tc.json, stderr)
			}
			if !tc.table && !tc.json && stderr != "" {
				t.Errorf("stderr not empty:\n%s", stderr)
			}
		})
	}
}

func TestRunNotConverged(t *testing.T) {
	// One iteration cannot reach a tolerance of 1e-14.
	path := writeCase(t, tinyCase+tinyProbe+"solver: {max_iterations: 1, tolerance: 1e-14}\n")
	out := filepath.Join(filepath.Dir(path), "out")
	stdout, stderr, err := execute(t, (&fakeLib{}).deps(), "run", path, "--out", out)
	if err == nil {
		t.Fatal("run succeeded without convergence")
	}
	line := errorLine(t, stderr)
	for _, w := range []string{"converge", "last iterate is written to " + out, "converged: false"} {
		if !strings.Contains(line, w) {
			t.Errorf("error line %q lacks %q", line, w)
		}
	}
	if !strings.Contains(stdout, "NOT converged") {
		t.Errorf("stdout does not report the failure:\n%s", stdout)
	}
	if got := listDir(t, out); !slices.Equal(got, tinyFiles) {
		t.Errorf("files %v, want %v", got, tinyFiles)
	}
	data, err := os.ReadFile(filepath.Join(out, "summary.json"))
	if err != nil {
		t.Fatal(err)
	}
	var sum struct {
		Converged  *bool `json:"converged"`
		Iterations int   `json:"iterations"`
	}
	if err := json.Unmarshal(data, &sum); err != nil || sum.Converged == nil || *sum.Converged {
		t.Errorf("summary.json converged = %v (%v), want false", sum.Converged, err)
	}
}

func TestProgressLineOf(t *testing.T) {
	for _, tc := range []struct {
		r    physics.IterationRecord
		want string
	}{
		{physics.IterationRecord{Iteration: 3, Residual: 1.5e-3, Change: 2e-2, MassAverage: 4.25e-6, Elapsed: 1250 * time.Millisecond},
			"        3    1.5000e-03    2.0000e-02    4.2500e-06      1.25 s"},
	} {
		if got := progressLineOf(tc.r); got != tc.want {
			t.Errorf("progressLineOf(%+v)\n = %q\nwant %q", tc.r, got, tc.want)
		}
		if len(progressLineOf(tc.r)) != len(progressHeader)+2 {
			t.Errorf("row %q and header %q are not aligned", progressLineOf(tc.r), progressHeader)
		}
	}
}

func TestBytesString(t *testing.T) {
	for _, tc := range []struct {
		n    uint64
		want string
	}{
		{0, "0 B"}, {1023, "1023 B"}, {1024, "1.0 KiB"}, {5 << 20, "5.0 MiB"}, {3 << 30, "3.0 GiB"},
	} {
		if got := bytesString(tc.n); got != tc.want {
			t.Errorf("bytesString(%d) = %q, want %q", tc.n, got, tc.want)
		}
	}
}

func TestRunLogJSONKeepsStderrJSON(t *testing.T) {
	// Under --log-json every line of stderr is one JSON object: the
	// iterations, the warnings ({"warning": ...}) and the final error
	// ({"error": ...}), for a run that does not converge and for a case
	// that cannot be read.
	for _, tc := range []struct {
		name, text string
		keys       []string // keys that some line must have
	}{
		{"not converged, with a warning", tinyCase + "solver: {method: picard, anderson_depth: 4, max_iterations: 1, tolerance: 1e-14}\n",
			[]string{"iteration", "warning", "error"}},
		{"bad case", tinyCase + "solver: {tolerance: 2}\n", []string{"error"}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			path := writeCase(t, tc.text)
			out := filepath.Join(filepath.Dir(path), "out")
			_, stderr, err := execute(t, (&fakeLib{}).deps(), "run", path, "--out", out, "--log-json")
			if err == nil {
				t.Fatal("run succeeded")
			}
			seen := map[string]bool{}
			for _, line := range strings.Split(strings.TrimSpace(stderr), "\n") {
				var rec map[string]any
				if err := json.Unmarshal([]byte(line), &rec); err != nil {
					t.Errorf("stderr line %q is not a JSON object: %v", line, err)
					continue
				}
				for k := range rec {
					seen[k] = true
				}
			}
			for _, k := range tc.keys {
				if !seen[k] {
					t.Errorf("no stderr line has key %q:\n%s", k, stderr)
				}
			}
		})
	}
}
