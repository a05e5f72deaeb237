package main

import (
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"syscall"
	"time"

	"github.com/spf13/cobra"

	"mixwell/casefile"
	"mixwell/physics"
	"mixwell/results"
	"mixwell/simulate"
)

// Results are sampled from the outcome of a solve.
var _ results.Sampler = (*simulate.Outcome)(nil)

// caution ends the report of every solve.
const caution = "Caution: these results are model predictions. Check them against measurements or " +
	"independent calculations, and have them reviewed under the applicable codes and licensed " +
	"professional practice, before relying on them."

// solveOptions are the flags shared by run and demo.
type solveOptions struct {
	out     string
	quiet   bool
	logJSON bool
}

// addSolveFlags declares the flags of solveOptions on cmd.
func addSolveFlags(cmd *cobra.Command, o *solveOptions, outDefault, outUsage string) {
	f := cmd.Flags()
	f.StringVarP(&o.out, "out", "o", outDefault, outUsage)
	f.BoolVarP(&o.quiet, "quiet", "q", false, "print no iteration table (warnings, the result summary and errors still print)")
	f.BoolVar(&o.logJSON, "log-json", false, "print one JSON object per iteration to stderr instead of the table, terminal or not")
	cmd.MarkFlagsMutuallyExclusive("quiet", "log-json")
	if err := cmd.MarkFlagDirname("out"); err != nil {
		panic("mixwell: registering completion: " + err.Error())
	}
	f.SortFlags = false
}

func newRunCmd(d deps) *cobra.Command {
	var o solveOptions
	cmd := &cobra.Command{
		Use:   "run CASE.yaml --out DIR",
		Short: "Solve a case and write fields, fluxes, probes and figures",
		Long: `Run reads a case file (its format: docs/case-format.md), checks it as
"mixwell check" does, solves the coupled flow and multicomponent diffusion
problem and writes the results into the directory given by --out, which is
created when missing. Nothing is created when the case has a fault.

While the solve runs, a table of the nonlinear iteration goes to stderr
when stderr is a terminal: iteration, residual, change of the state,
mass-average defect ||v - sum J/rho|| (relative to the largest of ||v|| and ||J_i/rho||) and elapsed time. --quiet
leaves it out; --log-json prints one JSON object per iteration instead
(keys iteration, residual, change, mass_average, clipped,
elapsed_seconds), also into pipes and files; its warnings and a final
error are then JSON objects too, {"warning": "..."} and {"error": "..."},
so that every line of stderr is one JSON object.

Files written into DIR (each written completely or not at all):
  fields.vtu        every field selected by output.fields (VTK XML), on
                    the mesh with each triangle cut into subdivision^2,
                    every triangle with vertices of its own so that
                    discontinuous fields show their jumps
  summary.json      convergence, boundary fluxes per boundary and species,
                    balances, scales and groups, method, timings, peak
                    memory, iteration history, list of files
  probe-NAME.csv    fields along each probe line: s,x,y, then the
                    selected fields (x_NAME, c_NAME, mu_NAME, vx, vy,
                    p, N_NAME_x, N_NAME_y, ...)
  x_NAME.png        colour map of each mole fraction
  velocity.png      speed with arrows
  probe-NAME.png    mole fractions along each probe line
  history.png       residual, change and mass-average defect per iteration

When the iteration does not converge, the last iterate is written all the
same with "converged": false in summary.json, and run ends with an error
line and a non-zero exit status.`,
		Example: `  # Solve a case, results into ./out
  mixwell run cell.yaml --out out

  # Keep a machine-readable log of the iteration
  mixwell run cell.yaml --out out --log-json 2> iterations.jsonl`,
		Args:              caseArgs,
		ValidArgsFunction: completeCaseFile,
		RunE: func(cmd *cobra.Command, args []string) error {
			if o.out == "" {
				return errors.New("--out needs a directory")
			}
			cmd.SilenceUsage = true
			start := time.Now()
			data, c, err := loadCase(args[0])
			if err != nil {
				return jsonError(cmd, &o, err)
			}
			return jsonError(cmd, &o, solveCase(cmd, d, c, data, time.Since(start), &o, nil))
		},
	}
	addSolveFlags(cmd, &o, "", "results directory `DIR` (required; created when missing)")
	if err := cmd.MarkFlagRequired("out"); err != nil {
		panic("mixwell: " + err.Error())
	}
	return cmd
}

