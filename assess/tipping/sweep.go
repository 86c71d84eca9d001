package tipping

import (
	"context"
	"fmt"
	"math"
	"strings"

	"holdfast/assess"
	"holdfast/assess/steady"
	"holdfast/sample"
)

// Limits on a sweep.
const (
	// MaxDraws bounds Options.Draws: the sweep keeps every draw's critical
	// value (about 40 bytes a draw) for exact order statistics.
	MaxDraws = 2_000_000
	// MaxSteps bounds Options.Steps.
	MaxSteps = 1001
)

// Options describe a driver sweep.
type Options struct {
	// Driver names the parameter that is swept. The sweep replaces its
	// value in every draw; the other parameters keep their draws.
	Driver string
	// From and To are the ends of the sweep. The tracked equilibrium is
	// followed from From toward To; To may be below From (a sweep down).
	From, To float64
	// Track is the label (E1, E2, …) of the equilibrium at nominal values
	// (the driver at its nominal value) whose tipping is sought.
	Track string
	// Steps is the number of driver values, From to To inclusive, at which
	// the probability curves are estimated (0: no curves; else at least 2).
	Steps int
	// Risk is α in (0, 1): the safe limit is the α-quantile of the
	// critical values along the sweep.
	Risk float64
	// Draws, Seed, Plan and Workers are as for assess.Run.
	Draws   int
	Seed    uint64
	Plan    sample.PlanKind
	Workers int
	// Progress, when set, is called from one goroutine with the draws
	// done and planned over all the engine runs of the sweep.
	Progress func(done, planned int)
}

// OptionError reports an option that cannot be used with the scenario.
type OptionError struct {
	Option string // "driver", "from", "to", "track", "steps", "risk", "draws"
	Msg    string
}

func (e *OptionError) Error() string { return e.Option + ": " + e.Msg }

func optErr(opt, format string, a ...any) error {
	return &OptionError{Option: opt, Msg: fmt.Sprintf(format, a...)}
}

// Allowed returns the values the named driver may take in a sweep: the
// closed support of its distribution when it is uncertain (so a sweep
// stays among the values the scenario deems possible; a truncated
// distribution's bounds are its support), any finite value when it is
// fixed. The same range decides whether a return fold is reachable
// (Irreversible). It returns false for a name that is not a parameter.
func Allowed(m *assess.Model, driver string) (lo, hi float64, ok bool) {
	j := m.Scenario.ParamIndex(driver)
	if j < 0 {
		return 0, 0, false
	}
	p := m.Scenario.Params[j]
	if p.Fixed || p.Dist == nil {
		return math.Inf(-1), math.Inf(1), true
	}
	lo, hi = p.Dist.Support()
	return lo, hi, true
}

// sweep is one validated sweep.
type sweep struct {
	m        *assess.Model
	opt      Options
	j        int // driver slot
	k        int // tracked index
	allowed  [2]float64
	finder   steady.Options
	nominal  *assess.Snapshot
	tips     []Tip
	failures map[string]*assess.Counted
	// Faults, warnings and run counts of the engine runs (see engineRun).
	faults              map[string]*assess.Counted
	faulted             int64
	warnings            []string
	runs, faultRuns     int     // engine runs, and those with faults in > 0.1% of draws
	worstShare, worstAt float64 // the largest share of faulted draws, and its driver value
	worstFaulted        int64
}

// check validates the options against the model.
func check(m *assess.Model, opt Options) (*sweep, error) {
	if opt.Draws < 1 || opt.Draws > MaxDraws {
		return nil, optErr("draws", "must be between 1 and %d, got %d", MaxDraws, opt.Draws)
	}
	if !(opt.Risk > 0 && opt.Risk < 1) {
		return nil, optErr("risk", "must be in (0, 1), got %v", opt.Risk)
	}
	if opt.Steps != 0 && (opt.Steps < 2 || opt.Steps > MaxSteps) {
		return nil, optErr("steps", "must be 0 (no curves) or between 2 and %d, got %d", MaxSteps, opt.Steps)
	}
	j := m.Scenario.ParamIndex(opt.Driver)
	if j < 0 {
		return nil, optErr("driver", "%q is not a parameter of the scenario (parameters: %s)", opt.Driver, strings.Join(m.Names, ", "))
	}
	if !m.Program.Uses(j) {
		return nil, optErr("driver", "parameter %s does not appear in the rate law; sweeping it changes nothing", opt.Driver)
	}
	for _, e := range []struct {
		name string
		v    float64
	}{{"from", opt.From}, {"to", opt.To}} {
		if math.IsNaN(e.v) || math.IsInf(e.v, 0) {
			return nil, optErr(e.name, "must be a finite number, got %v", e.v)
		}
	}
	if opt.From == opt.To {
		return nil, optErr("to", "the range is empty: from and to are both %v", opt.From)
	}
	lo, hi, _ := Allowed(m, opt.Driver)
	for _, e := range []struct {
		name string
		v    float64
	}{{"from", opt.From}, {"to", opt.To}} {
		if e.v < lo || e.v > hi {
			return nil, optErr(e.name, "%v is outside the values %s may take, [%v, %v] (the support of its distribution; fix it with --set to sweep any value)",
				e.v, opt.Driver, lo, hi)
		}
	}
	nominal, err := m.Analyze(m.Nominal)
	if err != nil {
		return nil, err
	}
	k := -1
	var labels []string
	for i, e := range nominal.Equilibria {
		labels = append(labels, e.Label)
		if strings.EqualFold(e.Label, strings.TrimSpace(opt.Track)) {
			k = i
		}
	}
	if k < 0 {
		if len(labels) == 0 {
			return nil, optErr("track", "there is no equilibrium at nominal values to track")
		}
		return nil, optErr("track", "%q is not an equilibrium at nominal values (there are %s)", opt.Track, strings.Join(labels, ", "))
	}
	fopt := steady.DefaultOptions()
	fopt.NoBarriers = true
	if _, err := steady.NewFinder(fopt); err != nil {
		return nil, err
	}
	return &sweep{
		m: m, opt: opt, j: j, k: k, allowed: [2]float64{lo, hi},
		finder: fopt, nominal: nominal,
		failures: map[string]*assess.Counted{},
		faults:   map[string]*assess.Counted{},
	}, nil
}

