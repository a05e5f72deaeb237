package mesh

import (
	"math"
	"math/big"
	"math/bits"
	"sync"
)

// Robust geometric predicates for the Delaunay code.
//
// Each predicate first evaluates its determinant in float64 and compares the
// result with an a-priori bound on the rounding error of that evaluation.
// When the sign is certain the float64 value is returned; otherwise the
// determinant is recomputed exactly with integer arithmetic (math/big, after
// scaling the coordinates by a common power of two), so
// the sign returned is always the sign of the exact determinant of the
// float64 inputs. The error-bound filters are those of J. R. Shewchuk,
// "Adaptive precision floating-point arithmetic and fast robust geometric
// predicates", Discrete Comput. Geom. 18:305–363, 1997, section 6 (the
// first, non-adaptive stage; constants from memory). Instead of his adaptive
// expansion arithmetic we fall back straight to exact big integers: slower, but
// the fallback is taken only for (nearly) degenerate input such as
// cocircular grid points.
//
// Products are wrapped in float64 conversions so that the compiler does not
// fuse them into fused multiply-adds, whose rounding the bounds do not model
// (the Go specification allows fusion only without explicit conversions).

// machEps is half the distance from 1 to the next float64, the unit roundoff
// of the error analysis.
const machEps = 1.0 / (1 << 53)

// Relative error bounds of the float64 evaluations (Shewchuk 1997, from
// memory): |error| <= bound × permanent.
const (
	orientBound   = (3 + 16*machEps) * machEps
	inCircleBound = (10 + 96*machEps) * machEps
)

// orientSign returns a number whose sign is that of twice the signed area of
// the triangle (a, b, c): positive when a, b, c are counter-clockwise,
// negative when clockwise, zero when they are collinear. The sign is exact;
// the magnitude is only approximate.
func orientSign(a, b, c [2]float64) float64 {
	acx, acy := a[0]-c[0], a[1]-c[1]
	bcx, bcy := b[0]-c[0], b[1]-c[1]
	if !(safe2(acx) && safe2(acy) && safe2(bcx) && safe2(bcy)) {
		return orientExact(a, b, c)
	}
	detLeft := float64(acx * bcy)
	detRight := float64(acy * bcx)
	det := detLeft - detRight
	bound := orientBound * (math.Abs(detLeft) + math.Abs(detRight))
	if det > bound || -det > bound {
		return det
	}
	return orientExact(a, b, c)
}

// The error bounds assume that no product underflows or overflows. They
// hold when every nonzero coordinate difference x satisfies
// 2^-250 <= |x| <= 2^250 for the in-circle test (degree-4 products) and
// 2^-500 <= |x| <= 2^500 for the orientation test (degree 2); other
// inputs go straight to the exact evaluation.
func safe2(x float64) bool {
	x = math.Abs(x)
	return x == 0 || x >= 0x1p-500 && x <= 0x1p500
}

func safe4(x float64) bool {
	x = math.Abs(x)
	return x == 0 || x >= 0x1p-250 && x <= 0x1p250
}

// orientExact evaluates the orientation determinant exactly and returns its
// sign as -1, 0 or 1.
func orientExact(a, b, c [2]float64) float64 {
	if sgn, ok := orientSmall(a, b, c); ok {
		return sgn
	}
	s := exactPool.Get().(*exactScratch)
	defer exactPool.Put(s)
	v := s.v[:6]
	scaleToIntegers(v, [8]float64{a[0], a[1], b[0], b[1], c[0], c[1]})
	t := &s.t
	t[0].Sub(&v[0], &v[4]) // acx
	t[1].Sub(&v[1], &v[5]) // acy
	t[2].Sub(&v[2], &v[4]) // bcx
	t[3].Sub(&v[3], &v[5]) // bcy
	t[4].Mul(&t[0], &t[3])
	t[5].Mul(&t[1], &t[2])
	return float64(t[4].Cmp(&t[5]))
}

// exactScratch holds reusable big integers for the exact fallbacks, so
// that after warm-up they do not allocate.
type exactScratch struct {
	v [8]big.Int
	t [16]big.Int
}

var exactPool = sync.Pool{New: func() any { return new(exactScratch) }}

