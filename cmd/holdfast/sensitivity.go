package main

import (
	"errors"
	"fmt"
	"io"

	"github.com/spf13/cobra"

	"holdfast/assess/sensitivity"
	"holdfast/report"
)

func newSensitivityCmd() *cobra.Command {
	var (
		sets           []string
		target, output string
		format, out    string
		base, workers  int
		seed           uint64
		quiet          bool
		rf             reportFlags
	)
	c := &cobra.Command{
		Use:   "sensitivity SCENARIO --target LABEL",
		Short: "Rank the uncertain inputs that drive a verdict",
		Long: `sensitivity ranks the scenario's uncertain inputs by how much each drives
one output of a tracked equilibrium (LABEL, e.g. E2, as numbered at nominal
values by holdfast equilibria):

  attracting  1 when the equilibrium exists and attracts, else 0
  position    its position x*
  slope       the slope f'(x*) there
  current     1 when the state ends there from the scenario's current state

It estimates first-order and total Sobol' indices (Saltelli 2010 and
Jansen 1999 estimators) on a quasi-random Saltelli design of --base rows,
N·(k+2) model runs for k uncertain inputs, with 95% bootstrap intervals;
Spearman and partial rank correlations and the split test of Spear &
Hornberger (1980) from the same runs; and the local elasticities at
nominal values. Fixed parameters are listed with zero effect.

Sobol' indices assume independent inputs. When the scenario correlates
inputs, the indices are computed with the correlations removed, 2N further
draws keep them, and the ranking uses the split test (or the rank
correlation) on those draws.

The result depends only on the scenario, the options and the seed, not on
--workers.`,
		Example: `  holdfast sensitivity demo:lake --target E1
  holdfast sensitivity demo:lake --target E3 --output current --base 4096
  holdfast sensitivity lake.yaml --target E1 --output position --format json --out lake-sens.json
  holdfast sensitivity demo:lake --target E1 --report lake-sens.html`,
		Args: cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			if err := checkFormat(format, "table", "json"); err != nil {
				return err
			}
			o, err := sensitivity.ParseOutput(output)
			if err != nil {
				return badInput(fmt.Errorf("--output: %w", err))
			}
			if target == "" {
				return badInput(errors.New("--target is required: the label of a tracked equilibrium (E1, E2, … from holdfast equilibria)"))
			}
			if base < 2 || base > sensitivity.MaxBase {
				return badInput(fmt.Errorf("--base must be between 2 and %d, got %d", sensitivity.MaxBase, base))
			}
			if err := checkWorkers(workers); err != nil {
				return err
			}
			m, err := loadModel(args[0], sets)
			if err != nil {
				return err
			}
			files, err := stageResult(out, &rf, m.Scenario.File)
			if err != nil {
				return err
			}
			defer files.abort()
			opt := sensitivity.Options{Target: target, Output: o, Base: base, Seed: seed, Workers: workers}
			var endBar func()
			opt.Progress, endBar = progress(cmd.ErrOrStderr(), quiet, base*4)
			res, err := sensitivity.Run(cmd.Context(), m, opt)
			endBar()
			var ie *sensitivity.InputError
			if errors.As(err, &ie) {
				return badInput(err)
			}
			if err != nil {
				return failed(err)
			}
			s := m.Scenario
			doc := report.NewSensitivityJSON(version, s.File, s.Title, res)
			doc.SetRun(report.RunInfo{Command: commandLine(cmd, args), Scenario: s})
			return files.write(cmd, doc, format, quiet, func(w io.Writer) error {
				return report.SensitivityTable(w, s.Title, s.State.Unit, res)
			})
		},
	}
	f := c.Flags()
	f.StringVar(&target, "target", "", "label of the tracked equilibrium (E1, E2, … at nominal values)")
	f.StringVar(&output, "output", "attracting", "output to analyse: attracting, position, slope or current")
	f.IntVar(&base, "base", 2048, "base rows N of the Saltelli design (N·(k+2) model runs; best a power of two)")
	f.Uint64Var(&seed, "seed", 1, "random seed; the same seed gives the same result")
	f.IntVar(&workers, "workers", 0, "worker goroutines (0: all cores); results do not depend on it")
	f.StringArrayVar(&sets, "set", nil, "fix a parameter at a value, as name=value (repeatable)")
	f.StringVar(&format, "format", "table", "output format: table or json")
	f.StringVar(&out, "out", "", "write the JSON result to this file")
	f.BoolVar(&quiet, "quiet", false, "no progress bar; with --out or --report, no table either")
	rf.add(f)
	return c
}
