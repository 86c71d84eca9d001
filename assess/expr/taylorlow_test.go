package expr

import (
	"math"
	"math/big"
	"math/rand/v2"
	"testing"
)

// TestTaylorLowOrderExactZeros: a derivative coefficient (k ≥ 1) that is
// exactly zero and computed from exact inputs by exact operations keeps the
// bound 0 at every order, as the classifier needs
// (Strogatz, Nonlinear Dynamics and Chaos, 2nd ed., 2015, §2.4: x' = x²
// and x' = ±x³ at 0, where the first non-vanishing derivative decides).
// Expected coefficients by hand: x² at 0 is t², x³ at 0 is t³.
func TestTaylorLowOrderExactZeros(t *testing.T) {
	env := Env{State: "x", Params: []string{"a", "r", "s"}}
	tests := []struct {
		rate  string
		theta []float64
		want  []float64 // coefficients 0..MaxOrder at x = 0, all exact
	}{
		{"x^2", nil, []float64{0, 0, 1, 0, 0, 0, 0, 0}},
		{"x^3", nil, []float64{0, 0, 0, 1, 0, 0, 0, 0}},
		{"x*x*x", nil, []float64{0, 0, 0, 1, 0, 0, 0, 0}},
		{"-x^3", nil, []float64{0, 0, 0, -1, 0, 0, 0, 0}},
		{"x^a", []float64{2, 0, 0}, []float64{0, 0, 1, 0, 0, 0, 0, 0}},
		{"x^a", []float64{3, 0, 0}, []float64{0, 0, 0, 1, 0, 0, 0, 0}},
		{"r*x^3 - s*x^2", []float64{0, 2, 0.5}, []float64{0, 0, -0.5, 2, 0, 0, 0, 0}},
		{"x^2/(1 + x^2)", nil, []float64{0, 0, 1, 0, -1, 0, 1, 0}},
		{"exp(x^3) - 1", nil, []float64{0, 0, 0, 1, 0, 0, 0.5, 0}},
		{"log(1 + x^3)", nil, []float64{0, 0, 0, 1, 0, 0, -0.5, 0}},
		// log(1 + t²) − t² = −t⁴/2 + t⁶/3 − …: c₂ = 2/2 − 1 exactly; c₆ = 1/3
		// is rounded, so orders up to 5 only.
		{"log(1 + x^2) - x^2", nil, []float64{0, 0, 0, 0, -0.5, 0}},
	}
	for _, tc := range tests {
		theta := tc.theta
		if theta == nil {
			theta = []float64{0, 0, 0}
		}
		m := mustCompile(t, tc.rate, env).NewMachine()
		for d := 1; d < len(tc.want); d++ {
			c, e := make([]float64, d+1), make([]float64, d+1)
			m.Taylor(0, theta, c, e)
			for k := range c {
				if c[k] != tc.want[k] || (k > 0 && tc.want[k] == 0 && e[k] != 0) {
					t.Errorf("%s at 0, order %d: c = %v, e = %v, want c = %v with zero bounds on the zeros",
						tc.rate, d, c, e, tc.want[:d+1])
					break
				}
			}
		}
	}
}

// TestTaylorHistoryIndependent: the x-independent registers are kept
// between calls with the same θ; the result must be the same bits as on a
// fresh Machine, whatever the earlier calls (orders, θ, x).
func TestTaylorHistoryIndependent(t *testing.T) {
	rng := rand.New(rand.NewPCG(13, 17))
	env := Env{State: "x", Params: []string{"a", "b", "q"}}
	for i := 0; i < 200; i++ {
		src := randomExpr(rng, 4)
		p := mustCompile(t, src, env)
		used := p.NewMachine()
		thetas := [][]float64{
			{-1 + 3*rng.Float64(), 0.1 + 2*rng.Float64(), 0.5 + 3*rng.Float64()},
			{-1 + 3*rng.Float64(), 0.1 + 2*rng.Float64(), 0.5 + 3*rng.Float64()},
		}
		for j := 0; j < 12; j++ {
			th := thetas[rng.IntN(2)]
			x := -2 + 4*rng.Float64()
			d := rng.IntN(MaxOrder + 1)
			c1, e1 := make([]float64, d+1), make([]float64, d+1)
			c2, e2 := make([]float64, d+1), make([]float64, d+1)
			used.Taylor(x, th, c1, e1)
			p.NewMachine().Taylor(x, th, c2, e2)
			for k := range c1 {
				if !sameFloat(c1[k], c2[k]) || !sameFloat(e1[k], e2[k]) {
					t.Fatalf("%s at x=%v θ=%v order %d: c = %v, e = %v after earlier calls; fresh c = %v, e = %v",
						src, x, th, d, c1, e1, c2, e2)
				}
			}
		}
	}
}

