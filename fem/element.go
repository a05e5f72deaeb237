package fem

// The reference triangle has vertices (0,0), (1,0), (0,1), in this order.
// Local edge i is opposite local vertex i and runs in the local direction
// from vertex (i+1)%3 to vertex (i+2)%3 (counter-clockwise around the
// reference triangle): edge 0 from v1 to v2, edge 1 from v2 to v0, edge 2
// from v0 to v1.

// EntityKind says which kind of mesh entity a degree of freedom is attached to.
type EntityKind int

const (
	// AtVertex marks a degree of freedom owned by a vertex.
	AtVertex EntityKind = iota
	// OnEdge marks a degree of freedom owned by an edge (shared by the
	// triangles on either side).
	OnEdge
	// Inside marks a degree of freedom owned by the triangle alone.
	Inside
)

// DofEntity locates one local basis function: the entity that owns it and its
// position among the functions of that entity.
//
// For OnEdge, Index is the local edge (0, 1, 2) and Ordinal counts the edge's
// functions in the local edge direction: for Lagrange elements the nodes are
// ordered from the edge's first to its second vertex; for H(div) elements
// Ordinal j is the moment against the Legendre polynomial of degree j in the
// local edge parameter. For AtVertex, Index is the local vertex. For Inside,
// Index is 0 and Ordinal numbers the interior functions.
type DofEntity struct {
	Kind    EntityKind
	Index   int
	Ordinal int
}

// ScalarElement is a basis of a scalar polynomial space on the reference
// triangle. Implementations: continuous Lagrange and discontinuous P_k.
type ScalarElement interface {
	// Degree is the polynomial degree k of the space P_k.
	Degree() int
	// Len is the number of basis functions.
	Len() int
	// Entities gives, for each basis function, the entity that owns it.
	Entities() []DofEntity
	// ValuesTo writes the value of every basis function at the reference
	// point x into dst, which must have length Len.
	ValuesTo(dst []float64, x [2]float64)
	// GradientsTo writes the reference gradient of every basis function at x
	// into dst, which must have length Len.
	GradientsTo(dst [][2]float64, x [2]float64)
}

// DivElement is a basis of an H(div)-conforming polynomial vector space on the
// reference triangle (Raviart–Thomas, Brezzi–Douglas–Marini). It is dual to
// these degrees of freedom, applied to a reference field u:
//
//	edge i, ordinal j:  int_0^1 u(x_i(s)) . nu_i  L_j(s) ds
//
// where x_i(s) runs along local edge i in its local direction,
// nu_i = (t_y, -t_x) for the edge vector t = x_i(1) - x_i(0) (the outward
// normal scaled by the edge length), and L_j is the Legendre polynomial of
// degree j on [0,1] with L_j(1) = 1; then interior moments
// int_T u . q_m dx against a fixed basis q_m of the interior test space
// (P_{k-1}^2 for Raviart–Thomas of index k; the first-kind Nédélec space of
// index k-2 for BDM_k).
//
// With the contravariant Piola map u = J û / det J (signed determinant) the
// edge moments computed with the mapped, rotated local edge vector are
// unchanged, on clockwise triangles as well; only the edge direction relative
// to the global orientation enters the global signs.
type DivElement interface {
	// Degree is the family's index: k for Raviart–Thomas RT_k (lowest is 0,
	// divergence in P_k), k for BDM_k (full P_k, divergence in P_{k-1}).
	Degree() int
	// Len is the number of basis functions.
	Len() int
	// Entities gives, for each basis function, the entity that owns it.
	Entities() []DofEntity
	// ValuesTo writes the value of every basis function at x into dst.
	ValuesTo(dst [][2]float64, x [2]float64)
	// DivergencesTo writes the reference divergence of every basis function
	// at x into dst.
	DivergencesTo(dst []float64, x [2]float64)
	// DofsTo applies the degrees of freedom to the reference field u and
	// writes the Len results into dst, in the order of Entities.
	DofsTo(dst []float64, u func(x [2]float64) [2]float64)
}
