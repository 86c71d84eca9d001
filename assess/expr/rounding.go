package expr

import "math"

// Running error analysis (Wilkinson 1986; Higham, Accuracy and Stability of
// Numerical Algorithms, 2nd ed., 2002, §3.3): every value v travels with a
// bound e on |v − v*|, the distance from the exact real result of exact
// arithmetic on exact inputs. Each elementary operation adds the error
// inherited from its operands (first-order terms and their products, so
// the bound is not only first order) and its own rounding error. The
// rounding error of + − × ÷ is not estimated but computed exactly by
// error-free transformations: TwoSum (Knuth, TAOCP vol. 2, §4.2.2,
// Theorem B), the product error a·b − fl(a·b) = fma(a, b, −fl(a·b)) (Ogita,
// Rump & Oishi 2005, SIAM J. Sci. Comput. 26:1955, TwoProduct) and the
// division remainder a − b·fl(a/b) = fma(−fl(a/b), b, a), which is exactly
// representable (Bohlender, Walter, Kornerup & Matula 1991, "Semantics for
// exact floating point operations", ARITH 10), all exact barring underflow,
// for which eta is added. Exact operations thus add nothing, so a
// coefficient that is exactly zero keeps a zero bound. Bounds are
// themselves computed in floating point; taylorSlack at the end covers
// their own relative rounding, but not underflow: a product of a bound and
// a value that falls below the least subnormal is lost, and a later
// division by a tiny quantity cannot restore it. The bounds are therefore
// guaranteed only while no such product underflows (x³·0.3 at x = −5e-160
// already loses its bound); the tests check x down to 1e-30 with
// parameters down to 1e-25, and x = 0. An underflowed power a^b with
// a ≠ 0 gets +Inf bounds on its higher coefficients.

const (
	u         = unitRoundoff
	eta       = 0x1p-1074 // least subnormal: bound on the absolute underflow error of * and /
	minNormal = 0x1p-1022
	// taylorSlack inflates final bounds to cover rounding in computing them
	// (relative error about u per operation on the bounds).
	taylorSlack = 1 + 0x1p-30
	// tinyProd: below this |product| the error term fma(a, b, −v) may itself
	// underflow (Boldo & Muller's condition, with margin).
	tinyProd = 0x1p-960
)

// pm multiplies two non-negative bounds, taking 0·∞ as 0: an exactly known
// zero times anything uncertain contributes no error.
func pm(x, y float64) float64 {
	if x == 0 || y == 0 {
		return 0
	}
	return x * y
}

// sumErr is |(a+b) − fl(a+b)| by TwoSum.
func sumErr(a, b, s float64) float64 {
	bb := s - a
	return math.Abs((a - (s - bb)) + (b - bb))
}

func addE(a, ea, b, eb float64) (float64, float64) {
	v := a + b
	return v, ea + eb + sumErr(a, b, v)
}

func subE(a, ea, b, eb float64) (float64, float64) {
	v := a - b
	return v, ea + eb + sumErr(a, -b, v)
}

// prodErr is |a·b − fl(a·b)|.
func prodErr(a, b, v float64) float64 {
	r := math.Abs(math.FMA(a, b, -v))
	if math.Abs(v) < tinyProd && a != 0 && b != 0 {
		r += eta
	}
	return r
}

func mulE(a, ea, b, eb float64) (float64, float64) {
	v := a * b
	e := math.Abs(a)*eb + ea*(math.Abs(b)+eb) + prodErr(a, b, v)
	if e != e { // 0·∞ in the propagated terms: an exact zero contributes nothing
		e = pm(math.Abs(a), eb) + pm(ea, math.Abs(b)) + pm(ea, eb) + prodErr(a, b, v)
	}
	return v, e
}

// quoErr is |a/b − fl(a/b)| = |a − b·v|/|b|.
func quoErr(a, b, v float64) float64 {
	r := math.Abs(math.FMA(-v, b, a)) / math.Abs(b) * (1 + 2*u)
	if math.Abs(v) < minNormal && a != 0 || math.Abs(v*b) < tinyProd && a != 0 {
		r += eta
	}
	return r
}

