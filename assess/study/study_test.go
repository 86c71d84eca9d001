package study

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"reflect"
	"sort"
	"strings"
	"testing"

	"holdfast/assess"
	"holdfast/sample"
	"holdfast/scenarios"
)

func demo(t testing.TB, name string) *assess.Model {
	t.Helper()
	s, err := scenarios.LoadDemo(name)
	if err != nil {
		t.Fatal(err)
	}
	m, err := assess.Compile(s)
	if err != nil {
		t.Fatal(err)
	}
	return m
}

// printable prints an outcome for comparison, following pointers (the
// nominal analysis, recomputed by each run, is left out). Undefined
// measures are NaN, which fmt prints as such, so equal outcomes print
// equal.
func printable(t *testing.T, o *Outcome) string {
	t.Helper()
	r := *o.Result
	r.Nominal = nil
	var b strings.Builder
	dump(&b, reflect.ValueOf([]any{r, o.Screening, o.Figures, o.Certification}))
	return b.String()
}

func dump(b *strings.Builder, v reflect.Value) {
	switch v.Kind() {
	case reflect.Pointer, reflect.Interface:
		if v.IsNil() {
			b.WriteString("nil")
			return
		}
		dump(b, v.Elem())
	case reflect.Struct:
		b.WriteString("{")
		for i := range v.NumField() {
			b.WriteString(v.Type().Field(i).Name + ":")
			dump(b, v.Field(i))
			b.WriteString(" ")
		}
		b.WriteString("}")
	case reflect.Slice, reflect.Array:
		b.WriteString("[")
		for i := range v.Len() {
			dump(b, v.Index(i))
			b.WriteString(" ")
		}
		b.WriteString("]")
	case reflect.Map:
		keys := v.MapKeys()
		sort.Slice(keys, func(i, j int) bool { return fmt.Sprint(keys[i]) < fmt.Sprint(keys[j]) })
		b.WriteString("map[")
		for _, k := range keys {
			fmt.Fprintf(b, "%v:", k)
			dump(b, v.MapIndex(k))
			b.WriteString(" ")
		}
		b.WriteString("]")
	case reflect.Func:
		b.WriteString("func")
	default:
		fmt.Fprintf(b, "%v", v)
	}
}

func TestShardsMergeToTheSingleStudy(t *testing.T) {
	// Four shards, each through its stored state as separate processes
	// would hand it over, merge into the outcome of one run: engine,
	// screening, figures and certification alike (common practice for
	// exact mergeable aggregates, no source).
	for _, name := range []string{"lake", "reactor"} {
		m := demo(t, name)
		cfg := Config{Certify: true}
		opt := assess.Options{Draws: 2501, Seed: 4, Plan: sample.QMC, Workers: 2}
		whole, err := mustNew(t, m, cfg).Run(context.Background(), opt)
		if err != nil {
			t.Fatal(err)
		}
		var states []*State
		for k := 3; k >= 0; k-- {
			o := opt
			o.Shard = assess.Shard{K: k, N: 4}
			st, err := mustNew(t, m, cfg).RunShard(context.Background(), o)
			if err != nil {
				t.Fatal(err)
			}
			raw, err := json.Marshal(st)
			if err != nil {
				t.Fatal(err)
			}
			var back State
			if err := json.Unmarshal(raw, &back); err != nil {
				t.Fatal(err)
			}
			states = append(states, &back)
		}
		merged, err := Merge(m, cfg, opt, states)
		if err != nil {
			t.Fatal(err)
		}
		if a, b := printable(t, whole), printable(t, merged); a != b {
			t.Errorf("%s: merged shards differ from the single run", name)
		}
		if _, err := Merge(m, Config{}, opt, states); err == nil {
			t.Errorf("%s: parts made with certification merged into a study without it", name)
		}
	}
}

func TestCheckpointResumesToTheUninterruptedStudy(t *testing.T) {
	// Stopped after its first checkpoint and resumed from the stored
	// state, a study ends with the outcome of an uninterrupted one (common
	// practice for checkpointed batch jobs, no source).
	m := demo(t, "fishery")
	opt := assess.Options{Draws: 80_000, Seed: 2, Plan: sample.LHS, Workers: 2}
	whole, err := mustNew(t, m, Config{}).Run(context.Background(), opt)
	if err != nil {
		t.Fatal(err)
	}
	var saved []byte
	stop := errors.New("stop")
	s := mustNew(t, m, Config{})
	o := opt
	o.CheckpointEvery = 1
	o.Checkpoint = s.Checkpoint(func(st *State) error {
		var err error
		if saved, err = json.Marshal(st); err != nil {
			return err
		}
		return stop
	})
	if _, err := s.Run(context.Background(), o); !errors.Is(err, stop) {
		t.Fatalf("run not stopped at its checkpoint: %v", err)
	}
	var st State
	if err := json.Unmarshal(saved, &st); err != nil {
		t.Fatal(err)
	}
	r := mustNew(t, m, Config{})
	p, err := r.Restore(&st)
	if err != nil {
		t.Fatal(err)
	}
	if p.Complete() {
		t.Fatal("the checkpoint covers the whole run")
	}
	o = opt
	o.Resume = p
	resumed, err := r.Run(context.Background(), o)
	if err != nil {
		t.Fatal(err)
	}
	if a, b := printable(t, whole), printable(t, resumed); a != b {
		t.Error("resumed study differs from the uninterrupted one")
	}
}

func mustNew(t *testing.T, m *assess.Model, cfg Config) *Study {
	t.Helper()
	s, err := New(m, cfg)
	if err != nil {
		t.Fatal(err)
	}
	return s
}
