package tipping

import (
	"math"
	"slices"
	"testing"

	"gonum.org/v1/gonum/stat"

	"holdfast/sample"
)

// tipsAt makes a result whose draws tip at the given driver values (NaN:
// a draw without tipping), plus one draw lost at From and one failed.
func tipsAt(from, to float64, ds ...float64) *Result {
	r := &Result{From: from, To: to}
	for _, d := range ds {
		tp := Tip{Kind: Fold, D: d}
		if math.IsNaN(d) {
			tp.Kind = None
		}
		r.Tips = append(r.Tips, tp)
	}
	r.Tips = append(r.Tips, Tip{Kind: Absent, D: math.NaN()}, Tip{Kind: Failed, D: math.NaN()},
		Tip{Kind: Exchange, D: math.Inf(1)})
	return r
}

// checkShape checks what every histogram must satisfy.
func checkShape(t *testing.T, h Histogram) {
	t.Helper()
	if len(h.Edges) != len(h.Counts)+1 || len(h.Counts) < 1 || len(h.Counts) > MaxHistogramBins {
		t.Fatalf("%d edges for %d bins", len(h.Edges), len(h.Counts))
	}
	var sum int64
	for i, k := range h.Counts {
		sum += k
		if !(h.Edges[i+1] > h.Edges[i]) {
			t.Errorf("edges not increasing at %d: %v", i, h.Edges)
		}
	}
	if sum != h.N {
		t.Errorf("counts sum to %d, N = %d", sum, h.N)
	}
}

func TestCriticalHistogramCountsAsGonum(t *testing.T) {
	// The bins hold what gonum's stat.Histogram (a reference library)
	// counts on the same dividers, the last one moved just above the
	// largest value since gonum's bins are all half-open. Values lying
	// exactly on an inner edge go to the bin above it.
	ds := []float64{0.31, 0.12, 0.2, 0.2, 0.25, 0.4, 0.18, 0.33, 0.29, 0.22, 0.27, 0.35, 0.21, 0.26, 0.24, 0.3, math.NaN(), math.NaN()}
	for _, sweep := range [][2]float64{{0.05, 0.5}, {0.5, 0.05}} {
		r := tipsAt(sweep[0], sweep[1], ds...)
		h := r.CriticalHistogram()
		checkShape(t, h)
		if h.N != 16 || h.Edges[0] != 0.12 || h.Edges[len(h.Edges)-1] != 0.4 {
			t.Fatalf("sweep %v: N %d, edges %v", sweep, h.N, h.Edges)
		}
		var x []float64
		for _, d := range ds {
			if !math.IsNaN(d) {
				x = append(x, d)
			}
		}
		// Put a value on every inner edge too.
		for _, e := range h.Edges[1 : len(h.Edges)-1] {
			r.Tips = append(r.Tips, Tip{Kind: Boundary, D: e})
			x = append(x, e)
		}
		h = r.CriticalHistogram()
		slices.Sort(x)
		div := append([]float64{}, h.Edges...)
		div[len(div)-1] = math.Nextafter(div[len(div)-1], math.Inf(1))
		want := stat.Histogram(nil, div, x, nil)
		for i, k := range h.Counts {
			if float64(k) != want[i] {
				t.Errorf("sweep %v: bin %d [%v, %v) holds %d, gonum counts %v", sweep, i, h.Edges[i], h.Edges[i+1], k, want[i])
			}
		}
	}
}

