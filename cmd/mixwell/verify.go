package main

import (
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"time"

	"github.com/spf13/cobra"

	"mixwell/verification"
)

// variantFlag ties a problem with element variants to the flag that picks
// the variant.
type variantFlag struct {
	flag     string
	problems []string
	what     string // what the variant chooses, for the help text
	// fallback lists the choices offered by shell completion while the
	// problem is not registered in this build.
	fallback []string
}

var variantFlags = []variantFlag{
	{"flux", []string{"mixed-poisson", "sosm"}, "`SPACE` of the flux", []string{"rt", "bdm"}},
	{"pair", []string{"stokes"}, "element `PAIR`", []string{"taylor-hood", "scott-vogelius"}},
}

var (
	meshChoices    = []string{"structured", "perturbed"}
	formatChoices  = []string{"table", "json"}
	flavourChoices = []string{"nonlinear", "frozen", "consistent"}
	// formulationChoices are the flux unknowns of --problem sosm.
	formulationChoices = []string{"total-flux", "diffusive-flux"}
	methodChoices      = []string{"anderson", "picard", "newton-krylov"}
)

type verifyOptions struct {
	problem string
	flux    string
	pair    string
	degree  int
	levels  int
	coarse  int
	mesh    string
	seed    uint64
	format  string
	plot    string
	quiet   bool

	species int
	flavour string
	// formulation selects the flux unknowns of --problem sosm.
	formulation string
	// stefanWall poses the sosm problem's bottom side as a Stefan wall
	// with composition data (diffusive-flux only).
	stefanWall bool
	method     string
	maxIter    int
	groupS     float64
	regime     string
	beta       float64

	thermodynamics string
	// meanSpeed is the mean inflow speed of --problem channel (m/s).
	meanSpeed float64
	// inlet is the inlet of --problem channel.
	inlet string
}

func newVerifyCmd(d deps) *cobra.Command {
	cmd, _ := newVerifyCmdOptions(d)
	return cmd
}

