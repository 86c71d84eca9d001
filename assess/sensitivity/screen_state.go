package sensitivity

import (
	"encoding/base64"
	"encoding/binary"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"slices"

	"holdfast/assess"
	"holdfast/assess/agg"
)

// screenVersion is the version of the stored form of a Screen.
const screenVersion = 1

// screenJSON is the stored form of a Screen. Numbers travel as the bits of
// their float64 values, little-endian, base64-encoded per column, so that
// NaN and ±Inf survive exactly (JSON numbers cannot hold them) and a kept
// draw costs 8 bytes per column before encoding.
type screenJSON struct {
	Version int `json:"version"`
	// Names are the model's parameters, Uncertain those drawn; Current
	// says whether the scenario has a current state. They identify the
	// model.
	Names     []string `json:"names"`
	Uncertain []string `json:"uncertain"`
	Current   bool     `json:"current"`
	Cap       int      `json:"cap"`
	Seen      int      `json:"seen"`
	Failed    int      `json:"failed"`
	Kept      int      `json:"kept"`
	Tracked   int      `json:"tracked"`
	// Index holds the global draw indices of the kept draws, increasing,
	// as unsigned varints of the gaps i₀, i₁−i₀−1, i₂−i₁−1, …
	Index string `json:"index"`
	// Theta holds one column per uncertain input.
	Theta []string `json:"theta"`
	// Outputs holds one column per tracked equilibrium and output, in
	// Output order, without the current column when there is no current
	// state (it is undefined throughout).
	Outputs []string `json:"outputs"`
}

var stateEncoding = base64.StdEncoding.Strict()

// stored reports whether output o is written to the stored form.
func (s *Screen) stored(o Output) bool { return o != Current || s.current }

// storedOutputs is the number of stored columns per tracked equilibrium.
func (s *Screen) storedOutputs() int {
	if s.current {
		return int(numOutputs)
	}
	return int(numOutputs) - 1
}

// MarshalJSON writes the Screen's complete state: the model's parameter
// names and uncertain inputs, the cap, the counts, and every kept draw
// with its global index, its inputs and its outputs, bit for bit. The
// bytes depend only on the state, so equal states give equal bytes.
func (s *Screen) MarshalJSON() ([]byte, error) {
	j := screenJSON{
		Version: screenVersion, Names: slices.Clone(s.names), Uncertain: s.uncertainNames(), Current: s.current,
		Cap: s.cap, Seen: s.seen, Failed: s.failed, Kept: len(s.index), Tracked: s.nTracked,
		Theta: make([]string, len(s.unc)), Outputs: []string{},
	}
	if j.Names == nil {
		j.Names = []string{}
	}
	var idx []byte
	prev := -1
	for _, i := range s.index {
		idx = binary.AppendUvarint(idx, uint64(i-prev-1))
		prev = i
	}
	j.Index = stateEncoding.EncodeToString(idx)
	for k := range s.unc {
		j.Theta[k] = encodeColumn(s.theta[k])
	}
	for t := range s.nTracked {
		for o := range numOutputs {
			if s.stored(o) {
				j.Outputs = append(j.Outputs, encodeColumn(s.outputs[t*int(numOutputs)+int(o)]))
			}
		}
	}
	return json.Marshal(j)
}

func (s *Screen) uncertainNames() []string {
	out := make([]string, len(s.unc))
	for k, p := range s.unc {
		out[k] = s.names[p]
	}
	return out
}

func encodeColumn(c []float64) string {
	b := make([]byte, 0, 8*len(c))
	for _, v := range c {
		b = binary.LittleEndian.AppendUint64(b, math.Float64bits(v))
	}
	return stateEncoding.EncodeToString(b)
}

// decodeColumn decodes a column of exactly n values.
func decodeColumn(str string, n int) ([]float64, error) {
	if len(str) != stateEncoding.EncodedLen(8*n) {
		return nil, fmt.Errorf("%d characters, want %d for %d values", len(str), stateEncoding.EncodedLen(8*n), n)
	}
	b, err := stateEncoding.DecodeString(str)
	if err != nil {
		return nil, err
	}
	if len(b) != 8*n {
		return nil, fmt.Errorf("%d bytes, want %d", len(b), 8*n)
	}
	c := make([]float64, n)
	for i := range c {
		c[i] = math.Float64frombits(binary.LittleEndian.Uint64(b[8*i:]))
	}
	return c, nil
}

