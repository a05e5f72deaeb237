// Package verification runs manufactured-solution convergence studies that
// prove the finite element core right: Poisson with Lagrange P_k, mixed
// Poisson with RT_k x DG_k and BDM_{k+1} x DG_k, and Stokes with Taylor–Hood
// P_{k+1}/P_k and Scott–Vogelius P_{k+1}/DG_k on barycentrically refined
// meshes. Each study solves on a sequence of uniformly refined meshes of the
// unit square (structured, or a randomly perturbed coarse mesh refined
// uniformly so every level has the same shape quality), measures the error
// in each norm against the exact solution, and reports the observed rates
// beside the rates theory predicts.
//
// The exact solutions and their sources are hand-derived and checked against
// hyper-dual automatic differentiation in the tests. Degrees follow the
// formulation note: k is always the degree of the pressure or potential
// space (for poisson, the Lagrange degree).
package verification
