package expr

import (
	"fmt"
	"math"
	"math/big"
)

// A high-precision reference for the Taylor back end, built only on Go's
// math/big: elementary functions by their power series (with argument
// halving or Newton iteration) and Taylor coefficients by the same
// Griewank–Walther recurrences in exact-rounded big.Float arithmetic at
// refPrec bits, walking the syntax tree rather than the lowered program (so
// constant folding, common subexpressions and the lowering of integer
// powers are checked too). Rounding in the reference is about 2^-300
// relative, far below float64 errors.

const refPrec = 400

func bf(x float64) *big.Float         { return new(big.Float).SetPrec(refPrec).SetFloat64(x) }
func bnew() *big.Float                { return new(big.Float).SetPrec(refPrec) }
func badd(a, b *big.Float) *big.Float { return bnew().Add(a, b) }
func bsub(a, b *big.Float) *big.Float { return bnew().Sub(a, b) }
func bmul(a, b *big.Float) *big.Float { return bnew().Mul(a, b) }
func bquo(a, b *big.Float) *big.Float { return bnew().Quo(a, b) }
func bint(k int) *big.Float           { return bnew().SetInt64(int64(k)) }

// errNaN marks a reference value that is not a real number.
type errNaN struct{ what string }

func (e errNaN) Error() string { return "reference undefined: " + e.what }

// bexp: exp x = (exp(x/2^k))^(2^k), series for |x/2^k| < 2^-8.
func bexp(x *big.Float) *big.Float {
	prec := uint(refPrec + 64)
	y := new(big.Float).SetPrec(prec).Set(x)
	k := 0
	for y.MantExp(nil) > -8 && y.Sign() != 0 {
		y.SetMantExp(y, -1)
		k++
	}
	sum := new(big.Float).SetPrec(prec).SetInt64(1)
	term := new(big.Float).SetPrec(prec).SetInt64(1)
	for i := 1; i < 400; i++ {
		term.Mul(term, y)
		term.Quo(term, new(big.Float).SetPrec(prec).SetInt64(int64(i)))
		sum.Add(sum, term)
		if term.Sign() == 0 || term.MantExp(nil) < sum.MantExp(nil)-int(prec)-8 {
			break
		}
	}
	for ; k > 0; k-- {
		sum.Mul(sum, sum)
	}
	return bnew().Set(sum)
}

// blog: Newton's iteration y ← y + 2(x − e^y)/(x + e^y) (Halley's method
// for e^y = x, cubically convergent) from the float64 logarithm.
func blog(x *big.Float) *big.Float {
	if x.Sign() <= 0 {
		panic(errNaN{"log of non-positive"})
	}
	xf, _ := x.Float64()
	y := bf(math.Log(xf))
	if math.IsInf(xf, 0) || xf == 0 {
		panic(errNaN{"log argument out of float64 range"})
	}
	for i := 0; i < 6; i++ {
		ey := bexp(y)
		y = badd(y, bquo(bmul(bint(2), bsub(x, ey)), badd(x, ey)))
	}
	return y
}

// bsincos: series for y = x/2^k with |y| < 2^-8, then k double-angle
// steps s ← 2sc, c ← c² − s² (each at most doubles the absolute error).
func bsincos(x *big.Float) (s, c *big.Float) {
	prec := uint(refPrec + 128)
	y := new(big.Float).SetPrec(prec).Set(x)
	k := 0
	for y.MantExp(nil) > -8 && y.Sign() != 0 {
		y.SetMantExp(y, -1)
		k++
	}
	y2 := new(big.Float).SetPrec(prec).Mul(y, y)
	s = new(big.Float).SetPrec(prec).Set(y)
	c = new(big.Float).SetPrec(prec).SetInt64(1)
	ts := new(big.Float).SetPrec(prec).Set(y)
	tc := new(big.Float).SetPrec(prec).SetInt64(1)
	for n := 1; n < 200; n++ {
		tc.Mul(tc, y2)
		tc.Quo(tc, new(big.Float).SetPrec(prec).SetInt64(int64((2*n-1)*(2*n))))
		tc.Neg(tc)
		ts.Mul(ts, y2)
		ts.Quo(ts, new(big.Float).SetPrec(prec).SetInt64(int64((2*n)*(2*n+1))))
		ts.Neg(ts)
		c.Add(c, tc)
		s.Add(s, ts)
		if ts.Sign() == 0 || ts.MantExp(nil) < -int(prec)-16 {
			break
		}
	}
	for ; k > 0; k-- {
		s2 := new(big.Float).SetPrec(prec).Mul(s, c)
		s2.SetMantExp(s2, 1)
		c2 := new(big.Float).SetPrec(prec).Mul(c, c)
		c2.Sub(c2, new(big.Float).SetPrec(prec).Mul(s, s))
		s, c = s2, c2
	}
	return bnew().Set(s), bnew().Set(c)
}

