package sample

import (
	"errors"
	"math"
	"sort"
	"strings"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
	"gonum.org/v1/gonum/mathext"
	"gonum.org/v1/gonum/stat/distuv"
)

// ksCritical01 is the asymptotic critical value of the one-sample
// Kolmogorov–Smirnov statistic D_n at α = 0.01, 1.63/√n (Massey 1951,
// JASA 46:68, Table 1: 1.63/√n for n > 35).
func ksCritical01(n int) float64 { return 1.63 / math.Sqrt(float64(n)) }

// ksStatistic returns D_n = sup |F_n(x) − F(x)| for the sample x against F.
func ksStatistic(x []float64, F func(float64) float64) float64 {
	s := append([]float64(nil), x...)
	sort.Float64s(s)
	n := float64(len(s))
	d := 0.0
	for i, v := range s {
		f := F(v)
		d = math.Max(d, math.Max(math.Abs(float64(i+1)/n-f), math.Abs(f-float64(i)/n)))
	}
	return d
}

// sampleBy draws n values by inversion from independent uniforms.
func sampleBy(t *testing.T, d Distribution, n int, seed uint64) []float64 {
	t.Helper()
	p, err := NewPlan(Random, n, 1, seed)
	if err != nil {
		t.Fatal(err)
	}
	u := make([]float64, 1)
	x := make([]float64, n)
	for i := range x {
		p.Point(i, u)
		x[i] = d.Quantile(u[0])
	}
	return x
}

// mustFn returns a helper that fails the test on a constructor error.
func mustFn(t *testing.T) func(Distribution, error) Distribution {
	return func(d Distribution, err error) Distribution {
		t.Helper()
		if err != nil {
			t.Fatal(err)
		}
		return d
	}
}

// TestSamplersKS compares samples drawn by inversion with gonum's CDF of
// the same distribution (a reference library), by the one-sample
// Kolmogorov–Smirnov statistic at α = 0.01 (Massey 1951).
func TestSamplersKS(t *testing.T) {
	must := mustFn(t)
	const n = 4000
	normalMu := func(med, gsd float64) (float64, float64) { return math.Log(med), math.Log(gsd) }
	mu1, s1 := normalMu(2, 1.5)
	// Lognormal from mean and sd, derived in the test: E = exp(μ+σ²/2),
	// Var = (exp(σ²)−1)exp(2μ+σ²) (Johnson, Kotz & Balakrishnan 1994, ch. 14).
	s2 := math.Sqrt(math.Log(1 + 0.5*0.5/(3*3)))
	mu2 := math.Log(3) - s2*s2/2
	pertA, pertB := 1+4*(2.0-1)/9, 1+4*(10-2.0)/9 // Vose (2008): α = 1 + 4(mode−min)/(max−min)
	cases := []struct {
		name string
		d    Distribution
		err  error
		ref  func(float64) float64
	}{
		{name: "normal", ref: distuv.Normal{Mu: 0.6, Sigma: 0.05}.CDF},
		{name: "lognormal-median", ref: distuv.LogNormal{Mu: mu1, Sigma: s1}.CDF},
		{name: "lognormal-mean", ref: distuv.LogNormal{Mu: mu2, Sigma: s2}.CDF},
		{name: "uniform", ref: distuv.Uniform{Min: -1, Max: 3}.CDF},
		{name: "loguniform", ref: func(x float64) float64 {
			return distuv.Uniform{Min: math.Log(0.01), Max: math.Log(100)}.CDF(math.Log(x))
		}},
		{name: "triangular", ref: distuv.NewTriangle(1, 10, 2, nil).CDF},
		{name: "pert", ref: func(x float64) float64 { return distuv.Beta{Alpha: pertA, Beta: pertB}.CDF((x - 1) / 9) }},
		{name: "beta", ref: func(x float64) float64 { return distuv.Beta{Alpha: 0.5, Beta: 2}.CDF((x + 1) / 3) }},
		{name: "gamma-scale", ref: distuv.Gamma{Alpha: 0.7, Beta: 1 / 2.5}.CDF},
		{name: "gamma-rate", ref: distuv.Gamma{Alpha: 4, Beta: 3}.CDF},
		{name: "truncated-normal", ref: func(x float64) float64 {
			// Direct formula (Φ(x)−Φ(a))/(Φ(b)−Φ(a)) with gonum's Φ.
			N := distuv.UnitNormal
			return (N.CDF(x) - N.CDF(-0.5)) / (N.CDF(2) - N.CDF(-0.5))
		}},
	}
	mk := []func() (Distribution, error){
		func() (Distribution, error) { return NewNormal(0.6, 0.05) },
		func() (Distribution, error) { return NewLognormalMedian(2, 1.5) },
		func() (Distribution, error) { return NewLognormalMean(3, 0.5) },
		func() (Distribution, error) { return NewUniform(-1, 3) },
		func() (Distribution, error) { return NewLogUniform(0.01, 100) },
		func() (Distribution, error) { return NewTriangular(1, 2, 10) },
		func() (Distribution, error) { return NewPERT(1, 2, 10) },
		func() (Distribution, error) { return NewBeta(0.5, 2, -1, 2) },
		func() (Distribution, error) { return NewGammaScale(0.7, 2.5) },
		func() (Distribution, error) { return NewGammaRate(4, 3) },
		func() (Distribution, error) {
			d, _ := NewNormal(0, 1)
			return Truncate(d, -0.5, 2)
		},
	}
	for k, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			d := must(mk[k]())
			x := sampleBy(t, d, n, uint64(100+k))
			if D := ksStatistic(x, c.ref); D > ksCritical01(n) {
				t.Errorf("%v: KS D = %.4f > %.4f (α = 0.01)", d, D, ksCritical01(n))
			}
			// The package's own CDF must agree with the reference.
			for _, v := range x[:50] {
				if got, want := d.CDF(v), c.ref(v); math.Abs(got-want) > 1e-9 {
					t.Errorf("%v: CDF(%g) = %g, reference %g", d, v, got, want)
				}
			}
		})
	}
}

