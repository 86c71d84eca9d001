package main

import (
	"errors"
	"fmt"
	"io"

	"github.com/spf13/cobra"

	"holdfast/assess/tipping"
	"holdfast/report"
)

func newSweepCmd() *cobra.Command {
	var (
		sets                        []string
		driver, track, format, plan string
		out                         string
		from, to, risk              float64
		draws, workers, steps       int
		seed                        uint64
		quiet                       bool
		rf                          reportFlags
	)
	c := &cobra.Command{
		Use:   "sweep SCENARIO --driver NAME --from A --to B --track LABEL",
		Short: "Tipping points along a driver: critical values, safe limit, hysteresis, curves",
		Long: `sweep moves one parameter, the driver, from A to B and asks where the
tracked equilibrium (a label E1, E2, … of the equilibria at nominal values)
is lost. For every draw of the other parameters it follows the tracked
equilibrium along the driver by pseudo-arclength continuation from A and
records the first driver value at which it meets a fold and vanishes (or
exchanges stability with a crossing branch, or leaves the state's domain),
or "no tipping in range". From these critical values it reports their
quantiles along the sweep, the safe limit at risk α (the α-quantile, with a
distribution-free interval from order statistics), and for each fold of an
attracting state the return fold where the new state vanishes in turn:
the hysteresis window, and whether the shift can be undone by reversing
the driver within its allowed values.

With --steps M it also runs the Monte Carlo engine at M driver values from
A to B on the same draws, giving the probability that the tracked
equilibrium exists and attracts, and of each regime, at each value.

The driver may be swept up (A < B) or down (A > B). An uncertain driver
may take the values of its distribution's support; a fixed one (or one
fixed with --set) any finite value. The sweep replaces the driver in every
draw.

--out saves the result file (with the command line, the seed, the scenario
text and its SHA-256, and a histogram of the critical values), which
holdfast report renders again at any time. --report FILE.md or FILE.html
writes the report at once.`,
		Example: `  holdfast sweep demo:lake --driver L --from 0.05 --to 0.4 --track E1
  holdfast sweep demo:lake --driver L --from 0.05 --to 0.4 --track E1 --risk 0.01 --steps 21 --format json
  holdfast sweep demo:lake --driver L --from 0.05 --to 0.4 --track E1 --out lake-sweep.json --report lake-sweep.html
  holdfast sweep demo:reactor --driver a --from 0.25 --to 0.08 --track E1 --draws 20000`,
		Args: cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			if err := checkFormat(format, "table", "json"); err != nil {
				return err
			}
			kind, err := planFlag(plan)
			if err != nil {
				return err
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
			opt := tipping.Options{
				Driver: driver, From: from, To: to, Track: track, Steps: steps, Risk: risk,
				Draws: draws, Seed: seed, Plan: kind, Workers: workers,
			}
			var endBar func()
			opt.Progress, endBar = progress(cmd.ErrOrStderr(), quiet, draws*max(steps, 1))
			res, err := tipping.Run(cmd.Context(), m, opt)
			endBar()
			var oe *tipping.OptionError
			if errors.As(err, &oe) {
				return badInput(fmt.Errorf("--%s: %s", oe.Option, oe.Msg))
			}
			if err != nil {
				return failed(err)
			}
			s := m.Scenario
			doc := report.NewSweepJSON(version, s.File, s.Title, res)
			doc.SetRun(report.RunInfo{Command: commandLine(cmd, args), Scenario: s})
			return files.write(cmd, doc, format, quiet, func(w io.Writer) error {
				driverUnit := ""
				if j := s.ParamIndex(driver); j >= 0 {
					driverUnit = s.Params[j].Unit
				}
				return report.SweepTable(w, s.Title, s.State.Unit, driverUnit, res)
			})
		},
	}
	f := c.Flags()
	f.StringVar(&driver, "driver", "", "the parameter to sweep (required)")
	f.Float64Var(&from, "from", 0, "driver value where the sweep starts (required)")
	f.Float64Var(&to, "to", 0, "driver value where the sweep ends (required)")
	f.StringVar(&track, "track", "", "label of the equilibrium at nominal values to follow, e.g. E1 (required)")
	f.IntVar(&steps, "steps", 11, "driver values for the probability curves, from --from to --to (0: no curves)")
	f.Float64Var(&risk, "risk", 0.05, "α in (0, 1): the safe limit keeps the probability of having lost the tracked equilibrium at most α")
	f.StringArrayVar(&sets, "set", nil, "fix a parameter at a value, as name=value (repeatable)")
	f.IntVar(&draws, "draws", 10000, "number of parameter draws")
	f.Uint64Var(&seed, "seed", 1, "random seed; the same seed gives the same result")
	f.StringVar(&plan, "plan", "lhs", "sampling plan: random, lhs (Latin hypercube) or qmc (scrambled Sobol')")
	f.IntVar(&workers, "workers", 0, "worker goroutines (0: all cores); results do not depend on it")
	f.StringVar(&format, "format", "table", "output format: table or json")
	f.StringVar(&out, "out", "", "write the JSON result to this file")
	f.BoolVar(&quiet, "quiet", false, "no progress bar; with --out or --report, no table either")
	rf.add(f)
	for _, name := range []string{"driver", "from", "to", "track"} {
		_ = c.MarkFlagRequired(name)
	}
	return c
}
