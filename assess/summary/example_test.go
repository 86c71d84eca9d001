package summary_test

import (
	"context"
	"fmt"

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