// divE: with q = a/b exactly, |q − a*/b*| ≤ (ea + |q|·eb)/(|b| − eb) when
// eb < |b|; otherwise the exact divisor may be zero and the bound is +Inf.
func divE(a, ea, b, eb float64) (float64, float64) {
	v := a / b
	ab := math.Abs(b)
	if !(eb < ab) {
		return v, math.Inf(1)
	}
	av := math.Abs(v)
	return v, (ea+pm(av*(1+u), eb))/(ab-eb) + quoErr(a, b, v)
}

// mulIntE multiplies by a small positive integer j.
func mulIntE(a, ea float64, j int) (float64, float64) {
	fj := float64(j)
	v := fj * a
	return v, fj*ea + prodErr(fj, a, v)
}

// divIntE divides by a small positive integer k.
func divIntE(a, ea float64, k int) (float64, float64) {
	fk := float64(k)
	v := a / fk
	return v, ea/fk + quoErr(a, fk, v)
}

// acc adds p to a running sum s that is empty when first is true, so that a
// sum of one term is that term, unrounded (keeping c[0] equal to Eval).
func acc(s, es, p, ep float64, first bool) (float64, float64) {
	if first {
		return p, ep
	}
	return addE(s, es, p, ep)
}

// lib is the error of a library function result v: rel units of u relative,
// plus eta for subnormal results. The accuracies used are at least twice
// what the Go sources state or quote from Cephes (Log: < 1 ulp ≤ 2u; Atan,
// Tan, Tanh: peak ≈ 1.6–2.6u) and cover what TestLibraryAccuracy measures
// against math/big: on amd64 the assembly Exp, whose source states no
// accuracy, reaches about 1.1 ulp, and Sin and Cos about 1 ulp; so 2 ulps
// (4u) for those.
func lib(v float64, rel float64) float64 {
	return rel*u*math.Abs(v) + eta
}

// logLib is lib for v = Log(a) or Log10(a). Go's amd64 assembly Log does
// not renormalise a subnormal argument (math.Log(5e-324) returns −709.09,
// not −744.44; TestLibraryAccuracy), so there the bound is +Inf.
func logLib(v, a float64, rel float64) float64 {
	if a > 0 && a < minNormal {
		return math.Inf(1)
	}
	return lib(v, rel)
}

// trigReduce is the absolute error of Go's Cody–Waite argument reduction
// for sin, cos and tan below 2²⁹: π/4 is split as PI4A+PI4B+PI4C, whose
// truncation (about 3e-31) and the rounding of y·PI4C make the reduced
// argument wrong by about 1e-30·|x| (bound taken 12× larger). Near a zero of
// sin or cos this dominates the relative error (sin(math.Pi) is off by a few
// ulps). From 2²⁹ up Go reduces by Payne–Hanek (math/trig_reduce.go): the
// fraction of x·4/π is truncated to 53 bits and multiplied by a rounded
// π/4, an absolute error of about 3u in the reduced argument, taken as 8u.
func trigReduce(x float64) float64 {
	if ax := math.Abs(x); ax < 1<<29 {
		return 0x1p-96 * ax
	}
	return 8 * u
}

// logProp bounds |log a* − log a| for |a* − a| ≤ ea: −log1p(−r) with
// r = ea/a, which is at most r/(1 − r) (compare the series Σ rⁿ/n and
// Σ rⁿ); that cheaper form is used for r ≤ 1/16, where it exceeds
// −log1p(−r) by less than r²/2 + r³.
func logProp(a, ea float64) float64 {
	if ea == 0 {
		return 0
	}
	if !(ea < a) {
		return math.Inf(1)
	}
	r := ea / a
	if r <= 0x1p-4 {
		return r / (1 - r) * (1 + 4*u)
	}
	return -math.Log1p(-r) * (1 + 4*u)
}

