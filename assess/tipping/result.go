package tipping

import (
	"cmp"
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"holdfast/assess"
	"holdfast/assess/agg"
	"holdfast/assess/steady"
	"holdfast/sample"
)

// conf is the confidence level of every interval reported.
const conf = 0.95

// Tip is one draw's outcome along the sweep.
type Tip struct {
	Kind Kind
	// D is the driver value of the event (Fold, Exchange, Boundary); NaN
	// otherwise.
	D float64
	// X is the state at the event; NaN when there is none.
	X float64
	// Return is the hysteresis verdict of a fold of an attracting
	// equilibrium, and DReturn the driver value of the return fold (NaN
	// when none was found).
	Return  Return
	DReturn float64
	// T is the sweep progress of the event, (D − From)/(To − From).
	T float64
	// Attracting tells whether the tracked equilibrium attracts at From.
	Attracting bool
}

// Where tells where a value read off the critical values lies.
type Where int

const (
	// InRange: a driver value inside the sweep.
	InRange Where = iota
	// AtStart: the tracked equilibrium is already lost at From in this
	// share of the draws, so the value is "at or before From".
	AtStart
	// BeyondEnd: the share of draws that tip in range is smaller than the
	// level, so the value is "beyond To".
	BeyondEnd
	// Unbounded: too few draws to bound an interval end.
	Unbounded
)

var whereNames = [...]string{"in range", "at start", "beyond end", "unbounded"}

// String returns "in range", "at start", "beyond end" or "unbounded".
func (w Where) String() string {
	if w >= 0 && int(w) < len(whereNames) {
		return whereNames[w]
	}
	return "Where(?)"
}

// Value is a driver value read off the critical values; D is NaN unless
// Where is InRange.
type Value struct {
	D     float64
	Where Where
}

// Critical summarises the critical values of the draws assessed. Levels
// run along the sweep: the 5% value is where 5% of the draws have tipped
// (the lower end of the distribution for a sweep up, the upper for a
// sweep down).
type Critical struct {
	// N is the number of draws assessed (failed ones left out).
	N int64
	// Count holds the number of draws by Kind (Failed: draws not assessed).
	Count [numKinds]int64
	// Quantiles at assess.QuantileLevels, type-1 sample quantiles (the
	// order statistic of rank ⌈Np⌉) of the event values, with draws
	// without tipping counted as beyond To and draws where the equilibrium
	// is absent at From as at From.
	Quantiles [5]Value
	// WithoutTipping is the share of draws with no event in range, and
	// LostAtStart the share where the equilibrium is absent at From.
	WithoutTipping, LostAtStart assess.Probability
}

// Kind names the kind of the events: the one kind seen, "mixed", or
// "none" when no draw tipped in range.
func (c *Critical) Kind() string {
	seen := ""
	for _, k := range []Kind{Fold, Exchange, Boundary} {
		if c.Count[k] > 0 {
			if seen != "" {
				return "mixed"
			}
			seen = k.String()
		}
	}
	if seen == "" {
		return "none"
	}
	return seen
}

// Limit is the safe operating limit at risk α: the largest driver value
// along the sweep at which the estimated probability of having lost the
// tracked equilibrium is at most α, read as the α-quantile of the
// critical values, with its distribution-free interval from order
// statistics (see OrderInterval).
type Limit struct {
	Risk     float64
	Value    Value
	CI       [2]Value
	Coverage float64 // exact coverage of the order-statistic interval (≥ 0.95)
	Ranks    [3]int  // ranks of the estimate and of the interval ends
}

// Hysteresis summarises the folds of an attracting tracked equilibrium.
type Hysteresis struct {
	// N is the number of draws whose first event is a fold of an
	// attracting equilibrium.
	N int64
	// Shares of the N draws by verdict.
	Reversible, Irreversible, Escapes, Unresolved assess.Probability
	// Return holds quantiles of the return fold's driver value, and Width
	// of the hysteresis window |fold − return fold|, over the draws where
	// a return fold was found (in natural order of the driver).
	Return, Width assess.Quantiles
}

// CurvePoint is the engine's verdict at one driver value, over the same
// draws as every other point.
type CurvePoint struct {
	Value              float64
	Exists, Attracting assess.Probability
	Regimes            []assess.Regime
	Failed             int64
	// Faulted counts the draws that met numeric trouble (a pole or an
	// undefined stretch of the rate law) at this driver value.
	Faulted int64
	// Disagree counts the draws in which the engine's verdict on the
	// tracked equilibrium (followed from nominal values straight to the
	// draw) differs from the sweep's (followed along the driver from
	// From): the two paths can pass on different sides of a cusp, where
	// an equilibrium's identity depends on the path.
	Disagree int64
}

