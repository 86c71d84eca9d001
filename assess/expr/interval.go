package expr

import "math"

// Interval arithmetic with outward rounding (Moore, Interval Analysis,
// 1966; Moore, Kearfott & Cloud, Introduction to Interval Analysis, SIAM
// 2009). Every operation returns an interval that contains the exact real
// result of the operation for every choice of real operands in the operand
// intervals. Go has no directed rounding modes, so each bound is computed
// in round-to-nearest and then moved outward:
//
//   - + − × ÷ and sqrt are correctly rounded (IEEE 754), so the exact value
//     lies within half a gap of the computed one, also in the subnormal
//     range; one step to the neighbouring float (nextDown, nextUp, the
//     effect of math.Nextafter) encloses it. A sum that rounds to zero is
//     exact under gradual underflow (x − y = 0 only if x = y; Goldberg,
//     ACM Computing Surveys 23:5, 1991), and so is a product or quotient
//     with an exact zero operand; those bounds stay 0, so an exact zero of
//     f at a point is recognised.
//   - Library functions (exp, log, sin, pow, …) are widened by the
//     accuracy the Taylor back end uses for them (rounding.go: lib,
//     logLib, trigReduce, powLib), plus one unit of their own, before the
//     step outward.
//
// The bounds keep the invariant Lo < +Inf and Hi > −Inf for a non-empty
// interval (an overflowed lower bound becomes MaxFloat64), so that bound
// arithmetic never forms ∞ − ∞; an exact zero times an infinite bound is
// taken as 0 (the bound is not attained).
//
// Functions are applied on their monotone pieces: even powers through
// their minimum at 0, sin and cos through every maximum and minimum the
// argument interval may contain (any number of periods), tan with its
// poles, cosh through its minimum. Where an argument leaves a function's
// domain (log and sqrt at or below 0, a negative base to a non-integer
// power, division by an interval holding 0) the result encloses the values
// on the part of the argument where the function is defined, and the
// evaluation is marked as not continuous on the box (IntervalSlope).

// Interval is the closed interval [Lo, Hi] of real numbers, Lo ≤ Hi; the
// bounds may be infinite. An interval with NaN bounds is empty: the rate
// law is undefined at every point it stands for.
type Interval struct {
	Lo, Hi float64
}

// Point returns the degenerate interval [x, x].
func Point(x float64) Interval { return Interval{x, x} }

var (
	emptyIv  = Interval{math.NaN(), math.NaN()}
	entireIv = Interval{math.Inf(-1), math.Inf(1)}
	zeroIv   = Interval{}
	oneIv    = Interval{1, 1}
)

// IsEmpty reports whether a is empty (NaN bounds).
func (a Interval) IsEmpty() bool { return a.Lo != a.Lo || a.Hi != a.Hi }

// Contains reports whether x lies in a (false for an empty a).
func (a Interval) Contains(x float64) bool { return a.Lo <= x && x <= a.Hi }

// Width returns Hi − Lo rounded upward (NaN for an empty interval).
func (a Interval) Width() float64 {
	if a.Lo == a.Hi {
		return 0
	}
	return NextUp(a.Hi - a.Lo)
}

// Mid returns a point of a near its middle (Lo + (Hi − Lo)/2 for finite
// bounds, without overflow), 0 for the entire line and a finite point
// for a half-line.
func (a Interval) Mid() float64 {
	switch {
	case math.IsInf(a.Lo, -1) && math.IsInf(a.Hi, 1):
		return 0
	case math.IsInf(a.Lo, -1):
		return -math.MaxFloat64
	case math.IsInf(a.Hi, 1):
		return math.MaxFloat64
	}
	m := a.Lo/2 + a.Hi/2
	if m < a.Lo {
		m = a.Lo
	}
	if m > a.Hi {
		m = a.Hi
	}
	return m
}

// Hull returns the smallest interval containing a and b (the other when
// one is empty).
func (a Interval) Hull(b Interval) Interval {
	switch {
	case a.IsEmpty():
		return b
	case b.IsEmpty():
		return a
	}
	return Interval{math.Min(a.Lo, b.Lo), math.Max(a.Hi, b.Hi)}
}

