package certify

import (
	"cmp"
	"errors"
	"fmt"
	"math"
	"slices"

	"holdfast/assess/expr"
	"holdfast/assess/steady"
)

// Func is a rate law with its parameters bound, evaluated in interval
// arithmetic. Bind makes one from a compiled rate law.
type Func interface {
	// Interval returns an enclosure of f over X: every real value f takes
	// at a point of X where it is defined lies in it (empty when f is
	// defined nowhere on X).
	Interval(x expr.Interval) expr.Interval
	// IntervalSlope returns enclosures of f and f' over X and whether f
	// is defined and continuous on all of X.
	IntervalSlope(x expr.Interval) (f, df expr.Interval, cont bool)
}

// Bind returns the rate law of m with the parameters theta (kept, not
// copied) as a Func.
func Bind(m *expr.Machine, theta []float64) Func { return &bound{m: m, theta: theta} }

type bound struct {
	m     *expr.Machine
	theta []float64
}

func (b *bound) Interval(x expr.Interval) expr.Interval { return b.m.Interval(x, b.theta) }
func (b *bound) IntervalSlope(x expr.Interval) (expr.Interval, expr.Interval, bool) {
	return b.m.IntervalSlope(x, b.theta)
}

// Status is the outcome of certifying one parameter set.
type Status int

const (
	// Certified: every root in the domain is enclosed in a box that holds
	// exactly one, and the rest of the domain is proven root-free.
	Certified Status = iota + 1
	// Unresolved: some small intervals could be neither cleared nor
	// certified (Report.Unresolved).
	Unresolved
)

// String returns "certified" or "unresolved".
func (s Status) String() string {
	switch s {
	case Certified:
		return "certified"
	case Unresolved:
		return "unresolved"
	}
	return fmt.Sprintf("Status(%d)", int(s))
}

// Root is a certified equilibrium: f has exactly one root in [Lo, Hi].
type Root struct {
	Lo, Hi float64
	// Class is Stable when f' < 0 on the enclosure, Unstable when f' > 0.
	Class steady.Class
	// Scan is the index of the scan equilibrium matched to this root, or
	// −1 (set by Compare).
	Scan int
}

// Why says why an interval is unresolved (a bit set).
type Why uint8

const (
	// Multiple: f and f' both hold 0 on the interval (a multiple root, a
	// cluster, or a near-touch hidden by rounding).
	Multiple Why = 1 << iota
	// Singular: f is undefined or not continuous on part of the interval.
	Singular
	// Edge: a root may lie at the domain end, within rounding.
	Edge
	// Budget: Options.MaxBoxes ran out before the interval was resolved.
	Budget
)

// String lists the reasons, e.g. "multiple root or cluster".
func (w Why) String() string {
	var s []string
	if w&Multiple != 0 {
		s = append(s, "multiple root or cluster")
	}
	if w&Singular != 0 {
		s = append(s, "undefined or discontinuous")
	}
	if w&Edge != 0 {
		s = append(s, "at a domain end")
	}
	if w&Budget != 0 {
		s = append(s, "box budget exhausted")
	}
	if len(s) == 0 {
		return "unresolved"
	}
	out := s[0]
	for _, t := range s[1:] {
		out += ", " + t
	}
	return out
}

// Box is an unresolved interval [Lo, Hi]. Any root of f in the domain
// outside the certified enclosures lies in one of these.
type Box struct {
	Lo, Hi float64
	Why    Why
	// ScanLo, ScanHi: the scan equilibria found[ScanLo:ScanHi] lie in the
	// box (set by Compare); their classification is the scan's, not
	// certified.
	ScanLo, ScanHi int
}

// Width returns Hi − Lo.
func (b Box) Width() float64 { return b.Hi - b.Lo }

// Kind is the kind of a disagreement between scan and certification.
type Kind uint8

const (
	// MissedByScan: a certified root with no scan equilibrium in it.
	MissedByScan Kind = 1 << iota
	// NotARoot: a scan equilibrium where f is proven not to vanish.
	NotARoot
	// ClassDiffers: the scan's class differs from the certified one.
	ClassDiffers
	// Duplicate: several scan equilibria in the enclosure of one root.
	Duplicate
	// SidesDiffer: the simulation cross-check (CheckSides) contradicts the
	// classification.
	SidesDiffer
)