// TestQuantileRoundTrip checks CDF(Quantile(p)) = p to near machine
// precision, including far tails (a consistency property, no source).
func TestQuantileRoundTrip(t *testing.T) {
	must := mustFn(t)
	ds := []Distribution{
		must(NewNormal(0.6, 0.05)),
		must(NewLognormalMedian(2, 3)),
		must(NewUniform(-1, 3)),
		must(NewLogUniform(1e-3, 1e3)),
		must(NewTriangular(0, 0.2, 1)),
		must(NewPERT(0, 0.9, 1)),
		must(NewBeta(2, 5, 0, 1)),
		must(NewGammaScale(0.5, 2)),
		must(NewGammaScale(30, 0.1)),
		must(NewGammaRate(2, 1)),
	}
	// slack is the change of f over a few ulps of x: the part of the
	// round-trip error due only to x being rounded to a float64.
	slack := func(f func(float64) float64, x float64) float64 {
		step := 4 * math.Max(math.Abs(x)*0x1p-52, 0x1p-1074)
		return math.Max(math.Abs(f(x+step)-f(x)), math.Abs(f(x)-f(x-step)))
	}
	for _, d := range ds {
		for _, p := range []float64{1e-300, 1e-12, 1e-4, 0.1, 0.5, 0.9, 1 - 1e-6} {
			x := d.Quantile(p)
			if got := d.CDF(x); math.Abs(got-p) > 1e-9*p+slack(d.CDF, x) {
				t.Errorf("%v: CDF(Quantile(%g)) = %g", d, p, got)
			}
		}
		// Upper tail through the survival function.
		if ut, ok := d.(UpperTail); ok {
			for _, q := range []float64{1e-200, 1e-12, 1e-3, 0.3} {
				x := ut.InverseSurvival(q)
				if got := ut.Survival(x); math.Abs(got-q) > 1e-9*q+slack(ut.Survival, x) {
					t.Errorf("%v: Survival(InverseSurvival(%g)) = %g", d, q, got)
				}
			}
		}
	}
}

