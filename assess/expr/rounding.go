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
// for which eta is added. Exact operations thus add nothing, so a coefficient that is
// exactly zero keeps a zero bound. Bounds are themselves computed in
// floating point; taylorSlack at the end covers their own rounding.

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

// trigReduce is the absolute error of Go's Cody–Waite argument reduction
// for sin, cos and tan below 2²⁹: π/4 is split as PI4A+PI4B+PI4C, whose
// truncation (about 3e-31) and the rounding of y·PI4C make the reduced
// argument wrong by about 1e-30·|x| (bound taken 12× larger). Near a zero of
// sin or cos this dominates the relative error (sin(math.Pi) is off by a few
// ulps).
func trigReduce(x float64) float64 { return 0x1p-96 * math.Abs(x) }

// logProp bounds |log a* − log a| for |a* − a| ≤ ea: −log1p(−ea/a).
func logProp(a, ea float64) float64 {
	if ea == 0 {
		return 0
	}
	if !(ea < a) {
		return math.Inf(1)
	}
	return -math.Log1p(-ea/a) * (1 + 4*u)
}

// powLib is the error of Go's math.Pow(a, b) = v. Reading its source: the
// integer part yi ≤ |b|+1 of the exponent is done by repeated squaring of
// the mantissa, which doubles the relative error at each squaring, so the
// product carries at most about yi·u plus one rounding per product; the
// fractional part is Exp(yf·Log(a)) with |yf| ≤ 1/2, good to about
// (3 + 1.5|log a|)u; then one reciprocal. Hence (|b| + 2|log a| + 8)u,
// enlarged by its own square for very large exponents.
func powLib(a, b, v float64) float64 {
	av := math.Abs(v)
	if av == 0 || math.IsInf(v, 0) || math.IsNaN(v) {
		return eta + u*av
	}
	rel := (math.Abs(b) + 2*math.Abs(math.Log(math.Abs(a))) + 8) * u
	return rel*(1+rel)*av + eta
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
	r := ea / aa
	if !(r < 1) {
		return math.Inf(1)
	}
	d := -math.Log1p(-r)
	delta := math.Abs(b)*d + pm(eb, math.Abs(math.Log(aa))+d)
	return pm(math.Abs(v), math.Expm1(delta)) * (1 + 4*u)
}
