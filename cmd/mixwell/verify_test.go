package main

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"image/png"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"mixwell/verification"
)

// fakeLib stands in for package verification: it knows the problem names,
// variants and degrees of issue 2 and "solves" by returning errors that are
// exact powers of h (u_L2 = h^(k+2), u_H1 = h^(k+1)), so that no finite
// element code runs in these tests. It records the configurations it was
// asked to run.
type fakeLib struct {
	ran      []verification.Config
	fail     error // returned by run when not nil
	terminal bool  // what isTerminal reports
}

func (f *fakeLib) deps() deps {
	return deps{
		problems: func() []verification.ProblemInfo {
			return []verification.ProblemInfo{
				{Name: "mixed-poisson", Variants: []string{"rt", "bdm"}, Degrees: map[string][]int{"rt": {0, 1, 2, 3, 4}, "bdm": {0, 1, 2, 3, 4}}},
				{Name: "poisson", Degrees: map[string][]int{"": {1, 2, 3, 4, 5}}},
				{Name: "stokes", Variants: []string{"taylor-hood", "scott-vogelius"}, Degrees: map[string][]int{"taylor-hood": {1, 2, 3, 4}, "scott-vogelius": {1, 2, 3}}},
			}
		},
		run: func(cfg verification.Config, progress func(level, unknowns int)) (*verification.Study, error) {
			f.ran = append(f.ran, cfg)
			if f.fail != nil {
				return nil, f.fail
			}
			s := &verification.Study{
				Problem:   cfg.Problem,
				Variant:   cfg.Variant,
				Degree:    cfg.Degree,
				Mesh:      "structured",
				Errors:    map[string][]float64{},
				Rates:     map[string]float64{},
				Expected:  map[string]float64{"u_L2": float64(cfg.Degree + 2), "u_H1": float64(cfg.Degree + 1)},
				PairRates: map[string][]float64{},
			}
			for l := range cfg.Levels {
				h := 1 / float64(int(4)<<l)
				s.H = append(s.H, h)
				s.Unknowns = append(s.Unknowns, 10<<(2*l))
				s.Errors["u_L2"] = append(s.Errors["u_L2"], pow(h, cfg.Degree+2))
				s.Errors["u_H1"] = append(s.Errors["u_H1"], pow(h, cfg.Degree+1))
				s.Residuals = append(s.Residuals, 1e-14)
				if l > 0 {
					s.PairRates["u_L2"] = append(s.PairRates["u_L2"], float64(cfg.Degree+2))
					s.PairRates["u_H1"] = append(s.PairRates["u_H1"], float64(cfg.Degree+1))
				}
				if progress != nil {
					progress(l, s.Unknowns[l])
				}
			}
			s.Rates["u_L2"] = float64(cfg.Degree + 2)
			s.Rates["u_H1"] = float64(cfg.Degree + 1)
			return s, nil
		},
		isTerminal: func(io.Writer) bool { return f.terminal },
	}
}

func pow(x float64, n int) float64 {
	p := 1.0
	for range n {
		p *= x
	}
	return p
}

// execute runs the root command in-process with args and returns what it
// wrote to stdout and stderr.
func execute(t *testing.T, d deps, args ...string) (stdout, stderr string, err error) {
	t.Helper()
	var out, errOut bytes.Buffer
	root := newRootCmd(d)
	root.SetArgs(args)
	root.SetOut(&out)
	root.SetErr(&errOut)
	err = root.Execute()
	return out.String(), errOut.String(), err
}

// errorLine returns the single "Error: ..." line of stderr, failing the test
// if there is not exactly one.
func errorLine(t *testing.T, stderr string) string {
	t.Helper()
	var found []string
	for _, line := range strings.Split(stderr, "\n") {
		if strings.HasPrefix(line, "Error: ") {
			found = append(found, line)
		}
	}
	if len(found) != 1 {
		t.Fatalf("stderr has %d error lines, want 1:\n%s", len(found), stderr)
	}
	return found[0]
}

