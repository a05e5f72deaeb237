package verification

import (
	"bytes"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"mixwell/atomicfile"
	"path/filepath"
	"strconv"
	"strings"
	"text/tabwriter"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/plotutil"
	"gonum.org/v1/plot/vg"
)

// This file turns a Study into text, JSON and pictures. It only reads the
// Study it is given.

// WriteJSON writes s to w as indented JSON with the keys tagged on Study,
// followed by a newline. Map keys come out sorted, so equal studies give
// equal bytes. JSON has no NaN or infinity: such values (a rate computed
// from a zero error, for example) are written as null.
func WriteJSON(w io.Writer, s *Study) error {
	b, err := json.MarshalIndent(newStudyJSON(s), "", "  ")
	if err != nil {
		return fmt.Errorf("verification: encoding study as JSON: %w", err)
	}
	b = append(b, '\n')
	_, err = w.Write(b)
	return err
}

// studyJSON mirrors Study field for field with the same JSON keys; only the
// number type differs, so that non-finite values become null instead of
// failing the whole encoding. TestStudyJSONMirrorsStudy keeps the two in
// step.
type studyJSON struct {
	Problem   string                 `json:"problem"`
	Variant   string                 `json:"variant,omitempty"`
	Degree    int                    `json:"degree"`
	Mesh      string                 `json:"mesh"`
	H         []jsonFloat            `json:"h"`
	Unknowns  []int                  `json:"unknowns"`
	Errors    map[string][]jsonFloat `json:"errors"`
	Rates     map[string]jsonFloat   `json:"rates"`
	Expected  map[string]jsonFloat   `json:"expected"`
	PairRates map[string][]jsonFloat `json:"pair_rates"`
	Residuals []jsonFloat            `json:"residuals"`

	Flavour      string      `json:"flavour,omitempty"`
	Species      int         `json:"species,omitempty"`
	S            jsonFloat   `json:"S,omitempty"`
	Beta         jsonFloat   `json:"beta,omitempty"`
	Formulation  string      `json:"formulation,omitempty"`
	StefanWall   bool        `json:"stefan_wall,omitempty"`
	Method       string      `json:"method,omitempty"`
	Iterations   []int       `json:"iterations,omitempty"`
	Conservation []jsonFloat `json:"conservation,omitempty"`
	// ConservationLast mirrors Study.ConservationLast.
	ConservationLast []jsonFloat `json:"conservation_last_species,omitempty"`
	MassAverage      []jsonFloat `json:"mass_average,omitempty"`
}

// jsonFloat is a float64 that encodes NaN and ±Inf as null.
type jsonFloat float64

func (f jsonFloat) MarshalJSON() ([]byte, error) {
	v := float64(f)
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return []byte("null"), nil
	}
	return json.Marshal(v)
}

func newStudyJSON(s *Study) studyJSON {
	return studyJSON{
		Problem:   s.Problem,
		Variant:   s.Variant,
		Degree:    s.Degree,
		Mesh:      s.Mesh,
		H:         jsonFloats(s.H),
		Unknowns:  s.Unknowns,
		Errors:    jsonFloatSlices(s.Errors),
		Rates:     jsonFloatMap(s.Rates),
		Expected:  jsonFloatMap(s.Expected),
		PairRates: jsonFloatSlices(s.PairRates),
		Residuals: jsonFloats(s.Residuals),

		Flavour:          s.Flavour,
		Species:          s.Species,
		S:                jsonFloat(s.S),
		Beta:             jsonFloat(s.Beta),
		Formulation:      s.Formulation,
		StefanWall:       s.StefanWall,
		Method:           s.Method,
		Iterations:       s.Iterations,
		Conservation:     jsonFloats(s.Conservation),
		ConservationLast: jsonFloats(s.ConservationLast),
		MassAverage:      jsonFloats(s.MassAverage),
	}
}

func jsonFloats(v []float64) []jsonFloat {
	if v == nil {
		return nil
	}
	out := make([]jsonFloat, len(v))
	for i, x := range v {
		out[i] = jsonFloat(x)
	}
	return out
}

func jsonFloatMap(m map[string]float64) map[string]jsonFloat {
	if m == nil {
		return nil
	}
	out := make(map[string]jsonFloat, len(m))
	for k, x := range m {
		out[k] = jsonFloat(x)
	}
	return out
}

func jsonFloatSlices(m map[string][]float64) map[string][]jsonFloat {
	if m == nil {
		return nil
	}
	out := make(map[string][]jsonFloat, len(m))
	for k, v := range m {
		out[k] = jsonFloats(v)
	}
	return out
}