// UnmarshalJSON restores a state written by MarshalJSON into a Screen made
// by NewScreen for the same model and cap; it replaces the Screen's draws,
// and the Screen then goes on exactly as the one that was written would.
// The stored form is checked throughout: the model (parameter names,
// uncertain inputs, current state) and the cap must be the receiver's, the
// tracked count the receiver's when it has kept draws, the counts
// consistent (Failed + Kept ≤ Seen, Kept ≤ Cap), the indices increasing
// and below the cap, every column of Kept values and the yes/no outputs
// 0, 1 or NaN. On error the Screen is unchanged.
func (s *Screen) UnmarshalJSON(b []byte) error {
	var j screenJSON
	if err := agg.DecodeStrict(b, &j); err != nil {
		return fmt.Errorf("screen state: %w", err)
	}
	if j.Version != screenVersion {
		return fmt.Errorf("screen state: version %d, want %d", j.Version, screenVersion)
	}
	if err := s.sameModel(j.Names, j.Uncertain, j.Current, j.Cap); err != nil {
		return fmt.Errorf("screen state does not fit this screen: %w", err)
	}
	if j.Seen < 0 || j.Failed < 0 || j.Kept < 0 || j.Kept > j.Cap || j.Failed > j.Seen || j.Kept > j.Seen-j.Failed {
		return fmt.Errorf("screen state: inconsistent counts: seen %d, failed %d, kept %d, cap %d", j.Seen, j.Failed, j.Kept, j.Cap)
	}
	if j.Tracked < 0 || (j.Kept == 0 && j.Tracked != 0) {
		return fmt.Errorf("screen state: %d tracked equilibria with %d kept draws", j.Tracked, j.Kept)
	}
	if len(s.index) > 0 && j.Kept > 0 && j.Tracked != s.nTracked {
		return fmt.Errorf("screen state does not fit this screen: tracked equilibria %d, this screen %d", j.Tracked, s.nTracked)
	}
	per := s.storedOutputs()
	if j.Tracked > len(j.Outputs) || len(j.Outputs) != j.Tracked*per {
		return fmt.Errorf("screen state: %d output columns, want %d for %d tracked equilibria", len(j.Outputs), j.Tracked*per, j.Tracked)
	}
	if len(j.Theta) != len(s.unc) {
		return fmt.Errorf("screen state: %d input columns, want %d", len(j.Theta), len(s.unc))
	}
	index, err := decodeIndex(j.Index, j.Kept, j.Cap)
	if err != nil {
		return fmt.Errorf("screen state: draw indices: %w", err)
	}
	theta := make([][]float64, len(s.unc))
	for k, str := range j.Theta {
		if theta[k], err = decodeColumn(str, j.Kept); err != nil {
			return fmt.Errorf("screen state: input %s: %w", j.Uncertain[k], err)
		}
	}
	var outputs [][]float64
	if j.Tracked > 0 {
		outputs = make([][]float64, j.Tracked*int(numOutputs))
	}
	next := 0
	for t := range j.Tracked {
		for o := range numOutputs {
			c := &outputs[t*int(numOutputs)+int(o)]
			if !s.stored(o) {
				*c = make([]float64, j.Kept)
				for i := range *c {
					(*c)[i] = math.NaN()
				}
				continue
			}
			if *c, err = decodeColumn(j.Outputs[next], j.Kept); err != nil {
				return fmt.Errorf("screen state: %s of %s: %w", o, assess.Label(t), err)
			}
			next++
			if o.Indicator() {
				for i, v := range *c {
					if v != 0 && v != 1 && !math.IsNaN(v) {
						return fmt.Errorf("screen state: %s of %s is %v in draw %d, want 0, 1 or NaN", o, assess.Label(t), v, index[i])
					}
				}
			}
		}
	}
	s.seen, s.failed, s.nTracked = j.Seen, j.Failed, j.Tracked
	s.index, s.theta, s.outputs = index, theta, outputs
	return nil
}

