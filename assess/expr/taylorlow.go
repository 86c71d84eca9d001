package expr

import "math"

// Low orders. The equilibrium finder asks for f, f' and f''/2 (len(c) ≤ 3)
// many times per draw, so Taylor runs orders 1 and 2 through the rules
// below: the recurrences of taylor.go (Griewank & Walther 2008, ch. 13)
// written out for k ≤ 2, in the same order of operations, so the
// coefficients are those of the general rules (up to the sign of a zero),
// with the same kind of bound: inherited error plus the exact rounding error
// of each + − × ÷ (rounding.go). The savings come from the unrolling and from
// operands that do not depend on x: their higher coefficients are exactly
// zero with zero bounds (such a register is only ever written at order 0),
// so a sum with one reduces to exact copies and a product or quotient to a
// coefficient-wise scaling.
//
// (The standard-model bound u·|fl(a ∘ b)| (Higham, Accuracy and Stability
// of Numerical Algorithms, 2nd ed., 2002, §2.2) in place of the exact
// rounding errors was measured too: a few per cent faster on the benchmark
// law, but it charges u·|s| to exact sums such as 2 − 0, so a coefficient
// that is exactly zero only by such cancellation, like c₂ of
// log(1 + x²) − x² at 0, would lose its zero bound.)
//
// Operations without a rule here, and rare cases (a divisor that may be
// zero, a power at a zero base, a bound of the form 0·∞), run the general
// rules of taylor.go.

// lowOrder is the highest order that execLow handles.
const lowOrder = 2

// rp is the rounding error of p = fl(a·b), computed exactly (prodErr).
func rp(p, a, b float64) float64 { return prodErr(a, b, p) }

// rs is the rounding error of s = fl(a+b), computed exactly (sumErr).
func rs(s, a, b float64) float64 { return sumErr(a, b, s) }

// prop is the error of a·b inherited from |a − a*| ≤ ea, |b − b*| ≤ eb:
// |ab − a*b*| ≤ |a|·eb + ea·(|b| + eb).
func prop(a, ea, b, eb float64) float64 {
	return math.Abs(a)*eb + ea*(math.Abs(b)+eb)
}

// execLow runs one instruction to order d ≤ lowOrder; d must be 0 for an
// instruction that does not depend on x.
func (t *taylorRegs) execLow(in *instr, d int) {
	a, b, w := &t.r[in.a], &t.r[in.b], &t.r[in.dst]
	ok := true
	switch in.op {
	case opAdd:
		lowAdd(w, a, b, d, 1, in.axdep, in.bxdep)
	case opSub:
		lowAdd(w, a, b, d, -1, in.axdep, in.bxdep)
	case opNeg:
		for k := 0; k <= d; k++ {
			w.v[k], w.e[k] = -a.v[k], a.e[k]
		}
	case opMul:
		switch {
		case !in.axdep:
			ok = lowScale(w, a.v[0], a.e[0], b, d)
		case !in.bxdep:
			ok = lowScale(w, b.v[0], b.e[0], a, d)
		default:
			ok = lowMul(w, a, b, d)
		}
	case opDiv:
		ok = lowDiv(w, a, b, d, in.bxdep)
	case opPow:
		ok = !in.bxdep && lowPow(w, a, b, d)
	case opExp:
		ok = lowExp(w, a, d)
	case opLog:
		ok = lowLog(w, a, d)
	default:
		ok = false
	}
	if !ok {
		t.exec(in, d)
	}
}

// lowAdd: w = a + sb·b with sb = ±1. The value at order 0 is a₀ + b₀ or
// a₀ − b₀ as in Eval. Where one operand is constant in x the higher
// coefficients are copies of the other's, exact.
func lowAdd(w, a, b *series, d int, sb float64, ax, bx bool) {
	var w0 float64
	if sb > 0 {
		w0 = a.v[0] + b.v[0]
	} else {
		w0 = a.v[0] - b.v[0]
	}
	w.v[0], w.e[0] = w0, a.e[0]+b.e[0]+rs(w0, a.v[0], sb*b.v[0])
	if d == 0 {
		return
	}
	switch {
	case ax && bx:
		v := a.v[1] + sb*b.v[1]
		w.v[1], w.e[1] = v, a.e[1]+b.e[1]+rs(v, a.v[1], sb*b.v[1])
		if d > 1 {
			v := a.v[2] + sb*b.v[2]
			w.v[2], w.e[2] = v, a.e[2]+b.e[2]+rs(v, a.v[2], sb*b.v[2])
		}
	case ax:
		w.v[1], w.e[1] = a.v[1], a.e[1]
		w.v[2], w.e[2] = a.v[2], a.e[2]
	default:
		w.v[1], w.e[1] = sb*b.v[1], b.e[1]
		w.v[2], w.e[2] = sb*b.v[2], b.e[2]
	}
}

