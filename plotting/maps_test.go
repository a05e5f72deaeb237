package plotting

import (
	"bytes"
	"encoding/xml"
	"image"
	"image/color"
	"image/png"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// testGrid returns an nx×ny grid on [0, w]×[0, h] sampled from f.
func testGrid(nx, ny int, w, h float64, f func(x, y float64) float64) Grid {
	g := Grid{NX: nx, NY: ny, DX: w / float64(nx), DY: h / float64(ny), Values: make([]float64, nx*ny)}
	g.X0, g.Y0 = g.DX/2, g.DY/2
	for j := range ny {
		for i := range nx {
			g.Values[j*nx+i] = f(g.X0+float64(i)*g.DX, g.Y0+float64(j)*g.DY)
		}
	}
	return g
}

// readPNG decodes the PNG file at path.
func readPNG(t *testing.T, path string) image.Image {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	img, err := png.Decode(f)
	if err != nil {
		t.Fatalf("decoding %s: %v", path, err)
	}
	return img
}

// checkSVG fails unless the file at path is well-formed XML with an <svg>
// root element.
func checkSVG(t *testing.T, path string) {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	dec := xml.NewDecoder(bytes.NewReader(b))
	root := ""
	for {
		tok, err := dec.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("%s: not well-formed XML: %v", path, err)
		}
		if se, ok := tok.(xml.StartElement); ok && root == "" {
			root = se.Name.Local
		}
	}
	if root != "svg" {
		t.Fatalf("%s: root element %q, want svg", path, root)
	}
}

// layoutOf redraws a map in memory to learn where drawMap put things. Drawing
// is deterministic, so the layout is that of the file written with the same
// input.
func layoutOf(t *testing.T, g Grid, a *arrowField, opt MapOptions) mapLayout {
	t.Helper()
	w, h, err := figureSize(opt.Width, opt.Height, defaultMapWidth, defaultMapHeight)
	if err != nil {
		t.Fatal(err)
	}
	l, err := drawMap(draw.New(newCanvas("png", w, h)), g, a, opt)
	if err != nil {
		t.Fatal(err)
	}
	return l
}

// pixelAt returns the pixel of img (height hpx) under the data point (x, y).
func pixelAt(img image.Image, l mapLayout, x, y float64) (px, py int) {
	cx := l.data.Min.X + vg.Length((x-l.xmin)/(l.xmax-l.xmin))*(l.data.Max.X-l.data.Min.X)
	cy := l.data.Min.Y + vg.Length((y-l.ymin)/(l.ymax-l.ymin))*(l.data.Max.Y-l.data.Min.Y)
	hpx := img.Bounds().Dy()
	return int(cx.Dots(dpi)), hpx - 1 - int(cy.Dots(dpi))
}

// closeColour reports whether a and b differ by at most tol in each 8-bit
// channel.
func closeColour(a, b color.Color, tol int) bool {
	ar, ag, ab, aa := a.RGBA()
	br, bg, bb, ba := b.RGBA()
	d := func(x, y uint32) bool { return math.Abs(float64(x>>8)-float64(y>>8)) <= float64(tol) }
	return d(ar, br) && d(ag, bg) && d(ab, bb) && d(aa, ba)
}

func rgba8(c color.Color) [4]uint32 {
	r, g, b, a := c.RGBA()
	return [4]uint32{r >> 8, g >> 8, b >> 8, a >> 8}
}

