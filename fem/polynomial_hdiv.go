package fem

// Shared machinery of the elements: dual bases and H(div) vector bases.
//
// Every element basis is the dual basis of its degrees of freedom within a
// prime space spanned by known functions. With the prime functions g_j, the
// dual matrix D[i][j] = dof_i(g_j) and basis functions phi_m = sum_j A[m][j]
// g_j, duality dof_i(phi_m) = delta_im reads A D^T = I. When the g_j are
// given by coefficient rows S over the orthonormal Dubiner basis, the basis
// coefficients C = A S solve D^T C = S. The condition number of D is kept as
// a unisolvence check.

import (
	"fmt"

	"gonum.org/v1/gonum/mat"
)

const (
	// maxDualCondition rejects a dual matrix that is numerically singular.
	maxDualCondition = 1e12
	// maxScalarLen bounds PolyDim of the Dubiner basis evaluated by
	// any element, so that evaluation can use stack arrays.
	maxScalarLen = 91 // PolyDim(12)

	errShortDst = "fem: destination length does not match the element"
)

// dualBasis returns the row-major coefficients C solving D^T C = S (S nil
// meaning the identity) and the 2-norm condition number of D.
func dualBasis(d, s *mat.Dense) ([]float64, float64, error) {
	n, _ := d.Dims()
	cond := mat.Cond(d, 2)
	if !(cond < maxDualCondition) {
		return nil, cond, fmt.Errorf("dual matrix is singular to working precision (condition number %g)", cond)
	}
	if s == nil {
		s = mat.NewDense(n, n, nil)
		for i := 0; i < n; i++ {
			s.Set(i, i, 1)
		}
	}
	var c mat.Dense
	if err := c.Solve(d.T(), s); err != nil {
		return nil, cond, fmt.Errorf("solving with the dual matrix: %w", err)
	}
	_, cols := c.Dims()
	out := make([]float64, n*cols)
	for i := 0; i < n; i++ {
		for j := 0; j < cols; j++ {
			out[i*cols+j] = c.At(i, j)
		}
	}
	return out, cond, nil
}

// vectorTest is a vector polynomial used as interior test function of an
// H(div) element: (f(x) psi_j(x)) for a Dubiner function psi_j and a linear
// factor f chosen by kind.
type vectorTest struct {
	j    int // Dubiner index
	kind int // testX: (psi,0); testY: (0,psi); testRot: (-y psi, x psi)
}

const (
	testX = iota
	testY
	testRot
)

func (v vectorTest) eval(psi []float64, x [2]float64) [2]float64 {
	p := psi[v.j]
	switch v.kind {
	case testX:
		return [2]float64{p, 0}
	case testY:
		return [2]float64{0, p}
	default:
		return [2]float64{-x[1] * p, x[0] * p}
	}
}

// hdivBasis is the common part of the Raviart–Thomas and BDM elements: a
// basis of a subspace of (P_m)^2 stored as coefficients over the Dubiner
// basis of degree m, and the data for applying its degrees of freedom.
type hdivBasis struct {
	index  int // family index k
	degree int // polynomial degree m of the prime space
	n      int // number of basis functions
	np     int // PolyDim(m)
	cx, cy []float64
	ents   []DofEntity
	cond   float64

	perEdge int       // edge moments per edge
	edgeS   []float64 // edge rule points in [0,1]
	edgeW   []float64 // perEdge by len(edgeS): weight * L_j(s)
	triPts  [][2]float64
	testW   [][2]float64 // interior tests by len(triPts): weight * q_m(x)
	nInside int
}

// refEdge returns the start point and the edge vector of local edge i of the
// reference triangle.
func refEdge(i int) (a, t [2]float64) {
	verts := [3][2]float64{{0, 0}, {1, 0}, {0, 1}}
	a, b := verts[(i+1)%3], verts[(i+2)%3]
	return a, [2]float64{b[0] - a[0], b[1] - a[1]}
}

