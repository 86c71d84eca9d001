package expr

import (
	"math"
	"math/rand/v2"
	"testing"
)

func TestEvalCacheDoesNotChangeValues(t *testing.T) {
	// Eval keeps the θ-only instructions between calls with the same θ:
	// every value must equal, bit for bit, a fresh machine's (common
	// practice for memoisation, no source).
	p := mustCompile(t, lakeRate, lakeEnv)
	m := p.NewMachine()
	rng := rand.New(rand.NewPCG(1, 2))
	theta := append([]float64(nil), lakeTheta...)
	for i := 0; i < 2000; i++ {
		if i%7 == 0 {
			theta[rng.IntN(len(theta))] *= 1 + 0.1*rng.NormFloat64()
		}
		x := 3 * rng.Float64()
		got := m.Eval(x, theta)
		want := p.NewMachine().Eval(x, theta)
		if math.Float64bits(got) != math.Float64bits(want) && !(math.IsNaN(got) && math.IsNaN(want)) {
			t.Fatalf("call %d: cached Eval %v, fresh %v", i, got, want)
		}
	}
	// A θ slice changed in place must be noticed.
	th := append([]float64(nil), lakeTheta...)
	a := m.Eval(0.7, th)
	th[3] *= 2 // m
	if b := m.Eval(0.7, th); b == a {
		t.Error("in-place change of θ went unnoticed")
	}
}
