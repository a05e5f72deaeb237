package physics

import (
	"fmt"
	"math"
	"slices"
)

// Species is one chemical component of a mixture.
type Species struct {
	// Name identifies the species; it must be non-empty and unique
	// within a mixture.
	Name string
	// MolarMass is M_i in kg/mol; it must be positive and finite.
	MolarMass float64
}

// Pair is a coefficient that belongs to an unordered pair of species, such
// as a Stefan–Maxwell diffusivity D_AB = D_BA or a Margules interaction
// coefficient. Pair{A, B, v} and Pair{B, A, v} state the same datum.
type Pair struct {
	A, B  string
	Value float64
}

// pairConsistencyTol is the relative difference below which two statements
// of the same pair coefficient count as equal.
const pairConsistencyTol = 1e-12

// Mixture is a validated set of n >= 2 species with the symmetric matrix of
// Stefan–Maxwell diffusivities D_ij (i != j, m^2/s, or the diffusivity scale
// of a scaled mixture). It is immutable; use NewMixture.
type Mixture struct {
	n     int
	names []string
	mass  []float64      // M_i
	diff  []float64      // D_ij, row-major n*n, zero diagonal
	invD  []float64      // 1/D_ij, row-major n*n, zero diagonal
	index map[string]int // name -> position
}

// NewMixture returns the mixture of the given species with the Stefan–Maxwell
// diffusivities listed in diffusivities, one Pair per unordered pair of
// distinct species. A pair may be listed more than once (in either order)
// only with the same value. The returned error is a *DataError naming the
// species or pair at fault when there are fewer than two species, a name is
// empty or repeated, a molar mass is not positive and finite, a pair names an
// unknown species or a species with itself, a diffusivity is not positive and
// finite, a pair is given twice with different values, or a pair is missing.
func NewMixture(species []Species, diffusivities []Pair) (*Mixture, error) {
	n := len(species)
	if n < 2 {
		return nil, &DataError{Index: -1, Value: math.NaN(),
			Reason: fmt.Sprintf("a mixture needs at least 2 species, got %d", n)}
	}
	m := &Mixture{
		n:     n,
		names: make([]string, n),
		mass:  make([]float64, n),
		diff:  make([]float64, n*n),
		invD:  make([]float64, n*n),
		index: make(map[string]int, n),
	}
	for i, s := range species {
		if s.Name == "" {
			return nil, &DataError{Index: i, Value: math.NaN(),
				Reason: fmt.Sprintf("species %d has an empty name", i)}
		}
		if _, dup := m.index[s.Name]; dup {
			return nil, &DataError{Species: []string{s.Name}, Index: i, Value: math.NaN(),
				Reason: fmt.Sprintf("name repeated (entries %d and %d)", m.index[s.Name], i)}
		}
		if !(s.MolarMass > 0) || math.IsInf(s.MolarMass, 0) {
			return nil, &DataError{Species: []string{s.Name}, Index: i, Value: s.MolarMass,
				Reason: fmt.Sprintf("molar mass %g kg/mol is not positive and finite", s.MolarMass)}
		}
		m.index[s.Name] = i
		m.names[i] = s.Name
		m.mass[i] = s.MolarMass
	}
	if err := m.fillPairs(m.diff, diffusivities, "diffusivity", true); err != nil {
		return nil, err
	}
	for i := 0; i < n; i++ {
		for j := i + 1; j < n; j++ {
			if m.diff[i*n+j] == 0 {
				return nil, &DataError{Species: []string{m.names[i], m.names[j]}, Index: -1, Value: math.NaN(),
					Reason: "Stefan–Maxwell diffusivity missing"}
			}
			m.invD[i*n+j] = 1 / m.diff[i*n+j]
			m.invD[j*n+i] = m.invD[i*n+j]
		}
	}
	return m, nil
}

