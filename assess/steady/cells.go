package steady

import "math"

// sgn is the sign of v, 0 when |v| ≤ e (zero within its error bound).
func sgn(v, e float64) int {
	switch {
	case v > e:
		return 1
	case v < -e:
		return -1
	}
	return 0
}

// cell decides the roots of f in the grid cell [A.x, B.x]; see the package
// documentation for the tests.
func (fz *Finder) cell(A, B node, depth int) {
	if fz.over() {
		return
	}
	if A.bad() || B.bad() {
		fz.singularCell(A, B, depth)
		return
	}
	h := B.x - A.x
	if !(h > 0) {
		return
	}
	canSplit := depth < fz.opt.MaxDepth && h > 64*fz.tol(A.x)
	if A.kind == kRough || B.kind == kRough {
		if canSplit {
			fz.split(A, B, depth)
			return
		}
		fz.convexCell(A, B, depth)
		return
	}
	if A.flat() && B.flat() && fz.zeroAt(0.5*(A.x+B.x)) {
		return // inside a continuum of zeros, handled by continua
	}
	if quickExcluded(&A, &B, h) {
		return
	}
	rho, slack := rho3(&A, &B, h)
	half := 0.5 * h
	if excluded(&A, &B, half, rho, slack) {
		return
	}
	if slack > 0 && canSplit {
		fz.split(A, B, depth)
		return
	}
	if monotone(&A, &B, half, rho) {
		if sgn(A.c[0], A.e[0])*sgn(B.c[0], B.e[0]) < 0 {
			fz.rootIn(A, B, depth)
		}
		return
	}
	if !canSplit || convex(&A, &B, half, rho) {
		fz.convexCell(A, B, depth)
		return
	}
	fz.split(A, B, depth)
}

// split bisects the cell.
func (fz *Finder) split(A, B node, depth int) {
	M := fz.evalNode(0.5 * (A.x + B.x))
	if M.zero() {
		fz.addNodeCand(&M)
	}
	fz.cell(A, M, depth+1)
	fz.cell(M, B, depth+1)
}

// rho3 bounds |c3| = |f‴/6| on the cell by twice the largest of five
// estimates from the disagreement of the quadratic Taylor models at the two
// ends (plus their rounding). When the estimates disagree among themselves
// (spread over half their size) while the cubic term matters on the cell
// (max|k| h³ > S/10, S the variation of f, f' h and f″ h²/2 across it),
// the end data do not resolve the cell, as when a feature narrower than
// the cell sits between the ends: slack is then a further allowance
// 2(S + max|k| h³) for the exclusion test, and the cell is split.
func rho3(A, B *node, h float64) (rho, slack float64) {
	h2 := h * h
	h3 := h2 * h
	i1 := 1 / h
	i2 := i1 * i1
	i3 := i2 * i1
	k1 := (B.c[0] - (A.c[0] + h*(A.c[1]+h*A.c[2]))) * i3
	k2 := -(A.c[0] - (B.c[0] - h*(B.c[1]-h*B.c[2]))) * i3
	k3 := (B.c[1] - (A.c[1] + 2*h*A.c[2])) * (i2 / 3)
	k4 := (A.c[1] - (B.c[1] - 2*h*B.c[2])) * (i2 / 3)
	k5 := (B.c[2] - A.c[2]) * (i1 / 3)
	lo := fmin(fmin(fmin(k1, k2), fmin(k3, k4)), k5)
	hi := fmax(fmax(fmax(k1, k2), fmax(k3, k4)), k5)
	m := fmax(-lo, hi)
	k3h := m * h3
	S := math.Abs(B.c[0]-A.c[0]) + fmax(math.Abs(A.c[1]), math.Abs(B.c[1]))*h +
		fmax(math.Abs(A.c[2]), math.Abs(B.c[2]))*h2
	if (hi-lo)*h3 > 0.5*k3h && k3h > 0.1*S {
		slack = 2 * (S + k3h)
	}
	m += (A.e[0]+B.e[0])*i3 + (A.e[1]+B.e[1])*i2 + (A.e[2]+B.e[2])*i1
	return 2 * m, slack
}

func fmax(a, b float64) float64 {
	if a > b {
		return a
	}
	return b
}

func fmin(a, b float64) float64 {
	if a < b {
		return a
	}
	return b
}

