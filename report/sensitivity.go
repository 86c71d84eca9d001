package report

import (
	"fmt"
	"io"
	"math"
	"strings"

	"holdfast/assess"
	"holdfast/assess/sensitivity"
)

// SensitivityJSON is the JSON form of a sensitivity ranking. With the
// envelope and the scenario's description and text (SetRun) it is a result
// file that holdfast report renders.
type SensitivityJSON struct {
	Envelope
	Model       *ModelJSON `json:"model"`
	Target      string     `json:"target"`
	TargetX     float64    `json:"target_nominal_x"`
	TargetClass string     `json:"target_nominal_class"`
	Output      string     `json:"output"`
	// Runs counts every model run: the Saltelli design's N·(k+2) plus a
	// separate screening run's draws (correlated inputs only).
	Runs          int   `json:"runs"`
	DesignRuns    int   `json:"design_runs"`
	ScreeningRuns int   `json:"screening_runs"`
	Base          int   `json:"base"`
	Uncertain     int   `json:"uncertain_inputs"`
	RowsUsed      int   `json:"rows_used"`
	FailedRuns    int64 `json:"failed_runs"`
	// FaultedDraws counts the model runs that met numeric trouble (a
	// pole or an undefined stretch of the rate law), listed by reason in
	// Faults; Failures lists the failed runs by reason. Their first_draws
	// are run indices: below design_runs, runs of the Saltelli design;
	// design_runs + i, draw i of the screening run.
	FaultedDraws int64         `json:"faulted_draws"`
	Failures     []CountedJSON `json:"failures"`
	Faults       []CountedJSON `json:"faults"`
	Seed         uint64        `json:"seed"`
	Plan         string        `json:"plan"`
	Replicates   int           `json:"bootstrap_replicates"`
	Level        float64       `json:"level"`
	OutputMean   *float64      `json:"output_mean"`
	OutputVar    *float64      `json:"output_variance"`
	Independent  bool          `json:"independent"`
	Correlated   []string      `json:"correlated"`
	RankedBy     string        `json:"ranked_by"`
	SplitOn      string        `json:"split_on"`
	ElasticityOf string        `json:"elasticity_of"`
	// Indices has one entry per parameter, in ranking order; fixed
	// parameters are listed with zero effect.
	Indices   []SensitivityRowJSON   `json:"indices"`
	Chart     BarChartJSON           `json:"chart"`
	Screening ScreeningSummaryJSON   `json:"screening"`
	Local     []LocalEquilibriumJSON `json:"local"`
	Reading   []string               `json:"reading"`
	Notes     []string               `json:"notes"`
	Warnings  []string               `json:"warnings"`
	// ScenarioText is the scenario file's full text (its SHA-256 is in
	// the envelope).
	ScenarioText string `json:"scenario_text"`
	Caution      string `json:"caution"`
}

// SetRun records the command line and the scenario (hash, description
// and full text).
func (d *SensitivityJSON) SetRun(run RunInfo) {
	d.Model, d.ScenarioText = d.Envelope.stamp(run)
}

// SensitivityRowJSON is one parameter's line of the ranking; numbers that
// could not be computed are null.
type SensitivityRowJSON struct {
	Parameter     string      `json:"parameter"`
	Fixed         bool        `json:"fixed"`
	FirstOrder    *float64    `json:"first_order"`
	FirstOrderCI  [2]*float64 `json:"first_order_ci"`
	Total         *float64    `json:"total"`
	TotalCI       [2]*float64 `json:"total_ci"`
	RankCorr      *float64    `json:"rank_corr"`
	PRCC          *float64    `json:"prcc"`
	SplitDistance *float64    `json:"split_distance"`
	SplitP        *float64    `json:"split_p"`
	Elasticity    *float64    `json:"elasticity"`
	Rank          int         `json:"rank"`
}

// BarChartJSON is the data of a horizontal bar chart of the ranking, one
// bar per parameter from the top of the ranking down: Value is the ranking
// measure (with its interval Lo–Hi where there is one) and Second the
// first-order index beside the total one.
type BarChartJSON struct {
	Kind    string    `json:"kind"`
	Title   string    `json:"title"`
	Measure string    `json:"measure"`
	Bars    []BarJSON `json:"bars"`
}

// BarJSON is one bar.
type BarJSON struct {
	Label  string   `json:"label"`
	Value  *float64 `json:"value"`
	Lo     *float64 `json:"lo"`
	Hi     *float64 `json:"hi"`
	Second *float64 `json:"first_order,omitempty"`
}

