package certify

import (
	"bytes"
	"context"
	"encoding/json"
	"math"
	"math/rand/v2"
	"reflect"
	"slices"
	"strings"
	"testing"

	"holdfast/assess"
	"holdfast/assess/agg"
	"holdfast/assess/steady"
	"holdfast/sample"
)

// recordRun runs the engine with the hook and returns deep copies of every
// record (the engine reuses the slices after the sink returns).
func recordRun(t *testing.T, m *assess.Model, opt assess.Options, hopt HookOptions) []assess.Draw {
	t.Helper()
	hook, err := Hook(m, hopt)
	if err != nil {
		t.Fatal(err)
	}
	var recs []assess.Draw
	opt.Extra = hook
	opt.Sink = func(block []assess.Draw) error {
		for _, r := range block {
			r.Theta = slices.Clone(r.Theta)
			r.Tracked = slices.Clone(r.Tracked)
			r.Pattern = slices.Clone(r.Pattern)
			r.Extra = slices.Clone(r.Extra)
			recs = append(recs, r)
		}
		return nil
	}
	if _, err := assess.Run(context.Background(), m, opt); err != nil {
		t.Fatal(err)
	}
	return recs
}

// fabricate marks some records of a real run as disagreeing (every kind,
// alone and combined, more draws than MaxListed) and some as unresolved
// with invented widths, so that the lists and the widest interval have
// something to merge. A failed record is added too.
func fabricate(recs []assess.Draw) []assess.Draw {
	out := slices.Clone(recs)
	for i := range out {
		ex := out[i].Extra[len(out[i].Extra)-ExLen:]
		switch {
		case i%11 == 3:
			ex[ExFlags] = float64(1 + (i/11)%31) // every non-empty set of kinds
		case i%29 == 5:
			ex[ExStatus], ex[ExBoxes] = float64(Unresolved), 1
			ex[ExMaxWidth] = 1e-9 * float64(i%97)
			ex[ExSumWidth] = ex[ExMaxWidth]
		case i == 17:
			out[i].Failed = "parameter not finite"
			ex[ExStatus] = 0
		}
	}
	return out
}

// feed gives recs to s in blocks of varying size (1 to 64 records).
func feed(t *testing.T, s *Summary, recs []assess.Draw, rng *rand.Rand) {
	t.Helper()
	for len(recs) > 0 {
		n := min(len(recs), 1+rng.IntN(64))
		if err := s.Add(recs[:n]); err != nil {
			t.Fatal(err)
		}
		recs = recs[n:]
	}
}

// roundTrip marshals s and restores it into a new Summary.
func roundTrip(t *testing.T, s *Summary) *Summary {
	t.Helper()
	b, err := json.Marshal(s)
	if err != nil {
		t.Fatal(err)
	}
	var r Summary
	if err := json.Unmarshal(b, &r); err != nil {
		t.Fatalf("%v\n%s", err, b)
	}
	b2, err := json.Marshal(&r)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(b, b2) {
		t.Fatalf("state changes in a round trip:\n%s\n%s", b, b2)
	}
	return &r
}

