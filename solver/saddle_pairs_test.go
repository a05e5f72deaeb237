package solver

import (
	"math"
	"testing"
)

// TestSaddlePairs checks the two properties saddlePairs is built for on
// small matrices [I Bᵀ; B 0] (three or four flux-like unknowns with unit
// diagonal, then the constraints): a constraint is not paired across a
// coupling that is zero up to rounding, and pairs along a chain of cells
// grow from the cell with a private neighbour, so that the factorisation
// with the resulting ordering needs no off-diagonal pivot even without
// scaling, with a negligible threshold and without delayed pivots.
func TestSaddlePairs(t *testing.T) {
	build := func(nflux int, b [][]float64) *CSR {
		n := nflux + len(b)
		c := NewCOO(n, n, 0)
		for i := 0; i < nflux; i++ {
			c.Add(i, i, 1)
		}
		for r, row := range b {
			for j, v := range row {
				if v != 0 {
					c.Add(nflux+r, j, v)
					c.Add(j, nflux+r, v)
				}
			}
		}
		return c.ToCSR()
	}
	for _, c := range []struct {
		name  string
		nflux int
		b     [][]float64
		want  map[int]int // constraint → required partner
	}{
		// Constraint 3 couples to flux 0 only by rounding (1e-17, as the
		// mean of a DG potential against an interior bubble); flux 0 is
		// also the only private neighbour of constraint 4, so a
		// pattern-only matching could take it for 3.
		{"rounding_coupling", 3, [][]float64{{1e-17, 1, 0}, {1, 1, 0}}, map[int]int{3: 1, 4: 0}},
		// Four cells in a row with fluxes on the three interior faces and
		// one boundary face at the right end (face 3): a node–face
		// divergence. Only cell 3 has a private face; each other cell must
		// take the face towards it, or the divergence restricted to the
		// pairs is singular.
		{"chain_of_cells", 4, [][]float64{
			{1, 0, 0, 0},
			{-1, 1, 0, 0},
			{0, -1, 1, 0},
			{0, 0, -1, 1},
		}, map[int]int{7: 3, 6: 2, 5: 1, 4: 0}},
	} {
		a := build(c.nflux, c.b)
		ptr, adj, zd := symmetricPattern(a)
		partner := saddlePairs(a, ptr, adj, zd, nil)
		for k, v := range c.want {
			if partner[k] != v {
				t.Errorf("%s: partner of %d is %d, want %d", c.name, k, partner[k], v)
			}
		}
		q, err := MinimumDegreeOrder(a)
		if err != nil {
			t.Fatal(err)
		}
		f := &LU{n: a.rows, tau: 1e-12, q: q, noDelay: true}
		if err := f.factor(a); err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		if st := f.Stats(); st.OffDiagonalPivots != 0 {
			t.Errorf("%s: %d off-diagonal pivots, want 0", c.name, st.OffDiagonalPivots)
		}
	}
}

// TestSaddlePairsOneSided checks that a constraint is not paired across a
// one-sided coupling. Constraint 2 couples to unknown 0 by 1 in its own row
// but by 1e-13 in the row of 0 (as a pressure to a flux in the species
// systems, where the flux rows carry the group S), and to unknown 1 by 0.3
// both ways. The pair (0, 2) would have the pivot −1e-13 after 0; the pair
// (1, 2) has −0.09. Judged by the larger entry, 0 is the stronger partner.
func TestSaddlePairsOneSided(t *testing.T) {
	c := NewCOO(3, 3, 0)
	c.Add(0, 0, 1)
	c.Add(1, 1, 1)
	c.Add(2, 0, 1)
	c.Add(0, 2, 1e-13)
	c.Add(2, 1, 0.3)
	c.Add(1, 2, 0.3)
	a := c.ToCSR()
	ptr, adj, zd := symmetricPattern(a)
	if partner := saddlePairs(a, ptr, adj, zd, nil); partner[2] != 1 {
		t.Errorf("partner of the constraint is %d, want 1", partner[2])
	}
}

// TestPairCouplingMatchesThreshold keeps pairCoupling at the square root of
// the default pivot threshold (see its comment).
func TestPairCouplingMatchesThreshold(t *testing.T) {
	const tol = 0.03 // relative; pairCoupling is rounded to two digits
	if got, want := pairCoupling*pairCoupling, DefaultPivotThreshold; math.Abs(got-want) > tol*want {
		t.Errorf("pairCoupling² = %v, want %v (DefaultPivotThreshold)", got, want)
	}
}
