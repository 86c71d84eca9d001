package agg

import (
	"math"
)

// Sketch summarises a stream of values so that any quantile can be read
// back with a relative error of at most Alpha, in memory that does not grow
// with the number of values. It is the logarithmic-bucket sketch of Masson,
// Rim & Lee (2019), "DDSketch: a fast and fully-mergeable quantile sketch
// with relative-error guarantees", PVLDB 12(12):2195: a value v > 0 goes to
// bucket ⌈log_γ v⌉ with γ = (1+α)/(1−α), negative values to a mirrored
// store, and tiny magnitudes to a zero bucket. Merging adds bucket counts,
// so the merged sketch is the same whatever the order or grouping of the
// merges: a run split into blocks, workers or shards reports identical
// quantiles.
//
// Each store keeps at most MaxBuckets buckets; beyond that the buckets of
// smallest magnitude are folded together (the final state depends only on
// the multiset of values, not on their order). Min and max are kept exactly.
//
// The zero value is not usable; call NewSketch.
type Sketch struct {
	gamma, lnGamma float64
	pos, neg       store
	zero           int64
	count          int64
	min, max       float64
	sum            float64
}

// Alpha is the relative accuracy of every Sketch: 0.1%.
const Alpha = 1e-3

// MaxBuckets bounds each store of a Sketch (so a sketch never exceeds
// about 2·MaxBuckets·8 bytes).
const MaxBuckets = 1 << 16

// minMagnitude is the smallest magnitude given its own bucket; smaller ones
// count as zero.
const minMagnitude = 1e-300

// NewSketch returns an empty sketch with relative accuracy Alpha.
func NewSketch() *Sketch {
	g := (1 + Alpha) / (1 - Alpha)
	return &Sketch{gamma: g, lnGamma: math.Log(g), min: math.Inf(1), max: math.Inf(-1)}
}

// Add records v. NaN and ±Inf are ignored and reported as false: callers
// count them as failures, they never silently vanish.
func (s *Sketch) Add(v float64) bool {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return false
	}
	s.count++
	s.sum += v
	if v < s.min {
		s.min = v
	}
	if v > s.max {
		s.max = v
	}
	switch {
	case v > minMagnitude:
		s.pos.add(s.index(v), 1)
	case v < -minMagnitude:
		s.neg.add(s.index(-v), 1)
	default:
		s.zero++
	}
	return true
}

func (s *Sketch) index(m float64) int {
	return int(math.Ceil(math.Log(m) / s.lnGamma))
}

// value is the representative of bucket i: relative error ≤ Alpha for every
// value in the bucket.
func (s *Sketch) value(i int) float64 {
	return 2 * math.Exp(float64(i)*s.lnGamma) / (s.gamma + 1)
}

// Merge adds every value recorded in o.
func (s *Sketch) Merge(o *Sketch) {
	if o == nil || o.count == 0 {
		return
	}
	s.count += o.count
	s.sum += o.sum
	s.zero += o.zero
	s.min = math.Min(s.min, o.min)
	s.max = math.Max(s.max, o.max)
	s.pos.merge(&o.pos)
	s.neg.merge(&o.neg)
}

// Count is the number of values recorded.
func (s *Sketch) Count() int64 { return s.count }

// Mean is the arithmetic mean of the values recorded (NaN when empty).
func (s *Sketch) Mean() float64 {
	if s.count == 0 {
		return math.NaN()
	}
	return s.sum / float64(s.count)
}

// Quantile returns the q-quantile (0 ≤ q ≤ 1) within relative error Alpha:
// the value of rank ⌊q·(n−1)⌋ in the sorted stream (0-based), clamped to
// the exact [min, max]. It returns NaN for an empty sketch.
func (s *Sketch) Quantile(q float64) float64 {
	if s.count == 0 || math.IsNaN(q) {
		return math.NaN()
	}
	if q <= 0 {
		return s.min
	}
	if q >= 1 {
		return s.max
	}
	rank := int64(q * float64(s.count-1))
	var v float64
	switch {
	case rank < s.neg.total:
		// Negative values: the most negative is the largest magnitude.
		i := s.neg.bucketAtRank(s.neg.total - 1 - rank)
		v = -s.value(i)
	case rank < s.neg.total+s.zero:
		v = 0
	default:
		i := s.pos.bucketAtRank(rank - s.neg.total - s.zero)
		v = s.value(i)
	}
	return math.Min(math.Max(v, s.min), s.max)
}

