package plotting

import (
	"errors"
	"fmt"
	"image"
	"image/color"
	"math"
	"strconv"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// MapOptions describe a colour map figure. The zero value is usable: no
// title, unlabelled units, automatic colour range and 800×600 pixels.
type MapOptions struct {
	// Title is printed above the map.
	Title string

	// Unit labels the colour bar, for example "temperature (K)" or
	// "mole fraction".
	Unit string

	// LengthUnit is the unit of the grid coordinates; the axes read
	// "x (LengthUnit)" and "y (LengthUnit)", or just "x" and "y" when it is
	// empty.
	LengthUnit string

	// Min and Max fix the colour range when Min < Max: Min gets the darkest
	// colour, Max the lightest, and values outside the range the colour of
	// the nearer end. When Min == Max (the zero value) the range is that of
	// the finite values of the field. Min > Max is an error.
	Min, Max float64

	// Width and Height are the size of the picture in pixels; zero means
	// 800 and 600.
	Width, Height int
}

// Default map size in pixels.
const defaultMapWidth, defaultMapHeight = 800, 600

// ColourMap draws the scalar field g as a colour map with a colour bar, a
// title and labelled axes at equal scales, and writes it to path as PNG or
// SVG according to the extension (see Format). NaN and ±Inf samples are
// drawn blank. A constant field is drawn in the middle colour of the map
// with a colour bar labelled only at its value.
//
// It is an error when g is empty or malformed, has no finite value, or when
// opt is out of range; the error names the path and the offending input.
func ColourMap(path string, g Grid, opt MapOptions) error {
	return render("ColourMap", path, opt.Width, opt.Height, defaultMapWidth, defaultMapHeight,
		func(c draw.Canvas) error {
			_, err := drawMap(c, g, nil, opt)
			return err
		})
}

// VectorMap draws magnitude as ColourMap does and overlays the vector field
// (vx, vy), sampled on its own regular grid (usually coarser than magnitude),
// as arrows centred on their sample points. Arrow lengths are proportional
// to the vector length, the longest being 0.9 times the smaller spacing of
// the vector grid; a sample is left without arrow when either component is
// not finite or the arrow would be shorter than 2.5 points. Arrows are
// black with a thin white rim so that they show on dark and light colours.
//
// vx and vy must be non-empty grids with the same samples at the same
// points. A field that is zero everywhere draws no arrows and is no error.
func VectorMap(path string, magnitude, vx, vy Grid, opt MapOptions) error {
	return render("VectorMap", path, opt.Width, opt.Height, defaultMapWidth, defaultMapHeight,
		func(c draw.Canvas) error {
			a, err := newArrowField(vx, vy)
			if err != nil {
				return err
			}
			_, err = drawMap(c, magnitude, a, opt)
			return err
		})
}

// mapLayout records where drawMap put things, for tests: the data area on
// the canvas and the data coordinates at its edges, the colour bar, and the
// values at the bottom and top of the colour bar, which are also the values
// mapped to Estuary(0) and Estuary(1).
type mapLayout struct {
	data                   vg.Rectangle
	xmin, xmax, ymin, ymax float64
	bar                    vg.Rectangle
	lo, hi                 float64
}

// Layout lengths of a map figure, our own choice.
var (
	figMargin  = 0.25 * vg.Centimeter // around the whole figure (also line plots)
	barGap     = 0.45 * vg.Centimeter // between the data area and the bar
	barWidth   = 0.45 * vg.Centimeter
	barTickLen = 0.12 * vg.Centimeter
	barLabPad  = 0.10 * vg.Centimeter // between ticks and their labels
	barUnitPad = 0.25 * vg.Centimeter // between tick labels and the unit
)

// colourRange is the range of values spread over the colour map.
type colourRange struct {
	lo, hi   float64 // lo ↦ Estuary(0), hi ↦ Estuary(1); lo < hi
	constant bool    // the field is constant, equal to (lo+hi)/2
	value    float64 // the constant value when constant
}

// newColourRange returns the colour range for g under opt.
func newColourRange(g Grid, opt MapOptions) (colourRange, error) {
	if math.IsNaN(opt.Min) || math.IsNaN(opt.Max) || math.IsInf(opt.Min, 0) || math.IsInf(opt.Max, 0) {
		return colourRange{}, fmt.Errorf("colour range [%g, %g] is not finite", opt.Min, opt.Max)
	}
	if opt.Min > opt.Max {
		return colourRange{}, fmt.Errorf("colour range has Min %g > Max %g", opt.Min, opt.Max)
	}
	lo, hi := opt.Min, opt.Max
	if lo == hi {
		var ok bool
		lo, hi, ok = g.finiteRange()
		if !ok {
			return colourRange{}, errors.New("field has no finite value to draw")
		}
	}
	if math.IsInf(hi-lo, 0) {
		return colourRange{}, fmt.Errorf("value range [%g, %g] is too wide to draw", lo, hi)
	}
	// A range below 1e-12 relative is rounding noise: draw it as constant
	// rather than with tick labels that differ in the 13th digit.
	const relFlat = 1e-12
	if hi-lo <= relFlat*math.Max(math.Abs(lo), math.Abs(hi)) {
		v := lo
		d := math.Abs(v) / 100
		if !(v+d > v-d) {
			d = 1
		}
		return colourRange{lo: v - d, hi: v + d, constant: true, value: v}, nil
	}
	return colourRange{lo: lo, hi: hi}, nil
}

// at returns the colour of value v: transparent for NaN and ±Inf, the end
// colours beyond the range.
func (r colourRange) at(v float64) color.NRGBA {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return color.NRGBA{}
	}
	// Halving first keeps hi - lo finite for any finite lo and hi.
	return Estuary((0.5*v - 0.5*r.lo) / (0.5*r.hi - 0.5*r.lo))
}