// lowScale: w = s·b for a factor s (bound es) constant in x: w_k = s·b_k.
// It reports false when a bound came out NaN (0·∞), for the general rule.
func lowScale(w *series, s, es float64, b *series, d int) bool {
	b0, eb0 := b.v[0], b.e[0]
	w0 := s * b0
	e0 := prop(s, es, b0, eb0) + rp(w0, s, b0)
	w.v[0], w.e[0] = w0, e0
	sum := e0
	if d > 0 {
		b1, eb1 := b.v[1], b.e[1]
		w1 := s * b1
		e1 := prop(s, es, b1, eb1) + rp(w1, s, b1)
		w.v[1], w.e[1] = w1, e1
		sum += e1
		if d > 1 {
			b2, eb2 := b.v[2], b.e[2]
			w2 := s * b2
			e2 := prop(s, es, b2, eb2) + rp(w2, s, b2)
			w.v[2], w.e[2] = w2, e2
			sum += e2
		}
	}
	return sum == sum
}

// lowMul: Cauchy product w_k = Σ_{j≤k} a_j b_{k−j}, both factors depending
// on x.
func lowMul(w, a, b *series, d int) bool {
	a0, ea0, b0, eb0 := a.v[0], a.e[0], b.v[0], b.e[0]
	w0 := a0 * b0
	e0 := prop(a0, ea0, b0, eb0) + rp(w0, a0, b0)
	w.v[0], w.e[0] = w0, e0
	sum := e0
	if d > 0 {
		a1, ea1, b1, eb1 := a.v[1], a.e[1], b.v[1], b.e[1]
		p, q := float64(a0*b1), float64(a1*b0)
		w1 := p + q
		e1 := prop(a0, ea0, b1, eb1) + prop(a1, ea1, b0, eb0) +
			rp(p, a0, b1) + rp(q, a1, b0) + rs(w1, p, q)
		w.v[1], w.e[1] = w1, e1
		sum += e1
		if d > 1 {
			a2, ea2, b2, eb2 := a.v[2], a.e[2], b.v[2], b.e[2]
			p, q, r := float64(a0*b2), float64(a1*b1), float64(a2*b0)
			s := p + q
			w2 := s + r
			e2 := prop(a0, ea0, b2, eb2) + prop(a1, ea1, b1, eb1) + prop(a2, ea2, b0, eb0) +
				rp(p, a0, b2) + rp(q, a1, b1) + rp(r, a2, b0) + rs(s, p, q) + rs(w2, s, r)
			w.v[2], w.e[2] = w2, e2
			sum += e2
		}
	}
	return sum == sum
}

// quo divides a numerator n (bound en) by b₀ (bound eb, with eb < |b₀| and
// ri = 1/(|b₀| − eb)): v = fl(n/b₀) and a bound on |v − n*/b*|. With q =
// n/b₀ exactly, |q − n*/b*| ≤ (en + |q|·eb)/(|b₀| − eb) (as divE) and
// |q| ≤ (1+u)|v| in the normal range; the rounding error |q − v| is
// |n − v·b₀|/|b₀|, the remainder computed exactly by one FMA (quoErr), and
// 1/|b₀| ≤ ri up to the rounding of ri. Near underflow (the quotient or the
// remainder possibly subnormal, tested by |n| since |v·b₀| ≥ (1−u)|n|)
// quoTiny adds eta for the rounding and for |q| − |v|.
func quo(n, en, b0, eb, ri float64) (float64, float64) {
	v := n / b0
	av := math.Abs(v)
	e := (en + av*(1+u)*eb + math.Abs(math.FMA(-v, b0, n))*(1+4*u)) * ri
	if av < minNormal || math.Abs(n) < 2*tinyProd {
		e += quoTiny(n, eb, ri)
	}
	return v, e
}

