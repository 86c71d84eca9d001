package steady

import (
	"math"
	"slices"
)

// binom[j][k] = C(j, k) for j, k < MaxTaylor.
var binom = [MaxTaylor][MaxTaylor]float64{
	{1},
	{1, 1},
	{1, 2, 1},
	{1, 3, 3, 1},
	{1, 4, 6, 4, 1},
	{1, 5, 10, 10, 5, 1},
	{1, 6, 15, 20, 15, 6, 1},
	{1, 7, 21, 35, 35, 21, 7, 1},
}

const (
	noteTouch = "touching root: f reaches zero within its error bound without a resolvable sign change " +
		"(a double root, or a close pair or near miss that floating point cannot resolve)"
	noteSpan  = "f vanishes identically (within its error bound) on Span"
	noteRough = "Taylor coefficients of f are not finite at this root: the derivative test cannot decide"
)

// classify applies the derivative test of DESIGN.md to a candidate.
func (fz *Finder) classify(cd *cand) {
	if cd.cont {
		cd.cls, cd.order, cd.side, cd.slope, cd.delta = Degenerate, 0, None, 0, 0
		return
	}
	// Quick path: the refinement's data already show a clearly
	// non-vanishing slope.
	if cd.data && !cd.touch {
		c, e := &cd.c, &cd.e
		if finite(c[0]) && finite(c[1]) && finite(c[2]) && finite(e[0]) && finite(e[1]) && finite(e[2]) && c[1] != 0 {
			d := fmax(cd.dloc, (math.Abs(c[0])+e[0])/math.Abs(c[1]))
			thr := e[1] + 4*(math.Abs(c[2])+e[2])*d
			if math.Abs(c[1]) > 4*thr {
				cd.order, cd.side, cd.slope, cd.delta = 1, None, c[1], d
				cd.cls = Unstable
				if c[1] < 0 {
					cd.cls = Stable
				}
				return
			}
		}
	}
	fz.taylor(cd.x, MaxTaylor)
	c, e := fz.c, fz.e
	a0 := math.Abs(c[0]) + e[0]
	dd := math.Inf(1)
	for k := 1; k < MaxTaylor; k++ {
		ak := math.Abs(c[k])
		if ak > e[k] && finite(ak) && finite(a0) {
			dd = fmin(dd, math.Pow(a0/ak, 1/float64(k)))
		}
	}
	d := cd.dloc
	if finite(dd) {
		d = fmax(d, dd)
	}
	var tail [MaxTaylor]float64
	n := deciding(&c, &e, &tail, 2*d)
	if n != 1 && d > 0 {
		// The coefficients beyond c_7 are unknown; bound their effect on
		// c_k from Taylor data at x* ± η: what the known terms do not
		// explain is the tail, which scales at least as η^(8−k).
		eta := fmax(4*d, 1e-3*fz.h0)
		for _, dir := range [2]float64{-1, 1} {
			xs := cd.x + dir*eta
			if xs < fz.lo || xs > fz.hi {
				continue
			}
			fz.taylor(xs, MaxTaylor)
			h := dir * eta
			for k := 1; k < MaxTaylor; k++ {
				known, p := 0.0, 1.0
				for j := k; j < MaxTaylor; j++ {
					known += binom[j][k] * c[j] * p
					p *= h
				}
				r := math.Abs(fz.c[k]-known) * math.Pow(2*d/eta, float64(MaxTaylor-k))
				if finite(r) {
					tail[k] = fmax(tail[k], r)
				}
			}
		}
		n = deciding(&c, &e, &tail, 2*d)
	}
	cd.order, cd.slope, cd.delta, cd.side = n, c[1], d, None
	switch {
	case n == 0:
		cd.cls = Degenerate
		for k := 1; k < MaxTaylor; k++ {
			cd.rough = cd.rough || math.IsNaN(c[k])
		}
	case n%2 == 1 && c[n] < 0:
		cd.cls = Stable
	case n%2 == 1:
		cd.cls = Unstable
	default:
		cd.cls = Semistable
		cd.side = Below
		if c[n] < 0 {
			cd.side = Above
		}
	}
	if finite(c[0]) && finite(c[1]) && finite(c[2]) {
		copy(cd.c[:], c[:3])
		copy(cd.e[:], e[:3])
		cd.data = true
	}
}

