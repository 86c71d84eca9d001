package expr

import (
	"fmt"
	"math"
)

// MaxOrder is the highest derivative order Taylor computes.
const MaxOrder = 7

// series is a truncated Taylor series v[0] + v[1]t + … + v[MaxOrder]t^MaxOrder
// with bounds e[k] ≥ |v[k] − v*[k]| on the error of each coefficient.
type series struct {
	v, e [MaxOrder + 1]float64
}

// taylorRegs is the register file of the Taylor back end: one series per
// register plus scratch series for auxiliary recurrences. The registers
// that do not depend on x are a function of θ alone; they are kept from one
// call to the next while θ is unchanged (bit for bit), since a caller
// typically asks for many points x with the same θ.
type taylorRegs struct {
	r     []series
	aux   [4]series
	theta []float64 // θ for which the x-independent registers are current
	ready bool      // theta is valid
}

// sameBits reports whether a and b hold the same float64 bit patterns.
func sameBits(a, b []float64) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if math.Float64bits(a[i]) != math.Float64bits(b[i]) {
			return false
		}
	}
	return true
}

// Taylor fills c[k] = f⁽ᵏ⁾(x)/k! for k = 0..len(c)−1 (len(c) ≤ MaxOrder+1)
// in one pass of truncated Taylor arithmetic (the coefficient recurrences of
// Griewank & Walther, Evaluating Derivatives, 2nd ed., SIAM 2008, ch. 13), and
// e[k] ≥ a bound on the floating-point error |c[k] − exact| carried by
// running error analysis through every operation (see rounding.go). e may be
// nil. c[0] equals Eval(x, theta) bit for bit (or both are NaN).
//
// Where f is not analytic the coefficients are NaN or ±Inf rather than
// meaningless numbers: u^a with non-integer a at u = 0 (and non-constant u),
// sqrt and log at 0, division by 0. The non-smooth functions abs, min and
// max choose their branch at a kink by the sign of the first non-zero
// coefficient of the argument (of a − b for min and max), that is the branch
// valid for t → 0⁺ when the kink is crossed; the error bound then also
// covers the other branch unless the choice is certain. A coefficient whose
// value is NaN has bound +Inf.
//
// Orders 1 and 2, which root finders ask for most, run unrolled rules with
// the same values and the same kind of bounds (taylorlow.go). The part of
// f that does not depend on x is computed once per θ and kept in the
// Machine while later calls pass the same θ (bit for bit); the results do
// not depend on earlier calls.
//
// Taylor panics if len(c) > MaxOrder+1, if e is non-nil and shorter than c,
// or if theta is shorter than NumParams(). It does not allocate.
func (m *Machine) Taylor(x float64, theta []float64, c, e []float64) {
	d := len(c) - 1
	if d < 0 {
		return
	}
	if d > MaxOrder {
		panic(fmt.Sprintf("expr: Taylor order %d exceeds MaxOrder = %d", d, MaxOrder))
	}
	if e != nil && len(e) < len(c) {
		panic("expr: Taylor: len(e) < len(c)")
	}
	p := m.p
	np := len(p.params)
	if len(theta) < np {
		panic(fmt.Sprintf("expr: len(theta) = %d, want %d parameters", len(theta), np))
	}
	t := &m.ts
	r := t.r
	th := theta[:np]
	if !t.ready || !sameBits(t.theta, th) {
		// The x-independent part, at order 0, always by the same rules
		// whatever the order asked, so that the result does not depend on
		// earlier calls.
		t.ready = false
		for j, v := range th {
			r[paramReg(j)].v[0] = v
		}
		for i := range p.pcode {
			t.execLow(&p.pcode[i], 0)
		}
		copy(t.theta, th)
		t.ready = true
	}
	r[regState].v[0] = x
	if d <= lowOrder {
		for i := range p.xcode {
			t.execLow(&p.xcode[i], d)
		}
	} else {
		for i := range p.xcode {
			t.exec(&p.xcode[i], d)
		}
	}
	out := &r[p.out]
	for k := 0; k <= d; k++ {
		c[k] = out.v[k]
		if e != nil {
			b := out.e[k] * taylorSlack
			if math.IsNaN(b) || math.IsNaN(c[k]) {
				b = math.Inf(1)
			}
			e[k] = b
		}
	}
}

