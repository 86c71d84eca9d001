package sample

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mathext"
	"gonum.org/v1/gonum/stat/distuv"
)

// normal is N(mu, sigma²), built on distuv.Normal.
type normal struct{ d distuv.Normal }

// NewNormal returns the normal distribution with the given mean and
// standard deviation sd > 0.
func NewNormal(mean, sd float64) (Distribution, error) {
	const name = "normal"
	if err := finite(name, "mean", mean); err != nil {
		return nil, err
	}
	if err := positive(name, "sd", sd); err != nil {
		return nil, err
	}
	return &normal{distuv.Normal{Mu: mean, Sigma: sd}}, nil
}

func (n *normal) Quantile(p float64) float64 {
	if badP(p) {
		return math.NaN()
	}
	return n.d.Quantile(p) // ±Inf at p = 0, 1 (mathext.NormalQuantile)
}

// CDF is ½ erfc(−(x−μ)/(σ√2)), accurate in the lower tail.
func (n *normal) CDF(x float64) float64 { return n.d.CDF(x) }

// Survival is ½ erfc((x−μ)/(σ√2)), accurate in the upper tail.
func (n *normal) Survival(x float64) float64 {
	return 0.5 * math.Erfc((x-n.d.Mu)/(n.d.Sigma*math.Sqrt2))
}

// InverseSurvival uses the symmetry Φ⁻¹(1−q) = −Φ⁻¹(q).
func (n *normal) InverseSurvival(q float64) float64 {
	if badP(q) {
		return math.NaN()
	}
	return n.d.Mu - n.d.Sigma*mathext.NormalQuantile(q)
}

func (n *normal) Median() float64           { return n.d.Mu }
func (n *normal) Support() (lo, hi float64) { return math.Inf(-1), math.Inf(1) }
func (n *normal) String() string {
	return fmt.Sprintf("normal(mean=%s, sd=%s)", num(n.d.Mu), num(n.d.Sigma))
}

// lognormal is exp(N(mu, sigma²)), built on distuv.LogNormal.
type lognormal struct {
	d     distuv.LogNormal
	label string
}

// NewLognormalMedian returns the lognormal distribution with the given
// median > 0 and geometric standard deviation gsd > 1, that is
// ln X ~ N(ln median, (ln gsd)²).
func NewLognormalMedian(median, gsd float64) (Distribution, error) {
	const name = "lognormal"
	if err := positive(name, "median", median); err != nil {
		return nil, err
	}
	if err := finite(name, "gsd", gsd); err != nil {
		return nil, err
	}
	if !(gsd > 1) {
		return nil, argErr(name, "gsd", "must be > 1 (got %s)", num(gsd))
	}
	return &lognormal{
		d:     distuv.LogNormal{Mu: math.Log(median), Sigma: math.Log(gsd)},
		label: fmt.Sprintf("lognormal(median=%s, gsd=%s)", num(median), num(gsd)),
	}, nil
}

// NewLognormalMean returns the lognormal distribution whose variable has
// arithmetic mean > 0 and standard deviation sd > 0:
// σ² = ln(1 + sd²/mean²), μ = ln(mean) − σ²/2 (Johnson, Kotz & Balakrishnan,
// Continuous Univariate Distributions, vol. 1, 2nd ed. 1994, ch. 14).
func NewLognormalMean(mean, sd float64) (Distribution, error) {
	const name = "lognormal"
	if err := positive(name, "mean", mean); err != nil {
		return nil, err
	}
	if err := positive(name, "sd", sd); err != nil {
		return nil, err
	}
	cv := sd / mean
	s2 := math.Log1p(cv * cv)
	if math.IsInf(s2, 0) || s2 == 0 {
		return nil, argErr(name, "sd", "sd/mean = %s is out of range", num(cv))
	}
	return &lognormal{
		d:     distuv.LogNormal{Mu: math.Log(mean) - s2/2, Sigma: math.Sqrt(s2)},
		label: fmt.Sprintf("lognormal(mean=%s, sd=%s)", num(mean), num(sd)),
	}, nil
}

