package certify

import (
	"errors"
	"math"
	"slices"

	"holdfast/assess"
	"holdfast/assess/expr"
	"holdfast/assess/steady"
)

// Fields of a draw record's Extra written by Hook. They are the last ExLen
// values of rec.Extra (the hook appends them), so that the hook can follow
// other Extra hooks: chain it last.
const (
	// ExStatus: 0 not checked (the draw failed), 1 certified, 2 unresolved.
	ExStatus = iota
	// ExRoots: the number of certified roots.
	ExRoots
	// ExRepelling: bit i set when certified root i (in ascending order)
	// is repelling (Unstable); the rest are attracting (Stable). −1 when
	// there are more than 52 roots (a float64 holds 53 bits exactly).
	ExRepelling
	// ExBoxes: the number of unresolved intervals.
	ExBoxes
	// ExMaxWidth: the widest unresolved interval (0 when certified).
	ExMaxWidth
	// ExSumWidth: the total width of the unresolved intervals.
	ExSumWidth
	// ExFlags: the Kind bits of the disagreements between scan and
	// certification (0 when they agree).
	ExFlags
	// ExEvals: the interval evaluations spent on the draw.
	ExEvals
	// ExSides: the attracting sides of the scan's semistable equilibria,
	// which rec.Pattern does not carry: bit i set when equilibrium i of
	// rec.Pattern is Semistable and attracts from Above, clear when it
	// attracts from Below (or is not Semistable). −1 when a side is not
	// known: more than 52 equilibria, or the hook's own search did not
	// reproduce rec.Pattern. Draws without a semistable equilibrium have
	// 0; the others are never certified (interval arithmetic cannot prove
	// a multiple root), so the hook runs its search on them anyway.
	ExSides
	// ExLen is the number of fields.
	ExLen
)

// DrawStatus is the certification of one draw as the hook recorded it.
type DrawStatus struct {
	Status     Status // 0 when the draw was not checked
	Roots      int
	Repelling  uint64 // bit i: certified root i is repelling
	Boxes      int
	MaxWidth   float64
	SumWidth   float64
	Flags      Kind
	Evals      int
	PatternBad bool // more than 52 certified roots: Repelling is not kept
	// Sides: bit i set when equilibrium i of rec.Pattern is semistable
	// and attracts from above (ExSides); SidesKnown is false when the
	// hook could not tell.
	Sides      uint64
	SidesKnown bool
}

// Fields decodes the hook's fields from a draw record; false when the
// record holds none, or values the hook cannot have written (a status
// other than 0, 1, 2; a count that is negative or not an integer; a
// repelling pattern that does not fit the roots; unknown flag bits; a
// negative or NaN width).
func Fields(rec *assess.Draw) (DrawStatus, bool) {
	if len(rec.Extra) < ExLen {
		return DrawStatus{}, false
	}
	ex := rec.Extra[len(rec.Extra)-ExLen:]
	for _, k := range [...]int{ExStatus, ExRoots, ExBoxes, ExFlags, ExEvals} {
		if !count(ex[k]) {
			return DrawStatus{}, false
		}
	}
	d := DrawStatus{
		Status:   Status(ex[ExStatus]),
		Roots:    int(ex[ExRoots]),
		Boxes:    int(ex[ExBoxes]),
		MaxWidth: ex[ExMaxWidth],
		SumWidth: ex[ExSumWidth],
		Flags:    Kind(ex[ExFlags]),
		Evals:    int(ex[ExEvals]),
	}
	switch r := ex[ExRepelling]; {
	case r == -1 && d.Roots > 52:
		d.PatternBad = true
	case count(r) && d.Roots <= 52 && r < float64(uint64(1)<<d.Roots):
		d.Repelling = uint64(r)
	default:
		return DrawStatus{}, false
	}
	switch sd := ex[ExSides]; {
	case sd == -1:
	case count(sd):
		d.Sides, d.SidesKnown = uint64(sd), true
	default:
		return DrawStatus{}, false
	}
	if d.Status != 0 && d.Status != Certified && d.Status != Unresolved ||
		ex[ExFlags] >= 2*float64(SidesDiffer) || !(d.MaxWidth >= 0) || !(d.SumWidth >= 0) {
		return DrawStatus{}, false
	}
	return d, true
}

// count reports whether v is a non-negative integer below 2⁵³ (held
// exactly by a float64).
func count(v float64) bool { return v >= 0 && v < 1<<53 && v == math.Trunc(v) }

// HookOptions configures Hook.
type HookOptions struct {
	// Options tunes the certification. Hook sets RootWidth to +Inf unless
	// it is given: the certifying boxes suffice to compare patterns.
	Options
	// Simulate runs the Dormand–Prince cross-check (CheckSides) on the
	// equilibria whose linear term vanishes, in draws that are not
	// certified; a contradiction sets the SidesDiffer flag.
	Simulate bool
	// Sim tunes the cross-check.
	Sim SimOptions
}

