package scenarios

import (
	"errors"
	"math"
	"os"
	"path/filepath"
	"testing"
	"testing/fstest"
)

// FuzzParse checks that Parse never panics, that a failure is a sorted,
// bounded ErrorList, and that a success satisfies the invariants the rest
// of holdfast relies on. The seeds are the demos and the bad-input
// catalogue.
func FuzzParse(f *testing.F) {
	for _, name := range Demos() {
		data, err := DemoSource(name)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(data)
	}
	bad, _ := filepath.Glob(filepath.Join("..", "testdata", "bad", "*.yaml"))
	for _, file := range bad {
		data, err := os.ReadFile(file)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(data)
	}
	f.Add([]byte(oneParam("{dist: empirical, file: data.csv, column: a}")))
	dir := fstest.MapFS{"data.csv": {Data: []byte("a,b\n1,2\n3,4\n5,\n")}}

	f.Fuzz(func(t *testing.T, data []byte) {
		s, err := Parse("fuzz.yaml", data, dir)
		if err != nil {
			var list ErrorList
			if !errors.As(err, &list) || len(list) == 0 || len(list) > MaxErrors+1 {
				t.Fatalf("error %v (%T) is not a bounded ErrorList", err, err)
			}
			for _, e := range list {
				if e.Msg == "" {
					t.Fatalf("empty message in %v", list)
				}
			}
			return
		}
		if s.Version != Version || s.Title == "" || s.Rate == "" || !IsIdentifier(s.State.Symbol) {
			t.Fatalf("accepted an incomplete scenario: %+v", s)
		}
		if d := s.State.Domain; !(d[0] < d[1]) || math.IsInf(d[1]-d[0], 0) {
			t.Fatalf("domain %v", d)
		}
		if st := s.State; st.HasCurrent && (st.Current < st.Domain[0] || st.Current > st.Domain[1]) {
			t.Fatalf("current %v outside %v", st.Current, st.Domain)
		}
		for _, p := range s.Params {
			if p.Fixed != (p.Dist == nil) || math.IsNaN(p.Nominal) || math.IsInf(p.Nominal, 0) {
				t.Fatalf("parameter %+v", p)
			}
			if p.Dist != nil {
				if lo, hi := p.Dist.Support(); p.Nominal < lo || p.Nominal > hi {
					t.Fatalf("nominal %v outside support [%v, %v]", p.Nominal, lo, hi)
				}
			}
		}
		for _, c := range s.Correlations {
			a, b := s.ParamIndex(c.A), s.ParamIndex(c.B)
			if a < 0 || b < 0 || s.Params[a].Fixed || s.Params[b].Fixed || !(c.Rho >= -1 && c.Rho <= 1) {
				t.Fatalf("correlation %+v", c)
			}
		}
		for off := 0; off <= len(s.Rate); off++ {
			if p := s.RateOffsetPos(off); !p.IsValid() {
				t.Fatalf("RateOffsetPos(%d) = %v", off, p)
			}
		}
	})
}
