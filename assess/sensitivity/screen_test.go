package sensitivity

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"holdfast/assess"
	"holdfast/assess/steady"
	"holdfast/scenarios"
)

func compile(t testing.TB, src string) *assess.Model {
	t.Helper()
	s, err := scenarios.Parse("test.yaml", []byte(src), nil)
	if err != nil {
		t.Fatal(err)
	}
	m, err := assess.Compile(s)
	if err != nil {
		t.Fatal(err)
	}
	return m
}

// twoInputs has uncertain a and b and fixed c; the records below are
// synthetic, so the rate law does not matter.
const twoInputs = `holdfast: 1
title: screening test (illustrative)
state: {symbol: x, domain: [0, 2], current: 0.5}
rate: "a - x + 0*b*c"
parameters:
  a: {dist: uniform, min: 0, max: 1}
  b: {dist: uniform, min: 0, max: 1}
  c: {value: 3}
`

// synthetic returns n records in which E1 exists at x = a² and attracts
// exactly when a > 0.5, b plays no part, and every 10th draw fails.
func synthetic(n int) []assess.Draw {
	rng := rand.New(rand.NewPCG(3, 4))
	recs := make([]assess.Draw, n)
	for i := range recs {
		a, b := rng.Float64(), rng.Float64()
		r := assess.Draw{Index: i, Theta: []float64{a, b, 3}, Outcome: "E1"}
		if i%10 == 9 {
			r.Failed = "test failure"
			r.Outcome = ""
		} else {
			cls := steady.Unstable
			if a > 0.5 {
				cls = steady.Stable
			}
			r.Tracked = []assess.TrackedDraw{{Exists: true, X: a * a, Slope: -a, Class: cls}}
			if a < 0.2 {
				r.Outcome = "leaves domain below"
			}
		}
		recs[i] = r
	}
	return recs
}

func TestScreenMeasures(t *testing.T) {
	m := compile(t, twoInputs)
	s := NewScreen(m, 0)
	if err := s.Add(synthetic(2000)); err != nil {
		t.Fatal(err)
	}
	r := s.Result()
	if r.Seen != 2000 || r.Failed != 200 || r.Kept != 1800 || r.Capped {
		t.Fatalf("counts %+v", r)
	}
	att := r.Of("E1", Attracting)
	// a separates the groups completely: the samples do not overlap, so
	// D = 1 (definition of the KS distance); b is irrelevant (p large).
	if d := att.Split[0]; math.Abs(d.D-1) > 1e-12 || d.P > 1e-10 || d.N1+d.N0 != 1800 {
		t.Errorf("split on a: %+v", d)
	}
	if d := att.Split[1]; d.P < 0.01 {
		t.Errorf("split on b (irrelevant): %+v", d)
	}
	if d := att.Split[2]; d.D != 0 || d.P != 1 {
		t.Errorf("fixed c: %+v, want zero effect", d)
	}
	// Position a² is monotone in a: Spearman exactly 1.
	pos := r.Of("E1", Position)
	if pos.N != 1800 || math.Abs(pos.Spearman[0]-1) > 1e-12 || math.Abs(pos.PRCC[0]-1) > 1e-12 {
		t.Errorf("position: N %d, ρ %v, PRCC %v", pos.N, pos.Spearman[0], pos.PRCC[0])
	}
	if math.Abs(pos.Spearman[1]) > 3/math.Sqrt(1800) || pos.Spearman[2] != 0 {
		t.Errorf("position: ρ(b) = %v, ρ(c) = %v", pos.Spearman[1], pos.Spearman[2])
	}
	if slope := r.Of("E1", Slope); math.Abs(slope.Spearman[0]+1) > 1e-12 {
		t.Errorf("slope −a: ρ = %v", slope.Spearman[0])
	}
	if cur := r.Of("E1", Current); cur == nil || math.Abs(cur.Split[0].D-1) > 1e-12 {
		t.Errorf("current: %+v", cur)
	}
	if r.Of("E2", Attracting) != nil {
		t.Error("unknown label must give nil")
	}
}

func TestScreenCapKeepsDrawsBelowCap(t *testing.T) {
	// With a cap, the result is that of the successful draws whose index
	// is below the cap, whatever the block sizes (definition of Screen).
	// Every 10th draw fails, so 450 of the first 500 draws are kept, not
	// the first 500 successful draws.
	m := compile(t, twoInputs)
	recs := synthetic(3000)
	capped := NewScreen(m, 500)
	for lo := 0; lo < len(recs); lo += 7 {
		if err := capped.Add(recs[lo:min(lo+7, len(recs))]); err != nil {
			t.Fatal(err)
		}
	}
	first := NewScreen(m, 0)
	if err := first.Add(recs[:500]); err != nil {
		t.Fatal(err)
	}
	a, b := capped.Result(), first.Result()
	if !a.Capped || a.Kept != 450 || a.Seen != 3000 || a.Failed != 300 || b.Capped || b.Kept != 450 {
		t.Fatalf("capped %+v, first 500 %+v", a, b)
	}
	if !sameBits(a.Equilibria, b.Equilibria) {
		t.Errorf("capped result differs from the draws below the cap:\n%s\n%s",
			fmt.Sprint(a.Equilibria[0].Outputs[Position]), fmt.Sprint(b.Equilibria[0].Outputs[Position]))
	}
}
