package assess

import (
	"context"
	"encoding/json"
	"fmt"
	"strings"
	"testing"

	"holdfast/sample"
	"holdfast/scenarios"
)

func TestShardsMergeToTheSingleRun(t *testing.T) {
	// Merged shards equal one run over all draws: the same Result, printed
	// (common practice for exact mergeable aggregates, no source).
	s, err := scenarios.LoadDemo("lake")
	if err != nil {
		t.Fatal(err)
	}
	m, err := Compile(s)
	if err != nil {
		t.Fatal(err)
	}
	opt := Options{Draws: 3001, Seed: 5, Plan: sample.LHS, Workers: 2}
	whole, err := Run(context.Background(), m, opt)
	if err != nil {
		t.Fatal(err)
	}
	var parts []*Partial
	for k := 3; k >= 0; k-- { // any order
		o := opt
		o.Shard = Shard{k, 4}
		p, err := RunPartial(context.Background(), m, o)
		if err != nil {
			t.Fatal(err)
		}
		// Through the stored form, as separate processes would.
		raw, err := json.Marshal(p)
		if err != nil {
			t.Fatal(err)
		}
		var back Partial
		if err := json.Unmarshal(raw, &back); err != nil {
			t.Fatal(err)
		}
		parts = append(parts, &back)
	}
	merged, err := Merge(m, opt, parts)
	if err != nil {
		t.Fatal(err)
	}
	whole.Nominal, merged.Nominal = nil, nil // recomputed by each; compare the rest
	if a, b := fmt.Sprintf("%+v", *whole), fmt.Sprintf("%+v", *merged); a != b {
		t.Errorf("merged shards differ from the single run:\n%s\n%s", a, b)
	}
	// Missing and duplicate shards are named.
	if _, err := Merge(m, opt, parts[:3]); err == nil || !strings.Contains(err.Error(), "missing") {
		t.Errorf("missing shard: %v", err)
	}
	if _, err := Merge(m, opt, append(parts[:3:3], parts[0])); err == nil || !strings.Contains(err.Error(), "twice") {
		t.Errorf("duplicate shard: %v", err)
	}
}

func TestCheckpointAndResumeGiveTheUninterruptedResult(t *testing.T) {
	// A run stopped after a checkpoint and resumed from the stored state
	// ends with the Result of an uninterrupted run, also with a
	// half-width target whose batches span the checkpoint (common practice
	// for exact mergeable aggregates, no source).
	s, err := scenarios.LoadDemo("fishery")
	if err != nil {
		t.Fatal(err)
	}
	m, err := Compile(s)
	if err != nil {
		t.Fatal(err)
	}
	for _, opt := range []Options{
		{Draws: 100_000, Seed: 3, Plan: sample.LHS, Workers: 2},
		{Draws: 20_000, Seed: 4, Plan: sample.Random, Workers: 2, UntilHalfWidth: 0.001, MaxDraws: 160_000},
	} {
		whole, err := Run(context.Background(), m, opt)
		if err != nil {
			t.Fatal(err)
		}
		// Stop at the second checkpoint, as a killed process would.
		var saved [][]byte
		stop := fmt.Errorf("stopped")
		o := opt
		o.CheckpointEvery = 1 // every chunk
		o.Checkpoint = func(p *Partial) error {
			raw, err := json.Marshal(p)
			if err != nil {
				return err
			}
			saved = append(saved, raw)
			if len(saved) == 2 {
				return stop
			}
			return nil
		}
		if _, err := Run(context.Background(), m, o); err == nil || !strings.Contains(err.Error(), "stopped") {
			t.Fatalf("run not stopped by its checkpoint: %v", err)
		}
		var back Partial
		if err := json.Unmarshal(saved[1], &back); err != nil {
			t.Fatal(err)
		}
		if back.Complete() || back.Draws == 0 {
			t.Fatalf("checkpoint covers %d of %d draws", back.Draws, back.Planned)
		}
		o.Checkpoint, o.Resume = nil, &back
		resumed, err := Run(context.Background(), m, o)
		if err != nil {
			t.Fatal(err)
		}
		whole.Nominal, resumed.Nominal = nil, nil
		if a, b := fmt.Sprintf("%+v", *whole), fmt.Sprintf("%+v", *resumed); a != b {
			t.Errorf("resumed run differs from the uninterrupted one:\n%s\n%s", a, b)
		}
		// A checkpoint cannot pass for a finished shard.
		if _, err := Merge(m, opt, []*Partial{&back}); err == nil || !strings.Contains(err.Error(), "checkpoint") {
			t.Errorf("merging a checkpoint: %v", err)
		}
	}
}
