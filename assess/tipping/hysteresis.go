package tipping

import (
	"math"
)

// Return is the verdict on undoing a tipping by reversing the driver.
type Return int

const (
	// NotApplicable: the draw has no fold in range, or the tracked
	// equilibrium was not attracting at the start.
	NotApplicable Return = iota
	// Reversible: the state the system falls to after the fold vanishes
	// itself at a return fold inside the driver's allowed values, so
	// reversing the driver far enough brings the tracked state back
	// (hysteresis, with a window between the two folds).
	Reversible
	// Irreversible: the return fold lies outside the driver's allowed
	// values, or the new state persists beyond them: the shift cannot be
	// undone by reversing the driver alone.
	Irreversible
	// Escapes: after the fold the state leaves the domain (no equilibrium
	// lies in the direction of the flow).
	Escapes
	// Unresolved: the new state meets something other than a fold inside
	// the allowed values (a crossing, a domain end), the search window
	// ended first, or the flow meets a singular point.
	Unresolved
	numReturns
)

var returnNames = [numReturns]string{"not applicable", "reversible", "irreversible", "escapes", "unresolved"}

// String returns "not applicable", "reversible", "irreversible",
// "escapes" or "unresolved".
func (r Return) String() string {
	if r >= 0 && r < numReturns {
		return returnNames[r]
	}
	return "Return(?)"
}

// Hysteresis search settings.
const (
	// beyondFold is how far past the fold (in units of the sweep width)
	// the new state is sought: far enough that the vanished pair leaves
	// no root, near enough that nothing else changes.
	beyondFold = 1e-6
	// backWindow is how far behind the start of the sweep (in sweep
	// widths) the return fold is sought.
	backWindow = 4.0
)

// hysteresis finds where the system goes after the fold ev and follows
// that state back along the driver to its own fold, the return fold. It
// returns the verdict and the return fold's t (NaN when none was found).
func (p *drawer) hysteresis(ev event) (Return, float64) {
	l, tr := p.l, &p.tr
	t1 := ev.t + beyondFold
	g := l.eval(ev.x, t1)
	if !finite(g) || g == 0 {
		return Unresolved, math.NaN()
	}
	// The flow from the vanished equilibrium: up when g > 0.
	sgn := math.Copysign(1, g)
	xd, verdict := p.destination(ev.x, t1, sgn)
	if verdict != NotApplicable {
		return verdict, math.NaN()
	}
	back := tr.trace(xd, t1, -1, -backWindow)
	switch {
	case back.kind == Fold && p.allowed(back.t):
		return Reversible, back.t
	case back.kind == Fold:
		return Irreversible, back.t
	case back.kind == None && !p.allowed(-backWindow):
		// The new state persists through the allowed values' end.
		return Irreversible, math.NaN()
	case back.kind != None && !p.allowed(back.t):
		return Irreversible, math.NaN()
	}
	return Unresolved, math.NaN()
}

// marchCells is the number of cells per domain width in which
// destination marches.
const marchCells = 32

// destination follows the flow of g(·, t) from x, where g has the sign
// sgn, to the first equilibrium in that direction. It marches in cells of
// 1/32 of the domain evaluating g and ∂g/∂x: a sign change of g brackets
// the equilibrium, which is refined by a safeguarded Newton iteration
// (bisection whenever a step leaves the bracket); a cell where g keeps its
// sign but has a minimum of |g| inside (∂g/∂x turning against the flow
// and back), where a close pair or a touching root could hide, is
// searched by package steady. It returns the equilibrium and
// NotApplicable, or Escapes when the flow leaves the domain, or
// Unresolved when it meets a singular point or an equilibrium that is not
// a simple attracting one.
func (p *drawer) destination(x, t, sgn float64) (float64, Return) {
	l, tr := p.l, &p.tr
	h := tr.w / marchCells
	a := x
	pa := 0.0 // ∂φ/∂s at a, φ(s) = sgn·g(x + sgn·s); 0 at the vanished pair
	for range 2 * marchCells {
		end := tr.hi
		if sgn < 0 {
			end = tr.lo
		}
		if (end-a)*sgn <= 1e-12*tr.w {
			return 0, Escapes
		}
		b := a + sgn*h
		if (b-end)*sgn > 0 {
			b = end
		}
		fb, gxb := l.slope(b, t)
		if !finite(fb, gxb) {
			return 0, Unresolved
		}
		phiB, pb := sgn*fb, gxb
		if phiB <= 0 {
			xd, ok := p.refine(a, b, t, sgn)
			if !ok {
				return 0, Unresolved
			}
			return p.attracting(xd, t)
		}
		if pa < 0 && pb > 0 {
			// A minimum of φ inside: let the full search decide.
			lo, hi := math.Min(a, b), math.Max(a, b)
			res, err := p.fz.Find(frozen{l}, lo, hi)
			if err != nil || len(res.Poles) > 0 || len(res.Undefined) > 0 {
				return 0, Unresolved
			}
			if n := len(res.Equilibria); n > 0 {
				e := res.Equilibria[0]
				if sgn < 0 {
					e = res.Equilibria[n-1]
				}
				return p.attracting(e.X, t)
			}
		}
		a, pa = b, pb
	}
	return 0, Unresolved
}

// refine finds the root of g(·, t) between a (where sgn·g > 0) and b
// (where sgn·g ≤ 0).
func (p *drawer) refine(a, b, t, sgn float64) (float64, bool) {
	l := p.l
	lo, hi := a, b // φ(lo) > 0 ≥ φ(hi) along the flow
	x := b
	for k := 0; k < 60; k++ {
		g, gx := l.slope(x, t)
		if !finite(g, gx) {
			return x, false
		}
		if sgn*g > 0 {
			lo = x
		} else {
			hi = x
		}
		if g == 0 || math.Abs(hi-lo) <= 1e-13*p.tr.w {
			return x, true
		}
		nx := x - g/gx
		if !(gx != 0 && (nx-lo)*(nx-hi) < 0) {
			nx = lo + (hi-lo)/2
		}
		if math.Abs(nx-x) <= 1e-14*p.tr.w {
			return nx, true
		}
		x = nx
	}
	return x, false
}

// attracting accepts the destination x when it is a simple attracting
// equilibrium (∂g/∂x < 0, clearly non-zero).
func (p *drawer) attracting(x, t float64) (float64, Return) {
	_, gx := p.l.slope(x, t)
	h := p.tr.w / marchCells
	g0, _ := p.l.slope(x+h, t)
	if !(gx < 0) || math.Abs(gx)*h <= 1e-9*math.Abs(g0) {
		return x, Unresolved
	}
	return x, NotApplicable
}

// allowed reports whether d(t) lies in the driver's allowed values.
func (p *drawer) allowed(t float64) bool {
	d := p.l.driver(t)
	return d >= p.sw.allowed[0] && d <= p.sw.allowed[1]
}
