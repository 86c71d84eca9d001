package tipping

import (
	"context"
	"fmt"
	"math"
	"slices"
	"sort"
	"testing"
	"time"

	"holdfast/assess"
	"holdfast/sample"
	"holdfast/scenarios"
)

// The speed benchmark: the lake demo's clear state E1 under a rising
// phosphorus load L from 0.05 to 0.4 (illustrative numbers), on the same
// Latin hypercube draws for both methods, two workers each.
const (
	benchWorkers = 2
	benchFrom    = 0.05
	benchTo      = 0.4
)

func benchModel(b *testing.B) *assess.Model {
	b.Helper()
	s, err := scenarios.LoadDemo("lake")
	if err != nil {
		b.Fatal(err)
	}
	m, err := assess.Compile(s)
	if err != nil {
		b.Fatal(err)
	}
	return m
}

func directRun(b *testing.B, m *assess.Model, n int) *Result {
	b.Helper()
	r, err := Run(context.Background(), m, Options{Driver: "L", From: benchFrom, To: benchTo, Track: "E1",
		Risk: 0.05, Draws: n, Seed: 1, Plan: sample.LHS, Workers: benchWorkers})
	if err != nil {
		b.Fatal(err)
	}
	return r
}

// gridLost is the slow way: the Monte Carlo engine re-run at M driver
// values evenly spaced over the range, on the same draws (common random
// numbers), each giving P(E1 lost) = 1 − P(E1 attracting).
func gridLost(b *testing.B, m *assess.Model, n, M int) (ds, lost []float64) {
	b.Helper()
	design, err := m.Design(sample.LHS, n, 1)
	if err != nil {
		b.Fatal(err)
	}
	j := m.Scenario.ParamIndex("L")
	for k := range M {
		d := benchFrom + (benchTo-benchFrom)*float64(k)/float64(M-1)
		r, err := assess.Run(context.Background(), m, assess.Options{
			Draws: n, Seed: 1, Plan: sample.LHS, Workers: benchWorkers,
			Points: func(i int, th []float64) { design.Draw(i, th); th[j] = d },
		})
		if err != nil {
			b.Fatal(err)
		}
		ds, lost = append(ds, d), append(lost, 1-r.Tracked[0].Attracting.P)
	}
	return ds, lost
}

// interpolated reads the p-quantile off the piecewise-linear interpolant
// of a curve of P(lost) on a grid.
func interpolated(ds, lost []float64, p float64) float64 {
	for k := 1; k < len(ds); k++ {
		if lost[k] >= p && lost[k-1] < p {
			return ds[k-1] + (p-lost[k-1])/(lost[k]-lost[k-1])*(ds[k]-ds[k-1])
		}
	}
	return math.NaN()
}

// gridPoints returns the number of grid points M that the slow way needs
// to reach the direct method's quantile accuracy: the smallest M such that
// every grid of M or more points (up to 400) reads each of the 5, 25, 50,
// 75 and 95% quantiles within half a standard error of the direct
// estimate, so that its total error is at most √(1 + 1/4) ≈ 1.12 times
// the direct method's. A grid on the same draws (common random numbers)
// that followed E1 as the sweep does would read P(lost) at d as the share
// of critical values ≤ d exactly; so its reading is taken from the direct
// critical values, which isolates the discretisation error from the
// engine's different identity path (see CurvePoint.Disagree). The
// standard error of a quantile is (X₍s₎ − X₍r₎)/(2·1.96) from its 95%
// order-statistic interval.
func gridPoints(b *testing.B, r *Result) int {
	b.Helper()
	var crit []float64
	for _, tp := range r.Tips {
		switch tp.Kind {
		case None:
			crit = append(crit, math.Inf(1))
		case Fold, Exchange, Boundary:
			crit = append(crit, tp.D)
		default:
			b.Fatalf("unexpected outcome %v", tp.Kind)
		}
	}
	slices.Sort(crit)
	n := len(crit)
	share := func(d float64) float64 {
		return float64(sort.SearchFloat64s(crit, math.Nextafter(d, math.Inf(1)))) / float64(n)
	}
	var want, se [5]float64
	for i, p := range assess.QuantileLevels {
		lo, hi, _, err := OrderInterval(n, p, 0.95)
		if err != nil || lo < 1 || hi > n {
			b.Fatalf("level %v: ranks %d, %d (%v)", p, lo, hi, err)
		}
		want[i] = crit[sampleRank(n, p)-1]
		se[i] = (crit[hi-1] - crit[lo-1]) / (2 * 1.959964)
	}
	need := 0
	for M := 400; M >= 2; M-- {
		ds, lost := make([]float64, M), make([]float64, M)
		for k := range M {
			ds[k] = benchFrom + (benchTo-benchFrom)*float64(k)/float64(M-1)
			lost[k] = share(ds[k])
		}
		for i, p := range assess.QuantileLevels {
			if !(math.Abs(interpolated(ds, lost, p)-want[i]) <= 0.5*se[i]) {
				need = M + 1
			}
		}
		if need > 0 {
			break
		}
	}
	return max(need, 2)
}

// BenchmarkCriticalValuesVsGrid times, in one run, the direct critical
// values (one engine pass with per-draw continuation and hysteresis) and
// the grid of Monte Carlo runs that reaches the same quantile accuracy
// (see gridPoints). Metrics: direct-s and grid-s per run, grid-points,
// speedup = grid-s / direct-s (target ≥ 20), and grid-vs-direct, the
// largest difference between the real grid's quantiles and the direct
// ones in standard errors (it includes the engine's path differences).
func BenchmarkCriticalValuesVsGrid(b *testing.B) {
	m := benchModel(b)
	for _, n := range []int{10000, 20000, 50000} {
		b.Run(fmt.Sprintf("draws=%d", n), func(b *testing.B) {
			M := gridPoints(b, directRun(b, m, n))
			var tDirect, tGrid time.Duration
			var worst float64
			for b.Loop() {
				t0 := time.Now()
				r := directRun(b, m, n)
				tDirect += time.Since(t0)
				t0 = time.Now()
				ds, lost := gridLost(b, m, n, M)
				tGrid += time.Since(t0)
				for i, p := range assess.QuantileLevels {
					lo, hi, _, _ := OrderInterval(int(r.Critical.N), p, 0.95)
					crit := r.Critical.Quantiles[i].D
					se := 0.0
					if lo >= 1 && hi <= len(r.Tips) {
						se = math.Abs(criticalAt(r, hi)-criticalAt(r, lo)) / (2 * 1.959964)
					}
					worst = math.Max(worst, math.Abs(interpolated(ds, lost, p)-crit)/se)
				}
			}
			b.ReportMetric(tDirect.Seconds()/float64(b.N), "direct-s")
			b.ReportMetric(tGrid.Seconds()/float64(b.N), "grid-s")
			b.ReportMetric(float64(M), "grid-points")
			b.ReportMetric(tGrid.Seconds()/tDirect.Seconds(), "speedup")
			b.ReportMetric(worst, "grid-vs-direct-SE")
		})
	}
}

// criticalAt returns the order statistic of the given rank of the
// critical values (+Inf for draws without tipping).
func criticalAt(r *Result, rank int) float64 {
	var crit []float64
	for _, tp := range r.Tips {
		if tp.Kind == None {
			crit = append(crit, math.Inf(1))
		} else {
			crit = append(crit, tp.D)
		}
	}
	slices.Sort(crit)
	return crit[rank-1]
}
