package casefile

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strconv"
	"strings"

	"gopkg.in/yaml.v3"
)

// Load reads the case file at path, parses and validates it. Mesh files
// named in it are read relative to the directory of path. On failure the
// error is an Errors list of at most MaxErrors faults, each naming
// file:line:column and the key path.
func Load(path string) (*Case, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		msg := err.Error()
		var pe *fs.PathError
		if errors.As(err, &pe) {
			msg = "cannot read the case file: " + pe.Err.Error()
		}
		return nil, Errors{{Position: Position{File: path}, Message: msg}}
	}
	return parse(path, data, openFile)
}

// Parse parses and validates a case held in data. name is used in messages
// and as the case file's path: mesh files named in the case are read from
// the file system relative to filepath.Dir(name). Errors are as for Load.
func Parse(name string, data []byte) (*Case, error) {
	return parse(name, data, openFile)
}

// ParseFS is Parse with the mesh files named in the case read from fsys
// (paths relative to filepath.Dir(name), in the slash-separated form that
// io/fs uses) instead of the operating system's file system: for cases
// built in memory, for example by a program that generates its own mesh.
func ParseFS(name string, data []byte, fsys fs.FS) (*Case, error) {
	return parse(name, data, func(path string) (io.ReadCloser, error) {
		return fsys.Open(filepath.ToSlash(filepath.Clean(path)))
	})
}

// opener opens a mesh file named in a case.
type opener func(path string) (io.ReadCloser, error)

// openFile opens a regular file.
func openFile(path string) (io.ReadCloser, error) {
	fi, err := os.Stat(path)
	if err != nil {
		return nil, err
	}
	if !fi.Mode().IsRegular() {
		return nil, fmt.Errorf("%s is not a regular file", path)
	}
	return os.Open(path)
}

// yamlLineRE finds the line number in messages of the YAML parser.
var yamlLineRE = regexp.MustCompile(`^yaml: line (\d+): (.*)$`)

// parse is Parse with a mesh file opener.
func parse(name string, data []byte, open opener) (*Case, error) {
	d := &decoder{file: name}
	root := d.document(data)
	var c *Case
	if root != nil && d.checkAliases(root, 0) {
		c = d.decodeCase(root, filepath.Dir(name), open)
	}
	if len(d.errs) > 0 {
		sortErrors(d.errs)
		return nil, Errors(d.errs)
	}
	c.Source = name
	slices.SortStableFunc(d.warns, func(a, b Warning) int {
		if a.Line != b.Line {
			return a.Line - b.Line
		}
		return a.Column - b.Column
	})
	c.Warnings = d.warns
	return c, nil
}

// document parses data into a YAML tree and returns its root, or nil after
// recording an error.
func (d *decoder) document(data []byte) (root *yaml.Node) {
	defer func() {
		// The YAML library is third-party code fed arbitrary input; a
		// panic in it becomes an error, not a crash of the caller.
		if r := recover(); r != nil {
			d.errs = append(d.errs[:0], &Error{Position: Position{File: d.file}, Message: fmt.Sprintf("YAML parser failed: %v", r)})
			root = nil
		}
	}()
	dec := yaml.NewDecoder(bytes.NewReader(data))
	var doc yaml.Node
	if err := dec.Decode(&doc); err != nil {
		if errors.Is(err, io.EOF) {
			d.fail(nil, "", "empty case file")
		} else {
			d.yamlError(err)
		}
		return nil
	}
	var extra yaml.Node
	if err := dec.Decode(&extra); !errors.Is(err, io.EOF) {
		if err != nil {
			d.yamlError(err)
		} else {
			d.fail(&extra, "", "a second YAML document; a case file holds one")
		}
		return nil
	}
	if doc.Kind != yaml.DocumentNode || len(doc.Content) == 0 {
		d.fail(nil, "", "empty case file")
		return nil
	}
	root = doc.Content[0]
	if root.Kind == yaml.ScalarNode && root.Tag == "!!null" {
		d.fail(nil, "", "empty case file")
		return nil
	}
	return root
}

