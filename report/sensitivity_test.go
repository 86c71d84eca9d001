package report

import (
	"bytes"
	"encoding/json"
	"math"
	"strings"
	"testing"

	"holdfast/assess/sensitivity"
	"holdfast/assess/steady"
)

// sensResult is a small hand-made result: s ranked first, q second with
// undefined (NaN) split numbers, r fixed.
func sensResult() *sensitivity.Result {
	nan := math.NaN()
	return &sensitivity.Result{
		Target: "E1", TargetX: 0.17, TargetClass: steady.Stable, Output: sensitivity.Attracting,
		Names: []string{"s", "q", "r"}, Uncertain: 2, Base: 64, Runs: 256,
		Indices:  &sensitivity.Estimate{Rows: 64, Replicates: 1000, Mean: 0.9, Variance: 0.09},
		Level:    0.95,
		RankedBy: sensitivity.ByTotal, SplitOn: sensitivity.Attracting, ElasticityOf: "slope",
		Rows: []sensitivity.Row{
			{Parameter: "s", First: 0.6, FirstCI: [2]float64{0.5, 0.7}, Total: 0.8, TotalCI: [2]float64{0.7, 0.9},
				RankCorr: -0.5, PRCC: -0.6, Split: sensitivity.Split{D: 0.7, P: 1e-9, N1: 50, N0: 14}, Elasticity: 1.1, Rank: 1},
			{Parameter: "q", First: 0.01, FirstCI: [2]float64{nan, nan}, Total: 0.2, TotalCI: [2]float64{0.1, 0.3},
				RankCorr: nan, PRCC: nan, Split: sensitivity.Split{D: nan, P: nan}, Elasticity: nan, Rank: 2},
			{Parameter: "r", Fixed: true, Split: sensitivity.Split{D: 0, P: 1}, Elasticity: 0.01, Rank: 3},
		},
		Screening: &sensitivity.Screening{Seen: 128, Kept: 128, Cap: 1 << 16},
		Local: []sensitivity.LocalEq{{Label: "E1", X: 0.17, Slope: -0.5, Class: steady.Stable, Order: 1,
			Params: []sensitivity.LocalParam{{Parameter: "s", Value: 0.6, DX: -0.3, XElasticity: -1, DSlope: -1, SlopeElasticity: 1.1}}}},
		Reading: []string{"Whether E1 attracts turns mostly on s (total index 0.80)."},
	}
}

func TestSensitivityJSONShape(t *testing.T) {
	var b bytes.Buffer
	if err := WriteJSON(&b, NewSensitivityJSON("v", "s.yaml", "t", sensResult())); err != nil {
		t.Fatal(err)
	}
	var doc map[string]any
	if err := json.Unmarshal(b.Bytes(), &doc); err != nil {
		t.Fatalf("invalid JSON: %v\n%s", err, b.String())
	}
	// The keys the sensitivity issue asks for, at least.
	for _, key := range []string{"target", "output", "runs", "indices", "chart", "local", "reading", "caution"} {
		if _, ok := doc[key]; !ok {
			t.Errorf("JSON lacks %q", key)
		}
	}
	rows := doc["indices"].([]any)
	if len(rows) != 3 {
		t.Fatalf("%d rows, want every parameter (fixed ones too)", len(rows))
	}
	for _, key := range []string{"parameter", "first_order", "first_order_ci", "total", "total_ci", "rank_corr", "split_distance", "split_p", "elasticity", "rank"} {
		if _, ok := rows[0].(map[string]any)[key]; !ok {
			t.Errorf("row lacks %q", key)
		}
	}
	q := rows[1].(map[string]any)
	if q["rank_corr"] != nil || q["split_distance"] != nil || q["first_order_ci"].([]any)[0] != nil {
		t.Errorf("NaN must be null: %v", q)
	}
	r := rows[2].(map[string]any)
	if r["fixed"] != true || r["total"] != 0.0 || r["first_order"] != 0.0 || r["split_distance"] != 0.0 {
		t.Errorf("fixed parameter must be listed with zero effect: %v", r)
	}
	bars := doc["chart"].(map[string]any)["bars"].([]any)
	if len(bars) != 3 || bars[0].(map[string]any)["label"] != "s" || bars[0].(map[string]any)["value"] != 0.8 {
		t.Errorf("chart bars %v", bars)
	}
	if doc["runs"] != 256.0 {
		t.Errorf("runs %v", doc["runs"])
	}
}

func TestSensitivityTableCarriesCaution(t *testing.T) {
	var b bytes.Buffer
	if err := SensitivityTable(&b, "title", "m", sensResult()); err != nil {
		t.Fatal(err)
	}
	out := b.String()
	for _, want := range []string{Caution, "Reading:", "turns mostly on s", "r (fixed)", "0.80 (0.70…0.90)", "0.70 (p<0.001)", "Local view", "████████████████"} {
		if !strings.Contains(out, want) {
			t.Errorf("table lacks %q:\n%s", want, out)
		}
	}
}

func TestScreeningSectionOfAssess(t *testing.T) {
	nan := math.NaN()
	meas := func(ind bool) *sensitivity.Measures {
		m := &sensitivity.Measures{N: 10, Spearman: []float64{0.5, 0}, PRCC: []float64{0.6, 0}}
		if ind {
			m.Split = []sensitivity.Split{{D: 0.4, P: 0.01, N1: 6, N0: 4}, {D: 0, P: 1}}
		}
		return m
	}
	scr := &sensitivity.Screening{Names: []string{"a", "c"}, Fixed: []bool{false, true}, Seen: 10, Kept: 10, Cap: 100,
		Equilibria: []sensitivity.ScreenEq{{Label: "E1", Outputs: [4]*sensitivity.Measures{meas(true), meas(false), meas(false), nil}}}}
	scr.Equilibria[0].Outputs[sensitivity.Slope].Spearman[0] = nan
	j := NewScreeningJSON(scr)
	if len(j.Equilibria) != 1 || len(j.Equilibria[0].Parameters) != 2 || j.Equilibria[0].Parameters[0].SplitCurrent != nil {
		t.Fatalf("screening JSON %+v", j)
	}
	if p := j.Equilibria[0].Parameters[0]; *p.SplitAttracting.Distance != 0.4 || p.RankCorrSlope != nil {
		t.Errorf("parameter a: %+v", p)
	}
	var b bytes.Buffer
	if err := screeningSection(&b, scr); err != nil {
		t.Fatal(err)
	}
	if out := b.String(); !strings.Contains(out, "0.40 (p=0.01)") || !strings.Contains(out, "not listed: c") || strings.Contains(out, "ends here") {
		t.Errorf("section:\n%s", out)
	}
	if NewScreeningJSON(nil) != nil {
		t.Error("nil screening must give nil")
	}
}