// store is a dense run of bucket counts starting at bucket offset.
type store struct {
	counts []int64
	offset int
	total  int64
}

func (st *store) add(i int, n int64) {
	st.total += n
	if len(st.counts) == 0 {
		st.counts = make([]int64, 1, 64)
		st.offset = i
	}
	if i < st.offset {
		st.growDown(i)
	} else if i >= st.offset+len(st.counts) {
		st.growUp(i)
	}
	if i < st.offset { // folded into the lowest bucket
		i = st.offset
	}
	st.counts[i-st.offset] += n
}

func (st *store) growUp(i int) {
	need := i - st.offset + 1
	if need > MaxBuckets {
		st.fold(i - MaxBuckets + 1)
		need = i - st.offset + 1
	}
	if need > cap(st.counts) {
		c := make([]int64, need, max(need, 2*cap(st.counts)))
		copy(c, st.counts)
		st.counts = c
		return
	}
	old := len(st.counts)
	st.counts = st.counts[:need]
	clear(st.counts[old:]) // the backing array may hold counts from before a fold
}

func (st *store) growDown(i int) {
	hi := st.offset + len(st.counts) - 1
	// Leave headroom below, as much again as the span, so that a slowly
	// falling minimum does not reallocate on every new bucket.
	lo := i - len(st.counts)
	if hi-lo+1 > MaxBuckets {
		lo = hi - MaxBuckets + 1
	}
	if lo >= st.offset {
		return // i is below the kept range; add folds it into the lowest bucket
	}
	c := make([]int64, hi-lo+1)
	copy(c[st.offset-lo:], st.counts)
	st.counts = c
	st.offset = lo
}

// fold moves every bucket below newOffset into bucket newOffset.
func (st *store) fold(newOffset int) {
	if newOffset <= st.offset {
		return
	}
	shift := newOffset - st.offset
	if shift >= len(st.counts) {
		var s int64
		for _, c := range st.counts {
			s += c
		}
		st.counts = st.counts[:1]
		st.counts[0] = s
		st.offset = newOffset
		return
	}
	var s int64
	for _, c := range st.counts[:shift] {
		s += c
	}
	n := copy(st.counts, st.counts[shift:])
	st.counts = st.counts[:n]
	st.counts[0] += s
	st.offset = newOffset
}

func (st *store) merge(o *store) {
	if o.total == 0 {
		return
	}
	if st.total == 0 {
		st.counts = append(st.counts[:0], o.counts...)
		st.offset = o.offset
		st.total = o.total
		return
	}
	// Extend to cover o's range first (this may fold), then add.
	top := o.offset + len(o.counts) - 1
	if top >= st.offset+len(st.counts) {
		st.growUp(top)
	}
	if o.offset < st.offset {
		st.growDown(o.offset)
	}
	for j, c := range o.counts {
		if c == 0 {
			continue
		}
		i := o.offset + j
		if i < st.offset {
			i = st.offset
		}
		st.counts[i-st.offset] += c
	}
	st.total += o.total
}

// bucketAtRank returns the bucket holding the value of 0-based rank r in
// ascending order of magnitude.
func (st *store) bucketAtRank(r int64) int {
	var acc int64
	for j, c := range st.counts {
		acc += c
		if acc > r {
			return st.offset + j
		}
	}
	return st.offset + len(st.counts) - 1
}

// Buckets calls fn for every non-empty bucket in ascending order of value,
// with the bucket's representative value and its count: the negative
// buckets from the largest magnitude down, the zero bucket, then the
// positive buckets. Each representative is the value Quantile(q) reports,
// for 0 < q < 1, at a rank in that bucket: within relative error Alpha of
// every value the bucket holds (unless buckets were folded together at
// the MaxBuckets bound), clamped to the exact [min, max]. The values are
// non-decreasing and the counts add up to Count. Buckets does not change
// the sketch.
func (s *Sketch) Buckets(fn func(value float64, count int64)) {
	if s.count == 0 {
		return
	}
	clamp := func(v float64) float64 { return math.Min(math.Max(v, s.min), s.max) }
	for j := len(s.neg.counts) - 1; j >= 0; j-- {
		if c := s.neg.counts[j]; c != 0 {
			fn(clamp(-s.value(s.neg.offset+j)), c)
		}
	}
	if s.zero != 0 {
		fn(clamp(0), s.zero)
	}
	for j, c := range s.pos.counts {
		if c != 0 {
			fn(clamp(s.value(s.pos.offset+j)), c)
		}
	}
}
