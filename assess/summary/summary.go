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
	// PilotDraws is the number of slopes per equilibrium that fix the bins
	// of its histogram (default 1000).
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
type Collector struct {
	cfg     Config
	grid    []float64
	labels  []string
	current bool

	nomX, nomF []float64

	seen, ok  int64
	bandDraws int64
	band      []*agg.Sketch
	undefined []int64

	hist []slopeHist

	exists, attracting, semistable, ends []int64
	next                                 int64
	running                              []Checkpoint
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
		cfg:        cfg,
		grid:       Grid(m.Domain, cfg.GridPoints),
		current:    m.Scenario.State.HasCurrent,
		band:       make([]*agg.Sketch, cfg.GridPoints),
		undefined:  make([]int64, cfg.GridPoints),
		hist:       make([]slopeHist, nt),
		exists:     make([]int64, nt),
		attracting: make([]int64, nt),
		semistable: make([]int64, nt),
		ends:       make([]int64, nt),
		next:       int64(cfg.FirstCheckpoint),
	}
	for k := range nt {
		c.labels = append(c.labels, nominal.Equilibria[k].Label)
		c.hist[k] = slopeHist{bins: cfg.Bins, pilotCap: cfg.PilotDraws}
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

// Add takes a block of draw records in draw order; it has the signature
// of assess.Options.Sink.
func (c *Collector) Add(block []assess.Draw) error {
	for i := range block {
		c.add(&block[i])
	}
	return nil
}

func (c *Collector) add(rec *assess.Draw) {
	c.seen++
	if rec.Failed == "" {
		c.ok++
		if g := len(c.grid); rec.Index < c.cfg.BandDraws && len(rec.Extra) >= g {
			c.bandDraws++
			for j, v := range rec.Extra[:g] {
				if !c.band[j].Add(v) {
					c.undefined[j]++
				}
			}
		}
		for k := range c.labels {
			if k >= len(rec.Tracked) {
				break
			}
			td := &rec.Tracked[k]
			if td.Exists {
				c.exists[k]++
				c.hist[k].add(td.Slope)
				switch td.Class {
				case steady.Stable:
					c.attracting[k]++
				case steady.Semistable:
					c.semistable[k]++
				}
			}
			if rec.Outcome == c.labels[k] {
				c.ends[k]++
			}
		}
	}
	if c.seen == c.next {
		c.checkpoint()
		c.next *= 2
	}
}

func (c *Collector) checkpoint() { c.running = append(c.running, c.snapshot()) }

func (c *Collector) snapshot() Checkpoint {
	cp := Checkpoint{
		Draws:      c.seen,
		Succeeded:  c.ok,
		Exists:     slices.Clone(c.exists),
		Attracting: slices.Clone(c.attracting),
		Semistable: slices.Clone(c.semistable),
	}
	if c.current {
		cp.Current = slices.Clone(c.ends)
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
// draws where it exists: Counts[i] those in [Edges[i], Edges[i+1]) (the
// last bin closed), Below and Above those outside the binned range, N the
// total including them. Edges is nil when no slope was seen.
type Histogram struct {
	Label        string
	Edges        []float64
	Counts       []int64
	Below, Above int64
	N            int64
}

// Checkpoint holds the running counts after the first Draws draws (in
// draw order): the successful draws and, per tracked equilibrium, the
// draws where it exists, attracts (class stable), is semistable, and where
// the state ends there from the current state (Current is nil without a
// current state). Each probability the run reports is such a count over
// Succeeded.
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
	// Running holds the checkpoints at FirstCheckpoint·2^k draws and at the
	// last draw.
	Running []Checkpoint
}

// Summary returns what was collected so far. It may be called once the
// run is over; calling it again gives the same result.
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
	for k := range c.hist {
		s.Slopes = append(s.Slopes, c.hist[k].result(c.labels[k]))
	}
	s.Running = slices.Clone(c.running)
	if n := len(s.Running); c.seen > 0 && (n == 0 || s.Running[n-1].Draws != c.seen) {
		s.Running = append(s.Running, c.snapshot())
	}
	return s
}

// slopeHist bins slopes on edges fixed by a pilot of the first values.
type slopeHist struct {
	bins, pilotCap int
	pilot          []float64
	lo, width      float64
	counts         []int64
	below, above   int64
	n              int64
}

func (h *slopeHist) add(v float64) {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return
	}
	h.n++
	if h.counts == nil {
		h.pilot = append(h.pilot, v)
		if len(h.pilot) >= h.pilotCap {
			h.fix()
		}
		return
	}
	h.bin(v)
}

// fix sets the bins from the pilot: the 0.5% to 99.5% order statistics,
// widened to include zero (the line between attracting and repelling)
// and padded by 2% of the span on each side, in equal widths.
func (h *slopeHist) fix() {
	s := slices.Clone(h.pilot)
	slices.Sort(s)
	n := len(s)
	lo := s[int(math.Floor(0.005*float64(n-1)))]
	hi := s[int(math.Ceil(0.995*float64(n-1)))]
	lo, hi = math.Min(lo, 0), math.Max(hi, 0)
	if hi == lo {
		lo, hi = -1, 1
	}
	pad := 0.02 * (hi - lo)
	h.lo, h.width = lo-pad, (hi-lo+2*pad)/float64(h.bins)
	h.counts = make([]int64, h.bins)
	for _, v := range h.pilot {
		h.bin(v)
	}
	h.pilot = nil
}

func (h *slopeHist) edge(i int) float64 { return h.lo + float64(i)*h.width }

func (h *slopeHist) bin(v float64) {
	switch {
	case v < h.lo:
		h.below++
	case v > h.edge(h.bins):
		h.above++
	default:
		i := min(int((v-h.lo)/h.width), h.bins-1)
		h.counts[i]++
	}
}

func (h *slopeHist) result(label string) Histogram {
	out := Histogram{Label: label, N: h.n}
	hh := *h
	hh.pilot = slices.Clone(h.pilot)
	hh.counts = slices.Clone(h.counts)
	if hh.counts == nil && len(hh.pilot) > 0 {
		hh.fix()
	}
	if hh.counts == nil {
		return out
	}
	out.Edges = make([]float64, hh.bins+1)
	for i := range out.Edges {
		out.Edges[i] = hh.edge(i)
	}
	out.Counts, out.Below, out.Above = hh.counts, hh.below, hh.above
	return out
}