// TestClosedForms checks medians and quantiles against closed forms.
func TestClosedForms(t *testing.T) {
	must := mustFn(t)
	near := func(name string, got, want, tol float64) {
		t.Helper()
		if math.Abs(got-want) > tol*math.Max(1, math.Abs(want)) {
			t.Errorf("%s = %.15g, want %.15g", name, got, want)
		}
	}
	// Standard normal table: z(0.975) = 1.959964 (Abramowitz & Stegun 26.2).
	n := must(NewNormal(0.6, 0.05))
	near("normal Q(0.975)", n.Quantile(0.975), 0.6+0.05*1.959964, 1e-7)
	near("normal median", n.Median(), 0.6, 0)

	// Lognormal: median = exp(μ); from mean and sd, E[X] = exp(μ+σ²/2) and
	// SD = E[X]·sqrt(exp(σ²)−1) (Johnson, Kotz & Balakrishnan 1994, ch. 14),
	// checked through gonum's LogNormal moments.
	lm := must(NewLognormalMedian(2, 1.5))
	near("lognormal median", lm.Median(), 2, 1e-15)
	near("lognormal Q(Φ(1))", lm.Quantile(distuv.UnitNormal.CDF(1)), 2*1.5, 1e-12) // one geometric sd above the median
	ln := must(NewLognormalMean(3, 0.5)).(*lognormal)
	near("lognormal mean", ln.d.Mean(), 3, 1e-13)
	near("lognormal sd", ln.d.StdDev(), 0.5, 1e-13)

	// Uniform: Q(p) = min + p(max−min).
	u := must(NewUniform(-1, 3))
	near("uniform Q(0.3)", u.Quantile(0.3), -1+0.3*4, 1e-15)
	near("uniform median", u.Median(), 1, 0)

	// Log-uniform: Q(p) = min·(max/min)^p, median √(min·max).
	lu := must(NewLogUniform(0.01, 100))
	near("loguniform median", lu.Median(), 1, 1e-15)
	near("loguniform Q(0.75)", lu.Quantile(0.75), 0.01*math.Pow(1e4, 0.75), 1e-14)

	// Triangular (Johnson, Kotz & Balakrishnan 1995, ch. 26): for
	// mode < (min+max)/2 the median is max − sqrt((max−min)(max−mode)/2);
	// for (1, 2, 10) that is 10 − sqrt(9·8/2) = 4.
	tr := must(NewTriangular(1, 2, 10))
	near("triangular median", tr.Median(), 4, 1e-15)
	tr2 := must(NewTriangular(0, 0.8, 1)) // mode ≥ mid: min + sqrt((max−min)(mode−min)/2)
	near("triangular median 2", tr2.Median(), math.Sqrt(0.4), 1e-15)
	near("triangular Q(0.05)", tr.Quantile(0.05), 1+math.Sqrt(0.05*9*1), 1e-14)

	// PERT is Beta(α, β) on [min, max] with α = 1 + 4(mode−min)/(max−min),
	// β = 1 + 4(max−mode)/(max−min) (Vose 2008), so its mean is
	// (min + 4 mode + max)/6; checked by integrating the quantile function,
	// E[X] = ∫₀¹ Q(p) dp, with gonum's quad.Fixed.
	pe := must(NewPERT(1, 2, 10))
	mean := quad.Fixed(pe.Quantile, 0, 1, 200, nil, 0)
	near("pert mean", mean, (1+4*2+10)/6.0, 1e-6)
	ref := distuv.Beta{Alpha: 1 + 4.0/9, Beta: 1 + 32.0/9}
	near("pert median", pe.Median(), 1+9*ref.Quantile(0.5), 1e-12)
	near("pert Q(0.9)", pe.Quantile(0.9), 1+9*ref.Quantile(0.9), 1e-12)

	// Beta on [min, max]: gonum's Beta quantile scaled.
	b := must(NewBeta(2, 3, 10, 20))
	near("beta Q(0.25)", b.Quantile(0.25), 10+10*distuv.Beta{Alpha: 2, Beta: 3}.Quantile(0.25), 1e-12)

	// Gamma with shape 1 is exponential: Q(p) = −θ ln(1−p), also deep in
	// both tails.
	g := must(NewGammaScale(1, 2.5))
	for _, p := range []float64{1e-300, 1e-9, 0.5, 0.999999} {
		near("exponential Q", g.Quantile(p), -2.5*math.Log1p(-p), 1e-12)
	}
	// Gamma with shape 1/2, scale 2 is χ²₁ = Z²: Q(p) = Φ⁻¹((1+p)/2)².
	c := must(NewGammaScale(0.5, 2))
	for _, p := range []float64{1e-6, 0.5, 0.95} {
		z := mathext.NormalQuantile((1 + p) / 2)
		near("chi-square(1) Q", c.Quantile(p), z*z, 1e-9)
	}
	gr := must(NewGammaRate(4, 3))
	near("gamma rate median", gr.Median(), distuv.Gamma{Alpha: 4, Beta: 3}.Quantile(0.5), 1e-12)

	// Quantile(0), Quantile(1) are the support ends; bad p gives NaN.
	if got := n.Quantile(0); !math.IsInf(got, -1) {
		t.Errorf("normal Q(0) = %g", got)
	}
	if got := tr.Quantile(1); got != 10 {
		t.Errorf("triangular Q(1) = %g", got)
	}
	for _, p := range []float64{-0.1, 1.1, math.NaN()} {
		if got := n.Quantile(p); !math.IsNaN(got) {
			t.Errorf("normal Q(%g) = %g, want NaN", p, got)
		}
	}
}

