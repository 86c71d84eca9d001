package report

import (
	"bytes"
	"encoding/json"
	"math"
	"strings"
	"testing"

	"holdfast/assess"
	"holdfast/assess/steady"
	"holdfast/assess/tipping"
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
