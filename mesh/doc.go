// Package mesh provides conforming triangle meshes of polygonal domains in
// the plane: construction and validation, structured generators, random
// perturbation, uniform and barycentric refinement, quality statistics, a
// plain text file format and VTK XML output.
//
// # Invariants
//
// A *Mesh returned by New or by any other function of this package satisfies
// the invariants documented on the Mesh type, and Validate checks them.
// The conventions downstream code relies on are:
//
//   - Triangles are counter-clockwise (positive signed area) unless
//     MixedOrientation is set; only PermuteLocalVertices (and Read, for files
//     that ask for it) makes clockwise triangles, to test orientation signs.
//   - Every edge has one global orientation, from its lower to its higher
//     vertex number; edges are numbered in lexicographic order of that pair.
//     Normal components of H(div) fields are continuous with respect to this
//     orientation.
//   - Local edge i of a triangle is opposite its local vertex i and runs, in
//     the triangle's local direction, from local vertex i+1 to i+2 (mod 3).
//   - A boundary edge has a positive tag (DefaultTag until TagBoundary or a
//     generator sets another); interior edges have tag 0. Tags may have names.
//
// Coordinates are plain float64 numbers without units; the caller decides
// the length scale.
//
// # Memory
//
// A Mesh owns its slices and its map. Functions never modify their mesh
// arguments and return freshly allocated meshes that share nothing with
// their inputs; TagBoundary is the only method that modifies its receiver.
// Fields are exported for fast read access by assembly loops; code that
// edits them directly must restore the invariants (check with Validate).
//
// # Derived meshes
//
// Refine (red refinement, four similar children), BarycentricSplit (three
// children around the centroid, for Scott–Vogelius elements) and Subdivide
// (n² children, for output of degree-n fields) number their children
// contiguously per parent and record the parent of every triangle in Parent.
// Boundary edges of children inherit their parent edge's tag.
//
// # Meshes of polygonal domains
//
// A Domain is a polygon with polygonal holes whose boundary segments carry
// tags. ConstrainedDelaunay triangulates it without adding points;
// Triangulate adds points by Delaunay refinement until the triangles meet a
// minimum angle (default 25 degrees), an optional area bound and optional
// geometric grading toward tagged segments (BoundaryLayer), and Delaunay
// triangulates a point set. Their meshes number the input points first,
// give every boundary edge its segment's tag and are deterministic. The
// geometric decisions use exact orientation and in-circle predicates, so
// degenerate input (collinear or cocircular points) is handled exactly.
//
// # Text format
//
// Read and Write use a line-oriented text format of our own, version 1:
//
//	mixwell-mesh 1
//	orientation mixed        (optional; omit it, or write "orientation ccw",
//	                          for counter-clockwise meshes)
//	points N
//	x y                      (N lines: coordinates of points 0..N-1)
//	triangles M
//	a b c                    (M lines: 0-based point indices of triangles 0..M-1)
//	boundary K               (optional section)
//	a b tag                  (K lines: a boundary edge, given by its two points
//	                          in either order, and its positive tag)
//	tag NUMBER NAME          (any number of lines: the name of a tag)
//
// Rules:
//   - Everything from a '#' to the end of its line is a comment. Blank lines
//     are ignored. Fields are separated by spaces or tabs.
//   - The header comes first; "orientation", "points" and "triangles" follow
//     in this order. After the triangles come, in any order, at most one
//     "boundary" section and any number of "tag" lines.
//   - Coordinates are decimal floating-point numbers as accepted by Go's
//     strconv.ParseFloat and must be finite. Write uses the shortest form that
//     reads back to the same float64, so a round trip is exact.
//   - The triangles obey the rules of New (for mixed orientation, either
//     orientation is allowed). Boundary edges not listed in the boundary
//     section get DefaultTag. A tag name is one word without '#'; a tag number
//     and a name may each appear once.
//   - Edges, edge numbering and triangle adjacency are not stored: Read
//     rebuilds them, so they equal those of the mesh that was written.
//     Parent is not stored.
//
// Read reports the line number of the first error and what was expected
// there. WriteFile replaces a file atomically.
//
// # Visualisation
//
// WriteVTU and WriteVTUBinary write the VTK XML unstructured grid format
// (.vtu), with point and cell fields. To show a field of polynomial degree
// n > 1 faithfully, write it on Subdivide(m, n) (continuous fields) or
// SubdivideBroken(m, n) (discontinuous fields), evaluating it at the returned
// SubPoints.
package mesh
