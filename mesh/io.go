package mesh

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"maps"
	"mixwell/atomicfile"
	"os"
	"slices"
	"strconv"
	"strings"
)

// FormatHeader is the first word of a mesh file; the format version follows
// it on the same line (see the package documentation).
const FormatHeader = "mixwell-mesh"

// FormatVersion is the version of the text format that Write produces and
// Read accepts.
const FormatVersion = 1

// Write writes m to w in the text format described in the package
// documentation. Coordinates are written in the shortest form that reads
// back to the same float64, so Write followed by Read reproduces Points,
// Triangles, the edge numbering, EdgeTags, TagNames and MixedOrientation
// exactly (Parent is not stored). Write validates m first and writes nothing
// if it is invalid.
func Write(w io.Writer, m *Mesh) error {
	if err := m.Validate(); err != nil {
		return fmt.Errorf("mesh: not writing an invalid mesh: %w", err)
	}
	bw := bufio.NewWriterSize(w, 1<<16)
	nb := m.countBoundary()
	fmt.Fprintf(bw, "%s %d\n", FormatHeader, FormatVersion)
	fmt.Fprintf(bw, "# %d points, %d triangles, %d edges, %d boundary edges\n", len(m.Points), len(m.Triangles), len(m.Edges), nb)
	if m.MixedOrientation {
		bw.WriteString("orientation mixed\n")
	}
	var buf []byte
	fmt.Fprintf(bw, "points %d\n", len(m.Points))
	for _, p := range m.Points {
		buf = strconv.AppendFloat(buf[:0], p[0], 'g', -1, 64)
		buf = append(buf, ' ')
		buf = strconv.AppendFloat(buf, p[1], 'g', -1, 64)
		buf = append(buf, '\n')
		bw.Write(buf)
	}
	fmt.Fprintf(bw, "triangles %d\n", len(m.Triangles))
	for _, t := range m.Triangles {
		buf = appendInts(buf[:0], t[0], t[1], t[2])
		bw.Write(buf)
	}
	fmt.Fprintf(bw, "boundary %d\n", nb)
	for e, ed := range m.Edges {
		if m.EdgeTriangles[e][1] < 0 {
			buf = appendInts(buf[:0], ed[0], ed[1], m.EdgeTags[e])
			bw.Write(buf)
		}
	}
	for _, tag := range slices.Sorted(maps.Keys(m.TagNames)) {
		fmt.Fprintf(bw, "tag %d %s\n", tag, m.TagNames[tag])
	}
	return bw.Flush()
}

func appendInts(buf []byte, a, b, c int) []byte {
	buf = strconv.AppendInt(buf, int64(a), 10)
	buf = append(buf, ' ')
	buf = strconv.AppendInt(buf, int64(b), 10)
	buf = append(buf, ' ')
	buf = strconv.AppendInt(buf, int64(c), 10)
	return append(buf, '\n')
}

// maxLine is the longest line Read accepts, in bytes.
const maxLine = 1 << 20

// lineReader returns the fields of the non-blank lines of a mesh file, with
// comments removed, and tracks line numbers.
type lineReader struct {
	sc     *bufio.Scanner
	line   int // number of the line last read, 1-based
	fields []string
}

// next reads the next line with content; it returns false at the end of the
// input or on a read error (see err).
func (lr *lineReader) next() bool {
	for lr.sc.Scan() {
		lr.line++
		s := lr.sc.Text()
		if i := strings.IndexByte(s, '#'); i >= 0 {
			s = s[:i]
		}
		lr.fields = appendFields(lr.fields[:0], s)
		if len(lr.fields) > 0 {
			return true
		}
	}
	return false
}

// appendFields appends the space- or tab-separated fields of s to dst; it
// reuses dst's storage, unlike strings.Fields.
func appendFields(dst []string, s string) []string {
	i := 0
	for i < len(s) {
		for i < len(s) && isSpace(s[i]) {
			i++
		}
		j := i
		for j < len(s) && !isSpace(s[j]) {
			j++
		}
		if j > i {
			dst = append(dst, s[i:j])
		}
		i = j
	}
	return dst
}

func isSpace(c byte) bool { return c == ' ' || c == '\t' || c == '\r' || c == '\v' || c == '\f' }

func (lr *lineReader) err() error {
	err := lr.sc.Err()
	switch {
	case err == nil:
		return nil
	case errors.Is(err, bufio.ErrTooLong):
		return fmt.Errorf("mesh: line %d is longer than %d bytes: %w", lr.line+1, maxLine, err)
	}
	return fmt.Errorf("mesh: line %d: %w", lr.line+1, err)
}

