package report

import (
	"bytes"
	"encoding/json"
	"errors"
	"math"
	"strings"
	"testing"

	"holdfast/assess"
	"holdfast/assess/steady"
	"holdfast/assess/tipping"
	"holdfast/scenarios"
)

// sweepResult is a hand-made sweep result: 4 draws, one lost at the
// start, one folding at 0.2, one at 0.3, one without tipping; no curves.
func sweepResult() *tipping.Result {
	nan := math.NaN()
	r := &tipping.Result{
		Driver: "L", From: 0.1, To: 0.4, Allowed: [2]float64{0, math.Inf(1)},
		Track:   "E1",
		Nominal: assess.Equilibrium{Label: "E1", Equilibrium: steady.Equilibrium{X: 0.2, Class: steady.Stable, Order: 1}},
		Draws:   4, Seed: 1,
	}
	c := &r.Critical
	c.N = 4
	c.Count[tipping.Absent], c.Count[tipping.Fold], c.Count[tipping.None] = 1, 2, 1
	c.WithoutTipping = assess.Probability{Count: 1, N: 4, P: 0.25, CI: [2]float64{0.05, 0.7}}
	c.LostAtStart = c.WithoutTipping
	c.Quantiles = [5]tipping.Value{{D: nan, Where: tipping.AtStart}, {D: nan, Where: tipping.AtStart}, {D: 0.2, Where: tipping.InRange},
		{D: 0.3, Where: tipping.InRange}, {D: nan, Where: tipping.BeyondEnd}}
	r.Limit = tipping.Limit{Risk: 0.05, Value: c.Quantiles[0], CI: [2]tipping.Value{{D: nan, Where: tipping.Unbounded}, {D: nan, Where: tipping.BeyondEnd}}, Coverage: 1}
	r.Tips = []tipping.Tip{{Kind: tipping.Absent, D: nan}, {Kind: tipping.Fold, D: 0.2}, {Kind: tipping.Fold, D: 0.3}, {Kind: tipping.None, D: nan}}
	r.Hysteresis = tipping.Hysteresis{N: 2,
		Reversible:   assess.Probability{Count: 1, N: 2, P: 0.5, CI: [2]float64{0.1, 0.9}},
		Irreversible: assess.Probability{Count: 1, N: 2, P: 0.5, CI: [2]float64{0.1, 0.9}},
		Return:       assess.Quantiles{N: 1, Q: [5]float64{0.05, 0.05, 0.05, 0.05, 0.05}},
		Width:        assess.Quantiles{N: 1, Q: [5]float64{0.15, 0.15, 0.15, 0.15, 0.15}},
	}
	return r
}

func TestSweepJSONNullsOutsideTheRange(t *testing.T) {
	var b bytes.Buffer
	if err := WriteJSON(&b, NewSweepJSON("v", "s.yaml", "t", sweepResult())); err != nil {
		t.Fatal(err)
	}
	var doc map[string]any
	if err := json.Unmarshal(b.Bytes(), &doc); err != nil {
		t.Fatalf("invalid JSON: %v\n%s", err, b.String())
	}
	crit := doc["critical"].(map[string]any)
	q := crit["quantiles"].(map[string]any)
	if q["5"] != nil || q["50"] != 0.2 || q["95"] != nil {
		t.Errorf("quantiles %v: values outside the range must be null", q)
	}
	where := crit["quantiles_where"].(map[string]any)
	if where["5"] != "at start" || where["50"] != "in range" || where["95"] != "beyond end" {
		t.Errorf("quantiles_where %v", where)
	}
	if crit["kind"] != "fold" || crit["share_without_tipping"] != 0.25 {
		t.Errorf("critical %v", crit)
	}
	lim := doc["limit"].(map[string]any)
	if lim["value"] != nil || lim["ci"].([]any)[0] != nil || lim["where"] != "at start" {
		t.Errorf("limit %v", lim)
	}
	if a := doc["allowed"].([]any); a[0] != 0.0 || a[1] != nil {
		t.Errorf("allowed %v: an infinite bound must be null", a)
	}
	if c, ok := doc["curve"].([]any); !ok || len(c) != 0 {
		t.Errorf("curve %v: want an empty list without --steps", doc["curve"])
	}
	if doc["caution"] != Caution {
		t.Errorf("JSON lacks the caution")
	}
}