func quoTiny(n, eb, ri float64) float64 {
	if n == 0 {
		return 0 // 0/b₀ is an exact zero
	}
	return eta + eta*eb*ri
}

// lowDiv: w = a/b, w_k = (a_k − Σ_{j<k} w_j b_{k−j}) / b₀. A divisor that
// may be zero (eb₀ ≥ |b₀|) goes to the general rule, which gives +Inf.
func lowDiv(w, a, b *series, d int, bx bool) bool {
	b0, eb0 := b.v[0], b.e[0]
	if !(eb0 < math.Abs(b0)) {
		return false
	}
	ri := 1 / (math.Abs(b0) - eb0)
	w0, e0 := quo(a.v[0], a.e[0], b0, eb0, ri)
	w.v[0], w.e[0] = w0, e0
	sum := e0
	if d > 0 {
		if !bx { // divisor constant in x: w_k = a_k / b₀
			w1, e1 := quo(a.v[1], a.e[1], b0, eb0, ri)
			w.v[1], w.e[1] = w1, e1
			sum += e1
			if d > 1 {
				w2, e2 := quo(a.v[2], a.e[2], b0, eb0, ri)
				w.v[2], w.e[2] = w2, e2
				sum += e2
			}
			return sum == sum
		}
		a1, ea1, b1, eb1 := a.v[1], a.e[1], b.v[1], b.e[1]
		p := float64(w0 * b1)
		n := a1 - p
		en := ea1 + prop(w0, e0, b1, eb1) + rp(p, w0, b1) + rs(n, a1, -p)
		w1, e1 := quo(n, en, b0, eb0, ri)
		w.v[1], w.e[1] = w1, e1
		sum += e1
		if d > 1 {
			a2, ea2, b2, eb2 := a.v[2], a.e[2], b.v[2], b.e[2]
			p, q := float64(w0*b2), float64(w1*b1)
			s := a2 - p
			n := s - q
			en := ea2 + prop(w0, e0, b2, eb2) + prop(w1, e1, b1, eb1) +
				rp(p, w0, b2) + rp(q, w1, b1) + rs(s, a2, -p) + rs(n, s, -q)
			w2, e2 := quo(n, en, b0, eb0, ri)
			w.v[2], w.e[2] = w2, e2
			sum += e2
		}
	}
	return sum == sum
}

// lowPow: w = a^b with b constant in x, from the rule of (*taylorRegs).pow:
// k a₀ w_k = Σ_{j<k} (b(k−j) − j) a_{k−j} w_j, so
// w₁ = b a₁ w₀ / a₀ and w₂ = (2b a₂ w₀ + (b − 1) a₁ w₁) / (2a₀).
// The value is math.Pow(a₀, b₀) as in Eval, computed once. A zero base
// (or one whose bound reaches zero) and an underflowed power go to the
// general rule.
func lowPow(w, a, b *series, d int) bool {
	a0, ea0, b0, eb := a.v[0], a.e[0], b.v[0], b.e[0]
	w0 := math.Pow(a0, b0)
	e0 := powLib(a0, b0, w0) + powProp(a0, ea0, b0, eb, w0)
	w.v[0], w.e[0] = w0, e0
	if d == 0 {
		return true
	}
	aa := math.Abs(a0)
	if a0 == 0 || !(ea0 < aa) || math.Abs(w0) < minNormal {
		return false // the general rule: +Inf bounds (powUnderflow)
	}
	ri := 1 / (aa - ea0)
	a1, ea1 := a.v[1], a.e[1]
	if a1 == 1 && ea1 == 0 && (d == 1 || a.v[2] == 0 && a.e[2] == 0) {
		return lowPowShift(w, b0, eb, a0, ea0, ri, d)
	}
	t := b0 * a1
	et := prop(b0, eb, a1, ea1) + rp(t, b0, a1)
	s := t * w0
	es := prop(t, et, w0, e0) + rp(s, t, w0)
	w1, e1 := quo(s, es, a0, ea0, ri)
	w.v[1], w.e[1] = w1, e1
	sum := e0 + e1
	if d > 1 {
		a2, ea2 := a.v[2], a.e[2]
		c := b0 - 1
		ec := eb + rs(c, b0, -1)
		b2 := 2 * b0 // exact
		t0 := b2 * a2
		et0 := prop(b2, 2*eb, a2, ea2) + rp(t0, b2, a2)
		p0 := t0 * w0
		ep0 := prop(t0, et0, w0, e0) + rp(p0, t0, w0)
		t1 := c * a1
		et1 := prop(c, ec, a1, ea1) + rp(t1, c, a1)
		p1 := t1 * w1
		ep1 := prop(t1, et1, w1, e1) + rp(p1, t1, w1)
		s := p0 + p1
		es := ep0 + ep1 + rs(s, p0, p1)
		// Divisor 2a₀ (exact) with bound 2ea₀: 1/(2|a₀| − 2ea₀) = ri/2.
		w2, e2 := quo(s, es, 2*a0, 2*ea0, ri/2)
		w.v[2], w.e[2] = w2, e2
		sum += e2
	}
	return sum == sum
}