func TestColourMapPixels(t *testing.T) {
	// Each case draws a small grid, so every cell spans many pixels, and
	// checks the pixel under the centre of chosen cells against the colour
	// the map gives that cell's value. Centres of cells away from the axes
	// are exact up to rounding in the canvas (tolerance 2 of 255).
	const colourTol = 2
	white := color.NRGBA{255, 255, 255, 255}
	ramp := testGrid(8, 6, 4, 3, func(x, y float64) float64 { return 10*x + y })
	withHole := testGrid(8, 6, 4, 3, func(x, y float64) float64 { return x - y })
	withHole.Values[2*8+3] = math.NaN()
	withHole.Values[3*8+4] = math.Inf(1)
	withHole.Values[1*8+5] = math.Inf(-1)
	constant := testGrid(7, 5, 1, 1, func(x, y float64) float64 { return 0.25 })
	fixed := testGrid(6, 6, 1, 1, func(x, y float64) float64 { return x })

	type cell struct {
		i, j int
		want color.Color // nil: the map colour of the value
	}
	for _, tc := range []struct {
		name      string
		g         Grid
		opt       MapOptions
		w, h      int // expected picture size
		cells     []cell
		lo, hi    float64 // expected colour range
		rangeTol  float64
		wantTicks int // expected number of labelled colour-bar ticks, -1: any
	}{
		{
			name: "ramp default size", g: ramp,
			opt: MapOptions{Title: "ramp", Unit: "T (K)", LengthUnit: "m"},
			w:   800, h: 600,
			cells: []cell{{2, 2, nil}, {5, 3, nil}, {6, 4, nil}},
			lo:    ramp.Values[0], hi: ramp.Values[len(ramp.Values)-1], rangeTol: 1e-12,
			wantTicks: -1,
		},
		{
			name: "NaN and Inf cells blank", g: withHole,
			opt: MapOptions{Width: 640, Height: 480},
			w:   640, h: 480,
			cells: []cell{{3, 2, white}, {4, 3, white}, {5, 1, white}, {2, 3, nil}, {6, 2, nil}},
			lo:    withHole.Values[5*8+0], hi: withHole.Values[0*8+7], rangeTol: 1e-12,
			wantTicks: -1,
		},
		{
			// A constant field takes the middle colour; the bar spans
			// ±1 % around the value (our own rule) with one tick at it.
			name: "constant field", g: constant,
			opt: MapOptions{Unit: "mole fraction", Width: 500, Height: 400},
			w:   500, h: 400,
			cells: []cell{{3, 2, Estuary(0.5)}, {1, 1, Estuary(0.5)}},
			lo:    0.2475, hi: 0.2525, rangeTol: 1e-12,
			wantTicks: 1,
		},
		{
			// Min/Max override: values beyond take the end colours.
			name: "fixed range", g: fixed,
			opt: MapOptions{Min: 0.3, Max: 0.6, Width: 400, Height: 400},
			w:   400, h: 400,
			cells: []cell{{0, 2, Estuary(0)}, {5, 2, Estuary(1)}, {3, 3, nil}},
			lo:    0.3, hi: 0.6, rangeTol: 0,
			wantTicks: -1,
		},
	} {
		t.Run(tc.name, func(t *testing.T) {
			path := filepath.Join(t.TempDir(), "map.png")
			if err := ColourMap(path, tc.g, tc.opt); err != nil {
				t.Fatalf("ColourMap: %v", err)
			}
			img := readPNG(t, path)
			if b := img.Bounds(); b.Dx() != tc.w || b.Dy() != tc.h {
				t.Fatalf("size %d×%d, want %d×%d", b.Dx(), b.Dy(), tc.w, tc.h)
			}
			l := layoutOf(t, tc.g, nil, tc.opt)
			if math.Abs(l.lo-tc.lo) > tc.rangeTol || math.Abs(l.hi-tc.hi) > tc.rangeTol {
				t.Errorf("colour range [%g, %g], want [%g, %g]", l.lo, l.hi, tc.lo, tc.hi)
			}
			cr, _ := newColourRange(tc.g, tc.opt)
			if tc.wantTicks >= 0 {
				n := 0
				for _, tk := range cr.ticks() {
					if tk.Label != "" {
						n++
					}
				}
				if n != tc.wantTicks {
					t.Errorf("%d labelled colour-bar ticks, want %d", n, tc.wantTicks)
				}
			}
			for _, c := range tc.cells {
				v := tc.g.At(c.i, c.j)
				want := c.want
				if want == nil {
					want = Estuary((v - l.lo) / (l.hi - l.lo))
				}
				px, py := pixelAt(img, l, tc.g.X0+float64(c.i)*tc.g.DX, tc.g.Y0+float64(c.j)*tc.g.DY)
				if got := img.At(px, py); !closeColour(got, want, colourTol) {
					t.Errorf("cell (%d, %d) value %g at pixel (%d, %d): colour %v, want %v", c.i, c.j, v, px, py, rgba8(got), rgba8(want))
				}
			}
		})
	}
}