// String names the kind.
func (k Kind) String() string {
	switch k {
	case MissedByScan:
		return "root missed by the scan"
	case NotARoot:
		return "scan equilibrium where none can be"
	case ClassDiffers:
		return "class differs from the certified one"
	case Duplicate:
		return "one root reported twice by the scan"
	case SidesDiffer:
		return "simulation contradicts the classification"
	}
	return fmt.Sprintf("Kind(%d)", int(k))
}

// Disagreement is one difference between the scan and the certification.
type Disagreement struct {
	Kind Kind
	X    float64 // where: the scan equilibrium, or the root's enclosure middle
	Scan int     // index into the scan equilibria, or −1
	Root int     // index into Report.Roots, or −1
}

// Report is the certification of one parameter set. A Report returned by
// a Checker is owned by it and overwritten by its next call.
type Report struct {
	Status Status
	// Lo, Hi is the domain.
	Lo, Hi float64
	// Roots are the certified equilibria, sorted.
	Roots []Root
	// Unresolved are the intervals left, sorted and merged.
	Unresolved []Box
	// Disagreements with the scan (filled by Compare).
	Disagreements []Disagreement
	// Boxes counts the boxes examined, Evals the interval evaluations.
	Boxes, Evals int
}

// UnresolvedWidth returns the widest unresolved interval and their total
// width (0, 0 when certified).
func (r *Report) UnresolvedWidth() (widest, total float64) {
	for _, b := range r.Unresolved {
		widest = math.Max(widest, b.Width())
		total += b.Width()
	}
	return widest, total
}

// Options tunes the certification. The zero value selects the defaults.
type Options struct {
	// MinWidth is the width below which a box is not bisected further,
	// as a fraction of the domain width (default 1e-10).
	MinWidth float64
	// RootWidth is the width to which certified enclosures are narrowed
	// by interval Newton steps, as a fraction of the domain width
	// (default 1e-10); +Inf skips the narrowing (the certifying box is
	// then the enclosure).
	RootWidth float64
	// MaxBoxes caps the boxes examined per call (default 20000); boxes
	// left when it runs out are reported unresolved.
	MaxBoxes int
	// MatchTol is the distance, as a fraction of the domain width, within
	// which a scan equilibrium counts as lying in an enclosure or an
	// unresolved interval (default 1e-9; the larger of this and 4·XErr is
	// used).
	MatchTol float64
}

func (o Options) withDefaults() (Options, error) {
	switch {
	case o.MinWidth == 0:
		o.MinWidth = 1e-10
	case !(o.MinWidth > 0 && o.MinWidth < 1):
		return o, fmt.Errorf("certify: MinWidth %g out of range (0, 1)", o.MinWidth)
	}
	switch {
	case o.RootWidth == 0:
		o.RootWidth = 1e-10
	case !(o.RootWidth > 0):
		return o, fmt.Errorf("certify: RootWidth %g must be positive", o.RootWidth)
	}
	switch {
	case o.MaxBoxes == 0:
		o.MaxBoxes = 20000
	case o.MaxBoxes < 1:
		return o, fmt.Errorf("certify: MaxBoxes %d must be positive", o.MaxBoxes)
	}
	switch {
	case o.MatchTol == 0:
		o.MatchTol = 1e-9
	case !(o.MatchTol > 0 && o.MatchTol < 1):
		return o, fmt.Errorf("certify: MatchTol %g out of range (0, 1)", o.MatchTol)
	}
	return o, nil
}

// ErrDomain reports an invalid domain.
var ErrDomain = errors.New("certify: invalid domain")

// Checker certifies parameter sets with reusable scratch space, so that a
// Monte Carlo worker allocates little per draw. It is not safe for
// concurrent use.
type Checker struct {
	opt      Options
	f        Func
	lo       float64
	hi       float64
	width    float64
	stack    []box
	deferred []box // boxes waiting for the next pass
	tops     []box // the boxes of the current pass
	deferW   float64
	near     []float64 // approximate roots (CertifyNear), sorted
	nearMin  float64   // narrowest box split between them
	rep      Report
}

// box is a sub-interval with enclosures of f at its ends and, when pd is
// set, an enclosure d of f' on it inherited from its parent (f continuous
// on the parent).
type box struct {
	lo, hi   float64
	flo, fhi expr.Interval
	d        expr.Interval
	pd       bool
}

