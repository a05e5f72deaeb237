package plotting

import (
	"image/color"
	"math"
)

// This file defines the colours of the package in the Oklab colour space of
// B. Ottosson, "A perceptual color space for image processing" (2020),
// https://bottosson.github.io/posts/oklab/, and its polar form OkLCh
// (lightness L, chroma C, hue h). Oklab lightness predicts perceived
// lightness, so a map whose L grows linearly looks evenly graded from dark to
// light.

// Estuary returns the colour at t in [0, 1] of the package's sequential
// colour map: from deep blue-grey water (t = 0) through teal and green to
// pale straw (t = 1). Values of t outside [0, 1] are clamped; NaN gives the
// fully transparent colour.
//
// Definition (our own): Oklab lightness L = 0.24 + 0.71 t, linear in t;
// chroma C and hue h are interpolated linearly in t between the stops of
// estuaryStops. Where that colour lies outside the sRGB gamut its chroma is
// reduced, keeping L and h, until it fits, so the lightness stays exactly
// linear before the rounding to 8 bits.
func Estuary(t float64) color.NRGBA {
	if math.IsNaN(t) {
		return color.NRGBA{}
	}
	t = math.Max(0, math.Min(1, t))
	return oklchToNRGBA(estuaryLightness(t), estuaryChroma(t), estuaryHue(t))
}

// estuaryL0 and estuaryL1 are the Oklab lightness of the ends of Estuary.
const (
	estuaryL0 = 0.24
	estuaryL1 = 0.95
)

func estuaryLightness(t float64) float64 { return estuaryL0 + (estuaryL1-estuaryL0)*t }

// estuaryStops are the control points of Estuary: at parameter t, OkLCh
// chroma C and hue h in degrees (hue decreases monotonically, without
// wrapping). They are our own choice: a blue-grey start, teal, green and a
// pale straw end.
var estuaryStops = []struct{ t, c, h float64 }{
	{0.00, 0.080, 262},
	{0.20, 0.072, 231},
	{0.40, 0.083, 198},
	{0.55, 0.105, 172},
	{0.80, 0.120, 128},
	{1.00, 0.080, 98},
}

func estuaryChroma(t float64) float64 {
	return interpStops(t, func(i int) float64 { return estuaryStops[i].c })
}

func estuaryHue(t float64) float64 {
	return interpStops(t, func(i int) float64 { return estuaryStops[i].h })
}

// interpStops interpolates the stop values v(i) linearly in t.
func interpStops(t float64, v func(i int) float64) float64 {
	n := len(estuaryStops)
	for i := 1; i < n; i++ {
		if t <= estuaryStops[i].t {
			a, b := estuaryStops[i-1], estuaryStops[i]
			s := (t - a.t) / (b.t - a.t)
			return v(i-1) + s*(v(i)-v(i-1))
		}
	}
	return v(n - 1)
}

// seriesColour returns the colour of the k-th series of a line plot: OkLCh
// lightness 0.55 and chroma 0.14 (reduced into the sRGB gamut where
// needed), hue 25° plus k golden angles (137.508°), so that successive
// series differ clearly in hue and no two are alike however many there are.
func seriesColour(k int) color.NRGBA {
	const goldenAngle = 137.50776405003785 // 360° (2 − φ), φ the golden ratio
	h := math.Mod(25+float64(k)*goldenAngle, 360)
	return oklchToNRGBA(0.55, 0.14, h)
}

// oklchToNRGBA converts OkLCh (h in degrees) to an opaque 8-bit sRGB colour.
// A colour outside the sRGB gamut has its chroma reduced by bisection,
// keeping L and h, to the largest value inside the gamut.
func oklchToNRGBA(l, c, hDeg float64) color.NRGBA {
	h := hDeg * math.Pi / 180
	cosH, sinH := math.Cos(h), math.Sin(h)
	r, g, b := oklabToLinearSRGB(l, c*cosH, c*sinH)
	if !inGamut(r, g, b) {
		lo, hi := 0.0, c
		for range 50 {
			mid := 0.5 * (lo + hi)
			r, g, b = oklabToLinearSRGB(l, mid*cosH, mid*sinH)
			if inGamut(r, g, b) {
				lo = mid
			} else {
				hi = mid
			}
		}
		r, g, b = oklabToLinearSRGB(l, lo*cosH, lo*sinH)
	}
	return color.NRGBA{R: to8(srgbEncode(r)), G: to8(srgbEncode(g)), B: to8(srgbEncode(b)), A: 255}
}

func inGamut(r, g, b float64) bool {
	const eps = 1e-12
	return r >= -eps && r <= 1+eps && g >= -eps && g <= 1+eps && b >= -eps && b <= 1+eps
}

func to8(x float64) uint8 {
	return uint8(math.Round(255 * math.Max(0, math.Min(1, x))))
}

// oklabToLinearSRGB converts Oklab to linear-light sRGB (D65). Matrices
// from Ottosson (2020), section "Converting from linear sRGB to Oklab",
// function oklab_to_linear_srgb.
func oklabToLinearSRGB(l, a, b float64) (r, g, bl float64) {
	lr := l + 0.3963377774*a + 0.2158037573*b
	mr := l - 0.1055613458*a - 0.0638541728*b
	sr := l - 0.0894841775*a - 1.2914855480*b
	lc, mc, sc := lr*lr*lr, mr*mr*mr, sr*sr*sr
	r = +4.0767416621*lc - 3.3077115913*mc + 0.2309699292*sc
	g = -1.2684380046*lc + 2.6097574011*mc - 0.3413193965*sc
	bl = -0.0041960863*lc - 0.7034186147*mc + 1.7076147010*sc
	return r, g, bl
}

// linearSRGBToOklab converts linear-light sRGB to Oklab. Matrices from
// Ottosson (2020), function linear_srgb_to_oklab.
func linearSRGBToOklab(r, g, b float64) (l, a, bb float64) {
	lc := 0.4122214708*r + 0.5363325363*g + 0.0514459929*b
	mc := 0.2119034982*r + 0.6806995451*g + 0.1073969566*b
	sc := 0.0883024619*r + 0.2817188376*g + 0.6299787005*b
	lr, mr, sr := math.Cbrt(lc), math.Cbrt(mc), math.Cbrt(sc)
	l = 0.2104542553*lr + 0.7936177850*mr - 0.0040720468*sr
	a = 1.9779984951*lr - 2.4285922050*mr + 0.4505937099*sr
	bb = 0.0259040371*lr + 0.7827717662*mr - 0.8086757660*sr
	return l, a, bb
}

// srgbEncode applies the sRGB transfer function of IEC 61966-2-1:1999 to a
// linear-light component in [0, 1].
func srgbEncode(x float64) float64 {
	if x <= 0.0031308 {
		return 12.92 * x
	}
	return 1.055*math.Pow(x, 1/2.4) - 0.055
}

// srgbDecode inverts srgbEncode (IEC 61966-2-1:1999).
func srgbDecode(x float64) float64 {
	if x <= 0.04045 {
		return x / 12.92
	}
	return math.Pow((x+0.055)/1.055, 2.4)
}
