package sensitivity

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"math"
	"math/rand/v2"
	"reflect"
	"slices"
	"strings"
	"testing"

	"holdfast/assess"
	"holdfast/sample"
	"holdfast/scenarios"
)

// The checks in this file compare a Screen assembled from parts with one
// Screen fed every draw: an invariance that holds by the definition of
// what a Screen keeps (common practice for exact mergeable state, no
// source).

// sameBits is reflect.DeepEqual except that float64 values compare by
// their bits, so NaN equals NaN (the measures are NaN where undefined, and
// DeepEqual never holds for NaN) and 0 differs from −0.
func sameBits(a, b any) bool { return equalBits(reflect.ValueOf(a), reflect.ValueOf(b)) }

func equalBits(a, b reflect.Value) bool {
	if a.IsValid() != b.IsValid() {
		return false
	}
	if !a.IsValid() {
		return true
	}
	if a.Type() != b.Type() {
		return false
	}
	switch a.Kind() {
	case reflect.Float64, reflect.Float32:
		return math.Float64bits(a.Float()) == math.Float64bits(b.Float())
	case reflect.Int, reflect.Int64, reflect.Int32, reflect.Int16, reflect.Int8:
		return a.Int() == b.Int()
	case reflect.Uint, reflect.Uint64, reflect.Uint32, reflect.Uint16, reflect.Uint8:
		return a.Uint() == b.Uint()
	case reflect.Bool:
		return a.Bool() == b.Bool()
	case reflect.String:
		return a.String() == b.String()
	case reflect.Pointer, reflect.Interface:
		if a.IsNil() || b.IsNil() {
			return a.IsNil() == b.IsNil()
		}
		return equalBits(a.Elem(), b.Elem())
	case reflect.Slice:
		if a.IsNil() != b.IsNil() || a.Len() != b.Len() {
			return false
		}
		fallthrough
	case reflect.Array:
		for i := range a.Len() {
			if !equalBits(a.Index(i), b.Index(i)) {
				return false
			}
		}
		return true
	case reflect.Struct:
		for i := range a.NumField() {
			if !equalBits(a.Field(i), b.Field(i)) {
				return false
			}
		}
		return true
	}
	panic(fmt.Sprintf("sameBits: kind %s not handled", a.Kind()))
}

// copyDraw deep-copies a record: the engine reuses its slices after the
// sink returns.
func copyDraw(r assess.Draw) assess.Draw {
	r.Theta = slices.Clone(r.Theta)
	r.Tracked = slices.Clone(r.Tracked)
	r.Pattern = slices.Clone(r.Pattern)
	r.Extra = slices.Clone(r.Extra)
	return r
}

// demoDraws runs n draws of a demo scenario and returns copies of their
// records in index order, with every 11th draw (from draw 5) turned into
// a failure, so that failed draws lie below and above the cap.
func demoDraws(t testing.TB, demo string, n int) (*assess.Model, []assess.Draw) {
	t.Helper()
	s, err := scenarios.LoadDemo(demo)
	if err != nil {
		t.Fatal(err)
	}
	m, err := assess.Compile(s)
	if err != nil {
		t.Fatal(err)
	}
	var recs []assess.Draw
	sink := func(block []assess.Draw) error {
		for _, r := range block {
			recs = append(recs, copyDraw(r))
		}
		return nil
	}
	if _, err := assess.Run(context.Background(), m, assess.Options{Draws: n, Seed: 11, Plan: sample.LHS, Workers: 2, Sink: sink}); err != nil {
		t.Fatal(err)
	}
	for i := range recs {
		if recs[i].Index != i {
			t.Fatalf("record %d has index %d", i, recs[i].Index)
		}
		if i%11 == 5 {
			recs[i].Failed, recs[i].Outcome = "fabricated failure (test)", ""
			recs[i].Tracked, recs[i].Pattern = nil, nil
		}
	}
	return m, recs
}

