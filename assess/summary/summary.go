package summary

import (
	"errors"
	"fmt"
	"math"
	"slices"

	"holdfast/assess"
	"holdfast/assess/agg"
	"holdfast/assess/steady"
)

// Config sets the sizes of the summaries. Zero fields take the defaults
// below.
type Config struct {
	// GridPoints is the number of x values, evenly spaced over the domain
	// ends included, at which f is evaluated for the band (default 61).
	GridPoints int
	// NominalPoints is the number of x values of the rate curve at nominal
	// values (default 241).
	NominalPoints int
	// BandDraws bounds the draws whose rate curve enters the band: those
	// of index below BandDraws (default 4096). It bounds the extra cost
	// (GridPoints evaluations of f per draw), not the memory, which is
	// fixed by the sketches.
	BandDraws int
	// Bins is the number of bins of each slope histogram (default 40).
	Bins int
	// PilotDraws is unused: it is kept, still defaulted to 1000 and
	// required to be positive, so that existing configurations stay valid.
	// The bins of the slope histograms once came from a pilot of the first
	// PilotDraws slopes; they now come from all of them (see Histogram).
	PilotDraws int
	// FirstCheckpoint is the first checkpoint of the running counts, a
	// power of two (default 16).
	FirstCheckpoint int
}

// Defaults.
const (
	DefaultGridPoints      = 61
	DefaultNominalPoints   = 241
	DefaultBandDraws       = 1 << 12
	DefaultBins            = 40
	DefaultPilotDraws      = 1000
	DefaultFirstCheckpoint = 16
)

func (c Config) withDefaults() (Config, error) {
	def := func(v *int, d int) {
		if *v == 0 {
			*v = d
		}
	}
	def(&c.GridPoints, DefaultGridPoints)
	def(&c.NominalPoints, DefaultNominalPoints)
	def(&c.BandDraws, DefaultBandDraws)
	def(&c.Bins, DefaultBins)
	def(&c.PilotDraws, DefaultPilotDraws)
	def(&c.FirstCheckpoint, DefaultFirstCheckpoint)
	switch {
	case c.GridPoints < 2 || c.GridPoints > 10000:
		return c, fmt.Errorf("summary: GridPoints %d out of range [2, 10000]", c.GridPoints)
	case c.NominalPoints < 2 || c.NominalPoints > 100000:
		return c, fmt.Errorf("summary: NominalPoints %d out of range [2, 100000]", c.NominalPoints)
	case c.BandDraws < 0:
		return c, fmt.Errorf("summary: BandDraws %d is negative", c.BandDraws)
	case c.Bins < 1 || c.Bins > 10000:
		return c, fmt.Errorf("summary: Bins %d out of range [1, 10000]", c.Bins)
	case c.PilotDraws < 1:
		return c, fmt.Errorf("summary: PilotDraws %d must be positive", c.PilotDraws)
	case c.FirstCheckpoint < 1 || c.FirstCheckpoint&(c.FirstCheckpoint-1) != 0:
		return c, fmt.Errorf("summary: FirstCheckpoint %d is not a power of two", c.FirstCheckpoint)
	}
	return c, nil
}

// Collector gathers a Summary from the engine's hooks: set
// assess.Options.Extra to Collector.Extra and call Collector.Add from
// assess.Options.Sink (alone or beside other sinks). The grid values
// travel in the draw records' Extra field, which the Collector then owns:
// it does not combine with another Options.Extra. A Collector is not
// safe for concurrent use, but the functions Extra makes are (one per
// worker).
//
// Everything a Collector keeps is a sum over the draws it has seen, each
// draw placed by its global index, never by its arrival: collectors fed
// disjoint sets of draws merge exactly (Merge), and a collector's state
// can be saved and restored exactly (MarshalJSON, UnmarshalJSON).
type Collector struct {
	cfg     Config
	grid    []float64
	labels  []string
	current bool

	nomX, nomF []float64

	bandDraws int64
	band      []*agg.Sketch
	undefined []int64

	slopes []*agg.Sketch

	// now counts every draw seen; closed[k] the draws seen of index below
	// the checkpoint threshold(k), for the thresholds that some seen draw
	// has reached (a draw of index ≥ threshold(k)). Every later threshold
	// is still open: its counts are now.
	now    counts
	closed []counts
}

