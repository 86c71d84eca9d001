package summary

import (
	"context"
	"fmt"
	"math"
	"testing"

	"holdfast/assess"
	"holdfast/assess/agg"
	"holdfast/sample"
	"holdfast/scenarios"
)

// stockSrc is the harvested logistic stock f = r x (1 − x/K) − H with
// r = 1, K = 4 and H ~ U(0.5, 1.25) (illustrative numbers). Its equilibria
// are x* = K/2 (1 ± √(1 − 4H/(rK))) = 2(1 ± √(1 − H)) while H < rK/4 = 1
// (Schaefer 1954), and the slope at the upper one is
// f'(x*) = r(1 − 2x*/K) = −√(1 − H).
const stockSrc = `holdfast: 1
title: Harvested stock (illustrative numbers)
state: {symbol: x, domain: [0, 6], current: 3}
rate: "r*x*(1 - x/K) - H"
parameters:
  r: {value: 1}
  K: {value: 4}
  H: {dist: uniform, min: 0.5, max: 1.25}
`

func stockModel(t testing.TB) *assess.Model {
	t.Helper()
	s, err := scenarios.Parse("stock.yaml", []byte(stockSrc), nil)
	if err != nil {
		t.Fatal(err)
	}
	m, err := assess.Compile(s)
	if err != nil {
		t.Fatal(err)
	}
	return m
}

// collect runs the engine with a Collector and returns both results.
func collect(t testing.TB, m *assess.Model, n, workers int, cfg Config) (*assess.Result, *Summary) {
	t.Helper()
	c, err := NewCollector(m, cfg)
	if err != nil {
		t.Fatal(err)
	}
	r, err := assess.Run(context.Background(), m, assess.Options{
		Draws: n, Seed: 3, Plan: sample.LHS, Workers: workers,
		Extra: c.Extra, Sink: c.Add,
	})
	if err != nil {
		t.Fatal(err)
	}
	return r, c.Summary()
}

func TestBandAgainstAnalyticQuantiles(t *testing.T) {
	// At each x, f(x) = x(1 − x/4) − H, so its q-quantile is
	// x(1 − x/4) − Q_H(1 − q) with Q_H(p) = 0.5 + 0.75p (analytic). A Latin
	// hypercube of n draws puts one H in each stratum of width 0.75/n
	// (McKay, Beckman & Conover 1979), so the sample quantile is within two
	// strata of the exact one; the sketch adds at most 0.1% relative error
	// (Masson, Rim & Lee 2019).
	const n = 4096
	m := stockModel(t)
	_, s := collect(t, m, n, 4, Config{BandDraws: n})
	if s.BandDraws != n || len(s.Grid) != DefaultGridPoints || len(s.Band) != DefaultGridPoints {
		t.Fatalf("band of %d draws on %d points", s.BandDraws, len(s.Band))
	}
	if s.Grid[0] != 0 || s.Grid[len(s.Grid)-1] != 6 {
		t.Errorf("grid %v…%v, want the domain [0, 6]", s.Grid[0], s.Grid[len(s.Grid)-1])
	}
	for g, x := range s.Grid {
		b := s.Band[g]
		if b.N != n || b.Undefined != 0 {
			t.Fatalf("x=%v: n=%d undefined=%d", x, b.N, b.Undefined)
		}
		for i, q := range Levels {
			want := x*(1-x/4) - (0.5 + 0.75*(1-q))
			tol := 2*0.75/n + 1.1e-3*math.Abs(want)
			if math.Abs(b.Q[i]-want) > tol {
				t.Errorf("x=%.2f q=%.2f: %v, want %v ± %.2g", x, q, b.Q[i], want, tol)
			}
		}
	}
	// The nominal curve uses the median H = 0.875.
	for i, x := range s.NominalX {
		if want := x*(1-x/4) - 0.875; math.Abs(s.NominalF[i]-want) > 1e-12 {
			t.Fatalf("nominal f(%v) = %v, want %v", x, s.NominalF[i], want)
		}
	}
}

