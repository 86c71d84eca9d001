package tipping

import (
	"math"
)

// Kind is what ends a branch's run along the sweep.
type Kind int

const (
	// None: the branch reaches the end of the range without an event
	// ("no tipping in range").
	None Kind = iota
	// Fold: the equilibrium meets another at a fold (saddle-node, f = 0
	// and ∂f/∂x = 0 with ∂f/∂d ≠ 0) and vanishes.
	Fold
	// Exchange: ∂f/∂x changes sign where two branches of equilibria cross
	// (f, ∂f/∂x and ∂f/∂d all vanish): the equilibrium persists but
	// exchanges stability with the crossing branch.
	Exchange
	// Boundary: the branch leaves the state's domain.
	Boundary
	// Absent: the tracked equilibrium does not exist at the start of the
	// range (it is lost at or before the start).
	Absent
	// Failed: the draw could not be assessed (see the failure reasons).
	Failed
	numKinds
)

var kindNames = [numKinds]string{"none", "fold", "exchange", "boundary", "absent", "failed"}

// String returns "none", "fold", "exchange", "boundary", "absent" or
// "failed".
func (k Kind) String() string {
	if k >= 0 && k < numKinds {
		return kindNames[k]
	}
	return "Kind(?)"
}

// event is where a branch's run ended, in the continuation's coordinates.
type event struct {
	kind   Kind
	x, t   float64
	reason reason // for Failed
}

// reason codes a continuation failure.
type reason int

const (
	noReason reason = iota
	reasonUndefined
	reasonStalled
	reasonBudget
	reasonEngine // the engine's own failure; its text is in the draw record
	reasonNonHyperbolic
	numReasons
)

var reasonNames = [numReasons]string{
	"", "rate law not finite along the branch", "continuation stalled (step size underflow)",
	"continuation step budget exhausted", "", "tracked equilibrium not hyperbolic at the start",
}

// Continuation settings.
const (
	maxArcSteps = 4000
	minArcStep  = 1e-10
	corrIter    = 10
	// corrTol ends a corrector: Newton's steps shrink quadratically, so
	// the point is then accurate far beyond what event detection needs
	// (events are located afresh).
	corrTol = 1e-7
	// sMax bounds a step in the (x/W, t) metric.
	sMax = 0.5
	// cosMin bounds the turn of the unit tangent in one step (about 14°),
	// which keeps steps short where the branch curves, at folds above all.
	cosMin = 0.97
	// natural is the least |t-component| of the tangent at which a step
	// is corrected at fixed t (natural parameter) rather than along the
	// arclength hyperplane.
	natural = 0.5
	// shortcutAt is the |t-component| of the tangent below which a turn
	// toward a fold is first cut short (see shortcut), and shortcutReach
	// how far away in the (x/W, t) metric the fold may then lie.
	shortcutAt    = 0.97
	shortcutReach = 0.2
	// dMax bounds the corrector's move away from the (second-order)
	// prediction: a step that jumps across a pair of folds to another
	// branch lands about the jump's width away from the prediction, so
	// jumps wider than dMax·W are refused (see the package documentation).
	dMax = 1.0 / 64
)

// tracer follows a branch of g(x, t) = 0 by pseudo-arclength continuation
// (Keller 1977; Allgower & Georg, Introduction to Numerical Continuation
// Methods, SIAM 2003, ch. 2 and 6) in the plane (u, t), u = x/W with W the
// width of the state's domain, so that both coordinates are of order one.
// Each step predicts to second order along the unit tangent and its rate of
// turn (estimated from the last two tangents), corrects by Newton's method
// (at fixed t where the branch is a graph over t, else on g = 0 plus the
// arclength condition), and is accepted when the corrector contracts,
// lands within min(s/2, W/64) of the prediction (distance test) and turns
// the tangent by less than about 14° (angle test); the next step is sized
// from the observed prediction error and turn, and a rejected step is
// halved. Where the branch turns toward a fold, the fold is solved for
// directly (shortcut) instead of being approached by ever shorter steps.
//
// The tangent's orientation is carried from step to step, so that its
// t-component changes sign exactly at a turning point; ∂g/∂x changes sign
// at every point where the branch loses or gains stability. A sign change
// of ∂g/∂x with a turn is a fold, or (when ∂g/∂t vanishes there too) a
// pitchfork-like branch point; without a turn it is a transcritical
// crossing. Both are located precisely (see locate).
type tracer struct {
	l      *law
	lo, hi float64 // state domain
	w      float64 // x scale
	steps  int     // accepted steps, for tests and benchmarks
}

