package assess

import (
	"context"
	"errors"
	"fmt"
	"math"
	"runtime"
	"slices"
	"sync"
	"sync/atomic"
	"time"

	"holdfast/assess/steady"
	"holdfast/sample"
)

// Options controls a Monte Carlo run.
type Options struct {
	// Draws is the number of parameter draws (the first batch when
	// UntilHalfWidth is set).
	Draws int
	// Seed fixes every random choice: draw i depends only on (Seed, i).
	Seed uint64
	// Plan is the sampling plan.
	Plan sample.PlanKind
	// Workers is the number of goroutines (0: all cores). The result does
	// not depend on it.
	Workers int
	// UntilHalfWidth, when positive, keeps drawing in batches (each as
	// large as all the draws before it) until every reported probability's
	// 95% interval has half-width ≤ UntilHalfWidth, or MaxDraws is reached.
	UntilHalfWidth float64
	// MaxDraws caps the draws when UntilHalfWidth is set (0: 100·Draws).
	MaxDraws int
	// Sink, when set, receives every draw's record in draw order, in blocks
	// (used for --draws-csv). The records are reused after the call.
	Sink func(block []Draw) error
	// Progress, when set, is called from one goroutine with the number of
	// draws done and the number planned so far.
	Progress func(done, planned int)
	// Points, when set, replaces the sampling design: it fills theta (in
	// parameter order) for draw i, and must depend only on i. Sensitivity
	// designs and driver sweeps with common random numbers use it; Plan
	// and Seed are then only recorded.
	Points func(i int, theta []float64)
	// Extra, when set, is called once per worker to make a function that
	// runs in that worker after each draw is assessed, with the worker's
	// evaluator bound to the draw's parameters and the draw's record. It
	// may compute further per-draw figures (a tipping point, say) into
	// rec.Extra, which reaches Sink in draw order. It must depend only on
	// the draw, so that results stay independent of the worker count.
	Extra func() func(f *Func, rec *Draw)
	// Shard restricts RunPartial to the draws i with i mod N = K.
	Shard Shard
	// Checkpoint, when set, is called from the run's goroutine between
	// chunks of draws, at most once per CheckpointEvery (default
	// DefaultCheckpointEvery), with the run's state so far. Every Sink has
	// then received exactly the draws the state covers, so the caller can
	// save its own collectors beside it. The Partial is valid only during
	// the call (encode it there).
	Checkpoint      func(p *Partial) error
	CheckpointEvery time.Duration
	// Resume, when set, continues a run (or a shard, with the same Shard)
	// from a state handed to Checkpoint: the draws it covers are not run
	// again, and the result is the one an uninterrupted run gives. Sinks
	// must be restored to the same point by the caller.
	Resume *Partial
}

// Limits on a run.
const (
	MaxDraws  = 1 << 31
	blockSize = 1024
	conf      = 0.95
)

// Outcome kinds of the motion from the current state, after the tracked
// equilibria's indices.
const (
	outUntracked = iota // an equilibrium not present at nominal values
	outExitBelow
	outExitAbove
	outSingular
	outOutside
	numOutKinds
)

var outNames = [numOutKinds]string{
	"other equilibrium", "leaves domain below", "leaves domain above", "singular point", "undefined start",
}

// Draw is the record of one draw, for --draws-csv.
type Draw struct {
	Index  int
	Theta  []float64
	Failed string // reason, empty when the draw succeeded
	// Tracked holds each nominal equilibrium's state in this draw.
	Tracked []TrackedDraw
	// Pattern is the ordered classes of every equilibrium of the draw.
	Pattern []steady.Class
	// Outcome is the label reached from the current state ("" without one).
	Outcome string
	// Extra holds figures computed by Options.Extra (nil otherwise).
	Extra []float64
}

// TrackedDraw is one tracked equilibrium in one draw.
type TrackedDraw struct {
	Exists bool
	X      float64
	Slope  float64
	Class  steady.Class
	Side   steady.Side
}