// WriteTable writes s to w as an aligned plain-text table: a title line, then
// one row per level with the mesh size h, the number of unknowns and, for
// every norm, the error and the observed rate against the previous level,
// then the relative residual of the linear solve when the study has one per
// level. A last row gives the rates theory expects. A rate that cannot be
// computed (first level, or a zero error) is shown as "-".
func WriteTable(w io.Writer, s *Study) error {
	title := "problem " + s.Problem
	if s.Variant != "" {
		title += " (" + s.Variant + ")"
	}
	title += fmt.Sprintf(", degree %d", s.Degree)
	if s.Mesh != "" {
		title += ", " + s.Mesh + " mesh"
	}
	if _, err := fmt.Fprintln(w, title); err != nil {
		return err
	}

	norms := s.Norms()
	withResiduals := len(s.Residuals) == len(s.H) && len(s.H) > 0
	var buf bytes.Buffer
	tw := tabwriter.NewWriter(&buf, 0, 0, 2, ' ', tabwriter.AlignRight)

	row := []string{"level", "h", "unknowns"}
	for _, n := range norms {
		row = append(row, n+" error", "rate")
	}
	if withResiduals {
		row = append(row, "residual")
	}
	writeRow(tw, row)

	for l := range s.H {
		row = append(row[:0], fmt.Sprint(l), fmt.Sprintf("%.4g", s.H[l]), "-")
		if l < len(s.Unknowns) {
			row[2] = fmt.Sprint(s.Unknowns[l])
		}
		for _, n := range norms {
			e := s.Errors[n]
			if l < len(e) {
				row = append(row, fmt.Sprintf("%.3e", e[l]))
			} else {
				row = append(row, "-")
			}
			row = append(row, formatRate(pairRate(s, n, l)))
		}
		if withResiduals {
			row = append(row, fmt.Sprintf("%.1e", s.Residuals[l]))
		}
		writeRow(tw, row)
	}

	row = append(row[:0], "expected", "", "")
	for _, n := range norms {
		r, ok := s.Expected[n]
		if !ok {
			r = math.NaN()
		}
		row = append(row, "", formatRate(r))
	}
	if withResiduals {
		row = append(row, "")
	}
	writeRow(tw, row)
	if err := tw.Flush(); err != nil {
		return err
	}
	// Drop the padding of empty trailing cells.
	out := make([]byte, 0, buf.Len())
	for line := range bytes.Lines(buf.Bytes()) {
		out = append(out, bytes.TrimRight(line, " \n")...)
		out = append(out, '\n')
	}
	_, err := w.Write(out)
	return err
}

// writeRow writes cells terminated by tabs, as tabwriter wants for right
// alignment of the last column too. Errors surface at Flush.
func writeRow(w io.Writer, cells []string) {
	io.WriteString(w, strings.Join(cells, "\t")+"\t\n")
}

// pairRate returns the observed rate of norm between levels l-1 and l, or NaN
// for the first level. It uses PairRates when present and computes the rate
// from H and Errors otherwise.
func pairRate(s *Study, norm string, l int) float64 {
	if l == 0 {
		return math.NaN()
	}
	if r := s.PairRates[norm]; l-1 < len(r) {
		return r[l-1]
	}
	e := s.Errors[norm]
	if l >= len(e) || l >= len(s.H) {
		return math.NaN()
	}
	return ObservedRate(e[l-1], e[l], s.H[l-1], s.H[l])
}

func formatRate(r float64) string {
	if math.IsNaN(r) || math.IsInf(r, 0) {
		return "-"
	}
	return fmt.Sprintf("%.2f", r)
}

// PlotFormat returns the image format, "png" or "svg", that WritePlot uses
// for path, chosen by its extension (in any letter case). Other extensions
// are an error naming the allowed ones.
func PlotFormat(path string) (string, error) {
	switch ext := strings.ToLower(filepath.Ext(path)); ext {
	case ".png", ".svg":
		return ext[1:], nil
	default:
		return "", fmt.Errorf("verification: plot file %q must end in .png or .svg", path)
	}
}

