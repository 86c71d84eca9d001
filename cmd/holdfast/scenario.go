package main

import (
	"fmt"
	"strconv"
	"strings"

	"holdfast/assess"
	"holdfast/sample"
	"holdfast/scenarios"
)

// loadModel loads the scenario named on the command line (a path, or
// demo:NAME for an embedded demo), applies --set overrides and compiles it.
// Every error is bad input.
func loadModel(arg string, sets []string) (*assess.Model, error) {
	var (
		s   *scenarios.Scenario
		err error
	)
	if name, ok := strings.CutPrefix(arg, "demo:"); ok {
		s, err = scenarios.LoadDemo(name)
	} else {
		s, err = scenarios.Load(arg)
	}
	if err != nil {
		return nil, badInput(err)
	}
	return compileWithSets(s, sets)
}

// compileWithSets applies --set overrides to a scenario and compiles it.
// Every error is bad input.
func compileWithSets(s *scenarios.Scenario, sets []string) (*assess.Model, error) {
	for _, kv := range sets {
		name, val, ok := strings.Cut(kv, "=")
		if !ok {
			return nil, badInput(fmt.Errorf("--set %q: want name=value", kv))
		}
		v, perr := strconv.ParseFloat(strings.TrimSpace(val), 64)
		if perr != nil {
			return nil, badInput(fmt.Errorf("--set %s: %q is not a number", name, val))
		}
		if err := s.Set(strings.TrimSpace(name), v); err != nil {
			return nil, badInput(fmt.Errorf("--set: %w", err))
		}
	}
	m, err := assess.Compile(s)
	if err != nil {
		return nil, badInput(err)
	}
	return m, nil
}

// checkFormat validates a --format value against the allowed ones.
func checkFormat(format string, allowed ...string) error {
	for _, a := range allowed {
		if format == a {
			return nil
		}
	}
	return badInput(fmt.Errorf("--format %q: want one of %s", format, strings.Join(allowed, ", ")))
}

// planFlag reads a --plan value: random, lhs or qmc.
func planFlag(plan string) (sample.PlanKind, error) {
	kind, err := sample.ParsePlan(plan)
	if err != nil {
		return kind, badInput(fmt.Errorf("--plan: %w", err))
	}
	return kind, nil
}

// checkDraws validates a --draws value: from 1 to assess.MaxDraws.
func checkDraws(draws int) error {
	if draws < 1 || draws > assess.MaxDraws {
		return badInput(fmt.Errorf("--draws must be between 1 and %d, got %d", assess.MaxDraws, draws))
	}
	return nil
}

// checkWorkers validates a --workers value: 0 (all cores) or more.
func checkWorkers(workers int) error {
	if workers < 0 || workers > maxWorkers {
		return badInput(fmt.Errorf("--workers must be 0 (all cores) to %d, got %d", maxWorkers, workers))
	}
	return nil
}

// maxWorkers bounds --workers: each worker holds its own evaluator and
// scratch (about 20 kB), and more workers than cores only cost memory.
const maxWorkers = 1024
