package report

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"strings"
	"testing"

	"holdfast/assess"
	"holdfast/assess/sensitivity"
	"holdfast/assess/tipping"
	"holdfast/internal/testscenario"
	"holdfast/sample"
	"holdfast/scenarios"
)

// faultSrc has an undefined stretch inside the domain in about 0.4/1.4
// of the draws (see testscenario.UndefinedStretch).
const faultSrc = testscenario.UndefinedStretch

const logFault = "log of non-positive (log in rate)"

// faultModel compiles faultSrc.
func faultModel(t *testing.T) (*scenarios.Scenario, *assess.Model) {
	t.Helper()
	s, err := scenarios.Parse("faults.yaml", []byte(faultSrc), nil)
	if err != nil {
		t.Fatal(err)
	}
	m, err := assess.Compile(s)
	if err != nil {
		t.Fatal(err)
	}
	return s, m
}

// outputs renders a result file every way: its JSON, Markdown and HTML.
func outputs(t *testing.T, doc any) (js map[string]any, md, page string) {
	t.Helper()
	var b bytes.Buffer
	if err := WriteJSON(&b, doc); err != nil {
		t.Fatal(err)
	}
	raw := bytes.Clone(b.Bytes())
	if err := json.Unmarshal(raw, &js); err != nil {
		t.Fatal(err)
	}
	b.Reset()
	if err := WriteMarkdown(&b, load(t, raw), nil); err != nil {
		t.Fatal(err)
	}
	md = b.String()
	b.Reset()
	if err := WriteHTML(&b, load(t, raw), false); err != nil {
		t.Fatal(err)
	}
	return js, md, b.String()
}

// checkFaultsJSON checks the faults list and the faulted count of a
// result's JSON.
func checkFaultsJSON(t *testing.T, js map[string]any, faulted int64, first []int) {
	t.Helper()
	fs, ok := js["faults"].([]any)
	if !ok || len(fs) != 1 {
		t.Fatalf("faults %v", js["faults"])
	}
	f := fs[0].(map[string]any)
	var want []any
	for _, i := range first {
		want = append(want, float64(i))
	}
	if f["reason"] != logFault || f["draws"] != float64(faulted) || fmt.Sprint(f["first_draws"]) != fmt.Sprint(want) {
		t.Errorf("fault %v, want %d × %s first %v", f, faulted, logFault, first)
	}
	if js["faulted_draws"] != float64(faulted) {
		t.Errorf("faulted_draws %v, want %d", js["faulted_draws"], faulted)
	}
	if _, ok := js["failures"].([]any); !ok {
		t.Errorf("failures %v: want a list", js["failures"])
	}
}

func TestSensitivityOutputsCarryFaults(t *testing.T) {
	s, m := faultModel(t)
	r, err := sensitivity.Run(context.Background(), m, sensitivity.Options{Target: "E2", Output: sensitivity.Position, Base: 64, Seed: 11})
	if err != nil {
		t.Fatal(err)
	}
	if len(r.Faults) != 1 || r.Faulted == 0 {
		t.Fatalf("faults %+v", r.Faults)
	}
	f := r.Faults[0]
	doc := NewSensitivityJSON("v", s.File, s.Title, r)
	doc.SetRun(RunInfo{Command: []string{"holdfast", "sensitivity", "faults.yaml"}, Scenario: s})
	js, md, page := outputs(t, doc)
	checkFaultsJSON(t, js, r.Faulted, f.First)
	var tb bytes.Buffer
	if err := SensitivityTable(&tb, "", "", r); err != nil {
		t.Fatal(err)
	}
	first := ints(f.First)
	line := fmt.Sprintf("Numeric trouble: %d model runs with %s (first runs: %s)", f.Draws, logFault, first)
	count := fmt.Sprintf("Model runs with numeric trouble (a pole or an undefined stretch of the rate law): %d of %d", r.Faulted, r.Runs)
	// The engine warns above 0.1% of runs (common practice, no source).
	warning := fmt.Sprintf("%d draws (", r.Faulted)
	for name, out := range map[string]string{"table": tb.String(), "Markdown": md, "HTML": page} {
		for _, want := range []string{line, count, warning, "more than 0.1%"} {
			if !strings.Contains(out, want) {
				t.Errorf("%s lacks %q", name, want)
			}
		}
	}
	if ws := js["warnings"].([]any); len(ws) == 0 || !strings.HasPrefix(ws[0].(string), warning) {
		t.Errorf("JSON warnings %v", ws)
	}
}