// Run draws parameter sets from the scenario's distributions, finds and
// classifies every equilibrium of each draw, follows the nominal
// equilibria E1 < E2 < … into each draw by continuation, and aggregates.
// Memory does not grow with the number of draws. The result is identical
// for any number of workers.
func Run(ctx context.Context, m *Model, opt Options) (*Result, error) {
	if opt.Draws < 1 || opt.Draws > MaxDraws {
		return nil, fmt.Errorf("draws must be between 1 and %d, got %d", MaxDraws, opt.Draws)
	}
	if opt.UntilHalfWidth < 0 || opt.UntilHalfWidth >= 0.5 || math.IsNaN(opt.UntilHalfWidth) {
		return nil, fmt.Errorf("until-halfwidth must be in (0, 0.5), got %v", opt.UntilHalfWidth)
	}
	if opt.Points != nil && opt.UntilHalfWidth > 0 {
		return nil, errors.New("until-halfwidth needs the scenario's own sampling design, not given points")
	}
	maxDraws := opt.Draws
	if opt.UntilHalfWidth > 0 {
		maxDraws = opt.MaxDraws
		if maxDraws == 0 {
			maxDraws = min(100*opt.Draws, MaxDraws)
		}
		if maxDraws < opt.Draws || maxDraws > MaxDraws {
			return nil, fmt.Errorf("max-draws (%d) must be between draws (%d) and %d", maxDraws, opt.Draws, MaxDraws)
		}
	}
	if opt.Shard.N > 1 {
		return nil, errors.New("a shard of a run gives a Partial: use RunPartial and Merge")
	}
	e, err := newEngine(m, opt)
	if err != nil {
		return nil, err
	}
	done, conv, err := e.run(ctx, opt, Shard{0, 1}, opt.Draws, maxDraws)
	if err != nil {
		return nil, err
	}
	return e.total.finish(m, e.nominal, opt, done, conv), nil
}

// DefaultCheckpointEvery is the least time between two calls of
// Options.Checkpoint when CheckpointEvery is zero.
const DefaultCheckpointEvery = 5 * time.Second

// run assesses the shard's draws, n of them at first (local indices
// 0..n−1, global index K + j·N), continuing a resumed state, in batches
// doubling up to maxDraws while a half-width target is set and not met.
// With a Checkpoint function the batches are cut into chunks, and the
// state after a chunk is handed to it when CheckpointEvery has passed.
func (e *engine) run(ctx context.Context, opt Options, sh Shard, n, maxDraws int) (int, Convergence, error) {
	done, end := 0, n
	conv := Convergence{Target: opt.UntilHalfWidth}
	if r := opt.Resume; r != nil {
		if r.Shard != sh.K || r.Shards != sh.N {
			return 0, conv, fmt.Errorf("resume: the saved state is of shard %d/%d, the run of shard %d/%d", r.Shard, r.Shards, sh.K, sh.N)
		}
		if len(r.agg.tracked) != len(e.nominal.Equilibria) {
			return 0, conv, fmt.Errorf("resume: the saved state tracks %d equilibria, the scenario %d", len(r.agg.tracked), len(e.nominal.Equilibria))
		}
		if r.Draws < 0 || r.Draws > r.Planned || r.Planned > maxDraws || (opt.UntilHalfWidth == 0 && r.Planned != n) {
			return 0, conv, fmt.Errorf("resume: the saved state covers %d of %d draws, which does not fit this run", r.Draws, r.Planned)
		}
		e.total.merge(r.agg)
		done, end, conv.Batches = r.Draws, r.Planned, r.Batches
		if r.Complete() && conv.Batches > 0 {
			conv.Batches-- // its last batch is counted again below
		}
	}
	chunk := end
	every := opt.CheckpointEvery
	if opt.Checkpoint != nil {
		chunk = max(1<<15, 4*blockSize*len(e.ws))
		if every <= 0 {
			every = DefaultCheckpointEvery
		}
	}
	last := time.Now()
	for {
		for done < end {
			to := min(end, done+chunk)
			if err := e.batch(ctx, done, to, end, opt, sh); err != nil {
				return 0, conv, err
			}
			done = to
			if opt.Checkpoint != nil && done < end && time.Since(last) >= every {
				p := &Partial{Draws: done, Planned: end, Batches: conv.Batches, Shard: sh.K, Shards: sh.N, agg: e.total}
				if err := opt.Checkpoint(p); err != nil {
					return 0, conv, fmt.Errorf("checkpoint: %w", err)
				}
				last = time.Now()
			}
		}
		conv.Batches++
		if opt.UntilHalfWidth == 0 {
			break
		}
		conv.MaxHalfWidth = e.total.maxHalfWidth()
		if conv.MaxHalfWidth <= opt.UntilHalfWidth {
			conv.Reached = true
			break
		}
		if done >= maxDraws {
			break
		}
		end = min(2*done, maxDraws)
	}
	return done, conv, nil
}

