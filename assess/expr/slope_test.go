package expr

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/diff/fd"
)

func TestSlopeMatchesTaylorAndFiniteDifferences(t *testing.T) {
	// Slope's dual numbers must agree with the Taylor coefficient c[1]
	// (an independent implementation of the same derivative) and with
	// gonum's central finite difference (diff/fd, a reference library).
	cases := []struct {
		src   string
		theta []float64
		xs    []float64
	}{
		{lakeRate, lakeTheta, []float64{0.1, 0.5, 1, 1.7, 3}},
		{"r*P*(1 - P/K) - H + 0*(L + s + m + q)", []float64{0.1, 0.6, 1, 1, 4}, []float64{0.2, 2}},
		{"exp(-q/P) - s*sqrt(P) + atan(P - m)*tanh(L*P)", lakeTheta, []float64{0.3, 1.2, 4}},
		{"P^P + log10(P + L) - min(P, m) + max(P^2, s)", lakeTheta, []float64{0.4, 0.9, 1.6}},
	}
	env := lakeEnv
	for _, c := range cases {
		e := env
		if c.src[0] == 'r' {
			e = Env{State: "P", Params: []string{"r", "K", "H", "L", "s"}}
			e.Params = append(e.Params, "m", "q")
			c.theta = []float64{0.5, 3, 0.1, 0.1, 0.6, 1, 4}
		}
		m := mustCompile(t, c.src, e).NewMachine()
		var tc, te [2]float64
		for _, x := range c.xs {
			f, fx := m.Slope(x, c.theta)
			m.Taylor(x, c.theta, tc[:], te[:])
			if f != m.Eval(x, c.theta) {
				t.Errorf("%s at %v: Slope value %v, Eval %v", c.src, x, f, m.Eval(x, c.theta))
			}
			if math.Abs(fx-tc[1]) > 1e-12*math.Max(1, math.Abs(fx)) {
				t.Errorf("%s at %v: Slope %v, Taylor c[1] %v", c.src, x, fx, tc[1])
			}
			ref := fd.Derivative(func(y float64) float64 { return m.Eval(y, c.theta) }, x, &fd.Settings{Formula: fd.Central, Step: 1e-6})
			if math.Abs(fx-ref) > 1e-6*math.Max(1, math.Abs(fx)) {
				t.Errorf("%s at %v: Slope %v, central difference %v", c.src, x, fx, ref)
			}
		}
	}
}
