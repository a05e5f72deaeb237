package verification

import (
	"fmt"
	"math"
	"sort"
	"strings"
)

// Config selects one convergence study.
type Config struct {
	// Problem is one of the names returned by Problems.
	Problem string
	// Variant selects the element pair within a problem: "rt" or "bdm" for
	// mixed-poisson, "taylor-hood" or "scott-vogelius" for stokes; empty
	// means the problem's default.
	Variant string
	// Degree is the degree k of the pressure or potential space (for
	// poisson, the Lagrange degree).
	Degree int
	// Levels is the number of meshes, each a uniform refinement of the
	// previous one; at least 2 so that a rate can be observed.
	Levels int
	// Coarse is the number of cells per side of the coarsest mesh; 0 means
	// the problem's default for the degree.
	Coarse int
	// Perturbed asks for a randomly perturbed coarse mesh (refined
	// uniformly, so every level has the same shape quality).
	Perturbed bool
	// Seed seeds the perturbation.
	Seed uint64
	// Clockwise permutes the local vertex order of every triangle at
	// random (same meshes, about half the triangles clockwise).
	Clockwise bool
	// Species is the number of species of the sosm problem (0 means 3).
	Species int
	// Flavour is the sosm manufactured-solution layer: "nonlinear" (the
	// default), "frozen" or "consistent".
	Flavour string
	// Method is the nonlinear iteration of the sosm problem: "anderson"
	// (the default), "picard" or "newton-krylov".
	Method string
	// MaxIterations bounds the nonlinear iterations per level (0: 60).
	MaxIterations int
	// S overrides the flavour's group S of the sosm problem (0: default).
	S float64
	// Beta is the one-sided species augmentation of the sosm problem
	// (physics.Problem.SpeciesAugmentation); negative means none, 0 the
	// default.
	Beta float64
	// Formulation is the sosm problem's choice of flux unknowns:
	// "total-flux" (the default: species mass fluxes J_i, remedies (a) and
	// (b) of docs/augmentation.md) or "diffusive-flux" (diffusive fluxes
	// j_i = J_i - w_i rho v of n-1 species, remedy (c); frozen flavour
	// only).
	Formulation string
	// StefanWall, for sosm with the diffusive-flux formulation, poses the
	// bottom side as a Stefan wall with composition data and the last
	// species impermeable (its exchange and tangential velocity taken from
	// the exact solution): a check of the wall's constraint rows.
	StefanWall bool
}

// Study is the result of a convergence study. Errors and rates are keyed by
// norm name (for example "velocity_H1"); Rates holds the observed rate on the
// finest pair of levels and Expected the rate theory predicts.
type Study struct {
	Problem  string               `json:"problem"`
	Variant  string               `json:"variant,omitempty"`
	Degree   int                  `json:"degree"`
	Mesh     string               `json:"mesh"`
	H        []float64            `json:"h"`
	Unknowns []int                `json:"unknowns"`
	Errors   map[string][]float64 `json:"errors"`
	Rates    map[string]float64   `json:"rates"`
	Expected map[string]float64   `json:"expected"`
	// PairRates holds the observed rate for every consecutive pair of levels.
	PairRates map[string][]float64 `json:"pair_rates"`
	// Residuals holds the relative residual ||Ax-b||/||b|| of the linear
	// solve on each level.
	Residuals []float64 `json:"residuals"`

	// The fields below belong to the coupled (sosm) problem.

	// Flavour is the manufactured-solution layer.
	Flavour string `json:"flavour,omitempty"`
	// Species is the number of species.
	Species int `json:"species,omitempty"`
	// S is the group S of the study.
	S float64 `json:"S,omitempty"`
	// Beta is the one-sided species augmentation of the study.
	Beta float64 `json:"beta,omitempty"`
	// Formulation names the flux unknowns ("total-flux" or
	// "diffusive-flux").
	Formulation string `json:"formulation,omitempty"`
	// StefanWall reports that the bottom side was a Stefan wall with
	// composition data (Config.StefanWall).
	StefanWall bool `json:"stefan_wall,omitempty"`
	// Method names the nonlinear iteration ("" for a frozen study).
	Method string `json:"method,omitempty"`
	// Iterations holds the number of nonlinear iterations per level (1
	// for a frozen study).
	Iterations []int `json:"iterations,omitempty"`
	// Conservation holds per level the largest element-wise species
	// conservation defect, relative.
	Conservation []float64 `json:"conservation,omitempty"`
	// ConservationLast holds per level, for the diffusive-flux
	// formulation only, the element conservation defect of the last
	// species, whose flux is minus the sum of the others' diffusive fluxes
	// plus its convective flux: its balance is the total mass row less the
	// others', exact per element with Scott–Vogelius and convergent, not
	// exact, with Taylor–Hood. Conservation then covers the other species.
	ConservationLast []float64 `json:"conservation_last_species,omitempty"`
	// MassAverage holds per level ||v - sum J/rho|| relative to the largest of ||v|| and ||J_i/rho||.
	MassAverage []float64 `json:"mass_average,omitempty"`
}