// engine is a pool of workers over one model with the running total.
type engine struct {
	nominal *Snapshot
	ws      []*worker
	total   *aggregate
}

func newEngine(m *Model, opt Options) (*engine, error) {
	workers := opt.Workers
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	nominal, err := m.Analyze(m.Nominal)
	if err != nil {
		return nil, err
	}
	points := opt.Points
	if points == nil {
		design, err := m.Design(opt.Plan, opt.Draws, opt.Seed)
		if err != nil {
			return nil, err
		}
		points = design.Draw
	}
	e := &engine{nominal: nominal, ws: make([]*worker, workers), total: newAggregate(len(nominal.Equilibria))}
	for w := range e.ws {
		e.ws[w], err = newWorker(m, points, nominal)
		if err != nil {
			return nil, err
		}
		if opt.Extra != nil {
			e.ws[w].extra = opt.Extra()
		}
	}
	return e, nil
}

// batch assesses the shard's draws of local index [from, to) and adds
// them to the total; planned is the number of draws planned so far, for
// progress. Worker aggregates hold only integer counts and order-free
// sketches, so the total does not depend on which worker took which draw.
func (e *engine) batch(ctx context.Context, from, to, planned int, opt Options, sh Shard) error {
	if err := runBatch(ctx, e.ws, from, to, planned, opt, sh); err != nil {
		return err
	}
	for _, w := range e.ws {
		e.total.merge(w.agg)
		w.agg = newAggregate(len(e.nominal.Equilibria))
	}
	return nil
}

// runBatch assesses the shard's draws of local index [from, to) (global
// index i = K + j·N) on the workers, block by block, and feeds the sink in
// draw order.
func runBatch(ctx context.Context, ws []*worker, from, to, planned int, opt Options, sh Shard) error {
	ctx, cancel := context.WithCancel(ctx)
	defer cancel()
	nBlocks := (to - from + blockSize - 1) / blockSize
	var next atomic.Int64
	type finished struct {
		b    int
		recs []Draw
	}
	results := make(chan finished, len(ws))
	var wg sync.WaitGroup
	var firstErr error
	var errOnce sync.Once
	fail := func(err error) {
		errOnce.Do(func() { firstErr = err; cancel() })
	}
	// free returns record buffers for reuse when a sink is set.
	free := make(chan []Draw, 2*len(ws)+2)
	for _, w := range ws {
		wg.Add(1)
		go func(w *worker) {
			defer wg.Done()
			for {
				b := int(next.Add(1)) - 1
				if b >= nBlocks || ctx.Err() != nil {
					return
				}
				lo := from + b*blockSize
				hi := min(lo+blockSize, to)
				var recs []Draw
				if opt.Sink != nil || opt.Extra != nil {
					select {
					case recs = <-free:
					default:
						recs = make([]Draw, blockSize)
					}
					recs = recs[:hi-lo]
				}
				for j := lo; j < hi; j++ {
					var rec *Draw
					if recs != nil {
						rec = &recs[j-lo]
					}
					w.draw(sh.K+j*sh.N, rec)
					if w.extra != nil {
						copy(w.f.Theta, w.theta)
						w.extra(w.f, rec)
					}
				}
				select {
				case results <- finished{b, recs}:
				case <-ctx.Done():
					return
				}
			}
		}(w)
	}
	go func() { wg.Wait(); close(results) }()
	pending := map[int][]Draw{}
	want, doneDraws := 0, from
	for r := range results {
		doneDraws += min(blockSize, to-(from+r.b*blockSize))
		if opt.Progress != nil {
			opt.Progress(doneDraws, planned)
		}
		if opt.Sink == nil || firstErr != nil {
			if r.recs != nil {
				select {
				case free <- r.recs:
				default:
				}
			}
			continue
		}
		pending[r.b] = r.recs
		for {
			recs, ok := pending[want]
			if !ok {
				break
			}
			delete(pending, want)
			if err := opt.Sink(recs); err != nil {
				fail(fmt.Errorf("writing draws: %w", err))
				break
			}
			select {
			case free <- recs:
			default:
			}
			want++
		}
	}
	if firstErr != nil {
		return firstErr
	}
	if err := ctx.Err(); err != nil {
		return errors.Join(errors.New("run interrupted"), context.Cause(ctx))
	}
	return nil
}