func TestColourMapEqualAspect(t *testing.T) {
	// One length unit must take the same number of points on both axes.
	// The layout loop stops within 1e-3 points of the target; on a data
	// area of at least 100 points that is a relative error below 1e-5, so
	// 1e-4 is a safe bound.
	const tol = 1e-4
	for _, tc := range []struct {
		name string
		w, h float64 // domain size
		opt  MapOptions
	}{
		{"wide channel", 10, 1, MapOptions{}},
		{"tall column", 1, 4, MapOptions{Title: "tall", Unit: "K"}},
		{"square in wide figure", 2, 2, MapOptions{Width: 1000, Height: 400}},
		{"square in tall figure", 2, 2, MapOptions{Width: 400, Height: 900}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			g := testGrid(10, 10, tc.w, tc.h, func(x, y float64) float64 { return x * y })
			l := layoutOf(t, g, nil, tc.opt)
			sx := float64(l.data.Max.X-l.data.Min.X) / (l.xmax - l.xmin)
			sy := float64(l.data.Max.Y-l.data.Min.Y) / (l.ymax - l.ymin)
			if math.Abs(sx/sy-1) > tol {
				t.Errorf("points per length unit: x %.6g, y %.6g", sx, sy)
			}
			// The colour bar sits right of the data area, level with it,
			// and inside the figure.
			w, _, _ := figureSize(tc.opt.Width, tc.opt.Height, defaultMapWidth, defaultMapHeight)
			if l.bar.Min.X <= l.data.Max.X || l.bar.Max.X > pixels(w) || l.bar.Min.Y != l.data.Min.Y || l.bar.Max.Y != l.data.Max.Y {
				t.Errorf("colour bar %v, data area %v, figure width %v", l.bar, l.data, pixels(w))
			}
		})
	}
}

func TestVectorMapDrawsArrows(t *testing.T) {
	// The same magnitude map is drawn once with a uniform vector field and
	// once with a zero one (no arrows); the arrows must change a fair share
	// of the data area, and only there, and must add near-black pixels,
	// which Estuary never produces (its darkest colour is (7, 28, 71)-ish).
	mag := testGrid(40, 20, 2, 1, func(x, y float64) float64 { return x })
	vx := testGrid(10, 5, 2, 1, func(x, y float64) float64 { return 1 })
	vy := testGrid(10, 5, 2, 1, func(x, y float64) float64 { return 0.5 })
	zero := testGrid(10, 5, 2, 1, func(x, y float64) float64 { return 0 })
	vx.Values[3] = math.NaN() // one missing arrow must not matter
	opt := MapOptions{Width: 600, Height: 400}

	dir := t.TempDir()
	with, without := filepath.Join(dir, "with.png"), filepath.Join(dir, "without.png")
	if err := VectorMap(with, mag, vx, vy, opt); err != nil {
		t.Fatal(err)
	}
	if err := VectorMap(without, mag, zero, zero, opt); err != nil {
		t.Fatal(err)
	}
	a, b := readPNG(t, with), readPNG(t, without)
	l := layoutOf(t, mag, nil, opt)
	x0, y1 := int(l.data.Min.X.Dots(dpi)), a.Bounds().Dy()-int(l.data.Min.Y.Dots(dpi))
	x1, y0 := int(l.data.Max.X.Dots(dpi)), a.Bounds().Dy()-int(l.data.Max.Y.Dots(dpi))
	var inside, outside, dark, total int
	for y := a.Bounds().Min.Y; y < a.Bounds().Max.Y; y++ {
		for x := a.Bounds().Min.X; x < a.Bounds().Max.X; x++ {
			in := x >= x0 && x < x1 && y >= y0 && y < y1
			if in {
				total++
			}
			if closeColour(a.At(x, y), b.At(x, y), 0) {
				continue
			}
			if in {
				inside++
			} else {
				outside++
			}
			if c := rgba8(a.At(x, y)); c[0] < 40 && c[1] < 40 && c[2] < 40 {
				dark++
			}
		}
	}
	// 49 arrows of about 0.18 length units on a 2×1 domain, 1 point
	// wide plus rims: some 3 % of the area; 1 % is a safe lower bound.
	if frac := float64(inside) / float64(total); frac < 0.01 {
		t.Errorf("arrows changed %d of %d data-area pixels (%.2f%%), want at least 1%%", inside, total, 100*frac)
	}
	if outside != 0 {
		t.Errorf("arrows changed %d pixels outside the data area", outside)
	}
	if dark == 0 {
		t.Error("no near-black arrow pixels")
	}
}