// drawer computes the critical values of one worker's draws.
type drawer struct {
	sw *sweep
	l  *law
	tr tracer
	fz *steady.Finder
}

func (sw *sweep) newDrawer() *drawer {
	m := sw.m
	l := newLaw(m.Program, sw.j, sw.opt.From, sw.opt.To-sw.opt.From)
	fz, _ := steady.NewFinder(sw.finder) // validated in check
	lo, hi := m.Domain[0], m.Domain[1]
	return &drawer{sw: sw, l: l, fz: fz, tr: tracer{l: l, lo: lo, hi: hi, w: hi - lo}}
}

// Fields of a draw record's Extra.
const (
	exKind = iota
	exT
	exX
	exReturn
	exTReturn
	exReason
	exAttracting
	exLen
)

// run is the engine's Extra hook: f is bound to the draw's parameters
// (the driver at From) and rec holds the tracked equilibria.
func (p *drawer) run(f *assess.Func, rec *assess.Draw) {
	nan := math.NaN()
	attracting := 0.0
	put := func(k Kind, t, x float64, r Return, tr float64, why reason) {
		rec.Extra = append(rec.Extra[:0], float64(k), t, x, float64(r), tr, float64(why), attracting)
	}
	if rec.Failed != "" || p.sw.k >= len(rec.Tracked) {
		put(Failed, nan, nan, NotApplicable, nan, reasonEngine)
		return
	}
	td := rec.Tracked[p.sw.k]
	if !td.Exists {
		put(Absent, nan, nan, NotApplicable, nan, noReason)
		return
	}
	if td.Class == steady.Stable || td.Slope < 0 {
		attracting = 1
	}
	copy(p.l.theta, f.Theta)
	ev := p.tr.trace(td.X, 0, 1, 1)
	ret, tr := NotApplicable, nan
	if ev.kind == Fold && attracting == 1 {
		ret, tr = p.hysteresis(ev)
	}
	switch ev.kind {
	case None:
		put(None, nan, nan, ret, tr, noReason)
	case Failed:
		put(Failed, ev.t, ev.x, ret, tr, ev.reason)
	default:
		put(ev.kind, ev.t, ev.x, ret, tr, noReason)
	}
}

// collect is the engine's Sink: it keeps every draw's figures in draw
// order.
func (sw *sweep) collect(block []assess.Draw) error {
	for i := range block {
		rec := &block[i]
		tip := Tip{Kind: Failed, D: math.NaN(), X: math.NaN(), DReturn: math.NaN(), T: math.NaN()}
		if len(rec.Extra) == exLen {
			ex := rec.Extra
			tip.Kind = Kind(ex[exKind])
			tip.Return = Return(ex[exReturn])
			tip.Attracting = ex[exAttracting] == 1
			switch tip.Kind {
			case Fold, Exchange, Boundary:
				tip.T, tip.D, tip.X = ex[exT], sw.driver(ex[exT]), ex[exX]
			}
			if !math.IsNaN(ex[exTReturn]) {
				tip.DReturn = sw.driver(ex[exTReturn])
			}
			// The engine's failures are listed with its own reasons
			// (see engineRun).
			if tip.Kind == Failed && rec.Failed == "" {
				why := ""
				if r := reason(ex[exReason]); r != reasonEngine && r > 0 && r < numReasons {
					why = reasonNames[r]
				}
				sw.fail(why, rec.Index)
			}
		} else {
			sw.fail("draw not assessed", rec.Index)
		}
		sw.tips = append(sw.tips, tip)
	}
	return nil
}

