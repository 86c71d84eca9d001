package sample

import (
	"math"
	"testing"
)

// TestQuantileMonotone: over a grid of extreme but valid parameters the
// quantile function is finite inside the support (or at its ends), never
// NaN, never panics, and is non-decreasing in p (a defining property of a
// quantile function; common practice, no source).
func TestQuantileMonotone(t *testing.T) {
	var ds []Distribution
	add := func(d Distribution, err error) {
		if err != nil {
			t.Fatal(err)
		}
		ds = append(ds, d)
	}
	for _, a := range []float64{1e-3, 0.05, 0.5, 1, 3, 50, 1e4} {
		for _, b := range []float64{1e-3, 0.5, 1, 7, 1e3} {
			add(NewBeta(a, b, 0, 1))
		}
		add(NewGammaScale(a, 1))
		add(NewGammaRate(a, 1e3))
	}
	add(NewLognormalMedian(1e-6, 20))
	add(NewLognormalMean(1e6, 1e7))
	add(NewLogUniform(1e-300, 1e300))
	add(NewPERT(0, 0, 1))
	add(NewPERT(0, 1, 1))
	add(NewTriangular(-1e6, 1e6, 1e6))
	add(NewUniform(-1e300, 1e300))
	n, _ := NewNormal(0, 1)
	add(Truncate(n, 30, 31))
	add(Truncate(n, -31, -30))
	g, _ := NewGammaScale(0.01, 1)
	add(Truncate(g, 0, 1e-100))
	ps := []float64{0, 1e-300, 1e-100, 1e-17, 0x1p-53, 1e-9, 1e-3, 0.1, 0.25, 0.3, 0.5, 0.7, 0.9, 0.999, 1 - 1e-9, maxUnit, 1}
	for _, d := range ds {
		lo, hi := d.Support()
		prev := math.Inf(-1)
		for _, p := range ps {
			x := d.Quantile(p)
			if math.IsNaN(x) || x < lo || x > hi {
				t.Errorf("%v: Quantile(%g) = %g outside [%g, %g]", d, p, x, lo, hi)
			}
			if x < prev {
				t.Errorf("%v: Quantile(%g) = %g < previous %g", d, p, x, prev)
			}
			prev = x
			if c := d.CDF(x); math.IsNaN(c) || c < 0 || c > 1 {
				t.Errorf("%v: CDF(%g) = %g", d, x, c)
			}
		}
	}
}
