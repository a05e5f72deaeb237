package plotting

import (
	"fmt"
	"image/color"
	"io"
	"mixwell/atomicfile"
	"path/filepath"
	"strings"

	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgsvg"
)

// This file holds what every figure shares: the choice of format, the
// canvas, the size limits and the atomic write.

// dpi is the resolution of PNG output; at 96 dots per inch a pixel of the
// PNG is a CSS pixel, the unit of SVG sizes.
const dpi = 96

// Size limits of a figure in pixels. Below the minimum there is no room for
// the axes; above the maximum a PNG would take unreasonable memory.
const (
	minWidth, minHeight = 200, 150
	maxSide             = 8000
)

// Format returns the image format, "png" or "svg", in which the functions
// of this package write path, chosen by its extension in any letter case.
// Other extensions are an error naming the path.
func Format(path string) (string, error) {
	switch ext := strings.ToLower(filepath.Ext(path)); ext {
	case ".png", ".svg":
		return ext[1:], nil
	default:
		return "", fmt.Errorf("plotting: %q: file name must end in .png or .svg", path)
	}
}

// pixels converts a size in pixels to a vg length at the package's dpi.
func pixels(n int) vg.Length { return vg.Length(n) * vg.Inch / dpi }

// figureSize returns w×h, or the defaults for a zero size, or an error when
// the size is out of bounds.
func figureSize(w, h, defW, defH int) (int, int, error) {
	if w == 0 {
		w = defW
	}
	if h == 0 {
		h = defH
	}
	if w < minWidth || h < minHeight || w > maxSide || h > maxSide {
		return 0, 0, fmt.Errorf("figure size %d×%d pixels out of range: want at least %d×%d and at most %d on a side",
			w, h, minWidth, minHeight, maxSide)
	}
	return w, h, nil
}

// newCanvas returns an empty white canvas of w×h pixels for format.
func newCanvas(format string, w, h int) vg.CanvasWriterTo {
	var c vg.CanvasWriterTo
	switch format {
	case "png":
		c = vgimg.PngCanvas{Canvas: vgimg.NewWith(vgimg.UseWH(pixels(w), pixels(h)), vgimg.UseDPI(dpi))}
	case "svg":
		c = vgsvg.New(pixels(w), pixels(h))
	default:
		panic("plotting: unknown format " + format)
	}
	dc := draw.New(c)
	dc.SetColor(color.White)
	dc.Fill(dc.Rectangle.Path())
	return c
}

// render checks path and the figure size, draws a figure with drawFig on a
// new canvas and writes it atomically to path. Errors are prefixed with the
// function name fn and the path.
func render(fn, path string, w, h, defW, defH int, drawFig func(c draw.Canvas) error) error {
	format, err := Format(path)
	if err != nil {
		return err
	}
	w, h, err = figureSize(w, h, defW, defH)
	if err != nil {
		return fmt.Errorf("plotting: %s %q: %w", fn, path, err)
	}
	c := newCanvas(format, w, h)
	if err := drawFig(draw.New(c)); err != nil {
		return fmt.Errorf("plotting: %s %q: %w", fn, path, err)
	}
	return atomicfile.Write(path, func(out io.Writer) error {
		_, err := c.WriteTo(out)
		return err
	})
}
