package solver

import (
	"bytes"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats"
)

func TestMatrixMarketRoundTrip(t *testing.T) {
	rnd := rand.New(rand.NewPCG(21, 22))
	a := randomSparse(rnd, 50, 0.1)
	// Values that stress the 17-digit printing.
	a.Values()[0] = math.Pi * 1e-300
	a.Values()[1] = -1.0 / 3
	a.Values()[2] = math.MaxFloat64
	var buf bytes.Buffer
	if err := WriteMatrixMarket(&buf, a); err != nil {
		t.Fatal(err)
	}
	b, err := ReadMatrixMarket(&buf)
	if err != nil {
		t.Fatal(err)
	}
	if !a.SamePattern(b) || !floats.Equal(a.Values(), b.Values()) {
		t.Errorf("matrix round trip is not exact")
	}
	x := randomVector(rnd, 40)
	x[3] = -0.0
	x[4] = 5e-324
	buf.Reset()
	if err := WriteMatrixMarketVector(&buf, x); err != nil {
		t.Fatal(err)
	}
	y, err := ReadMatrixMarketVector(&buf)
	if err != nil {
		t.Fatal(err)
	}
	if !floats.Equal(x, y) {
		t.Errorf("vector round trip is not exact")
	}
}

func TestReadMatrixMarketExamples(t *testing.T) {
	cases := []struct {
		name string
		text string
		// want lists (i, j, value) in 0-based indices, hand-derived from
		// the text.
		want [][3]float64
		rows int
	}{
		{
			// The 5×5 example of the format description (Boisvert, Pozo
			// and Remington, NISTIR 5935), from memory.
			name: "nist_example",
			text: `%%MatrixMarket matrix coordinate real general
%=================================================================================
%
% This ASCII file represents a sparse MxN matrix with L
% nonzeros in the following Matrix Market format:
%
%=================================================================================
  5  5  8
    1     1   1.000e+00
    2     2   1.050e+01
    3     3   1.500e-02
    1     4   6.000e+00
    4     2   2.505e+02
    4     4  -2.800e+02
    4     5   3.332e+01
    5     5   1.200e+01
`,
			rows: 5,
			want: [][3]float64{{0, 0, 1}, {0, 3, 6}, {1, 1, 10.5}, {2, 2, 0.015}, {3, 1, 250.5}, {3, 3, -280}, {3, 4, 33.32}, {4, 4, 12}},
		},
		{
			name: "symmetric_integer_duplicates",
			text: "%%MatrixMarket matrix coordinate integer symmetric\n3 3 4\n1 1 2\n3 1 -1\n3 1 -1\n3 3 5\n",
			rows: 3,
			want: [][3]float64{{0, 0, 2}, {0, 2, -2}, {2, 0, -2}, {2, 2, 5}},
		},
		{
			name: "skew_symmetric",
			text: "%%MatrixMarket matrix coordinate real skew-symmetric\n2 2 1\n2 1 3\n",
			rows: 2,
			want: [][3]float64{{0, 1, -3}, {1, 0, 3}},
		},
	}
	for _, c := range cases {
		a, err := ReadMatrixMarket(strings.NewReader(c.text))
		if err != nil {
			t.Errorf("%s: %v", c.name, err)
			continue
		}
		if a.NNZ() != len(c.want) || a.rows != c.rows {
			t.Errorf("%s: %d entries in %d rows, want %d in %d", c.name, a.NNZ(), a.rows, len(c.want), c.rows)
		}
		for _, w := range c.want {
			if got := a.At(int(w[0]), int(w[1])); got != w[2] {
				t.Errorf("%s: entry (%v, %v) = %v, want %v", c.name, w[0], w[1], got, w[2])
			}
		}
	}
}

func TestReadMatrixMarketErrors(t *testing.T) {
	const head = "%%MatrixMarket matrix coordinate real general\n"
	cases := []struct {
		name, text, contains string
	}{
		{"empty", "", "empty input"},
		{"banner", "%%MatrixMarket matrix coordinate real\n", "line 1: banner"},
		{"object", "%%MatrixMarket vector coordinate real general\n", `line 1: object "vector"`},
		{"field", "%%MatrixMarket matrix coordinate complex general\n", `line 1: field "complex"`},
		{"pattern", "%%MatrixMarket matrix coordinate pattern general\n", `field "pattern" not supported`},
		{"format", "%%MatrixMarket matrix array real general\n1 1\n1\n", `format "array" not supported for a sparse matrix`},
		{"hermitian", "%%MatrixMarket matrix coordinate real hermitian\n", `symmetry "hermitian"`},
		{"no_size", head + "% only a comment\n", "missing size line"},
		{"size", head + "3 3\n", "line 2: size line: want 3 integers"},
		{"row_range", head + "2 2 2\n1 1 1\n3 1 1\n", "line 4: row index 3 out of range [1, 2]"},
		{"col_range", head + "2 2 1\n1 0 1\n", "line 3: column index 0 out of range [1, 2]"},
		{"value", head + "2 2 1\n1 1 x\n", `line 3: value "x" is not a number`},
		{"nan", head + "2 2 1\n1 1 NaN\n", `line 3: value "NaN" is not finite`},
		{"fields", head + "2 2 1\n1 1\n", "line 3: entry needs row, column and value"},
		{"too_few", head + "2 2 3\n1 1 1\n2 2 1\n", "expected 3 entries, found 2"},
		{"too_many", head + "2 2 1\n1 1 1\n2 2 1\n", "line 4: unexpected data"},
		{"upper_symmetric", "%%MatrixMarket matrix coordinate real symmetric\n2 2 1\n1 2 1\n", "line 3: entry (1, 2) above the diagonal"},
		{"rect_symmetric", "%%MatrixMarket matrix coordinate real symmetric\n2 3 0\n", "must be square, got 2×3"},
	}
	for _, c := range cases {
		_, err := ReadMatrixMarket(strings.NewReader(c.text))
		if err == nil || !strings.Contains(err.Error(), c.contains) {
			t.Errorf("%s: error %v, want one containing %q", c.name, err, c.contains)
		}
	}
	vcases := []struct {
		name, text, contains string
	}{
		{"coordinate", head + "2 1 0\n", `format "coordinate" not supported for a vector`},
		{"matrix", "%%MatrixMarket matrix array real general\n2 2\n1\n2\n3\n4\n", "array is 2×2"},
		{"short", "%%MatrixMarket matrix array real general\n3 1\n1\n2\n", "expected 3 values, found 2"},
		{"long", "%%MatrixMarket matrix array real general\n1 1\n1\n2\n", "line 4: unexpected data"},
	}
	for _, c := range vcases {
		_, err := ReadMatrixMarketVector(strings.NewReader(c.text))
		if err == nil || !strings.Contains(err.Error(), c.contains) {
			t.Errorf("vector %s: error %v, want one containing %q", c.name, err, c.contains)
		}
	}
}