// fillPairs writes the symmetric pair coefficients into dst (n*n, zero on
// entry). Unlisted pairs stay zero. When positive is true every value must be
// positive; otherwise any finite value is accepted.
func (m *Mixture) fillPairs(dst []float64, pairs []Pair, what string, positive bool) error {
	n := m.n
	set := make([]bool, n*n)
	for k, p := range pairs {
		names := []string{p.A, p.B}
		i, okA := m.index[p.A]
		j, okB := m.index[p.B]
		switch {
		case !okA:
			return &DataError{Species: names, Index: k, Value: p.Value,
				Reason: fmt.Sprintf("%s given for unknown species %q", what, p.A)}
		case !okB:
			return &DataError{Species: names, Index: k, Value: p.Value,
				Reason: fmt.Sprintf("%s given for unknown species %q", what, p.B)}
		case i == j:
			return &DataError{Species: names, Index: k, Value: p.Value,
				Reason: fmt.Sprintf("%s of a species with itself is not defined", what)}
		case math.IsNaN(p.Value) || math.IsInf(p.Value, 0):
			return &DataError{Species: names, Index: k, Value: p.Value,
				Reason: fmt.Sprintf("%s %g is not finite", what, p.Value)}
		case positive && p.Value <= 0:
			return &DataError{Species: names, Index: k, Value: p.Value,
				Reason: fmt.Sprintf("%s %g is not positive", what, p.Value)}
		}
		if set[i*n+j] {
			old := dst[i*n+j]
			if math.Abs(old-p.Value) > pairConsistencyTol*math.Max(math.Abs(old), math.Abs(p.Value)) {
				return &DataError{Species: names, Index: k, Value: p.Value,
					Reason: fmt.Sprintf("%s given twice with different values %g and %g", what, old, p.Value)}
			}
			continue
		}
		set[i*n+j], set[j*n+i] = true, true
		dst[i*n+j], dst[j*n+i] = p.Value, p.Value
	}
	return nil
}

// Len returns the number of species n.
func (m *Mixture) Len() int { return m.n }

// Species returns species i.
func (m *Mixture) Species(i int) Species {
	return Species{Name: m.names[i], MolarMass: m.mass[i]}
}

// Name returns the name of species i.
func (m *Mixture) Name(i int) string { return m.names[i] }

// Index returns the position of the named species and whether it exists.
func (m *Mixture) Index(name string) (int, bool) {
	i, ok := m.index[name]
	return i, ok
}

// MolarMass returns M_i.
func (m *Mixture) MolarMass(i int) float64 { return m.mass[i] }

// Diffusivity returns the Stefan–Maxwell diffusivity D_ij = D_ji. It panics
// if i == j: D_ii is not defined.
func (m *Mixture) Diffusivity(i, j int) float64 {
	if i == j {
		panic("physics: Stefan–Maxwell diffusivity D_ii is not defined")
	}
	return m.diff[i*m.n+j]
}

// Scaled returns a copy of the mixture in the units of s: diffusivities
// divided by s.Diffusivity and molar masses by s.MolarMass().
func (m *Mixture) Scaled(s Scales) *Mixture {
	out := &Mixture{
		n:     m.n,
		names: append([]string(nil), m.names...),
		mass:  make([]float64, m.n),
		diff:  make([]float64, len(m.diff)),
		invD:  make([]float64, len(m.invD)),
		index: make(map[string]int, m.n),
	}
	mm := s.MolarMass()
	for i := range m.mass {
		out.mass[i] = m.mass[i] / mm
		out.index[m.names[i]] = i
	}
	for k := range m.diff {
		out.diff[k] = m.diff[k] / s.Diffusivity
		out.invD[k] = m.invD[k] * s.Diffusivity
	}
	return out
}

// MassFractionsTo writes the mass fractions w_i = M_i c_i / rho of the
// concentrations c into dst and returns the density rho = sum_i M_i c_i. It
// does not allocate. dst may be c.
func (m *Mixture) MassFractionsTo(dst, c []float64) (rho float64) {
	m.checkLen("MassFractionsTo: dst", len(dst))
	m.checkLen("MassFractionsTo: c", len(c))
	for i, ci := range c {
		rho += m.mass[i] * ci
	}
	for i, ci := range c {
		dst[i] = m.mass[i] * ci / rho
	}
	return rho
}

