package tipping_test

import (
	"context"
	"fmt"

	"holdfast/assess"
	"holdfast/assess/tipping"
	"holdfast/sample"
	"holdfast/scenarios"
)

// How much harvest can a stock take? Logistic growth with constant
// harvest H folds at H = rK/4 (Schaefer 1954); with the growth rate r
// uniform on [0.5, 1.5] and K = 4 (illustrative numbers) the critical
// harvest is uniform on [0.5, 1.5], and at 10% risk the safe limit is its
// 10% quantile, 0.6 (estimated from 1000 draws as the 100th smallest
// critical value, within 1/1000 of it on a Latin hypercube).
func ExampleRun() {
	src := `holdfast: 1
title: Harvested stock (illustrative numbers)
state: {symbol: x, domain: [0, 6]}
rate: "r*x*(1 - x/K) - H"
parameters:
  r: {dist: uniform, min: 0.5, max: 1.5}
  K: {value: 4}
  H: {value: 0.5}
`
	s, err := scenarios.Parse("stock.yaml", []byte(src), nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	m, err := assess.Compile(s)
	if err != nil {
		fmt.Println(err)
		return
	}
	r, err := tipping.Run(context.Background(), m, tipping.Options{
		Driver: "H", From: 0, To: 2, Track: "E2", Risk: 0.1, Steps: 3,
		Draws: 1000, Seed: 1, Plan: sample.LHS,
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	c := r.Critical
	fmt.Printf("%s in %d of %d draws; median critical H %.3f\n", c.Kind(), c.Count[tipping.Fold], c.N, c.Quantiles[2].D)
	fmt.Printf("safe limit at 10%% risk: H = %.3f (95%% interval %.3f to %.3f)\n", r.Limit.Value.D, r.Limit.CI[0].D, r.Limit.CI[1].D)
	for _, p := range r.Curve {
		fmt.Printf("H = %.1f: E2 attracting in %.3f of draws\n", p.Value, p.Attracting.P)
	}
	// Output:
	// fold in 1000 of 1000 draws; median critical H 0.999
	// safe limit at 10% risk: H = 0.599 (95% interval 0.582 to 0.620)
	// H = 0.0: E2 attracting in 1.000 of draws
	// H = 1.0: E2 attracting in 0.500 of draws
	// H = 2.0: E2 attracting in 0.000 of draws
}