// Intersect returns a ∩ b, empty when they are disjoint.
func (a Interval) Intersect(b Interval) Interval {
	lo, hi := math.Max(a.Lo, b.Lo), math.Min(a.Hi, b.Hi)
	if !(lo <= hi) {
		return emptyIv
	}
	return Interval{lo, hi}
}

// Neg returns −a (exact).
func (a Interval) Neg() Interval { return Interval{-a.Hi, -a.Lo} }

// Add returns an enclosure of a + b.
func (a Interval) Add(b Interval) Interval { return ivAdd(a, b) }

// Sub returns an enclosure of a − b.
func (a Interval) Sub(b Interval) Interval { return ivSub(a, b) }

// Mul returns an enclosure of a·b.
func (a Interval) Mul(b Interval) Interval { return ivMul(a, b) }

// Div returns an enclosure of {x/y : x ∈ a, y ∈ b, y ≠ 0}: bounded when b
// excludes 0, a half-line or the whole line when b holds 0, empty when b
// is [0, 0].
func (a Interval) Div(b Interval) Interval { w, _ := ivDiv(a, b); return w }

// NextDown returns the largest float64 below x (math.Nextafter(x, −∞)),
// MaxFloat64 for +Inf; −Inf and NaN are returned unchanged. Applied to the
// result of one operation in round-to-nearest, it gives a lower bound on
// the exact result, which lies within half a gap, also when subnormal.
// (Written to fit the compiler's inlining budget, across packages too.)
func NextDown(x float64) float64 {
	b := math.Float64bits(x)
	switch {
	case x > 0:
		b--
	case x < 0 && x >= -math.MaxFloat64:
		b++
	case x == 0:
		return -eta
	}
	return math.Float64frombits(b)
}

// NextUp returns the smallest float64 above x, −MaxFloat64 for −Inf: the
// upper bound matching NextDown.
func NextUp(x float64) float64 {
	b := math.Float64bits(x)
	switch {
	case x < 0:
		b--
	case x > 0 && x <= math.MaxFloat64:
		b++
	case x == 0:
		return eta
	}
	return math.Float64frombits(b)
}

// sDn and sUp round a computed sum s = fl(a ± b) outward; a zero sum is
// exact.
func sDn(s float64) float64 {
	if s == 0 {
		return 0
	}
	return NextDown(s)
}

func sUp(s float64) float64 {
	if s == 0 {
		return 0
	}
	return NextUp(s)
}

// addDn and addUp bound a + b from below and above with the rounding error
// of s = fl(a + b), computed exactly by TwoSum (Knuth, TAOCP vol. 2,
// §4.2.2): when the exact sum is at or above s, s itself is a lower bound,
// and an exact sum stays exact. Overflow (a NaN error) falls back to
// stepping outward.
func addDn(a, b float64) float64 {
	s := a + b
	bb := s - a
	if e := (a - (s - bb)) + (b - bb); e >= 0 {
		return s
	}
	return sDn(s)
}

func addUp(a, b float64) float64 {
	s := a + b
	bb := s - a
	if e := (a - (s - bb)) + (b - bb); e <= 0 {
		return s
	}
	return sUp(s)
}

// pDn and pUp bound x·y from below and above (x, y not NaN); a zero
// factor gives an exact 0, also against an infinite bound.
func pDn(x, y float64) float64 {
	if x == 0 || y == 0 {
		return 0
	}
	return NextDown(x * y)
}

func pUp(x, y float64) float64 {
	if x == 0 || y == 0 {
		return 0
	}
	return NextUp(x * y)
}

// qDn and qUp bound x/y (y ≠ 0; never both infinite under the invariant);
// 0/y is exact.
func qDn(x, y float64) float64 {
	if x == 0 {
		return 0
	}
	return NextDown(x / y)
}

func qUp(x, y float64) float64 {
	if x == 0 {
		return 0
	}
	return NextUp(x / y)
}

// widenDn0 and widenUp0 are widenDn and widenUp that keep an exact value
// (e = 0) as it is.
func widenDn0(v, e float64) float64 {
	if e == 0 {
		return v
	}
	return widenDn(v, e)
}

func widenUp0(v, e float64) float64 {
	if e == 0 {
		return v
	}
	return widenUp(v, e)
}

