package assess

import (
	"math"

	"holdfast/assess/steady"
)

// tracker follows an equilibrium x*(θ) of f(x; θ) = 0 along the straight
// path θ(t) = θ₀ + t(θ₁ − θ₀), t ∈ [0, 1], from the nominal parameters to a
// draw's, by pseudo-arclength continuation (Keller 1977; Allgower & Georg,
// Introduction to Numerical Continuation Methods, SIAM 2003, §2.3 and
// ch. 5): the solution curve g(x, t) = f(x; θ(t)) = 0 is parametrised by
// arclength in the (x/W, t) plane, W being the domain width; each step
// predicts along the unit tangent and corrects by Newton's method on g = 0
// plus the arclength condition. Because the curve is followed through a
// fold rather than stopped before it, a fold shows itself cheaply as the
// tangent's t-component changing sign: the branch turns back, the
// equilibrium has met a partner and vanished, and it is lost in that draw.
// It is also lost when the curve leaves the domain.
//
// ∂g/∂t is a one-sided difference quotient (one extra evaluation per
// point); the corrector still converges to a point on the exact curve
// because the residual g is exact.
type tracker struct {
	f        *Func
	roots    []steady.Equilibrium // the draw's equilibria (t = 1), from the scan
	th0, th1 []float64            // endpoints of the path; f.Theta is the moving point
	lo, hi   float64              // domain
	calls    int                  // evaluations, for benchmarks and tests
}

const (
	maxArcSteps = 200
	newtonMax   = 8
	minArcStep  = 1e-7
	dtDiff      = 1e-7     // difference step in t for ∂g/∂t
	foldStep    = 1.0 / 16 // longest step after which a turn is taken for a fold
)

// at sets f.Theta = θ(t).
func (tr *tracker) at(t float64) {
	for j := range tr.f.Theta {
		tr.f.Theta[j] = tr.th0[j] + t*(tr.th1[j]-tr.th0[j])
	}
}

// slope evaluates g and ∂g/∂x at x for the θ last set.
func (tr *tracker) slope(x float64) (g, gx float64) {
	tr.calls++
	return tr.f.Slope(x)
}

// jet returns g, ∂g/∂x and ∂g/∂t at (x, t), leaving f.Theta at θ(t).
func (tr *tracker) jet(x, t float64) (g, gx, gt float64) {
	tr.at(t + dtDiff)
	tr.calls++
	g1 := tr.f.Eval(x)
	tr.at(t)
	g, gx = tr.slope(x)
	return g, gx, (g1 - g) / dtDiff
}

// follow continues the equilibrium x0 of g(·, 0), whose slope there is
// slope0, to t = 1. It returns the equilibrium of g(·, 1), the index of
// that equilibrium among tr.roots (−1 when Newton's method found a root the
// scan did not report), and true; or false when the branch meets a fold or
// leaves the domain. scale is the length in x over which the branch may be
// assumed isolated (half the gap to the neighbouring equilibria at t = 0):
// it sets the metric of the arclength, so that no accepted step moves x by
// more than a fraction of it beyond the prediction. f.Theta is left at θ₁.
//
// The last stretch to t = 1 lands on the draw's own roots: when exactly
// one root lies within the acceptance radius of the prediction and has the
// branch's slope sign, it is the branch's end (the branch keeps its slope
// sign up to a fold, and the radius is the one the distance test of every
// arclength step uses). Only when none is there does Newton's method look
// for a root the scan may have missed.
func (tr *tracker) follow(x0, slope0, scale float64) (x float64, idx int, ok bool) {
	defer tr.at(1)
	W := scale
	if !(W > 0) || !(tr.hi > tr.lo) || slope0 == 0 || math.IsNaN(slope0) {
		return math.NaN(), -1, false
	}
	// At t = 0 the point is the nominal equilibrium: g = 0 and ∂g/∂x is
	// its slope; ∂g/∂t needs one evaluation.
	tr.at(dtDiff)
	tr.calls++
	gt := tr.f.Eval(x0) / dtDiff
	if math.IsNaN(gt) || math.IsInf(gt, 0) {
		return math.NaN(), -1, false
	}
	gx := slope0
	// Work in u = x/W so that both coordinates are of order one.
	u, t := x0/W, 0.0
	tu, tt := tangent(gx*W, gt, 1)
	s := 1.0
	for step := 0; step < maxArcSteps; step++ {
		// Land when t = 1 is within reach: the arclength to it along the
		// tangent, (1 − t)/tt, may exceed the step by a quarter (a gentle
		// path reaches t = 1 in one step); the acceptance radius is that
		// arclength's half, as for a step.
		if land := (1 - t) / tt; land <= 1.25*s {
			up := u + (1-t)*tu/tt
			j, near := tr.rootNear(up*W, 0.5*land*W, gx)
			switch {
			case near == 1 && j >= 0:
				return tr.roots[j].X, j, true
			case near == 0 && s <= 1.0/16:
				// Nothing the scan found is there: look for a root it
				// may have missed, with the same distance test.
				x, ok := tr.newtonAt1(up*W, math.Copysign(1, gx))
				if ok && math.Abs(x/W-up) <= 0.5*s {
					x, ok = tr.inside(x)
					return x, -1, ok
				}
			}
			s /= 2
			if s < minArcStep {
				return math.NaN(), -1, false
			}
			continue
		}
		pu, pt := u+s*tu, t+s*tt
		nu, nt, ngx, gt1, ok := tr.correct(pu, pt, tu, tt, W)
		// Distance test (Allgower & Georg 2003, §6.1): a corrector that
		// moved far from the prediction may have reached another branch.
		if ok && math.Hypot(nu-pu, nt-pt) > 0.5*s {
			ok = false
		}
		if !ok {
			s /= 2
			if s < minArcStep {
				return math.NaN(), -1, false
			}
			continue
		}
		if nu*W < tr.lo-(tr.hi-tr.lo) || nu*W > tr.hi+(tr.hi-tr.lo) {
			return math.NaN(), -1, false // far outside: the branch left the domain
		}
		// The tangent from the last corrector iterate's derivatives: it
		// is within the convergence tolerance of the new point.
		ntu, ntt := tangent(ngx*W, gt1, 1)
		if ntu*tu+ntt*tt < 0 { // keep the orientation of the curve
			ntu, ntt = -ntu, -ntt
		}
		if ntt <= 0 || ngx*gx <= 0 {
			// The curve turned (or the slope changed sign): a fold, unless
			// a long step jumped onto another branch. Believe it only
			// after a short step.
			if s > foldStep {
				s /= 2
				continue
			}
			return math.NaN(), -1, false // turned back at a fold
		}
		u, t, tu, tt = nu, nt, ntu, ntt
		s = math.Min(2*s, 1)
	}
	return math.NaN(), -1, false
}

