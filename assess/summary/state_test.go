package summary

import (
	"context"
	"encoding/json"
	"slices"
	"strings"
	"testing"

	"holdfast/assess"
	"holdfast/sample"
)

// fuzzCfg is the configuration of the collector the fuzz target restores
// into (on the harvested stock of stockSrc).
var fuzzCfg = Config{GridPoints: 5, Bins: 4, BandDraws: 40, FirstCheckpoint: 4}

// stockState is the saved state of a collector after 100 draws of the
// harvested stock.
func stockState(t testing.TB) (*assess.Model, []byte) {
	t.Helper()
	m := stockModel(t)
	c, err := NewCollector(m, fuzzCfg)
	if err != nil {
		t.Fatal(err)
	}
	collectInto(t, m, c, 100)
	b, err := json.Marshal(c)
	if err != nil {
		t.Fatal(err)
	}
	return m, b
}

func TestStateRoundTripsAndIsChecked(t *testing.T) {
	m, good := stockState(t)
	// edit returns the good state with one member changed.
	edit := func(f func(st map[string]any)) []byte {
		var st map[string]any
		if err := json.Unmarshal(good, &st); err != nil {
			t.Fatal(err)
		}
		f(st)
		b, err := json.Marshal(st)
		if err != nil {
			t.Fatal(err)
		}
		return b
	}
	sub := func(st map[string]any, key string) map[string]any { return st[key].(map[string]any) }
	for _, tc := range []struct {
		name, want string
		state      []byte
	}{
		{"not JSON", "reading collector state", []byte("{")},
		{"trailing", "data after", append(append([]byte{}, good...), "{}"...)},
		{"unknown member", "unknown field", edit(func(st map[string]any) { st["extra"] = 1 })},
		{"format", "format", edit(func(st map[string]any) { st["format"] = "other/1" })},
		{"config", "config Bins 5, collector 4", edit(func(st map[string]any) { sub(st, "config")["bins"] = 5 })},
		{"labels", "labels", edit(func(st map[string]any) { st["labels"] = []string{"E1"} })},
		{"current", "current state", edit(func(st map[string]any) { st["current_state"] = false })},
		{"grid", "grid [0, 7]", edit(func(st map[string]any) { st["grid_ends"] = []any{0, 7} })},
		{"grid NaN", "grid [0, NaN]", edit(func(st map[string]any) { st["grid_ends"] = []any{0, "NaN"} })},
		{"grid length", "3 grid ends", edit(func(st map[string]any) { st["grid_ends"] = []any{0, 6, 7} })},
		{"grid string", "bad number", edit(func(st map[string]any) { st["grid_ends"] = []any{0, "six"} })},
		{"band draws", "band of 101 draws", edit(func(st map[string]any) { sub(st, "band")["draws"] = 101 })},
		{"band length", "band: 4 undefined", edit(func(st map[string]any) {
			u := sub(st, "band")["undefined"].([]any)
			sub(st, "band")["undefined"] = u[:4]
		})},
		{"band counts", "band point 2", edit(func(st map[string]any) { sub(st, "band")["undefined"].([]any)[2] = 1 })},
		{"band sketch", "band sketch 0", edit(func(st map[string]any) { sub(st, "band")["sketches"].([]any)[0] = map[string]any{"count": -1} })},
		{"slopes length", "slope sketches", edit(func(st map[string]any) { st["slopes"] = st["slopes"].([]any)[:1] })},
		{"slopes count", "slope sketch 1", edit(func(st map[string]any) {
			sk := st["slopes"].([]any)[1].(map[string]any)
			sk["count"], sk["zero"] = sk["count"].(float64)+1000, sk["zero"].(float64)+1000
		})},
		{"succeeded", "succeeded of", edit(func(st map[string]any) { sub(st, "counts")["succeeded"] = 101 })},
		{"negative", "succeeded of", edit(func(st map[string]any) { sub(st, "counts")["draws"] = -1 })},
		{"exists", "equilibrium 0", edit(func(st map[string]any) { sub(st, "counts")["exists"].([]any)[0] = 101 })},
		{"attracting", "equilibrium 1", edit(func(st map[string]any) { sub(st, "counts")["semistable"].([]any)[1] = 2 })},
		{"ends", "ends there", edit(func(st map[string]any) { sub(st, "counts")["ends"].([]any)[0] = 100 })},
		{"lengths", "counts per kind", edit(func(st map[string]any) { sub(st, "counts")["ends"] = []int{} })},
		{"not monotone", "fall below", edit(func(st map[string]any) {
			cl := st["closed_checkpoints"].([]any)
			cl[0], cl[1] = cl[1], cl[0]
		})},
		{"above totals", "exceed the totals", edit(func(st map[string]any) {
			more := map[string]any{}
			for k, v := range sub(st, "counts") {
				more[k] = v
			}
			more["draws"] = 101.0
			st["closed_checkpoints"] = append(st["closed_checkpoints"].([]any), more)
		})},
		{"too many", "too many", edit(func(st map[string]any) {
			cl := st["closed_checkpoints"].([]any)
			for len(cl) < 70 {
				cl = append(cl, st["counts"])
			}
			st["closed_checkpoints"] = cl
		})},
	} {
		c := newCollector(t, m, fuzzCfg)
		before, _ := json.Marshal(c)
		err := c.UnmarshalJSON(tc.state)
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: %v, want an error with %q", tc.name, err, tc.want)
		}
		if after, _ := json.Marshal(c); string(after) != string(before) {
			t.Errorf("%s: a refused state changed the collector", tc.name)
		}
	}
	// The untouched state reads back, and writes the same bytes.
	c := newCollector(t, m, fuzzCfg)
	if err := json.Unmarshal(good, c); err != nil {
		t.Fatal(err)
	}
	if again, _ := json.Marshal(c); string(again) != string(good) {
		t.Errorf("state changed on a round trip:\n%s\n%s", good, again)
	}
	var zero Collector
	if _, err := zero.MarshalJSON(); err == nil {
		t.Error("zero Collector marshalled")
	}
	if err := zero.UnmarshalJSON(good); err == nil {
		t.Error("zero Collector unmarshalled")
	}
}

