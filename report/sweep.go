package report

import (
	"fmt"
	"io"
	"strings"

	"holdfast/assess"
	"holdfast/assess/steady"
	"holdfast/assess/tipping"
)

// SweepJSON is the JSON form of a driver sweep. With the envelope, the
// scenario's description and text (SetRun), the settings and the
// critical-value histogram it is a result file that holdfast report
// renders.
type SweepJSON struct {
	Envelope
	Driver      string      `json:"driver"`
	From        float64     `json:"from"`
	To          float64     `json:"to"`
	Allowed     [2]*float64 `json:"allowed"`
	Track       string      `json:"track"`
	TrackX      float64     `json:"track_nominal_x"`
	TrackClass  string      `json:"track_nominal_class"`
	Draws       int         `json:"draws"`
	FailedDraws int64       `json:"failed_draws"`
	Seed        uint64      `json:"seed"`
	Plan        string      `json:"plan"`
	// Settings and Model describe the run for a report's method and
	// inputs sections.
	Settings   *SweepSettingsJSON `json:"settings"`
	Model      *ModelJSON         `json:"model"`
	Critical   CriticalJSON       `json:"critical"`
	Limit      LimitJSON          `json:"limit"`
	Hysteresis HysteresisJSON     `json:"hysteresis"`
	Curve      []CurvePointJSON   `json:"curve"`
	Failures   []CountedJSON      `json:"failures"`
	// Faults lists the numeric faults (poles, undefined stretches of the
	// rate law) by reason, and FaultedDraws counts the draws that met
	// them, over every engine run (one per curve point, or one without
	// curves): a draw counts once per driver value. The first_draws of
	// Failures and Faults are draw indices, the same at every value.
	Faults       []CountedJSON `json:"faults"`
	FaultedDraws int64         `json:"faulted_draws"`
	Warnings     []string      `json:"warnings"`
	// ScenarioText is the scenario file's full text (its SHA-256 is in
	// the envelope).
	ScenarioText string            `json:"scenario_text"`
	Caution      string            `json:"caution"`
	Notes        map[string]string `json:"notes"`
}

// SetRun records the command line and the scenario (hash, description
// and full text).
func (d *SweepJSON) SetRun(run RunInfo) {
	d.Model, d.ScenarioText = d.Envelope.stamp(run)
}

// SweepSettingsJSON records the settings of a sweep that its method
// section describes.
type SweepSettingsJSON struct {
	Draws int    `json:"draws"`
	Plan  string `json:"plan"`
	Seed  uint64 `json:"seed"`
	// Steps is the number of driver values of the probability curves (0:
	// none), Risk the α of the safe limit.
	Steps      int     `json:"steps"`
	Risk       float64 `json:"risk"`
	Confidence float64 `json:"confidence"`
	// Interval is the interval of every probability; LimitInterval that
	// of the safe limit.
	Interval      string `json:"interval"`
	LimitInterval string `json:"limit_interval"`
	// HistogramMaxBins bounds the critical-value histogram's bins, whose
	// width follows the Freedman–Diaconis rule.
	HistogramMaxBins int `json:"histogram_max_bins"`
	// ScanCells, ScanMaxDepth and RootRelTol are the equilibrium search's
	// initial grid, bisection depth limit and root tolerance; MaxOrder the
	// highest derivative order the classification looks at.
	ScanCells    int     `json:"scan_cells"`
	ScanMaxDepth int     `json:"scan_max_depth"`
	RootRelTol   float64 `json:"root_rel_tol"`
	MaxOrder     int     `json:"max_order"`
}

func newSweepSettingsJSON(r *tipping.Result) *SweepSettingsJSON {
	d := steady.DefaultOptions()
	return &SweepSettingsJSON{
		Draws: r.Draws, Plan: r.Plan.String(), Seed: r.Seed, Steps: len(r.Curve), Risk: r.Limit.Risk, Confidence: 0.95,
		Interval:         "Wilson score; Clopper–Pearson when the count is 0 or N",
		LimitInterval:    "distribution-free, between two order statistics",
		HistogramMaxBins: tipping.MaxHistogramBins,
		ScanCells:        d.Grid, ScanMaxDepth: d.MaxDepth, RootRelTol: d.RelTol, MaxOrder: 7,
	}
}

// SweepQuantilesJSON holds driver values at the 5, 25, 50, 75 and 95%
// levels along the sweep; null where the value lies outside the range
// (see the matching where field).
type SweepQuantilesJSON struct {
	Q5  *float64 `json:"5"`
	Q25 *float64 `json:"25"`
	Q50 *float64 `json:"50"`
	Q75 *float64 `json:"75"`
	Q95 *float64 `json:"95"`
}

