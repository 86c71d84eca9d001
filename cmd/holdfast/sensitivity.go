package main

import (
	"errors"

	"github.com/spf13/cobra"
)

// newSensitivityCmd is a placeholder until the sensitivity issue lands.
func newSensitivityCmd() *cobra.Command {
	return &cobra.Command{
		Use:    "sensitivity SCENARIO",
		Short:  "Rank the uncertain inputs that drive a verdict (not yet available)",
		Hidden: true,
		RunE: func(cmd *cobra.Command, args []string) error {
			return failed(errors.New("sensitivity is not available yet"))
		},
	}
}
