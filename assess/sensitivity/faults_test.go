package sensitivity

import (
	"slices"
	"strings"
	"testing"

	"holdfast/assess"
	"holdfast/internal/testscenario"
	"holdfast/sample"
)

// faultSrc has an undefined stretch inside the domain in about 0.4/1.4
// of the draws (see testscenario.UndefinedStretch).
const faultSrc = testscenario.UndefinedStretch

const correlated = `correlations:
  - [r, c, 0.3]
`

// undefinedAt returns the indices i < n whose parameters theta(i) put c
// above 0, that is, an undefined stretch of log(x − c) inside the domain
// [0, 6] (log(y) is undefined for y ≤ 0; analytic).
func undefinedAt(n int, theta func(i int, th []float64), c int, dim int) []int {
	var out []int
	th := make([]float64, dim)
	for i := range n {
		theta(i, th)
		if th[c] > 0 {
			out = append(out, i)
		}
	}
	return out
}

func TestRunCountsFaultsOfEveryRun(t *testing.T) {
	for _, tc := range []struct {
		name string
		src  string
	}{{"independent", faultSrc}, {"correlated", faultSrc + correlated}} {
		t.Run(tc.name, func(t *testing.T) {
			m := compile(t, tc.src)
			const base, seed = 64, 11
			r := run(t, tc.src, Options{Target: "E2", Output: Position, Base: base, Seed: seed, Workers: 3})
			ci := m.Scenario.ParamIndex("c")

			// The runs of the Saltelli design, mapped as Run maps them.
			d, err := NewDesign(base, 2, seed)
			if err != nil {
				t.Fatal(err)
			}
			params := make([]sample.Param, len(m.Scenario.Params))
			for i, p := range m.Scenario.Params {
				params[i] = sample.Param{Name: p.Name, Dist: p.Dist, Value: p.Value}
			}
			indep, err := sample.NewDesign(params, nil, sample.Random, 1, seed)
			if err != nil {
				t.Fatal(err)
			}
			want := undefinedAt(d.Runs(), func(i int, th []float64) {
				u := th[:2]
				d.Point(i, u)
				indep.Map(u, th)
			}, ci, len(params))
			// The screening run's draws, the scenario's own Latin
			// hypercube with its correlation, indexed after the design.
			if r.ScreenRuns > 0 {
				lhs, err := m.Design(sample.LHS, r.ScreenRuns, seed)
				if err != nil {
					t.Fatal(err)
				}
				for _, i := range undefinedAt(r.ScreenRuns, lhs.Draw, ci, len(params)) {
					want = append(want, r.Runs+i)
				}
			}
			if tc.name == "correlated" && r.ScreenRuns != 2*base {
				t.Fatalf("screening runs %d, want %d", r.ScreenRuns, 2*base)
			}
			if len(want) == 0 {
				t.Fatal("the fixture has no run with c > 0")
			}
			t.Logf("%d of %d runs with c > 0; faults %+v; warnings %q", len(want), r.Runs+r.ScreenRuns, r.Faults, r.Warnings)
			if len(r.Faults) != 1 {
				t.Fatalf("faults %+v, want one reason", r.Faults)
			}
			f := r.Faults[0]
			if !strings.Contains(f.Reason, "log") || f.Draws != int64(len(want)) || r.Faulted != int64(len(want)) {
				t.Errorf("faults %+v, %d runs faulted; want %d runs with a log fault", f, r.Faulted, len(want))
			}
			if !slices.Equal(f.First, want[:min(5, len(want))]) {
				t.Errorf("first runs %v, want %v", f.First, want[:min(5, len(want))])
			}
			if len(r.Failed) != 0 || r.FailedRuns != 0 {
				t.Errorf("failed %+v (%d)", r.Failed, r.FailedRuns)
			}
			// About 0.4/1.4 of the runs have c > 0, far above 0.1%: the
			// engine warns (common practice, no source), and for the
			// screening run too, marked as such.
			warned := 0
			for _, w := range r.Warnings {
				if strings.Contains(w, "numeric trouble") && strings.Contains(w, "more than 0.1%") {
					warned++
					if r.ScreenRuns > 0 && warned == 2 && !strings.HasPrefix(w, "screening run: ") {
						t.Errorf("screening run's warning %q not marked", w)
					}
				}
			}
			if wantWarned := 1 + min(r.ScreenRuns, 1); warned != wantWarned {
				t.Errorf("%d fault warnings, want %d: %q", warned, wantWarned, r.Warnings)
			}
		})
	}
}

func TestMergeCounts(t *testing.T) {
	// The engine's merge of per-worker counts (assess/aggregate.go):
	// numbers add up and the smallest five indices are kept; here the
	// second list is a later run whose indices are moved by its offset.
	m := map[string]*assess.Counted{}
	mergeCounts(m, []assess.Counted{{Reason: "a", Draws: 7, First: []int{3, 4, 9, 11, 12}}, {Reason: "b", Draws: 1, First: []int{5}}}, 0)
	mergeCounts(m, []assess.Counted{{Reason: "a", Draws: 2, First: []int{0, 1}}, {Reason: "c", Draws: 9, First: []int{2}}}, 10)
	got := sortedCounts(m)
	want := []assess.Counted{
		{Reason: "a", Draws: 9, First: []int{3, 4, 9, 10, 11}},
		{Reason: "c", Draws: 9, First: []int{12}},
		{Reason: "b", Draws: 1, First: []int{5}},
	}
	if len(got) != len(want) {
		t.Fatalf("got %+v", got)
	}
	for i := range want {
		if got[i].Reason != want[i].Reason || got[i].Draws != want[i].Draws || !slices.Equal(got[i].First, want[i].First) {
			t.Errorf("%d: got %+v, want %+v", i, got[i], want[i])
		}
	}
}
