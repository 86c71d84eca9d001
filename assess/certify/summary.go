package certify

import (
	"cmp"
	"fmt"
	"slices"
	"strings"

	"holdfast/assess"
	"holdfast/assess/agg"
	"holdfast/assess/steady"
)

// Summary aggregates the hook's per-draw fields, fed block by block from
// assess.Options.Sink (alone or beside other sinks). It is not safe for
// concurrent use; the engine calls the sink from one goroutine, in draw
// order, so the result does not depend on the number of workers.
type Summary struct {
	seen, checked, certified, unresolved int64
	evals                                int64
	maxWidth                             float64
	all                                  map[uint64]int64    // scan pattern code (patternCode)
	cert                                 map[[2]uint64]int64 // certified roots: count, repelling bits
	disagreed                            int64
	kinds                                map[Kind]*listed
	listed                               []Disagreeing
}

// MaxListed is the number of disagreeing draws a Summary lists by index.
const MaxListed = 100

type listed struct {
	n     int64
	first []int
}

// Disagreeing is one draw whose scan and certification disagree.
type Disagreeing struct {
	Draw  int
	Flags Kind
}

// NewSummary returns an empty Summary.
func NewSummary() *Summary {
	return &Summary{all: map[uint64]int64{}, cert: map[[2]uint64]int64{}, kinds: map[Kind]*listed{}}
}

// Add takes a block of draw records in draw order; it has the signature of
// assess.Options.Sink. Records without the hook's fields (Fields) are
// counted as seen only.
func (s *Summary) Add(block []assess.Draw) error {
	for i := range block {
		s.add(&block[i])
	}
	return nil
}

func (s *Summary) add(rec *assess.Draw) {
	s.seen++
	d, ok := Fields(rec)
	if !ok || d.Status == 0 || rec.Failed != "" {
		return
	}
	s.checked++
	s.evals += int64(d.Evals)
	s.all[patternCode(rec.Pattern)]++
	switch d.Status {
	case Certified:
		s.certified++
		key := [2]uint64{uint64(d.Roots), d.Repelling}
		if d.PatternBad {
			key = [2]uint64{0, 1} // more than 52 roots
		}
		s.cert[key]++
	case Unresolved:
		s.unresolved++
		s.maxWidth = max(s.maxWidth, d.MaxWidth)
	}
	if d.Flags != 0 {
		s.disagreed++
		if len(s.listed) < MaxListed {
			s.listed = append(s.listed, Disagreeing{Draw: rec.Index, Flags: d.Flags})
		}
		for k := MissedByScan; k <= SidesDiffer; k <<= 1 {
			if d.Flags&k == 0 {
				continue
			}
			l := s.kinds[k]
			if l == nil {
				l = &listed{}
				s.kinds[k] = l
			}
			l.n++
			if len(l.first) < 5 {
				l.first = append(l.first, rec.Index)
			}
		}
	}
}

// patternCode encodes the scan's ordered classes without allocating: a
// leading 1 bit, then 3 bits per equilibrium (the Class), for up to 20
// equilibria; 0 for more.
func patternCode(p []steady.Class) uint64 {
	if len(p) > 20 {
		return 0
	}
	key := uint64(1)
	for _, c := range p {
		key = key<<3 | uint64(c)&7
	}
	return key
}

// scanPattern names a pattern code's classes as the engine's regimes do
// ("stable", "unstable", "degenerate"); a semistable equilibrium, whose
// side the record does not keep, is "semistable".
func scanPattern(key uint64) []string {
	if key == 0 {
		return []string{"more than 20 equilibria"}
	}
	p := []string{}
	for ; key > 1; key >>= 3 {
		p = append(p, steady.Class(key&7).String())
	}
	slices.Reverse(p)
	return p
}

// certPattern names the certified roots' classes in order.
func certPattern(key [2]uint64) []string {
	if key == [2]uint64{0, 1} {
		return []string{"more than 52 equilibria"}
	}
	names := make([]string, key[0])
	for i := range names {
		names[i] = steady.Stable.String()
		if key[1]>>i&1 == 1 {
			names[i] = steady.Unstable.String()
		}
	}
	return names
}

