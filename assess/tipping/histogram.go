package tipping

import (
	"math"
	"slices"
)

// MaxHistogramBins bounds the number of bins of CriticalHistogram.
const MaxHistogramBins = 60

// Histogram counts the critical values that lie in range (the draws whose
// tracked equilibrium is lost at a fold, an exchange or the domain's edge
// between From and To) in equal bins along the driver, in increasing
// driver value whatever the direction of the sweep. Bin i is
// [Edges[i], Edges[i+1]), the last one closed. Draws lost already at From,
// draws without tipping and failed draws are not counted (Critical.Count
// has them).
type Histogram struct {
	Edges  []float64
	Counts []int64
	// N is the number of critical values counted, the sum of Counts.
	N int64
}

// CriticalHistogram bins the in-range critical values of the sweep, so
// that a report can draw their distribution without the per-draw values.
//
// The bins are equal and span the smallest to the largest value. Their
// width follows the Freedman–Diaconis rule h = 2·IQR·n^(−1/3) (Freedman &
// Diaconis 1981, Z. Wahrscheinlichkeitstheorie verw. Gebiete 57:453), with
// the interquartile range IQR from type-1 sample quantiles; where the IQR
// is zero, Sturges' count ⌈log₂ n⌉ + 1 (Sturges 1926) is used instead. The
// count is kept between 1 and MaxHistogramBins. When the values agree to
// within 10⁻⁹·|To − From| (the accuracy of a located fold), one bin of
// width |To − From|/1000 is centred on them. With no value
// in range, Edges and Counts are empty.
func (r *Result) CriticalHistogram() Histogram {
	var v []float64
	for _, tp := range r.Tips {
		switch tp.Kind {
		case Fold, Exchange, Boundary:
			if !math.IsNaN(tp.D) && !math.IsInf(tp.D, 0) {
				v = append(v, tp.D)
			}
		}
	}
	h := Histogram{Edges: []float64{}, Counts: []int64{}, N: int64(len(v))}
	if len(v) == 0 {
		return h
	}
	slices.Sort(v)
	lo, hi := v[0], v[len(v)-1]
	span := math.Abs(r.To - r.From)
	if !(hi-lo > 1e-9*span) {
		// One value, up to the accuracy of the fold location.
		mid := lo + (hi-lo)/2
		half := span / 2000
		if !(mid-half < lo && hi < mid+half) {
			half = math.Max(math.Abs(mid)*1e-6, 1e-12)
		}
		h.Edges = []float64{mid - half, mid + half}
		h.Counts = []int64{h.N}
		return h
	}
	n := len(v)
	bins := 0
	iqr := v[sampleRank(n, 0.75)-1] - v[sampleRank(n, 0.25)-1]
	if iqr > 0 {
		width := 2 * iqr * math.Cbrt(1/float64(n))
		bins = int(math.Ceil(math.Min((hi-lo)/width, MaxHistogramBins)))
	} else {
		bins = int(math.Ceil(math.Log2(float64(n)))) + 1
	}
	bins = min(max(bins, 1), MaxHistogramBins)
	h.Edges = make([]float64, bins+1)
	for i := range bins {
		h.Edges[i] = lo + (hi-lo)*float64(i)/float64(bins)
	}
	h.Edges[bins] = hi
	for i := 1; i <= bins; i++ {
		if !(h.Edges[i] > h.Edges[i-1]) {
			// A range too narrow for the floats to split: one bin.
			bins, h.Edges = 1, []float64{lo, hi}
			break
		}
	}
	h.Counts = make([]int64, bins)
	for _, x := range v {
		// Start from the arithmetic guess, then settle against the edges
		// themselves, so that a value on an edge goes to the bin above it.
		i := min(max(int((x-lo)/(hi-lo)*float64(bins)), 0), bins-1)
		for i > 0 && x < h.Edges[i] {
			i--
		}
		for i < bins-1 && x >= h.Edges[i+1] {
			i++
		}
		h.Counts[i]++
	}
	return h
}
