package assess

import (
	"cmp"
	"fmt"
	"math"
	"slices"
	"strings"

	"holdfast/assess/agg"
	"holdfast/assess/steady"
	"holdfast/sample"
)

// aggregate is the mergeable summary of a set of draws. Everything in it
// is an integer count or an order-free sketch, so merging per-worker
// aggregates gives the same numbers whichever worker assessed which draw.
type aggregate struct {
	n          int64 // successful draws
	failed     map[string]*counted
	faults     map[string]*counted
	warned     int64 // draws whose search raised a warning
	faulted    int64 // draws with numeric trouble (poles, undefined stretches)
	scanMissed int64 // tracked roots the scan did not report
	untracked  int64 // draws with an equilibrium not followed from nominal
	regimes    map[uint64]int64
	tracked    []trackedAgg
	outcomes   []int64
}

// counted is a count with the first few draw indices, so a case can be
// replayed.
type counted struct {
	n     int64
	first []int
}

const keepIndices = 5

func (c *counted) add(i int) {
	c.n++
	if len(c.first) < keepIndices {
		c.first = append(c.first, i)
	}
}

func (c *counted) merge(o *counted) {
	c.n += o.n
	c.first = append(c.first, o.first...)
	slices.Sort(c.first)
	c.first = c.first[:min(len(c.first), keepIndices)]
}

type trackedAgg struct {
	exists, attracting, semistable int64
	x, slope, returnTime, basin    *agg.Sketch
	barrier                        *agg.Sketch
}

func newAggregate(nTracked int) *aggregate {
	a := &aggregate{
		failed:   map[string]*counted{},
		faults:   map[string]*counted{},
		regimes:  map[uint64]int64{},
		tracked:  make([]trackedAgg, nTracked),
		outcomes: make([]int64, nTracked+numOutKinds),
	}
	for k := range a.tracked {
		t := &a.tracked[k]
		t.x, t.slope, t.returnTime, t.basin, t.barrier = agg.NewSketch(), agg.NewSketch(), agg.NewSketch(), agg.NewSketch(), agg.NewSketch()
	}
	return a
}

func (a *aggregate) fail(reason string, i int) {
	c := a.failed[reason]
	if c == nil {
		c = &counted{}
		a.failed[reason] = c
	}
	c.add(i)
}

func (a *aggregate) fault(reason string, i int) {
	c := a.faults[reason]
	if c == nil {
		c = &counted{}
		a.faults[reason] = c
	}
	c.add(i)
}

// regime counts the ordered pattern of classes, 3 bits per equilibrium
// (semistable ones by side), up to 20 equilibria; more share one key.
func (a *aggregate) regime(eqs []steady.Equilibrium) {
	var key uint64 = 1 // leading 1 marks the length
	if len(eqs) > 20 {
		key = 0
	} else {
		for _, e := range eqs {
			key = key<<3 | uint64(classCode(e.Class, e.AttractsFrom))
		}
	}
	a.regimes[key]++
}

func classCode(c steady.Class, s steady.Side) int {
	switch c {
	case steady.Stable:
		return 1
	case steady.Unstable:
		return 2
	case steady.Semistable:
		if s == steady.Below {
			return 3
		}
		return 4
	}
	return 5
}

func codeName(c int) string {
	return [...]string{"", "stable", "unstable", "semistable-below", "semistable-above", "degenerate"}[c]
}

// patternOf decodes a regime key.
func patternOf(key uint64) []string {
	if key == 0 {
		return []string{"more than 20 equilibria"}
	}
	var p []string
	for key > 1 {
		p = append(p, codeName(int(key&7)))
		key >>= 3
	}
	slices.Reverse(p)
	if p == nil {
		p = []string{}
	}
	return p
}

func (t *trackedAgg) add(s *trackSlot, eqs []steady.Equilibrium) {
	if !s.exists {
		return
	}
	t.exists++
	t.x.Add(s.x)
	t.slope.Add(s.slope)
	if s.idx < 0 {
		if s.slope < 0 {
			t.attracting++
		}
		return
	}
	e := &eqs[s.idx]
	switch e.Class {
	case steady.Stable:
		t.attracting++
		t.returnTime.Add(e.ReturnTime)
		t.basin.Add(e.Basin[1] - e.Basin[0])
		t.barrier.Add(escapeBarrier(e))
	case steady.Semistable:
		t.semistable++
	}
}

