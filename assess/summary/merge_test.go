package summary

import (
	"context"
	"encoding/json"
	"fmt"
	"math/rand/v2"
	"reflect"
	"slices"
	"strings"
	"sync"
	"testing"

	"holdfast/assess"
	"holdfast/sample"
	"holdfast/scenarios"
)

// lakeCfg keeps the band and the checkpoints small so that draw counts
// below and above them are cheap: band of the draws below 300, first
// checkpoint at 16.
var lakeCfg = Config{GridPoints: 9, BandDraws: 300, Bins: 12, PilotDraws: 100}

// lakeMax draws of the lake demo (illustrative numbers) are run once.
const lakeMax = 1100

var lakeOnce struct {
	sync.Once
	m    *assess.Model
	recs []assess.Draw
	err  error
}

// lakeRecords runs the lake demo once with a Collector's Extra and keeps a
// deep copy of every record (the engine reuses Theta, Tracked, Pattern and
// Extra after the Sink returns). Every 97th record is marked failed, as
// the engine leaves a draw it cannot assess (no figures), so that failed
// draws are counted too.
func lakeRecords(t testing.TB) (*assess.Model, []assess.Draw) {
	t.Helper()
	o := &lakeOnce
	o.Do(func() {
		s, err := scenarios.LoadDemo("lake")
		if err != nil {
			o.err = err
			return
		}
		if o.m, err = assess.Compile(s); err != nil {
			o.err = err
			return
		}
		c, err := NewCollector(o.m, lakeCfg)
		if err != nil {
			o.err = err
			return
		}
		_, o.err = assess.Run(context.Background(), o.m, assess.Options{
			Draws: lakeMax, Seed: 11, Plan: sample.LHS, Workers: 2, Extra: c.Extra,
			Sink: func(block []assess.Draw) error {
				for _, d := range block {
					d = deepCopy(d)
					if d.Index%97 == 50 {
						d.Failed, d.Tracked, d.Pattern, d.Outcome, d.Extra = "illustrative failure", nil, nil, "", nil
					}
					o.recs = append(o.recs, d)
				}
				return nil
			},
		})
	})
	if o.err != nil {
		t.Fatal(o.err)
	}
	return o.m, o.recs
}

func newCollector(t testing.TB, m *assess.Model, cfg Config) *Collector {
	t.Helper()
	c, err := NewCollector(m, cfg)
	if err != nil {
		t.Fatal(err)
	}
	return c
}

// feed adds recs to c in blocks of irregular sizes.
func feed(t testing.TB, c *Collector, recs []assess.Draw) {
	t.Helper()
	for i, b := 0, 1; i < len(recs); i, b = i+b, b*3%101+1 {
		if err := c.Add(recs[i:min(i+b, len(recs))]); err != nil {
			t.Fatal(err)
		}
	}
}

// roundTrip saves c and restores it into a new Collector.
func roundTrip(t testing.TB, m *assess.Model, cfg Config, c *Collector) *Collector {
	t.Helper()
	b, err := json.Marshal(c)
	if err != nil {
		t.Fatal(err)
	}
	r := newCollector(t, m, cfg)
	if err := json.Unmarshal(b, r); err != nil {
		t.Fatal(err)
	}
	return r
}

// mergeAll merges restored copies of the parts in the given order, or as
// a balanced tree when order is nil.
func mergeAll(t testing.TB, m *assess.Model, parts []*Collector, order []int) *Collector {
	t.Helper()
	cs := make([]*Collector, len(parts))
	for i, p := range parts {
		cs[i] = roundTrip(t, m, lakeCfg, p)
	}
	if order == nil {
		for len(cs) > 1 {
			var next []*Collector
			for i := 0; i < len(cs); i += 2 {
				if i+1 < len(cs) {
					if err := cs[i].Merge(cs[i+1]); err != nil {
						t.Fatal(err)
					}
				}
				next = append(next, cs[i])
			}
			cs = next
		}
		return cs[0]
	}
	into := cs[order[0]]
	for _, k := range order[1:] {
		if err := into.Merge(cs[k]); err != nil {
			t.Fatal(err)
		}
	}
	return into
}

// sameSummary reports how got differs from want (nil if it does not),
// by reflect.DeepEqual and by their JSON.
func sameSummary(got, want *Summary) error {
	if !reflect.DeepEqual(got, want) {
		return fmt.Errorf("summaries differ:\n got %+v\nwant %+v", got, want)
	}
	a, err1 := json.Marshal(got)
	b, err2 := json.Marshal(want)
	if err1 != nil || err2 != nil || string(a) != string(b) {
		return fmt.Errorf("JSON differs (%v, %v)", err1, err2)
	}
	return nil
}

