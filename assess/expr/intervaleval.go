package expr

import (
	"fmt"
	"math"
)

// The interval back end runs the instruction list on intervals
// (interval.go). IntervalSlope carries with each value an enclosure of its
// derivative in x over the box: interval dual numbers, the first-order
// case of the Taylor arithmetic's recurrences (taylor.go) taken over
// intervals, with the chain rule applied to the enclosures (Moore 1966;
// Neumaier, Interval Methods for Systems of Equations, 1990).
// For abs, min and max, which are Lipschitz but not differentiable, the
// derivative enclosure holds Clarke's generalised gradient (Clarke,
// Optimization and Nonsmooth Analysis, 1983), for which the mean
// value inclusion f(y) − f(x) ∈ F'(X)(y − x) still holds (Lebourg's mean
// value theorem).

// ivState is the register file of the interval back end: per register an
// enclosure of its value, of its derivative in x, and whether it is
// defined and continuous on the whole box. The registers that do not
// depend on x are computed once per θ (bit for bit), as Eval does.
type ivState struct {
	code  []instr // the program's instructions
	def   []int32 // per register: the index in code of its instruction, or −1
	v, d  []Interval
	pc    powCache
	sat   []satTerm // per xcode instruction
	ok    []bool
	theta []float64
	ready bool
}

// ivInit allocates the interval registers (NewMachine calls it) and loads
// the constants as intervals [val − err, val + err] rounded outward.
func (m *Machine) ivInit() {
	p := m.p
	s := &m.iv
	s.v = make([]Interval, p.nreg)
	s.d = make([]Interval, p.nreg)
	s.ok = make([]bool, p.nreg)
	s.theta = make([]float64, len(p.params))
	for i := range s.ok {
		s.ok[i] = true
	}
	s.sat = findSat(p)
	s.code = p.code
	s.def = defs(p)
	for _, c := range p.consts {
		iv := Point(c.val)
		switch {
		case math.IsNaN(c.val):
			iv = emptyIv
		case math.IsInf(c.val, 1): // a real constant beyond MaxFloat64 (2^2000)
			iv = Interval{math.MaxFloat64, math.Inf(1)}
		case math.IsInf(c.val, -1):
			iv = Interval{math.Inf(-1), -math.MaxFloat64}
		case c.err != 0:
			iv = Interval{widenDn(c.val, c.err), widenUp(c.val, c.err)}
		}
		s.v[c.reg] = iv
	}
}

// ivPrepare loads θ and runs the x-independent instructions when θ changed.
func (m *Machine) ivPrepare(theta []float64) {
	p := m.p
	np := len(p.params)
	if len(theta) < np {
		panic(fmt.Sprintf("expr: len(theta) = %d, want %d parameters", len(theta), np))
	}
	s := &m.iv
	th := theta[:np]
	if s.ready && sameBits(s.theta, th) {
		return
	}
	s.ready = false
	for j, v := range th {
		r := paramReg(j)
		s.v[r] = Point(v)
		s.ok[r] = !math.IsNaN(v) && !math.IsInf(v, 0)
		if math.IsInf(v, 0) {
			s.v[r] = emptyIv // not a real number
		}
	}
	for i := range p.pcode {
		s.step(&p.pcode[i])
	}
	copy(s.theta, th)
	s.ready = true
}

// Interval returns an enclosure of {f(x; θ) : x ∈ X, f defined at x}: every
// real value the rate law takes on the box X, with exact real arithmetic
// on the exact constants, lies in the result. The result is empty (NaN
// bounds) when f is defined nowhere on X. A point box X = Point(x)
// encloses the exact f(x). Interval does not allocate; it panics if theta
// is shorter than NumParams().
func (m *Machine) Interval(x Interval, theta []float64) Interval {
	m.ivPrepare(theta)
	s := &m.iv
	s.v[regState], s.ok[regState] = x, !x.IsEmpty()
	code := m.p.xcode
	box := x.Lo != x.Hi // at a point the naive rules have no dependency to undo
	for i := range code {
		if box {
			if st := &s.sat[i]; st.skip {
				continue // the numerator k·u of a saturating term, done by it
			} else if st.ok {
				if s.satTerm(&code[i], st, false) {
					continue
				}
				if st.num >= 0 {
					s.step(&code[st.num])
				}
			}
		}
		s.step(&code[i])
	}
	return s.v[m.p.out]
}