func mustJSON(t *testing.T, s *Summary) []byte {
	t.Helper()
	b, err := json.Marshal(s)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// mergeAll merges parts, in the order given, into a new Summary.
func mergeAll(t *testing.T, parts []*Summary, order []int) *Summary {
	t.Helper()
	var s Summary // the zero value must work too
	for _, k := range order {
		if err := s.Merge(parts[k]); err != nil {
			t.Fatal(err)
		}
	}
	return &s
}

// Splitting the records of one run into shards (i mod N) or contiguous
// pieces, storing and restoring each part's Summary, resuming a stored
// Summary with the next piece, and merging the parts in any order all give
// the Summary of one pass over every record: the same state (the same
// bytes) and the same Result. (Property of the design: every figure is an
// integer count, a max, or a list kept by global index.)
func TestSummaryShardsAndResume(t *testing.T) {
	lake := demoModel(t, "lake")
	cases := []struct {
		name string
		recs []assess.Draw
		// want: some draws disagree, some are unresolved, some have a
		// semistable equilibrium with its side
		disagree, unresolved, semi bool
	}{
		{"lake, fabricated", fabricate(recordRun(t, lake, assess.Options{Draws: 2500, Seed: 5, Plan: sample.Random, Workers: 2}, HookOptions{})), true, true, false},
		{"double root", recordRun(t, scenario(t, doubleRootScenario), assess.Options{Draws: 300, Seed: 3, Plan: sample.Random, Workers: 2}, HookOptions{}), false, true, true},
		{"narrow bump", recordRun(t, scenario(t, bumpScenario), assess.Options{Draws: 400, Seed: 11, Plan: sample.LHS, Workers: 2}, HookOptions{}), false, false, false},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			rng := rand.New(rand.NewPCG(1, 2))
			all := NewSummary()
			feed(t, all, tc.recs, rng)
			want := all.Result()
			wantJSON := mustJSON(t, all)
			if tc.disagree && (want.Disagreeing <= MaxListed || len(want.ByKind) != 5) {
				t.Fatalf("fabricated records: %d disagreeing, kinds %+v", want.Disagreeing, want.ByKind)
			}
			if tc.unresolved && (want.Unresolved == 0 || want.MaxWidth == 0) {
				t.Fatalf("no unresolved draws: %+v", want)
			}
			if tc.semi && !strings.Contains(strings.Join(want.Regimes[0].Pattern, " "), "semistable-") {
				t.Fatalf("no side for the semistable equilibrium: %+v", want.Regimes)
			}
			check := func(what string, got *Summary) {
				t.Helper()
				if g := got.Result(); !reflect.DeepEqual(g, want) {
					t.Errorf("%s: result\n got %+v\nwant %+v", what, g, want)
				}
				if g := mustJSON(t, got); !bytes.Equal(g, wantJSON) {
					t.Errorf("%s: state\n got %s\nwant %s", what, g, wantJSON)
				}
			}
			check("round trip", roundTrip(t, all))
			for _, n := range []int{1, 2, 3, 7} {
				parts := make([]*Summary, n)
				for k := range parts {
					s := NewSummary()
					var shard []assess.Draw
					for i := k; i < len(tc.recs); i += n {
						shard = append(shard, tc.recs[i])
					}
					feed(t, s, shard, rng)
					parts[k] = roundTrip(t, s)
				}
				order := make([]int, n)
				for k := range order {
					order[k] = k
				}
				check("shards in order", mergeAll(t, parts, order))
				slices.Reverse(order)
				check("shards reversed", mergeAll(t, parts, order))
				rng.Shuffle(n, func(i, j int) { order[i], order[j] = order[j], order[i] })
				check("shards shuffled", mergeAll(t, parts, order))
			}
			// Contiguous pieces: resumed from the stored state, and merged.
			cuts := []int{0, 1, len(tc.recs) / 3, len(tc.recs) / 3, len(tc.recs)/2 + 7, len(tc.recs)}
			s := NewSummary()
			var pieces []*Summary
			for c := 1; c < len(cuts); c++ {
				piece := tc.recs[cuts[c-1]:cuts[c]]
				s = roundTrip(t, s)
				feed(t, s, piece, rng)
				p := NewSummary()
				feed(t, p, piece, rng)
				pieces = append(pieces, roundTrip(t, p))
			}
			check("resumed", s)
			check("pieces merged", mergeAll(t, pieces, []int{4, 0, 3, 1, 2}))
		})
	}
}