func TestVerifyRejectsMisuse(t *testing.T) {
	for _, tc := range []struct {
		name string
		args []string
		want []string // substrings of the error line
	}{
		{"unknown problem", []string{"--problem", "nosuch", "--degree", "1"},
			[]string{`unknown problem "nosuch"`, "mixed-poisson, poisson, stokes"}},
		{"unknown problem without degree", []string{"--problem", "nosuch"},
			[]string{`unknown problem "nosuch"`, "mixed-poisson, poisson, stokes"}},
		{"missing problem", []string{"--degree", "1"},
			[]string{"missing --problem", "mixed-poisson, poisson, stokes"}},
		{"degree too high", []string{"--problem", "poisson", "--degree", "99"},
			[]string{"no degree 99", "1, 2, 3, 4, 5"}},
		{"degree of variant", []string{"--problem", "stokes", "--pair", "scott-vogelius", "--degree", "4"},
			[]string{"scott-vogelius", "no degree 4", "1, 2, 3"}},
		{"missing degree", []string{"--problem", "mixed-poisson"},
			[]string{"missing --degree", "0, 1, 2, 3, 4"}},
		{"format xml", []string{"--problem", "poisson", "--degree", "1", "--format", "xml"},
			[]string{`--format "xml"`, "table, json"}},
		{"flux with stokes", []string{"--problem", "stokes", "--flux", "rt", "--degree", "1"},
			[]string{"--flux applies only to --problem mixed-poisson"}},
		{"pair with poisson", []string{"--problem", "poisson", "--pair", "taylor-hood", "--degree", "1"},
			[]string{"--pair applies only to --problem stokes"}},
		{"bad flux", []string{"--problem", "mixed-poisson", "--flux", "nedelec", "--degree", "1"},
			[]string{`--flux "nedelec"`, "rt, bdm"}},
		{"one level", []string{"--problem", "poisson", "--degree", "1", "--levels", "1"},
			[]string{"--levels must be at least 2"}},
		{"negative coarse", []string{"--problem", "poisson", "--degree", "1", "--coarse", "-3"},
			[]string{"--coarse"}},
		{"bad mesh", []string{"--problem", "poisson", "--degree", "1", "--mesh", "random"},
			[]string{`--mesh "random"`, "structured, perturbed"}},
		{"seed without perturbed mesh", []string{"--problem", "poisson", "--degree", "1", "--seed", "3"},
			[]string{"--seed applies only to --mesh perturbed"}},
		{"plot as pdf", []string{"--problem", "poisson", "--degree", "1", "--plot", "conv.pdf"},
			[]string{"conv.pdf", ".png or .svg"}},
		{"stefan wall with poisson", []string{"--problem", "poisson", "--degree", "1", "--stefan-wall"},
			[]string{"--stefan-wall applies only to --problem sosm"}},
		{"flux with channel", []string{"--problem", "channel", "--degree", "1", "--flux", "rt"},
			[]string{"--flux does not apply to --problem channel"}},
		{"channel without degree", []string{"--problem", "channel"},
			[]string{"missing --degree", "1, 2, 3"}},
		{"channel degree 5", []string{"--problem", "channel", "--degree", "5"},
			[]string{"no degree 5"}},
		{"channel one level", []string{"--problem", "channel", "--degree", "1", "--levels", "1"},
			[]string{"--levels must be at least 2"}},
		{"channel bad method", []string{"--problem", "channel", "--degree", "1", "--method", "gauss"},
			[]string{`--method "gauss"`, "anderson, picard, newton-krylov"}},
		{"channel bad format", []string{"--problem", "channel", "--degree", "1", "--format", "xml"},
			[]string{`--format "xml"`, "table, json"}},
		{"channel bad closure", []string{"--problem", "channel", "--degree", "1", "--thermodynamics", "margules"},
			[]string{`--thermodynamics "margules"`, "ideal-gas, ideal-gas-at-pressure"}},
		{"closure with poisson", []string{"--problem", "poisson", "--degree", "1", "--thermodynamics", "ideal-gas"},
			[]string{"--thermodynamics applies only to --problem channel"}},
		{"positional argument", []string{"poisson"},
			[]string{`unknown command "poisson"`}},
		{"unknown flag", []string{"--problme", "poisson"},
			[]string{"unknown flag: --problme"}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			lib := &fakeLib{}
			stdout, stderr, err := execute(t, lib.deps(), append([]string{"verify"}, tc.args...)...)
			if err == nil {
				t.Fatalf("verify %v succeeded, want an error", tc.args)
			}
			line := errorLine(t, stderr)
			for _, w := range tc.want {
				if !strings.Contains(line, w) {
					t.Errorf("error line %q does not contain %q", line, w)
				}
			}
			if len(lib.ran) != 0 {
				t.Errorf("a study ran despite the bad command line: %+v", lib.ran)
			}
			// Misuse shows the usage text (cobra sends it to the
			// output stream, which these tests capture as stdout).
			if !strings.Contains(stdout+stderr, "Usage:") {
				t.Errorf("no usage text after misuse; stdout:\n%s\nstderr:\n%s", stdout, stderr)
			}
		})
	}
}

