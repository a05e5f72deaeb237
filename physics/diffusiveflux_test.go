package physics

import (
	"strings"
	"testing"

	"mixwell/mesh"
)

// uniformChannel poses plane Poiseuille flow of a ternary mixture of uniform
// composition c in the channel [0, 2] x [0, 1] (tags: 1 bottom, 2 right,
// 3 top, 4 left): parabolic inflow of peak speed u on the left, no-slip
// impermeable walls, an open outlet on the right with the traction of the
// exact flow, and the potentials mu on the left and right. Scaled O(1)
// data of our own; eta = 1, lambda = 0.
func uniformChannel(t testing.TB, c, mu []float64, u float64) *Problem {
	return uniformChannelMesh(t, c, mu, u, 4, 2)
}

// uniformChannelMesh is uniformChannel on an nx by ny grid of cells.
func uniformChannelMesh(t testing.TB, c, mu []float64, u float64, nx, ny int) *Problem {
	t.Helper()
	mix, err := NewMixture([]Species{{"a", 1}, {"b", 2}, {"c", 3}},
		[]Pair{{"a", "b", 1}, {"a", "c", 0.5}, {"b", "c", 2}})
	if err != nil {
		t.Fatal(err)
	}
	m, err := mesh.Rectangle(0, 0, 2, 1, nx, ny, mesh.AlternatingDiagonal)
	if err != nil {
		t.Fatal(err)
	}
	const eta = 1.0
	inflow := func(x [2]float64) [2]float64 { return [2]float64{4 * u * x[1] * (1 - x[1]), 0} }
	// -eta lap v + grad p = 0 gives p = 8 eta u (2 - x) (zero at the
	// outlet); the traction there is (-p, eta dv_x/dy).
	outlet := func(x, n [2]float64) [2]float64 {
		return [2]float64{0, eta * 4 * u * (1 - 2*x[1])}
	}
	potentials := func() []SpeciesCondition {
		out := make([]SpeciesCondition, 3)
		for i := range out {
			v := mu[i]
			out[i] = SpeciesCondition{Kind: SpeciesPotential, Potential: func([2]float64) float64 { return v }}
		}
		return out
	}
	wall := []SpeciesCondition{{Kind: SpeciesFlux}, {Kind: SpeciesFlux}, {Kind: SpeciesFlux}}
	return &Problem{
		Mesh: m, Mixture: mix, Degree: 1, S: 1e-7,
		Viscosity: ConstantViscosity(eta), BulkViscosity: 2 * eta / 3,
		Boundary: map[int]BoundaryCondition{
			1: {Velocity: VelocityCondition{Kind: VelocityGiven}, Species: wall},
			2: {Velocity: VelocityCondition{Kind: VelocityTraction, Traction: outlet}, Species: potentials()},
			3: {Velocity: VelocityCondition{Kind: VelocityGiven}, Species: wall},
			4: {Velocity: VelocityCondition{Kind: VelocityGiven, Velocity: inflow}, Species: potentials()},
		},
	}
}