// batan: atan x = 2 atan(x/(1+√(1+x²))) until |x| < 1/16, then the series.
func batan(x *big.Float) *big.Float {
	prec := uint(refPrec + 64)
	y := new(big.Float).SetPrec(prec).Set(x)
	k := 0
	one := new(big.Float).SetPrec(prec).SetInt64(1)
	for y.MantExp(nil) > -4 && y.Sign() != 0 {
		q := new(big.Float).SetPrec(prec).Mul(y, y)
		q.Add(q, one)
		q.Sqrt(q)
		q.Add(q, one)
		y.Quo(y, q)
		k++
	}
	y2 := new(big.Float).SetPrec(prec).Mul(y, y)
	sum := new(big.Float).SetPrec(prec).Set(y)
	pw := new(big.Float).SetPrec(prec).Set(y)
	for n := 1; n < 2000; n++ {
		pw.Mul(pw, y2)
		pw.Neg(pw)
		t := new(big.Float).SetPrec(prec).Quo(pw, new(big.Float).SetPrec(prec).SetInt64(int64(2*n+1)))
		sum.Add(sum, t)
		if t.Sign() == 0 || t.MantExp(nil) < -int(prec)-8 {
			break
		}
	}
	sum.SetMantExp(sum, k)
	return bnew().Set(sum)
}

func bpi() *big.Float { return bmul(bint(4), batan(bint(1))) }

// bser is a truncated Taylor series with big.Float coefficients.
type bser []*big.Float

func bzero(d int) bser {
	s := make(bser, d+1)
	for i := range s {
		s[i] = bnew()
	}
	return s
}

func bconst(c *big.Float, d int) bser {
	s := bzero(d)
	s[0].Set(c)
	return s
}

func (s bser) isConst() bool {
	for _, c := range s[1:] {
		if c.Sign() != 0 {
			return false
		}
	}
	return true
}

// bref evaluates a program's syntax trees in big.Float Taylor arithmetic.
type bref struct {
	p     *Program
	x     float64
	theta []float64
	d     int
	defs  map[int]bser
}

// refTaylor returns the reference coefficients, or an error when some
// operation leaves the reals (log of a negative number, ...).
func refTaylor(p *Program, x float64, theta []float64, d int) (out bser, err error) {
	defer func() {
		if r := recover(); r != nil {
			switch r := r.(type) {
			case errNaN:
				err = r
			case big.ErrNaN:
				err = errNaN{r.Error()}
			default:
				panic(r)
			}
		}
	}()
	r := &bref{p: p, x: x, theta: theta, d: d, defs: map[int]bser{}}
	return r.node(p.exprs[len(p.exprs)-1].root), nil
}