func TestVerifyMapsFlagsToConfig(t *testing.T) {
	for _, tc := range []struct {
		name string
		args []string
		want verification.Config
	}{
		{"poisson defaults", []string{"--problem", "poisson", "--degree", "3"},
			verification.Config{Problem: "poisson", Degree: 3, Levels: 4, Seed: 1}},
		{"flux bdm", []string{"--problem", "mixed-poisson", "--flux", "bdm", "--degree", "0", "--levels", "3"},
			verification.Config{Problem: "mixed-poisson", Variant: "bdm", Degree: 0, Levels: 3, Seed: 1}},
		{"flux default", []string{"--problem", "mixed-poisson", "--degree", "2"},
			verification.Config{Problem: "mixed-poisson", Variant: "rt", Degree: 2, Levels: 4, Seed: 1}},
		{"pair, perturbed mesh", []string{"--problem", "stokes", "--pair", "scott-vogelius", "--degree", "2",
			"--levels", "5", "--coarse", "3", "--mesh", "perturbed", "--seed", "42"},
			verification.Config{Problem: "stokes", Variant: "scott-vogelius", Degree: 2, Levels: 5, Coarse: 3, Perturbed: true, Seed: 42}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			lib := &fakeLib{}
			_, stderr, err := execute(t, lib.deps(), append([]string{"verify"}, tc.args...)...)
			if err != nil {
				t.Fatalf("verify %v: %v\n%s", tc.args, err, stderr)
			}
			if len(lib.ran) != 1 || lib.ran[0] != tc.want {
				t.Errorf("ran %+v, want [%+v]", lib.ran, tc.want)
			}
		})
	}
}

func TestVerifyJSON(t *testing.T) {
	lib := &fakeLib{terminal: true}
	stdout, stderr, err := execute(t, lib.deps(), "verify", "--problem", "stokes", "--degree", "2", "--levels", "3", "--format", "json", "--quiet")
	if err != nil {
		t.Fatalf("verify: %v\n%s", err, stderr)
	}
	if stderr != "" {
		t.Errorf("--quiet run wrote to stderr: %q", stderr)
	}
	var s verification.Study
	dec := json.NewDecoder(strings.NewReader(stdout))
	dec.DisallowUnknownFields()
	if err := dec.Decode(&s); err != nil {
		t.Fatalf("stdout is not a Study in JSON: %v\n%s", err, stdout)
	}
	if dec.More() {
		t.Errorf("stdout holds more than one JSON value:\n%s", stdout)
	}
	if s.Problem != "stokes" || s.Variant != "taylor-hood" || s.Degree != 2 || len(s.H) != 3 {
		t.Errorf("decoded study %+v, want stokes taylor-hood degree 2 on 3 levels", s)
	}
	// The fake's rates are exact: k+2 and k+1 for k = 2.
	const tol = 1e-12
	for norm, want := range map[string]float64{"u_L2": 4, "u_H1": 3} {
		if got := s.Rates[norm]; got < want-tol || got > want+tol {
			t.Errorf("rates[%s] = %v, want %v", norm, got, want)
		}
	}
}

func TestVerifyTable(t *testing.T) {
	lib := &fakeLib{}
	stdout, stderr, err := execute(t, lib.deps(), "verify", "--problem", "poisson", "--degree", "1", "--levels", "3")
	if err != nil {
		t.Fatalf("verify: %v\n%s", err, stderr)
	}
	for _, want := range []string{"problem poisson, degree 1", "u_L2 error", "u_H1 error", "3.00", "2.00", "expected"} {
		if !strings.Contains(stdout, want) {
			t.Errorf("table lacks %q:\n%s", want, stdout)
		}
	}
	if stderr != "" {
		t.Errorf("stderr is not a terminal, yet got %q", stderr)
	}
}

