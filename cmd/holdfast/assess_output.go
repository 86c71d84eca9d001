package main

import (
	"errors"
	"fmt"
	"io"
	"os"
	"strconv"
	"strings"

	"github.com/spf13/cobra"

	"holdfast/assess"
	"holdfast/assess/gate"
	"holdfast/assess/study"
	"holdfast/report"
	"holdfast/scenarios"
)

// assessOutput is what holdfast assess and holdfast merge hand to
// finishAssess: a finished study and where its result goes.
type assessOutput struct {
	model    *assess.Model
	scenario *scenarios.Scenario
	opt      assess.Options
	outcome  *study.Outcome
	command  []string
	version  string
	reqs     []gate.Requirement
	format   string
	quiet    bool
	files    resultFiles // --out, --report and further outputs (--draws-csv)
}

// finishAssess builds the result document, writes every output and
// prints the table or the JSON (resultFiles.write), and returns the gate's
// error when a requirement is not met.
func finishAssess(cmd *cobra.Command, a assessOutput) error {
	s := a.scenario
	res := a.outcome.Result
	cert := report.NewCertificationJSON(a.outcome.Certification)
	res.Warnings = append(res.Warnings, report.CertificationWarnings(cert, replayCommand(s.File, a.command, a.opt))...)
	doc := report.NewAssessJSON(a.version, s.File, s.Title, res)
	doc.Sensitivity = report.NewScreeningJSON(a.outcome.Screening)
	doc.Certification = cert
	doc.SetRun(report.RunInfo{Command: a.command, Scenario: s})
	doc.Settings = report.NewSettingsJSON(a.opt)
	doc.Figures = report.NewFiguresJSON(a.outcome.Figures)
	outs, err := doc.Judge(a.reqs)
	if err != nil {
		return badInput(err)
	}
	doc.Requirements = report.NewRequirementsJSON(outs)
	err = a.files.write(cmd, doc, a.format, a.quiet, func(w io.Writer) error {
		return report.AssessTableCertified(w, s.Title, s.State.Unit, res, a.outcome.Screening, cert, outs, painter(w))
	})
	if err != nil {
		return err
	}
	return gateError(outs)
}

// replayCommand is the start of the command that replays one draw of the
// run: holdfast equilibria with the run's scenario, --set values, seed,
// plan and draws, to be followed by the draw index.
func replayCommand(scenario string, command []string, opt assess.Options) string {
	words := []string{"holdfast", "equilibria", scenario}
	for i := 0; i+1 < len(command); i++ {
		if command[i] == "--set" {
			words = append(words, "--set", command[i+1])
		}
	}
	words = append(words, "--seed", strconv.FormatUint(opt.Seed, 10), "--plan", opt.Plan.String(),
		"--draws", strconv.Itoa(opt.Draws), "--draw")
	return strings.Join(words, " ")
}

// studyConfig is the study of holdfast assess (and of merge, from the
// parts' settings).
func studyConfig(certify, checkSides bool) study.Config {
	cfg := study.Config{Certify: certify}
	cfg.CertifyOptions.Simulate = checkSides
	return cfg
}

// trackedLabels are the labels of the model's nominal equilibria.
func trackedLabels(m *assess.Model) ([]string, error) {
	nominal, err := m.Analyze(m.Nominal)
	if err != nil {
		return nil, failed(err)
	}
	var labels []string
	for _, e := range nominal.Equilibria {
		labels = append(labels, e.Label)
	}
	return labels, nil
}

// checkRequirements checks that every requirement names an equilibrium of
// the scenario at nominal values (and a current state where it asks for
// one).
func checkRequirements(m *assess.Model, reqs []gate.Requirement) error {
	labels, err := trackedLabels(m)
	if err != nil {
		return err
	}
	if err := report.CheckRequirements(reqs, labels, m.Scenario.State.HasCurrent); err != nil {
		return badInput(err)
	}
	return nil
}

