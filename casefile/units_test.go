package casefile

import (
	"math"
	"strings"
	"testing"
)

func TestParseQuantity(t *testing.T) {
	// Reference conversions. Sources: SI brochure (BIPM, 9th ed., 2019) for
	// the prefixes, the litre, min, h and the Celsius scale (t/degC =
	// T/K - 273.15); NIST SP 811 (2008), appendix B.8, for bar = 1e5 Pa and
	// atm = 101325 Pa (standard atmosphere, exact); compound values are
	// products of these.
	const tol = 1e-15 // relative: one or two roundings
	for _, tc := range []struct {
		in   string
		want float64
		dim  dimension
	}{
		{"1 atm", 101325, dimPressure},
		{"1 bar", 1e5, dimPressure},
		{"2.5 mbar", 250, dimPressure},
		{"99.4 kPa", 99400, dimPressure},
		{"1e3 MPa", 1e9, dimPressure},
		{"1 GPa", 1e9, dimPressure},
		{"1 N/m^2", 1, dimPressure},
		{"1 kg/(m s^2)", 1, dimPressure},
		{"8.48e-6 m^2/s", 8.48e-6, dimDiffusivity},
		{"1 cm^2/s", 1e-4, dimDiffusivity},
		{"60 mm^2/s", 6e-5, dimDiffusivity},
		{"58.08 g/mol", 0.05808, dimMolarMass},
		{"1 kg/kmol", 1e-3, dimMolarMass},
		{"0.238 m", 0.238, dimL},
		{"2 mm", 2e-3, dimL},
		{"2mm", 2e-3, dimL},
		{"5 um", 5e-6, dimL},
		{"5 µm", 5e-6, dimL},
		{"5 μm", 5e-6, dimL},
		{"3 nm", 3e-9, dimL},
		{"1.5 km", 1500, dimL},
		{"3 cm/s", 0.03, dimVelocity},
		{"1 m s^-1", 1, dimVelocity},
		{"1 m*s^-1", 1, dimVelocity},
		{"9.81 m/s^2", 9.81, dimAccel},
		{"1.8e-5 Pa s", 1.8e-5, dimViscosity},
		{"1.8e-5 Pa*s", 1.8e-5, dimViscosity},
		{"1.8e-5 Pa·s", 1.8e-5, dimViscosity},
		{"1.2 mPa s", 1.2e-3, dimViscosity},
		{"1 L", 1e-3, dimVolume},
		{"1 mL", 1e-6, dimVolume},
		{"20 cm^3/mol", 2e-5, dimMolarVolume},
		{"1 L/mol", 1e-3, dimMolarVolume},
		{"2 min", 120, dimT},
		{"1 h", 3600, dimT},
		{"1 ms", 1e-3, dimT},
		{"1 kJ/mol", 1000, dim(2, 1, -2, -1, 0)},
		{"8.314462618 J/(mol K)", 8.314462618, dim(2, 1, -2, -1, -1)},
		{"1 W/(m K)", 1, dim(1, 1, -3, 0, -1)},
		{"1 mol/(m^2 s)", 1, dimMolarFlux},
		{"1 kmol/(m^2 h)", 1000.0 / 3600, dimMolarFlux},
		{"1 kg/(m^2 s)", 1, dimMassFlux},
		{"2 1/s", 2, dim(0, 0, -1, 0, 0)},
		{"1 (kg m)/s", 1, dim(1, 1, -1, 0, 0)},
		{"300 K", 300, dimTheta},
		{"25 degC", 298.15, dimTheta},
		{"-273.15 degC", 0, dimTheta},
		{"1e-10", 1e-10, dimNone},
		{"-.5", -0.5, dimNone},
		{"+7E+2", 700, dimNone},
	} {
		q, err := parseQuantity(tc.in, true)
		if err != nil {
			t.Errorf("%q: %v", tc.in, err)
			continue
		}
		if q.dim != tc.dim || math.Abs(q.value-tc.want) > tol*math.Abs(tc.want) {
			t.Errorf("%q: got %g %v, want %g %v", tc.in, q.value, q.dim, tc.want, tc.dim)
		}
	}
}

func TestParseQuantityErrors(t *testing.T) {
	for _, tc := range []struct {
		in, msg string
		affine  bool
	}{
		{"m", "does not start with a number", false},
		{"x 1", "does not start with a number", false},
		{"NaN", "does not start with a number", false},
		{"Inf", "does not start with a number", false},
		{"0x10", `unknown symbol "x"`, false},
		{"1_000", "unexpected character", false},
		{"1 m2", "write powers with '^'", false},
		{"1 kg/m^2 s", "write the whole denominator in parentheses", false},
		{"1 m/s/s", "more than one '/'", false},
		{"1 furlong", `unknown symbol "furlong"`, false},
		{"1 cs", `unknown symbol "cs"`, false},
		{"1 mh", `unknown symbol "mh"`, false},
		{"1 kK", `unknown symbol "kK"`, false},
		{"20 °C", "write degC", true},
		{"20 degC", "allowed only for absolute temperatures", false},
		{"20 degC/s", "cannot be combined", true},
		{"1 (m", "missing ')'", false},
		{"1 m)", "unbalanced ')'", false},
		{"1 m^", "must be a non-zero integer", false},
		{"1 m^0", "must be a non-zero integer", false},
		{"1 m^x", "must be a non-zero integer", false},
		{"1 *m", "unexpected", false},
		{"1 m*", "'*' must be followed by a unit", false},
		{"1 m/", "a unit is missing", false},
		{"1 m & s", "unexpected character", false},
		{"1e999 m", "out of the range", false},
		{"1e300 GPa^2", "out of the range", false},
		{"1 ((((((((((m))))))))))", "nested deeper", false},
		{"1 ((m^9)^9)", "exponent", false},
	} {
		_, err := parseQuantity(tc.in, tc.affine)
		if err == nil || !strings.Contains(err.Error(), tc.msg) {
			t.Errorf("%q: got %v, want an error containing %q", tc.in, err, tc.msg)
		}
	}
}

func TestDimensionString(t *testing.T) {
	for _, tc := range []struct {
		d    dimension
		want string
	}{
		{dimNone, "dimensionless"},
		{dimL, "length"},
		{dimMolarMass, "mass/amount"},
		{dimPressure, "mass/(length time^2)"},
		{dimDiffusivity, "length^2/time"},
		{dim(0, 0, -1, 0, 0), "1/time"},
		{dimMolarFlux, "amount/(length^2 time)"},
	} {
		if got := tc.d.String(); got != tc.want {
			t.Errorf("%v: got %q, want %q", [5]int(tc.d), got, tc.want)
		}
	}
}
