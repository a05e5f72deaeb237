package physics

import (
	"math"
	"strings"
	"testing"

	"mixwell/mesh"
)

// ternary returns the acetone (1), methanol (2), air (3) mixture with the
// Stefan–Maxwell diffusivities of the Carty & Schrodt Stefan tube as
// tabulated by Taylor & Krishna, Multicomponent Mass Transfer (Wiley 1993),
// in SI, with molar masses of common practice (kg/mol). lengthUnit and
// timeUnit rescale the data into other units (1e-3 for millimetres).
func ternary(t *testing.T, lengthUnit float64) *Mixture {
	t.Helper()
	l2 := 1 / (lengthUnit * lengthUnit)
	mix, err := NewMixture(
		[]Species{{"acetone", 58.08e-3}, {"methanol", 32.04e-3}, {"air", 28.96e-3}},
		[]Pair{{"acetone", "methanol", 8.48e-6 * l2}, {"acetone", "air", 13.72e-6 * l2}, {"methanol", "air", 19.91e-6 * l2}})
	if err != nil {
		t.Fatal(err)
	}
	return mix
}

// scaledSlab poses, in the given length unit (1 for metres, 1e-3 for
// millimetres; mass in kg, time in s), a ternary ideal gas in a slab of
// width 0.05 m and height 0.238 m with slip side walls, a no-slip bottom
// of composition (0.319, 0.528, 0.153) and an open top at the reference
// pressure with composition (0.02, 0.03, 0.95). (With both ends open, a
// uniform translation through the slip channel would be a null mode.) It returns the scaled problem, its
// closure and the scales.
func scaledSlab(t *testing.T, unit float64) (*Problem, Closure, Scales) {
	t.Helper()
	const (
		T = 328.5  // K
		P = 99.4e3 // Pa
	)
	// Unit conversions from SI into (unit, kg, s): a length of 1 m is
	// 1/unit units; J = kg m^2/s^2; Pa = kg/(m s^2).
	lu := 1 / unit
	RT := GasConstant * T * lu * lu
	pres := P / lu
	eta := 1.8e-5 / lu
	mix := ternary(t, unit)
	H, W := 0.238*lu, 0.05*lu
	bottom := []float64{0.319, 0.528, 0.153}
	top := []float64{0.02, 0.03, 0.95}
	sc, err := ChooseScales(mix, ReferenceState{Length: H, MoleFractions: bottom, TotalConcentration: pres / RT, RT: RT, Viscosity: ConstantViscosity(eta)})
	if err != nil {
		t.Fatal(err)
	}
	m, err := mesh.Rectangle(0, 0, W/H, 1, 2, 6, mesh.AlternatingDiagonal)
	if err != nil {
		t.Fatal(err)
	}
	smix := mix.Scaled(sc)
	closure, err := NewIdealGas(smix, 1, pres/sc.ThermodynamicPressure())
	if err != nil {
		t.Fatal(err)
	}
	potentials := func(x []float64) []SpeciesCondition {
		mu := make([]float64, 3)
		if err := closure.PotentialsTo(mu, x, pres/sc.ThermodynamicPressure()); err != nil {
			t.Fatal(err)
		}
		out := make([]SpeciesCondition, 3)
		for i := range out {
			v := mu[i]
			out[i] = SpeciesCondition{Kind: SpeciesPotential, Potential: func([2]float64) float64 { return v }}
		}
		return out
	}
	wall := []SpeciesCondition{{Kind: SpeciesFlux}, {Kind: SpeciesFlux}, {Kind: SpeciesFlux}}
	open := VelocityCondition{Kind: VelocityTraction}
	slip := VelocityCondition{Kind: VelocitySlip}
	prob := &Problem{
		Mesh: m, Mixture: smix, Degree: 1, S: sc.S(),
		Viscosity:           ConstantViscosity(1),
		SpeciesAugmentation: 1,
		Boundary: map[int]BoundaryCondition{
			1: {Velocity: VelocityCondition{Kind: VelocityGiven}, Species: potentials(bottom)},
			2: {Velocity: slip, Species: wall},
			3: {Velocity: open, Species: potentials(top)},
			4: {Velocity: slip, Species: wall},
		},
	}
	return prob, closure, sc
}

