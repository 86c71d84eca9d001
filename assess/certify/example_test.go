package certify_test

import (
	"context"
	"fmt"

	"holdfast/assess"
	"holdfast/assess/certify"
	"holdfast/assess/expr"
	"holdfast/assess/steady"
	"holdfast/sample"
	"holdfast/scenarios"
)

// law binds a compiled rate law to its parameters for the scan.
type law struct {
	m     *expr.Machine
	theta []float64
}

func (l law) Eval(x float64) float64           { return l.m.Eval(x, l.theta) }
func (l law) Taylor(x float64, c, e []float64) { l.m.Taylor(x, l.theta, c, e) }

// Logistic growth with constant harvest (illustrative numbers r = 1,
// K = 1, H = 0.16): equilibria at K/2·(1 ± sqrt(1 − 4H/(rK))) = 0.2
// (repelling) and 0.8 (attracting) (Schaefer 1954). Interval arithmetic
// proves that there are exactly these two in [0, 1.2] and confirms the
// scan's classes.
func ExampleCheck() {
	p, err := expr.Compile("r*x*(1 - x/K) - H", expr.Env{State: "x", Params: []string{"r", "K", "H"}})
	if err != nil {
		fmt.Println(err)
		return
	}
	theta := []float64{1, 1, 0.16}
	l := law{m: p.NewMachine(), theta: theta}
	res, err := steady.Find(l, 0, 1.2, steady.DefaultOptions())
	if err != nil {
		fmt.Println(err)
		return
	}
	rep, err := certify.Check(certify.Bind(p.NewMachine(), theta), 0, 1.2, res.Equilibria, certify.Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(rep.Status, "with", len(rep.Disagreements), "disagreements")
	for _, r := range rep.Roots {
		fmt.Printf("exactly one root in [%.9f, %.9f]: %v\n", r.Lo, r.Hi, r.Class)
	}
	// Output:
	// certified with 0 disagreements
	// exactly one root in [0.200000000, 0.200000000]: unstable
	// exactly one root in [0.800000000, 0.800000000]: stable
}

// Certify every draw of a Monte Carlo run of the lake demo (illustrative
// numbers) and summarise.
func ExampleHook() {
	s, err := scenarios.LoadDemo("lake")
	if err != nil {
		fmt.Println(err)
		return
	}
	m, err := assess.Compile(s)
	if err != nil {
		fmt.Println(err)
		return
	}
	hook, err := certify.Hook(m, certify.HookOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	sum := certify.NewSummary()
	opt := assess.Options{Draws: 500, Seed: 1, Plan: sample.LHS, Extra: hook, Sink: sum.Add}
	if _, err := assess.Run(context.Background(), m, opt); err != nil {
		fmt.Println(err)
		return
	}
	r := sum.Result()
	fmt.Printf("certified %d of %d draws, %d disagreements\n", r.Certified.Count, r.Checked, r.Disagreeing)
	// Output:
	// certified 500 of 500 draws, 0 disagreements
}