// feed adds the records to s in blocks of random sizes.
func feed(t testing.TB, s *Screen, recs []assess.Draw, rng *rand.Rand) {
	t.Helper()
	for lo := 0; lo < len(recs); {
		hi := min(lo+1+rng.IntN(60), len(recs))
		if err := s.Add(recs[lo:hi]); err != nil {
			t.Fatal(err)
		}
		lo = hi
	}
}

// roundTrip stores s and restores it into a new Screen of the model, as a
// separate process would.
func roundTrip(t testing.TB, m *assess.Model, cap int, s *Screen) *Screen {
	t.Helper()
	raw, err := json.Marshal(s)
	if err != nil {
		t.Fatal(err)
	}
	back := NewScreen(m, cap)
	if err := json.Unmarshal(raw, back); err != nil {
		t.Fatal(err)
	}
	again, err := json.Marshal(back)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(raw, again) {
		t.Fatal("restored screen stores different bytes")
	}
	return back
}

// mergeAll merges the parts in the given order into a new Screen.
func mergeAll(t testing.TB, m *assess.Model, cap int, parts []*Screen, order []int) *Screen {
	t.Helper()
	total := NewScreen(m, cap)
	for _, k := range order {
		if err := total.Merge(parts[k]); err != nil {
			t.Fatal(err)
		}
	}
	return total
}

// mergeTree merges the parts pairwise, part into part, as a reduction
// over several machines would.
func mergeTree(t testing.TB, parts []*Screen) *Screen {
	t.Helper()
	for len(parts) > 1 {
		var next []*Screen
		for i := 0; i < len(parts); i += 2 {
			if i+1 < len(parts) {
				// The later part takes the earlier one: order is free.
				if err := parts[i+1].Merge(parts[i]); err != nil {
					t.Fatal(err)
				}
				next = append(next, parts[i+1])
			} else {
				next = append(next, parts[i])
			}
		}
		parts = next
	}
	return parts[0]
}

// checkSame compares a screen assembled from parts with the single one:
// the same Result and the same stored state.
func checkSame(t *testing.T, what string, got, want *Screen) {
	t.Helper()
	if !sameBits(got.Result(), want.Result()) {
		t.Errorf("%s: result differs from the single screen:\n%+v\n%+v", what, got.Result(), want.Result())
		return
	}
	a, _ := json.Marshal(got)
	b, _ := json.Marshal(want)
	if !bytes.Equal(a, b) {
		t.Errorf("%s: state differs from the single screen", what)
	}
}