// counts are the running counts over a set of draws.
type counts struct {
	draws, ok                            int64
	exists, attracting, semistable, ends []int64
}

func newCounts(nt int) counts {
	return counts{
		exists: make([]int64, nt), attracting: make([]int64, nt),
		semistable: make([]int64, nt), ends: make([]int64, nt),
	}
}

func (a *counts) clone() counts {
	return counts{
		draws: a.draws, ok: a.ok,
		exists: slices.Clone(a.exists), attracting: slices.Clone(a.attracting),
		semistable: slices.Clone(a.semistable), ends: slices.Clone(a.ends),
	}
}

// merge adds b's counts (of the same length) to a's.
func (a *counts) merge(b *counts) {
	a.draws += b.draws
	a.ok += b.ok
	for k := range a.exists {
		a.exists[k] += b.exists[k]
		a.attracting[k] += b.attracting[k]
		a.semistable[k] += b.semistable[k]
		a.ends[k] += b.ends[k]
	}
}

// NewCollector returns a Collector for the model. It analyses the nominal
// parameter set (as the engine does) to learn the tracked equilibria.
func NewCollector(m *assess.Model, cfg Config) (*Collector, error) {
	if m == nil {
		return nil, errors.New("summary: nil model")
	}
	cfg, err := cfg.withDefaults()
	if err != nil {
		return nil, err
	}
	nominal, err := m.Analyze(m.Nominal)
	if err != nil {
		return nil, fmt.Errorf("summary: %w", err)
	}
	nt := len(nominal.Equilibria)
	c := &Collector{
		cfg:       cfg,
		grid:      Grid(m.Domain, cfg.GridPoints),
		current:   m.Scenario.State.HasCurrent,
		band:      make([]*agg.Sketch, cfg.GridPoints),
		undefined: make([]int64, cfg.GridPoints),
		slopes:    make([]*agg.Sketch, nt),
		now:       newCounts(nt),
	}
	for k := range nt {
		c.labels = append(c.labels, nominal.Equilibria[k].Label)
		c.slopes[k] = agg.NewSketch()
	}
	for g := range c.band {
		c.band[g] = agg.NewSketch()
	}
	c.nomX = Grid(m.Domain, cfg.NominalPoints)
	f := m.Func(slices.Clone(m.Nominal))
	c.nomF = make([]float64, len(c.nomX))
	for i, x := range c.nomX {
		c.nomF[i] = f.Eval(x)
	}
	return c, nil
}

// Grid returns n ≥ 2 evenly spaced values from dom[0] to dom[1], both
// included.
func Grid(dom [2]float64, n int) []float64 {
	g := make([]float64, n)
	for i := range g {
		g[i] = dom[0] + (dom[1]-dom[0])*float64(i)/float64(n-1)
	}
	g[n-1] = dom[1]
	return g
}

// Extra has the signature of assess.Options.Extra: each worker's function
// evaluates the draw's rate law on the band grid, into rec.Extra, for the
// successful draws of index below BandDraws. It depends only on the draw.
func (c *Collector) Extra() func(f *assess.Func, rec *assess.Draw) {
	grid, limit := c.grid, c.cfg.BandDraws
	return func(f *assess.Func, rec *assess.Draw) {
		if rec == nil || rec.Failed != "" || rec.Index >= limit {
			return
		}
		for _, x := range grid {
			rec.Extra = append(rec.Extra, f.Eval(x))
		}
	}
}

// Add takes a block of draw records; it has the signature of
// assess.Options.Sink. Each record counts by its Index, so the blocks may
// come in any order and from any subset of the draws (a shard, or the
// draws after a restored state), as long as no draw is added twice.
func (c *Collector) Add(block []assess.Draw) error {
	for i := range block {
		c.add(&block[i])
	}
	return nil
}

// threshold is the k-th checkpoint, FirstCheckpoint·2^k, and false when
// it does not fit in an int64.
func (c *Collector) threshold(k int) (int64, bool) {
	fc := int64(c.cfg.FirstCheckpoint)
	if k < 0 || k >= 63 || fc > math.MaxInt64>>k {
		return 0, false
	}
	return fc << k, true
}