// yamlError records a syntax error of the YAML parser with its line.
func (d *decoder) yamlError(err error) {
	msg := err.Error()
	if m := yamlLineRE.FindStringSubmatch(msg); m != nil {
		line, _ := strconv.Atoi(m[1])
		d.errs = append(d.errs, &Error{Position: Position{File: d.file, Line: line}, Message: "YAML syntax: " + m[2]})
		return
	}
	d.fail(nil, "", "YAML syntax: %s", strings.TrimPrefix(msg, "yaml: "))
}

// Top-level keys.
var topKeys = []string{"title", "temperature", "reference_pressure", "species", "diffusivities",
	"thermodynamics", "viscosity", "gravity", "geometry", "discretisation",
	"boundaries", "initial", "solver", "output"}

// require returns the value of a required key, or records an error.
func (d *decoder) require(m *mapping, key, hint string) *yaml.Node {
	n := m.get(key)
	if n == nil {
		d.fail(m.node, join(m.path, key), "missing; %s", hint)
	}
	return n
}

// decodeCase decodes the top-level mapping.
func (d *decoder) decodeCase(root *yaml.Node, dir string, open opener) *Case {
	top := d.mapping(root, "", topKeys)
	if top == nil {
		return nil
	}
	c := &Case{}
	if n := top.get("title"); n != nil {
		c.Title, _ = d.str(n, "title")
	}
	if n := d.require(top, "temperature", "give the temperature, e.g. temperature: 300 K"); n != nil {
		c.Temperature, _ = d.positive(n, "temperature", kindTemperature)
	}
	if n := d.require(top, "reference_pressure", "give the reference pressure, e.g. reference_pressure: 101325 Pa"); n != nil {
		c.Pressure, _ = d.positive(n, "reference_pressure", kindPressure)
	}
	var sp *speciesSet
	if n := d.require(top, "species", "list the species, each with name and molar_mass"); n != nil {
		sp = d.species(n, c)
	}
	if n := top.get("gravity"); n != nil {
		c.Gravity, _ = d.vector(n, "gravity", kindAccel)
	}
	d.discretisation(top.get("discretisation"), &c.Discretisation)
	var geo *geometryNames
	if n := d.require(top, "geometry", "give one of rectangle, polygon or mesh_file"); n != nil {
		geo = d.geometry(n, dir, open, &c.Geometry)
	}
	if sp != nil {
		if n := d.require(top, "diffusivities", "give the Stefan–Maxwell diffusivity of every pair"); n != nil {
			c.Diffusivities = d.diffusivities(n, sp)
		}
		if n := d.require(top, "thermodynamics", "give the model: ideal-gas, ideal-gas-at-pressure, ideal-solution or margules"); n != nil {
			d.thermodynamics(n, sp, &c.Thermodynamics)
		}
		if n := d.require(top, "viscosity", "give a constant viscosity, e.g. viscosity: 1.8e-5 Pa s"); n != nil {
			d.viscosity(n, sp, c)
		}
		if n := top.get("initial"); n != nil {
			d.initial(n, sp, &c.Initial)
		}
	}
	nSpecies := len(c.Species)
	d.solver(top.get("solver"), nSpecies, &c.Solver)
	d.output(top.get("output"), c)
	if sp != nil {
		if n := d.require(top, "boundaries", "give a condition for every boundary of the geometry"); n != nil {
			d.boundaries(n, sp, geo, c)
		}
	}
	if sp != nil && geo != nil {
		d.crossChecks(top, sp, geo, c)
	}
	return c
}

// speciesSet is the validated species list with name lookup.
type speciesSet struct {
	names []string
	index map[string]int
}

// lookup returns the index of a species named by node k, or records an
// error listing the known names.
func (s *speciesSet) lookup(d *decoder, k *yaml.Node, path string) (int, bool) {
	i, ok := s.index[k.Value]
	if !ok {
		d.fail(k, path, "unknown species %q; the species are %s", clip(k.Value), strings.Join(s.names, ", "))
	}
	return i, ok
}

