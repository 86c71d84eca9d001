package expr

import (
	"math"
	"testing"
)

// meets reports whether the enclosure iv meets [v − e, v + e].
func meets(iv Interval, v, e float64) bool {
	return !iv.IsEmpty() && iv.Lo <= v+e && iv.Hi >= v-e
}

// FuzzInterval: for any expression that compiles, Interval and
// IntervalSlope never panic, and on a small box around x their enclosures
// of f (and f') contain the values at sample points of the box (of f'
// inside it). Eval's
// float value carries its own rounding error, which the Taylor back end
// bounds by e[0]: the exact f(y) lies both in [Eval − e[0], Eval + e[0]]
// and in the enclosure, so the two must meet (likewise for f' with
// Taylor's c[1] and e[1]). Points where Eval is not finite or the bound is
// infinite carry no value to check. Seeds: f.Add below.
func FuzzInterval(f *testing.F) {
	for _, s := range []string{
		"a - b*x + x^2/(1+x^2)", "q*x^a/(b^q + x^a)", "a*x/(b + x) - x", "exp(x)*log(x)", "pow(x, a)",
		"min(x, a) + max(x, b) + abs(x - q)", "sin(x)+cos(x)+tan(x)", "atan(x)+sinh(x)+cosh(x)+tanh(x)",
		"sqrt(x) + log10(x)", "atan(1/x)", "exp(-1/x^2)", "x^3 - x", "(x - a)^2", "1/(x - a)",
		"sin(1000*x)", "x^0.5 - a", "pow(x, x)", "2^x - 3", "x*0.1 - 1", "cosh(x) - 2",
	} {
		f.Add(s, 0.7, 0.01, 0.5)
		f.Add(s, -1.3, 0.2, 1.5)
		f.Add(s, 0.0, 1e-9, 0.25)
	}
	env := Env{State: "x", Params: []string{"a", "b", "q"}}
	f.Fuzz(func(t *testing.T, src string, x, r, a float64) {
		p, err := Compile(src, env)
		if err != nil {
			return
		}
		if !finite(x) || !finite(r) || !finite(a) || math.Abs(x) > 1e6 {
			return
		}
		// A small box of positive width (so that limits such as
		// atan(1/x) → π/2, which Eval takes through ±Inf, are enclosed).
		r = math.Mod(math.Abs(r), 1)
		r = math.Max(r, 1e-12*math.Max(1, math.Abs(x)))
		box := Interval{x - r, x + r}
		theta := []float64{a, 1 - a, 2.5}
		m := p.NewMachine()
		fv := m.Interval(box, theta)
		fs, df, _ := m.IntervalSlope(box, theta)
		var c, e [2]float64
		for _, y := range []float64{box.Lo, box.Hi, x, x - r/3, x + r/7} {
			v := m.Eval(y, theta)
			if !finite(v) {
				continue
			}
			m.Taylor(y, theta, c[:], e[:])
			if math.IsInf(e[0], 0) || !sameFloat(c[0], v) {
				continue
			}
			if !meets(fv, v, e[0]) || !meets(fs, v, e[0]) {
				t.Fatalf("%q θ=%v on %v: f(%v) = %v ± %v, enclosures %v and %v", src, theta, box, y, v, e[0], fv, fs)
			}
			// Taylor takes the right derivative at a kink (abs, min, max),
			// which at the upper end lies outside the box: f' is checked
			// inside.
			inside := y > box.Lo && y < box.Hi
			if inside && finite(c[1]) && !math.IsInf(e[1], 0) && !meets(df, c[1], e[1]) {
				t.Fatalf("%q θ=%v on %v: f'(%v) = %v ± %v, enclosure %v", src, theta, box, y, c[1], e[1], df)
			}
		}
	})
}