// widenDn and widenUp bound a real number known to lie within e of v.
func widenDn(v, e float64) float64 {
	if math.IsInf(v, 1) {
		return math.MaxFloat64
	}
	return NextDown(v - e)
}

func widenUp(v, e float64) float64 {
	if math.IsInf(v, -1) {
		return -math.MaxFloat64
	}
	return NextUp(v + e)
}

func ivAdd(a, b Interval) Interval {
	return Interval{addDn(a.Lo, b.Lo), addUp(a.Hi, b.Hi)}
}

func ivSub(a, b Interval) Interval {
	return Interval{addDn(a.Lo, -b.Hi), addUp(a.Hi, -b.Lo)}
}

// ivScale returns s·b for a real s.
func ivScale(s float64, b Interval) Interval {
	if s >= 0 {
		return Interval{pDn(s, b.Lo), pUp(s, b.Hi)}
	}
	return Interval{pDn(s, b.Hi), pUp(s, b.Lo)}
}

func ivMul(a, b Interval) Interval {
	if a.IsEmpty() || b.IsEmpty() {
		return emptyIv
	}
	switch {
	case a.Lo >= 0 && b.Lo >= 0:
		return Interval{pDn(a.Lo, b.Lo), pUp(a.Hi, b.Hi)}
	case a.Lo == a.Hi:
		return ivScale(a.Lo, b)
	case b.Lo == b.Hi:
		return ivScale(b.Lo, a)
	case a.Hi <= 0 && b.Hi <= 0:
		return Interval{pDn(a.Hi, b.Hi), pUp(a.Lo, b.Lo)}
	}
	// Mixed signs: round the extreme products once (nextDown is monotone,
	// so NextDown(min p) is below every exact product); 0·∞ is 0.
	p1, p2, p3, p4 := a.Lo*b.Lo, a.Lo*b.Hi, a.Hi*b.Lo, a.Hi*b.Hi
	if p1 != p1 || p2 != p2 || p3 != p3 || p4 != p4 {
		return Interval{
			min(pDn(a.Lo, b.Lo), pDn(a.Lo, b.Hi), pDn(a.Hi, b.Lo), pDn(a.Hi, b.Hi)),
			max(pUp(a.Lo, b.Lo), pUp(a.Lo, b.Hi), pUp(a.Hi, b.Lo), pUp(a.Hi, b.Hi)),
		}
	}
	return Interval{NextDown(min(p1, p2, p3, p4)), NextUp(max(p1, p2, p3, p4))}
}

// ivSqr returns {x² : x ∈ a}: 0 is the minimum when a holds it.
func ivSqr(a Interval) Interval {
	switch {
	case a.IsEmpty():
		return emptyIv
	case a.Lo >= 0:
		return Interval{pDn(a.Lo, a.Lo), pUp(a.Hi, a.Hi)}
	case a.Hi <= 0:
		return Interval{pDn(a.Hi, a.Hi), pUp(a.Lo, a.Lo)}
	}
	m := math.Max(-a.Lo, a.Hi)
	return Interval{0, pUp(m, m)}
}

// ivDiv returns an enclosure of a/b over the points where b ≠ 0 and
// whether b excludes 0 (the quotient is then continuous).
func ivDiv(a, b Interval) (Interval, bool) {
	if a.IsEmpty() || b.IsEmpty() {
		return emptyIv, false
	}
	switch {
	case b.Lo > 0:
		switch {
		case a.Lo >= 0:
			return Interval{qDn(a.Lo, b.Hi), qUp(a.Hi, b.Lo)}, true
		case a.Hi <= 0:
			return Interval{qDn(a.Lo, b.Lo), qUp(a.Hi, b.Hi)}, true
		}
		return Interval{qDn(a.Lo, b.Lo), qUp(a.Hi, b.Lo)}, true
	case b.Hi < 0:
		switch {
		case a.Lo >= 0:
			return Interval{qDn(a.Hi, b.Hi), qUp(a.Lo, b.Lo)}, true
		case a.Hi <= 0:
			return Interval{qDn(a.Hi, b.Lo), qUp(a.Lo, b.Hi)}, true
		}
		return Interval{qDn(a.Hi, b.Hi), qUp(a.Lo, b.Hi)}, true
	}
	// b holds 0 (Kahan's extended division, keeping the hull).
	switch {
	case b.Lo == 0 && b.Hi == 0:
		return emptyIv, false
	case a.Lo == 0 && a.Hi == 0:
		return zeroIv, false
	case b.Lo == 0: // b ⊂ [0, ∞): y > 0 only
		switch {
		case a.Lo >= 0:
			return Interval{qDn(a.Lo, b.Hi), math.Inf(1)}, false
		case a.Hi <= 0:
			return Interval{math.Inf(-1), qUp(a.Hi, b.Hi)}, false
		}
	case b.Hi == 0: // y < 0 only
		switch {
		case a.Lo >= 0:
			return Interval{math.Inf(-1), qUp(a.Lo, b.Lo)}, false
		case a.Hi <= 0:
			return Interval{qDn(a.Hi, b.Lo), math.Inf(1)}, false
		}
	}
	return entireIv, false
}