// deciding returns the order n ≥ 1 of the first Taylor coefficient that
// does not vanish, or 0 when c_1..c_7 all vanish: c_k vanishes when
// |c_k| ≤ e_k + Σ_{j>k} C(j,k)|c_j| d2^(j−k) + tail_k.
func deciding(c, e, tail *[MaxTaylor]float64, d2 float64) int {
	for k := 1; k < MaxTaylor; k++ {
		ck := c[k]
		if math.IsNaN(ck) {
			continue
		}
		if math.IsInf(ck, 0) {
			return k
		}
		thr := e[k] + tail[k]
		p := d2
		for j := k + 1; j < MaxTaylor; j++ {
			if t := binom[j][k] * math.Abs(c[j]) * p; finite(t) {
				thr += t
			}
			p *= d2
		}
		if math.Abs(ck) > thr {
			return k
		}
	}
	return 0
}

// item is one element of the phase line: an equilibrium (eq ≥ 0) or a
// singular place (pole or undefined interval, eq < 0).
type item struct {
	lo, hi float64
	eq     int
}

// segment is the open interval between neighbouring items.
type segment struct {
	L, R     float64
	sign     int
	integral float64
	done     bool
}

// assemble classifies and merges the candidates, tidies the singular
// places, builds the phase line and computes the per-equilibrium figures.
func (fz *Finder) assemble() {
	// Point candidates inside a continuum found by the scan are covered by it.
	keep := fz.cands[:0]
	for _, cd := range fz.cands {
		if cd.cont || !fz.inContinuum(cd.x) {
			keep = append(keep, cd)
		}
	}
	fz.cands = keep
	if !slices.IsSortedFunc(fz.cands, cmpCand) {
		slices.SortStableFunc(fz.cands, cmpCand)
	}
	lastDeg := math.Inf(-1)
	for i := range fz.cands {
		cd := &fz.cands[i]
		if !cd.cont && cd.x <= lastDeg+fz.tol(cd.x) {
			// Inside the zero span of the previous degenerate candidate:
			// merged below without a second span search.
			cd.cls, cd.span = Degenerate, [2]float64{cd.x, cd.x}
			continue
		}
		fz.classify(cd)
		if cd.cls == Degenerate {
			if !cd.cont {
				cd.span = [2]float64{fz.zeroEdge(cd.x, -1), fz.zeroEdge(cd.x, +1)}
				cd.x = 0.5 * (cd.span[0] + cd.span[1])
			}
			lastDeg = cd.span[1]
		}
	}
	if !math.IsInf(lastDeg, -1) {
		// A span search moved a candidate's lower edge.
		slices.SortStableFunc(fz.cands, cmpCand)
	}
	out := fz.cands[:0]
	for _, cd := range fz.cands {
		if k := len(out); k > 0 {
			last := &out[k-1]
			gap := cd.span[0] - last.span[1]
			if gap <= fmax(last.delta, cd.delta)+fz.tol(cd.x) {
				mergeCand(last, &cd)
				continue
			}
		}
		out = append(out, cd)
	}
	fz.cands = out
	fz.tidySingular()
	fz.phaseLine()
}

func cmpCand(a, b cand) int {
	switch {
	case a.span[0] < b.span[0]:
		return -1
	case a.span[0] > b.span[0]:
		return 1
	}
	return 0
}

// mergeCand folds b into a (duplicates of one equilibrium).
func mergeCand(a, b *cand) {
	if a.cls == Degenerate || b.cls == Degenerate {
		a.span[0] = fmin(a.span[0], b.span[0])
		a.span[1] = fmax(a.span[1], b.span[1])
		a.x = 0.5 * (a.span[0] + a.span[1])
		a.cls, a.order, a.side, a.slope = Degenerate, 0, None, 0
		a.cont = a.cont || b.cont
		a.delta = fmax(a.delta, b.delta)
		return
	}
	keepB := b.touch && !a.touch
	if a.touch == b.touch {
		keepB = a.data && b.data && math.Abs(b.c[0]) < math.Abs(a.c[0])
	}
	d := fmax(a.delta, b.delta)
	if keepB {
		*a = *b
	}
	a.delta = d
}

