package physics

import (
	"errors"
	"math"
	"strings"
	"testing"
)

// TestScalesUnits writes the same case in metres and in millimetres (lengths
// x 1e3, diffusivities x 1e6, concentrations x 1e-9, energies x 1e6, viscosity
// x 1e-3, speeds x 1e3; kg, mol, s unchanged) and checks that the
// dimensionless groups agree.
func TestScalesUnits(t *testing.T) {
	const tol = 1e-12
	build := func(l, d, c, e, eta, u float64) Scales {
		t.Helper()
		mix, err := NewMixture(
			[]Species{{"H2O", 18.015e-3}, {"N2", 28.0134e-3}, {"CO2", 44.0095e-3}},
			[]Pair{{"H2O", "N2", 2.6e-5 * d}, {"H2O", "CO2", 1.6e-5 * d}, {"N2", "CO2", 1.65e-5 * d}},
		)
		if err != nil {
			t.Fatal(err)
		}
		s, err := ChooseScales(mix, ReferenceState{
			Length:             0.05 * l,
			MoleFractions:      []float64{0.1, 0.8, 0.1},
			TotalConcentration: 40.6 * c,
			RT:                 rt300 * e,
			Viscosity:          ConstantViscosity(1.8e-5 * eta),
			Speed:              0.01 * u,
		})
		if err != nil {
			t.Fatal(err)
		}
		return s
	}
	m := build(1, 1, 1, 1, 1, 1)
	mm := build(1e3, 1e6, 1e-9, 1e6, 1e-3, 1e3)
	for _, g := range []struct {
		name  string
		m, mm float64
	}{
		{"S", m.S(), mm.S()},
		{"Peclet", m.Peclet(), mm.Peclet()},
		{"Schmidt", m.Schmidt(), mm.Schmidt()},
		{"Pressure/ThermodynamicPressure", m.Pressure() / m.ThermodynamicPressure(), mm.Pressure() / mm.ThermodynamicPressure()},
	} {
		if r := math.Abs(g.m-g.mm) / math.Abs(g.m); r > tol {
			t.Errorf("%s: %.16g in metres, %.16g in millimetres (relative %.2g)", g.name, g.m, g.mm, r)
		} else {
			t.Logf("%s = %.6g, metres vs millimetres %.2g relative", g.name, g.m, r)
		}
	}
	// S is the ratio of the viscous to the thermodynamic pressure scale (closed form).
	if r := math.Abs(m.S()-m.Pressure()/m.ThermodynamicPressure()) / m.S(); r > tol {
		t.Errorf("S = %g, Pressure/ThermodynamicPressure = %g", m.S(), m.Pressure()/m.ThermodynamicPressure())
	}
	// Gas case: S is about 1e-13 (formulation note, section 1).
	if s := m.S(); s < 1e-15 || s > 1e-11 {
		t.Errorf("gas S = %g, expected about 1e-13", s)
	}
}

func TestChooseScales(t *testing.T) {
	const tol = 4e-15 // a few rounding errors
	mix, err := NewMixture([]Species{{"A", 0.002}, {"B", 0.032}, {"C", 0.044}},
		[]Pair{{"A", "B", 1e-5}, {"A", "C", 1e-4}, {"B", "C", 1e-6}})
	if err != nil {
		t.Fatal(err)
	}
	s, err := ChooseScales(mix, ReferenceState{
		Length: 2, MoleFractions: []float64{0.5, 0.25, 0.25}, TotalConcentration: 10, RT: 1000,
		Viscosity: ConstantViscosity(2e-5),
	})
	if err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		name      string
		got, want float64 // closed forms from the data above
	}{
		{"diffusivity (geometric mean of 1e-5, 1e-4, 1e-6)", s.Diffusivity, 1e-5},
		{"density 10 (0.5*0.002 + 0.25*0.032 + 0.25*0.044)", s.Density, 0.2},
		{"velocity D/L", s.Velocity(), 5e-6},
		{"pressure eta v/L", s.Pressure(), 5e-11},
		{"S eta D/(L^2 c RT)", s.S(), 2e-5 * 1e-5 / (4 * 10 * 1000)},
		{"molar mass rho/c", s.MolarMass(), 0.02},
		{"mass flux rho v", s.MassFlux(), 1e-6},
		{"Peclet without flow", s.Peclet(), 0},
	} {
		if math.Abs(tc.got-tc.want) > tol*math.Abs(tc.want) {
			t.Errorf("%s: got %.17g, want %.17g", tc.name, tc.got, tc.want)
		}
	}
	rep := s.String()
	for _, w := range []string{"length", "S = eta D/(L^2 c RT)", "Schmidt"} {
		if !strings.Contains(rep, w) {
			t.Errorf("report lacks %q:\n%s", w, rep)
		}
	}
	// The scaled mixture has D_ref-relative diffusivities and rho_ref/c_ref-relative molar masses.
	sm := mix.Scaled(s)
	if got := sm.Diffusivity(0, 2); math.Abs(got-10) > 1e-14 {
		t.Errorf("scaled D_AC = %g, want 10", got)
	}
	if got := sm.MolarMass(1); math.Abs(got-1.6) > 1e-15 {
		t.Errorf("scaled M_B = %g, want 1.6", got)
	}

	// Bad input.
	for _, tc := range []struct {
		name string
		ref  ReferenceState
		want string
	}{
		{"zero length", ReferenceState{Length: 0, MoleFractions: []float64{0.5, 0.25, 0.25}, TotalConcentration: 10, RT: 1000, Viscosity: ConstantViscosity(1)}, "length scale 0"},
		{"negative viscosity", ReferenceState{Length: 1, MoleFractions: []float64{0.5, 0.25, 0.25}, TotalConcentration: 10, RT: 1000, Viscosity: ConstantViscosity(-1)}, "viscosity scale -1"},
		{"no viscosity", ReferenceState{Length: 1, MoleFractions: []float64{0.5, 0.25, 0.25}, TotalConcentration: 10, RT: 1000}, "no viscosity model"},
		{"bad composition", ReferenceState{Length: 1, MoleFractions: []float64{0.5, 0.25, 0.2}, TotalConcentration: 10, RT: 1000, Viscosity: ConstantViscosity(1)}, "sum to 0.95"},
		{"short composition", ReferenceState{Length: 1, MoleFractions: []float64{1}, TotalConcentration: 10, RT: 1000, Viscosity: ConstantViscosity(1)}, "1 mole fractions for 3 species"},
		{"negative speed", ReferenceState{Length: 1, MoleFractions: []float64{0.5, 0.25, 0.25}, TotalConcentration: 10, RT: 1000, Viscosity: ConstantViscosity(1), Speed: -1}, "speed scale -1"},
	} {
		_, err := ChooseScales(mix, tc.ref)
		var de *DataError
		if !errors.As(err, &de) || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: error %v, want a *DataError containing %q", tc.name, err, tc.want)
		}
	}
}