func TestSlopeHistogramAgainstAnalyticShares(t *testing.T) {
	// E2's slope is −√(1 − H) (analytic, see stockSrc): it falls in [a, b)
	// exactly when H ∈ [1 − a², 1 − min(b, 0)²), so a bin's expected count
	// is n times that interval's length (within [0.5, 1)) over 0.75. With a
	// Latin hypercube the count is within 2 of it (one draw per stratum;
	// McKay, Beckman & Conover 1979); one more is allowed for draws within
	// a continuation step of the fold at H = 1, where following E2 may lose
	// it a hair early. The histogram bins sketch buckets, not slopes: a
	// slope within the sketch's relative accuracy α = 0.1% of an edge may
	// land beside its bin (Masson, Rim & Lee 2019), so each bin may also
	// gain or lose the expected count of slopes in [e(1+α), e(1−α)] about
	// each of its edges e.
	const n = 4096
	m := stockModel(t)
	r, s := collect(t, m, n, 3, Config{Bins: 20})
	h := s.Slopes[1]
	if h.Label != "E2" || len(h.Edges) != 21 || len(h.Counts) != 20 {
		t.Fatalf("histogram %s: %d edges, %d counts", h.Label, len(h.Edges), len(h.Counts))
	}
	var total int64
	for _, c := range h.Counts {
		total += c
	}
	if total+h.Below+h.Above != h.N || h.N != r.Tracked[1].Exists.Count {
		t.Errorf("counts %d + %d + %d, N %d, exists %d", total, h.Below, h.Above, h.N, r.Tracked[1].Exists.Count)
	}
	if h.Edges[0] > -math.Sqrt(0.5) || h.Edges[20] < 0 {
		t.Errorf("bins [%v, %v] must cover most slopes and zero", h.Edges[0], h.Edges[20])
	}
	share := func(a, b float64) float64 {
		if a >= 0 {
			return 0
		}
		lo, hi := math.Max(1-a*a, 0.5), 1-math.Pow(math.Min(b, 0), 2)
		hi = math.Min(hi, 1)
		if hi <= lo {
			return 0
		}
		return (hi - lo) / 0.75
	}
	const alpha = 1e-3 // agg.Alpha
	near := func(e float64) float64 {
		return n * share(math.Min(e*(1+alpha), e*(1-alpha)), math.Max(e*(1+alpha), e*(1-alpha)))
	}
	for i, c := range h.Counts {
		want := n * share(h.Edges[i], h.Edges[i+1])
		if tol := 3 + near(h.Edges[i]) + near(h.Edges[i+1]); math.Abs(float64(c)-want) > tol {
			t.Errorf("bin [%.4f, %.4f): %d, want %.1f ± %.1f", h.Edges[i], h.Edges[i+1], c, want, tol)
		}
	}
	if want, tol := n*share(-2, h.Edges[0]), 3+near(h.Edges[0]); math.Abs(float64(h.Below)-want) > tol {
		t.Errorf("below %d, want %.1f ± %.1f", h.Below, want, tol)
	}
	// The bins span the slope of rank r = ⌊0.005(N−1)⌋ to zero, padded by
	// 2% of the span: the lower edge is 1.02 times that slope. Slopes rise
	// with H, so rank r is the draw in the Latin hypercube stratum r of H,
	// H ≈ 0.5 + (r + ½)·0.75/n, and the slope there is −√(1 − H)
	// (analytic), within half a stratum (0.75/(2n) in H, less in slope as
	// |d slope/dH| = 1/(2√(1 − H)) < 1 there) and the sketch's α.
	r0 := math.Floor(0.005 * float64(h.N-1))
	q := -math.Sqrt(1 - (0.5 + (r0+0.5)*0.75/n))
	if lo := h.Edges[0] / 1.02; math.Abs(lo-q) > alpha*math.Abs(q)+0.75/(2*n) {
		t.Errorf("lower bin edge %v, want 1.02·%v", h.Edges[0], q)
	}
}

