package solver

import "testing"

// TestSaddlePairs checks the two properties saddlePairs is built for on
// small matrices [I Bᵀ; B 0] (three or four flux-like unknowns with unit
// diagonal, then the constraints): a constraint is not paired across a
// coupling that is zero up to rounding, and pairs along a chain of cells
// grow from the cell with a private neighbour, so that the factorisation
// with the resulting ordering needs no off-diagonal pivot even without
// scaling and with a negligible threshold.
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
		f := &LU{n: a.rows, tau: 1e-12, q: q}
		if err := f.factor(a); err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		if st := f.Stats(); st.OffDiagonalPivots != 0 {
			t.Errorf("%s: %d off-diagonal pivots, want 0", c.name, st.OffDiagonalPivots)
		}
	}
}