func TestCriticalHistogramBinRules(t *testing.T) {
	// Freedman & Diaconis (1981): width 2·IQR·n^(−1/3). For the 8 values
	// 1…8 the type-1 quartiles are the 2nd and 6th (Hyndman & Fan 1996,
	// definition 1), IQR = 4, width 2·4/2 = 4, so ⌈7/4⌉ = 2 bins.
	h := tipsAt(0, 10, 1, 2, 3, 4, 5, 6, 7, 8).CriticalHistogram()
	checkShape(t, h)
	if len(h.Counts) != 2 || h.Counts[0] != 4 || h.Counts[1] != 4 {
		t.Errorf("1…8: bins %v counts %v, want 2 bins of 4", h.Edges, h.Counts)
	}
	// IQR zero but a spread: Sturges (1926), ⌈log₂ 11⌉ + 1 = 5 bins.
	h = tipsAt(0, 1, 0.2, 0.2, 0.2, 0.2, 0.2, 0.2, 0.2, 0.2, 0.2, 0.2, 0.3).CriticalHistogram()
	checkShape(t, h)
	if len(h.Counts) != 5 || h.Counts[0] != 10 || h.Counts[4] != 1 {
		t.Errorf("IQR 0: counts %v, want 5 bins (Sturges)", h.Counts)
	}
	// One value: a single bin of width |To − From|/1000 around it.
	h = tipsAt(0.4, 0, 0.25, 0.25, 0.25+1e-12).CriticalHistogram()
	checkShape(t, h)
	if len(h.Counts) != 1 || h.Counts[0] != 3 || math.Abs(h.Edges[1]-h.Edges[0]-0.0004) > 1e-12 || !(h.Edges[0] < 0.25 && 0.25 < h.Edges[1]) {
		t.Errorf("one value: edges %v counts %v", h.Edges, h.Counts)
	}
	// Nothing in range: empty.
	h = tipsAt(0, 1, math.NaN()).CriticalHistogram()
	if h.N != 0 || len(h.Edges) != 0 || len(h.Counts) != 0 || h.Edges == nil || h.Counts == nil {
		t.Errorf("no tipping: %+v", h)
	}
	// A far outlier: the rule asks for about 10⁴ bins of width 0.1 on
	// [0, 1000]; never more than MaxHistogramBins.
	var ds []float64
	for i := range 1000 {
		ds = append(ds, float64(i)/1000)
	}
	h = tipsAt(0, 2000, append(ds, 1000)...).CriticalHistogram()
	checkShape(t, h)
	if len(h.Counts) != MaxHistogramBins || h.Counts[0] != 1000 || h.Counts[MaxHistogramBins-1] != 1 {
		t.Errorf("%d bins with an outlier, want the cap %d", len(h.Counts), MaxHistogramBins)
	}
}

func TestCriticalHistogramOfSchaeferFold(t *testing.T) {
	// Schaefer (1954): the stock folds at H = rK/4 = r (K = 4), so with r
	// uniform on [0.5, 1.5] the critical harvest has density 1 there. A
	// Latin hypercube puts one draw in each of the N strata of width 1/N
	// (McKay, Beckman & Conover 1979), so a bin of width w holds N·w draws
	// up to the two strata its ends cut (and one more for a fold located
	// on the other side of an edge).
	m := compile(t, harvestSrc)
	const n = 1000
	r := run(t, m, Options{Driver: "H", From: 0, To: 2, Track: "E2", Risk: 0.1, Draws: n, Seed: 11, Plan: sample.LHS})
	h := r.CriticalHistogram()
	checkShape(t, h)
	if h.N != n || h.Edges[0] < 0.5 || h.Edges[len(h.Edges)-1] > 1.5 {
		t.Fatalf("N %d, edges %v", h.N, h.Edges)
	}
	// Freedman–Diaconis with IQR ≈ 0.5: width ≈ n^(−1/3) = 0.1, about 10 bins.
	if b := len(h.Counts); b < 9 || b > 11 {
		t.Errorf("%d bins, want about 10", b)
	}
	for i, k := range h.Counts {
		w := h.Edges[i+1] - h.Edges[i]
		if math.Abs(float64(k)-n*w) > 3 {
			t.Errorf("bin %d [%.4f, %.4f): %d draws, want %.1f ± 3", i, h.Edges[i], h.Edges[i+1], k, n*w)
		}
	}
}