// rootNear counts the draw's roots within r of x and returns the index of
// the nearest one whose slope has the sign of slope (−1 if that one has
// another sign or is not hyperbolic).
func (tr *tracker) rootNear(x, r, slope float64) (j, n int) {
	j = -1
	best := math.Inf(1)
	for k := range tr.roots {
		d := math.Abs(tr.roots[k].X - x)
		if d > r {
			continue
		}
		n++
		if d < best {
			best = d
			j = k
		}
	}
	if j >= 0 && (tr.roots[j].Order != 1 || tr.roots[j].Slope*slope <= 0) {
		j = -1
	}
	return j, n
}

// tangent returns the unit vector (−gt, gu), the direction in which g
// stays zero, oriented so that its t-component has the sign of dir.
func tangent(gu, gt, dir float64) (tu, tt float64) {
	n := math.Hypot(gu, gt)
	tu, tt = -gt/n, gu/n
	if tt*dir < 0 || (tt == 0 && tu < 0) {
		tu, tt = -tu, -tt
	}
	return tu, tt
}

// correct solves g(uW, t) = 0 and (u − pu)·tu + (t − pt)·tt = 0 by Newton's
// method from the predicted point (pu, pt).
func (tr *tracker) correct(pu, pt, tu, tt, W float64) (u, t, gx, gt float64, ok bool) {
	u, t = pu, pt
	prev := math.Inf(1)
	for k := 0; k < newtonMax; k++ {
		g, gxk, gt := tr.jet(u*W, t)
		if math.IsNaN(g) || math.IsNaN(gxk) || math.IsNaN(gt) {
			return u, t, gxk, gt, false
		}
		gu := gxk * W
		// [gu gt; tu tt] [du dt] = −[g; (u−pu)tu + (t−pt)tt]
		r2 := (u-pu)*tu + (t-pt)*tt
		det := gu*tt - gt*tu
		if det == 0 {
			return u, t, gxk, gt, false
		}
		du := (-g*tt + gt*r2) / det
		dt := (-gu*r2 + g*tu) / det
		u += du
		t += dt
		size := math.Abs(du) + math.Abs(dt)
		if size <= 1e-13*(1+math.Abs(u)) {
			return u, t, gxk, gt, true
		}
		// Contraction test (Allgower & Georg 2003, §6.1): Newton must
		// converge at least linearly with rate ½ from the start.
		if size > 0.5*prev {
			return u, t, gxk, gt, false
		}
		prev = size
	}
	return u, t, 0, 0, false
}

// newtonAt1 solves g(x, 1) = 0 by Newton's method from x, keeping the
// slope's sign.
func (tr *tracker) newtonAt1(x, sgn float64) (float64, bool) {
	tr.at(1)
	for k := 0; k < newtonMax; k++ {
		g, gx := tr.slope(x)
		if math.IsNaN(g) || gx*sgn <= 0 {
			return x, false
		}
		dx := g / gx
		x -= dx
		if math.Abs(dx) <= 1e-13*math.Max(1, math.Abs(x)) {
			return x, true
		}
	}
	return x, false
}

// inside reports the equilibrium when it lies in the domain (with a
// rounding tolerance at the ends).
func (tr *tracker) inside(x float64) (float64, bool) {
	tol := 1e-12 * (tr.hi - tr.lo)
	if x < tr.lo-tol || x > tr.hi+tol {
		return x, false
	}
	return math.Min(math.Max(x, tr.lo), tr.hi), true
}