// TestDiscrete checks step quantiles and CDFs against hand-computed values
// for the weights 1, 2 (merged from 0.5 + 1.5), 1 on 1, 2, 3.
func TestDiscrete(t *testing.T) {
	must := mustFn(t)
	d := must(NewDiscrete([]float64{3, 2, 1, 2, 9}, []float64{1, 0.5, 1, 1.5, 0}))
	for _, c := range []struct{ p, want float64 }{
		{0, 1}, {0.25, 1}, {0.2500001, 2}, {0.75, 2}, {0.7500001, 3}, {1, 3},
	} {
		if got := d.Quantile(c.p); got != c.want {
			t.Errorf("Q(%g) = %g, want %g", c.p, got, c.want)
		}
	}
	for _, c := range []struct{ x, want float64 }{{0.5, 0}, {1, 0.25}, {2.5, 0.75}, {9, 1}} {
		if got := d.CDF(c.x); got != c.want {
			t.Errorf("CDF(%g) = %g, want %g", c.x, got, c.want)
		}
	}
	if lo, hi := d.Support(); lo != 1 || hi != 3 {
		t.Errorf("support [%g, %g], want [1, 3] (zero weight on 9 dropped)", lo, hi)
	}
	if d.Median() != 2 {
		t.Errorf("median %g", d.Median())
	}
	// Empirical: Q(p) = x₍⌈np⌉₎ (Hyndman & Fan 1996, definition 1).
	e := must(NewEmpirical([]float64{5, 1, 4, 2, 3}))
	for _, c := range []struct{ p, want float64 }{{0.2, 1}, {0.21, 2}, {0.5, 3}, {0.81, 5}} {
		if got := e.Quantile(c.p); got != c.want {
			t.Errorf("empirical Q(%g) = %g, want %g", c.p, got, c.want)
		}
	}
	if got := e.String(); got != "empirical(n=5, min=1, max=5)" {
		t.Errorf("String = %q", got)
	}
	// Resampling frequencies: each value 1/5 (common practice, chi-square-free
	// bound: 4 binomial standard errors).
	x := sampleBy(t, e, 10000, 7)
	count := map[float64]int{}
	for _, v := range x {
		count[v]++
	}
	se := math.Sqrt(10000 * 0.2 * 0.8)
	for v := 1.0; v <= 5; v++ {
		if math.Abs(float64(count[v])-2000) > 4*se {
			t.Errorf("value %g drawn %d times of 10000, want about 2000", v, count[v])
		}
	}
}