// TestTaylorErrorBoundExtreme repeats the math/big check of the bounds at
// x = 0 (exact zeros), at small and large x with small parameters, and at
// every order. The points stay above the range where the bounds themselves,
// computed in round-to-nearest, can underflow (a product of a value and a
// bound below the least subnormal is lost; see rounding.go), and the x⁻¹
// reference (bigref_test.go) stays exact enough.
func TestTaylorErrorBoundExtreme(t *testing.T) {
	rng := rand.New(rand.NewPCG(31, 37))
	env := Env{State: "x", Params: []string{"a", "b", "q"}}
	n := 150 * *boundScale
	if testing.Short() {
		n = 40
	}
	xs := []float64{0, 0, 1e-30, -3e-25, 1e-12, 1e12, -2e15, 1e20}
	checked := 0
	for i := 0; i < n; i++ {
		src := randomExpr(rng, 3)
		p := mustCompile(t, src, env)
		m := p.NewMachine()
		for j := 0; j < 3; j++ {
			x := xs[rng.IntN(len(xs))] * (1 + rng.Float64())
			theta := []float64{-1 + 3*rng.Float64(), 0.1 + 2*rng.Float64(), 0.5 + 3*rng.Float64()}
			if rng.IntN(2) == 0 {
				theta[0] *= 1e-20
				theta[1] *= 1e-25
			}
			ref, err := refTaylor(p, x, theta, MaxOrder)
			if err != nil {
				continue
			}
			for d := 0; d <= MaxOrder; d++ {
				c, e := make([]float64, d+1), make([]float64, d+1)
				m.Taylor(x, theta, c, e)
				k, _ := checkBound(t, src+" at x="+fmtG(x)+" θ="+fmtGs(theta), c, e, ref)
				checked += k
			}
		}
	}
	if checked < n {
		t.Errorf("only %d coefficients checked", checked)
	}
	t.Logf("%d coefficients checked", checked)
}

// TestCheapPropagationBounds checks the library-free forms in rounding.go
// against math/big: logAbsBound(a) ≥ |log a| (and within ln 2 of it, a
// looseness the pow model absorbs), logProp(a, ea) ≥ −log(1 − ea/a) and
// expProp(v, ea) ≥ |v|·(e^ea − 1) for v = exp(a), and powProp against the
// extreme corners of its argument box.
func TestCheapPropagationBounds(t *testing.T) {
	rng := rand.New(rand.NewPCG(41, 43))
	big1 := bint(1)
	n := 1000
	if testing.Short() {
		n = 200
	}
	for i := 0; i < n; i++ {
		a := math.Exp(-700 + 1400*rng.Float64())
		if i%3 == 0 {
			a = 1 + (rng.Float64()-0.5)*math.Pow(2, -float64(rng.IntN(50)))
		}
		lb := logAbsBound(a)
		l := blog(bf(a))
		exact, _ := new(big.Float).Abs(l).Float64()
		if lb < exact || lb > exact+math.Ln2+1e-12 {
			t.Errorf("logAbsBound(%v) = %v, |log a| = %v", a, lb, exact)
		}

		r := math.Pow(2, -1-60*rng.Float64()) // ea/a in (2^-61, 1/2)
		ea := r * a
		want := bnew().Neg(blog(bsub(big1, bquo(bf(ea), bf(a)))))
		if got := logProp(a, ea); bf(got).Cmp(want) < 0 {
			w, _ := want.Float64()
			t.Errorf("logProp(%v, %v) = %v < %v", a, ea, got, w)
		}

		x := -5 + 10*rng.Float64()
		v := math.Exp(x)
		e := math.Pow(2, -60*rng.Float64()) // up to 1: both branches
		// |exp(x)| ≤ v(1+4u) (lib), so |v|·expm1(e) is the quantity to cover
		// up to that factor, which expProp includes.
		want = bmul(bf(v), bsub(bexp(bf(e)), big1))
		if got := expProp(v, e); bf(got).Cmp(want) < 0 {
			w, _ := want.Float64()
			t.Errorf("expProp(%v, %v) = %v < %v", v, e, got, w)
		}
	}
	// powProp: a^b is monotone in a and in b (a > 0), so the largest
	// |a*^b* − a^b| over the box is at a corner; the reference is
	// exp(b log a) in math/big.
	for i := 0; i < n/5; i++ {
		a := math.Exp(-3 + 6*rng.Float64())
		b := -8 + 16*rng.Float64()
		ea := a * math.Pow(2, -10-40*rng.Float64())
		eb := 0.0
		if i%2 == 0 {
			eb = math.Pow(2, -10-40*rng.Float64())
		}
		got := powProp(a, ea, b, eb, math.Pow(a, b))
		exact := bpow0(bf(a), bf(b))
		for _, sa := range []float64{-1, 1} {
			for _, sb := range []float64{-1, 1} {
				as := badd(bf(a), bmul(bf(sa), bf(ea)))
				bs := badd(bf(b), bmul(bf(sb), bf(eb)))
				diff := bsub(bexp(bmul(bs, blog(as))), exact)
				if bf(got).Cmp(diff.Abs(diff)) < 0 {
					df, _ := diff.Float64()
					t.Errorf("powProp(%v, %v, %v, %v) = %v < %v", a, ea, b, eb, got, df)
				}
			}
		}
	}
	if logProp(2, 0) != 0 || expProp(3, 0) != 0 || expProp(0, 1) != 0 || powProp(2, 0, 3, 0, 8) != 0 {
		t.Error("exact arguments must add no error")
	}
}
