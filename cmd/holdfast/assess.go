package main

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"os"

	"github.com/schollz/progressbar/v3"
	"github.com/spf13/cobra"
	"golang.org/x/term"

	"holdfast/assess"
	"holdfast/assess/gate"
	"holdfast/assess/sensitivity"
	"holdfast/assess/summary"
	"holdfast/report"
	"holdfast/sample"
)

func newAssessCmd() *cobra.Command {
	var (
		sets                   []string
		format, plan           string
		out, drawsCSV          string
		draws, workers, maxDrw int
		seed                   uint64
		halfWidth              float64
		quiet                  bool
		requires               []string
		rf                     reportFlags
	)
	c := &cobra.Command{
		Use:   "assess SCENARIO",
		Short: "Monte Carlo assessment: how likely each equilibrium exists and attracts",
		Long: `assess draws parameter sets from the scenario's distributions (with their
rank correlations), finds and classifies every equilibrium of every draw,
follows each nominal equilibrium E1 < E2 < … into every draw by
continuation (it is lost where it meets a fold), and reports the
probability that each exists, attracts or is semistable with 95% intervals,
quantiles of its position, slope, return time, basin width and barrier,
the regimes seen, and where the state goes from the current state.

Draw i depends only on the seed and i, so results are identical for any
number of workers.

--out saves the result file (with the command line, the seed, the scenario
text and its SHA-256, and the summaries behind the plots), which holdfast
report renders again at any time. --report FILE.md or FILE.html writes the
report at once.

--require "LABEL VERDICT OP PROBABILITY" (repeatable) makes the run a gate
for automated reviews: VERDICT is exists, attracting, semistable or current
(the state ends there from the current state), OP one of >=, >, <=, <, and
the probability a number in [0, 1] or a percentage. Each requirement is
judged on the end of the 95% interval (the lower one for >= and >), not on
the estimate; the exit status is 3 when one is not met.`,
		Example: `  holdfast assess demo:lake
  holdfast assess lake.yaml --draws 100000 --plan qmc --seed 7 --out lake-result.json
  holdfast assess lake.yaml --until-halfwidth 0.005 --max-draws 1000000
  holdfast assess demo:lake --seed 7 --report lake.md --report lake.html
  holdfast assess lake.yaml --require "E1 attracting >= 0.95" --require "E3 current <= 5%"`,
		Args: cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			if err := checkFormat(format, "table", "json"); err != nil {
				return err
			}
			kind, err := sample.ParsePlan(plan)
			if err != nil {
				return badInput(fmt.Errorf("--plan: %w", err))
			}
			if draws < 1 || draws > assess.MaxDraws {
				return badInput(fmt.Errorf("--draws must be between 1 and %d, got %d", assess.MaxDraws, draws))
			}
			if workers < 0 {
				return badInput(fmt.Errorf("--workers must be 0 (all cores) or more, got %d", workers))
			}
			if halfWidth < 0 || halfWidth >= 0.5 {
				return badInput(fmt.Errorf("--until-halfwidth must be in (0, 0.5), got %g", halfWidth))
			}
			if maxDrw != 0 && (halfWidth == 0 || maxDrw < draws) {
				return badInput(errors.New("--max-draws needs --until-halfwidth and must be at least --draws"))
			}
			reqs, err := gate.ParseAll(requires)
			if err != nil {
				return badInput(fmt.Errorf("--require: %w", err))
			}
			m, err := loadModel(args[0], sets)
			if err != nil {
				return err
			}
			opt := assess.Options{Draws: draws, Seed: seed, Plan: kind, Workers: workers, UntilHalfWidth: halfWidth, MaxDraws: maxDrw}
			scenarioPath := m.Scenario.File
			// Screening measures (which inputs drive each verdict) from the
			// same draws, at no extra model cost.
			screen := sensitivity.NewScreen(m, 0)
			// The summaries behind the report's plots, from the same draws.
			collect, err := summary.NewCollector(m, summary.Config{})
			if err != nil {
				return failed(err)
			}
			if len(reqs) > 0 {
				var labels []string
				nominal, err := m.Analyze(m.Nominal)
				if err != nil {
					return failed(err)
				}
				for _, e := range nominal.Equilibria {
					labels = append(labels, e.Label)
				}
				if err := report.CheckRequirements(reqs, labels, m.Scenario.State.HasCurrent); err != nil {
					return badInput(err)
				}
			}
			opt.Extra = collect.Extra
			opt.Sink = func(block []assess.Draw) error {
				screen.Add(block)
				return collect.Add(block)
			}

			var csvOut *report.Staged
			if drawsCSV != "" {
				if csvOut, err = report.Stage(drawsCSV, scenarioPath); err != nil {
					return badInput(err)
				}
				defer csvOut.Abort()
				nominal, err := m.Analyze(m.Nominal)
				if err != nil {
					return failed(err)
				}
				var labels []string
				for _, e := range nominal.Equilibria {
					labels = append(labels, e.Label)
				}
				csvw := report.NewDrawsCSV(csvOut, m.Names, labels)
				opt.Sink = func(block []assess.Draw) error {
					screen.Add(block)
					collect.Add(block)
					return csvw.Write(block)
				}
			}
			var outFile *report.Staged
			if out != "" {
				if outFile, err = report.Stage(out, scenarioPath); err != nil {
					return badInput(err)
				}
				defer outFile.Abort()
			}
			reports, err := rf.prepare(scenarioPath, out)
			if err != nil {
				return err
			}
			defer reports.Abort()
			var endBar func()
			opt.Progress, endBar = progress(cmd.ErrOrStderr(), quiet, draws)
			res, err := assess.Run(cmd.Context(), m, opt)
			endBar()
			if err != nil {
				return failed(err)
			}
			s := m.Scenario
			scr := screen.Result()
			doc := report.NewAssessJSON(version, s.File, s.Title, res)
			doc.Sensitivity = report.NewScreeningJSON(scr)
			doc.SetRun(report.RunInfo{Command: commandLine(cmd, args), Scenario: s})
			doc.Settings = report.NewSettingsJSON(opt)
			doc.Figures = report.NewFiguresJSON(collect.Summary())
			outs, err := doc.Judge(reqs)
			if err != nil {
				return badInput(err)
			}
			doc.Requirements = report.NewRequirementsJSON(outs)
			var raw bytes.Buffer
			if err := report.WriteJSON(&raw, doc); err != nil {
				return failed(err)
			}
			if outFile != nil {
				if _, err := outFile.Write(raw.Bytes()); err != nil {
					return failed(err)
				}
			}
			if reports != nil {
				if err := renderReports(reports, raw.Bytes()); err != nil {
					return failed(err)
				}
			}
			// Everything is written: make the files appear together.
			for _, st := range []*report.Staged{csvOut, outFile} {
				if st != nil {
					if err := st.Commit(); err != nil {
						return failed(err)
					}
				}
			}
			w := cmd.OutOrStdout()
			if reports != nil && !quiet {
				fmt.Fprintf(cmd.ErrOrStderr(), "Wrote %s.\n", describeWritten(reports.Written()))
			}
			if format == "json" {
				if _, err := w.Write(raw.Bytes()); err != nil {
					return failed(err)
				}
				return gateError(outs)
			}
			if quiet && (out != "" || reports != nil) {
				return gateError(outs)
			}
			if err := report.AssessTableGated(w, s.Title, s.State.Unit, res, scr, outs, painter(w)); err != nil {
				return failed(err)
			}
			return gateError(outs)
		},
	}
	f := c.Flags()
	f.StringArrayVar(&sets, "set", nil, "fix a parameter at a value, as name=value (repeatable)")
	f.IntVar(&draws, "draws", 10000, "number of parameter draws (the first batch with --until-halfwidth)")
	f.Uint64Var(&seed, "seed", 1, "random seed; the same seed gives the same result")
	f.StringVar(&plan, "plan", "lhs", "sampling plan: random, lhs (Latin hypercube) or qmc (scrambled Sobol')")
	f.IntVar(&workers, "workers", 0, "worker goroutines (0: all cores); results do not depend on it")
	f.Float64Var(&halfWidth, "until-halfwidth", 0, "keep drawing until every probability's 95% half-width is at most this")
	f.IntVar(&maxDrw, "max-draws", 0, "draw limit with --until-halfwidth (default 100 × --draws)")
	f.StringVar(&format, "format", "table", "output format: table or json")
	f.StringVar(&out, "out", "", "write the JSON result to this file")
	f.StringVar(&drawsCSV, "draws-csv", "", "write one CSV row per draw to this file")
	f.BoolVar(&quiet, "quiet", false, "no progress bar; with --out or --report, no table either")
	f.StringArrayVar(&requires, "require", nil, `requirement gate, e.g. "E2 attracting >= 0.95" (repeatable; exit status 3 when not met)`)
	rf.add(f)
	return c
}

// progress returns a progress callback drawing a bar on stderr when stderr
// is a terminal, the run is long enough to want one (planned draws) and
// --quiet is off, and a function that clears the bar when the run ends.
// Otherwise the callback is nil and done does nothing.
func progress(w io.Writer, quiet bool, planned int) (update func(done, planned int), done func()) {
	f, ok := w.(*os.File)
	if quiet || !ok || !term.IsTerminal(int(f.Fd())) || planned < 20000 {
		return nil, func() {}
	}
	bar := progressbar.NewOptions(planned,
		progressbar.OptionSetWriter(w),
		progressbar.OptionSetDescription("draws"),
		progressbar.OptionShowCount(),
		progressbar.OptionThrottle(200e6),
		progressbar.OptionSetWidth(30),
	)
	update = func(done, planned int) {
		bar.ChangeMax(planned)
		bar.Set(done)
	}
	return update, func() {
		bar.Finish()
		bar.Clear()
	}
}
