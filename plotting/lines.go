package plotting

import (
	"errors"
	"fmt"
	"math"
	"strconv"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Series is one named line of a line plot: Values[k] belongs to the k-th
// abscissa (or iteration) of the plot.
type Series struct {
	Name   string
	Values []float64
}

// LineOptions describe a line plot. The zero value is usable: no title, the
// default axis labels of the function and 800×500 pixels.
type LineOptions struct {
	Title string

	// XLabel and YLabel label the axes, units included, for example
	// "distance along probe (m)". Empty labels take the function's default.
	XLabel, YLabel string

	// Width and Height are the size of the picture in pixels; zero means
	// 800 and 500.
	Width, Height int
}

// Default line plot size in pixels.
const defaultLineWidth, defaultLineHeight = 800, 500

// Profiles draws each series against the common abscissa s, for example
// mole fractions along a probe line, and writes the picture to path as PNG
// or SVG according to the extension (see Format). Each series gets its own
// colour and dash pattern and an entry, in the given order, in a key to the
// right of the plot. A point with a non-finite abscissa or value breaks the
// line; a point with no finite neighbour is drawn as a dot; a series with
// no finite point is left out, also of the key. The default x label is "s".
//
// Every series must have len(s) values. It is an error when s or series is
// empty, or when no series has a finite point.
func Profiles(path string, s []float64, series []Series, opt LineOptions) error {
	return render("Profiles", path, opt.Width, opt.Height, defaultLineWidth, defaultLineHeight,
		func(c draw.Canvas) error {
			if len(s) == 0 {
				return errors.New("abscissa s is empty")
			}
			if err := checkSeries(series, len(s), "abscissa values"); err != nil {
				return err
			}
			p := newLinePlot(opt, "s")
			var key plot.Legend
			drawn := 0
			for k, ser := range series {
				runs := finiteRuns(s, ser.Values, false)
				if len(runs) == 0 {
					continue
				}
				thumb, err := addRuns(p, runs, k, false)
				if err != nil {
					return fmt.Errorf("series %q: %w", ser.Name, err)
				}
				key.Add(seriesName(ser, k), thumb...)
				drawn++
			}
			if drawn == 0 {
				return errors.New("no series has a finite point")
			}
			return drawWithKey(c, p, key)
		})
}

// History draws the history of a nonlinear iteration, for example the
// residual norm, the norm of the change and the mass-average defect, against
// the iteration numbers on a logarithmic y axis, and writes the picture to
// path as PNG or SVG according to the extension (see Format). Points with a
// non-positive or non-finite value are dropped, since a logarithmic axis
// cannot show them; the remaining points of a series are joined, with a
// marker on each; a series with no point left is left out, also of the
// key. The y axis spans whole decades. The default x label is "iteration".
//
// Every series must have len(iterations) values. It is an error when
// iterations or series is empty, or when no value at all is positive and
// finite.
func History(path string, iterations []int, series []Series, opt LineOptions) error {
	return render("History", path, opt.Width, opt.Height, defaultLineWidth, defaultLineHeight,
		func(c draw.Canvas) error {
			if len(iterations) == 0 {
				return errors.New("iterations are empty")
			}
			if err := checkSeries(series, len(iterations), "iterations"); err != nil {
				return err
			}
			x := make([]float64, len(iterations))
			for k, it := range iterations {
				x[k] = float64(it)
			}
			p := newLinePlot(opt, "iteration")
			p.Y.Scale = plot.LogScale{}
			p.Y.Tick.Marker = decadeTicks{}
			p.X.Tick.Marker = integerTicks{}
			var key plot.Legend
			ymin, ymax := math.Inf(1), math.Inf(-1)
			for k, ser := range series {
				runs := finiteRuns(x, ser.Values, true)
				if len(runs) == 0 {
					continue
				}
				for _, r := range runs {
					for _, pt := range r {
						ymin, ymax = math.Min(ymin, pt.Y), math.Max(ymax, pt.Y)
					}
				}
				thumb, err := addRuns(p, runs, k, true)
				if err != nil {
					return fmt.Errorf("series %q: %w", ser.Name, err)
				}
				key.Add(seriesName(ser, k), thumb...)
			}
			if math.IsInf(ymin, 1) {
				return errors.New("no positive finite value to draw on a logarithmic axis")
			}
			p.Y.Min = math.Pow(10, math.Floor(math.Log10(ymin)))
			p.Y.Max = math.Pow(10, math.Ceil(math.Log10(ymax)))
			if !(p.Y.Max > p.Y.Min) {
				p.Y.Max = 10 * p.Y.Min
			}
			return drawWithKey(c, p, key)
		})
}

// checkSeries checks that there are series and that each has n values.
func checkSeries(series []Series, n int, what string) error {
	if len(series) == 0 {
		return errors.New("series are empty")
	}
	for k, ser := range series {
		if len(ser.Values) != n {
			return fmt.Errorf("series %d (%q) has %d values, want one per %s (%d)", k, ser.Name, len(ser.Values), what, n)
		}
	}
	return nil
}

func seriesName(ser Series, k int) string {
	if ser.Name == "" {
		return "series " + strconv.Itoa(k+1)
	}
	return ser.Name
}

func newLinePlot(opt LineOptions, defaultX string) *plot.Plot {
	p := plot.New()
	p.Title.Text = opt.Title
	p.X.Label.Text = opt.XLabel
	if p.X.Label.Text == "" {
		p.X.Label.Text = defaultX
	}
	p.Y.Label.Text = opt.YLabel
	return p
}

// finiteRuns splits the points (x[k], y[k]) into runs of consecutive points
// that can be drawn: both coordinates finite and, when positive is set, y
// positive. With positive set, dropped points do not split the run: the
// neighbours are joined across them.
func finiteRuns(x, y []float64, positive bool) []plotter.XYs {
	var runs []plotter.XYs
	var cur plotter.XYs
	for k := range x {
		ok := finite(x[k]) && finite(y[k]) && (!positive || y[k] > 0)
		if ok {
			cur = append(cur, plotter.XY{X: x[k], Y: y[k]})
			continue
		}
		if !positive && len(cur) > 0 {
			runs = append(runs, cur)
			cur = nil
		}
	}
	if len(cur) > 0 {
		runs = append(runs, cur)
	}
	return runs
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// dashes are the dash patterns of series, cycled; our own choice.
var dashes = [][]vg.Length{
	nil,
	{vg.Points(6), vg.Points(3)},
	{vg.Points(1.5), vg.Points(2.5)},
	{vg.Points(8), vg.Points(3), vg.Points(1.5), vg.Points(3)},
}

// markers are the marker shapes of History series, cycled.
var markers = []draw.GlyphDrawer{
	draw.CircleGlyph{}, draw.SquareGlyph{}, draw.TriangleGlyph{}, draw.CrossGlyph{}, draw.PlusGlyph{}, draw.RingGlyph{},
}

// addRuns adds the runs of series number k to p, with markers on every
// point when marks is set and on isolated points otherwise, and returns the
// thumbnails for its key entry.
func addRuns(p *plot.Plot, runs []plotter.XYs, k int, marks bool) ([]plot.Thumbnailer, error) {
	line := draw.LineStyle{Color: seriesColour(k), Width: vg.Points(1.5), Dashes: dashes[k%len(dashes)]}
	glyph := draw.GlyphStyle{Color: seriesColour(k), Radius: vg.Points(2.5), Shape: markers[k%len(markers)]}
	if !marks {
		glyph.Shape = draw.CircleGlyph{}
		glyph.Radius = vg.Points(1.5)
	}
	var thumbs []plot.Thumbnailer
	for _, r := range runs {
		if len(r) > 1 {
			l, err := plotter.NewLine(r)
			if err != nil {
				return nil, err
			}
			l.LineStyle = line
			p.Add(l)
			if thumbs == nil {
				thumbs = []plot.Thumbnailer{l}
			}
		}
		if marks || len(r) == 1 {
			sc, err := plotter.NewScatter(r)
			if err != nil {
				return nil, err
			}
			sc.GlyphStyle = glyph
			p.Add(sc)
			if marks && len(thumbs) < 2 {
				thumbs = append(thumbs, sc)
			}
		}
	}
	if thumbs == nil { // only isolated points
		sc, err := plotter.NewScatter(runs[0])
		if err != nil {
			return nil, err
		}
		sc.GlyphStyle = glyph
		thumbs = []plot.Thumbnailer{sc}
	}
	return thumbs, nil
}

// keyGap is the space between the plot and its key.
var keyGap = 0.4 * vg.Centimeter

// drawWithKey draws p on c with key to the right of the plot, its top
// level with the top of the data area.
func drawWithKey(c draw.Canvas, p *plot.Plot, key plot.Legend) error {
	key.TextStyle = p.Legend.TextStyle
	key.ThumbnailWidth = vg.Points(28)
	key.Top, key.Left = true, true
	key.YPosition = draw.PosCenter
	avail := draw.Crop(c, figMargin, -figMargin, figMargin, -figMargin)
	kr := key.Rectangle(avail)
	kw := kr.Max.X - kr.Min.X + key.TextStyle.Width(" ")
	pc := avail
	pc.Max.X -= kw + keyGap
	if pc.Max.X-pc.Min.X < 3*vg.Centimeter {
		return errors.New("figure too narrow for the plot and its key: shorten the series names or widen the figure")
	}
	dc := p.DataCanvas(pc)
	if dc.Max.X <= dc.Min.X || dc.Max.Y <= dc.Min.Y {
		return errors.New("figure too small for the plot")
	}
	p.Draw(pc)
	kc := avail
	kc.Min.X = pc.Max.X + keyGap
	kc.Max.Y = dc.Max.Y
	key.Draw(kc)
	return nil
}

// decadeTicks marks a logarithmic axis with labelled powers of ten and
// unlabelled multiples 2..9 between them; each power of ten is computed
// directly, so labels read 1e-05 rather than 9.99e-06.
type decadeTicks struct{}

// Ticks implements plot.Ticker.
func (decadeTicks) Ticks(min, max float64) []plot.Tick {
	var ticks []plot.Tick
	lo, hi := int(math.Floor(math.Log10(min))), int(math.Ceil(math.Log10(max)))
	for e := lo; e <= hi; e++ {
		v := math.Pow10(e)
		label := "1e" + strconv.Itoa(e)
		if -3 <= e && e <= 3 {
			label = strconv.FormatFloat(v, 'f', -1, 64)
		}
		ticks = append(ticks, plot.Tick{Value: v, Label: label})
		for m := 2; m < 10 && e < hi; m++ {
			ticks = append(ticks, plot.Tick{Value: float64(m) * v})
		}
	}
	return ticks
}

// integerTicks labels an axis of counts at whole numbers only: every whole
// number on a short axis (up to integerTicksAll units), otherwise the
// default ticks with the non-integer labels left out.
type integerTicks struct{}

const integerTicksAll = 12

// integerTicksLabelled is the most labelled ticks of a long count axis.
const integerTicksLabelled = 8

// Ticks implements plot.Ticker.
func (integerTicks) Ticks(min, max float64) []plot.Tick {
	var out []plot.Tick
	if max-min <= integerTicksAll {
		for v := math.Ceil(min) + 0; v <= max; v++ { // + 0 turns -0 into 0
			out = append(out, plot.Tick{Value: v, Label: strconv.FormatFloat(v, 'f', -1, 64)})
		}
		return out
	}
	// Labels every step of 1, 2 or 5 times a power of ten, the smallest
	// that leaves at most integerTicksLabelled of them, and unlabelled
	// ticks at the whole numbers between, thinned to steps of step/5 or
	// step/2 (common practice for axis ticks).
	step := 1.0
	for k := 0; (max-min)/step > integerTicksLabelled; k++ {
		step = []float64{1, 2, 5}[k%3] * math.Pow(10, float64(k/3))
	}
	minor := step / 5
	if math.Mod(step, 5) != 0 {
		minor = step / 2
	}
	minor = math.Max(1, minor)
	for v := math.Ceil(min/minor)*minor + 0; v <= max; v += minor {
		t := plot.Tick{Value: v}
		if math.Mod(v, step) == 0 {
			t.Label = strconv.FormatFloat(v, 'f', -1, 64)
		}
		out = append(out, t)
	}
	return out
}
