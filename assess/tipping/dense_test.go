package tipping

import (
	"context"
	"math"
	"testing"

	"holdfast/assess"
	"holdfast/sample"
	"holdfast/scenarios"
)

// denseTrace is a brute-force reference for tracer.trace: natural
// continuation in t with many tiny steps, each corrected by Newton's method
// from the previous point; the branch is lost where Newton fails or the
// slope changes sign (a fold or a crossing lies in that step), and leaves
// the domain where x does. It returns the kind (Fold for any loss of the
// root or slope sign, Boundary, None) and the step's end t.
func denseTrace(l *law, lo, hi, x0 float64, steps int) (Kind, float64) {
	x := x0
	_, gx0 := l.slope(x, 0)
	sgn := math.Copysign(1, gx0)
	for i := 1; i <= steps; i++ {
		t := float64(i) / float64(steps)
		ok := false
		for k := 0; k < 40; k++ {
			g, gx := l.slope(x, t)
			if !finite(g, gx) || gx*sgn <= 0 {
				break
			}
			dx := g / gx
			x -= dx
			if math.Abs(dx) <= 1e-12*(hi-lo) {
				ok = true
				break
			}
		}
		if !ok {
			return Fold, t
		}
		if x < lo || x > hi {
			return Boundary, t
		}
	}
	return None, 1
}

// starts runs the engine with the driver at from and returns each draw's
// parameters and the tracked equilibrium's state (NaN when absent).
func starts(t *testing.T, m *assess.Model, j, k, n int, from float64) ([][]float64, []float64) {
	t.Helper()
	d, err := m.Design(sample.Random, n, 5)
	if err != nil {
		t.Fatal(err)
	}
	thetas := make([][]float64, 0, n)
	xs := make([]float64, 0, n)
	_, err = assess.Run(context.Background(), m, assess.Options{
		Draws: n, Seed: 5, Workers: 2,
		Points: func(i int, th []float64) { d.Draw(i, th); th[j] = from },
		Sink: func(block []assess.Draw) error {
			for _, r := range block {
				thetas = append(thetas, append([]float64(nil), r.Theta...))
				x := math.NaN()
				if r.Failed == "" && r.Tracked[k].Exists {
					x = r.Tracked[k].X
				}
				xs = append(xs, x)
			}
			return nil
		},
	})
	if err != nil {
		t.Fatal(err)
	}
	return thetas, xs
}

func TestTracerAgreesWithDenseContinuation(t *testing.T) {
	// Reference: dense natural-parameter continuation (Allgower & Georg
	// 2003, ch. 2), an independent and slow method; common practice. With
	// 20000 steps its event lies within 1/20000 of the range after the
	// true one.
	const steps = 20000
	draws := 200
	if testing.Short() {
		draws = 40
	}
	cases := []struct {
		demo, driver, track string
		from, to            float64
	}{
		{"lake", "L", "E1", 0.05, 0.4},
		{"lake", "s", "E1", 0.7, 0.3}, // less loss: a sweep down
		{"reactor", "D", "E1", 0.005, 0.05},
		{"reactor", "a", "E1", 0.25, 0.08},
		{"fishery", "H", "E3", 15, 25},
		{"tank", "c", "E1", 0.45, 0.75},
		// The pump saturates along the way: a kink of min and max.
		{"tank", "q0", "E1", 0, 3},
	}
	for _, c := range cases {
		s, err := scenarios.LoadDemo(c.demo)
		if err != nil {
			t.Fatal(err)
		}
		m, err := assess.Compile(s)
		if err != nil {
			t.Fatal(err)
		}
		sw, err := check(m, Options{Driver: c.driver, From: c.from, To: c.to, Track: c.track, Risk: 0.1, Draws: draws})
		if err != nil {
			t.Fatal(err)
		}
		thetas, xs := starts(t, m, sw.j, sw.k, draws, c.from)
		p := sw.newDrawer()
		ref := newLaw(m.Program, sw.j, c.from, c.to-c.from)
		disagree, events, failed := 0, 0, 0
		for i, x0 := range xs {
			if math.IsNaN(x0) {
				continue
			}
			copy(p.l.theta, thetas[i])
			copy(ref.theta, thetas[i])
			ev := p.tr.trace(x0, 0, 1, 1)
			if ev.kind == Failed {
				failed++
			}
			kind, tRef := denseTrace(ref, m.Domain[0], m.Domain[1], x0, steps)
			got := ev.kind
			if got == Exchange {
				got = Fold // the dense reference cannot tell them apart
			}
			if got != None {
				events++
			}
			bad := got != kind
			if !bad && kind != None && (ev.t > tRef+1e-9 || ev.t < tRef-1.0/steps-1e-9) {
				bad = true
			}
			if bad {
				disagree++
				if disagree <= 5 {
					t.Errorf("%s/%s draw %d: tracer %v at d = %v, dense %v at d = %v", c.demo, c.driver, i, ev.kind, p.l.driver(ev.t), kind, ref.driver(tRef))
				}
			}
		}
		if disagree > 0 {
			t.Errorf("%s/%s: %d disagreements", c.demo, c.driver, disagree)
		}
		if failed > 0 {
			t.Errorf("%s/%s: %d draws failed", c.demo, c.driver, failed)
		}
		t.Logf("%s/%s: %d draws with an event; %d accepted steps in all", c.demo, c.driver, events, p.tr.steps)
	}
}
