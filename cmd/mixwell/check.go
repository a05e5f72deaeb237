package main

import (
	"errors"
	"fmt"
	"io"
	"strings"

	"github.com/spf13/cobra"

	"mixwell/casefile"
	"mixwell/results"
	"mixwell/simulate"
)

func newCheckCmd(d deps) *cobra.Command {
	return &cobra.Command{
		Use:   "check CASE.yaml",
		Short: "Check a case file and show the problem it poses, without solving",
		Long: `Check reads a case file (its format: docs/case-format.md) and does every
check that needs no solve: the keys, units and values of the file, then the
mesh, the boundary conditions of the discrete problem, the compatibility of
flux data and the probe lines. It writes no file.

On success it prints an account of the case (species, conditions, solver
and output settings, and warnings about admissible but suspicious data with
their file:line:column), the mesh with its boundaries, the number of
unknowns, the reference scales and the dimensionless groups (S, the ratio
of viscous to thermodynamic pressure in the diffusion rows; the Peclet
number of any imposed flow).

On failure every fault of the file is listed with its file:line:column
and key path, the first on the "Error:" line, and the exit status is
non-zero.`,
		Example: `  # Check a case before a long run
  mixwell check cell.yaml

  # Check every case of a directory, stopping at the first fault
  for f in cases/*.yaml; do mixwell check "$f" > /dev/null || break; done`,
		Args:              caseArgs,
		ValidArgsFunction: completeCaseFile,
		RunE: func(cmd *cobra.Command, args []string) error {
			cmd.SilenceUsage = true
			return runCheck(cmd, args[0])
		},
	}
}

func runCheck(cmd *cobra.Command, path string) error {
	stdout, stderr := cmd.OutOrStdout(), cmd.ErrOrStderr()
	c, err := casefile.Load(path)
	if err != nil {
		var es casefile.Errors
		if !errors.As(err, &es) || len(es) < 2 {
			return caseError(err, path)
		}
		// List every fault: the first on the error line, the others
		// after it, each on a line of its own.
		cmd.SilenceErrors = true
		fmt.Fprintf(stderr, "Error: %s\n", oneLine(es[0]))
		for _, e := range es[1:] {
			fmt.Fprintf(stderr, "%s\n", oneLine(e))
		}
		return fmt.Errorf("%s: %d faults", path, len(es))
	}
	setup, err := simulate.Prepare(c)
	if err != nil {
		return prepareError(err, c)
	}
	if err := results.CheckProbes(c, setup.Mesh); err != nil {
		return oneLine(err)
	}
	return writeCheck(stdout, c, setup)
}

// writeCheck prints the account of a checked case.
func writeCheck(w io.Writer, c *casefile.Case, s *simulate.Setup) error {
	var b strings.Builder
	b.WriteString(c.Summary())
	b.WriteString("\n")
	b.WriteString(s.Describe())
	if !strings.HasSuffix(b.String(), "\n") {
		b.WriteString("\n")
	}
	status := "no warnings"
	if n := len(c.Warnings); n > 0 {
		status = fmt.Sprintf("%d warning%s (listed above)", n, plural(n))
	}
	fmt.Fprintf(&b, "\n%s: ready to run, %d unknowns, %s\n", c.Source, s.Unknowns(), status)
	_, err := io.WriteString(w, b.String())
	return err
}