// worker holds one goroutine's scratch: its own evaluator, finder,
// tracker and aggregate.
type worker struct {
	m       *Model
	points  func(i int, theta []float64)
	extra   func(f *Func, rec *Draw)
	nominal *Snapshot
	f       *Func
	finder  *steady.Finder
	tr      tracker
	theta   []float64 // the draw's parameters
	claimed []int     // draw equilibrium index → tracked index, or −1
	slots   []trackSlot
	scale   []float64 // per nominal equilibrium: half the gap to its neighbours
	agg     *aggregate
}

type trackSlot struct {
	exists bool
	idx    int // index into the draw's equilibria, −1 when found only by continuation
	x      float64
	slope  float64
}

func newWorker(m *Model, points func(int, []float64), nominal *Snapshot) (*worker, error) {
	fopt := steady.DefaultOptions()
	// Barriers enter 0.1%-accurate quantile sketches, and only escape
	// barriers over thresholds are reported.
	fopt.QuadRelTol = 1e-5
	fopt.ThresholdBarriersOnly = true
	finder, err := steady.NewFinder(fopt)
	if err != nil {
		return nil, err
	}
	work := make([]float64, len(m.Names))
	w := &worker{
		m:       m,
		points:  points,
		nominal: nominal,
		f:       m.Func(work),
		finder:  finder,
		theta:   make([]float64, len(m.Names)),
		slots:   make([]trackSlot, len(nominal.Equilibria)),
		agg:     newAggregate(len(nominal.Equilibria)),
	}
	w.tr = tracker{f: w.f, th0: m.Nominal, th1: w.theta, lo: m.Domain[0], hi: m.Domain[1]}
	w.scale = isolation(nominal.Equilibria, m.Domain)
	return w, nil
}