// caseArgs accepts exactly one argument, the case file.
func caseArgs(_ *cobra.Command, args []string) error {
	switch {
	case len(args) == 0:
		return errors.New("give the case file (CASE.yaml)")
	case len(args) > 1:
		return fmt.Errorf("give one case file, got %d arguments: %s", len(args), strings.Join(args, " "))
	}
	return nil
}

// completeCaseFile offers YAML files for the case argument.
func completeCaseFile(_ *cobra.Command, args []string, _ string) ([]cobra.Completion, cobra.ShellCompDirective) {
	if len(args) > 0 {
		return nil, cobra.ShellCompDirectiveNoFileComp
	}
	return []cobra.Completion{"yaml", "yml"}, cobra.ShellCompDirectiveFilterFileExt
}

// loadCase reads and checks the case file at path. It returns the bytes
// read (for the digest in summary.json) and the case, or one error line
// naming the first fault.
func loadCase(path string) ([]byte, *casefile.Case, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		_, err = casefile.Load(path) // the reader's own message
		return nil, nil, caseError(err, path)
	}
	c, err := casefile.Parse(path, data)
	if err != nil {
		return nil, nil, caseError(err, path)
	}
	return data, c, nil
}

// caseError reduces the faults of a case file to one line: the first,
// and how many more "mixwell check" would list.
func caseError(err error, path string) error {
	var es casefile.Errors
	if errors.As(err, &es) && len(es) > 1 {
		return oneLine(fmt.Errorf("%w (and %d more fault%s: \"mixwell check %s\" lists all)",
			es[0], len(es)-1, plural(len(es)-1), path))
	}
	if errors.As(err, &es) && len(es) == 1 {
		return oneLine(es[0])
	}
	return oneLine(err)
}

// prepareError makes an error of simulate.Prepare one line that names the
// case file.
func prepareError(err error, c *casefile.Case) error {
	if !strings.HasPrefix(err.Error(), c.Source) {
		err = fmt.Errorf("%s: %w", c.Source, err)
	}
	return oneLine(err)
}

func plural(n int) string {
	if n == 1 {
		return ""
	}
	return "s"
}

// checkOutDir finds out before a solve whether dir can become the output
// directory: it must be a directory, or not exist yet below a directory.
// It creates nothing.
func checkOutDir(dir string) error {
	p := filepath.Clean(dir)
	for {
		fi, err := os.Stat(p)
		switch {
		case err == nil && fi.IsDir():
			return nil
		case err == nil:
			if p == filepath.Clean(dir) {
				return fmt.Errorf("--out %s: exists and is not a directory", dir)
			}
			return fmt.Errorf("--out %s: %s is not a directory", dir, p)
		case !errors.Is(err, os.ErrNotExist) && !errors.Is(err, syscall.ENOTDIR):
			return fmt.Errorf("--out %s: %w", dir, errors.Unwrap(err))
		}
		parent := filepath.Dir(p)
		if parent == p {
			return nil
		}
		p = parent
	}
}

// warn prints a warning to stderr: a "Warning: " line, or a JSON object
// {"warning": ...} under --log-json.
func warn(stderr io.Writer, o *solveOptions, msg string) {
	if o.logJSON {
		line, _ := json.Marshal(map[string]string{"warning": msg})
		fmt.Fprintf(stderr, "%s\n", line)
		return
	}
	fmt.Fprintf(stderr, "Warning: %s\n", msg)
}

