package steady

import (
	"errors"
	"fmt"
	"math"
)

// Func is a rate law f(x) with its parameters bound.
type Func interface {
	// Eval returns f(x). NaN means f is undefined at x, ±Inf that it is
	// infinite there.
	Eval(x float64) float64
	// Taylor fills c[k] = f^(k)(x)/k! for k = 0..len(c)-1 (len(c) ≤ 8, i.e.
	// up to the 7th derivative) and e[k] ≥ a bound on the floating-point
	// rounding error of c[k].
	Taylor(x float64, c, e []float64)
}

// MaxTaylor is the largest number of Taylor coefficients the package asks
// for (c_0..c_7).
const MaxTaylor = 8

// Class is the stability class of an equilibrium.
type Class int

const (
	// Stable: attracting from both sides (first non-vanishing derivative of
	// odd order and negative).
	Stable Class = iota + 1
	// Unstable: repelling on both sides (odd order, positive).
	Unstable
	// Semistable: attracting from one side only (even order); see
	// Equilibrium.AttractsFrom.
	Semistable
	// Degenerate: all derivatives up to order 7 vanish, or f ≡ 0 on a
	// sub-interval (Equilibrium.Span).
	Degenerate
)

// String returns "stable", "unstable", "semistable" or "degenerate".
func (c Class) String() string {
	switch c {
	case Stable:
		return "stable"
	case Unstable:
		return "unstable"
	case Semistable:
		return "semistable"
	case Degenerate:
		return "degenerate"
	}
	return fmt.Sprintf("Class(%d)", int(c))
}

// Side names one side of a point on the line.
type Side int

const (
	// None: no side (not semistable, or not applicable).
	None Side = iota
	// Below: the side of smaller x.
	Below
	// Above: the side of larger x.
	Above
)

// String returns "", "below" or "above".
func (s Side) String() string {
	switch s {
	case None:
		return ""
	case Below:
		return "below"
	case Above:
		return "above"
	}
	return fmt.Sprintf("Side(%d)", int(s))
}

// Interval is a closed interval [Lo, Hi].
type Interval struct {
	Lo, Hi float64
}

// Equilibrium is one root x* of f with its classification and figures.
type Equilibrium struct {
	// X is the equilibrium (the midpoint of Span for a continuum).
	X float64
	// XErr is the location uncertainty of X: the refinement's last
	// correction, or for a multiple root the radius within which f cannot
	// be told from zero.
	XErr float64
	// Slope is f'(X) (0 for a continuum).
	Slope float64
	// Class is the verdict of the derivative test.
	Class Class
	// Order is the order of the deciding derivative (1 when linearisation
	// decided; 0 for Degenerate).
	Order int
	// AttractsFrom is the attracting side of a Semistable equilibrium
	// (None otherwise).
	AttractsFrom Side
	// ReturnTime is 1/|f'(X)| for a hyperbolic (Order 1) stable
	// equilibrium, NaN otherwise.
	ReturnTime float64
	// Basin is the closed set of starting points in the domain that flow
	// to this equilibrium, read off the phase line; it contains X (or Span).
	Basin [2]float64
	// BasinAtDomainEnd tells whether each edge of Basin is a domain end.
	BasinAtDomainEnd [2]bool
	// BasinAtSingular tells whether each edge of Basin is a pole or the
	// edge of an undefined interval.
	BasinAtSingular [2]bool
	// Barrier is the potential barrier V(edge) − V(X), V(x) = −∫f dx, from
	// X to the lower and upper basin edges. It is 0 on a side where the
	// basin ends at X itself, NaN toward a singular edge or when barriers
	// are switched off (Options.NoBarriers).
	Barrier [2]float64
	// Span is the sub-interval on which f ≡ 0 (within its rounding error)
	// for a Degenerate equilibrium; [X, X] otherwise.
	Span [2]float64
	// Note explains a special case, e.g. a touching root that floating
	// point cannot tell from a close pair. Empty otherwise.
	Note string
}