// draw assesses draw i and adds it to the worker's aggregate; rec, when
// not nil, receives the draw's record.
func (w *worker) draw(i int, rec *Draw) {
	w.points(i, w.theta)
	if rec != nil {
		rec.Index = i
		rec.Theta = append(rec.Theta[:0], w.theta...)
		rec.Failed, rec.Outcome = "", ""
		rec.Extra = rec.Extra[:0]
		rec.Tracked = rec.Tracked[:0]
		rec.Pattern = rec.Pattern[:0]
	}
	for j, v := range w.theta {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			w.agg.fail(fmt.Sprintf("parameter %s drawn as %v", w.m.Names[j], v), i)
			if rec != nil {
				rec.Failed = "parameter not finite"
			}
			return
		}
	}
	copy(w.f.Theta, w.theta)
	lo, hi := w.m.Domain[0], w.m.Domain[1]
	res, err := w.finder.Find(w.f, lo, hi)
	if err != nil {
		w.agg.fail("equilibrium search: "+err.Error(), i)
		if rec != nil {
			rec.Failed = "equilibrium search failed"
		}
		return
	}
	a := w.agg
	a.n++
	// Numeric trouble inside the draw: counted by reason, never dropped.
	for _, iv := range res.Undefined {
		a.fault(faultReason(w.f, iv.Lo+(iv.Hi-iv.Lo)/2), i)
	}
	for _, p := range res.Poles {
		a.fault(faultReason(w.f, p), i)
	}
	if len(res.Undefined)+len(res.Poles) > 0 {
		a.faulted++
	}
	if len(res.Warnings) > 0 {
		a.warned++
	}
	eqs := res.Equilibria
	a.regime(eqs)
	w.track(res)
	for k := range w.slots {
		w.agg.tracked[k].add(&w.slots[k], eqs)
	}
	if len(eqs) > w.claimedCount() {
		a.untracked++
	}
	if st := w.m.Scenario.State; st.HasCurrent {
		out := w.outcome(res, st.Current)
		a.outcomes[out]++
		if rec != nil {
			rec.Outcome = w.outcomeName(out)
		}
	}
	if rec != nil {
		for _, e := range eqs {
			rec.Pattern = append(rec.Pattern, e.Class)
		}
		for k := range w.slots {
			s := &w.slots[k]
			td := TrackedDraw{Exists: s.exists, X: math.NaN(), Slope: math.NaN()}
			if s.exists {
				td.X, td.Slope = s.x, s.slope
				if s.idx >= 0 {
					td.Class, td.Side = eqs[s.idx].Class, eqs[s.idx].AttractsFrom
				} else {
					td.Class = slopeClass(s.slope)
				}
			}
			rec.Tracked = append(rec.Tracked, td)
		}
	}
}

func (w *worker) claimedCount() int {
	n := 0
	for _, s := range w.slots {
		if s.exists && s.idx >= 0 {
			n++
		}
	}
	return n
}

// track follows every nominal equilibrium into the draw. Hyperbolic ones
// (order 1) by continuation; non-hyperbolic ones, which are structurally
// unstable and split or vanish under any perturbation, by proximity: the
// draw's equilibrium nearest the nominal position, within half the gap to
// the nominal neighbours.
func (w *worker) track(res *steady.Result) {
	eqs := res.Equilibria
	w.claimed = slices.Grow(w.claimed[:0], len(eqs))[:len(eqs)]
	for j := range w.claimed {
		w.claimed[j] = -1
	}
	nom := w.nominal.Equilibria
	for k := range nom {
		s := &w.slots[k]
		*s = trackSlot{idx: -1}
		e := &nom[k].Equilibrium
		if e.Order == 1 && e.Class != steady.Degenerate {
			if !w.candidate(eqs, e.Slope) {
				continue // no unclaimed root with this slope sign: lost
			}
			w.tr.roots = eqs
			x, j, ok := w.tr.follow(e.X, e.Slope, w.scale[k])
			if !ok {
				continue
			}
			s.exists, s.x = true, x
			if j < 0 {
				// Newton's method found it: is it one the scan reported?
				j = nearest(eqs, x, w.m.Domain)
			}
			if j >= 0 && w.claimed[j] < 0 {
				w.claimed[j] = k
				s.idx, s.x, s.slope = j, eqs[j].X, eqs[j].Slope
			} else {
				// Continuation found a root the scan did not report (or
				// one already claimed): keep it, classify by its slope,
				// and count the miss.
				_, s.slope = w.tr.slope(x)
				w.agg.scanMissed++
			}
			continue
		}
		reach := w.m.Domain[1] - w.m.Domain[0]
		if k > 0 {
			reach = math.Min(reach, (e.X-nom[k-1].X)/2)
		}
		if k+1 < len(nom) {
			reach = math.Min(reach, (nom[k+1].X-e.X)/2)
		}
		best, bd := -1, reach
		for j, d := range eqs {
			if dist := math.Abs(d.X - e.X); dist <= bd && w.claimed[j] < 0 {
				best, bd = j, dist
			}
		}
		if best >= 0 {
			w.claimed[best] = k
			*s = trackSlot{exists: true, idx: best, x: eqs[best].X, slope: eqs[best].Slope}
		}
	}
	// Leave the evaluator at the draw's parameters.
	copy(w.f.Theta, w.theta)
}

