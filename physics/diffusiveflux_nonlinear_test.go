package physics

import (
	"math"
	"testing"

	"mixwell/mesh"
)

// mixingChannel poses a mixing channel of our own (invented scaled data):
// [0, 4] x [0, 1], a ternary ideal gas entering on the left (tag 4) with a
// parabolic profile of mean speed u and a composition that varies across
// the height, no-slip impermeable walls (tags 1, 3), and an outflow on the
// right (tag 2): open at p = 0 with zero tangential velocity. Nothing but
// diffusion and convection changes the composition, so every species leaves
// as much as enters, and the mixture leaves more uniform than it came.
func mixingChannel(t testing.TB, nx, ny int, u, S float64, massInlet bool) (*Problem, *IdealGas, []float64) {
	t.Helper()
	mix, err := NewMixture([]Species{{"a", 1}, {"b", 2}, {"c", 3}},
		[]Pair{{"a", "b", 1}, {"a", "c", 0.5}, {"b", "c", 0.8}})
	if err != nil {
		t.Fatal(err)
	}
	m, err := mesh.Rectangle(0, 0, 4, 1, nx, ny, mesh.AlternatingDiagonal)
	if err != nil {
		t.Fatal(err)
	}
	gas, err := NewIdealGas(mix, 1, 1)
	if err != nil {
		t.Fatal(err)
	}
	xin := func(y float64) [3]float64 { return [3]float64{0.2 + 0.4*y, 0.5 - 0.2*y, 0.3 - 0.2*y} }
	profile := func(y float64) float64 { return 6 * u * y * (1 - y) }
	inflow := func(x [2]float64) [2]float64 { return [2]float64{profile(x[1]), 0} }
	inlet := make([]SpeciesCondition, 3)
	for i := range inlet {
		sp := i
		inlet[i] = SpeciesCondition{Kind: SpeciesFlux, Flux: func(x, n [2]float64) float64 {
			// J_i.n = rho_i v.n with the inflow composition on the
			// equation of state at the reference pressure (c_T = 1).
			return mix.mass[sp] * xin(x[1])[sp] * profile(x[1]) * n[0]
		}}
	}
	wall := []SpeciesCondition{{Kind: SpeciesFlux}, {Kind: SpeciesFlux}, {Kind: SpeciesFlux}}
	out := []SpeciesCondition{{Kind: SpeciesOutflow}, {Kind: SpeciesOutflow}, {Kind: SpeciesOutflow}}
	prob := &Problem{
		Mesh: m, Mixture: mix, Degree: 1, S: S,
		Viscosity: ConstantViscosity(1), BulkViscosity: 2.0 / 3,
		Boundary: map[int]BoundaryCondition{
			1: {Velocity: VelocityCondition{Kind: VelocityGiven}, Species: wall},
			2: {Velocity: VelocityCondition{Kind: VelocityTraction, NoTangential: true}, Species: out},
			3: {Velocity: VelocityCondition{Kind: VelocityGiven}, Species: wall},
			4: {Velocity: VelocityCondition{Kind: VelocityGiven, Velocity: inflow}, Species: inlet},
		},
	}
	if massInlet {
		// The inflow gives the mass fluxes; the normal velocity follows
		// as their sum over the density there (a Stefan wall with flux
		// data).
		bc := prob.Boundary[4]
		bc.Velocity = VelocityCondition{Kind: VelocityStefan}
		prob.Boundary[4] = bc
	}
	mean := []float64{0.4, 0.4, 0.2} // the inflow's flux-weighted mean
	return prob, gas, mean
}

func TestDiffusiveFluxMixingChannel(t *testing.T) {
	// Remedy (c) as a nonlinear solver on a flow-through case: the mixing
	// channel with an inlet of given mass fluxes (docs/augmentation.md,
	// "Remedy (c) on a mixing channel"). Checked: convergence; the total
	// concentration on the equation of state to rounding (the level comes
	// from it); every element balance of the independent species closed
	// (the last one's converges, Taylor–Hood); the domain balance of every
	// species closed; and the outgoing mixture has the mean inflow
	// composition (0.4, 0.4, 0.2), as the balance of a channel without
	// sources demands. Measured on 16 x 4 cells: 32 iterations, EOS defect
	// 1.6e-15, element balances 1.5e-14 and 1.1e-13 (last species 8.1e-4).
	prob, gas, mean := mixingChannel(t, 16, 4, 5, 1e-7, true)
	d, err := NewDiffusiveFlux(prob)
	if err != nil {
		t.Fatal(err)
	}
	sol, rep, err := d.SolveNonlinear(&DiffusiveFluxSettings{Gas: gas, Pressure0: 1, Initial: mean})
	if err != nil {
		t.Fatal(err)
	}
	if !rep.Converged || rep.Iterations > 60 {
		t.Errorf("converged %v after %d iterations, want convergence within 60", rep.Converged, rep.Iterations)
	}
	if !(rep.EOSDefect < 1e-12) {
		t.Errorf("EOS defect %.3g, want < 1e-12", rep.EOSDefect)
	}
	cons := sol.Conservation()
	for i := 0; i < 2; i++ {
		if !(cons[i] < 1e-11) {
			t.Errorf("species %d: element balance defect %.3g, want < 1e-11", i, cons[i])
		}
	}
	in, err := sol.BoundaryMassFlow(4)
	if err != nil {
		t.Fatal(err)
	}
	out, err := sol.BoundaryMassFlow(2)
	if err != nil {
		t.Fatal(err)
	}
	var molar [3]float64
	var total float64
	for i := 0; i < 3; i++ {
		if d := math.Abs(in[i] + out[i]); !(d < 1e-9*math.Abs(in[i])) {
			t.Errorf("species %d: inflow %.12g, outflow %.12g, want them to balance", i, in[i], out[i])
		}
		molar[i] = out[i] / prob.Mixture.MolarMass(i)
		total += molar[i]
	}
	for i := 0; i < 3; i++ {
		if x := molar[i] / total; math.Abs(x-mean[i]) > 1e-5 {
			t.Errorf("species %d leaves with mole fraction %.8f, want the inflow mean %g", i, x, mean[i])
		}
	}
	// The reference pressure of the potentials is a convention: another
	// one must give the same flows.
	gas2, err := NewIdealGas(prob.Mixture, 1, 2.5)
	if err != nil {
		t.Fatal(err)
	}
	d2, err := NewDiffusiveFlux(prob)
	if err != nil {
		t.Fatal(err)
	}
	sol2, _, err := d2.SolveNonlinear(&DiffusiveFluxSettings{Gas: gas2, Pressure0: 1, Initial: mean})
	if err != nil {
		t.Fatal(err)
	}
	out2, err := sol2.BoundaryMassFlow(2)
	if err != nil {
		t.Fatal(err)
	}
	for i := range out {
		if math.Abs(out2[i]-out[i]) > 1e-8*math.Abs(out[i]) {
			t.Errorf("species %d: outflow %.12g with P_ref = 1, %.12g with P_ref = 2.5", i, out[i], out2[i])
		}
	}
}
