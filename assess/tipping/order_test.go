package tipping

import (
	"math"
	"testing"
)

// binomCDF is the binomial distribution function summed term by term from
// the probability mass function C(n, j) p^j (1 − p)^(n−j), computed with
// log-gamma: the construction itself, independent of gonum's incomplete
// beta function.
func binomCDF(n, k int, p float64) float64 {
	if k < 0 {
		return 0
	}
	if k >= n {
		return 1
	}
	s := 0.0
	for j := 0; j <= k; j++ {
		lg1, _ := math.Lgamma(float64(n + 1))
		lg2, _ := math.Lgamma(float64(j + 1))
		lg3, _ := math.Lgamma(float64(n - j + 1))
		s += math.Exp(lg1 - lg2 - lg3 + float64(j)*math.Log(p) + float64(n-j)*math.Log1p(-p))
	}
	return s
}

func TestOrderIntervalAgainstBinomialConstruction(t *testing.T) {
	// Conover (Practical Nonparametric Statistics, 3rd ed., 1999, §3.2):
	// P(X₍r₎ ≤ ξ_p < X₍s₎) = P(r ≤ B ≤ s − 1), B ~ Binomial(n, p), with
	// r − 1 the largest k with F(k) ≤ (1 − conf)/2 and s − 1 the smallest
	// with F(k) ≥ (1 + conf)/2. Checked here against the binomial mass
	// function summed directly.
	for _, n := range []int{1, 5, 10, 20, 59, 100, 1000} {
		for _, p := range []float64{0.01, 0.05, 0.1, 0.5, 0.9} {
			r, s, cov, err := OrderInterval(n, p, 0.95)
			if err != nil {
				t.Fatal(err)
			}
			F := func(k int) float64 { return binomCDF(n, k, p) }
			wantR := 0
			for k := 0; k < n; k++ {
				if F(k) <= 0.025 {
					wantR = k + 1
				}
			}
			wantS := n + 1
			for k := n; k >= 0; k-- {
				if F(k) >= 0.975 {
					wantS = k + 1
				}
			}
			if r != wantR || s != wantS {
				t.Errorf("n=%d p=%v: ranks (%d, %d), binomial construction (%d, %d)", n, p, r, s, wantR, wantS)
			}
			if want := F(s-1) - F(r-1); math.Abs(cov-want) > 1e-9 {
				t.Errorf("n=%d p=%v: coverage %v, binomial construction %v", n, p, cov, want)
			}
			if cov < 0.95-1e-12 {
				t.Errorf("n=%d p=%v: coverage %v below 0.95", n, p, cov)
			}
		}
	}
}

func TestOrderIntervalMedianOfTen(t *testing.T) {
	// The median of n = 10 (a textbook case, from memory: X₍2₎ to X₍9₎):
	// P(B ≤ 1) = 11/1024 ≤ 0.025 < P(B ≤ 2) = 56/1024 and P(B ≤ 8) =
	// 1013/1024 ≥ 0.975 > P(B ≤ 7) = 968/1024, so r = 2, s = 9 with
	// coverage 1 − 22/1024, verified here from the binomial coefficients.
	r, s, cov, err := OrderInterval(10, 0.5, 0.95)
	if err != nil {
		t.Fatal(err)
	}
	if r != 2 || s != 9 || math.Abs(cov-(1-22.0/1024)) > 1e-12 {
		t.Errorf("median of 10: (%d, %d) coverage %v, want (2, 9) coverage %v", r, s, cov, 1-22.0/1024)
	}
	// Too few observations to bound a tail quantile: α = 0.05 needs
	// 0.95^n ≤ 0.025, n ≥ 72, for a lower bound.
	if r, _, _, _ := OrderInterval(71, 0.05, 0.95); r != 0 {
		t.Errorf("n = 71, p = 0.05: lower rank %d, want 0 (unbounded)", r)
	}
	if r, _, _, _ := OrderInterval(72, 0.05, 0.95); r != 1 {
		t.Errorf("n = 72, p = 0.05: lower rank %d, want 1", r)
	}
	for _, bad := range [][3]float64{{0, 0.5, 0.95}, {10, 0, 0.95}, {10, 1, 0.95}, {10, 0.5, 1}, {10, math.NaN(), 0.95}} {
		if _, _, _, err := OrderInterval(int(bad[0]), bad[1], bad[2]); err == nil {
			t.Errorf("OrderInterval%v: no error", bad)
		}
	}
}

func TestSampleRank(t *testing.T) {
	// Hyndman & Fan (1996), definition 1: the smallest order statistic at
	// which the empirical distribution function reaches p, rank ⌈np⌉.
	for _, c := range []struct {
		n    int
		p    float64
		want int
	}{{10, 0.05, 1}, {10, 0.1, 1}, {10, 0.11, 2}, {100, 0.05, 5}, {2000, 0.95, 1900}, {3, 0.999, 3}} {
		if got := sampleRank(c.n, c.p); got != c.want {
			t.Errorf("sampleRank(%d, %v) = %d, want %d", c.n, c.p, got, c.want)
		}
	}
}