// tidySingular sorts and merges undefined intervals and poles.
func (fz *Finder) tidySingular() {
	slices.SortFunc(fz.undef, func(a, b Interval) int {
		switch {
		case a.Lo < b.Lo:
			return -1
		case a.Lo > b.Lo:
			return 1
		}
		return 0
	})
	u := fz.undef[:0]
	for _, iv := range fz.undef {
		if k := len(u); k > 0 && iv.Lo <= u[k-1].Hi+2*fz.tol(iv.Lo) {
			u[k-1].Hi = fmax(u[k-1].Hi, iv.Hi)
			continue
		}
		u = append(u, iv)
	}
	fz.undef = u
	slices.Sort(fz.poles)
	p := fz.poles[:0]
	for _, x := range fz.poles {
		if k := len(p); k > 0 && x-p[k-1] <= 2*fz.tol(x)+1e-9*fz.h0 {
			continue
		}
		inside := false
		for _, iv := range fz.undef {
			if x >= iv.Lo-2*fz.tol(x) && x <= iv.Hi+2*fz.tol(x) {
				inside = true
				break
			}
		}
		if !inside {
			p = append(p, x)
		}
	}
	fz.poles = p
}

// phaseLine builds the equilibria with their phase-line checks, basins and
// barriers.
func (fz *Finder) phaseLine() {
	// Items in order.
	fz.items = fz.items[:0]
	ie, ip, iu := 0, 0, 0
	for ie < len(fz.cands) || ip < len(fz.poles) || iu < len(fz.undef) {
		best, which := math.Inf(1), -1
		if ie < len(fz.cands) && fz.cands[ie].span[0] < best {
			best, which = fz.cands[ie].span[0], 0
		}
		if ip < len(fz.poles) && fz.poles[ip] < best {
			best, which = fz.poles[ip], 1
		}
		if iu < len(fz.undef) && fz.undef[iu].Lo < best {
			which = 2
		}
		switch which {
		case 0:
			fz.items = append(fz.items, item{fz.cands[ie].span[0], fz.cands[ie].span[1], ie})
			ie++
		case 1:
			fz.items = append(fz.items, item{fz.poles[ip], fz.poles[ip], -1})
			ip++
		default:
			fz.items = append(fz.items, item{fz.undef[iu].Lo, fz.undef[iu].Hi, -1})
			iu++
		}
	}
	m := len(fz.items)
	fz.segs = fz.segs[:0]
	for k := 0; k <= m; k++ {
		L, R := fz.lo, fz.hi
		if k > 0 {
			L = fz.items[k-1].hi
		}
		if k < m {
			R = fz.items[k].lo
		}
		sg := segment{L: L, R: R}
		if R > L {
			v := fz.eval(0.5 * (L + R))
			if finite(v) {
				sg.sign = sgn(v, 0)
			}
		}
		fz.segs = append(fz.segs, sg)
	}
	for k := 0; k < m; k++ {
		it := fz.items[k]
		if it.eq < 0 {
			continue
		}
		cd := &fz.cands[it.eq]
		fz.eqs = append(fz.eqs, fz.equilibrium(cd, k))
	}
}

// expectedSigns are the signs of f below and above an equilibrium implied
// by its class.
func expectedSigns(cls Class, side Side) (below, above int, ok bool) {
	switch cls {
	case Stable:
		return 1, -1, true
	case Unstable:
		return -1, 1, true
	case Semistable:
		if side == Below {
			return 1, 1, true
		}
		return -1, -1, true
	}
	return 0, 0, false
}