// The engine names a semistable equilibrium's side in its regimes
// (assess); with the hook's ExSides the certification summary names the
// scan's regimes the same way.
func TestSummarySemistableSide(t *testing.T) {
	m := scenario(t, doubleRootScenario)
	opt := assess.Options{Draws: 200, Seed: 3, Plan: sample.Random, Workers: 2}
	res, r, recs := runCertified(t, m, opt, HookOptions{})
	if !reflect.DeepEqual(r.Regimes, res.Regimes) {
		t.Errorf("regimes\n got %+v\nwant %+v (engine)", r.Regimes, res.Regimes)
	}
	for _, d := range recs {
		// x = 0 is equilibrium 0 and attracts from below (f ≈ r x² > 0 on
		// both sides; Strogatz ch. 2): the bit is clear, and known.
		if !d.SidesKnown || d.Sides != 0 {
			t.Fatalf("record %+v", d)
		}
	}
	// Without the side (a record whose hook could not tell), the regime
	// says "semistable".
	rec := assess.Draw{Pattern: []steady.Class{steady.Semistable, steady.Stable}, Extra: make([]float64, ExLen)}
	rec.Extra[ExStatus], rec.Extra[ExRoots], rec.Extra[ExBoxes], rec.Extra[ExSides] = float64(Unresolved), 1, 1, -1
	s := NewSummary()
	if err := s.Add([]assess.Draw{rec}); err != nil {
		t.Fatal(err)
	}
	if got := s.Result().Regimes; len(got) != 1 || !slices.Equal(got[0].Pattern, []string{"semistable", "stable"}) {
		t.Errorf("regimes %+v", got)
	}
	// Side above: bit 0 set.
	rec.Extra[ExSides] = 1
	s = NewSummary()
	s.Add([]assess.Draw{rec})
	if got := s.Result().Regimes; len(got) != 1 || !slices.Equal(got[0].Pattern, []string{"semistable-above", "stable"}) {
		t.Errorf("regimes %+v", got)
	}
}

func TestSummaryMergeErrors(t *testing.T) {
	recs := fabricate(recordRun(t, demoModel(t, "lake"), assess.Options{Draws: 200, Seed: 1, Plan: sample.Random, Workers: 1}, HookOptions{}))
	a, b := NewSummary(), NewSummary()
	a.Add(recs)
	b.Add(recs[100:])
	before := mustJSON(t, a)
	for name, o := range map[string]*Summary{"nil": nil, "itself": a, "overlapping": b} {
		if err := a.Merge(o); err == nil {
			t.Errorf("merge with %s accepted", name)
		}
	}
	if !bytes.Equal(mustJSON(t, a), before) {
		t.Error("a failed merge changed the summary")
	}
}

// keepFirst keeps the n smallest indices whatever the order of arrival.
func TestKeepFirst(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	id := func(i int) int { return i }
	for trial := 0; trial < 200; trial++ {
		n := 1 + rng.IntN(8)
		vals := rng.Perm(1 + rng.IntN(20))
		var list []int
		for _, v := range vals {
			list = keepFirst(list, v, n, id)
		}
		slices.Sort(vals)
		if want := vals[:min(n, len(vals))]; !slices.Equal(list, want) {
			t.Fatalf("n = %d: got %v, want %v", n, list, want)
		}
	}
}

