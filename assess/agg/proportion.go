package agg

import (
	"math"

	"gonum.org/v1/gonum/stat/distuv"
)

// Proportion counts K successes in N trials.
type Proportion struct {
	K, N int64
}

// Add records one trial.
func (p *Proportion) Add(success bool) {
	p.N++
	if success {
		p.K++
	}
}

// Merge adds the counts of q.
func (p *Proportion) Merge(q Proportion) {
	p.K += q.K
	p.N += q.N
}

// Estimate is K/N, or NaN when N = 0.
func (p Proportion) Estimate() float64 {
	if p.N == 0 {
		return math.NaN()
	}
	return float64(p.K) / float64(p.N)
}

// Interval is the two-sided confidence interval at level conf (e.g. 0.95)
// that holdfast reports: the Wilson score interval, except when K = 0 or
// K = N, where the Wilson interval's coverage is poor and the exact
// Clopper–Pearson interval is used (Newcombe 1998, Statistics in Medicine
// 17:857; Brown, Cai & DasGupta 2001, Statistical Science 16:101).
func (p Proportion) Interval(conf float64) (lo, hi float64) {
	if p.N > 0 && (p.K == 0 || p.K == p.N) {
		return p.ClopperPearson(conf)
	}
	return p.Wilson(conf)
}

// Wilson is the Wilson score interval (Wilson 1927) without continuity
// correction:
//
//	(p̂ + z²/2n ± z √(p̂(1−p̂)/n + z²/4n²)) / (1 + z²/n)
//
// with z the (1+conf)/2 standard normal quantile. It returns NaNs for N = 0.
func (p Proportion) Wilson(conf float64) (lo, hi float64) {
	if p.N == 0 {
		return math.NaN(), math.NaN()
	}
	z := distuv.UnitNormal.Quantile(0.5 + conf/2)
	n := float64(p.N)
	ph := float64(p.K) / n
	z2 := z * z
	den := 1 + z2/n
	centre := (ph + z2/(2*n)) / den
	half := z * math.Sqrt(ph*(1-ph)/n+z2/(4*n*n)) / den
	lo, hi = centre-half, centre+half
	if p.K == 0 {
		lo = 0
	}
	if p.K == p.N {
		hi = 1
	}
	return math.Max(lo, 0), math.Min(hi, 1)
}

// ClopperPearson is the exact interval of Clopper & Pearson (1934), from
// quantiles of the beta distribution:
//
//	lo = B⁻¹(α/2; K, N−K+1),  hi = B⁻¹(1−α/2; K+1, N−K)
//
// with lo = 0 when K = 0 and hi = 1 when K = N.
func (p Proportion) ClopperPearson(conf float64) (lo, hi float64) {
	if p.N == 0 {
		return math.NaN(), math.NaN()
	}
	alpha := 1 - conf
	k, n := float64(p.K), float64(p.N)
	if p.K > 0 {
		lo = distuv.Beta{Alpha: k, Beta: n - k + 1}.Quantile(alpha / 2)
	}
	hi = 1
	if p.K < p.N {
		hi = distuv.Beta{Alpha: k + 1, Beta: n - k}.Quantile(1 - alpha/2)
	}
	return lo, hi
}

// HalfWidth is half the width of Interval(conf); NaN when N = 0.
func (p Proportion) HalfWidth(conf float64) float64 {
	lo, hi := p.Interval(conf)
	return (hi - lo) / 2
}
