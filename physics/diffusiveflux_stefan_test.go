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

// patchedMixingChannel is the mixing channel (mixingChannel, inlet velocity
// given) with a patch of the bottom wall, 1 <= x <= 2, that holds the
// composition (0.4, 0.4, 0.2) and lets the species impermeable through it
// not pass: a Stefan wall with composition data.
func patchedMixingChannel(t *testing.T, nx int, impermeable []int) (*Problem, *IdealGas, []float64) {
	prob, gas, mean := mixingChannel(t, nx, nx/4, 5, 1e-7, false)
	onPatch := func(a, b [2]float64) bool {
		return a[1] < 1e-9 && b[1] < 1e-9 && math.Min(a[0], b[0]) > 1-1e-9 && math.Max(a[0], b[0]) < 2+1e-9
	}
	if err := prob.Mesh.TagBoundary(5, "patch", onPatch); err != nil {
		t.Fatal(err)
	}
	xp := []float64{0.4, 0.4, 0.2}
	sp := make([]SpeciesCondition, 3)
	for i := range sp {
		v := math.Log(xp[i]) // RT = P0 = P_ref = 1
		sp[i] = SpeciesCondition{Kind: SpeciesPotential, Potential: func([2]float64) float64 { return v }}
	}
	for _, l := range impermeable {
		sp[l].Kind = SpeciesFlux
	}
	prob.Boundary[5] = BoundaryCondition{Velocity: VelocityCondition{Kind: VelocityStefan}, Species: sp}
	return prob, gas, mean
}

func TestDiffusiveFluxPatchOnMixingChannel(t *testing.T) {
	// A flow-through case with a releasing wall that meets no-slip walls
	// at its ends, where the normal velocity cannot follow the exchanged
	// mass (the patch ends are singular). The constraint J_c.n = 0 holds
	// in every normal-trace moment, so c must not cross the patch at all,
	// and every species must balance over the domain. Measured on 16 x 4
	// cells: 37 iterations, patch flows a -0.0404, b -0.0269, c 4e-18 (on
	// 32 x 8: -0.0418, -0.0293; the patch ends converge slowly). An
	// earlier version that tested the constraint with the velocity basis
	// let c through at 4.8e-3 / 3.4e-3 / 2.4e-3 on 16 / 32 / 64 columns.
	prob, gas, mean := patchedMixingChannel(t, 16, []int{2})
	d, err := NewDiffusiveFlux(prob)
	if err != nil {
		t.Fatal(err)
	}
	sol, rep, err := d.SolveNonlinear(&DiffusiveFluxSettings{Gas: gas, Pressure0: 1, Initial: mean, MaxIterations: 80})
	if err != nil {
		t.Fatal(err)
	}
	if !rep.Converged || rep.Iterations > 60 {
		t.Errorf("converged %v after %d iterations, want convergence within 60", rep.Converged, rep.Iterations)
	}
	flows := map[int][]float64{}
	for _, tag := range []int{1, 2, 3, 4, 5} {
		if flows[tag], err = sol.BoundaryMassFlow(tag); err != nil {
			t.Fatal(err)
		}
	}
	patch := flows[5]
	if !(patch[0] < 0) || !(math.Abs(patch[2]) < 1e-12*math.Abs(patch[0])) {
		t.Errorf("patch flows %v: want a released (negative) and c not crossing", patch)
	}
	for i := 0; i < 3; i++ {
		var sum, scale float64
		for _, f := range flows {
			sum += f[i]
			scale = math.Max(scale, math.Abs(f[i]))
		}
		if !(math.Abs(sum) < 1e-9*scale) {
			t.Errorf("species %d: boundary flows sum to %.3g (largest %.3g), want balance", i, sum, scale)
		}
	}
	cons := sol.Conservation()
	for i := 0; i < 2; i++ {
		if !(cons[i] < 1e-11) {
			t.Errorf("species %d: element balance defect %.3g, want < 1e-11", i, cons[i])
		}
	}
	t.Logf("%d iterations, patch flows %.4g, element balances %.2g", rep.Iterations, patch, cons)

	// With both b and c impermeable and no composition boundary elsewhere
	// the split of b and c at the wall has no datum in a step; the
	// iteration pins b's relative potential in one element and sets its
	// level by b's balance. Measured on 16 / 32 / 64 columns: 42 / 43 /
	// 47 iterations, patch flux of a -0.0316 / -0.0329 / -0.0335, b and c
	// through the patch below 1e-17. (b) with beta 0.3 on the same
	// problem: -0.0354 / -0.0363 / -0.0369 with a mass-average defect of
	// 2.7e-3 that does not fall: the two differ by 10 %, which this test
	// does not settle (docs/augmentation.md).
	prob2, gas2, mean2 := patchedMixingChannel(t, 16, []int{1, 2})
	d2, err := NewDiffusiveFlux(prob2)
	if err != nil {
		t.Fatal(err)
	}
	sol2, rep2, err := d2.SolveNonlinear(&DiffusiveFluxSettings{Gas: gas2, Pressure0: 1, Initial: mean2, MaxIterations: 80})
	if err != nil {
		t.Fatal(err)
	}
	if !rep2.Converged || rep2.Iterations > 60 {
		t.Errorf("two impermeable species: converged %v after %d iterations, want convergence within 60", rep2.Converged, rep2.Iterations)
	}
	patch2, err := sol2.BoundaryMassFlow(5)
	if err != nil {
		t.Fatal(err)
	}
	if !(patch2[0] < 0) || !(math.Abs(patch2[1]) < 1e-12*math.Abs(patch2[0])) || !(math.Abs(patch2[2]) < 1e-12*math.Abs(patch2[0])) {
		t.Errorf("two impermeable species: patch flows %v, want a released and b, c not crossing", patch2)
	}
	cons2 := sol2.Conservation()
	for i := 0; i < 2; i++ {
		if !(cons2[i] < 1e-9) {
			t.Errorf("two impermeable species: species %d element balance defect %.3g, want < 1e-9", i, cons2[i])
		}
	}
	t.Logf("two impermeable species: %d iterations, patch flows %.4g, element balances %.2g", rep2.Iterations, patch2, cons2)
}