func TestScreenShardsAndPiecesMergeToTheSingleScreen(t *testing.T) {
	const cap = 500
	cases := []struct {
		demo string
		n    int
	}{
		{"lake", 300},     // below the cap: every successful draw kept
		{"lake", 1300},    // above the cap
		{"fishery", 1100}, // above the cap
	}
	for _, c := range cases {
		t.Run(fmt.Sprintf("%s/%d", c.demo, c.n), func(t *testing.T) {
			m, recs := demoDraws(t, c.demo, c.n)
			rng := rand.New(rand.NewPCG(1, uint64(c.n)))
			single := NewScreen(m, cap)
			feed(t, single, recs, rng)
			r := single.Result()
			wantKept, wantFailed := 0, 0
			for i, rec := range recs {
				if rec.Failed != "" {
					wantFailed++
				} else if i < cap {
					wantKept++
				}
			}
			if r.Seen != c.n || r.Failed != wantFailed || r.Kept != wantKept || r.Capped != (c.n-wantFailed > wantKept) || len(r.Equilibria) == 0 {
				t.Fatalf("single screen: seen %d failed %d kept %d capped %v, want %d %d %d", r.Seen, r.Failed, r.Kept, r.Capped, c.n, wantFailed, wantKept)
			}

			// Shards: draw i goes to shard i mod N.
			for _, n := range []int{1, 2, 3, 4, 7} {
				var parts []*Screen
				for k := range n {
					var mine []assess.Draw
					for i := k; i < len(recs); i += n {
						mine = append(mine, recs[i])
					}
					s := NewScreen(m, cap)
					feed(t, s, mine, rng)
					parts = append(parts, roundTrip(t, m, cap, s))
				}
				forward := make([]int, n)
				for k := range forward {
					forward[k] = k
				}
				backward := slices.Clone(forward)
				slices.Reverse(backward)
				shuffled := slices.Clone(forward)
				rng.Shuffle(n, func(i, j int) { shuffled[i], shuffled[j] = shuffled[j], shuffled[i] })
				for _, order := range [][]int{forward, backward, shuffled} {
					checkSame(t, fmt.Sprintf("%d shards merged in order %v", n, order), mergeAll(t, m, cap, parts, order), single)
				}
				// Pairwise, into the parts themselves (which this changes).
				checkSame(t, fmt.Sprintf("%d shards merged pairwise", n), mergeTree(t, parts), single)
			}

			// Contiguous pieces, merged in shuffled order.
			cuts := []int{0, 1, 137, cap - 1, cap, cap + 1, 900}
			var pieces []*Screen
			for p := range cuts {
				lo, hi := min(cuts[p], c.n), c.n
				if p+1 < len(cuts) {
					hi = min(cuts[p+1], c.n)
				}
				s := NewScreen(m, cap)
				feed(t, s, recs[lo:hi], rng)
				pieces = append(pieces, roundTrip(t, m, cap, s))
			}
			order := rng.Perm(len(pieces))
			checkSame(t, fmt.Sprintf("pieces merged in order %v", order), mergeAll(t, m, cap, pieces, order), single)

			// Checkpoint and resume: after each piece the state is stored
			// and restored, and the restored screen goes on.
			s := NewScreen(m, cap)
			for p := range cuts {
				lo, hi := min(cuts[p], c.n), c.n
				if p+1 < len(cuts) {
					hi = min(cuts[p+1], c.n)
				}
				feed(t, s, recs[lo:hi], rng)
				s = roundTrip(t, m, cap, s)
			}
			checkSame(t, "resumed after every piece", s, single)
		})
	}
}

func TestScreenRunPartialShards(t *testing.T) {
	// Screens fed straight by the engine's shards (assess.RunPartial with a
	// Sink) merge to the Screen of the whole run.
	s, err := scenarios.LoadDemo("lake")
	if err != nil {
		t.Fatal(err)
	}
	m, err := assess.Compile(s)
	if err != nil {
		t.Fatal(err)
	}
	const cap = 700
	opt := assess.Options{Draws: 2001, Seed: 4, Plan: sample.LHS, Workers: 3}
	single := NewScreen(m, cap)
	o := opt
	o.Sink = single.Add
	if _, err := assess.Run(context.Background(), m, o); err != nil {
		t.Fatal(err)
	}
	total := NewScreen(m, cap)
	for k := 2; k >= 0; k-- {
		part := NewScreen(m, cap)
		o := opt
		o.Shard, o.Sink = assess.Shard{K: k, N: 3}, part.Add
		if _, err := assess.RunPartial(context.Background(), m, o); err != nil {
			t.Fatal(err)
		}
		if err := total.Merge(roundTrip(t, m, cap, part)); err != nil {
			t.Fatal(err)
		}
	}
	if r := single.Result(); r.Seen != 2001 || !r.Capped {
		t.Fatalf("single run: %+v", r)
	}
	checkSame(t, "engine shards", total, single)
}

