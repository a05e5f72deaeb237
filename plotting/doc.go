// Package plotting turns plain numbers into PNG and SVG figures with
// gonum/plot: colour maps of scalar fields sampled on a regular grid, the
// same with arrows for a vector field, line profiles along a probe line and
// the history of a nonlinear iteration on a logarithmic axis.
//
// The package knows nothing about meshes or finite elements. A
// finite-element field is first sampled onto a regular Grid by its owner;
// points of the grid outside the domain carry NaN and are drawn blank.
//
// # Conventions
//
// Grid values are stored row by row from the bottom: Values[j*NX+i] is the
// value at (X0 + i*DX, Y0 + j*DY). Each sample is drawn as a flat cell of
// size DX×DY centred on its point (nearest-sample display, no smoothing), so
// the picture extends half a cell beyond the outermost samples. Maps are
// drawn with equal scales on both axes: one length unit is as long on the x
// axis as on the y axis.
//
// Colours come from Estuary, a sequential colour map of this package whose
// Oklab lightness grows linearly from dark to light (see colour.go for its
// definition and sources), so that higher values always look lighter, also
// in greyscale print. Series in line plots get colours of equal Oklab
// lightness with hues a golden angle apart, and a dash pattern each.
//
// Non-finite numbers (NaN, ±Inf) never panic: in maps they are blank cells
// or missing arrows, in line plots they break the line, and on logarithmic
// axes non-positive values are dropped as well. Input that leaves nothing at
// all to draw is an error naming what is empty.
//
// # Files
//
// Every function writes one file whose format, PNG or SVG, is chosen by the
// extension of the path (in any letter case). Sizes are given in pixels at
// 96 per inch: a PNG has exactly the requested number of pixels, and an SVG
// the same physical size (written in points, 800 pixels being 600pt). Writing is atomic: the picture is rendered completely in memory,
// written to a temporary file in the target directory and renamed over the
// path only on success, so the path never holds a partial picture and no
// temporary file survives a failure. Equal input gives byte-for-byte equal
// files.
//
// No function modifies its inputs or keeps references to them after it
// returns.
package plotting
