package sensitivity

import (
	"fmt"
	"math"
	"slices"

	"holdfast/assess"
)

// DefaultScreenCap is the cap of a Screen when none is given: it keeps the
// successful draws whose index is below 65,536.
const DefaultScreenCap = 1 << 16

// Screen accumulates the engine's per-draw records for the screening
// measures: for every tracked equilibrium and every output (see Output),
// Spearman's rank correlation and the partial rank correlation of each
// input with the output and, for the yes/no outputs, the split test of
// Spear & Hornberger (1980).
//
// Memory is bounded by the cap: a Screen keeps the successful draws whose
// global draw index (assess.Draw.Index) is below Cap, in index order, and
// only counts the others (failed draws, and draws at index Cap or beyond).
// Which draws are kept thus depends only on each draw itself, never on
// the draws before it, so a run split into shards (draw i to shard
// i mod N) or into pieces (a checkpoint, then a resumed run) can screen
// each part on its own and combine the parts with Merge, through the
// stored form of MarshalJSON and UnmarshalJSON when the parts run in
// separate processes: the combined Result is the one of a single Screen
// fed every draw. For a single run this differs from the earlier
// definition, the first Cap successful draws in draw order, only when
// draws below the cap fail: they are not made up by later draws, so fewer
// than Cap are kept. (Run screens the runs of the base matrices A and B,
// numbered by their run index in the Saltelli design.)
//
// The result depends only on the set of draws added, not on the block
// sizes, the order of Add calls or the number of workers. Each draw must be
// added once; a kept draw added twice is an error. Add has the signature
// of assess.Options.Sink. A Screen is not safe for concurrent use.
type Screen struct {
	names   []string
	fixed   []bool
	unc     []int // parameter index of each uncertain input
	cap     int
	current bool

	seen, failed int
	nTracked     int // learnt from the first kept draw

	index   []int       // global draw index of each kept draw, increasing
	theta   [][]float64 // [uncertain input][kept draw]
	outputs [][]float64 // [tracked·numOutputs + output][kept draw]
}

// NewScreen returns a Screen for the model's parameters keeping the
// successful draws with index below cap (0: DefaultScreenCap).
func NewScreen(m *assess.Model, cap int) *Screen {
	if cap <= 0 {
		cap = DefaultScreenCap
	}
	s := &Screen{names: m.Names, fixed: make([]bool, len(m.Names)), cap: cap, current: m.Scenario.State.HasCurrent}
	for i, p := range m.Scenario.Params {
		s.fixed[i] = p.Dist == nil
		if p.Dist != nil {
			s.unc = append(s.unc, i)
		}
	}
	s.theta = make([][]float64, len(s.unc))
	return s
}

// Add takes a block of draw records. It copies what it keeps, so the
// records may be reused after the call. It fails on a record with a
// negative index or the wrong number of parameters, and on a kept draw
// added twice; the records before the bad one are added.
func (s *Screen) Add(block []assess.Draw) error {
	for i := range block {
		if err := s.addDraw(&block[i]); err != nil {
			return err
		}
	}
	return nil
}

// add adds one record, for Run, whose records are always well formed.
func (s *Screen) add(rec *assess.Draw) { _ = s.addDraw(rec) }

func (s *Screen) addDraw(rec *assess.Draw) error {
	i := rec.Index
	if i < 0 {
		return fmt.Errorf("screen: draw index %d is negative", i)
	}
	if len(rec.Theta) != len(s.names) {
		return fmt.Errorf("screen: draw %d has %d parameters, the model %d", i, len(rec.Theta), len(s.names))
	}
	if rec.Failed != "" {
		s.seen++
		s.failed++
		return nil
	}
	if i >= s.cap {
		s.seen++
		return nil
	}
	pos := len(s.index)
	if pos > 0 && i <= s.index[pos-1] {
		var found bool
		if pos, found = slices.BinarySearch(s.index, i); found {
			return fmt.Errorf("screen: draw %d added twice", i)
		}
	}
	if len(s.index) == 0 {
		s.nTracked = len(rec.Tracked)
		s.outputs = make([][]float64, s.nTracked*int(numOutputs))
	}
	s.seen++
	s.index = slices.Insert(s.index, pos, i)
	for j, p := range s.unc {
		s.theta[j] = slices.Insert(s.theta[j], pos, rec.Theta[p])
	}
	for t := range s.nTracked {
		label := assess.Label(t)
		for o := range numOutputs {
			v := math.NaN()
			if o != Current || s.current {
				v = o.value(rec, t, label)
			}
			c := &s.outputs[t*int(numOutputs)+int(o)]
			*c = slices.Insert(*c, pos, v)
		}
	}
	return nil
}

// Screening is the result of a Screen.
type Screening struct {
	// Names are the parameter names; Fixed marks those that are not
	// uncertain (every measure is zero for them).
	Names []string
	Fixed []bool
	// Seen is the number of draws received, Failed those that failed,
	// Kept the successful ones with draw index below Cap, which are the
	// ones analysed. The other Seen − Failed − Kept draws succeeded but lie
	// at index Cap or beyond; Capped is set when there are any. Failed
	// counts failed draws at every index.
	Seen, Failed, Kept, Cap int
	Capped                  bool
	// Equilibria holds the measures per tracked equilibrium E1, E2, ….
	Equilibria []ScreenEq
}