// TestTruncate compares truncated quantiles with direct formulas.
func TestTruncate(t *testing.T) {
	must := mustFn(t)
	near := func(name string, got, want, tol float64) {
		t.Helper()
		if math.Abs(got-want) > tol*math.Max(1, math.Abs(want)) {
			t.Errorf("%s = %.15g, want %.15g", name, got, want)
		}
	}
	N := must(NewNormal(0, 1))

	// Central interval: Q_T(p) = Φ⁻¹(Φ(a) + p(Φ(b) − Φ(a))) (Johnson, Kotz &
	// Balakrishnan 1994, ch. 13, truncated normal), with gonum's Φ and Φ⁻¹.
	tn := must(Truncate(N, -0.5, 2))
	Phi := distuv.UnitNormal.CDF
	for _, p := range []float64{0.1, 0.5, 0.9} {
		near("truncated normal Q", tn.Quantile(p), mathext.NormalQuantile(Phi(-0.5)+p*(Phi(2)-Phi(-0.5))), 1e-12)
	}

	// Far upper tail, [10, ∞): 1 − Φ(10) ≈ 7.6e-24 is lost entirely in
	// 1 − CDF, so the direct formula uses the symmetry 1 − Φ(x) = Φ(−x):
	// Q_T(p) = −Φ⁻¹((1−p)·Φ(−10)).
	up := must(Truncate(N, 10, math.Inf(1)))
	for _, p := range []float64{1e-9, 0.5, 0.99} {
		near("upper-tail truncated normal Q", up.Quantile(p), -mathext.NormalQuantile((1-p)*Phi(-10)), 1e-12)
	}
	if got := up.Quantile(0.5); !(got > 10 && got < 10.2) {
		t.Errorf("median of N(0,1) on [10, ∞) = %g, want just above 10", got)
	}
	near("upper-tail CDF", up.CDF(10.05), 1-Phi(-10.05)/Phi(-10), 1e-12)
	// Same in the lower tail, (−∞, −10].
	down := must(Truncate(N, math.Inf(-1), -10))
	near("lower-tail truncated normal Q", down.Quantile(0.5), mathext.NormalQuantile(0.5*Phi(-10)), 1e-12)

	// Exponential is memoryless: Exp(θ) on [L, ∞) is L + Exp(θ), so
	// Q_T(p) = L − θ ln(1−p) (Johnson, Kotz & Balakrishnan 1994, ch. 19),
	// here with L = 50θ where F(L) = 1 − e⁻⁵⁰ rounds to 1.
	ex := must(NewGammaScale(1, 2))
	te := must(Truncate(ex, 100, math.Inf(1)))
	for _, p := range []float64{0.01, 0.5, 0.99} {
		near("truncated exponential Q", te.Quantile(p), 100-2*math.Log1p(-p), 1e-12)
	}

	// Uniform on [0, 1] truncated to [0.2, 0.5] is uniform on [0.2, 0.5].
	un := must(NewUniform(0, 1))
	tu := must(Truncate(un, 0.2, 0.5))
	near("truncated uniform Q", tu.Quantile(0.25), 0.275, 1e-15)
	if lo, hi := tu.Support(); lo != 0.2 || hi != 0.5 {
		t.Errorf("support [%g, %g]", lo, hi)
	}
	// Truncating twice intersects the intervals.
	tt := must(Truncate(tu, 0.3, 0.9))
	if lo, hi := tt.Support(); lo != 0.3 || hi != 0.5 {
		t.Errorf("twice truncated support [%g, %g]", lo, hi)
	}
	// Discrete truncation keeps the atoms inside, renormalised.
	d := must(NewDiscrete([]float64{1, 2, 3, 4}, []float64{1, 1, 1, 1}))
	td := must(Truncate(d, 2, 3))
	if td.Quantile(0.5) != 2 || td.Quantile(0.51) != 3 || td.CDF(2) != 0.5 {
		t.Errorf("truncated discrete: Q(.5)=%g Q(.51)=%g CDF(2)=%g", td.Quantile(0.5), td.Quantile(0.51), td.CDF(2))
	}

	if got, want := must(Truncate(must(NewNormal(0.6, 0.05)), 0, math.Inf(1))).String(), "normal(mean=0.6, sd=0.05) truncated to [0, +Inf)"; got != want {
		t.Errorf("String = %q, want %q", got, want)
	}

	// Impossible truncations.
	for _, c := range []struct {
		name   string
		d      Distribution
		lo, hi float64
	}{
		{"lo = hi", N, 1, 1},
		{"lo > hi", N, 2, 1},
		{"NaN", N, math.NaN(), 1},
		{"outside support", un, 2, 3},
		{"mass underflows", N, 40, 50},
		{"no atom", d, 2.2, 2.8},
	} {
		_, err := Truncate(c.d, c.lo, c.hi)
		var ae *ArgError
		if !errors.As(err, &ae) || ae.Arg != "truncate" {
			t.Errorf("%s: error %v, want *ArgError with Arg truncate", c.name, err)
		}
	}
}