// Hook returns a function with the signature of assess.Options.Extra. Each
// worker's function certifies the draw's parameter set over the model's
// domain with its own Checker and interval evaluator, compares the result
// with the draw's pattern of classes (rec.Pattern) and appends the ExLen
// fields to rec.Extra. The positions of the draw's tracked equilibria
// (rec.Tracked) steer the bisection (CertifyNear); they are never taken
// as proven. When the draw is not certified, or the patterns
// differ, it runs its own equilibrium search (steady.Find, with the
// engine's settings, which finds the same equilibria) to locate the
// disagreement and, with Simulate, to run the side cross-check. The
// result depends only on the draw.
func Hook(m *assess.Model, opt HookOptions) (func() func(f *assess.Func, rec *assess.Draw), error) {
	if m == nil {
		return nil, errors.New("certify: nil model")
	}
	if opt.RootWidth == 0 {
		opt.RootWidth = math.Inf(1)
	}
	o, err := opt.Options.withDefaults()
	if err != nil {
		return nil, err
	}
	opt.Options = o
	if opt.Sim, err = opt.Sim.withDefaults(); err != nil {
		return nil, err
	}
	fopt := steady.DefaultOptions()
	// As the engine's workers (assess/run.go): the equilibria do not
	// depend on the quadrature settings.
	fopt.QuadRelTol = 1e-5
	fopt.ThresholdBarriersOnly = true
	if _, err := steady.NewFinder(fopt); err != nil {
		return nil, err
	}
	return func() func(*assess.Func, *assess.Draw) {
		ch, _ := NewChecker(opt.Options)
		w := &hookWorker{
			opt:  opt,
			fopt: fopt,
			ch:   ch,
			mach: m.Program.NewMachine(),
			lo:   m.Domain[0],
			hi:   m.Domain[1],
		}
		return w.run
	}, nil
}

type hookWorker struct {
	opt    HookOptions
	fopt   steady.Options
	ch     *Checker
	mach   *expr.Machine
	bound  Func
	theta  []float64
	finder *steady.Finder
	near   []float64
	lo, hi float64
}

func (w *hookWorker) run(f *assess.Func, rec *assess.Draw) {
	if rec == nil {
		return
	}
	var ex [ExLen]float64
	defer func() { rec.Extra = append(rec.Extra, ex[:]...) }()
	if rec.Failed != "" {
		return
	}
	if w.bound == nil || !sameSlice(w.theta, f.Theta) {
		w.theta = f.Theta
		w.bound = Bind(w.mach, f.Theta)
	}
	// The tracked equilibria's positions steer the bisection (they are
	// the scan's; rec.Pattern has no positions).
	w.near = w.near[:0]
	for _, t := range rec.Tracked {
		if t.Exists {
			w.near = append(w.near, t.X)
		}
	}
	rep, err := w.ch.CertifyNear(w.bound, w.lo, w.hi, w.near)
	if err != nil {
		return
	}
	ex[ExSides] = sideBits(rec.Pattern, nil, false)
	if !rep.Agrees(rec.Pattern) {
		// Locate the disagreement (or match the unresolved intervals)
		// with the scan's positions.
		if w.finder == nil {
			w.finder, _ = steady.NewFinder(w.fopt)
		}
		if res, err := w.finder.Find(f, w.lo, w.hi); err == nil {
			ex[ExSides] = sideBits(rec.Pattern, res.Equilibria, true)
			w.ch.Compare(res.Equilibria)
			if w.opt.Simulate && rep.Status == Unresolved {
				for k := range res.Equilibria {
					e := &res.Equilibria[k]
					if e.Order < 2 || e.Class == steady.Degenerate {
						continue
					}
					if sd := CheckSides(f, res.Equilibria, k, w.lo, w.hi, w.opt.Sim); sd.Checked() && !sd.Agree {
						rep.Disagreements = append(rep.Disagreements, Disagreement{Kind: SidesDiffer, X: e.X, Scan: k, Root: -1})
					}
				}
			}
		}
	}
	ex[ExStatus] = float64(rep.Status)
	ex[ExRoots] = float64(len(rep.Roots))
	if len(rep.Roots) <= 52 {
		var bits uint64
		for i, r := range rep.Roots {
			if r.Class == steady.Unstable {
				bits |= 1 << i
			}
		}
		ex[ExRepelling] = float64(bits)
	} else {
		ex[ExRepelling] = -1
	}
	ex[ExBoxes] = float64(len(rep.Unresolved))
	ex[ExMaxWidth], ex[ExSumWidth] = rep.UnresolvedWidth()
	var flags Kind
	for _, d := range rep.Disagreements {
		flags |= d.Kind
	}
	ex[ExFlags] = float64(flags)
	ex[ExEvals] = float64(rep.Evals)
}

// sideBits returns the ExSides field for the scan pattern p, given the
// hook's own search eqs when have is set: 0 when p holds no semistable
// equilibrium, −1 when a side is not known.
func sideBits(p []steady.Class, eqs []steady.Equilibrium, have bool) float64 {
	if !slices.Contains(p, steady.Semistable) {
		return 0
	}
	if !have || len(eqs) != len(p) || len(p) > 52 {
		return -1
	}
	var bits uint64
	for i, e := range eqs {
		if e.Class != p[i] {
			return -1
		}
		if e.Class != steady.Semistable {
			continue
		}
		switch e.AttractsFrom {
		case steady.Above:
			bits |= 1 << i
		case steady.Below:
		default:
			return -1
		}
	}
	return float64(bits)
}

// sameSlice reports whether a and b are the same slice (same first
// element and length), so the bound evaluator can be reused.
func sameSlice(a, b []float64) bool {
	return len(a) == len(b) && (len(a) == 0 || &a[0] == &b[0])
}
