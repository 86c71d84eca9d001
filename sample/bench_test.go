package sample

import (
	"math"
	"math/rand/v2"
	"testing"
)

// benchParams are six uncertain parameters of mixed families (k = 6).
func benchParams(b *testing.B) []Param {
	mk := func(d Distribution, err error) Distribution {
		if err != nil {
			b.Fatal(err)
		}
		return d
	}
	n := mk(NewNormal(0.6, 0.05))
	return []Param{
		{Name: "p1", Dist: n},
		{Name: "p2", Dist: mk(NewLognormalMedian(2, 1.5))},
		{Name: "p3", Dist: mk(NewUniform(0, 1))},
		{Name: "p4", Dist: mk(NewTriangular(1, 2, 10))},
		{Name: "p5", Dist: mk(Truncate(n, 0.55, math.Inf(1)))},
		{Name: "p6", Dist: mk(NewLogUniform(0.1, 10))},
		{Name: "fixed", Value: 3},
	}
}

func benchDraw(b *testing.B, kind PlanKind, corr []Correlation) {
	d, err := NewDesign(benchParams(b), corr, kind, 1_000_000, 1)
	if err != nil {
		b.Fatal(err)
	}
	theta := make([]float64, d.Dim())
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; b.Loop(); i++ {
		d.Draw(i, theta)
	}
}

// BenchmarkDesignDraw measures one full draw for k = 6 uncertain
// parameters (plan point, optional copula, six inversions, one fixed value).
func BenchmarkDesignDraw(b *testing.B) {
	corr := []Correlation{{"p1", "p2", 0.5}, {"p3", "p4", -0.3}}
	b.Run("random", func(b *testing.B) { benchDraw(b, Random, nil) })
	b.Run("lhs", func(b *testing.B) { benchDraw(b, LHS, nil) })
	b.Run("qmc", func(b *testing.B) { benchDraw(b, QMC, nil) })
	b.Run("random+copula", func(b *testing.B) { benchDraw(b, Random, corr) })
	b.Run("qmc+copula", func(b *testing.B) { benchDraw(b, QMC, corr) })
}

// BenchmarkNativeDraw is the hand-written reference: the same six
// marginals drawn directly with a PCG generator and closed forms
// (rejection for the truncation), no per-draw reseeding, no plan.
func BenchmarkNativeDraw(b *testing.B) {
	rng := rand.New(rand.NewPCG(1, 2))
	theta := make([]float64, 7)
	b.ReportAllocs()
	for b.Loop() {
		theta[0] = 0.6 + 0.05*rng.NormFloat64()
		theta[1] = 2 * math.Exp(math.Log(1.5)*rng.NormFloat64())
		theta[2] = rng.Float64()
		u := rng.Float64()
		if u < 1.0/9 {
			theta[3] = 1 + math.Sqrt(u*9)
		} else {
			theta[3] = 10 - math.Sqrt((1-u)*9*8)
		}
		for {
			x := 0.6 + 0.05*rng.NormFloat64()
			if x >= 0.55 {
				theta[4] = x
				break
			}
		}
		theta[5] = 0.1 * math.Pow(100, rng.Float64())
		theta[6] = 3
	}
}

// BenchmarkPoint measures the plan alone, k = 6.
func BenchmarkPoint(b *testing.B) {
	for _, kind := range []PlanKind{Random, LHS, QMC} {
		b.Run(kind.String(), func(b *testing.B) {
			p, _ := NewPlan(kind, 1_000_000, 6, 1)
			u := make([]float64, 6)
			b.ReportAllocs()
			for i := 0; b.Loop(); i++ {
				p.Point(i, u)
			}
		})
	}
}

// BenchmarkQuantile measures one inversion per family.
func BenchmarkQuantile(b *testing.B) {
	mk := func(d Distribution, err error) Distribution {
		if err != nil {
			b.Fatal(err)
		}
		return d
	}
	n := mk(NewNormal(0, 1))
	for _, c := range []struct {
		name string
		d    Distribution
	}{
		{"normal", n},
		{"lognormal", mk(NewLognormalMedian(2, 1.5))},
		{"triangular", mk(NewTriangular(1, 2, 10))},
		{"pert", mk(NewPERT(1, 2, 10))},
		{"gamma", mk(NewGammaScale(2, 1))},
		{"truncated-normal", mk(Truncate(n, 0, math.Inf(1)))},
		{"empirical-1000", mk(NewEmpirical(func() []float64 {
			x := make([]float64, 1000)
			for i := range x {
				x[i] = float64(i * i % 997)
			}
			return x
		}()))},
	} {
		b.Run(c.name, func(b *testing.B) {
			s := 0.0
			for i := 0; b.Loop(); i++ {
				s += c.d.Quantile((float64(i%1000) + 0.5) / 1000)
			}
			_ = s
		})
	}
}