// lowPowShift finishes lowPow for a base x + const (a₁ = 1, a₂ = 0
// exactly, as for x^q): w₁ = b w₀/a₀, w₂ = (b − 1) w₁/(2a₀), the terms of
// lowPow's general formulas that are exact zeros or exact products by 1
// left out (same values, same bounds).
func lowPowShift(w *series, b0, eb, a0, ea0, ri float64, d int) bool {
	w0, e0 := w.v[0], w.e[0]
	s := b0 * w0
	es := prop(b0, eb, w0, e0) + rp(s, b0, w0)
	w1, e1 := quo(s, es, a0, ea0, ri)
	w.v[1], w.e[1] = w1, e1
	sum := e0 + e1
	if d > 1 {
		c := b0 - 1
		ec := eb + rs(c, b0, -1)
		p := c * w1
		ep := prop(c, ec, w1, e1) + rp(p, c, w1)
		w2, e2 := quo(p, ep, 2*a0, 2*ea0, ri/2)
		w.v[2], w.e[2] = w2, e2
		sum += e2
	}
	return sum == sum
}

// lowExp: w = exp a, w₁ = a₁ w₀, w₂ = (a₁ w₁ + 2a₂ w₀)/2 (expRec).
func lowExp(w, a *series, d int) bool {
	a0, ea0 := a.v[0], a.e[0]
	w0 := math.Exp(a0)
	e0 := lib(w0, 4) + expProp(w0, ea0)
	w.v[0], w.e[0] = w0, e0
	if d == 0 {
		return true
	}
	a1, ea1 := a.v[1], a.e[1]
	w1 := a1 * w0
	e1 := prop(a1, ea1, w0, e0) + rp(w1, a1, w0)
	w.v[1], w.e[1] = w1, e1
	sum := e0 + e1
	if d > 1 {
		a2, ea2 := a.v[2], a.e[2]
		p := float64(a1 * w1)
		t := 2 * a2 // exact
		q := float64(t * w0)
		s := p + q
		es := prop(a1, ea1, w1, e1) + prop(t, 2*ea2, w0, e0) +
			rp(p, a1, w1) + rp(q, t, w0) + rs(s, p, q)
		w2, e2 := quo(s, es, 2, 0, 0.5)
		w.v[2], w.e[2] = w2, e2
		sum += e2
	}
	return sum == sum
}

// lowLog: w = log a, w₁ = a₁/a₀, w₂ = (2a₂ − w₁ a₁)/(2a₀) (logRec). A base
// that is not positive or whose bound reaches zero goes to the general
// rule.
func lowLog(w, a *series, d int) bool {
	a0, ea0 := a.v[0], a.e[0]
	if d == 0 || !(ea0 < a0) {
		return false
	}
	w0 := math.Log(a0)
	e0 := logLib(w0, a0, 3) + logProp(a0, ea0)
	w.v[0], w.e[0] = w0, e0
	ri := 1 / (a0 - ea0)
	a1, ea1 := a.v[1], a.e[1]
	w1, e1 := quo(a1, ea1, a0, ea0, ri)
	w.v[1], w.e[1] = w1, e1
	sum := e0 + e1
	if d > 1 {
		a2, ea2 := a.v[2], a.e[2]
		p := float64(w1 * a1)
		n := 2*a2 - p // 2a₂ exact
		en := 2*ea2 + prop(w1, e1, a1, ea1) + rp(p, w1, a1) + rs(n, 2*a2, -p)
		w2, e2 := quo(n, en, 2*a0, 2*ea0, ri/2)
		w.v[2], w.e[2] = w2, e2
		sum += e2
	}
	return sum == sum
}
