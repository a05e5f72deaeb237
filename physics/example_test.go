package physics_test

import (
	"fmt"
	"log"

	"mixwell/physics"
)

func ExampleNewMixture() {
	species := []physics.Species{{Name: "H2O", MolarMass: 18.015e-3}, {Name: "air", MolarMass: 28.96e-3}}
	mix, err := physics.NewMixture(species, []physics.Pair{{A: "H2O", B: "air", Value: 2.6e-5}})
	if err != nil {
		log.Fatal(err)
	}
	fmt.Printf("%d species, D(H2O, air) = %g m^2/s\n", mix.Len(), mix.Diffusivity(0, 1))

	_, err = physics.NewMixture(species, []physics.Pair{{A: "H2O", B: "air", Value: -1}})
	fmt.Println(err)
	// Output:
	// 2 species, D(H2O, air) = 2.6e-05 m^2/s
	// physics: pair ("H2O", "air"): diffusivity -1 is not positive
}

func ExampleMixture_TransportMatrixTo() {
	mix, err := physics.NewMixture(
		[]physics.Species{{Name: "A", MolarMass: 0.002}, {Name: "B", MolarMass: 0.032}},
		[]physics.Pair{{A: "A", B: "B", Value: 1e-5}},
	)
	if err != nil {
		log.Fatal(err)
	}
	m := make([]float64, 4)
	mix.TransportMatrixTo(m, []float64{10, 30}, 2500)
	// M_12 = -RT c_1 c_2 / (c_T D_12) = -2500 * 10 * 30 / (40 * 1e-5).
	fmt.Printf("[% .4g % .4g]\n[% .4g % .4g]\n", m[0], m[1], m[2], m[3])
	// Output:
	// [ 1.875e+09 -1.875e+09]
	// [-1.875e+09  1.875e+09]
}

// A binary ideal gas at uniform pressure: the species velocities from the
// Onsager–Stefan–Maxwell relations give Fick's law relative to the
// molar-average velocity.
func ExampleMixture_SpeciesVelocitiesTo() {
	mix, err := physics.NewMixture(
		[]physics.Species{{Name: "H2O", MolarMass: 18.015e-3}, {Name: "air", MolarMass: 28.96e-3}},
		[]physics.Pair{{A: "H2O", B: "air", Value: 2.6e-5}},
	)
	if err != nil {
		log.Fatal(err)
	}
	const rt = physics.GasConstant * 300
	cT := 101325 / rt
	x1, gradX1 := 0.02, -1.0 // mole fraction and its gradient (1/m)
	c := []float64{x1 * cT, (1 - x1) * cT}
	// Ideal gas, uniform pressure: d_i = -c_i grad mu_i = -c_T RT grad x_i.
	d := []float64{-cT * rt * gradX1, cT * rt * gradX1}
	v := make([]float64, 2)
	if _, err := mix.SpeciesVelocitiesTo(v, c, d, rt, 0); err != nil {
		log.Fatal(err)
	}
	n1, n2 := c[0]*v[0], c[1]*v[1]
	fmt.Printf("N1 - x1 (N1 + N2) = %.6g mol/(m^2 s)\n", n1-x1*(n1+n2))
	fmt.Printf("-c_T D12 grad x1  = %.6g mol/(m^2 s)\n", -cT*2.6e-5*gradX1)
	// Output:
	// N1 - x1 (N1 + N2) = 0.00105617 mol/(m^2 s)
	// -c_T D12 grad x1  = 0.00105617 mol/(m^2 s)
}

func ExampleIdealGas() {
	mix, err := physics.NewMixture(
		[]physics.Species{{Name: "N2", MolarMass: 28.0134e-3}, {Name: "O2", MolarMass: 31.9988e-3}},
		[]physics.Pair{{A: "N2", B: "O2", Value: 2.1e-5}},
	)
	if err != nil {
		log.Fatal(err)
	}
	const rt = physics.GasConstant * 300
	gas, err := physics.NewIdealGas(mix, rt, 101325)
	if err != nil {
		log.Fatal(err)
	}
	// Potentials of air at 2 atm, then concentrations and the Jacobian back.
	mu := make([]float64, 2)
	if err := gas.PotentialsTo(mu, []float64{0.79, 0.21}, 2*101325); err != nil {
		log.Fatal(err)
	}
	c, dcdmu := make([]float64, 2), make([]float64, 4)
	if err := gas.ConcentrationsTo(c, dcdmu, nil, mu, 0); err != nil {
		log.Fatal(err)
	}
	fmt.Printf("mu/RT = %.4f %.4f\n", mu[0]/rt, mu[1]/rt)
	fmt.Printf("c = %.4f %.4f mol/m^3, thermodynamic pressure %.0f Pa\n", c[0], c[1], gas.Pressure(mu))
	fmt.Printf("dc/dmu diagonal = %.4g %.4g\n", dcdmu[0], dcdmu[3])
	// Output:
	// mu/RT = 0.4574 -0.8675
	// c = 64.1827 17.0612 mol/m^3, thermodynamic pressure 202650 Pa
	// dc/dmu diagonal = 0.02573 0.00684
}

