package steady_test

import (
	"fmt"
	"math"

	"holdfast/assess/steady"
)

// harvested is logistic growth with constant harvest,
// f(x) = r x (1 − x/K) − H, with its Taylor coefficients written out:
// c0 = f, c1 = r (1 − 2x/K), c2 = −r/K, and a simple rounding bound.
type harvested struct{ r, K, H float64 }

func (h harvested) Eval(x float64) float64 { return h.r*x*(1-x/h.K) - h.H }

func (h harvested) Taylor(x float64, c, e []float64) {
	const u = 0x1p-53
	for k := range c {
		c[k], e[k] = 0, 0
	}
	c[0] = h.Eval(x)
	e[0] = 8 * u * (math.Abs(h.r*x) + math.Abs(h.r*x*x/h.K) + math.Abs(h.H))
	if len(c) > 1 {
		c[1] = h.r * (1 - 2*x/h.K)
		e[1] = 4 * u * (math.Abs(h.r) + math.Abs(2*h.r*x/h.K))
	}
	if len(c) > 2 {
		c[2] = -h.r / h.K
		e[2] = 2 * u * math.Abs(c[2])
	}
}

// A harvested population (illustrative numbers): r = 1, K = 1, H = 0.16,
// below the fold at rK/4 = 0.25, has a repelling equilibrium at 0.2 and an
// attracting one at 0.8 (Schaefer 1954). From 0.5 the state needs
// ln(199)/0.6 ≈ 8.8222 time units to cover 99% of the way to 0.8.
func ExampleFinder_Find() {
	fz, err := steady.NewFinder(steady.DefaultOptions())
	if err != nil {
		fmt.Println(err)
		return
	}
	f := harvested{r: 1, K: 1, H: 0.16}
	res, err := fz.Find(f, 0, 1.2)
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, q := range res.Equilibria {
		fmt.Printf("x*=%.4f %-8v order %d slope %+.2f basin [%.2f, %.2f] barrier [%.4f, %.4f]\n",
			q.X, q.Class, q.Order, q.Slope, q.Basin[0], q.Basin[1], q.Barrier[0], q.Barrier[1])
	}
	tr := steady.FromState(f, res, 0.5)
	fmt.Printf("from 0.5: %v x*=%.4f in %.4f time units\n", tr.Fate, tr.Target, tr.Time)
	// Output:
	// x*=0.2000 unstable order 1 slope +0.60 basin [0.20, 0.20] barrier [0.0000, 0.0000]
	// x*=0.8000 stable   order 1 slope -0.60 basin [0.20, 1.20] barrier [0.0360, 0.0693]
	// from 0.5: approaches x*=0.8000 in 8.8222 time units
}