// newHdivBasis builds the dual basis of the prime space spanned by the rows
// of s (coefficients over the Dubiner basis of degree m: the x components in
// columns 0..np-1, the y components in np..2np-1) for k+1 edge moments per
// edge and the interior tests, which are evaluated with Dubiner functions of
// degree testDeg. Degrees of freedom are integrated with rules exact to
// degree ruleDeg.
func newHdivBasis(index, m int, s *mat.Dense, testDeg int, tests []vectorTest, ruleDeg int) (*hdivBasis, error) {
	np := PolyDim(m)
	n, cols := s.Dims()
	if cols != 2*np {
		panic("fem: prime coefficient matrix has the wrong width")
	}
	b := &hdivBasis{index: index, degree: m, n: n, np: np, perEdge: index + 1, nInside: len(tests)}
	if 3*b.perEdge+b.nInside != n {
		panic("fem: degrees of freedom do not match the prime space")
	}
	for i := 0; i < 3; i++ {
		for j := 0; j < b.perEdge; j++ {
			b.ents = append(b.ents, DofEntity{Kind: OnEdge, Index: i, Ordinal: j})
		}
	}
	for j := 0; j < b.nInside; j++ {
		b.ents = append(b.ents, DofEntity{Kind: Inside, Ordinal: j})
	}

	er, err := NewEdgeRule(ruleDeg)
	if err != nil {
		return nil, err
	}
	b.edgeS = er.Points
	ne := len(er.Points)
	b.edgeW = make([]float64, b.perEdge*ne)
	leg := make([]float64, b.perEdge)
	for q, sq := range er.Points {
		legendreUnitTo(leg, sq)
		for j, l := range leg {
			b.edgeW[j*ne+q] = er.Weights[q] * l
		}
	}
	tr, err := NewTriangleRule(ruleDeg)
	if err != nil {
		return nil, err
	}
	b.triPts = tr.Points
	nq := len(tr.Points)
	b.testW = make([][2]float64, b.nInside*nq)
	psiT := make([]float64, PolyDim(testDeg))
	for q, x := range tr.Points {
		if testDeg >= 0 {
			DubinerValuesTo(psiT, testDeg, x)
		}
		for m, tf := range tests {
			v := tf.eval(psiT, x)
			w := tr.Weights[q]
			b.testW[m*nq+q] = [2]float64{w * v[0], w * v[1]}
		}
	}

	// Dual matrix D[i][j] = dof_i(g_j).
	d := mat.NewDense(n, n, nil)
	col := make([]float64, n)
	psi := make([]float64, np)
	for j := 0; j < n; j++ {
		row := s.RawRowView(j)
		g := func(x [2]float64) [2]float64 {
			DubinerValuesTo(psi, m, x)
			var u [2]float64
			for i, p := range psi {
				u[0] += row[i] * p
				u[1] += row[np+i] * p
			}
			return u
		}
		b.dofsTo(col, g)
		d.SetCol(j, col)
	}
	c, cond, err := dualBasis(d, s)
	if err != nil {
		return nil, err
	}
	b.cond = cond
	b.cx = make([]float64, n*np)
	b.cy = make([]float64, n*np)
	for i := 0; i < n; i++ {
		copy(b.cx[i*np:(i+1)*np], c[i*2*np:i*2*np+np])
		copy(b.cy[i*np:(i+1)*np], c[i*2*np+np:(i+1)*2*np])
	}
	return b, nil
}

// projectTimesLinear returns the coefficients over the Dubiner basis of
// degree deg+1 of (lx(x) psi_j, ly(x) psi_j) for the Dubiner function psi_j
// of degree at most deg and the linear factors given as functions, computed
// by L2 projection with a rule exact for the products (so exactly, up to
// rounding). The result has length 2*PolyDim(deg+1): x components, then y
// components.
func projectTimesLinear(j, deg int, lx, ly func(x [2]float64) float64) ([]float64, error) {
	np := PolyDim(deg + 1)
	rule, err := NewTriangleRule(2*deg + 2)
	if err != nil {
		return nil, err
	}
	out := make([]float64, 2*np)
	psi := make([]float64, np)
	for q, x := range rule.Points {
		DubinerValuesTo(psi, deg+1, x)
		w := rule.Weights[q] * psi[j]
		fx, fy := w*lx(x), w*ly(x)
		for i, p := range psi {
			out[i] += fx * p
			out[np+i] += fy * p
		}
	}
	return out, nil
}

func (b *hdivBasis) valuesTo(dst [][2]float64, x [2]float64) {
	if len(dst) != b.n {
		panic(errShortDst)
	}
	var buf [maxScalarLen]float64
	psi := buf[:b.np]
	dubiner(psi, nil, b.degree, x)
	np := b.np
	for m := range dst {
		cx := b.cx[m*np : (m+1)*np]
		cy := b.cy[m*np : (m+1)*np]
		var ux, uy float64
		for j, p := range psi {
			ux += cx[j] * p
			uy += cy[j] * p
		}
		dst[m] = [2]float64{ux, uy}
	}
}

func (b *hdivBasis) divergencesTo(dst []float64, x [2]float64) {
	if len(dst) != b.n {
		panic(errShortDst)
	}
	var buf [maxScalarLen][2]float64
	g := buf[:b.np]
	dubiner(nil, g, b.degree, x)
	np := b.np
	for m := range dst {
		cx := b.cx[m*np : (m+1)*np]
		cy := b.cy[m*np : (m+1)*np]
		var dv float64
		for j, gj := range g {
			dv += cx[j]*gj[0] + cy[j]*gj[1]
		}
		dst[m] = dv
	}
}

// dofsTo applies the edge normal moments and the interior moments to u.
func (b *hdivBasis) dofsTo(dst []float64, u func(x [2]float64) [2]float64) {
	if len(dst) != b.n {
		panic(errShortDst)
	}
	for i := range dst {
		dst[i] = 0
	}
	ne := len(b.edgeS)
	for i := 0; i < 3; i++ {
		a, t := refEdge(i)
		nu := [2]float64{t[1], -t[0]}
		out := dst[i*b.perEdge : (i+1)*b.perEdge]
		for q, s := range b.edgeS {
			v := u([2]float64{a[0] + s*t[0], a[1] + s*t[1]})
			vn := v[0]*nu[0] + v[1]*nu[1]
			for j := range out {
				out[j] += b.edgeW[j*ne+q] * vn
			}
		}
	}
	out := dst[3*b.perEdge:]
	nq := len(b.triPts)
	for q, x := range b.triPts {
		v := u(x)
		for m := range out {
			w := b.testW[m*nq+q]
			out[m] += w[0]*v[0] + w[1]*v[1]
		}
	}
}

// dofRuleDegree is the degree of the edge and triangle rules with which the
// moment degrees of freedom of an element with prime degree m are
// integrated: max(2m+8, 18). This is exact for polynomial fields of degree
// m against the test functions with a margin, and integrates smooth
// non-polynomial fields (for example sin(x+2y)) to about 1e-14 on the
// reference triangle; on small mesh triangles the error is smaller still.
func dofRuleDegree(m int) int { return max(2*m+8, 18) }