func (l *lognormal) Quantile(p float64) float64 {
	if badP(p) {
		return math.NaN()
	}
	if p == 0 {
		return 0
	}
	return l.d.Quantile(p)
}

func (l *lognormal) CDF(x float64) float64 {
	if x <= 0 {
		return 0
	}
	return l.d.CDF(x)
}

func (l *lognormal) Survival(x float64) float64 {
	if x <= 0 {
		return 1
	}
	return 0.5 * math.Erfc((math.Log(x)-l.d.Mu)/(l.d.Sigma*math.Sqrt2))
}

func (l *lognormal) InverseSurvival(q float64) float64 {
	if badP(q) {
		return math.NaN()
	}
	return math.Exp(l.d.Mu - l.d.Sigma*mathext.NormalQuantile(q))
}

func (l *lognormal) Median() float64           { return math.Exp(l.d.Mu) }
func (l *lognormal) Support() (lo, hi float64) { return 0, math.Inf(1) }
func (l *lognormal) String() string            { return l.label }

// uniform is U(min, max).
type uniform struct{ min, max float64 }

// NewUniform returns the uniform distribution on [min, max], min < max.
func NewUniform(min, max float64) (Distribution, error) {
	if err := ordered("uniform", min, max); err != nil {
		return nil, err
	}
	return &uniform{min, max}, nil
}

func (u *uniform) Quantile(p float64) float64 {
	if badP(p) {
		return math.NaN()
	}
	return clamp(u.min+p*(u.max-u.min), u.min, u.max)
}

func (u *uniform) CDF(x float64) float64 {
	return clamp((x-u.min)/(u.max-u.min), 0, 1)
}

func (u *uniform) Survival(x float64) float64 {
	return clamp((u.max-x)/(u.max-u.min), 0, 1)
}

func (u *uniform) InverseSurvival(q float64) float64 {
	if badP(q) {
		return math.NaN()
	}
	return clamp(u.max-q*(u.max-u.min), u.min, u.max)
}

func (u *uniform) Median() float64           { return u.min + (u.max-u.min)/2 }
func (u *uniform) Support() (lo, hi float64) { return u.min, u.max }
func (u *uniform) String() string {
	return fmt.Sprintf("uniform(min=%s, max=%s)", num(u.min), num(u.max))
}

// logUniform has ln X ~ U(ln min, ln max).
type logUniform struct{ min, max, lmin, lmax float64 }

// NewLogUniform returns the log-uniform (reciprocal) distribution on
// [min, max], 0 < min < max: CDF(x) = ln(x/min)/ln(max/min),
// Q(p) = min·(max/min)^p, median √(min·max).
func NewLogUniform(min, max float64) (Distribution, error) {
	const name = "loguniform"
	if err := positive(name, "min", min); err != nil {
		return nil, err
	}
	if err := ordered(name, min, max); err != nil {
		return nil, err
	}
	return &logUniform{min, max, math.Log(min), math.Log(max)}, nil
}

func (l *logUniform) Quantile(p float64) float64 {
	if badP(p) {
		return math.NaN()
	}
	return clamp(math.Exp(l.lmin+p*(l.lmax-l.lmin)), l.min, l.max)
}

func (l *logUniform) CDF(x float64) float64 {
	if x <= l.min {
		return 0
	}
	return clamp((math.Log(x)-l.lmin)/(l.lmax-l.lmin), 0, 1)
}

func (l *logUniform) Survival(x float64) float64 {
	if x <= l.min {
		return 1
	}
	return clamp((l.lmax-math.Log(x))/(l.lmax-l.lmin), 0, 1)
}

func (l *logUniform) InverseSurvival(q float64) float64 {
	if badP(q) {
		return math.NaN()
	}
	return clamp(math.Exp(l.lmax-q*(l.lmax-l.lmin)), l.min, l.max)
}