// ticks returns the ticks of the colour bar.
func (r colourRange) ticks() []plot.Tick {
	if r.constant {
		return []plot.Tick{{Value: r.value, Label: strconv.FormatFloat(r.value, 'g', 6, 64)}}
	}
	var out []plot.Tick
	for _, t := range (plot.DefaultTicks{}).Ticks(r.lo, r.hi) {
		if t.Value >= r.lo && t.Value <= r.hi {
			out = append(out, t)
		}
	}
	return out
}

// drawMap draws the colour map of g, with the arrows of a if a is not nil,
// on c.
func drawMap(c draw.Canvas, g Grid, a *arrowField, opt MapOptions) (mapLayout, error) {
	if err := g.check("field grid"); err != nil {
		return mapLayout{}, err
	}
	cr, err := newColourRange(g, opt)
	if err != nil {
		return mapLayout{}, err
	}

	p := plot.New()
	p.Title.Text = opt.Title
	p.X.Label.Text = axisLabel("x", opt.LengthUnit)
	p.Y.Label.Text = axisLabel("y", opt.LengthUnit)
	xmin, xmax, ymin, ymax := g.extent()
	if a != nil {
		ax0, ax1, ay0, ay1 := a.vx.extent()
		xmin, xmax = math.Min(xmin, ax0), math.Max(xmax, ax1)
		ymin, ymax = math.Min(ymin, ay0), math.Max(ymax, ay1)
	}
	p.X.Min, p.X.Max, p.Y.Min, p.Y.Max = xmin, xmax, ymin, ymax
	cells := &cellImage{g: g, colours: cr}
	p.Add(cells)
	if a != nil {
		p.Add(a)
	}

	// The colour bar strip to the right of the plot.
	ticks := cr.ticks()
	tickSty := p.Y.Tick.Label
	tickSty.XAlign = draw.XLeft
	var labelW vg.Length
	for _, t := range ticks {
		if t.Label != "" {
			labelW = max(labelW, tickSty.Width(t.Label))
		}
	}
	unitSty := p.Y.Label.TextStyle
	strip := barGap + barWidth + barTickLen + barLabPad + labelW
	if opt.Unit != "" {
		strip += barUnitPad + unitSty.Height(opt.Unit)
	}

	avail := draw.Crop(c, figMargin, -figMargin, figMargin, -figMargin)
	mc := avail
	mc.Max.X -= strip
	if mc.Max.X-mc.Min.X < 2*vg.Centimeter || mc.Max.Y-mc.Min.Y < 2*vg.Centimeter {
		return mapLayout{}, errors.New("figure too small for the map and its colour bar")
	}

	// Equal scales: shrink the plot's canvas along the axis with room to
	// spare until a data unit is equally long on both axes. The axes take
	// a width that depends only on their ranges, so the data area shrinks
	// by what the canvas loses and this converges in a step or two; the
	// loop bound only guards against a pathological tick layout.
	for range 8 {
		dc := p.DataCanvas(mc)
		w, h := dc.Max.X-dc.Min.X, dc.Max.Y-dc.Min.Y
		if w <= 0 || h <= 0 {
			return mapLayout{}, errors.New("figure too small for the map and its colour bar")
		}
		s := math.Max((xmax-xmin)/float64(w), (ymax-ymin)/float64(h)) // data units per point
		sx := w - vg.Length((xmax-xmin)/s)
		sy := h - vg.Length((ymax-ymin)/s)
		mc.Max.X -= sx
		mc.Min.Y += sy / 2
		mc.Max.Y -= sy / 2
		if sx < 1e-3 && sy < 1e-3 {
			break
		}
	}
	// Centre plot and colour bar together.
	off := (avail.Max.X - strip - mc.Max.X) / 2
	mc.Min.X += off
	mc.Max.X += off

	dc := p.DataCanvas(mc)
	cells.kx = max(1, int(math.Ceil(float64((dc.Max.X-dc.Min.X).Dots(dpi))/float64(g.NX))))
	cells.ky = max(1, int(math.Ceil(float64((dc.Max.Y-dc.Min.Y).Dots(dpi))/float64(g.NY))))
	const maxImage = 4096 // pixels on a side of the cell image
	cells.kx = max(1, min(cells.kx, maxImage/g.NX))
	cells.ky = max(1, min(cells.ky, maxImage/g.NY))
	p.Draw(mc)

	bar := vg.Rectangle{
		Min: vg.Point{X: dc.Max.X + barGap, Y: dc.Min.Y},
		Max: vg.Point{X: dc.Max.X + barGap + barWidth, Y: dc.Max.Y},
	}
	drawColourBar(c, bar, cr, ticks, tickSty, labelW, unitSty, opt.Unit)

	return mapLayout{
		data: dc.Rectangle,
		xmin: xmin, xmax: xmax, ymin: ymin, ymax: ymax,
		bar: bar,
		lo:  cr.lo, hi: cr.hi,
	}, nil
}

