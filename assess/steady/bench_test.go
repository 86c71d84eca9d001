package steady

import (
	"math"
	"testing"

	"holdfast/internal/nativeref"
)

// Illustrative shallow-lake setting with three equilibria (a inside the
// window between the folds for b = 0.52).
const benchA, benchB = 0.06, 0.52

// nativeLake is the shallow-lake law written directly in Go.
func nativeLake(p float64) float64 { return benchA - benchB*p + p*p/(1+p*p) }

// nativeScanBrent is the plain reference: f on a 200-point grid, Brent in
// every cell with a sign change.
func nativeScanBrent(f func(float64) float64, lo, hi float64, roots []float64) ([]float64, int) {
	const n = 200
	roots = roots[:0]
	h := (hi - lo) / (n - 1)
	x0 := lo
	f0 := f(x0)
	evals := 1
	for i := 1; i < n; i++ {
		x1 := lo + float64(i)*h
		f1 := f(x1)
		evals++
		switch {
		case f0 == 0:
			roots = append(roots, x0)
		case f0*f1 < 0:
			r, k := nativeref.Brent(f, x0, x1, f0, f1, 1e-12*math.Max(1, math.Abs(x0)))
			evals += k
			roots = append(roots, r)
		}
		x0, f0 = x1, f1
	}
	if f0 == 0 {
		roots = append(roots, x0)
	}
	return roots, evals
}

func BenchmarkNativeScanBrent(b *testing.B) {
	roots := make([]float64, 0, 8)
	evals := 0
	for b.Loop() {
		roots, evals = nativeScanBrent(nativeLake, 0, 3, roots)
	}
	if len(roots) != 3 {
		b.Fatalf("native reference found %d roots, want 3", len(roots))
	}
	b.ReportMetric(float64(evals), "evals/op")
}

func benchFind(b *testing.B, opt Options) {
	fz, err := NewFinder(opt)
	if err != nil {
		b.Fatal(err)
	}
	var f Func = lakeFunc{benchA, benchB}
	var res *Result
	b.ReportAllocs()
	for b.Loop() {
		res, err = fz.Find(f, 0, 3)
		if err != nil {
			b.Fatal(err)
		}
	}
	if len(res.Equilibria) != 3 {
		b.Fatalf("Find found %d equilibria, want 3", len(res.Equilibria))
	}
	b.ReportMetric(float64(res.Evals), "evals/op")
	b.ReportMetric(float64(res.TaylorCalls), "taylor/op")
	b.ReportMetric(float64(res.TaylorTerms), "terms/op")
}

// BenchmarkFind is the full call: equilibria, classes, basins, barriers.
func BenchmarkFind(b *testing.B) { benchFind(b, DefaultOptions()) }

// BenchmarkFindNoBarriers skips the barrier quadrature.
func BenchmarkFindNoBarriers(b *testing.B) {
	opt := DefaultOptions()
	opt.NoBarriers = true
	benchFind(b, opt)
}

// The cost of one Eval and of Taylor orders 2 and 7 of the benchmark law,
// to convert the counts above into evaluation equivalents.
func BenchmarkLakeEval(b *testing.B) {
	f := lakeFunc{benchA, benchB}
	x, s := 0.3, 0.0
	for b.Loop() {
		s += f.Eval(x)
	}
	_ = s
}

func BenchmarkLakeTaylor3(b *testing.B) {
	f := lakeFunc{benchA, benchB}
	var c, e [3]float64
	for b.Loop() {
		f.Taylor(0.3, c[:], e[:])
	}
}

func BenchmarkLakeTaylor8(b *testing.B) {
	f := lakeFunc{benchA, benchB}
	var c, e [8]float64
	for b.Loop() {
		f.Taylor(0.3, c[:], e[:])
	}
}

// The same comparison on a costlier law, the shallow lake with a Hill
// recycling term L − sP + rP^q/(m^q + P^q) (illustrative parameters,
// three equilibria on [0.05, 3]): one Eval costs a math.Pow, as evaluating
// a compiled rate law costs more than a native Go expression.
var benchHill = hillLake{L: 0.05, s: 0.5, r: 1, mq: 1, q: 4.3}

func BenchmarkNativeScanBrentHill(b *testing.B) {
	roots := make([]float64, 0, 8)
	evals := 0
	for b.Loop() {
		roots, evals = nativeScanBrent(benchHill.Eval, 0.05, 3, roots)
	}
	if len(roots) != 3 {
		b.Fatalf("native reference found %d roots, want 3", len(roots))
	}
	b.ReportMetric(float64(evals), "evals/op")
}

func BenchmarkFindHill(b *testing.B) {
	fz, err := NewFinder(DefaultOptions())
	if err != nil {
		b.Fatal(err)
	}
	var f Func = benchHill
	var res *Result
	b.ReportAllocs()
	for b.Loop() {
		res, err = fz.Find(f, 0.05, 3)
		if err != nil {
			b.Fatal(err)
		}
	}
	if len(res.Equilibria) != 3 {
		b.Fatalf("Find found %d equilibria, want 3", len(res.Equilibria))
	}
	b.ReportMetric(float64(res.Evals), "evals/op")
	b.ReportMetric(float64(res.TaylorCalls), "taylor/op")
}

func BenchmarkHillEval(b *testing.B) {
	x, s := 0.7, 0.0
	for b.Loop() {
		s += benchHill.Eval(x)
	}
	_ = s
}

func BenchmarkHillTaylor3(b *testing.B) {
	var c, e [3]float64
	for b.Loop() {
		benchHill.Taylor(0.7, c[:], e[:])
	}
}

// TestBenchLawsAgree: Find and the plain scan + Brent reference agree on
// both benchmark laws (same roots to 1e-10).
func TestBenchLawsAgree(t *testing.T) {
	for _, tc := range []struct {
		f      Func
		native func(float64) float64
		lo, hi float64
	}{
		{lakeFunc{benchA, benchB}, nativeLake, 0, 3},
		{benchHill, benchHill.Eval, 0.05, 3},
	} {
		ref, _ := nativeScanBrent(tc.native, tc.lo, tc.hi, nil)
		res := mustFind(t, tc.f, tc.lo, tc.hi)
		got := xs(res)
		if len(got) != len(ref) {
			t.Fatalf("Find %v, scan + Brent %v", got, ref)
		}
		for i := range ref {
			if !near(got[i], ref[i], 1e-10) {
				t.Errorf("root %d: Find %.15g, scan + Brent %.15g", i, got[i], ref[i])
			}
		}
	}
}