// A stored state that Add and Merge cannot produce is an error, and the
// Summary is left as it was.
func TestSummaryStateErrors(t *testing.T) {
	recs := fabricate(recordRun(t, demoModel(t, "lake"), assess.Options{Draws: 1200, Seed: 1, Plan: sample.Random, Workers: 1}, HookOptions{}))
	s := NewSummary()
	s.Add(recs)
	good := string(mustJSON(t, s))
	var ok Summary
	if err := json.Unmarshal([]byte(good), &ok); err != nil {
		t.Fatal(err)
	}
	edit := func(from, to string) string {
		if !strings.Contains(good, from) {
			t.Fatalf("%q not in %s", from, good)
		}
		return strings.Replace(good, from, to, 1)
	}
	long := uint64(1) // the code of 20 stable equilibria, after every other
	for range 20 {
		long = long<<3 | codeStable
	}
	if !validCode(long) {
		t.Fatal("long code")
	}
	var j summaryJSON
	json.Unmarshal([]byte(good), &j)
	enc := func(f func(*summaryJSON)) string {
		c := j
		c.Regimes = slices.Clone(j.Regimes)
		c.CertRegimes = slices.Clone(j.CertRegimes)
		c.Kinds = slices.Clone(j.Kinds)
		c.Listed = slices.Clone(j.Listed)
		f(&c)
		b, _ := json.Marshal(c)
		return string(b)
	}
	bad := map[string]string{
		"empty":            ``,
		"not an object":    `[]`,
		"trailing data":    good + `{}`,
		"unknown field":    edit(`{`, `{"extra":1,`),
		"version":          enc(func(c *summaryJSON) { c.Version = 2 }),
		"negative seen":    enc(func(c *summaryJSON) { c.Seen = -1 }),
		"checked > seen":   enc(func(c *summaryJSON) { c.Seen = c.Checked - 1 }),
		"certified sum":    enc(func(c *summaryJSON) { c.Certified++ }),
		"negative evals":   enc(func(c *summaryJSON) { c.Evals = -1 }),
		"NaN width":        enc(func(c *summaryJSON) { c.MaxWidth = agg.ExactFloat(math.NaN()) }),
		"negative width":   enc(func(c *summaryJSON) { c.MaxWidth = -1 }),
		"minus zero width": enc(func(c *summaryJSON) { c.MaxWidth = agg.ExactFloat(math.Copysign(0, -1)) }),
		"width, none unresolved": enc(func(c *summaryJSON) {
			c.Certified += c.Unresolved
			c.Unresolved = 0
		}),
		"regime sum":       enc(func(c *summaryJSON) { c.Regimes[0].N++ }),
		"regime zero":      enc(func(c *summaryJSON) { c.Regimes = append(c.Regimes, regimeJSON{long, 0}) }),
		"regime code":      enc(func(c *summaryJSON) { c.Regimes[0].Code = 1<<3 | 7 }),
		"regime code len":  enc(func(c *summaryJSON) { c.Regimes[0].Code = 1<<2 | 1 }),
		"regime twice":     enc(func(c *summaryJSON) { c.Regimes = append(c.Regimes, c.Regimes[0]) }),
		"regime overflow":  enc(func(c *summaryJSON) { c.Regimes = append(c.Regimes, regimeJSON{long, math.MaxInt64}) }),
		"certified key":    enc(func(c *summaryJSON) { c.CertRegimes[0].Repelling = 1 << 40 }),
		"certified sum 2":  enc(func(c *summaryJSON) { c.CertRegimes[0].N-- }),
		"kind bits":        enc(func(c *summaryJSON) { c.Kinds[0].Kind = 3 }),
		"kind order":       enc(func(c *summaryJSON) { c.Kinds[0], c.Kinds[1] = c.Kinds[1], c.Kinds[0] }),
		"kind first":       enc(func(c *summaryJSON) { c.Kinds[0].First = c.Kinds[0].First[1:] }),
		"kind first order": enc(func(c *summaryJSON) { c.Kinds[0].First = []int{5, 4, 3, 2, 1} }),
		"kind count":       enc(func(c *summaryJSON) { c.Kinds[0].N = c.Disagreeing + 1 }),
		"listed short":     enc(func(c *summaryJSON) { c.Listed = c.Listed[1:] }),
		"listed order":     enc(func(c *summaryJSON) { c.Listed[0], c.Listed[1] = c.Listed[1], c.Listed[0] }),
		"listed flags":     enc(func(c *summaryJSON) { c.Listed[0].Flags = 0 }),
		"disagreeing":      enc(func(c *summaryJSON) { c.Disagreeing = c.Checked + 1 }),
		"count type":       edit(`"seen":`, `"seen":1.5,"x":`),
	}
	for name, b := range bad {
		got := ok
		if err := got.UnmarshalJSON([]byte(b)); err == nil {
			t.Errorf("%s: accepted\n%s", name, b)
		}
		if g := mustJSON(t, &got); string(g) != good {
			t.Errorf("%s: a failed read changed the summary", name)
		}
	}
}