// exec runs one instruction to degree d (degree 0 for a result that does
// not depend on the state: its higher coefficients stay exactly zero).
func (t *taylorRegs) exec(in *instr, d int) {
	if !in.xdep {
		d = 0
	}
	a, b, w := &t.r[in.a], &t.r[in.b], &t.r[in.dst]
	switch in.op {
	case opAdd:
		for k := 0; k <= d; k++ {
			w.v[k], w.e[k] = addE(a.v[k], a.e[k], b.v[k], b.e[k])
		}
	case opSub:
		for k := 0; k <= d; k++ {
			w.v[k], w.e[k] = subE(a.v[k], a.e[k], b.v[k], b.e[k])
		}
	case opNeg:
		for k := 0; k <= d; k++ {
			w.v[k], w.e[k] = -a.v[k], a.e[k]
		}
	case opMul:
		seriesMul(w, a, b, d)
	case opDiv:
		seriesDiv(w, a, b, d)
	case opPow:
		t.pow(w, a, b, d, in.bxdep)
	case opExp:
		w.v[0] = math.Exp(a.v[0])
		w.e[0] = lib(w.v[0], 4) + expProp(w.v[0], a.e[0])
		expRec(w, a, d)
	case opLog:
		w.v[0] = math.Log(a.v[0])
		w.e[0] = logLib(w.v[0], a.v[0], 3) + logProp(a.v[0], a.e[0])
		logRec(w, a, d)
	case opLog10:
		w.v[0] = math.Log10(a.v[0])
		w.e[0] = logLib(w.v[0], a.v[0], 4) + logProp(a.v[0], a.e[0])/math.Ln10*(1+4*u)
		if d > 0 {
			l := &t.aux[0]
			l.v[0] = math.Log(a.v[0])
			l.e[0] = logLib(l.v[0], a.v[0], 3) + logProp(a.v[0], a.e[0])
			logRec(l, a, d)
			const inv = 1 / math.Ln10
			for k := 1; k <= d; k++ {
				w.v[k], w.e[k] = mulE(l.v[k], l.e[k], inv, u*inv)
			}
		}
	case opSqrt:
		seriesSqrt(w, a, d)
	case opAbs:
		seriesAbs(w, a, d)
	case opMin, opMax:
		seriesMinMax(w, a, b, d, in.op == opMax)
	case opSin, opCos, opSinh, opCosh:
		s, c := w, &t.aux[0]
		if in.op == opCos || in.op == opCosh {
			s, c = c, w
		}
		sinCos(s, c, a, d, in.op == opSinh || in.op == opCosh)
	case opTan, opTanh:
		seriesTan(w, &t.aux[0], a, d, in.op == opTanh)
	case opAtan:
		seriesAtan(w, &t.aux[0], a, d)
	}
}

// seriesMul: w_k = Σ_{j=0}^{k} a_j b_{k−j} (Cauchy product).
func seriesMul(w, a, b *series, d int) {
	for k := 0; k <= d; k++ {
		s, es := mulE(a.v[0], a.e[0], b.v[k], b.e[k])
		for j := 1; j <= k; j++ {
			p, ep := mulE(a.v[j], a.e[j], b.v[k-j], b.e[k-j])
			s, es = addE(s, es, p, ep)
		}
		w.v[k], w.e[k] = s, es
	}
}

// seriesDiv: w = a/b, w_k = (a_k − Σ_{j<k} w_j b_{k−j}) / b_0
// (Griewank & Walther ch. 13).
func seriesDiv(w, a, b *series, d int) {
	w.v[0], w.e[0] = divE(a.v[0], a.e[0], b.v[0], b.e[0])
	for k := 1; k <= d; k++ {
		s, es := a.v[k], a.e[k]
		for j := 0; j < k; j++ {
			p, ep := mulE(w.v[j], w.e[j], b.v[k-j], b.e[k-j])
			s, es = subE(s, es, p, ep)
		}
		w.v[k], w.e[k] = divE(s, es, b.v[0], b.e[0])
	}
}