func TestDiffusiveFluxReproducesPoiseuille(t *testing.T) {
	// Plane Poiseuille flow (common practice: the parabolic profile solves
	// Stokes flow with a linear pressure) of a mixture of uniform
	// composition lies in the Taylor–Hood P2/P1 space, and its diffusive
	// fluxes vanish, so the frozen diffusive-flux step must reproduce it
	// to rounding: v exact, p exact, J_i = rho_i v, and the relative
	// potentials constant.
	c := []float64{0.3, 0.5, 0.2}
	mu := []float64{-1.2, 0.4, 0.9}
	const u = 1.5
	prob := uniformChannel(t, c, mu, u)
	d, err := NewDiffusiveFlux(prob)
	if err != nil {
		t.Fatal(err)
	}
	sol, err := d.SolveFrozen(func(x [2]float64, cq []float64, gc [][2]float64) {
		copy(cq, c)
		clear(gc)
	})
	if err != nil {
		t.Fatal(err)
	}
	mass := []float64{1, 2, 3}
	e := sol.Errors(func(x [2]float64) ([2]float64, [2][2]float64, float64, [][2]float64, []float64, []float64) {
		v := [2]float64{4 * u * x[1] * (1 - x[1]), 0}
		grad := [2][2]float64{{0, 4 * u * (1 - 2*x[1])}, {0, 0}}
		J := make([][2]float64, 3)
		for i := range J {
			J[i] = [2]float64{mass[i] * c[i] * v[0], 0}
		}
		return v, grad, 8 * u * (2 - x[0]), J, make([]float64, 3), mu
	}, 8)
	const tol = 1e-10
	check := func(name string, v float64) {
		if !(v < tol) {
			t.Errorf("%s error %.3g, want < %g", name, v, tol)
		}
	}
	check("velocity L2", e.VelocityL2)
	check("velocity H1", e.VelocityH1)
	check("pressure", e.Pressure)
	for i := 0; i < 3; i++ {
		check("flux "+prob.Mixture.Name(i), e.Flux[i])
		check("flux divergence "+prob.Mixture.Name(i), e.FluxDiv[i])
	}
	for i := 0; i < 2; i++ {
		check("relative potential "+prob.Mixture.Name(i), e.Potential[i])
	}
	// The measurement must be able to fail: a wrong pressure level shows.
	e2 := sol.Errors(func(x [2]float64) ([2]float64, [2][2]float64, float64, [][2]float64, []float64, []float64) {
		v := [2]float64{4 * u * x[1] * (1 - x[1]), 0}
		grad := [2][2]float64{{0, 4 * u * (1 - 2*x[1])}, {0, 0}}
		J := make([][2]float64, 3)
		for i := range J {
			J[i] = [2]float64{mass[i] * c[i] * v[0], 0}
		}
		return v, grad, 8*u*(2-x[0]) + 1e-3, J, make([]float64, 3), mu
	}, 8)
	if !(e2.Pressure > 1e-4) {
		t.Errorf("a shifted exact pressure gave error %.3g", e2.Pressure)
	}
}

func TestDiffusiveFluxRejectsUnbuiltConditions(t *testing.T) {
	c := []float64{0.3, 0.5, 0.2}
	mu := []float64{-1.2, 0.4, 0.9}
	cases := []struct {
		name string
		edit func(p *Problem)
		want []string
	}{
		{"Stefan wall with composition for every species", func(p *Problem) {
			bc := p.Boundary[4]
			bc.Velocity = VelocityCondition{Kind: VelocityStefan}
			p.Boundary[4] = bc
		}, []string{"(tag 4)", "composition data for every species", "an impermeable species"}},
		{"Stefan wall with outflow data", func(p *Problem) {
			bc := p.Boundary[4]
			bc.Velocity = VelocityCondition{Kind: VelocityStefan}
			bc.Species = []SpeciesCondition{{Kind: SpeciesOutflow}, {Kind: SpeciesOutflow}, {Kind: SpeciesOutflow}}
			p.Boundary[4] = bc
		}, []string{"(tag 4)", "outflow"}},
		{"impermeable species without wall potential", func(p *Problem) {
			bc := p.Boundary[4]
			bc.Velocity = VelocityCondition{Kind: VelocityStefan}
			bc.Species = append([]SpeciesCondition(nil), bc.Species...)
			bc.Species[1] = SpeciesCondition{Kind: SpeciesFlux}
			p.Boundary[4] = bc
		}, []string{"(tag 4)", `impermeable species "b"`, "potential"}},
		{"sloped slip wall", func(p *Problem) {
			sk, err := mesh.Rectangle(0, 0, 2, 1, 4, 2, mesh.AlternatingDiagonal)
			if err != nil {
				t.Fatal(err)
			}
			for i := range sk.Points {
				sk.Points[i][1] += 0.1 * sk.Points[i][0]
			}
			p.Mesh = sk
			bc := p.Boundary[3]
			bc.Velocity = VelocityCondition{Kind: VelocitySlip}
			p.Boundary[3] = bc
		}, []string{"tag 3", "parallel to a coordinate axis"}},
		{"mixed data", func(p *Problem) {
			bc := p.Boundary[4]
			sp := append([]SpeciesCondition(nil), bc.Species...)
			sp[1] = SpeciesCondition{Kind: SpeciesFlux}
			bc.Species = sp
			p.Boundary[4] = bc
		}, []string{"tag 4", "mixes flux and potential", `"b" has flux`}},
		{"flux on an open boundary", func(p *Problem) {
			bc := p.Boundary[2]
			bc.Species = []SpeciesCondition{{Kind: SpeciesFlux}, {Kind: SpeciesFlux}, {Kind: SpeciesFlux}}
			p.Boundary[2] = bc
		}, []string{"tag 2", "open (traction)", "velocity given"}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			p := uniformChannel(t, c, mu, 1)
			tc.edit(p)
			_, err := NewDiffusiveFlux(p)
			if err == nil {
				t.Fatal("no error")
			}
			for _, w := range tc.want {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("error %q does not mention %q", err, w)
				}
			}
		})
	}
}

