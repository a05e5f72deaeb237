package casefile

import (
	"fmt"
	"strings"
)

// Summary returns a short human-readable account of the case, a few lines
// in SI units, for "mixwell check".
func (c *Case) Summary() string {
	var b strings.Builder
	title := c.Title
	if title == "" {
		title = "(no title)"
	}
	fmt.Fprintf(&b, "case %s: %s\n", c.Source, title)
	names := make([]string, len(c.Species))
	for i, s := range c.Species {
		names[i] = fmt.Sprintf("%s (%.6g g/mol)", s.Name, 1e3*s.MolarMass)
	}
	fmt.Fprintf(&b, "  %d species: %s\n", len(c.Species), strings.Join(names, ", "))
	fmt.Fprintf(&b, "  T = %.6g K, P_ref = %.6g Pa, thermodynamics %s, viscosity %s\n",
		c.Temperature, c.Pressure, c.Thermodynamics.Model, c.viscositySummary())
	fmt.Fprintf(&b, "  geometry: %s; boundaries %s\n", c.geometrySummary(), strings.Join(c.Geometry.Names, ", "))
	dd := c.Discretisation
	q := "default"
	if dd.Quadrature > 0 {
		q = fmt.Sprint(dd.Quadrature)
	}
	fmt.Fprintf(&b, "  discretisation: k = %d, %s, %s, quadrature %s, %s formulation\n", dd.Degree, dd.Pair, dd.Flux, q, dd.Formulation)
	for _, bc := range c.Boundaries {
		fmt.Fprintf(&b, "  %s: velocity %s; species %s\n", bc.Name, velocitySummary(bc.Velocity), c.speciesSummary(bc.Species))
	}
	s := c.Solver
	method := string(s.Method)
	if s.Method == Anderson {
		method = fmt.Sprintf("anderson (depth %d)", s.AndersonDepth)
	}
	fmt.Fprintf(&b, "  solver: %s, tolerance %g, at most %d iterations, update %s, floor %g\n",
		method, s.Tolerance, s.MaxIterations, s.Update, s.MoleFractionFloor)
	fmt.Fprintf(&b, "  output: %d fields, subdivision %d, %d probe line%s\n",
		len(c.Output.Fields), c.Output.Subdivision, len(c.Output.Probes), plural(len(c.Output.Probes)))
	if len(c.Warnings) > 0 {
		fmt.Fprintf(&b, "  %d warning%s:\n", len(c.Warnings), plural(len(c.Warnings)))
		for _, w := range c.Warnings {
			fmt.Fprintf(&b, "    %s\n", w)
		}
	}
	return b.String()
}

func (c *Case) viscositySummary() string {
	v := c.Viscosity
	s := fmt.Sprintf("%.6g Pa s", v.Value)
	if v.Model == Wilke {
		s = "wilke"
	}
	if v.Bulk != 0 {
		s += fmt.Sprintf(", bulk %.6g Pa s", v.Bulk)
	}
	return s
}

func (c *Case) geometrySummary() string {
	g := c.Geometry
	var s string
	switch g.Kind {
	case RectangleGeometry:
		r := g.Rectangle
		s = fmt.Sprintf("rectangle [%.6g, %.6g] x [%.6g, %.6g] m, %d x %d cells", r.X0, r.X1, r.Y0, r.Y1, r.NX, r.NY)
	case PolygonGeometry:
		p := g.Polygon
		s = fmt.Sprintf("polygon, %d vertices, %d hole%s, max area %.3g m^2, min angle %g deg",
			len(p.Outline.Points), len(p.Holes), plural(len(p.Holes)), g.Meshing.MaxArea, g.Meshing.MinAngle)
	case MeshFileGeometry:
		m := g.MeshFile.Mesh
		s = fmt.Sprintf("mesh file %s, %d triangles", g.MeshFile.Path, m.NumTriangles())
	}
	if g.Meshing.Refinements > 0 {
		s += fmt.Sprintf(", %d refinement%s", g.Meshing.Refinements, plural(g.Meshing.Refinements))
	}
	for _, l := range g.Meshing.Layers {
		s += fmt.Sprintf(", %d layers at %s", l.Count, l.Boundary)
	}
	return s
}

func velocitySummary(v VelocityBC) string {
	switch v.Kind {
	case Wall:
		if v.Speed != 0 {
			return fmt.Sprintf("wall moving at %.6g m/s", v.Speed)
		}
	case Inflow:
		if v.HasVector {
			return fmt.Sprintf("inflow (%.6g, %.6g) m/s", v.Vector[0], v.Vector[1])
		}
		return fmt.Sprintf("inflow, %s, mean %.6g m/s", v.Profile, v.MeanSpeed)
	case Open:
		return fmt.Sprintf("open at p = %.6g Pa", v.Pressure)
	}
	return string(v.Kind)
}

func (c *Case) speciesSummary(s SpeciesBC) string {
	list := func(v []float64, unit string) string {
		parts := make([]string, 0, len(v))
		for i, x := range v {
			parts = append(parts, fmt.Sprintf("%s %.6g", c.Species[i].Name, x))
		}
		return strings.Join(parts, ", ") + unit
	}
	switch s.Kind {
	case Flux:
		unit := " mol/(m^2 s)"
		if s.Basis == MassBasis {
			unit = " kg/(m^2 s)"
		}
		return fmt.Sprintf("%s flux (%s)", s.Basis, list(s.Fluxes, unit))
	case Composition, ConvectiveInflow:
		out := fmt.Sprintf("%s (%s)", s.Kind, list(s.MoleFractions, ""))
		var imp []string
		for i, b := range s.Impermeable {
			if b {
				imp = append(imp, c.Species[i].Name)
			}
		}
		if len(imp) > 0 {
			out += ", impermeable to " + strings.Join(imp, ", ")
		}
		return out
	}
	return string(s.Kind)
}