// WritePlot draws the errors of s against the mesh size h on log–log axes,
// one line with markers per norm and a legend giving the observed and the
// expected rate, and writes the picture to path as PNG or SVG according to
// its extension (see PlotFormat).
//
// Points with a non-positive or non-finite h or error are left out, since
// a logarithmic axis cannot show them; it is an error only when no point at
// all is left. The file is written atomically: the picture goes to a
// temporary file in the same directory, which is then renamed to path, so
// path never holds a partial picture.
func WritePlot(path string, s *Study) error {
	format, err := PlotFormat(path)
	if err != nil {
		return err
	}

	p := plot.New()
	p.Title.Text = "Convergence: " + s.Problem
	if s.Variant != "" {
		p.Title.Text += " (" + s.Variant + ")"
	}
	p.Title.Text += fmt.Sprintf(", degree %d", s.Degree)
	if s.Mesh != "" {
		p.Title.Text += ", " + s.Mesh + " mesh"
	}
	p.X.Label.Text = "mesh size h"
	p.Y.Label.Text = "error"
	p.X.Scale = plot.LogScale{}
	p.Y.Scale = plot.LogScale{}
	// Errors fall as h falls, so the lines run from lower left to upper
	// right and the lower right corner is free for the legend.
	p.Legend.Top = false
	p.Legend.Left = false
	p.Legend.XOffs = -0.3 * vg.Centimeter
	p.Legend.YOffs = 0.3 * vg.Centimeter

	xmin, xmax := math.Inf(1), math.Inf(-1)
	ymin, ymax := math.Inf(1), math.Inf(-1)
	var hTicks []plot.Tick
	seenH := map[float64]bool{}
	drawn := 0
	for i, name := range s.Norms() {
		var pts plotter.XYs
		for l, e := range s.Errors[name] {
			if l >= len(s.H) || !positiveFinite(s.H[l]) || !positiveFinite(e) {
				continue
			}
			h := s.H[l]
			pts = append(pts, plotter.XY{X: h, Y: e})
			xmin, xmax = math.Min(xmin, h), math.Max(xmax, h)
			ymin, ymax = math.Min(ymin, e), math.Max(ymax, e)
			if !seenH[h] {
				seenH[h] = true
				hTicks = append(hTicks, plot.Tick{Value: h, Label: fmt.Sprintf("%.3g", h)})
			}
		}
		if len(pts) == 0 {
			continue
		}
		line, marks, err := plotter.NewLinePoints(pts)
		if err != nil {
			return fmt.Errorf("verification: plotting %s: %w", name, err)
		}
		line.Color = plotutil.Color(i)
		marks.Color = plotutil.Color(i)
		marks.Shape = plotutil.Shape(i)
		p.Add(line, marks)
		p.Legend.Add(legendLabel(s, name), line, marks)
		drawn++
	}
	if drawn == 0 {
		return fmt.Errorf("verification: nothing to plot for %q: no norm has a positive error", path)
	}

	// Label the x axis at the mesh sizes themselves (a study rarely spans
	// a decade of h), with a little room either side; widen the y axis to
	// whole decades so that it always carries labelled powers of ten.
	p.X.Tick.Marker = plot.ConstantTicks(hTicks)
	p.X.Min, p.X.Max = xmin/1.25, xmax*1.25
	p.Y.Tick.Marker = decadeTicks{}
	p.Y.Min = math.Pow(10, math.Floor(math.Log10(ymin)))
	p.Y.Max = math.Pow(10, math.Ceil(math.Log10(ymax)))
	if p.Y.Max <= p.Y.Min {
		p.Y.Max = 10 * p.Y.Min
	}

	wt, err := p.WriterTo(16*vg.Centimeter, 12*vg.Centimeter, format)
	if err != nil {
		return fmt.Errorf("verification: drawing %q: %w", path, err)
	}
	return atomicfile.Write(path, func(w io.Writer) error {
		_, err := wt.WriteTo(w)
		return err
	})
}

// decadeTicks marks a logarithmic axis with labelled powers of ten and
// unlabelled multiples 2..9 between them. Unlike plot.LogTicks it computes
// every power of ten directly, so labels read 1e-05, not 9.99...e-06.
type decadeTicks struct{}

func (decadeTicks) Ticks(min, max float64) []plot.Tick {
	var ticks []plot.Tick
	lo, hi := int(math.Floor(math.Log10(min))), int(math.Ceil(math.Log10(max)))
	for e := lo; e <= hi; e++ {
		v := math.Pow10(e)
		label := fmt.Sprintf("1e%d", e)
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

func positiveFinite(x float64) bool { return x > 0 && !math.IsInf(x, 1) }

func legendLabel(s *Study, name string) string {
	label := name
	if r, ok := s.Rates[name]; ok && !math.IsNaN(r) && !math.IsInf(r, 0) {
		label += fmt.Sprintf(": rate %.2f", r)
		if e, ok := s.Expected[name]; ok {
			label += fmt.Sprintf(" (expected %g)", e)
		}
	}
	return label
}