// ivAbs returns {|x| : x ∈ a} (exact).
func ivAbs(a Interval) Interval {
	switch {
	case a.Lo >= 0:
		return a
	case a.Hi <= 0:
		return a.Neg()
	case a.IsEmpty():
		return emptyIv
	}
	return Interval{0, math.Max(-a.Lo, a.Hi)}
}

// ivMag returns max |x| over a.
func ivMag(a Interval) float64 { return math.Max(math.Abs(a.Lo), math.Abs(a.Hi)) }

// ivMinMax returns {min(x, y)} (max when isMax) over x ∈ a, y ∈ b (exact),
// and which operand it follows on the whole box: 1 for a, 2 for b, 0 when
// it may switch.
func ivMinMax(a, b Interval, isMax bool) (Interval, int) {
	if a.IsEmpty() || b.IsEmpty() {
		return emptyIv, 0
	}
	var w Interval
	if isMax {
		w = Interval{math.Max(a.Lo, b.Lo), math.Max(a.Hi, b.Hi)}
	} else {
		w = Interval{math.Min(a.Lo, b.Lo), math.Min(a.Hi, b.Hi)}
	}
	switch {
	case a.Hi <= b.Lo:
		if isMax {
			return w, 2
		}
		return w, 1
	case b.Hi <= a.Lo:
		if isMax {
			return w, 1
		}
		return w, 2
	}
	return w, 0
}

// libIv encloses the exact value of a library function whose computed
// value v carries the error bound e (absolute).
func libIv(v, e float64) Interval { return Interval{widenDn(v, e), widenUp(v, e)} }

// ivMono applies a non-decreasing library function g, computed with
// relative accuracy rel units of u (lib), to a. At the point x0 the exact
// value g(x0) = v0 is known (sin 0 = 0, exp 0 = 1, …) and an end there
// keeps it exactly, so that an exact zero of f stays recognisable.
func ivMono(a Interval, g func(float64) float64, rel, x0, v0 float64) Interval {
	if a.IsEmpty() {
		return emptyIv
	}
	lo, hi := g(a.Lo), g(a.Hi)
	w := Interval{widenDn(lo, lib(lo, rel+1)), widenUp(hi, lib(hi, rel+1))}
	return exactEnds(a, w, x0, v0)
}

// exactEnds sets the ends of w = g(a) for a non-decreasing g at the point
// x0 where g(x0) = v0 exactly.
func exactEnds(a, w Interval, x0, v0 float64) Interval {
	if a.Lo == x0 {
		w.Lo = v0
	}
	if a.Hi == x0 {
		w.Hi = v0
	}
	return w
}

func ivExp(a Interval) Interval {
	w := ivMono(a, math.Exp, 4, 0, 1)
	w.Lo = math.Max(w.Lo, 0)
	return w
}

// ivLog returns log (log10 when ten) on the positive part of a, and whether
// a is positive throughout.
func ivLog(a Interval, ten bool) (Interval, bool) {
	if a.IsEmpty() || a.Hi <= 0 {
		return emptyIv, false
	}
	g, rel := math.Log, 4.0
	if ten {
		g, rel = math.Log10, 5
	}
	w := Interval{Lo: math.Inf(-1)}
	if a.Lo > 0 {
		v := g(a.Lo)
		w.Lo = widenDn(v, logLib(v, a.Lo, rel))
	}
	v := g(a.Hi)
	w.Hi = widenUp(v, logLib(v, a.Hi, rel))
	return exactEnds(a, w, 1, 0), a.Lo > 0
}

