package assess

import (
	"context"
	"math"
	"sync"
	"testing"
	"time"

	"holdfast/internal/nativeref"
	"holdfast/sample"
	"holdfast/scenarios"
)

// The lake demo's rate law written directly in Go, with its derivative:
// f(P) = L − sP + rP^q/(m^q + P^q), parameters in scenario order L, s, r, m, q.
func lakeF(P float64, th []float64) float64 {
	L, s, r, m, q := th[0], th[1], th[2], th[3], th[4]
	pq := math.Pow(P, q)
	return L - s*P + r*pq/(math.Pow(m, q)+pq)
}

func lakeDF(P float64, th []float64) float64 {
	s, r, m, q := th[1], th[2], th[3], th[4]
	if P == 0 {
		return -s
	}
	pq, mq := math.Pow(P, q), math.Pow(m, q)
	return -s + r*q*mq*pq/P/((mq+pq)*(mq+pq))
}

// brent is the native reference's zero-finder (nativeref.Brent) without
// its evaluation count.
func brent(f func(float64) float64, a, b, fa, fb, tol float64) float64 {
	x, _ := nativeref.Brent(f, a, b, fa, fb, tol)
	return x
}

// nativeLake is the hand-written reference of the Monte Carlo benchmark:
// a 200-point grid scan for sign changes, Brent refinement, the slope
// sign as verdict, and a count of draws where the upper (turbid) state
// exists and attracts.
func nativeLake(d *sample.Design, n, workers int) (roots, attracting int) {
	var mu sync.Mutex
	var wg sync.WaitGroup
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func(w int) {
			defer wg.Done()
			th := make([]float64, 5)
			f := func(P float64) float64 { return lakeF(P, th) }
			var nr, na int
			for i := w; i < n; i += workers {
				d.Draw(i, th)
				const grid = 200
				lo, hi := 0.0, 5.0
				xa, fa := lo, f(lo)
				for k := 1; k <= grid; k++ {
					xb := lo + (hi-lo)*float64(k)/grid
					fb := f(xb)
					if fa*fb < 0 {
						x := brent(f, xa, xb, fa, fb, 1e-12)
						nr++
						if lakeDF(x, th) < 0 && x > 1 {
							na++
						}
					}
					xa, fa = xb, fb
				}
			}
			mu.Lock()
			roots += nr
			attracting += na
			mu.Unlock()
		}(w)
	}
	wg.Wait()
	return roots, attracting
}

const benchDraws = 20000

func lakeModel(b *testing.B) *Model {
	s, err := scenarios.LoadDemo("lake")
	if err != nil {
		b.Fatal(err)
	}
	m, err := Compile(s)
	if err != nil {
		b.Fatal(err)
	}
	return m
}

// BenchmarkMonteCarloLake and BenchmarkNativeLake run the same draws of
// the lake demo on two workers; compare their draws/s.
func BenchmarkMonteCarloLake(b *testing.B) {
	m := lakeModel(b)
	b.ResetTimer()
	for b.Loop() {
		if _, err := Run(context.Background(), m, Options{Draws: benchDraws, Seed: 1, Plan: sample.Random, Workers: 2}); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(benchDraws*b.N)/b.Elapsed().Seconds(), "draws/s")
}

func BenchmarkNativeLake(b *testing.B) {
	m := lakeModel(b)
	d, err := m.Design(sample.Random, benchDraws, 1)
	if err != nil {
		b.Fatal(err)
	}
	b.ResetTimer()
	for b.Loop() {
		nativeLake(d, benchDraws, 2)
	}
	b.ReportMetric(float64(benchDraws*b.N)/b.Elapsed().Seconds(), "draws/s")
}

// BenchmarkLakeEngineVsNative times the engine and the native reference
// alternately on the same 20,000 lake draws (two workers each) and reports
// the ratio of their draws per second, so that load on a shared machine
// affects both alike. Target: ratio ≥ 1.
func BenchmarkLakeEngineVsNative(b *testing.B) {
	m := lakeModel(b)
	d, err := m.Design(sample.Random, benchDraws, 1)
	if err != nil {
		b.Fatal(err)
	}
	var engine, native time.Duration
	for b.Loop() {
		t0 := time.Now()
		if _, err := Run(context.Background(), m, Options{Draws: benchDraws, Seed: 1, Plan: sample.Random, Workers: 2}); err != nil {
			b.Fatal(err)
		}
		t1 := time.Now()
		nativeLake(d, benchDraws, 2)
		t2 := time.Now()
		engine += t1.Sub(t0)
		native += t2.Sub(t1)
	}
	n := float64(benchDraws * b.N)
	b.ReportMetric(n/engine.Seconds(), "engine-draws/s")
	b.ReportMetric(n/native.Seconds(), "native-draws/s")
	b.ReportMetric(native.Seconds()/engine.Seconds(), "speed-ratio")
}
