package sample

import (
	"fmt"
	"math"
	"strconv"
)

// Distribution is a univariate distribution sampled by inversion.
//
// Quantile is the generalised inverse of the CDF,
// Q(p) = inf{x : CDF(x) ≥ p}; Quantile(0) and Quantile(1) are the ends of
// the support (possibly ±Inf) and Quantile returns NaN for p outside [0, 1]
// or NaN. No method panics.
type Distribution interface {
	Quantile(p float64) float64 // inverse CDF, p in [0, 1]
	CDF(x float64) float64
	Median() float64
	Support() (lo, hi float64) // may be ±Inf
	String() string            // e.g. "normal(mean=0.6, sd=0.05) truncated to [0, +Inf)"
}

// UpperTail is implemented by distributions that evaluate their upper tail
// directly, without the cancellation in 1 − CDF(x). Every continuous
// distribution of this package implements it; Truncate uses it when the
// truncation interval lies in the upper tail.
type UpperTail interface {
	// Survival returns P(X > x) = 1 − CDF(x), accurate when it is small.
	Survival(x float64) float64
	// InverseSurvival returns x such that Survival(x) = q, for q in [0, 1].
	InverseSurvival(q float64) float64
}

// ArgError reports an impossible argument to a distribution constructor.
// Dist is the distribution's name ("normal", "pert", ...) and Arg the
// scenario field name of the offending argument ("sd", "min", "mode",
// "weights", "samples", "truncate", ...).
type ArgError struct{ Dist, Arg, Msg string }

// Error returns "dist: arg msg", for example "normal: sd must be > 0 (got -1)".
func (e *ArgError) Error() string { return e.Dist + ": " + e.Arg + " " + e.Msg }

func argErr(dist, arg, format string, a ...any) error {
	return &ArgError{Dist: dist, Arg: arg, Msg: fmt.Sprintf(format, a...)}
}

// finite reports an ArgError unless x is finite.
func finite(dist, arg string, x float64) error {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return argErr(dist, arg, "must be a finite number (got %s)", num(x))
	}
	return nil
}

// positive reports an ArgError unless x is finite and > 0.
func positive(dist, arg string, x float64) error {
	if err := finite(dist, arg, x); err != nil {
		return err
	}
	if x <= 0 {
		return argErr(dist, arg, "must be > 0 (got %s)", num(x))
	}
	return nil
}

// ordered checks finite min < max.
func ordered(dist string, min, max float64) error {
	if err := finite(dist, "min", min); err != nil {
		return err
	}
	if err := finite(dist, "max", max); err != nil {
		return err
	}
	if !(min < max) {
		return argErr(dist, "max", "must be greater than min (got min=%s, max=%s)", num(min), num(max))
	}
	if math.IsInf(max-min, 0) {
		return argErr(dist, "max", "max − min overflows (min=%s, max=%s)", num(min), num(max))
	}
	return nil
}

// num formats x in the shortest form that reads back exactly; infinities
// are written +Inf and -Inf.
func num(x float64) string {
	switch {
	case math.IsInf(x, 1):
		return "+Inf"
	case math.IsInf(x, -1):
		return "-Inf"
	}
	return strconv.FormatFloat(x, 'g', -1, 64)
}

// badP reports whether p lies outside [0, 1] (or is NaN).
func badP(p float64) bool { return !(p >= 0 && p <= 1) }

// clamp restricts x to [lo, hi]; NaN stays NaN.
func clamp(x, lo, hi float64) float64 {
	if x < lo {
		return lo
	}
	if x > hi {
		return hi
	}
	return x
}