// expRec fills w_1..w_d of w = exp(a) given w_0, from w' = a'w:
// w_k = (1/k) Σ_{j=1}^{k} j a_j w_{k−j} (Griewank & Walther ch. 13).
func expRec(w, a *series, d int) {
	for k := 1; k <= d; k++ {
		var s, es float64
		for j := 1; j <= k; j++ {
			q, eq := mulIntE(a.v[j], a.e[j], j)
			p, ep := mulE(q, eq, w.v[k-j], w.e[k-j])
			s, es = acc(s, es, p, ep, j == 1)
		}
		w.v[k], w.e[k] = divIntE(s, es, k)
	}
}

// logRec fills w_1..w_d of w = log(a), from a w' = a':
// w_k = (k a_k − Σ_{j=1}^{k−1} j w_j a_{k−j}) / (k a_0).
func logRec(w, a *series, d int) {
	for k := 1; k <= d; k++ {
		num, enum := mulIntE(a.v[k], a.e[k], k)
		for j := 1; j < k; j++ {
			q, eq := mulIntE(w.v[j], w.e[j], j)
			p, ep := mulE(q, eq, a.v[k-j], a.e[k-j])
			num, enum = subE(num, enum, p, ep)
		}
		den, eden := mulIntE(a.v[0], a.e[0], k)
		w.v[k], w.e[k] = divE(num, enum, den, eden)
	}
}

// seriesSqrt: w = √a, w_k = (a_k − Σ_{j=1}^{k−1} w_j w_{k−j}) / (2 w_0).
func seriesSqrt(w, a *series, d int) {
	a0, ea := a.v[0], a.e[0]
	w0 := math.Sqrt(a0)
	prop := 0.0
	if ea != 0 {
		// |√a* − √a| ≤ min(√ea, ea/(√a + √max(a−ea, 0))).
		prop = math.Sqrt(ea)
		if den := w0 + math.Sqrt(math.Max(a0-ea, 0)); den > 0 {
			prop = math.Min(prop, ea/den)
		}
		prop *= 1 + 4*u
	}
	w.v[0], w.e[0] = w0, u*w0+prop
	if a0 < 0 {
		w.e[0] = math.Inf(1)
	}
	for k := 1; k <= d; k++ {
		s, es := a.v[k], a.e[k]
		for j := 1; j < k; j++ {
			p, ep := mulE(w.v[j], w.e[j], w.v[k-j], w.e[k-j])
			s, es = subE(s, es, p, ep)
		}
		den, eden := mulIntE(w.v[0], w.e[0], 2)
		w.v[k], w.e[k] = divE(s, es, den, eden)
	}
}

