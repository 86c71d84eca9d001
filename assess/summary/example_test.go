package summary_test

import (
	"context"
	"encoding/json"
	"fmt"
	"reflect"

	"holdfast/assess"
	"holdfast/assess/summary"
	"holdfast/sample"
	"holdfast/scenarios"
)

// Collect the report figures of a run on a harvested stock with an
// uncertain harvest H ~ U(0.5, 1.25) (illustrative numbers). At x = 2 the
// rate is 1 − H, so the band's median there is 1 − 0.875 = 0.125.
func ExampleCollector() {
	src := `holdfast: 1
title: Harvested stock (illustrative numbers)
state: {symbol: x, domain: [0, 4]}
rate: "x*(1 - x/4) - H"
parameters:
  H: {dist: uniform, min: 0.5, max: 1.25}
`
	s, _ := scenarios.Parse("stock.yaml", []byte(src), nil)
	m, _ := assess.Compile(s)
	c, err := summary.NewCollector(m, summary.Config{GridPoints: 5})
	if err != nil {
		fmt.Println(err)
		return
	}
	_, err = assess.Run(context.Background(), m, assess.Options{
		Draws: 2048, Seed: 1, Plan: sample.LHS, Extra: c.Extra, Sink: c.Add,
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	sum := c.Summary()
	fmt.Printf("grid %v\n", sum.Grid)
	fmt.Printf("median of f(2): %.3f\n", sum.Band[2].Q[2])
	last := sum.Running[len(sum.Running)-1]
	fmt.Printf("%s exists in %d of %d draws\n", sum.Labels[1], last.Exists[1], last.Succeeded)
	// Output:
	// grid [0 1 2 3 4]
	// median of f(2): 0.125
	// E2 exists in 1365 of 2048 draws
}

// Split a run of the harvested stock (illustrative numbers) between two
// collectors, as two shards would (even and odd draws), save one and
// restore it, and merge: the result is the summary of one collector fed
// every draw. From x = 3 the stock settles on E2 whenever it exists,
// that is when H < 1: in 2/3 of the draws (analytic; Schaefer 1954).
func ExampleCollector_Merge() {
	src := `holdfast: 1
title: Harvested stock (illustrative numbers)
state: {symbol: x, domain: [0, 4], current: 3}
rate: "x*(1 - x/4) - H"
parameters:
  H: {dist: uniform, min: 0.5, max: 1.25}
`
	s, _ := scenarios.Parse("stock.yaml", []byte(src), nil)
	m, _ := assess.Compile(s)
	cfg := summary.Config{GridPoints: 5}
	whole, _ := summary.NewCollector(m, cfg)
	even, _ := summary.NewCollector(m, cfg)
	odd, _ := summary.NewCollector(m, cfg)
	_, err := assess.Run(context.Background(), m, assess.Options{
		Draws: 1000, Seed: 1, Plan: sample.LHS, Extra: whole.Extra,
		Sink: func(block []assess.Draw) error {
			for i := range block {
				shard := even
				if block[i].Index%2 == 1 {
					shard = odd
				}
				if err := shard.Add(block[i : i+1]); err != nil {
					return err
				}
			}
			return whole.Add(block)
		},
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	saved, err := json.Marshal(odd)
	if err != nil {
		fmt.Println(err)
		return
	}
	restored, _ := summary.NewCollector(m, cfg)
	if err := json.Unmarshal(saved, restored); err != nil {
		fmt.Println(err)
		return
	}
	if err := even.Merge(restored); err != nil {
		fmt.Println(err)
		return
	}
	merged := even.Summary()
	fmt.Println("same as one collector:", reflect.DeepEqual(merged, whole.Summary()))
	for _, cp := range merged.Running {
		fmt.Printf("%d draws: %s ends there in %d\n", cp.Draws, merged.Labels[1], cp.Current[1])
	}
	// Output:
	// same as one collector: true
	// 16 draws: E2 ends there in 11
	// 32 draws: E2 ends there in 24
	// 64 draws: E2 ends there in 43
	// 128 draws: E2 ends there in 88
	// 256 draws: E2 ends there in 170
	// 512 draws: E2 ends there in 338
	// 1000 draws: E2 ends there in 667
}
