package plotting

import (
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"gonum.org/v1/plot/plotter"
)

func TestLinePlotsWrite(t *testing.T) {
	nan, inf := math.NaN(), math.Inf(1)
	s := []float64{0, 0.25, 0.5, 0.75, 1}
	its := []int{0, 1, 2, 3, 4}
	for _, tc := range []struct {
		name string
		draw func(path string) error
		w, h int
	}{
		{"profiles default size", func(p string) error {
			return Profiles(p, s, []Series{
				{Name: "N2", Values: []float64{0.78, 0.7, 0.6, 0.5, 0.4}},
				{Name: "O2", Values: []float64{0.21, 0.2, nan, 0.15, 0.1}},
				{Values: []float64{nan, 0.1, nan, inf, nan}}, // only isolated points, no name
			}, LineOptions{Title: "probe", XLabel: "distance (m)", YLabel: "mole fraction"})
		}, 800, 500},
		{"profiles constant series", func(p string) error {
			return Profiles(p, s, []Series{{Name: "Ar", Values: []float64{0.01, 0.01, 0.01, 0.01, 0.01}}}, LineOptions{Width: 300, Height: 200})
		}, 300, 200},
		{"profiles non-finite abscissa", func(p string) error {
			return Profiles(p, []float64{0, nan, 2, math.Inf(-1), 4}, []Series{{Name: "x", Values: []float64{1, 2, 3, 4, 5}}}, LineOptions{})
		}, 800, 500},
		{"history with zeros and NaN", func(p string) error {
			return History(p, its, []Series{
				{Name: "residual", Values: []float64{1, 1e-2, 1e-6, 1e-13, 0}},
				{Name: "change", Values: []float64{nan, 0.3, 1e-3, -1, 1e-12}},
				{Name: "mass-average defect", Values: []float64{0, 0, 0, 0, 0}}, // nothing positive: no line, no error
			}, LineOptions{Title: "Newton", Width: 640, Height: 480})
		}, 640, 480},
		{"history one point", func(p string) error {
			return History(p, []int{3}, []Series{{Name: "residual", Values: []float64{1e-8}}}, LineOptions{})
		}, 800, 500},
		{"history long run", func(p string) error {
			n := 60
			it, v := make([]int, n), make([]float64, n)
			for k := range n {
				it[k], v[k] = k, math.Pow(0.7, float64(k))
			}
			return History(p, it, []Series{{Name: "residual", Values: v}}, LineOptions{})
		}, 800, 500},
	} {
		t.Run(tc.name, func(t *testing.T) {
			path := filepath.Join(t.TempDir(), "l.png")
			if err := tc.draw(path); err != nil {
				t.Fatal(err)
			}
			img := readPNG(t, path)
			if b := img.Bounds(); b.Dx() != tc.w || b.Dy() != tc.h {
				t.Errorf("size %d×%d, want %d×%d", b.Dx(), b.Dy(), tc.w, tc.h)
			}
		})
	}
}

func TestLinePlotErrors(t *testing.T) {
	nan := math.NaN()
	one := []Series{{Name: "a", Values: []float64{1, 2}}}
	for _, tc := range []struct {
		name   string
		draw   func(path string) error
		wantIn []string
	}{
		{"profiles empty abscissa", func(p string) error { return Profiles(p, nil, one, LineOptions{}) }, []string{"Profiles", "abscissa s is empty"}},
		{"profiles no series", func(p string) error { return Profiles(p, []float64{1, 2}, nil, LineOptions{}) }, []string{"series are empty"}},
		{"profiles length mismatch", func(p string) error {
			return Profiles(p, []float64{1, 2, 3}, one, LineOptions{})
		}, []string{`series 0 ("a") has 2 values`, "(3)"}},
		{"profiles nothing finite", func(p string) error {
			return Profiles(p, []float64{1, 2}, []Series{{Name: "a", Values: []float64{nan, nan}}}, LineOptions{})
		}, []string{"no series has a finite point"}},
		{"history empty iterations", func(p string) error { return History(p, nil, one, LineOptions{}) }, []string{"History", "iterations are empty"}},
		{"history no series", func(p string) error { return History(p, []int{1}, nil, LineOptions{}) }, []string{"series are empty"}},
		{"history nothing positive", func(p string) error {
			return History(p, []int{1, 2}, []Series{{Name: "r", Values: []float64{0, -1}}}, LineOptions{})
		}, []string{"no positive finite value"}},
		{"bad extension", func(p string) error { return History(p+".pdf", []int{1, 2}, one, LineOptions{}) }, []string{".pdf", ".png or .svg"}},
		{"too narrow for key", func(p string) error {
			return Profiles(p, []float64{1, 2}, []Series{{Name: strings.Repeat("very long name ", 20), Values: []float64{1, 2}}}, LineOptions{Width: 300})
		}, []string{"too narrow"}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			dir := t.TempDir()
			err := tc.draw(filepath.Join(dir, "l.png"))
			if err == nil {
				t.Fatal("no error")
			}
			for _, s := range tc.wantIn {
				if !strings.Contains(err.Error(), s) {
					t.Errorf("error %q does not contain %q", err, s)
				}
			}
			if ents, _ := os.ReadDir(dir); len(ents) != 0 {
				t.Errorf("failed call left %q", ents[0].Name())
			}
		})
	}
}

