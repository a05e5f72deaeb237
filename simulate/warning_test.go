package simulate

import (
	"strings"
	"testing"

	"mixwell/casefile"
)

func TestMassAverageWarning(t *testing.T) {
	// The limit and the advice of each formulation (the limit's evidence is
	// in the comment of MassAverageLimit).
	for _, tc := range []struct {
		f    casefile.Formulation
		ma   float64
		want string // "" for no warning
	}{
		{casefile.TotalFlux, 0, ""},
		{casefile.TotalFlux, 0.9 * MassAverageLimit, ""},
		{casefile.TotalFlux, 0.06, "species mass fluxes on a stefan-wall"},
		{casefile.TotalFlux, 0.06, "is 0.06 (above 0.01)"},
		{casefile.DiffusiveFlux, 0.9 * MassAverageLimit, ""},
		{casefile.DiffusiveFlux, 0.02, "interpolation error: refine the mesh"},
	} {
		got := massAverageWarning(tc.f, tc.ma)
		if tc.want == "" && got != "" || !strings.Contains(got, tc.want) {
			t.Errorf("%s, defect %g: warning %q, want %q", tc.f, tc.ma, got, tc.want)
		}
	}
}