// ScreeningSummaryJSON says which draws the screening measures used.
type ScreeningSummaryJSON struct {
	Seen   int  `json:"draws_seen"`
	Kept   int  `json:"draws_used"`
	Cap    int  `json:"cap"`
	Capped bool `json:"capped"`
}

// LocalEquilibriumJSON is the local view of one equilibrium at nominal
// values.
type LocalEquilibriumJSON struct {
	Label  string           `json:"label"`
	X      float64          `json:"x"`
	Slope  float64          `json:"slope"`
	Class  string           `json:"class"`
	Order  int              `json:"order"`
	Params []LocalParamJSON `json:"parameters"`
}

// LocalParamJSON holds ∂x*/∂θ, d f'(x*)/dθ and their elasticities.
type LocalParamJSON struct {
	Parameter       string   `json:"parameter"`
	Fixed           bool     `json:"fixed"`
	Value           float64  `json:"value"`
	DX              *float64 `json:"dx_dtheta"`
	XElasticity     *float64 `json:"x_elasticity"`
	DSlope          *float64 `json:"dslope_dtheta"`
	SlopeElasticity *float64 `json:"slope_elasticity"`
}

func ci(v [2]float64) [2]*float64 { return [2]*float64{num(v[0]), num(v[1])} }

// NewSensitivityJSON converts a sensitivity result for JSON output.
func NewSensitivityJSON(version, scenario, title string, r *sensitivity.Result) *SensitivityJSON {
	out := &SensitivityJSON{
		Envelope: newEnvelope(KindSensitivity, version, scenario, title),
		Target:   r.Target, TargetX: r.TargetX, TargetClass: r.TargetClass.String(),
		Output: r.Output.String(),
		Runs:   r.Runs + r.ScreenRuns, DesignRuns: r.Runs, ScreeningRuns: r.ScreenRuns,
		Base: r.Base, Uncertain: r.Uncertain, FailedRuns: r.FailedRuns,
		FaultedDraws: r.Faulted, Failures: countedJSON(r.Failed), Faults: countedJSON(r.Faults),
		Seed: r.Seed, Plan: r.Plan.String(), Level: r.Level,
		Independent: len(r.Correlated) == 0, Correlated: append([]string{}, r.Correlated...),
		RankedBy: r.RankedBy, SplitOn: r.SplitOn.String(), ElasticityOf: r.ElasticityOf,
		Indices: []SensitivityRowJSON{}, Local: []LocalEquilibriumJSON{},
		Chart:    SensitivityBars(r),
		Reading:  append([]string{}, r.Reading...),
		Notes:    append([]string{}, r.Notes...),
		Warnings: append([]string{}, r.Warnings...),
		Caution:  Caution,
	}
	if e := r.Indices; e != nil {
		out.RowsUsed, out.Replicates = e.Rows, e.Replicates
		out.OutputMean, out.OutputVar = num(e.Mean), num(e.Variance)
	}
	if s := r.Screening; s != nil {
		out.Screening = ScreeningSummaryJSON{Seen: s.Seen, Kept: s.Kept, Cap: s.Cap, Capped: s.Capped}
	}
	for _, w := range r.Rows {
		out.Indices = append(out.Indices, SensitivityRowJSON{
			Parameter: w.Parameter, Fixed: w.Fixed,
			FirstOrder: num(w.First), FirstOrderCI: ci(w.FirstCI),
			Total: num(w.Total), TotalCI: ci(w.TotalCI),
			RankCorr: num(w.RankCorr), PRCC: num(w.PRCC),
			SplitDistance: num(w.Split.D), SplitP: num(w.Split.P),
			Elasticity: num(w.Elasticity), Rank: w.Rank,
		})
	}
	for _, e := range r.Local {
		le := LocalEquilibriumJSON{Label: e.Label, X: e.X, Slope: e.Slope, Class: e.Class.String(), Order: e.Order, Params: []LocalParamJSON{}}
		for _, p := range e.Params {
			le.Params = append(le.Params, LocalParamJSON{
				Parameter: p.Parameter, Fixed: p.Fixed, Value: p.Value,
				DX: num(p.DX), XElasticity: num(p.XElasticity),
				DSlope: num(p.DSlope), SlopeElasticity: num(p.SlopeElasticity),
			})
		}
		out.Local = append(out.Local, le)
	}
	return out
}