// jsonError prints err as a JSON object {"error": ...} to stderr under
// --log-json, instead of cobra's "Error: " line, and returns it for the
// exit status.
func jsonError(cmd *cobra.Command, o *solveOptions, err error) error {
	if err == nil || !o.logJSON {
		return err
	}
	cmd.SilenceErrors = true
	line, _ := json.Marshal(map[string]string{"error": oneLine(err).Error()})
	fmt.Fprintf(cmd.ErrOrStderr(), "%s\n", line)
	return err
}

// solveCase prepares, solves and writes case c, read from data in load
// time. before, when not nil, writes extra files into the output directory
// (created by then) after the solve and returns their names.
func solveCase(cmd *cobra.Command, d deps, c *casefile.Case, data []byte, load time.Duration, o *solveOptions,
	before func(dir string) ([]string, error)) error {
	stdout, stderr := cmd.OutOrStdout(), cmd.ErrOrStderr()
	if err := checkOutDir(o.out); err != nil {
		return err
	}
	var mem results.PeakMemory
	t0 := time.Now()
	setup, err := simulate.Prepare(c)
	if err != nil {
		return prepareError(err, c)
	}
	if err := results.CheckProbes(c, setup.Mesh); err != nil {
		return oneLine(err)
	}
	prepare := time.Since(t0)
	mem.Sample()
	warnings := make([]string, len(c.Warnings))
	for i, w := range c.Warnings {
		warnings[i] = w.String()
		warn(stderr, o, warnings[i])
	}

	prog := newProgress(stderr, o, d.isTerminal(stderr))
	if prog.table {
		fmt.Fprintf(stderr, "%s: %d unknowns, prepared in %s\n", c.Source, setup.Unknowns(), seconds(prepare))
	}
	t1 := time.Now()
	outcome, serr := setup.Solve(func(r physics.IterationRecord) {
		mem.Sample()
		prog.record(r)
	})
	solve := time.Since(t1)
	if outcome == nil {
		if serr == nil {
			serr = errors.New("the solver returned no result")
		}
		return oneLine(serr)
	}
	for _, w := range outcome.Warnings {
		warn(stderr, o, w)
	}
	warnings = append(warnings, outcome.Warnings...)
	shown := len(warnings)

	var extra []string
	if before != nil {
		if err := os.MkdirAll(o.out, 0o755); err != nil {
			return fmt.Errorf("creating the output directory: %w", err)
		}
		if extra, err = before(o.out); err != nil {
			return oneLine(err)
		}
	}
	sum, err := results.Write(o.out, &results.Run{
		Outcome:    outcome,
		Fields:     outcome,
		Unknowns:   setup.Unknowns(),
		Program:    "mixwell " + resolveVersion(),
		CaseSHA256: digest(data),
		Load:       load,
		Prepare:    prepare,
		Solve:      solve,
		Memory:     &mem,
		Warnings:   warnings,
		Files:      extra,
	})
	if err != nil {
		return oneLine(err)
	}
	for _, w := range sum.Warnings[shown:] {
		warn(stderr, o, w)
	}
	if err := report(stdout, sum, o.out); err != nil {
		return fmt.Errorf("writing the report: %w", err)
	}
	if serr != nil || !outcome.Converged {
		msg := "the iteration did not converge"
		if serr != nil {
			msg = serr.Error()
		}
		return oneLine(fmt.Errorf("%s; the last iterate is written to %s (converged: false in %s)",
			msg, o.out, results.SummaryFile))
	}
	return nil
}

func digest(data []byte) string {
	if data == nil {
		return ""
	}
	h := sha256.Sum256(data)
	return hex.EncodeToString(h[:])
}

func seconds(d time.Duration) string { return fmt.Sprintf("%.2f s", d.Seconds()) }

// progress prints the iteration to stderr: a table, JSON lines or
// nothing.
type progress struct {
	w          io.Writer
	table      bool
	json       bool
	headerDone bool
}

func newProgress(w io.Writer, o *solveOptions, terminal bool) *progress {
	return &progress{w: w, json: o.logJSON, table: !o.logJSON && !o.quiet && terminal}
}

