package main

import (
	"errors"

	"github.com/spf13/cobra"
)

// newSweepCmd is a placeholder until the tipping-point issue lands.
func newSweepCmd() *cobra.Command {
	return &cobra.Command{
		Use:    "sweep SCENARIO",
		Short:  "Tipping points along a driver parameter (not yet available)",
		Hidden: true,
		RunE: func(cmd *cobra.Command, args []string) error {
			return failed(errors.New("sweep is not available yet"))
		},
	}
}