// ScreenEq holds the screening measures of one tracked equilibrium, per
// output (indexed by Output). Outputs[Current] is nil without a current
// state.
type ScreenEq struct {
	Label   string
	Outputs [numOutputs]*Measures
}

// Measures are the screening measures of one output, per parameter.
type Measures struct {
	// N is the number of draws where the output is defined.
	N int
	// Spearman and PRCC are the rank and partial rank correlations of each
	// parameter with the output (0 for fixed parameters; NaN where
	// undefined, e.g. the output does not vary).
	Spearman, PRCC []float64
	// Split is the split test of each parameter on the yes/no outputs
	// (nil for continuous ones); D = 0, P = 1 for fixed parameters.
	Split []Split
}

// Of returns the measures of output o for the tracked equilibrium with the
// given label, or nil.
func (r *Screening) Of(label string, o Output) *Measures {
	if r == nil || o < 0 || o >= numOutputs {
		return nil
	}
	for i := range r.Equilibria {
		if r.Equilibria[i].Label == label {
			return r.Equilibria[i].Outputs[o]
		}
	}
	return nil
}

// Result computes the screening measures of the draws kept so far.
func (s *Screen) Result() *Screening {
	r := &Screening{
		Names: s.names, Fixed: s.fixed,
		Seen: s.seen, Failed: s.failed, Kept: len(s.index), Cap: s.cap,
		Capped: s.seen-s.failed-len(s.index) > 0,
	}
	var full, sub rankCache
	for t := range s.nTracked {
		eq := ScreenEq{Label: assess.Label(t)}
		for o := range numOutputs {
			if o == Current && !s.current {
				continue
			}
			cache := &sub
			if o.Indicator() {
				cache = &full
			}
			eq.Outputs[o] = s.measures(s.outputs[t*int(numOutputs)+int(o)], o.Indicator(), cache)
		}
		r.Equilibria = append(r.Equilibria, eq)
	}
	return r
}

// rankCache holds the centred ranks of the uncertain inputs over one
// subset of the kept draws, so that outputs defined on the same draws
// share them.
type rankCache struct {
	keep  []int
	ranks [][]float64
	xs    [][]float64 // the inputs' values over the subset
}

// ranksOver returns the inputs' values and centred ranks over the draws
// keep, computing them only when the subset differs from the cached one.
func (s *Screen) ranksOver(keep []int, c *rankCache) *rankCache {
	if c.ranks != nil && slices.Equal(keep, c.keep) {
		return c
	}
	c.keep = keep
	c.xs = make([][]float64, len(s.unc))
	c.ranks = make([][]float64, len(s.unc))
	for j := range s.unc {
		c.xs[j] = make([]float64, len(keep))
		for i, d := range keep {
			c.xs[j][i] = s.theta[j][d]
		}
		c.ranks[j] = centred(Ranks(c.xs[j]))
	}
	return c
}

// measures computes the measures of one output column over the draws
// where it is defined.
func (s *Screen) measures(y []float64, ind bool, cache *rankCache) *Measures {
	np := len(s.names)
	m := &Measures{Spearman: make([]float64, np), PRCC: make([]float64, np)}
	var keep []int
	for i, v := range y {
		if !math.IsNaN(v) {
			keep = append(keep, i)
		}
	}
	m.N = len(keep)
	ys := make([]float64, len(keep))
	for i, d := range keep {
		ys[i] = y[d]
	}
	c := s.ranksOver(keep, cache)
	ry := centred(Ranks(ys))
	// Spearman's coefficient is Pearson's on the midranks; the ranks are
	// centred, so it is Σ r_x r_y / √(Σ r_x² Σ r_y²).
	for j, p := range s.unc {
		m.Spearman[p] = pearsonCentred(c.ranks[j], ry)
	}
	if len(keep) >= len(s.unc)+2 {
		prcc := prccRanks(append(slices.Clone(c.ranks), ry))
		for j, p := range s.unc {
			m.PRCC[p] = prcc[j]
		}
	} else {
		for _, p := range s.unc {
			m.PRCC[p] = math.NaN()
		}
	}
	if ind {
		m.Split = make([]Split, np)
		var n1 int
		for _, v := range ys {
			if v == 1 {
				n1++
			}
		}
		for p := range np {
			m.Split[p] = Split{D: 0, P: 1, N1: n1, N0: len(ys) - n1}
		}
		for j, p := range s.unc {
			a := make([]float64, 0, n1)
			b := make([]float64, 0, len(ys)-n1)
			for i, v := range ys {
				if v == 1 {
					a = append(a, c.xs[j][i])
				} else {
					b = append(b, c.xs[j][i])
				}
			}
			d, pv := KSTest(a, b)
			m.Split[p] = Split{D: d, P: pv, N1: len(a), N0: len(b)}
		}
	}
	return m
}

// pearsonCentred is the correlation of two centred samples, NaN when
// either is constant or they hold fewer than 2 values.
func pearsonCentred(x, y []float64) float64 {
	if len(x) < 2 {
		return math.NaN()
	}
	var sxy, sxx, syy float64
	for i := range x {
		sxy += x[i] * y[i]
		sxx += x[i] * x[i]
		syy += y[i] * y[i]
	}
	if sxx == 0 || syy == 0 {
		return math.NaN()
	}
	return sxy / math.Sqrt(sxx*syy)
}