func (l *logUniform) Median() float64           { return math.Sqrt(l.min) * math.Sqrt(l.max) }
func (l *logUniform) Support() (lo, hi float64) { return l.min, l.max }
func (l *logUniform) String() string {
	return fmt.Sprintf("loguniform(min=%s, max=%s)", num(l.min), num(l.max))
}

// triangular is built on distuv.Triangle, with a direct upper tail.
type triangular struct {
	d              distuv.Triangle
	min, mode, max float64
}

// NewTriangular returns the triangular distribution on [min, max] with the
// given mode, min ≤ mode ≤ max, min < max (Johnson, Kotz & Balakrishnan,
// Continuous Univariate Distributions, vol. 2, 1995, ch. 26).
func NewTriangular(min, mode, max float64) (Distribution, error) {
	const name = "triangular"
	if err := checkMinModeMax(name, min, mode, max); err != nil {
		return nil, err
	}
	return &triangular{d: distuv.NewTriangle(min, max, mode, nil), min: min, mode: mode, max: max}, nil
}

func checkMinModeMax(name string, min, mode, max float64) error {
	if err := finite(name, "mode", mode); err != nil {
		return err
	}
	if err := ordered(name, min, max); err != nil {
		return err
	}
	if mode < min || mode > max {
		return argErr(name, "mode", "must lie in [min, max] = [%s, %s] (got %s)", num(min), num(max), num(mode))
	}
	return nil
}

func (t *triangular) Quantile(p float64) float64 {
	if badP(p) {
		return math.NaN()
	}
	return clamp(t.d.Quantile(p), t.min, t.max)
}

func (t *triangular) CDF(x float64) float64 {
	if math.IsNaN(x) {
		return math.NaN()
	}
	return t.d.CDF(x)
}

// Survival is (max−x)²/((max−min)(max−mode)) above the mode.
func (t *triangular) Survival(x float64) float64 {
	switch {
	case x <= t.min:
		return 1
	case x >= t.max:
		return 0
	case x < t.mode:
		return 1 - t.d.CDF(x)
	}
	d := t.max - x
	return d * d / ((t.max - t.min) * (t.max - t.mode))
}

func (t *triangular) InverseSurvival(q float64) float64 {
	if badP(q) {
		return math.NaN()
	}
	if q <= (t.max-t.mode)/(t.max-t.min) {
		return clamp(t.max-math.Sqrt(q*(t.max-t.min)*(t.max-t.mode)), t.min, t.max)
	}
	return clamp(t.min+math.Sqrt((1-q)*(t.max-t.min)*(t.mode-t.min)), t.min, t.max)
}

func (t *triangular) Median() float64           { return t.Quantile(0.5) }
func (t *triangular) Support() (lo, hi float64) { return t.min, t.max }
func (t *triangular) String() string {
	return fmt.Sprintf("triangular(min=%s, mode=%s, max=%s)", num(t.min), num(t.mode), num(t.max))
}

// scaledBeta is min + (max−min)·Y with Y ~ Beta(a, b), using the
// regularized incomplete beta function of gonum's mathext (as distuv.Beta
// does) and the symmetry I_x(a, b) = 1 − I_{1−x}(b, a) for the upper tail.
type scaledBeta struct {
	a, b, min, max float64
	label          string
}

// NewBeta returns the beta distribution with shape parameters alpha, beta > 0
// scaled to [min, max]; callers pass min = 0, max = 1 for the standard form.
func NewBeta(alpha, beta, min, max float64) (Distribution, error) {
	const name = "beta"
	if err := positive(name, "alpha", alpha); err != nil {
		return nil, err
	}
	if err := positive(name, "beta", beta); err != nil {
		return nil, err
	}
	if err := ordered(name, min, max); err != nil {
		return nil, err
	}
	label := fmt.Sprintf("beta(alpha=%s, beta=%s)", num(alpha), num(beta))
	if min != 0 || max != 1 {
		label = fmt.Sprintf("beta(alpha=%s, beta=%s, min=%s, max=%s)", num(alpha), num(beta), num(min), num(max))
	}
	return &scaledBeta{a: alpha, b: beta, min: min, max: max, label: label}, nil
}