// SweepWhereJSON tells, per level, where the value lies: "in range", "at
// start" (the tracked equilibrium is already lost at from), "beyond end"
// (no tipping up to to) or "unbounded" (too few draws).
type SweepWhereJSON struct {
	Q5  string `json:"5"`
	Q25 string `json:"25"`
	Q50 string `json:"50"`
	Q75 string `json:"75"`
	Q95 string `json:"95"`
}

// CriticalJSON summarises the per-draw critical values.
type CriticalJSON struct {
	Kind                  string             `json:"kind"`
	N                     int64              `json:"n"`
	Counts                map[string]int64   `json:"counts"`
	Quantiles             SweepQuantilesJSON `json:"quantiles"`
	Where                 SweepWhereJSON     `json:"quantiles_where"`
	ShareWithoutTipping   float64            `json:"share_without_tipping"`
	ShareWithoutTippingCI [2]float64         `json:"share_without_tipping_ci"`
	ShareLostAtStart      float64            `json:"share_lost_at_start"`
	ShareLostAtStartCI    [2]float64         `json:"share_lost_at_start_ci"`
	// Histogram counts the critical values in range (see
	// tipping.Result.CriticalHistogram); its label is the driver.
	Histogram HistogramJSON `json:"histogram"`
}

// LimitJSON is the safe limit at a risk with its order-statistic interval.
type LimitJSON struct {
	Risk     float64     `json:"risk"`
	Value    *float64    `json:"value"`
	CI       [2]*float64 `json:"ci"`
	Where    string      `json:"where"`
	CIWhere  [2]string   `json:"ci_where"`
	Coverage float64     `json:"coverage"`
	Ranks    [3]int      `json:"ranks"`
}

// HysteresisJSON summarises the folds of an attracting tracked
// equilibrium.
type HysteresisJSON struct {
	Draws        int64         `json:"draws"`
	Reversible   ProbJSON      `json:"reversible"`
	Irreversible ProbJSON      `json:"irreversible"`
	Escapes      ProbJSON      `json:"escapes"`
	Unresolved   ProbJSON      `json:"unresolved"`
	ReturnFold   QuantilesJSON `json:"return_fold_quantiles"`
	Width        QuantilesJSON `json:"width_quantiles"`
}

// CurvePointJSON is the engine's verdict at one driver value.
type CurvePointJSON struct {
	Value         float64      `json:"value"`
	PExists       float64      `json:"p_exists"`
	PExistsCI     [2]float64   `json:"p_exists_ci"`
	PAttracting   float64      `json:"p_attracting"`
	PAttractingCI [2]float64   `json:"p_attracting_ci"`
	Regimes       []RegimeJSON `json:"regimes"`
	FailedDraws   int64        `json:"failed_draws"`
	FaultedDraws  int64        `json:"faulted_draws"`
	PathDisagree  int64        `json:"path_disagreements"`
}

func valueJSON(v tipping.Value) *float64 {
	if v.Where != tipping.InRange {
		return nil
	}
	return num(v.D)
}