// escapeBarrier is the lower of the potential barriers toward basin edges
// that are not domain ends (where the state would leave the modelled
// range rather than cross a threshold); NaN when both edges are domain ends.
func escapeBarrier(e *steady.Equilibrium) float64 {
	b := math.NaN()
	for s := 0; s < 2; s++ {
		if e.BasinAtDomainEnd[s] || math.IsNaN(e.Barrier[s]) {
			continue
		}
		if math.IsNaN(b) || e.Barrier[s] < b {
			b = e.Barrier[s]
		}
	}
	return b
}

func (a *aggregate) merge(o *aggregate) {
	a.n += o.n
	a.warned += o.warned
	a.faulted += o.faulted
	a.scanMissed += o.scanMissed
	a.untracked += o.untracked
	mergeCounted(a.failed, o.failed)
	mergeCounted(a.faults, o.faults)
	for k, v := range o.regimes {
		a.regimes[k] += v
	}
	for k := range a.tracked {
		t, u := &a.tracked[k], &o.tracked[k]
		t.exists += u.exists
		t.attracting += u.attracting
		t.semistable += u.semistable
		t.x.Merge(u.x)
		t.slope.Merge(u.slope)
		t.returnTime.Merge(u.returnTime)
		t.basin.Merge(u.basin)
		t.barrier.Merge(u.barrier)
	}
	for k, v := range o.outcomes {
		a.outcomes[k] += v
	}
}

func mergeCounted(dst, src map[string]*counted) {
	for r, c := range src {
		if d := dst[r]; d != nil {
			d.merge(c)
		} else {
			cp := *c
			cp.first = slices.Clone(c.first)
			dst[r] = &cp
		}
	}
}

// maxHalfWidth is the largest 95% half-width over every probability the
// result reports.
func (a *aggregate) maxHalfWidth() float64 {
	hw := 0.0
	p := func(k int64) {
		if a.n > 0 {
			hw = math.Max(hw, agg.Proportion{K: k, N: a.n}.HalfWidth(conf))
		}
	}
	for _, t := range a.tracked {
		p(t.exists)
		p(t.attracting)
		p(t.semistable)
	}
	for _, v := range a.regimes {
		p(v)
	}
	for _, v := range a.outcomes {
		p(v)
	}
	if a.n == 0 {
		return math.Inf(1)
	}
	return hw
}

// Probability is an estimated probability with its 95% interval (Wilson,
// or Clopper–Pearson when the count is 0 or N).
type Probability struct {
	Count, N int64
	P        float64
	CI       [2]float64
}

func prob(k, n int64) Probability {
	pr := agg.Proportion{K: k, N: n}
	lo, hi := pr.Interval(conf)
	return Probability{Count: k, N: n, P: pr.Estimate(), CI: [2]float64{lo, hi}}
}

// QuantileLevels are the levels of every reported quantile summary.
var QuantileLevels = [5]float64{0.05, 0.25, 0.5, 0.75, 0.95}

// Quantiles summarises a figure over the draws where it is defined.
type Quantiles struct {
	N int64
	Q [5]float64 // at QuantileLevels; NaN when N = 0
}

func quantiles(s *agg.Sketch) Quantiles {
	q := Quantiles{N: s.Count()}
	for i, l := range QuantileLevels {
		q.Q[i] = s.Quantile(l)
	}
	return q
}

// Tracked is the Monte Carlo summary of one nominal equilibrium.
type Tracked struct {
	Label        string
	NominalX     float64
	NominalClass steady.Class
	NominalSide  steady.Side
	Exists       Probability
	Attracting   Probability
	Semistable   Probability
	X, Slope     Quantiles
	ReturnTime   Quantiles // hyperbolic attracting draws
	BasinWidth   Quantiles // attracting draws
	Barrier      Quantiles // attracting draws with a threshold edge
}

// Regime is one ordered pattern of classes seen in the draws.
type Regime struct {
	Pattern []string
	P       Probability
}

// Outcome is the probability of one destination from the current state.
type Outcome struct {
	Label string
	P     Probability
}

// Counted is a number of draws with the first few of their indices.
type Counted struct {
	Reason string
	Draws  int64
	First  []int
}

// Convergence reports the batches drawn and the widest interval.
type Convergence struct {
	Target       float64 // requested half-width (0: none)
	Reached      bool
	Batches      int
	MaxHalfWidth float64
}

