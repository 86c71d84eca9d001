package report

import (
	"fmt"
	"math"
	"strings"

	"holdfast/assess/sensitivity"
)

// sensitivityDocument lays out the report of a sensitivity result.
func sensitivityDocument(r *SensitivityJSON) *document {
	d := titledDocument(r.Title, "Sensitivity ranking")
	unit := ""
	if r.Model != nil {
		unit = r.Model.State.Unit
	}
	d.p(tx(fmt.Sprintf("Sensitivity ranking by holdfast %s of scenario ", r.Version)), cd(r.Scenario),
		tx(fmt.Sprintf(": which inputs drive %s (%s is %s at x* = %s at nominal values).",
			outputPhrase(r.Output, r.Target), r.Target, r.TargetClass, withUnit(g(r.TargetX), unit))))
	d.caution()
	if len(r.Reading) > 0 {
		d.h2("Reading")
		d.list(textItems(r.Reading)...)
	}
	scenarioSection(d, &r.Envelope, r.Model)
	inputsSection(d, r.Model)
	sensitivityMethod(d, r)
	rankingSection(d, r)
	localSection(d, r)
	lines := append(affixed("Note: ", "", r.Notes), affixed("Warning: ", "", r.Warnings)...)
	if r.FailedRuns > 0 && len(r.Failures) == 0 {
		// A result file written before failures were listed by reason.
		lines = append(lines, fmt.Sprintf("%s failed and were left out.", plural(r.FailedRuns, "model run", "model runs")))
	}
	lines = append(lines, affixed("", ".", runTroubleLines(countedOf(r.Failures), countedOf(r.Faults), r.FaultedDraws, r.DesignRuns, r.ScreeningRuns))...)
	troubleSection(d, "Notes and warnings", lines, "None: the run raised no warning, and every model run was assessed without numeric trouble.")
	limitsSection(d, "A ranking says which inputs move the verdict under the stated distributions; an input ranked low may still matter if its distribution is too narrow.")
	reproductionSection(d, &r.Envelope, r.ScenarioText, r.Model)
	d.caution()
	return d
}

func sensitivityMethod(d *document, r *SensitivityJSON) {
	d.h2("Method")
	d.pf("Saltelli design (Saltelli et al. 2010): %d base rows × (%d uncertain inputs + 2) = %d model runs, on %s with seed %d; %d rows used, %d runs failed.",
		r.Base, r.Uncertain, r.DesignRuns, planPhrase(r.Plan), r.Seed, r.RowsUsed, r.FailedRuns)
	d.pf("First-order indices by the estimator of Saltelli (2010), total indices by that of Jansen (1999), with %d bootstrap replicates for %s%% percentile intervals (Archer, Saltelli & Sobol' 1997).",
		r.Replicates, g(100*r.Level))
	if r.Independent {
		d.p(tx("The inputs are independent, as Sobol' indices require."))
	} else {
		d.pf("The scenario correlates %s: the indices are computed with the correlations removed, and the ranking uses %d further draws that keep them.",
			strings.Join(r.Correlated, ", "), r.ScreeningRuns)
	}
	d.pf("Rank correlation and partial rank correlation (Iman & Conover 1980) over %d draws; split distance: the Kolmogorov–Smirnov distance between each input's values where %s and where not (Spear & Hornberger 1980). Elasticities are those of %s at nominal values. Ranked by %s.",
		r.Screening.Kept, verdictPhrase(r.SplitOn, r.Target), elasticityPhrase(r.ElasticityOf, r.Target), r.RankedBy)
}

// ciText is withCI for numbers read from a result file (null: "–", or
// no interval).
func ciText(v *float64, c [2]*float64) string {
	if v == nil {
		return "–"
	}
	if c[0] == nil || c[1] == nil {
		return f2(*v)
	}
	return withCI(*v, [2]float64{*c[0], *c[1]})
}

func rankingSection(d *document, r *SensitivityJSON) {
	d.h2("Ranking")
	t := table{head: []string{"rank", "input", "first order", "total", "rank corr", "split D", "elasticity"},
		right: []bool{true, false, true, true, true, true, true}}
	for _, w := range r.Indices {
		sd := split(sensitivity.Split{D: orNaN(w.SplitDistance), P: orNaN(w.SplitP)})
		t.rows = append(t.rows, []string{fmt.Sprint(w.Rank), paramName(w.Parameter, w.Fixed), ciText(w.FirstOrder, w.FirstOrderCI), ciText(w.Total, w.TotalCI),
			f2p(w.RankCorr), sd, g3p(w.Elasticity)})
	}
	d.table(t)
	var bars []barItem
	for _, b := range r.Chart.Bars {
		if b.Value == nil {
			continue
		}
		bars = append(bars, barItem{label: b.Label, value: *b.Value, lo: b.Lo, hi: b.Hi, other: b.Second})
	}
	if len(bars) == 0 {
		return
	}
	title := r.Chart.Title
	measure := r.Chart.Measure
	d.figure("ranking", fmt.Sprintf("%s. Bars: %s; whiskers: its %s%% interval where there is one; diamonds: the first-order index.", title, measure, g(100*r.Level)),
		func() (*chart, error) {
			return barsChart(title, measure, "interval", "first-order index", bars)
		})
}

func localSection(d *document, r *SensitivityJSON) {
	if len(r.Local) == 0 {
		return
	}
	d.h2("Local view at nominal values")
	d.p(tx("∂x*/∂θ = −(∂f/∂θ)/(∂f/∂x) from the rate law's exact parameter derivatives; an elasticity is the relative change per relative change of θ."))
	t := table{head: []string{"", "input", "∂x*/∂θ", "elasticity of x*", "d f'(x*)/dθ", "elasticity of f'(x*)"},
		right: []bool{false, false, true, true, true, true}}
	for _, e := range r.Local {
		for _, p := range e.Params {
			t.rows = append(t.rows, []string{e.Label, p.Parameter, g3p(p.DX), g3p(p.XElasticity), g3p(p.DSlope), g3p(p.SlopeElasticity)})
		}
	}
	d.table(t)
}

// orNaN is *v, or NaN for null.
func orNaN(v *float64) float64 {
	if v == nil {
		return math.NaN()
	}
	return *v
}

func g3p(v *float64) string {
	if v == nil {
		return "–"
	}
	return g3(*v)
}