// axisLabel returns "name (unit)", or name when unit is empty.
func axisLabel(name, unit string) string {
	if unit == "" {
		return name
	}
	return name + " (" + unit + ")"
}

// drawColourBar draws the colour bar in rect with ticks and their labels on
// its right, and the unit label, rotated, right of those.
func drawColourBar(c draw.Canvas, rect vg.Rectangle, cr colourRange, ticks []plot.Tick,
	tickSty text.Style, labelW vg.Length, unitSty text.Style, unit string) {
	const steps = 256
	img := image.NewNRGBA(image.Rect(0, 0, 1, steps))
	for k := range steps {
		img.SetNRGBA(0, steps-1-k, Estuary((float64(k)+0.5)/steps))
	}
	c.DrawImage(rect, img)

	line := draw.LineStyle{Color: color.Black, Width: vg.Points(0.5)}
	c.StrokeLines(line, []vg.Point{
		rect.Min, {X: rect.Max.X, Y: rect.Min.Y}, rect.Max, {X: rect.Min.X, Y: rect.Max.Y}, rect.Min,
	})

	h := rect.Max.Y - rect.Min.Y
	x := rect.Max.X
	descent := tickSty.FontExtents().Descent
	for _, t := range ticks {
		y := rect.Min.Y + vg.Length((t.Value-cr.lo)/(cr.hi-cr.lo))*h
		l := barTickLen
		if t.IsMinor() {
			l /= 2
		}
		c.StrokeLine2(line, x, y, x+l, y)
		if t.Label != "" {
			c.FillText(tickSty, vg.Point{X: x + barTickLen + barLabPad, Y: y + descent}, t.Label)
		}
	}
	if unit != "" {
		sty := unitSty
		sty.Rotation += math.Pi / 2
		ux := x + barTickLen + barLabPad + labelW + barUnitPad + unitSty.Height(unit) - unitSty.FontExtents().Descent
		c.FillText(sty, vg.Point{X: ux, Y: rect.Min.Y + h/2}, unit)
	}
}

// cellImage draws each sample of a grid as a flat DX×DY cell centred on its
// point. The picture is an image of kx×ky pixels per cell, so that the
// smoothing of the canvas when it scales the image only blurs about one
// output pixel at cell edges.
type cellImage struct {
	g       Grid
	colours colourRange
	kx, ky  int
}

var _ plot.Plotter = (*cellImage)(nil)

// Plot implements plot.Plotter.
func (ci *cellImage) Plot(c draw.Canvas, p *plot.Plot) {
	kx, ky := max(ci.kx, 1), max(ci.ky, 1)
	g := ci.g
	img := image.NewNRGBA(image.Rect(0, 0, g.NX*kx, g.NY*ky))
	for j := range g.NY {
		for i := range g.NX {
			col := ci.colours.at(g.Values[j*g.NX+i])
			// Image rows run from the top; grid rows from the bottom.
			y0 := (g.NY - 1 - j) * ky
			for y := y0; y < y0+ky; y++ {
				for x := i * kx; x < (i+1)*kx; x++ {
					img.SetNRGBA(x, y, col)
				}
			}
		}
	}
	trX, trY := p.Transforms(&c)
	xmin, xmax, ymin, ymax := g.extent()
	c.DrawImage(vg.Rectangle{
		Min: vg.Point{X: trX(xmin), Y: trY(ymin)},
		Max: vg.Point{X: trX(xmax), Y: trY(ymax)},
	}, img)
}

