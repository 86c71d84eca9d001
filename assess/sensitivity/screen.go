package sensitivity

import (
	"math"
	"slices"

	"holdfast/assess"
)

// DefaultScreenCap is the number of draws a Screen keeps when none is
// given: the first 65,536 successful draws in draw order.
const DefaultScreenCap = 1 << 16

// Screen accumulates the engine's per-draw records for the screening
// measures: for every tracked equilibrium and every output (see Output),
// Spearman's rank correlation and the partial rank correlation of each
// input with the output and, for the yes/no outputs, the split test of
// Spear & Hornberger (1980).
//
// Memory is bounded: a Screen keeps at most Cap successful draws, the first
// ones in draw order, and counts the rest (Screening.Capped says so).
// Because the engine delivers records in draw order, the result is the
// same for any number of workers. Add has the signature of
// assess.Options.Sink. A Screen is not safe for concurrent use.
type Screen struct {
	names []string
	fixed []bool
	unc   []int // parameter index of each uncertain input
	cap   int

	seen, failed, kept int
	capped             bool
	nTracked           int
	current            bool

	theta   [][]float64 // [uncertain input][draw]
	outputs [][]float64 // [tracked·numOutputs + output][draw]
}

// NewScreen returns a Screen for the model's parameters keeping at most
// cap draws (0: DefaultScreenCap).
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

// Add takes a block of draw records (in draw order).
func (s *Screen) Add(block []assess.Draw) error {
	for i := range block {
		s.add(&block[i])
	}
	return nil
}

func (s *Screen) add(rec *assess.Draw) {
	s.seen++
	if rec.Failed != "" {
		s.failed++
		return
	}
	if s.kept == s.cap {
		s.capped = true
		return
	}
	if s.kept == 0 {
		s.nTracked = len(rec.Tracked)
		s.outputs = make([][]float64, s.nTracked*int(numOutputs))
	}
	for j, p := range s.unc {
		s.theta[j] = append(s.theta[j], rec.Theta[p])
	}
	for t := range s.nTracked {
		label := assess.Label(t)
		for o := range numOutputs {
			v := math.NaN()
			if o != Current || s.current {
				v = o.value(rec, t, label)
			}
			c := &s.outputs[t*int(numOutputs)+int(o)]
			*c = append(*c, v)
		}
	}
	s.kept++
}

// Screening is the result of a Screen.
type Screening struct {
	// Names are the parameter names; Fixed marks those that are not
	// uncertain (every measure is zero for them).
	Names []string
	Fixed []bool
	// Seen is the number of draws received, Failed those that failed,
	// Kept those analysed (at most Cap). Capped is set when draws were left
	// out because Cap was reached.
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
		Seen: s.seen, Failed: s.failed, Kept: s.kept, Cap: s.cap, Capped: s.capped,
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