// SensitivityBars returns the bar-chart data of the ranking: one bar per
// parameter in ranking order, its length the ranking measure (total index
// with its interval and the first-order index beside it; the split
// distance; or the rank correlation's size).
func SensitivityBars(r *sensitivity.Result) BarChartJSON {
	c := BarChartJSON{
		Kind:    "horizontal-bar",
		Title:   fmt.Sprintf("Inputs ranked by %s: %s of %s", r.RankedBy, r.Output, r.Target),
		Measure: r.RankedBy,
		Bars:    []BarJSON{},
	}
	for _, w := range r.Rows {
		b := BarJSON{Label: w.Parameter}
		switch r.RankedBy {
		case sensitivity.ByTotal:
			b.Value, b.Lo, b.Hi, b.Second = num(w.Total), num(w.TotalCI[0]), num(w.TotalCI[1]), num(w.First)
		case sensitivity.BySplit:
			b.Value = num(w.Split.D)
		case sensitivity.ByRankCorr:
			b.Value = num(math.Abs(w.RankCorr))
		}
		c.Bars = append(c.Bars, b)
	}
	return c
}

// bar draws v ∈ [0, 1] as a text bar of up to 20 blocks.
func bar(v *float64) string {
	if v == nil || !(*v > 0) {
		return ""
	}
	n := int(math.Round(math.Min(*v, 1) * 20))
	if n == 0 {
		return "▏"
	}
	return strings.Repeat("█", n)
}

// f2 formats an index-like number with two decimals, "–" for NaN.
func f2(v float64) string {
	if math.IsNaN(v) {
		return "–"
	}
	if v == 0 {
		return "0"
	}
	return fmt.Sprintf("%.2f", v)
}

func withCI(v float64, c [2]float64) string {
	if math.IsNaN(v) {
		return "–"
	}
	if math.IsNaN(c[0]) || v == 0 && c == [2]float64{} {
		return f2(v)
	}
	return fmt.Sprintf("%s (%s…%s)", f2(v), f2(c[0]), f2(c[1]))
}

func split(s sensitivity.Split) string {
	if math.IsNaN(s.D) {
		return "–"
	}
	if s.D == 0 && s.P == 1 {
		return "0"
	}
	return fmt.Sprintf("%.2f (%s)", s.D, pval(s.P))
}

func pval(p float64) string {
	switch {
	case math.IsNaN(p):
		return "p –"
	case p < 0.001:
		return "p<0.001"
	}
	return fmt.Sprintf("p=%.2g", p)
}

// outputPhrase words the output analysed (a sensitivity.Output's name)
// of the target equilibrium.
func outputPhrase(output, target string) string {
	switch output {
	case sensitivity.Attracting.String():
		return "whether " + target + " attracts"
	case sensitivity.Position.String():
		return "the position x* of " + target
	case sensitivity.Slope.String():
		return "the slope f'(x*) at " + target
	}
	return "whether the state ends at " + target + " from the current state"
}