// equilibrium builds the Equilibrium of item k.
func (fz *Finder) equilibrium(cd *cand, k int) Equilibrium {
	eq := Equilibrium{
		X: cd.x, XErr: cd.delta, Slope: cd.slope, Class: cd.cls, Order: cd.order,
		AttractsFrom: cd.side, ReturnTime: math.NaN(), Span: cd.span,
		Barrier: [2]float64{math.NaN(), math.NaN()},
	}
	if cd.cls == Stable && cd.order == 1 && finite(cd.slope) && cd.slope != 0 {
		eq.ReturnTime = 1 / math.Abs(cd.slope)
	}
	switch {
	case cd.rough:
		eq.Note = noteRough
	case cd.touch:
		eq.Note = noteTouch
	case cd.cls == Degenerate && cd.span[1]-cd.span[0] > 2*fz.tol(cd.x):
		eq.Note = noteSpan
	}
	below, above := &fz.segs[k], &fz.segs[k+1]
	// Phase-line cross-check.
	if eb, ea, ok := expectedSigns(cd.cls, cd.side); ok {
		bad := (below.R > below.L && below.sign != 0 && below.sign != eb) ||
			(above.R > above.L && above.sign != 0 && above.sign != ea)
		if bad {
			fz.warnf("equilibrium at x=%.10g: derivative test says %v (order %d) but f has sign %+d below and %+d above",
				cd.x, verdict(cd.cls, cd.side), cd.order, below.sign, above.sign)
		}
	}
	// Basin from the phase line.
	eq.Basin = [2]float64{cd.span[0], cd.span[1]}
	if below.R > below.L && below.sign > 0 {
		eq.Basin[0] = below.L
		eq.BasinAtDomainEnd[0] = k == 0
		eq.BasinAtSingular[0] = k > 0 && fz.items[k-1].eq < 0
	}
	if above.R > above.L && above.sign < 0 {
		eq.Basin[1] = above.R
		eq.BasinAtDomainEnd[1] = k+1 == len(fz.items)
		eq.BasinAtSingular[1] = k+1 < len(fz.items) && fz.items[k+1].eq < 0
	}
	if k == 0 && cd.span[0] <= fz.lo {
		eq.BasinAtDomainEnd[0] = true
	}
	if k+1 == len(fz.items) && cd.span[1] >= fz.hi {
		eq.BasinAtDomainEnd[1] = true
	}
	if fz.opt.NoBarriers {
		return eq
	}
	// Barriers V(edge) − V(x*), V = −∫ f dx.
	eq.Barrier = [2]float64{0, 0}
	if eq.Basin[0] < cd.span[0] {
		if eq.BasinAtSingular[0] || (fz.opt.ThresholdBarriersOnly && eq.BasinAtDomainEnd[0]) {
			eq.Barrier[0] = math.NaN()
		} else {
			eq.Barrier[0] = fz.segIntegral(k)
		}
	}
	if eq.Basin[1] > cd.span[1] {
		if eq.BasinAtSingular[1] || (fz.opt.ThresholdBarriersOnly && eq.BasinAtDomainEnd[1]) {
			eq.Barrier[1] = math.NaN()
		} else {
			eq.Barrier[1] = -fz.segIntegral(k + 1)
		}
	}
	return eq
}

func verdict(cls Class, side Side) string {
	if cls == Semistable {
		return "semistable from " + side.String()
	}
	return cls.String()
}

// pointData returns f, f'/1!, f″/2! at an end of segment k: the domain end
// (a grid point) or the equilibrium there.
func (fz *Finder) pointData(k int, upper bool) (c [3]float64, ok bool) {
	m := len(fz.items)
	if !upper {
		if k == 0 {
			nd := &fz.nodes[0]
			return nd.c, nd.kind == kSmooth
		}
		it := fz.items[k-1]
		if it.eq < 0 {
			return c, false
		}
		cd := &fz.cands[it.eq]
		if cd.cls == Degenerate {
			return c, true
		}
		return cd.c, cd.data
	}
	if k == m {
		nd := &fz.nodes[len(fz.nodes)-1]
		return nd.c, nd.kind == kSmooth
	}
	it := fz.items[k]
	if it.eq < 0 {
		return c, false
	}
	cd := &fz.cands[it.eq]
	if cd.cls == Degenerate {
		return c, true
	}
	return cd.c, cd.data
}

