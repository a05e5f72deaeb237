package casefile

import (
	"math"
	"slices"
	"strings"

	"gopkg.in/yaml.v3"
)

// Keys allowed in a velocity condition, per kind.
var velocityKeys = map[VelocityKind][]string{
	Wall:       {"type", "speed"},
	Inflow:     {"type", "profile", "mean_speed", "vector"},
	Slip:       {"type"},
	Open:       {"type", "pressure"},
	StefanWall: {"type"},
}

// Keys allowed in a species condition, per kind.
var speciesKeys = map[SpeciesKind][]string{
	Impermeable:      {"type"},
	Flux:             {"type", "basis", "fluxes", "profile"},
	ConvectiveInflow: {"type", "mole_fractions"},
	Composition:      {"type", "mole_fractions", "impermeable"},
	Outflow:          {"type"},
}

var (
	velocityKinds = []string{string(Wall), string(Inflow), string(Slip), string(Open), string(StefanWall)}
	speciesKinds  = []string{string(Impermeable), string(Flux), string(ConvectiveInflow), string(Composition), string(Outflow)}
)

// boundaryNodes keeps the nodes of a decoded boundary for later checks.
type boundaryNodes struct {
	entry    *yaml.Node // key node of the boundary
	velocity *yaml.Node
	species  *yaml.Node
}

// boundaries decodes the boundary conditions and checks them against the
// geometry (geo may be nil when the geometry was invalid).
func (d *decoder) boundaries(n *yaml.Node, sp *speciesSet, geo *geometryNames, c *Case) {
	const path = "boundaries"
	m := d.mapping(n, path, nil)
	if m == nil {
		return
	}
	nodes := map[string]boundaryNodes{}
	for _, e := range m.entries {
		bp := join(path, e.key)
		if geo != nil && !geo.has(e.key) {
			d.fail(e.kNode, bp, "no boundary %q in the geometry; its boundaries are %s", clip(e.key), strings.Join(geo.names, ", "))
			continue
		}
		bm := d.mapping(e.vNode, bp, []string{"velocity", "species"})
		if bm == nil {
			continue
		}
		b := Boundary{Name: e.key, Pos: d.pos(e.kNode)}
		bn := boundaryNodes{entry: e.kNode}
		if vn := d.require(bm, "velocity", "give the velocity condition: "+strings.Join(velocityKinds, ", ")); vn != nil {
			bn.velocity = vn
			d.velocity(vn, join(bp, "velocity"), &b.Velocity)
		}
		b.Species.Kind = Impermeable
		if sn := bm.get("species"); sn != nil {
			bn.species = sn
			d.speciesBC(sn, join(bp, "species"), sp, e.key, &b.Species)
		} else {
			bn.species = e.kNode
		}
		nodes[e.key] = bn
		c.Boundaries = append(c.Boundaries, b)
	}
	slices.SortFunc(c.Boundaries, func(a, b Boundary) int { return strings.Compare(a.Name, b.Name) })
	if geo == nil {
		return
	}
	var missing []string
	for _, name := range geo.names {
		if _, ok := m.byKey[name]; !ok {
			missing = append(missing, name)
		}
	}
	if len(missing) > 0 {
		what := "boundary"
		if len(missing) > 1 {
			what = "boundaries"
		}
		d.fail(n, path, "no condition for the %s %s of the geometry; every boundary needs one", what, strings.Join(missing, ", "))
	}
	d.boundaryChecks(n, geo, c, nodes)
}