// Result is the outcome of a sweep.
type Result struct {
	Driver   string
	From, To float64
	// Allowed is the range of values the driver may take (see Allowed).
	Allowed [2]float64
	// Track is the tracked label, and Nominal the equilibrium at nominal
	// values.
	Track      string
	Nominal    assess.Equilibrium
	Draws      int
	Seed       uint64
	Plan       sample.PlanKind
	Critical   Critical
	Limit      Limit
	Hysteresis Hysteresis
	// Curve is empty without Options.Steps.
	Curve []CurvePoint
	// Tips holds every draw's outcome, in draw order.
	Tips []Tip
	// Failed lists by reason the draws that could not be assessed at
	// From (by the engine or by the continuation along the driver) and
	// the engine's failures at the curves' other driver values. Faults
	// lists by reason the numeric faults (poles and undefined stretches
	// of the rate law) the engine met in successful draws, over every
	// engine run of the sweep (Runs of them), and Faulted counts the
	// draws with numeric trouble summed over those runs. A draw counts
	// once per driver value at which it failed or faulted; First holds
	// the smallest draw indices (at most 5), the same draw i (θ_i of the
	// scenario's design) at every driver value.
	Failed, Faults []assess.Counted
	Faulted        int64
	// Runs is the number of engine runs: one per curve point (the first
	// at From), or one without curves.
	Runs     int
	Warnings []string
}

func probability(k, n int64) assess.Probability {
	pr := agg.Proportion{K: k, N: n}
	lo, hi := pr.Interval(conf)
	return assess.Probability{Count: k, N: n, P: pr.Estimate(), CI: [2]float64{lo, hi}}
}

// summarise turns the collected tips into the result.
func (sw *sweep) summarise() *Result {
	opt := sw.opt
	r := &Result{
		Driver: opt.Driver, From: opt.From, To: opt.To, Allowed: sw.allowed,
		Track: sw.nominal.Equilibria[sw.k].Label, Nominal: sw.nominal.Equilibria[sw.k],
		Draws: opt.Draws, Seed: opt.Seed, Plan: opt.Plan,
		Tips: sw.tips,
	}
	c := &r.Critical
	// Sweep progress of each assessed draw: −∞ when absent at From, +∞
	// without tipping.
	ts := make([]float64, 0, len(sw.tips))
	var hyst [numReturns]int64
	var returns, widths []float64
	for i := range sw.tips {
		tp := &sw.tips[i]
		c.Count[tp.Kind]++
		switch tp.Kind {
		case Failed:
			continue
		case Absent:
			ts = append(ts, math.Inf(-1))
		case None:
			ts = append(ts, math.Inf(1))
		default:
			ts = append(ts, tp.T)
		}
		if tp.Return != NotApplicable {
			hyst[tp.Return]++
			if !math.IsNaN(tp.DReturn) {
				returns = append(returns, tp.DReturn)
				widths = append(widths, math.Abs(tp.D-tp.DReturn))
			}
		}
	}
	n := int64(len(ts))
	c.N = n
	c.WithoutTipping = probability(c.Count[None], n)
	c.LostAtStart = probability(c.Count[Absent], n)
	slices.Sort(ts)
	value := func(rank int) Value {
		if rank < 1 || rank > len(ts) {
			return Value{D: math.NaN(), Where: Unbounded}
		}
		t := ts[rank-1]
		switch {
		case math.IsInf(t, -1):
			return Value{D: math.NaN(), Where: AtStart}
		case math.IsInf(t, 1):
			return Value{D: math.NaN(), Where: BeyondEnd}
		}
		return Value{D: sw.driver(t), Where: InRange}
	}
	nan := Value{D: math.NaN(), Where: Unbounded}
	for i, q := range assess.QuantileLevels {
		c.Quantiles[i] = nan
		if n > 0 {
			c.Quantiles[i] = value(sampleRank(int(n), q))
		}
	}
	r.Limit = Limit{Risk: opt.Risk, Value: nan, CI: [2]Value{nan, nan}}
	if n > 0 {
		k := sampleRank(int(n), opt.Risk)
		lo, hi, cov, _ := OrderInterval(int(n), opt.Risk, conf)
		r.Limit.Value = value(k)
		r.Limit.CI = [2]Value{value(lo), value(hi)}
		r.Limit.Coverage = cov
		r.Limit.Ranks = [3]int{k, lo, hi}
	}
	h := &r.Hysteresis
	for _, v := range hyst[Reversible:] {
		h.N += v
	}
	h.Reversible = probability(hyst[Reversible], h.N)
	h.Irreversible = probability(hyst[Irreversible], h.N)
	h.Escapes = probability(hyst[Escapes], h.N)
	h.Unresolved = probability(hyst[Unresolved], h.N)
	h.Return = sortedQuantiles(returns)
	h.Width = sortedQuantiles(widths)
	return r
}

