package solver

import (
	"bufio"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
)

// The Matrix Market exchange format is described in R. F. Boisvert, R. Pozo
// and K. A. Remington, "The Matrix Market Exchange Formats: Initial Design",
// NISTIR 5935 (1996). Only the parts needed here are implemented: sparse
// "coordinate" real or integer matrices (general, symmetric, skew-symmetric)
// and dense "array" real or integer column vectors.

const mmBanner = "%%MatrixMarket"

// WriteMatrixMarket writes a in Matrix Market coordinate real general form,
// one entry per line with 1-based indices and values printed with 17
// significant digits, so that reading the file back gives the same float64
// values.
func WriteMatrixMarket(w io.Writer, a *CSR) error {
	bw := bufio.NewWriter(w)
	fmt.Fprintf(bw, "%s matrix coordinate real general\n", mmBanner)
	fmt.Fprintf(bw, "%d %d %d\n", a.rows, a.cols, a.NNZ())
	buf := make([]byte, 0, 64)
	for i := 0; i < a.rows; i++ {
		for p := a.rowPtr[i]; p < a.rowPtr[i+1]; p++ {
			buf = buf[:0]
			buf = strconv.AppendInt(buf, int64(i+1), 10)
			buf = append(buf, ' ')
			buf = strconv.AppendInt(buf, int64(a.colIdx[p]+1), 10)
			buf = append(buf, ' ')
			buf = strconv.AppendFloat(buf, a.val[p], 'g', 17, 64)
			buf = append(buf, '\n')
			if _, err := bw.Write(buf); err != nil {
				return err
			}
		}
	}
	return bw.Flush()
}

// WriteMatrixMarketVector writes x as a dense len(x)×1 Matrix Market array
// (real general), values printed with 17 significant digits.
func WriteMatrixMarketVector(w io.Writer, x []float64) error {
	bw := bufio.NewWriter(w)
	fmt.Fprintf(bw, "%s matrix array real general\n", mmBanner)
	fmt.Fprintf(bw, "%d 1\n", len(x))
	buf := make([]byte, 0, 32)
	for _, v := range x {
		buf = strconv.AppendFloat(buf[:0], v, 'g', 17, 64)
		buf = append(buf, '\n')
		if _, err := bw.Write(buf); err != nil {
			return err
		}
	}
	return bw.Flush()
}

// mmReader reads a Matrix Market stream line by line and keeps the line
// number for error messages.
type mmReader struct {
	sc   *bufio.Scanner
	line int
}

func newMMReader(r io.Reader) *mmReader {
	sc := bufio.NewScanner(r)
	sc.Buffer(make([]byte, 64*1024), 16*1024*1024)
	return &mmReader{sc: sc}
}

func (m *mmReader) errorf(format string, args ...any) error {
	return fmt.Errorf("solver: matrix market line %d: %s", m.line, fmt.Sprintf(format, args...))
}

// next returns the fields of the next line that is neither blank nor a
// comment. It returns io.EOF at the end of the input.
func (m *mmReader) next() ([]string, error) {
	for m.sc.Scan() {
		m.line++
		t := strings.TrimSpace(m.sc.Text())
		if t == "" || strings.HasPrefix(t, "%") {
			continue
		}
		return strings.Fields(t), nil
	}
	if err := m.sc.Err(); err != nil {
		return nil, fmt.Errorf("solver: matrix market line %d: %w", m.line+1, err)
	}
	return nil, io.EOF
}

// header reads and checks the banner line and returns its format, field and
// symmetry words in lower case.
func (m *mmReader) header() (format, field, symmetry string, err error) {
	if !m.sc.Scan() {
		if err := m.sc.Err(); err != nil {
			return "", "", "", fmt.Errorf("solver: matrix market: %w", err)
		}
		return "", "", "", fmt.Errorf("solver: matrix market: empty input")
	}
	m.line = 1
	f := strings.Fields(m.sc.Text())
	if len(f) != 5 || !strings.EqualFold(f[0], mmBanner) {
		return "", "", "", m.errorf("banner must be %q followed by four words, got %q", mmBanner, m.sc.Text())
	}
	if !strings.EqualFold(f[1], "matrix") {
		return "", "", "", m.errorf("object %q not supported, want \"matrix\"", f[1])
	}
	format, field, symmetry = strings.ToLower(f[2]), strings.ToLower(f[3]), strings.ToLower(f[4])
	if field != "real" && field != "integer" {
		return "", "", "", m.errorf("field %q not supported, want \"real\" or \"integer\"", f[3])
	}
	return format, field, symmetry, nil
}

func (m *mmReader) ints(f []string, want int, what string) ([]int, error) {
	if len(f) != want {
		return nil, m.errorf("%s: want %d integers, got %d fields", what, want, len(f))
	}
	out := make([]int, want)
	for k, s := range f {
		v, err := strconv.Atoi(s)
		if err != nil {
			return nil, m.errorf("%s: %q is not an integer", what, s)
		}
		if v < 0 {
			return nil, m.errorf("%s: negative value %d", what, v)
		}
		out[k] = v
	}
	return out, nil
}

