package certify

import (
	"cmp"
	"errors"
	"fmt"
	"math/bits"
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
//
// A Summary is mergeable and resumable: a run split into shards (draws
// i ≡ K mod N) or into contiguous pieces gives, with one Summary per part
// merged in any order (Merge), the Result of one Summary fed every draw;
// MarshalJSON and UnmarshalJSON keep its exact state between the pieces.
// Every count is an integer, the widest unresolved interval merges by
// max, and the listed draws are kept by global index (the smallest ones,
// whatever order the records come in), so that merging keeps the first
// ones of the whole run.
type Summary struct {
	seen, checked, certified, unresolved int64
	evals                                int64
	maxWidth                             float64
	all                                  map[uint64]int64    // scan pattern code (patternCode)
	cert                                 map[[2]uint64]int64 // certified roots: count, repelling bits
	disagreed                            int64
	kinds                                map[Kind]*listed
	listed                               []Disagreeing // the smallest indices, sorted
}

// MaxListed is the number of disagreeing draws a Summary lists by index.
const MaxListed = 100

// maxFirst is the number of draw indices kept per kind of disagreement.
const maxFirst = 5

type listed struct {
	n     int64
	first []int // the smallest indices, sorted
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

// init makes the maps of a zero Summary.
func (s *Summary) init() {
	if s.all == nil {
		s.all = map[uint64]int64{}
	}
	if s.cert == nil {
		s.cert = map[[2]uint64]int64{}
	}
	if s.kinds == nil {
		s.kinds = map[Kind]*listed{}
	}
}

// Add takes a block of draw records in draw order; it has the signature of
// assess.Options.Sink. Records without the hook's fields (Fields) are
// counted as seen only.
func (s *Summary) Add(block []assess.Draw) error {
	s.init()
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
	s.all[patternCode(rec.Pattern, d.Sides, d.SidesKnown)]++
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
		s.listed = keepFirst(s.listed, Disagreeing{Draw: rec.Index, Flags: d.Flags}, MaxListed, func(d Disagreeing) int { return d.Draw })
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
			l.first = keepFirst(l.first, rec.Index, maxFirst, func(i int) int { return i })
		}
	}
}

// keepFirst inserts v into list, sorted by index and holding at most n
// elements, keeping the n smallest indices (an equal index goes after
// those already there). Records arriving in increasing index are
// appended until the list is full.
func keepFirst[T any](list []T, v T, n int, index func(T) int) []T {
	k := len(list)
	for k > 0 && index(list[k-1]) > index(v) {
		k--
	}
	switch {
	case k == n:
		return list
	case len(list) < n:
		return slices.Insert(list, k, v)
	}
	copy(list[k+1:], list[k:len(list)-1])
	list[k] = v
	return list
}

// Merge adds the draws of o, a Summary over other draws of the same run
// (another shard, or another piece of the draw range), to s. The result
// is the Summary of one run over both sets of draws, whatever the order of
// merging. It fails, leaving s unchanged, when o is s or when both list
// the same draw (they overlap).
func (s *Summary) Merge(o *Summary) error {
	switch {
	case o == nil:
		return errors.New("certify: merge with a nil summary")
	case o == s:
		return errors.New("certify: merge of a summary with itself")
	}
	for _, d := range o.listed {
		if _, dup := slices.BinarySearchFunc(s.listed, d.Draw, func(e Disagreeing, i int) int { return cmp.Compare(e.Draw, i) }); dup {
			return fmt.Errorf("certify: merge: draw %d is in both summaries", d.Draw)
		}
	}
	s.init()
	s.seen += o.seen
	s.checked += o.checked
	s.certified += o.certified
	s.unresolved += o.unresolved
	s.evals += o.evals
	s.maxWidth = max(s.maxWidth, o.maxWidth)
	for k, v := range o.all {
		s.all[k] += v
	}
	for k, v := range o.cert {
		s.cert[k] += v
	}
	s.disagreed += o.disagreed
	for _, d := range o.listed {
		s.listed = keepFirst(s.listed, d, MaxListed, func(d Disagreeing) int { return d.Draw })
	}
	for k, ol := range o.kinds {
		l := s.kinds[k]
		if l == nil {
			l = &listed{}
			s.kinds[k] = l
		}
		l.n += ol.n
		for _, i := range ol.first {
			l.first = keepFirst(l.first, i, maxFirst, func(i int) int { return i })
		}
	}
	return nil
}

// Scan pattern codes: a leading 1 bit, then 3 bits per equilibrium, as
// the engine's regimes (assess) name them.
const (
	codeStable = iota + 1
	codeUnstable
	codeSemiBelow
	codeSemiAbove
	codeDegenerate
	codeSemi // semistable, side not known
	numCodes
)

var codeNames = [numCodes]string{"", "stable", "unstable", "semistable-below", "semistable-above", "degenerate", "semistable"}

// patternCode encodes the scan's ordered classes, with the sides of the
// semistable ones (sides, ExSides) when known, without allocating: a
// leading 1 bit, then 3 bits per equilibrium, for up to 20 equilibria; 0
// for more.
func patternCode(p []steady.Class, sides uint64, known bool) uint64 {
	if len(p) > 20 {
		return 0
	}
	key := uint64(1)
	for i, c := range p {
		code := uint64(codeDegenerate)
		switch c {
		case steady.Stable:
			code = codeStable
		case steady.Unstable:
			code = codeUnstable
		case steady.Semistable:
			switch {
			case !known:
				code = codeSemi
			case sides>>i&1 == 1:
				code = codeSemiAbove
			default:
				code = codeSemiBelow
			}
		}
		key = key<<3 | code
	}
	return key
}

// validCode reports whether key is a pattern code patternCode can return.
func validCode(key uint64) bool {
	if key == 0 {
		return true
	}
	n := bits.Len64(key) - 1
	if n%3 != 0 || n > 60 {
		return false
	}
	for ; key > 1; key >>= 3 {
		if c := key & 7; c == 0 || c >= numCodes {
			return false
		}
	}
	return true
}

// scanPattern names a pattern code's classes as the engine's regimes do
// ("stable", "unstable", "semistable-below", "semistable-above",
// "degenerate"); "semistable" when the side is not known.
func scanPattern(key uint64) []string {
	if key == 0 {
		return []string{"more than 20 equilibria"}
	}
	p := []string{}
	for ; key > 1; key >>= 3 {
		p = append(p, codeNames[key&7])
	}
	slices.Reverse(p)
	return p
}

// validCert reports whether key is a certified pattern key.
func validCert(key [2]uint64) bool {
	return key == [2]uint64{0, 1} || key[0] <= 52 && key[1] < 1<<key[0]
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
	// (from the scan, named as the engine's regimes, with the attracting
	// side of a semistable equilibrium from the hook's ExSides:
	// "semistable" alone when it is not known), CertifiedRegimes those
	// over certified draws alone (from the certification, where every
	// root is proven), each with its probability among its own draws.
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