func TestVerifyProgress(t *testing.T) {
	lib := &fakeLib{terminal: true}
	_, stderr, err := execute(t, lib.deps(), "verify", "--problem", "poisson", "--degree", "1", "--levels", "3", "--format", "json")
	if err != nil {
		t.Fatalf("verify: %v\n%s", err, stderr)
	}
	lines := strings.Split(strings.TrimSpace(stderr), "\n")
	if len(lines) != 3 {
		t.Fatalf("want 3 progress lines, got:\n%s", stderr)
	}
	for i, line := range lines {
		want := fmt.Sprintf("] level %d/3 solved (%d unknowns, ", i+1, 10<<(2*i))
		if !strings.HasPrefix(line, "[") || !strings.Contains(line, want) || !strings.HasSuffix(line, " s)") {
			t.Errorf("progress line %d = %q, want %q...s)", i, line, want)
		}
	}
}

func TestVerifyPlot(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "conv.png")
	lib := &fakeLib{}
	_, stderr, err := execute(t, lib.deps(), "verify", "--problem", "poisson", "--degree", "2", "--levels", "3", "--plot", path)
	if err != nil {
		t.Fatalf("verify --plot: %v\n%s", err, stderr)
	}
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("plot not written: %v", err)
	}
	if _, err := png.Decode(bytes.NewReader(b)); err != nil {
		t.Errorf("plot is not a PNG: %v", err)
	}
}

func TestVerifyRuntimeFailure(t *testing.T) {
	for _, tc := range []struct {
		name string
		lib  *fakeLib
		args []string
		want string
	}{
		{"solver fails", &fakeLib{fail: errors.New("solver: singular matrix at pivot 17\nafter 3 retries")},
			[]string{"--problem", "poisson", "--degree", "1"}, "singular matrix at pivot 17 after 3 retries"},
		{"plot directory missing", &fakeLib{},
			[]string{"--problem", "poisson", "--degree", "1", "--plot", filepath.Join(t.TempDir(), "no", "such", "conv.svg")}, "no such file or directory"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			stdout, stderr, err := execute(t, tc.lib.deps(), append([]string{"verify"}, tc.args...)...)
			if err == nil {
				t.Fatalf("verify succeeded, want an error")
			}
			if line := errorLine(t, stderr); !strings.Contains(line, tc.want) {
				t.Errorf("error line %q does not contain %q", line, tc.want)
			}
			if strings.Contains(stdout+stderr, "Usage:") {
				t.Errorf("runtime failure printed usage text:\n%s%s", stdout, stderr)
			}
		})
	}
}

func TestVerifyCompletion(t *testing.T) {
	for _, tc := range []struct {
		name string
		args []string
		want []string
	}{
		{"problem", []string{"verify", "--problem", ""}, []string{"mixed-poisson\t", "poisson\t", "stokes\t", ":4"}},
		{"flux", []string{"verify", "--flux", ""}, []string{"rt", "bdm", ":4"}},
		{"pair", []string{"verify", "--pair", ""}, []string{"taylor-hood", "scott-vogelius", ":4"}},
		{"format", []string{"verify", "--format", ""}, []string{"json", "table", ":4"}},
		{"mesh", []string{"verify", "--mesh", ""}, []string{"structured", "perturbed", ":4"}},
		{"degree", []string{"verify", "--problem", "stokes", "--pair", "scott-vogelius", "--degree", ""}, []string{"1\n2\n3\n:4"}},
		// 8 is cobra's ShellCompDirectiveFilterFileExt.
		{"plot", []string{"verify", "--plot", ""}, []string{"png\nsvg\n:8"}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			stdout, stderr, err := execute(t, (&fakeLib{}).deps(), append([]string{"__complete"}, tc.args...)...)
			if err != nil {
				t.Fatalf("completion: %v\n%s", err, stderr)
			}
			for _, w := range tc.want {
				if !strings.Contains(stdout, w) {
					t.Errorf("completion output lacks %q:\n%s", w, stdout)
				}
			}
		})
	}
}