func TestSweepTableWordsCensoredValues(t *testing.T) {
	var b bytes.Buffer
	if err := SweepTable(&b, "title", "g/m^3", "g/m^3/yr", sweepResult()); err != nil {
		t.Fatal(err)
	}
	out := b.String()
	for _, want := range []string{"at start (0.1)", "beyond 0.4", "Safe limit at risk 5.0%", "reversible", Caution} {
		if !strings.Contains(out, want) {
			t.Errorf("table lacks %q:\n%s", want, out)
		}
	}
}

// savedSweep is r as a result file read back, run on the lake demo.
func savedSweep(t *testing.T, r *tipping.Result) *Saved {
	t.Helper()
	s, err := scenarios.LoadDemo("lake")
	if err != nil {
		t.Fatal(err)
	}
	doc := NewSweepJSON("v", s.File, s.Title, r)
	doc.SetRun(RunInfo{Command: []string{"holdfast", "sweep", "demo:lake"}, Scenario: s})
	var b bytes.Buffer
	if err := WriteJSON(&b, doc); err != nil {
		t.Fatal(err)
	}
	return load(t, b.Bytes())
}

func TestSweepResultFile(t *testing.T) {
	raw := sweepFixture(t)
	var doc map[string]any
	if err := json.Unmarshal(raw, &doc); err != nil {
		t.Fatal(err)
	}
	if doc["kind"] != KindSweep || doc["version"] != "test" || doc["model"] == nil || doc["settings"] == nil {
		t.Errorf("envelope or run description missing: kind %v version %v", doc["kind"], doc["version"])
	}
	// The histogram counts every draw that tips in range, and no other.
	sv := load(t, raw)
	c := sv.Sweep.Critical
	h := c.Histogram
	var sum int64
	for _, k := range h.Counts {
		sum += k
	}
	inRange := c.Counts["fold"] + c.Counts["exchange"] + c.Counts["boundary"]
	if h.N != inRange || sum != inRange || len(h.Edges) != len(h.Counts)+1 || h.Label != "L" {
		t.Errorf("histogram %+v for %d draws tipping in range", h, inRange)
	}
	// Its range holds the in-range quantiles.
	for _, q := range []*float64{c.Quantiles.Q5, c.Quantiles.Q50, c.Quantiles.Q95} {
		if q == nil || *q < h.Edges[0] || *q > h.Edges[len(h.Edges)-1] {
			t.Errorf("quantile %v outside the histogram's range %v…%v", q, h.Edges[0], h.Edges[len(h.Edges)-1])
		}
	}
	if s := sv.Sweep.Settings; s.Draws != 300 || s.Seed != 5 || s.Steps != 5 || s.Risk != 0.05 || s.Plan != "lhs" {
		t.Errorf("settings %+v", s)
	}
}

func TestSweepMarkdownCarriesEverySection(t *testing.T) {
	var b bytes.Buffer
	if err := WriteMarkdown(&b, load(t, sweepFixture(t)), func(n string) string { return "sw-plots/" + n + ".svg" }); err != nil {
		t.Fatal(err)
	}
	md := b.String()
	for _, want := range []string{
		"# Nutrient-loaded lake (illustrative numbers)\n",
		"> **Caution.** These verdicts come from a model",
		"## Key figures", "- Safe limit at 5.0% risk: L = ", "## Scenario", "## Inputs", "In this sweep L does not take its drawn values",
		"## Method", "Latin hypercube sampling", "with seed 5", "swept up from 0.05 to 0.4", "Keller 1977", "Conover 1999",
		"Freedman & Diaconis (1981)", "at 5 values of L", "Wilson 1927",
		"## Tipping distribution", "| meets a fold and vanishes |", "| L (g/m^3/yr) |",
		"![Figure 1](sw-plots/critical-values.svg)", "safe limit at 5.0% risk.*",
		"## Safe limit", "order statistics of ranks", "## Hysteresis", "(irreversible) |", "allowed values of L: \\[0, +∞\\]",
		"## Probability curves", "![Figure 2](sw-plots/curve-attracting.svg)",
		"## Warnings and failures", "## What these results do not say", "slowly enough for the state to follow",
		"## Reproduction", "```sh\nholdfast sweep demo:lake --driver L --from 0.05 --to 0.4 --track E1 --draws 300 --seed 5 --steps 5\n```",
		"```yaml\nholdfast: 1\n",
	} {
		if !strings.Contains(md, want) {
			t.Errorf("sweep Markdown lacks %q", want)
		}
	}
	if strings.Count(md, "**Caution.**") != 2 || strings.Index(md, "**Caution.**") > strings.Index(md, "## Key figures") {
		t.Error("the caution must come up front (and again at the end)")
	}
	if strings.Contains(md, "curve-exists") {
		t.Error("an attracting tracked equilibrium whose curves agree needs one curve plot")
	}
}

