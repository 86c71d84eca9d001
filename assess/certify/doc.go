// Package certify proves, for one parameter set, that the equilibria of a
// rate law dx/dt = f(x) in a domain [lo, hi] are all found: interval
// arithmetic with outward rounding (assess/expr: Machine.Interval and
// Machine.IntervalSlope) encloses f and f' over whole sub-intervals, so an
// enclosure that excludes 0 proves that no equilibrium lies there, which a
// scan at finitely many points cannot.
//
// # Method
//
// Branch and prune over the domain (Moore, Interval Analysis, 1966; Hansen
// & Walster, Global Optimization Using Interval Analysis, 2nd ed., 2004;
// Neumaier, Interval Methods for Systems of Equations, 1990).
// Each box X = [a, b] carries enclosures F(a), F(b) of f at its ends. A box
// is
//
//   - discarded when the enclosure F(X) excludes 0, or when the bicentred
//     mean value form excludes it: with F'(X) = [d, D] and the end values,
//     f(x) ≥ max(F(a)⁻ + d(x − a), F(b)⁻ − D(b − x)) on X, whose minimum
//     is bounded below by a convex combination of the two lines in which
//     x cancels (a mean value form centred at both ends; Neumaier 1990
//     for centred forms);
//   - certified to hold exactly one root when f is continuous on X,
//     0 ∉ F'(X) (f strictly monotone, so at most one root) and F(a), F(b)
//     have strictly opposite signs (at least one root, by the intermediate
//     value theorem); the root's class follows from the sign of F'(X):
//     Stable when f' < 0 throughout, Unstable when f' > 0. A monotone box
//     whose ends have the same strict sign holds no root. A root where f
//     is exactly 0 at a domain end (an enclosure [0, 0]) is certified the
//     same way. The enclosure is then narrowed by interval Newton steps
//     N(X) = m − F(m)/F'(X), X ← X ∩ N(X), with a bisection by the sign of
//     F(m) when a step gains less than half (Moore 1966, ch. 7; Alefeld &
//     Herzberger, Introduction to Interval Computations, 1983, ch. 7);
//   - otherwise bisected, at a point near the middle where the enclosure
//     of f excludes 0 when there is one, until it is narrower than
//     Options.MinWidth, or f is within a few times its rounding error of
//     0 at both ends and at the split point (there rounding hides the
//     sign of f, and halving further would only multiply boxes). The
//     halves first try the mean value form with the parent's enclosure of
//     f', which often clears them without an evaluation.
//
// Boxes are examined depth first, in passes by scale (a box to be split
// below 1e-4, 1e-6, 1e-8 of the domain waits for the next pass, where each
// waiting box gets an equal share of the remaining Options.MaxBoxes), so
// that a hard cluster cannot spend the budget before the rest of the
// domain has been examined at the same scale. Enclosures of f come from
// Machine.Interval at points and Machine.IntervalSlope over boxes
// (assess/expr), whose rules for saturating terms k·u/(c + u) and their
// derivatives keep the usual rate laws' boxes few.
//
// CertifyNear takes approximate positions of the roots (a scan's
// equilibria): a box holding two or more of them, or of the middles
// between consecutive ones (where f has an extremum), is bisected between
// them without being evaluated, since it could be neither certified nor
// cleared. The positions only choose where to bisect, never what is
// proven.
//
// What remains is reported, adjacent boxes merged, as unresolved: a small
// interval that may hold a multiple root (f and f' both vanish there, the
// case of every non-hyperbolic equilibrium), a cluster of roots closer than
// floating point can separate, a near-touch that rounding hides, a point
// where f is undefined or discontinuous, or a root within rounding of a
// domain end. Such an interval is located but not certified; the
// equilibria the scan (assess/steady) reports inside it keep the scan's
// classification by the higher-order derivative test, marked "not
// certified".
//
// The scan and the certification are compared (Report.Disagreements): a
// certified root the scan lacks, a scan equilibrium where interval
// arithmetic proves there is none, two scan equilibria in the enclosure of
// one root, and a class that differs from the certified one.
//
// For equilibria whose linear term vanishes, CheckSides integrates the rate
// law from just above and just below the equilibrium with the adaptive
// Dormand–Prince 5(4) pair (Dormand & Prince, J. Comput. Appl. Math. 6:19,
// 1980; step-size control of Hairer, Nørsett & Wanner, Solving Ordinary
// Differential Equations I, 2nd ed., 1993, §II.4) and reports the sides
// from which it is approached, to compare with the classification.
//
// # Monte Carlo
//
// Hook makes an assess.Options.Extra hook that certifies every draw,
// guided by the positions of the draw's tracked equilibria, and writes
// its status into the draw record (see the Ex* constants for the
// layout); Summary, fed from assess.Options.Sink, counts the certified
// draws, the regime probabilities over certified draws beside those over
// all draws, and the disagreements with the draw indices, so that a draw
// can be replayed (holdfast equilibria SCENARIO --seed S --draw i). The
// scan's regimes name the attracting side of a semistable equilibrium as
// the engine does; the record's pattern lacks it, so the hook, which runs
// its own search on every draw with such an equilibrium, writes it
// (ExSides). A Summary is exact integer state: the Summaries of the shards
// of a run, or of pieces of its draw range, merge (Summary.Merge) into the
// Summary of the whole run, and MarshalJSON / UnmarshalJSON store and
// restore it between pieces.
//
// The package does no I/O and keeps no global state.
package certify
