package solver

import (
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats"
)

func TestEquilibrateSymmetricDiagonal(t *testing.T) {
	// Closed form: for A = diag(a_i) with a_i > 0, D A D = I needs
	// d_i = 1/sqrt(a_i); the Ruiz step reaches it in one sweep.
	const tol = 1e-15
	tr := NewCOO(3, 3, 3)
	tr.Add(0, 0, 4)
	tr.Add(1, 1, 1e-6)
	tr.Add(2, 2, 2.5e8)
	a := tr.ToCSR()
	d := make([]float64, 3)
	res, err := EquilibrateSymmetricTo(d, a, &EquilibrationSettings{Tolerance: 1e-14})
	if err != nil {
		t.Fatal(err)
	}
	want := []float64{0.5, 1e3, 1 / math.Sqrt(2.5e8)}
	if !floats.EqualApprox(d, want, tol) {
		t.Errorf("d = %v, want %v", d, want)
	}
	if res.Iterations != 1 {
		t.Errorf("%d sweeps, want 1", res.Iterations)
	}
}

func TestEquilibrateSymmetricSaddle(t *testing.T) {
	// The MAC matrix mixes entries 4/h², 1/h and 1 (pinned pressure).
	const tol = 1e-3
	a, _ := macStokes(16)
	d := make([]float64, a.rows)
	res, err := EquilibrateSymmetricTo(d, a, &EquilibrationSettings{Tolerance: tol})
	if err != nil {
		t.Fatal(err)
	}
	s := a.Clone()
	s.ScaleRowsCols(d, d)
	m := make([]float64, a.rows)
	ones := make([]float64, a.rows)
	floats.AddConst(1, ones)
	symmetricMaxTo(m, ones, s)
	for i, mi := range m {
		if math.Abs(mi-1) > tol {
			t.Errorf("row %d: max |(DAD)_ij| = %v, want 1 ± %v", i, mi, tol)
			break
		}
	}
	// Symmetry is kept.
	s.DoNonZero(func(i, j int, v float64) {
		if w := s.At(j, i); math.Abs(v-w) > 1e-15*math.Abs(v) {
			t.Errorf("D A D not symmetric at (%d, %d): %v vs %v", i, j, v, w)
		}
	})
	t.Logf("MAC 16×16: Ruiz scaling reached deviation %.2g in %d sweeps", res.Deviation, res.Iterations)
}

func TestEquilibrateSymmetricErrors(t *testing.T) {
	tr := NewCOO(3, 3, 2)
	tr.Add(0, 0, 1)
	tr.Add(2, 2, 1)
	if _, err := EquilibrateSymmetricTo(make([]float64, 3), tr.ToCSR(), nil); err == nil || !strings.Contains(err.Error(), "row and column 1 are zero") {
		t.Errorf("zero row: error %v", err)
	}
	if _, err := EquilibrateSymmetricTo(nil, NewCOO(2, 3, 0).ToCSR(), nil); err == nil || !strings.Contains(err.Error(), "2×3") {
		t.Errorf("non-square: error %v", err)
	}
	tr = NewCOO(1, 1, 1)
	tr.Add(0, 0, math.Inf(1))
	if _, err := EquilibrateSymmetricTo(make([]float64, 1), tr.ToCSR(), nil); err == nil || !strings.Contains(err.Error(), "non-finite value +Inf at (0, 0)") {
		t.Errorf("infinite value: error %v", err)
	}
}
