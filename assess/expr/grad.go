package expr

import (
	"fmt"
	"math"
)

// ParamGrad returns f(x; θ) and fills df[j] = ∂f/∂θ_j and dfx[j] =
// ∂²f/∂x∂θ_j for every parameter slot j, exactly up to rounding, by
// forward-over-reverse algorithmic differentiation (Griewank & Walther,
// Evaluating Derivatives, 2nd ed., SIAM 2008, §5.2 second-order adjoints):
// one forward sweep carries values and their x-tangents, one reverse sweep
// carries adjoints and their x-tangents, so the cost does not grow with the
// number of parameters. The returned value equals Eval(x, theta).
//
// At kinks of abs, min and max the branch is chosen as in Taylor (by value,
// then by x-tangent). df and dfx must have length at least NumParams();
// entries for unused parameters are 0. ParamGrad does not allocate.
func (m *Machine) ParamGrad(x float64, theta []float64, df, dfx []float64) float64 {
	p := m.p
	np := len(p.params)
	if len(df) < np || len(dfx) < np {
		panic(fmt.Sprintf("expr: ParamGrad needs len(df), len(dfx) ≥ %d", np))
	}
	v, vd := m.gv, m.gd
	m.forward(x, theta)

	// Reverse sweep: adjoints ā = ∂f/∂a and their x-tangents.
	bar, bard := m.gb, m.gbd
	for i := range bar {
		bar[i], bard[i] = 0, 0
	}
	bar[p.out] = 1
	pdep := p.pdep
	for i := len(p.code) - 1; i >= 0; i-- {
		in := &p.code[i]
		wb, wbd := bar[in.dst], bard[in.dst]
		if wb == 0 && wbd == 0 {
			continue
		}
		ia, ib := in.a, in.b
		a, b := v[ia], v[ib]
		ad, bd := vd[ia], vd[ib]
		w := v[in.dst]
		pa, pb := pdep[ia], pdep[ib] && in.op.binary()
		switch in.op {
		case opAdd, opSub:
			sb := 1.0
			if in.op == opSub {
				sb = -1
			}
			if pa {
				bar[ia] += wb
				bard[ia] += wbd
			}
			if pb {
				bar[ib] += sb * wb
				bard[ib] += sb * wbd
			}
		case opNeg:
			if pa {
				bar[ia] -= wb
				bard[ia] -= wbd
			}
		case opMul:
			if pa {
				bar[ia] += wb * b
				bard[ia] += wbd*b + wb*bd
			}
			if pb {
				bar[ib] += wb * a
				bard[ib] += wbd*a + wb*ad
			}
		case opDiv:
			// g_a = 1/b, g_b = −w/b, g_aa = 0, g_ab = −1/b², g_bb = 2w/b².
			if pa {
				bar[ia] += wb / b
				bard[ia] += wbd/b - wb*bd/(b*b)
			}
			if pb {
				bar[ib] -= wb * w / b
				bard[ib] += -wbd*w/b + wb*(2*w*bd-ad)/(b*b)
			}
		case opPow:
			// g_a = b a^(b−1), g_b = w log a, g_aa = b(b−1)a^(b−2),
			// g_ab = a^(b−1)(1 + b log a), g_bb = w log² a.
			// Terms whose factor is an exact zero are skipped, so that
			// log a (NaN for a < 0) enters only where b varies.
			var gab float64
			needAB := (pa && bd != 0) || (pb && ad != 0)
			if needAB {
				gab = math.Pow(a, b-1) * (1 + b*math.Log(a))
			}
			if pa {
				ga := powDa(a, b)
				bar[ia] += wb * ga
				t := wbd * ga
				if ad != 0 {
					t += wb * powDaa(a, b) * ad
				}
				if bd != 0 {
					t += wb * gab * bd
				}
				bard[ia] += t
			}
			if pb {
				la := math.Log(a)
				gb := w * la
				bar[ib] += wb * gb
				t := wbd * gb
				if ad != 0 {
					t += wb * gab * ad
				}
				if bd != 0 {
					t += wb * gb * la * bd
				}
				bard[ib] += t
			}
		case opMin, opMax:
			if pickA(a, b, ad, bd, in.op == opMax) {
				if pa {
					bar[ia] += wb
					bard[ia] += wbd
				}
			} else if pdep[ib] {
				bar[ib] += wb
				bard[ib] += wbd
			}
		default:
			if pa {
				_, d1, d2 := unary(in.op, a, ad)
				bar[ia] += wb * d1
				t := wbd * d1
				if ad != 0 {
					t += wb * d2 * ad
				}
				bard[ia] += t
			}
		}
	}
	for j := 0; j < np; j++ {
		df[j], dfx[j] = bar[paramReg(j)], bard[paramReg(j)]
	}
	return v[p.out]
}