// NewSweepJSON converts a sweep result for JSON output.
func NewSweepJSON(version, scenario, title string, r *tipping.Result) *SweepJSON {
	c := &r.Critical
	q := c.Quantiles
	out := &SweepJSON{
		Envelope: newEnvelope(KindSweep, version, scenario, title),
		Driver:   r.Driver, From: r.From, To: r.To,
		Allowed:     [2]*float64{num(r.Allowed[0]), num(r.Allowed[1])},
		Track:       r.Track,
		TrackX:      r.Nominal.X,
		TrackClass:  className(r.Nominal.Class.String(), r.Nominal.AttractsFrom.String()),
		Draws:       r.Draws,
		FailedDraws: c.Count[tipping.Failed],
		Seed:        r.Seed,
		Plan:        r.Plan.String(),
		Critical: CriticalJSON{
			Kind:   c.Kind(),
			N:      c.N,
			Counts: map[string]int64{},
			Quantiles: SweepQuantilesJSON{
				Q5: valueJSON(q[0]), Q25: valueJSON(q[1]), Q50: valueJSON(q[2]), Q75: valueJSON(q[3]), Q95: valueJSON(q[4]),
			},
			Where: SweepWhereJSON{
				Q5: q[0].Where.String(), Q25: q[1].Where.String(), Q50: q[2].Where.String(), Q75: q[3].Where.String(), Q95: q[4].Where.String(),
			},
		},
		Limit: LimitJSON{
			Risk:     r.Limit.Risk,
			Value:    valueJSON(r.Limit.Value),
			CI:       [2]*float64{valueJSON(r.Limit.CI[0]), valueJSON(r.Limit.CI[1])},
			Where:    r.Limit.Value.Where.String(),
			CIWhere:  [2]string{r.Limit.CI[0].Where.String(), r.Limit.CI[1].Where.String()},
			Coverage: zeroNaN(r.Limit.Coverage),
			Ranks:    r.Limit.Ranks,
		},
		Settings:     newSweepSettingsJSON(r),
		Curve:        []CurvePointJSON{},
		Failures:     countedJSON(r.Failed),
		Faults:       countedJSON(r.Faults),
		FaultedDraws: r.Faulted,
		Warnings:     append([]string{}, r.Warnings...),
		Caution:      Caution,
		Notes: map[string]string{
			"levels":     "quantile levels run along the sweep: the 5% value is where 5% of the draws have lost the tracked equilibrium",
			"limit":      "the risk-quantile of the critical values (order statistic of rank ceil(N*risk)); ci is the distribution-free order-statistic interval",
			"curve":      "engine verdicts on the same draws at each driver value; path_disagreements counts draws where the engine's identity (from nominal values) differs from the sweep's (along the driver)",
			"hysteresis": "irreversible: the return fold lies outside the driver's allowed values, so reversing the driver alone cannot undo the shift",
			"histogram":  "critical.histogram counts the critical values in range only; draws lost at from and draws without tipping are in critical.counts",
			"faults":     "failures and faults are summed over the engine runs (at from and at each curve value): a draw counts once per driver value at which it failed or met numeric trouble; first_draws are draw indices, the same draw at every value",
		},
	}
	for k := tipping.None; k <= tipping.Failed; k++ {
		out.Critical.Counts[k.String()] = c.Count[k]
	}
	hist := r.CriticalHistogram()
	out.Critical.Histogram = HistogramJSON{Label: r.Driver, Edges: nonNil(hist.Edges), Counts: nonNilInts(hist.Counts), N: hist.N}
	w, a := probJSON(c.WithoutTipping), probJSON(c.LostAtStart)
	out.Critical.ShareWithoutTipping, out.Critical.ShareWithoutTippingCI = w.P, w.CI
	out.Critical.ShareLostAtStart, out.Critical.ShareLostAtStartCI = a.P, a.CI
	h := &r.Hysteresis
	out.Hysteresis = HysteresisJSON{
		Draws:        h.N,
		Reversible:   probJSON(h.Reversible),
		Irreversible: probJSON(h.Irreversible),
		Escapes:      probJSON(h.Escapes),
		Unresolved:   probJSON(h.Unresolved),
		ReturnFold:   quantilesJSON(h.Return),
		Width:        quantilesJSON(h.Width),
	}
	for _, p := range r.Curve {
		e, at := probJSON(p.Exists), probJSON(p.Attracting)
		cp := CurvePointJSON{
			Value: p.Value, PExists: e.P, PExistsCI: e.CI, PAttracting: at.P, PAttractingCI: at.CI,
			Regimes: regimesJSON(p.Regimes), FailedDraws: p.Failed, FaultedDraws: p.Faulted, PathDisagree: p.Disagree,
		}
		out.Curve = append(out.Curve, cp)
	}
	return out
}

// sweepValue formats a driver value read off the critical values.
func sweepValue(v tipping.Value, r *tipping.Result) string {
	switch v.Where {
	case tipping.InRange:
		return g(v.D)
	case tipping.AtStart:
		return "at start (" + g(r.From) + ")"
	case tipping.BeyondEnd:
		return "beyond " + g(r.To)
	}
	return "–"
}