// isolation returns, for each equilibrium, half the distance to its
// nearest neighbour (the domain width for a lone one).
func isolation(eqs []Equilibrium, dom [2]float64) []float64 {
	sc := make([]float64, len(eqs))
	for k := range eqs {
		d := dom[1] - dom[0]
		if k > 0 {
			d = math.Min(d, (eqs[k].X-eqs[k-1].X)/2)
		}
		if k+1 < len(eqs) {
			d = math.Min(d, (eqs[k+1].X-eqs[k].X)/2)
		}
		sc[k] = math.Max(d, 1e-9*(dom[1]-dom[0]))
	}
	return sc
}

// candidate reports whether the draw has an unclaimed equilibrium whose
// slope has the sign of slope. A hyperbolic branch keeps its slope sign
// until it meets a fold, so without such a root the branch cannot have
// survived to the draw (given that the scan found every root; a root the
// scan missed is caught when continuation runs).
func (w *worker) candidate(eqs []steady.Equilibrium, slope float64) bool {
	for j := range eqs {
		if w.claimed[j] < 0 && eqs[j].Order == 1 && eqs[j].Slope*slope > 0 {
			return true
		}
	}
	return false
}

// nearest returns the index of the equilibrium within a small tolerance of
// x, or −1.
func nearest(eqs []steady.Equilibrium, x float64, dom [2]float64) int {
	best, bd := -1, math.Inf(1)
	for j := range eqs {
		tol := math.Max(1e-7*(dom[1]-dom[0]), 100*eqs[j].XErr)
		if d := math.Abs(eqs[j].X - x); d <= tol && d < bd {
			best, bd = j, d
		}
	}
	return best
}

func slopeClass(s float64) steady.Class {
	switch {
	case s < 0:
		return steady.Stable
	case s > 0:
		return steady.Unstable
	}
	return steady.Degenerate
}

// outcome is where the state goes from x0 in this draw, read off the phase
// line: the nearest equilibrium in the direction of the flow, unless a pole
// or an undefined stretch or a domain end comes first. The value is a
// tracked index, or len(tracked)+outXxx.
func (w *worker) outcome(res *steady.Result, x0 float64) int {
	nt := len(w.slots)
	eqs := res.Equilibria
	v := w.f.Eval(x0)
	if math.IsNaN(v) {
		return nt + outOutside
	}
	target := -1
	switch {
	case v == 0:
		target = nearest(eqs, x0, w.m.Domain)
		if target < 0 {
			return nt + outUntracked
		}
	case v > 0:
		for j := range eqs {
			if eqs[j].Span[0] > x0 {
				target = j
				break
			}
		}
	default:
		for j := len(eqs) - 1; j >= 0; j-- {
			if eqs[j].Span[1] < x0 {
				target = j
				break
			}
		}
	}
	// What stands in the way?
	a, b := x0, w.m.Domain[1]
	if v < 0 {
		a, b = w.m.Domain[0], x0
	}
	if target >= 0 {
		if v > 0 {
			b = eqs[target].Span[0]
		} else if v < 0 {
			a = eqs[target].Span[1]
		}
	}
	for _, p := range res.Poles {
		if p > a && p < b {
			return nt + outSingular
		}
	}
	for _, iv := range res.Undefined {
		if iv.Hi > a && iv.Lo < b {
			return nt + outSingular
		}
	}
	if target < 0 {
		if v > 0 {
			return nt + outExitAbove
		}
		return nt + outExitBelow
	}
	if k := w.claimed[target]; k >= 0 {
		return k
	}
	return nt + outUntracked
}

func (w *worker) outcomeName(out int) string {
	if out < len(w.slots) {
		return w.nominal.Equilibria[out].Label // no formatting per draw
	}
	return outNames[out-len(w.slots)]
}

// faultReason names the numeric fault of f at x.
func faultReason(f *Func, x float64) string {
	if fl := f.Diagnose(x); fl != nil {
		return fmt.Sprintf("%s (%s in %s)", fl.Kind, fl.Op, fl.Where)
	}
	return "rate law not finite"
}
