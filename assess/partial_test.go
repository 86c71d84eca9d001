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