func (c *Collector) add(rec *assess.Draw) {
	i := int64(rec.Index)
	// A draw at or past an open threshold closes it: every draw seen
	// before has a smaller index, so the counts so far are its counts.
	for {
		t, ok := c.threshold(len(c.closed))
		if !ok || t > i {
			break
		}
		c.closed = append(c.closed, c.now.clone())
	}
	c.count(&c.now, rec)
	// A draw below closed thresholds (out of index order) counts there too.
	for k := len(c.closed) - 1; k >= 0; k-- {
		if t, _ := c.threshold(k); t <= i {
			break
		}
		c.count(&c.closed[k], rec)
	}
	if rec.Failed != "" {
		return
	}
	if g := len(c.grid); rec.Index < c.cfg.BandDraws && len(rec.Extra) >= g {
		c.bandDraws++
		for j, v := range rec.Extra[:g] {
			if !c.band[j].Add(v) {
				c.undefined[j]++
			}
		}
	}
	for k := range c.slopes {
		if k < len(rec.Tracked) && rec.Tracked[k].Exists {
			c.slopes[k].Add(rec.Tracked[k].Slope) // NaN and ±Inf are left out
		}
	}
}

// count adds the draw to the running counts n.
func (c *Collector) count(n *counts, rec *assess.Draw) {
	n.draws++
	if rec.Failed != "" {
		return
	}
	n.ok++
	for k := range c.labels {
		if k >= len(rec.Tracked) {
			break
		}
		td := &rec.Tracked[k]
		if td.Exists {
			n.exists[k]++
			switch td.Class {
			case steady.Stable:
				n.attracting[k]++
			case steady.Semistable:
				n.semistable[k]++
			}
		}
		if c.current && rec.Outcome == c.labels[k] {
			n.ends[k]++
		}
	}
}

func (c *Collector) checkpoint(n *counts) Checkpoint {
	cp := Checkpoint{
		Draws:      n.draws,
		Succeeded:  n.ok,
		Exists:     slices.Clone(n.exists),
		Attracting: slices.Clone(n.attracting),
		Semistable: slices.Clone(n.semistable),
	}
	if c.current {
		cp.Current = slices.Clone(n.ends)
	}
	return cp
}

// Levels are the quantile levels of every Band: assess.QuantileLevels.
var Levels = assess.QuantileLevels

// Band is the distribution of f(x) over the band's draws at one grid
// point: N finite values with quantiles Q at Levels (NaN when N = 0), and
// the number of draws where f is undefined or infinite there.
type Band struct {
	N, Undefined int64
	Q            [5]float64
}

// Histogram counts the slopes f'(x*) of one tracked equilibrium over the
// draws where it exists (and the slope is finite): Counts[i] those in
// [Edges[i], Edges[i+1]) (the last bin closed), Below and Above those
// outside the binned range, N the total including them. Edges is nil when
// no slope was seen.
//
// The slopes are kept in a quantile sketch (agg.Sketch, relative accuracy
// agg.Alpha = 0.1%), which merges exactly. The bins span the sketch's
// 0.5% to 99.5% quantiles (ranks ⌊0.005(N−1)⌋ and ⌈0.995(N−1)⌉), widened
// to include zero and padded by 2% of the span on each side, in equal
// widths; each sketch bucket is counted in the bin holding its
// representative value. So N is exact, and each count is exact up to the
// slopes within 0.1% (relative) of a bin edge, which may fall in the
// neighbouring bin (or Below/Above).
type Histogram struct {
	Label        string
	Edges        []float64
	Counts       []int64
	Below, Above int64
	N            int64
}

// Checkpoint holds running counts over Draws draws: the successful draws
// and, per tracked equilibrium, the draws where it exists, attracts (class
// stable), is semistable, and where the state ends there from the current
// state (Current is nil without a current state). Each probability the
// run reports is such a count over Succeeded. The checkpoint at threshold
// c = FirstCheckpoint·2^k counts the draws of index below c, so for a
// run of draws 0…n−1 (whole, or merged from its shards) it holds the
// first c draws and Draws = c.
type Checkpoint struct {
	Draws      int64
	Succeeded  int64
	Exists     []int64
	Attracting []int64
	Semistable []int64
	Current    []int64
}

