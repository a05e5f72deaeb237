package solver

import (
	"math/rand/v2"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/mat"
)

// denseOf returns a gonum dense copy of a built from its stored entries
// (not through At, so that At can be checked against it).
func denseOf(m *CSR) *mat.Dense {
	r, c := m.Dims()
	d := mat.NewDense(max(r, 1), max(c, 1), nil)
	m.DoNonZero(func(i, j int, v float64) { d.Set(i, j, v) })
	return d
}

func TestCOOToCSR(t *testing.T) {
	// Hand-computed: duplicates (1,2) summed to 5, (0,0) summed to 0 and
	// kept as an explicit zero.
	tr := NewCOO(3, 4, 0)
	tr.Add(1, 2, 2)
	tr.Add(2, 0, 7)
	tr.Add(0, 3, 1)
	tr.Add(1, 2, 3)
	tr.Add(0, 0, 1)
	tr.Add(0, 0, -1)
	tr.Add(1, 0, 4)
	a := tr.ToCSR()
	wantPtr := []int{0, 2, 4, 5}
	wantIdx := []int{0, 3, 0, 2, 0}
	wantVal := []float64{0, 1, 4, 5, 7}
	if !equalInts(a.RowPtr(), wantPtr) || !equalInts(a.ColIndices(), wantIdx) || !floats.Equal(a.Values(), wantVal) {
		t.Errorf("ToCSR: got ptr %v idx %v val %v, want %v %v %v", a.RowPtr(), a.ColIndices(), a.Values(), wantPtr, wantIdx, wantVal)
	}
	if r, c := a.Dims(); r != 3 || c != 4 {
		t.Errorf("Dims = %d×%d, want 3×4", r, c)
	}
	if tr.Len() != 7 {
		t.Errorf("COO Len = %d, want 7", tr.Len())
	}
	tr.Reset()
	if tr.Len() != 0 || tr.ToCSR().NNZ() != 0 {
		t.Errorf("Reset left entries")
	}
}

func TestCOOAddPanics(t *testing.T) {
	defer func() {
		r := recover()
		if r == nil || !strings.Contains(r.(string), "(3, 0) out of range") {
			t.Errorf("panic %v, want one naming index (3, 0)", r)
		}
	}()
	NewCOO(3, 3, 0).Add(3, 0, 1)
}

func TestCSRAgainstDense(t *testing.T) {
	// Reference: gonum dense matrix–vector products on the same entries.
	const tol = 1e-14
	rnd := rand.New(rand.NewPCG(1, 1))
	for _, c := range []struct {
		name       string
		rows, cols int
		density    float64
	}{
		{"square", 30, 30, 0.1},
		{"wide", 7, 19, 0.3},
		{"tall", 25, 4, 0.5},
	} {
		tr := NewCOO(c.rows, c.cols, 0)
		for i := 0; i < c.rows; i++ {
			for j := 0; j < c.cols; j++ {
				if rnd.Float64() < c.density {
					tr.Add(i, j, 2*rnd.Float64()-1)
				}
			}
		}
		a := tr.ToCSR()
		d := denseOf(a)
		// At, through the mat.Matrix interface.
		if !mat.EqualApprox(mat.DenseCopyOf(a), d, 0) {
			t.Errorf("%s: At disagrees with the stored entries", c.name)
		}
		if !mat.Equal(mat.DenseCopyOf(a.T()), d.T()) {
			t.Errorf("%s: T() disagrees with the dense transpose", c.name)
		}
		if !mat.Equal(mat.DenseCopyOf(a.Transpose()), d.T()) {
			t.Errorf("%s: Transpose disagrees with the dense transpose", c.name)
		}
		csc := a.ToCSC()
		if !mat.Equal(mat.DenseCopyOf(csc), d) || !mat.Equal(mat.DenseCopyOf(csc.ToCSR()), d) {
			t.Errorf("%s: CSR/CSC conversion changed the matrix", c.name)
		}
		x := randomVector(rnd, c.cols)
		y := randomVector(rnd, c.rows)
		var want mat.VecDense
		want.MulVec(d, mat.NewVecDense(c.cols, x))
		got := make([]float64, c.rows)
		a.MulVecTo(got, x)
		if !floats.EqualApprox(got, want.RawVector().Data, tol) {
			t.Errorf("%s: CSR MulVecTo differs from dense", c.name)
		}
		csc.MulVecTo(got, x)
		if !floats.EqualApprox(got, want.RawVector().Data, tol) {
			t.Errorf("%s: CSC MulVecTo differs from dense", c.name)
		}
		var wantT mat.VecDense
		wantT.MulVec(d.T(), mat.NewVecDense(c.rows, y))
		gotT := make([]float64, c.cols)
		a.MulVecTransTo(gotT, y)
		if !floats.EqualApprox(gotT, wantT.RawVector().Data, tol) {
			t.Errorf("%s: CSR MulVecTransTo differs from dense", c.name)
		}
		csc.MulVecTransTo(gotT, y)
		if !floats.EqualApprox(gotT, wantT.RawVector().Data, tol) {
			t.Errorf("%s: CSC MulVecTransTo differs from dense", c.name)
		}
	}
}