// segIntegral returns ∫ f over segment k: Gauss–Legendre (quad.Fixed),
// accepted when it agrees with the composite quintic Hermite integral of
// the scan data, else refined by adaptive bisection.
func (fz *Finder) segIntegral(k int) float64 {
	sg := &fz.segs[k]
	if sg.done {
		return sg.integral
	}
	sg.done = true
	L, R := sg.L, sg.R
	if !(R > L) {
		sg.integral = 0
		return 0
	}
	G := fz.rule.integrate(fz.integrand, L, R)
	absTol := fz.opt.QuadRelTol*math.Abs(G) + 1e-15*(R-L)*fz.fscale
	if H, ok := fz.hermiteIntegral(k); ok && finite(G) &&
		math.Abs(G-H) <= fz.checkTol()*(math.Abs(G)+math.Abs(H))+1e-10*(R-L)*fz.fscale {
		sg.integral = G
		return G
	}
	sg.integral = fz.adapt(L, R, G, absTol, 0)
	return sg.integral
}

// checkTol is the relative agreement between the Gauss–Legendre and the
// Hermite integral of a segment under which the former is accepted without
// refinement: 1e-4, or 100·QuadRelTol when that is looser (a caller that
// asks for barriers to 1e-5 accepts two rules agreeing to 1e-3).
func (fz *Finder) checkTol() float64 {
	return math.Max(1e-4, 100*fz.opt.QuadRelTol)
}

// hermiteIntegral is the composite two-point Hermite rule
// ∫_0^h p = h/2 (f0+f1) + h²/10 (f0'−f1') + h³/120 (f0″+f1″), exact for
// quintics, over the scan points inside segment k.
func (fz *Finder) hermiteIntegral(k int) (float64, bool) {
	sg := &fz.segs[k]
	cl, ok1 := fz.pointData(k, false)
	cr, ok2 := fz.pointData(k, true)
	if !ok1 || !ok2 {
		return 0, false
	}
	sum := 0.0
	x0, c0 := sg.L, cl
	for i := range fz.nodes {
		nd := &fz.nodes[i]
		if nd.x <= sg.L || nd.x >= sg.R {
			continue
		}
		if nd.kind != kSmooth {
			return 0, false
		}
		sum += hermitePanel(x0, nd.x, &c0, &nd.c)
		x0, c0 = nd.x, nd.c
	}
	sum += hermitePanel(x0, sg.R, &c0, &cr)
	return sum, finite(sum)
}

func hermitePanel(a, b float64, ca, cb *[3]float64) float64 {
	h := b - a
	return h/2*(ca[0]+cb[0]) + h*h/10*(ca[1]-cb[1]) + h*h*h/120*(2*ca[2]+2*cb[2])
}

// adapt refines the Gauss–Legendre integral whole over [a, b] by bisection
// until the halves agree with the whole within absTol, which is halved
// with the panel (a global tolerance QuadRelTol·|∫| shared out).
func (fz *Finder) adapt(a, b, whole, absTol float64, depth int) float64 {
	m := 0.5 * (a + b)
	l := fz.rule.integrate(fz.integrand, a, m)
	r := fz.rule.integrate(fz.integrand, m, b)
	s := l + r
	if math.Abs(s-whole) <= absTol || !finite(s) {
		return s
	}
	if depth >= 12 || fz.over() {
		// Only a panel whose own error estimate exceeds the tolerance of
		// the whole integral is worth a warning (an endpoint singularity
		// of f' leaves tiny panels that converge slowly but harmlessly).
		if math.Abs(s-whole) > absTol*float64(uint(1)<<depth) {
			fz.warnf("barrier quadrature on [%.6g, %.6g] did not reach its tolerance", a, b)
		}
		return s
	}
	return fz.adapt(a, m, l, absTol/2, depth+1) + fz.adapt(m, b, r, absTol/2, depth+1)
}
