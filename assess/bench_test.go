package assess

import (
	"context"
	"math"
	"sync"
	"testing"
	"time"

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

// brent finds a root of f in [a, b] with f(a)·f(b) < 0 (Brent 1973,
// Algorithms for Minimization without Derivatives, ch. 4, zero).
func brent(f func(float64) float64, a, b, fa, fb, tol float64) float64 {
	c, fc := a, fa
	d := b - a
	e := d
	for iter := 0; iter < 100; iter++ {
		if fb*fc > 0 {
			c, fc = a, fa
			d = b - a
			e = d
		}
		if math.Abs(fc) < math.Abs(fb) {
			a, b, c = b, c, b
			fa, fb, fc = fb, fc, fb
		}
		tol1 := 2*2.2e-16*math.Abs(b) + tol/2
		xm := (c - b) / 2
		if math.Abs(xm) <= tol1 || fb == 0 {
			return b
		}
		if math.Abs(e) >= tol1 && math.Abs(fa) > math.Abs(fb) {
			s := fb / fa
			var p, q float64
			if a == c {
				p = 2 * xm * s
				q = 1 - s
			} else {
				q0 := fa / fc
				r := fb / fc
				p = s * (2*xm*q0*(q0-r) - (b-a)*(r-1))
				q = (q0 - 1) * (r - 1) * (s - 1)
			}
			if p > 0 {
				q = -q
			}
			p = math.Abs(p)
			if 2*p < math.Min(3*xm*q-math.Abs(tol1*q), math.Abs(e*q)) {
				e = d
				d = p / q
			} else {
				d = xm
				e = d
			}
		} else {
			d = xm
			e = d
		}
		a, fa = b, fb
		if math.Abs(d) > tol1 {
			b += d
		} else {
			b += math.Copysign(tol1, xm)
		}
		fb = f(b)
	}
	return b
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