// expProp bounds |exp a* − exp a| for |a* − a| ≤ ea given v = fl(exp a):
// |exp a|·expm1(ea) with |exp a| ≤ |v|(1+4u) (lib), expm1 bounded without
// a library call for small ea (expm1Up); an exact argument adds nothing.
func expProp(v, ea float64) float64 {
	if ea == 0 || v == 0 {
		return 0
	}
	return math.Abs(v) * (1 + 4*u) * expm1Up(ea)
}

// powLib is the error of Go's math.Pow(a, b) = v. Reading its source: the
// integer part yi ≤ |b|+1 of the exponent is done by repeated squaring of
// the mantissa, which doubles the relative error at each squaring, so the
// product carries at most about yi·u plus one rounding per product; the
// fractional part is Exp(yf·Log(a)) with |yf| ≤ 1/2, good to about
// (3 + 1.5|log a|)u except for a subnormal a (see logLib); then one
// reciprocal. Hence (|b| + 2|log a| + 8)u, enlarged by its own square for
// very large exponents.
func powLib(a, b, v float64) float64 {
	if a != 0 && math.Abs(a) < minNormal && b != math.Trunc(b) {
		return math.Inf(1) // the fractional part goes through Log (logLib)
	}
	av := math.Abs(v)
	if av == 0 || math.IsInf(v, 0) || math.IsNaN(v) {
		return eta + u*av
	}
	rel := (math.Abs(b) + 2*logAbsBound(a) + 8) * u
	return rel*(1+rel)*av + eta
}

// logAbsBound returns an upper bound on |log |a|| from the binary exponent,
// without a library call: for |a| = m·2ᵏ with 1 ≤ m < 2, log|a| = k·ln 2 +
// log m and (m−1)/2 ≤ (m−1)/m ≤ log m ≤ min(m−1, ln 2). Zero, subnormal
// and non-finite a use math.Log.
func logAbsBound(a float64) float64 {
	bits := math.Float64bits(a)
	ex := int(bits>>52) & 0x7ff
	if ex == 0 || ex == 0x7ff {
		return math.Abs(math.Log(math.Abs(a)))
	}
	k := float64(ex - 1023)
	m1 := math.Float64frombits(bits&(1<<52-1)|1023<<52) - 1 // m − 1, exact
	var r float64
	if k >= 0 {
		r = k*math.Ln2 + math.Ln2
		if m1 < math.Ln2 {
			r = k*math.Ln2 + m1
		}
	} else {
		r = -k*math.Ln2 - m1/2
	}
	return r * (1 + 0x1p-40) // margin for the rounding of r
}

// powProp bounds |a*^b* − a^b| for |a*−a| ≤ ea, |b*−b| ≤ eb, given v = a^b.
func powProp(a, ea, b, eb, v float64) float64 {
	if ea == 0 && eb == 0 {
		return 0
	}
	switch {
	case a == 0:
		if b > 0 && eb < b && ea < 1 {
			return math.Pow(ea, b-eb)
		}
		return math.Inf(1)
	case a < 0 && eb != 0:
		return math.Inf(1) // the exact exponent may be non-integer
	}
	aa := math.Abs(a)
	if !(ea < aa) {
		return math.Inf(1)
	}
	d := logProp(aa, ea) // ≥ −log1p(−ea/|a|); 0 when ea = 0
	delta := math.Abs(b) * d
	if eb != 0 {
		delta += eb * (math.Abs(math.Log(aa)) + d)
	}
	return pm(math.Abs(v), expm1Up(delta)) * (1 + 4*u)
}

// expm1Up returns an upper bound on expm1(x) for x ≥ 0: x + x² for
// x ≤ 1/2, since expm1(x) − x = x²/2·(1 + x/3 + …) ≤ x²/2·eˣ ≤ x² there,
// and the library value otherwise.
func expm1Up(x float64) float64 {
	if x <= 0.5 {
		return (x + x*x) * (1 + 2*u)
	}
	return math.Expm1(x) * (1 + 4*u)
}