// progressHeader and progressRow lay out the iteration table.
const (
	progressHeader = "iteration      residual        change  mass-average      time"
	progressFormat = "%9d  %12.4e  %12.4e  %12.4e  %8.2f s"
)

func (p *progress) record(r physics.IterationRecord) {
	switch {
	case p.json:
		line, err := json.Marshal(results.IterationOf(r))
		if err == nil {
			fmt.Fprintf(p.w, "%s\n", line)
		}
	case p.table:
		if !p.headerDone {
			fmt.Fprintln(p.w, progressHeader)
			p.headerDone = true
		}
		fmt.Fprintln(p.w, progressLineOf(r))
	}
}

// progressLineOf is one row of the iteration table.
func progressLineOf(r physics.IterationRecord) string {
	return fmt.Sprintf(progressFormat, r.Iteration, r.Residual, r.Change, r.MassAverage, r.Elapsed.Seconds())
}

// report prints the outcome on w: convergence, balances, the boundary
// fluxes, the files and the caution line.
func report(w io.Writer, s *results.Summary, dir string) error {
	var b strings.Builder
	if s.Converged {
		fmt.Fprintf(&b, "converged in %d iterations: residual %.3g (tolerance %g)\n",
			s.Iterations, float64(s.Residual), float64(s.Tolerance))
	} else {
		fmt.Fprintf(&b, "NOT converged after %d iterations: residual %.3g (tolerance %g)\n",
			s.Iterations, float64(s.Residual), float64(s.Tolerance))
	}
	fmt.Fprintf(&b, "%d unknowns; species balance %.3g, mass-average residual %.3g, wall-pressure approximation %.3g\n",
		s.Unknowns, float64(s.SpeciesBalance), float64(s.MassAverageResidual), float64(s.WallPressureApproximation))
	if len(s.BoundaryFlux) > 0 {
		b.WriteString("outward molar flux per metre of depth, mol/(s m):\n")
		names := make([]string, 0, len(s.BoundaryFlux))
		width := len("boundary")
		for name := range s.BoundaryFlux {
			names = append(names, name)
			width = max(width, len(name))
		}
		slices.Sort(names)
		cols := make([]int, len(s.Species))
		fmt.Fprintf(&b, "  %-*s", width, "boundary")
		for i, sp := range s.Species {
			cols[i] = max(12, len(sp))
			fmt.Fprintf(&b, "  %*s", cols[i], sp)
		}
		b.WriteString("\n")
		row := func(name string, flux func(sp string) (results.Flux, bool)) {
			fmt.Fprintf(&b, "  %-*s", width, name)
			for i, sp := range s.Species {
				if f, ok := flux(sp); ok {
					fmt.Fprintf(&b, "  %*.4e", cols[i], float64(f.Molar))
				} else {
					fmt.Fprintf(&b, "  %*s", cols[i], "-")
				}
			}
			b.WriteString("\n")
		}
		for _, name := range names {
			row(name, func(sp string) (results.Flux, bool) { f, ok := s.BoundaryFlux[name][sp]; return f, ok })
		}
		row("(net)", func(sp string) (results.Flux, bool) { f, ok := s.NetOutflow[sp]; return f, ok })
	}
	t := s.TimingSeconds
	fmt.Fprintf(&b, "wrote %d files to %s (prepare %.2f s, solve %.2f s, write %.2f s; peak memory %s)\n",
		len(s.Files), dir, float64(t.Prepare), float64(t.Solve), float64(t.Write), bytesString(s.PeakMemoryBytes))
	b.WriteString(caution + "\n")
	_, err := io.WriteString(w, b.String())
	return err
}

// bytesString writes n bytes in binary multiples.
func bytesString(n uint64) string {
	const unit = 1024
	if n < unit {
		return fmt.Sprintf("%d B", n)
	}
	exp := int(math.Log(float64(n)) / math.Log(unit))
	exp = min(exp, 4)
	return fmt.Sprintf("%.1f %ciB", float64(n)/math.Pow(unit, float64(exp)), "KMGT"[exp-1])
}
