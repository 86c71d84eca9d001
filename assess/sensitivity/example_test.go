package sensitivity_test

import (
	"context"
	"fmt"

	"holdfast/assess"
	"holdfast/assess/sensitivity"
	"holdfast/scenarios"
)

// Sobol' indices of Y = u₁ + 2u₂ on the unit square, from the outputs on a
// Saltelli design of 1024 base rows. The linear model's indices are
// 1/5 and 4/5.
func ExampleSobol() {
	const n, k = 1024, 2
	d, _ := sensitivity.NewDesign(n, k, 1)
	fA, fB := make([]float64, n), make([]float64, n)
	fAB := [][]float64{make([]float64, n), make([]float64, n)}
	u := make([]float64, k)
	for i := range d.Runs() {
		d.Point(i, u)
		y := u[0] + 2*u[1]
		switch row, role := d.Role(i); role {
		case sensitivity.RoleA:
			fA[row] = y
		case sensitivity.RoleB:
			fB[row] = y
		default:
			fAB[role-2][row] = y
		}
	}
	est, _ := sensitivity.Sobol(fA, fB, fAB, sensitivity.BootstrapOptions{Seed: 1})
	for l := range k {
		fmt.Printf("u%d: first order %.2f, total %.2f\n", l+1, est.First[l], est.Total[l])
	}
	// Output:
	// u1: first order 0.20, total 0.20
	// u2: first order 0.80, total 0.80
}

// Which input decides where a harvested stock's upper equilibrium lies
// (illustrative numbers)? The harvest H matters, the growth rate r less so.
func ExampleRun() {
	src := `holdfast: 1
title: Harvested stock (illustrative numbers)
state: {symbol: x, domain: [0, 6], current: 3}
rate: "r*x*(1 - x/K) - H"
parameters:
  r: {dist: uniform, min: 0.9, max: 1.1}
  K: {value: 4}
  H: {dist: uniform, min: 0.5, max: 0.8}
`
	s, _ := scenarios.Parse("stock.yaml", []byte(src), nil)
	m, _ := assess.Compile(s)
	r, err := sensitivity.Run(context.Background(), m, sensitivity.Options{
		Target: "E2", Output: sensitivity.Position, Base: 1024, Seed: 1,
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, w := range r.Rows {
		fmt.Printf("%d. %s: total index %.2f\n", w.Rank, w.Parameter, w.Total)
	}
	fmt.Println(r.Reading[0])
	// Output:
	// 1. H: total index 0.84
	// 2. r: total index 0.18
	// 3. K: total index 0.00
	// The position of E2 turns mostly on H (total index 0.84).
}
