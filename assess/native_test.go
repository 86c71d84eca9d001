package assess

import (
	"math"
	"slices"
	"testing"

	"holdfast/assess/steady"
	"holdfast/sample"
	"holdfast/scenarios"
)

// nativeRoots is the hand-written reference's root list for one draw of
// the lake law: a 200-point scan for sign changes and Brent refinement.
func nativeRoots(th []float64, lo, hi float64) []float64 {
	f := func(P float64) float64 { return lakeF(P, th) }
	var roots []float64
	const grid = 200
	xa, fa := lo, f(lo)
	for k := 1; k <= grid; k++ {
		xb := lo + (hi-lo)*float64(k)/grid
		fb := f(xb)
		if fa*fb < 0 {
			roots = append(roots, brent(f, xa, xb, fa, fb, 1e-12))
		}
		xa, fa = xb, fb
	}
	return roots
}

func TestEngineMissesNoRootTheNativeScanFinds(t *testing.T) {
	// The benchmark's native reference (scan + Brent, Brent 1973) on the
	// same draws: every root it finds must be among the engine's.
	m := lakeModelT(t)
	d, err := m.Design(sample.Random, 20000, 1)
	if err != nil {
		t.Fatal(err)
	}
	finder, err := steady.NewFinder(steady.DefaultOptions())
	if err != nil {
		t.Fatal(err)
	}
	theta := make([]float64, len(m.Names))
	f := m.Func(make([]float64, len(m.Names)))
	missed := 0
	for i := 0; i < 20000; i++ {
		d.Draw(i, theta)
		copy(f.Theta, theta)
		res, err := finder.Find(f, m.Domain[0], m.Domain[1])
		if err != nil {
			t.Fatal(err)
		}
		for _, r := range nativeRoots(theta, m.Domain[0], m.Domain[1]) {
			if !slices.ContainsFunc(res.Equilibria, func(e steady.Equilibrium) bool { return math.Abs(e.X-r) < 1e-9 }) {
				missed++
				if missed < 5 {
					t.Errorf("draw %d: native root %v not found; engine has %v", i, r, res.Equilibria)
				}
			}
		}
	}
	if missed > 0 {
		t.Errorf("%d native roots missed", missed)
	}
}

func TestEngineFindsTangentialRootsTheScanMisses(t *testing.T) {
	// x' = a − (x − 1)² with a drawn from {−0.1, 0, 0.1}: at a = 0 the
	// equilibrium x = 1 touches zero without a sign change (a fold; Strogatz
	// ch. 3), which a sign-change scan cannot see and the engine must.
	m := mustModel(t, `holdfast: 1
title: tangential
state: {symbol: x, domain: [0, 3]}
rate: "a - (x - 1)^2"
parameters:
  a: {dist: discrete, values: [-0.1, 0, 0.1], weights: [1, 1, 1], nominal: 0.1}
`)
	finder, _ := steady.NewFinder(steady.DefaultOptions())
	f := m.Func([]float64{0})
	res, err := finder.Find(f, 0, 3)
	if err != nil {
		t.Fatal(err)
	}
	if len(res.Equilibria) != 1 || math.Abs(res.Equilibria[0].X-1) > 1e-6 || res.Equilibria[0].Class != steady.Semistable {
		t.Fatalf("a = 0: %+v, want one semistable equilibrium at 1", res.Equilibria)
	}
	// The plain scan sees no sign change at a = 0.
	g := func(x float64) float64 { return -(x - 1) * (x - 1) }
	changes := 0
	for k := 0; k < 200; k++ {
		if g(3*float64(k)/200)*g(3*float64(k+1)/200) < 0 {
			changes++
		}
	}
	if changes != 0 {
		t.Fatalf("scan saw %d sign changes", changes)
	}
}

func lakeModelT(t *testing.T) *Model {
	t.Helper()
	return mustModel(t, lakeDemoSource(t))
}

func lakeDemoSource(t *testing.T) string {
	t.Helper()
	src, err := scenarios.DemoSource("lake")
	if err != nil {
		t.Fatal(err)
	}
	return string(src)
}