// engineRun adds an engine run of the sweep at driver value d to the
// failure and fault lists and the warnings.
func (sw *sweep) engineRun(r *assess.Result, d float64) {
	mergeCounts(sw.failures, r.Failed)
	mergeCounts(sw.faults, r.Faults)
	sw.faulted += r.Faulted
	for _, w := range r.Warnings {
		if !engineFaultWarning(r, w) && !slices.Contains(sw.warnings, w) {
			sw.warnings = append(sw.warnings, w)
		}
	}
	if r.Faulted > 0 && float64(r.Faulted) > 0.001*float64(r.Draws) {
		sw.faultRuns++
		if f := float64(r.Faulted) / float64(r.Draws); f > sw.worstShare {
			sw.worstShare, sw.worstAt, sw.worstFaulted = f, d, r.Faulted
		}
	}
	sw.runs++
}

// engineFaultWarning tells the engine's warning that more than 0.1% of a
// run's draws met numeric trouble (see assess.Result.Warnings): the sweep
// replaces those of its runs by one of its own.
func engineFaultWarning(r *assess.Result, w string) bool {
	return r.Faulted > 0 && strings.HasPrefix(w, strconv.FormatInt(r.Faulted, 10)+" draws (")
}

// finish completes the result after every engine run: the failure and
// fault lists merged over the runs, and the warnings (the engines', the
// sweep's on faults and failures, and on the tracked equilibrium's class).
func (sw *sweep) finish(r *Result) {
	r.Failed, r.Faults = sortedCounts(sw.failures), sortedCounts(sw.faults)
	r.Faulted, r.Runs = sw.faulted, sw.runs
	r.Warnings = append(r.Warnings, sw.warnings...)
	switch {
	case sw.faultRuns == 0:
	case sw.runs == 1:
		r.Warnings = append(r.Warnings, fmt.Sprintf("%d of %d draws (%.3g%%, more than 0.1%%) met numeric trouble in the rate law at %s = %.4g; see the list of faults",
			sw.worstFaulted, r.Draws, 100*sw.worstShare, r.Driver, sw.worstAt))
	default:
		r.Warnings = append(r.Warnings, fmt.Sprintf("at %d of %d driver values more than 0.1%% of draws met numeric trouble in the rate law (at most %d of %d draws, %.3g%%, at %s = %.4g); see the curves and the list of faults",
			sw.faultRuns, sw.runs, sw.worstFaulted, r.Draws, 100*sw.worstShare, r.Driver, sw.worstAt))
	}
	if f := r.Critical.Count[Failed]; f > 0 && float64(f) > 0.001*float64(r.Draws) {
		r.Warnings = append(r.Warnings, "more than 0.1% of draws could not be assessed; see the failure list")
	}
	if cl := r.Nominal.Class; cl != steady.Stable {
		r.Warnings = append(r.Warnings, "the tracked equilibrium "+r.Track+" is "+cl.String()+
			" at nominal values: its critical values are where it vanishes or changes stability, not where a stable state is lost")
	}
}

// sortedQuantiles returns type-1 sample quantiles of v at
// assess.QuantileLevels (NaN when v is empty).
func sortedQuantiles(v []float64) assess.Quantiles {
	q := assess.Quantiles{N: int64(len(v))}
	slices.Sort(v)
	for i, l := range assess.QuantileLevels {
		q.Q[i] = math.NaN()
		if len(v) > 0 {
			q.Q[i] = v[sampleRank(len(v), l)-1]
		}
	}
	return q
}

// keepIndices is the number of smallest draw indices kept per reason, as
// the engine keeps them.
const keepIndices = 5

// mergeCounts adds the counts of src to dst by reason (as the engine
// merges its workers' counts): the numbers add up, and the smallest
// keepIndices draw indices are kept.
func mergeCounts(dst map[string]*assess.Counted, src []assess.Counted) {
	for _, c := range src {
		d := dst[c.Reason]
		if d == nil {
			d = &assess.Counted{Reason: c.Reason}
			dst[c.Reason] = d
		}
		d.Draws += c.Draws
		d.First = append(d.First, c.First...)
		slices.Sort(d.First)
		d.First = slices.Compact(d.First)
		d.First = d.First[:min(len(d.First), keepIndices)]
	}
}

// sortedCounts lists the counts by decreasing number, then by reason.
func sortedCounts(m map[string]*assess.Counted) []assess.Counted {
	out := []assess.Counted{}
	for _, c := range m {
		out = append(out, *c)
	}
	slices.SortFunc(out, func(x, y assess.Counted) int {
		return cmp.Or(cmp.Compare(y.Draws, x.Draws), cmp.Compare(x.Reason, y.Reason))
	})
	return out
}