// point is an accepted point of the branch with its derivatives and
// oriented unit tangent.
type point struct {
	u, t, gx, gt, tu, tt float64
}

func finite(v ...float64) bool {
	for _, x := range v {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return false
		}
	}
	return true
}

// tangent returns the unit vector (−gt, gu), along which g stays zero,
// oriented so that its t-component has the sign of dir.
func tangent(gu, gt, dir float64) (tu, tt float64) {
	n := math.Hypot(gu, gt)
	tu, tt = -gt/n, gu/n
	if tt*dir < 0 || (tt == 0 && tu*dir < 0) {
		tu, tt = -tu, -tt
	}
	return tu, tt
}

// trace follows the branch through the equilibrium x0 of g(·, t0) in the
// direction of t given by dir (+1 or −1) until t reaches tEnd or an event
// ends it.
func (tr *tracer) trace(x0, t0, dir, tEnd float64) event {
	l, W := tr.l, tr.w
	// Polish the starting equilibrium (the engine's is accurate; a
	// destination found after a fold may be a little less so).
	x := x0
	for k := 0; k < 4; k++ {
		g, gx := l.slope(x, t0)
		if !finite(g, gx) || gx == 0 {
			break
		}
		dx := g / gx
		if math.Abs(dx) > 1e-6*W {
			break
		}
		x -= dx
		if math.Abs(dx) <= 1e-15*W {
			break
		}
	}
	g, gx, gt := l.grad(x, t0)
	if !finite(g, gx, gt) {
		return event{kind: Failed, x: x, t: t0, reason: reasonUndefined}
	}
	if gx == 0 {
		// A non-hyperbolic start: the branch is vertical in t here, at a
		// fold or a crossing already.
		return event{kind: Failed, x: x, t: t0, reason: reasonNonHyperbolic}
	}
	tu, tt := tangent(gx*W, gt, dir)
	cur := point{u: x / W, t: t0, gx: gx, gt: gt, tu: tu, tt: tt}
	if tt*dir < 1e-12 {
		return event{kind: Failed, x: x, t: t0, reason: reasonNonHyperbolic}
	}
	s := sMax / 2
	var ku, kt float64 // curvature vector dT/dσ from the last two tangents
	tryAt := shortcutAt
	for step := 0; step < maxArcSteps; step++ {
		var nxt point
		var ok, last bool
		var pu, pt, sig float64
		switch {
		case (tEnd-cur.t)*dir <= s*cur.tt*dir:
			// The step reaches the end of the range: land on t = tEnd.
			sig = (tEnd - cur.t) / cur.tt
			if sig <= minArcStep {
				return event{kind: None, x: cur.u * W, t: cur.t}
			}
			pu, pt = cur.u+sig*cur.tu+0.5*sig*sig*ku, tEnd
			nxt, ok = tr.land(pu, tEnd)
			last = true
		case math.Abs(cur.tt) >= natural:
			// Away from turns the branch is a graph over t: correct at
			// fixed t, which needs only ∂g/∂x.
			sig = s
			pu, pt = cur.u+s*cur.tu+0.5*s*s*ku, cur.t+s*cur.tt+0.5*s*s*kt
			nxt, ok = tr.land(pu, pt)
		default:
			sig = s
			pu, pt = cur.u+s*cur.tu+0.5*s*s*ku, cur.t+s*cur.tt+0.5*s*s*kt
			nxt, ok = tr.correct(pu, pt, cur.tu, cur.tt)
		}
		// Distance test (Allgower & Georg 2003, §6.1): a corrector that
		// moved far from the prediction may have reached another branch.
		// The corrector's own tolerance sets a floor (a point next to a
		// kink may be off the branch by about that much).
		if ok && math.Hypot(nxt.u-pu, nxt.t-pt) > math.Max(math.Min(0.5*sig, dMax), 10*corrTol*(1+math.Abs(pu)+math.Abs(pt))) {
			ok = false
		}
		var grow float64
		if ok {
			nxt.tu, nxt.tt = tangent(nxt.gx*W, nxt.gt, 1)
			cos := nxt.tu*cur.tu + nxt.tt*cur.tt
			if cos < 0 { // keep the orientation
				nxt.tu, nxt.tt, cos = -nxt.tu, -nxt.tt, -cos
			}
			if !finite(nxt.tu, nxt.tt) {
				ok = false
			} else if cos < cosMin && sig > 1e-6 {
				ok = false // turned too far: shorten
			} else {
				// Next step from the observed prediction error and turn,
				// aiming at half of each limit (Allgower & Georg 2003,
				// §6.1): the error grows like σ², the angle like σ.
				dist := math.Hypot(nxt.u-pu, nxt.t-pt)
				angle := math.Acos(math.Min(cos, 1))
				grow = 2.0
				if dist > 0 {
					grow = math.Min(grow, math.Sqrt(0.5*dMax/dist))
				}
				if angle > 0 {
					grow = math.Min(grow, 0.5*math.Acos(cosMin)/angle)
				}
				grow = math.Max(grow, 0.5)
			}
		}
		if !ok {
			s = sig / 2
			if s < minArcStep {
				return event{kind: Failed, x: cur.u * W, t: cur.t, reason: tr.why(pu, pt)}
			}
			continue
		}
		if ev, found, retry := tr.events(&cur, &nxt, dir, tEnd); retry {
			s = sig / 2
			if s < minArcStep {
				return event{kind: Failed, x: cur.u * W, t: cur.t, reason: reasonStalled}
			}
			continue
		} else if found {
			return ev
		}
		tr.steps++
		if last {
			return event{kind: None, x: nxt.u * W, t: tEnd}
		}
		ku, kt = 0, 0
		if h := math.Hypot(nxt.u-cur.u, nxt.t-cur.t); h > 0 && nxt.tu*cur.tu+nxt.tt*cur.tt >= cosMin {
			// A sharper turn was let through only for a tiny step: a kink
			// of a non-smooth rate law (abs, min, max), where the tangent
			// jumps and a rate of turn means nothing.
			ku, kt = (nxt.tu-cur.tu)/h, (nxt.tt-cur.tt)/h
		}
		cur = nxt
		// Turning toward a fold that the tangent's rate of turn puts
		// within reach: try to reach it in one Newton solve.
		if at := math.Abs(cur.tt); at < tryAt && cur.tt*kt < 0 {
			tryAt = 0.9 * at
			if ev, ok := tr.shortcut(&cur, dir, tEnd); ok {
				return ev
			}
		}
		s = math.Min(grow*sig, sMax)
	}
	return event{kind: Failed, x: cur.u * W, t: cur.t, reason: reasonBudget}
}

