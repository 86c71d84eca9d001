package report

import (
	"fmt"
	"strings"
)

// sweepDocument lays out the report of a sweep result.
func sweepDocument(r *SweepJSON) *document {
	d := titledDocument(r.Title, "Tipping-point sweep")
	su, du := "", ""
	if m := r.Model; m != nil {
		su = m.State.Unit
		for _, p := range m.Parameters {
			if p.Name == r.Driver {
				du = p.Unit
			}
		}
	}
	d.p(tx(fmt.Sprintf("Tipping-point sweep by holdfast %s of scenario ", r.Version)), cd(r.Scenario),
		tx(fmt.Sprintf(": the driver %s moved from %s to %s, following %s (%s at x* = %s at nominal values); %d parameter draws (%s, seed %d), %d assessed.",
			r.Driver, g(r.From), withUnit(g(r.To), du), r.Track, trackClassPhrase(r.TrackClass), withUnit(g(r.TrackX), su),
			r.Draws, r.Plan, r.Seed, r.Critical.N)))
	d.caution()
	sweepKeyFigures(d, r, du)
	scenarioSection(d, &r.Envelope, r.Model)
	inputsSection(d, r.Model)
	d.pf("In this sweep %s does not take its drawn values: every draw takes the sweep's values of %s instead, and its distribution only bounds the values it may take.", r.Driver, r.Driver)
	sweepMethod(d, r)
	criticalSection(d, r, du)
	limitSection(d, r, du)
	hysteresisSection(d, r, du)
	curveSection(d, r, du)
	sweepWarnings(d, r)
	limitsSection(d,
		"The critical values concern moving "+r.Driver+" alone, slowly enough for the state to follow its equilibrium. A fast change, or other inputs changing at the same time, can tip the system earlier or later.",
		"Whether a shift can be undone is judged in the model by reversing "+r.Driver+" within its allowed values; the report does not say how long a recovery would take.")
	reproductionSection(d, &r.Envelope, r.ScenarioText, r.Model)
	d.caution()
	return d
}

// trackClassPhrase words the nominal class of the tracked equilibrium.
func trackClassPhrase(c string) string {
	switch {
	case c == "stable":
		return "attracting"
	case strings.HasPrefix(c, "semistable-"):
		return "attracting from " + strings.TrimPrefix(c, "semistable-") + " only"
	}
	return nominalClassPhrase(c)
}

// sweepValueJSON formats a driver value read off the critical values.
func sweepValueJSON(v *float64, where string, r *SweepJSON) string {
	switch where {
	case "in range":
		if v != nil {
			return g(*v)
		}
	case "at start":
		return "at the start (" + g(r.From) + ")"
	case "beyond end":
		return "beyond " + g(r.To)
	}
	return "–"
}

// sweepDirection is "up" or "down".
func sweepDirection(r *SweepJSON) string {
	if r.To < r.From {
		return "down"
	}
	return "up"
}

// boundText formats an allowed value of the driver; null is infinite.
func boundText(v *float64, sign string) string {
	if v == nil {
		return sign + "∞"
	}
	return g(*v)
}

func sweepKeyFigures(d *document, r *SweepJSON, du string) {
	d.h2("Key figures")
	c, l := &r.Critical, &r.Limit
	risk := pc(l.Risk) + "%"
	var items [][]span
	switch l.Where {
	case "in range":
		items = append(items, []span{tx(fmt.Sprintf("Safe limit at %s risk: %s = %s (95%% interval %s to %s). From the start of the sweep to this value the estimated probability of having lost %s is at most %s.",
			risk, r.Driver, withUnit(sweepValueJSON(l.Value, l.Where, r), du), sweepValueJSON(l.CI[0], l.CIWhere[0], r), sweepValueJSON(l.CI[1], l.CIWhere[1], r), r.Track, risk))})
	case "at start":
		items = append(items, []span{tx(fmt.Sprintf("No safe limit at %s risk inside the sweep: %s is already lost at the start (%s = %s) in more than %s of draws.",
			risk, r.Track, r.Driver, g(r.From), risk))})
	case "beyond end":
		items = append(items, []span{tx(fmt.Sprintf("The safe limit at %s risk lies beyond the end of the sweep: fewer than %s of draws lose %s before %s = %s.",
			risk, risk, r.Track, r.Driver, g(r.To)))})
	default:
		items = append(items, []span{tx(fmt.Sprintf("Too few draws to estimate the safe limit at %s risk.", risk))})
	}
	q := c.Quantiles
	w := c.Where
	items = append(items, []span{tx(fmt.Sprintf("Median critical value of %s: %s (5%% to 95%% along the sweep: %s to %s).",
		r.Driver, withUnit(sweepValueJSON(q.Q50, w.Q50, r), du), sweepValueJSON(q.Q5, w.Q5, r), sweepValueJSON(q.Q95, w.Q95, r)))})
	items = append(items, []span{tx(fmt.Sprintf("%s is lost within the sweep in %d of %d assessed draws; no tipping in range in %s; already lost at the start in %s.",
		r.Track, c.Counts["fold"]+c.Counts["exchange"]+c.Counts["boundary"], c.N,
		pctCI(c.ShareWithoutTipping, c.ShareWithoutTippingCI, c.N), pctCI(c.ShareLostAtStart, c.ShareLostAtStartCI, c.N)))})
	if h := &r.Hysteresis; h.Draws > 0 {
		items = append(items, []span{tx(fmt.Sprintf("Of the %s in which an attracting %s folds, the shift cannot be undone by reversing %s within its allowed values in %s.",
			plural(h.Draws, "draw", "draws"), r.Track, r.Driver, pctCI(h.Irreversible.P, h.Irreversible.CI, h.Draws)))})
	}
	items = append(items, []span{tx("Intervals are 95%.")})
	d.list(items...)
}

