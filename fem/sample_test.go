package fem

import (
	"bytes"
	"math"
	"math/rand/v2"
	"testing"

	"mixwell/mesh"
)

func TestSampleOnSubdivision(t *testing.T) {
	// A P3 field and an RT_2 field that reproduce polynomials exactly
	// (common practice: interpolation is a projection) are sampled at the
	// vertices of a degree-3 sub-triangulation; the samples must equal the
	// polynomials there, and the result must write as VTU.
	const tol = 1e-12
	m := randomMesh(t, 21)
	rng := rand.New(rand.NewPCG(22, 23))
	f, _ := randomPoly(rng, 3)
	g, _ := randomPoly(rng, 2)
	g2, _ := randomPoly(rng, 2)
	lag, _ := NewLagrange(3)
	s := NewScalarSpace(m, lag)
	c := make([]float64, s.Len())
	InterpolateScalar(c, s, f)
	sub, pts := mesh.Subdivide(m, 3)
	vals := make([]float64, len(pts))
	SampleScalarTo(vals, s, c, pts)
	for k, v := range vals {
		if want := f(sub.Points[k]); math.Abs(v-want) > tol*math.Max(1, math.Abs(want)) {
			t.Fatalf("scalar sample %d: %g, want %g", k, v, want)
		}
	}
	rt, _ := NewRaviartThomas(2)
	d := NewDivSpace(m, rt)
	u := func(x [2]float64) [2]float64 { return [2]float64{g2(x), g(x)} }
	cd := make([]float64, d.Len())
	InterpolateDiv(cd, d, u)
	bsub, bpts := mesh.SubdivideBroken(m, 3)
	vec := make([]float64, 2*len(bpts))
	SampleDivTo(vec, d, cd, bpts)
	for k := range bpts {
		want := u(bsub.Points[k])
		if math.Abs(vec[2*k]-want[0]) > tol*math.Max(1, math.Abs(want[0])) || math.Abs(vec[2*k+1]-want[1]) > tol*math.Max(1, math.Abs(want[1])) {
			t.Fatalf("vector sample %d: (%g, %g), want %v", k, vec[2*k], vec[2*k+1], want)
		}
	}
	var buf bytes.Buffer
	if err := mesh.WriteVTU(&buf, bsub, []mesh.Field{{Name: "u", Components: 2, Data: vec}}, nil); err != nil {
		t.Fatal(err)
	}
	if buf.Len() == 0 {
		t.Fatal("empty VTU output")
	}
}