// scaleToIntegers sets dst[i] to xs[i]·2^-e, where 2^e is the largest power
// of two dividing every xs[i] (for i < len(dst)): an exact integer image of
// the coordinates, preserving every polynomial sign. Every finite float64
// is an integer times a power of two, so this is always possible; the
// integers are small unless the exponents differ widely.
func scaleToIntegers(dst []big.Int, xs [8]float64) {
	var mant [8]int64
	var exps [8]int
	emin := math.MaxInt
	for i := range dst {
		x := xs[i]
		if x == 0 {
			continue
		}
		fr, e := math.Frexp(x)     // x = fr·2^e, 1/2 <= |fr| < 1
		m := int64(fr * (1 << 53)) // exact: fr has at most 53 significant bits
		tz := bits.TrailingZeros64(uint64(m))
		mant[i], exps[i] = m>>tz, e-53+tz
		emin = min(emin, exps[i])
	}
	for i := range dst {
		dst[i].SetInt64(mant[i])
		if mant[i] != 0 {
			dst[i].Lsh(&dst[i], uint(exps[i]-emin))
		}
	}
}

// inCircleSign returns a number whose sign tells where d lies relative to
// the circle through a, b and c, which must be counter-clockwise: positive
// inside, negative outside, zero on the circle. (For clockwise a, b, c the
// sign is reversed.) The sign is exact; the magnitude is only approximate.
func inCircleSign(a, b, c, d [2]float64) float64 {
	adx, ady := a[0]-d[0], a[1]-d[1]
	bdx, bdy := b[0]-d[0], b[1]-d[1]
	cdx, cdy := c[0]-d[0], c[1]-d[1]
	if !(safe4(adx) && safe4(ady) && safe4(bdx) && safe4(bdy) && safe4(cdx) && safe4(cdy)) {
		return inCircleExact(a, b, c, d)
	}

	bdxcdy, cdxbdy := float64(bdx*cdy), float64(cdx*bdy)
	cdxady, adxcdy := float64(cdx*ady), float64(adx*cdy)
	adxbdy, bdxady := float64(adx*bdy), float64(bdx*ady)
	alift := float64(adx*adx) + float64(ady*ady)
	blift := float64(bdx*bdx) + float64(bdy*bdy)
	clift := float64(cdx*cdx) + float64(cdy*cdy)

	det := float64(alift*(bdxcdy-cdxbdy)) + float64(blift*(cdxady-adxcdy)) + float64(clift*(adxbdy-bdxady))
	perm := float64((math.Abs(bdxcdy)+math.Abs(cdxbdy))*alift) +
		float64((math.Abs(cdxady)+math.Abs(adxcdy))*blift) +
		float64((math.Abs(adxbdy)+math.Abs(bdxady))*clift)
	bound := inCircleBound * perm
	if det > bound || -det > bound {
		return det
	}
	return inCircleExact(a, b, c, d)
}

// inCircleExact evaluates the in-circle determinant exactly and returns its
// sign as -1, 0 or 1.
func inCircleExact(a, b, c, d [2]float64) float64 {
	if sgn, ok := inCircleSmall(a, b, c, d); ok {
		return sgn
	}
	s := exactPool.Get().(*exactScratch)
	defer exactPool.Put(s)
	v := s.v[:8]
	scaleToIntegers(v, [8]float64{a[0], a[1], b[0], b[1], c[0], c[1], d[0], d[1]})
	t := &s.t
	// t[0..5] = adx, ady, bdx, bdy, cdx, cdy; t[6..8] = lifts.
	for i := range 3 {
		x, y, l := &t[2*i], &t[2*i+1], &t[6+i]
		x.Sub(&v[2*i], &v[6])
		y.Sub(&v[2*i+1], &v[7])
		l.Mul(x, x)
		t[9].Mul(y, y)
		l.Add(l, &t[9])
	}
	det, m, p := &t[10], &t[11], &t[12]
	det.SetInt64(0)
	for i := range 3 {
		j, k := (i+1)%3, (i+2)%3
		// Minor x_j y_k - x_k y_j, times lift_i.
		m.Mul(&t[2*j], &t[2*k+1])
		p.Mul(&t[2*k], &t[2*j+1])
		m.Sub(m, p)
		m.Mul(m, &t[6+i])
		det.Add(det, m)
	}
	return float64(det.Sign())
}

