package solver

import (
	"math/rand/v2"
)

// laplace2D returns the 5-point finite-difference Laplacian (stencil
// 4, -1, -1, -1, -1, unscaled) on an m×m grid of interior nodes with zero
// Dirichlet data, numbered row by row. It is symmetric positive definite
// (eigenvalues 4 − 2cos(iπ/(m+1)) − 2cos(jπ/(m+1)), closed form).
func laplace2D(m int) *CSR {
	t := NewCOO(m*m, m*m, 5*m*m)
	id := func(i, j int) int { return j*m + i }
	for j := 0; j < m; j++ {
		for i := 0; i < m; i++ {
			k := id(i, j)
			t.Add(k, k, 4)
			if i > 0 {
				t.Add(k, id(i-1, j), -1)
			}
			if i < m-1 {
				t.Add(k, id(i+1, j), -1)
			}
			if j > 0 {
				t.Add(k, id(i, j-1), -1)
			}
			if j < m-1 {
				t.Add(k, id(i, j+1), -1)
			}
		}
	}
	return t.ToCSR()
}

// macStokes returns the symmetric indefinite saddle-point matrix
//
//	[ K  Bᵀ ]
//	[ B  0  ]
//
// of the marker-and-cell (staggered) discretisation of the Stokes problem on
// the unit square with an n×n grid of cells (h = 1/n) and no-slip walls:
// K is the 5-point Laplacian (scaled by 1/h², boundary values eliminated)
// on the interior x-face velocities and on the interior y-face velocities,
// B is the discrete divergence (scaled by 1/h) from faces to cells. The
// pressure of cell 0 is pinned: its row and column are replaced by the
// identity, which removes the constant pressure mode. The order is
// 2n(n−1) + n²; nu is the number of velocity unknowns.
func macStokes(n int) (a *CSR, nu int) {
	h := 1 / float64(n)
	kd, ko, bd := 4/(h*h), -1/(h*h), 1/h
	nux := (n - 1) * n // x-velocities on vertical interior faces
	nuy := n * (n - 1) // y-velocities on horizontal interior faces
	nu = nux + nuy
	order := nu + n*n
	ux := func(i, j int) int { return j*(n-1) + (i - 1) } // face x = i h, 1 <= i <= n-1
	uy := func(i, j int) int { return nux + (j-1)*n + i } // face y = j h, 1 <= j <= n-1
	pc := func(i, j int) int { return nu + j*n + i }
	t := NewCOO(order, order, 7*nu+4*n*n)
	// Velocity blocks.
	for j := 0; j < n; j++ {
		for i := 1; i <= n-1; i++ {
			k := ux(i, j)
			t.Add(k, k, kd)
			if i > 1 {
				t.Add(k, ux(i-1, j), ko)
			}
			if i < n-1 {
				t.Add(k, ux(i+1, j), ko)
			}
			if j > 0 {
				t.Add(k, ux(i, j-1), ko)
			}
			if j < n-1 {
				t.Add(k, ux(i, j+1), ko)
			}
		}
	}
	for j := 1; j <= n-1; j++ {
		for i := 0; i < n; i++ {
			k := uy(i, j)
			t.Add(k, k, kd)
			if i > 0 {
				t.Add(k, uy(i-1, j), ko)
			}
			if i < n-1 {
				t.Add(k, uy(i+1, j), ko)
			}
			if j > 1 {
				t.Add(k, uy(i, j-1), ko)
			}
			if j < n-1 {
				t.Add(k, uy(i, j+1), ko)
			}
		}
	}
	// Divergence rows and their transposes.
	for j := 0; j < n; j++ {
		for i := 0; i < n; i++ {
			p := pc(i, j)
			if i == 0 && j == 0 {
				t.Add(p, p, 1)
				continue
			}
			add := func(f int, v float64) {
				t.Add(p, f, v)
				t.Add(f, p, v)
			}
			if i+1 <= n-1 {
				add(ux(i+1, j), bd)
			}
			if i >= 1 {
				add(ux(i, j), -bd)
			}
			if j+1 <= n-1 {
				add(uy(i, j+1), bd)
			}
			if j >= 1 {
				add(uy(i, j), -bd)
			}
		}
	}
	return t.ToCSR(), nu
}

// randomSparse returns an n×n nonsymmetric matrix with about density·n²
// random entries in [-1, 1) plus a random permutation matrix scaled by 2
// (which makes it structurally nonsingular without favouring the diagonal).
func randomSparse(rnd *rand.Rand, n int, density float64) *CSR {
	t := NewCOO(n, n, int(density*float64(n*n))+n)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			if rnd.Float64() < density {
				t.Add(i, j, 2*rnd.Float64()-1)
			}
		}
	}
	for i, j := range rnd.Perm(n) {
		t.Add(i, j, 2)
	}
	return t.ToCSR()
}

// randomVector returns n values uniform in [-1, 1).
func randomVector(rnd *rand.Rand, n int) []float64 {
	x := make([]float64, n)
	for i := range x {
		x[i] = 2*rnd.Float64() - 1
	}
	return x
}