// quickExcluded is a cheaper sufficient condition for excluded: every
// estimate in rho3 is at most S = |Δf| + max|f'| h + max|f″/2| h² (so the
// cubic allowance is at most S/4 and the slack at most 4S), and each
// quadratic model moves at most S/2 over half a cell; |f| > 5S at both ends
// with one sign therefore passes the full test.
func quickExcluded(A, B *node, h float64) bool {
	s := sgn(A.c[0], 0)
	if s == 0 || sgn(B.c[0], 0) != s {
		return false
	}
	S := math.Abs(B.c[0]-A.c[0]) + fmax(math.Abs(A.c[1]), math.Abs(B.c[1]))*h +
		fmax(math.Abs(A.c[2]), math.Abs(B.c[2]))*h*h
	// Rounding terms of the full test (rho3 and excluded), bounded alike.
	E := 2 * (A.e[0] + B.e[0] + (A.e[1]+B.e[1])*h + (A.e[2]+B.e[2])*h*h)
	return fmin(math.Abs(A.c[0]), math.Abs(B.c[0])) > 5*S+E
}

// quadMin returns the sign of q(t) = c0 + c1 t + c2 t² on [t0, t1] and the
// minimum of |q| there, or sign 0 when q reaches zero.
func quadMin(c0, c1, c2, t0, t1 float64) (int, float64) {
	v0 := c0 + t0*(c1+t0*c2)
	v1 := c0 + t1*(c1+t1*c2)
	s := sgn(v0, 0)
	if s == 0 || sgn(v1, 0) != s {
		return 0, 0
	}
	m := fmin(math.Abs(v0), math.Abs(v1))
	if c2 != 0 {
		tv := -c1 / (2 * c2)
		if tv > t0 && tv < t1 {
			vv := c0 + tv*(c1+tv*c2)
			if sgn(vv, 0) != s {
				return 0, 0
			}
			m = fmin(m, math.Abs(vv))
		}
	}
	return s, m
}

// excluded reports that f has no zero on the cell: on each half, the
// quadratic model from the near end stays away from zero by more than the
// cubic remainder bound and the rounding.
func excluded(A, B *node, half, rho, slack float64) bool {
	rem := rho*half*half*half + slack
	s1, m1 := quadMin(A.c[0], A.c[1], A.c[2], 0, half)
	if s1 == 0 || m1 <= rem+A.e[0]+half*(A.e[1]+half*A.e[2]) {
		return false
	}
	s2, m2 := quadMin(B.c[0], B.c[1], B.c[2], -half, 0)
	return s2 == s1 && m2 > rem+B.e[0]+half*(B.e[1]+half*B.e[2])
}

// monotone reports that f' has no zero on the cell (same construction one
// derivative higher).
func monotone(A, B *node, half, rho float64) bool {
	rem := 3 * rho * half * half
	a0, a1 := A.c[1], A.c[1]+2*A.c[2]*half
	b0, b1 := B.c[1]-2*B.c[2]*half, B.c[1]
	ta := rem + A.e[1] + 2*half*A.e[2]
	tb := rem + B.e[1] + 2*half*B.e[2]
	s := sgn(a0, ta)
	return s != 0 && sgn(a1, ta) == s && sgn(b0, tb) == s && sgn(b1, tb) == s
}

// convex reports that f″ keeps one sign on the cell.
func convex(A, B *node, half, rho float64) bool {
	rem := 6 * rho * half
	s := sgn(2*A.c[2], rem+2*A.e[2])
	return s != 0 && sgn(2*B.c[2], rem+2*B.e[2]) == s
}

