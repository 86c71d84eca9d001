package main

import (
	"errors"
	"fmt"

	"github.com/spf13/cobra"

	"holdfast/assess"
	"holdfast/report"
	"holdfast/sample"
)

func newEquilibriaCmd() *cobra.Command {
	var (
		sets         []string
		format, plan string
		seed         uint64
		draw, draws  int
	)
	c := &cobra.Command{
		Use:   "equilibria SCENARIO",
		Short: "Find and classify every equilibrium at nominal parameter values",
		Long: `equilibria finds every equilibrium of the scenario's rate law in the state's
domain at nominal parameter values (the median of each distribution unless
the scenario gives a nominal value; --set fixes a parameter), classifies
each one — stable, unstable, semistable with the side it attracts from, or
degenerate — by the first derivative of the rate law that does not vanish,
and gives its slope, return time, basin of attraction and potential
barriers. With a current state in the scenario it says where the state goes
and how long it takes.

--draw i analyses draw i of a Monte Carlo run instead of the nominal values:
with the run's --seed, --plan and --draws (defaults as in holdfast assess)
it rebuilds the same sampling design and takes draw i's parameters, so that
a draw a run reports (a failure, a disagreement) can be replayed alone.`,
		Example: `  holdfast equilibria demo:lake
  holdfast equilibria lake.yaml --set L=0.12 --format json
  holdfast equilibria demo:lake --seed 7 --draw 123`,
		Args: cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			if err := checkFormat(format, "table", "json"); err != nil {
				return err
			}
			fl := cmd.Flags()
			replay := fl.Changed("draw")
			if !replay && (fl.Changed("seed") || fl.Changed("plan") || fl.Changed("draws")) {
				return badInput(errors.New("--seed, --plan and --draws choose a Monte Carlo draw: give --draw too"))
			}
			var kind sample.PlanKind
			if replay {
				var err error
				if kind, err = planFlag(plan); err != nil {
					return err
				}
				if err := checkDraws(draws); err != nil {
					return err
				}
				if draw < 0 || draw >= assess.MaxDraws {
					return badInput(fmt.Errorf("--draw must be between 0 and %d, got %d", assess.MaxDraws-1, draw))
				}
			}
			m, err := loadModel(args[0], sets)
			if err != nil {
				return err
			}
			s := m.Scenario
			title, theta := s.Title, m.Nominal
			if replay {
				// The design of holdfast assess with the same flags: draw i
				// depends only on the seed, the plan, the number of draws
				// and i.
				d, err := m.Design(kind, draws, seed)
				if err != nil {
					return badInput(err)
				}
				theta = make([]float64, len(m.Names))
				d.Draw(draw, theta)
				title = fmt.Sprintf("%s (draw %d of seed %d, %s plan, %d draws)", s.Title, draw, seed, kind, draws)
			}
			snap, err := m.Analyze(theta)
			if err != nil {
				return failed(err)
			}
			out := cmd.OutOrStdout()
			if format == "json" {
				return failed(report.WriteJSON(out, report.NewEquilibriaJSON(s.File, title, snap)))
			}
			return failed(report.EquilibriaTable(out, title, s.State.Unit, snap))
		},
	}
	f := c.Flags()
	f.StringArrayVar(&sets, "set", nil, "fix a parameter at a value, as name=value (repeatable)")
	f.StringVar(&format, "format", "table", "output format: table or json")
	f.IntVar(&draw, "draw", 0, "analyse this draw of a Monte Carlo run (0-based index) instead of the nominal values")
	f.Uint64Var(&seed, "seed", 1, "with --draw: the run's random seed")
	f.StringVar(&plan, "plan", "lhs", "with --draw: the run's sampling plan (random, lhs or qmc)")
	f.IntVar(&draws, "draws", 10000, "with --draw: the run's number of draws (the plan depends on it)")
	return c
}