func (r *bref) node(n node) bser {
	d := r.d
	switch n := n.(type) {
	case *numLit:
		v, _, err := big.ParseFloat(n.lit, 10, refPrec, big.ToNearestEven)
		if err != nil {
			panic(err)
		}
		return bconst(v, d)
	case *constRef:
		if n.name == constPi {
			return bconst(bpi(), d)
		}
		return bconst(bexp(bint(1)), d)
	case *varRef:
		switch n.kind {
		case symState:
			s := bconst(bf(r.x), d)
			if d > 0 {
				s[1].SetInt64(1)
			}
			return s
		case symParam:
			return bconst(bf(r.theta[n.index]), d)
		}
		if s, ok := r.defs[n.index]; ok {
			return s
		}
		s := r.node(r.p.exprs[n.index].root)
		r.defs[n.index] = s
		return s
	case *unaryExpr:
		a := r.node(n.x)
		w := bzero(d)
		for k := range w {
			w[k].Neg(a[k])
		}
		return w
	case *binaryExpr:
		a, b := r.node(n.x), r.node(n.y)
		switch n.op {
		case '+', '-':
			w := bzero(d)
			for k := range w {
				if n.op == '+' {
					w[k].Add(a[k], b[k])
				} else {
					w[k].Sub(a[k], b[k])
				}
			}
			return w
		case '*':
			return bsMul(a, b)
		case '/':
			return bsDiv(a, b)
		}
		return bsPow(a, b)
	case *callExpr:
		a := r.node(n.args[0])
		var b bser
		if len(n.args) == 2 {
			b = r.node(n.args[1])
		}
		switch n.fn {
		case fnPow:
			return bsPow(a, b)
		case fnExp:
			return bsExp(a, bexp(a[0]))
		case fnLog:
			return bsLog(a)
		case fnLog10:
			l := bsLog(a)
			ln10 := blog(bint(10))
			for k := range l {
				l[k] = bquo(l[k], ln10)
			}
			return l
		case fnSqrt:
			return bsSqrt(a)
		case fnAbs:
			sign := 1
			for _, c := range a {
				if c.Sign() != 0 {
					sign = c.Sign()
					break
				}
			}
			w := bzero(d)
			for k := range w {
				w[k].Set(a[k])
				if sign < 0 {
					w[k].Neg(w[k])
				}
			}
			return w
		case fnMin, fnMax:
			pick := a
			for k := range a {
				if c := a[k].Cmp(b[k]); c != 0 {
					if (c > 0) != (n.fn == fnMax) {
						pick = b
					}
					break
				}
			}
			return pick
		case fnSin, fnCos:
			s, c := bsSinCos(a, false)
			if n.fn == fnSin {
				return s
			}
			return c
		case fnSinh, fnCosh:
			s, c := bsSinCos(a, true)
			if n.fn == fnSinh {
				return s
			}
			return c
		case fnTan, fnTanh:
			s, c := bsSinCos(a, n.fn == fnTanh)
			return bsDiv(s, c)
		case fnAtan:
			// atan' = 1/(1+a²): w = w0 + ∫ a'/(1+a²).
			v := bsMul(a, a)
			v[0] = badd(v[0], bint(1))
			q := bsDiv(bsDeriv(a), v)
			return bsInteg(q, batan(a[0]))
		}
	}
	panic(fmt.Sprintf("bref: unexpected node %T", n))
}

func bsMul(a, b bser) bser {
	w := bzero(len(a) - 1)
	for k := range w {
		for j := 0; j <= k; j++ {
			w[k].Add(w[k], bmul(a[j], b[k-j]))
		}
	}
	return w
}

func bsDiv(a, b bser) bser {
	if b[0].Sign() == 0 {
		panic(errNaN{"division by zero"})
	}
	w := bzero(len(a) - 1)
	for k := range w {
		s := bnew().Set(a[k])
		for j := 0; j < k; j++ {
			s.Sub(s, bmul(w[j], b[k-j]))
		}
		w[k] = bquo(s, b[0])
	}
	return w
}

// bsDeriv returns the series of the derivative (one order lower, padded).
func bsDeriv(a bser) bser {
	w := bzero(len(a) - 1)
	for k := 0; k+1 < len(a); k++ {
		w[k] = bmul(bint(k+1), a[k+1])
	}
	return w
}

// bsInteg returns c0 + ∫ q.
func bsInteg(q bser, c0 *big.Float) bser {
	w := bzero(len(q) - 1)
	w[0].Set(c0)
	for k := 1; k < len(w); k++ {
		w[k] = bquo(q[k-1], bint(k))
	}
	return w
}

// bsExp: w' = a'w integrated order by order.
func bsExp(a bser, w0 *big.Float) bser {
	w := bzero(len(a) - 1)
	w[0].Set(w0)
	da := bsDeriv(a)
	for k := 1; k < len(w); k++ {
		// k w_k = Σ_{j=0}^{k-1} da_j w_{k-1-j}
		s := bnew()
		for j := 0; j < k; j++ {
			s.Add(s, bmul(da[j], w[k-1-j]))
		}
		w[k] = bquo(s, bint(k))
	}
	return w
}

// bsLog: log a = log a0 + ∫ a'/a.
func bsLog(a bser) bser {
	return bsInteg(bsDiv(bsDeriv(a), a), blog(a[0]))
}

// bsSqrt by the recurrence w_k = (a_k − Σ w_j w_{k−j}) / (2 w_0).
func bsSqrt(a bser) bser {
	if a[0].Sign() <= 0 {
		panic(errNaN{"sqrt at or below 0"})
	}
	w := bzero(len(a) - 1)
	w[0].Sqrt(a[0])
	for k := 1; k < len(w); k++ {
		s := bnew().Set(a[k])
		for j := 1; j < k; j++ {
			s.Sub(s, bmul(w[j], w[k-j]))
		}
		w[k] = bquo(s, bmul(bint(2), w[0]))
	}
	return w
}

