package simulate

import (
	"math"
	"testing"

	"mixwell/fem"
	"mixwell/physics"
)

// closedBox is a sealed square of a binary ideal gas: A enters through the
// left wall and leaves through the right one at the same molar flux (Stefan
// walls, so the exchanged mass moves the mixture), B crosses no boundary.
// No boundary has composition data, so the fill composition times the
// volume fixes both amounts (formulation note, section 6). Invented data.
const closedBox = `
title: sealed box
temperature: 300 K
reference_pressure: 100 kPa
species:
  - {name: A, molar_mass: 32 g/mol}
  - {name: B, molar_mass: 28 g/mol}
diffusivities:
  A: {B: 2e-5 m^2/s}
thermodynamics: ideal-gas
viscosity: 1.8e-5 Pa s
geometry:
  rectangle: {x1: 1 cm, y1: 1 cm, nx: 4, ny: 4, names: {left: in, right: out, bottom: wall, top: wall}}
discretisation: {degree: 1}
boundaries:
  in:
    velocity: stefan-wall
    species: {type: flux, basis: molar, fluxes: {A: -2e-3 mol/(m^2 s)}}
  out:
    velocity: stefan-wall
    species: {type: flux, basis: molar, fluxes: {A: 2e-3 mol/(m^2 s)}}
  wall:
    velocity: wall
    species: impermeable
initial:
  mole_fractions: {A: 0.3, B: 0.7}
`

func TestInventoryFixesTheAmounts(t *testing.T) {
	// The amounts of A and B in the box equal the fill composition times
	// c_T = P/(R T) times the area (the inventory of section 6), to 1e-8
	// relative, although A is far from uniform.
	const tol = 1e-8
	s, o := solved(t, "box.yaml", closedBox)
	rule, err := fem.NewTriangleRule(10)
	if err != nil {
		t.Fatal(err)
	}
	var wsum float64
	for _, w := range rule.Weights {
		wsum += w
	}
	pt := o.NewPoint()
	amount := make([]float64, 2)
	var lo, hi = math.Inf(1), math.Inf(-1)
	for tri := range s.Mesh.Triangles {
		area := s.Mesh.Area(tri)
		for q, xh := range rule.Points {
			o.SampleTo(pt, tri, xh)
			for i := range amount {
				amount[i] += area * rule.Weights[q] / wsum * pt.C[i]
			}
			lo, hi = math.Min(lo, pt.MoleFraction[0]), math.Max(hi, pt.MoleFraction[0])
		}
	}
	cT := 100e3 / (physics.GasConstant * 300)
	for i, x := range []float64{0.3, 0.7} {
		want := x * cT * 1e-4
		if d := math.Abs(amount[i]-want) / want; !(d < tol) {
			t.Errorf("species %d: amount %.12g mol/m, inventory %.12g: relative difference %.3g", i, amount[i], want, d)
		}
	}
	if !(hi-lo > 0.01) {
		t.Errorf("x_A spans only [%g, %g]: the test case does not exercise a non-uniform state", lo, hi)
	}
	t.Logf("x_A in [%.4f, %.4f], %d iterations, balance %.2g", lo, hi, o.Iterations, o.SpeciesBalance)
}
