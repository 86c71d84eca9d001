package sensitivity

import (
	"math"

	"holdfast/assess"
	"holdfast/assess/steady"
)

// LocalEq is the local sensitivity of one equilibrium at nominal values.
type LocalEq struct {
	Label string
	X     float64
	// Slope is f'(x*); Order the order of the derivative that decided the
	// class (the derivatives below are NaN unless Order is 1).
	Slope float64
	Class steady.Class
	Order int
	// Params holds one entry per parameter, in parameter order.
	Params []LocalParam
}

// LocalParam is the local sensitivity of an equilibrium to one parameter.
type LocalParam struct {
	Parameter string
	// Fixed is set for a parameter that is not uncertain in the scenario;
	// its derivatives are still given (what a change would do).
	Fixed bool
	// Value is the nominal value θ.
	Value float64
	// DX is ∂x*/∂θ and DSlope is d f'(x*)/dθ, the change of the slope
	// along the moving equilibrium.
	DX, DSlope float64
	// XElasticity = (θ/x*)·∂x*/∂θ and SlopeElasticity =
	// (θ/f'(x*))·d f'(x*)/dθ: relative change per relative change of θ.
	// NaN where x* = 0 or f'(x*) = 0.
	XElasticity, SlopeElasticity float64
}

// Local returns the local sensitivity of every equilibrium of the nominal
// snapshot (from m.Analyze(m.Nominal)) to every parameter, from the rate
// law's exact derivatives (expr.Machine.ParamGrad for ∂f/∂θ and ∂²f/∂x∂θ,
// expr.Machine.Taylor for f' and f″). By the implicit function theorem,
// differentiating f(x*(θ); θ) = 0,
//
//	∂x*/∂θ = −(∂f/∂θ) / (∂f/∂x),
//
// and the slope λ = f'(x*(θ); θ) changes by
//
//	dλ/dθ = ∂²f/∂x∂θ + f″(x*)·∂x*/∂θ
//
// (the implicit function theorem for the first, the chain rule for the
// second). Both need a hyperbolic equilibrium
// (f'(x*) ≠ 0, Order 1); for others they are NaN.
func Local(m *assess.Model, nominal *assess.Snapshot) []LocalEq {
	mach := m.Program.NewMachine()
	np := len(m.Names)
	theta := nominal.Theta
	df, dfx := make([]float64, np), make([]float64, np)
	c := make([]float64, 3)
	out := make([]LocalEq, 0, len(nominal.Equilibria))
	for _, e := range nominal.Equilibria {
		le := LocalEq{Label: e.Label, X: e.X, Slope: e.Slope, Class: e.Class, Order: e.Order}
		mach.ParamGrad(e.X, theta, df, dfx)
		mach.Taylor(e.X, theta, c, nil)
		fx, fxx := c[1], 2*c[2]
		hyper := e.Order == 1 && fx != 0 && !math.IsNaN(fx)
		for j, name := range m.Names {
			lp := LocalParam{Parameter: name, Fixed: m.Scenario.Params[j].Dist == nil, Value: theta[j]}
			lp.DX, lp.DSlope = math.NaN(), math.NaN()
			lp.XElasticity, lp.SlopeElasticity = math.NaN(), math.NaN()
			if hyper {
				lp.DX = -df[j] / fx
				lp.DSlope = dfx[j] + fxx*lp.DX
				if df[j] == 0 {
					lp.DX = 0 // f does not depend on θ here: no NaN from 0·Inf
					lp.DSlope = dfx[j]
				}
				lp.XElasticity = elasticity(lp.DX, theta[j], e.X)
				lp.SlopeElasticity = elasticity(lp.DSlope, theta[j], fx)
			}
			le.Params = append(le.Params, lp)
		}
		out = append(out, le)
	}
	return out
}

// elasticity is (θ/y)·dy/dθ, NaN when y = 0.
func elasticity(d, theta, y float64) float64 {
	if y == 0 || math.IsNaN(d) {
		return math.NaN()
	}
	if d == 0 || theta == 0 {
		return 0
	}
	return d * theta / y
}
