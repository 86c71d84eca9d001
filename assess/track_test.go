package assess

import (
	"math"
	"slices"
	"testing"

	"holdfast/assess/steady"
	"holdfast/sample"
	"holdfast/scenarios"
)

// denseFollow is a brute-force reference for tracker.follow: natural
// continuation in t with many tiny steps, each corrected by Newton from the
// previous point; the branch is lost when Newton fails or the slope sign
// flips (a fold), or when it leaves the domain.
func denseFollow(tr *tracker, x0, sgn float64, steps int) (float64, bool) {
	x, _, ok := denseFollowMin(tr, x0, sgn, steps)
	return x, ok
}

// denseFollowMin is denseFollow that also reports the smallest |∂g/∂x| met
// on the way: a path that grazes a cusp (|∂g/∂x| → 0 without a sign
// change) is ill-conditioned, and two sound methods may disagree there.
func denseFollowMin(tr *tracker, x0, sgn float64, steps int) (float64, float64, bool) {
	x := x0
	minSlope := math.Inf(1)
	// newton corrects x at the θ last set; it fails when Newton does not
	// converge or the slope changes sign.
	newton := func(x float64) (float64, bool) {
		for k := 0; k < 30; k++ {
			g, gx := tr.slope(x)
			if math.IsNaN(g) || gx*sgn <= 0 {
				return x, false
			}
			dx := g / gx
			x -= dx
			if math.Abs(dx) <= 1e-12*math.Max(1, math.Abs(x)) {
				minSlope = math.Min(minSlope, math.Abs(gx)) // on the branch
				return x, true
			}
		}
		return x, false
	}
	// step goes from t0 to t1, halving the step where Newton fails, down
	// to 2^-12 of a step: a failure then is a fold, not a too-long step.
	var step func(x, t0, t1 float64, depth int) (float64, bool)
	step = func(x, t0, t1 float64, depth int) (float64, bool) {
		tr.at(t1)
		if xn, ok := newton(x); ok {
			return xn, true
		}
		if depth == 12 {
			return x, false
		}
		mid := (t0 + t1) / 2
		xm, ok := step(x, t0, mid, depth+1)
		if !ok {
			return xm, false
		}
		return step(xm, mid, t1, depth+1)
	}
	for i := 1; i <= steps; i++ {
		var ok bool
		x, ok = step(x, float64(i-1)/float64(steps), float64(i)/float64(steps), 0)
		if !ok {
			return math.NaN(), minSlope, false
		}
	}
	x, ok := tr.inside(x)
	return x, minSlope, ok
}

func TestTrackerAgreesWithDenseContinuation(t *testing.T) {
	// Reference: dense natural-parameter continuation (Allgower & Georg
	// 2003, ch. 2), an independent and slow method; common practice.
	// The last case puts the lake near its cusp (low recycling
	// steepness q), where branches fold and re-form along the path.
	nearCusp := `holdfast: 1
title: lake near the cusp
state: {symbol: P, domain: [0, 5]}
rate: "L - s*P + r*P^q/(m^q + P^q)"
parameters:
  L: {dist: normal, mean: 0.12, sd: 0.02}
  s: {dist: normal, mean: 0.62, sd: 0.03}
  r: {value: 1}
  m: {value: 1}
  q: {dist: uniform, min: 2.0, max: 2.8, nominal: 2.6}
`
	for _, demo := range []string{"lake", "reactor", "fishery", "near-cusp"} {
		var m *Model
		if demo == "near-cusp" {
			m = mustModel(t, nearCusp)
		} else {
			s, err := scenarios.LoadDemo(demo)
			if err != nil {
				t.Fatal(err)
			}
			if m, err = Compile(s); err != nil {
				t.Fatal(err)
			}
		}
		nom, err := m.Analyze(m.Nominal)
		if err != nil {
			t.Fatal(err)
		}
		d, err := m.Design(sample.Random, 300, 7)
		if err != nil {
			t.Fatal(err)
		}
		theta := make([]float64, len(m.Names))
		work := make([]float64, len(m.Names))
		tr := tracker{f: m.Func(work), th0: m.Nominal, th1: theta, lo: m.Domain[0], hi: m.Domain[1]}
		scale := isolation(nom.Equilibria, m.Domain)
		disagree, grazing := 0, 0
		for i := 0; i < 300; i++ {
			d.Draw(i, theta)
			res, err := steady.Find(m.Func(slices.Clone(theta)), m.Domain[0], m.Domain[1], steady.DefaultOptions())
			if err != nil {
				t.Fatal(err)
			}
			tr.roots = res.Equilibria
			for k, e := range nom.Equilibria {
				if e.Order != 1 || e.Class == steady.Degenerate {
					continue
				}
				x1, _, ok1 := tr.follow(e.X, e.Slope, scale[k])
				x2, minSlope, ok2 := denseFollowMin(&tr, e.X, math.Copysign(1, e.Slope), 3000)
				if ok1 != ok2 || (ok1 && math.Abs(x1-x2) > 1e-8*(1+math.Abs(x2))) {
					if minSlope < 1e-3*math.Abs(e.Slope) {
						grazing++ // the path grazes a cusp: ill-conditioned, counted
						continue
					}
					disagree++
					if disagree <= 5 {
						t.Errorf("%s draw %d %s: arclength (%v, %v), dense (%v, %v)", demo, i, e.Label, x1, ok1, x2, ok2)
					}
				}
			}
		}
		if disagree > 0 {
			t.Errorf("%s: %d disagreements", demo, disagree)
		}
		if grazing > 300*len(nom.Equilibria)/50 {
			t.Errorf("%s: %d disagreements on paths that graze a cusp, more than 2%%", demo, grazing)
		}
	}
}
