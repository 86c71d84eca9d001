package steady

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/integrate/quad"
)

// Fate is where the flow from a starting state goes.
type Fate int

const (
	// Stays: the start is an equilibrium (or lies in a zero span).
	Stays Fate = iota
	// Approaches: the state moves to Equilibria[To].
	Approaches
	// ExitsBelow: no equilibrium in the way; the state leaves the domain
	// through lo.
	ExitsBelow
	// ExitsAbove: it leaves through hi.
	ExitsAbove
	// Singular: it runs into a pole or an undefined interval.
	Singular
	// Outside: the start is outside the domain or where f is undefined.
	Outside
)

// String names the fate.
func (f Fate) String() string {
	switch f {
	case Stays:
		return "stays"
	case Approaches:
		return "approaches"
	case ExitsBelow:
		return "exits below"
	case ExitsAbove:
		return "exits above"
	case Singular:
		return "singular"
	case Outside:
		return "outside"
	}
	return fmt.Sprintf("Fate(%d)", int(f))
}

// Transit is the motion from a starting state.
type Transit struct {
	Fate Fate
	// To is the index in Result.Equilibria for Stays and Approaches, −1
	// otherwise.
	To int
	// Target is where the state goes: the equilibrium (the near edge of a
	// span), the domain end, or the edge of the singular place.
	Target float64
	// Time is, for Approaches, the time until the remaining distance to
	// the target is 1% of the starting distance, T = ∫_{x0}^{x1} dx/f with
	// x1 = x* + 0.01 (x0 − x*); for the exits and Singular, the time to
	// reach Target; 0 for Stays; NaN for Outside or when f is not finite
	// on the way.
	Time float64
}

// transitRelTol is the relative tolerance of transit times.
const transitRelTol = 1e-10

// FromState tells which equilibrium the state moves to from x0 and how long
// it takes. In one dimension this is exact: the state follows the sign of f
// to the nearest equilibrium (or domain end, pole or undefined interval) in
// that direction. res must come from Find on the same f.
//
// For Approaches the time integral is taken in s with x = x* + (x0 − x*)e^{−s},
// s ∈ [0, ln 100], where the integrand −(x − x*)/f(x) is smooth even when
// the target is not hyperbolic (for x' = −k(x − a) it is the constant 1/k),
// by adaptive Gauss–Legendre quadrature (gonum quad.Fixed).
func FromState(f Func, res *Result, x0 float64) Transit {
	t := Transit{Fate: Outside, To: -1, Target: math.NaN(), Time: math.NaN()}
	if f == nil || res == nil || !finite(x0) || x0 < res.Lo || x0 > res.Hi {
		return t
	}
	for _, iv := range res.Undefined {
		if x0 >= iv.Lo && x0 <= iv.Hi {
			return t
		}
	}
	tol := 1e-12 * math.Max(res.Hi-res.Lo, math.Abs(x0))
	for i, eq := range res.Equilibria {
		r := math.Max(eq.XErr, tol)
		if x0 >= eq.Span[0]-r && x0 <= eq.Span[1]+r {
			return Transit{Fate: Stays, To: i, Target: eq.X, Time: 0}
		}
	}
	v := f.Eval(x0)
	if math.IsNaN(v) {
		return t
	}
	if v == 0 {
		return Transit{Fate: Stays, To: -1, Target: x0, Time: 0}
	}
	up := v > 0
	// Nearest obstacle in the direction of flow.
	target, fate, to := res.Hi, ExitsAbove, -1
	if !up {
		target, fate = res.Lo, ExitsBelow
	}
	closer := func(x float64) bool {
		if up {
			return x > x0 && x < target
		}
		return x < x0 && x > target
	}
	for i, eq := range res.Equilibria {
		edge := eq.Span[0]
		if !up {
			edge = eq.Span[1]
		}
		if closer(edge) {
			target, fate, to = edge, Approaches, i
		}
	}
	for _, p := range res.Poles {
		if closer(p) {
			target, fate, to = p, Singular, -1
		}
	}
	for _, iv := range res.Undefined {
		edge := iv.Lo
		if !up {
			edge = iv.Hi
		}
		if closer(edge) {
			target, fate, to = edge, Singular, -1
		}
	}
	t = Transit{Fate: fate, To: to, Target: target}
	q := timeQuad{f: f}
	if fate == Approaches {
		q.xs, q.d0 = target, x0-target
		t.Time = q.adapt(0, math.Log(100), q.fixed(0, math.Log(100)), 0)
	} else {
		a, b := x0, target
		sign := 1.0
		if b < a {
			a, b, sign = b, a, -1
		}
		q.direct = true
		t.Time = sign * q.adapt(a, b, q.fixed(a, b), 0)
	}
	if !finite(t.Time) {
		t.Time = math.NaN()
	}
	return t
}

// timeQuad integrates transit times.
type timeQuad struct {
	f      Func
	xs, d0 float64 // target and starting offset (Approaches)
	direct bool    // integrate 1/f(x) dx directly
}

func (q *timeQuad) integrand(s float64) float64 {
	if q.direct {
		return 1 / q.f.Eval(s)
	}
	dx := q.d0 * math.Exp(-s)
	return -dx / q.f.Eval(q.xs+dx)
}

func (q *timeQuad) fixed(a, b float64) float64 {
	return quad.Fixed(q.integrand, a, b, 12, quad.Legendre{}, 0)
}

func (q *timeQuad) adapt(a, b, whole float64, depth int) float64 {
	m := 0.5 * (a + b)
	l, r := q.fixed(a, m), q.fixed(m, b)
	s := l + r
	if math.Abs(s-whole) <= transitRelTol*math.Abs(s) || depth >= 30 || !finite(s) {
		return s
	}
	return q.adapt(a, m, l, depth+1) + q.adapt(m, b, r, depth+1)
}