// speciesNameRE is what a species name may look like: a letter or digit,
// then letters, digits and _ . + - ( ) (e.g. H2O, Na+, SO4(2-)).
var speciesNameRE = regexp.MustCompile(`^[A-Za-z0-9][A-Za-z0-9_.+()-]{0,63}$`)

// species decodes the species list.
func (d *decoder) species(n *yaml.Node, c *Case) *speciesSet {
	items, ok := d.sequence(n, "species", "species (name and molar_mass)")
	if !ok {
		return nil
	}
	if len(items) < 2 {
		d.fail(n, "species", "a mixture needs at least 2 species, got %d", len(items))
		return nil
	}
	s := &speciesSet{index: make(map[string]int)}
	good := true
	for i, it := range items {
		path := index("species", i)
		m := d.mapping(it, path, []string{"name", "molar_mass"})
		if m == nil {
			good = false
			continue
		}
		var sp Species
		if nn := d.require(m, "name", "give the species name"); nn != nil {
			name, ok := d.str(nn, join(path, "name"))
			switch {
			case !ok:
				good = false
			case !speciesNameRE.MatchString(name):
				d.fail(nn, join(path, "name"), "species name %q: use letters, digits and _ . + - ( ), starting with a letter or digit, at most 64 characters", clip(name))
				good = false
			default:
				if j, dup := s.index[name]; dup {
					d.fail(nn, join(path, "name"), "species %q repeated (also species[%d])", name, j)
					good = false
				}
				sp.Name = name
			}
		} else {
			good = false
		}
		if mn := d.require(m, "molar_mass", "give the molar mass, e.g. molar_mass: 28.96 g/mol"); mn != nil {
			v, ok := d.positive(mn, join(path, "molar_mass"), kindMolarMass)
			good = good && ok
			sp.MolarMass = v
		} else {
			good = false
		}
		if sp.Name != "" {
			if _, dup := s.index[sp.Name]; !dup {
				s.index[sp.Name] = i
			}
		}
		s.names = append(s.names, sp.Name)
		c.Species = append(c.Species, sp)
	}
	if !good {
		return nil
	}
	return s
}

// perSpecies decodes a mapping species name -> quantity. When all is set
// every species must be listed. It returns the values in species order
// (zero for unlisted species).
func (d *decoder) perSpecies(n *yaml.Node, path string, sp *speciesSet, all bool,
	value func(v *yaml.Node, path string) (float64, bool)) ([]float64, bool) {
	m := d.mapping(n, path, nil)
	if m == nil {
		return nil, false
	}
	out := make([]float64, len(sp.names))
	seen := make([]bool, len(sp.names))
	ok := true
	for _, e := range m.entries {
		i, found := sp.lookup(d, e.kNode, join(path, e.key))
		if !found {
			ok = false
			continue
		}
		v, good := value(e.vNode, join(path, e.key))
		ok = ok && good
		out[i], seen[i] = v, true
	}
	if all && ok {
		var missing []string
		for i, s := range seen {
			if !s {
				missing = append(missing, sp.names[i])
			}
		}
		if len(missing) > 0 {
			d.fail(n, path, "missing for species %s; every species needs a value", strings.Join(missing, ", "))
			ok = false
		}
	}
	return out, ok
}

// MoleFractionSumTol is the largest |sum x_i - 1| a composition may have.
const MoleFractionSumTol = 1e-9

// composition decodes mole fractions (unlisted species 0), each in [0, 1],
// summing to one within MoleFractionSumTol. where names the place for the
// sum message.
func (d *decoder) composition(n *yaml.Node, path string, sp *speciesSet, where string) ([]float64, bool) {
	x, ok := d.perSpecies(n, path, sp, false, func(v *yaml.Node, p string) (float64, bool) {
		f, ok := d.nonNegative(v, p, kindNumber)
		if ok && f > 1 {
			d.fail(v, p, "mole fraction %g exceeds 1", f)
			return 0, false
		}
		return f, ok
	})
	if !ok {
		return nil, false
	}
	var sum float64
	for _, v := range x {
		sum += v
	}
	if math.Abs(sum-1) > MoleFractionSumTol {
		d.fail(n, path, "mole fractions %s sum to %.12g, not 1 (tolerance %g)", where, sum, MoleFractionSumTol)
		return nil, false
	}
	return x, true
}

