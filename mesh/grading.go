package mesh

import (
	"fmt"
	"math"
)

// BoundaryLayer asks Triangulate to grade the mesh geometrically toward the
// boundary segments carrying a tag, for example to resolve the logarithmic
// layer of a chemical potential next to a boundary where a species is
// nearly absent.
//
// Layer k = 1, 2, ..., Layers has thickness First·Growth^(k-1), so layer k
// ends at the distance
//
//	d_k = First·(1 + Growth + ... + Growth^(k-1))
//
// from the segments (First·k for Growth = 1). The grading is realised as a
// size function, not by inserting points along normals: a triangle whose
// nearest vertex lies at distance d <= d_Layers from a graded segment is
// refined until its longest edge is at most
//
//	h(d) = First + (Growth-1)·d,
//
// which equals the thickness of layer k at its inner edge d = d_{k-1}
// (h(d_{k-1}) = First·Growth^(k-1)), so the target size follows the
// geometric law layer by layer. Beyond d_Layers the layer imposes nothing
// (MaxArea and the angle bound still apply, and Delaunay refinement grades
// the mesh smoothly from the layer to the coarse interior).
//
// The triangles stay isotropic and keep the angle bound of Triangulate
// wherever that bound holds: this grading refines in every direction, so
// the number of triangles along a graded segment of length ℓ is about
// ℓ/First. (Stretched boundary-layer elements would need fewer, but would
// give up the angle bound.)
type BoundaryLayer struct {
	// Tag selects the graded segments; some segment of the domain must
	// carry it.
	Tag int
	// First is the thickness of the first layer, the target size of
	// triangles touching the segments. It must be positive.
	First float64
	// Growth is the ratio (>= 1) of the thicknesses of successive layers.
	Growth float64
	// Layers is the number of layers (>= 1).
	Layers int
}

// maxLayers bounds BoundaryLayer.Layers, far beyond any useful number.
const maxLayers = 10000

// Thickness returns d_Layers, the distance from the segments at which the
// grading ends.
func (b BoundaryLayer) Thickness() float64 {
	if b.Growth == 1 {
		return b.First * float64(b.Layers)
	}
	return b.First * (math.Pow(b.Growth, float64(b.Layers)) - 1) / (b.Growth - 1)
}

// Size returns the target size h(d) at distance d from the segments, or +Inf
// beyond the layers.
func (b BoundaryLayer) Size(d float64) float64 {
	if d > b.Thickness() {
		return math.Inf(1)
	}
	return b.First + (b.Growth-1)*d
}

// check validates the layer against the tags present in the domain.
func (b BoundaryLayer) check(i int, hasTag func(int) bool) error {
	switch {
	case b.Tag <= 0:
		return fmt.Errorf("mesh: boundary layer %d: tag %d is not a boundary tag (tags are positive)", i, b.Tag)
	case !hasTag(b.Tag):
		return fmt.Errorf("mesh: boundary layer %d: no segment of the domain has tag %d", i, b.Tag)
	case !(b.First > 0) || math.IsInf(b.First, 0):
		return fmt.Errorf("mesh: boundary layer %d: first thickness %g: want a positive finite number", i, b.First)
	case !(b.Growth >= 1) || math.IsInf(b.Growth, 0):
		return fmt.Errorf("mesh: boundary layer %d: growth %g: want a finite ratio >= 1 (layers thicken away from the boundary)", i, b.Growth)
	case b.Layers < 1 || b.Layers > maxLayers:
		return fmt.Errorf("mesh: boundary layer %d: %d layers: want 1 to %d", i, b.Layers, maxLayers)
	case math.IsInf(b.Thickness(), 0):
		return fmt.Errorf("mesh: boundary layer %d: total thickness overflows (growth %g, %d layers)", i, b.Growth, b.Layers)
	}
	return nil
}

// layerField evaluates the size function of one BoundaryLayer.
type layerField struct {
	spec      BoundaryLayer
	reach     float64         // d_Layers
	segs      [][2][2]float64 // the graded segments
	lo, hi    [2]float64      // bounding box of segs widened by reach
	first, gm float64         // First and Growth-1
}

func newLayerField(spec BoundaryLayer, segs [][2][2]float64) layerField {
	f := layerField{spec: spec, reach: spec.Thickness(), segs: segs, first: spec.First, gm: spec.Growth - 1}
	f.lo = [2]float64{math.Inf(1), math.Inf(1)}
	f.hi = [2]float64{math.Inf(-1), math.Inf(-1)}
	for _, s := range segs {
		for _, p := range s {
			f.lo = [2]float64{min(f.lo[0], p[0]), min(f.lo[1], p[1])}
			f.hi = [2]float64{max(f.hi[0], p[0]), max(f.hi[1], p[1])}
		}
	}
	f.lo[0] -= f.reach
	f.lo[1] -= f.reach
	f.hi[0] += f.reach
	f.hi[1] += f.reach
	return f
}

// target returns the size bound of the layer for a triangle with the given
// vertices: h at the distance of the nearest vertex, +Inf if none is within
// reach.
func (f *layerField) target(p [3][2]float64) float64 {
	in := false
	for _, q := range p {
		if q[0] >= f.lo[0] && q[0] <= f.hi[0] && q[1] >= f.lo[1] && q[1] <= f.hi[1] {
			in = true
			break
		}
	}
	if !in {
		return math.Inf(1)
	}
	d2 := math.Inf(1)
	for _, s := range f.segs {
		for _, q := range p {
			d2 = min(d2, pointSegmentDist2(q, s[0], s[1]))
		}
	}
	d := math.Sqrt(d2)
	if d > f.reach {
		return math.Inf(1)
	}
	return f.first + f.gm*d
}

// pointSegmentDist2 returns the squared distance from p to the segment ab.
func pointSegmentDist2(p, a, b [2]float64) float64 {
	abx, aby := b[0]-a[0], b[1]-a[1]
	apx, apy := p[0]-a[0], p[1]-a[1]
	l2 := abx*abx + aby*aby
	s := 0.0
	if l2 > 0 {
		s = max(0, min(1, (apx*abx+apy*aby)/l2))
	}
	dx, dy := apx-s*abx, apy-s*aby
	return dx*dx + dy*dy
}