// NewPERT returns the Beta-PERT distribution on [min, max] with the given
// mode and λ = 4: a beta distribution scaled to [min, max] with
// α = 1 + 4(mode−min)/(max−min), β = 1 + 4(max−mode)/(max−min), whose mean
// is (min + 4·mode + max)/6 (Malcolm, Roseboom, Clark & Fazar 1959; Vose,
// Risk Analysis, 3rd ed. 2008).
func NewPERT(min, mode, max float64) (Distribution, error) {
	const name = "pert"
	if err := checkMinModeMax(name, min, mode, max); err != nil {
		return nil, err
	}
	r := max - min
	return &scaledBeta{
		a: 1 + 4*(mode-min)/r, b: 1 + 4*(max-mode)/r, min: min, max: max,
		label: fmt.Sprintf("pert(min=%s, mode=%s, max=%s)", num(min), num(mode), num(max)),
	}, nil
}

func (s *scaledBeta) Quantile(p float64) float64 {
	if badP(p) {
		return math.NaN()
	}
	switch p {
	case 0:
		return s.min
	case 1:
		return s.max
	}
	if p > 0.5 {
		return s.InverseSurvival(1 - p)
	}
	y := mathext.InvRegIncBeta(s.a, s.b, p)
	return clamp(s.min+(s.max-s.min)*y, s.min, s.max)
}

func (s *scaledBeta) CDF(x float64) float64 {
	switch {
	case x <= s.min:
		return 0
	case x >= s.max:
		return 1
	}
	return mathext.RegIncBeta(s.a, s.b, clamp((x-s.min)/(s.max-s.min), 0, 1))
}

func (s *scaledBeta) Survival(x float64) float64 {
	switch {
	case x <= s.min:
		return 1
	case x >= s.max:
		return 0
	}
	return mathext.RegIncBeta(s.b, s.a, clamp((s.max-x)/(s.max-s.min), 0, 1))
}

func (s *scaledBeta) InverseSurvival(q float64) float64 {
	if badP(q) {
		return math.NaN()
	}
	switch q {
	case 0:
		return s.max
	case 1:
		return s.min
	}
	y := mathext.InvRegIncBeta(s.b, s.a, q)
	return clamp(s.max-(s.max-s.min)*y, s.min, s.max)
}

func (s *scaledBeta) Median() float64           { return s.Quantile(0.5) }
func (s *scaledBeta) Support() (lo, hi float64) { return s.min, s.max }
func (s *scaledBeta) String() string            { return s.label }

// gamma is the gamma distribution, built on gonum's regularized incomplete
// gamma functions (as distuv.Gamma is).
type gamma struct {
	shape, scale float64
	label        string
}

// NewGammaScale returns the gamma distribution with shape k > 0 and scale
// θ > 0: density x^(k−1) e^(−x/θ) / (Γ(k) θ^k).
func NewGammaScale(shape, scale float64) (Distribution, error) {
	const name = "gamma"
	if err := positive(name, "shape", shape); err != nil {
		return nil, err
	}
	if err := positive(name, "scale", scale); err != nil {
		return nil, err
	}
	return &gamma{shape, scale, fmt.Sprintf("gamma(shape=%s, scale=%s)", num(shape), num(scale))}, nil
}

// NewGammaRate returns the gamma distribution with shape k > 0 and rate
// β > 0 (scale 1/β).
func NewGammaRate(shape, rate float64) (Distribution, error) {
	const name = "gamma"
	if err := positive(name, "shape", shape); err != nil {
		return nil, err
	}
	if err := positive(name, "rate", rate); err != nil {
		return nil, err
	}
	scale := 1 / rate
	if math.IsInf(scale, 0) {
		return nil, argErr(name, "rate", "is too small (got %s)", num(rate))
	}
	return &gamma{shape, scale, fmt.Sprintf("gamma(shape=%s, rate=%s)", num(shape), num(rate))}, nil
}