// Fast exact paths for the common degenerate case of points on a fine
// dyadic grid (such as the cocircular vertices of refined meshes of
// polygons with simple coordinates): when every coordinate difference is
// computed without rounding and the differences are small integer multiples
// of a common power of two, the determinant is evaluated exactly in 64- and
// 128-bit integer arithmetic instead of math/big.

// exactDiff returns a-b and whether it is exact, from the roundoff of the
// subtraction recovered as in Knuth's TwoSum (D. E. Knuth, TAOCP vol. 2,
// 4.2.2; Shewchuk 1997, Two-Diff).
func exactDiff(a, b float64) (float64, bool) {
	x := a - b
	bv := a - x
	av := x + bv
	return x, (a-av)+(bv-b) == 0
}

// smallIntegers returns xs[i]·2^-e (at most 8 values) for the largest common power of
// two 2^e, if every result is below 2^maxBits in magnitude.
func smallIntegers(xs []float64, maxBits int) ([8]int64, bool) {
	var out [8]int64
	var mant [8]int64
	var exps [8]int
	emin := math.MaxInt
	for i, x := range xs {
		if x == 0 {
			continue
		}
		fr, e := math.Frexp(x)
		m := int64(fr * (1 << 53))
		tz := bits.TrailingZeros64(uint64(m))
		mant[i], exps[i] = m>>tz, e-53+tz
		emin = min(emin, exps[i])
	}
	for i := range xs {
		if mant[i] == 0 {
			continue
		}
		m := mant[i]
		if m < 0 {
			m = -m
		}
		sh := exps[i] - emin
		if bits.Len64(uint64(m))+sh > maxBits {
			return out, false
		}
		out[i] = mant[i] << sh
	}
	return out, true
}

// orientSmall is the orientation test on small dyadic differences.
func orientSmall(a, b, c [2]float64) (float64, bool) {
	var d [4]float64
	var ok [4]bool
	d[0], ok[0] = exactDiff(a[0], c[0])
	d[1], ok[1] = exactDiff(a[1], c[1])
	d[2], ok[2] = exactDiff(b[0], c[0])
	d[3], ok[3] = exactDiff(b[1], c[1])
	if !(ok[0] && ok[1] && ok[2] && ok[3]) {
		return 0, false
	}
	n, fits := smallIntegers(d[:], 31)
	if !fits {
		return 0, false
	}
	// |products| < 2^62, so the difference fits in int64.
	l, r := n[0]*n[3], n[1]*n[2]
	switch {
	case l > r:
		return 1, true
	case l < r:
		return -1, true
	}
	return 0, true
}

// inCircleSmall is the in-circle test on small dyadic differences.
func inCircleSmall(a, b, c, d [2]float64) (float64, bool) {
	var x [6]float64
	for i, p := range [3][2]float64{a, b, c} {
		var ok0, ok1 bool
		x[2*i], ok0 = exactDiff(p[0], d[0])
		x[2*i+1], ok1 = exactDiff(p[1], d[1])
		if !ok0 || !ok1 {
			return 0, false
		}
	}
	// With |n| < 2^29: lifts and minors are below 2^59 (int64), terms
	// below 2^118, and their sum below 2^120 (signed 128-bit).
	n, fits := smallIntegers(x[:], 29)
	if !fits {
		return 0, false
	}
	var hi, lo uint64 // two's complement 128-bit accumulator
	for i := range 3 {
		j, k := (i+1)%3, (i+2)%3
		lift := n[2*i]*n[2*i] + n[2*i+1]*n[2*i+1]
		minor := n[2*j]*n[2*k+1] - n[2*k]*n[2*j+1]
		neg := minor < 0
		if neg {
			minor = -minor
		}
		th, tl := bits.Mul64(uint64(lift), uint64(minor))
		if neg {
			th, tl = ^th, ^tl
			var carry uint64
			tl, carry = bits.Add64(tl, 1, 0)
			th += carry
		}
		var carry uint64
		lo, carry = bits.Add64(lo, tl, 0)
		hi, _ = bits.Add64(hi, th, carry)
	}
	switch {
	case int64(hi) < 0:
		return -1, true
	case hi == 0 && lo == 0:
		return 0, true
	}
	return 1, true
}
