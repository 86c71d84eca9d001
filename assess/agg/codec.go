package agg

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
)

// sketchJSON is the stored form of a Sketch: exact bucket counts (sparse,
// as [bucket, count] pairs), so that a sketch read back merges exactly as
// the one written.
type sketchJSON struct {
	Count int64      `json:"count"`
	Zero  int64      `json:"zero"`
	Min   *float64   `json:"min"`
	Max   *float64   `json:"max"`
	Sum   ExactFloat `json:"sum"`
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
	j := sketchJSON{Count: s.count, Zero: s.zero, Sum: ExactFloat(s.sum), Pos: s.pos.sparse(), Neg: s.neg.sparse()}
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

// DecodeStrict decodes b into v as one JSON value, strictly, as stored
// states are read: a field v does not have, or anything after the value,
// is an error.
func DecodeStrict(b []byte, v any) error {
	dec := json.NewDecoder(bytes.NewReader(b))
	dec.DisallowUnknownFields()
	if err := dec.Decode(v); err != nil {
		return err
	}
	if _, err := dec.Token(); err != io.EOF {
		return errors.New("data after the value")
	}
	return nil
}

// ExactFloat is a float64 that JSON holds bit for bit, whatever its value:
// a finite value as a JSON number in its shortest round-trip form (−0
// included), the others as the strings "+Inf", "-Inf" and "NaN" (or
// "NaN:0x…" with the bits of a NaN other than math.NaN()'s). Stored
// states use it where encoding/json, which rejects NaN and ±Inf, would
// fail or round.
type ExactFloat float64

// MarshalJSON writes the value exactly.
func (v ExactFloat) MarshalJSON() ([]byte, error) {
	f := float64(v)
	switch {
	case math.IsInf(f, 1):
		return []byte(`"+Inf"`), nil
	case math.IsInf(f, -1):
		return []byte(`"-Inf"`), nil
	case math.IsNaN(f):
		if b := math.Float64bits(f); b != math.Float64bits(math.NaN()) {
			return fmt.Appendf(nil, `"NaN:%#016x"`, b), nil
		}
		return []byte(`"NaN"`), nil
	}
	return strconv.AppendFloat(nil, f, 'g', -1, 64), nil
}

// UnmarshalJSON reads a value written by MarshalJSON (or any JSON number).
func (v *ExactFloat) UnmarshalJSON(b []byte) error {
	if len(b) > 0 && b[0] == '"' {
		var s string
		if err := json.Unmarshal(b, &s); err != nil {
			return err
		}
		switch {
		case s == "+Inf":
			*v = ExactFloat(math.Inf(1))
		case s == "-Inf":
			*v = ExactFloat(math.Inf(-1))
		case s == "NaN":
			*v = ExactFloat(math.NaN())
		case strings.HasPrefix(s, "NaN:0x"):
			bits, err := strconv.ParseUint(s[len("NaN:0x"):], 16, 64)
			if f := math.Float64frombits(bits); err != nil || !math.IsNaN(f) {
				return fmt.Errorf("bad NaN %q", s)
			}
			*v = ExactFloat(math.Float64frombits(bits))
		default:
			return fmt.Errorf("bad number %q", s)
		}
		return nil
	}
	if string(b) == "null" {
		return fmt.Errorf("null is not a number")
	}
	var f float64
	if err := json.Unmarshal(b, &f); err != nil {
		return err
	}
	*v = ExactFloat(f)
	return nil
}