// SensitivityTable writes the ranking as a terminal table: one row per
// parameter with the measures side by side and a bar of the ranking
// measure, then the plain reading, the notes, the local view at nominal
// values and the caution.
func SensitivityTable(w io.Writer, title, unit string, r *sensitivity.Result) error {
	if title != "" {
		fmt.Fprintf(w, "%s\n", title)
	}
	fmt.Fprintf(w, "Sensitivity of %s (output %s; %s is %s at x* = %s%s at nominal values).\n",
		outputPhrase(r.Output.String(), r.Target), r.Output, r.Target, r.TargetClass, g(r.TargetX), unitSuffix(unit))
	used := 0
	if r.Indices != nil {
		used = r.Indices.Rows
	}
	fmt.Fprintf(w, "Saltelli design: %d base rows × (%d inputs + 2) = %d model runs (plan %s, seed %d); %d rows used, %d runs failed.\n",
		r.Base, r.Uncertain, r.Runs, r.Plan, r.Seed, used, r.FailedRuns)
	screen := 0
	if r.Screening != nil {
		screen = r.Screening.Kept
	}
	fmt.Fprintf(w, "Indices: first order (Saltelli 2010), total (Jansen 1999), 95%% bootstrap intervals. Rank correlation over %d draws; split D: Kolmogorov–Smirnov distance between each input's values where %s and where not (Spear & Hornberger 1980). Elasticity: of %s at nominal values.\n",
		screen, verdictPhrase(r.SplitOn.String(), r.Target), elasticityPhrase(r.ElasticityOf, r.Target))
	fmt.Fprintf(w, "Ranked by %s.\n\n", r.RankedBy)
	bars := SensitivityBars(r)
	var rows [][]string
	for i, row := range r.Rows {
		rows = append(rows, []string{
			fmt.Sprint(row.Rank), paramName(row.Parameter, row.Fixed), withCI(row.First, row.FirstCI), withCI(row.Total, row.TotalCI),
			f2(row.RankCorr), split(row.Split), g3(row.Elasticity), bar(bars.Bars[i].Value),
		})
	}
	if err := writeTable(w, []string{"rank", "input", "first order", "total", "rank corr", "split D", "elasticity", r.RankedBy}, rows); err != nil {
		return err
	}
	if len(r.Reading) > 0 {
		fmt.Fprintf(w, "\nReading:\n")
		printLines(w, "  ", r.Reading)
	}
	printLines(w, "Note: ", r.Notes)
	printLines(w, "Warning: ", r.Warnings)
	printLines(w, "", runTroubleLines(r.Failed, r.Faults, r.Faulted, r.Runs, r.ScreenRuns))
	if len(r.Local) > 0 {
		fmt.Fprintf(w, "\nLocal view at nominal values (∂x*/∂θ = −(∂f/∂θ)/(∂f/∂x); elasticity = relative change per relative change of θ):\n")
		var rows [][]string
		for _, e := range r.Local {
			for _, p := range e.Params {
				rows = append(rows, []string{e.Label, p.Parameter, g3(p.DX), g3(p.XElasticity), g3(p.DSlope), g3(p.SlopeElasticity)})
			}
		}
		if err := writeTable(w, []string{"", "input", "∂x*/∂θ", "elasticity of x*", "d f'(x*)/dθ", "elasticity of f'(x*)"}, rows); err != nil {
			return err
		}
	}
	fmt.Fprintf(w, "\n%s\n", Caution)
	return nil
}

// runTroubleLines words the failed model runs and the numeric faults of
// a sensitivity run by reason with their first run indices, the number
// of runs with faults, and (with a screening run) what the indices are.
func runTroubleLines(failed, faults []assess.Counted, faulted int64, runs, screenRuns int) []string {
	out := countedLines(failed, faults, "model run", "model runs", "first runs")
	if faulted > 0 {
		out = append(out, fmt.Sprintf("Model runs with numeric trouble (a pole or an undefined stretch of the rate law): %d of %d", faulted, runs+screenRuns))
	}
	if len(out) > 0 && screenRuns > 0 {
		out = append(out, fmt.Sprintf("Run indices below %d are runs of the Saltelli design; index %d + i is draw i of the screening run", runs, runs))
	}
	return out
}

// elasticityPhrase words what the elasticities are of ("x*" or "slope")
// for the target equilibrium.
func elasticityPhrase(of, target string) string {
	if of == "x*" {
		return "the position x* of " + target
	}
	return "the slope f'(x*) of " + target
}

// verdictPhrase words the verdict the split test is on (a
// sensitivity.Output's name) for the target equilibrium.
func verdictPhrase(splitOn, target string) string {
	if splitOn == sensitivity.Current.String() {
		return "the state ends at " + target + " from the current state"
	}
	return target + " attracts"
}

// g3 formats with three significant digits, "–" for NaN.
func g3(v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "–"
	}
	return fmt.Sprintf("%.3g", v)
}

// ScreeningJSON is the screening section of an assess result: for each
// tracked equilibrium and each parameter, the split test on whether it
// attracts (and on whether the state ends there from the current state),
// and the rank and partial rank correlations with its position and slope.
type ScreeningJSON struct {
	Method     string            `json:"method"`
	Seen       int               `json:"draws_seen"`
	Kept       int               `json:"draws_used"`
	Cap        int               `json:"cap"`
	Capped     bool              `json:"capped"`
	Equilibria []ScreeningEqJSON `json:"equilibria"`
}

// ScreeningEqJSON is the screening of one tracked equilibrium.
type ScreeningEqJSON struct {
	Label      string               `json:"label"`
	Parameters []ScreeningParamJSON `json:"parameters"`
}

// ScreeningParamJSON holds one parameter's screening measures; numbers
// that are undefined (the verdict never or always holds, the equilibrium
// is always lost) are null.
type ScreeningParamJSON struct {
	Parameter        string     `json:"parameter"`
	Fixed            bool       `json:"fixed"`
	SplitAttracting  SplitJSON  `json:"split_attracting"`
	SplitCurrent     *SplitJSON `json:"split_current,omitempty"`
	RankCorrPosition *float64   `json:"rank_corr_position"`
	PRCCPosition     *float64   `json:"prcc_position"`
	RankCorrSlope    *float64   `json:"rank_corr_slope"`
	PRCCSlope        *float64   `json:"prcc_slope"`
}