// sinCos fills s = sin a and c = cos a (or sinh and cosh when hyp) from
// s' = a'c, c' = ∓a's: s_k = (1/k) Σ j a_j c_{k−j}, c_k = ∓(1/k) Σ j a_j s_{k−j}.
func sinCos(s, c, a *series, d int, hyp bool) {
	a0, ea := a.v[0], a.e[0]
	if hyp {
		s.v[0], c.v[0] = math.Sinh(a0), math.Cosh(a0)
		// Go's Sinh for 1/2 < |x| ≤ 21 is (e^x − e^−x)/2: a few u.
		ls, lc := lib(s.v[0], 6), lib(c.v[0], 6)
		// |sinh a* − sinh a| ≤ ea·cosh(|a|+ea) ≤ ea·cosh(a)·e^ea;
		// |cosh a* − cosh a| ≤ ea·sinh(|a|+ea) ≤ ea·(|sinh a|·cosh ea + cosh a·sinh ea).
		s.e[0] = ls + pm(ea, (c.v[0]+lc)*math.Exp(ea))
		c.e[0] = lc + pm(ea, (math.Abs(s.v[0])+ls)*math.Cosh(ea)+(c.v[0]+lc)*math.Sinh(ea))
	} else {
		s.v[0], c.v[0] = math.Sin(a0), math.Cos(a0)
		ls := lib(s.v[0], 4) + trigReduce(a0)
		lc := lib(c.v[0], 4) + trigReduce(a0)
		// Mean value theorem: |sin a* − sin a| ≤ ea·max|cos ξ| ≤ ea·min(1, |cos a| + ea).
		s.e[0] = ls + pm(ea, math.Min(1, math.Abs(c.v[0])+lc+ea))
		c.e[0] = lc + pm(ea, math.Min(1, math.Abs(s.v[0])+ls+ea))
	}
	for k := 1; k <= d; k++ {
		var ss, es, cs, ec float64
		for j := 1; j <= k; j++ {
			q, eq := mulIntE(a.v[j], a.e[j], j)
			p, ep := mulE(q, eq, c.v[k-j], c.e[k-j])
			ss, es = acc(ss, es, p, ep, j == 1)
			p, ep = mulE(q, eq, s.v[k-j], s.e[k-j])
			cs, ec = acc(cs, ec, p, ep, j == 1)
		}
		s.v[k], s.e[k] = divIntE(ss, es, k)
		c.v[k], c.e[k] = divIntE(cs, ec, k)
		if !hyp {
			c.v[k] = -c.v[k]
		}
	}
}

// seriesTan: w = tan a (tanh a when hyp) from w' = v a', v = 1 ± w²:
// w_k = (1/k) Σ_{j=1}^{k} j a_j v_{k−j}, v_k = ±Σ_{j=0}^{k} w_j w_{k−j}.
func seriesTan(w, v, a *series, d int, hyp bool) {
	a0, ea := a.v[0], a.e[0]
	if hyp {
		w.v[0] = math.Tanh(a0)
		// tanh' = sech² ≤ min(1, 4e^(−2|ξ|)).
		w.e[0] = lib(w.v[0], 4) + pm(ea, math.Min(1, 4*math.Exp(-2*math.Max(math.Abs(a0)-ea, 0))))
	} else {
		w0 := math.Tan(a0)
		w.v[0] = w0
		w.e[0] = lib(w0, 4) + trigReduce(a0)*(1+w0*w0)
		if ea != 0 {
			// tan' = 1/cos²ξ with |cos ξ| ≥ |cos a| − ea.
			cs := (1 - 1e-15) / math.Sqrt(1+w0*w0)
			if ea < cs/2 {
				w.e[0] += ea / ((cs - ea) * (cs - ea))
			} else {
				w.e[0] = math.Inf(1)
			}
		}
	}
	if d == 0 {
		return
	}
	sq, esq := mulE(w.v[0], w.e[0], w.v[0], w.e[0])
	if hyp {
		v.v[0], v.e[0] = subE(1, 0, sq, esq)
	} else {
		v.v[0], v.e[0] = addE(1, 0, sq, esq)
	}
	for k := 1; k <= d; k++ {
		var s, es float64
		for j := 1; j <= k; j++ {
			q, eq := mulIntE(a.v[j], a.e[j], j)
			p, ep := mulE(q, eq, v.v[k-j], v.e[k-j])
			s, es = acc(s, es, p, ep, j == 1)
		}
		w.v[k], w.e[k] = divIntE(s, es, k)
		if k < d {
			var q, eq float64
			for j := 0; j <= k; j++ {
				p, ep := mulE(w.v[j], w.e[j], w.v[k-j], w.e[k-j])
				q, eq = acc(q, eq, p, ep, j == 0)
			}
			if hyp {
				q = -q
			}
			v.v[k], v.e[k] = q, eq
		}
	}
}

