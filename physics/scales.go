package physics

import (
	"fmt"
	"math"
	"strings"
)

// Scales are the reference values that make the coupled Stokes–
// Onsager–Stefan–Maxwell problem dimensionless (formulation note, section 1).
// The primary scales are fields; the derived ones are methods. All are in SI
// when the case data are in SI, but only consistency matters: the same case
// in any consistent units gives the same dimensionless groups.
type Scales struct {
	// Length is L, the size of the domain (m).
	Length float64
	// Concentration is c_ref, the reference total concentration (mol/m^3).
	Concentration float64
	// Diffusivity is D_ref (m^2/s).
	Diffusivity float64
	// RT is the potential scale (J/mol).
	RT float64
	// Viscosity is eta_ref (Pa s).
	Viscosity float64
	// Density is rho_ref (kg/m^3).
	Density float64
	// Speed is a characteristic flow speed U (m/s) used only for the
	// Peclet number; 0 when the case imposes no flow.
	Speed float64
}

// Velocity returns v_ref = D_ref/L, the diffusive velocity scale.
func (s Scales) Velocity() float64 { return s.Diffusivity / s.Length }

// Pressure returns the viscous pressure scale eta_ref v_ref / L.
func (s Scales) Pressure() float64 { return s.Viscosity * s.Velocity() / s.Length }

// ThermodynamicPressure returns c_ref RT, the pressure unit in which the
// closures see the absolute pressure in scaled units. Pressure() =
// S() * ThermodynamicPressure().
func (s Scales) ThermodynamicPressure() float64 { return s.Concentration * s.RT }

// MassFlux returns rho_ref v_ref.
func (s Scales) MassFlux() float64 { return s.Density * s.Velocity() }

// MolarFlux returns c_ref v_ref.
func (s Scales) MolarFlux() float64 { return s.Concentration * s.Velocity() }

// MolarMass returns rho_ref / c_ref, the molar mass scale (kg/mol).
func (s Scales) MolarMass() float64 { return s.Density / s.Concentration }

// Time returns L^2 / D_ref, the diffusion time.
func (s Scales) Time() float64 { return s.Length * s.Length / s.Diffusivity }

// Transport returns RT c_ref / D_ref, the scale of the transport matrix
// entries M_ij.
func (s Scales) Transport() float64 { return s.RT * s.Concentration / s.Diffusivity }

// Augmentation returns eta_ref / L^2, the unit of the augmentation
// parameter gamma.
func (s Scales) Augmentation() float64 { return s.Viscosity / (s.Length * s.Length) }

// S returns the dimensionless group S = eta_ref D_ref / (L^2 c_ref RT) that
// multiplies the pressure and augmentation terms of the diffusion rows in
// scaled units: the ratio of the viscous pressure scale to the thermodynamic
// one (about 1e-13 for gases, 1e-9 for liquids).
func (s Scales) S() float64 {
	return s.Viscosity * s.Diffusivity / (s.Length * s.Length * s.Concentration * s.RT)
}

// Peclet returns Pe = U L / D_ref, or 0 when Speed is 0.
func (s Scales) Peclet() float64 { return s.Speed * s.Length / s.Diffusivity }

// Schmidt returns Sc = eta_ref / (rho_ref D_ref).
func (s Scales) Schmidt() float64 { return s.Viscosity / (s.Density * s.Diffusivity) }

// Validate returns a *DataError naming the first scale that is not positive
// and finite (Speed may be zero).
func (s Scales) Validate() error {
	for _, f := range []struct {
		name string
		v    float64
		zero bool
	}{
		{"length", s.Length, false},
		{"concentration", s.Concentration, false},
		{"diffusivity", s.Diffusivity, false},
		{"RT", s.RT, false},
		{"viscosity", s.Viscosity, false},
		{"density", s.Density, false},
		{"speed", s.Speed, true},
	} {
		bad := math.IsNaN(f.v) || math.IsInf(f.v, 0) || f.v < 0 || (f.v == 0 && !f.zero)
		if bad {
			return &DataError{Index: -1, Value: f.v,
				Reason: fmt.Sprintf("%s scale %g is not positive and finite", f.name, f.v)}
		}
	}
	return nil
}