// NewChecker validates opt and returns a Checker.
func NewChecker(opt Options) (*Checker, error) {
	o, err := opt.withDefaults()
	if err != nil {
		return nil, err
	}
	return &Checker{opt: o}, nil
}

// Check certifies the equilibria of f in [lo, hi] and compares them with
// the scan's equilibria found (sorted by X, as steady.Find returns them).
// It is NewChecker, Certify and Compare in one; use a Checker to certify
// without a scan or to reuse scratch space.
func Check(f Func, lo, hi float64, found []steady.Equilibrium, opt Options) (*Report, error) {
	c, err := NewChecker(opt)
	if err != nil {
		return nil, err
	}
	if _, err := c.Certify(f, lo, hi); err != nil {
		return nil, err
	}
	return c.Compare(found), nil
}

// Certify runs the branch and prune over [lo, hi] (see the package
// documentation) and returns the report, owned by c. The error is non-nil
// only for an invalid domain.
func (c *Checker) Certify(f Func, lo, hi float64) (*Report, error) {
	return c.CertifyNear(f, lo, hi, nil)
}

// CertifyNear is Certify guided by approximate positions of the roots,
// such as a scan's equilibria (any order; values outside [lo, hi] or not
// finite are ignored). With the middles between consecutive positions,
// where f has an extremum, they mark the places that must end up in
// different boxes: a box at least 10⁻³ of the domain wide that holds two
// or more of them (ends included; at least a quarter of that apart) is
// bisected without being evaluated, at the middle of the gap between two
// of them nearest its own middle, so that each root comes to lie in a box
// reaching about a quarter of the way to its neighbours, the extrema in
// boxes between; the rest is unchanged. The positions only steer the
// bisection: the report is proven whatever they are, and wrong or missing
// positions cost only evaluations.
func (c *Checker) CertifyNear(f Func, lo, hi float64, near []float64) (*Report, error) {
	if !(lo < hi) || math.IsInf(lo, 0) || math.IsInf(hi, 0) || math.IsInf(hi-lo, 0) {
		return nil, fmt.Errorf("%w: [%g, %g] (need finite lo < hi)", ErrDomain, lo, hi)
	}
	c.f, c.lo, c.hi, c.width = f, lo, hi, hi-lo
	c.near = c.near[:0]
	for _, x := range near {
		if x >= lo && x <= hi {
			c.near = append(c.near, x)
		}
	}
	slices.Sort(c.near)
	// Between two consecutive roots f has an extremum, where a box can be
	// cleared but not certified, and next to which a box holding a root
	// cannot be proven monotone: its middle is a third kind of place to
	// keep boxes apart (an estimate; common practice, no source).
	for i, n := 1, len(c.near); i < n; i++ {
		c.near = append(c.near, c.near[i-1]+(c.near[i]-c.near[i-1])/2)
	}
	slices.Sort(c.near)
	// Positions closer than this are left to the regular bisection,
	// which handles clusters (common practice, no source).
	c.nearMin = 1e-3 * c.width
	r := &c.rep
	*r = Report{Lo: lo, Hi: hi, Roots: r.Roots[:0], Unresolved: r.Unresolved[:0], Disagreements: r.Disagreements[:0]}
	// Passes by scale: a box that needs splitting below the pass's width
	// waits for the next pass, and within a pass each box left by the
	// previous one gets an equal share of the remaining budget, so that a
	// hard cluster cannot spend the budget before the rest of the domain
	// is examined at the same scale.
	c.deferred = append(c.deferred[:0], box{lo: lo, hi: hi, flo: c.point(lo), fhi: c.point(hi)})
	passes := [...]float64{1e-4, 1e-6, 1e-8, 0} // fractions of the domain (common practice, no source)
	for i, w := range passes {
		c.deferW = w * c.width
		last := i == len(passes)-1
		// Swap the (distinct) backing arrays: this pass works through the
		// boxes deferred so far and defers into the other array.
		c.tops, c.deferred = c.deferred, c.tops[:0]
		share := max(64, (c.opt.MaxBoxes-r.Boxes)/max(1, len(c.tops)))
		for _, b := range c.tops {
			c.stack = append(c.stack[:0], b)
			c.run(share, last)
		}
	}
	slices.SortFunc(r.Roots, func(a, b Root) int { return cmp.Compare(a.Lo, b.Lo) })
	c.mergeUnresolved()
	r.Status = Certified
	if len(r.Unresolved) > 0 {
		r.Status = Unresolved
	}
	return r, nil
}