// Fields takes only values the hook can write.
func TestFieldsRejects(t *testing.T) {
	base := func() []float64 {
		ex := make([]float64, ExLen)
		ex[ExStatus], ex[ExRoots], ex[ExRepelling], ex[ExEvals] = 1, 3, 2, 20
		return ex
	}
	if _, ok := Fields(&assess.Draw{Extra: base()}); !ok {
		t.Fatal("valid record rejected")
	}
	for name, f := range map[string]func([]float64){
		"status":     func(ex []float64) { ex[ExStatus] = 3 },
		"roots":      func(ex []float64) { ex[ExRoots] = -1 },
		"fraction":   func(ex []float64) { ex[ExEvals] = 2.5 },
		"NaN count":  func(ex []float64) { ex[ExBoxes] = math.NaN() },
		"repelling":  func(ex []float64) { ex[ExRepelling] = 8 }, // 3 roots: bits 0..2
		"not > 52":   func(ex []float64) { ex[ExRepelling] = -1 },
		"flags":      func(ex []float64) { ex[ExFlags] = 32 },
		"width":      func(ex []float64) { ex[ExMaxWidth] = math.NaN() },
		"sum width":  func(ex []float64) { ex[ExSumWidth] = -1 },
		"sides":      func(ex []float64) { ex[ExSides] = -2 },
		"huge count": func(ex []float64) { ex[ExEvals] = 1 << 60 },
	} {
		ex := base()
		f(ex)
		if d, ok := Fields(&assess.Draw{Extra: ex}); ok {
			t.Errorf("%s: accepted as %+v", name, d)
		}
	}
}

// FuzzSummaryState: UnmarshalJSON never panics; a state it accepts
// writes back to the same bytes once normalised (marshal, unmarshal,
// marshal is a fixed point), gives a Result, and accepts more records and
// a merge. Seeds: testdata/fuzz/FuzzSummaryState (states of the lake demo
// with fabricated disagreements, of the double-root scenario, an empty
// one, one with an infinite width) and f.Add below.
func FuzzSummaryState(f *testing.F) {
	f.Add([]byte(`{"version":1,"seen":0,"checked":0,"certified":0,"unresolved":0,"evals":0,"max_width":0,"regimes":[],"certified_regimes":[],"disagreeing":0,"kinds":[],"listed":[]}`))
	f.Add([]byte(`{"version":1,"seen":3,"checked":2,"certified":1,"unresolved":1,"evals":40,"max_width":"+Inf","regimes":[{"code":83,"n":2}],"certified_regimes":[{"roots":2,"repelling":0,"n":1}],"disagreeing":1,"kinds":[{"kind":4,"n":1,"first":[2]}],"listed":[{"draw":2,"flags":4}]}`))
	rec := assess.Draw{Index: 1 << 40, Pattern: []steady.Class{steady.Stable, steady.Semistable}, Extra: make([]float64, ExLen)}
	rec.Extra[ExStatus], rec.Extra[ExRoots], rec.Extra[ExBoxes], rec.Extra[ExFlags], rec.Extra[ExSides] = float64(Unresolved), 1, 1, float64(NotARoot), 2
	rec.Extra[ExMaxWidth] = 0.25
	f.Fuzz(func(t *testing.T, b []byte) {
		var s Summary
		if err := s.UnmarshalJSON(b); err != nil {
			return
		}
		b1, err := s.MarshalJSON()
		if err != nil {
			t.Fatal(err)
		}
		var s2 Summary
		if err := s2.UnmarshalJSON(b1); err != nil {
			t.Fatalf("own output rejected: %v\n%s", err, b1)
		}
		if b2, _ := s2.MarshalJSON(); !bytes.Equal(b1, b2) {
			t.Fatalf("not a fixed point:\n%s\n%s", b1, b2)
		}
		r := s.Result()
		r.Warnings()
		if r.Draws != s.seen || r.Checked != s.checked {
			t.Fatalf("result %+v", r)
		}
		s.Add([]assess.Draw{rec})
		var s3 Summary
		s3.UnmarshalJSON(b1)
		if err := s.Merge(&s3); err == nil {
			// no shared listed draw: the merged state must still be valid
			b3, _ := s.MarshalJSON()
			if err := s2.UnmarshalJSON(b3); err != nil {
				t.Fatalf("merged state rejected: %v\n%s", err, b3)
			}
		}
	})
}