// SplitJSON is a split test: the KS distance, its p-value and the sizes of
// the two groups.
type SplitJSON struct {
	Distance *float64 `json:"distance"`
	P        *float64 `json:"p"`
	NYes     int      `json:"n_yes"`
	NNo      int      `json:"n_no"`
}

func splitJSON(s sensitivity.Split) SplitJSON {
	return SplitJSON{Distance: num(s.D), P: num(s.P), NYes: s.N1, NNo: s.N0}
}

const screeningMethod = "Spearman rank correlation and partial rank correlation (Iman & Conover 1980) over the draws where the figure is defined; " +
	"split test (Spear & Hornberger 1980): Kolmogorov–Smirnov distance between the parameter's values in draws where the verdict holds and where it does not, with its asymptotic p-value"

// NewScreeningJSON converts screening measures for JSON output (nil for
// nil).
func NewScreeningJSON(s *sensitivity.Screening) *ScreeningJSON {
	if s == nil {
		return nil
	}
	out := &ScreeningJSON{Method: screeningMethod, Seen: s.Seen, Kept: s.Kept, Cap: s.Cap, Capped: s.Capped, Equilibria: []ScreeningEqJSON{}}
	for _, e := range s.Equilibria {
		eq := ScreeningEqJSON{Label: e.Label, Parameters: []ScreeningParamJSON{}}
		att, pos, slope := e.Outputs[sensitivity.Attracting], e.Outputs[sensitivity.Position], e.Outputs[sensitivity.Slope]
		cur := e.Outputs[sensitivity.Current]
		for p, name := range s.Names {
			sp := ScreeningParamJSON{
				Parameter: name, Fixed: s.Fixed[p],
				SplitAttracting:  splitJSON(att.Split[p]),
				RankCorrPosition: num(pos.Spearman[p]), PRCCPosition: num(pos.PRCC[p]),
				RankCorrSlope: num(slope.Spearman[p]), PRCCSlope: num(slope.PRCC[p]),
			}
			if cur != nil {
				c := splitJSON(cur.Split[p])
				sp.SplitCurrent = &c
			}
			eq.Parameters = append(eq.Parameters, sp)
		}
		out.Equilibria = append(out.Equilibria, eq)
	}
	return out
}

// screeningSection writes the screening table of an assess result: one row
// per tracked equilibrium and uncertain parameter.
func screeningSection(w io.Writer, s *sensitivity.Screening) error {
	if len(s.Equilibria) == 0 {
		return nil
	}
	hasCurrent := s.Equilibria[0].Outputs[sensitivity.Current] != nil
	fmt.Fprintf(w, "\nWhich inputs drive each verdict (screening over %d draws): split D is the Kolmogorov–Smirnov distance between an input's values where the verdict holds and where not (Spear & Hornberger 1980); ρ is Spearman's rank correlation, PRCC the partial rank correlation.\n", s.Kept)
	head := []string{"", "input", "attracts: split D"}
	if hasCurrent {
		head = append(head, "ends here from current: split D")
	}
	head = append(head, "ρ with x*", "PRCC with x*", "ρ with slope")
	var fixed []string
	for p, name := range s.Names {
		if s.Fixed[p] {
			fixed = append(fixed, name)
		}
	}
	var rows [][]string
	for _, e := range s.Equilibria {
		for p, name := range s.Names {
			if s.Fixed[p] {
				continue
			}
			row := []string{e.Label, name, split(e.Outputs[sensitivity.Attracting].Split[p])}
			if hasCurrent {
				row = append(row, split(e.Outputs[sensitivity.Current].Split[p]))
			}
			pos, sl := e.Outputs[sensitivity.Position], e.Outputs[sensitivity.Slope]
			row = append(row, f2(pos.Spearman[p]), f2(pos.PRCC[p]), f2(sl.Spearman[p]))
			rows = append(rows, row)
		}
	}
	if err := writeTable(w, head, rows); err != nil {
		return err
	}
	if len(fixed) > 0 {
		fmt.Fprintf(w, "Fixed parameters have no effect and are not listed: %s.\n", strings.Join(fixed, ", "))
	}
	if s.Capped {
		fmt.Fprintf(w, "Screening used the %d successful draws among the first %d (the cap) of %d.\n", s.Kept, s.Cap, s.Seen)
	}
	return nil
}
