package sample

import (
	"fmt"
	"math"
)

// truncated is a continuous distribution restricted to [lo, hi] and
// renormalised. When upper is set the interval is handled on the survival
// scale: sLo = S(lo), sHi = S(hi), Q(p) = S⁻¹(sLo − p(sLo − sHi)); otherwise
// on the CDF scale: Q(p) = F⁻¹(fLo + p(fHi − fLo)).
type truncated struct {
	base     Distribution
	lo, hi   float64 // requested bounds, for String
	slo, shi float64 // effective support
	a, b     float64 // F(lo), F(hi) or S(lo), S(hi)
	upper    bool
}

// Truncate returns d restricted to [lo, hi] and renormalised:
// CDF_T(x) = (F(x) − F(lo)) / (F(hi) − F(lo)) for x in [lo, hi]. lo may be
// −Inf and hi +Inf; lo < hi is required, and [lo, hi] must hold positive
// probability. Sampling inverts on [F(lo), F(hi)]; when F(lo) > ½ the
// computation moves to the survival function S = 1 − F (see UpperTail) so
// that truncation far in the upper tail does not lose precision through
// cancellation. Truncating a discrete or empirical distribution keeps the
// atoms inside [lo, hi]; truncating a truncated distribution intersects the
// intervals. Errors are *ArgError with Arg "truncate".
func Truncate(d Distribution, lo, hi float64) (Distribution, error) {
	if d == nil {
		return nil, &ArgError{Dist: "truncate", Arg: "truncate", Msg: "needs a distribution"}
	}
	if t, ok := d.(*truncated); ok {
		return Truncate(t.base, math.Max(lo, t.lo), math.Min(hi, t.hi))
	}
	name := distName(d)
	if math.IsNaN(lo) || math.IsNaN(hi) {
		return nil, argErr(name, "truncate", "bounds must not be NaN (got [%s, %s])", num(lo), num(hi))
	}
	if !(lo < hi) {
		return nil, argErr(name, "truncate", "lower bound must be below upper bound (got [%s, %s])", num(lo), num(hi))
	}
	label := d.String() + " truncated to " + interval(lo, hi)
	slo, shi := d.Support()
	slo, shi = math.Max(slo, lo), math.Min(shi, hi)
	if dd, ok := d.(*discrete); ok {
		r := dd.restrict(lo, hi, label)
		if r == nil {
			return nil, argErr(name, "truncate", "%s holds no value of %s", interval(lo, hi), d)
		}
		return r, nil
	}
	if !(slo <= shi) {
		return nil, argErr(name, "truncate", "%s lies outside the support of %s", interval(lo, hi), d)
	}
	t := &truncated{base: d, lo: lo, hi: hi, slo: slo, shi: shi}
	t.a, t.b = d.CDF(slo), d.CDF(shi)
	if ut, ok := d.(UpperTail); ok && t.a > 0.5 {
		t.upper = true
		t.a, t.b = ut.Survival(slo), ut.Survival(shi)
	}
	if !(math.Abs(t.b-t.a) > 0) {
		return nil, argErr(name, "truncate", "%s holds no probability under %s (mass underflows to 0)", interval(lo, hi), d)
	}
	return t, nil
}

// distName is the leading identifier of d.String(), e.g. "normal".
func distName(d Distribution) string {
	s := d.String()
	for i, r := range s {
		if r == '(' || r == ' ' {
			return s[:i]
		}
	}
	return s
}

func interval(lo, hi float64) string {
	l, r := "[", "]"
	if math.IsInf(lo, -1) {
		l = "("
	}
	if math.IsInf(hi, 1) {
		r = ")"
	}
	return fmt.Sprintf("%s%s, %s%s", l, num(lo), num(hi), r)
}

func (t *truncated) Quantile(p float64) float64 {
	if badP(p) {
		return math.NaN()
	}
	switch p {
	case 0:
		return t.slo
	case 1:
		return t.shi
	}
	var x float64
	if t.upper {
		x = t.base.(UpperTail).InverseSurvival(t.a - p*(t.a-t.b))
	} else {
		x = t.base.Quantile(t.a + p*(t.b-t.a))
	}
	return clamp(x, t.slo, t.shi)
}

func (t *truncated) CDF(x float64) float64 {
	switch {
	case x < t.slo:
		return 0
	case x >= t.shi:
		return 1
	}
	if t.upper {
		return clamp((t.a-t.base.(UpperTail).Survival(x))/(t.a-t.b), 0, 1)
	}
	return clamp((t.base.CDF(x)-t.a)/(t.b-t.a), 0, 1)
}

// Survival is implemented so that a truncated distribution is itself an
// UpperTail.
func (t *truncated) Survival(x float64) float64 {
	switch {
	case x < t.slo:
		return 1
	case x >= t.shi:
		return 0
	}
	if t.upper {
		return clamp((t.base.(UpperTail).Survival(x)-t.b)/(t.a-t.b), 0, 1)
	}
	if ut, ok := t.base.(UpperTail); ok {
		// (F(hi) − F(x)) = S(x) − S(hi), computed without cancellation.
		return clamp((ut.Survival(x)-ut.Survival(t.shi))/(t.b-t.a), 0, 1)
	}
	return clamp((t.b-t.base.CDF(x))/(t.b-t.a), 0, 1)
}

func (t *truncated) InverseSurvival(q float64) float64 {
	if badP(q) {
		return math.NaN()
	}
	return t.Quantile(1 - q)
}

func (t *truncated) Median() float64           { return t.Quantile(0.5) }
func (t *truncated) Support() (lo, hi float64) { return t.slo, t.shi }
func (t *truncated) String() string {
	return t.base.String() + " truncated to " + interval(t.lo, t.hi)
}