func TestCSRPatternReuse(t *testing.T) {
	a := laplace2D(4)
	pos := a.Index(5, 6)
	if pos < 0 || a.Values()[pos] != -1 {
		t.Fatalf("Index(5, 6) = %d, want the position of -1", pos)
	}
	if a.Index(0, 15) != -1 {
		t.Errorf("Index of an entry outside the pattern is not -1")
	}
	before := a.Clone()
	// Re-assemble the same values into the zeroed pattern in reverse.
	a.Zero()
	for i := 15; i >= 0; i-- {
		cols, vals := before.Row(i)
		for k, j := range cols {
			a.AddAt(a.Index(i, j), vals[k]/2)
			a.AddAt(a.Index(i, j), vals[k]/2)
		}
	}
	if !a.SamePattern(before) || !floats.Equal(a.Values(), before.Values()) {
		t.Errorf("re-assembly into a fixed pattern changed the matrix")
	}
	allocs := testing.AllocsPerRun(10, func() {
		a.Zero()
		a.AddAt(a.Index(3, 3), 4)
	})
	if allocs != 0 {
		t.Errorf("Zero/Index/AddAt allocated %v times, want 0", allocs)
	}
	if want := []float64{4, 4, 4, 4}; !floats.Equal(laplace2D(2).Diagonal(), want) {
		t.Errorf("Diagonal = %v, want %v", laplace2D(2).Diagonal(), want)
	}
}

func TestScaleRowsCols(t *testing.T) {
	// Hand-computed: diag(1, 2) [1 2; 3 4] diag(10, 100).
	tr := NewCOO(2, 2, 4)
	tr.Add(0, 0, 1)
	tr.Add(0, 1, 2)
	tr.Add(1, 0, 3)
	tr.Add(1, 1, 4)
	a := tr.ToCSR()
	a.ScaleRowsCols([]float64{1, 2}, []float64{10, 100})
	if want := []float64{10, 200, 60, 800}; !floats.Equal(a.Values(), want) {
		t.Errorf("ScaleRowsCols: got %v, want %v", a.Values(), want)
	}
	a.ScaleRowsCols(nil, []float64{0.1, 0.01})
	if want := []float64{1, 2, 6, 8}; !floats.EqualApprox(a.Values(), want, 1e-15) {
		t.Errorf("ScaleRowsCols with nil rows: got %v, want %v", a.Values(), want)
	}
}

func TestNewCompressedErrors(t *testing.T) {
	cases := []struct {
		name     string
		rows     int
		cols     int
		ptr, idx []int
		val      []float64
		contains string
	}{
		{"ok", 2, 2, []int{0, 1, 2}, []int{1, 0}, []float64{1, 2}, ""},
		{"short_pointer", 2, 2, []int{0, 1}, []int{1}, []float64{1}, "row pointer length 2, want 3"},
		{"bad_start", 1, 2, []int{1, 1}, []int{}, []float64{}, "starts at 1"},
		{"count", 1, 2, []int{0, 2}, []int{0}, []float64{1}, "1 column indices and 1 values, row pointer says 2"},
		{"decreasing", 2, 2, []int{0, 2, 1}, []int{0}, []float64{1}, "row pointer decreases at row 1"},
		{"range", 1, 2, []int{0, 1}, []int{5}, []float64{1}, "column index 5 out of range [0, 2) in row 0"},
		{"unsorted", 1, 3, []int{0, 2}, []int{2, 1}, []float64{1, 1}, "not strictly increasing"},
		{"duplicate", 1, 3, []int{0, 2}, []int{1, 1}, []float64{1, 1}, "not strictly increasing"},
	}
	for _, c := range cases {
		_, err := NewCSR(c.rows, c.cols, c.ptr, c.idx, c.val)
		switch {
		case c.contains == "" && err != nil:
			t.Errorf("%s: unexpected error %v", c.name, err)
		case c.contains != "" && (err == nil || !strings.Contains(err.Error(), c.contains)):
			t.Errorf("%s: error %v, want one containing %q", c.name, err, c.contains)
		}
	}
	if _, err := NewCSC(3, 1, []int{0, 2}, []int{2, 0}, []float64{1, 1}); err == nil || !strings.Contains(err.Error(), "row indices of column 0") {
		t.Errorf("NewCSC unsorted: error %v", err)
	}
	if m, err := NewCSC(3, 1, []int{0, 2}, []int{0, 2}, []float64{1, 5}); err != nil || m.At(2, 0) != 5 || m.At(1, 0) != 0 {
		t.Errorf("NewCSC valid input: %v", err)
	}
}
