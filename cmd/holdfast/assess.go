package main

import (
	"errors"
	"fmt"
	"io"
	"os"
	"strconv"
	"strings"
	"time"

	"github.com/schollz/progressbar/v3"
	"github.com/spf13/cobra"
	"golang.org/x/term"

	"holdfast/assess"
	"holdfast/assess/gate"
	"holdfast/assess/study"
	"holdfast/report"
)

func newAssessCmd() *cobra.Command {
	var (
		sets                   []string
		format, plan           string
		out, drawsCSV          string
		draws, workers, maxDrw int
		seed                   uint64
		halfWidth              float64
		quiet, certifyOn       bool
		checkSides             bool
		requires               []string
		rf                     reportFlags
		shardSpec, checkpoint  string
		resume                 bool
		every                  time.Duration
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
the estimate; the exit status is 3 when one is not met.

Every draw's equilibria are also proven by interval arithmetic (a box
whose enclosure of f excludes 0 holds none; an interval Newton step proves
one): the result gives the certified share, the regimes over certified
draws, and each draw where scan and certification disagree with the
command that replays it. --certify=false skips the proof (on the demos the
proof takes 1.0 to 1.5 times the run's time).

--shard K/N computes only the draws i with i mod N = K into the part file
--out (the text {shard} in it becomes K); holdfast merge combines the N
parts into exactly this command's result without --shard. --shard auto
reads a Slurm job array's SLURM_ARRAY_TASK_ID (less SLURM_ARRAY_TASK_MIN)
and SLURM_ARRAY_TASK_COUNT; --shard auto/N a Kubernetes Indexed Job's
JOB_COMPLETION_INDEX, with N its completions.

--checkpoint FILE saves the run's state every --checkpoint-every; after an
interruption, the same command with --resume continues from it to the
result an uninterrupted run gives. The file is removed when the run ends.`,
		Example: `  holdfast assess demo:lake
  holdfast assess lake.yaml --draws 100000 --plan qmc --seed 7 --out lake-result.json
  holdfast assess lake.yaml --until-halfwidth 0.005 --max-draws 1000000
  holdfast assess demo:lake --seed 7 --report lake.md --report lake.html
  holdfast assess lake.yaml --require "E1 attracting >= 0.95" --require "E3 current <= 5%"
  holdfast assess lake.yaml --certify=false --draws 1000000
  holdfast assess lake.yaml --draws 10000000 --shard 3/8 --out parts/part-{shard}.json
  holdfast assess lake.yaml --draws 10000000 --checkpoint lake-state.json --out lake.json`,
		Args: cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			if err := checkFormat(format, "table", "json"); err != nil {
				return err
			}
			kind, err := planFlag(plan)
			if err != nil {
				return err
			}
			if err := checkDraws(draws); err != nil {
				return err
			}
			if err := checkWorkers(workers); err != nil {
				return err
			}
			if halfWidth < 0 || halfWidth >= 0.5 {
				return badInput(fmt.Errorf("--until-halfwidth must be in (0, 0.5), got %g", halfWidth))
			}
			if maxDrw != 0 && (halfWidth == 0 || maxDrw < draws) {
				return badInput(errors.New("--max-draws needs --until-halfwidth and must be at least --draws"))
			}
			if maxDrw > assess.MaxDraws {
				return badInput(fmt.Errorf("--max-draws must be at most %d, got %d", assess.MaxDraws, maxDrw))
			}
			sh, err := parseShard(shardSpec, os.Getenv)
			if err != nil {
				return badInput(fmt.Errorf("--shard: %w", err))
			}
			sharded := shardSpec != ""
			switch {
			case sharded && out == "":
				return badInput(errors.New("--shard needs --out FILE for the part file (holdfast merge combines the parts)"))
			case sharded && halfWidth > 0:
				return badInput(errors.New("--shard cannot be used with --until-halfwidth: its stopping rule needs every draw"))
			case sharded && (drawsCSV != "" || rf.any() || format == "json"):
				return badInput(errors.New("--shard writes only the part file: --draws-csv, --report and --format json apply to the merged result (holdfast merge)"))
			case resume && checkpoint == "":
				return badInput(errors.New("--resume needs --checkpoint FILE, the file to resume from"))
			case checkpoint != "" && drawsCSV != "":
				return badInput(errors.New("--checkpoint cannot be used with --draws-csv: the rows of the draws before a checkpoint would be lost on resuming"))
			}
			if sharded {
				out = strings.ReplaceAll(out, "{shard}", strconv.Itoa(sh.K))
			}
			reqs, err := gate.ParseAll(requires)
			if err != nil {
				return badInput(fmt.Errorf("--require: %w", err))
			}
			m, err := loadModel(args[0], sets)
			if err != nil {
				return err
			}
			scenarioPath := m.Scenario.File
			if checkpoint != "" {
				if err := checkCheckpointPath(checkpoint, resume, scenarioPath, out); err != nil {
					return err
				}
			}
			if len(reqs) > 0 {
				if err := checkRequirements(m, reqs); err != nil {
					return err
				}
			}
			if checkSides && !certifyOn {
				return badInput(errors.New("--check-sides needs the certification (drop --certify=false)"))
			}
			st, err := study.New(m, studyConfig(certifyOn, checkSides))
			if err != nil {
				return failed(err)
			}
			opt := assess.Options{Draws: draws, Seed: seed, Plan: kind, Workers: workers, UntilHalfWidth: halfWidth, MaxDraws: maxDrw}
			if sharded {
				opt.Shard = sh
			}
			command := commandLine(cmd, args)
			settings := report.PartRunJSON{
				Sets: sets, Draws: draws, Seed: seed, Plan: kind.String(), UntilHalfWidth: halfWidth, MaxDraws: maxDrw,
				Certify: certifyOn, CheckSides: checkSides, Requires: requires, Shard: sh.K, Shards: max(sh.N, 1),
			}
			runInfo := report.RunInfo{Command: command, Scenario: m.Scenario}
			if checkpoint != "" {
				if resume {
					saved, err := report.ReadPart(checkpoint, report.KindCheckpoint)
					if err != nil {
						return badInput(err)
					}
					here := report.NewPartJSON(report.KindCheckpoint, version, runInfo, settings, nil)
					if d := report.SameRun(here, saved); d != "" {
						return badInput(fmt.Errorf("--resume: %s is the checkpoint of another run (%s)", checkpoint, d))
					}
					if saved.Run.Shard != settings.Shard {
						return badInput(fmt.Errorf("--resume: %s is the checkpoint of shard %d/%d, not of shard %d/%d", checkpoint, saved.Run.Shard, saved.Run.Shards, settings.Shard, settings.Shards))
					}
					if opt.Resume, err = st.Restore(saved.State); err != nil {
						return badInput(fmt.Errorf("--resume: %s: %w", checkpoint, err))
					}
				}
				if every <= 0 {
					return badInput(fmt.Errorf("--checkpoint-every must be positive, got %v", every))
				}
				opt.CheckpointEvery = every
				opt.Checkpoint = st.Checkpoint(func(state *study.State) error {
					doc := report.NewPartJSON(report.KindCheckpoint, version, runInfo, settings, state)
					return report.WriteFileAtomic(checkpoint, func(w io.Writer) error { return report.WritePart(w, doc) }, scenarioPath)
				})
			}

			var outFile *report.Staged
			if out != "" {
				if outFile, err = report.Stage(out, scenarioPath, checkpoint); err != nil {
					return badInput(err)
				}
				defer outFile.Abort()
			}
			var csvOut *report.Staged
			if drawsCSV != "" {
				if csvOut, err = report.Stage(drawsCSV, scenarioPath, out); err != nil {
					return badInput(err)
				}
				defer csvOut.Abort()
				labels, err := trackedLabels(m)
				if err != nil {
					return err
				}
				csvw := report.NewDrawsCSV(csvOut, m.Names, labels)
				csvw.Certified = certifyOn
				opt.Sink = csvw.Write
			}
			reports, err := rf.prepare(scenarioPath, out)
			if err != nil {
				return err
			}
			defer reports.Abort()
			var endBar func()
			opt.Progress, endBar = progress(cmd.ErrOrStderr(), quiet, opt.Shard.Size(draws))

			if sharded {
				state, err := st.RunShard(cmd.Context(), opt)
				endBar()
				if err != nil {
					return failed(err)
				}
				doc := report.NewPartJSON(report.KindPart, version, runInfo, settings, state)
				if err := report.WritePart(outFile, doc); err != nil {
					return failed(err)
				}
				if err := outFile.Commit(); err != nil {
					return failed(err)
				}
				removeCheckpoint(checkpoint)
				if !quiet {
					fmt.Fprintf(cmd.ErrOrStderr(), "Shard %d of %d: %d draws assessed into %s; merge all %d parts with holdfast merge.\n",
						sh.K, sh.N, state.Engine.Draws, out, sh.N)
				}
				return nil
			}
			outcome, err := st.Run(cmd.Context(), opt)
			endBar()
			if err != nil {
				return failed(err)
			}
			err = finishAssess(cmd, assessOutput{
				model: m, scenario: m.Scenario, opt: opt, outcome: outcome, command: command, version: version,
				reqs: reqs, format: format, quiet: quiet, files: resultFiles{out: outFile, reports: reports, staged: []*report.Staged{csvOut}},
			})
			if err == nil || isGate(err) {
				removeCheckpoint(checkpoint)
			}
			return err
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
	f.BoolVar(&certifyOn, "certify", true, "prove every draw's equilibria by interval arithmetic and report the certified share (--certify=false skips it)")
	f.BoolVar(&checkSides, "check-sides", false, "also integrate the rate law (Dormand–Prince) on both sides of each equilibrium whose linear term vanishes, in draws not certified, and warn where it contradicts the verdict")
	f.StringVar(&shardSpec, "shard", "", "run only shard K of N (K/N; auto or auto/N from Slurm or Kubernetes variables) into the part file --out")
	f.StringVar(&checkpoint, "checkpoint", "", "save the run's state to this file every few seconds (removed when the run ends)")
	f.BoolVar(&resume, "resume", false, "continue the run saved in --checkpoint FILE")
	f.DurationVar(&every, "checkpoint-every", assess.DefaultCheckpointEvery, "least time between two saves of --checkpoint")
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