// Norms returns the norm names of the study in sorted order.
func (s *Study) Norms() []string {
	names := make([]string, 0, len(s.Errors))
	for k := range s.Errors {
		names = append(names, k)
	}
	sort.Strings(names)
	return names
}

// ObservedRate returns log(e0/e1)/log(h0/h1), the convergence rate between two
// levels with errors e0, e1 on meshes of size h0, h1.
func ObservedRate(e0, e1, h0, h1 float64) float64 {
	return math.Log(e0/e1) / math.Log(h0/h1)
}

// fillRates computes PairRates and Rates from H and Errors.
func (s *Study) fillRates() {
	s.PairRates = make(map[string][]float64, len(s.Errors))
	s.Rates = make(map[string]float64, len(s.Errors))
	for name, e := range s.Errors {
		r := make([]float64, 0, len(e))
		for l := 1; l < len(e); l++ {
			r = append(r, ObservedRate(e[l-1], e[l], s.H[l-1], s.H[l]))
		}
		s.PairRates[name] = r
		if len(r) > 0 {
			s.Rates[name] = r[len(r)-1]
		}
	}
}

// problem is one manufactured-solution study.
type problem struct {
	name     string
	variants []string // first is the default; nil if none
	// degrees returns the allowed degrees for a variant.
	degrees func(variant string) []int
	run     func(cfg Config, progress func(level, unknowns int)) (*Study, error)
}

var registry = map[string]*problem{}

func register(p *problem) { registry[p.name] = p }

// ProblemInfo describes a problem for help texts and error messages.
type ProblemInfo struct {
	Name     string
	Variants []string
	// Degrees maps each variant ("" if the problem has none) to its allowed
	// degrees.
	Degrees map[string][]int
}

// Problems lists the available problems in alphabetical order.
func Problems() []ProblemInfo {
	out := make([]ProblemInfo, 0, len(registry))
	for _, p := range registry {
		info := ProblemInfo{Name: p.name, Variants: p.variants, Degrees: map[string][]int{}}
		if len(p.variants) == 0 {
			info.Degrees[""] = p.degrees("")
		}
		for _, v := range p.variants {
			info.Degrees[v] = p.degrees(v)
		}
		out = append(out, info)
	}
	sort.Slice(out, func(i, j int) bool { return out[i].Name < out[j].Name })
	return out
}

// Run performs the convergence study described by cfg. progress, if not nil,
// is called after each level is solved.
func Run(cfg Config, progress func(level, unknowns int)) (*Study, error) {
	p, ok := registry[cfg.Problem]
	if !ok {
		names := make([]string, 0, len(registry))
		for n := range registry {
			names = append(names, n)
		}
		sort.Strings(names)
		return nil, fmt.Errorf("verification: unknown problem %q (valid: %s)", cfg.Problem, strings.Join(names, ", "))
	}
	if len(p.variants) == 0 && cfg.Variant != "" {
		return nil, fmt.Errorf("verification: problem %q has no variants, got %q", cfg.Problem, cfg.Variant)
	}
	if len(p.variants) > 0 {
		if cfg.Variant == "" {
			cfg.Variant = p.variants[0]
		}
		found := false
		for _, v := range p.variants {
			found = found || v == cfg.Variant
		}
		if !found {
			return nil, fmt.Errorf("verification: problem %q has no variant %q (valid: %s)", cfg.Problem, cfg.Variant, strings.Join(p.variants, ", "))
		}
	}
	degrees := p.degrees(cfg.Variant)
	okDeg := false
	for _, d := range degrees {
		okDeg = okDeg || d == cfg.Degree
	}
	if !okDeg {
		return nil, fmt.Errorf("verification: problem %q %s does not support degree %d (valid: %v)", cfg.Problem, cfg.Variant, cfg.Degree, degrees)
	}
	if cfg.Levels < 2 {
		return nil, fmt.Errorf("verification: need at least 2 levels to observe a rate, got %d", cfg.Levels)
	}
	if cfg.Levels > 8 {
		return nil, fmt.Errorf("verification: at most 8 levels are allowed, got %d", cfg.Levels)
	}
	if cfg.Coarse < 0 {
		return nil, fmt.Errorf("verification: coarse mesh cells per side must be positive, got %d", cfg.Coarse)
	}
	s, err := p.run(cfg, progress)
	if err != nil {
		return nil, err
	}
	s.fillRates()
	return s, nil
}
