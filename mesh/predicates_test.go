package mesh

import (
	"math"
	"math/big"
	"testing"
)

// ratOrient and ratInCircle are reference predicates in plain rational
// arithmetic, independent of the integer scaling of predicates.go.
func ratOrient(a, b, c [2]float64) int {
	r := func(x float64) *big.Rat { return new(big.Rat).SetFloat64(x) }
	acx := new(big.Rat).Sub(r(a[0]), r(c[0]))
	acy := new(big.Rat).Sub(r(a[1]), r(c[1]))
	bcx := new(big.Rat).Sub(r(b[0]), r(c[0]))
	bcy := new(big.Rat).Sub(r(b[1]), r(c[1]))
	return new(big.Rat).Sub(new(big.Rat).Mul(acx, bcy), new(big.Rat).Mul(acy, bcx)).Sign()
}

func ratInCircle(a, b, c, d [2]float64) int {
	r := func(x float64) *big.Rat { return new(big.Rat).SetFloat64(x) }
	var rows [3][3]*big.Rat
	for i, p := range [3][2]float64{a, b, c} {
		x := new(big.Rat).Sub(r(p[0]), r(d[0]))
		y := new(big.Rat).Sub(r(p[1]), r(d[1]))
		l := new(big.Rat).Add(new(big.Rat).Mul(x, x), new(big.Rat).Mul(y, y))
		rows[i] = [3]*big.Rat{x, y, l}
	}
	det := new(big.Rat)
	for i := range 3 {
		j, k := (i+1)%3, (i+2)%3
		m := new(big.Rat).Sub(new(big.Rat).Mul(rows[j][0], rows[k][1]), new(big.Rat).Mul(rows[k][0], rows[j][1]))
		det.Add(det, m.Mul(m, rows[i][2]))
	}
	return det.Sign()
}

func sign(x float64) int {
	switch {
	case x > 0:
		return 1
	case x < 0:
		return -1
	}
	return 0
}

// TestPredicatesNearDegenerate compares the filtered predicates with exact
// rational references on inputs built to be (nearly) degenerate, where a
// plain float64 evaluation often gets the sign wrong.
func TestPredicatesNearDegenerate(t *testing.T) {
	rng := newRNG(21)
	const n = 3000
	nudge := func(x float64, k int) float64 {
		for range k {
			x = math.Nextafter(x, math.Inf(1))
		}
		for range -k {
			x = math.Nextafter(x, math.Inf(-1))
		}
		return x
	}
	scales := []float64{1, 1e-200, 1e200, 3.7e5}
	zeros, fallbackNeeded := 0, 0
	for i := range n {
		s := scales[i%len(scales)]
		a := [2]float64{s * rng.Float64(), s * rng.Float64()}
		b := [2]float64{s * (rng.Float64() + 2), s * (rng.Float64() + 1)}
		// c on the line ab, rounded, then nudged by a few ulps.
		u := rng.Float64()*3 - 1
		c := [2]float64{a[0] + u*(b[0]-a[0]), a[1] + u*(b[1]-a[1])}
		c[0], c[1] = nudge(c[0], rng.IntN(5)-2), nudge(c[1], rng.IntN(5)-2)
		want := ratOrient(a, b, c)
		if got := sign(orientSign(a, b, c)); got != want {
			t.Fatalf("orientSign(%v, %v, %v) sign %d, want %d", a, b, c, got, want)
		}
		if sign(orient(a, b, c)) != want {
			fallbackNeeded++
		}
		if want == 0 {
			zeros++
		}

		// d on the circle through a, b, c' (c' = c moved off the line),
		// constructed at unit scale (the circumcentre of huge points would
		// overflow), scaled, rounded and nudged.
		c2 := [2]float64{c[0], c[1] + s*(0.5+rng.Float64())}
		cc := circumcentre([2]float64{a[0] / s, a[1] / s}, [2]float64{b[0] / s, b[1] / s}, [2]float64{c2[0] / s, c2[1] / s})
		rad := math.Sqrt(sq(cc, [2]float64{a[0] / s, a[1] / s}))
		phi := 2 * math.Pi * rng.Float64()
		d := [2]float64{s * (cc[0] + rad*math.Cos(phi)), s * (cc[1] + rad*math.Sin(phi))}
		d[0], d[1] = nudge(d[0], rng.IntN(3)-1), nudge(d[1], rng.IntN(3)-1)
		p, q, r := a, b, c2
		if ratOrient(p, q, r) < 0 {
			q, r = r, q
		}
		wantC := ratInCircle(p, q, r, d)
		if got := sign(inCircleSign(p, q, r, d)); got != wantC {
			t.Fatalf("inCircleSign(%v, %v, %v, %v) sign %d, want %d", p, q, r, d, got, wantC)
		}
	}
	t.Logf("%d cases, %d exactly collinear, %d where a plain float64 orientation has another sign", n, zeros, fallbackNeeded)
}