func TestScreenStateIsExact(t *testing.T) {
	// Values JSON numbers cannot hold, a NaN with a payload and −0 survive
	// the stored form bit for bit (IEEE 754-2019 §3.4: the bits are the
	// value).
	m := compile(t, twoInputs)
	odd := []float64{math.Inf(1), math.Inf(-1), math.Copysign(0, -1), math.Float64frombits(0x7ff8000000000123), math.SmallestNonzeroFloat64, math.MaxFloat64}
	s := NewScreen(m, 100)
	for i, v := range odd {
		rec := assess.Draw{Index: 3 * i, Theta: []float64{v, -v, 3}, Outcome: "E1",
			Tracked: []assess.TrackedDraw{{Exists: true, X: v, Slope: -v}}}
		if err := s.Add([]assess.Draw{rec}); err != nil {
			t.Fatal(err)
		}
	}
	back := roundTrip(t, m, 100, s)
	if !sameBits(back.theta, s.theta) || !sameBits(back.outputs, s.outputs) || !slices.Equal(back.index, s.index) {
		t.Errorf("stored form is not exact:\n%v\n%v", back.outputs, s.outputs)
	}
	if !sameBits(back.Result(), s.Result()) {
		t.Error("restored result differs")
	}
}

func TestScreenAddOrderFree(t *testing.T) {
	// The kept draws are held in index order whatever order they arrive
	// in; a kept draw added twice is an error and changes nothing.
	m := compile(t, twoInputs)
	recs := synthetic(400)
	inOrder := NewScreen(m, 300)
	if err := inOrder.Add(recs); err != nil {
		t.Fatal(err)
	}
	shuffled := slices.Clone(recs)
	rand.New(rand.NewPCG(5, 6)).Shuffle(len(shuffled), func(i, j int) { shuffled[i], shuffled[j] = shuffled[j], shuffled[i] })
	anyOrder := NewScreen(m, 300)
	if err := anyOrder.Add(shuffled); err != nil {
		t.Fatal(err)
	}
	checkSame(t, "shuffled draws", anyOrder, inOrder)
	if err := anyOrder.Add(recs[20:21]); err == nil || !strings.Contains(err.Error(), "draw 20 added twice") {
		t.Errorf("duplicate draw: %v", err)
	}
	checkSame(t, "after the rejected duplicate", anyOrder, inOrder)
	bad := []struct {
		rec  assess.Draw
		want string
	}{
		{assess.Draw{Index: -1, Theta: []float64{0, 0, 3}}, "negative"},
		{assess.Draw{Index: 500, Theta: []float64{0, 0}}, "2 parameters, the model 3"},
	}
	for _, c := range bad {
		if err := anyOrder.Add([]assess.Draw{c.rec}); err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("Add(%+v) = %v, want %q", c.rec, err, c.want)
		}
	}
}

const otherModel = `holdfast: 1
title: another model (illustrative)
state: {symbol: x, domain: [0, 2], current: 0.5}
rate: "a - x + 0*b*d"
parameters:
  a: {dist: uniform, min: 0, max: 1}
  b: {dist: uniform, min: 0, max: 1}
  d: {value: 3}
`

const bFixed = `holdfast: 1
title: b fixed (illustrative)
state: {symbol: x, domain: [0, 2], current: 0.5}
rate: "a - x + 0*b*c"
parameters:
  a: {dist: uniform, min: 0, max: 1}
  b: {value: 0.5}
  c: {value: 3}
`

const noCurrent = `holdfast: 1
title: no current state (illustrative)
state: {symbol: x, domain: [0, 2]}
rate: "a - x + 0*b*c"
parameters:
  a: {dist: uniform, min: 0, max: 1}
  b: {dist: uniform, min: 0, max: 1}
  c: {value: 3}
`

