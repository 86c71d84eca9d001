package agg

import (
	"encoding/json"
	"fmt"
	"math"
)

// sketchJSON is the stored form of a Sketch: exact bucket counts (sparse,
// as [bucket, count] pairs), so that a sketch read back merges exactly as
// the one written.
type sketchJSON struct {
	Count int64      `json:"count"`
	Zero  int64      `json:"zero"`
	Min   *float64   `json:"min"`
	Max   *float64   `json:"max"`
	Sum   jsonFloat  `json:"sum"`
	Pos   [][2]int64 `json:"pos"`
	Neg   [][2]int64 `json:"neg"`
}

func (st *store) sparse() [][2]int64 {
	out := [][2]int64{}
	for j, c := range st.counts {
		if c != 0 {
			out = append(out, [2]int64{int64(st.offset + j), c})
		}
	}
	return out
}

// MarshalJSON writes the sketch's exact state.
func (s *Sketch) MarshalJSON() ([]byte, error) {
	j := sketchJSON{Count: s.count, Zero: s.zero, Sum: jsonFloat(s.sum), Pos: s.pos.sparse(), Neg: s.neg.sparse()}
	if s.count > 0 {
		j.Min, j.Max = &s.min, &s.max
	}
	return json.Marshal(j)
}

// UnmarshalJSON reads a sketch written by MarshalJSON, checking that its
// counts are consistent.
func (s *Sketch) UnmarshalJSON(b []byte) error {
	var j sketchJSON
	if err := json.Unmarshal(b, &j); err != nil {
		return err
	}
	*s = *NewSketch()
	if j.Count < 0 || j.Zero < 0 {
		return fmt.Errorf("sketch: negative count")
	}
	var total int64
	for _, part := range []struct {
		st    *store
		pairs [][2]int64
	}{{&s.pos, j.Pos}, {&s.neg, j.Neg}} {
		for k, p := range part.pairs {
			if p[1] <= 0 || (k > 0 && p[0] <= part.pairs[k-1][0]) || p[0] < math.MinInt32 || p[0] > math.MaxInt32 {
				return fmt.Errorf("sketch: bucket list not strictly increasing with positive counts")
			}
			part.st.add(int(p[0]), p[1])
			total += p[1]
		}
		if len(part.st.counts) > MaxBuckets {
			return fmt.Errorf("sketch: more than %d buckets", MaxBuckets)
		}
	}
	if total+j.Zero != j.Count {
		return fmt.Errorf("sketch: bucket counts add to %d, count says %d", total+j.Zero, j.Count)
	}
	s.count, s.zero, s.sum = j.Count, j.Zero, float64(j.Sum)
	if j.Count > 0 {
		if j.Min == nil || j.Max == nil || *j.Min > *j.Max {
			return fmt.Errorf("sketch: min and max missing or reversed")
		}
		s.min, s.max = *j.Min, *j.Max
	}
	return nil
}

// jsonFloat is a float64 that JSON can hold when it is not finite: a
// number when finite, else the string "+Inf", "-Inf" or "NaN" (a sum of
// values near the float64 limit can overflow).
type jsonFloat float64

func (f jsonFloat) MarshalJSON() ([]byte, error) {
	v := float64(f)
	switch {
	case math.IsNaN(v):
		return []byte(`"NaN"`), nil
	case math.IsInf(v, 1):
		return []byte(`"+Inf"`), nil
	case math.IsInf(v, -1):
		return []byte(`"-Inf"`), nil
	}
	return json.Marshal(v)
}

func (f *jsonFloat) UnmarshalJSON(b []byte) error {
	switch string(b) {
	case `"NaN"`:
		*f = jsonFloat(math.NaN())
	case `"+Inf"`:
		*f = jsonFloat(math.Inf(1))
	case `"-Inf"`:
		*f = jsonFloat(math.Inf(-1))
	default:
		var v float64
		if err := json.Unmarshal(b, &v); err != nil {
			return fmt.Errorf("sketch: sum %s is not a number", b)
		}
		*f = jsonFloat(v)
	}
	return nil
}