// powDa is ∂(a^b)/∂a = b·a^(b−1).
func powDa(a, b float64) float64 {
	if b == 0 {
		return 0
	}
	return b * math.Pow(a, b-1)
}

// powDaa is ∂²(a^b)/∂a² = b(b−1)·a^(b−2).
func powDaa(a, b float64) float64 {
	if b == 0 || b == 1 {
		return 0
	}
	return b * (b - 1) * math.Pow(a, b-2)
}

// pickA reports whether min(a, b) (max when isMax) follows a: by value, then
// by x-tangent, a on a full tie — the rule Taylor uses.
func pickA(a, b, ad, bd float64, isMax bool) bool {
	switch {
	case a != b:
		return (a < b) != isMax
	case ad != bd:
		return (ad < bd) != isMax
	}
	return true
}

// unary returns φ(a), φ′(a) and φ″(a) for a univariate instruction; ad
// (the x-tangent of a) picks the branch of abs at 0.
func unary(op opcode, a, ad float64) (w, d1, d2 float64) {
	switch op {
	case opExp:
		w = math.Exp(a)
		return w, w, w
	case opLog:
		return math.Log(a), 1 / a, -1 / (a * a)
	case opLog10:
		return math.Log10(a), 1 / (a * math.Ln10), -1 / (a * a * math.Ln10)
	case opSqrt:
		w = math.Sqrt(a)
		return w, 0.5 / w, -0.25 / (w * a)
	case opAbs:
		s := 1.0
		if a < 0 || a == 0 && ad < 0 {
			s = -1
		}
		return math.Abs(a), s, 0
	case opSin:
		w = math.Sin(a)
		return w, math.Cos(a), -w
	case opCos:
		w = math.Cos(a)
		return w, -math.Sin(a), -w
	case opTan:
		w = math.Tan(a)
		s := 1 + w*w
		return w, s, 2 * w * s
	case opAtan:
		q := 1 + a*a
		return math.Atan(a), 1 / q, -2 * a / (q * q)
	case opSinh:
		w = math.Sinh(a)
		return w, math.Cosh(a), w
	case opCosh:
		w = math.Cosh(a)
		return w, math.Sinh(a), w
	case opTanh:
		w = math.Tanh(a)
		s := 1 - w*w
		return w, s, -2 * w * s
	}
	return math.NaN(), math.NaN(), math.NaN()
}

// forward runs the forward sweep of ParamGrad: every register's value and
// its derivative with respect to x (dual numbers; Griewank & Walther 2008,
// ch. 3), into m.gv and m.gd.
func (m *Machine) forward(x float64, theta []float64) {
	p := m.p
	v, vd := m.gv, m.gd
	m.load(v, x, theta)
	vd[regState] = 1
	for i := range p.code {
		in := &p.code[i]
		a, b := v[in.a], v[in.b]
		ad, bd := vd[in.a], vd[in.b]
		var w, wd float64
		switch in.op {
		case opAdd:
			w, wd = a+b, ad+bd
		case opSub:
			w, wd = a-b, ad-bd
		case opMul:
			w, wd = a*b, ad*b+a*bd
		case opDiv:
			w = a / b
			wd = (ad - w*bd) / b
		case opNeg:
			w, wd = -a, -ad
		case opPow:
			w = math.Pow(a, b)
			if ad != 0 {
				// b·a^(b−1) as b·w/a saves a second Pow where a ≠ 0.
				if a != 0 && !math.IsInf(w, 0) && w != 0 {
					wd = b * w / a * ad
				} else {
					wd = powDa(a, b) * ad
				}
			}
			if bd != 0 {
				wd += w * math.Log(a) * bd
			}
		case opMin, opMax:
			wd = bd
			if pickA(a, b, ad, bd, in.op == opMax) {
				wd = ad
			}
			if in.op == opMax {
				w = math.Max(a, b)
			} else {
				w = math.Min(a, b)
			}
		default:
			var d1 float64
			w, d1, _ = unary(in.op, a, ad)
			if ad != 0 {
				wd = d1 * ad
			}
		}
		v[in.dst], vd[in.dst] = w, wd
	}
}

// Slope returns f(x; θ) and ∂f/∂x by one forward sweep of dual numbers,
// without the Taylor arithmetic's error bounds: the cheap first derivative
// that continuation's Newton steps need. It does not allocate.
func (m *Machine) Slope(x float64, theta []float64) (f, fx float64) {
	m.forward(x, theta)
	out := m.p.out
	return m.gv[out], m.gd[out]
}