// parseShard reads --shard: "K/N"; "auto/N", the index from the
// scheduler with the count N given: JOB_COMPLETION_INDEX (Kubernetes
// Indexed Jobs) or SLURM_ARRAY_TASK_ID (Slurm job arrays numbered 0 to
// N−1, so that one task can be rerun alone with sbatch --array=K); or
// "auto" under a Slurm array: SLURM_ARRAY_TASK_ID less SLURM_ARRAY_TASK_MIN
// of SLURM_ARRAY_TASK_COUNT tasks. The empty spec is the whole run.
func parseShard(spec string, getenv func(string) string) (assess.Shard, error) {
	if spec == "" {
		return assess.Shard{}, nil
	}
	k, n, hasN := strings.Cut(spec, "/")
	count := 0
	if hasN {
		v, err := strconv.Atoi(strings.TrimSpace(n))
		if err != nil || v < 1 || v > maxShards {
			return assess.Shard{}, fmt.Errorf("%q: the shard count must be a whole number from 1 to %d", spec, maxShards)
		}
		count = v
	}
	k = strings.TrimSpace(k)
	if k != "auto" {
		if !hasN {
			return assess.Shard{}, fmt.Errorf("%q: want K/N (shard K of N, counted from 0), auto or auto/N", spec)
		}
		v, err := strconv.Atoi(k)
		if err != nil || v < 0 || v >= count {
			return assess.Shard{}, fmt.Errorf("%q: the shard index must be a whole number from 0 to %d", spec, count-1)
		}
		return assess.Shard{K: v, N: count}, nil
	}
	envInt := func(name string) (int, bool, error) {
		s := strings.TrimSpace(getenv(name))
		if s == "" {
			return 0, false, nil
		}
		v, err := strconv.Atoi(s)
		if err != nil || v < 0 {
			return 0, true, fmt.Errorf("%s=%q is not a whole number", name, s)
		}
		return v, true, nil
	}
	idx, fromK8s, err := envInt("JOB_COMPLETION_INDEX")
	if err != nil {
		return assess.Shard{}, err
	}
	switch {
	case fromK8s && count == 0:
		return assess.Shard{}, errors.New("auto: JOB_COMPLETION_INDEX (a Kubernetes Indexed Job) gives the index only: give the count as --shard auto/N, N the Job's completions")
	case !fromK8s:
		id, ok, err := envInt("SLURM_ARRAY_TASK_ID")
		if err != nil {
			return assess.Shard{}, err
		}
		if !ok {
			return assess.Shard{}, errors.New("auto: neither JOB_COMPLETION_INDEX (Kubernetes Indexed Job) nor SLURM_ARRAY_TASK_ID (Slurm job array) is set; give --shard K/N")
		}
		idx = id
		if count > 0 {
			break // the task ID is the index: arrays 0 to N−1
		}
		lo, _, err := envInt("SLURM_ARRAY_TASK_MIN")
		if err != nil {
			return assess.Shard{}, err
		}
		c, okC, err := envInt("SLURM_ARRAY_TASK_COUNT")
		if err != nil {
			return assess.Shard{}, err
		}
		switch {
		case !okC:
			return assess.Shard{}, errors.New("auto: SLURM_ARRAY_TASK_COUNT is not set; give the count as --shard auto/N")
		case c == 1:
			return assess.Shard{}, errors.New("auto: the Slurm array has one task (one task rerun alone?), so the shard count is unknown: give it as --shard auto/N")
		case id < lo:
			return assess.Shard{}, fmt.Errorf("auto: SLURM_ARRAY_TASK_ID=%d is below SLURM_ARRAY_TASK_MIN=%d", id, lo)
		}
		idx, count = id-lo, c
	}
	if count < 1 || count > maxShards || idx >= count {
		return assess.Shard{}, fmt.Errorf("auto: shard index %d is not below the count %d (number the tasks 0 to N−1; arrays with steps, such as --array=0-15:2, are not supported)", idx, count)
	}
	return assess.Shard{K: idx, N: count}, nil
}

// maxShards bounds the shard count.
const maxShards = 100_000

// checkCheckpointPath refuses a checkpoint file that would overwrite an
// input or an output, and a fresh run over an existing checkpoint (which
// --resume continues), and a --resume without one.
func checkCheckpointPath(path string, resume bool, inputs ...string) error {
	for _, in := range inputs {
		if in != "" && report.SamePath(path, in) {
			return badInput(fmt.Errorf("--checkpoint %s: the same file as an input or output", path))
		}
	}
	_, err := os.Stat(path)
	switch {
	case resume && errors.Is(err, os.ErrNotExist):
		return badInput(fmt.Errorf("--resume: no checkpoint file %s to resume from", path))
	case !resume && err == nil:
		return badInput(fmt.Errorf("--checkpoint %s: the file exists (the checkpoint of an earlier run?): add --resume to continue that run, or remove the file", path))
	}
	return nil
}

// removeCheckpoint removes the checkpoint of a finished run.
func removeCheckpoint(path string) {
	if path != "" {
		os.Remove(path)
	}
}

// isGate reports whether err is the gate's exit-status-3 error.
func isGate(err error) bool {
	var ce *codeError
	return errors.As(err, &ce) && ce.code == exitGate
}