func ExampleMixture_FloorMoleFractionsTo() {
	mix, err := physics.NewMixture(
		[]physics.Species{{Name: "H2O", MolarMass: 18.015e-3}, {Name: "N2", MolarMass: 28.0134e-3}, {Name: "O2", MolarMass: 31.9988e-3}},
		[]physics.Pair{{A: "H2O", B: "N2", Value: 2.6e-5}, {A: "H2O", B: "O2", Value: 2.6e-5}, {A: "N2", B: "O2", Value: 2.1e-5}},
	)
	if err != nil {
		log.Fatal(err)
	}
	x := make([]float64, 3)
	floored, err := mix.FloorMoleFractionsTo(x, []float64{0, 0.79, 0.21}, 0)
	if err != nil {
		log.Fatal(err)
	}
	for _, i := range floored {
		fmt.Printf("warning: mole fraction of %s raised to %g\n", mix.Name(i), x[i])
	}
	fmt.Printf("x = %.8f\n", x)
	// Output:
	// warning: mole fraction of H2O raised to 1e-06
	// x = [0.00000100 0.78999921 0.20999979]
}

func ExampleWilkeViscosity() {
	mix, err := physics.NewMixture(
		[]physics.Species{{Name: "CO2", MolarMass: 44.01e-3}, {Name: "O2", MolarMass: 32.00e-3}, {Name: "N2", MolarMass: 28.02e-3}},
		[]physics.Pair{{A: "CO2", B: "O2", Value: 1.6e-5}, {A: "CO2", B: "N2", Value: 1.6e-5}, {A: "O2", B: "N2", Value: 2.1e-5}},
	)
	if err != nil {
		log.Fatal(err)
	}
	w, err := physics.NewWilkeViscosity(mix, []float64{1.462e-5, 2.031e-5, 1.754e-5})
	if err != nil {
		log.Fatal(err)
	}
	fmt.Printf("eta = %.4g Pa s\n", w.Viscosity([]float64{0.133, 0.039, 0.828}))
	// Output:
	// eta = 1.714e-05 Pa s
}

func ExampleChooseScales() {
	mix, err := physics.NewMixture(
		[]physics.Species{{Name: "H2O", MolarMass: 18.015e-3}, {Name: "air", MolarMass: 28.96e-3}},
		[]physics.Pair{{A: "H2O", B: "air", Value: 2.6e-5}},
	)
	if err != nil {
		log.Fatal(err)
	}
	const rt = physics.GasConstant * 300
	s, err := physics.ChooseScales(mix, physics.ReferenceState{
		Length:             0.1,
		MoleFractions:      []float64{0.02, 0.98},
		TotalConcentration: 101325 / rt,
		RT:                 rt,
		Viscosity:          physics.ConstantViscosity(1.85e-5),
		Speed:              0.01,
	})
	if err != nil {
		log.Fatal(err)
	}
	fmt.Println(s)
	// Output:
	// scales:
	//   length                   L        = 1.000000e-01 m
	//   concentration            c_ref    = 4.062199e+01 mol/m^3
	//   diffusivity              D_ref    = 2.600000e-05 m^2/s
	//   potential                RT       = 2.494339e+03 J/mol
	//   viscosity                eta_ref  = 1.850000e-05 Pa s
	//   density                  rho_ref  = 1.167521e+00 kg/m^3
	//   velocity                 D/L      = 2.600000e-04 m/s
	//   pressure (viscous)       eta v/L  = 4.810000e-08 Pa
	//   pressure (thermo.)       c RT     = 1.013250e+05 Pa
	//   molar flux               c v      = 1.056172e-02 mol/(m^2 s)
	//   mass flux                rho v    = 3.035554e-04 kg/(m^2 s)
	// groups:
	//   S = eta D/(L^2 c RT)     S        = 4.747101e-13
	//   Schmidt eta/(rho D)      Sc       = 6.094440e-01
	//   Peclet U L/D             Pe       = 3.846154e+01
}
