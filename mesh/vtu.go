package mesh

import (
	"bufio"
	"bytes"
	"encoding/binary"
	"encoding/xml"
	"fmt"
	"io"
	"math"
	"mixwell/atomicfile"
	"strconv"
)

// Field is a named array of values attached to the points or to the
// triangles of a mesh, for output.
type Field struct {
	// Name identifies the field in the file; it must not be empty and must
	// be unique among the point (or cell) fields of one call.
	Name string
	// Components is the number of values per point or triangle: 1 for a
	// scalar, 2 for a plane vector (written padded with a zero third
	// component, as VTK expects vectors to have three), or any other
	// positive number (written as is).
	Components int
	// Data holds the values, point (or triangle) by point, component by
	// component: len(Data) = Components × NumPoints (or NumTriangles).
	Data []float64
}

// vtkTriangle is the VTK cell type number of a linear triangle.
const vtkTriangle = 5

// vtuArray is one DataArray of a .vtu file.
type vtuArray struct {
	name  string // empty for the point coordinates
	typ   string // VTK type name: Float64, Int64 or UInt8
	ncomp int    // components per tuple as written
	n     int    // number of values written, tuples × ncomp
	value func(i int) float64
	ivalu func(i int) int64
}

func (a *vtuArray) bytes() int {
	if a.typ == "UInt8" {
		return a.n
	}
	return 8 * a.n
}

// WriteVTU writes m, with the given point and cell (triangle) fields, as a
// VTK XML unstructured grid (.vtu) with ASCII data: readable, and parsable by
// any XML reader. ASCII output cannot represent NaN or infinite values
// portably, so WriteVTU returns an error naming the first one; use
// WriteVTUBinary for such fields or very large meshes. Points are written with
// z = 0, triangles as VTK linear triangles in their local vertex order.
//
// WriteVTU returns an error naming the field at fault if a field has no name,
// a repeated name, a non-positive number of components or the wrong length.
func WriteVTU(w io.Writer, m *Mesh, point, cell []Field) error {
	return writeVTU(w, m, point, cell, false)
}

// WriteVTUBinary is WriteVTU with the arrays stored as raw little-endian
// binary in the file's appended-data section (64-bit sizes), about half the
// size of ASCII output and faster to write and read. Non-finite values are
// allowed.
func WriteVTUBinary(w io.Writer, m *Mesh, point, cell []Field) error {
	return writeVTU(w, m, point, cell, true)
}

// WriteVTUFile writes the output of WriteVTU to the named file atomically
// (see WriteFile).
func WriteVTUFile(path string, m *Mesh, point, cell []Field) error {
	return atomicfile.Write(path, func(w io.Writer) error { return WriteVTU(w, m, point, cell) })
}

// WriteVTUBinaryFile writes the output of WriteVTUBinary to the named file
// atomically (see WriteFile).
func WriteVTUBinaryFile(path string, m *Mesh, point, cell []Field) error {
	return atomicfile.Write(path, func(w io.Writer) error { return WriteVTUBinary(w, m, point, cell) })
}

// fieldArrays checks fields attached to n entities ("point" or "cell") and
// returns their arrays.
func fieldArrays(kind string, fields []Field, n int, ascii bool) ([]vtuArray, error) {
	arrays := make([]vtuArray, 0, len(fields))
	seen := make(map[string]bool)
	for k, f := range fields {
		switch {
		case f.Name == "":
			return nil, fmt.Errorf("mesh: %s field %d has no name", kind, k)
		case seen[f.Name]:
			return nil, fmt.Errorf("mesh: %s field %q appears twice", kind, f.Name)
		case f.Components < 1:
			return nil, fmt.Errorf("mesh: %s field %q has %d components; want at least 1", kind, f.Name, f.Components)
		case len(f.Data) != n*f.Components:
			return nil, fmt.Errorf("mesh: %s field %q: %d components on %d %ss need %d values, got %d", kind, f.Name, f.Components, n, kind, n*f.Components, len(f.Data))
		}
		seen[f.Name] = true
		if ascii {
			for i, x := range f.Data {
				if math.IsNaN(x) || math.IsInf(x, 0) {
					return nil, fmt.Errorf("mesh: %s field %q: value %g at %s %d, component %d; ASCII output needs finite values (binary output accepts them)", kind, f.Name, x, kind, i/f.Components, i%f.Components)
				}
			}
		}
		data, nc := f.Data, f.Components
		a := vtuArray{name: f.Name, typ: "Float64", ncomp: nc, n: len(data), value: func(i int) float64 { return data[i] }}
		if nc == 2 {
			a.ncomp, a.n = 3, 3*n
			a.value = func(i int) float64 {
				if c := i % 3; c < 2 {
					return data[2*(i/3)+c]
				}
				return 0
			}
		}
		arrays = append(arrays, a)
	}
	return arrays, nil
}