// shortcut tries to reach the fold the branch is turning toward from the
// accepted point p in one solve of the fold conditions (newtonFold),
// instead of many short steps around it. The fold is accepted only when
// it lies ahead of p along the branch, within shortcutReach, inside the
// range and the domain, is a genuine fold (∂g/∂t ≠ 0), is approached from
// the side the sign of ∂g/∂x at p says (∂g/∂x ≈ g_xx·(x − x_f)), and the
// branch point midway, projected perpendicular to the chord, keeps that
// sign: no other stability change lies between.
func (tr *tracer) shortcut(p *point, dir, tEnd float64) (event, bool) {
	W := tr.w
	x, t, gt, gxx, ok := tr.newtonFold(p.u*W, p.t, 8)
	if !ok {
		return event{}, false
	}
	du, dt := x/W-p.u, t-p.t
	dist := math.Hypot(du, dt)
	tol := 1e-9 * (tr.hi - tr.lo)
	switch {
	case dist > shortcutReach || du*p.tu+dt*p.tt < 0 || dt*dir < 0 || (t-tEnd)*dir > 0:
		return event{}, false
	case x < tr.lo-tol || x > tr.hi+tol:
		return event{}, false
	case math.Abs(gt) <= 1e-4*math.Hypot(p.gx*W, p.gt):
		return event{}, false
	case p.gx*gxx*(p.u*W-x) <= 0:
		return event{}, false
	}
	if dist > 0 {
		// The branch midway, reached from the chord's midpoint by one
		// Newton step perpendicular to the chord, must keep the sign of
		// ∂g/∂x.
		mu, mt := p.u+du/2, p.t+dt/2
		m, ok := tr.step(mu, mt, du/dist, dt/dist)
		if !ok || m.gx*p.gx <= 0 || math.Hypot(m.u-mu, m.t-mt) > 0.5*dist {
			return event{}, false
		}
		if xm := m.u * W; xm < tr.lo-tol || xm > tr.hi+tol {
			return event{}, false
		}
	}
	return event{kind: Fold, x: x, t: t}, true
}