// Summary is the result of a Collector.
type Summary struct {
	// Config is the collector's configuration, defaults filled in.
	Config Config
	// Labels are the tracked equilibria E1, E2, ….
	Labels []string
	// Grid and Band: the band of the rate curve; BandDraws is the number of
	// successful draws that entered it.
	Grid      []float64
	Band      []Band
	BandDraws int64
	// NominalX and NominalF: the rate curve at nominal values (NaN where f
	// is undefined).
	NominalX, NominalF []float64
	// Slopes holds a histogram per tracked equilibrium.
	Slopes []Histogram
	// Running holds the checkpoints at the thresholds c = FirstCheckpoint·2^k
	// with c at most the number of draws seen, then one over all the draws
	// seen when it differs from the last.
	Running []Checkpoint
}

// Summary returns what was collected so far. It does not change the
// Collector: calling it again, or after further Add or Merge calls, gives
// the summary of the draws seen by then.
func (c *Collector) Summary() *Summary {
	s := &Summary{
		Config:    c.cfg,
		Labels:    slices.Clone(c.labels),
		Grid:      slices.Clone(c.grid),
		BandDraws: c.bandDraws,
		NominalX:  slices.Clone(c.nomX),
		NominalF:  slices.Clone(c.nomF),
	}
	for g, sk := range c.band {
		b := Band{N: sk.Count(), Undefined: c.undefined[g]}
		for i, l := range Levels {
			b.Q[i] = sk.Quantile(l)
		}
		s.Band = append(s.Band, b)
	}
	for k, sk := range c.slopes {
		s.Slopes = append(s.Slopes, histogram(c.labels[k], sk, c.cfg.Bins))
	}
	seen := c.now.draws
	for k := 0; ; k++ {
		t, ok := c.threshold(k)
		if !ok || t > seen {
			break
		}
		n := &c.now
		if k < len(c.closed) {
			n = &c.closed[k]
		}
		s.Running = append(s.Running, c.checkpoint(n))
	}
	if n := len(s.Running); seen > 0 && (n == 0 || s.Running[n-1].Draws != seen) {
		s.Running = append(s.Running, c.checkpoint(&c.now))
	}
	return s
}

// histogram bins the slopes recorded in sk on bins chosen from them: the
// order statistics of rank ⌊0.005(n−1)⌋ and ⌈0.995(n−1)⌉ as the sketch
// reads them, widened to include zero (the line between attracting and
// repelling) and padded by 2% of the span on each side, in equal widths.
// Each sketch bucket is counted, whole, in the bin of its representative
// value, so a slope within the sketch's relative resolution agg.Alpha of
// a bin edge may be counted in the bin beside its own.
func histogram(label string, sk *agg.Sketch, bins int) Histogram {
	out := Histogram{Label: label, N: sk.Count()}
	n := sk.Count()
	if n == 0 {
		return out
	}
	lo := rankValue(sk, int64(math.Floor(0.005*float64(n-1))))
	hi := rankValue(sk, int64(math.Ceil(0.995*float64(n-1))))
	lo, hi = math.Min(lo, 0), math.Max(hi, 0)
	if hi == lo {
		lo, hi = -1, 1
	}
	pad := 0.02 * (hi - lo)
	lo, width := lo-pad, (hi-lo+2*pad)/float64(bins)
	out.Edges = make([]float64, bins+1)
	for i := range out.Edges {
		out.Edges[i] = lo + float64(i)*width
	}
	out.Counts = make([]int64, bins)
	top := out.Edges[bins]
	sk.Buckets(func(v float64, c int64) {
		switch {
		case v < lo:
			out.Below += c
		case v > top:
			out.Above += c
		default:
			i := int((v - lo) / width)
			out.Counts[max(0, min(i, bins-1))] += c
		}
	})
	return out
}

// rankValue is the value of 0-based rank r among the values recorded in
// sk, as its buckets represent them (the last one past the end).
func rankValue(sk *agg.Sketch, r int64) float64 {
	var acc int64
	v, found := math.NaN(), false
	sk.Buckets(func(b float64, c int64) {
		if found {
			return
		}
		v, acc = b, acc+c
		found = acc > r
	})
	return v
}
