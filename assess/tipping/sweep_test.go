package tipping

import (
	"context"
	"errors"
	"fmt"
	"math"
	"testing"

	"holdfast/assess"
	"holdfast/sample"
	"holdfast/scenarios"
)

func compile(t testing.TB, src string) *assess.Model {
	t.Helper()
	s, err := scenarios.Parse("sweep.yaml", []byte(src), nil)
	if err != nil {
		t.Fatal(err)
	}
	m, err := assess.Compile(s)
	if err != nil {
		t.Fatal(err)
	}
	return m
}

func run(t testing.TB, m *assess.Model, opt Options) *Result {
	t.Helper()
	r, err := Run(context.Background(), m, opt)
	if err != nil {
		t.Fatal(err)
	}
	return r
}

// harvestSrc is logistic growth with constant harvest, r uncertain.
const harvestSrc = `holdfast: 1
title: harvested stock (illustrative numbers)
state: {symbol: x, domain: [0, 6]}
rate: "r*x*(1 - x/K) - H"
parameters:
  r: {dist: uniform, min: 0.5, max: 1.5}
  K: {value: 4}
  H: {value: 0.5}
`

func TestSchaeferFoldForEveryDraw(t *testing.T) {
	// Schaefer (1954): the stock's upper equilibrium meets the lower one
	// at H = rK/4, x = K/2, for every draw. With r ~ uniform(0.5, 1.5) and
	// K = 4 the critical harvest rK/4 = r is uniform on [0.5, 1.5], its
	// q-quantile 0.5 + q, and the limit at risk α is 0.5 + α. A Latin
	// hypercube puts exactly one draw of r in each of the N strata
	// (McKay, Beckman & Conover 1979), so the sample quantile of rank ⌈Nq⌉
	// lies within 1/N of the exact one.
	m := compile(t, harvestSrc)
	const n = 2000
	r := run(t, m, Options{Driver: "H", From: 0, To: 2, Track: "E2", Risk: 0.1, Steps: 5,
		Draws: n, Seed: 7, Plan: sample.LHS, Workers: 2})
	d, err := m.Design(sample.LHS, n, 7)
	if err != nil {
		t.Fatal(err)
	}
	theta := make([]float64, 3)
	for i, tp := range r.Tips {
		d.Draw(i, theta)
		want := theta[0] * 4 / 4
		if tp.Kind != Fold || math.Abs(tp.D-want) > 1e-9 || math.Abs(tp.X-2) > 1e-6 {
			t.Fatalf("draw %d (r = %v): %v at H = %v, x = %v; want a fold at H = rK/4 = %v, x = K/2 = 2", i, theta[0], tp.Kind, tp.D, tp.X, want)
		}
		if tp.Return != Escapes {
			t.Fatalf("draw %d: hysteresis %v, want escapes (the stock declines out of the domain)", i, tp.Return)
		}
	}
	c := r.Critical
	if c.Kind() != "fold" || c.N != n || c.WithoutTipping.Count != 0 || c.LostAtStart.Count != 0 {
		t.Errorf("critical summary %+v", c)
	}
	for i, q := range assess.QuantileLevels {
		if v := c.Quantiles[i]; v.Where != InRange || math.Abs(v.D-(0.5+q)) > 1.0/n+1e-9 {
			t.Errorf("%v-quantile %+v, want %v", q, v, 0.5+q)
		}
	}
	l := r.Limit
	if l.Value.Where != InRange || math.Abs(l.Value.D-0.6) > 1.0/n+1e-9 {
		t.Errorf("limit %+v, want 0.6", l.Value)
	}
	if !(l.CI[0].D <= 0.6 && 0.6 <= l.CI[1].D) || l.Coverage < 0.95 {
		t.Errorf("limit interval %+v (coverage %v) does not cover 0.6", l.CI, l.Coverage)
	}
	if h := r.Hysteresis; h.N != n || h.Escapes.Count != n {
		t.Errorf("hysteresis %+v", h)
	}
	// Curves: E2 attracts iff r > H, so P = clamp(1.5 − H, 0, 1).
	if len(r.Curve) != 5 {
		t.Fatalf("%d curve points", len(r.Curve))
	}
	for _, p := range r.Curve {
		exact := math.Min(math.Max(1.5-p.Value, 0), 1)
		if math.Abs(p.Attracting.P-exact) > 1.0/n || p.Attracting.CI[0] > exact || p.Attracting.CI[1] < exact {
			t.Errorf("H = %v: P(E2 attracting) = %v %v, exact %v", p.Value, p.Attracting.P, p.Attracting.CI, exact)
		}
		if p.Disagree != 0 {
			t.Errorf("H = %v: %d draws where engine and sweep disagree", p.Value, p.Disagree)
		}
	}
}