func (g *gamma) Quantile(p float64) float64 {
	if badP(p) {
		return math.NaN()
	}
	switch p {
	case 0:
		return 0
	case 1:
		return math.Inf(1)
	}
	if p > 0.5 {
		return g.InverseSurvival(1 - p)
	}
	if p < 0.25 {
		// mathext.GammaIncRegInv's false-position search can step to x < 0
		// (and panic) for very small p; use a bracketed Newton iteration.
		return gammaLowerInv(g.shape, p) * g.scale
	}
	return mathext.GammaIncRegInv(g.shape, p) * g.scale
}

// gammaLowerInv returns x with P(k, x) = p for 0 < p < 0.25, where P is the
// regularized lower incomplete gamma function. It runs Newton's method on
// h(x) = ln P(k, x) − ln p, h′(x) = x^(k−1) e^(−x) / (Γ(k) P(k, x)), kept
// inside a bracket [lo, hi] that every iterate narrows and falling back to
// bisection (geometric once lo > 0). The start x₀ = (p Γ(k+1))^(1/k) is a
// lower bound because P(k, x) ≤ x^k / Γ(k+1) (Abramowitz & Stegun 6.5.29:
// P(k, x) = x^k e^(−x) Σ xⁿ/Γ(k+n+1), and e^(−x) Σ xⁿ Γ(k+1)/Γ(k+n+1) ≤ 1).
func gammaLowerInv(k, p float64) float64 {
	lo, hi := 0.0, mathext.GammaIncRegCompInv(k, 0.75) // P(k, hi) = 0.25 > p
	lgk, _ := math.Lgamma(k)
	lgk1, _ := math.Lgamma(k + 1)
	lp := math.Log(p)
	x := math.Exp((lp + lgk1) / k)
	if x < 0x1p-1022 {
		// x* = x₀(1 + O(x₀)): the answer is x₀ to working precision (and
		// below the normal range, where ln P would lose accuracy).
		return x
	}
	if !(x > lo && x < hi) {
		x = hi / 2
	}
	for iter := 0; iter < 200; iter++ {
		P := mathext.GammaIncReg(k, x)
		if P < p {
			lo = x
		} else {
			hi = x
		}
		var xn float64
		if P > 0 {
			logPdf := (k-1)*math.Log(x) - x - lgk
			xn = x - (math.Log(P)-lp)*math.Exp(math.Log(P)-logPdf)
		}
		if !(xn > lo && xn < hi) {
			if lo > 0 {
				xn = math.Sqrt(lo) * math.Sqrt(hi)
			} else {
				xn = hi / 2
			}
		}
		if math.Abs(xn-x) <= 4e-16*x || hi-lo <= 4e-16*hi {
			return xn
		}
		x = xn
	}
	return x
}

func (g *gamma) CDF(x float64) float64 {
	if x <= 0 {
		return 0
	}
	if math.IsInf(x, 1) {
		return 1
	}
	return mathext.GammaIncReg(g.shape, x/g.scale)
}

func (g *gamma) Survival(x float64) float64 {
	if x <= 0 {
		return 1
	}
	if math.IsInf(x, 1) {
		return 0
	}
	return mathext.GammaIncRegComp(g.shape, x/g.scale)
}

func (g *gamma) InverseSurvival(q float64) float64 {
	if badP(q) {
		return math.NaN()
	}
	switch q {
	case 0:
		return math.Inf(1)
	case 1:
		return 0
	}
	return mathext.GammaIncRegCompInv(g.shape, q) * g.scale
}

func (g *gamma) Median() float64           { return g.Quantile(0.5) }
func (g *gamma) Support() (lo, hi float64) { return 0, math.Inf(1) }
func (g *gamma) String() string            { return g.label }