// IntervalSlope returns enclosures of f and of ∂f/∂x over the box X, and
// cont, which reports that every operation's argument stayed inside the
// region where the operation is defined and continuous for all x ∈ X: then
// f is continuous and Lipschitz on X wherever df is bounded, and
// f(y) − f(x) ∈ df·(y − x) for x, y ∈ X. When cont is false, f and df
// enclose only the values where f is defined (df where differentiable).
// IntervalSlope does not allocate.
func (m *Machine) IntervalSlope(x Interval, theta []float64) (f, df Interval, cont bool) {
	m.ivPrepare(theta)
	s := &m.iv
	s.v[regState], s.d[regState], s.ok[regState] = x, oneIv, !x.IsEmpty()
	code := m.p.xcode
	box := x.Lo != x.Hi
	for i := range code {
		if box {
			if st := &s.sat[i]; st.skip {
				continue
			} else if st.ok {
				if s.satTerm(&code[i], st, true) {
					continue
				}
				if st.num >= 0 {
					s.stepSlope(&code[st.num])
				}
			}
		}
		s.stepSlope(&code[i])
	}
	out := m.p.out
	if !m.p.xdep[out] {
		return s.v[out], zeroIv, s.ok[out]
	}
	return s.v[out], s.d[out], s.ok[out]
}

// step runs one instruction on enclosures of values only.
func (s *ivState) step(in *instr) {
	a, b := s.v[in.a], s.v[in.b]
	ok := s.ok[in.a] && s.ok[in.b]
	var w Interval
	c := true
	switch in.op {
	case opAdd:
		w = ivAdd(a, b)
	case opSub:
		w = ivSub(a, b)
	case opNeg:
		w = a.Neg()
	case opMul:
		if in.a == in.b {
			w = ivSqr(a)
		} else {
			w = ivMul(a, b)
		}
	case opDiv:
		w, c = ivDiv(a, b)
	case opPow:
		w, _, c = s.pc.powParts(a, b, in.bxdep, false)
	case opExp:
		w = ivExp(a)
	case opLog, opLog10:
		w, c = ivLog(a, in.op == opLog10)
	case opSqrt:
		w, c = ivSqrt(a)
	case opAbs:
		w = ivAbs(a)
	case opMin, opMax:
		w, _ = ivMinMax(a, b, in.op == opMax)
	case opSin, opCos:
		w = ivSinCos(a, in.op == opCos)
	case opTan:
		w, c = ivTan(a)
	case opAtan:
		w = ivAtan(a)
	case opSinh:
		w = ivSinh(a)
	case opCosh:
		w = ivCosh(a)
	case opTanh:
		w = ivTanh(a)
	}
	s.v[in.dst], s.ok[in.dst] = w, ok && c && !w.IsEmpty()
}

