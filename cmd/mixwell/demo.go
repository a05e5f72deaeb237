package main

import (
	"embed"
	"fmt"
	"io"
	"path/filepath"
	"time"

	"github.com/spf13/cobra"

	"mixwell/casefile"
	"mixwell/results"
)

// demoFiles holds the demonstration case.
//
//go:embed demo/*.yaml
var demoFiles embed.FS

// demoCase is the embedded case "mixwell demo" solves, and demoCopy the
// name of its copy in the output directory.
const (
	demoCase = "demo/exchange-cell.yaml"
	demoCopy = "case.yaml"
)

func newDemoCmd(d deps) *cobra.Command {
	var o solveOptions
	var show bool
	cmd := &cobra.Command{
		Use:   "demo [--out DIR]",
		Short: "Solve the built-in demonstration case",
		Long: `Demo solves a small case built into mixwell, with invented data: three
gases exchanged through a cell between two open windows, where the
Stefan–Maxwell coupling drags a gas along that has the same share at both
windows. It takes a few seconds and writes what "mixwell run" writes, plus
the case itself as case.yaml, into --out (default ./mixwell-demo).

Start a case of your own from the copy:
  mixwell run mixwell-demo/case.yaml --out my-results

--show-case prints the case to stdout and solves nothing.`,
		Example: `  # Solve the demonstration case into ./mixwell-demo
  mixwell demo

  # Into another directory, without the iteration table
  mixwell demo --out /tmp/demo --quiet

  # Only print the case
  mixwell demo --show-case > cell.yaml`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			if o.out == "" {
				return fmt.Errorf("--out needs a directory")
			}
			cmd.SilenceUsage = true
			data, err := demoFiles.ReadFile(demoCase)
			if err != nil {
				return fmt.Errorf("the demonstration case is missing from this build: %w", err)
			}
			if show {
				_, err := cmd.OutOrStdout().Write(data)
				return err
			}
			start := time.Now()
			c, err := casefile.Parse(demoCase, data)
			if err != nil {
				return caseError(err, demoCase)
			}
			copyCase := func(dir string) ([]string, error) {
				err := results.WriteFileAtomic(filepath.Join(dir, demoCopy), func(w io.Writer) error {
					_, err := w.Write(data)
					return err
				})
				return []string{demoCopy}, err
			}
			return jsonError(cmd, &o, solveCase(cmd, d, c, data, time.Since(start), &o, copyCase))
		},
	}
	addSolveFlags(cmd, &o, "mixwell-demo", "results directory `DIR` (created when missing)")
	cmd.Flags().BoolVar(&show, "show-case", false, "print the demonstration case to stdout and solve nothing")
	return cmd
}
