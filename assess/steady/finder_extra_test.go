package steady

import (
	"math"
	"testing"
)

func TestThresholdBarriersOnly(t *testing.T) {
	// Allee law r x (x/A − 1)(1 − x/K) on [−0.5, 12]: the barrier from K
	// to the threshold A is the same with and without the option; toward
	// the domain ends it becomes NaN (analytic integral not needed: the
	// full computation is the reference).
	f := allee(0.5, 2, 10)
	full, err := Find(f, -0.5, 12, DefaultOptions())
	if err != nil {
		t.Fatal(err)
	}
	fullEqs := append([]Equilibrium(nil), full.Equilibria...)
	opt := DefaultOptions()
	opt.ThresholdBarriersOnly = true
	part, err := Find(f, -0.5, 12, opt)
	if err != nil {
		t.Fatal(err)
	}
	for i, e := range part.Equilibria {
		for s := 0; s < 2; s++ {
			switch {
			case e.BasinAtDomainEnd[s] && e.Basin[s] != e.Span[s]:
				if !math.IsNaN(e.Barrier[s]) {
					t.Errorf("E%d side %d: barrier %v toward a domain end, want NaN", i+1, s, e.Barrier[s])
				}
			case e.Barrier[s] != fullEqs[i].Barrier[s]:
				t.Errorf("E%d side %d: barrier %v, full computation %v", i+1, s, e.Barrier[s], fullEqs[i].Barrier[s])
			}
		}
	}
}