func TestScreenMergeErrors(t *testing.T) {
	m := compile(t, twoInputs)
	recs := synthetic(200)
	part := func(src string, cap int, lo, hi int, tracked int) *Screen {
		s := NewScreen(compile(t, src), cap)
		for _, r := range recs[lo:hi] {
			r.Tracked = slices.Repeat(r.Tracked, tracked)
			if err := s.Add([]assess.Draw{r}); err != nil {
				t.Fatal(err)
			}
		}
		return s
	}
	base := func() *Screen { return part(twoInputs, 100, 0, 50, 1) }
	cases := []struct {
		name  string
		other *Screen
		want  string
	}{
		{"nil", nil, "nil screen"},
		{"other parameters", part(otherModel, 100, 50, 60, 1), "parameters [a b d], this screen [a b c]"},
		{"other uncertain inputs", part(bFixed, 100, 50, 60, 1), "uncertain inputs [a], this screen [a b]"},
		{"no current state", part(noCurrent, 100, 50, 60, 1), "current state absent, this screen given"},
		{"other cap", part(twoInputs, 200, 50, 60, 1), "cap 200, this screen 100"},
		{"other tracked count", part(twoInputs, 100, 50, 60, 2), "tracks 2 equilibria, this screen 1"},
		{"overlap", part(twoInputs, 100, 40, 60, 1), "draw 40 is kept by both"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			s := base()
			before, _ := json.Marshal(s)
			err := s.Merge(c.other)
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Fatalf("Merge = %v, want %q", err, c.want)
			}
			if after, _ := json.Marshal(s); !bytes.Equal(before, after) {
				t.Error("failed merge changed the screen")
			}
		})
	}
	s := base()
	if err := s.Merge(s); err == nil || !strings.Contains(err.Error(), "itself") {
		t.Errorf("self merge: %v", err)
	}
	// Parts with no kept draws merge whatever their tracked count.
	empty := NewScreen(m, 100)
	if err := empty.Add(recs[150:200]); err != nil {
		t.Fatal(err)
	}
	if err := s.Merge(empty); err != nil {
		t.Fatal(err)
	}
	if r := s.Result(); r.Seen != 100 || r.Kept != 45 || r.Failed != 10 || !r.Capped {
		t.Errorf("counts after merging a screen with no kept draws: %+v", r)
	}
}

// stateOf returns the stored form of a small screen as a map, to be
// spoiled field by field.
func stateOf(t *testing.T) map[string]any {
	t.Helper()
	s := NewScreen(compile(t, twoInputs), 50)
	if err := s.Add(synthetic(80)); err != nil {
		t.Fatal(err)
	}
	raw, err := json.Marshal(s)
	if err != nil {
		t.Fatal(err)
	}
	var j map[string]any
	if err := json.Unmarshal(raw, &j); err != nil {
		t.Fatal(err)
	}
	return j
}