// ivSqrt returns sqrt on the non-negative part of a, and whether a ≥ 0
// throughout. Sqrt is correctly rounded; sqrt(0) = 0 is exact.
func ivSqrt(a Interval) (Interval, bool) {
	if a.IsEmpty() || a.Hi < 0 {
		return emptyIv, false
	}
	w := Interval{}
	if a.Lo > 0 {
		w.Lo = math.Max(NextDown(math.Sqrt(a.Lo)), 0)
	}
	if a.Hi > 0 {
		w.Hi = NextUp(math.Sqrt(a.Hi))
	}
	return w, a.Lo >= 0
}

// mayHold reports whether [lo, hi] may contain a point phi + k·period for
// an integer k; it errs toward true.
func mayHold(a Interval, phi, period float64) bool {
	if !(a.Hi-a.Lo < period) || math.IsInf(a.Lo, 0) || math.IsInf(a.Hi, 0) {
		return true
	}
	x := (a.Lo - phi) / period
	y := (a.Hi - phi) / period
	s := 1e-9 * (1 + math.Abs(x) + math.Abs(y))
	return math.Floor(y+s) >= math.Ceil(x-s)
}

// ivSinCos returns sin over a (cos when isCos), through every extremum
// the interval may hold. The error of a value is lib(v, 4) plus Go's
// argument reduction error (trigReduce), since |sin'| ≤ 1.
func ivSinCos(a Interval, isCos bool) Interval {
	if a.IsEmpty() {
		return emptyIv
	}
	if !(a.Hi-a.Lo < 2*math.Pi) || math.IsInf(a.Lo, 0) || math.IsInf(a.Hi, 0) {
		return Interval{-1, 1}
	}
	g, g0, phiMax, phiMin := math.Sin, 0.0, math.Pi/2, -math.Pi/2
	if isCos {
		g, g0, phiMax, phiMin = math.Cos, 1, 0, math.Pi
	}
	vl, vh := g(a.Lo), g(a.Hi)
	el, eh := lib(vl, 5)+trigReduce(a.Lo), lib(vh, 5)+trigReduce(a.Hi)
	if a.Lo == 0 { // sin 0 = 0 and cos 0 = 1 exactly
		vl, el = g0, 0
	}
	if a.Hi == 0 {
		vh, eh = g0, 0
	}
	w := Interval{
		math.Min(widenDn0(vl, el), widenDn0(vh, eh)),
		math.Max(widenUp0(vl, el), widenUp0(vh, eh)),
	}
	if mayHold(a, phiMax, 2*math.Pi) {
		w.Hi = 1
	}
	if mayHold(a, phiMin, 2*math.Pi) {
		w.Lo = -1
	}
	w.Lo, w.Hi = math.Max(w.Lo, -1), math.Min(w.Hi, 1)
	return w
}

// ivTan returns tan over a and whether a is free of poles π/2 + kπ.
func ivTan(a Interval) (Interval, bool) {
	if a.IsEmpty() {
		return emptyIv, false
	}
	if mayHold(a, math.Pi/2, math.Pi) {
		return entireIv, false
	}
	vl, vh := math.Tan(a.Lo), math.Tan(a.Hi)
	el := lib(vl, 5) + trigReduce(a.Lo)*(1+vl*vl)*(1+0x1p-20)
	eh := lib(vh, 5) + trigReduce(a.Hi)*(1+vh*vh)*(1+0x1p-20)
	return exactEnds(a, Interval{widenDn(vl, el), widenUp(vh, eh)}, 0, 0), true
}

func ivAtan(a Interval) Interval {
	w := ivMono(a, math.Atan, 4, 0, 0)
	w.Lo, w.Hi = math.Max(w.Lo, -math.Pi/2-1e-15), math.Min(w.Hi, math.Pi/2+1e-15)
	return w
}

func ivTanh(a Interval) Interval {
	w := ivMono(a, math.Tanh, 4, 0, 0)
	w.Lo, w.Hi = math.Max(w.Lo, -1), math.Min(w.Hi, 1)
	return w
}