// convexCell handles a cell where f has at most one extremum: a sign change
// of f' locates it, and f there decides between a touching root, a close
// pair (one root on each side) and no root.
func (fz *Finder) convexCell(A, B node, depth int) {
	sA, sB := sgn(A.c[0], A.e[0]), sgn(B.c[0], B.e[0])
	if A.kind == kSmooth && B.kind == kSmooth && sgn(A.c[1], A.e[1])*sgn(B.c[1], B.e[1]) < 0 {
		p := hermite(&A, &B)
		var d [5]float64
		for k := 1; k < 6; k++ {
			d[k-1] = float64(k) * p[k]
		}
		x0 := A.x + unitRoot(d[:])*(B.x-A.x)
		st := fz.solve(1, A.x, B.x, sgn(A.c[1], 0), x0)
		switch st {
		case solveBad:
			fz.splitAtBad(A, B, depth)
			return
		case solveBudget:
			return
		}
		M := fz.sol.node()
		big := fmax(math.Abs(A.c[0]), math.Abs(B.c[0]))
		if math.Abs(M.c[0]) > 1e6*big+M.e[0] && sA != 0 && sA == sB && sgn(M.c[0], 0) == sA {
			// |f| peaks far above both ends: an even pole inside the cell.
			fz.addPole(M.x)
			return
		}
		dm := fz.sol.dloc
		T := 2 * (M.e[0] + math.Abs(M.c[1])*dm + math.Abs(M.c[2])*dm*dm)
		sm := sgn(M.c[0], T)
		if sm == 0 {
			fz.addSolved(true)
			return
		}
		if sA*sm < 0 {
			fz.rootIn(A, M, depth)
		}
		if sm*sB < 0 {
			fz.rootIn(M, B, depth)
		}
		return
	}
	if sA*sB < 0 {
		fz.rootIn(A, B, depth)
	}
}

// rootIn refines the root bracketed by a strict sign change of f between A
// and B, and tells a root from a pole or jump by |f| at the refined point.
func (fz *Finder) rootIn(A, B node, depth int) {
	sa := sgn(A.c[0], A.e[0])
	x0 := 0.5 * (A.x + B.x)
	if A.kind == kSmooth && B.kind == kSmooth {
		p := hermite(&A, &B)
		x0 = A.x + unitRoot(p[:])*(B.x-A.x)
	} else if finite(A.c[0]) && finite(B.c[0]) && A.c[0] != B.c[0] {
		x0 = A.x + A.c[0]/(A.c[0]-B.c[0])*(B.x-A.x)
	}
	// A bound on |f‴/6| for Halley's error estimate (none without data).
	fz.rho = math.Inf(1)
	if A.kind == kSmooth && B.kind == kSmooth {
		fz.rho, _ = rho3(&A, &B, B.x-A.x)
	}
	switch fz.solve(0, A.x, B.x, sa, x0) {
	case solveBad:
		fz.splitAtBad(A, B, depth)
		return
	case solveBudget:
		return
	}
	s := &fz.sol
	c, e := s.shifted()
	v := math.Abs(c[0])
	lo := fmin(math.Abs(A.c[0]), math.Abs(B.c[0]))
	hi := fmax(math.Abs(A.c[0]), math.Abs(B.c[0]))
	// Schröder's ratio q = f f″/f'² tells a zero from a pole in the local
	// power-law model: (m−1)/(2m) < 1/2 at a zero of order m, (m+1)/(2m) > 1/2
	// at a pole of order m.
	q := math.Abs(c[0]*c[2]) / (c[1] * c[1])
	switch {
	case v > hi:
		// |f| grew instead of vanishing (even when the rounding bound,
		// as next to a pole, exceeds |f| itself).
		fz.addPole(s.root)
	case v <= 2*e[0] || v <= 1e-3*lo || q < 0.5:
		fz.addSolved(false)
	default:
		fz.warnf("f changes sign at x=%.10g without a root (a jump discontinuity)", s.root)
	}
}

// splitAtBad reprocesses [A, B] around the non-finite point fz.sol.x met by
// an iteration.
func (fz *Finder) splitAtBad(A, B node, depth int) {
	X := fz.sol.node()
	if !(X.x > A.x && X.x < B.x) {
		return
	}
	fz.cell(A, X, depth+1)
	fz.cell(X, B, depth+1)
}

// singularCell handles a cell with a non-finite end: it finds the edge of
// the non-finite set by bisection, records a pole (isolated infinite point)
// or an undefined interval, and scans the finite remainder.
func (fz *Finder) singularCell(A, B node, depth int) {
	if depth > fz.opt.MaxDepth+60 {
		return
	}
	if A.bad() && B.bad() {
		if depth < fz.opt.MaxDepth && B.x-A.x > 64*fz.tol(A.x) {
			M := fz.evalNode(0.5 * (A.x + B.x))
			if !M.bad() {
				if M.zero() {
					fz.addNodeCand(&M)
				}
				fz.cell(A, M, depth+1)
				fz.cell(M, B, depth+1)
				return
			}
		}
		fz.addUndef(A.x, B.x)
		return
	}
	good, bad := A, B
	if A.bad() {
		good, bad = B, A
	}
	p, q, tiny := fz.boundary(good.x, bad.x)
	if tiny && bad.kind == kPole {
		fz.addPole(bad.x)
	} else {
		fz.addUndef(q, bad.x)
	}
	if p == good.x {
		return
	}
	P := fz.evalNode(p)
	if P.bad() {
		return
	}
	if P.zero() {
		fz.addNodeCand(&P)
	}
	if good.x < bad.x {
		fz.cell(good, P, depth+1)
	} else {
		fz.cell(P, good, depth+1)
	}
}