// newVerifyCmdOptions returns the verify command and the options its flags
// fill in.
func newVerifyCmdOptions(d deps) (*cobra.Command, *verifyOptions) {
	o := new(verifyOptions)
	cmd := &cobra.Command{
		Use:   "verify --problem NAME --degree K [flags]",
		Short: "Run a convergence study against a manufactured solution",
		Long: `Verify solves a problem with a known smooth solution on the unit square,
on a sequence of uniformly refined meshes, and reports the error in each
norm on every mesh together with the observed convergence rate and the rate
theory predicts. Observed rates close to the predicted ones are the evidence
that elements, assembly and linear solver are right.

--degree is always the degree k of the pressure or potential space (for
poisson, the Lagrange degree). For example, taylor-hood with --degree 2
uses quadratic pressures and cubic velocities, and rt with --degree 0 uses
the lowest-order Raviart–Thomas fluxes with piecewise constant potentials.

Problems in this build:
` + problemList(d.problems()) + `

Output goes to stdout: a table (--format table) or a JSON object
(--format json) with the keys problem, variant, degree, mesh, h, unknowns,
errors (per norm, one error per level), rates (observed rate on the finest
pair of levels), expected (theoretical rates, same keys as rates),
pair_rates (observed rate for every consecutive pair of levels) and
residuals (relative residual of the linear solve per level). The coupled
Stokes–Onsager–Stefan–Maxwell problem (sosm) adds flavour, species, S, beta,
formulation, method, iterations (nonlinear iterations per level, 1 for the frozen
layer), conservation (largest element-wise species conservation defect per
level) and mass_average (||v - sum J/rho|| relative to the largest of ||v|| and ||J_i/rho||, per level).
With --formulation diffusive-flux the unknowns are the diffusive fluxes of
all species but the last, relative to the mass-average velocity, so
mass_average is zero by construction and is left out; conservation then
covers those species, and conservation_last_species the last one.
--stefan-wall (diffusive-flux only) poses the bottom side as a Stefan wall
with composition data and the last species impermeable, data from the
exact solution, and reports stefan_wall. When stderr
is a terminal, a progress line per solved level is printed there unless
--quiet: a bar of the work done (counted in unknowns), the level and its
size and time.`,
		Example: `  # Lagrange elements of degree 3, table on stdout
  mixwell verify --problem poisson --degree 3 --levels 4

  # Brezzi–Douglas–Marini fluxes with piecewise linear potentials, as JSON
  mixwell verify --problem mixed-poisson --flux bdm --degree 1 --levels 4 --format json

  # Scott–Vogelius on randomly perturbed meshes, with a log–log plot
  mixwell verify --problem stokes --pair scott-vogelius --degree 2 --levels 3 \
      --mesh perturbed --seed 7 --plot stokes-sv2.png

  # Three species, Taylor–Hood P2/P1 with BDM2 fluxes, nonlinear layer
  mixwell verify --problem sosm --species 3 --degree 1 --levels 4 --format json`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			cfg, err := o.config(cmd, d.problems())
			if err != nil {
				return err
			}
			// From here on the flags are well formed; failures are not
			// misuse, so they print one error line without usage text.
			cmd.SilenceUsage = true
			return runVerify(cmd, d, o, cfg)
		},
	}

	f := cmd.Flags()
	infos := d.problems()
	f.StringVar(&o.problem, "problem", "", "`NAME` of the problem to solve (required): "+listOrNone(append(problemNames(infos), channelProblem)))
	for _, v := range variantFlags {
		target := &o.flux
		if v.flag == "pair" {
			target = &o.pair
		}
		f.StringVar(target, v.flag, "", variantUsage(v, infos))
	}
	f.IntVar(&o.degree, "degree", 0, "degree `K` of the pressure or potential space; for poisson, the Lagrange degree (required)")
	f.IntVar(&o.levels, "levels", 4, "number `L` of meshes, each a uniform refinement of the one before (at least 2)")
	f.IntVar(&o.coarse, "coarse", 0, "`N` cells per side on the coarsest mesh (0: the problem's default for the degree)")
	f.StringVar(&o.mesh, "mesh", "structured", "coarse mesh `KIND`: structured, or perturbed (vertices moved at random)")
	f.Uint64Var(&o.seed, "seed", 1, "seed `S` of the random perturbation (only with --mesh perturbed)")
	f.IntVar(&o.species, "species", 3, "number `N` of species of --problem sosm (2 to 6)")
	f.StringVar(&o.flavour, "flavour", "nonlinear", "manufactured `LAYER` of --problem sosm: nonlinear, frozen or consistent")
	f.BoolVar(&o.stefanWall, "stefan-wall", false, "with --formulation diffusive-flux: pose the bottom side as a Stefan wall with composition data, the last species impermeable")
	f.StringVar(&o.formulation, "formulation", "total-flux", "flux `UNKNOWNS` of --problem sosm or channel: total-flux (species mass fluxes) or diffusive-flux (fluxes relative to the mass-average velocity; sosm: frozen layer only)")
	f.StringVar(&o.method, "method", "anderson", "nonlinear `METHOD` of --problem sosm: anderson, picard or newton-krylov")
	f.IntVar(&o.maxIter, "max-iterations", 60, "most nonlinear iterations `M` per level (--problem sosm)")
	f.Float64Var(&o.groupS, "group-s", 0, "dimensionless group `S` of --problem sosm (0: 1 for frozen, 1e-7 otherwise)")
	f.StringVar(&o.regime, "regime", "", "`REGIME` of --problem sosm: unit (S = 1) or physical (S = 1e-7); the default depends on --flavour")
	f.Float64Var(&o.beta, "beta", 0, "one-sided species augmentation `BETA` of --problem sosm or channel (0: the default; negative: none)")
	f.StringVar(&o.thermodynamics, "thermodynamics", "ideal-gas", "`CLOSURE` of --problem channel: ideal-gas or ideal-gas-at-pressure")
	f.StringVar(&o.inlet, "inlet", verification.VelocityInlet, "`INLET` of --problem channel: velocity (parabolic velocity and convective-inflow fluxes) or mass-flux (parabolic species mass fluxes on a Stefan wall)")
	f.Float64Var(&o.meanSpeed, "mean-speed", 1, "mean inflow `SPEED` of --problem channel in m/s (Peclet number 6.25 per m/s)")
	f.StringVar(&o.format, "format", "table", "output `FORMAT`: table or json")
	f.StringVar(&o.plot, "plot", "", "also draw error against h on log–log axes into `FILE` (.png or .svg)")
	f.BoolVarP(&o.quiet, "quiet", "q", false, "print no progress lines")
	f.SortFlags = false

	registerVerifyCompletions(cmd, d)
	return cmd, o
}