// pairs decodes a nested mapping A: {B: value} of pair coefficients into
// an n*n symmetric matrix and a set mask. A pair may appear as (A, B) and
// (B, A) only with equal values.
func (d *decoder) pairs(n *yaml.Node, path string, sp *speciesSet,
	value func(v *yaml.Node, path string) (float64, bool)) (vals []float64, set []bool, ok bool) {
	ns := len(sp.names)
	vals, set = make([]float64, ns*ns), make([]bool, ns*ns)
	where := make([]int, ns*ns) // line of the first statement
	outer := d.mapping(n, path, nil)
	if outer == nil {
		return nil, nil, false
	}
	ok = true
	for _, e := range outer.entries {
		pa := join(path, e.key)
		i, found := sp.lookup(d, e.kNode, pa)
		if !found {
			ok = false
			continue
		}
		inner := d.mapping(e.vNode, pa, nil)
		if inner == nil {
			ok = false
			continue
		}
		for _, f := range inner.entries {
			pb := join(pa, f.key)
			j, found := sp.lookup(d, f.kNode, pb)
			if !found {
				ok = false
				continue
			}
			if i == j {
				d.fail(f.kNode, pb, "a pair needs two different species")
				ok = false
				continue
			}
			v, good := value(f.vNode, pb)
			if !good {
				ok = false
				continue
			}
			if set[i*ns+j] {
				old := vals[i*ns+j]
				if math.Abs(old-v) > 1e-12*math.Max(math.Abs(old), math.Abs(v)) {
					d.fail(f.vNode, pb, "pair (%s, %s) given twice with different values: %g (line %d) and %g",
						sp.names[i], sp.names[j], old, where[i*ns+j], v)
					ok = false
				}
				continue
			}
			set[i*ns+j], set[j*ns+i] = true, true
			vals[i*ns+j], vals[j*ns+i] = v, v
			where[i*ns+j], where[j*ns+i] = f.vNode.Line, f.vNode.Line
		}
	}
	return vals, set, ok
}

// diffusivities decodes the Stefan–Maxwell diffusivities; every pair is
// required.
func (d *decoder) diffusivities(n *yaml.Node, sp *speciesSet) []Pair {
	vals, set, ok := d.pairs(n, "diffusivities", sp, func(v *yaml.Node, p string) (float64, bool) {
		return d.positive(v, p, kindDiffusivity)
	})
	if !ok {
		return nil
	}
	ns := len(sp.names)
	var out []Pair
	var missing []string
	for i := 0; i < ns; i++ {
		for j := i + 1; j < ns; j++ {
			if !set[i*ns+j] {
				missing = append(missing, fmt.Sprintf("(%s, %s)", sp.names[i], sp.names[j]))
				continue
			}
			out = append(out, Pair{A: sp.names[i], B: sp.names[j], Value: vals[i*ns+j]})
		}
	}
	if len(missing) > 0 {
		d.fail(n, "diffusivities", "Stefan–Maxwell diffusivity missing for the pair%s %s; every pair of species needs one",
			plural(len(missing)), strings.Join(missing, ", "))
		return nil
	}
	return out
}

func plural(n int) string {
	if n == 1 {
		return ""
	}
	return "s"
}