// boundary returns p, the finite point nearest to the non-finite point b
// found from the finite point g, q the non-finite point next to it, and
// whether the non-finite set next to b is narrower than 1e-9 |b − g|.
func (fz *Finder) boundary(g, b float64) (p, q float64, tiny bool) {
	p = b - (b-g)*1e-9
	if finite(fz.eval(p)) {
		return p, b, true
	}
	lo, hi := g, p
	for math.Abs(hi-lo) > fz.tol(hi) && !fz.over() {
		m := 0.5 * (lo + hi)
		if m == lo || m == hi {
			break
		}
		if finite(fz.eval(m)) {
			lo = m
		} else {
			hi = m
		}
	}
	return lo, hi, false
}

// Outcomes of solve.
const (
	solveOK = iota
	solveBad
	solveBudget
)

// solution is the last iterate of solve.
type solution struct {
	x, root, dloc float64
	c, e          [4]float64 // Taylor data at x
}

// shifted returns c0..c2 and their bounds moved from the iterate x to root
// (the last correction is small, the bounds are kept).
func (s *solution) shifted() (c, e [3]float64) {
	d := s.root - s.x
	c[0] = s.c[0] + d*(s.c[1]+d*s.c[2])
	c[1] = s.c[1] + 2*d*s.c[2]
	c[2] = s.c[2]
	if d == 0 {
		copy(c[:], s.c[:3])
	}
	copy(e[:], s.e[:3])
	return c, e
}

func (s *solution) node() node {
	nd := node{x: s.root}
	nd.c, nd.e = s.shifted()
	switch {
	case math.IsNaN(s.c[0]):
		nd.kind = kUndef
		nd.x = s.x
	case math.IsInf(s.c[0], 0):
		nd.kind = kPole
		nd.x = s.x
	case !finite(nd.c[1]) || !finite(nd.c[2]) || !finite(nd.c[0]):
		nd.kind = kRough
	}
	return nd
}

// solve refines a zero of g = f^(L) (L = 0 or 1) inside (a, b), where g has
// the nonzero sign sa at a and the opposite sign at b, from x0: Schröder's
// step dx = −g g'/(g'² − g g″), quadratic at simple and multiple zeros,
// safeguarded by bisection. The result is in fz.sol.
func (fz *Finder) solve(L int, a, b float64, sa int, x0 float64) int {
	n := L + 3
	lo, hi := a, b
	x := x0
	if !(x > lo && x < hi) {
		x = 0.5 * (lo + hi)
	}
	s := &fz.sol
	prev := hi - lo
	m1, m2 := float64(L+1), float64((L+1)*(L+2))
	for it := 0; it < 200; it++ {
		if fz.over() {
			s.x, s.root, s.dloc = x, x, 0.5*(hi-lo)
			return solveBudget
		}
		fz.taylor(x, n)
		s.x = x
		clear(s.c[:])
		clear(s.e[:])
		copy(s.c[:], fz.c[:n])
		copy(s.e[:], fz.e[:n])
		g, eg := fz.c[L], fz.e[L]
		if !finite(g) || (L == 1 && !finite(fz.c[0])) {
			s.root, s.dloc = x, 0
			return solveBad
		}
		g1, g2 := m1*fz.c[L+1], m2*fz.c[L+2]
		if math.Abs(g) <= eg {
			// Zero within its error bound.
			// At level 0 the classification measures the zero set from
			// the full Taylor data; at level 1 the width of the zero set
			// of f' is the location uncertainty of the extremum.
			s.root, s.dloc = x, 0
			if L == 1 && g1 != 0 && finite(g1) {
				s.dloc = eg / math.Abs(g1)
			}
			return solveOK
		}
		if sgn(g, 0) == sa {
			lo = x
		} else {
			hi = x
		}
		// Schröder's step; at a zero that is clearly simple
		// (|g g″| ≤ g'²/10) Halley's, dx = −2 g g'/(2g'² − g g″), whose
		// error is cubic: (g″²/(4g'²) + |g‴|/(6|g'|)) |dx|³.
		halley := L == 0 && math.Abs(g*g2) <= 0.1*g1*g1
		var dx float64
		if halley {
			dx = -2 * g * g1 / (2*g1*g1 - g*g2)
		} else {
			dx = -g * g1 / (g1*g1 - g*g2)
		}
		xn := x + dx
		tolx := fz.tol(x)
		if xn > lo && xn < hi && math.Abs(dx) <= 0.5*prev {
			ad := math.Abs(dx)
			if ad <= tolx {
				s.root, s.dloc = xn, ad
				return solveOK
			}
			// Predicted error of the new iterate at a simple zero.
			if g1 != 0 && ad < 1e-3*(b-a) {
				r := math.Abs(g2 / g1)
				pred := r * ad * ad
				if halley {
					pred = (0.25*r*r + fz.rho/math.Abs(g1)) * ad * ad * ad
				}
				if pred <= tolx {
					s.root, s.dloc = xn, pred
					return solveOK
				}
			}
		} else {
			xn = 0.5 * (lo + hi)
		}
		if hi-lo <= tolx {
			s.root, s.dloc = 0.5*(lo+hi), 0.5*(hi-lo)
			return solveOK
		}
		prev = math.Abs(xn - x)
		x = xn
	}
	s.root, s.dloc = x, 0.5*(hi-lo)
	return solveOK
}

