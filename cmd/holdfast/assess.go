package main

import (
	"errors"
	"fmt"
	"io"
	"os"

	"github.com/schollz/progressbar/v3"
	"github.com/spf13/cobra"
	"golang.org/x/term"

	"holdfast/assess"
	"holdfast/assess/sensitivity"
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
number of workers.`,
		Example: `  holdfast assess demo:lake
  holdfast assess lake.yaml --draws 100000 --plan qmc --seed 7 --out lake-result.json
  holdfast assess lake.yaml --until-halfwidth 0.005 --max-draws 1000000`,
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
			m, err := loadModel(args[0], sets)
			if err != nil {
				return err
			}
			opt := assess.Options{Draws: draws, Seed: seed, Plan: kind, Workers: workers, UntilHalfWidth: halfWidth, MaxDraws: maxDrw}
			scenarioPath := m.Scenario.File
			// Screening measures (which inputs drive each verdict) from the
			// same draws, at no extra model cost.
			screen := sensitivity.NewScreen(m, 0)
			opt.Sink = screen.Add

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
			bar := progress(cmd.ErrOrStderr(), quiet, draws)
			if bar != nil {
				opt.Progress = func(done, planned int) {
					bar.ChangeMax(planned)
					bar.Set(done)
				}
			}
			res, err := assess.Run(cmd.Context(), m, opt)
			if bar != nil {
				bar.Finish()
				bar.Clear()
			}
			if err != nil {
				return failed(err)
			}
			s := m.Scenario
			scr := screen.Result()
			doc := report.NewAssessJSON(version, s.File, s.Title, res)
			doc.Sensitivity = report.NewScreeningJSON(scr)
			if outFile != nil {
				if err := report.WriteJSON(outFile, doc); err != nil {
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
			if format == "json" {
				return failed(report.WriteJSON(w, doc))
			}
			if quiet && out != "" {
				return nil
			}
			return failed(report.AssessTableScreened(w, s.Title, s.State.Unit, res, scr))
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
	f.BoolVar(&quiet, "quiet", false, "no progress bar; with --out, no table either")
	return c
}

// progress returns a progress bar on stderr when stderr is a terminal,
// the run is long enough to want one, and --quiet is off; nil otherwise.
func progress(w io.Writer, quiet bool, draws int) *progressbar.ProgressBar {
	f, ok := w.(*os.File)
	if quiet || !ok || !term.IsTerminal(int(f.Fd())) || draws < 20000 {
		return nil
	}
	return progressbar.NewOptions(draws,
		progressbar.OptionSetWriter(w),
		progressbar.OptionSetDescription("draws"),
		progressbar.OptionShowCount(),
		progressbar.OptionThrottle(200e6),
		progressbar.OptionSetWidth(30),
	)
}
