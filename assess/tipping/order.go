package tipping

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/stat/distuv"
)

// OrderInterval returns the ranks r < s (1-based) of the order statistics
// X₍r₎ ≤ X₍s₎ of a sample of n that enclose the p-quantile ξ_p of any
// continuous distribution with probability at least conf, and that
// probability. With B ~ Binomial(n, p) the number of observations at or
// below ξ_p,
//
//	P(X₍r₎ ≤ ξ_p < X₍s₎) = P(r ≤ B ≤ s − 1) = F_B(s − 1) − F_B(r − 1),
//
// whatever the distribution: the interval is distribution-free (Conover,
// Practical Nonparametric Statistics, 3rd ed., Wiley 1999, §3.2; David &
// Nagaraja, Order Statistics, 3rd ed., 2003, §7.1). The tails are split
// equally: r − 1 is the largest k with F_B(k) ≤ (1 − conf)/2 and s − 1
// the smallest k with F_B(k) ≥ (1 + conf)/2. r = 0 means the sample is too
// small to bound ξ_p from below (the interval is open there), s = n + 1
// that it is too small to bound it from above.
func OrderInterval(n int, p, conf float64) (r, s int, coverage float64, err error) {
	if n < 1 {
		return 0, 0, 0, fmt.Errorf("order interval: sample size must be positive, got %d", n)
	}
	if !(p > 0 && p < 1) {
		return 0, 0, 0, fmt.Errorf("order interval: level must be in (0, 1), got %v", p)
	}
	if !(conf > 0 && conf < 1) {
		return 0, 0, 0, fmt.Errorf("order interval: confidence must be in (0, 1), got %v", conf)
	}
	b := distuv.Binomial{N: float64(n), P: p}
	cdf := func(k int) float64 {
		switch {
		case k < 0:
			return 0
		case k >= n:
			return 1
		}
		return b.CDF(float64(k))
	}
	tail := (1 - conf) / 2
	// r − 1 = largest k in [−1, n] with F(k) ≤ tail (F(−1) = 0).
	lo, hi := -1, n // F(lo) ≤ tail < F(hi) = 1 (tail < 1/2)
	for hi-lo > 1 {
		mid := lo + (hi-lo)/2
		if cdf(mid) <= tail {
			lo = mid
		} else {
			hi = mid
		}
	}
	r = lo + 1
	// s − 1 = smallest k in [0, n] with F(k) ≥ 1 − tail.
	lo, hi = -1, n // F(lo) < 1 − tail ≤ F(hi)
	for hi-lo > 1 {
		mid := lo + (hi-lo)/2
		if cdf(mid) >= 1-tail {
			hi = mid
		} else {
			lo = mid
		}
	}
	s = hi + 1
	return r, s, cdf(s-1) - cdf(r-1), nil
}

// sampleRank is the rank (1-based) of the sample p-quantile, the smallest
// order statistic at which the empirical distribution function reaches p:
// ⌈np⌉ (Hyndman & Fan 1996, definition 1).
func sampleRank(n int, p float64) int {
	k := int(math.Ceil(float64(n)*p - 1e-9))
	return min(max(k, 1), n)
}
