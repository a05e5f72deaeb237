// Package casefile reads a mixwell case file — a YAML document describing
// one steady Stokes–Onsager–Stefan–Maxwell problem — checks it, and returns
// it as a Case of plain structs in SI units. The format is our own; every
// key, its unit and its default are documented in docs/case-format.md, and
// testdata/cases holds examples.
//
// # What is checked
//
// Load and Parse decode the file through yaml.Node so that every fault
// carries the file, line and column of the value at fault and its key path
// (e.g. "boundaries.inlet.species.mole_fractions"). Keys are strict: an
// unknown key is an error listing the allowed keys, and a repeated key is
// an error naming the line of its first use. YAML aliases and merge keys
// are rejected. Beyond syntax the checks are the ones that need no
// solver: at least two species with distinct names and positive molar
// masses; a positive Stefan–Maxwell diffusivity for every pair (a missing
// pair is named); compositions that name known species, lie in [0, 1] and
// sum to one within 1e-9; model data for every species where the model
// needs them; boundary names that exist in the geometry, and a condition
// for every boundary of the geometry; species conditions that fit the
// velocity condition (convective-inflow on an inflow, outflow on an open
// boundary); not every boundary an outflow; polygons with at least three
// points per loop, no repeated points, no crossing segments and holes
// inside the outline; boundary-layer gradings that fit in a rectangle.
// The mesh file of a mesh-file geometry is read with mesh.Read (its tags
// must be named). The case reader does not mesh polygons: it hands the
// outline, holes and meshing controls to the mesher as they are.
//
// Checks continue after a fault where later data do not depend on it, and
// up to MaxErrors faults are reported together, sorted by position, as an
// Errors value; errors.As with a *Error target finds the first. Data that
// are admissible but suspicious (composition for every species on a
// no-slip wall, a zero mole fraction at a composition boundary without a
// graded mesh, slip on a sloped segment) become Warnings of the Case.
//
// # Units
//
// A number without a unit is in SI units. A string value may carry a unit
// after the number, e.g. "8.48e-6 m^2/s", "99.4 kPa", "55 degC",
// "2 mm", "1.8e-5 Pa s", "58.08 g/mol". The unit parser is our own: the
// symbols m, s, min, h, g, mol, K, Pa, bar, atm, J, N, W, L with the
// prefixes n, u (or µ), m, c (for m and L only), k, M, G; products by a
// space, '*' or '·'; powers by '^' (negative allowed); at most one '/' per
// parenthesis level, its denominator one factor or a parenthesised group
// (so "kg/(m^2 s)", not "kg/m^2 s", following the SI brochure, section
// 5.4.6). degC, an affine scale, is accepted only on its own and only for
// an absolute temperature. Every quantity key declares its dimension; a
// unit of another dimension is an error naming the unit, its dimension
// and the dimension wanted.
//
// # Order and ownership
//
// Per-species slices of a Case follow the order of Case.Species; pairs
// follow (i, j), i < j, in that order; boundaries are sorted by name. A
// Case shares nothing with the input bytes; the caller owns it. The
// functions of this package are safe for concurrent use.
//
// # Layering
//
// casefile knows mesh (to read mesh files) and nothing above it; cmd turns
// a Case into physics and solver objects.
package casefile
