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
	x := x0
	for i := 1; i <= steps; i++ {
		tr.at(float64(i) / float64(steps))
		ok := false
		for k := 0; k < 30; k++ {
			g, gx := tr.slope(x)
			if math.IsNaN(g) || gx*sgn <= 0 {
				break
			}
			dx := g / gx
			x -= dx
			if math.Abs(dx) <= 1e-12*math.Max(1, math.Abs(x)) {
				ok = true
				break
			}
		}
		if !ok {
			return math.NaN(), false
		}
	}
	return tr.inside(x)
}

func TestTrackerAgreesWithDenseContinuation(t *testing.T) {
	// Reference: dense natural-parameter continuation (Allgower & Georg
	// 2003, ch. 2), an independent and slow method; common practice.
	for _, demo := range []string{"lake", "reactor", "fishery"} {
		s, err := scenarios.LoadDemo(demo)
		if err != nil {
			t.Fatal(err)
		}
		m, err := Compile(s)
		if err != nil {
			t.Fatal(err)
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
		disagree := 0
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
				x2, ok2 := denseFollow(&tr, e.X, math.Copysign(1, e.Slope), 3000)
				if ok1 != ok2 || (ok1 && math.Abs(x1-x2) > 1e-8*(1+math.Abs(x2))) {
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
	}
}