// thermodynamics decodes the thermodynamic model.
func (d *decoder) thermodynamics(n *yaml.Node, sp *speciesSet, t *Thermodynamics) {
	const path = "thermodynamics"
	models := []string{string(IdealGas), string(IdealGasAtPressure), string(IdealSolution), string(Margules)}
	if n.Kind == yaml.ScalarNode {
		if s, ok := d.word(n, path, models); ok {
			t.Model = ThermoModel(s)
			if t.Model == IdealSolution || t.Model == Margules {
				d.fail(n, path, "model %s needs molar_volumes; write it as a mapping with keys model and molar_volumes", s)
			}
		}
		return
	}
	m := d.mapping(n, path, []string{"model", "molar_volumes", "interactions"})
	if m == nil {
		return
	}
	mn := d.require(m, "model", "give one of "+strings.Join(models, ", "))
	if mn == nil {
		return
	}
	s, ok := d.word(mn, join(path, "model"), models)
	if !ok {
		return
	}
	t.Model = ThermoModel(s)
	switch t.Model {
	case IdealGas, IdealGasAtPressure:
		d.restrict(m, []string{"model"}, "by the model "+s)
	case IdealSolution:
		d.restrict(m, []string{"model", "molar_volumes"}, "by the model "+s)
	case Margules:
		d.restrict(m, []string{"model", "molar_volumes", "interactions"}, "by the model "+s)
	}
	if t.Model == IdealSolution || t.Model == Margules {
		if vn := d.require(m, "molar_volumes", "give the partial molar volume of every species"); vn != nil {
			t.MolarVolumes, _ = d.perSpecies(vn, join(path, "molar_volumes"), sp, true, func(v *yaml.Node, p string) (float64, bool) {
				return d.positive(v, p, kindMolarVolume)
			})
		}
	}
	if t.Model == Margules {
		if in := m.get("interactions"); in != nil {
			vals, set, ok := d.pairs(in, join(path, "interactions"), sp, func(v *yaml.Node, p string) (float64, bool) {
				return d.quantity(v, p, kindNumber)
			})
			if ok {
				ns := len(sp.names)
				for i := 0; i < ns; i++ {
					for j := i + 1; j < ns; j++ {
						if set[i*ns+j] {
							t.Interactions = append(t.Interactions, Pair{A: sp.names[i], B: sp.names[j], Value: vals[i*ns+j]})
						}
					}
				}
			}
		}
	}
}

// viscosity decodes the viscosity: a scalar is a constant value.
func (d *decoder) viscosity(n *yaml.Node, sp *speciesSet, c *Case) {
	const path = "viscosity"
	v := &c.Viscosity
	if n.Kind == yaml.ScalarNode {
		v.Model = ConstantViscosity
		v.Value, _ = d.positive(n, path, kindViscosity)
		return
	}
	m := d.mapping(n, path, []string{"model", "value", "pure", "bulk"})
	if m == nil {
		return
	}
	models := []string{string(ConstantViscosity), string(Wilke)}
	if mn := m.get("model"); mn != nil {
		s, ok := d.word(mn, join(path, "model"), models)
		if !ok {
			return
		}
		v.Model = ViscosityModel(s)
	} else {
		v.Model = ConstantViscosity
	}
	if b := m.get("bulk"); b != nil {
		v.Bulk, _ = d.nonNegative(b, join(path, "bulk"), kindViscosity)
	}
	switch v.Model {
	case ConstantViscosity:
		d.restrict(m, []string{"model", "value", "bulk"}, "by the constant model")
		if vn := d.require(m, "value", "give the viscosity, e.g. value: 1.8e-5 Pa s"); vn != nil {
			v.Value, _ = d.positive(vn, join(path, "value"), kindViscosity)
		}
	case Wilke:
		d.restrict(m, []string{"model", "pure", "bulk"}, "by the wilke model")
		if pn := d.require(m, "pure", "give the viscosity of every pure species"); pn != nil {
			v.Pure, _ = d.perSpecies(pn, join(path, "pure"), sp, true, func(v *yaml.Node, p string) (float64, bool) {
				return d.positive(v, p, kindViscosity)
			})
		}
	}
}