func TestSVGOutput(t *testing.T) {
	g := testGrid(12, 8, 3, 2, func(x, y float64) float64 { return math.Sin(x) * y })
	g.Values[5] = math.NaN()
	dir := t.TempDir()
	for _, tc := range []struct {
		name string
		file string
		draw func(path string) error
	}{
		{"colour map", "m.svg", func(p string) error { return ColourMap(p, g, MapOptions{Title: "a & b < c", Unit: "K"}) }},
		{"vector map, upper-case extension", "v.SVG", func(p string) error { return VectorMap(p, g, g, g, MapOptions{}) }},
		{"profiles", "p.svg", func(p string) error {
			return Profiles(p, []float64{0, 1, 2}, []Series{{Name: "<N2>", Values: []float64{1, 2, 3}}}, LineOptions{})
		}},
		{"history", "h.svg", func(p string) error {
			return History(p, []int{1, 2, 3}, []Series{{Name: "residual", Values: []float64{1, 1e-3, 1e-9}}}, LineOptions{})
		}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			path := filepath.Join(dir, tc.file)
			if err := tc.draw(path); err != nil {
				t.Fatal(err)
			}
			checkSVG(t, path)
		})
	}
}

func TestMapErrors(t *testing.T) {
	good := testGrid(4, 3, 1, 1, func(x, y float64) float64 { return x })
	allNaN := testGrid(4, 3, 1, 1, func(x, y float64) float64 { return math.NaN() })
	short := good
	short.Values = good.Values[:5]
	badStep := good
	badStep.DX = 0
	shifted := good
	shifted.X0 += 0.5
	for _, tc := range []struct {
		name   string
		file   string
		draw   func(path string) error
		wantIn []string // substrings of the error
	}{
		{"empty grid", "a.png", func(p string) error { return ColourMap(p, Grid{}, MapOptions{}) }, []string{"field grid is empty", "a.png"}},
		{"no values", "a.png", func(p string) error { return ColourMap(p, Grid{NX: 2, NY: 2, DX: 1, DY: 1}, MapOptions{}) }, []string{"field grid is empty"}},
		{"wrong length", "a.png", func(p string) error { return ColourMap(p, short, MapOptions{}) }, []string{"5 values", "4*3"}},
		{"zero spacing", "a.png", func(p string) error { return ColourMap(p, badStep, MapOptions{}) }, []string{"DX=0"}},
		{"all NaN", "a.png", func(p string) error { return ColourMap(p, allNaN, MapOptions{}) }, []string{"no finite value"}},
		{"Min > Max", "a.png", func(p string) error { return ColourMap(p, good, MapOptions{Min: 2, Max: 1}) }, []string{"Min 2 > Max 1"}},
		{"NaN Min", "a.png", func(p string) error { return ColourMap(p, good, MapOptions{Min: math.NaN()}) }, []string{"not finite"}},
		{"bad extension", "a.jpg", func(p string) error { return ColourMap(p, good, MapOptions{}) }, []string{"a.jpg", ".png or .svg"}},
		{"no extension", "a", func(p string) error { return ColourMap(p, good, MapOptions{}) }, []string{".png or .svg"}},
		{"too small", "a.png", func(p string) error { return ColourMap(p, good, MapOptions{Width: 50, Height: 50}) }, []string{"50×50"}},
		{"empty vx", "a.png", func(p string) error { return VectorMap(p, good, Grid{}, good, MapOptions{}) }, []string{"vx grid is empty"}},
		{"empty vy", "a.png", func(p string) error { return VectorMap(p, good, good, Grid{}, MapOptions{}) }, []string{"vy grid is empty"}},
		{"vx and vy differ", "a.png", func(p string) error { return VectorMap(p, good, good, shifted, MapOptions{}) }, []string{"differ"}},
		{"empty magnitude", "a.png", func(p string) error { return VectorMap(p, Grid{}, good, good, MapOptions{}) }, []string{"field grid is empty"}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			dir := t.TempDir()
			err := tc.draw(filepath.Join(dir, tc.file))
			if err == nil {
				t.Fatal("no error")
			}
			for _, s := range tc.wantIn {
				if !strings.Contains(err.Error(), s) {
					t.Errorf("error %q does not contain %q", err, s)
				}
			}
			if ents, _ := os.ReadDir(dir); len(ents) != 0 {
				t.Errorf("failed call left %d file(s), first %q", len(ents), ents[0].Name())
			}
		})
	}
}