// why tells a failed step's cause: the rate law undefined at the
// predicted point, or a stall.
func (tr *tracer) why(pu, pt float64) reason {
	if g := tr.l.eval(pu*tr.w, pt); !finite(g) {
		return reasonUndefined
	}
	return reasonStalled
}

// correct solves g(uW, t) = 0 and (u − pu)·tu + (t − pt)·tt = 0 by Newton's
// method from the predicted point (pu, pt). It requires the steps to
// contract at least linearly with rate ½ from the start (Allgower & Georg
// 2003, §6.1), forgiving one step that does not (the step that crosses a
// kink of a non-smooth rate law, where ∂g/∂x jumps).
func (tr *tracer) correct(pu, pt, tu, tt float64) (point, bool) {
	W := tr.w
	u, t := pu, pt
	prev, grace := math.Inf(1), 1
	for k := 0; k < corrIter; k++ {
		g, gx, gt := tr.l.grad(u*W, t)
		if !finite(g, gx, gt) {
			return point{}, false
		}
		gu := gx * W
		r2 := (u-pu)*tu + (t-pt)*tt
		det := gu*tt - gt*tu
		if det == 0 {
			return point{}, false
		}
		du := (-g*tt + gt*r2) / det
		dt := (-gu*r2 + g*tu) / det
		u += du
		t += dt
		size := math.Abs(du) + math.Abs(dt)
		if size <= corrTol*(1+math.Abs(u)+math.Abs(t)) {
			// Quadratic convergence: the point is now accurate to about
			// the square of this step; the derivatives are those of the
			// last iterate.
			return point{u: u, t: t, gx: gx, gt: gt}, true
		}
		if size > 0.5*prev {
			if grace--; grace < 0 {
				return point{}, false
			}
		}
		prev = size
	}
	return point{}, false
}

// step takes one Newton step of correct from (pu, pt) and returns the
// point reached with ∂g/∂x there.
func (tr *tracer) step(pu, pt, tu, tt float64) (point, bool) {
	W := tr.w
	g, gx, gt := tr.l.grad(pu*W, pt)
	det := gx*W*tt - gt*tu
	if !finite(g, gx, gt) || det == 0 {
		return point{}, false
	}
	u, t := pu-g*tt/det, pt+g*tu/det
	_, gx = tr.l.slope(u*W, t)
	return point{u: u, t: t, gx: gx}, finite(gx)
}

// land solves g(uW, t) = 0 at fixed t by Newton's method from u = pu,
// with the contraction test of correct.
func (tr *tracer) land(pu, t float64) (point, bool) {
	W := tr.w
	x := pu * W
	prev, grace := math.Inf(1), 1
	for k := 0; k < corrIter; k++ {
		g, gx := tr.l.slope(x, t)
		if !finite(g, gx) || gx == 0 {
			return point{}, false
		}
		dx := g / gx
		x -= dx
		if math.Abs(dx) <= corrTol*(W+math.Abs(x)) {
			g, gx, gt := tr.l.grad(x, t)
			if !finite(g, gx, gt) {
				return point{}, false
			}
			return point{u: x / W, t: t, gx: gx, gt: gt}, true
		}
		if math.Abs(dx) > 0.5*prev {
			if grace--; grace < 0 {
				return point{}, false
			}
		}
		prev = math.Abs(dx)
	}
	return point{}, false
}