// seriesAtan: w = atan a from v w' = a', v = 1 + a²:
// w_k = (k a_k − Σ_{j=1}^{k−1} j w_j v_{k−j}) / (k v_0).
func seriesAtan(w, v, a *series, d int) {
	a0, ea := a.v[0], a.e[0]
	w.v[0] = math.Atan(a0)
	lo := math.Max(math.Abs(a0)-ea, 0)
	w.e[0] = lib(w.v[0], 4) + pm(ea, 1/(1+lo*lo))
	if d == 0 {
		return
	}
	for k := 0; k < d; k++ {
		var q, eq float64
		for j := 0; j <= k; j++ {
			p, ep := mulE(a.v[j], a.e[j], a.v[k-j], a.e[k-j])
			q, eq = acc(q, eq, p, ep, j == 0)
		}
		if k == 0 {
			q, eq = addE(1, 0, q, eq)
		}
		v.v[k], v.e[k] = q, eq
	}
	for k := 1; k <= d; k++ {
		num, enum := mulIntE(a.v[k], a.e[k], k)
		for j := 1; j < k; j++ {
			q, eq := mulIntE(w.v[j], w.e[j], j)
			p, ep := mulE(q, eq, v.v[k-j], v.e[k-j])
			num, enum = subE(num, enum, p, ep)
		}
		den, eden := mulIntE(v.v[0], v.e[0], k)
		w.v[k], w.e[k] = divE(num, enum, den, eden)
	}
}

// seriesAbs: w = s·a with s the sign of the first non-zero coefficient of a
// (+1 if none). The choice is certain when that coefficient exceeds its
// error bound and every earlier one is exactly zero; otherwise the exact
// function may follow the other branch and |s a_k − s* a*_k| ≤ 2|a_k| + e_k.
func seriesAbs(w, a *series, d int) {
	w.v[0], w.e[0] = math.Abs(a.v[0]), a.e[0] // |·| is 1-Lipschitz
	if d == 0 {
		return
	}
	sign, certain, doubt := 1.0, false, false
	for k := 0; k <= d; k++ {
		if a.v[k] != 0 {
			if a.v[k] < 0 {
				sign = -1
			}
			certain = !doubt && math.Abs(a.v[k]) > a.e[k]
			break
		}
		doubt = doubt || a.e[k] != 0 // an exact non-zero coefficient may hide here
	}
	for k := 1; k <= d; k++ {
		w.v[k], w.e[k] = sign*a.v[k], a.e[k]
		if !certain {
			w.e[k] += 2 * math.Abs(a.v[k])
		}
	}
}

// seriesMinMax: min(a, b) (max when isMax) follows a or b according to the
// first coefficient where they differ (a when none differ); uncertain
// choices widen the bound to cover the other operand.
func seriesMinMax(w, a, b *series, d int, isMax bool) {
	if isMax {
		w.v[0] = math.Max(a.v[0], b.v[0])
	} else {
		w.v[0] = math.Min(a.v[0], b.v[0])
	}
	w.e[0] = math.Max(a.e[0], b.e[0]) // min and max are 1-Lipschitz in each argument
	if d == 0 {
		return
	}
	pick, certain, doubt := a, false, false
	for k := 0; k <= d; k++ {
		if a.v[k] != b.v[k] {
			if (a.v[k] > b.v[k]) != isMax {
				pick = b
			}
			certain = !doubt && math.Abs(a.v[k]-b.v[k]) > a.e[k]+b.e[k]
			break
		}
		doubt = doubt || a.e[k] != 0 || b.e[k] != 0
	}
	other := b
	if pick == b {
		other = a
	}
	for k := 1; k <= d; k++ {
		w.v[k], w.e[k] = pick.v[k], pick.e[k]
		if !certain {
			w.e[k] = math.Max(w.e[k], math.Abs(a.v[k]-b.v[k])+other.e[k])
		}
	}
	if math.IsNaN(w.v[0]) {
		for k := 1; k <= d; k++ {
			w.v[k] = math.NaN()
		}
	}
}