func TestSensitivityNamesScreeningRunIndices(t *testing.T) {
	r := sensResult()
	r.ScreenRuns = 128
	r.Faults = []assess.Counted{{Reason: logFault, Draws: 3, First: []int{7, 256, 300}}}
	r.Faulted = 3
	r.Failed = []assess.Counted{{Reason: "equilibrium search: did not converge", Draws: 1, First: []int{260}}}
	r.FailedRuns = 1
	var b bytes.Buffer
	if err := SensitivityTable(&b, "", "", r); err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{
		"Failed model runs: 1 × equilibrium search: did not converge (first runs: 260)",
		"Numeric trouble: 3 model runs with " + logFault + " (first runs: 7, 256, 300)",
		"numeric trouble (a pole or an undefined stretch of the rate law): 3 of 384",
		"Run indices below 256 are runs of the Saltelli design; index 256 + i is draw i of the screening run",
	} {
		if !strings.Contains(b.String(), want) {
			t.Errorf("table lacks %q:\n%s", want, b.String())
		}
	}
	// Without trouble the report says so.
	lake, err := scenarios.LoadDemo("lake")
	if err != nil {
		t.Fatal(err)
	}
	doc := NewSensitivityJSON("v", lake.File, lake.Title, sensResult())
	doc.SetRun(RunInfo{Command: []string{"holdfast", "sensitivity", "demo:lake"}, Scenario: lake})
	_, md, _ := outputs(t, doc)
	if !strings.Contains(md, "every model run was assessed without numeric trouble") {
		t.Error("Markdown does not say the runs met no numeric trouble")
	}
}

func TestSweepOutputsCarryFaults(t *testing.T) {
	s, m := faultModel(t)
	const n = 300
	for _, steps := range []int{0, 3} {
		r, err := tipping.Run(context.Background(), m, tipping.Options{Driver: "H", From: 0.5, To: 1.5, Track: "E2", Steps: steps, Risk: 0.1,
			Draws: n, Seed: 4, Plan: sample.LHS})
		if err != nil {
			t.Fatal(err)
		}
		if len(r.Faults) != 1 || r.Faulted == 0 {
			t.Fatalf("steps %d: faults %+v", steps, r.Faults)
		}
		f := r.Faults[0]
		doc := NewSweepJSON("v", s.File, s.Title, r)
		doc.SetRun(RunInfo{Command: []string{"holdfast", "sweep", "faults.yaml"}, Scenario: s})
		js, md, page := outputs(t, doc)
		checkFaultsJSON(t, js, r.Faulted, f.First)
		var tb bytes.Buffer
		if err := SweepTable(&tb, "", "", "", r); err != nil {
			t.Fatal(err)
		}
		line := fmt.Sprintf("Numeric trouble: %d draws with %s (first: %s)", f.Draws, logFault, ints(f.First))
		count := fmt.Sprintf("Draws with numeric trouble (a pole or an undefined stretch of the rate law): %d of %d", r.Faulted, n)
		warning := "at H = 0.5; see the list of faults"
		if steps > 0 {
			per := r.Faulted / int64(steps)
			count = fmt.Sprintf("Draws with numeric trouble (a pole or an undefined stretch of the rate law): %d over the %d driver values of %d draws each", r.Faulted, steps, n)
			warning = fmt.Sprintf("at 3 of 3 driver values more than 0.1%% of draws met numeric trouble in the rate law (at most %d of %d draws", per, n)
			if cs := js["curve"].([]any); cs[2].(map[string]any)["faulted_draws"] != float64(per) {
				t.Errorf("curve point %v: want %d faulted draws", cs[2], per)
			}
		}
		outs := map[string]string{"table": tb.String(), "Markdown": md, "HTML": page}
		for name, out := range outs {
			for _, want := range []string{line, count, warning} {
				if !strings.Contains(out, want) {
					t.Errorf("steps %d: %s lacks %q", steps, name, want)
				}
			}
		}
		// The curves show the faulted draws per driver value.
		if steps > 0 && (!strings.Contains(outs["table"], "│ numeric trouble │") || !strings.Contains(outs["table"], fmt.Sprintf("│ %d draws ", r.Faulted/3)) ||
			!strings.Contains(md, "| draws with numeric trouble |")) {
			t.Errorf("steps %d: the curve tables lack the column of faulted draws", steps)
		}
	}
}

func TestSweepWithoutFaultsSaysSo(t *testing.T) {
	var b bytes.Buffer
	if err := WriteMarkdown(&b, savedSweep(t, sweepResult()), nil); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(b.String(), "every draw was assessed without numeric trouble") || strings.Contains(b.String(), "draws with numeric trouble |") {
		t.Error("a sweep without faults must say so, without a column of faulted draws")
	}
}
