package tipping

import (
	"context"
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

// faultWarnings returns the warnings on numeric trouble above 0.1%.
func faultWarnings(ws []string) []string {
	var out []string
	for _, w := range ws {
		if strings.Contains(w, "numeric trouble") && strings.Contains(w, "more than 0.1%") {
			out = append(out, w)
		}
	}
	return out
}

func TestSweepCountsFaultsAtEveryDriverValue(t *testing.T) {
	m := compile(t, faultSrc)
	const n, seed = 1000, 4
	// The draws with c > 0, read off the design the sweep uses.
	d, err := m.Design(sample.LHS, n, seed)
	if err != nil {
		t.Fatal(err)
	}
	ci := m.Scenario.ParamIndex("c")
	var want []int
	th := make([]float64, len(m.Names))
	for i := range n {
		d.Draw(i, th)
		if th[ci] > 0 {
			want = append(want, i)
		}
	}
	// A Latin hypercube puts one draw in each of the n strata of c ~
	// U(−1, 0.4) (McKay, Beckman & Conover 1979), so the count of c > 0 is
	// within one of n·0.4/1.4.
	if k := float64(len(want)); k < n*0.4/1.4-1 || k > n*0.4/1.4+1 {
		t.Fatalf("%d draws with c > 0, want %.1f ± 1", len(want), n*0.4/1.4)
	}
	first := want[:5]
	for _, tc := range []struct {
		steps, runs int
		warning     string
	}{
		{0, 1, "at H = 0.5"},
		{3, 3, "at 3 of 3 driver values"},
	} {
		r := run(t, m, Options{Driver: "H", From: 0.5, To: 1.5, Track: "E2", Steps: tc.steps, Risk: 0.1,
			Draws: n, Seed: seed, Plan: sample.LHS, Workers: 3})
		// The stretch does not depend on H: the same draws fault at every
		// driver value (common random numbers), once per engine run.
		k := int64(len(want))
		if r.Runs != tc.runs || len(r.Faults) != 1 {
			t.Fatalf("steps %d: %d runs, faults %+v", tc.steps, r.Runs, r.Faults)
		}
		f := r.Faults[0]
		if !strings.Contains(f.Reason, "log") || f.Draws != int64(tc.runs)*k || r.Faulted != int64(tc.runs)*k || !slices.Equal(f.First, first) {
			t.Errorf("steps %d: faults %+v, %d faulted; want %d × %d draws, first %v", tc.steps, f, r.Faulted, tc.runs, k, first)
		}
		for _, p := range r.Curve {
			if p.Faulted != k {
				t.Errorf("steps %d: %d faulted draws at H = %g, want %d", tc.steps, p.Faulted, p.Value, k)
			}
		}
		// 28% of draws is far above 0.1%: one warning for the sweep, not
		// one per engine run (common practice, no source).
		if ws := faultWarnings(r.Warnings); len(ws) != 1 || !strings.Contains(ws[0], tc.warning) {
			t.Errorf("steps %d: fault warnings %q, want one %q", tc.steps, ws, tc.warning)
		}
		t.Logf("steps %d: faults %+v; failed %+v; warnings %q", tc.steps, r.Faults, r.Failed, r.Warnings)
	}
}

func TestSweepCountsFaultsWhereTheDriverMakesThem(t *testing.T) {
	// Swept as the driver, c puts the undefined stretch [0, c] of
	// log(x − c) into the domain at c = 0.1 and 0.4 and not at −0.5 or
	// −0.2 (analytic), in every draw.
	m := compile(t, faultSrc)
	const n = 200
	r := run(t, m, Options{Driver: "c", From: -0.5, To: 0.4, Track: "E2", Steps: 4, Risk: 0.1,
		Draws: n, Seed: 2, Plan: sample.LHS, Workers: 2})
	wantAt := []int64{0, 0, n, n}
	for i, p := range r.Curve {
		if p.Faulted != wantAt[i] {
			t.Errorf("c = %g: %d faulted draws, want %d", p.Value, p.Faulted, wantAt[i])
		}
	}
	if len(r.Faults) != 1 || r.Faults[0].Draws != 2*n || r.Faulted != 2*n || !slices.Equal(r.Faults[0].First, []int{0, 1, 2, 3, 4}) {
		t.Errorf("faults %+v, %d faulted; want %d draws, first 0…4", r.Faults, r.Faulted, 2*n)
	}
	if ws := faultWarnings(r.Warnings); len(ws) != 1 || !strings.Contains(ws[0], "at 2 of 4 driver values") || !strings.Contains(ws[0], "100%, at c = 0.1") {
		t.Errorf("fault warnings %q", ws)
	}
}

func TestEngineFaultWarningIsRecognised(t *testing.T) {
	// The sweep replaces the engine's per-run warning on faulted draws by
	// its own; this pins the engine's wording it recognises.
	m := compile(t, faultSrc)
	r, err := assess.Run(context.Background(), m, assess.Options{Draws: 500, Seed: 1, Plan: sample.LHS})
	if err != nil {
		t.Fatal(err)
	}
	var hit []string
	for _, w := range r.Warnings {
		if engineFaultWarning(r, w) {
			hit = append(hit, w)
		}
	}
	if r.Faulted == 0 || len(hit) != 1 || len(faultWarnings(r.Warnings)) != 1 || hit[0] != faultWarnings(r.Warnings)[0] {
		t.Errorf("%d faulted draws; warnings %q, recognised %q", r.Faulted, r.Warnings, hit)
	}
}

func TestMergeCounts(t *testing.T) {
	// As the engine merges per-worker counts (assess/aggregate.go):
	// numbers add up and the five smallest indices are kept; a draw
	// listed at two driver values is listed once.
	m := map[string]*assess.Counted{}
	mergeCounts(m, []assess.Counted{{Reason: "a", Draws: 7, First: []int{3, 4, 9, 11, 12}}, {Reason: "b", Draws: 1, First: []int{5}}})
	mergeCounts(m, []assess.Counted{{Reason: "a", Draws: 6, First: []int{1, 3, 4, 8, 9}}, {Reason: "c", Draws: 9, First: []int{2}}})
	got := sortedCounts(m)
	want := []assess.Counted{
		{Reason: "a", Draws: 13, First: []int{1, 3, 4, 8, 9}},
		{Reason: "c", Draws: 9, First: []int{2}},
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