// pow: w = a^b. The value is math.Pow(a_0, b_0), as in Eval.
//
// Exponent independent of x (a constant or parameter): from a w' = b a' w,
// k a_0 w_k = Σ_{j=0}^{k−1} (b(k−j) − j) a_{k−j} w_j (from the ODE, as in
// Griewank & Walther ch. 13), valid for a_0 ≠ 0. At a_0 = 0 the series exists only for an
// integer exponent n ≥ 0 (then it is the n-th Cauchy power of a, formed by
// binary powering) or a base constant in x; otherwise the higher
// coefficients are NaN.
//
// Exponent depending on x: w = exp(b log a), for a_0 > 0 only (NaN beyond
// the value otherwise).
func (t *taylorRegs) pow(w, a, b *series, d int, bxdep bool) {
	a0, b0 := a.v[0], b.v[0]
	w0 := math.Pow(a0, b0)
	w.v[0] = w0
	w.e[0] = powLib(a0, b0, w0) + powProp(a0, a.e[0], b0, b.e[0], w0)
	if d == 0 {
		return
	}
	switch {
	case bxdep:
		if a0 > 0 {
			l, pr := &t.aux[0], &t.aux[1]
			l.v[0] = math.Log(a0)
			l.e[0] = logLib(l.v[0], a0, 3) + logProp(a0, a.e[0])
			logRec(l, a, d)
			seriesMul(pr, b, l, d)
			expRec(w, pr, d)
			powUnderflow(w, d)
			return
		}
	case a0 != 0:
		eb := b.e[0]
		for k := 1; k <= d; k++ {
			var s, es float64
			for j := 0; j < k; j++ {
				al, eal := mulIntE(b0, eb, k-j)
				if j > 0 {
					al, eal = subE(al, eal, float64(j), 0)
				}
				p, ep := mulE(al, eal, a.v[k-j], a.e[k-j])
				p, ep = mulE(p, ep, w.v[j], w.e[j])
				s, es = acc(s, es, p, ep, j == 0)
			}
			den, eden := mulIntE(a0, a.e[0], k)
			w.v[k], w.e[k] = divE(s, es, den, eden)
		}
		powUnderflow(w, d)
		return
	default: // a0 == 0, exponent constant in x
		constBase := true
		for k := 1; k <= d; k++ {
			if a.v[k] != 0 || a.e[k] != 0 {
				constBase = false
			}
		}
		n := b0
		switch {
		case constBase:
			for k := 1; k <= d; k++ {
				w.v[k], w.e[k] = 0, 0
			}
			return
		case b.e[0] == 0 && n == math.Trunc(n) && n >= 0 && n <= maxIntPow:
			t.intPow(w, a, int(n), d)
			w.v[0] = w0
			return
		case b.e[0] == 0 && n == math.Trunc(n) && n > maxIntPow:
			// a = t·g(t) exactly when a_0 is exact, so a^n = O(t^n), n > d.
			for k := 1; k <= d; k++ {
				w.v[k], w.e[k] = 0, 0
				if a.e[0] != 0 {
					w.e[k] = math.Inf(1)
				}
			}
			return
		}
	}
	for k := 1; k <= d; k++ {
		w.v[k], w.e[k] = math.NaN(), math.Inf(1)
	}
}

// powUnderflow: when a^b with a ≠ 0 underflowed (|w₀| below the least
// normal number, so w₀ has lost its relative accuracy), the higher
// coefficients, w₀ times powers of a_k/a₀ that may be huge, get the bound
// +Inf: the running bounds, computed in floating point, would underflow
// with w₀'s.
func powUnderflow(w *series, d int) {
	if math.Abs(w.v[0]) < minNormal {
		for k := 1; k <= d; k++ {
			w.e[k] = math.Inf(1)
		}
	}
}

// intPow sets w to the n-th Cauchy power of a by binary powering.
func (t *taylorRegs) intPow(w, a *series, n, d int) {
	res, base, tmp := &t.aux[0], &t.aux[1], &t.aux[2]
	*res = series{}
	res.v[0] = 1
	*base = *a
	for n > 0 {
		if n&1 == 1 {
			seriesMul(tmp, res, base, d)
			*res = *tmp
		}
		n >>= 1
		if n > 0 {
			seriesMul(tmp, base, base, d)
			*base = *tmp
		}
	}
	*w = *res
}