// arrowField draws a vector field as arrows centred on its sample points.
type arrowField struct {
	vx, vy Grid
	scale  float64 // data length of the arrow per unit of vector length; 0: no arrows
}

var _ plot.Plotter = (*arrowField)(nil)

func newArrowField(vx, vy Grid) (*arrowField, error) {
	if err := vx.check("vx grid"); err != nil {
		return nil, err
	}
	if err := vy.check("vy grid"); err != nil {
		return nil, err
	}
	if !sameLattice(vx, vy) {
		return nil, fmt.Errorf("vx grid (%d×%d at (%g, %g) step (%g, %g)) and vy grid (%d×%d at (%g, %g) step (%g, %g)) differ",
			vx.NX, vx.NY, vx.X0, vx.Y0, vx.DX, vx.DY, vy.NX, vy.NY, vy.X0, vy.Y0, vy.DX, vy.DY)
	}
	var vmax float64
	for k := range vx.Values {
		if l, ok := vectorLength(vx.Values[k], vy.Values[k]); ok {
			vmax = math.Max(vmax, l)
		}
	}
	a := &arrowField{vx: vx, vy: vy}
	if vmax > 0 {
		a.scale = 0.9 * math.Min(vx.DX, vx.DY) / vmax
	}
	return a, nil
}

// vectorLength returns the length of (x, y) and whether it is finite.
func vectorLength(x, y float64) (float64, bool) {
	l := math.Hypot(x, y)
	return l, !math.IsNaN(l) && !math.IsInf(l, 0) && !math.IsInf(x, 0) && !math.IsInf(y, 0)
}

// Arrow drawing lengths, our own choice.
var (
	arrowMinLen   = vg.Points(2.5) // shorter arrows would be all rim and head
	arrowWidth    = vg.Points(1)
	arrowRim      = vg.Points(0.7) // white rim either side
	arrowHeadMax  = vg.Points(6)
	arrowHeadFrac = 0.35 // head length as a fraction of the arrow, at most arrowHeadMax
	arrowHeadAsp  = 0.6  // head width over head length
)

// Plot implements plot.Plotter. All rims are drawn before all arrows, so
// that no rim covers a neighbouring arrow.
func (a *arrowField) Plot(c draw.Canvas, p *plot.Plot) {
	if a.scale == 0 {
		return
	}
	trX, trY := p.Transforms(&c)
	type arrow struct{ tail, back, tip, left, right vg.Point }
	var arrows []arrow
	g := a.vx
	for j := range g.NY {
		for i := range g.NX {
			k := j*g.NX + i
			ux, uy := a.vx.Values[k], a.vy.Values[k]
			if _, ok := vectorLength(ux, uy); !ok {
				continue
			}
			x, y := g.X0+float64(i)*g.DX, g.Y0+float64(j)*g.DY
			hx, hy := 0.5*a.scale*ux, 0.5*a.scale*uy
			tail := vg.Point{X: trX(x - hx), Y: trY(y - hy)}
			tip := vg.Point{X: trX(x + hx), Y: trY(y + hy)}
			d := tip.Sub(tail)
			l := vg.Length(math.Hypot(float64(d.X), float64(d.Y)))
			if l < arrowMinLen {
				continue
			}
			u := d.Scale(1 / l)                                 // unit direction
			n := vg.Point{X: -u.Y, Y: u.X}                      // unit normal
			hl := min(vg.Length(arrowHeadFrac)*l, arrowHeadMax) // head length
			back := tip.Sub(u.Scale(hl))
			hw := vg.Length(arrowHeadAsp) * hl / 2
			arrows = append(arrows, arrow{
				tail: tail, back: back, tip: tip,
				left: back.Add(n.Scale(hw)), right: back.Sub(n.Scale(hw)),
			})
		}
	}
	head := func(ar arrow) vg.Path {
		var pa vg.Path
		pa.Move(ar.tip)
		pa.Line(ar.left)
		pa.Line(ar.right)
		pa.Close()
		return pa
	}
	rim := draw.LineStyle{Color: color.White, Width: arrowWidth + 2*arrowRim}
	for _, ar := range arrows {
		c.StrokeLines(rim, []vg.Point{ar.tail, ar.back})
		c.SetLineStyle(draw.LineStyle{Color: color.White, Width: 2 * arrowRim})
		c.Stroke(head(ar))
	}
	shaft := draw.LineStyle{Color: color.Black, Width: arrowWidth}
	for _, ar := range arrows {
		c.StrokeLines(shaft, []vg.Point{ar.tail, ar.back})
		c.SetColor(color.Black)
		c.Fill(head(ar))
	}
}