// stepSlope runs one x-dependent instruction on the value enclosure and
// the derivative enclosure.
func (s *ivState) stepSlope(in *instr) {
	a, b := s.v[in.a], s.v[in.b]
	ok := s.ok[in.a] && s.ok[in.b]
	da, db := s.d[in.a], s.d[in.b]
	if !in.axdep {
		da = zeroIv
	}
	if !in.bxdep {
		db = zeroIv
	}
	var w, wd Interval
	c := true
	switch in.op {
	case opAdd:
		w, wd = ivAdd(a, b), dAdd(da, db, in.axdep, in.bxdep)
	case opSub:
		w = ivSub(a, b)
		switch {
		case !in.bxdep:
			wd = da
		case !in.axdep:
			wd = db.Neg()
		default:
			wd = ivSub(da, db)
		}
	case opNeg:
		w, wd = a.Neg(), da.Neg()
	case opMul:
		if in.a == in.b {
			w, wd = ivSqr(a), ivMul(Interval{2 * a.Lo, 2 * a.Hi}, da)
			break
		}
		w = ivMul(a, b)
		switch {
		case !in.axdep:
			wd = ivMul(a, db)
		case !in.bxdep:
			wd = ivMul(da, b)
		default:
			wd = ivAdd(ivMul(da, b), ivMul(a, db))
		}
	case opDiv:
		w, c = ivDiv(a, b)
		switch {
		case !in.bxdep:
			wd, _ = ivDiv(da, b)
		case !in.axdep:
			wd, _ = ivDiv(ivMul(w, db).Neg(), b) // −w b'/b
		default:
			wd, _ = ivDiv(ivSub(da, ivMul(w, db)), b) // (a' − w b')/b
		}
	case opPow:
		var gp Interval
		w, gp, c = s.pc.powParts(a, b, in.bxdep, true)
		if b.Lo == b.Hi && !in.bxdep {
			wd = ivMul(gp, da)
			break
		}
		// An interval exponent or one depending on x:
		// b·a^(b−1)·a' + a^b·log(a)·b'.
		g, _ := ivPowGen(a, ivSub(b, oneIv))
		wd = ivMul(ivMul(b, g), da)
		if in.bxdep {
			l, _ := ivLog(a, false)
			wd = ivAdd(wd, ivMul(ivMul(w, l), db))
		}
	case opExp:
		w = ivExp(a)
		wd = ivMul(w, da)
	case opLog, opLog10:
		w, c = ivLog(a, in.op == opLog10)
		den := a
		if in.op == opLog10 {
			den = ivMul(a, Interval{NextDown(math.Ln10), NextUp(math.Ln10)})
		}
		wd, _ = ivDiv(da, den)
	case opSqrt:
		w, c = ivSqrt(a)
		wd, _ = ivDiv(da, Interval{2 * w.Lo, 2 * w.Hi})
	case opAbs:
		w = ivAbs(a)
		switch {
		case a.Lo >= 0:
			wd = da
		case a.Hi <= 0:
			wd = da.Neg()
		default:
			m := ivMag(da)
			wd = Interval{-m, m}
		}
	case opMin, opMax:
		var follow int
		w, follow = ivMinMax(a, b, in.op == opMax)
		switch follow {
		case 1:
			wd = da
		case 2:
			wd = db
		default:
			wd = da.Hull(db)
		}
	case opSin, opCos:
		isCos := in.op == opCos
		w = ivSinCos(a, isCos)
		g := ivSinCos(a, !isCos) // sin' = cos, cos' = −sin
		if isCos {
			g = g.Neg()
		}
		wd = ivMul(g, da)
	case opTan:
		w, c = ivTan(a)
		wd = ivMul(ivAdd(oneIv, ivSqr(w)), da)
	case opAtan:
		w = ivAtan(a)
		wd, _ = ivDiv(da, ivAdd(oneIv, ivSqr(a)))
	case opSinh:
		w = ivSinh(a)
		wd = ivMul(ivCosh(a), da)
	case opCosh:
		w = ivCosh(a)
		wd = ivMul(ivSinh(a), da)
	case opTanh:
		w = ivTanh(a)
		wd = ivMul(ivSub(oneIv, ivSqr(w)), da)
	}
	s.v[in.dst], s.d[in.dst] = w, wd
	s.ok[in.dst] = ok && c && !w.IsEmpty()
}

func dAdd(da, db Interval, ax, bx bool) Interval {
	switch {
	case !bx:
		return da
	case !ax:
		return db
	}
	return ivAdd(da, db)
}

// powCache remembers enclosures of x^y for recent points (x, y): a
// direct-mapped table of 64 entries. Branch and prune evaluates f on boxes
// whose ends were evaluated before, and math.Pow is the dearest library
// call, so most power enclosures at box ends come from here. An entry is a
// pure function of (x, y), so hits return exactly what powIv would.
type powCache struct {
	key [64][2]uint64
	val [64]Interval
	set [64]bool
}

