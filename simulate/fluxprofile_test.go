package simulate

import (
	"math"
	"testing"
)

func TestFluxProfile(t *testing.T) {
	// Flux data with profile: parabolic are the means over the straight
	// boundary: each flux is 6 t (1 - t) times its uniform value, t the
	// position along the boundary, so it peaks at 1.5 times the mean and
	// vanishes at the ends (closed form; common practice for a parabolic
	// profile of given mean), and Simpson's rule, exact for a quadratic,
	// integrates it to the mean times the length.
	const path = "../testdata/cases/poiseuille.yaml"
	inlet := func(profile string) *Setup {
		return prepared(t, path, editedCase(t, path, [2]string{
			"    velocity: {type: inflow, profile: parabolic, mean_speed: 1 cm/s}\n    species: {type: composition, mole_fractions: {A: 0.2, B: 0.5, C: 0.3}}",
			"    velocity: stefan-wall\n    species: {type: flux, basis: mass, profile: " + profile + ", fluxes: {A: -1 g/(m^2 s), B: -2 g/(m^2 s)}}",
		}))
	}
	uni, par := inlet("uniform"), inlet("parabolic")
	tag := -1
	for k, name := range par.Mesh.TagNames {
		if name == "inlet" {
			tag = k
		}
	}
	if tag < 0 {
		t.Fatal("no boundary named inlet")
	}
	// The inlet is the left side, x = 0, from y0 to y1 in the problem's
	// scaled coordinates.
	sm := par.Problem.Mesh
	y0, y1 := math.Inf(1), math.Inf(-1)
	for _, e := range sm.BoundaryEdges(tag) {
		for _, v := range sm.Edges[e] {
			y0 = math.Min(y0, sm.Points[v][1])
			y1 = math.Max(y1, sm.Points[v][1])
		}
	}
	nrm := [2]float64{-1, 0}
	at := func(s *Setup, i int, tt float64) float64 {
		return s.Problem.Boundary[tag].Species[i].Flux([2]float64{0, y0 + tt*(y1-y0)}, nrm)
	}
	for i := 0; i < 3; i++ {
		mean := at(uni, i, 0.3)
		for _, tt := range []float64{0, 0.25, 0.5, 0.9, 1} {
			if got := at(uni, i, tt); got != mean {
				t.Errorf("species %d, uniform: flux %g at t = %g, want %g everywhere", i, got, tt, mean)
			}
			want := 6 * tt * (1 - tt) * mean
			if got := at(par, i, tt); math.Abs(got-want) > 1e-12*math.Abs(mean) {
				t.Errorf("species %d, parabolic: flux %g at t = %g, want %g", i, got, tt, want)
			}
		}
		simpson := (at(par, i, 0) + 4*at(par, i, 0.5) + at(par, i, 1)) / 6
		if math.Abs(simpson-mean) > 1e-12*math.Abs(mean) {
			t.Errorf("species %d: mean of the parabolic flux %g, want %g", i, simpson, mean)
		}
	}
	if at(uni, 0, 0.5) >= 0 || at(uni, 1, 0.5) != 2*at(uni, 0, 0.5) || at(uni, 2, 0.5) != 0 {
		t.Errorf("uniform fluxes %g, %g, %g: want the data's -1 : -2 : 0", at(uni, 0, 0.5), at(uni, 1, 0.5), at(uni, 2, 0.5))
	}
}