// config checks the flags and turns them into a study configuration. Its
// errors are misuse of the command line.
func (o *verifyOptions) config(cmd *cobra.Command, infos []verification.ProblemInfo) (verification.Config, error) {
	var cfg verification.Config
	names := append(problemNames(infos), channelProblem)
	slices.Sort(names)
	if o.problem == "" {
		return cfg, fmt.Errorf("missing --problem (valid: %s)", listOrNone(names))
	}
	if o.problem == channelProblem {
		return o.channelConfig(cmd)
	}
	i := slices.IndexFunc(infos, func(p verification.ProblemInfo) bool { return p.Name == o.problem })
	if i < 0 {
		return cfg, fmt.Errorf("unknown problem %q (valid: %s)", o.problem, listOrNone(names))
	}
	info := infos[i]

	variant := ""
	flags := cmd.Flags()
	sosmPair, err := o.sosmPair(flags.Changed)
	if err != nil {
		return cfg, err
	}
	for _, v := range variantFlags {
		if !flags.Changed(v.flag) || v.flag == "pair" && sosmPair {
			continue
		}
		value := o.flux
		if v.flag == "pair" {
			value = o.pair
		}
		if !slices.Contains(v.problems, o.problem) {
			allowed := v.problems
			if v.flag == "pair" {
				allowed = append(slices.Clone(allowed), "sosm") // handled by sosmPair
			}
			return cfg, fmt.Errorf("--%s applies only to --problem %s, not to %s", v.flag, strings.Join(allowed, " or "), o.problem)
		}
		if !slices.Contains(info.Variants, value) {
			return cfg, fmt.Errorf("--%s %q is not available (valid: %s)", v.flag, value, listOrNone(info.Variants))
		}
		variant = value
	}
	if variant == "" && len(info.Variants) > 0 {
		variant = info.Variants[0]
	}
	if sosmPair && o.pair == "scott-vogelius" {
		if variant != "bdm" && variant != "scott-vogelius" {
			return cfg, fmt.Errorf("--pair scott-vogelius for --problem sosm comes with BDM fluxes, not --flux %s", variant)
		}
		variant = "scott-vogelius"
	}

	what := "problem " + o.problem
	if variant != "" {
		what += " with " + variant
	}
	degrees := info.Degrees[variant]
	if !flags.Changed("degree") {
		return cfg, fmt.Errorf("missing --degree: %s takes degrees %s", what, joinInts(degrees))
	}
	if !slices.Contains(degrees, o.degree) {
		return cfg, fmt.Errorf("%s has no degree %d (valid: %s)", what, o.degree, joinInts(degrees))
	}

	if o.levels < 2 {
		return cfg, fmt.Errorf("--levels must be at least 2 to observe a rate, got %d", o.levels)
	}
	if err := o.checkCoarseAndFormat(); err != nil {
		return cfg, err
	}
	if err := checkChoice("mesh", o.mesh, meshChoices); err != nil {
		return cfg, err
	}
	if flags.Changed("seed") && o.mesh != "perturbed" {
		return cfg, errors.New("--seed applies only to --mesh perturbed")
	}
	if flags.Changed("plot") {
		if _, err := verification.PlotFormat(o.plot); err != nil {
			return cfg, fmt.Errorf("--plot %q: the file name must end in .png or .svg", o.plot)
		}
	}

	for _, name := range []string{"thermodynamics", "mean-speed", "inlet"} {
		if flags.Changed(name) {
			return cfg, fmt.Errorf("--%s applies only to --problem channel, not to %s", name, o.problem)
		}
	}
	for _, name := range []string{"species", "flavour", "formulation", "stefan-wall", "method", "max-iterations", "group-s", "regime", "beta"} {
		if flags.Changed(name) && o.problem != "sosm" {
			which := "sosm"
			if slices.Contains([]string{"formulation", "method", "max-iterations", "beta"}, name) {
				which = "sosm or channel"
			}
			return cfg, fmt.Errorf("--%s applies only to --problem %s, not to %s", name, which, o.problem)
		}
	}
	if o.problem == "sosm" {
		if o.species < 2 || o.species > 6 {
			return cfg, fmt.Errorf("--species must be 2 to 6, got %d", o.species)
		}
		if err := checkChoice("flavour", o.flavour, flavourChoices); err != nil {
			return cfg, err
		}
		if err := checkChoice("formulation", o.formulation, formulationChoices); err != nil {
			return cfg, err
		}
		if o.formulation == "diffusive-flux" && o.flavour != "frozen" {
			return cfg, fmt.Errorf("--formulation diffusive-flux is built for --flavour frozen only, not %s", o.flavour)
		}
		if o.stefanWall && o.formulation != "diffusive-flux" {
			return cfg, errors.New("--stefan-wall applies only to --formulation diffusive-flux")
		}
		if o.formulation == "diffusive-flux" && flags.Changed("beta") {
			return cfg, errors.New("--beta does not apply to --formulation diffusive-flux, which needs no augmentation")
		}
		if err := o.checkIteration(); err != nil {
			return cfg, err
		}
		if o.groupS < 0 || math.IsNaN(o.groupS) || math.IsInf(o.groupS, 0) {
			return cfg, fmt.Errorf("--group-s must be positive and finite (or 0 for the default), got %g", o.groupS)
		}
		switch o.regime {
		case "":
		case "unit", "physical":
			if flags.Changed("group-s") {
				return cfg, errors.New("give --regime or --group-s, not both")
			}
			o.groupS = 1
			if o.regime == "physical" {
				o.groupS = 1e-7
			}
		default:
			return cfg, fmt.Errorf("unknown --regime %q (valid: unit, physical)", o.regime)
		}
		cfg.Species, cfg.Flavour, cfg.Method = o.species, o.flavour, o.method
		cfg.MaxIterations, cfg.S, cfg.Beta = o.maxIter, o.groupS, o.beta
		cfg.Formulation = o.formulation
		cfg.StefanWall = o.stefanWall
	}

	return verification.Config{
		Species:       cfg.Species,
		Flavour:       cfg.Flavour,
		Method:        cfg.Method,
		MaxIterations: cfg.MaxIterations,
		S:             cfg.S,
		Beta:          cfg.Beta,
		Formulation:   cfg.Formulation,
		StefanWall:    cfg.StefanWall,
		Problem:       o.problem,
		Variant:       variant,
		Degree:        o.degree,
		Levels:        o.levels,
		Coarse:        o.coarse,
		Perturbed:     o.mesh == "perturbed",
		Seed:          o.seed,
	}, nil
}

