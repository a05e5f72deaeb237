package plotting

import (
	"image/color"
	"math"
	"testing"
)

// oklabOf returns the Oklab coordinates of an 8-bit sRGB colour.
func oklabOf(c color.Color) (l, a, b float64) {
	r, g, bl, _ := c.RGBA()
	return linearSRGBToOklab(srgbDecode(float64(r)/0xffff), srgbDecode(float64(g)/0xffff), srgbDecode(float64(bl)/0xffff))
}

// cieLStar returns the CIE 1976 lightness L* of an 8-bit sRGB colour, an
// independent check on Oklab L. Relative luminance Y from linear sRGB with
// the Rec. ITU-R BT.709 / IEC 61966-2-1 weights 0.2126, 0.7152, 0.0722;
// L* = 116 f(Y/Yn) - 16 with Yn = 1, f(t) = t^(1/3) above (6/29)^3 and
// t/(3 (6/29)^2) + 4/29 below (CIE 15:2004, section 8.2.1).
func cieLStar(c color.Color) float64 {
	r, g, b, _ := c.RGBA()
	y := 0.2126*srgbDecode(float64(r)/0xffff) + 0.7152*srgbDecode(float64(g)/0xffff) + 0.0722*srgbDecode(float64(b)/0xffff)
	const d = 6.0 / 29
	f := math.Cbrt(y)
	if y <= d*d*d {
		f = y/(3*d*d) + 4.0/29
	}
	return 116*f - 16
}

func TestOklabReference(t *testing.T) {
	// Reference values: Oklab is normalised so that sRGB white has L = 1,
	// a = b = 0 and black is 0 (Ottosson 2020, "A perceptual color space
	// for image processing"); the published matrices carry 10 digits, so
	// white comes out exact to about 1e-8.
	const tol = 1e-6
	for _, tc := range []struct {
		name     string
		r, g, b  float64 // linear sRGB
		l, a, bb float64
	}{
		{"white", 1, 1, 1, 1, 0, 0},
		{"black", 0, 0, 0, 0, 0, 0},
		{"mid grey", 0.18, 0.18, 0.18, math.Cbrt(0.18), 0, 0}, // achromatic: L = Y^(1/3) by construction
	} {
		l, a, bb := linearSRGBToOklab(tc.r, tc.g, tc.b)
		if math.Abs(l-tc.l) > tol || math.Abs(a-tc.a) > tol || math.Abs(bb-tc.bb) > tol {
			t.Errorf("%s: Oklab (%.8f, %.8f, %.8f), want (%g, %g, %g)", tc.name, l, a, bb, tc.l, tc.a, tc.bb)
		}
	}
}

func TestOklabRoundTrip(t *testing.T) {
	// The two published matrix pairs are inverses of each other to the
	// printed 10 digits, so a round trip returns the input to about 1e-7.
	const tol = 1e-6
	for _, c := range [][3]float64{{1, 0, 0}, {0, 1, 0}, {0, 0, 1}, {0.2, 0.5, 0.9}, {0.9, 0.8, 0.05}} {
		l, a, b := linearSRGBToOklab(c[0], c[1], c[2])
		r, g, bl := oklabToLinearSRGB(l, a, b)
		if math.Abs(r-c[0]) > tol || math.Abs(g-c[1]) > tol || math.Abs(bl-c[2]) > tol {
			t.Errorf("round trip of %v: (%g, %g, %g)", c, r, g, bl)
		}
	}
	for _, x := range []float64{0, 0.002, 0.0031308, 0.04, 0.5, 1} {
		if got := srgbDecode(srgbEncode(x)); math.Abs(got-x) > 1e-12 {
			t.Errorf("sRGB transfer round trip of %g: %g", x, got)
		}
	}
}

func TestEstuaryLightness(t *testing.T) {
	// Estuary is defined with Oklab L = 0.24 + 0.71 t (our own design), so
	// both Oklab L and CIE L* must increase strictly along it. Rounding to 8
	// bits moves L by less than 0.004 (one code value of the darkest
	// channel at the dark end moves L by about 0.003).
	const (
		samples = 101
		lTol    = 0.004
	)
	prevL, prevStar := math.Inf(-1), math.Inf(-1)
	for k := range samples {
		tt := float64(k) / (samples - 1)
		c := Estuary(tt)
		if c.A != 255 {
			t.Fatalf("t=%g: alpha %d, want opaque", tt, c.A)
		}
		l, _, _ := oklabOf(c)
		star := cieLStar(c)
		if l <= prevL || star <= prevStar {
			t.Errorf("t=%g: Oklab L %.4f (previous %.4f), L* %.3f (previous %.3f): not increasing", tt, l, prevL, star, prevStar)
		}
		if want := estuaryL0 + (estuaryL1-estuaryL0)*tt; math.Abs(l-want) > lTol {
			t.Errorf("t=%g: Oklab L %.4f, want %.4f (linear design) within %g", tt, l, want, lTol)
		}
		prevL, prevStar = l, star
	}
}