func TestRunningCountsEndAtTheResult(t *testing.T) {
	// The last checkpoint holds the very counts behind the run's
	// probabilities; checkpoints fall at 16·2^k draws and at the end.
	m := stockModel(t)
	r, s := collect(t, m, 3000, 2, Config{})
	var draws []int64
	for _, c := range s.Running {
		draws = append(draws, c.Draws)
	}
	if fmt.Sprint(draws) != "[16 32 64 128 256 512 1024 2048 3000]" {
		t.Fatalf("checkpoints %v", draws)
	}
	last := s.Running[len(s.Running)-1]
	if last.Succeeded != r.Succeeded {
		t.Errorf("succeeded %d, result %d", last.Succeeded, r.Succeeded)
	}
	for k, tr := range r.Tracked {
		if last.Exists[k] != tr.Exists.Count || last.Attracting[k] != tr.Attracting.Count || last.Semistable[k] != tr.Semistable.Count {
			t.Errorf("%s: running %d/%d/%d, result %d/%d/%d", tr.Label, last.Exists[k], last.Attracting[k], last.Semistable[k],
				tr.Exists.Count, tr.Attracting.Count, tr.Semistable.Count)
		}
		if last.Current[k] != r.Outcomes[k].P.Count {
			t.Errorf("%s: ends here %d, result %d", tr.Label, last.Current[k], r.Outcomes[k].P.Count)
		}
	}
	// P(E2 exists) = P(H < 1) = 2/3 (analytic); at 3000 Latin hypercube
	// draws the share is within 1/3000 of it.
	if p := float64(last.Exists[1]) / float64(last.Succeeded); math.Abs(p-2.0/3) > 2.0/3000 {
		t.Errorf("P(E2 exists) = %v, want 2/3", p)
	}
}

func TestSameSummaryForAnyWorkerCount(t *testing.T) {
	m := stockModel(t)
	cfg := Config{BandDraws: 700}
	_, a := collect(t, m, 2500, 1, cfg)
	_, b := collect(t, m, 2500, 7, cfg)
	if fmt.Sprintf("%v", a) != fmt.Sprintf("%v", b) {
		t.Error("summary differs between 1 and 7 workers")
	}
	if a.BandDraws != 700 {
		t.Errorf("band draws %d, want the first 700", a.BandDraws)
	}
}

func TestConfigValidation(t *testing.T) {
	m := stockModel(t)
	for _, cfg := range []Config{{GridPoints: 1}, {Bins: -1}, {FirstCheckpoint: 3}, {PilotDraws: -2}, {BandDraws: -1}} {
		if _, err := NewCollector(m, cfg); err == nil {
			t.Errorf("%+v accepted", cfg)
		}
	}
	if _, err := NewCollector(nil, Config{}); err == nil {
		t.Error("nil model accepted")
	}
}

func TestHistogramWithFewSlopesAndAllZero(t *testing.T) {
	// All-zero slopes get the bins [−1, 1] padded by 2%: edges −1.04, …,
	// 1.04 (arithmetic).
	sk := agg.NewSketch()
	for range 5 {
		sk.Add(0)
	}
	sk.Add(math.NaN())
	r := histogram("E1", sk, 4)
	if r.N != 5 || len(r.Edges) != 5 || r.Edges[0] != -1.04 || r.Counts[2] != 5 {
		t.Errorf("%+v", r)
	}
	// Reading twice gives the same answer and leaves the sketch.
	if r2 := histogram("E1", sk, 4); fmt.Sprint(r2) != fmt.Sprint(r) || sk.Count() != 5 {
		t.Error("histogram changed the sketch")
	}
	if r := histogram("E2", agg.NewSketch(), 4); r.Edges != nil || r.N != 0 {
		t.Errorf("empty: %+v", r)
	}
	// One slope of 2: bins [0, 2] padded by 0.04, the value in the last bin.
	one := agg.NewSketch()
	one.Add(2)
	if r := histogram("E3", one, 4); r.Edges[0] != -0.04 || r.Counts[3] != 1 || r.Below+r.Above != 0 {
		t.Errorf("one slope: %+v", r)
	}
}