func TestMetresAndMillimetres(t *testing.T) {
	// The same physical case posed in metres and in millimetres gives the
	// same physical fluxes (formulation note, section 1): the scaled
	// problems agree, so the fluxes agree to rounding. Tolerance 1e-8
	// relative (the requirement).
	const tol = 1e-8
	var flux [2][3]float64
	var groups [2]float64
	for c, unit := range []float64{1, 1e-3} {
		prob, closure, sc := scaledSlab(t, unit)
		groups[c] = sc.S()
		d, err := NewDiscretisation(prob)
		if err != nil {
			t.Fatal(err)
		}
		x0 := []float64{0.17, 0.28, 0.55}
		mu0 := make([]float64, 3)
		if err := closure.PotentialsTo(mu0, x0, 1); err != nil {
			t.Fatal(err)
		}
		sol, rep, err := d.SolveNonlinear(&NonlinearSettings{Closure: closure, Pressure0: 1,
			Initial: func(_ [2]float64, mu []float64) { copy(mu, mu0) }})
		if err != nil {
			t.Fatalf("unit %g: %v", unit, err)
		}
		dg := d.Diagnose(sol)
		if dg.Balance > 1e-10 {
			t.Errorf("unit %g: species balance %.3g", unit, dg.Balance)
		}
		// No production: every element's fluxes balance to rounding, and
		// the defect is measured against the flux through the element.
		if !(dg.Conservation < 1e-12) {
			t.Errorf("unit %g: element conservation defect %.3g, want < 1e-12", unit, dg.Conservation)
		}
		if c == 0 {
			// One flux coefficient moved by 1e-4 of the largest must show.
			j := sol.Flux(0)
			var big float64
			for _, v := range j {
				big = math.Max(big, math.Abs(v))
			}
			k := len(j) / 2
			j[k] += 1e-4 * big
			if got := d.Diagnose(sol).Conservation; !(got > 1e-6) {
				t.Errorf("a perturbed flux gives an element conservation defect %.3g, want > 1e-6", got)
			}
			j[k] -= 1e-4 * big
		}
		for i := 0; i < 3; i++ {
			// Scaled flux through the top per unit scaled depth, back to
			// kg/(s m of depth): J L (the depth is one length unit).
			flux[c][i] = dg.BoundaryFlux[3][i] * sc.MassFlux() * sc.Length / unit
		}
		t.Logf("unit %g: S = %.4g, %d iterations, top fluxes %.10g kg/(s m)", unit, sc.S(), rep.Iterations, flux[c])
	}
	if math.Abs(groups[0]-groups[1]) > 1e-12*groups[0] {
		t.Errorf("S differs: %g (m) and %g (mm)", groups[0], groups[1])
	}
	for i := 0; i < 3; i++ {
		if d := math.Abs(flux[0][i]-flux[1][i]) / math.Abs(flux[0][i]); !(d < tol) {
			t.Errorf("species %d: flux %.12g in metres, %.12g in millimetres: relative difference %.3g", i, flux[0][i], flux[1][i], d)
		}
	}
	// Acetone and methanol leave through the top (outward flux positive).
	if !(flux[0][0] > 0 && flux[0][1] > 0) {
		t.Errorf("evaporating species do not leave through the top: %g", flux[0])
	}
}

func TestProblemValidation(t *testing.T) {
	good := func(t *testing.T) *Problem {
		p, _, _ := scaledSlab(t, 1)
		return p
	}
	for _, tc := range []struct {
		name  string
		edit  func(p *Problem)
		wants []string
	}{
		{"missing tag", func(p *Problem) { delete(p.Boundary, 2) }, []string{"no boundary condition", "tag 2"}},
		{"unknown tag", func(p *Problem) { p.Boundary[9] = p.Boundary[1] }, []string{"tags [9]"}},
		{"species count", func(p *Problem) {
			bc := p.Boundary[1]
			bc.Species = bc.Species[:2]
			p.Boundary[1] = bc
		}, []string{"tag 1", "2 species conditions for 3 species"}},
		{"potential without data", func(p *Problem) {
			bc := p.Boundary[3]
			bc.Species = append([]SpeciesCondition(nil), bc.Species...)
			bc.Species[1] = SpeciesCondition{Kind: SpeciesPotential}
			p.Boundary[3] = bc
		}, []string{"tag 3", `"methanol"`, "without data"}},
		{"bad S", func(p *Problem) { p.S = 0 }, []string{"S = 0"}},
		{"bad degree", func(p *Problem) { p.Degree = 0 }, []string{"degree 0"}},
		{"negative beta", func(p *Problem) { p.SpeciesAugmentation = -1 }, []string{"beta"}},
		{"slip on a sloped boundary", func(p *Problem) {
			m := p.Mesh.Clone()
			m.Points[len(m.Points)-1][0] += 0.05 // tilt the top-right corner
			p.Mesh = m
		}, []string{"slip", "not a straight segment"}},
		{"incompatible fluxes", func(p *Problem) {
			for tag, bc := range p.Boundary {
				sp := make([]SpeciesCondition, 3)
				copy(sp, bc.Species)
				sp[2] = SpeciesCondition{Kind: SpeciesFlux}
				if tag == 1 {
					sp[2].Flux = func(_, _ [2]float64) float64 { return 1e-3 }
				}
				bc.Species = sp
				p.Boundary[tag] = bc
			}
		}, []string{`species "air"`, "incompatible", "tag 1"}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			p := good(t)
			tc.edit(p)
			_, err := NewDiscretisation(p)
			if err == nil {
				t.Fatal("accepted")
			}
			for _, w := range tc.wants {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("error %q does not mention %q", err, w)
				}
			}
		})
	}
}