// run processes the stack depth first, left half first, for at most
// limit boxes; what is left waits for the next pass, or in the last pass
// (and once MaxBoxes is spent) is reported unresolved.
func (c *Checker) run(limit int, last bool) {
	r := &c.rep
	minW := c.opt.MinWidth * c.width
	for n := 0; len(c.stack) > 0; n++ {
		b := c.stack[len(c.stack)-1]
		c.stack = c.stack[:len(c.stack)-1]
		switch {
		case r.Boxes >= c.opt.MaxBoxes || (n >= limit && last):
			c.unresolved(b.lo, b.hi, Budget)
		case n >= limit:
			c.deferred = append(c.deferred, b)
		default:
			c.process(b, minW)
		}
	}
}

func (c *Checker) point(x float64) expr.Interval {
	c.rep.Evals++
	return c.f.Interval(expr.Point(x))
}

// sign is +1 or −1 when the enclosure excludes 0, 0 when it holds 0 or is
// empty.
func sign(iv expr.Interval) int {
	switch {
	case iv.Lo > 0:
		return 1
	case iv.Hi < 0:
		return -1
	}
	return 0
}

func isZero(iv expr.Interval) bool { return iv.Lo == 0 && iv.Hi == 0 }

// nearZero reports whether the enclosure holds 0 or lies within four of
// its widths of 0.
func nearZero(iv expr.Interval) bool {
	return iv.Contains(0) || math.Min(math.Abs(iv.Lo), math.Abs(iv.Hi)) <= 4*(iv.Hi-iv.Lo)
}

func finite(iv expr.Interval) bool {
	return !math.IsInf(iv.Lo, 0) && !math.IsInf(iv.Hi, 0) && !iv.IsEmpty()
}

// process examines one box: discard, certify, or bisect.
func (c *Checker) process(b box, minW float64) {
	r := &c.rep
	r.Boxes++
	if m, ok := c.nearSplit(b); ok {
		if fm := c.point(m); sign(fm) != 0 {
			c.stack = append(c.stack,
				box{lo: m, hi: b.hi, flo: fm, fhi: b.fhi},
				box{lo: b.lo, hi: m, flo: b.flo, fhi: fm})
			return
		}
	}
	// The parent's enclosure of f' holds on b too, and b's end values are
	// closer together: the mean value form may already clear b.
	if b.pd && finite(b.flo) && finite(b.fhi) && c.cleared(b, b.d) {
		return
	}
	r.Evals++
	x := expr.Interval{Lo: b.lo, Hi: b.hi}
	f, df, cont := c.f.IntervalSlope(x)
	if f.IsEmpty() {
		// Undefined on the whole box. The ends must agree (a guard against
		// an enclosure that came out empty for any other reason).
		if b.flo.IsEmpty() && b.fhi.IsEmpty() {
			return
		}
	} else if !f.Contains(0) {
		return
	}
	monotone := cont && !df.IsEmpty() && !df.Contains(0)
	if cont && finite(df) && finite(b.flo) && finite(b.fhi) && c.cleared(b, df) {
		return
	}
	if monotone {
		sa, sb := sign(b.flo), sign(b.fhi)
		switch {
		case sa != 0 && sa == sb:
			return // strictly monotone with the same sign at both ends
		case sa != 0 && sb == -sa:
			c.root(b, df)
			return
		case sb != 0 && isZero(b.flo) && b.lo == c.lo && sb == sign(df):
			c.pointRoot(b.lo, df) // f(lo) = 0 exactly at the domain end
			return
		case sa != 0 && isZero(b.fhi) && b.hi == c.hi && sa == -sign(df):
			c.pointRoot(b.hi, df)
			return
		}
	}
	if b.hi-b.lo > minW {
		if b.hi-b.lo < c.deferW {
			c.deferred = append(c.deferred, b)
			return
		}
		m, fm, ok := c.split(b)
		// When f is within a few times its rounding error of 0 at both
		// ends and at the split point, the box lies where rounding hides
		// the sign of f (around a multiple root or a cluster, or on a
		// stretch where f ≡ 0): halving it further would only multiply
		// such boxes. (Where to stop never affects what is proven.)
		floor := nearZero(fm) && nearZero(b.flo) && nearZero(b.fhi)
		if ok && !floor {
			// Right first, so that the left half is processed first and
			// the results come out in ascending order.
			pd := cont && finite(df)
			c.stack = append(c.stack,
				box{lo: m, hi: b.hi, flo: fm, fhi: b.fhi, d: df, pd: pd},
				box{lo: b.lo, hi: m, flo: b.flo, fhi: fm, d: df, pd: pd})
			return
		}
	}
	why := Multiple
	if !cont || f.IsEmpty() {
		why = Singular
	}
	if (b.lo == c.lo && sign(b.flo) == 0) || (b.hi == c.hi && sign(b.fhi) == 0) {
		why |= Edge
	}
	c.unresolved(b.lo, b.hi, why)
}

