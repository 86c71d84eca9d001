package study_test

import (
	"context"
	"encoding/json"
	"fmt"

	"holdfast/assess"
	"holdfast/assess/study"
	"holdfast/sample"
	"holdfast/scenarios"
)

// Two shards of one assessment, each handed over in its stored form as
// separate machines would, merge into the assessment of all draws.
func ExampleMerge() {
	s, _ := scenarios.LoadDemo("fishery")
	m, _ := assess.Compile(s)
	opt := assess.Options{Draws: 1000, Seed: 7, Plan: sample.LHS}
	var states []*study.State
	for k := range 2 {
		st, _ := study.New(m, study.Config{})
		o := opt
		o.Shard = assess.Shard{K: k, N: 2}
		state, err := st.RunShard(context.Background(), o)
		if err != nil {
			fmt.Println(err)
			return
		}
		raw, _ := json.Marshal(state) // written to a part file
		var back study.State
		if err := json.Unmarshal(raw, &back); err != nil {
			fmt.Println(err)
			return
		}
		states = append(states, &back)
	}
	out, err := study.Merge(m, study.Config{}, opt, states)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%d draws, %d assessed\n", out.Result.Draws, out.Result.Succeeded)
	for _, t := range out.Result.Tracked {
		fmt.Printf("%s exists in %d draws\n", t.Label, t.Exists.Count)
	}
	// Output:
	// 1000 draws, 1000 assessed
	// E1 exists in 1000 draws
	// E2 exists in 916 draws
	// E3 exists in 916 draws
}
