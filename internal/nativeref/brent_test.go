package nativeref

import (
	"math"
	"testing"
)

func TestBrentFindsKnownRoots(t *testing.T) {
	// Roots known in closed form (analytic): √2 of x² − 2, π/2 of cos x, and
	// the root 1 of the cubic (x − 1)(x² + 1), whose other roots are complex.
	for _, c := range []struct {
		name string
		f    func(float64) float64
		a, b float64
		want float64
	}{
		{"x²−2", func(x float64) float64 { return x*x - 2 }, 0, 2, math.Sqrt2},
		{"cos", math.Cos, 0, 3, math.Pi / 2},
		{"cubic", func(x float64) float64 { return (x - 1) * (x*x + 1) }, -3, 4, 1},
	} {
		x, evals := Brent(c.f, c.a, c.b, c.f(c.a), c.f(c.b), 1e-13)
		if math.Abs(x-c.want) > 1e-12 || evals < 1 || evals > 100 {
			t.Errorf("%s: root %v after %d evaluations, want %v", c.name, x, evals, c.want)
		}
	}
}