// split chooses a bisection point near the middle of b where the
// enclosure of f excludes 0 (so that no root sits on a box end), trying a
// few points around the middle; the first point tried when none
// qualifies. It reports false when b is too narrow to split in floating
// point.
func (c *Checker) split(b box) (float64, expr.Interval, bool) {
	w := b.hi - b.lo
	mid := b.lo + w/2
	var firstM float64
	var firstF expr.Interval
	have := false
	for _, off := range [...]float64{0, 1.0 / 16, -1.0 / 16, 3.0 / 16, -3.0 / 16} {
		m := mid + off*w
		if !(m > b.lo && m < b.hi) {
			continue
		}
		fm := c.point(m)
		if sign(fm) != 0 {
			return m, fm, true
		}
		if !have {
			firstM, firstF, have = m, fm, true
		}
	}
	return firstM, firstF, have
}

// nearSplit returns, for a box that holds two or more of the approximate
// roots c.near (ends included), the middle of the gap between two
// consecutive ones nearest the box's middle.
func (c *Checker) nearSplit(b box) (float64, bool) {
	if len(c.near) < 2 || b.hi-b.lo < c.nearMin {
		return 0, false
	}
	i, _ := slices.BinarySearch(c.near, b.lo)
	mid := b.lo + (b.hi-b.lo)/2
	best, bd := 0.0, math.Inf(1)
	for k := i + 1; k < len(c.near) && c.near[k] <= b.hi; k++ {
		m := c.near[k-1] + (c.near[k]-c.near[k-1])/2
		if d := math.Abs(m - mid); d < bd && m > b.lo && m < b.hi && c.near[k]-c.near[k-1] >= c.nearMin/4 {
			best, bd = m, d
		}
	}
	return best, bd < math.Inf(1)
}

// cleared reports whether the bicentred mean value form proves f ≠ 0 on
// the box: f > 0 when a lower bound of f on the box is positive, f < 0
// when one of −f is.
func (c *Checker) cleared(b box, df expr.Interval) bool {
	// f > 0 on the box needs f > 0 at both ends, f < 0 likewise.
	switch w := up(b.hi - b.lo); {
	case b.flo.Lo > 0 && b.fhi.Lo > 0:
		return lowerBound(b.flo.Lo, b.fhi.Lo, df, w) > 0
	case b.flo.Hi < 0 && b.fhi.Hi < 0:
		return lowerBound(-b.flo.Hi, -b.fhi.Hi, df.Neg(), w) > 0
	}
	return false
}