func (sw *sweep) fail(why string, i int) {
	if why == "" {
		why = "unknown"
	}
	c := sw.failures[why]
	if c == nil {
		c = &assess.Counted{Reason: why}
		sw.failures[why] = c
	}
	c.Draws++
	if len(c.First) < 5 {
		c.First = append(c.First, i)
	}
}

// driver is the driver value at sweep progress t.
func (sw *sweep) driver(t float64) float64 {
	if t == 1 {
		return sw.opt.To
	}
	return sw.opt.From + t*(sw.opt.To-sw.opt.From)
}

// Run computes, for every draw of the scenario's parameters, the driver
// value at which the tracked equilibrium tips as the driver goes from
// From to To, and from these the quantiles of the critical value, the
// safe limit at risk α with its order-statistic interval, the hysteresis
// of each fold, and (with Steps) the probability curves.
//
// Draw i is the scenario's design draw i with the driver replaced. Its
// tracked equilibrium at d = From is the engine's (assess.Run with
// Options.Points): the nominal equilibrium followed from nominal values
// into the draw. From there the branch is continued in d within the same
// worker (Options.Extra) up to the first event (see Kind). The curves run
// the engine at each of Steps driver values on the same draws (common
// random numbers), so that they are smooth in d and comparable.
//
// Failures and numeric faults (poles, undefined stretches of the rate
// law) of every engine run are counted by reason with their first draw
// indices and merged over the runs (see Result.Failed), with a warning
// when more than 0.1% of the draws at some driver value met numeric
// trouble.
//
// Errors in the options are *OptionError.
func Run(ctx context.Context, m *assess.Model, opt Options) (*Result, error) {
	sw, err := check(m, opt)
	if err != nil {
		return nil, err
	}
	design, err := m.Design(opt.Plan, opt.Draws, opt.Seed)
	if err != nil {
		return nil, err
	}
	at := func(d float64) func(int, []float64) {
		return func(i int, theta []float64) {
			design.Draw(i, theta)
			theta[sw.j] = d
		}
	}
	sw.tips = make([]Tip, 0, opt.Draws)
	runs := max(opt.Steps, 1)
	progress := func(run int) func(int, int) {
		if opt.Progress == nil {
			return nil
		}
		return func(done, _ int) { opt.Progress(run*opt.Draws+done, runs*opt.Draws) }
	}
	eng := assess.Options{
		Draws: opt.Draws, Seed: opt.Seed, Plan: opt.Plan, Workers: opt.Workers,
		Points:   at(opt.From),
		Extra:    func() func(*assess.Func, *assess.Draw) { return sw.newDrawer().run },
		Sink:     sw.collect,
		Progress: progress(0),
	}
	first, err := assess.Run(ctx, m, eng)
	if err != nil {
		return nil, err
	}
	sw.engineRun(first, opt.From)
	res := sw.summarise()
	for s := 0; s < opt.Steps; s++ {
		d := opt.From + (opt.To-opt.From)*float64(s)/float64(opt.Steps-1)
		if s == opt.Steps-1 {
			d = opt.To
		}
		if s == 0 {
			res.Curve = append(res.Curve, curvePoint(d, first, sw.k, 0))
			continue
		}
		t := float64(s) / float64(opt.Steps-1)
		var disagree int64
		r, err := assess.Run(ctx, m, assess.Options{
			Draws: opt.Draws, Seed: opt.Seed, Plan: opt.Plan, Workers: opt.Workers,
			Points:   at(d),
			Progress: progress(s),
			Sink: func(block []assess.Draw) error {
				for i := range block {
					if sw.disagrees(&block[i], t) {
						disagree++
					}
				}
				return nil
			},
		})
		if err != nil {
			return nil, err
		}
		sw.engineRun(r, d)
		res.Curve = append(res.Curve, curvePoint(d, r, sw.k, disagree))
	}
	sw.finish(res)
	return res, nil
}

// disagrees reports whether the engine's verdict on the tracked
// equilibrium in the draw record rec, at sweep progress t, differs from
// the sweep's: the engine follows the nominal equilibrium straight from
// nominal values to the draw, the sweep along the driver from From, and
// near a cusp the two paths can pass on different sides of it.
func (sw *sweep) disagrees(rec *assess.Draw, t float64) bool {
	tp := &sw.tips[rec.Index]
	if rec.Failed != "" || tp.Kind == Failed || sw.k >= len(rec.Tracked) {
		return false
	}
	alive := tp.Kind == None || ((tp.Kind == Fold || tp.Kind == Exchange || tp.Kind == Boundary) && tp.T > t)
	e := rec.Tracked[sw.k]
	if tp.Attracting {
		return alive != (e.Exists && e.Slope < 0)
	}
	return alive != e.Exists
}

func curvePoint(d float64, r *assess.Result, k int, disagree int64) CurvePoint {
	t := r.Tracked[k]
	return CurvePoint{
		Value:      d,
		Exists:     t.Exists,
		Attracting: t.Attracting,
		Regimes:    r.Regimes,
		Failed:     int64(r.Draws) - r.Succeeded,
		Faulted:    r.Faulted,
		Disagree:   disagree,
	}
}
