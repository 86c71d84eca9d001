package main

import (
	"errors"
	"fmt"

	"github.com/spf13/cobra"

	"holdfast/assess"
	"holdfast/assess/gate"
	"holdfast/assess/study"
	"holdfast/report"
	"holdfast/sample"
	"holdfast/scenarios"
)

func newMergeCmd() *cobra.Command {
	var (
		out, format string
		quiet       bool
		rf          reportFlags
	)
	c := &cobra.Command{
		Use:   "merge PART.json... --out RESULT.json",
		Short: "Combine the part files of a sharded assess run into its result",
		Long: `merge combines the part files written by holdfast assess --shard K/N into
the result of the whole run: exactly the JSON that one holdfast assess run
with the same settings writes, quantiles included, whatever the number of
shards or machines.

The parts must be the N shards of one run, each exactly once: the same
holdfast version, scenario text, --set values, draws, seed, plan,
--certify and --require settings, and shard count. merge names the file
and the setting that differ, shards given twice, and shards missing (rerun
those alone with the same command and their --shard K/N).

Each part file carries the scenario's text (and any CSV file it reads),
so merge needs no scenario file. --out saves the result, --report renders
the report at once; the table is printed as by assess, and --require
gates recorded in the parts are judged here (exit status 3 when one is
not met).`,
		Example: `  holdfast assess lake.yaml --draws 1000000 --seed 7 --shard 0/4 --out part-0.json   # and 1/4, 2/4, 3/4
  holdfast merge part-*.json --out lake-result.json --report lake.html`,
		Args: cobra.MinimumNArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			if err := checkFormat(format, "table", "json"); err != nil {
				return err
			}
			// One part at a time: memory holds the merged state and one
			// part, whatever the number of shards.
			protect := append([]string{}, args...)
			var (
				check   report.PartChecker
				p0      *report.PartJSON
				s       *scenarios.Scenario
				m       *assess.Model
				opt     assess.Options
				reqs    []gate.Requirement
				merger  *study.Merger
				outFile *report.Staged
				reports *report.Reports
			)
			for i, name := range args {
				p, err := report.ReadPart(name, report.KindPart)
				if err != nil {
					return badInput(err)
				}
				if err := check.Add(name, p); err != nil {
					return badInput(err)
				}
				if i == 0 {
					p0 = p
					if s, err = p.Parse(); err != nil {
						return badInput(fmt.Errorf("%s: the stored scenario: %w", name, err))
					}
					if m, err = compileWithSets(s, p.Run.Sets); err != nil {
						return badInput(fmt.Errorf("%s: %w", name, err))
					}
					kind, err := sample.ParsePlan(p.Run.Plan)
					if err != nil {
						return badInput(fmt.Errorf("%s: %w", name, err))
					}
					if reqs, err = gate.ParseAll(p.Run.Requires); err != nil {
						return badInput(fmt.Errorf("%s: --require: %w", name, err))
					}
					opt = assess.Options{Draws: p.Run.Draws, Seed: p.Run.Seed, Plan: kind, UntilHalfWidth: p.Run.UntilHalfWidth, MaxDraws: p.Run.MaxDraws}
					if merger, err = study.NewMerger(m, studyConfig(p.Run.Certify, p.Run.CheckSides), opt); err != nil {
						return failed(err)
					}
					// Stage the outputs once the first part is known good,
					// so that a bad path fails before the long part.
					if out != "" {
						if outFile, err = report.Stage(out, protect...); err != nil {
							return badInput(err)
						}
						defer outFile.Abort()
					}
					if reports, err = rf.prepare(protect...); err != nil {
						return err
					}
					defer reports.Abort()
					if out == "" && reports == nil && quiet {
						return badInput(errors.New("nothing to do: --quiet without --out or --report"))
					}
				}
				if err := merger.Add(p.State); err != nil {
					return badInput(fmt.Errorf("merging %s: %w", name, err))
				}
				p.State = nil
			}
			if err := check.Done(); err != nil {
				return badInput(err)
			}
			outcome, err := merger.Outcome()
			if err != nil {
				return badInput(err)
			}
			return finishAssess(cmd, assessOutput{
				model: m, scenario: s, opt: opt, outcome: outcome, command: p0.Command, version: p0.Version,
				reqs: reqs, format: format, quiet: quiet, files: resultFiles{out: outFile, reports: reports},
			})
		},
	}
	f := c.Flags()
	f.StringVar(&out, "out", "", "write the merged JSON result to this file")
	f.StringVar(&format, "format", "table", "output format: table or json")
	f.BoolVar(&quiet, "quiet", false, "with --out or --report, print no table")
	rf.add(f)
	return c
}
