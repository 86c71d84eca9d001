package sensitivity

import (
	"math"
	"slices"
	"testing"

	"gonum.org/v1/gonum/diff/fd"
)

// harvest is logistic growth with constant harvest, f = r x (1 − x/K) − H
// (Schaefer 1954), plus a parameter u the rate law does not use.
const harvest = `holdfast: 1
title: harvested stock (illustrative)
state: {symbol: x, domain: [0, 6]}
rate: "r*x*(1 - x/K) - H"
parameters:
  r: {value: 1}
  K: {value: 4}
  H: {dist: uniform, min: 0.5, max: 1.0}
  u: {dist: uniform, min: 0, max: 1}
`

func TestLocalHarvestAnalytic(t *testing.T) {
	// x*± = K/2 (1 ± s), s = √(1 − 4H/(rK)) (Schaefer 1954). Implicit
	// differentiation: f_H = −1 and f_x = r(1 − 2x*/K) = ∓ r s, so
	// ∂x*±/∂H = ∓1/(r s); the slope λ± = ∓ r s changes by
	// dλ±/dH = ∓ r ds/dH = ±2/(K s).
	m := compile(t, harvest)
	snap, err := m.Analyze(m.Nominal)
	if err != nil {
		t.Fatal(err)
	}
	loc := Local(m, snap)
	if len(loc) != 2 {
		t.Fatalf("%d equilibria, want 2", len(loc))
	}
	r, K, H := 1.0, 4.0, m.Nominal[2]
	s := math.Sqrt(1 - 4*H/(r*K))
	for i, sign := range []float64{-1, 1} { // E1 lower, E2 upper
		x := K / 2 * (1 + sign*s)
		lam := -sign * r * s
		dx := -sign / (r * s)
		dl := sign * 2 / (K * s)
		p := loc[i].Params[2]
		if math.Abs(loc[i].X-x) > 1e-9 || math.Abs(p.DX-dx) > 1e-9 || math.Abs(p.DSlope-dl) > 1e-9 {
			t.Errorf("%s: x %v dx %v dslope %v, want %v %v %v", loc[i].Label, loc[i].X, p.DX, p.DSlope, x, dx, dl)
		}
		if math.Abs(p.XElasticity-dx*H/x) > 1e-9 || math.Abs(p.SlopeElasticity-dl*H/lam) > 1e-9 {
			t.Errorf("%s: elasticities %v %v", loc[i].Label, p.XElasticity, p.SlopeElasticity)
		}
		// u does not enter f: no effect.
		if u := loc[i].Params[3]; u.DX != 0 || u.DSlope != 0 || u.XElasticity != 0 {
			t.Errorf("%s: unused u has effect %+v", loc[i].Label, u)
		}
	}
}

func TestLocalAgainstFiniteDifferences(t *testing.T) {
	// On the lake demo, compare ∂x*/∂θ and d f'(x*)/dθ with central
	// differences of the re-solved equilibria (gonum diff/fd as reference).
	m := compile(t, lakeSource(t))
	snap, err := m.Analyze(m.Nominal)
	if err != nil {
		t.Fatal(err)
	}
	loc := Local(m, snap)
	for k, e := range loc {
		for j := range m.Names {
			at := func(v float64, slope bool) float64 {
				th := slices.Clone(m.Nominal)
				th[j] = v
				s, err := m.Analyze(th)
				if err != nil || len(s.Equilibria) != len(snap.Equilibria) {
					t.Fatalf("re-solve at %s = %v failed", m.Names[j], v)
				}
				if slope {
					return s.Equilibria[k].Slope
				}
				return s.Equilibria[k].X
			}
			h := 1e-4 * math.Max(1, math.Abs(m.Nominal[j]))
			set := &fd.Settings{Formula: fd.Central, Step: h}
			dx := fd.Derivative(func(v float64) float64 { return at(v, false) }, m.Nominal[j], set)
			ds := fd.Derivative(func(v float64) float64 { return at(v, true) }, m.Nominal[j], set)
			p := e.Params[j]
			if math.Abs(p.DX-dx) > 1e-5*math.Max(1, math.Abs(dx)) || math.Abs(p.DSlope-ds) > 1e-5*math.Max(1, math.Abs(ds)) {
				t.Errorf("%s, %s: dx %v (fd %v), dslope %v (fd %v)", e.Label, m.Names[j], p.DX, dx, p.DSlope, ds)
			}
		}
	}
}
