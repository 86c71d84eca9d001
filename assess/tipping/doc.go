// Package tipping finds where an uncertain rate law dx/dt = f(x; θ) tips
// as one parameter, the driver d (a nutrient load, a harvest, a heat
// input), is moved across a range [From, To]: for every plausible
// parameter set, the driver value at which the equilibrium one relies on
// meets a fold and vanishes, and from their distribution a safe operating
// limit at a stated risk, the hysteresis of each fold, and the probability
// of each regime along the driver.
//
// # Per-draw critical values
//
// The tracked equilibrium is a nominal equilibrium E_k (found at nominal
// values, the driver at its nominal value). In draw i the engine
// (assess.Run with Options.Points) follows E_k from nominal values to the
// draw's parameters with the driver at From; from there the branch x*(d)
// is continued in d toward To by pseudo-arclength continuation (Keller
// 1977; Allgower & Georg, Introduction to Numerical Continuation Methods,
// SIAM 2003), which passes through folds instead of stopping before them.
// Along the branch the sign of ∂f/∂x is watched. Where it changes and the
// branch turns back in d, the fold is located precisely by Newton's method
// on the 2×2 system f = 0, ∂f/∂x = 0 in (x, d) (Seydel, Practical
// Bifurcation and Stability Analysis, 3rd ed., 2010, §5.5): ∂²f/∂x² from
// truncated Taylor arithmetic, ∂f/∂d and ∂²f/∂x∂d by forward differences
// while far from the solution and by algorithmic differentiation
// (expr.Machine.ParamGrad) for the last step, so the fold is exact up to
// rounding. Where the branch visibly turns toward a fold, the same solve
// is started from the last accepted point instead of approaching the fold
// by ever shorter steps, and accepted only when the fold lies ahead on the
// same branch. Where ∂f/∂x changes sign and the branch does not turn, or
// turns at a point where ∂f/∂d vanishes too, two branches cross: the
// equilibrium persists but exchanges stability (Kind Exchange). A branch
// may also leave the state's domain (Boundary). Non-smooth rate laws (abs,
// min, max) give branches with corners, which the continuation steps
// across.
//
// A draw with no event in range is recorded as such (None: "no tipping in
// range"), and a draw in which E_k is already absent at From as Absent.
// For the quantiles and the limit, a fold, an exchange or a domain exit
// counts as having lost the tracked equilibrium at its driver value, an
// absent one as lost at From, and a draw without tipping as beyond To.
//
// Resolution: a step that would jump from one branch to another across a
// pair of folds is refused when the jump moves x by more than 1/64 of the
// state's domain, and steps turn the tangent by at most about 14°. Two
// folds so close together that the branch moves less than that between
// them (a tiny S next to a cusp) can be stepped over unseen, as with any
// continuation method. Tests check the events against dense
// natural-parameter continuation on the demo scenarios.
//
// # Hysteresis
//
// For a fold of an attracting equilibrium the state the system falls to
// is found just past the fold: the first equilibrium in the direction of
// the flow, bracketed by marching along the flow and refined by a
// safeguarded Newton iteration, with package steady searching any cell
// that could hide a close pair or a touching root. That state is
// continued back along the driver to its own fold, the return fold.
// Between the two folds lies the hysteresis window. When the return fold lies outside the driver's
// allowed values (see Allowed), the shift cannot be undone by reversing
// the driver alone (Irreversible). The return fold is sought up to four
// sweep widths behind From.
//
// # Safe limit
//
// The critical values of N draws, with draws without tipping counted as
// beyond To, give the estimated probability of having lost the tracked
// equilibrium by each driver value. The limit at risk α is its α-quantile
// (the order statistic of rank ⌈Nα⌉), with the distribution-free interval
// between two order statistics whose ranks come from the binomial
// distribution (OrderInterval; Conover 1999, §3.2). CriticalHistogram
// bins the critical values in range (Freedman–Diaconis widths) so that a
// saved result can draw their distribution without the per-draw values.
//
// # Curves
//
// At Steps driver values from From to To the engine is run on the same
// draws (common random numbers: draw i has the same θ_i at every driver
// value), giving the probability that E_k exists and attracts and the
// probability of each regime, with the engine's intervals (Wilson, or
// Clopper–Pearson at 0 and N).
//
// # Failures and numeric faults
//
// Draws that cannot be assessed, and numeric faults inside assessed
// draws (poles and undefined stretches of the rate law, as the engine
// finds them), are counted by reason with the first draw indices, over
// every engine run of the sweep: a draw counts once per driver value at
// which it fails or faults, and its index is the same at every value.
// More than 0.1% of the draws with faults at any driver value raises a
// warning (common practice, no source). Nothing is dropped silently.
//
// The sweep replaces the driver in every draw; the driver's own
// distribution only bounds the values it may take, and its rank
// correlations, if any, have no effect on the other parameters' draws.
//
// Nothing in this package prints.
package tipping
