package main

import (
	"io"

	"github.com/spf13/cobra"
)

// version is the tool version recorded in every result file.
const version = "0.1.0-dev"

func newRootCmd(stdout, stderr io.Writer) *cobra.Command {
	root := &cobra.Command{
		Use:   "holdfast",
		Short: "Assess whether the steady states of an uncertain rate law hold",
		Long: `holdfast reads a scenario — a one-variable rate law dx/dt = f(x; θ), the
state's range and a distribution for every uncertain parameter — and finds,
classifies and assesses every equilibrium.

Model verdicts need review by a qualified expert before real decisions and
defer to local codes, standards and licensed practice.`,
		Version:       version,
		SilenceUsage:  true,
		SilenceErrors: true,
	}
	root.SetOut(stdout)
	root.SetErr(stderr)
	root.SetFlagErrorFunc(func(c *cobra.Command, err error) error {
		return badInput(err)
	})
	root.AddCommand(newEquilibriaCmd(), newAssessCmd(), newSensitivityCmd(), newSweepCmd(), newDemosCmd(), newReportCmd(), newMergeCmd())
	return root
}
