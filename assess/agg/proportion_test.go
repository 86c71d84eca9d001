package agg

import (
	"math"
	"testing"
)

func TestWilsonNewcombe(t *testing.T) {
	// Newcombe (1998), Statistics in Medicine 17:857, Table I, method 3
	// (Wilson score without continuity correction), worked examples.
	cases := []struct {
		k, n   int64
		lo, hi float64
	}{
		{81, 263, 0.2553, 0.3662},
		{15, 148, 0.0624, 0.1605},
		{0, 20, 0, 0.1611},
		{1, 29, 0.0061, 0.1718},
	}
	for _, c := range cases {
		lo, hi := Proportion{K: c.k, N: c.n}.Wilson(0.95)
		if math.Abs(lo-c.lo) > 5e-5 || math.Abs(hi-c.hi) > 5e-5 {
			t.Errorf("Wilson %d/%d = [%.4f, %.4f], want [%.4f, %.4f]", c.k, c.n, lo, hi, c.lo, c.hi)
		}
	}
}

func TestClopperPearsonNewcombe(t *testing.T) {
	// Newcombe (1998), Table I, method 5 (exact Clopper–Pearson): 0/20 → 0–0.1684.
	lo, hi := Proportion{K: 0, N: 20}.ClopperPearson(0.95)
	if lo != 0 || math.Abs(hi-0.1684) > 5e-5 {
		t.Errorf("Clopper–Pearson 0/20 = [%.4f, %.4f], want [0, 0.1684]", lo, hi)
	}
	// Analytic check: for K = 0 the upper bound solves (1−p)^N = α/2.
	want := 1 - math.Pow(0.025, 1.0/20)
	if math.Abs(hi-want) > 1e-10 {
		t.Errorf("Clopper–Pearson 0/20 upper = %.12f, analytic %.12f", hi, want)
	}
	// Symmetry: N/N mirrors 0/N.
	lo2, hi2 := Proportion{K: 20, N: 20}.ClopperPearson(0.95)
	if hi2 != 1 || math.Abs(lo2-(1-hi)) > 1e-12 {
		t.Errorf("Clopper–Pearson 20/20 = [%v, %v], want [%v, 1]", lo2, hi2, 1-hi)
	}
}

func TestIntervalChoosesExactAtEdges(t *testing.T) {
	// Common practice, no source beyond Newcombe (1998): exact interval at 0 and N.
	p := Proportion{K: 0, N: 20}
	lo, hi := p.Interval(0.95)
	clo, chi := p.ClopperPearson(0.95)
	if lo != clo || hi != chi {
		t.Errorf("Interval(0/20) = [%v, %v], want Clopper–Pearson [%v, %v]", lo, hi, clo, chi)
	}
	p = Proportion{K: 81, N: 263}
	lo, hi = p.Interval(0.95)
	wlo, whi := p.Wilson(0.95)
	if lo != wlo || hi != whi {
		t.Errorf("Interval(81/263) should be Wilson")
	}
	if !math.IsNaN(Proportion{}.Estimate()) {
		t.Errorf("estimate of 0/0 should be NaN")
	}
}