func writeVTU(w io.Writer, m *Mesh, point, cell []Field, binaryData bool) error {
	np, nt := len(m.Points), len(m.Triangles)
	pa, err := fieldArrays("point", point, np, !binaryData)
	if err != nil {
		return err
	}
	ca, err := fieldArrays("cell", cell, nt, !binaryData)
	if err != nil {
		return err
	}
	for v, p := range m.Points {
		if msg := pointProblem(p); msg != "" {
			return fmt.Errorf("mesh: point %d %s", v, msg)
		}
	}
	coords := vtuArray{typ: "Float64", ncomp: 3, n: 3 * np, value: func(i int) float64 {
		if c := i % 3; c < 2 {
			return m.Points[i/3][c]
		}
		return 0
	}}
	conn := vtuArray{name: "connectivity", typ: "Int64", ncomp: 1, n: 3 * nt, ivalu: func(i int) int64 { return int64(m.Triangles[i/3][i%3]) }}
	offs := vtuArray{name: "offsets", typ: "Int64", ncomp: 1, n: nt, ivalu: func(i int) int64 { return int64(3 * (i + 1)) }}
	types := vtuArray{name: "types", typ: "UInt8", ncomp: 1, n: nt, ivalu: func(int) int64 { return vtkTriangle }}

	// Offsets of the arrays in the appended section, in the order written.
	var order []*vtuArray
	for i := range pa {
		order = append(order, &pa[i])
	}
	for i := range ca {
		order = append(order, &ca[i])
	}
	order = append(order, &coords, &conn, &offs, &types)
	offset := make(map[*vtuArray]int, len(order))
	pos := 0
	for _, a := range order {
		offset[a] = pos
		pos += 8 + a.bytes()
	}

	bw := bufio.NewWriterSize(w, 1<<16)
	var buf []byte
	writeArray := func(indent string, a *vtuArray) {
		bw.WriteString(indent)
		fmt.Fprintf(bw, `<DataArray type="%s"`, a.typ)
		if a.name != "" {
			fmt.Fprintf(bw, ` Name="%s"`, xmlEscape(a.name))
		}
		if a.ncomp != 1 {
			fmt.Fprintf(bw, ` NumberOfComponents="%d"`, a.ncomp)
		}
		if binaryData {
			fmt.Fprintf(bw, " format=\"appended\" offset=\"%d\"/>\n", offset[a])
			return
		}
		bw.WriteString(" format=\"ascii\">\n")
		for i := 0; i < a.n; i += a.ncomp {
			buf = append(buf[:0], indent...)
			buf = append(buf, "  "...)
			for c := range a.ncomp {
				if c > 0 {
					buf = append(buf, ' ')
				}
				if a.value != nil {
					buf = strconv.AppendFloat(buf, a.value(i+c), 'g', -1, 64)
				} else {
					buf = strconv.AppendInt(buf, a.ivalu(i+c), 10)
				}
			}
			buf = append(buf, '\n')
			bw.Write(buf)
		}
		bw.WriteString(indent)
		bw.WriteString("</DataArray>\n")
	}

	bw.WriteString("<?xml version=\"1.0\"?>\n")
	bw.WriteString(`<VTKFile type="UnstructuredGrid" version="1.0" byte_order="LittleEndian" header_type="UInt64">` + "\n")
	bw.WriteString("  <UnstructuredGrid>\n")
	fmt.Fprintf(bw, "    <Piece NumberOfPoints=\"%d\" NumberOfCells=\"%d\">\n", np, nt)
	bw.WriteString("      <PointData>\n")
	for i := range pa {
		writeArray("        ", &pa[i])
	}
	bw.WriteString("      </PointData>\n")
	bw.WriteString("      <CellData>\n")
	for i := range ca {
		writeArray("        ", &ca[i])
	}
	bw.WriteString("      </CellData>\n")
	bw.WriteString("      <Points>\n")
	writeArray("        ", &coords)
	bw.WriteString("      </Points>\n")
	bw.WriteString("      <Cells>\n")
	writeArray("        ", &conn)
	writeArray("        ", &offs)
	writeArray("        ", &types)
	bw.WriteString("      </Cells>\n")
	bw.WriteString("    </Piece>\n")
	bw.WriteString("  </UnstructuredGrid>\n")
	if binaryData {
		bw.WriteString("  <AppendedData encoding=\"raw\">\n   _")
		for _, a := range order {
			buf = binary.LittleEndian.AppendUint64(buf[:0], uint64(a.bytes()))
			bw.Write(buf)
			for i := 0; i < a.n; i++ {
				switch {
				case a.typ == "UInt8":
					bw.WriteByte(byte(a.ivalu(i)))
				case a.value != nil:
					buf = binary.LittleEndian.AppendUint64(buf[:0], math.Float64bits(a.value(i)))
					bw.Write(buf)
				default:
					buf = binary.LittleEndian.AppendUint64(buf[:0], uint64(a.ivalu(i)))
					bw.Write(buf)
				}
			}
		}
		bw.WriteString("\n  </AppendedData>\n")
	}
	bw.WriteString("</VTKFile>\n")
	return bw.Flush()
}

// xmlEscape escapes s for use in an XML attribute value.
func xmlEscape(s string) string {
	var b bytes.Buffer
	xml.EscapeText(&b, []byte(s))
	return b.String()
}
