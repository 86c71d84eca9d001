package sensitivity

import (
	"context"
	"math"
	"os"
	"sync"
	"testing"

	"holdfast/assess"
	"holdfast/sample"
	"holdfast/scenarios"
)

// The benchmark: k = 6 uncertain inputs (testdata/lake6.yaml), N = 2¹⁴
// base rows, so N·(k+2) = 131,072 model runs, on two workers; output
// "attracting" of E1 with 1000 bootstrap replicates. Run it with
//
//	go test -run '^$' -bench Lake6 -benchtime 2x ./assess/sensitivity
const benchBase = 1 << 14

func lake6(b *testing.B) *assess.Model {
	src, err := os.ReadFile("testdata/lake6.yaml")
	if err != nil {
		b.Fatal(err)
	}
	s, err := scenarios.Parse("testdata/lake6.yaml", src, nil)
	if err != nil {
		b.Fatal(err)
	}
	m, err := assess.Compile(s)
	if err != nil {
		b.Fatal(err)
	}
	return m
}

// BenchmarkSensitivityLake6 is the whole sensitivity run: engine, screening,
// local view and bootstrap.
func BenchmarkSensitivityLake6(b *testing.B) {
	m := lake6(b)
	b.ResetTimer()
	for b.Loop() {
		if _, err := Run(context.Background(), m, Options{Target: "E1", Output: Attracting, Base: benchBase, Seed: 1, Workers: 2}); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(benchBase*8*b.N)/b.Elapsed().Seconds(), "draws/s")
}

// lakeRate is the lake rate law written in Go, parameters L, s, r, m, q
// (w is not used).
func lakeRate(P float64, th []float64) float64 {
	L, s, r, m, q := th[0], th[1], th[2], th[3], th[4]
	pq := math.Pow(P, q)
	return L - s*P + r*pq/(math.Pow(m, q)+pq)
}

// bisect refines a sign change of f on [a, b] to 1e-12.
func bisect(f func(float64) float64, a, b, fa float64) float64 {
	for b-a > 1e-12 {
		c := a + (b-a)/2
		fc := f(c)
		if (fc < 0) == (fa < 0) {
			a, fa = c, fc
		} else {
			b = c
		}
	}
	return a + (b-a)/2
}

// BenchmarkNativeSaltelliLake6 is the hand-written reference: the same
// design points, a 200-point grid scan with bisection, and a simplified
// verdict (the lowest root lies below 0.5 and f falls through it), then
// the same estimator and bootstrap. It does no classification by
// higher derivatives, no tracking, no basins, barriers or screening.
func BenchmarkNativeSaltelliLake6(b *testing.B) {
	m := lake6(b)
	params := make([]sample.Param, len(m.Scenario.Params))
	for i, p := range m.Scenario.Params {
		params[i] = sample.Param{Name: p.Name, Dist: p.Dist, Value: p.Value}
	}
	indep, err := sample.NewDesign(params, nil, sample.Random, 1, 1)
	if err != nil {
		b.Fatal(err)
	}
	d, err := NewDesign(benchBase, 6, 1)
	if err != nil {
		b.Fatal(err)
	}
	y := make([]float64, d.Runs())
	b.ResetTimer()
	for b.Loop() {
		var wg sync.WaitGroup
		for w := range 2 {
			wg.Add(1)
			go func() {
				defer wg.Done()
				th := make([]float64, 6)
				f := func(P float64) float64 { return lakeRate(P, th) }
				for i := w; i < d.Runs(); i += 2 {
					d.Point(i, th)
					indep.Map(th, th)
					const grid = 200
					y[i] = 0
					xa, fa := 0.0, f(0)
					for g := 1; g <= grid; g++ {
						xb := 5 * float64(g) / grid
						fb := f(xb)
						if fa*fb < 0 {
							if x := bisect(f, xa, xb, fa); x < 0.5 && fa > 0 {
								y[i] = 1
							}
							break
						}
						xa, fa = xb, fb
					}
				}
			}()
		}
		wg.Wait()
		if _, err := sobolRows(y, 6, BootstrapOptions{Seed: 1, Workers: 2}); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(d.Runs()*b.N)/b.Elapsed().Seconds(), "draws/s")
}

// BenchmarkBootstrap is the estimator with 1000 replicates alone, N = 2¹⁴,
// k = 6.
func BenchmarkBootstrap(b *testing.B) {
	fA, fB, fAB := onDesign(b, benchBase, 6, 1, gFunction([]float64{0, 1, 4.5, 9, 99, 99}))
	b.ResetTimer()
	for b.Loop() {
		if _, err := Sobol(fA, fB, fAB, BootstrapOptions{Seed: 1, Workers: 2}); err != nil {
			b.Fatal(err)
		}
	}
}