// FuzzCollectorState feeds arbitrary bytes to UnmarshalJSON: it must not
// panic, and a state it accepts must save again, read back to the same
// bytes, and leave a Collector that takes further draws and merges.
func FuzzCollectorState(f *testing.F) {
	m, good := stockState(f)
	f.Add(good)
	f.Add([]byte(`{}`))
	f.Add([]byte(`{"format":"holdfast.summary.collector/1"}`))
	more := collectRecords(f, m, fuzzCfg, 8)
	f.Fuzz(func(t *testing.T, b []byte) {
		c, err := NewCollector(m, fuzzCfg)
		if err != nil {
			t.Fatal(err)
		}
		if c.UnmarshalJSON(b) != nil {
			return
		}
		out, err := c.MarshalJSON()
		if err != nil {
			t.Fatalf("accepted state does not save: %v", err)
		}
		d, _ := NewCollector(m, fuzzCfg)
		if err := d.UnmarshalJSON(out); err != nil {
			t.Fatalf("saved state does not read back: %v\n%s", err, out)
		}
		if again, _ := d.MarshalJSON(); string(again) != string(out) {
			t.Fatalf("state changed on a round trip:\n%s\n%s", out, again)
		}
		c.Summary()
		if err := c.Add(more); err != nil {
			t.Fatal(err)
		}
		if err := c.Merge(d); err != nil {
			t.Fatal(err)
		}
		c.Summary()
	})
}

// collectInto runs n draws of the model into c.
func collectInto(t testing.TB, m *assess.Model, c *Collector, n int) {
	t.Helper()
	_, err := assess.Run(context.Background(), m, assess.Options{
		Draws: n, Seed: 5, Plan: sample.LHS, Workers: 2, Extra: c.Extra, Sink: c.Add,
	})
	if err != nil {
		t.Fatal(err)
	}
}

// collectRecords runs n draws of the model with the band figures of a
// collector for cfg and returns deep copies of the records.
func collectRecords(t testing.TB, m *assess.Model, cfg Config, n int) []assess.Draw {
	t.Helper()
	c, err := NewCollector(m, cfg)
	if err != nil {
		t.Fatal(err)
	}
	var recs []assess.Draw
	_, err = assess.Run(context.Background(), m, assess.Options{
		Draws: n, Seed: 5, Plan: sample.LHS, Workers: 2, Extra: c.Extra,
		Sink: func(block []assess.Draw) error {
			for _, d := range block {
				recs = append(recs, deepCopy(d))
			}
			return nil
		},
	})
	if err != nil {
		t.Fatal(err)
	}
	return recs
}

// deepCopy copies a record out of the engine's buffers, which it reuses
// after the Sink returns.
func deepCopy(d assess.Draw) assess.Draw {
	d.Theta = slices.Clone(d.Theta)
	d.Tracked = slices.Clone(d.Tracked)
	d.Pattern = slices.Clone(d.Pattern)
	d.Extra = slices.Clone(d.Extra)
	return d
}