func (c *powCache) pow(x, y float64) Interval {
	kx, ky := math.Float64bits(x), math.Float64bits(y)
	h := ((kx ^ ky*0x9e3779b97f4a7c15) * 0x9e3779b97f4a7c15) >> 58
	if c.set[h] && c.key[h] == [2]uint64{kx, ky} {
		return c.val[h]
	}
	v := powIv(x, y)
	c.key[h], c.val[h], c.set[h] = [2]uint64{kx, ky}, v, true
	return v
}

// powParts encloses a^b and, with deriv and an exponent b that is a point
// not depending on x, g' = b·a^(b−1) over a (else gp is empty); it reports
// whether a^b is continuous on the box. x^0 = 1 and 1^y = 1 also where the
// other operand is undefined, as math.Pow (and so Eval) has it.
func (pc *powCache) powParts(a, b Interval, bx, deriv bool) (w, gp Interval, ok bool) {
	if b.Lo == 0 && b.Hi == 0 || a.Lo == 1 && a.Hi == 1 {
		return oneIv, zeroIv, true
	}
	if a.IsEmpty() || b.IsEmpty() {
		return emptyIv, emptyIv, false
	}
	if b.Lo != b.Hi || bx {
		w, ok = ivPowGen(a, b)
		return w, emptyIv, ok
	}
	y := b.Lo
	if a.Lo >= 0 {
		return pc.powPos(a, y, deriv)
	}
	if y == math.Trunc(y) && !math.IsInf(y, 0) {
		w, ok = ivPowInt(a, y)
		if deriv {
			g, _ := ivPowInt(a, y-1)
			gp = ivScale(y, g)
		}
		return w, gp, ok
	}
	if a.Hi < 0 {
		return emptyIv, emptyIv, false
	}
	w, gp, _ = pc.powPos(Interval{0, a.Hi}, y, deriv)
	return w, gp, false
}

// powPos encloses a^y for a ≥ 0 and a point exponent y: monotone in a, so
// the bounds come from the ends; with deriv also g' = y·a^(y−1), monotone
// too, from the same end values divided by the ends (a^(y−1) = a^y/a),
// saving two calls of math.Pow.
func (pc *powCache) powPos(a Interval, y float64, deriv bool) (w, gp Interval, ok bool) {
	L := pc.pow(a.Lo, y)
	H := L
	if a.Hi != a.Lo {
		H = pc.pow(a.Hi, y)
	}
	ok = !(a.Lo == 0 && y < 0)
	if y >= 0 {
		w = Interval{L.Lo, H.Hi}
	} else {
		w = Interval{H.Lo, L.Hi}
	}
	w.Lo = math.Max(w.Lo, 0)
	if !deriv {
		return w, gp, ok
	}
	if y == 1 {
		return w, oneIv, ok
	}
	// Enclosures of a^(y−1) at the two ends.
	var gl, gh Interval
	switch {
	case a.Lo > 0:
		gl, _ = ivDiv(L, Point(a.Lo))
	case y > 1:
		gl = zeroIv
	default:
		gl = Interval{math.MaxFloat64, math.Inf(1)}
	}
	switch {
	case math.IsInf(a.Hi, 1): // the limit of a^(y−1) as a → ∞
		gh = zeroIv
		if y > 1 {
			gh = Interval{math.MaxFloat64, math.Inf(1)}
		}
	case a.Hi > 0:
		gh, _ = ivDiv(H, Point(a.Hi))
	default:
		gh = gl
	}
	var g Interval
	if y > 1 {
		g = Interval{gl.Lo, gh.Hi}
	} else {
		g = Interval{gh.Lo, gl.Hi}
	}
	return w, ivScale(y, g), ok
}

