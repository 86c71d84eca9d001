package expr

import (
	"errors"
	"math"
	"testing"
)

// FuzzCompile: Compile never panics; a compile error is an *Error with an
// offset inside the source; a compiled program evaluates without panics,
// Taylor's c[0] equals Eval bit for bit (or both are NaN) at every order
// path, ParamGrad
// returns Eval's value, and Diagnose reports a fault exactly when Eval is
// not finite. Seeds: f.Add below and testdata/fuzz/FuzzCompile.
func FuzzCompile(f *testing.F) {
	for _, s := range []string{
		"L - s*P + r*P^q/(m^q + P^q)", "a - b*P + P^2/(1+P^2)", "-P^2", "2^3^2", "2^-1",
		"exp(P)*log(P)", "pow(P, a)", "min(P, a) + max(P, b) + abs(P - g)", "sin(P)+cos(P)+tan(P)",
		"atan(P)+sinh(P)+cosh(P)+tanh(P)", "sqrt(P) + log10(P)", "((P))", "P ** 2", "1e", "1.2.3",
		"exp(P, 1)", "pi*e", "g^g", "P^0.5", "1/P", "", "((((", "P−1", "\xff",
	} {
		f.Add(s, 0.5, 1.5)
	}
	env := Env{State: "P", Params: []string{"a", "b", "q"}, Defines: []Define{{"g", "a*P + b"}}}
	f.Fuzz(func(t *testing.T, src string, x, a float64) {
		p, err := Compile(src, env)
		if err != nil {
			var e *Error
			if !errors.As(err, &e) {
				t.Fatalf("error %T is not *Error", err)
			}
			if e.Offset < -1 || e.Offset > len(e.Src) {
				t.Fatalf("offset %d outside source of length %d", e.Offset, len(e.Src))
			}
			_ = e.Error()
			return
		}
		theta := []float64{a, 1 - a, 2.5}
		m := p.NewMachine()
		v := m.Eval(x, theta)
		c, e := make([]float64, MaxOrder+1), make([]float64, MaxOrder+1)
		m.Taylor(x, theta, c, e)
		if !sameFloat(c[0], v) {
			t.Fatalf("%q at %v: Taylor c[0] = %v, Eval = %v", src, x, c[0], v)
		}
		for k := range e {
			if e[k] < 0 || math.IsNaN(e[k]) {
				t.Fatalf("%q: bound e[%d] = %v", src, k, e[k])
			}
		}
		for d := 1; d <= lowOrder; d++ { // the unrolled low orders
			cl, el := c[:d+1], e[:d+1]
			m.Taylor(x, theta, cl, el)
			if !sameFloat(cl[0], v) {
				t.Fatalf("%q at %v, order %d: Taylor c[0] = %v, Eval = %v", src, x, d, cl[0], v)
			}
			for k := range el {
				if el[k] < 0 || math.IsNaN(el[k]) {
					t.Fatalf("%q, order %d: bound e[%d] = %v", src, d, k, el[k])
				}
			}
		}
		df, dfx := make([]float64, 3), make([]float64, 3)
		if g := m.ParamGrad(x, theta, df, dfx); !sameFloat(g, v) {
			t.Fatalf("%q: ParamGrad value %v, Eval %v", src, g, v)
		}
		if fault := m.Diagnose(x, theta); (fault == nil) != finite(v) {
			t.Fatalf("%q at %v: Eval %v, Diagnose %v", src, x, v, fault)
		}
	})
}