// velocity decodes a velocity condition: a kind, or a mapping with type.
func (d *decoder) velocity(n *yaml.Node, path string, v *VelocityBC) {
	m, w, ok := d.conditionKind(n, path, "velocity", velocityKinds)
	if !ok {
		return
	}
	v.Kind = VelocityKind(w)
	if m != nil {
		d.restrict(m, velocityKeys[v.Kind], "by velocity type "+w)
	}
	switch v.Kind {
	case Wall:
		if s := m.get("speed"); s != nil {
			v.Speed, _ = d.quantity(s, join(path, "speed"), kindVelocity)
		}
	case Open:
		if p := m.get("pressure"); p != nil {
			v.Pressure, _ = d.quantity(p, join(path, "pressure"), kindPressure)
		}
	case Inflow:
		v.Profile = Uniform
		if m == nil {
			d.fail(n, path, "an inflow needs mean_speed or vector; write it as a mapping, e.g. {type: inflow, mean_speed: 1 cm/s}")
			return
		}
		if p := m.get("profile"); p != nil {
			if w, ok := d.word(p, join(path, "profile"), []string{string(Uniform), string(Parabolic)}); ok {
				v.Profile = Profile(w)
			}
		}
		ms, vec := m.get("mean_speed"), m.get("vector")
		switch {
		case ms != nil && vec != nil:
			d.fail(m.keyNode("vector"), join(path, "vector"), "give mean_speed or vector, not both")
		case ms != nil:
			v.MeanSpeed, _ = d.positive(ms, join(path, "mean_speed"), kindVelocity)
		case vec != nil:
			v.Vector, v.HasVector = d.vector(vec, join(path, "vector"), kindVelocity)
			if v.Profile == Parabolic {
				d.fail(m.keyNode("profile"), join(path, "profile"), "a parabolic inflow is given by mean_speed; vector gives a uniform one")
			}
		default:
			d.fail(n, path, "an inflow needs mean_speed (into the domain) or vector")
		}
	}
}

// speciesBC decodes a species condition: a kind, or a mapping with type.
func (d *decoder) speciesBC(n *yaml.Node, path string, sp *speciesSet, boundary string, s *SpeciesBC) {
	m, w, ok := d.conditionKind(n, path, "species", speciesKinds)
	if !ok {
		return
	}
	s.Kind = SpeciesKind(w)
	if m == nil {
		switch s.Kind {
		case Flux:
			d.fail(n, path, "a flux condition needs basis and fluxes; write it as a mapping")
		case ConvectiveInflow, Composition:
			d.fail(n, path, "a %s condition needs mole_fractions; write it as a mapping", w)
		}
		return
	}
	d.restrict(m, speciesKeys[s.Kind], "by species type "+w)
	switch s.Kind {
	case Flux:
		bn := d.require(m, "basis", "say whether the fluxes are molar (mol/(m^2 s)) or mass (kg/(m^2 s)) fluxes")
		if bn == nil {
			return
		}
		b, ok := d.word(bn, join(path, "basis"), []string{string(MolarBasis), string(MassBasis)})
		if !ok {
			return
		}
		s.Basis = FluxBasis(b)
		k := kindMolarFlux
		if s.Basis == MassBasis {
			k = kindMassFlux
		}
		if fn := d.require(m, "fluxes", "give the outward normal flux of each species (unlisted species: 0)"); fn != nil {
			s.Fluxes, _ = d.perSpecies(fn, join(path, "fluxes"), sp, false, func(v *yaml.Node, p string) (float64, bool) {
				return d.quantity(v, p, k)
			})
		}
		s.Profile = Uniform
		if p := m.get("profile"); p != nil {
			if w, ok := d.word(p, join(path, "profile"), []string{string(Uniform), string(Parabolic)}); ok {
				s.Profile = Profile(w)
			}
		}
	case ConvectiveInflow, Composition:
		if xn := d.require(m, "mole_fractions", "give the composition as mole fractions"); xn != nil {
			s.MoleFractions, _ = d.composition(xn, join(path, "mole_fractions"), sp, "on boundary \""+boundary+"\"")
		}
		if in := m.get("impermeable"); in != nil {
			ip := join(path, "impermeable")
			if in.Kind != yaml.SequenceNode {
				d.fail(in, ip, "give a list of species names, e.g. [air]")
				return
			}
			s.Impermeable = make([]bool, len(sp.names))
			count := 0
			for _, k := range in.Content {
				if k.Kind != yaml.ScalarNode {
					d.fail(k, ip, "give species names")
					return
				}
				i, ok := sp.lookup(d, k, ip)
				if !ok {
					return
				}
				if s.Impermeable[i] {
					d.fail(k, ip, "species %q listed twice", k.Value)
					return
				}
				s.Impermeable[i] = true
				count++
			}
			if count == len(sp.names) {
				d.fail(in, ip, "every species is impermeable; use type impermeable instead")
			}
		}
	}
}