func runVerify(cmd *cobra.Command, d deps, o *verifyOptions, cfg verification.Config) error {
	stdout, stderr := cmd.OutOrStdout(), cmd.ErrOrStderr()
	if cfg.Problem == channelProblem {
		return runChannel(cmd, d, o, cfg)
	}

	// Find out before a possibly long study that the plot cannot be
	// written.
	if o.plot != "" {
		dir := filepath.Dir(o.plot)
		if fi, err := os.Stat(dir); err != nil {
			return fmt.Errorf("--plot %q: directory %q: %w", o.plot, dir, errors.Unwrap(err))
		} else if !fi.IsDir() {
			return fmt.Errorf("--plot %q: %q is not a directory", o.plot, dir)
		}
	}

	var progress func(level, unknowns int)
	if !o.quiet && d.isTerminal(stderr) {
		last := time.Now()
		progress = func(level, unknowns int) {
			now := time.Now()
			fmt.Fprintln(stderr, progressLine(level, cfg.Levels, unknowns, now.Sub(last)))
			last = now
		}
	}

	s, err := d.run(cfg, progress)
	if err != nil {
		return oneLine(err)
	}

	switch o.format {
	case "json":
		err = verification.WriteJSON(stdout, s)
	default:
		err = verification.WriteTable(stdout, s)
	}
	if err != nil {
		return fmt.Errorf("writing the results: %w", err)
	}

	if o.plot != "" {
		if err := verification.WritePlot(o.plot, s); err != nil {
			return oneLine(err)
		}
		if progress != nil {
			fmt.Fprintf(stderr, "plot written to %s\n", o.plot)
		}
	}
	return nil
}

