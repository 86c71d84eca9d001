package sensitivity

import (
	"context"
	"errors"
	"fmt"
	"math"
	"os"
	"strings"
	"testing"
)

func run(t testing.TB, src string, opt Options) *Result {
	t.Helper()
	r, err := Run(context.Background(), compile(t, src), opt)
	if err != nil {
		t.Fatal(err)
	}
	return r
}

func row(t testing.TB, r *Result, name string) Row {
	t.Helper()
	for _, w := range r.Rows {
		if w.Parameter == name {
			return w
		}
	}
	t.Fatalf("no row for %s", name)
	return Row{}
}

func covers(ci [2]float64, v float64) bool { return ci[0] <= v && v <= ci[1] }

func TestRunLinearPosition(t *testing.T) {
	// dx/dt = a + 2b − x has the single attracting equilibrium x* = a + 2b.
	// With a ~ U(0, 1), b ~ U(0, 1) independent, the linear model's indices
	// (REFERENCE-CHECKS.md) are S_a = ST_a = (1/12)/(1/12 + 4/12) = 0.2 and
	// S_b = ST_b = 0.8.
	src := `holdfast: 1
title: linear position (illustrative)
state: {symbol: x, domain: [-1, 4]}
rate: "a + 2*b - x"
parameters:
  a: {dist: uniform, min: 0, max: 1}
  b: {dist: uniform, min: 0, max: 1}
  k: {value: 5}
`
	r := run(t, src, Options{Target: "E1", Output: Position, Base: 1024, Seed: 2})
	want := map[string]float64{"a": 0.2, "b": 0.8, "k": 0}
	for name, s := range want {
		w := row(t, r, name)
		if !covers(w.FirstCI, s) || !covers(w.TotalCI, s) || math.Abs(w.First-s) > 0.01 || math.Abs(w.Total-s) > 0.01 {
			t.Errorf("%s: S %.4f %v, ST %.4f %v, want %.1f", name, w.First, w.FirstCI, w.Total, w.TotalCI, s)
		}
	}
	if r.RankedBy != ByTotal || r.Rows[0].Parameter != "b" || r.Rows[2].Parameter != "k" || !r.Rows[2].Fixed {
		t.Errorf("ranking %s: %v, %v, %v", r.RankedBy, r.Rows[0].Parameter, r.Rows[1].Parameter, r.Rows[2].Parameter)
	}
	if r.Runs != 1024*4 || r.FailedRuns != 0 {
		t.Errorf("runs %d failed %d", r.Runs, r.FailedRuns)
	}
	// Local view: ∂x*/∂b = 2, elasticity 2·b/x* at the medians (0.5, 0.5).
	if e := row(t, r, "b").Elasticity; math.Abs(e-2*0.5/1.5) > 1e-12 {
		t.Errorf("elasticity of x* to b = %v, want 2/3", e)
	}
	// The equilibrium attracts in every run: the verdict does not vary,
	// and the reading says so rather than ranking noise.
	r2 := run(t, src, Options{Target: "E1", Output: Attracting, Base: 256, Seed: 2})
	if r2.RankedBy != ByNone || !strings.Contains(strings.Join(r2.Reading, " "), "does not vary") {
		t.Errorf("constant verdict: ranked by %s, reading %q", r2.RankedBy, r2.Reading)
	}
}

func TestRunIshigamiThroughEngine(t *testing.T) {
	// dx/dt = Y(X) − x has the single equilibrium x* = Y, the Ishigami
	// function (Ishigami & Homma 1990), so its position's indices are the
	// analytic ones derived in ishigamiIndices.
	src := `holdfast: 1
title: Ishigami position (illustrative)
state: {symbol: x, domain: [-20, 20]}
rate: "sin(X1) + 7*sin(X2)^2 + 0.1*X3^4*sin(X1) - x"
parameters:
  X1: {dist: uniform, min: -3.141592653589793, max: 3.141592653589793}
  X2: {dist: uniform, min: -3.141592653589793, max: 3.141592653589793}
  X3: {dist: uniform, min: -3.141592653589793, max: 3.141592653589793}
`
	r := run(t, src, Options{Target: "E1", Output: Position, Base: 2048, Seed: 1})
	s, st := ishigamiIndices()
	for i, name := range []string{"X1", "X2", "X3"} {
		w := row(t, r, name)
		if !covers(w.FirstCI, s[i]) || !covers(w.TotalCI, st[i]) {
			t.Errorf("%s: S %.4f %v (analytic %.4f), ST %.4f %v (analytic %.4f)", name, w.First, w.FirstCI, s[i], w.Total, w.TotalCI, st[i])
		}
	}
	if r.Indices.Dropped != 0 || r.FailedRuns != 0 {
		t.Errorf("dropped %d rows, %d failed runs", r.Indices.Dropped, r.FailedRuns)
	}
	if got := []string{r.Rows[0].Parameter, r.Rows[1].Parameter, r.Rows[2].Parameter}; fmt.Sprint(got) != "[X1 X2 X3]" {
		t.Errorf("ranking %v, want X1 X2 X3 (ST 0.56, 0.44, 0.24)", got)
	}
	if txt := strings.Join(r.Reading, " "); !strings.Contains(txt, "X3 matters only through its interaction with X1") {
		t.Errorf("reading misses the X1–X3 interaction: %q", txt)
	}
}