func sweepMethod(d *document, r *SweepJSON) {
	s := r.Settings
	if !methodHead(d, s != nil) {
		return
	}
	d.pf("%d parameter sets were drawn by %s with seed %d, and in each the driver %s was swept %s from %s to %s. Draw i depends only on the seed and i, so the numbers do not depend on how many workers shared the run.",
		s.Draws, planPhrase(s.Plan), s.Seed, r.Driver, sweepDirection(r), g(r.From), g(r.To))
	d.pf("In each draw the equilibrium %s found at nominal values is followed to the draw's parameters with %s at %s by pseudo-arclength continuation (Keller 1977), as in an assessment, and counts as lost at the start when it meets a fold on the way. From there its branch is continued in %s toward %s by pseudo-arclength continuation (Allgower & Georg 2003), which passes through folds instead of stopping before them. Where the slope ∂f/∂x changes sign and the branch turns back, the fold is located by Newton's method on f = 0, ∂f/∂x = 0 (Seydel 2010, §5.5); where it changes sign without turning, two branches cross and %s exchanges stability; a branch may also leave the state's domain. The first such event is the draw's critical value.",
		r.Track, r.Driver, g(r.From), r.Driver, g(r.To), r.Track)
	d.pf("Equilibria are found by a scan of f and f' together, from truncated Taylor arithmetic, on %d cells refined by adaptive bisection (up to %d levels), each root refined to a relative tolerance of %s, and classified by the first derivative that does not vanish (up to order %d).",
		s.ScanCells, s.ScanMaxDepth, strings.Replace(fmt.Sprintf("%.0e", s.RootRelTol), "e-", "e−", 1), s.MaxOrder)
	d.pf("Quantiles of the critical values are sample quantiles (the order statistic of rank ⌈Np⌉; Hyndman & Fan 1996, definition 1), counting a draw lost at the start as lost at %s and a draw without tipping as lost beyond %s; levels run along the sweep. The safe limit at risk %s%% is the %s-quantile, with a %s interval (%s) whose ranks come from the binomial distribution (Conover 1999, §3.2).",
		g(r.From), g(r.To), pc(s.Risk), g(s.Risk), g(100*s.Confidence)+"%", s.LimitInterval)
	d.p(tx("For a fold of an attracting equilibrium, the state the system falls to is found just past the fold and followed back along the driver to its own fold, the return fold, sought up to four sweep widths behind the start; between the two lies the hysteresis window. When the return fold lies outside the driver's allowed values, reversing the driver alone cannot undo the shift (irreversible)."))
	if s.Steps > 0 {
		d.pf("The probability curves run the Monte Carlo engine at %d values of %s from %s to %s on the same draws (common random numbers), with %s%% intervals: %s (Wilson 1927; Clopper & Pearson 1934).",
			s.Steps, r.Driver, g(r.From), g(r.To), g(100*s.Confidence), s.Interval)
	}
	d.pf("The histogram of the critical values has equal bins from the smallest to the largest value in range, of width 2·IQR·n^(−1/3) by the rule of Freedman & Diaconis (1981), at most %d of them.", s.HistogramMaxBins)
}