// CheckMoleFractions returns a *DataError naming the species at fault if a
// mole fraction is negative or not finite, or naming none if the mole
// fractions do not sum to one within MoleFractionSumTol.
func (m *Mixture) CheckMoleFractions(x []float64) error {
	m.checkLen("CheckMoleFractions: x", len(x))
	return checkComposition(m.names, x, false)
}

// CheckConcentrations returns a *DataError naming the species at fault if a
// concentration is negative or not finite, or naming none if the total
// concentration is not positive.
func (m *Mixture) CheckConcentrations(c []float64) error {
	m.checkLen("CheckConcentrations: c", len(c))
	var cT float64
	for i, ci := range c {
		if math.IsNaN(ci) || math.IsInf(ci, 0) || ci < 0 {
			return &DataError{Species: []string{m.names[i]}, Index: i, Value: ci,
				Reason: fmt.Sprintf("concentration %g is negative or not finite", ci)}
		}
		cT += ci
	}
	if !(cT > 0) {
		return &DataError{Index: -1, Value: cT, Reason: "total concentration is zero"}
	}
	return nil
}

// checkComposition validates mole fractions x for the named species: each
// finite and non-negative (positive when strict), summing to one within
// MoleFractionSumTol.
func checkComposition(names []string, x []float64, strict bool) error {
	var sum float64
	for i, xi := range x {
		if math.IsNaN(xi) || math.IsInf(xi, 0) || xi < 0 {
			return &DataError{Species: []string{names[i]}, Index: i, Value: xi,
				Reason: fmt.Sprintf("mole fraction %g is negative or not finite", xi)}
		}
		if strict && xi == 0 {
			return &DataError{Species: []string{names[i]}, Index: i, Value: xi,
				Reason: "mole fraction is zero, so its chemical potential is -infinity; raise it with FloorMoleFractionsTo"}
		}
		sum += xi
	}
	if math.Abs(sum-1) > MoleFractionSumTol {
		return &DataError{Index: -1, Value: sum,
			Reason: fmt.Sprintf("mole fractions sum to %.12g, not 1 (tolerance %g)", sum, MoleFractionSumTol)}
	}
	return nil
}

// FloorMoleFractionsTo writes into dst the mole fractions x with every entry
// below xMin raised to xMin and the others scaled by a common factor so that
// dst sums to one; it returns the indices of the raised species in
// increasing order, so that callers can warn about them (the potential of an
// absent species is -infinity; formulation note, section 5). xMin = 0 means
// DefaultMoleFractionFloor. dst may be x. It returns a *DataError if x fails
// CheckMoleFractions, or if xMin is negative or n*xMin >= 1. It allocates
// only the returned slice.
func (m *Mixture) FloorMoleFractionsTo(dst, x []float64, xMin float64) (floored []int, err error) {
	m.checkLen("FloorMoleFractionsTo: dst", len(dst))
	if err := m.CheckMoleFractions(x); err != nil {
		return nil, err
	}
	if xMin == 0 {
		xMin = DefaultMoleFractionFloor
	}
	if !(xMin > 0) || float64(m.n)*xMin >= 1 {
		return nil, &DataError{Index: -1, Value: xMin,
			Reason: fmt.Sprintf("mole fraction floor %g is not in (0, 1/n) for n = %d", xMin, m.n)}
	}
	copy(dst, x)
	// Raising species can push a scaled one below the floor; repeat until
	// no new species falls below it (at most n passes).
	for {
		added := false
		for i, v := range dst {
			if v < xMin && !slices.Contains(floored, i) {
				floored = append(floored, i)
				added = true
			}
		}
		if !added {
			break
		}
		var rest float64
		for i, v := range dst {
			if !slices.Contains(floored, i) {
				rest += v
			}
		}
		scale := (1 - float64(len(floored))*xMin) / rest
		for i := range dst {
			if slices.Contains(floored, i) {
				dst[i] = xMin
			} else {
				dst[i] *= scale
			}
		}
	}
	slices.Sort(floored)
	return floored, nil
}

// checkLen panics unless got equals the number of species.
func (m *Mixture) checkLen(what string, got int) {
	if got != m.n {
		panic(fmt.Sprintf("physics: %s has length %d, want %d", what, got, m.n))
	}
}