func TestShardsMergeToTheSingleRun(t *testing.T) {
	// The guarantee of the package: draws 0…n−1 split among collectors,
	// by i mod N or in consecutive pieces, each saved and restored, then
	// merged in any order give the summary of one collector fed them all.
	// n runs below and above the first checkpoints (16, 32, …), the band
	// (300) and the old pilot size (100), and is not a multiple of N.
	m, all := lakeRecords(t)
	for _, n := range []int{1, 5, 15, 17, 33, 299, 301, 1001, lakeMax} {
		recs := all[:n]
		single := newCollector(t, m, lakeCfg)
		feed(t, single, recs)
		want := single.Summary()
		if n == lakeMax && (want.BandDraws == 0 || want.BandDraws >= 300 || len(want.Running) != 8) {
			t.Fatalf("n=%d: band of %d draws, %d checkpoints", n, want.BandDraws, len(want.Running))
		}
		type split struct {
			name  string
			parts [][]assess.Draw
		}
		var splits []split
		for _, nn := range []int{2, 3, 4, 7} {
			parts := make([][]assess.Draw, nn)
			for _, r := range recs {
				parts[r.Index%nn] = append(parts[r.Index%nn], r)
			}
			splits = append(splits, split{fmt.Sprintf("mod %d", nn), parts})
		}
		a, b := n/3, n/3+n/4
		splits = append(splits,
			split{"pieces", [][]assess.Draw{recs[:a], recs[a:b], recs[b:]}},
			split{"pieces with an empty one", [][]assess.Draw{recs[:b], recs[b:b], recs[b:]}})
		for _, sp := range splits {
			parts := make([]*Collector, len(sp.parts))
			for i, p := range sp.parts {
				parts[i] = newCollector(t, m, lakeCfg)
				feed(t, parts[i], p)
			}
			k := len(parts)
			rng := rand.New(rand.NewPCG(uint64(n), uint64(k)))
			for _, order := range [][]int{seq(k), reversed(seq(k)), rng.Perm(k), nil} {
				got := mergeAll(t, m, parts, order).Summary()
				if err := sameSummary(got, want); err != nil {
					t.Fatalf("n=%d, %s, merge order %v: %v", n, sp.name, order, err)
				}
			}
		}
	}
}

func reversed(s []int) []int {
	slices.Reverse(s)
	return s
}

func seq(k int) []int {
	s := make([]int, k)
	for i := range s {
		s[i] = i
	}
	return s
}

func TestResumeGivesTheUninterruptedState(t *testing.T) {
	// A collector saved after draws [0, a), restored and fed [a, n) holds
	// the very state of one fed [0, n) without a break: the same saved
	// bytes, the same summary.
	m, recs := lakeRecords(t)
	single := newCollector(t, m, lakeCfg)
	feed(t, single, recs)
	want, err := json.Marshal(single)
	if err != nil {
		t.Fatal(err)
	}
	for _, a := range []int{0, 1, 16, 17, 299, 300, 777, lakeMax} {
		c := newCollector(t, m, lakeCfg)
		feed(t, c, recs[:a])
		c = roundTrip(t, m, lakeCfg, c)
		feed(t, c, recs[a:])
		got, err := json.Marshal(c)
		if err != nil {
			t.Fatal(err)
		}
		if string(got) != string(want) {
			t.Errorf("resumed at %d: state differs", a)
		}
		if err := sameSummary(c.Summary(), single.Summary()); err != nil {
			t.Errorf("resumed at %d: %v", a, err)
		}
	}
	// Saving twice gives the same bytes.
	again, _ := json.Marshal(single)
	if string(again) != string(want) {
		t.Error("MarshalJSON is not deterministic")
	}
}

func TestAddInAnyOrder(t *testing.T) {
	// Every figure is placed by the draw's index, so the order of the
	// records does not matter.
	m, recs := lakeRecords(t)
	recs = recs[:400]
	single := newCollector(t, m, lakeCfg)
	feed(t, single, recs)
	shuffled := slices.Clone(recs)
	rng := rand.New(rand.NewPCG(7, 8))
	rng.Shuffle(len(shuffled), func(i, j int) { shuffled[i], shuffled[j] = shuffled[j], shuffled[i] })
	c := newCollector(t, m, lakeCfg)
	feed(t, c, shuffled)
	if err := sameSummary(c.Summary(), single.Summary()); err != nil {
		t.Error(err)
	}
}

func TestShardAloneCheckpoints(t *testing.T) {
	// Shard 0 of 2 over draws 0…99 sees the 50 even draws: the checkpoint
	// at 16 counts its 8 draws below 16, the one at 32 its 16 below 32;
	// 64 exceeds the 50 draws seen; the last counts all 50.
	m, recs := lakeRecords(t)
	c := newCollector(t, m, lakeCfg)
	for _, r := range recs[:100] {
		if r.Index%2 == 0 {
			feed(t, c, []assess.Draw{r})
		}
	}
	var draws []int64
	for _, cp := range c.Summary().Running {
		draws = append(draws, cp.Draws)
	}
	if fmt.Sprint(draws) != "[8 16 50]" {
		t.Errorf("checkpoints %v, want [8 16 50]", draws)
	}
}

func TestMergeRefusesDifferentCollectors(t *testing.T) {
	lake, recs := lakeRecords(t)
	stock := stockModel(t)
	// The same stock with another domain: same labels, another grid.
	src := strings.Replace(stockSrc, "domain: [0, 6]", "domain: [0, 5]", 1)
	s, err := scenarios.Parse("stock5.yaml", []byte(src), nil)
	if err != nil {
		t.Fatal(err)
	}
	stock5, err := assess.Compile(s)
	if err != nil {
		t.Fatal(err)
	}
	base := newCollector(t, lake, lakeCfg)
	feed(t, base, recs[:50])
	before, _ := json.Marshal(base)
	other := lakeCfg
	other.Bins = 13
	for _, tc := range []struct {
		name string
		o    *Collector
		want string
	}{
		{"config", newCollector(t, lake, other), "Bins 12 and 13"},
		{"labels", newCollector(t, stock, lakeCfg), "labels differ"},
		{"itself", base, "itself"},
		{"nil", nil, "NewCollector"},
		{"zero", &Collector{}, "NewCollector"},
	} {
		err := base.Merge(tc.o)
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: %v, want an error with %q", tc.name, err, tc.want)
		}
	}
	if err := newCollector(t, stock, lakeCfg).Merge(newCollector(t, stock5, lakeCfg)); err == nil || !strings.Contains(err.Error(), "grids differ") {
		t.Errorf("other domain: %v", err)
	}
	if after, _ := json.Marshal(base); string(after) != string(before) {
		t.Error("a refused merge changed the collector")
	}
}