func criticalSection(d *document, r *SweepJSON, du string) {
	c := &r.Critical
	d.h2("Tipping distribution")
	d.pf("How each of the %d draws ends along the sweep of %s from %s to %s:", r.Draws, r.Driver, g(r.From), g(r.To))
	t := table{head: []string{"outcome", "draws", "share of assessed draws"}, right: []bool{false, true, true}}
	for _, o := range []struct{ kind, text string }{
		{"fold", "meets a fold and vanishes"},
		{"exchange", "exchanges stability with a crossing branch"},
		{"boundary", "leaves the state's domain"},
		{"none", "no tipping in range"},
		{"absent", "already lost at the start"},
	} {
		t.rows = append(t.rows, []string{o.text, fmt.Sprint(c.Counts[o.kind]), propCI(c.Counts[o.kind], c.N)})
	}
	t.rows = append(t.rows, []string{"not assessed (failed)", fmt.Sprint(c.Counts["failed"]), "–"})
	d.table(t)
	d.pf("Critical values of %s, read along the sweep: the 5%% value is where 5%% of the draws have lost %s.", r.Driver, r.Track)
	q, w := c.Quantiles, c.Where
	qt := table{head: []string{"level along the sweep", "5%", "25%", "50%", "75%", "95%"}, right: []bool{false, true, true, true, true, true}}
	qt.rows = append(qt.rows, []string{r.Driver + inUnit(du), sweepValueJSON(q.Q5, w.Q5, r), sweepValueJSON(q.Q25, w.Q25, r),
		sweepValueJSON(q.Q50, w.Q50, r), sweepValueJSON(q.Q75, w.Q75, r), sweepValueJSON(q.Q95, w.Q95, r)})
	d.table(qt)
	h := c.Histogram
	if len(h.Counts) == 0 {
		d.pf("No draw loses %s within the sweep, so there is no distribution of critical values to show.", r.Track)
		return
	}
	var mark *float64
	markLabel := ""
	if r.Limit.Value != nil && r.Limit.Where == "in range" {
		mark = r.Limit.Value
		markLabel = "safe limit at " + pc(r.Limit.Risk) + "% risk"
	}
	var left []string
	if k := c.Counts["absent"]; k > 0 {
		left = append(left, plural(k, "draw", "draws")+" lost at the start")
	}
	if k := c.Counts["none"]; k > 0 {
		left = append(left, plural(k, "draw", "draws")+" without tipping in range")
	}
	out := ""
	if len(left) > 0 {
		out = " (" + strings.Join(left, " and ") + " are not shown)"
	}
	marked := ""
	if mark != nil {
		marked = "; the solid line marks the " + markLabel
	}
	driver, track, xl := r.Driver, r.Track, axisLabel(r.Driver, du)
	d.figure("critical-values", fmt.Sprintf("The critical values of %s at which %s is lost, over the %s that lose it within the sweep%s%s.",
		driver, track, plural(h.N, "draw", "draws"), out, marked),
		func() (*chart, error) {
			return histogramChart("Critical values of "+driver+" for "+track, xl, h.Edges, h.Counts,
				fmt.Sprintf("draws (%d)", h.N), mark, markLabel, false)
		})
}

func limitSection(d *document, r *SweepJSON, du string) {
	l := &r.Limit
	d.h2("Safe limit")
	risk := pc(l.Risk) + "%"
	d.pf("At risk α = %s: %s = %s, 95%% interval %s to %s (order statistics of ranks %d and %d of %d, exact coverage %.3f; the estimate is the one of rank %d).",
		risk, r.Driver, withUnit(sweepValueJSON(l.Value, l.Where, r), du), sweepValueJSON(l.CI[0], l.CIWhere[0], r), sweepValueJSON(l.CI[1], l.CIWhere[1], r),
		l.Ranks[1], l.Ranks[2], r.Critical.N, l.Coverage, l.Ranks[0])
	switch l.Where {
	case "in range":
		d.pf("Moving %s from %s %s to this value, the estimated probability of having lost %s is at most %s; the interval says how far that value may move with other draws.", r.Driver, g(r.From), sweepDirection(r), r.Track, risk)
	case "at start":
		d.pf("%s is already lost at the start of the sweep in more than %s of draws: no value of %s in the sweep keeps the risk that low.", r.Track, risk, r.Driver)
	case "beyond end":
		d.pf("Fewer than %s of draws lose %s before %s = %s: the limit lies beyond the sweep; a longer sweep would locate it.", risk, r.Track, r.Driver, g(r.To))
	}
	if l.CIWhere[0] == "unbounded" || l.CIWhere[1] == "unbounded" {
		d.p(tx("An interval end shown as – cannot be bounded with this number of draws."))
	}
}

