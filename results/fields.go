package results

import (
	"mixwell/casefile"
	"mixwell/simulate"
)

// Sampler evaluates a solution at any point of the mesh; *simulate.Outcome
// satisfies it.
type Sampler interface {
	// NewPoint returns a Point sized for the case.
	NewPoint() *simulate.Point
	// SampleTo fills pt with every field at reference point xh of
	// triangle t, in SI units.
	SampleTo(pt *simulate.Point, t int, xh [2]float64)
	// Locate returns a triangle containing x (m) and the reference
	// coordinates of x in it, or ok false when x lies outside the mesh.
	Locate(x [2]float64) (t int, xh [2]float64, ok bool)
}

// quantity is one output array: a scalar or a plane vector taken from a
// Point.
type quantity struct {
	name       string // name in fields.vtu
	columns    []string
	components int
	get        func(pt *simulate.Point, dst []float64)
}

// quantities returns the output arrays of the selected fields, in the
// order of casefile.AllFields and, per species, in case order.
func quantities(c *casefile.Case) []quantity {
	selected := make(map[casefile.Field]bool, len(c.Output.Fields))
	for _, f := range c.Output.Fields {
		selected[f] = true
	}
	var qs []quantity
	vector := func(name string, get func(pt *simulate.Point) [2]float64) {
		qs = append(qs, quantity{name: name, columns: []string{name + "_x", name + "_y"}, components: 2,
			get: func(pt *simulate.Point, dst []float64) { v := get(pt); dst[0], dst[1] = v[0], v[1] }})
	}
	scalar := func(name string, get func(pt *simulate.Point) float64) {
		qs = append(qs, quantity{name: name, columns: []string{name}, components: 1,
			get: func(pt *simulate.Point, dst []float64) { dst[0] = get(pt) }})
	}
	for _, f := range casefile.AllFields {
		if !selected[f] {
			continue
		}
		for i, sp := range c.Species {
			switch f {
			case casefile.FieldMassFlux:
				vector("J_"+sp.Name, func(pt *simulate.Point) [2]float64 { return pt.J[i] })
			case casefile.FieldMolarFlux:
				vector("N_"+sp.Name, func(pt *simulate.Point) [2]float64 { return pt.N[i] })
			case casefile.FieldDiffusiveFlux:
				vector("j_"+sp.Name, func(pt *simulate.Point) [2]float64 { return pt.Diffusive[i] })
			case casefile.FieldPotential:
				scalar("mu_"+sp.Name, func(pt *simulate.Point) float64 { return pt.Mu[i] })
			case casefile.FieldConcentration:
				scalar("c_"+sp.Name, func(pt *simulate.Point) float64 { return pt.C[i] })
			case casefile.FieldMoleFraction:
				scalar("x_"+sp.Name, func(pt *simulate.Point) float64 { return pt.MoleFraction[i] })
			case casefile.FieldMassFraction:
				scalar("w_"+sp.Name, func(pt *simulate.Point) float64 { return pt.MassFraction[i] })
			}
		}
		switch f {
		case casefile.FieldVelocity:
			vector("velocity", func(pt *simulate.Point) [2]float64 { return pt.V })
			qs[len(qs)-1].columns = []string{"vx", "vy"}
		case casefile.FieldPressure:
			scalar("pressure", func(pt *simulate.Point) float64 { return pt.P })
			qs[len(qs)-1].columns = []string{"p"}
		case casefile.FieldDensity:
			scalar("density", func(pt *simulate.Point) float64 { return pt.Rho })
		}
	}
	return qs
}

// continuousOnly reports whether every selected field is continuous
// across triangle edges: the velocity always, the pressure with the
// Taylor–Hood pair (continuous pressures), nothing else.
func continuousOnly(c *casefile.Case) bool {
	for _, f := range c.Output.Fields {
		switch {
		case f == casefile.FieldVelocity:
		case f == casefile.FieldPressure && c.Discretisation.Pair == casefile.TaylorHood:
		default:
			return false
		}
	}
	return true
}

// fieldUnits are the SI units of the output arrays, by name prefix, for
// summary.json.
var fieldUnits = map[string]string{
	"s, x, y":           "m",
	"velocity (vx, vy)": "m/s",
	"pressure (p)":      "Pa (dynamic pressure, relative to the reference pressure)",
	"J_NAME":            "kg/(m^2 s) (mass flux)",
	"N_NAME":            "mol/(m^2 s) (molar flux)",
	"j_NAME":            "kg/(m^2 s) (diffusive mass flux J - rho_i v)",
	"mu_NAME":           "J/mol (relative to the pure species at the reference pressure)",
	"c_NAME":            "mol/m^3",
	"x_NAME":            "1 (mole fraction)",
	"w_NAME":            "1 (mass fraction)",
	"density":           "kg/m^3",
	"boundary_flux":     "molar mol/(s m), mass kg/(s m), per metre of depth, outward positive",
	"production":        "kg/(s m), per metre of depth",
}