// TestValidation is the table of impossible arguments.
func TestValidation(t *testing.T) {
	nan, inf := math.NaN(), math.Inf(1)
	cases := []struct {
		name      string
		mk        func() (Distribution, error)
		dist, arg string
	}{
		{"normal sd 0", func() (Distribution, error) { return NewNormal(0, 0) }, "normal", "sd"},
		{"normal sd < 0", func() (Distribution, error) { return NewNormal(0, -1) }, "normal", "sd"},
		{"normal sd NaN", func() (Distribution, error) { return NewNormal(0, nan) }, "normal", "sd"},
		{"normal mean Inf", func() (Distribution, error) { return NewNormal(inf, 1) }, "normal", "mean"},
		{"lognormal gsd 1", func() (Distribution, error) { return NewLognormalMedian(1, 1) }, "lognormal", "gsd"},
		{"lognormal median 0", func() (Distribution, error) { return NewLognormalMedian(0, 2) }, "lognormal", "median"},
		{"lognormal mean < 0", func() (Distribution, error) { return NewLognormalMean(-1, 2) }, "lognormal", "mean"},
		{"lognormal sd 0", func() (Distribution, error) { return NewLognormalMean(1, 0) }, "lognormal", "sd"},
		{"uniform min = max", func() (Distribution, error) { return NewUniform(1, 1) }, "uniform", "max"},
		{"uniform min > max", func() (Distribution, error) { return NewUniform(2, 1) }, "uniform", "max"},
		{"uniform NaN", func() (Distribution, error) { return NewUniform(nan, 1) }, "uniform", "min"},
		{"uniform overflow", func() (Distribution, error) { return NewUniform(-math.MaxFloat64, math.MaxFloat64) }, "uniform", "max"},
		{"loguniform min 0", func() (Distribution, error) { return NewLogUniform(0, 1) }, "loguniform", "min"},
		{"loguniform min > max", func() (Distribution, error) { return NewLogUniform(2, 1) }, "loguniform", "max"},
		{"triangular mode low", func() (Distribution, error) { return NewTriangular(0, -1, 1) }, "triangular", "mode"},
		{"triangular mode high", func() (Distribution, error) { return NewTriangular(0, 2, 1) }, "triangular", "mode"},
		{"triangular mode NaN", func() (Distribution, error) { return NewTriangular(0, nan, 1) }, "triangular", "mode"},
		{"triangular min = max", func() (Distribution, error) { return NewTriangular(1, 1, 1) }, "triangular", "max"},
		{"pert mode outside", func() (Distribution, error) { return NewPERT(0, 5, 1) }, "pert", "mode"},
		{"pert max Inf", func() (Distribution, error) { return NewPERT(0, 0.5, inf) }, "pert", "max"},
		{"beta alpha 0", func() (Distribution, error) { return NewBeta(0, 1, 0, 1) }, "beta", "alpha"},
		{"beta beta < 0", func() (Distribution, error) { return NewBeta(1, -2, 0, 1) }, "beta", "beta"},
		{"beta min = max", func() (Distribution, error) { return NewBeta(1, 2, 1, 1) }, "beta", "max"},
		{"gamma shape 0", func() (Distribution, error) { return NewGammaScale(0, 1) }, "gamma", "shape"},
		{"gamma scale NaN", func() (Distribution, error) { return NewGammaScale(1, nan) }, "gamma", "scale"},
		{"gamma rate < 0", func() (Distribution, error) { return NewGammaRate(1, -1) }, "gamma", "rate"},
		{"discrete empty", func() (Distribution, error) { return NewDiscrete(nil, nil) }, "discrete", "values"},
		{"discrete length", func() (Distribution, error) { return NewDiscrete([]float64{1, 2}, []float64{1}) }, "discrete", "weights"},
		{"discrete negative weight", func() (Distribution, error) { return NewDiscrete([]float64{1, 2}, []float64{1, -1}) }, "discrete", "weights"},
		{"discrete zero sum", func() (Distribution, error) { return NewDiscrete([]float64{1, 2}, []float64{0, 0}) }, "discrete", "weights"},
		{"discrete NaN weight", func() (Distribution, error) { return NewDiscrete([]float64{1, 2}, []float64{nan, 1}) }, "discrete", "weights"},
		{"discrete NaN value", func() (Distribution, error) { return NewDiscrete([]float64{1, nan}, []float64{1, 1}) }, "discrete", "values[1]"},
		{"empirical one value", func() (Distribution, error) { return NewEmpirical([]float64{1}) }, "empirical", "samples"},
		{"empirical NaN", func() (Distribution, error) { return NewEmpirical([]float64{1, nan, 2}) }, "empirical", "samples"},
	}
	for _, c := range cases {
		d, err := c.mk()
		var ae *ArgError
		if !errors.As(err, &ae) {
			t.Errorf("%s: got (%v, %v), want *ArgError", c.name, d, err)
			continue
		}
		if ae.Dist != c.dist || ae.Arg != c.arg {
			t.Errorf("%s: error %q has Dist=%q Arg=%q, want %q %q", c.name, err, ae.Dist, ae.Arg, c.dist, c.arg)
		}
		if !strings.HasPrefix(err.Error(), c.dist+": "+c.arg+" ") {
			t.Errorf("%s: message %q", c.name, err)
		}
	}
}