// TestPredicatesExactCases checks cases whose answer is known in closed
// form, including cocircular grid points (exact zero) and coordinates whose
// products overflow float64.
func TestPredicatesExactCases(t *testing.T) {
	for _, c := range []struct {
		name       string
		a, b, c, d [2]float64
		orient     int // sign of orient(a, b, c)
		inCircle   int // sign of inCircle(a, b, c, d)
	}{
		{"unit square corner", [2]float64{0, 0}, [2]float64{1, 0}, [2]float64{1, 1}, [2]float64{0, 1}, 1, 0},
		{"inside", [2]float64{0, 0}, [2]float64{1, 0}, [2]float64{0, 1}, [2]float64{0.25, 0.25}, 1, 1},
		{"outside", [2]float64{0, 0}, [2]float64{1, 0}, [2]float64{0, 1}, [2]float64{2, 2}, 1, -1},
		{"tiny cocircular", [2]float64{0, 0}, [2]float64{1e-300, 0}, [2]float64{1e-300, 1e-300}, [2]float64{0, 1e-300}, 1, 0},
		{"huge cocircular", [2]float64{0, 0}, [2]float64{1e200, 0}, [2]float64{1e200, 1e200}, [2]float64{0, 1e200}, 1, 0},
		{"mixed exponents", [2]float64{1e-30, 0}, [2]float64{1e30, 0}, [2]float64{1e30, 1e-30}, [2]float64{-1e30, 0}, 1, -1},
		{"exactly collinear", [2]float64{0.5, 0.25}, [2]float64{1, 0.5}, [2]float64{3, 1.5}, [2]float64{0, 0}, 0, 0},
	} {
		if got := sign(orientSign(c.a, c.b, c.c)); got != c.orient {
			t.Errorf("%s: orient sign %d, want %d", c.name, got, c.orient)
		}
		if c.orient == 0 {
			continue
		}
		if got := sign(inCircleSign(c.a, c.b, c.c, c.d)); got != c.inCircle {
			t.Errorf("%s: inCircle sign %d, want %d", c.name, got, c.inCircle)
		}
		if want := ratInCircle(c.a, c.b, c.c, c.d); want != c.inCircle {
			t.Errorf("%s: reference inCircle sign %d, want %d (bad test case)", c.name, want, c.inCircle)
		}
	}
}

// TestPredicatesDyadicGrid compares the predicates with the rational
// references on points of dyadic grids, where collinear and cocircular
// quadruples are frequent and the small-integer exact path is taken, and on
// grids too fine for it (big-integer path).
func TestPredicatesDyadicGrid(t *testing.T) {
	rng := newRNG(33)
	for _, c := range []struct {
		name  string
		bits  int     // grid indices below 2^bits
		scale float64 // grid step
	}{
		{"coarse", 3, 1.0 / 8},
		{"medium", 12, math.Ldexp(1, -20)},
		{"beyond 2^29", 40, math.Ldexp(1, -3)},
		{"offset", 6, 1.0 / 64},
	} {
		zeroO, zeroC := 0, 0
		off := 0.0
		if c.name == "offset" {
			off = 1000.25
		}
		pt := func() [2]float64 {
			n := int64(1) << c.bits
			return [2]float64{off + float64(rng.Int64N(n))*c.scale, off + float64(rng.Int64N(n))*c.scale}
		}
		for i := range 4000 {
			a, b, p, d := pt(), pt(), pt(), pt()
			if i%2 == 0 {
				// Degenerate by construction: p = 2b - a is collinear with
				// a and b (exact in float64 for these grids), and the
				// corners of an axis-parallel rectangle are cocircular.
				p = [2]float64{2*b[0] - a[0], 2*b[1] - a[1]}
				if i%4 == 0 {
					p = [2]float64{b[0], a[1]}
					d = [2]float64{a[0], b[1]}
				}
			}
			want := ratOrient(a, b, p)
			if got := sign(orientSign(a, b, p)); got != want {
				t.Fatalf("%s: orientSign(%v, %v, %v) sign %d, want %d", c.name, a, b, p, got, want)
			}
			if want == 0 {
				zeroO++
				continue
			}
			if want < 0 {
				b, p = p, b
			}
			wantC := ratInCircle(a, b, p, d)
			if got := sign(inCircleSign(a, b, p, d)); got != wantC {
				t.Fatalf("%s: inCircleSign(%v, %v, %v, %v) sign %d, want %d", c.name, a, b, p, d, got, wantC)
			}
			if wantC == 0 {
				zeroC++
			}
		}
		t.Logf("%s: %d collinear and %d cocircular cases", c.name, zeroO, zeroC)
	}
}