func TestScreenUnmarshalErrors(t *testing.T) {
	m := compile(t, twoInputs)
	// A column of five values from the given bits.
	column := func(bits ...uint64) string {
		c := make([]float64, len(bits))
		for i, b := range bits {
			c[i] = math.Float64frombits(b)
		}
		return encodeColumn(c)
	}
	cases := []struct {
		name  string
		spoil func(j map[string]any)
		want  string
	}{
		{"version", func(j map[string]any) { j["version"] = 2 }, "version 2"},
		{"cap", func(j map[string]any) { j["cap"] = 60 }, "cap 60, this screen 50"},
		{"names", func(j map[string]any) { j["names"] = []string{"a", "b", "d"} }, "parameters [a b d]"},
		{"uncertain", func(j map[string]any) { j["uncertain"] = []string{"b", "a"} }, "uncertain inputs [b a]"},
		{"current", func(j map[string]any) { j["current"] = false }, "current state absent"},
		{"kept above seen", func(j map[string]any) { j["seen"] = 10 }, "inconsistent counts"},
		{"negative failed", func(j map[string]any) { j["failed"] = -1 }, "inconsistent counts"},
		{"kept above cap", func(j map[string]any) { j["kept"] = 51 }, "inconsistent counts"},
		{"kept not the column length", func(j map[string]any) { j["kept"] = 44 }, "draw indices: 45 indices, want 44"},
		{"tracked", func(j map[string]any) { j["tracked"] = 2 }, "tracked equilibria 2, this screen 1"},
		{"output columns", func(j map[string]any) { j["outputs"] = j["outputs"].([]any)[:3] }, "3 output columns, want 4"},
		{"tracked negative", func(j map[string]any) { j["tracked"] = -1 }, "-1 tracked equilibria"},
		{"input columns", func(j map[string]any) { j["theta"] = j["theta"].([]any)[:1] }, "1 input columns, want 2"},
		{"short column", func(j map[string]any) { j["theta"].([]any)[1] = "AAAAAAAAAAA=" }, "input b: 12 characters"},
		{"bad base64", func(j map[string]any) { j["index"] = "!!!!" }, "draw indices: illegal base64"},
		{"index beyond cap", func(j map[string]any) {
			j["index"] = stateEncoding.EncodeToString(append([]byte{50}, make([]byte, 44)...))
		}, "beyond the cap"},
		{"too few index bytes", func(j map[string]any) { j["index"] = "AAAA" }, "3 bytes cannot hold 45 indices"},
		{"bad varint", func(j map[string]any) { j["kept"], j["index"] = 1, "gA==" }, "bad varint"},
		{"indicator", func(j map[string]any) {
			j["kept"], j["seen"], j["failed"], j["index"] = 5, 5, 0, "AAAAAAA="
			j["theta"] = []string{column(0, 0, 0, 0, 0), column(0, 0, 0, 0, 0)}
			half := math.Float64bits(0.5)
			j["outputs"] = []string{column(0, 0, half, 0, 0), column(0, 0, 0, 0, 0), column(0, 0, 0, 0, 0), column(0, 0, 0, 0, 0)}
		}, "attracting of E1 is 0.5 in draw 2"},
		{"unknown field", func(j map[string]any) { j["extra"] = 1 }, "unknown field"},
		{"not a number", func(j map[string]any) { j["seen"] = 1.5 }, "cannot unmarshal"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			j := stateOf(t)
			c.spoil(j)
			raw, err := json.Marshal(j)
			if err != nil {
				t.Fatal(err)
			}
			s := NewScreen(m, 50)
			if err := s.Add(synthetic(3)); err != nil {
				t.Fatal(err)
			}
			before, _ := json.Marshal(s)
			err = s.UnmarshalJSON(raw)
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Fatalf("UnmarshalJSON = %v, want %q", err, c.want)
			}
			if after, _ := json.Marshal(s); !bytes.Equal(before, after) {
				t.Error("failed UnmarshalJSON changed the screen")
			}
		})
	}
	for _, raw := range []string{"", "null x", `{"version":1} {}`, "[]", `{"version":1`} {
		if err := NewScreen(m, 50).UnmarshalJSON([]byte(raw)); err == nil {
			t.Errorf("UnmarshalJSON(%q) succeeded", raw)
		}
	}
}

func TestScreenStateSize(t *testing.T) {
	// The stored form costs 8 bytes per column and kept draw, ×4/3 for
	// base64 (RFC 4648 §4), plus about one byte for the index gap.
	m, recs := demoDraws(t, "lake", 2000)
	s := NewScreen(m, 0)
	if err := s.Add(recs); err != nil {
		t.Fatal(err)
	}
	raw, err := json.Marshal(s)
	if err != nil {
		t.Fatal(err)
	}
	kept := s.Result().Kept
	// lake: 3 uncertain inputs, 3 tracked equilibria × 4 outputs.
	columns := len(s.unc) + s.nTracked*s.storedOutputs()
	perDraw := float64(len(raw)) / float64(kept)
	t.Logf("lake: %d bytes for %d kept draws, %.1f bytes per kept draw (%d columns)", len(raw), kept, perDraw, columns)
	if limit := float64(columns)*8*4/3 + 3; perDraw > limit {
		t.Errorf("%.1f bytes per kept draw, want at most %.1f", perDraw, limit)
	}
}