// TestStrings pins the human-readable forms used in reports.
func TestStrings(t *testing.T) {
	must := mustFn(t)
	for _, c := range []struct {
		d    Distribution
		want string
	}{
		{must(NewNormal(0.6, 0.05)), "normal(mean=0.6, sd=0.05)"},
		{must(NewLognormalMedian(2, 1.5)), "lognormal(median=2, gsd=1.5)"},
		{must(NewLognormalMean(3, 0.5)), "lognormal(mean=3, sd=0.5)"},
		{must(NewUniform(-1, 3)), "uniform(min=-1, max=3)"},
		{must(NewLogUniform(0.01, 100)), "loguniform(min=0.01, max=100)"},
		{must(NewTriangular(1, 2, 10)), "triangular(min=1, mode=2, max=10)"},
		{must(NewPERT(1, 2, 10)), "pert(min=1, mode=2, max=10)"},
		{must(NewBeta(2, 3, 0, 1)), "beta(alpha=2, beta=3)"},
		{must(NewBeta(2, 3, 1, 5)), "beta(alpha=2, beta=3, min=1, max=5)"},
		{must(NewGammaScale(2, 3)), "gamma(shape=2, scale=3)"},
		{must(NewGammaRate(2, 3)), "gamma(shape=2, rate=3)"},
		{must(NewDiscrete([]float64{1, 2}, []float64{3, 1})), "discrete(1:3, 2:1)"},
		{must(Truncate(must(NewNormal(0, 1)), math.Inf(-1), 2)), "normal(mean=0, sd=1) truncated to (-Inf, 2]"},
	} {
		if got := c.d.String(); got != c.want {
			t.Errorf("String() = %q, want %q", got, c.want)
		}
	}
}