// Saturating terms. Rate laws abound in k·u/(c + u) (Michaelis–Menten,
// Hill, Holling type II, the Arrhenius factor x/(1 + x)), where the naive
// interval quotient treats the two occurrences of u as independent and
// overestimates by O(width) even on small boxes. h(u, c) = u/(u + c) is
// monotone in u (∂h/∂u = c/(u + c)², the sign of c) and in c (∂h/∂c =
// −u/(u + c)², minus the sign of u) wherever c and u keep their signs and
// u + c ≠ 0, so its range over U × C is the hull of its values at the four
// corners (elementary calculus; the monotonicity test of Hansen & Walster,
// Global Optimization Using Interval Analysis, 2004, applied to one node).
// The derivative k·(c·u' − u·c')/(u + c)² has each factor once, but u'
// and (u + c)² grow together: for a Hill term x^q/(m^q + x^q) on a box
// of relative width w the quotient of their enclosures overestimates the
// derivative's range by a relative amount of order q·w, several times the
// range itself (TestIntervalSaturatingTight). Where c does not depend on
// x and u is built from x by products, powers and exp, the derivative is
// also enclosed as k·h(1 − h)·u'/u, where h(1 − h) comes from the range
// of h and u'/u from rules that take each operand once (logD); the two
// enclosures are intersected. On a box the product k·u is computed only
// if the rule does not apply (satTerm.num).

// satTerm marks a division instruction of the form k·u/(c + u) or
// u/(c + u) (either order of the sum, k independent of x): the registers
// of u, c and k (k < 0 for no factor). logForm says that u is built so
// that its logarithmic derivative u'/u has a close enclosure (logD), which
// gives the term's derivative a tighter form (logDeriv).
type satTerm struct {
	u, c, k int32
	num     int32 // xcode index of the product k·u when only this term uses it, else −1
	ok      bool
	logForm bool
	skip    bool // on a product k·u marked by a term's num: skipped on boxes
}

// maxLogDepth bounds the nesting logD follows (common practice, no
// source: powers, products and exponentials nest a few levels deep in
// rate laws).
const maxLogDepth = 6

// findSat finds the saturating terms among the x-dependent instructions.
func findSat(p *Program) []satTerm {
	def := defs(p)
	sat := make([]satTerm, len(p.xcode))
	for i, in := range p.xcode {
		if in.op != opDiv || def[in.b] < 0 {
			continue
		}
		den := p.code[def[in.b]]
		if den.op != opAdd || !p.xdep[in.a] {
			continue
		}
		// Candidates for u: the numerator itself, or the x-dependent
		// factor of a product with a factor independent of x.
		u, k := in.a, int32(-1)
		if j := def[in.a]; j >= 0 && p.code[j].op == opMul && p.code[j].a != p.code[j].b {
			num := p.code[j]
			switch {
			case !p.xdep[num.a] && (num.b == den.a || num.b == den.b):
				u, k = num.b, num.a
			case !p.xdep[num.b] && (num.a == den.a || num.a == den.b):
				u, k = num.a, num.b
			}
		}
		switch u {
		case den.a:
			sat[i] = satTerm{u: u, c: den.b, k: k, ok: den.a != den.b}
		case den.b:
			sat[i] = satTerm{u: u, c: den.a, k: k, ok: den.a != den.b}
		default:
			continue
		}
		st := &sat[i]
		st.logForm = st.u != regState && logShape(p, def, st.u, maxLogDepth)
	}
	// A product k·u that only its saturating term reads need not be
	// computed on a box where the term's rule applies: the term then runs
	// it itself, just before the general rule.
	uses := make([]int, p.nreg)
	for _, in := range p.code {
		uses[in.a]++
		if in.b != in.a {
			uses[in.b]++
		}
	}
	xidx := make([]int32, p.nreg)
	for i := range xidx {
		xidx[i] = -1
	}
	for i, in := range p.xcode {
		xidx[in.dst] = int32(i)
	}
	for i := range sat {
		st := &sat[i]
		st.num = -1
		if !st.ok || st.k < 0 {
			continue
		}
		a := p.xcode[i].a // the numerator k·u
		if j := xidx[a]; j >= 0 && uses[a] == 1 && a != p.out && !sat[j].ok {
			st.num, sat[j].skip = j, true
		}
	}
	return sat
}