// The tests below use the real package verification.

func TestVerifyUnknownProblemListsRegistered(t *testing.T) {
	_, stderr, err := execute(t, defaultDeps(), "verify", "--problem", "nosuch", "--degree", "1")
	if err == nil {
		t.Fatal("verify --problem nosuch succeeded")
	}
	line := errorLine(t, stderr)
	for _, p := range verification.Problems() {
		if !strings.Contains(line, p.Name) {
			t.Errorf("error line %q does not list problem %q", line, p.Name)
		}
	}
}

func TestVerifyPoissonJSON(t *testing.T) {
	stdout, stderr, err := execute(t, defaultDeps(), "verify", "--problem", "poisson", "--degree", "1", "--levels", "2", "--format", "json")
	if err != nil {
		t.Fatalf("verify: %v\n%s", err, stderr)
	}
	var s verification.Study
	if err := json.Unmarshal([]byte(stdout), &s); err != nil {
		t.Fatalf("stdout is not a Study in JSON: %v\n%s", err, stdout)
	}
	if s.Problem != "poisson" || s.Degree != 1 || len(s.H) != 2 || len(s.Unknowns) != 2 {
		t.Errorf("study %+v, want poisson degree 1 on 2 levels", s)
	}
	if len(s.Errors) == 0 {
		t.Fatalf("study has no errors:\n%s", stdout)
	}
	for norm, e := range s.Errors {
		if len(e) != 2 {
			t.Errorf("errors[%s] has %d entries, want 2", norm, len(e))
		}
		if _, ok := s.Rates[norm]; !ok {
			t.Errorf("rates lacks norm %s", norm)
		}
		if _, ok := s.Expected[norm]; !ok {
			t.Errorf("expected lacks norm %s", norm)
		}
	}
}

func TestWriteChannelTable(t *testing.T) {
	// The table prints one row per level and the study's summary line
	// with the values given (made-up numbers: only the layout is tested).
	st := &verification.ChannelStudy{Degree: 1, Formulation: "total-flux", Thermodynamics: "ideal-gas-at-pressure", Inlet: "velocity", Beta: 0.3, Peclet: 6.25, S: 2.2e-8,
		Warnings: []string{"4 rows: a made-up warning"},
		Rows:     []int{4, 8}, Unknowns: []int{100, 400}, Iterations: []int{40, 41}, Converged: []bool{true, false},
		PatchFlux: []float64{8.5e-4, 8.6e-4}, OutletA: []float64{0.25, 0.26}, MassAverageLevels: []float64{4e-3, 2e-3},
		EOSDefect: []float64{3e-2, 1e-2}, Seconds: []float64{1, 2},
		Balance: 1e-15, MassAverage: 2e-3, Truncation: 1.5e-3, PatchFluxChange: 1.2e-2}
	var b bytes.Buffer
	writeChannelTable(&b, st)
	out := b.String()
	for _, want := range []string{"total-flux, ideal-gas-at-pressure, velocity inlet, beta 0.3, Peclet number 6.25", "warning: 4 rows: a made-up warning", "EOS defect", "1.000e-02", "false", "truncation 1.500e-03", "patch flux change 1.200e-02"} {
		if !strings.Contains(out, want) {
			t.Errorf("table lacks %q:\n%s", want, out)
		}
	}
	if n := strings.Count(out, "\n"); n != 6 {
		t.Errorf("table has %d lines, want 6 (title, header, 2 levels, summary, warning):\n%s", n, out)
	}
}

func TestChannelConfigTakesBeta(t *testing.T) {
	// --beta reaches the channel benchmark (docs/augmentation.md compares
	// beta on it); the study itself is not run here.
	for _, tc := range []struct {
		args []string
		want float64
	}{
		{[]string{"--problem", "channel", "--degree", "2", "--beta", "0.3"}, 0.3},
		{[]string{"--problem", "channel", "--degree", "1"}, 0},
		{[]string{"--problem", "channel", "--degree", "1", "--beta", "-1"}, -1},
	} {
		cmd, o := newVerifyCmdOptions((&fakeLib{}).deps())
		if err := cmd.ParseFlags(tc.args); err != nil {
			t.Fatal(err)
		}
		cfg, err := o.channelConfig(cmd)
		if err != nil {
			t.Fatalf("%v: %v", tc.args, err)
		}
		if cfg.Beta != tc.want {
			t.Errorf("%v: beta %g, want %g", tc.args, cfg.Beta, tc.want)
		}
	}
}

