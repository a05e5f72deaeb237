package physics

import (
	"math"
	"testing"

	"mixwell/mesh"
)

// stefanTube poses, in scaled units with RT = 1 and P0 = P_ref = 1
// (c_T = 1), species a evaporating from a liquid surface at the bottom of
// a slip-walled tube [0, 0.1] x [0, 1] (mole fraction x0 there; b does not
// dissolve: a Stefan wall with composition data and one impermeable
// species) into an open mouth at the top with mole fraction xL. Molar
// masses 2 and 1, D_ab = 1; invented round numbers.
func stefanTube(t testing.TB, ny, degree int, x0, xL float64) (*Problem, *IdealGas) {
	t.Helper()
	mix, err := NewMixture([]Species{{"a", 2}, {"b", 1}}, []Pair{{"a", "b", 1}})
	if err != nil {
		t.Fatal(err)
	}
	m, err := mesh.Rectangle(0, 0, 0.1, 1, 1, ny, mesh.AlternatingDiagonal)
	if err != nil {
		t.Fatal(err)
	}
	gas, err := NewIdealGas(mix, 1, 1)
	if err != nil {
		t.Fatal(err)
	}
	constant := func(v float64) func([2]float64) float64 { return func([2]float64) float64 { return v } }
	wall := []SpeciesCondition{{Kind: SpeciesFlux}, {Kind: SpeciesFlux}}
	prob := &Problem{
		Mesh: m, Mixture: mix, Degree: degree, S: 1e-7,
		Viscosity: ConstantViscosity(1), BulkViscosity: 2.0 / 3,
		Boundary: map[int]BoundaryCondition{
			1: {Velocity: VelocityCondition{Kind: VelocityStefan}, Species: []SpeciesCondition{
				{Kind: SpeciesPotential, Potential: constant(math.Log(x0))},
				{Kind: SpeciesFlux, Potential: constant(math.Log(1 - x0))},
			}},
			2: {Velocity: VelocityCondition{Kind: VelocitySlip}, Species: wall},
			3: {Velocity: VelocityCondition{Kind: VelocityTraction}, Species: []SpeciesCondition{
				{Kind: SpeciesPotential, Potential: constant(math.Log(xL))},
				{Kind: SpeciesPotential, Potential: constant(math.Log(1 - xL))},
			}},
			4: {Velocity: VelocityCondition{Kind: VelocitySlip}, Species: wall},
		},
	}
	return prob, gas
}

func TestDiffusiveFluxStefanTubeClosedForm(t *testing.T) {
	// Diffusion of a through stagnant b (Bird, Stewart & Lightfoot,
	// Transport Phenomena, 2nd ed., 2002, section 18.2):
	// N_a = (c D_ab / L) ln((1 - x_L)/(1 - x_0)), here ln(2.25) with
	// c = D = L = 1. The surface is a Stefan wall whose normal velocity is
	// an unknown tied to the impermeable species' diffusive flux. Checked:
	// N_a at the surface and the mouth within 1e-6 of the closed form; b
	// stagnant (its flux through both ends below 1e-9 of N_a). Measured on
	// 1 x 16 cells: 13 and 14 iterations, relative differences 9.2e-8 (k =
	// 1) and 1.3e-7 (k = 2), the size of S = 1e-7, by which the pressure
	// moves c_T off 1.
	const x0, xL = 0.6, 0.1
	want := math.Log((1 - xL) / (1 - x0))
	for _, degree := range []int{1, 2} {
		prob, gas := stefanTube(t, 16, degree, x0, xL)
		d, err := NewDiffusiveFlux(prob)
		if err != nil {
			t.Fatal(err)
		}
		sol, rep, err := d.SolveNonlinear(&DiffusiveFluxSettings{Gas: gas, Pressure0: 1, Initial: []float64{0.35, 0.65}})
		if err != nil {
			t.Fatal(err)
		}
		surface, err := sol.BoundaryMassFlow(1)
		if err != nil {
			t.Fatal(err)
		}
		mouth, err := sol.BoundaryMassFlow(3)
		if err != nil {
			t.Fatal(err)
		}
		const width = 0.1
		ma := prob.Mixture.MolarMass(0)
		nIn, nOut := -surface[0]/ma/width, mouth[0]/ma/width
		t.Logf("k=%d: %d iterations, N_a in %.10f out %.10f (closed form %.10f), b %.3g %.3g",
			degree, rep.Iterations, nIn, nOut, want, surface[1], mouth[1])
		for _, got := range []float64{nIn, nOut} {
			if r := math.Abs(got-want) / want; !(r < 1e-6) {
				t.Errorf("k=%d: N_a = %.10f, closed form %.10f: relative difference %.3g", degree, got, want, r)
			}
		}
		for _, b := range []float64{surface[1], mouth[1]} {
			if !(math.Abs(b) < 1e-9*want) {
				t.Errorf("k=%d: b crosses an end at %.3g, want it stagnant", degree, b)
			}
		}
	}
}