// defs returns, per register, the index in p.code of the instruction
// that writes it, or −1.
func defs(p *Program) []int32 {
	def := make([]int32, p.nreg)
	for i := range def {
		def[i] = -1
	}
	for i, in := range p.code {
		def[in.dst] = int32(i)
	}
	return def
}

// logShape reports whether register r, which depends on x, is built by
// the rules of logD: x, products and quotients (a factor or divisor may be
// independent of x), negation, powers with an exponent independent of x,
// and exp.
func logShape(p *Program, def []int32, r int32, depth int) bool {
	if r == regState {
		return true
	}
	if depth == 0 || def[r] < 0 || !p.xdep[r] {
		return false
	}
	in := p.code[def[r]]
	switch in.op {
	case opExp:
		return true
	case opNeg:
		return logShape(p, def, in.a, depth-1)
	case opPow:
		return !p.xdep[in.b] && logShape(p, def, in.a, depth-1)
	case opMul, opDiv:
		return (!p.xdep[in.a] || logShape(p, def, in.a, depth-1)) &&
			(!p.xdep[in.b] || logShape(p, def, in.b, depth-1))
	}
	return false
}

// satTerm evaluates a saturating term (and with deriv its derivative) by
// the monotone rule when its conditions hold, and reports whether it did;
// otherwise the general rules run.
func (s *ivState) satTerm(in *instr, st *satTerm, deriv bool) bool {
	// D is the sum instruction's enclosure ivAdd(U, C), so D excluding 0
	// means u + c ≠ 0 on all of U × C, which the corner rule needs.
	U, C, D := s.v[st.u], s.v[st.c], s.v[in.b]
	if !finiteIv(U) || !finiteIv(C) || sign0(C) == 0 || !(D.Lo > 0 || D.Hi < 0) ||
		(U.Lo < 0 && U.Hi > 0) || !s.ok[st.u] || !s.ok[st.c] {
		return false
	}
	// The minimum is at u = U.Lo when h increases in u (c > 0), and at
	// c = C.Hi when h decreases in c (u ≥ 0); the maximum at the
	// opposite corner.
	uMin, uMax := U.Lo, U.Hi
	if C.Lo < 0 {
		uMin, uMax = uMax, uMin
	}
	cMin, cMax := C.Hi, C.Lo
	if U.Hi <= 0 {
		cMin, cMax = cMax, cMin
	}
	lo, _ := ivDiv(Point(uMin), ivAdd(Point(uMin), Point(cMin)))
	hi, _ := ivDiv(Point(uMax), ivAdd(Point(uMax), Point(cMax)))
	w := Interval{lo.Lo, hi.Hi}
	ok := true
	if st.k >= 0 {
		w = ivMul(s.v[st.k], w)
		ok = s.ok[st.k]
	}
	s.v[in.dst], s.ok[in.dst] = w, ok
	if deriv {
		// k·(c·u' − u·c')/(u + c)². Registers that do not depend on x
		// keep a zero derivative (only x-dependent instructions write s.d).
		num := ivMul(C, s.d[st.u])
		dc := s.d[st.c]
		constC := dc.Lo == 0 && dc.Hi == 0
		if !constC {
			num = ivSub(num, ivMul(U, dc))
		}
		if st.k >= 0 {
			num = ivMul(s.v[st.k], num)
		}
		wd, _ := ivDiv(num, ivSqr(D))
		if constC && st.logForm {
			if t, ok := s.logDeriv(st, Interval{lo.Lo, hi.Hi}); ok {
				if st.k >= 0 {
					t = ivMul(s.v[st.k], t)
				}
				if v := wd.Intersect(t); !v.IsEmpty() {
					wd = v
				}
			}
		}
		s.d[in.dst] = wd
	}
	return true
}

