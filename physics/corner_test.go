package physics

import (
	"testing"
)

func TestCornerPrecedence(t *testing.T) {
	// Formulation note, section 10 item 7: where segments meet, a given
	// velocity (wall, inflow) takes precedence over slip, and slip over an
	// open boundary. The slab of scaledSlab: a bottom wall moving at
	// (1, 0) (given), slip sides, an open top with zero tangential
	// velocity. At the bottom corners vx must keep the wall's 1 (the slip
	// sides alone would fix it to 0); at the top corners vx is 0 (slip,
	// and the outlet's tangential condition agrees) and vy is free (the
	// outlet's normal component).
	prob, _, _ := scaledSlab(t, 1)
	bottom := prob.Boundary[1]
	bottom.Velocity.Velocity = func([2]float64) [2]float64 { return [2]float64{1, 0} }
	prob.Boundary[1] = bottom
	top := prob.Boundary[3]
	top.Velocity.NoTangential = true
	prob.Boundary[3] = top
	d, err := NewDiscretisation(prob)
	if err != nil {
		t.Fatal(err)
	}
	m := prob.Mesh
	corner := func(x, y float64) int {
		for v, p := range m.Points {
			if p[0] == x && p[1] == y {
				return v
			}
		}
		t.Fatalf("no vertex at (%g, %g)", x, y)
		return -1
	}
	// The P_{k+1} Lagrange space numbers vertex functions by vertex first
	// (one per vertex), so vertex v's velocity unknowns are v in each block.
	W := m.Points[len(m.Points)-1][0]
	for _, tc := range []struct {
		name    string
		x, y    float64
		vxFixed bool
		vxValue float64
		vyFixed bool
		vyValue float64
	}{
		{"bottom left", 0, 0, true, 1, true, 0},
		{"bottom right", W, 0, true, 1, true, 0},
		{"top left", 0, 1, true, 0, false, 0},
		{"top right", W, 1, true, 0, false, 0},
	} {
		v := corner(tc.x, tc.y)
		gx := d.lay.Offset(blockVX) + v
		gy := d.lay.Offset(blockVY) + v
		if d.sys.Fixed(gx) != tc.vxFixed || tc.vxFixed && d.sys.FixedValue(gx) != tc.vxValue {
			t.Errorf("%s: vx fixed %v to %g, want fixed %v to %g", tc.name, d.sys.Fixed(gx), d.sys.FixedValue(gx), tc.vxFixed, tc.vxValue)
		}
		if d.sys.Fixed(gy) != tc.vyFixed || tc.vyFixed && d.sys.FixedValue(gy) != tc.vyValue {
			t.Errorf("%s: vy fixed %v to %g, want fixed %v to %g", tc.name, d.sys.Fixed(gy), d.sys.FixedValue(gy), tc.vyFixed, tc.vyValue)
		}
	}
}
