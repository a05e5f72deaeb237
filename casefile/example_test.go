package casefile_test

import (
	"fmt"
	"log"

	"mixwell/casefile"
)

func ExampleParse() {
	const text = `
temperature: 55 degC
reference_pressure: 1 atm
species:
  - {name: A, molar_mass: 2 g/mol}
  - {name: B, molar_mass: 28 g/mol}
diffusivities:
  A: {B: 0.7 cm^2/s}
thermodynamics: ideal-gas
viscosity: 1.8e-5 Pa s
geometry:
  rectangle: {x1: 1 cm, y1: 5 cm, nx: 2, ny: 10, names: {left: wall, right: wall}}
boundaries:
  bottom:
    velocity: stefan-wall
    species: {type: composition, mole_fractions: {A: 0.6, B: 0.4}, impermeable: [B]}
  top:
    velocity: open
    species: {type: composition, mole_fractions: {A: 0.1, B: 0.9}}
  wall:
    velocity: slip
`
	c, err := casefile.Parse("tube.yaml", []byte(text))
	if err != nil {
		log.Fatal(err)
	}
	fmt.Printf("T = %.2f K, P = %g Pa, D_AB = %g m^2/s, height %g m\n",
		c.Temperature, c.Pressure, c.Diffusivities[0].Value, c.Geometry.Rectangle.Y1)
	fmt.Println(c.Boundary("wall").Species.Kind, c.Solver.Method, c.Discretisation.Degree)

	_, err = casefile.Parse("tube.yaml", []byte(text+"solver: {tolerance: 1e-8 s}\n"))
	fmt.Println(err)
	// Output:
	// T = 328.15 K, P = 101325 Pa, D_AB = 7e-05 m^2/s, height 0.05 m
	// impermeable anderson 2
	// tube.yaml:22:21: solver.tolerance: unit "s" has dimension time, want dimensionless (e.g. a plain number)
}

func ExampleLoad() {
	c, err := casefile.Load("../testdata/cases/stefan-tube.yaml")
	if err != nil {
		log.Fatal(err)
	}
	fmt.Print(c.Summary())
	// Output:
	// case ../testdata/cases/stefan-tube.yaml: Stefan tube, acetone (1) / methanol (2) / air (3)
	//   3 species: acetone (58.08 g/mol), methanol (32.04 g/mol), air (28.96 g/mol)
	//   T = 328.5 K, P_ref = 99400 Pa, thermodynamics ideal-gas-at-pressure, viscosity 2e-05 Pa s
	//   geometry: rectangle [0, 0.002] x [0, 0.238] m, 1 x 64 cells, 16 layers at mouth; boundaries mouth, surface, wall
	//   discretisation: k = 2, taylor-hood, bdm, quadrature default, total-flux formulation
	//   mouth: velocity open at p = 0 Pa; species composition (acetone 0, methanol 0, air 1)
	//   surface: velocity stefan-wall; species composition (acetone 0.319, methanol 0.528, air 0.153), impermeable to air
	//   wall: velocity slip; species impermeable
	//   solver: anderson (depth 20), tolerance 1e-07, at most 150 iterations, update potential, floor 1e-06
	//   output: 10 fields, subdivision 3, 1 probe line
}
