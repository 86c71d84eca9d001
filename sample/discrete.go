package sample

import (
	"fmt"
	"math"
	"sort"
	"strings"
)

// discrete is a finite distribution on sorted distinct atoms x[0] < … < x[n−1]
// with cumulative probabilities cum[k] = P(X ≤ x[k]), cum[n−1] = 1.
type discrete struct {
	x, cum []float64
	label  string
}

// maxListed is the largest number of values String lists in full.
const maxListed = 10

// NewDiscrete returns the distribution that takes values[k] with probability
// weights[k]/Σweights. Values must be finite; weights finite and ≥ 0 with a
// positive sum. Repeated values have their weights added; zero-weight values
// are dropped. Quantile is the step function inf{x : CDF(x) ≥ p}. String
// lists "value:weight" pairs as given, or summarises more than ten values.
func NewDiscrete(values, weights []float64) (Distribution, error) {
	const name = "discrete"
	if len(values) == 0 {
		return nil, argErr(name, "values", "must not be empty")
	}
	if len(weights) != len(values) {
		return nil, argErr(name, "weights", "must have one weight per value (got %d weights for %d values)", len(weights), len(values))
	}
	for k, v := range values {
		if err := finite(name, fmt.Sprintf("values[%d]", k), v); err != nil {
			return nil, err
		}
	}
	total := 0.0
	for k, w := range weights {
		if math.IsNaN(w) || math.IsInf(w, 0) || w < 0 {
			return nil, argErr(name, "weights", "must be finite and ≥ 0 (weights[%d] = %s)", k, num(w))
		}
		total += w
	}
	if !(total > 0) || math.IsInf(total, 0) {
		return nil, argErr(name, "weights", "must sum to a positive finite number (sum = %s)", num(total))
	}
	d := newAtoms(values, weights, "")
	if len(values) <= maxListed {
		parts := make([]string, len(values))
		for k := range values {
			parts[k] = num(values[k]) + ":" + num(weights[k])
		}
		d.label = "discrete(" + strings.Join(parts, ", ") + ")"
	} else {
		d.label = fmt.Sprintf("discrete(n=%d, min=%s, max=%s)", len(values), num(d.x[0]), num(d.x[len(d.x)-1]))
	}
	return d, nil
}

// NewEmpirical returns the empirical distribution of samples: each value has
// probability 1/n, so sampling by inversion resamples the given values with
// replacement, Q(p) = x₍⌈np⌉₎ (the step quantile, Hyndman & Fan 1996 type 1).
// samples must hold at least two values, all finite.
func NewEmpirical(samples []float64) (Distribution, error) {
	const name = "empirical"
	if len(samples) < 2 {
		return nil, argErr(name, "samples", "must hold at least 2 values (got %d)", len(samples))
	}
	w := make([]float64, len(samples))
	for k, v := range samples {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, argErr(name, "samples", "must all be finite (samples[%d] = %s)", k, num(v))
		}
		w[k] = 1
	}
	d := newAtoms(samples, w, "")
	d.label = fmt.Sprintf("empirical(n=%d, min=%s, max=%s)", len(samples), num(d.x[0]), num(d.x[len(d.x)-1]))
	return d, nil
}

// newAtoms sorts the atoms, merges repeats, drops zero weights and
// accumulates. The inputs are valid and the weight sum is positive.
func newAtoms(values, weights []float64, label string) *discrete {
	idx := make([]int, len(values))
	for k := range idx {
		idx[k] = k
	}
	sort.SliceStable(idx, func(a, b int) bool { return values[idx[a]] < values[idx[b]] })
	var x, w []float64
	for _, k := range idx {
		if weights[k] == 0 {
			continue
		}
		if n := len(x); n > 0 && x[n-1] == values[k] {
			w[n-1] += weights[k]
			continue
		}
		x = append(x, values[k])
		w = append(w, weights[k])
	}
	// Kahan-free running sum is adequate: the last entry is forced to 1.
	total := 0.0
	for _, v := range w {
		total += v
	}
	cum := make([]float64, len(w))
	s := 0.0
	for k, v := range w {
		s += v
		cum[k] = s / total
	}
	cum[len(cum)-1] = 1
	return &discrete{x: x, cum: cum, label: label}
}

func (d *discrete) Quantile(p float64) float64 {
	if badP(p) {
		return math.NaN()
	}
	// Smallest k with cum[k] ≥ p.
	k := sort.SearchFloat64s(d.cum, p)
	if k >= len(d.x) {
		k = len(d.x) - 1
	}
	return d.x[k]
}

func (d *discrete) CDF(x float64) float64 {
	if math.IsNaN(x) {
		return math.NaN()
	}
	// Number of atoms ≤ x.
	k := sort.Search(len(d.x), func(i int) bool { return d.x[i] > x })
	if k == 0 {
		return 0
	}
	return d.cum[k-1]
}

// Median is the lower median Q(½).
func (d *discrete) Median() float64           { return d.Quantile(0.5) }
func (d *discrete) Support() (lo, hi float64) { return d.x[0], d.x[len(d.x)-1] }
func (d *discrete) String() string            { return d.label }

// restrict returns the atoms inside [lo, hi] renormalised, or nil when none.
func (d *discrete) restrict(lo, hi float64, label string) *discrete {
	var x, w []float64
	prev := 0.0
	for k, v := range d.x {
		p := d.cum[k] - prev
		prev = d.cum[k]
		if v >= lo && v <= hi && p > 0 {
			x = append(x, v)
			w = append(w, p)
		}
	}
	if len(x) == 0 {
		return nil
	}
	return newAtoms(x, w, label)
}
