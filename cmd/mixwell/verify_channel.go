package main

import (
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"text/tabwriter"
	"time"

	"github.com/spf13/cobra"

	"mixwell/verification"
)

// channelProblem is the name of the flow-through channel benchmark, which
// reports balances and mesh independence instead of convergence rates.
const channelProblem = "channel"

// channelClosures are the closures the channel benchmark offers.
var channelClosures = []string{"ideal-gas", "ideal-gas-at-pressure"}

// channelConfig checks the flags of --problem channel.
func (o *verifyOptions) channelConfig(cmd *cobra.Command) (verification.Config, error) {
	var cfg verification.Config
	flags := cmd.Flags()
	for _, name := range []string{"flux", "pair", "mesh", "seed", "species", "flavour", "stefan-wall", "group-s", "regime", "plot"} {
		if flags.Changed(name) {
			return cfg, fmt.Errorf("--%s does not apply to --problem channel", name)
		}
	}
	if !flags.Changed("degree") {
		return cfg, fmt.Errorf("missing --degree: problem channel takes degrees 1, 2, 3")
	}
	if o.degree < 1 || o.degree > 3 {
		return cfg, fmt.Errorf("problem channel has no degree %d (valid: 1, 2, 3)", o.degree)
	}
	if o.levels < 2 {
		return cfg, fmt.Errorf("--levels must be at least 2 to compare levels, got %d", o.levels)
	}
	if err := o.checkCoarseAndFormat(); err != nil {
		return cfg, err
	}
	if err := o.checkIteration(); err != nil {
		return cfg, err
	}
	if err := checkChoice("thermodynamics", o.thermodynamics, channelClosures); err != nil {
		return cfg, err
	}
	if err := checkChoice("formulation", o.formulation, formulationChoices); err != nil {
		return cfg, err
	}
	if o.formulation == "diffusive-flux" {
		switch {
		case flags.Changed("beta"):
			return cfg, errors.New("--beta does not apply to --formulation diffusive-flux, which needs no augmentation")
		case o.thermodynamics != "ideal-gas":
			return cfg, fmt.Errorf("--formulation diffusive-flux is built for --thermodynamics ideal-gas only, not %s", o.thermodynamics)
		case o.method != "anderson":
			return cfg, fmt.Errorf("--formulation diffusive-flux iterates with --method anderson only, not %s", o.method)
		}
	}
	if err := checkChoice("inlet", o.inlet, []string{verification.VelocityInlet, verification.MassFluxInlet}); err != nil {
		return cfg, err
	}
	if !(o.meanSpeed > 0) || math.IsInf(o.meanSpeed, 0) {
		return cfg, fmt.Errorf("--mean-speed must be positive and finite (m/s), got %g", o.meanSpeed)
	}
	maxIt := o.maxIter
	if !flags.Changed("max-iterations") {
		maxIt = 0 // the benchmark's own default
	}
	return verification.Config{Problem: channelProblem, Degree: o.degree, Levels: o.levels, Coarse: o.coarse,
		Method: o.method, MaxIterations: maxIt, Beta: o.beta, Formulation: o.formulation}, nil
}

// runChannel runs the channel benchmark and prints its result.
func runChannel(cmd *cobra.Command, d deps, o *verifyOptions, cfg verification.Config) error {
	stdout, stderr := cmd.OutOrStdout(), cmd.ErrOrStderr()
	cc := verification.ChannelConfig{Degree: cfg.Degree, Levels: cfg.Levels, Coarse: cfg.Coarse,
		Method: cfg.Method, MaxIterations: cfg.MaxIterations, Thermodynamics: o.thermodynamics,
		SpeciesAugmentation: cfg.Beta, Formulation: cfg.Formulation, MeanSpeed: o.meanSpeed, Inlet: o.inlet}
	if !o.quiet && d.isTerminal(stderr) {
		start := time.Now()
		cc.Progress = func(what string, unknowns int) {
			fmt.Fprintf(stderr, "solving %s (%d unknowns; %.1f s so far)\n", what, unknowns, time.Since(start).Seconds())
		}
	}
	st, err := verification.RunChannel(cc)
	if st == nil {
		return oneLine(err)
	}
	if o.format == "json" {
		enc := json.NewEncoder(stdout)
		enc.SetIndent("", "  ")
		if werr := enc.Encode(st); werr != nil {
			return fmt.Errorf("writing the results: %w", werr)
		}
	} else {
		writeChannelTable(stdout, st)
	}
	if err != nil {
		return oneLine(err)
	}
	for l, ok := range st.Converged {
		if !ok {
			return fmt.Errorf("channel: level %d (%d rows) did not converge in %d iterations", l+1, st.Rows[l], st.Iterations[l])
		}
	}
	return nil
}

// writeChannelTable prints a channel study as a table.
func writeChannelTable(w interface{ Write([]byte) (int, error) }, st *verification.ChannelStudy) {
	fmt.Fprintf(w, "channel benchmark, degree %d, %s, %s, %s inlet, beta %g, Peclet number %.3g, S = %.3g\n", st.Degree, st.Formulation, st.Thermodynamics, st.Inlet, st.Beta, st.Peclet, st.S)
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintln(tw, "rows\tunknowns\titerations\tconverged\tpatch flux A (mol/(s m))\toutlet x_A\tmass average\tEOS defect\tseconds\t")
	for l := range st.Rows {
		fmt.Fprintf(tw, "%d\t%d\t%d\t%v\t%.8e\t%.6f\t%.3e\t%.3e\t%.1f\t\n", st.Rows[l], st.Unknowns[l], st.Iterations[l], st.Converged[l],
			st.PatchFlux[l], st.OutletA[l], st.MassAverageLevels[l], st.EOSDefect[l], st.Seconds[l])
	}
	tw.Flush()
	fmt.Fprintf(w, "balance %.3e, mass_average %.3e, truncation %.3e, patch flux change %.3e\n",
		st.Balance, st.MassAverage, st.Truncation, st.PatchFluxChange)
	for _, warn := range st.Warnings {
		fmt.Fprintf(w, "warning: %s\n", warn)
	}
}
