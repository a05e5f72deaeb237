package fem

// Orthonormal polynomials on the reference triangle.
//
// Every element of this package is built on one prime basis: the Dubiner
// (Koornwinder–Dubiner) basis of P_k on the reference triangle T with
// vertices (0,0), (1,0), (0,1), orthonormal in L2(T):
//
//	int_T psi_i psi_j dx = delta_ij.
//
// In collapsed coordinates xi = (2x+y-1)/(1-y) in [-1,1] and t = 2y-1 the
// function with indices (p, q) is
//
//	psi_pq = c_pq  P_p(xi) (1-y)^p  P_q^(2p+1,0)(t),  c_pq = sqrt(2 (2p+1) (p+q+1)),
//
// with P_p the Legendre and P_q^(a,b) the Jacobi polynomials (Koornwinder
// 1975; Dubiner 1991, J. Sci. Comput. 6, 345–390; Karniadakis & Sherwin,
// Spectral/hp Element Methods for CFD, 2nd ed. 2005, Chapter 3). The
// normalisation follows from the Jacobi norm
// int_{-1}^{1} (1-t)^a (P_q^(a,0))^2 dt = 2^(a+1)/(2q+a+1).
//
// The factor Q_p = (1-y)^p P_p(xi) is never formed by dividing by 1-y: with
// s = 2x+y-1 and b = 1-y the Legendre recurrence multiplied through by b^(p+1)
// gives the polynomial recurrence
//
//	Q_0 = 1,  Q_1 = s,  (p+1) Q_{p+1} = (2p+1) s Q_p - p b^2 Q_{p-1},
//
// which is differentiated term by term. Values and gradients are therefore
// exact polynomial evaluations everywhere, including the collapsed vertex
// (0,1), and also outside T (the polynomial extension).
//
// Ordering: the basis is hierarchical in the total degree n = p+q. The index
// of (p, q) is n(n+1)/2 + q, so the first PolyDim(k) functions span P_k and
// the functions with index in [PolyDim(k-1), PolyDim(k)) have total degree
// exactly k.

import "math"

// PolyDim returns the dimension (k+1)(k+2)/2 of the space P_k of polynomials
// of total degree at most k in two variables; PolyDim(-1) is 0.
func PolyDim(k int) int {
	if k < 0 {
		return 0
	}
	return (k + 1) * (k + 2) / 2
}

// DubinerIndex returns the position of the Dubiner function with indices
// (p, q), of total degree p+q, in the hierarchical ordering.
func DubinerIndex(p, q int) int {
	if p < 0 || q < 0 {
		panic("fem: negative Dubiner index")
	}
	n := p + q
	return n*(n+1)/2 + q
}

// DubinerValuesTo writes the values at x of the PolyDim(k) orthonormal
// Dubiner functions of degree at most k into dst. It panics if len(dst) is
// not PolyDim(k). It does not allocate.
func DubinerValuesTo(dst []float64, k int, x [2]float64) {
	if k < 0 || len(dst) != PolyDim(k) {
		panic("fem: bad length or degree in DubinerValuesTo")
	}
	dubiner(dst, nil, k, x)
}

// DubinerGradientsTo writes the gradients at x of the PolyDim(k) orthonormal
// Dubiner functions of degree at most k into dst. It panics if len(dst) is
// not PolyDim(k). It does not allocate.
func DubinerGradientsTo(dst [][2]float64, k int, x [2]float64) {
	if k < 0 || len(dst) != PolyDim(k) {
		panic("fem: bad length or degree in DubinerGradientsTo")
	}
	dubiner(nil, dst, k, x)
}

// dubiner evaluates the Dubiner basis of degree k at x into val and its
// gradient into grad; either may be nil. Both recurrences keep only the last
// two terms, so no scratch storage is needed.
func dubiner(val []float64, grad [][2]float64, k int, x [2]float64) {
	s := 2*x[0] + x[1] - 1 // grad s = (2, 1)
	b := 1 - x[1]          // grad b = (0, -1)
	t := 2*x[1] - 1        // dt/dy = 2
	wantGrad := grad != nil

	// Q_p and its gradient; qm, gqm hold Q_{p-1}.
	q, gq := 1.0, [2]float64{}
	var qm float64
	var gqm [2]float64
	for p := 0; p <= k; p++ {
		alpha := float64(2*p + 1)
		// Jacobi P_j^(alpha,0)(t) and its y-derivative, j = 0..k-p
		// (Abramowitz & Stegun 22.7.1 with beta = 0).
		r, dr := 1.0, 0.0
		var rm, drm float64
		for j := 0; j <= k-p; j++ {
			idx := DubinerIndex(p, j)
			c := math.Sqrt(2 * alpha * float64(p+j+1))
			if val != nil {
				val[idx] = c * q * r
			}
			if wantGrad {
				grad[idx] = [2]float64{c * gq[0] * r, c * (gq[1]*r + q*dr)}
			}
			// Advance the Jacobi recurrence to degree j+1.
			var rn, drn float64
			if j == 0 {
				rn = ((alpha+2)*t + alpha) / 2
				drn = alpha + 2
			} else {
				n := float64(j + 1)
				a1 := 2 * n * (n + alpha) * (2*n + alpha - 2)
				a2 := (2*n + alpha - 1) * (2*n + alpha) * (2*n + alpha - 2)
				a3 := (2*n + alpha - 1) * alpha * alpha
				a4 := 2 * (n + alpha - 1) * (n - 1) * (2*n + alpha)
				rn = ((a2*t+a3)*r - a4*rm) / a1
				drn = ((a2*t+a3)*dr + 2*a2*r - a4*drm) / a1
			}
			rm, drm = r, dr
			r, dr = rn, drn
		}
		// Advance Q_p to Q_{p+1}.
		var qn float64
		var gqn [2]float64
		if p == 0 {
			qn = s
			gqn = [2]float64{2, 1}
		} else {
			fp := float64(p)
			c1 := (2*fp + 1) / (fp + 1)
			c2 := fp / (fp + 1)
			qn = c1*s*q - c2*b*b*qm
			if wantGrad {
				gqn[0] = c1*(2*q+s*gq[0]) - c2*b*b*gqm[0]
				gqn[1] = c1*(q+s*gq[1]) - c2*(-2*b*qm+b*b*gqm[1])
			}
		}
		qm, gqm = q, gq
		q, gq = qn, gqn
	}
}

// legendreUnitTo writes L_j(s) for j = 0..len(dst)-1 into dst, where L_j is
// the Legendre polynomial of degree j on [0,1] with L_j(1) = 1, that is
// P_j(2s-1) (Bonnet's recurrence, Abramowitz & Stegun 22.7.10).
func legendreUnitTo(dst []float64, s float64) {
	t := 2*s - 1
	pm, p := 0.0, 1.0
	for j := range dst {
		dst[j] = p
		fj := float64(j)
		pm, p = p, ((2*fj+1)*t*p-fj*pm)/(fj+1)
	}
}