// boundaryChecks checks the conditions against each other and the
// geometry.
func (d *decoder) boundaryChecks(n *yaml.Node, geo *geometryNames, c *Case, nodes map[string]boundaryNodes) {
	allOutflow := len(c.Boundaries) > 0
	for i := range c.Boundaries {
		b := &c.Boundaries[i]
		bn := nodes[b.Name]
		bp := join("boundaries", b.Name)
		if b.Species.Kind != Outflow {
			allOutflow = false
		}
		switch {
		case b.Species.Kind == ConvectiveInflow && b.Velocity.Kind != "" && b.Velocity.Kind != Inflow:
			d.fail(bn.species, join(bp, "species"), "convective-inflow needs velocity type inflow (it takes the flux from the inflow velocity), got %s", b.Velocity.Kind)
		case b.Species.Kind == Outflow && b.Velocity.Kind != "" && b.Velocity.Kind != Open:
			d.fail(bn.species, join(bp, "species"), "outflow needs velocity type open, got %s", b.Velocity.Kind)
		case b.Species.Kind == Composition && b.Velocity.Kind == StefanWall && !anyTrue(b.Species.Impermeable):
			d.fail(bn.species, join(bp, "species"), "composition data for every species on a stefan-wall leave its normal velocity undetermined (the exchanged mass flux is whatever the wall lets through); list the species that do not cross the wall under impermeable, e.g. the solvent at a dissolving solid, or give fluxes (formulation note, section 10 item 3)")
		case b.Species.Kind == Composition && b.Velocity.Kind == Wall && !anyTrue(b.Species.Impermeable):
			d.warn(bn.species, join(bp, "species"), "composition data for every species on a no-slip wall describe a reservoir, not a wall; if the wall exchanges mass use velocity type stefan-wall (formulation note, section 10 item 3)")
		}
		if b.Species.Kind == Composition && !geo.layers[b.Name] {
			var zero []string
			for j, x := range b.Species.MoleFractions {
				if x == 0 && !(j < len(b.Species.Impermeable) && b.Species.Impermeable[j]) {
					zero = append(zero, c.Species[j].Name)
				}
			}
			if len(zero) > 0 {
				d.warn(bn.species, join(bp, "species"), "mole fraction 0 for %s: the solver raises it to %g, and the potential has a logarithmic layer here; grade the mesh toward this boundary (geometry.meshing.layers)",
					strings.Join(zero, ", "), c.Solver.MoleFractionFloor)
			}
		}
		segs := geo.segments[b.Name]
		if b.Velocity.Kind == Inflow && b.Velocity.Profile == Parabolic && !collinear(segs) {
			d.fail(bn.velocity, join(bp, "velocity"), "a parabolic inflow needs a straight boundary; the segments of %q are not on one line", b.Name)
		}
		if b.Species.Kind == Flux && b.Species.Profile == Parabolic && !collinear(segs) {
			d.fail(bn.species, join(bp, "species"), "parabolic fluxes need a straight boundary; the segments of %q are not on one line", b.Name)
		}
		if b.Velocity.Kind == Slip && !axisParallel(segs) {
			d.warn(bn.velocity, join(bp, "velocity"), "slip on segments not parallel to a coordinate axis: the solver supports slip only on axis-parallel segments")
		}
	}
	if allOutflow {
		d.fail(n, "boundaries", "species outflow on every boundary leaves no inflow or composition data")
	}
	d.flowThroughClosureChecks(c, nodes)
}