// Result lists every equilibrium in the domain, sorted by X, with the
// places where f is undefined or infinite.
//
// A Result returned by (*Finder).Find is owned by the Finder: its slices are
// reused by the next call on the same Finder. Copy what must outlive it.
type Result struct {
	// Lo, Hi is the domain searched.
	Lo, Hi float64
	// Equilibria sorted by X, without duplicates.
	Equilibria []Equilibrium
	// Undefined lists the sub-intervals where f is NaN (or overflows over a
	// stretch), merged and sorted.
	Undefined []Interval
	// Poles lists isolated points where f is infinite, sorted.
	Poles []float64
	// Warnings lists disagreements (derivative test against phase line),
	// discontinuities, exhausted budgets. Empty when all is well.
	Warnings []string
	// Evals counts calls of f.Eval, TaylorCalls calls of f.Taylor and
	// TaylorTerms the coefficients those calls asked for (Σ len(c)).
	Evals, TaylorCalls, TaylorTerms int
}

// Options tunes Find. Use DefaultOptions and change what you need.
type Options struct {
	// Grid is the number of cells of the initial uniform scan (≥ 2).
	// Features narrower than about a cell that leave no trace in f, f' and
	// f″ at the grid points can be missed; raise Grid for such laws.
	Grid int
	// MaxDepth bounds the adaptive bisection of a cell (0..40).
	MaxDepth int
	// RelTol and AbsTol set the root tolerance RelTol·|x| + AbsTol. AbsTol 0
	// means RelTol·(hi − lo).
	RelTol, AbsTol float64
	// QuadNodes is the number of Gauss–Legendre nodes per quadrature panel
	// (2..100).
	QuadNodes int
	// QuadRelTol is the relative tolerance of barriers and transit times.
	QuadRelTol float64
	// NoBarriers skips the barrier quadrature (Barrier is then NaN), which
	// saves about QuadNodes evaluations per interval between equilibria.
	NoBarriers bool
	// ThresholdBarriersOnly computes barriers only toward basin edges
	// that are thresholds between equilibria, not domain ends (Barrier is
	// NaN toward a domain end). The Monte Carlo engine reports only
	// escape barriers over thresholds, so it saves the integrals over the
	// outermost segments.
	ThresholdBarriersOnly bool
	// MaxCalls caps the calls of f (Eval and Taylor) per Find; when it is
	// reached the search stops with a warning.
	MaxCalls int
}

// DefaultOptions returns the documented defaults: Grid 12, MaxDepth 8,
// RelTol 1e-12, AbsTol 0 (that is 1e-12·(hi − lo)), QuadNodes 10,
// QuadRelTol 1e-9, barriers on, MaxCalls 20000.
//
// The scan then costs 13 Taylor evaluations of order 2, plus about one per
// simple root and a few per cell that needs subdividing (common practice,
// no source: chosen by measurement on the package's test laws, where the
// adaptive subdivision, not the initial grid, resolves fast variation).
func DefaultOptions() Options {
	return Options{
		Grid:       12,
		MaxDepth:   8,
		RelTol:     1e-12,
		AbsTol:     0,
		QuadNodes:  10,
		QuadRelTol: 1e-9,
		MaxCalls:   20000,
	}
}

// validate reports the first invalid option.
func (o Options) validate() error {
	switch {
	case o.Grid < 2 || o.Grid > 1<<20:
		return fmt.Errorf("steady: Grid %d out of range [2, %d]", o.Grid, 1<<20)
	case o.MaxDepth < 0 || o.MaxDepth > 40:
		return fmt.Errorf("steady: MaxDepth %d out of range [0, 40]", o.MaxDepth)
	case !(o.RelTol >= 1e-16 && o.RelTol <= 1e-3):
		return fmt.Errorf("steady: RelTol %g out of range [1e-16, 1e-3]", o.RelTol)
	case !(o.AbsTol >= 0 && !math.IsInf(o.AbsTol, 0)):
		return fmt.Errorf("steady: AbsTol %g must be finite and ≥ 0", o.AbsTol)
	case o.QuadNodes < 2 || o.QuadNodes > 100:
		return fmt.Errorf("steady: QuadNodes %d out of range [2, 100]", o.QuadNodes)
	case !(o.QuadRelTol >= 1e-15 && o.QuadRelTol <= 0.1):
		return fmt.Errorf("steady: QuadRelTol %g out of range [1e-15, 0.1]", o.QuadRelTol)
	case o.MaxCalls < 100:
		return fmt.Errorf("steady: MaxCalls %d below 100", o.MaxCalls)
	}
	return nil
}

// ErrDomain reports an invalid search domain.
var ErrDomain = errors.New("steady: invalid domain")