func TestDeterministic(t *testing.T) {
	// Equal input gives byte-for-byte equal files.
	g := testGrid(30, 20, 3, 2, func(x, y float64) float64 { return math.Cos(x) + y })
	dir := t.TempDir()
	for _, ext := range []string{".png", ".svg"} {
		var files [2][]byte
		for k := range files {
			path := filepath.Join(dir, "d"+string(rune('0'+k))+ext)
			if err := VectorMap(path, g, g, g, MapOptions{Title: "same"}); err != nil {
				t.Fatal(err)
			}
			b, err := os.ReadFile(path)
			if err != nil {
				t.Fatal(err)
			}
			files[k] = b
		}
		if !bytes.Equal(files[0], files[1]) {
			t.Errorf("%s: two renderings of the same input differ", ext)
		}
	}
}

func TestInputsNotModified(t *testing.T) {
	g := testGrid(5, 4, 1, 1, func(x, y float64) float64 { return x + y })
	g.Values[2] = math.NaN()
	before := append([]float64(nil), g.Values...)
	if err := VectorMap(filepath.Join(t.TempDir(), "m.png"), g, g, g, MapOptions{Min: -1, Max: 1}); err != nil {
		t.Fatal(err)
	}
	for k := range before {
		if g.Values[k] != before[k] && !(math.IsNaN(g.Values[k]) && math.IsNaN(before[k])) {
			t.Fatalf("value %d changed from %g to %g", k, before[k], g.Values[k])
		}
	}
}

func TestAtomicWrite(t *testing.T) {
	good := testGrid(4, 3, 1, 1, func(x, y float64) float64 { return x })

	t.Run("missing directory", func(t *testing.T) {
		parent := t.TempDir()
		err := ColourMap(filepath.Join(parent, "missing", "m.png"), good, MapOptions{})
		if err == nil || !strings.Contains(err.Error(), "m.png") {
			t.Fatalf("error %v, want one naming m.png", err)
		}
		if ents, _ := os.ReadDir(parent); len(ents) != 0 {
			t.Errorf("left %q in the parent directory", ents[0].Name())
		}
	})

	t.Run("success replaces and leaves no temp", func(t *testing.T) {
		dir := t.TempDir()
		path := filepath.Join(dir, "m.png")
		if err := os.WriteFile(path, []byte("old"), 0o644); err != nil {
			t.Fatal(err)
		}
		if err := ColourMap(path, good, MapOptions{}); err != nil {
			t.Fatal(err)
		}
		readPNG(t, path)
		if ents, _ := os.ReadDir(dir); len(ents) != 1 {
			t.Errorf("directory holds %d entries, want 1", len(ents))
		}
	})
}

func TestNearlyConstantAndExtremeRanges(t *testing.T) {
	// Rounding noise and extreme magnitudes must draw, not panic.
	for _, tc := range []struct {
		name   string
		values []float64
	}{
		{"rounding noise", []float64{1, 1 + 1e-15, 1, 1 - 1e-15}},
		{"zero", []float64{0, 0, 0, 0}},
		{"tiny", []float64{5e-324, 5e-324, 5e-324, 5e-324}},
		{"huge", []float64{1e300, -1e300, 1e300, 0}},
		{"one finite value", []float64{math.NaN(), math.Inf(1), 7, math.Inf(-1)}},
		{"subnormal range", []float64{0, 1e-310, 0, 0}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			g := Grid{NX: 2, NY: 2, X0: 0, Y0: 0, DX: 1, DY: 1, Values: tc.values}
			if err := ColourMap(filepath.Join(t.TempDir(), "m.png"), g, MapOptions{}); err != nil {
				t.Fatal(err)
			}
		})
	}
}

func TestExtremeShapes(t *testing.T) {
	// Extreme domains and grids must draw, not panic, even where the
	// picture is of little use.
	for _, tc := range []struct {
		name   string
		nx, ny int
		w, h   float64
	}{
		{"very wide domain", 20, 2, 1e6, 1},
		{"very tall domain", 2, 20, 1, 1e6},
		{"single sample", 1, 1, 1, 1},
		{"one row of many samples", 6000, 1, 6000, 1},
		{"tiny lengths", 3, 3, 1e-12, 1e-12},
	} {
		t.Run(tc.name, func(t *testing.T) {
			g := testGrid(tc.nx, tc.ny, tc.w, tc.h, func(x, y float64) float64 { return x + y })
			if err := VectorMap(filepath.Join(t.TempDir(), "m.png"), g, g, g, MapOptions{Width: 400, Height: 300}); err != nil {
				t.Fatal(err)
			}
		})
	}
}