// events checks the step from a to b for a stability change (∂g/∂x
// changing sign) and for an exit from the state's domain, and locates the
// first. retry asks for a shorter step: the located event lies beyond tEnd,
// so the step reached the end on another branch.
func (tr *tracer) events(a, b *point, dir, tEnd float64) (ev event, found, retry bool) {
	W := tr.w
	tol := 1e-9 * (tr.hi - tr.lo)
	xb := b.u * W
	out := xb < tr.lo-tol || xb > tr.hi+tol
	turned := b.tt*dir <= 0
	crossed := a.gx*b.gx <= 0
	if !out && !turned && !crossed {
		return event{}, false, false
	}
	lamG := math.Inf(1)
	if turned || crossed {
		lamG = 1.0
		if d := a.gx - b.gx; d != 0 {
			lamG = math.Min(math.Max(a.gx/d, 0), 1)
		}
	}
	lamB := math.Inf(1)
	edge := tr.lo
	if out {
		if xb > tr.hi+tol {
			edge = tr.hi
		}
		lamB = 1.0
		if d := b.u - a.u; d != 0 {
			lamB = math.Min(math.Max((edge/W-a.u)/d, 0), 1)
		}
	}
	if lamB < lamG-1e-9 {
		ev = tr.boundary(a, b, edge, lamB)
	} else {
		ev = tr.locate(a, b, turned, crossed, lamG)
	}
	if (ev.t-tEnd)*dir > 0 {
		return event{}, false, true
	}
	return ev, true, false
}

// locate finds the point between a and b where the branch's stability
// changes. At a turn with a sign change of ∂g/∂x it solves the fold
// conditions g = 0, ∂g/∂x = 0 together by Newton's method on the 2×2 system
// in (x, t), whose Jacobian [[g_x, g_t], [g_xx, g_xt]] is regular at a fold
// (g_t ≠ 0, g_xx ≠ 0; Seydel, Practical Bifurcation and Stability Analysis,
// 3rd ed., Springer 2010, §5.5, the direct method for turning points), so
// it converges quadratically. A turning point where ∂g/∂t vanishes as well
// is a branch point, where the branch meets another: so is a turn without
// a sign change of ∂g/∂x (a pitchfork), and a sign change without a turn
// is a transcritical crossing. These are exchanges of stability, located
// along the chord from a to b by bisection on the sign of ∂g/∂x, or of the
// tangent's t-component at a pitchfork.
func (tr *tracer) locate(a, b *point, turned, crossed bool, lam float64) event {
	W := tr.w
	chord := math.Hypot(b.u-a.u, b.t-a.t)
	scale := math.Max(math.Hypot(a.gx*W, a.gt), math.Hypot(b.gx*W, b.gt))
	if turned && !crossed {
		x, t := tr.chordSearch(a, b, lam, true)
		return event{kind: Exchange, x: x, t: t}
	}
	if turned {
		x0 := (a.u + lam*(b.u-a.u)) * W
		t0 := a.t + lam*(b.t-a.t)
		x, t, gt, _, ok := tr.newtonFold(x0, t0, 30)
		near := func(p *point) bool { return math.Hypot(x/W-p.u, t-p.t) <= 2*chord+1e-12 }
		if ok && near(a) && near(b) && math.Abs(gt) > 1e-4*scale {
			return event{kind: Fold, x: x, t: t}
		}
	}
	x, t := tr.chordSearch(a, b, lam, false)
	if turned {
		if _, _, gt := tr.l.grad(x, t); math.Abs(gt) > 1e-4*scale {
			return event{kind: Fold, x: x, t: t}
		}
	}
	return event{kind: Exchange, x: x, t: t}
}