func TestDiffusiveFluxStefanTubeTwoInertSpecies(t *testing.T) {
	// Diffusion of a through a stagnant mixture of b and c (N_b = N_c =
	// 0). The Stefan–Maxwell equations of an ideal gas,
	// -c grad x_i = sum_j (x_j N_i - x_i N_j)/D_ij, give for each inert
	// species d ln x_i/dz = N_a/(c D_ai), so x_i(z) = x_i,0
	// exp(N_a z/(c D_ai)); with the mouth composition and x_b,0 + x_c,0 =
	// 1 - x_a,0 at the surface, N_a is the root of
	// x_b,L exp(-N_a L/(c D_ab)) + x_c,L exp(-N_a L/(c D_ac)) = 1 - x_a,0
	// (our derivation from the Stefan–Maxwell equations, common practice;
	// solved here by bisection). The split of b and c at the surface is
	// unknown: the wall multiplier. Checked: N_a within 1e-5 of the root at
	// both ends, and b and c stagnant. Measured on 1 x 16 cells, k = 1: 11
	// iterations, N_a off the root by 4.8e-7, b and c through the ends
	// below 1e-15.
	mix, err := NewMixture([]Species{{"a", 2}, {"b", 1}, {"c", 3}},
		[]Pair{{"a", "b", 1}, {"a", "c", 0.5}, {"b", "c", 2}})
	if err != nil {
		t.Fatal(err)
	}
	const xa0 = 0.6
	xL := []float64{0.1, 0.6, 0.3}
	dab, dac := 1.0, 0.5
	lo, hi := 0.0, 10.0
	for k := 0; k < 200; k++ {
		mid := (lo + hi) / 2
		if xL[1]*math.Exp(-mid/dab)+xL[2]*math.Exp(-mid/dac) > 1-xa0 {
			lo = mid
		} else {
			hi = mid
		}
	}
	want := (lo + hi) / 2
	xb0, xc0 := xL[1]*math.Exp(-want/dab), xL[2]*math.Exp(-want/dac)
	m, err := mesh.Rectangle(0, 0, 0.1, 1, 1, 16, mesh.AlternatingDiagonal)
	if err != nil {
		t.Fatal(err)
	}
	gas, err := NewIdealGas(mix, 1, 1)
	if err != nil {
		t.Fatal(err)
	}
	constant := func(v float64) func([2]float64) float64 { return func([2]float64) float64 { return v } }
	wall := []SpeciesCondition{{Kind: SpeciesFlux}, {Kind: SpeciesFlux}, {Kind: SpeciesFlux}}
	mouth := make([]SpeciesCondition, 3)
	for i := range mouth {
		mouth[i] = SpeciesCondition{Kind: SpeciesPotential, Potential: constant(math.Log(xL[i]))}
	}
	prob := &Problem{
		Mesh: m, Mixture: mix, Degree: 1, S: 1e-7,
		Viscosity: ConstantViscosity(1), BulkViscosity: 2.0 / 3,
		Boundary: map[int]BoundaryCondition{
			// The data split of b and c at the surface (0.3, 0.1) is not
			// the solution's: only their sum may matter.
			1: {Velocity: VelocityCondition{Kind: VelocityStefan}, Species: []SpeciesCondition{
				{Kind: SpeciesPotential, Potential: constant(math.Log(xa0))},
				{Kind: SpeciesFlux, Potential: constant(math.Log(0.3))},
				{Kind: SpeciesFlux, Potential: constant(math.Log(0.1))},
			}},
			2: {Velocity: VelocityCondition{Kind: VelocitySlip}, Species: wall},
			3: {Velocity: VelocityCondition{Kind: VelocityTraction}, Species: mouth},
			4: {Velocity: VelocityCondition{Kind: VelocitySlip}, Species: wall},
		},
	}
	d, err := NewDiffusiveFlux(prob)
	if err != nil {
		t.Fatal(err)
	}
	sol, rep, err := d.SolveNonlinear(&DiffusiveFluxSettings{Gas: gas, Pressure0: 1, Initial: []float64{0.35, 0.4, 0.25}})
	if err != nil {
		t.Fatal(err)
	}
	surface, err := sol.BoundaryMassFlow(1)
	if err != nil {
		t.Fatal(err)
	}
	top, err := sol.BoundaryMassFlow(3)
	if err != nil {
		t.Fatal(err)
	}
	const width = 0.1
	ma := mix.MolarMass(0)
	nIn, nOut := -surface[0]/ma/width, top[0]/ma/width
	t.Logf("%d iterations, N_a in %.10f out %.10f (root %.10f), b %.3g %.3g, c %.3g %.3g; surface x_b %.6f x_c %.6f",
		rep.Iterations, nIn, nOut, want, surface[1], top[1], surface[2], top[2], xb0, xc0)
	for _, got := range []float64{nIn, nOut} {
		if r := math.Abs(got-want) / want; !(r < 1e-5) {
			t.Errorf("N_a = %.10f, root %.10f: relative difference %.3g", got, want, r)
		}
	}
	for i := 1; i < 3; i++ {
		for _, v := range []float64{surface[i], top[i]} {
			if !(math.Abs(v) < 1e-9*want) {
				t.Errorf("species %d crosses an end at %.3g, want it stagnant", i, v)
			}
		}
	}
}