// discretisation decodes the finite element choices (n may be nil).
func (d *decoder) discretisation(n *yaml.Node, t *Discretisation) {
	const path = "discretisation"
	*t = Discretisation{Degree: 2, Flux: BDM, Pair: TaylorHood, Formulation: TotalFlux}
	if n == nil {
		return
	}
	m := d.mapping(n, path, []string{"degree", "flux", "pair", "quadrature", "formulation"})
	if m == nil {
		return
	}
	if k := m.get("degree"); k != nil {
		if v, ok := d.integer(k, join(path, "degree"), 1, 4); ok {
			t.Degree = v
		}
	}
	if f := m.get("flux"); f != nil {
		if s, ok := d.word(f, join(path, "flux"), []string{string(BDM), string(RT)}); ok {
			t.Flux = FluxFamily(s)
		}
	}
	if p := m.get("pair"); p != nil {
		if s, ok := d.word(p, join(path, "pair"), []string{string(TaylorHood), string(ScottVogelius)}); ok {
			t.Pair = PairFamily(s)
		}
	}
	if q := m.get("quadrature"); q != nil {
		t.Quadrature, _ = d.integer(q, join(path, "quadrature"), 0, maxQuadrature)
	}
	if f := m.get("formulation"); f != nil {
		if s, ok := d.word(f, join(path, "formulation"), []string{string(TotalFlux), string(DiffusiveFlux)}); ok {
			t.Formulation = Formulation(s)
			t.FormulationPos = d.pos(f)
		}
	}
}

// maxQuadrature is the highest triangle rule degree accepted (the fem
// package's MaxQuadratureDegree).
const maxQuadrature = 60

// initial decodes the fill composition and inventory.
func (d *decoder) initial(n *yaml.Node, sp *speciesSet, in *Initial) {
	const path = "initial"
	m := d.mapping(n, path, []string{"mole_fractions", "inventory"})
	if m == nil {
		return
	}
	if x := m.get("mole_fractions"); x != nil {
		in.MoleFractions, _ = d.composition(x, join(path, "mole_fractions"), sp, "of the fill")
	}
	if v := m.get("inventory"); v != nil {
		in.Inventory, _ = d.perSpecies(v, join(path, "inventory"), sp, false, func(v *yaml.Node, p string) (float64, bool) {
			return d.positive(v, p, kindInventory)
		})
	}
}

// solver decodes the nonlinear solver settings (n may be nil).
func (d *decoder) solver(n *yaml.Node, nSpecies int, s *Solver) {
	const path = "solver"
	*s = Solver{Method: Anderson, Tolerance: 1e-10, MaxIterations: 60, AndersonDepth: 10,
		SpeciesAugmentation: AutoSpeciesAugmentation, Augmentation: 1, Update: PotentialUpdate, MoleFractionFloor: 1e-6}
	if n == nil {
		return
	}
	m := d.mapping(n, path, []string{"method", "tolerance", "max_iterations", "anderson_depth",
		"species_augmentation", "augmentation", "update", "mole_fraction_floor"})
	if m == nil {
		return
	}
	if v := m.get("method"); v != nil {
		if w, ok := d.word(v, join(path, "method"), []string{string(Anderson), string(Picard), string(NewtonKrylov)}); ok {
			s.Method = Method(w)
		}
	}
	if v := m.get("tolerance"); v != nil {
		if t, ok := d.positive(v, join(path, "tolerance"), kindNumber); ok {
			if t >= 1 {
				d.fail(v, join(path, "tolerance"), "%g is not below 1 (it is a relative residual)", t)
			}
			s.Tolerance = t
		}
	}
	if v := m.get("max_iterations"); v != nil {
		if k, ok := d.integer(v, join(path, "max_iterations"), 1, 100000); ok {
			s.MaxIterations = k
		}
	}
	if v := m.get("anderson_depth"); v != nil {
		if k, ok := d.integer(v, join(path, "anderson_depth"), 1, 100); ok {
			s.AndersonDepth = k
		}
		if s.Method != Anderson {
			d.warn(v, join(path, "anderson_depth"), "used only by method anderson; method is %s", s.Method)
		}
	}
	if v := m.get("species_augmentation"); v != nil {
		text := strings.TrimSpace(v.Value)
		switch {
		case v.Kind == yaml.ScalarNode && text == "auto":
			s.SpeciesAugmentation = AutoSpeciesAugmentation
		case v.Kind == yaml.ScalarNode && text != "" && !strings.ContainsAny(text[:1], "0123456789.+-"):
			d.fail(v, join(path, "species_augmentation"), "%q is neither auto nor a number >= 0", clip(text))
		default:
			if b, ok := d.nonNegative(v, join(path, "species_augmentation"), kindNumber); ok {
				s.SpeciesAugmentation = b
			}
		}
	}
	if v := m.get("augmentation"); v != nil {
		if g, ok := d.positive(v, join(path, "augmentation"), kindNumber); ok {
			s.Augmentation = g
		}
	}
	if v := m.get("update"); v != nil {
		if w, ok := d.word(v, join(path, "update"), []string{string(PotentialUpdate), string(ConcentrationUpdate)}); ok {
			s.Update = Update(w)
		}
	}
	if v := m.get("mole_fraction_floor"); v != nil {
		if f, ok := d.positive(v, join(path, "mole_fraction_floor"), kindNumber); ok {
			if nSpecies > 0 && float64(nSpecies)*f >= 1 {
				d.fail(v, join(path, "mole_fraction_floor"), "%g is too large: %d species times the floor must stay below 1", f, nSpecies)
			}
			s.MoleFractionFloor = f
		}
	}
}

