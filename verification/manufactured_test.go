package verification

import (
	"math"
	"testing"

	hd "gonum.org/v1/gonum/num/hyperdual"
)

// The manufactured sources are hand-derived; these tests check them against
// forward-mode automatic differentiation with hyper-dual numbers (gonum
// num/hyperdual: exact first and second derivatives, no truncation error).

const derivativeTol = 1e-12

// seed returns the hyper-dual number t + e1 + e2, whose function values carry
// f(t), f'(t) (E1mag) and f”(t) (E1E2mag).
func seed(t float64) hd.Number { return hd.Number{Real: t, E1mag: 1, E2mag: 1} }

func closeRel(got, want float64) bool {
	return math.Abs(got-want) <= derivativeTol*math.Max(1, math.Abs(want))
}

// bumpHD is sin(t + 1/2) exp(a t) in hyper-dual arithmetic.
func bumpHD(t hd.Number, a float64) hd.Number {
	return hd.Mul(hd.Sin(hd.Add(t, hd.Number{Real: 0.5})), hd.Exp(hd.Scale(a, t)))
}

// bumpDerivHD is the hand-derived first derivative of the bump,
// (cos(t + 1/2) + a sin(t + 1/2)) exp(a t), in hyper-dual arithmetic; it is
// checked against the dual part of bumpHD below.
func bumpDerivHD(t hd.Number, a float64) hd.Number {
	s := hd.Add(t, hd.Number{Real: 0.5})
	return hd.Mul(hd.Add(hd.Cos(s), hd.Scale(a, hd.Sin(s))), hd.Exp(hd.Scale(a, t)))
}

func TestStokesBumpDerivatives(t *testing.T) {
	for _, a := range []float64{1, -0.5} {
		for _, x := range []float64{0, 0.13, 0.5, 0.77, 1} {
			b := bumpHD(seed(x), a)
			d := bumpDerivHD(seed(x), a)
			got := stokesBump(x, a)
			if !closeRel(d.Real, b.E1mag) {
				t.Errorf("a=%g t=%g: derivative formula %g, dual %g", a, x, d.Real, b.E1mag)
			}
			want := [4]float64{b.Real, b.E1mag, b.E1E2mag, d.E1E2mag}
			for n := range want {
				if !closeRel(got[n], want[n]) {
					t.Errorf("a=%g t=%g: derivative %d = %g, dual %g", a, x, n, got[n], want[n])
				}
			}
		}
	}
}

func TestPoissonSource(t *testing.T) {
	// f = -(u_xx + u_yy) with second derivatives from hyper-dual numbers.
	u := func(x, y hd.Number) hd.Number {
		return hd.Mul(hd.Exp(x), hd.Sin(hd.Add(hd.Scale(math.Pi, y), hd.Number{Real: 0.3})))
	}
	for _, p := range [][2]float64{{0.1, 0.2}, {0.5, 0.9}, {0.83, 0.37}} {
		ux := u(seed(p[0]), hd.Number{Real: p[1]})
		uy := u(hd.Number{Real: p[0]}, seed(p[1]))
		want := -(ux.E1E2mag + uy.E1E2mag)
		if got := poissonSource(p); !closeRel(got, want) {
			t.Errorf("source at %v: %g, want %g", p, got, want)
		}
		g := poissonGrad(p)
		if !closeRel(g[0], ux.E1mag) || !closeRel(g[1], uy.E1mag) {
			t.Errorf("gradient at %v: %v, want (%g %g)", p, g, ux.E1mag, uy.E1mag)
		}
	}
}

func TestStokesLoad(t *testing.T) {
	// Velocity u = (X Y', -X' Y) and pressure cos(pi x) exp(y) in hyper-dual
	// arithmetic; the load must equal -Laplace u + grad p, the gradient
	// formula must match, and div u must vanish.
	vel := func(x, y hd.Number) [2]hd.Number {
		return [2]hd.Number{
			hd.Mul(bumpHD(x, 1), bumpDerivHD(y, -0.5)),
			hd.Scale(-1, hd.Mul(bumpDerivHD(x, 1), bumpHD(y, -0.5))),
		}
	}
	pres := func(x, y hd.Number) hd.Number { return hd.Mul(hd.Cos(hd.Scale(math.Pi, x)), hd.Exp(y)) }
	for _, p := range [][2]float64{{0.1, 0.2}, {0.5, 0.9}, {0.83, 0.37}} {
		vx := vel(seed(p[0]), hd.Number{Real: p[1]})
		vy := vel(hd.Number{Real: p[0]}, seed(p[1]))
		px := pres(seed(p[0]), hd.Number{Real: p[1]})
		py := pres(hd.Number{Real: p[0]}, seed(p[1]))
		g := stokesVelocityGrad(p)
		load := stokesLoad(p)
		u := stokesVelocity(p)
		gp := [2]float64{px.E1mag, py.E1mag}
		for c := 0; c < 2; c++ {
			if !closeRel(u[c], vx[c].Real) {
				t.Errorf("u_%d at %v: %g, want %g", c, p, u[c], vx[c].Real)
			}
			if !closeRel(g[c][0], vx[c].E1mag) || !closeRel(g[c][1], vy[c].E1mag) {
				t.Errorf("grad u_%d at %v: %v, want (%g %g)", c, p, g[c], vx[c].E1mag, vy[c].E1mag)
			}
			want := -(vx[c].E1E2mag + vy[c].E1E2mag) + gp[c]
			if !closeRel(load[c], want) {
				t.Errorf("load_%d at %v: %g, want %g", c, p, load[c], want)
			}
		}
		if div := vx[0].E1mag + vy[1].E1mag; math.Abs(div) > derivativeTol {
			t.Errorf("div u at %v = %g", p, div)
		}
		if !closeRel(stokesPressure(p), px.Real) {
			t.Errorf("pressure at %v", p)
		}
	}
}