func (m *mmReader) value(s string) (float64, error) {
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		return 0, m.errorf("value %q is not a number", s)
	}
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, m.errorf("value %q is not finite", s)
	}
	return v, nil
}

// ReadMatrixMarket reads a sparse matrix in Matrix Market coordinate form
// with field real or integer and symmetry general, symmetric or
// skew-symmetric. For the symmetric kinds only entries on or below the
// diagonal may be given (as the format prescribes) and the upper triangle is
// filled in. Duplicate entries are summed. Errors name the line.
func ReadMatrixMarket(r io.Reader) (*CSR, error) {
	m := newMMReader(r)
	format, _, symmetry, err := m.header()
	if err != nil {
		return nil, err
	}
	if format != "coordinate" {
		return nil, m.errorf("format %q not supported for a sparse matrix, want \"coordinate\"", format)
	}
	switch symmetry {
	case "general", "symmetric", "skew-symmetric":
	default:
		return nil, m.errorf("symmetry %q not supported, want general, symmetric or skew-symmetric", symmetry)
	}
	f, err := m.next()
	if err == io.EOF {
		return nil, m.errorf("missing size line")
	}
	if err != nil {
		return nil, err
	}
	size, err := m.ints(f, 3, "size line")
	if err != nil {
		return nil, err
	}
	rows, cols, nnz := size[0], size[1], size[2]
	if symmetry != "general" && rows != cols {
		return nil, m.errorf("%s matrix must be square, got %d×%d", symmetry, rows, cols)
	}
	capacity := nnz
	if symmetry != "general" {
		capacity *= 2
	}
	t := NewCOO(rows, cols, capacity)
	for k := 0; k < nnz; k++ {
		f, err := m.next()
		if err == io.EOF {
			return nil, m.errorf("expected %d entries, found %d", nnz, k)
		}
		if err != nil {
			return nil, err
		}
		if len(f) != 3 {
			return nil, m.errorf("entry needs row, column and value, got %d fields", len(f))
		}
		ij, err := m.ints(f[:2], 2, "entry")
		if err != nil {
			return nil, err
		}
		i, j := ij[0], ij[1]
		if i < 1 || i > rows {
			return nil, m.errorf("row index %d out of range [1, %d]", i, rows)
		}
		if j < 1 || j > cols {
			return nil, m.errorf("column index %d out of range [1, %d]", j, cols)
		}
		v, err := m.value(f[2])
		if err != nil {
			return nil, err
		}
		i--
		j--
		t.Add(i, j, v)
		switch symmetry {
		case "symmetric":
			if j > i {
				return nil, m.errorf("entry (%d, %d) above the diagonal in a symmetric matrix", i+1, j+1)
			}
			if i != j {
				t.Add(j, i, v)
			}
		case "skew-symmetric":
			if j >= i {
				return nil, m.errorf("entry (%d, %d) on or above the diagonal in a skew-symmetric matrix", i+1, j+1)
			}
			t.Add(j, i, -v)
		}
	}
	if f, err := m.next(); err == nil {
		return nil, m.errorf("unexpected data %q after %d entries", strings.Join(f, " "), nnz)
	} else if err != io.EOF {
		return nil, err
	}
	return t.ToCSR(), nil
}

// ReadMatrixMarketVector reads a dense vector stored as a Matrix Market
// array (real or integer, general) with one column or one row.
func ReadMatrixMarketVector(r io.Reader) ([]float64, error) {
	m := newMMReader(r)
	format, _, symmetry, err := m.header()
	if err != nil {
		return nil, err
	}
	if format != "array" {
		return nil, m.errorf("format %q not supported for a vector, want \"array\"", format)
	}
	if symmetry != "general" {
		return nil, m.errorf("symmetry %q not supported for a vector, want \"general\"", symmetry)
	}
	f, err := m.next()
	if err == io.EOF {
		return nil, m.errorf("missing size line")
	}
	if err != nil {
		return nil, err
	}
	size, err := m.ints(f, 2, "size line")
	if err != nil {
		return nil, err
	}
	if size[0] != 1 && size[1] != 1 {
		return nil, m.errorf("array is %d×%d, want a single row or column", size[0], size[1])
	}
	n := size[0] * size[1]
	x := make([]float64, 0, n)
	for len(x) < n {
		f, err := m.next()
		if err == io.EOF {
			return nil, m.errorf("expected %d values, found %d", n, len(x))
		}
		if err != nil {
			return nil, err
		}
		for _, s := range f {
			if len(x) == n {
				return nil, m.errorf("more than %d values", n)
			}
			v, err := m.value(s)
			if err != nil {
				return nil, err
			}
			x = append(x, v)
		}
	}
	if f, err := m.next(); err == nil {
		return nil, m.errorf("unexpected data %q after %d values", strings.Join(f, " "), n)
	} else if err != io.EOF {
		return nil, err
	}
	return x, nil
}