func TestFiniteRuns(t *testing.T) {
	nan := math.NaN()
	x := []float64{0, 1, 2, 3, 4, 5}
	for _, tc := range []struct {
		name     string
		y        []float64
		positive bool
		want     [][]float64 // y values of each run
	}{
		{"all finite", []float64{1, 2, 3, 4, 5, 6}, false, [][]float64{{1, 2, 3, 4, 5, 6}}},
		{"NaN breaks", []float64{1, nan, 3, 4, nan, 6}, false, [][]float64{{1}, {3, 4}, {6}}},
		{"Inf breaks", []float64{math.Inf(1), 2, 3, math.Inf(-1), 5, 6}, false, [][]float64{{2, 3}, {5, 6}}},
		{"negative kept on linear axis", []float64{-1, 0, 1, 2, 3, 4}, false, [][]float64{{-1, 0, 1, 2, 3, 4}}},
		{"log axis drops and joins", []float64{1, 0, 1e-3, -2, nan, 1e-9}, true, [][]float64{{1, 1e-3, 1e-9}}},
		{"log axis nothing left", []float64{0, -1, nan, 0, 0, 0}, true, nil},
	} {
		runs := finiteRuns(x, tc.y, tc.positive)
		if len(runs) != len(tc.want) {
			t.Errorf("%s: %d runs, want %d", tc.name, len(runs), len(tc.want))
			continue
		}
		for r := range runs {
			if !sameY(runs[r], tc.want[r]) {
				t.Errorf("%s: run %d = %v, want y %v", tc.name, r, runs[r], tc.want[r])
			}
		}
	}
}

func sameY(run plotter.XYs, y []float64) bool {
	if len(run) != len(y) {
		return false
	}
	for k := range run {
		if run[k].Y != y[k] { // exact: the values are copied, not computed
			return false
		}
	}
	return true
}

func TestTickers(t *testing.T) {
	labels := func(min, max float64, decade bool) []string {
		var out []string
		var ticks = integerTicks{}.Ticks(min, max)
		if decade {
			ticks = decadeTicks{}.Ticks(min, max)
		}
		for _, tk := range ticks {
			if tk.Label != "" {
				out = append(out, tk.Label)
			}
		}
		return out
	}
	for _, tc := range []struct {
		name     string
		min, max float64
		decade   bool
		want     string
	}{
		{"decades", 1e-6, 10, true, "1e-6 1e-5 1e-4 0.001 0.01 0.1 1 10"},
		{"short count axis: every integer", 0, 7, false, "0 1 2 3 4 5 6 7"},
		{"fractional ends", -0.4, 3.6, false, "0 1 2 3"},
		{"long count axis: steps of 1, 2 or 5 times a power of ten", 0, 59, false, "0 10 20 30 40 50"},
		{"twenty iterations", 1, 19, false, "5 10 15"},
		{"hundreds", 3, 1234, false, "200 400 600 800 1000 1200"},
	} {
		if got := strings.Join(labels(tc.min, tc.max, tc.decade), " "); got != tc.want {
			t.Errorf("%s: labels %q, want %q", tc.name, got, tc.want)
		}
	}
}
