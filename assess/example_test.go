package assess_test

import (
	"context"
	"fmt"

	"holdfast/assess"
	"holdfast/sample"
	"holdfast/scenarios"
)

// A harvested stock with an uncertain harvest (illustrative numbers): the
// upper equilibrium survives while the harvest stays below rK/4 = 1. At the
// nominal (median) harvest 0.875 the equilibria are 2(1 ± √(1 − 0.875)).
func ExampleRun() {
	src := `holdfast: 1
title: Harvested stock (illustrative numbers)
state: {symbol: x, domain: [0, 6], current: 3}
rate: "r*x*(1 - x/K) - H"
parameters:
  r: {value: 1}
  K: {value: 4}
  H: {dist: uniform, min: 0.5, max: 1.25}
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
	r, err := assess.Run(context.Background(), m, assess.Options{Draws: 4096, Seed: 1, Plan: sample.LHS})
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, t := range r.Tracked {
		fmt.Printf("%s (nominal %s at %.3f): exists in %.2f of draws\n", t.Label, t.NominalClass, t.NominalX, t.Exists.P)
	}
	// Output:
	// E1 (nominal unstable at 1.293): exists in 0.67 of draws
	// E2 (nominal stable at 2.707): exists in 0.67 of draws
}

// Analyse one parameter set: the lake demo at its nominal values.
func ExampleModel_Analyze() {
	s, _ := scenarios.LoadDemo("lake")
	m, _ := assess.Compile(s)
	snap, _ := m.Analyze(m.Nominal)
	for _, e := range snap.Equilibria {
		fmt.Printf("%s x*=%.4f %s (order %d)\n", e.Label, e.X, e.Class, e.Order)
	}
	fmt.Println("from", snap.Current.From, "moves to", snap.Current.MovesTo)
	// Output:
	// E1 x*=0.1680 stable (order 1)
	// E2 x*=1.0000 unstable (order 1)
	// E3 x*=1.6237 stable (order 1)
	// from 1.2 moves to E3
}
