package fem

// Tables of basis values at quadrature points, computed once per element
// and rule and then read by assembly.

// ScalarTable holds the values and reference gradients of the basis
// functions of a scalar element at a list of reference points, flattened
// point-major: entry q*Len+i belongs to point q and basis function i.
type ScalarTable struct {
	// Len is the number of basis functions.
	Len int
	// Points are the reference points (a copy of the input).
	Points [][2]float64
	// Values[q*Len+i] is basis function i at point q.
	Values []float64
	// Gradients[q*Len+i] is the reference gradient of basis function i at
	// point q.
	Gradients [][2]float64
}

// Tabulate evaluates the basis of e and its reference gradients at pts.
func Tabulate(e ScalarElement, pts [][2]float64) *ScalarTable {
	n := e.Len()
	t := &ScalarTable{
		Len:       n,
		Points:    append([][2]float64(nil), pts...),
		Values:    make([]float64, n*len(pts)),
		Gradients: make([][2]float64, n*len(pts)),
	}
	for q, x := range pts {
		e.ValuesTo(t.Values[q*n:(q+1)*n], x)
		e.GradientsTo(t.Gradients[q*n:(q+1)*n], x)
	}
	return t
}

// ValuesAt returns the values of all basis functions at point q (aliasing
// the table).
func (t *ScalarTable) ValuesAt(q int) []float64 { return t.Values[q*t.Len : (q+1)*t.Len] }

// GradientsAt returns the reference gradients of all basis functions at
// point q (aliasing the table).
func (t *ScalarTable) GradientsAt(q int) [][2]float64 {
	return t.Gradients[q*t.Len : (q+1)*t.Len]
}

// DivTable holds the values and reference divergences of the basis
// functions of an H(div) element at a list of reference points, flattened
// point-major: entry q*Len+i belongs to point q and basis function i.
type DivTable struct {
	// Len is the number of basis functions.
	Len int
	// Points are the reference points (a copy of the input).
	Points [][2]float64
	// Values[q*Len+i] is basis function i at point q.
	Values [][2]float64
	// Divergences[q*Len+i] is the reference divergence of basis function i
	// at point q.
	Divergences []float64
}

// TabulateDiv evaluates the basis of e and its reference divergences at pts.
func TabulateDiv(e DivElement, pts [][2]float64) *DivTable {
	n := e.Len()
	t := &DivTable{
		Len:         n,
		Points:      append([][2]float64(nil), pts...),
		Values:      make([][2]float64, n*len(pts)),
		Divergences: make([]float64, n*len(pts)),
	}
	for q, x := range pts {
		e.ValuesTo(t.Values[q*n:(q+1)*n], x)
		e.DivergencesTo(t.Divergences[q*n:(q+1)*n], x)
	}
	return t
}

// ValuesAt returns the values of all basis functions at point q (aliasing
// the table).
func (t *DivTable) ValuesAt(q int) [][2]float64 { return t.Values[q*t.Len : (q+1)*t.Len] }

// DivergencesAt returns the reference divergences of all basis functions at
// point q (aliasing the table).
func (t *DivTable) DivergencesAt(q int) []float64 {
	return t.Divergences[q*t.Len : (q+1)*t.Len]
}
