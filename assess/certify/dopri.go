package certify

import (
	"fmt"
	"math"

	"holdfast/assess/steady"
)

// The Dormand–Prince 5(4) pair (Dormand & Prince, "A family of embedded
// Runge–Kutta formulae", J. Comput. Appl. Math. 6:19, 1980; Hairer,
// Nørsett & Wanner, Solving Ordinary Differential Equations I, 2nd ed.,
// 1993, §II.5): seven stages, the last evaluated at the new point and reused
// as the first of the next step (FSAL); the fifth-order solution is
// propagated and the difference from the embedded fourth-order one
// estimates the local error. The coefficients were recalled (from memory)
// and are checked in the tests against the order conditions (Σb = 1,
// Σb c^(k−1) = 1/k for k ≤ 5, Σ_j a_ij = c_i, and the fourth-order
// conditions for the embedded weights).
var (
	dpC = [7]float64{0, 1.0 / 5, 3.0 / 10, 4.0 / 5, 8.0 / 9, 1, 1}
	dpA = [7][6]float64{
		{},
		{1.0 / 5},
		{3.0 / 40, 9.0 / 40},
		{44.0 / 45, -56.0 / 15, 32.0 / 9},
		{19372.0 / 6561, -25360.0 / 2187, 64448.0 / 6561, -212.0 / 729},
		{9017.0 / 3168, -355.0 / 33, 46732.0 / 5247, 49.0 / 176, -5103.0 / 18656},
		{35.0 / 384, 0, 500.0 / 1113, 125.0 / 192, -2187.0 / 6784, 11.0 / 84},
	}
	// Fifth-order weights (the last row of dpA) and the embedded
	// fourth-order ones.
	dpB  = [7]float64{35.0 / 384, 0, 500.0 / 1113, 125.0 / 192, -2187.0 / 6784, 11.0 / 84, 0}
	dpB4 = [7]float64{5179.0 / 57600, 0, 7571.0 / 16695, 393.0 / 640, -92097.0 / 339200, 187.0 / 2100, 1.0 / 40}
)

// dopriStep advances x' = f(x) by one step h from x with k1 = f(x); it
// returns the fifth-order solution, the local error estimate (fifth minus
// fourth order) and f at the new point (the next step's k1).
func dopriStep(f func(float64) float64, x, h, k1 float64) (x5, errEst, k7 float64) {
	var k [7]float64
	k[0] = k1
	for i := 1; i < 7; i++ {
		s := 0.0
		for j := 0; j < i; j++ {
			s += dpA[i][j] * k[j]
		}
		k[i] = f(x + h*s)
	}
	var s5, se float64
	for i := range k {
		s5 += dpB[i] * k[i]
		se += (dpB[i] - dpB4[i]) * k[i]
	}
	return x + h*s5, h * se, k[6]
}

// integrate follows x' = f(x) from x0 with adaptive steps (Hairer, Nørsett
// & Wanner 1993, §II.4: err = |local error|/(atol + rtol·max(|x|, |x_new|)),
// h ← h·min(5, max(0.2, 0.9·err^(−1/5))), no growth after a rejection)
// until stop returns non-zero at an accepted point, and returns that value,
// or 0 when maxSteps run out or f is not finite.
func integrate(f func(float64) float64, x0, h0, rtol, atol float64, maxSteps int, stop func(x float64) int) int {
	x, h := x0, h0
	k1 := f(x)
	rejected := false
	for step := 0; step < maxSteps; step++ {
		if math.IsNaN(k1) || math.IsInf(k1, 0) {
			return 0
		}
		x5, e, k7 := dopriStep(f, x, h, k1)
		sc := atol + rtol*math.Max(math.Abs(x), math.Abs(x5))
		err := math.Abs(e) / sc
		if math.IsNaN(err) {
			return 0
		}
		fac := 5.0
		if err > 0 {
			fac = math.Min(5, math.Max(0.2, 0.9*math.Pow(err, -0.2)))
		}
		if err <= 1 {
			x, k1 = x5, k7
			if r := stop(x); r != 0 {
				return r
			}
			if rejected {
				fac = math.Min(fac, 1)
			}
			rejected = false
		} else {
			rejected = true
		}
		h *= fac
	}
	return 0
}

// SimOptions tunes CheckSides. The zero value selects the defaults.
type SimOptions struct {
	// Offset is the starting distance from the equilibrium as a fraction
	// of the domain width (default 1e-3); it is reduced to a quarter of the
	// gap to the nearest other equilibrium or domain end.
	Offset float64
	// RelTol is the relative local error tolerance (default 1e-9); the
	// absolute one is RelTol times the starting distance.
	RelTol float64
	// MaxSteps caps the steps per side (default 20000).
	MaxSteps int
}