// flowThroughClosureChecks warns about the plain ideal gas in flow-through
// cases (an outflow boundary), where the augmentation's residual
// accumulates along the flow and the total concentration drifts from the
// equation of state (docs/outflow.md); ideal-gas-at-pressure keeps it there.
func (d *decoder) flowThroughClosureChecks(c *Case, nodes map[string]boundaryNodes) {
	if c.Thermodynamics.Model != IdealGas {
		return
	}
	for _, b := range c.Boundaries {
		if b.Species.Kind == Outflow {
			d.warn(nodes[b.Name].species, join(join("boundaries", b.Name), "species"), "with outflow and thermodynamics ideal-gas the total concentration can drift from the equation of state along the flow (3 %% in the channel benchmark; a 10-height channel diverged); ideal-gas-at-pressure keeps it on the equation of state (docs/outflow.md)")
			return
		}
	}
}

// crossChecks relate sections to each other after all are decoded.
func (d *decoder) crossChecks(top *mapping, sp *speciesSet, geo *geometryNames, c *Case) {
	hasComposition := make([]bool, len(sp.names))
	anyData := false
	for _, b := range c.Boundaries {
		switch b.Species.Kind {
		case Composition:
			anyData = true
			for i := range hasComposition {
				hasComposition[i] = true
			}
		case ConvectiveInflow:
			anyData = true
		}
	}
	in := top.get("initial")
	if !anyData && c.Initial.MoleFractions == nil && len(d.errs) == 0 {
		n := top.node
		if in != nil {
			n = in
		}
		d.fail(n, "initial.mole_fractions", "missing; no boundary gives a composition, so the fill composition is needed")
	}
	if c.Initial.Inventory != nil && in != nil {
		var ignored []string
		for i, v := range c.Initial.Inventory {
			if v != 0 && hasComposition[i] {
				ignored = append(ignored, sp.names[i])
			}
		}
		if len(ignored) > 0 {
			d.warn(child(in, "inventory"), "initial.inventory", "a composition boundary fixes the potential level of %s; their inventory is not used", strings.Join(ignored, ", "))
		}
	}
	if c.Viscosity.Model == Wilke && (c.Thermodynamics.Model == IdealSolution || c.Thermodynamics.Model == Margules) {
		d.warn(top.get("viscosity"), "viscosity.model", "Wilke's rule is for dilute gas mixtures, but the thermodynamic model is %s", c.Thermodynamics.Model)
	}
}

// collinear reports whether all segment end points lie on one line
// (relative tolerance 1e-9 of the extent).
func collinear(segs []segment) bool {
	if len(segs) == 0 {
		return true
	}
	p0 := segs[0][0]
	var far [2]float64
	var dmax float64
	for _, s := range segs {
		for _, p := range s {
			if dd := math.Hypot(p[0]-p0[0], p[1]-p0[1]); dd > dmax {
				far, dmax = p, dd
			}
		}
	}
	for _, s := range segs {
		for _, p := range s {
			if math.Abs(orient(p0, far, p)) > 1e-9*dmax*dmax {
				return false
			}
		}
	}
	return true
}

// axisParallel reports whether every segment is parallel to a coordinate
// axis (relative tolerance 1e-9).
func axisParallel(segs []segment) bool {
	for _, s := range segs {
		dx, dy := math.Abs(s[1][0]-s[0][0]), math.Abs(s[1][1]-s[0][1])
		if dx > 1e-9*dy && dy > 1e-9*dx {
			return false
		}
	}
	return true
}

// anyTrue reports whether some element of v is true.
func anyTrue(v []bool) bool {
	for _, b := range v {
		if b {
			return true
		}
	}
	return false
}

// conditionKind decodes the kind of a boundary condition written either as
// a bare word or as a mapping with the key type, from the allowed kinds. It
// returns the mapping (nil for a bare word) and the kind; ok is false when
// an error has been recorded.
func (d *decoder) conditionKind(n *yaml.Node, path, what string, kinds []string) (m *mapping, kind string, ok bool) {
	kn := n
	tp := path
	if n.Kind != yaml.ScalarNode {
		if m = d.mapping(n, path, nil); m == nil {
			return nil, "", false
		}
		if kn = d.require(m, "type", "give the "+what+" condition: "+strings.Join(kinds, ", ")); kn == nil {
			return nil, "", false
		}
		tp = join(path, "type")
	}
	kind, ok = d.word(kn, tp, kinds)
	return m, kind, ok
}