// SweepTable writes the terminal summary of a driver sweep. stateUnit and
// driverUnit may be empty.
func SweepTable(w io.Writer, title, stateUnit, driverUnit string, r *tipping.Result) error {
	if title != "" {
		fmt.Fprintf(w, "%s\n", title)
	}
	c := &r.Critical
	du := unitSuffix(driverUnit)
	fmt.Fprintf(w, "Sweep of %s from %s to %s%s, tracking %s (%s at nominal values, x* = %s%s).\n",
		r.Driver, g(r.From), g(r.To), du, r.Track, classFrom(r.Nominal.Class.String(), r.Nominal.AttractsFrom.String()),
		g(r.Nominal.X), unitSuffix(stateUnit))
	fmt.Fprintf(w, "%d draws (plan %s, seed %d); %d assessed, %d failed. Intervals are 95%%.\n\n",
		r.Draws, r.Plan, r.Seed, c.N, c.Count[tipping.Failed])

	fmt.Fprintf(w, "Critical value of %s (first loss of %s along the sweep):\n", r.Driver, r.Track)
	var kinds []string
	for _, k := range []tipping.Kind{tipping.Fold, tipping.Exchange, tipping.Boundary} {
		if n := c.Count[k]; n > 0 {
			kinds = append(kinds, fmt.Sprintf("%s in %d draws", kindPhrase(k), n))
		}
	}
	if len(kinds) == 0 {
		kinds = []string{"no draw tips in range"}
	}
	fmt.Fprintf(w, "  %s\n", strings.Join(kinds, "; "))
	fmt.Fprintf(w, "  no tipping in range: %s; already lost at %s: %s\n", pct(c.WithoutTipping), g(r.From), pct(c.LostAtStart))
	row := []string{r.Driver + du}
	for _, v := range c.Quantiles {
		row = append(row, sweepValue(v, r))
	}
	if err := writeTable(w, []string{"level along the sweep", "5%", "25%", "50%", "75%", "95%"}, [][]string{row}); err != nil {
		return err
	}

	l := &r.Limit
	fmt.Fprintf(w, "\nSafe limit at risk %s: %s = %s%s (95%% interval %s to %s; order statistics, coverage %.3f)\n",
		pc(l.Risk)+"%", r.Driver, sweepValue(l.Value, r), du, sweepValue(l.CI[0], r), sweepValue(l.CI[1], r), l.Coverage)
	fmt.Fprintf(w, "  up to this value the estimated probability of having lost %s is at most %s%%.\n", r.Track, pc(l.Risk))

	if h := &r.Hysteresis; h.N > 0 {
		fmt.Fprintf(w, "\nHysteresis (%d draws in which an attracting %s folds):\n", h.N, r.Track)
		rows := [][]string{
			{"return fold inside the allowed values (reversible)", pct(h.Reversible)},
			{"return fold outside the allowed values (irreversible)", pct(h.Irreversible)},
			{"the state leaves the domain", pct(h.Escapes)},
			{"unresolved", pct(h.Unresolved)},
		}
		if err := writeTable(w, []string{"after the fold", "share of those draws"}, rows); err != nil {
			return err
		}
		fmt.Fprintf(w, "  allowed values of %s: [%s, %s]\n", r.Driver, g(r.Allowed[0]), g(r.Allowed[1]))
		if h.Return.N > 0 {
			fmt.Fprintf(w, "  return fold %s 5%%…95%%: %s … %s%s; window width median %s\n",
				r.Driver, g(h.Return.Q[0]), g(h.Return.Q[4]), du, g(h.Width.Q[2]))
		}
	}

	if len(r.Curve) > 0 {
		fmt.Fprintf(w, "\nProbability curves (the engine on the same draws at each value of %s):\n", r.Driver)
		faulted := false
		for _, p := range r.Curve {
			faulted = faulted || p.Faulted > 0
		}
		head := []string{r.Driver + du, r.Track + " exists", r.Track + " attracting", "most common regime"}
		if faulted {
			head = append(head, "numeric trouble")
		}
		var rows [][]string
		for _, p := range r.Curve {
			regime := "–"
			if len(p.Regimes) > 0 {
				regime = regimeShare(p.Regimes[0].Pattern, p.Regimes[0].P.P)
			}
			row := []string{g(p.Value), pct(p.Exists), pct(p.Attracting), regime}
			if faulted {
				row = append(row, fmt.Sprintf("%d draws", p.Faulted))
			}
			rows = append(rows, row)
		}
		if err := writeTable(w, head, rows); err != nil {
			return err
		}
		var most int64
		for _, p := range r.Curve {
			most = max(most, p.Disagree)
		}
		if most > 0 {
			fmt.Fprintf(w, "  The engine follows %s from nominal values straight to each draw, the sweep along %s; near a cusp\n  the two paths can give different verdicts (in at most %d of %d draws at one value).\n",
				r.Track, r.Driver, most, r.Draws)
		}
	}
	printLines(w, "", sweepTroubleLines(r.Failed, r.Faults, r.Faulted, r.Draws, r.Runs))
	printLines(w, "Warning: ", r.Warnings)
	fmt.Fprintf(w, "\n%s\n", Caution)
	return nil
}

// sweepTroubleLines words the failures and numeric faults of a sweep by
// reason with their first draw indices, and the number of draws with
// faults over the runs engine runs of draws each.
func sweepTroubleLines(failed, faults []assess.Counted, faulted int64, draws, runs int) []string {
	out := countedLines(failed, faults, "draw", "draws", "first")
	if faulted > 0 {
		if runs <= 1 {
			out = append(out, fmt.Sprintf("Draws with numeric trouble (a pole or an undefined stretch of the rate law): %d of %d", faulted, draws))
		} else {
			out = append(out, fmt.Sprintf("Draws with numeric trouble (a pole or an undefined stretch of the rate law): %d over the %d driver values of %d draws each (a draw counts once per value)", faulted, runs, draws))
		}
	}
	return out
}

func kindPhrase(k tipping.Kind) string {
	switch k {
	case tipping.Fold:
		return "meets a fold and vanishes"
	case tipping.Exchange:
		return "exchanges stability with a crossing branch"
	case tipping.Boundary:
		return "leaves the state's domain"
	}
	return k.String()
}