func TestRunDummyInputHasNoEffect(t *testing.T) {
	// w does not enter the rate law: f(A_B^(w)) = f(A) in every row, so both
	// its indices are exactly 0, and its split test is not significant.
	src, err := os.ReadFile("testdata/lake6.yaml")
	if err != nil {
		t.Fatal(err)
	}
	for _, out := range []Output{Attracting, Current} {
		r := run(t, string(src), Options{Target: "E1", Output: out, Base: 512, Seed: 4})
		w := row(t, r, "w")
		if w.First != 0 || w.Total != 0 || w.TotalCI != [2]float64{} {
			t.Errorf("%s: dummy w has S %v, ST %v %v", out, w.First, w.Total, w.TotalCI)
		}
		if !(w.Split.P > 0.05) {
			t.Errorf("%s: dummy w split test %+v is significant", out, w.Split)
		}
		if w.Rank != 6 {
			t.Errorf("%s: dummy w ranked %d of 6", out, w.Rank)
		}
	}
}

func TestRunSameForAnyWorkers(t *testing.T) {
	src := lakeSource(t)
	var prev string
	for _, w := range []int{1, 3} {
		r := run(t, src, Options{Target: "E3", Output: Current, Base: 256, Seed: 8, Workers: w})
		got := fmt.Sprintf("%+v %v %v %+v", r.Rows, r.Reading, r.Notes, r.Indices)
		for _, e := range r.Screening.Equilibria {
			for _, m := range e.Outputs {
				got += fmt.Sprintf(" %+v", *m)
			}
		}
		if prev != "" && got != prev {
			t.Errorf("result with %d workers differs", w)
		}
		prev = got
	}
}

func TestRunCorrelatedRanksByScreening(t *testing.T) {
	src, err := os.ReadFile("../../scenarios/demos/reactor.yaml")
	if err != nil {
		t.Fatal(err)
	}
	r := run(t, string(src), Options{Target: "E1", Output: Current, Base: 256, Seed: 1})
	if r.RankedBy != BySplit || r.ScreenRuns != 512 || fmt.Sprint(r.Correlated) != "[D Ea]" {
		t.Errorf("ranked by %s, screen runs %d, correlated %v", r.RankedBy, r.ScreenRuns, r.Correlated)
	}
	if !strings.Contains(strings.Join(r.Notes, " "), "Sobol' indices assume independent inputs") {
		t.Errorf("notes %q", r.Notes)
	}
	for i := 1; i < len(r.Rows); i++ {
		a, b := r.Rows[i-1], r.Rows[i]
		if !b.Fixed && !a.Fixed && b.Split.D > a.Split.D {
			t.Errorf("rows %d, %d out of split order", i, i+1)
		}
	}
	r2 := run(t, string(src), Options{Target: "E1", Output: Position, Base: 256, Seed: 1})
	if r2.RankedBy != ByRankCorr {
		t.Errorf("continuous output ranked by %s", r2.RankedBy)
	}
}

func TestRunBadInput(t *testing.T) {
	lake := lakeSource(t)
	noCurrent := strings.Replace(lake, "  current: 1.2\n", "", 1)
	allFixed := `holdfast: 1
title: all fixed (illustrative)
state: {symbol: x, domain: [0, 2]}
rate: "a - x"
parameters:
  a: {value: 1}
`
	cases := []struct {
		name, src string
		opt       Options
		want      string
	}{
		{"unknown target", lake, Options{Target: "E7", Base: 1024}, `unknown target "E7"; the equilibria at nominal values are E1 (stable`},
		{"no target", lake, Options{Base: 1024}, "no target equilibrium given"},
		{"current without state", noCurrent, Options{Target: "E1", Output: Current, Base: 1024}, "needs a current state"},
		{"base too small", lake, Options{Target: "E1", Base: 32}, "too small for 3 uncertain inputs: need at least 64"},
		{"base too large", lake, Options{Target: "E1", Base: MaxBase + 1}, "too large"},
		{"no uncertain inputs", allFixed, Options{Target: "E1", Base: 1024}, "no uncertain inputs"},
		{"bad output", lake, Options{Target: "E1", Output: Output(9), Base: 1024}, "unknown output"},
	}
	for _, c := range cases {
		_, err := Run(context.Background(), compile(t, c.src), c.opt)
		var ie *InputError
		if !errors.As(err, &ie) {
			t.Errorf("%s: error %v is not an *InputError", c.name, err)
			continue
		}
		if !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: %q lacks %q", c.name, err, c.want)
		}
	}
}
