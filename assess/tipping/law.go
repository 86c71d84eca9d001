package tipping

import (
	"math"

	"holdfast/assess/expr"
)

// law is the rate law of one draw with the driver as the continuation
// parameter: g(x, t) = f(x; θ(t)), where θ(t) is the draw's parameter
// vector with the driver slot set to d(t) = a + t·span. Working in t keeps
// the continuation's second coordinate of order one whatever the driver's
// units; d = a and d = a + span are the ends of the sweep.
type law struct {
	m       *expr.Machine
	theta   []float64 // the draw's parameters; theta[j] is moved
	j       int       // driver slot
	a, span float64
	c       [3]float64 // Taylor scratch
	df, dfx []float64  // ParamGrad scratch
}

func newLaw(p *expr.Program, j int, a, span float64) *law {
	n := p.NumParams()
	return &law{
		m:     p.NewMachine(),
		theta: make([]float64, n),
		j:     j,
		a:     a,
		span:  span,
		df:    make([]float64, n),
		dfx:   make([]float64, n),
	}
}

// driver is d(t).
func (l *law) driver(t float64) float64 { return l.a + t*l.span }

// at moves the driver to d(t).
func (l *law) at(t float64) { l.theta[l.j] = l.driver(t) }

// eval returns g(x, t).
func (l *law) eval(x, t float64) float64 {
	l.at(t)
	return l.m.Eval(x, l.theta)
}

// slope returns g and ∂g/∂x at (x, t) by dual numbers.
func (l *law) slope(x, t float64) (g, gx float64) {
	l.at(t)
	return l.m.Slope(x, l.theta)
}

// dtDiff is the forward-difference step in t for ∂g/∂t inside the
// continuation's corrector. The corrector's residual g is exact, so an
// approximate ∂g/∂t only slows its convergence, never moves the point it
// converges to.
const dtDiff = 1e-7

// grad returns g, ∂g/∂x and ∂g/∂t at (x, t); ∂g/∂t by a forward
// difference whose step is the driver change actually represented.
func (l *law) grad(x, t float64) (g, gx, gt float64) {
	d0 := l.driver(t)
	l.theta[l.j] = d0 + dtDiff*l.span
	d1 := l.theta[l.j]
	g1 := l.m.Eval(x, l.theta)
	g, gx = l.slope(x, t)
	if d1 == d0 {
		return g, gx, math.NaN()
	}
	return g, gx, (g1 - g) / (d1 - d0) * l.span
}

// jet returns g, ∂g/∂x, ∂²g/∂x², ∂g/∂t and ∂²g/∂x∂t at (x, t), exactly
// up to rounding: the x-derivatives from truncated Taylor arithmetic, the
// driver derivatives by algorithmic differentiation (expr.Machine.ParamGrad).
func (l *law) jet(x, t float64) (g, gx, gxx, gt, gxt float64) {
	l.at(t)
	l.m.Taylor(x, l.theta, l.c[:], nil)
	l.m.ParamGrad(x, l.theta, l.df, l.dfx)
	return l.c[0], l.c[1], 2 * l.c[2], l.df[l.j] * l.span, l.dfx[l.j] * l.span
}

// jetFD is jet with the t-derivatives by a forward difference: Taylor
// arithmetic at (x, t) and dual numbers at (x, t + h).
func (l *law) jetFD(x, t float64) (g, gx, gxx, gt, gxt float64) {
	d0 := l.driver(t)
	l.theta[l.j] = d0 + dtDiff*l.span
	d1 := l.theta[l.j]
	g1, gx1 := l.m.Slope(x, l.theta)
	l.theta[l.j] = d0
	l.m.Taylor(x, l.theta, l.c[:], nil)
	g, gx, gxx = l.c[0], l.c[1], 2*l.c[2]
	if d1 == d0 {
		return g, gx, gxx, math.NaN(), math.NaN()
	}
	r := l.span / (d1 - d0)
	return g, gx, gxx, (g1 - g) * r, (gx1 - gx) * r
}

// frozen is the law at a fixed t, as a steady.Func for the equilibrium
// search of one driver value.
type frozen struct{ l *law }

func (f frozen) Eval(x float64) float64 { return f.l.m.Eval(x, f.l.theta) }

func (f frozen) Taylor(x float64, c, e []float64) {
	f.l.m.Taylor(x, f.l.theta, c, e)
}