func TestDiffusiveFluxRejectsNonPositiveState(t *testing.T) {
	p := uniformChannel(t, []float64{0.3, 0.5, 0.2}, []float64{0, 0, 0}, 1)
	d, err := NewDiffusiveFlux(p)
	if err != nil {
		t.Fatal(err)
	}
	_, err = d.SolveFrozen(func(x [2]float64, c []float64, gc [][2]float64) {
		copy(c, []float64{0.3, -0.1, 0.2})
		clear(gc)
	})
	if err == nil || !strings.Contains(err.Error(), `"b"`) || !strings.Contains(err.Error(), "not positive") {
		t.Errorf("error %v, want one naming species \"b\" and a non-positive concentration", err)
	}
}

// benchmarkFrozenStep times one frozen step (assembly, refactorisation,
// solve) of the total-flux or the diffusive-flux discretisation on the
// uniform channel with 32 by 16 cells, k = 1 (the total-flux one with the
// default beta of a case without outflow, ClosedSpeciesAugmentation); the
// ordering is kept from a first solve outside the timing.
func benchmarkFrozenStep(b *testing.B, diffusive bool) {
	c := []float64{0.3, 0.5, 0.2}
	prob := uniformChannelMesh(b, c, []float64{-1.2, 0.4, 0.9}, 1.5, 32, 16)
	prob.SpeciesAugmentation = ClosedSpeciesAugmentation
	conc := func(x [2]float64, cq []float64, gc [][2]float64) {
		// A mild composition gradient, so that convection matters.
		cq[0], cq[1], cq[2] = c[0]*(1+0.2*x[0]), c[1]*(1-0.1*x[1]), c[2]
		gc[0], gc[1], gc[2] = [2]float64{0.2 * c[0], 0}, [2]float64{0, -0.1 * c[1]}, [2]float64{}
	}
	var step func() error
	if diffusive {
		d, err := NewDiffusiveFlux(prob)
		if err != nil {
			b.Fatal(err)
		}
		step = func() error { _, err := d.SolveFrozen(conc); return err }
	} else {
		d, err := NewDiscretisation(prob)
		if err != nil {
			b.Fatal(err)
		}
		step = func() error { _, err := d.SolveFrozen(conc); return err }
	}
	if err := step(); err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		benchSinkErr = step()
	}
}

func BenchmarkFrozenStepTotalFlux(b *testing.B)     { benchmarkFrozenStep(b, false) }
func BenchmarkFrozenStepDiffusiveFlux(b *testing.B) { benchmarkFrozenStep(b, true) }