// Result is the outcome of a Monte Carlo run.
type Result struct {
	Draws       int   // draws attempted
	Succeeded   int64 // draws assessed
	Seed        uint64
	Plan        sample.PlanKind
	Names       []string
	Nominal     *Snapshot
	Tracked     []Tracked
	Regimes     []Regime
	Untracked   Probability // draws with an equilibrium not present at nominal values
	Outcomes    []Outcome   // from the current state; nil without one
	Failed      []Counted
	Faults      []Counted
	Convergence Convergence
	// ScanMissed counts tracked equilibria that continuation found and the
	// scan did not; Warned counts draws whose search raised a warning.
	ScanMissed, Warned int64
	// Faulted counts the successful draws that met numeric trouble (a
	// pole or an undefined stretch of the rate law); Faults lists the
	// troubles by reason.
	Faulted  int64
	Warnings []string
}

func (a *aggregate) finish(m *Model, nominal *Snapshot, opt Options, draws int, conv Convergence) *Result {
	r := &Result{
		Draws:       draws,
		Succeeded:   a.n,
		Seed:        opt.Seed,
		Plan:        opt.Plan,
		Names:       m.Names,
		Nominal:     nominal,
		Untracked:   prob(a.untracked, a.n),
		ScanMissed:  a.scanMissed,
		Warned:      a.warned,
		Faulted:     a.faulted,
		Convergence: conv,
	}
	r.Convergence.MaxHalfWidth = a.maxHalfWidth()
	for k, e := range nominal.Equilibria {
		t := &a.tracked[k]
		r.Tracked = append(r.Tracked, Tracked{
			Label:        e.Label,
			NominalX:     e.X,
			NominalClass: e.Class,
			NominalSide:  e.AttractsFrom,
			Exists:       prob(t.exists, a.n),
			Attracting:   prob(t.attracting, a.n),
			Semistable:   prob(t.semistable, a.n),
			X:            quantiles(t.x),
			Slope:        quantiles(t.slope),
			ReturnTime:   quantiles(t.returnTime),
			BasinWidth:   quantiles(t.basin),
			Barrier:      quantiles(t.barrier),
		})
	}
	for key, v := range a.regimes {
		r.Regimes = append(r.Regimes, Regime{Pattern: patternOf(key), P: prob(v, a.n)})
	}
	slices.SortFunc(r.Regimes, func(x, y Regime) int {
		return cmp.Or(cmp.Compare(y.P.Count, x.P.Count), cmp.Compare(strings.Join(x.Pattern, "/"), strings.Join(y.Pattern, "/")))
	})
	if m.Scenario.State.HasCurrent {
		nt := len(nominal.Equilibria)
		for k, v := range a.outcomes {
			label := ""
			if k < nt {
				label = Label(k)
			} else {
				label = outNames[k-nt]
				if v == 0 {
					continue
				}
			}
			r.Outcomes = append(r.Outcomes, Outcome{Label: label, P: prob(v, a.n)})
		}
	}
	r.Failed = sortedCounts(a.failed)
	r.Faults = sortedCounts(a.faults)
	var failed int64
	for _, c := range r.Failed {
		failed += c.Draws
	}
	if failed > 0 && float64(failed) > 0.001*float64(draws) {
		r.Warnings = append(r.Warnings, "more than 0.1% of draws failed; see the failure list")
	}
	if a.faulted > 0 && float64(a.faulted) > 0.001*float64(draws) {
		r.Warnings = append(r.Warnings, fmt.Sprintf("%d draws (%.3g%%, more than 0.1%%) met numeric trouble in the rate law; see the list of faults", a.faulted, 100*float64(a.faulted)/float64(draws)))
	}
	if a.scanMissed > 0 {
		r.Warnings = append(r.Warnings, "the equilibrium scan missed roots that continuation found; they are counted with their slope as verdict")
	}
	if len(m.Unused) > 0 {
		r.Warnings = append(r.Warnings, "parameters not used by the rate law: "+strings.Join(m.Unused, ", "))
	}
	return r
}

func sortedCounts(m map[string]*counted) []Counted {
	var out []Counted
	for reason, c := range m {
		out = append(out, Counted{Reason: reason, Draws: c.n, First: c.first})
	}
	slices.SortFunc(out, func(x, y Counted) int {
		return cmp.Or(cmp.Compare(y.Draws, x.Draws), cmp.Compare(x.Reason, y.Reason))
	})
	return out
}
