// Package fem provides the finite element machinery of mixwell on triangle
// meshes: quadrature, reference elements (continuous Lagrange P_k,
// discontinuous P_k with an orthonormal basis, Raviart–Thomas and
// Brezzi–Douglas–Marini), affine and Piola maps, degree-of-freedom maps for
// single and product spaces, element-by-element assembly with essential
// conditions, canonical interpolation, L2 projection and error norms. It
// knows nothing about chemistry.
//
// # Conventions
//
// The reference triangle has vertices (0,0), (1,0), (0,1). Local edge i is
// opposite local vertex i and runs from vertex (i+1)%3 to vertex (i+2)%3.
// Every mesh edge has a global orientation from its lower to its higher
// vertex number (package mesh).
//
// Scalar fields map by composition with the affine map F(xh) = x0 + J xh;
// gradients by J^{-T}. H(div) fields map by the contravariant Piola map
// u = J uh / det J with the signed determinant, which keeps the edge
// moments taken against the mapped, rotated local edge vector unchanged, so
// clockwise triangles need no special case. A global H(div) basis function
// restricted to a triangle is sign times the mapped local one, where the
// sign (Space.Signs) is -1 for even moments and +1 for odd ones on an edge
// whose local direction opposes its global orientation, and +1 otherwise.
// Lagrange edge nodes are numbered along the global edge orientation.
//
// # Memory
//
// Reference elements and spaces are immutable after construction and may be
// shared between goroutines. ScalarQuad, DivQuad and EdgeQuad hold per-
// triangle workspace and belong to one goroutine. Slices returned by
// Space.Dofs and Space.Signs alias the space's storage.
package fem
