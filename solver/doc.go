// Package solver provides the sparse linear algebra of mixwell: sparse
// matrix storage, fill-reducing orderings, a sparse direct LU solver for
// the symmetric indefinite (saddle-point) systems of the mixed finite
// element discretisation, conjugate gradients for symmetric positive
// definite systems, diagonal equilibration and Matrix Market input/output.
// It knows nothing about meshes or physics.
//
// # Storage
//
// COO collects (i, j, v) triplets during assembly; duplicates are allowed
// and are summed by COO.ToCSR. CSR (compressed rows) and CSC (compressed
// columns) hold a matrix with these invariants, checked by NewCSR and
// NewCSC and kept by every function of the package:
//
//   - the pointer slice has one entry more than the major dimension, starts
//     at 0 and does not decrease;
//   - within each row (CSR) or column (CSC) the minor indices are strictly
//     increasing: sorted, no duplicates;
//   - explicit zeros may be stored; they are part of the pattern.
//
// Indices are 0-based. CSR and CSC implement gonum's mat.Matrix (At costs a
// binary search) and mat.NonZeroDoer. The pattern of a CSR matrix can be
// refilled without allocation with Zero, Index and AddAt.
//
// # Memory ownership
//
// NewCSR and NewCSC take ownership of the slices passed to them. The
// accessors RowPtr, ColIndices, Values, Row, ColPtr, RowIndices and Col
// return views of the receiver's memory: pattern slices must not be
// modified, values may be. T returns a view sharing memory (the CSR arrays
// of A are the CSC arrays of Aᵀ); Transpose, ToCSC, ToCSR and Clone copy.
// Functions that write into a caller's buffer take it first and end in To.
// Functions do not modify their matrix arguments; methods named Zero,
// AddAt, SetAt and ScaleRowsCols modify the receiver. FactorLU does not
// retain its argument.
//
// # Direct solver
//
// FactorLU computes P A Q = L U. The column ordering Q is approximate
// minimum degree on the pattern of A + Aᵀ (Amestoy, Davis and Duff, SIAM J.
// Matrix Anal. Appl. 17, 1996), reverse Cuthill–McKee, or the natural
// order. For saddle-point matrices (zero diagonal in the constraint block)
// the minimum degree ordering pairs each constraint with a coupled
// unknown, chosen on the scaled matrix among the couplings that make a sound
// 2×2 pivot (judged by the geometric mean of the two entries, so that
// one-sided couplings of unsymmetric matrices do not count), and orders the
// pair as one node, so that every leading block of the permuted matrix is
// nonsingular and diagonal pivots exist (after Duff and Pralet, SIAM J.
// Matrix Anal. Appl. 27, 2005, and Bridson's constrained orderings, 2005);
// see MinimumDegreeOrder.
//
// By default the matrix is first equilibrated, D A D with the symmetric
// Ruiz scaling of EquilibrateSymmetricTo, and the scaling is undone inside
// the solves. The factorisation is left-looking (Gilbert and Peierls, SIAM
// J. Sci. Stat. Comput. 9, 1988): each column is a sparse triangular solve
// whose pattern is found by depth-first search. The pivot is the diagonal
// entry of the permuted matrix when its magnitude is at least τ (default
// 0.1) times the largest candidate of its column. Otherwise the column is
// postponed until its ancestors in the elimination tree have been
// eliminated and retried then (delayed pivots, after Duff and Reid, ACM
// Trans. Math. Softw. 9, 1983); a constraint pair is instead pivoted as a
// 2×2 block when that block passes the threshold test, and a column that
// cannot wait takes, of the candidates within the threshold, the one whose
// row comes earliest in the ordering. So unsymmetric and indefinite
// matrices are handled too. Refactor reuses the order of elimination,
// delays included, for new values.
//
// Failures return errors that carry data: ErrNotSquare (wrapped, with the
// dimensions), *SingularError (the column and pivot step, structural or
// numerical), *NotConvergedError (iterations and residual), and Matrix
// Market errors with the line number. Programmer errors (index out of
// range, mismatched vector lengths) panic with a "solver: " message.
//
// # Nonlinear fixed-point solvers
//
// SolveFixedPoint finds x = G(x) for a map given as a function
// (FixedPointMap), such as the Picard map of the mixture iteration, by
// plain or damped Picard iteration, Anderson acceleration (the default;
// Walker and Ni, SIAM J. Numer. Anal. 49, 2011, with a QR-updated history,
// conditioning and restart safeguards) or Newton–Krylov on x − G(x)
// (Kelley, "Iterative Methods for Linear and Nonlinear Equations", SIAM
// 1995: GMRES with directional differences of G, Eisenstat–Walker forcing
// terms and an Armijo line search). All methods stop on the same relative
// residual Norm(x − G(x)) / Norm(x), return a FixedPointResult with the
// history of every iteration (also on failure), and report failure as a
// *ConvergenceError (not converged, diverged or non-finite) or a *MapError
// wrapping an error of G. GMRES, restarted GMRES(m) for a LinearOperator
// given as a function (Saad and Schultz, SIAM J. Sci. Stat. Comput. 7,
// 1986), is exported for other matrix-free solves; it does not retain its
// arguments. SolveFixedPoint does not modify x0 and returns X in memory of
// its own.
package solver