func ivSinh(a Interval) Interval { return ivMono(a, math.Sinh, 6, 0, 0) }

func ivCosh(a Interval) Interval {
	switch {
	case a.IsEmpty():
		return emptyIv
	case a.Lo >= 0:
		w := ivMono(a, math.Cosh, 6, 0, 1)
		w.Lo = math.Max(w.Lo, 1)
		return w
	case a.Hi <= 0:
		w := ivMono(a.Neg(), math.Cosh, 6, 0, 1)
		w.Lo = math.Max(w.Lo, 1)
		return w
	}
	v := math.Cosh(math.Max(-a.Lo, a.Hi))
	return Interval{1, widenUp(v, lib(v, 7))}
}

// powIv encloses x^y for a point (x, y) computed by math.Pow; 0^y with y > 0
// is an exact 0 and x^0 an exact 1.
func powIv(x, y float64) Interval {
	switch {
	case y == 0 || x == 1:
		return oneIv
	case x == 0 && y > 0:
		return zeroIv
	case x == 0:
		return Interval{math.MaxFloat64, math.Inf(1)}
	}
	v := math.Pow(x, y)
	return libIv(v, powLib(x, y, v)*(1+0x1p-20)+eta)
}

// ivPowInt encloses a^n for an integer n (also for negative a), and
// reports whether a^n is continuous on a.
func ivPowInt(a Interval, n float64) (Interval, bool) {
	if n == 0 {
		return oneIv, true
	}
	if a.IsEmpty() {
		return emptyIv, false
	}
	even := math.Mod(n, 2) == 0
	holds0 := a.Lo <= 0 && a.Hi >= 0
	mag := ivMag(a)
	mig := 0.0
	if !holds0 {
		mig = math.Min(math.Abs(a.Lo), math.Abs(a.Hi))
	}
	if n > 0 {
		if even {
			return Interval{powIv(mig, n).Lo, powIv(mag, n).Hi}, true
		}
		return Interval{powIv(a.Lo, n).Lo, powIv(a.Hi, n).Hi}, true
	}
	if holds0 {
		switch {
		case a.Lo == 0 && a.Hi == 0:
			return emptyIv, false
		case even:
			return Interval{powIv(mag, n).Lo, math.Inf(1)}, false
		case a.Lo == 0:
			return Interval{powIv(a.Hi, n).Lo, math.Inf(1)}, false
		case a.Hi == 0:
			return Interval{math.Inf(-1), powIv(a.Lo, n).Hi}, false
		}
		return entireIv, false
	}
	if even {
		return Interval{powIv(mag, n).Lo, powIv(mig, n).Hi}, true
	}
	return Interval{powIv(a.Hi, n).Lo, powIv(a.Lo, n).Hi}, true
}

// ivPowGen encloses a^b = exp(b log a) for an exponent interval b: over
// a ≥ 0 the extremes lie at the corners, b·log a being bilinear in
// (log a, b). A base that is partly negative is cut to a ≥ 0 (not
// continuous), except that an exponent interval holding an integer, where
// a negative base is defined, gives the whole line.
func ivPowGen(a, b Interval) (Interval, bool) {
	if a.IsEmpty() || b.IsEmpty() {
		return emptyIv, false
	}
	ok := true
	if a.Lo < 0 {
		if math.Floor(b.Hi) >= math.Ceil(b.Lo) {
			return entireIv, false
		}
		if a.Hi < 0 {
			return emptyIv, false
		}
		a.Lo, ok = 0, false
	}
	ok = ok && (a.Lo > 0 || b.Lo > 0)
	c1, c2, c3, c4 := powIv(a.Lo, b.Lo), powIv(a.Lo, b.Hi), powIv(a.Hi, b.Lo), powIv(a.Hi, b.Hi)
	w := Interval{
		math.Min(math.Min(c1.Lo, c2.Lo), math.Min(c3.Lo, c4.Lo)),
		math.Max(math.Max(c1.Hi, c2.Hi), math.Max(c3.Hi, c4.Hi)),
	}
	if a.Lo == 0 && b.Lo <= 0 && b.Hi >= 0 {
		w = w.Hull(oneIv) // a^b → 1 along b = 0
	}
	w.Lo = math.Max(w.Lo, 0)
	return w, ok
}
