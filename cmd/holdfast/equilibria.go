package main

import (
	"github.com/spf13/cobra"

	"holdfast/report"
)

func newEquilibriaCmd() *cobra.Command {
	var (
		sets   []string
		format string
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
and how long it takes.`,
		Example: `  holdfast equilibria demo:lake
  holdfast equilibria lake.yaml --set L=0.12 --format json`,
		Args: cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			if err := checkFormat(format, "table", "json"); err != nil {
				return err
			}
			m, err := loadModel(args[0], sets)
			if err != nil {
				return err
			}
			snap, err := m.Analyze(m.Nominal)
			if err != nil {
				return failed(err)
			}
			s := m.Scenario
			out := cmd.OutOrStdout()
			if format == "json" {
				doc := report.NewEquilibriaJSON(s.File, s.Title, snap)
				doc.SetRun(report.RunInfo{Version: version, Command: commandLine(cmd, args), Scenario: s})
				return failed(report.WriteJSON(out, doc))
			}
			return failed(report.EquilibriaTable(out, s.Title, s.State.Unit, snap))
		},
	}
	c.Flags().StringArrayVar(&sets, "set", nil, "fix a parameter at a value, as name=value (repeatable)")
	c.Flags().StringVar(&format, "format", "table", "output format: table or json")
	return c
}
