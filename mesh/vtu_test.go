package mesh

import (
	"bytes"
	"encoding/binary"
	"encoding/xml"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

type vtkDataArray struct {
	Type       string `xml:"type,attr"`
	Name       string `xml:"Name,attr"`
	Components int    `xml:"NumberOfComponents,attr"`
	Format     string `xml:"format,attr"`
	Offset     int    `xml:"offset,attr"`
	Text       string `xml:",chardata"`
}

type vtkFile struct {
	XMLName   xml.Name `xml:"VTKFile"`
	Type      string   `xml:"type,attr"`
	ByteOrder string   `xml:"byte_order,attr"`
	Grid      struct {
		Piece struct {
			NumberOfPoints int            `xml:"NumberOfPoints,attr"`
			NumberOfCells  int            `xml:"NumberOfCells,attr"`
			PointData      []vtkDataArray `xml:"PointData>DataArray"`
			CellData       []vtkDataArray `xml:"CellData>DataArray"`
			Points         vtkDataArray   `xml:"Points>DataArray"`
			Cells          []vtkDataArray `xml:"Cells>DataArray"`
		} `xml:"Piece"`
	} `xml:"UnstructuredGrid"`
}

// arrays returns the data arrays of a parsed file in the order written.
func (f *vtkFile) arrays() []*vtkDataArray {
	p := &f.Grid.Piece
	var as []*vtkDataArray
	for i := range p.PointData {
		as = append(as, &p.PointData[i])
	}
	for i := range p.CellData {
		as = append(as, &p.CellData[i])
	}
	as = append(as, &p.Points)
	for i := range p.Cells {
		as = append(as, &p.Cells[i])
	}
	return as
}

// asciiValues parses the text of an ASCII data array.
func asciiValues(t *testing.T, a *vtkDataArray) []float64 {
	t.Helper()
	var v []float64
	for _, s := range strings.Fields(a.Text) {
		x, err := strconv.ParseFloat(s, 64)
		if err != nil {
			t.Fatalf("array %q: %v", a.Name, err)
		}
		v = append(v, x)
	}
	return v
}

// binaryValues decodes an appended raw array: a 64-bit byte count, then the
// values.
func binaryValues(t *testing.T, a *vtkDataArray, raw []byte) []float64 {
	t.Helper()
	b := raw[a.Offset:]
	n := int(binary.LittleEndian.Uint64(b))
	b = b[8 : 8+n]
	var v []float64
	switch a.Type {
	case "UInt8":
		for _, x := range b {
			v = append(v, float64(x))
		}
	case "Int64":
		for i := 0; i < n; i += 8 {
			v = append(v, float64(int64(binary.LittleEndian.Uint64(b[i:]))))
		}
	case "Float64":
		for i := 0; i < n; i += 8 {
			v = append(v, math.Float64frombits(binary.LittleEndian.Uint64(b[i:])))
		}
	default:
		t.Fatalf("array %q: unknown type %q", a.Name, a.Type)
	}
	return v
}

// vtuFixture returns a small mixed-orientation mesh and fields on it.
func vtuFixture(t *testing.T) (*Mesh, []Field, []Field) {
	m, err := Perturb(mustRectangle(t, 0, 0, 2, 1, 3, 2, AlternatingDiagonal), 0.3, newRNG(21))
	if err != nil {
		t.Fatal(err)
	}
	m = m.PermuteLocalVertices(newRNG(22))
	np, nt := m.NumPoints(), m.NumTriangles()
	p := Field{Name: "pressure", Components: 1, Data: make([]float64, np)}
	v := Field{Name: "velocity", Components: 2, Data: make([]float64, 2*np)}
	g := Field{Name: `grad<"u"&v>`, Components: 4, Data: make([]float64, 4*np)}
	for i, x := range m.Points {
		p.Data[i] = x[0] + 2*x[1]
		v.Data[2*i], v.Data[2*i+1] = x[1], -x[0]
		for c := range 4 {
			g.Data[4*i+c] = float64(c) + x[0]*x[1]
		}
	}
	a := Field{Name: "area", Components: 1, Data: make([]float64, nt)}
	for tr := range m.Triangles {
		a.Data[tr] = m.Area(tr)
	}
	return m, []Field{p, v, g}, []Field{a}
}

// wantValues returns the values the file must hold for each array, in the
// order written: fields (2-vectors padded), coordinates, connectivity,
// offsets, types.
func wantValues(m *Mesh, point, cell []Field) [][]float64 {
	var out [][]float64
	for _, f := range append(append([]Field{}, point...), cell...) {
		if f.Components != 2 {
			out = append(out, f.Data)
			continue
		}
		var v []float64
		for i := 0; i < len(f.Data); i += 2 {
			v = append(v, f.Data[i], f.Data[i+1], 0)
		}
		out = append(out, v)
	}
	var xyz, conn, offs, types []float64
	for _, p := range m.Points {
		xyz = append(xyz, p[0], p[1], 0)
	}
	for i, tri := range m.Triangles {
		conn = append(conn, float64(tri[0]), float64(tri[1]), float64(tri[2]))
		offs = append(offs, float64(3*(i+1)))
		types = append(types, 5) // VTK_TRIANGLE in the VTK file format documentation
	}
	return append(out, xyz, conn, offs, types)
}

func checkVTU(t *testing.T, name string, data []byte, m *Mesh, point, cell []Field, bin bool) {
	t.Helper()
	var raw []byte
	text := data
	if bin {
		const marker = `<AppendedData encoding="raw">`
		i := bytes.Index(data, []byte(marker))
		if i < 0 {
			t.Fatalf("%s: no appended data", name)
		}
		j := bytes.IndexByte(data[i:], '_')
		raw = data[i+j+1:]
		if !bytes.HasSuffix(raw, []byte("\n  </AppendedData>\n</VTKFile>\n")) {
			t.Errorf("%s: file does not end with the closing tags", name)
		}
		text = append(bytes.Clone(data[:i]), "</VTKFile>\n"...)
	}
	var f vtkFile
	if err := xml.Unmarshal(text, &f); err != nil {
		t.Fatalf("%s: not well-formed XML: %v", name, err)
	}
	p := &f.Grid.Piece
	if f.Type != "UnstructuredGrid" || f.ByteOrder != "LittleEndian" || p.NumberOfPoints != m.NumPoints() || p.NumberOfCells != m.NumTriangles() {
		t.Errorf("%s: type %q, byte order %q, %d points, %d cells; want UnstructuredGrid, LittleEndian, %d, %d",
			name, f.Type, f.ByteOrder, p.NumberOfPoints, p.NumberOfCells, m.NumPoints(), m.NumTriangles())
	}
	if len(p.PointData) != len(point) || len(p.CellData) != len(cell) || len(p.Cells) != 3 {
		t.Fatalf("%s: %d point arrays, %d cell arrays, %d cell-structure arrays; want %d, %d, 3",
			name, len(p.PointData), len(p.CellData), len(p.Cells), len(point), len(cell))
	}
	for i, fl := range point {
		want := fl.Components
		if want == 2 {
			want = 3
		}
		if a := p.PointData[i]; a.Name != fl.Name || max(a.Components, 1) != want {
			t.Errorf("%s: point array %d is %q with %d components; want %q with %d", name, i, a.Name, a.Components, fl.Name, want)
		}
	}
	want := wantValues(m, point, cell)
	for k, a := range f.arrays() {
		var got []float64
		if bin {
			if a.Format != "appended" {
				t.Errorf("%s: array %q format %q", name, a.Name, a.Format)
			}
			got = binaryValues(t, a, raw)
		} else {
			if a.Format != "ascii" {
				t.Errorf("%s: array %q format %q", name, a.Name, a.Format)
			}
			got = asciiValues(t, a)
		}
		if len(got) != len(want[k]) {
			t.Errorf("%s: array %q has %d values, want %d", name, a.Name, len(got), len(want[k]))
			continue
		}
		// Shortest decimal forms and raw bits both reproduce float64 values
		// exactly: tolerance zero.
		for i := range got {
			if got[i] != want[k][i] && !(math.IsNaN(got[i]) && math.IsNaN(want[k][i])) {
				t.Errorf("%s: array %q value %d = %v, want %v", name, a.Name, i, got[i], want[k][i])
				break
			}
		}
	}
}

func TestWriteVTU(t *testing.T) {
	m, point, cell := vtuFixture(t)
	for _, bin := range []bool{false, true} {
		var buf bytes.Buffer
		write := WriteVTU
		if bin {
			write = WriteVTUBinary
		}
		if err := write(&buf, m, point, cell); err != nil {
			t.Fatal(err)
		}
		checkVTU(t, "binary="+strconv.FormatBool(bin), buf.Bytes(), m, point, cell, bin)
	}
	// No fields at all.
	var buf bytes.Buffer
	if err := WriteVTU(&buf, m, nil, nil); err != nil {
		t.Fatal(err)
	}
	checkVTU(t, "no fields", buf.Bytes(), m, nil, nil, false)
}

func TestWriteVTUBinaryNaN(t *testing.T) {
	m, point, cell := vtuFixture(t)
	point[0].Data[3] = math.NaN()
	cell[0].Data[1] = math.Inf(-1)
	var buf bytes.Buffer
	if err := WriteVTUBinary(&buf, m, point, cell); err != nil {
		t.Fatal(err)
	}
	checkVTU(t, "non-finite binary", buf.Bytes(), m, point, cell, true)
	wantError(t, "non-finite ascii", WriteVTU(&buf, m, point, cell), `point field "pressure"`, "point 3", "binary")
}

func TestWriteVTUErrors(t *testing.T) {
	m, _, _ := vtuFixture(t)
	np, nt := m.NumPoints(), m.NumTriangles()
	for _, tc := range []struct {
		name        string
		point, cell []Field
		want        []string
	}{
		{"no name", []Field{{Components: 1, Data: make([]float64, np)}}, nil, []string{"point field 0", "no name"}},
		{"twice", nil, []Field{{"a", 1, make([]float64, nt)}, {"a", 1, make([]float64, nt)}}, []string{`cell field "a"`, "twice"}},
		{"no components", []Field{{"p", 0, nil}}, nil, []string{`"p"`, "0 components"}},
		{"short", []Field{{"v", 2, make([]float64, 2*np-1)}}, nil, []string{`point field "v"`, "need " + strconv.Itoa(2*np), "got " + strconv.Itoa(2*np-1)}},
		{"cell length", nil, []Field{{"a", 1, make([]float64, nt+1)}}, []string{`cell field "a"`, "need " + strconv.Itoa(nt), "got " + strconv.Itoa(nt+1)}},
	} {
		for _, write := range []func(*bytes.Buffer) error{
			func(b *bytes.Buffer) error { return WriteVTU(b, m, tc.point, tc.cell) },
			func(b *bytes.Buffer) error { return WriteVTUBinary(b, m, tc.point, tc.cell) },
		} {
			var buf bytes.Buffer
			wantError(t, tc.name, write(&buf), tc.want...)
			if buf.Len() != 0 {
				t.Errorf("%s: wrote %d bytes before failing", tc.name, buf.Len())
			}
		}
	}
}

func TestWriteVTUFile(t *testing.T) {
	m, point, cell := vtuFixture(t)
	dir := t.TempDir()
	for _, tc := range []struct {
		name  string
		file  func(string, *Mesh, []Field, []Field) error
		write func(*bytes.Buffer) error
	}{
		{"ascii", WriteVTUFile, func(b *bytes.Buffer) error { return WriteVTU(b, m, point, cell) }},
		{"binary", WriteVTUBinaryFile, func(b *bytes.Buffer) error { return WriteVTUBinary(b, m, point, cell) }},
	} {
		path := filepath.Join(dir, tc.name+".vtu")
		if err := tc.file(path, m, point, cell); err != nil {
			t.Fatal(err)
		}
		got, err := os.ReadFile(path)
		if err != nil {
			t.Fatal(err)
		}
		var want bytes.Buffer
		tc.write(&want)
		if !bytes.Equal(got, want.Bytes()) {
			t.Errorf("%s: file differs from the writer's output", tc.name)
		}
		// A failing write leaves the file as it was.
		wantError(t, tc.name, tc.file(path, m, []Field{{"x", 1, nil}}, nil), path, `"x"`)
		if again, _ := os.ReadFile(path); !bytes.Equal(again, got) {
			t.Errorf("%s: failed write changed the file", tc.name)
		}
	}
}

func TestWriteVTUSubdivided(t *testing.T) {
	// A quadratic field written on Subdivide(m, 2): evaluating at the
	// SubPoints through the parent's affine map gives the field at the
	// vertices (checked against the coordinates to rounding).
	const tol = 1e-13
	m, _, _ := vtuFixture(t)
	s, sub := Subdivide(m, 2)
	f := Field{Name: "u", Components: 1, Data: make([]float64, s.NumPoints())}
	for v, sp := range sub {
		tri := m.Triangles[sp.Triangle]
		a, b, c := m.Points[tri[0]], m.Points[tri[1]], m.Points[tri[2]]
		xi, eta := sp.Ref[0], sp.Ref[1]
		x := (1-xi-eta)*a[0] + xi*b[0] + eta*c[0]
		y := (1-xi-eta)*a[1] + xi*b[1] + eta*c[1]
		f.Data[v] = x*x - x*y
		if p := s.Points[v]; math.Abs(f.Data[v]-(p[0]*p[0]-p[0]*p[1])) > tol {
			t.Errorf("vertex %d: field %v, want %v", v, f.Data[v], p[0]*p[0]-p[0]*p[1])
		}
	}
	parent := Field{Name: "parent", Components: 1, Data: make([]float64, s.NumTriangles())}
	for c, p := range s.Parent {
		parent.Data[c] = float64(p)
	}
	var buf bytes.Buffer
	if err := WriteVTU(&buf, s, []Field{f}, []Field{parent}); err != nil {
		t.Fatal(err)
	}
	checkVTU(t, "subdivided", buf.Bytes(), s, []Field{f}, []Field{parent}, false)
}