func TestChannelConfigTakesFormulationAndSpeed(t *testing.T) {
	// --formulation and --mean-speed reach the channel benchmark
	// (docs/augmentation.md compares the formulations over the Peclet
	// number), and their misuse is named; the study is not run here.
	cmd, o := newVerifyCmdOptions((&fakeLib{}).deps())
	args := []string{"--problem", "channel", "--degree", "1", "--formulation", "diffusive-flux", "--mean-speed", "0.05", "--inlet", "mass-flux"}
	if err := cmd.ParseFlags(args); err != nil {
		t.Fatal(err)
	}
	cfg, err := o.channelConfig(cmd)
	if err != nil {
		t.Fatalf("%v: %v", args, err)
	}
	if cfg.Formulation != "diffusive-flux" || o.meanSpeed != 0.05 || o.inlet != "mass-flux" {
		t.Errorf("%v: formulation %q, mean speed %g, inlet %q", args, cfg.Formulation, o.meanSpeed, o.inlet)
	}
	for _, tc := range []struct {
		args []string
		want string
	}{
		{[]string{"--formulation", "mixed"}, `"mixed"`},
		{[]string{"--formulation", "diffusive-flux", "--beta", "0.3"}, "--beta does not apply to --formulation diffusive-flux"},
		{[]string{"--formulation", "diffusive-flux", "--thermodynamics", "ideal-gas-at-pressure"}, "--thermodynamics ideal-gas only"},
		{[]string{"--formulation", "diffusive-flux", "--method", "picard"}, "--method anderson only"},
		{[]string{"--mean-speed", "0"}, "--mean-speed must be positive"},
		{[]string{"--inlet", "pipe"}, `"pipe"`},
		{[]string{"--mean-speed", "-1"}, "--mean-speed must be positive"},
	} {
		cmd, o := newVerifyCmdOptions((&fakeLib{}).deps())
		args := append([]string{"--problem", "channel", "--degree", "1"}, tc.args...)
		if err := cmd.ParseFlags(args); err != nil {
			t.Fatal(err)
		}
		if _, err := o.channelConfig(cmd); err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%v: error %v, want one containing %q", args, err, tc.want)
		}
	}
	_, stderr, err := execute(t, sosmDeps(&fakeLib{}), "verify", "--problem", "stokes", "--degree", "1", "--mean-speed", "2")
	if err == nil || !strings.Contains(stderr, "--mean-speed applies only to --problem channel") {
		t.Errorf("--mean-speed with stokes: error %v, stderr %q", err, stderr)
	}
}

func TestVerifySOSMFormulation(t *testing.T) {
	// --formulation reaches the sosm study, and its misuse is named.
	f := &fakeLib{}
	d := sosmDeps(f)
	if _, stderr, err := execute(t, d, "verify", "--problem", "sosm", "--degree", "1", "--flavour", "frozen", "--formulation", "diffusive-flux", "--quiet"); err != nil {
		t.Fatalf("%v\n%s", err, stderr)
	}
	if len(f.ran) != 1 || f.ran[0].Formulation != "diffusive-flux" {
		t.Fatalf("ran %+v, want one sosm study with the diffusive-flux formulation", f.ran)
	}
	for _, tc := range []struct {
		name string
		args []string
		want string
	}{
		{"unknown", []string{"--problem", "sosm", "--degree", "1", "--flavour", "frozen", "--formulation", "mixed"}, `"mixed"`},
		{"nonlinear flavour", []string{"--problem", "sosm", "--degree", "1", "--formulation", "diffusive-flux"}, "--flavour frozen only, not nonlinear"},
		{"with beta", []string{"--problem", "sosm", "--degree", "1", "--flavour", "frozen", "--formulation", "diffusive-flux", "--beta", "0.3"}, "--beta does not apply"},
		{"other problem", []string{"--problem", "stokes", "--degree", "1", "--formulation", "diffusive-flux"}, "--formulation applies only to --problem sosm or channel"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, stderr, err := execute(t, d, append([]string{"verify"}, tc.args...)...)
			if err == nil {
				t.Fatal("no error")
			}
			if line := errorLine(t, stderr); !strings.Contains(line, tc.want) {
				t.Errorf("error line %q does not contain %q", line, tc.want)
			}
		})
	}
}