// probeNameRE is what a probe name may look like (it names output files).
var probeNameRE = regexp.MustCompile(`^[A-Za-z0-9][A-Za-z0-9_-]{0,63}$`)

// output decodes the output selection (n may be nil).
func (d *decoder) output(n *yaml.Node, c *Case) {
	const path = "output"
	o := &c.Output
	o.Fields = slices.Clone(AllFields)
	o.Subdivision = c.Discretisation.Degree + 1
	if n == nil {
		return
	}
	m := d.mapping(n, path, []string{"fields", "subdivision", "probes"})
	if m == nil {
		return
	}
	if f := m.get("fields"); f != nil {
		items, ok := d.sequence(f, join(path, "fields"), "field names")
		if ok {
			o.Fields = o.Fields[:0]
			names := make([]string, len(AllFields))
			for i, a := range AllFields {
				names[i] = string(a)
			}
			for i, it := range items {
				w, ok := d.word(it, index(join(path, "fields"), i), names)
				if !ok {
					continue
				}
				if slices.Contains(o.Fields, Field(w)) {
					d.fail(it, index(join(path, "fields"), i), "field %s listed twice", w)
					continue
				}
				o.Fields = append(o.Fields, Field(w))
			}
		}
	}
	if s := m.get("subdivision"); s != nil {
		if k, ok := d.integer(s, join(path, "subdivision"), 1, 8); ok {
			o.Subdivision = k
		}
	}
	if p := m.get("probes"); p != nil {
		items, ok := d.sequence(p, join(path, "probes"), "probe lines (name, from, to, points)")
		if !ok {
			return
		}
		seen := map[string]int{}
		for i, it := range items {
			pp := index(join(path, "probes"), i)
			pm := d.mapping(it, pp, []string{"name", "from", "to", "points"})
			if pm == nil {
				continue
			}
			pr := Probe{Points: 101}
			if nn := d.require(pm, "name", "give the probe a name"); nn != nil {
				if name, ok := d.str(nn, join(pp, "name")); ok {
					if !probeNameRE.MatchString(name) {
						d.fail(nn, join(pp, "name"), "probe name %q: use letters, digits, _ and -", clip(name))
					} else if j, dup := seen[name]; dup {
						d.fail(nn, join(pp, "name"), "probe %q repeated (also probes[%d])", name, j)
					}
					seen[name] = i
					pr.Name = name
				}
			}
			okA, okB := false, false
			if a := d.require(pm, "from", "give the start point [x, y]"); a != nil {
				pr.From, okA = d.vector(a, join(pp, "from"), kindLength)
				pr.FromPos = d.pos(a)
			}
			if b := d.require(pm, "to", "give the end point [x, y]"); b != nil {
				pr.To, okB = d.vector(b, join(pp, "to"), kindLength)
				pr.ToPos = d.pos(b)
			}
			if okA && okB && pr.From == pr.To {
				d.fail(pm.get("to"), join(pp, "to"), "the end point equals the start point")
			}
			if k := pm.get("points"); k != nil {
				pr.Points, _ = d.integer(k, join(pp, "points"), 2, 100000)
			}
			o.Probes = append(o.Probes, pr)
		}
	}
}