// decodeIndex decodes n increasing draw indices below cap.
func decodeIndex(str string, n, cap int) ([]int, error) {
	b, err := stateEncoding.DecodeString(str)
	if err != nil {
		return nil, err
	}
	// Each index takes at least one byte, which bounds the allocation by
	// the input's size.
	if n > len(b) {
		return nil, fmt.Errorf("%d bytes cannot hold %d indices", len(b), n)
	}
	index := make([]int, 0, n)
	prev := -1
	for len(b) > 0 {
		gap, w := binary.Uvarint(b)
		if w <= 0 {
			return nil, errors.New("bad varint")
		}
		b = b[w:]
		if gap >= uint64(cap-prev-1) {
			return nil, fmt.Errorf("index beyond the cap %d", cap)
		}
		prev += 1 + int(gap)
		index = append(index, prev)
	}
	if len(index) != n {
		return nil, fmt.Errorf("%d indices, want %d", len(index), n)
	}
	return index, nil
}

// sameModel checks that a Screen's model and cap are the receiver's.
func (s *Screen) sameModel(names, uncertain []string, current bool, cap int) error {
	switch {
	case !slices.Equal(names, s.names):
		return fmt.Errorf("parameters %v, this screen %v", names, s.names)
	case !slices.Equal(uncertain, s.uncertainNames()):
		return fmt.Errorf("uncertain inputs %v, this screen %v", uncertain, s.uncertainNames())
	case current != s.current:
		return fmt.Errorf("current state %s, this screen %s", presence(current), presence(s.current))
	case cap != s.cap:
		return fmt.Errorf("cap %d, this screen %d", cap, s.cap)
	}
	return nil
}

func presence(b bool) string {
	if b {
		return "given"
	}
	return "absent"
}

// Merge adds the draws of o to s: the screens of the shards or pieces of
// one run, each fed a disjoint set of draws, merge into the Screen of the
// whole run, in any order. Kept draws are merged by global index and the
// counts summed. Both screens must be for the same model and cap, and
// track the same number of equilibria when both kept draws; a draw kept
// by both is an error (the same shard or piece given twice). Draws that
// neither keeps cannot be checked for overlap. o is not changed; on error
// s is not either.
func (s *Screen) Merge(o *Screen) error {
	if o == nil {
		return errors.New("screen merge: nil screen")
	}
	if o == s {
		return errors.New("screen merge: a screen cannot be merged with itself")
	}
	if err := s.sameModel(o.names, o.uncertainNames(), o.current, o.cap); err != nil {
		return fmt.Errorf("screen merge: the other screen has %w", err)
	}
	if len(s.index) > 0 && len(o.index) > 0 && s.nTracked != o.nTracked {
		return fmt.Errorf("screen merge: the other screen tracks %d equilibria, this screen %d", o.nTracked, s.nTracked)
	}
	if o.seen > math.MaxInt-s.seen {
		return errors.New("screen merge: draw count overflows")
	}
	// Where each kept draw of the merge comes from: a draw of s (≥ 0) or
	// of o (−1−k).
	n := len(s.index) + len(o.index)
	from := make([]int, 0, n)
	a, b := 0, 0
	for a < len(s.index) || b < len(o.index) {
		switch {
		case b == len(o.index) || (a < len(s.index) && s.index[a] < o.index[b]):
			from = append(from, a)
			a++
		case a == len(s.index) || o.index[b] < s.index[a]:
			from = append(from, -1-b)
			b++
		default:
			return fmt.Errorf("screen merge: draw %d is kept by both screens", s.index[a])
		}
	}
	if len(o.index) == 0 {
		s.seen += o.seen
		s.failed += o.failed
		return nil
	}
	pick := func(x, y []float64) []float64 {
		c := make([]float64, n)
		for i, f := range from {
			if f >= 0 {
				c[i] = x[f]
			} else {
				c[i] = y[-1-f]
			}
		}
		return c
	}
	index := make([]int, n)
	for i, f := range from {
		if f >= 0 {
			index[i] = s.index[f]
		} else {
			index[i] = o.index[-1-f]
		}
	}
	// s may have no kept draws and then no output columns; pick then never
	// reads them.
	col := func(x [][]float64, k int) []float64 {
		if k < len(x) {
			return x[k]
		}
		return nil
	}
	theta := make([][]float64, len(s.unc))
	for k := range s.unc {
		theta[k] = pick(col(s.theta, k), o.theta[k])
	}
	outputs := make([][]float64, o.nTracked*int(numOutputs))
	for k := range outputs {
		outputs[k] = pick(col(s.outputs, k), o.outputs[k])
	}
	s.seen += o.seen
	s.failed += o.failed
	s.nTracked, s.index, s.theta, s.outputs = o.nTracked, index, theta, outputs
	return nil
}
