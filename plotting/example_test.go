package plotting_test

import (
	"fmt"
	"image/png"
	"math"
	"os"
	"path/filepath"

	"mixwell/plotting"
)

func ExampleColourMap() {
	dir, err := os.MkdirTemp("", "plotting-example-")
	if err != nil {
		fmt.Println(err)
		return
	}
	defer os.RemoveAll(dir)

	// A temperature field on the unit square, sampled at 21×21 points;
	// the points inside a round obstacle are outside the domain (NaN).
	const n = 21
	g := plotting.Grid{NX: n, NY: n, DX: 1.0 / (n - 1), DY: 1.0 / (n - 1), Values: make([]float64, n*n)}
	for j := range n {
		for i := range n {
			x, y := float64(i)*g.DX, float64(j)*g.DY
			v := 300 + 50*x*y
			if math.Hypot(x-0.5, y-0.5) < 0.2 {
				v = math.NaN()
			}
			g.Values[j*n+i] = v
		}
	}
	path := filepath.Join(dir, "temperature.png")
	err = plotting.ColourMap(path, g, plotting.MapOptions{
		Title:      "Temperature",
		Unit:       "T (K)",
		LengthUnit: "m",
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	fi, err := os.Stat(path)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println("ok, file size over 1 kB:", fi.Size() > 1000)
	// Output: ok, file size over 1 kB: true
}

func ExampleHistory() {
	dir, err := os.MkdirTemp("", "plotting-example-")
	if err != nil {
		fmt.Println(err)
		return
	}
	defer os.RemoveAll(dir)

	// A quadratically converging Newton iteration. The exact zero at the
	// end cannot be shown on a logarithmic axis and is left out.
	path := filepath.Join(dir, "history.png")
	err = plotting.History(path, []int{0, 1, 2, 3, 4, 5},
		[]plotting.Series{
			{Name: "residual", Values: []float64{1, 1e-1, 1e-3, 1e-7, 1e-14, 0}},
			{Name: "change", Values: []float64{math.NaN(), 5e-1, 2e-2, 3e-5, 1e-10, 1e-16}},
		},
		plotting.LineOptions{Title: "Newton iteration", YLabel: "norm"})
	if err != nil {
		fmt.Println(err)
		return
	}
	f, err := os.Open(path)
	if err != nil {
		fmt.Println(err)
		return
	}
	defer f.Close()
	cfg, err := png.DecodeConfig(f)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%d×%d pixels\n", cfg.Width, cfg.Height)
	// Output: 800×500 pixels
}

func ExampleFormat() {
	for _, p := range []string{"field.png", "FIELD.SVG", "field.pdf"} {
		f, err := plotting.Format(p)
		fmt.Printf("%q %v\n", f, err)
	}
	// Output:
	// "png" <nil>
	// "svg" <nil>
	// "" plotting: "field.pdf": file name must end in .png or .svg
}