// sosmDeps is f's dependencies with the sosm problem registered too.
func sosmDeps(f *fakeLib) deps {
	d := f.deps()
	base := d.problems
	d.problems = func() []verification.ProblemInfo {
		return append(base(), verification.ProblemInfo{Name: "sosm", Variants: []string{"bdm", "rt", "scott-vogelius"},
			Degrees: map[string][]int{"bdm": {1, 2, 3}, "rt": {1, 2, 3}, "scott-vogelius": {1, 2, 3}}})
	}
	return d
}

func TestVerifySOSMPair(t *testing.T) {
	// --pair chooses the velocity–pressure pair of the sosm study as it
	// does for stokes; --flux scott-vogelius stays its synonym.
	for _, tc := range []struct {
		args    []string
		variant string
	}{
		{[]string{"--pair", "scott-vogelius"}, "scott-vogelius"},
		{[]string{"--pair", "scott-vogelius", "--flux", "bdm"}, "scott-vogelius"},
		{[]string{"--flux", "scott-vogelius"}, "scott-vogelius"},
		{[]string{"--pair", "taylor-hood", "--flux", "rt"}, "rt"},
		{[]string{"--pair", "taylor-hood"}, "bdm"},
	} {
		f := &fakeLib{}
		args := append([]string{"verify", "--problem", "sosm", "--degree", "1", "--quiet"}, tc.args...)
		if _, stderr, err := execute(t, sosmDeps(f), args...); err != nil {
			t.Fatalf("%v: %v\n%s", tc.args, err, stderr)
		}
		if len(f.ran) != 1 || f.ran[0].Variant != tc.variant {
			t.Errorf("%v: ran %+v, want variant %s", tc.args, f.ran, tc.variant)
		}
	}
	for _, tc := range []struct {
		args []string
		want string
	}{
		{[]string{"--problem", "sosm", "--pair", "scott-vogelius", "--flux", "rt"}, "comes with BDM fluxes, not --flux rt"},
		{[]string{"--problem", "sosm", "--pair", "mini"}, `--pair "mini" is not available for --problem sosm`},
		{[]string{"--problem", "mixed-poisson", "--pair", "taylor-hood"}, "--pair applies only to --problem stokes or sosm"},
	} {
		_, stderr, err := execute(t, sosmDeps(&fakeLib{}), append([]string{"verify", "--degree", "1"}, tc.args...)...)
		if err == nil {
			t.Errorf("%v: no error", tc.args)
			continue
		}
		if line := errorLine(t, stderr); !strings.Contains(line, tc.want) {
			t.Errorf("%v: error line %q does not contain %q", tc.args, line, tc.want)
		}
	}
}

func TestVerifySOSMStefanWall(t *testing.T) {
	// --stefan-wall reaches the study's configuration with the
	// diffusive-flux formulation and is refused with the total-flux one.
	f := &fakeLib{}
	args := []string{"verify", "--problem", "sosm", "--flavour", "frozen", "--formulation", "diffusive-flux", "--stefan-wall", "--degree", "1", "--quiet"}
	if _, stderr, err := execute(t, sosmDeps(f), args...); err != nil {
		t.Fatalf("%v\n%s", err, stderr)
	}
	if len(f.ran) != 1 || !f.ran[0].StefanWall || f.ran[0].Formulation != "diffusive-flux" {
		t.Errorf("ran %+v, want one diffusive-flux study with the Stefan wall", f.ran)
	}
	_, stderr, err := execute(t, sosmDeps(&fakeLib{}), "verify", "--problem", "sosm", "--flavour", "frozen", "--degree", "1", "--stefan-wall")
	if err == nil || !strings.Contains(stderr, "--stefan-wall applies only to --formulation diffusive-flux") {
		t.Errorf("total-flux with --stefan-wall: error %v, stderr %q", err, stderr)
	}
}
