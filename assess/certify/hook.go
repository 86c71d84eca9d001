package certify

import (
	"errors"
	"math"

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
}

// Fields decodes the hook's fields from a draw record; false when the
// record holds none.
func Fields(rec *assess.Draw) (DrawStatus, bool) {
	if len(rec.Extra) < ExLen {
		return DrawStatus{}, false
	}
	ex := rec.Extra[len(rec.Extra)-ExLen:]
	d := DrawStatus{
		Status:   Status(ex[ExStatus]),
		Roots:    int(ex[ExRoots]),
		Boxes:    int(ex[ExBoxes]),
		MaxWidth: ex[ExMaxWidth],
		SumWidth: ex[ExSumWidth],
		Flags:    Kind(ex[ExFlags]),
		Evals:    int(ex[ExEvals]),
	}
	if r := ex[ExRepelling]; r < 0 {
		d.PatternBad = true
	} else {
		d.Repelling = uint64(r)
	}
	if d.Status != 0 && d.Status != Certified && d.Status != Unresolved {
		return DrawStatus{}, false
	}
	return d, true
}

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
// fields to rec.Extra. When the draw is not certified, or the patterns
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
	fopt.QuadRelTol = 1e-6
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
	rep, err := w.ch.Certify(w.bound, w.lo, w.hi)
	if err != nil {
		return
	}
	if !rep.Agrees(rec.Pattern) {
		// Locate the disagreement (or match the unresolved intervals)
		// with the scan's positions.
		if w.finder == nil {
			w.finder, _ = steady.NewFinder(w.fopt)
		}
		if res, err := w.finder.Find(f, w.lo, w.hi); err == nil {
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

// sameSlice reports whether a and b are the same slice (same first
// element and length), so the bound evaluator can be reused.
func sameSlice(a, b []float64) bool {
	return len(a) == len(b) && (len(a) == 0 || &a[0] == &b[0])
}
