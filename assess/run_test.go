package assess

import (
	"context"
	"errors"
	"fmt"
	"math"
	"reflect"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"

	"holdfast/sample"
	"holdfast/scenarios"
)

func mustModel(t testing.TB, src string) *Model {
	t.Helper()
	s, err := scenarios.Parse("mc.yaml", []byte(src), nil)
	if err != nil {
		t.Fatal(err)
	}
	m, err := Compile(s)
	if err != nil {
		t.Fatal(err)
	}
	return m
}

func covers(t *testing.T, what string, p Probability, exact float64) {
	t.Helper()
	if exact < p.CI[0] || exact > p.CI[1] {
		t.Errorf("%s: estimate %.4f with 95%% interval [%.4f, %.4f] does not cover the exact %.4f", what, p.P, p.CI[0], p.CI[1], exact)
	}
}

func TestSaddleNodeProbabilityIsNormalCDF(t *testing.T) {
	// x' = a − x² with a ~ normal(μ, σ): an attracting equilibrium (√a)
	// exists iff a > 0, so P = Φ(μ/σ); Φ(1) = 0.8413 (standard normal
	// table, Abramowitz & Stegun 26.2), computed here with gonum.
	m := mustModel(t, `holdfast: 1
title: saddle-node normal form
state: {symbol: x, domain: [-10, 10]}
rate: "a - x^2"
parameters:
  a: {dist: normal, mean: 1, sd: 1}
`)
	r, err := Run(context.Background(), m, Options{Draws: 20000, Seed: 3, Plan: sample.Random})
	if err != nil {
		t.Fatal(err)
	}
	exact := distuv.UnitNormal.CDF(1)
	if math.Abs(exact-0.8413) > 1e-4 {
		t.Fatalf("Φ(1) = %v, table 0.8413", exact)
	}
	if len(r.Tracked) != 2 {
		t.Fatalf("tracked %d equilibria, want 2 (−1 and +1 at a = 1)", len(r.Tracked))
	}
	covers(t, "P(E2 attracting)", r.Tracked[1].Attracting, exact)
	covers(t, "P(E1 exists)", r.Tracked[0].Exists, exact)
	covers(t, "P(no equilibrium)", regimeP(r, ""), 1-exact)
	// Position quantiles: x* = √a given a > 0; the median of √a among
	// those draws is √ of the conditional median of a (monotone map).
	q := distuv.Normal{Mu: 1, Sigma: 1}.Quantile(1 - 0.5*exact)
	if got := r.Tracked[1].X.Q[2]; math.Abs(got-math.Sqrt(q)) > 0.02 {
		t.Errorf("median of E2 = %v, want about √%v = %v", got, q, math.Sqrt(q))
	}
}

func regimeP(r *Result, pattern string) Probability {
	for _, g := range r.Regimes {
		if joined(g.Pattern) == pattern {
			return g.P
		}
	}
	return prob(0, r.Succeeded)
}

func joined(p []string) string {
	s := ""
	for i, c := range p {
		if i > 0 {
			s += "/"
		}
		s += c
	}
	return s
}

func TestHarvestFoldProbability(t *testing.T) {
	// Logistic growth with constant harvest H ~ uniform(0.5, 1.25), r = 1,
	// K = 4: the upper equilibrium exists iff H < rK/4 = 1 (Schaefer 1954),
	// so P = (1 − 0.5)/(1.25 − 0.5) = 2/3.
	m := mustModel(t, `holdfast: 1
title: harvested logistic
state: {symbol: x, domain: [0, 6], current: 3}
rate: "r*x*(1 - x/K) - H"
parameters:
  r: {value: 1}
  K: {value: 4}
  H: {dist: uniform, min: 0.5, max: 1.25}
`)
	for _, plan := range []sample.PlanKind{sample.Random, sample.LHS, sample.QMC} {
		r, err := Run(context.Background(), m, Options{Draws: 8192, Seed: 9, Plan: plan})
		if err != nil {
			t.Fatal(err)
		}
		covers(t, plan.String()+" P(E2 exists)", r.Tracked[1].Exists, 2.0/3)
		covers(t, plan.String()+" P(E2 attracting)", r.Tracked[1].Attracting, 2.0/3)
		covers(t, plan.String()+" P(unstable/stable)", regimeP(r, "unstable/stable"), 2.0/3)
		// From x = 3 the stock reaches E2 while it exists (x = 3 lies above
		// the threshold K/2(1 − √(1 − 4H/rK)) ≤ 2) and otherwise collapses
		// out through the lower end.
		for _, o := range r.Outcomes {
			switch o.Label {
			case "E2":
				covers(t, plan.String()+" P(ends at E2)", o.P, 2.0/3)
			case outNames[outExitBelow]:
				covers(t, plan.String()+" P(collapse)", o.P, 1.0/3)
			}
		}
	}
}