// newtonFold solves g(x, t) = 0, ∂g/∂x(x, t) = 0 by Newton's method from
// (x, t) in at most iters steps. The steps use the Jacobian [[g_x, g_t],
// [g_xx, g_xt]] with g_xx from Taylor arithmetic and the t-derivatives by
// a forward difference (law.jetFD), which is cheaper and, the residual
// being exact, converges to the same point; once the steps are small, the
// last one uses the exact Jacobian (law.jet, with ParamGrad), so that the
// solution and ∂g/∂t, ∂²g/∂x² returned with it are exact up to rounding.
func (tr *tracer) newtonFold(x, t float64, iters int) (xf, tf, gt, gxx float64, ok bool) {
	W := tr.w
	exact := false
	for k := 0; k < iters; k++ {
		var g, gx, gxt float64
		if exact {
			g, gx, gxx, gt, gxt = tr.l.jet(x, t)
		} else {
			g, gx, gxx, gt, gxt = tr.l.jetFD(x, t)
		}
		det := gx*gxt - gt*gxx
		if !finite(g, gx, gxx, gt, gxt, det) || det == 0 {
			return x, t, gt, gxx, false
		}
		dx := (-g*gxt + gt*gx) / det
		dt := (-gx*gx + gxx*g) / det
		x += dx
		t += dt
		size := math.Abs(dx)/W + math.Abs(dt)
		scale := 1 + math.Abs(x)/W + math.Abs(t)
		if exact && (size <= 1e-13*scale || k >= iters-1) {
			// The exact step from within 1e-6 leaves an error of order
			// 1e-12 or less; gt and gxx are those of the last iterate.
			return x, t, gt, gxx, size <= 1e-9*scale
		}
		if size <= 1e-6*scale {
			exact = true
		}
	}
	return x, t, 0, 0, false
}

// chordSearch bisects along the chord from a to b, projecting each chord
// point onto the branch perpendicular to the chord, on the sign of ∂g/∂x,
// or with byTurn on the sign of the t-component of the tangent oriented
// along the chord. It returns the last point found (the linear estimate
// lam when no projection succeeds).
func (tr *tracer) chordSearch(a, b *point, lam float64, byTurn bool) (x, t float64) {
	W := tr.w
	du, dt := b.u-a.u, b.t-a.t
	n := math.Hypot(du, dt)
	x, t = (a.u+lam*du)*W, a.t+lam*dt
	if n == 0 {
		return x, t
	}
	cu, ct := du/n, dt/n
	side := func(p *point) bool {
		if !byTurn {
			return p.gx*a.gx > 0
		}
		tu, tt := tangent(p.gx*W, p.gt, 1)
		if tu*cu+tt*ct < 0 {
			tt = -tt
		}
		return tt*a.tt > 0
	}
	lo, hi := 0.0, 1.0
	for it := 0; it < 60 && hi-lo > 1e-13; it++ {
		mid := (lo + hi) / 2
		p, ok := tr.correct(a.u+mid*du, a.t+mid*dt, cu, ct)
		if !ok {
			break
		}
		x, t = p.u*W, p.t
		if side(&p) {
			lo = mid
		} else {
			hi = mid
		}
	}
	return x, t
}

// boundary locates where the branch reaches the domain end edge between a
// and b: the root in t of g(edge, t), by Newton's method from the linear
// estimate.
func (tr *tracer) boundary(a, b *point, edge, lam float64) event {
	t := a.t + lam*(b.t-a.t)
	t0, t1 := math.Min(a.t, b.t), math.Max(a.t, b.t)
	span := math.Max(t1-t0, 1e-12)
	tt := t
	for k := 0; k < 20; k++ {
		g, _, gt := tr.l.grad(edge, tt)
		if !finite(g, gt) || gt == 0 {
			break
		}
		d := g / gt
		tt -= d
		if tt < t0-span || tt > t1+span {
			break
		}
		if math.Abs(d) <= 1e-13*(1+math.Abs(tt)) {
			t = tt
			break
		}
	}
	return event{kind: Boundary, x: edge, t: t}
}