func (o SimOptions) withDefaults() (SimOptions, error) {
	switch {
	case o.Offset == 0:
		o.Offset = 1e-3
	case !(o.Offset > 0 && o.Offset < 0.5):
		return o, fmt.Errorf("certify: Sim.Offset %g out of range (0, 0.5)", o.Offset)
	}
	switch {
	case o.RelTol == 0:
		o.RelTol = 1e-9
	case !(o.RelTol >= 1e-14 && o.RelTol <= 1e-2):
		return o, fmt.Errorf("certify: Sim.RelTol %g out of range [1e-14, 1e-2]", o.RelTol)
	}
	switch {
	case o.MaxSteps == 0:
		o.MaxSteps = 20000
	case o.MaxSteps < 10:
		return o, fmt.Errorf("certify: Sim.MaxSteps %d below 10", o.MaxSteps)
	}
	return o, nil
}

// Approach is what the flow does from one side of an equilibrium.
type Approach int

const (
	// NotTested: no room on that side (a domain end or a neighbour too
	// close), f too close to its rounding error there, or the
	// integration gave no verdict.
	NotTested Approach = iota
	// Approached: the state moved to within half its starting distance.
	Approached
	// Repelled: the state moved to twice its starting distance or left
	// the domain.
	Repelled
)

// String returns "not tested", "approached" or "repelled".
func (a Approach) String() string {
	switch a {
	case NotTested:
		return "not tested"
	case Approached:
		return "approached"
	case Repelled:
		return "repelled"
	}
	return fmt.Sprintf("Approach(%d)", int(a))
}

// Sides is the simulation cross-check of one equilibrium.
type Sides struct {
	X            float64
	Class        steady.Class // the classification checked
	AttractsFrom steady.Side
	Below, Above Approach
	// Agree is false when a tested side contradicts the classification.
	Agree bool
}

// Checked reports whether at least one side was tested.
func (s Sides) Checked() bool { return s.Below != NotTested || s.Above != NotTested }

// expect returns what the classification predicts on each side.
func expect(c steady.Class, from steady.Side) (below, above Approach, ok bool) {
	switch c {
	case steady.Stable:
		return Approached, Approached, true
	case steady.Unstable:
		return Repelled, Repelled, true
	case steady.Semistable:
		if from == steady.Below {
			return Approached, Repelled, true
		}
		return Repelled, Approached, true
	}
	return NotTested, NotTested, false
}

// CheckSides integrates dx/dt = f(x) with the Dormand–Prince 5(4) pair
// from x* − h and x* + h, where x* = eqs[k].X and h is Options.Offset·(hi −
// lo) or a quarter of the gap to the neighbouring equilibrium or domain
// end, whichever is less, and records from which sides the equilibrium is
// approached: the state comes to within h/2 of x* (or crosses it), or it
// is repelled to 2h or out of the domain. A side is not tested when h is
// below 10·XErr (the location uncertainty) or |f(x* ± h)| is within ten
// times its rounding-error bound. Agree compares the tested sides with the
// classification (Stable: both approached; Unstable: neither; Semistable:
// only AttractsFrom). It is meant for equilibria whose linear term
// vanishes, where the classification rests on higher derivatives.
func CheckSides(f steady.Func, eqs []steady.Equilibrium, k int, lo, hi float64, opt SimOptions) Sides {
	e := eqs[k]
	sd := Sides{X: e.X, Class: e.Class, AttractsFrom: e.AttractsFrom, Agree: true}
	o, err := opt.withDefaults()
	if err != nil || e.Span[0] != e.Span[1] {
		return sd
	}
	below, above, ok := expect(e.Class, e.AttractsFrom)
	if !ok {
		return sd
	}
	gapLo, gapHi := e.X-lo, hi-e.X
	if k > 0 {
		gapLo = e.X - eqs[k-1].Span[1]
	}
	if k+1 < len(eqs) {
		gapHi = eqs[k+1].Span[0] - e.X
	}
	ev := func(x float64) float64 { return f.Eval(x) }
	var c, eb [1]float64
	for _, side := range [2]float64{-1, 1} {
		gap := gapLo
		if side > 0 {
			gap = gapHi
		}
		h := math.Min(o.Offset*(hi-lo), gap/4)
		if !(h > 10*e.XErr) || !(h > 0) {
			continue
		}
		x0 := e.X + side*h
		f.Taylor(x0, c[:], eb[:])
		if !(math.Abs(c[0]) > 10*eb[0]) {
			continue
		}
		xs := e.X
		stop := func(x float64) int {
			d := (x - xs) * side
			switch {
			case d <= h/2: // within half the distance, or crossed
				return int(Approached)
			case d >= 2*h || x < lo || x > hi:
				return int(Repelled)
			}
			return 0
		}
		h0 := 0.01 * h / math.Abs(c[0]) // time to move 1% of h
		got := Approach(integrate(ev, x0, h0, o.RelTol, o.RelTol*h, o.MaxSteps, stop))
		want := below
		if side > 0 {
			sd.Above, want = got, above
		} else {
			sd.Below = got
		}
		if got != NotTested && got != want {
			sd.Agree = false
		}
	}
	return sd
}