func hysteresisSection(d *document, r *SweepJSON, du string) {
	h := &r.Hysteresis
	d.h2("Hysteresis")
	if h.Draws == 0 {
		d.pf("In no draw does an attracting %s fold within the sweep, so there is no hysteresis to report.", r.Track)
		return
	}
	d.pf("What follows the fold in the %s in which an attracting %s folds; allowed values of %s: [%s, %s].",
		plural(h.Draws, "draw", "draws"), r.Track, r.Driver, boundText(r.Allowed[0], "−"), boundText(r.Allowed[1], "+"))
	t := table{head: []string{"after the fold", "share of those draws", "draws"}, right: []bool{false, true, true}}
	for _, row := range []struct {
		text string
		p    ProbJSON
	}{
		{"return fold inside the allowed values (reversible)", h.Reversible},
		{"return fold outside the allowed values (irreversible)", h.Irreversible},
		{"the state leaves the domain", h.Escapes},
		{"unresolved", h.Unresolved},
	} {
		t.rows = append(t.rows, []string{row.text, pctCI(row.p.P, row.p.CI, h.Draws), fmt.Sprint(row.p.Count)})
	}
	d.table(t)
	if h.ReturnFold.N > 0 {
		d.pf("Over the %s where a return fold was found (5%% / median / 95%%): return fold of %s %s; width of the hysteresis window %s.",
			plural(h.ReturnFold.N, "draw", "draws"), r.Driver, withUnit(q3(h.ReturnFold), du), withUnit(q3(h.Width), du))
	}
}

func curveSection(d *document, r *SweepJSON, du string) {
	d.h2("Probability curves")
	if len(r.Curve) == 0 {
		d.p(tx("The run computed no probability curves (--steps 0)."))
		return
	}
	d.pf("The Monte Carlo engine on the same draws at each value of %s: the share of draws in which %s exists and attracts, with 95%% intervals, and the most common regime.", r.Driver, r.Track)
	t := table{head: []string{r.Driver + inUnit(du), r.Track + " exists", r.Track + " attracting", "most common regime", "failed draws"},
		right: []bool{true, true, true, false, true}}
	faulted := false
	for _, p := range r.Curve {
		faulted = faulted || p.FaultedDraws != 0
	}
	if faulted {
		t.head = append(t.head, "draws with numeric trouble")
		t.right = append(t.right, true)
	}
	var most int64
	differ := false
	n := int64(r.Draws)
	for _, p := range r.Curve {
		regime := "–"
		if len(p.Regimes) > 0 {
			regime = regimeShare(p.Regimes[0].Pattern, p.Regimes[0].P)
		}
		ok := n - p.FailedDraws
		row := []string{g(p.Value), pctCI(p.PExists, p.PExistsCI, ok), pctCI(p.PAttracting, p.PAttractingCI, ok), regime, fmt.Sprint(p.FailedDraws)}
		if faulted {
			row = append(row, fmt.Sprint(p.FaultedDraws))
		}
		t.rows = append(t.rows, row)
		most = max(most, p.PathDisagree)
		if p.PExists != p.PAttracting {
			differ = true
		}
	}
	d.table(t)
	if most > 0 {
		d.pf("The engine follows %s from nominal values straight to each draw, the sweep along %s; near a cusp the two paths can give different verdicts (in at most %d of %d draws at one value).",
			r.Track, r.Driver, most, r.Draws)
	}
	x := make([]float64, len(r.Curve))
	var pe, le, he, pa, la, ha []float64
	for i, p := range r.Curve {
		x[i] = p.Value
		pe, le, he = append(pe, p.PExists), append(le, p.PExistsCI[0]), append(he, p.PExistsCI[1])
		pa, la, ha = append(pa, p.PAttracting), append(la, p.PAttractingCI[0]), append(ha, p.PAttractingCI[1])
	}
	driver, track, xl := r.Driver, r.Track, axisLabel(r.Driver, du)
	attracting := strings.HasPrefix(r.TrackClass, "stable")
	if attracting || differ {
		d.figure("curve-attracting", fmt.Sprintf("The probability that %s attracts against %s, with its 95%% interval.", track, driver),
			func() (*chart, error) {
				return curveChart("P("+track+" attracting) along "+driver, xl, "P("+track+" attracting)", x, pa, la, ha)
			})
	}
	if !attracting || differ {
		d.figure("curve-exists", fmt.Sprintf("The probability that %s exists against %s, with its 95%% interval.", track, driver),
			func() (*chart, error) {
				return curveChart("P("+track+" exists) along "+driver, xl, "P("+track+" exists)", x, pe, le, he)
			})
	}
}

func sweepWarnings(d *document, r *SweepJSON) {
	lines := affixed("Warning: ", "", r.Warnings)
	lines = append(lines, affixed("", ".", sweepTroubleLines(countedOf(r.Failures), countedOf(r.Faults), r.FaultedDraws, r.Draws, max(len(r.Curve), 1)))...)
	troubleSection(d, "Warnings and failures", lines, noDrawTrouble)
}