func bsSinCos(a bser, hyp bool) (s, c bser) {
	d := len(a) - 1
	s, c = bzero(d), bzero(d)
	if hyp {
		s[0], c[0] = bsinhcosh(a[0])
	} else {
		s[0], c[0] = bsincos(a[0])
	}
	da := bsDeriv(a)
	for k := 1; k <= d; k++ {
		ss, cs := bnew(), bnew()
		for j := 0; j < k; j++ {
			ss.Add(ss, bmul(da[j], c[k-1-j]))
			cs.Add(cs, bmul(da[j], s[k-1-j]))
		}
		s[k] = bquo(ss, bint(k))
		c[k] = bquo(cs, bint(k))
		if !hyp {
			c[k].Neg(c[k])
		}
	}
	return s, c
}

// bsinhcosh: (e^x ∓ e^−x)/2, but by the power series for |x| < 1/2, where
// the difference would cancel (for x near 1e-160 beyond refPrec bits).
func bsinhcosh(x *big.Float) (s, c *big.Float) {
	if x.MantExp(nil) > -1 {
		ep, em := bexp(x), bexp(bnew().Neg(x))
		return bquo(bsub(ep, em), bint(2)), bquo(badd(ep, em), bint(2))
	}
	prec := uint(refPrec + 64)
	x2 := new(big.Float).SetPrec(prec).Mul(x, x)
	s = new(big.Float).SetPrec(prec).Set(x)
	c = new(big.Float).SetPrec(prec).SetInt64(1)
	ts := new(big.Float).SetPrec(prec).Set(x)
	tc := new(big.Float).SetPrec(prec).SetInt64(1)
	for n := 1; n < 200; n++ {
		tc.Mul(tc, x2)
		tc.Quo(tc, new(big.Float).SetPrec(prec).SetInt64(int64((2*n-1)*(2*n))))
		ts.Mul(ts, x2)
		ts.Quo(ts, new(big.Float).SetPrec(prec).SetInt64(int64((2*n)*(2*n+1))))
		c.Add(c, tc)
		s.Add(s, ts)
		if tc.Sign() == 0 || tc.MantExp(nil) < -int(prec)-16 {
			break
		}
	}
	return bnew().Set(s), bnew().Set(c)
}

// bpow0 is a^b for big a and b: repeated multiplication for an integer b,
// else exp(b log a) for a > 0.
func bpow0(a, b *big.Float) *big.Float {
	if b.IsInt() {
		n, acc := b.Int64()
		if acc == big.Exact && n >= -4096 && n <= 4096 {
			m := n
			if m < 0 {
				m = -m
			}
			w := bint(1)
			for i := int64(0); i < m; i++ {
				w = bmul(w, a)
			}
			if n < 0 {
				if w.Sign() == 0 {
					panic(errNaN{"0 to a negative power"})
				}
				w = bquo(bint(1), w)
			}
			return w
		}
	}
	if a.Sign() <= 0 {
		panic(errNaN{"pow of non-positive base"})
	}
	return bexp(bmul(b, blog(a)))
}

func bsPow(a, b bser) bser {
	d := len(a) - 1
	w0 := bpow0(a[0], b[0])
	switch {
	case !b.isConst():
		if a[0].Sign() <= 0 {
			panic(errNaN{"variable exponent with non-positive base"})
		}
		return bsExp(bsMul(b, bsLog(a)), w0)
	case a.isConst():
		return bconst(w0, d)
	}
	if n, acc := b[0].Int64(); b[0].IsInt() && acc == big.Exact && n >= -64 && n <= 64 {
		// Integer exponent: Cauchy powers, free of the division by a₀ of the
		// recurrence below, which cancels badly when a₀ is tiny.
		m := n
		if m < 0 {
			m = -m
		}
		w := bconst(bint(1), d)
		for i := int64(0); i < m; i++ {
			w = bsMul(w, a)
		}
		if n < 0 {
			w = bsDiv(bconst(bint(1), d), w)
		}
		return w
	}
	switch {
	case a[0].Sign() != 0:
		// k a0 w_k = Σ_{j<k} (b(k−j) − j) a_{k−j} w_j
		w := bzero(d)
		w[0] = w0
		for k := 1; k <= d; k++ {
			s := bnew()
			for j := 0; j < k; j++ {
				al := bsub(bmul(b[0], bint(k-j)), bint(j))
				s.Add(s, bmul(bmul(al, a[k-j]), w[j]))
			}
			w[k] = bquo(s, bmul(bint(k), a[0]))
		}
		return w
	}
	panic(errNaN{"non-analytic power at 0"})
}