// logDeriv encloses the derivative of h = u/(u + c), c independent of x,
// in the form h(1 − h)·u'/u: with h(1 − h) = u·c/(u + c)², this is
// c·u'/(u + c)², the general rule, wherever u ≠ 0. H encloses h on the
// box. Each factor is enclosed closely: h(1 − h) from the monotone pieces
// of the parabola p(h) = h − h², and u'/u by logD, where the general
// rule's numerator and denominator vary together and their quotient is
// overestimated (the structure of a function used to narrow its
// enclosure, as in the monotonicity and centred forms of Hansen &
// Walster, Global Optimization Using Interval Analysis, 2004, ch. 3 and
// 6). It reports false when the form does not apply on this box.
func (s *ivState) logDeriv(st *satTerm, H Interval) (Interval, bool) {
	L, ok := s.logD(st.u, maxLogDepth)
	if !ok || !finiteIv(L) || L.IsEmpty() || !finiteIv(H) {
		return Interval{}, false
	}
	// p(h) = h(1 − h) increases below 1/2 and decreases above.
	pl, ph := ivMul(Point(H.Lo), ivSub(oneIv, Point(H.Lo))), ivMul(Point(H.Hi), ivSub(oneIv, Point(H.Hi)))
	var P Interval
	switch {
	case H.Hi <= 0.5:
		P = Interval{pl.Lo, ph.Hi}
	case H.Lo >= 0.5:
		P = Interval{ph.Lo, pl.Hi}
	default:
		P = Interval{math.Min(pl.Lo, ph.Lo), 0.25}
	}
	return ivMul(P, L), true
}

// logD encloses the logarithmic derivative r'/r of register r over the
// box, and reports false unless r is defined, continuous and nonzero on
// the whole box, which the rules need: x'/x = 1/x; (v·w)'/(v·w) =
// v'/v + w'/w and (v/w)'/(v/w) = v'/v − w'/w (a factor k independent of x
// adds k'/k = 0, and must not vanish); (−v)'/(−v) = v'/v; (v^y)'/v^y =
// y·v'/v for v > 0 and y independent of x; exp(g)'/exp(g) = g'. Each rule
// has each operand once, so the enclosure is as close as those of its
// operands: for x^q it is q/x, for D·exp(E/T) it is −E/T².
func (s *ivState) logD(r int32, depth int) (Interval, bool) {
	if !s.ok[r] {
		return Interval{}, false
	}
	if r == regState {
		X := s.v[r]
		if sign0(X) == 0 || !finiteIv(X) {
			return Interval{}, false
		}
		q, _ := ivDiv(oneIv, X)
		return q, true
	}
	if depth == 0 {
		return Interval{}, false
	}
	in := &s.code[s.def[r]]
	switch in.op {
	case opExp:
		return s.d[in.a], true
	case opNeg:
		return s.logD(in.a, depth-1)
	case opPow:
		A, Y := s.v[in.a], s.v[in.b]
		if !(A.Lo > 0) || Y.Lo != Y.Hi || !finiteIv(Y) || in.bxdep {
			return Interval{}, false
		}
		L, ok := s.logD(in.a, depth-1)
		return ivScale(Y.Lo, L), ok
	case opMul, opDiv:
		la, ok := s.logFactor(in.a, in.axdep, depth)
		if !ok {
			return Interval{}, false
		}
		if in.a == in.b {
			return ivScale(2, la), true // a square
		}
		lb, ok := s.logFactor(in.b, in.bxdep, depth)
		switch {
		case !ok:
			return Interval{}, false
		case in.op == opDiv:
			return ivSub(la, lb), true
		}
		return ivAdd(la, lb), true
	}
	return Interval{}, false
}

// logFactor is logD for an operand of a product or quotient: 0 for one
// independent of x, which must not vanish.
func (s *ivState) logFactor(r int32, xdep bool, depth int) (Interval, bool) {
	if xdep {
		return s.logD(r, depth-1)
	}
	v := s.v[r]
	return zeroIv, s.ok[r] && finiteIv(v) && sign0(v) != 0
}

func sign0(v Interval) int {
	switch {
	case v.Lo > 0:
		return 1
	case v.Hi < 0:
		return -1
	}
	return 0
}

func finiteIv(v Interval) bool {
	return math.Abs(v.Lo) <= math.MaxFloat64 && math.Abs(v.Hi) <= math.MaxFloat64
}