func TestSemenovCriticalDelta(t *testing.T) {
	// Semenov (1928): θ' = δe^θ − cθ loses its lower (attracting)
	// equilibrium where f = f' = 0: e^θ δ = cθ and δe^θ = c give θ = 1,
	// δ = c/e. With c = 1 every draw tips at δ = 1/e; with c uniform on
	// [0.8, 1.2] the critical δ is uniform on [0.8/e, 1.2/e].
	for _, c := range []struct {
		name, c string
		q       func(p float64) float64
	}{
		{"c fixed", "{value: 1}", func(float64) float64 { return 1 / math.E }},
		{"c uniform", "{dist: uniform, min: 0.8, max: 1.2}", func(p float64) float64 { return (0.8 + 0.4*p) / math.E }},
	} {
		t.Run(c.name, func(t *testing.T) {
			m := compile(t, `holdfast: 1
title: runaway
state: {symbol: T, domain: [0, 10]}
rate: "delta*exp(T) - c*T"
parameters:
  delta: {dist: uniform, min: 0.01, max: 0.6, nominal: 0.1}
  c: `+c.c+"\n")
			const n = 1000
			r := run(t, m, Options{Driver: "delta", From: 0.05, To: 0.6, Track: "E1", Risk: 0.05, Draws: n, Seed: 3, Plan: sample.LHS})
			for i, tp := range r.Tips {
				if tp.Kind != Fold || math.Abs(tp.X-1) > 1e-6 {
					t.Fatalf("draw %d: %v at x = %v, want a fold at θ = 1", i, tp.Kind, tp.X)
				}
			}
			for i, q := range assess.QuantileLevels {
				if v := r.Critical.Quantiles[i]; math.Abs(v.D-c.q(q)) > 0.4/math.E/n+1e-9 {
					t.Errorf("%v-quantile %v, want %v", q, v.D, c.q(q))
				}
			}
			if h := r.Hysteresis; h.Escapes.Count != n {
				t.Errorf("hysteresis %+v, want every draw to run away out of the domain", h)
			}
		})
	}
}

func TestShallowLakeSweepIrreversible(t *testing.T) {
	// Carpenter, Ludwig & Brock (1999): P' = a − bP + P²/(1 + P²) with
	// b = 0.45 < 1/2. The clear state folds at the lower fold point and
	// the turbid state's return fold lies at a < 0, outside the support
	// [0, 0.1] of the loading a: irreversible. Both from f = 0, f' = 0
	// (lakeFolds).
	P, A := lakeFolds(t, 0.45)
	m := compile(t, `holdfast: 1
title: shallow lake
state: {symbol: P, domain: [0, 4]}
rate: "a - b*P + P^2/(1 + P^2)"
parameters:
  a: {dist: uniform, min: 0, max: 0.1, nominal: 0.01}
  b: {value: 0.45}
`)
	r := run(t, m, Options{Driver: "a", From: 0, To: 0.1, Track: "E1", Risk: 0.05, Draws: 50, Seed: 1})
	for i, tp := range r.Tips {
		if tp.Kind != Fold || math.Abs(tp.D-A[0]) > 1e-10 || math.Abs(tp.X-P[0]) > 1e-6 {
			t.Fatalf("draw %d: %v at (a, P) = (%v, %v), analytic fold (%v, %v)", i, tp.Kind, tp.D, tp.X, A[0], P[0])
		}
		if tp.Return != Irreversible || math.Abs(tp.DReturn-A[1]) > 1e-10 {
			t.Fatalf("draw %d: %v with return fold %v, want irreversible at %v", i, tp.Return, tp.DReturn, A[1])
		}
	}
	if w := r.Hysteresis.Width.Q[2]; math.Abs(w-(A[0]-A[1])) > 1e-9 {
		t.Errorf("hysteresis width %v, want %v", w, A[0]-A[1])
	}
}

func TestSweepDownOrdersLevelsAlongTheSweep(t *testing.T) {
	// θ' = δe^θ − cθ with the cooling c reduced from 1.2 to 0.2 at
	// δ ~ uniform(0.1, 0.3): the fold is at c = δe (Semenov 1928), so the
	// 5% value along the sweep (met first, the highest c) is the 95%
	// point of δe, (0.1 + 0.95·0.2)e.
	m := compile(t, `holdfast: 1
title: cooling
state: {symbol: T, domain: [0, 10]}
rate: "delta*exp(T) - c*T"
parameters:
  delta: {dist: uniform, min: 0.1, max: 0.3}
  c: {dist: uniform, min: 0.1, max: 1.5, nominal: 1}
`)
	const n = 1000
	r := run(t, m, Options{Driver: "c", From: 1.2, To: 0.2, Track: "E1", Risk: 0.05, Draws: n, Seed: 2, Plan: sample.LHS})
	q := r.Critical.Quantiles
	if want := (0.1 + 0.95*0.2) * math.E; math.Abs(q[0].D-want) > 0.2*math.E/n+1e-9 {
		t.Errorf("5%% value along the sweep %v, want %v", q[0].D, want)
	}
	if !(q[0].D > q[2].D && q[2].D > q[4].D) {
		t.Errorf("levels along a sweep down must decrease: %+v", q)
	}
	if r.Limit.Value.D != q[0].D {
		t.Errorf("limit at α = 0.05 %v differs from the 5%% value %v", r.Limit.Value.D, q[0].D)
	}
}