// String lists the scales and the dimensionless groups, one per line.
func (s Scales) String() string {
	var b strings.Builder
	row := func(name, sym string, v float64, unit string) {
		fmt.Fprintf(&b, "  %-24s %-8s = %.6e", name, sym, v)
		if unit != "" {
			b.WriteString(" " + unit)
		}
		b.WriteString("\n")
	}
	b.WriteString("scales:\n")
	row("length", "L", s.Length, "m")
	row("concentration", "c_ref", s.Concentration, "mol/m^3")
	row("diffusivity", "D_ref", s.Diffusivity, "m^2/s")
	row("potential", "RT", s.RT, "J/mol")
	row("viscosity", "eta_ref", s.Viscosity, "Pa s")
	row("density", "rho_ref", s.Density, "kg/m^3")
	row("velocity", "D/L", s.Velocity(), "m/s")
	row("pressure (viscous)", "eta v/L", s.Pressure(), "Pa")
	row("pressure (thermo.)", "c RT", s.ThermodynamicPressure(), "Pa")
	row("molar flux", "c v", s.MolarFlux(), "mol/(m^2 s)")
	row("mass flux", "rho v", s.MassFlux(), "kg/(m^2 s)")
	b.WriteString("groups:\n")
	row("S = eta D/(L^2 c RT)", "S", s.S(), "")
	row("Schmidt eta/(rho D)", "Sc", s.Schmidt(), "")
	if s.Speed > 0 {
		row("Peclet U L/D", "Pe", s.Peclet(), "")
	}
	return strings.TrimRight(b.String(), "\n")
}

// ReferenceState is the case data from which ChooseScales picks the scales.
type ReferenceState struct {
	// Length is the size of the domain (m), e.g. its largest extent.
	Length float64
	// MoleFractions is the reference composition (e.g. the fill or the
	// inflow composition), summing to one.
	MoleFractions []float64
	// TotalConcentration is c_T at the reference state (mol/m^3); for an
	// ideal gas P_ref/RT.
	TotalConcentration float64
	// RT is the gas constant times the temperature (J/mol).
	RT float64
	// Viscosity is evaluated at MoleFractions.
	Viscosity ViscosityModel
	// Speed is a characteristic flow speed (m/s), e.g. the mean inflow
	// speed; 0 when the case imposes no flow.
	Speed float64
}

// ChooseScales picks the scales of a case: L = ref.Length, c_ref =
// ref.TotalConcentration, D_ref = the geometric mean of the Stefan–Maxwell
// diffusivities of mix (a balanced choice when they span decades), RT =
// ref.RT, eta_ref = ref.Viscosity at the reference composition and rho_ref =
// c_ref sum_i x_i M_i. The error is a *DataError for a bad composition or a
// scale that is not positive and finite.
func ChooseScales(mix *Mixture, ref ReferenceState) (Scales, error) {
	if len(ref.MoleFractions) != mix.n {
		return Scales{}, &DataError{Index: -1, Value: float64(len(ref.MoleFractions)),
			Reason: fmt.Sprintf("reference composition has %d mole fractions for %d species", len(ref.MoleFractions), mix.n)}
	}
	if err := mix.CheckMoleFractions(ref.MoleFractions); err != nil {
		return Scales{}, err
	}
	if ref.Viscosity == nil {
		return Scales{}, &DataError{Index: -1, Value: math.NaN(), Reason: "no viscosity model given"}
	}
	var logD float64
	var pairs int
	for i := 0; i < mix.n; i++ {
		for j := i + 1; j < mix.n; j++ {
			logD += math.Log(mix.diff[i*mix.n+j])
			pairs++
		}
	}
	var mbar float64
	for i, x := range ref.MoleFractions {
		mbar += x * mix.mass[i]
	}
	s := Scales{
		Length:        ref.Length,
		Concentration: ref.TotalConcentration,
		Diffusivity:   math.Exp(logD / float64(pairs)),
		RT:            ref.RT,
		Viscosity:     ref.Viscosity.Viscosity(ref.MoleFractions),
		Density:       ref.TotalConcentration * mbar,
		Speed:         ref.Speed,
	}
	if err := s.Validate(); err != nil {
		return Scales{}, err
	}
	return s, nil
}