// progressLine reports that level (counted from 0) of levels, with the
// given number of unknowns, has been solved, and how long it took.
func progressLine(level, levels, unknowns int, took time.Duration) string {
	// The bar counts unknowns, not levels: each level costs several times
	// the one before, so the share of work done is about the share of the
	// unknowns solved (the levels are uniform refinements, 4x each).
	done, all := 0.0, 0.0
	for l := 0; l < levels; l++ {
		w := math.Pow(4, float64(l))
		all += w
		if l <= level {
			done += w
		}
	}
	const width = 20
	n := int(math.Round(width * done / all))
	bar := strings.Repeat("#", n) + strings.Repeat(".", width-n)
	return fmt.Sprintf("[%s] level %d/%d solved (%d unknowns, %.1f s)", bar, level+1, levels, unknowns, took.Seconds())
}

func registerVerifyCompletions(cmd *cobra.Command, d deps) {
	fixed := func(choices ...string) cobra.CompletionFunc {
		return cobra.FixedCompletions(choices, cobra.ShellCompDirectiveNoFileComp)
	}
	must := func(err error) {
		if err != nil {
			panic("mixwell: registering completion: " + err.Error())
		}
	}

	must(cmd.RegisterFlagCompletionFunc("problem", func(*cobra.Command, []string, string) ([]cobra.Completion, cobra.ShellCompDirective) {
		var out []cobra.Completion
		for _, p := range d.problems() {
			out = append(out, cobra.CompletionWithDesc(p.Name, problemSummary(p)))
		}
		return out, cobra.ShellCompDirectiveNoFileComp
	}))
	for _, v := range variantFlags {
		must(cmd.RegisterFlagCompletionFunc(v.flag, func(*cobra.Command, []string, string) ([]cobra.Completion, cobra.ShellCompDirective) {
			for _, p := range d.problems() {
				if slices.Contains(v.problems, p.Name) {
					return p.Variants, cobra.ShellCompDirectiveNoFileComp
				}
			}
			return v.fallback, cobra.ShellCompDirectiveNoFileComp
		}))
	}
	must(cmd.RegisterFlagCompletionFunc("degree", func(c *cobra.Command, _ []string, _ string) ([]cobra.Completion, cobra.ShellCompDirective) {
		problem, _ := c.Flags().GetString("problem")
		for _, p := range d.problems() {
			if p.Name != problem {
				continue
			}
			variant := ""
			if len(p.Variants) > 0 {
				variant = p.Variants[0]
				for _, v := range variantFlags {
					if s, _ := c.Flags().GetString(v.flag); slices.Contains(v.problems, problem) && s != "" {
						variant = s
					}
				}
			}
			var out []cobra.Completion
			for _, k := range p.Degrees[variant] {
				out = append(out, strconv.Itoa(k))
			}
			return out, cobra.ShellCompDirectiveNoFileComp
		}
		return nil, cobra.ShellCompDirectiveNoFileComp
	}))
	must(cmd.RegisterFlagCompletionFunc("mesh", fixed(meshChoices...)))
	must(cmd.RegisterFlagCompletionFunc("format", fixed(formatChoices...)))
	must(cmd.RegisterFlagCompletionFunc("thermodynamics", fixed(channelClosures...)))
	must(cmd.RegisterFlagCompletionFunc("plot", cobra.FixedCompletions([]string{"png", "svg"}, cobra.ShellCompDirectiveFilterFileExt)))
}

// variantUsage is the help line of a variant flag, with the choices and the
// default taken from the registered problem when there is one.
func variantUsage(v variantFlag, infos []verification.ProblemInfo) string {
	choices := v.fallback
	var defaults []string
	for _, p := range infos {
		if slices.Contains(v.problems, p.Name) && len(p.Variants) > 0 {
			choices = p.Variants
			defaults = append(defaults, p.Variants[0]+" for "+p.Name)
		}
	}
	sorted := slices.Clone(choices)
	slices.Sort(sorted)
	u := v.what + " for --problem " + strings.Join(v.problems, " or ") + ": " + strings.Join(sorted, " or ")
	if len(defaults) > 0 {
		u += " (default " + strings.Join(defaults, ", ") + ")"
	}
	if v.flag == "flux" && slices.Contains(choices, "scott-vogelius") {
		// The sosm study names its Scott–Vogelius variant among the
		// fluxes: it changes the velocity–pressure pair, not the flux.
		u += "; for sosm, scott-vogelius means BDM fluxes with the Scott–Vogelius velocity–pressure pair instead of Taylor–Hood (the same as --pair scott-vogelius)"
	}
	if v.flag == "pair" {
		u += "; for --problem sosm, taylor-hood (the default) or scott-vogelius, with BDM fluxes"
	}
	return u
}

