package physics

import (
	"mixwell/fem"
)

// Solution is a discrete solution of a Problem: the coefficient vector in
// the Discretisation's layout, with accessors per field. Fields are in the
// problem's scaled units.
type Solution struct {
	d *Discretisation
	// X is the coefficient vector (blocks vx, vy, p, J_1..J_n, mu_1..mu_n).
	X []float64
	// LinearResidual is the relative residual of the last linear solve.
	LinearResidual float64
	// frozen is the coefficient field the solution was computed with.
	frozen frozenField
}

// Discretisation returns the discretisation the solution belongs to.
func (s *Solution) Discretisation() *Discretisation { return s.d }

// Velocity returns the coefficients of velocity component c (0 or 1) in the
// velocity space d.V (aliasing X).
func (s *Solution) Velocity(c int) []float64 { return s.d.lay.Block(s.X, blockVX+c) }

// Pressure returns the pressure coefficients in d.P (aliasing X).
func (s *Solution) Pressure() []float64 { return s.d.lay.Block(s.X, blockP) }

// Flux returns the mass-flux coefficients of species i in d.F (aliasing X).
func (s *Solution) Flux(i int) []float64 { return s.d.lay.Block(s.X, blockJ0+i) }

// Potential returns the potential coefficients of species i in d.U
// (aliasing X).
func (s *Solution) Potential(i int) []float64 { return s.d.lay.Block(s.X, blockJ0+s.d.n+i) }

// SolveFrozen solves one linear step with the concentrations given by conc
// (c_i and grad c_i at a point, in mixture order) frozen as coefficients:
// the first verification layer of the formulation note, section 8. When
// the pressure or a potential was pinned to remove a null mode, the
// pressure is returned with zero mean and the potential with zero mean.
func (d *Discretisation) SolveFrozen(conc func(x [2]float64, c []float64, gradc [][2]float64)) (*Solution, error) {
	if len(d.outflow) > 0 {
		return nil, errOutflowFrozen
	}
	A, b, err := d.assemble(exactField{d: d, fn: conc})
	if err != nil {
		return nil, err
	}
	x, res, err := d.solveLinear(A, b)
	if err != nil {
		return nil, err
	}
	s := &Solution{d: d, X: x, LinearResidual: res, frozen: exactField{d: d, fn: conc}}
	d.restoreLevels(s)
	return s, nil
}

// restoreLevels shifts pinned fields to zero mean.
func (d *Discretisation) restoreLevels(s *Solution) {
	if d.pinnedP >= 0 {
		shiftMean(d.P, s.Pressure())
	}
	for i, g := range d.pinnedMu {
		if g >= 0 {
			shiftMean(d.U, s.Potential(i))
		}
	}
}

// shiftMean subtracts the mean of the field with coefficients c in the
// scalar space sp (constants are reproduced by both Lagrange and the
// discontinuous spaces).
func shiftMean(sp *fem.Space, c []float64) {
	mean := fem.Integrate(sp, c) / fem.Area(sp)
	one := make([]float64, len(c))
	fem.InterpolateScalar(one, sp, func([2]float64) float64 { return 1 })
	for i := range c {
		c[i] -= mean * one[i]
	}
}