// Result is the summary of the certification over a Monte Carlo run.
type Result struct {
	// Draws is the number of records seen, Checked the successful draws
	// that were certified or left unresolved.
	Draws, Checked int64
	// Certified is the share of checked draws that are certified, with
	// its 95% interval (Wilson; Clopper–Pearson at 0 or N).
	Certified assess.Probability
	// Unresolved counts the checked draws left unresolved; MaxWidth is the
	// widest unresolved interval among them.
	Unresolved int64
	MaxWidth   float64
	// Regimes are the ordered patterns of classes over all checked draws
	// (from the scan), CertifiedRegimes those over certified draws alone
	// (from the certification, where every root is proven), each with its
	// probability among its own draws.
	Regimes, CertifiedRegimes []assess.Regime
	// Disagreeing counts the draws where scan and certification disagree;
	// ByKind counts them by kind with the first draw indices; Listed gives
	// the first MaxListed such draws in draw order.
	Disagreeing int64
	ByKind      []assess.Counted
	Listed      []Disagreeing
	// EvalsPerDraw is the mean number of interval evaluations per
	// checked draw.
	EvalsPerDraw float64
}

// Result returns the summary so far.
func (s *Summary) Result() *Result {
	r := &Result{
		Draws:       s.seen,
		Checked:     s.checked,
		Certified:   probability(s.certified, s.checked),
		Unresolved:  s.unresolved,
		MaxWidth:    s.maxWidth,
		Disagreeing: s.disagreed,
		Listed:      slices.Clone(s.listed),
	}
	if s.checked > 0 {
		r.EvalsPerDraw = float64(s.evals) / float64(s.checked)
	}
	for key, v := range s.all {
		r.Regimes = append(r.Regimes, assess.Regime{Pattern: scanPattern(key), P: probability(v, s.checked)})
	}
	for key, v := range s.cert {
		r.CertifiedRegimes = append(r.CertifiedRegimes, assess.Regime{Pattern: certPattern(key), P: probability(v, s.certified)})
	}
	sortRegimes(r.Regimes)
	sortRegimes(r.CertifiedRegimes)
	for k := MissedByScan; k <= SidesDiffer; k <<= 1 {
		if l := s.kinds[k]; l != nil {
			r.ByKind = append(r.ByKind, assess.Counted{Reason: k.String(), Draws: l.n, First: slices.Clone(l.first)})
		}
	}
	slices.SortStableFunc(r.ByKind, func(a, b assess.Counted) int { return cmp.Compare(b.Draws, a.Draws) })
	return r
}

// Warnings returns one line per listed disagreeing draw, naming its index
// so that it can be replayed.
func (r *Result) Warnings() []string {
	var w []string
	for _, d := range r.Listed {
		var kinds []string
		for k := MissedByScan; k <= SidesDiffer; k <<= 1 {
			if d.Flags&k != 0 {
				kinds = append(kinds, k.String())
			}
		}
		w = append(w, fmt.Sprintf("draw %d: scan and certification disagree (%s)", d.Draw, strings.Join(kinds, "; ")))
	}
	if n := r.Disagreeing - int64(len(r.Listed)); n > 0 {
		w = append(w, fmt.Sprintf("… and %d more disagreeing draws", n))
	}
	return w
}

func probability(k, n int64) assess.Probability {
	p := assess.Probability{Count: k, N: n}
	if n > 0 {
		pr := agg.Proportion{K: k, N: n}
		lo, hi := pr.Interval(0.95)
		p.P, p.CI = pr.Estimate(), [2]float64{lo, hi}
	}
	return p
}

func sortRegimes(rs []assess.Regime) {
	slices.SortFunc(rs, func(x, y assess.Regime) int {
		return cmp.Or(cmp.Compare(y.P.Count, x.P.Count), cmp.Compare(strings.Join(x.Pattern, "/"), strings.Join(y.Pattern, "/")))
	})
}
