package sensitivity_test

import (
	"context"
	"encoding/json"
	"fmt"

	"holdfast/assess"
	"holdfast/assess/sensitivity"
	"holdfast/sample"
	"holdfast/scenarios"
)

// Screening a run split into two shards, each run on its own (in separate
// processes, say) and stored; the stored parts merge into the screening of
// the whole run. The lake demo's numbers are illustrative.
func ExampleScreen_Merge() {
	s, _ := scenarios.LoadDemo("lake")
	m, _ := assess.Compile(s)
	opt := assess.Options{Draws: 2000, Seed: 1, Plan: sample.LHS}
	const cap = 1000 // keep the draws with index below 1000

	var stored [][]byte
	for k := range 2 {
		part := sensitivity.NewScreen(m, cap)
		o := opt
		o.Shard, o.Sink = assess.Shard{K: k, N: 2}, part.Add
		if _, err := assess.RunPartial(context.Background(), m, o); err != nil {
			fmt.Println(err)
			return
		}
		b, _ := json.Marshal(part)
		stored = append(stored, b)
	}

	total := sensitivity.NewScreen(m, cap)
	for _, b := range stored {
		part := sensitivity.NewScreen(m, cap)
		if err := json.Unmarshal(b, part); err != nil {
			fmt.Println(err)
			return
		}
		if err := total.Merge(part); err != nil {
			fmt.Println(err)
			return
		}
	}
	r := total.Result()
	fmt.Printf("seen %d, failed %d, kept %d, capped %v\n", r.Seen, r.Failed, r.Kept, r.Capped)
	pos := r.Of("E1", sensitivity.Position)
	fmt.Printf("position of E1: Spearman's rho with L %.2f over %d draws\n", pos.Spearman[0], pos.N)
	// Output:
	// seen 2000, failed 0, kept 1000, capped true
	// position of E1: Spearman's rho with L 0.93 over 993 draws
}