// hermite returns the coefficients p_0..p_5 in s ∈ [0, 1] (x = a + s h) of
// the quintic Hermite interpolant of f, f', f″/2 at both ends.
func hermite(A, B *node) [6]float64 {
	h := B.x - A.x
	var p [6]float64
	p[0], p[1], p[2] = A.c[0], A.c[1]*h, A.c[2]*h*h
	r0 := B.c[0] - (p[0] + p[1] + p[2])
	r1 := B.c[1]*h - (p[1] + 2*p[2])
	r2 := B.c[2]*h*h - p[2]
	p[5] = r2 - 3*r1 + 6*r0
	p[4] = r1 - 3*r0 - 2*p[5]
	p[3] = r0 - p[4] - p[5]
	return p
}

// unitRoot returns a zero in (0, 1) of the polynomial q (ascending
// coefficients) when q(0), q(1) differ in sign (Newton with bisection from
// the zero of its quadratic part at the nearer end, or of the secant), or
// 0.5 otherwise.
func unitRoot(q []float64) float64 {
	q0 := q[0]
	q1 := 0.0
	for _, v := range q {
		q1 += v
	}
	if !(q0*q1 < 0) {
		return 0.5
	}
	lo, hi := 0.0, 1.0
	s := q0 / (q0 - q1)
	if t := quadRoot(q[0], q[1], q[2]); t > 0 && t < 1 {
		s = t
	}
	for it := 0; it < 40; it++ {
		v, d := 0.0, 0.0
		for k := len(q) - 1; k >= 0; k-- {
			d = d*s + v
			v = v*s + q[k]
		}
		if v == 0 {
			return s
		}
		if (v > 0) == (q0 > 0) {
			lo = s
		} else {
			hi = s
		}
		sn := s - v/d
		if !(sn > lo && sn < hi) {
			sn = 0.5 * (lo + hi)
		}
		if math.Abs(sn-s) < 1e-8 {
			return sn // a starting point: solve refines it
		}
		s = sn
	}
	return s
}

// quadRoot returns the smallest positive zero of c0 + c1 t + c2 t², or −1.
func quadRoot(c0, c1, c2 float64) float64 {
	if c2 == 0 {
		if c1 == 0 {
			return -1
		}
		return -c0 / c1
	}
	d := c1*c1 - 4*c0*c2
	if d < 0 {
		return -1
	}
	// Stable form: q = −(c1 + sign(c1)√d)/2, roots q/c2 and c0/q.
	sq := math.Sqrt(d)
	if c1 < 0 {
		sq = -sq
	}
	qq := -0.5 * (c1 + sq)
	r1, r2 := -1.0, -1.0
	if c2 != 0 {
		r1 = qq / c2
	}
	if qq != 0 {
		r2 = c0 / qq
	}
	switch {
	case r1 > 0 && (r2 <= 0 || r1 < r2):
		return r1
	case r2 > 0:
		return r2
	}
	return -1
}