func TestSemenovCriticalProbability(t *testing.T) {
	// Semenov (1928): θ' = δe^θ − θ has two equilibria iff δ < 1/e. With
	// δ ~ uniform(0.2, 0.5): P = (1/e − 0.2)/0.3.
	m := mustModel(t, `holdfast: 1
title: Semenov
state: {symbol: theta, domain: [0, 8]}
rate: "delta*exp(theta) - theta"
parameters:
  delta: {dist: uniform, min: 0.2, max: 0.5, nominal: 0.3}
`)
	r, err := Run(context.Background(), m, Options{Draws: 10000, Seed: 1, Plan: sample.LHS})
	if err != nil {
		t.Fatal(err)
	}
	exact := (math.Exp(-1) - 0.2) / 0.3
	covers(t, "P(E1 attracting)", r.Tracked[0].Attracting, exact)
	covers(t, "P(stable/unstable)", regimeP(r, "stable/unstable"), exact)
	covers(t, "P(no equilibrium)", regimeP(r, ""), 1-exact)
}

func TestRunIsIndependentOfWorkers(t *testing.T) {
	// Draw i depends only on (seed, i), and aggregates are integer counts
	// and order-free sketches: the result must not depend on the workers.
	s, err := scenarios.LoadDemo("reactor")
	if err != nil {
		t.Fatal(err)
	}
	m, err := Compile(s)
	if err != nil {
		t.Fatal(err)
	}
	var prev *Result
	for _, w := range []int{1, 3, 8} {
		r, err := Run(context.Background(), m, Options{Draws: 3000, Seed: 4, Plan: sample.QMC, Workers: w})
		if err != nil {
			t.Fatal(err)
		}
		// Compare printed forms: NaN quantiles (no data) are not DeepEqual.
		if prev != nil && fmt.Sprint(prev.Tracked) != fmt.Sprint(r.Tracked) {
			t.Errorf("workers=%d: tracked summaries differ", w)
		}
		if prev != nil && !reflect.DeepEqual(prev.Regimes, r.Regimes) {
			t.Errorf("workers=%d: regimes differ", w)
		}
		prev = r
	}
}

func TestUntilHalfWidthStopsInBatches(t *testing.T) {
	m := mustModel(t, `holdfast: 1
title: saddle-node
state: {symbol: x, domain: [-10, 10]}
rate: "a - x^2"
parameters:
  a: {dist: normal, mean: 1, sd: 1}
`)
	r, err := Run(context.Background(), m, Options{Draws: 500, Seed: 2, Plan: sample.Random, UntilHalfWidth: 0.01, MaxDraws: 100000})
	if err != nil {
		t.Fatal(err)
	}
	if !r.Convergence.Reached || r.Convergence.MaxHalfWidth > 0.01 {
		t.Errorf("convergence %+v", r.Convergence)
	}
	// Doubling batches from 500: 500, 1000, 2000, ... (common practice).
	if r.Draws != 500<<(r.Convergence.Batches-1) {
		t.Errorf("draws %d after %d batches", r.Draws, r.Convergence.Batches)
	}
	// The Wilson half-width at p ≈ 0.84 needs n ≈ 1.96²·p(1−p)/0.01² ≈ 5100.
	if r.Draws < 4000 {
		t.Errorf("stopped after %d draws, too early for half-width 0.01", r.Draws)
	}
	r2, err := Run(context.Background(), m, Options{Draws: 500, Seed: 2, Plan: sample.Random, UntilHalfWidth: 0.001, MaxDraws: 2000})
	if err != nil {
		t.Fatal(err)
	}
	if r2.Convergence.Reached || r2.Draws != 2000 {
		t.Errorf("with a draw cap: %+v after %d draws", r2.Convergence, r2.Draws)
	}
}

func TestRunCancels(t *testing.T) {
	s, _ := scenarios.LoadDemo("lake")
	m, _ := Compile(s)
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	_, err := Run(ctx, m, Options{Draws: 100000, Seed: 1})
	if err == nil || !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled run returned %v", err)
	}
}

func TestFaultsAreCounted(t *testing.T) {
	// log(x − c) is undefined below c: draws where c lies inside the domain
	// must report the fault by reason, not drop it.
	m := mustModel(t, `holdfast: 1
title: faults
state: {symbol: x, domain: [0, 4]}
rate: "log(x - c) - 0.5"
parameters:
  c: {dist: uniform, min: -1, max: 1}
`)
	r, err := Run(context.Background(), m, Options{Draws: 2000, Seed: 1, Plan: sample.Random})
	if err != nil {
		t.Fatal(err)
	}
	if len(r.Faults) == 0 {
		t.Fatal("no faults reported")
	}
	f := r.Faults[0]
	if f.Draws < 800 || f.Draws > 1200 || len(f.First) == 0 {
		t.Errorf("fault %+v: want about half the draws (c > 0) with replayable indices", f)
	}
}
