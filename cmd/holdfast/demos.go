package main

import (
	"fmt"

	"github.com/spf13/cobra"

	"holdfast/scenarios"
)

func newDemosCmd() *cobra.Command {
	return &cobra.Command{
		Use:   "demos [NAME]",
		Short: "List the embedded demo scenarios, or print one",
		Long: `demos lists the demo scenarios built into holdfast. With a name it prints
that scenario's file, ready to save and edit. Any command takes demo:NAME in
place of a scenario path. The demos are invented settings with illustrative
numbers.`,
		Example: `  holdfast demos
  holdfast demos lake > my-lake.yaml`,
		Args: cobra.MaximumNArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			out := cmd.OutOrStdout()
			if len(args) == 0 {
				for _, name := range scenarios.Demos() {
					s, err := scenarios.LoadDemo(name)
					if err != nil {
						return failed(err)
					}
					fmt.Fprintf(out, "demo:%-10s %s\n", name, s.Title)
				}
				return nil
			}
			src, err := scenarios.DemoSource(args[0])
			if err != nil {
				return badInput(err)
			}
			_, err = out.Write(src)
			return failed(err)
		},
	}
}
