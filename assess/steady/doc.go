// Package steady finds, classifies and characterises every equilibrium of a
// one-variable rate law dx/dt = f(x) in a closed domain [lo, hi], for one
// parameter set.
//
// # Method
//
// Scan. f, f' and f″ are taken from the rate law's truncated Taylor
// arithmetic (Func.Taylor, order 2) at the points of a uniform grid. Each
// grid cell is then tested with the two quadratic Taylor models from its
// ends, whose cubic remainder is bounded by an estimate of |f‴/6| taken
// from the disagreement of the two models (five estimates, doubled):
//
//   - exclusion: |f| stays above the remainder bound on the whole cell, so
//     the cell holds no root;
//   - monotonicity: |f'| stays above its remainder bound, so the cell holds
//     a root exactly when f changes sign across it;
//   - convexity: f″ keeps one sign, so f has at most one extremum in the
//     cell; a sign change of f' locates it.
//
// When the five estimates disagree among themselves while the cubic term
// matters, the end data do not resolve the cell (a feature narrower than
// the cell may sit between its ends); the exclusion test then gets a
// further allowance of twice the cell's variation and the cell is bisected.
// A cell that passes none of the tests is bisected too (at most
// Options.MaxDepth times); a cell at the depth limit is treated as convex.
// This is a scan of f and f' together with adaptive subdivision where f″
// changes sign, so that tangential roots and close pairs are not missed the
// way a plain sign-change scan misses them, and the grid can stay coarse
// (Options.Grid) where f is smooth. Its limit: a feature that leaves no
// trace in f, f' and f″ at the grid points (in the tests, a Gaussian bump
// narrower than about a third of a cell) can be missed.
//
// Refinement. A sign change of f is refined by a safeguarded
// Newton-type iteration inside the bracket: Schröder's step
// dx = −f f'/(f'² − f f″), which converges quadratically at simple and
// multiple roots alike (Schröder 1870; see Householder, The Numerical
// Treatment of a Single Nonlinear Equation, 1970), with a bisection step
// whenever it leaves the bracket or stalls. Where the root is clearly simple
// (|f f″| ≤ f'²/10) Halley's step dx = −2f f'/(2f'² − f f″) is taken
// instead, whose cubic error, estimated with the cell's bound on |f‴|, lets
// the iteration stop after one Taylor evaluation in the common case. The
// first iterate is the root of the quintic Hermite interpolant of the cell
// data. An extremum of f (a root
// of f') is refined the same way one derivative higher. At an extremum x_m
// the verdict is: a touching root when |f(x_m)| is within its rounding-error
// bound plus the effect of the location uncertainty of x_m; a close pair,
// bracketed on both sides, when f(x_m) has the sign opposite to the cell
// ends; otherwise no root.
//
// Classification (holdfast DESIGN.md, "Classification"). Let n be the order
// of the first derivative of f at x* that does not vanish. n odd: Stable if
// f⁽ⁿ⁾ < 0, Unstable if > 0; n even: Semistable, attracting from Above when
// f⁽ⁿ⁾ < 0 and from Below when f⁽ⁿ⁾ > 0; Degenerate when all derivatives up
// to order 7 vanish. The Taylor coefficient c_k = f⁽ᵏ⁾/k! vanishes when
//
//	|c_k| ≤ e_k + Σ_{j>k} C(j,k) |c_j| (2δ)^{j−k},
//
// where e_k is the rounding-error bound carried by the Taylor arithmetic and
// δ the location uncertainty of the root (the larger of the refinement's
// last correction and min_k ((|c_0|+e_0)/|c_k|)^{1/k}). For a verdict of
// order above 1 the effect of the unknown coefficients beyond c_7 is added,
// bounded from Taylor data at x* ± η by what c_0..c_7 do not explain (so
// x' = −x⁹ is Degenerate, not "order 7"). Each verdict is
// cross-checked against the sign of f between neighbouring equilibria (the
// phase line); a disagreement becomes a warning.
//
// Figures. The basin of an equilibrium is read off the phase line: each
// open interval between neighbouring equilibria flows up where f > 0 and
// down where f < 0. The potential barrier V(edge) − V(x*), V = −∫f dx, is
// integrated by Gauss–Legendre sums with gonum's integrate/quad nodes,
// checked against the quintic Hermite integral of the scan data and split
// adaptively when the two disagree. FromState follows the flow from a start
// and integrates the transit time ∫dx/f by quadrature after the
// substitution x = x* + (x0 − x*)e^{−s}.
//
// Points where f is NaN (outside its domain of definition) or infinite are
// reported as undefined intervals and poles, never as roots: a sign change
// that refines to a point where |f| grows instead of vanishing is a pole.
//
// The package does no I/O and keeps no global state.
package steady