// lowerBound returns a lower bound of a function g on [a, a + w] given
// g(a) ≥ a1, g(a+w) ≥ a2 and g' ∈ d (finite): g(a+t) ≥ a1 + d.Lo·t and
// g(a+t) ≥ a2 − d.Hi·(w − t), so for λ ∈ [0, 1], μ = 1 − λ,
// g ≥ λ(a1 + d.Lo·t) + μ(a2 − d.Hi·(w − t)) = λa1 + μ(a2 − d.Hi·w) + c·t
// with c = λd.Lo + μd.Hi, and c·t ≥ min(0, c)·w on [0, w] (w may exceed
// the true width). λ = d.Hi/(d.Hi − d.Lo) makes c vanish; any λ gives a
// valid bound as long as λ + μ = 1 exactly, which the choice below
// ensures (Sterbenz: 1 − y is exact for y in [1/2, 1]). Every operation is
// rounded downward (dn: one float below the round-to-nearest result).
func lowerBound(a1, a2 float64, d expr.Interval, w float64) float64 {
	switch {
	case d.Lo >= 0:
		return a1
	case d.Hi <= 0:
		return a2
	}
	lam := d.Hi / (d.Hi - d.Lo)
	lam = math.Min(math.Max(lam, 0), 1)
	mu := 1 - lam
	if lam < 0.5 {
		lam = 1 - mu // mu ≥ 1/2: exact
	}
	inner := dn(a2 - up(d.Hi*w)) // ≤ a2 − d.Hi·w
	v := dn(dn(lam*a1) + dn(mu*inner))
	if c := dn(dn(lam*d.Lo) + dn(mu*d.Hi)); c < 0 {
		v = dn(v + dn(c*w))
	}
	return v
}

// dn and up bound the exact result of the one operation that produced x
// (see expr.NextDown).
func dn(x float64) float64 { return expr.NextDown(x) }

func up(x float64) float64 { return expr.NextUp(x) }

// root records the root certified in b (f strictly monotone, opposite
// signs at the ends) and narrows its enclosure.
func (c *Checker) root(b box, df expr.Interval) {
	s := sign(df)
	x := expr.Interval{Lo: b.lo, Hi: b.hi}
	tol := c.opt.RootWidth * c.width
	for iter := 0; iter < 100 && x.Hi-x.Lo > tol; iter++ {
		_, d, _ := c.f.IntervalSlope(x)
		c.rep.Evals++
		m := x.Mid()
		fm := c.point(m)
		y := x
		if d.Contains(0) || d.IsEmpty() {
			d = df // the enclosure on the larger box stays valid
		}
		if n := expr.Point(m).Sub(fm.Div(d)); !n.IsEmpty() {
			y = x.Intersect(n)
		}
		if y.IsEmpty() {
			break // cannot happen with valid enclosures: keep x
		}
		if y.Hi-y.Lo > (x.Hi-x.Lo)/2 {
			// Slow progress: halve by the sign of f(m); f < 0 left of
			// the root when f increases.
			switch sign(fm) * s {
			case 1:
				y.Hi = math.Min(y.Hi, m)
			case -1:
				y.Lo = math.Max(y.Lo, m)
			}
		}
		if y == x {
			break
		}
		x = y
	}
	c.rep.Roots = append(c.rep.Roots, Root{Lo: x.Lo, Hi: x.Hi, Class: classOf(s), Scan: -1})
}

// pointRoot records a root where f is exactly 0 at a domain end.
func (c *Checker) pointRoot(x float64, df expr.Interval) {
	c.rep.Roots = append(c.rep.Roots, Root{Lo: x, Hi: x, Class: classOf(sign(df)), Scan: -1})
}

func classOf(slopeSign int) steady.Class {
	if slopeSign > 0 {
		return steady.Unstable
	}
	return steady.Stable
}

// unresolved records [lo, hi], merging it with the previous interval when
// they touch (boxes mostly come in ascending order; mergeUnresolved
// finishes the job).
func (c *Checker) unresolved(lo, hi float64, why Why) {
	u := c.rep.Unresolved
	if n := len(u); n > 0 && u[n-1].Hi == lo {
		u[n-1].Hi = hi
		u[n-1].Why |= why
		return
	}
	c.rep.Unresolved = append(u, Box{Lo: lo, Hi: hi, Why: why})
}

// mergeUnresolved sorts the unresolved intervals and merges those that
// touch or overlap.
func (c *Checker) mergeUnresolved() {
	u := c.rep.Unresolved
	slices.SortFunc(u, func(a, b Box) int { return cmp.Compare(a.Lo, b.Lo) })
	out := u[:0]
	for _, b := range u {
		if n := len(out); n > 0 && out[n-1].Hi >= b.Lo {
			out[n-1].Hi = math.Max(out[n-1].Hi, b.Hi)
			out[n-1].Why |= b.Why
			continue
		}
		out = append(out, b)
	}
	c.rep.Unresolved = out
}