// errorf returns an error naming the current line.
func (lr *lineReader) errorf(format string, args ...any) error {
	return fmt.Errorf("mesh: line %d: %s", lr.line, fmt.Sprintf(format, args...))
}

// expect reads the next line and returns an error naming what was expected if
// the input ends first.
func (lr *lineReader) expect(what string) error {
	if lr.next() {
		return nil
	}
	return lr.eof(what)
}

// expectItem is expect for item k of n of a section; it formats its message
// only on failure.
func (lr *lineReader) expectItem(item string, k, n int) error {
	if lr.next() {
		return nil
	}
	return lr.eof(fmt.Sprintf("%s %d of %d", item, k, n))
}

func (lr *lineReader) eof(what string) error {
	if err := lr.err(); err != nil {
		return err
	}
	return fmt.Errorf("mesh: line %d: unexpected end of file; expected %s", lr.line+1, what)
}

// count parses a section header "keyword N".
func (lr *lineReader) count(keyword string) (int, error) {
	f := lr.fields
	if f[0] != keyword {
		return 0, lr.errorf("found %q; expected %q followed by a count", f[0], keyword)
	}
	if len(f) != 2 {
		return 0, lr.errorf("%q needs exactly one count, got %d fields", keyword, len(f)-1)
	}
	n, err := strconv.Atoi(f[1])
	if err != nil || n < 0 {
		return 0, lr.errorf("count %q of %q is not a non-negative integer", f[1], keyword)
	}
	return n, nil
}

// ints parses the fields of the current line as len(dst) integers, the
// values "what" of item k.
func (lr *lineReader) ints(dst []int, what, item string, k int) error {
	if len(lr.fields) != len(dst) {
		return lr.errorf("expected %d integers %s of %s %d, got %d fields", len(dst), what, item, k, len(lr.fields))
	}
	for i, s := range lr.fields {
		v, err := strconv.Atoi(s)
		if err != nil {
			return lr.errorf("field %d %q is not an integer; expected %s of %s %d", i+1, s, what, item, k)
		}
		dst[i] = v
	}
	return nil
}

