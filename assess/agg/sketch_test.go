package agg

import (
	"math"
	"math/rand/v2"
	"sort"
	"testing"
)

// exactQuantile is the order statistic of rank ⌊q(n−1)⌋, the definition
// Sketch.Quantile approximates.
func exactQuantile(sorted []float64, q float64) float64 {
	return sorted[int(q*float64(len(sorted)-1))]
}

func TestSketchRelativeAccuracy(t *testing.T) {
	// Guarantee of Masson, Rim & Lee (2019), Theorem 1: relative error ≤ α.
	rng := rand.New(rand.NewPCG(1, 2))
	gens := map[string]func() float64{
		"lognormal": func() float64 { return math.Exp(rng.NormFloat64() * 2) },
		"normal":    func() float64 { return rng.NormFloat64() },
		"mixed":     func() float64 { return float64(rng.IntN(5)-2) * rng.Float64() },
	}
	for name, g := range gens {
		s := NewSketch()
		vals := make([]float64, 20000)
		for i := range vals {
			vals[i] = g()
			s.Add(vals[i])
		}
		sort.Float64s(vals)
		for _, q := range []float64{0, 0.01, 0.05, 0.25, 0.5, 0.75, 0.95, 0.99, 1} {
			got, want := s.Quantile(q), exactQuantile(vals, q)
			if math.Abs(got-want) > Alpha*math.Abs(want)*(1+1e-9) {
				t.Errorf("%s q=%v: got %v, exact %v", name, q, got, want)
			}
		}
	}
}

func TestSketchMergeIsOrderFree(t *testing.T) {
	// Property of bucket-count merging (Masson et al. 2019, §2.3): the merge
	// of parts equals one pass, whatever the grouping.
	rng := rand.New(rand.NewPCG(3, 4))
	whole := NewSketch()
	parts := []*Sketch{NewSketch(), NewSketch(), NewSketch()}
	for i := 0; i < 30000; i++ {
		v := rng.NormFloat64() * math.Exp(rng.NormFloat64()*5)
		whole.Add(v)
		parts[rng.IntN(3)].Add(v)
	}
	m1 := NewSketch()
	m1.Merge(parts[2])
	m1.Merge(parts[0])
	m1.Merge(parts[1])
	for _, q := range []float64{0.05, 0.25, 0.5, 0.75, 0.95} {
		if a, b := whole.Quantile(q), m1.Quantile(q); a != b {
			t.Errorf("q=%v: one pass %v, merged %v", q, a, b)
		}
	}
	if whole.Count() != m1.Count() {
		t.Errorf("counts differ")
	}
}

func TestSketchFoldingKeepsUpperQuantiles(t *testing.T) {
	// Magnitudes over 300 decades overflow MaxBuckets (about 57 decades at
	// α = 0.1%); the largest ones stay within α, the folded ones collapse.
	s := NewSketch()
	var top float64
	for e := -150; e <= 150; e++ {
		top = math.Pow(10, float64(e))
		s.Add(top)
	}
	if got := s.Quantile(1); got != top {
		t.Errorf("max = %v, want %v", got, top)
	}
	if got, want := s.Quantile(0.9), 1e120; math.Abs(got-want) > Alpha*want {
		t.Errorf("q0.9 = %v, want %v", got, want)
	}
	if got := s.Quantile(0.1); got > 1e100 {
		t.Errorf("q0.1 = %v should sit in the folded bottom bucket", got)
	}
	if s.Add(math.NaN()) || s.Add(math.Inf(1)) {
		t.Errorf("NaN/Inf must be refused")
	}
}

func TestSketchBuckets(t *testing.T) {
	// Walking the buckets in order reproduces the sorted stream within the
	// relative error α of Masson, Rim & Lee (2019), Theorem 1, at every
	// rank (the exact order statistics come from sort.Float64s), and agrees
	// with Quantile.
	rng := rand.New(rand.NewPCG(5, 6))
	s := NewSketch()
	vals := make([]float64, 5000)
	for i := range vals {
		switch rng.IntN(6) {
		case 0:
			vals[i] = 0
		case 1:
			vals[i] = -math.Exp(rng.NormFloat64() * 3)
		default:
			vals[i] = math.Exp(rng.NormFloat64() * 3)
		}
		s.Add(vals[i])
	}
	sort.Float64s(vals)
	var expanded []float64
	prev := math.Inf(-1)
	s.Buckets(func(v float64, c int64) {
		if v < prev || c <= 0 {
			t.Fatalf("bucket (%v, %d) after %v", v, c, prev)
		}
		prev = v
		for range c {
			expanded = append(expanded, v)
		}
	})
	if int64(len(expanded)) != s.Count() {
		t.Fatalf("buckets hold %d values, count %d", len(expanded), s.Count())
	}
	for r, want := range vals {
		if got := expanded[r]; math.Abs(got-want) > Alpha*math.Abs(want)*(1+1e-9) {
			t.Errorf("rank %d: bucket value %v, exact %v", r, got, want)
		}
	}
	// Quantile(0) and Quantile(1) are the exact min and max instead.
	for _, q := range []float64{0.005, 0.1, 0.5, 0.9, 0.995} {
		if got, want := expanded[int(q*float64(len(vals)-1))], s.Quantile(q); got != want {
			t.Errorf("q=%v: buckets give %v, Quantile %v", q, got, want)
		}
	}
	NewSketch().Buckets(func(float64, int64) { t.Error("empty sketch has a bucket") })
}