func TestSweepReportWordsCensoredValues(t *testing.T) {
	// The hand-made result: the limit at the start, the 95% value beyond
	// the end, an interval end unbounded, no curves.
	var b bytes.Buffer
	if err := WriteMarkdown(&b, savedSweep(t, sweepResult()), nil); err != nil {
		t.Fatal(err)
	}
	md := b.String()
	for _, want := range []string{
		"No safe limit at 5.0% risk inside the sweep: E1 is already lost at the start (L = 0.1)",
		"5% to 95% along the sweep: at the start (0.1) to beyond 0.4", "E1 is lost within the sweep in 2 of 4 assessed draws",
		"| at the start (0.1) | at the start (0.1) | 0.2 | 0.3 | beyond 0.4 |", "cannot be bounded with this number of draws",
		"swept up from 0.1 to 0.4", "(1 draw lost at the start and 1 draw without tipping in range are not shown)",
		"The run computed no probability curves", "return fold of L 0.05 / 0.05 / 0.05 g/m^3/yr",
	} {
		if !strings.Contains(md, want) {
			t.Errorf("Markdown lacks %q:\n%s", want, md)
		}
	}
	if strings.Contains(md, "the solid line marks") {
		t.Error("no limit to mark when it lies at the start")
	}
	// Swept down, with nothing tipping in range.
	r := sweepResult()
	r.From, r.To = 0.4, 0.1
	r.Tips = []tipping.Tip{{Kind: tipping.None, D: math.NaN()}}
	b.Reset()
	if err := WriteMarkdown(&b, savedSweep(t, r), nil); err != nil {
		t.Fatal(err)
	}
	md = b.String()
	for _, want := range []string{"swept down from 0.4 to 0.1", "at the start (0.4)", "there is no distribution of critical values to show"} {
		if !strings.Contains(md, want) {
			t.Errorf("swept-down Markdown lacks %q", want)
		}
	}
	plots, err := Plots(savedSweep(t, r), false)
	if err != nil || len(plots) != 0 {
		t.Errorf("%d plots (%v) without curves or values in range", len(plots), err)
	}
}

func TestEquilibriaJSONCarriesTheEnvelope(t *testing.T) {
	s, err := scenarios.LoadDemo("lake")
	if err != nil {
		t.Fatal(err)
	}
	m, err := assess.Compile(s)
	if err != nil {
		t.Fatal(err)
	}
	snap, err := m.Analyze(m.Nominal)
	if err != nil {
		t.Fatal(err)
	}
	doc := NewEquilibriaJSON(s.File, s.Title, snap)
	doc.SetRun(RunInfo{Version: "9.9", Command: []string{"holdfast", "equilibria", "demo:lake", "--format", "json"}, Scenario: s})
	var b bytes.Buffer
	if err := WriteJSON(&b, doc); err != nil {
		t.Fatal(err)
	}
	var got map[string]any
	if err := json.Unmarshal(b.Bytes(), &got); err != nil {
		t.Fatal(err)
	}
	for key, want := range map[string]any{"format": ResultFormat, "schema": float64(SchemaVersion), "kind": KindEquilibria, "tool": "holdfast",
		"version": "9.9", "scenario": "demo:lake", "title": s.Title, "caution": Caution} {
		if got[key] != want {
			t.Errorf("%s = %v, want %v", key, got[key], want)
		}
	}
	if c, ok := got["command"].([]any); !ok || len(c) != 5 || c[1] != "equilibria" {
		t.Errorf("command %v", got["command"])
	}
	if text, _ := got["scenario_text"].(string); text != string(s.Source) || got["scenario_sha256"] != SHA256(s.Source) {
		t.Error("scenario text or its SHA-256 missing")
	}
	// The keys of the analysis stay as they were.
	for _, key := range []string{"parameters", "domain", "equilibria", "current", "warnings", "model"} {
		if _, ok := got[key]; !ok {
			t.Errorf("no %q", key)
		}
	}
	if eq := got["equilibria"].([]any); len(eq) != 3 || eq[0].(map[string]any)["label"] != "E1" {
		t.Errorf("equilibria %v", eq)
	}
	// holdfast report refuses it clearly.
	_, err = LoadResult(b.Bytes())
	var re *ResultError
	if !errors.As(err, &re) || !strings.Contains(err.Error(), "does not render equilibria results") {
		t.Errorf("LoadResult of an equilibria result: %v", err)
	}
}
