package solver

import (
	"bytes"
	"errors"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

// python3 returns the interpreter to run the SciPy cross-check with: the
// system one when present (it is where Debian's python3-scipy installs),
// otherwise the first python3 on PATH.
func python3() (string, error) {
	if _, err := os.Stat("/usr/bin/python3"); err == nil {
		return "/usr/bin/python3", nil
	}
	return exec.LookPath("python3")
}

func TestScipyCrossCheck(t *testing.T) {
	if os.Getenv("MIXWELL_SCIPY_CHECK") != "1" {
		t.Skip("the SciPy cross-check is run by `make scipy-check` (or with MIXWELL_SCIPY_CHECK=1)")
	}
	// Reference: scipy.sparse.linalg.spsolve (SciPy's own sparse direct
	// solver), an implementation outside this project.
	const tol = 1e-10
	py, err := python3()
	if err != nil {
		t.Skipf("python3 not found: %v", err)
	}
	script, err := filepath.Abs(filepath.Join("testdata", "scipy_check.py"))
	if err != nil {
		t.Fatal(err)
	}
	a, _ := macStokes(30)
	n := a.rows
	rnd := rand.New(rand.NewPCG(41, 42))
	b := randomVector(rnd, n)

	dir := t.TempDir()
	write := func(name string, fn func(*os.File) error) string {
		path := filepath.Join(dir, name)
		f, err := os.Create(path)
		if err != nil {
			t.Fatal(err)
		}
		if err := fn(f); err != nil {
			t.Fatal(err)
		}
		if err := f.Close(); err != nil {
			t.Fatal(err)
		}
		return path
	}
	aPath := write("A.mtx", func(f *os.File) error { return WriteMatrixMarket(f, a) })
	bPath := write("b.mtx", func(f *os.File) error { return WriteMatrixMarketVector(f, b) })
	xPath := filepath.Join(dir, "x.mtx")

	cmd := exec.Command(py, script, aPath, bPath, xPath)
	var stdout, stderr bytes.Buffer
	cmd.Stdout, cmd.Stderr = &stdout, &stderr
	err = cmd.Run()
	var exit *exec.ExitError
	if errors.As(err, &exit) && exit.ExitCode() == 3 {
		t.Skipf("%s: %s", py, strings.TrimSpace(stderr.String()))
	}
	if err != nil {
		t.Fatalf("%s %s: %v\n%s", py, script, err, stderr.String())
	}
	t.Logf("%s", strings.TrimSpace(stdout.String()))

	xf, err := os.Open(xPath)
	if err != nil {
		t.Fatal(err)
	}
	defer xf.Close()
	want, err := ReadMatrixMarketVector(xf)
	if err != nil {
		t.Fatal(err)
	}
	if len(want) != n {
		t.Fatalf("SciPy returned %d values, want %d", len(want), n)
	}
	f, err := FactorLU(a, nil)
	if err != nil {
		t.Fatal(err)
	}
	x := make([]float64, n)
	if err := f.SolveTo(x, b); err != nil {
		t.Fatal(err)
	}
	d := relDiff(x, want)
	t.Logf("MAC 30×30 saddle point (%d unknowns): ‖x − x_scipy‖/‖x_scipy‖ = %.3g, our residual %.3g", n, d, RelativeResidual(a, x, b))
	if d > tol {
		t.Errorf("solution differs from SciPy's by %.3g > %.3g", d, tol)
	}
}