// sosmPair reports whether --pair was given for --problem sosm, where it
// selects the velocity–pressure pair of the coupled study (taylor-hood or
// scott-vogelius), and checks its value.
func (o *verifyOptions) sosmPair(changed func(name string) bool) (bool, error) {
	if o.problem != "sosm" || !changed("pair") {
		return false, nil
	}
	if o.pair != "taylor-hood" && o.pair != "scott-vogelius" {
		return false, fmt.Errorf("--pair %q is not available for --problem sosm (valid: scott-vogelius, taylor-hood)", o.pair)
	}
	return true, nil
}

func problemNames(infos []verification.ProblemInfo) []string {
	names := make([]string, len(infos))
	for i, p := range infos {
		names[i] = p.Name
	}
	return names
}

// problemSummary describes the variants and degrees of a problem, as in
// "rt: degrees 0, 1, 2; bdm: degrees 0, 1, 2".
func problemSummary(p verification.ProblemInfo) string {
	if len(p.Variants) == 0 {
		return "degrees " + joinInts(p.Degrees[""])
	}
	parts := make([]string, len(p.Variants))
	for i, v := range p.Variants {
		parts[i] = v + ": degrees " + joinInts(p.Degrees[v])
	}
	return strings.Join(parts, "; ")
}

// problemList is the list of problems for the help text, one per line.
func problemList(infos []verification.ProblemInfo) string {
	if len(infos) == 0 {
		return "  (none: no problem is registered in this build)"
	}
	names := make([]string, len(infos))
	width := 0
	for i, p := range infos {
		names[i] = p.Name
		for _, v := range variantFlags {
			if slices.Contains(v.problems, p.Name) {
				names[i] += " (--" + v.flag + ")"
			}
		}
		width = max(width, len(names[i]))
	}
	width = max(width, len(channelProblem))
	lines := make([]string, len(infos), len(infos)+1)
	for i, p := range infos {
		lines[i] = fmt.Sprintf("  %-*s  %s", width, names[i], problemSummary(p))
	}
	lines = append(lines, fmt.Sprintf("  %-*s  %s", width, channelProblem, "flow-through benchmark (docs/outflow.md): degrees 1, 2, 3"))
	return strings.Join(lines, "\n")
}

func listOrNone(names []string) string {
	if len(names) == 0 {
		return "none in this build"
	}
	return strings.Join(names, ", ")
}

func joinInts(v []int) string {
	if len(v) == 0 {
		return "none"
	}
	s := make([]string, len(v))
	for i, k := range v {
		s[i] = strconv.Itoa(k)
	}
	return strings.Join(s, ", ")
}

// checkChoice reports an error naming the flag and the valid values when
// value is not one of choices.
func checkChoice(flag, value string, choices []string) error {
	if !slices.Contains(choices, value) {
		return fmt.Errorf("unknown --%s %q (valid: %s)", flag, value, strings.Join(choices, ", "))
	}
	return nil
}

// checkCoarseAndFormat checks the flags every verify problem shares.
func (o *verifyOptions) checkCoarseAndFormat() error {
	if o.coarse < 0 {
		return fmt.Errorf("--coarse must be positive (or 0 for the default), got %d", o.coarse)
	}
	return checkChoice("format", o.format, formatChoices)
}

// checkIteration checks the nonlinear iteration flags.
func (o *verifyOptions) checkIteration() error {
	if err := checkChoice("method", o.method, methodChoices); err != nil {
		return err
	}
	if o.maxIter < 1 {
		return fmt.Errorf("--max-iterations must be positive, got %d", o.maxIter)
	}
	return nil
}