// Read reads a mesh in the text format described in the package
// documentation and returns it after checking it as New does and setting the
// tags. Errors name the line at fault and what was expected there.
func Read(r io.Reader) (*Mesh, error) {
	sc := bufio.NewScanner(r)
	sc.Buffer(make([]byte, 0, 1<<16), maxLine)
	lr := &lineReader{sc: sc}

	if err := lr.expect(fmt.Sprintf("the header %q", FormatHeader+" "+strconv.Itoa(FormatVersion))); err != nil {
		return nil, err
	}
	if f := lr.fields; f[0] != FormatHeader || len(f) != 2 {
		return nil, lr.errorf("not a mesh file: expected the header %q", FormatHeader+" "+strconv.Itoa(FormatVersion))
	}
	if v, err := strconv.Atoi(lr.fields[1]); err != nil || v != FormatVersion {
		return nil, lr.errorf("unsupported format version %q; this reader knows version %d", lr.fields[1], FormatVersion)
	}

	if err := lr.expect(`"orientation" or "points"`); err != nil {
		return nil, err
	}
	mixed := false
	if lr.fields[0] == "orientation" {
		if len(lr.fields) != 2 || (lr.fields[1] != "mixed" && lr.fields[1] != "ccw") {
			return nil, lr.errorf(`expected "orientation mixed" or "orientation ccw"`)
		}
		mixed = lr.fields[1] == "mixed"
		if err := lr.expect(`"points"`); err != nil {
			return nil, err
		}
	}

	np, err := lr.count("points")
	if err != nil {
		return nil, err
	}
	if np < 3 {
		return nil, lr.errorf("%d points; a mesh needs at least 3", np)
	}
	points := make([][2]float64, 0, min(np, 1<<20))
	for v := range np {
		if err := lr.expectItem("point", v, np); err != nil {
			return nil, err
		}
		if len(lr.fields) != 2 {
			return nil, lr.errorf("expected the two coordinates \"x y\" of point %d, got %d fields", v, len(lr.fields))
		}
		var p [2]float64
		for i, s := range lr.fields {
			x, err := strconv.ParseFloat(s, 64)
			if err != nil {
				return nil, lr.errorf("coordinate %q of point %d is not a number", s, v)
			}
			p[i] = x
		}
		if msg := pointProblem(p); msg != "" {
			return nil, lr.errorf("point %d %s", v, msg)
		}
		points = append(points, p)
	}

	if err := lr.expect(`"triangles"`); err != nil {
		return nil, err
	}
	nt, err := lr.count("triangles")
	if err != nil {
		return nil, err
	}
	if nt < 1 {
		return nil, lr.errorf("0 triangles; a mesh needs at least one")
	}
	tris := make([][3]int, 0, min(nt, 1<<20))
	triLine := make([]int, 0, min(nt, 1<<20))
	used := make([]bool, len(points))
	for t := range nt {
		if err := lr.expectItem("triangle", t, nt); err != nil {
			return nil, err
		}
		var tri [3]int
		if err := lr.ints(tri[:], `"a b c" (the vertices)`, "triangle", t); err != nil {
			return nil, err
		}
		if msg := triangleProblem(points, tri, mixed); msg != "" {
			if !mixed && strings.Contains(msg, "clockwise") {
				msg += ` (or declare "orientation mixed" after the header)`
			}
			return nil, lr.errorf("triangle %d (vertices %d %d %d) %s", t, tri[0], tri[1], tri[2], msg)
		}
		used[tri[0]], used[tri[1]], used[tri[2]] = true, true, true
		tris = append(tris, tri)
		triLine = append(triLine, lr.line)
	}
	if v := slices.Index(used, false); v >= 0 {
		return nil, fmt.Errorf("mesh: point %d (%g, %g) is a vertex of no triangle; every point must be used", v, points[v][0], points[v][1])
	}
	m, err := assemble(points, tris, mixed)
	if err != nil {
		var te *topoError
		if errors.As(err, &te) {
			lines := make([]string, len(te.tris))
			for i, t := range te.tris {
				lines[i] = strconv.Itoa(triLine[t])
			}
			return nil, fmt.Errorf("mesh: lines %s: %s", strings.Join(lines, ", "), te.msg)
		}
		return nil, err
	}

	seenBoundary := false
	tagged := make([]bool, len(m.Edges))
	for lr.next() {
		switch lr.fields[0] {
		case "boundary":
			if seenBoundary {
				return nil, lr.errorf("second \"boundary\" section; there may be only one")
			}
			seenBoundary = true
			nb, err := lr.count("boundary")
			if err != nil {
				return nil, err
			}
			for k := range nb {
				if err := lr.expectItem("boundary edge", k, nb); err != nil {
					return nil, err
				}
				var f [3]int
				if err := lr.ints(f[:], `"a b tag" (two vertices and a tag)`, "boundary edge", k); err != nil {
					return nil, err
				}
				e, ok := m.EdgeBetween(f[0], f[1])
				switch {
				case !ok:
					return nil, lr.errorf("%d-%d is not an edge of the mesh; expected a boundary edge", f[0], f[1])
				case m.EdgeTriangles[e][1] >= 0:
					return nil, lr.errorf("edge %d-%d is interior (triangles %d and %d); only boundary edges carry tags", f[0], f[1], m.EdgeTriangles[e][0], m.EdgeTriangles[e][1])
				case f[2] <= 0:
					return nil, lr.errorf("tag %d of edge %d-%d is not positive", f[2], f[0], f[1])
				case tagged[e]:
					return nil, lr.errorf("boundary edge %d-%d is listed twice", f[0], f[1])
				}
				tagged[e] = true
				m.EdgeTags[e] = f[2]
			}
		case "tag":
			if len(lr.fields) != 3 {
				return nil, lr.errorf("expected \"tag NUMBER NAME\", got %d fields", len(lr.fields))
			}
			tag, err := strconv.Atoi(lr.fields[1])
			if err != nil || tag <= 0 {
				return nil, lr.errorf("tag number %q is not a positive integer", lr.fields[1])
			}
			if old, ok := m.TagNames[tag]; ok {
				return nil, lr.errorf("tag %d is named twice (%q, then %q)", tag, old, lr.fields[2])
			}
			if err := checkTagName(m.TagNames, tag, lr.fields[2]); err != nil {
				return nil, lr.errorf("%v", strings.TrimPrefix(err.Error(), "mesh: "))
			}
			m.TagNames[tag] = lr.fields[2]
		default:
			return nil, lr.errorf("unexpected %q; expected \"boundary\", \"tag\" or the end of the file", lr.fields[0])
		}
	}
	if err := lr.err(); err != nil {
		return nil, err
	}
	return m, nil
}

// ReadFile reads a mesh file written by WriteFile or Write.
func ReadFile(path string) (*Mesh, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	m, err := Read(bufio.NewReaderSize(f, 1<<16))
	if err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	return m, nil
}

// WriteFile writes m to the named file in the text format, atomically: it
// writes a temporary file in the same directory, flushes it to disk and
// renames it to path, so that path holds either its old content or the
// complete new mesh, never a partial file. The file gets mode 0644.
func WriteFile(path string, m *Mesh) error {
	return atomicfile.Write(path, func(w io.Writer) error { return Write(w, m) })
}