func TestCurveAgreesWithCriticalValues(t *testing.T) {
	// The engine's probability that the lake's clear state is lost at each
	// driver value must match the share of draws whose critical value
	// lies at or before it, up to the draws in which the two identities
	// differ (counted in Disagree); internal consistency, common practice.
	s, err := scenarios.LoadDemo("lake")
	if err != nil {
		t.Fatal(err)
	}
	m, err := assess.Compile(s)
	if err != nil {
		t.Fatal(err)
	}
	const n = 3000
	r := run(t, m, Options{Driver: "L", From: 0.05, To: 0.4, Track: "E1", Risk: 0.05, Steps: 8, Draws: n, Seed: 4, Plan: sample.LHS})
	for _, p := range r.Curve {
		lost := 0
		for _, tp := range r.Tips {
			if tp.Kind != None && tp.D <= p.Value {
				lost++
			}
		}
		engine := n - int(p.Attracting.Count)
		if diff := math.Abs(float64(engine - lost)); diff > float64(p.Disagree) || p.Disagree > n/100 {
			t.Errorf("L = %v: engine lost in %d draws, sweep in %d, %d disagreements", p.Value, engine, lost, p.Disagree)
		}
	}
}

func TestRunIndependentOfWorkers(t *testing.T) {
	s, err := scenarios.LoadDemo("lake")
	if err != nil {
		t.Fatal(err)
	}
	m, err := assess.Compile(s)
	if err != nil {
		t.Fatal(err)
	}
	opt := Options{Driver: "L", From: 0.05, To: 0.4, Track: "E1", Risk: 0.05, Steps: 3, Draws: 1500, Seed: 9, Plan: sample.LHS}
	var want string
	for _, w := range []int{1, 3} {
		opt.Workers = w
		r := run(t, m, opt)
		got := fmt.Sprintf("%v", *r)
		if want == "" {
			want = got
		} else if got != want {
			t.Errorf("results differ between 1 and %d workers", w)
		}
	}
}

func TestRunRejectsBadOptions(t *testing.T) {
	m := compile(t, `holdfast: 1
title: bad options
state: {symbol: x, domain: [0, 6]}
rate: "r*x*(1 - x/K) - H"
parameters:
  r: {dist: uniform, min: 0.5, max: 1.5}
  K: {value: 4}
  H: {dist: uniform, min: 0, max: 1, nominal: 0.5}
  unused: {value: 1}
`)
	good := Options{Driver: "H", From: 0, To: 1, Track: "E2", Risk: 0.1, Draws: 10}
	cases := []struct {
		option string
		edit   func(*Options)
	}{
		{"driver", func(o *Options) { o.Driver = "Z" }},
		{"driver", func(o *Options) { o.Driver = "x" }},
		{"driver", func(o *Options) { o.Driver = "unused" }},
		{"to", func(o *Options) { o.To = o.From }},
		{"from", func(o *Options) { o.From = -0.5 }},
		{"to", func(o *Options) { o.To = 1.5 }},
		{"from", func(o *Options) { o.From = math.NaN() }},
		{"to", func(o *Options) { o.To = math.Inf(1) }},
		{"track", func(o *Options) { o.Track = "E3" }},
		{"track", func(o *Options) { o.Track = "stable" }},
		{"risk", func(o *Options) { o.Risk = 0 }},
		{"risk", func(o *Options) { o.Risk = 1 }},
		{"risk", func(o *Options) { o.Risk = math.NaN() }},
		{"steps", func(o *Options) { o.Steps = 1 }},
		{"steps", func(o *Options) { o.Steps = MaxSteps + 1 }},
		{"draws", func(o *Options) { o.Draws = 0 }},
		{"draws", func(o *Options) { o.Draws = MaxDraws + 1 }},
	}
	for _, c := range cases {
		opt := good
		c.edit(&opt)
		_, err := Run(context.Background(), m, opt)
		var oe *OptionError
		if !errors.As(err, &oe) || oe.Option != c.option {
			t.Errorf("%+v: error %v, want an OptionError for %q", opt, err, c.option)
		}
	}
	if _, err := Run(context.Background(), m, good); err != nil {
		t.Errorf("good options: %v", err)
	}
	// A fixed driver may take any finite value; the label is not case
	// sensitive.
	fixed := good
	fixed.Driver, fixed.From, fixed.To, fixed.Track = "K", 4, -3, "e2"
	if _, err := Run(context.Background(), m, fixed); err != nil {
		t.Errorf("fixed driver over any range: %v", err)
	}
}