func TestEstuaryUniformSteps(t *testing.T) {
	// Perceptual uniformity: the Oklab distance between neighbouring
	// samples may vary only mildly along the map. The bound 1.5 is our own
	// acceptance level; lightness alone gives equal steps, and hue and
	// chroma turns add at most a third of that.
	const (
		samples  = 33
		maxRatio = 1.5
	)
	minStep, maxStep := math.Inf(1), 0.0
	l0, a0, b0 := oklabOf(Estuary(0))
	for k := 1; k < samples; k++ {
		l, a, b := oklabOf(Estuary(float64(k) / (samples - 1)))
		d := math.Sqrt((l-l0)*(l-l0) + (a-a0)*(a-a0) + (b-b0)*(b-b0))
		minStep, maxStep = math.Min(minStep, d), math.Max(maxStep, d)
		l0, a0, b0 = l, a, b
	}
	if maxStep > maxRatio*minStep {
		t.Errorf("Oklab steps range from %.4f to %.4f, ratio %.2f > %g", minStep, maxStep, maxStep/minStep, maxRatio)
	}
}

func TestEstuaryInGamut(t *testing.T) {
	// The stops are chosen inside the sRGB gamut, so no chroma is cut and
	// the map has no kinks where the gamut boundary would be followed.
	for k := 0; k <= 200; k++ {
		tt := float64(k) / 200
		h := estuaryHue(tt) * math.Pi / 180
		c := estuaryChroma(tt)
		r, g, b := oklabToLinearSRGB(estuaryLightness(tt), c*math.Cos(h), c*math.Sin(h))
		if !inGamut(r, g, b) {
			t.Errorf("t=%g: linear sRGB (%.4f, %.4f, %.4f) outside the gamut", tt, r, g, b)
		}
	}
}

func TestEstuaryEdgeCases(t *testing.T) {
	for _, tc := range []struct {
		name string
		t    float64
		want color.NRGBA
	}{
		{"NaN is transparent", math.NaN(), color.NRGBA{}},
		{"below 0 clamps", -3, Estuary(0)},
		{"above 1 clamps", 7, Estuary(1)},
		{"-Inf clamps", math.Inf(-1), Estuary(0)},
		{"+Inf clamps", math.Inf(1), Estuary(1)},
	} {
		if got := Estuary(tc.t); got != tc.want {
			t.Errorf("%s: Estuary(%g) = %v, want %v", tc.name, tc.t, got, tc.want)
		}
	}
}

func TestSeriesColours(t *testing.T) {
	// Series colours share one Oklab lightness (0.55 by design, to within
	// 8-bit rounding) and differ in hue. Hues a golden angle apart come
	// back within 32.5° of each other after five steps (series 0 and 5:
	// chord 2·0.14·sin 16.25° = 0.078), so the nearest pair of the first six
	// is 0.07 apart in Oklab, still over three times a just-noticeable
	// difference of about 0.02 (Oklab is scaled like CIELAB/100); such
	// pairs also differ in dash pattern.
	const (
		lTol    = 0.005
		minDist = 0.07
		n       = 6
	)
	var lab [n][3]float64
	for k := range n {
		l, a, b := oklabOf(seriesColour(k))
		if math.Abs(l-0.55) > lTol {
			t.Errorf("series %d: Oklab L %.4f, want 0.55", k, l)
		}
		lab[k] = [3]float64{l, a, b}
	}
	for i := range n {
		for j := range i {
			d := math.Sqrt((lab[i][0]-lab[j][0])*(lab[i][0]-lab[j][0]) + (lab[i][1]-lab[j][1])*(lab[i][1]-lab[j][1]) + (lab[i][2]-lab[j][2])*(lab[i][2]-lab[j][2]))
			if d < minDist {
				t.Errorf("series %d and %d: Oklab distance %.3f < %g", i, j, d, minDist)
			}
		}
	}
}
