package main

import (
	"io"
	"os"
	"runtime/debug"
	"strings"

	"github.com/spf13/cobra"

	"mixwell/verification"
)

// version is the release name, set at link time with
//
//	go build -ldflags "-X main.version=v0.1.0" ./cmd/mixwell
//
// Without it, mixwell reports the module version recorded by "go install"
// or "dev".
var version = ""

// deps is what the commands need from the rest of the program. Execute
// passes the real implementations; tests pass fakes, so that the command line
// can be checked without running a finite-element solve.
type deps struct {
	// problems lists the convergence studies that verify can run.
	problems func() []verification.ProblemInfo
	// run performs one study, calling progress after each level.
	run func(cfg verification.Config, progress func(level, unknowns int)) (*verification.Study, error)
	// isTerminal reports whether w is an interactive terminal; progress
	// lines go to stderr only when it is.
	isTerminal func(w io.Writer) bool
}

func defaultDeps() deps {
	return deps{
		problems:   verification.Problems,
		run:        verification.Run,
		isTerminal: isTerminal,
	}
}

// Execute runs the mixwell command line with the process arguments. On
// failure the command has already printed one "Error: ..." line to stderr
// (followed by usage text when flags or arguments were misused), and Execute
// exits with status 1.
func Execute() {
	if err := newRootCmd(defaultDeps()).Execute(); err != nil {
		os.Exit(1)
	}
}

func newRootCmd(d deps) *cobra.Command {
	root := &cobra.Command{
		Use:   "mixwell",
		Short: "Steady 2D flow of concentrated multicomponent mixtures",
		Long: `mixwell computes steady two-dimensional flow of concentrated
multicomponent mixtures: Stokes flow coupled to Onsager–Stefan–Maxwell
cross-diffusion, discretised with high-order mixed finite elements.

Describe a case in a YAML file (docs/case-format.md), check it with
"mixwell check", solve it with "mixwell run"; "mixwell demo" runs an
embedded case, and "mixwell verify" runs manufactured-solution convergence
studies. Results are model predictions: they need validation and review
under the applicable codes and licensed practice before they inform a
design.`,
		Example: `  # Run the embedded demonstration case into ./mixwell-demo
  mixwell demo

  # Check Taylor–Hood Stokes elements of pressure degree 2 on four meshes
  mixwell verify --problem stokes --pair taylor-hood --degree 2 --levels 4

  # Set up shell completion (bash; see "mixwell completion --help")
  source <(mixwell completion bash)`,
		Version: resolveVersion(),
		Args:    cobra.NoArgs,
	}
	root.SetVersionTemplate("mixwell {{.Version}}\n")
	root.AddCommand(newVerifyCmd(d))
	root.AddCommand(newCheckCmd(d))
	root.AddCommand(newRunCmd(d))
	root.AddCommand(newDemoCmd(d))
	root.AddCommand(newMeshCmd(d))
	return root
}

func resolveVersion() string {
	if version != "" {
		return version
	}
	if info, ok := debug.ReadBuildInfo(); ok && info.Main.Version != "" && info.Main.Version != "(devel)" {
		return info.Main.Version
	}
	return "dev"
}

// isTerminal reports whether w is a character device such as a terminal.
// Pipes, regular files and in-memory buffers are not.
func isTerminal(w io.Writer) bool {
	f, ok := w.(*os.File)
	if !ok {
		return false
	}
	fi, err := f.Stat()
	return err == nil && fi.Mode()&os.ModeCharDevice != 0
}

// oneLine collapses runs of white space, newlines included, so that an
// error prints as the single line after "Error: ".
func oneLine(err error) error {
	msg := err.Error()
	if !strings.ContainsAny(msg, "\n\r") {
		return err
	}
	return &lineError{msg: strings.Join(strings.Fields(msg), " "), err: err}
}

type lineError struct {
	msg string
	err error
}

func (e *lineError) Error() string { return e.msg }
func (e *lineError) Unwrap() error { return e.err }
