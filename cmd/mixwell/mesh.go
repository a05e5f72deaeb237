package main

import (
	"fmt"
	"path/filepath"
	"sort"
	"strings"

	"github.com/spf13/cobra"

	"mixwell/casefile"
	"mixwell/mesh"
	"mixwell/simulate"
)

type meshOptions struct {
	out string
	vtu string
}

func newMeshCmd(d deps) *cobra.Command {
	var o meshOptions
	cmd := &cobra.Command{
		Use:   "mesh CASE.yaml|FILE.mesh [--out FILE] [--vtu FILE]",
		Short: "Build the mesh of a case, report its quality and export it",
		Long: `Mesh builds the triangulation that "mixwell run" would use for a case
(rectangle, polygon with holes, or mesh file, with its refinement and
boundary-layer settings) and prints its size and quality: vertices,
triangles, the extreme angles and edge lengths, and the edges of each
named boundary. Given a mesh file (.mesh, mixwell's text format) instead
of a case, it reports on that mesh, in the file's own length unit.

--out writes the mesh in mixwell's own text format, which a case can read
back with geometry.mesh_file; --vtu writes it as VTK XML with the shape
quality and area of each triangle, for a viewer. Both are written
atomically.`,
		Example: `  # Inspect the mesh of a case
  mixwell mesh cell.yaml

  # Export it for reuse and for viewing
  mixwell mesh cell.yaml --out cell.mesh --vtu cell-mesh.vtu

  # Inspect a mesh file, and convert it for a viewer
  mixwell mesh cell.mesh --vtu cell-mesh.vtu`,
		Args:              caseArgs,
		ValidArgsFunction: completeCaseFile,
		RunE: func(cmd *cobra.Command, args []string) error {
			cmd.SilenceUsage = true
			return runMesh(cmd, args[0], &o)
		},
	}
	f := cmd.Flags()
	f.StringVar(&o.out, "out", "", "write the mesh in mixwell's text format to `FILE`")
	f.StringVar(&o.vtu, "vtu", "", "write the mesh with triangle quality as VTK XML to `FILE`")
	return cmd
}

func runMesh(cmd *cobra.Command, path string, o *meshOptions) error {
	m, unit, err := loadMesh(path)
	if err != nil {
		return err
	}
	q := m.Quality()
	w := cmd.OutOrStdout()
	fmt.Fprintf(w, "%d vertices, %d triangles, %d edges (%d on the boundary), area %.6g %s\n",
		q.Points, q.Triangles, q.Edges, q.BoundaryEdges, q.Area, areaUnit(unit))
	fmt.Fprintf(w, "angles %.2f to %.2f degrees; edges %.4g to %.4g %s; shape quality %.3f to %.3f (mean %.3f)\n",
		q.MinAngle, q.MaxAngle, q.MinEdge, q.MaxEdge, unit, q.MinShape, q.MaxShape, q.MeanShape)
	names := make([]string, 0, len(m.TagNames))
	for _, n := range m.TagNames {
		names = append(names, n)
	}
	sort.Strings(names)
	tagOf := map[string]int{}
	for t, n := range m.TagNames {
		tagOf[n] = t
	}
	var parts []string
	for _, n := range names {
		parts = append(parts, fmt.Sprintf("%s %d", n, len(m.BoundaryEdges(tagOf[n]))))
	}
	fmt.Fprintf(w, "boundary edges: %s\n", strings.Join(parts, ", "))
	if o.out != "" {
		if err := mesh.WriteFile(o.out, m); err != nil {
			return oneLine(err)
		}
		fmt.Fprintf(w, "wrote %s\n", o.out)
	}
	if o.vtu != "" {
		shape := make([]float64, m.NumTriangles())
		area := make([]float64, m.NumTriangles())
		for t := range shape {
			shape[t] = m.Shape(t)
			area[t] = m.Area(t)
		}
		cells := []mesh.Field{{Name: "shape", Components: 1, Data: shape}, {Name: "area", Components: 1, Data: area}}
		if err := mesh.WriteVTUFile(o.vtu, m, nil, cells); err != nil {
			return oneLine(err)
		}
		fmt.Fprintf(w, "wrote %s\n", o.vtu)
	}
	return nil
}

// loadMesh returns the mesh of a case file, in metres, or the mesh in a
// mesh file (.mesh), in its own length unit, with the name of the unit.
func loadMesh(path string) (*mesh.Mesh, string, error) {
	if strings.EqualFold(filepath.Ext(path), ".mesh") {
		m, err := mesh.ReadFile(path)
		if err != nil {
			return nil, "", oneLine(err)
		}
		return m, "file units", nil
	}
	c, err := casefile.Load(path)
	if err != nil {
		return nil, "", caseError(err, path)
	}
	m, err := simulate.BuildMesh(c)
	if err != nil {
		return nil, "", oneLine(err)
	}
	return m, "m", nil
}

// areaUnit names the unit of area of the length unit.
func areaUnit(length string) string {
	if length == "m" {
		return "m^2"
	}
	return "square " + length
}
