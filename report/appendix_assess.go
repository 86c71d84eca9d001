package report

import (
	"fmt"
	"strings"
)

// assessDocument lays out the report of an assess result.
func assessDocument(r *AssessJSON) *document {
	d := titledDocument(r.Title, "Equilibrium assessment")
	unit, symbol := "", "x"
	if r.Model != nil {
		unit, symbol = r.Model.State.Unit, r.Model.State.Symbol
	}
	d.p(tx(fmt.Sprintf("Equilibrium assessment by holdfast %s of scenario ", r.Version)), cd(r.Scenario),
		tx(fmt.Sprintf(": %d parameter draws (%s, seed %d), %d assessed.", r.Draws, r.Plan, r.Seed, r.Assessed)))
	d.caution()
	keyFigures(d, r, unit)
	scenarioSection(d, &r.Envelope, r.Model)
	inputsSection(d, r.Model)
	assessMethod(d, r)
	nominalSection(d, r, symbol, unit)
	probabilitySection(d, r, unit)
	regimeSection(d, r)
	certificationSection(d, r)
	currentSection(d, r, unit)
	resilienceSection(d, r, unit)
	screeningDocSection(d, r)
	convergenceSection(d, r)
	requirementSection(d, r.Requirements)
	warningSection(d, r)
	limitsSection(d, "An equilibrium that attracts in a draw attracts only within its basin: the report does not say how large the disturbances are that the system will meet.")
	reproductionSection(d, &r.Envelope, r.ScenarioText, r.Model)
	d.caution()
	return d
}

func keyFigures(d *document, r *AssessJSON, unit string) {
	d.h2("Key figures")
	var items [][]span
	for _, e := range r.Equilibria {
		var s string
		switch {
		case strings.HasPrefix(e.NominalClass, "stable"):
			s = fmt.Sprintf("%s, attracting at nominal values (x* = %s): attracts in %s of draws.",
				e.Label, withUnit(g(e.NominalX), unit), pctCI(e.PAttracting, e.PAttractingCI, r.Assessed))
		case strings.HasPrefix(e.NominalClass, "semistable"):
			s = fmt.Sprintf("%s, attracting from one side only at nominal values (x* = %s): semistable in %s of draws, attracting from both sides in %s.",
				e.Label, withUnit(g(e.NominalX), unit), pctCI(e.PSemistable, e.PSemistableCI, r.Assessed), pctCI(e.PAttracting, e.PAttractingCI, r.Assessed))
		default:
			s = fmt.Sprintf("%s, %s at nominal values (x* = %s): exists in %s of draws.",
				e.Label, nominalClassPhrase(e.NominalClass), withUnit(g(e.NominalX), unit), pctCI(e.PExists, e.PExistsCI, r.Assessed))
		}
		items = append(items, []span{tx(s)})
	}
	if len(r.Equilibria) == 0 {
		items = append(items, []span{tx("No equilibrium in the domain at nominal values.")})
	}
	var multi int64
	for _, g := range r.Regimes {
		n := 0
		for _, c := range g.Pattern {
			if c == "stable" {
				n++
			}
		}
		if n >= 2 {
			multi += g.Count
		}
	}
	if multi > 0 {
		items = append(items, []span{tx(fmt.Sprintf("Two or more attracting states (multistability) in %s of draws.", propCI(multi, r.Assessed)))})
	}
	if c := r.Current; c != nil && len(c.Outcomes) > 0 {
		best := c.Outcomes[0]
		for _, o := range c.Outcomes[1:] {
			if o.Count > best.Count {
				best = o
			}
		}
		items = append(items, []span{tx(fmt.Sprintf("From the current state %s the state most often %s: %s of draws.",
			withUnit(g(c.X), unit), outcomePhrase(best.Label), pctCI(best.P, best.CI, r.Assessed)))})
	}
	items = append(items, []span{tx(fmt.Sprintf("Intervals are 95%%; the widest half-width of any probability reported is %s percentage points.",
		fmt.Sprintf("%.2g", 100*r.Convergence.MaxHalfWidth)))})
	d.list(items...)
}

// outcomePhrase says where the state goes for an outcome label.
func outcomePhrase(label string) string {
	switch label {
	case "other equilibrium":
		return "ends at an equilibrium absent at nominal values"
	case "leaves domain below":
		return "leaves the domain through its lower end"
	case "leaves domain above":
		return "leaves the domain through its upper end"
	case "singular point":
		return "runs into a point where the rate law is undefined"
	case "undefined start":
		return "starts where the rate law is undefined"
	}
	return "ends at " + label
}

func nominalClassPhrase(c string) string {
	switch {
	case c == "unstable":
		return "repelling"
	case strings.HasPrefix(c, "degenerate"):
		return "degenerate"
	}
	return c
}

func assessMethod(d *document, r *AssessJSON) {
	s := r.Settings
	if !methodHead(d, s != nil) {
		return
	}
	draws := fmt.Sprintf("%d parameter sets were drawn by %s with seed %d", r.Draws, planPhrase(s.Plan), s.Seed)
	if s.UntilHalfWidth != nil {
		draws = fmt.Sprintf("Parameter sets were drawn by %s with seed %d in batches, the first of %d draws and each further one as large as all before it, until every probability's 95%% half-width was at most %s or %d draws were reached; %d were drawn",
			planPhrase(s.Plan), s.Seed, s.DrawsRequested, g(*s.UntilHalfWidth), s.MaxDraws, r.Draws)
	}
	d.p(tx(draws + ". Draw i depends only on the seed and i, so the numbers do not depend on how many workers shared the run."))
	d.pf("In each draw, every equilibrium in the domain is found by a scan of f and f' together, from truncated Taylor arithmetic, on %d cells refined by adaptive bisection where the first derivative may change sign (up to %d levels), so that roots where f touches zero and close pairs are not missed; each root is refined by a safeguarded Newton-type iteration to a relative tolerance of %s.",
		s.ScanCells, s.ScanMaxDepth, strings.Replace(fmt.Sprintf("%.0e", s.RootRelTol), "e-", "e−", 1))
	d.pf("Each equilibrium is classified by n, the order of the first derivative of f at x* that does not vanish (up to order %d): for odd n it attracts when that derivative is negative (stable) and repels when positive (unstable); for even n it attracts from one side only (semistable). Whether a derivative vanishes is judged against the rounding-error bound the Taylor arithmetic carries, and every verdict is checked against the signs of f between neighbouring equilibria.",
		s.MaxOrder)
	d.p(tx("The equilibria at nominal values are labelled E1 < E2 < …. Each hyperbolic one is followed into every draw by pseudo-arclength continuation (Keller 1977) along the straight path from the nominal parameters to the draw's, and counts as lost in that draw when it meets a fold on the way; non-hyperbolic ones are matched to the nearest equilibrium of the draw within half the distance to their nominal neighbours. Regimes, the ordered classes of all equilibria of a draw, are counted beside them."))
	d.pf("Probabilities are shares of the %d assessed draws with 95%% intervals: %s (Wilson 1927; Clopper & Pearson 1934). Quantiles come from a mergeable sketch with relative accuracy %s (Masson, Rim & Lee 2019). A draw that cannot be assessed is counted with its reason and left out of the shares.",
		r.Assessed, s.Interval, g(s.QuantileAccuracy))
	if f := r.Figures; f != nil {
		d.pf("The figures are drawn from summaries kept during the run: the rate curve of %d assessed draws (those of lowest index, up to a fixed number) on %d points across the domain; each slope histogram from a mergeable sketch of every slope, on bins over its 0.5%% to 99.5%% range widened to include zero (counts exact up to the sketch's resolution at bin edges); and the counts behind each probability at 16, 32, 64, … draws.",
			f.Band.Draws, len(f.Band.X))
	}
}

func nominalSection(d *document, r *AssessJSON, symbol, unit string) {
	d.h2("Equilibria at nominal values")
	n := r.Nominal
	if n == nil {
		d.p(tx("The result file does not hold the nominal analysis."))
		return
	}
	var ps []string
	for _, p := range n.Parameters {
		ps = append(ps, p.Name+" = "+g(p.Value))
	}
	if len(ps) > 0 {
		d.pf("At %s:", strings.Join(ps, ", "))
	}
	if len(n.Equilibria) == 0 {
		d.p(tx("No equilibrium in the domain."))
	} else {
		t := table{head: []string{"", "x*" + inUnit(unit), "class", "order", "slope f'(x*)", "return time", "basin", "barrier below", "barrier above"},
			right: []bool{false, true, false, true, true, true, false, true, true}}
		for _, e := range n.Equilibria {
			t.rows = append(t.rows, []string{e.Label, g(e.X), attractsClass(e.Class, e.AttractsFrom), fmt.Sprint(e.Order), g(e.Slope), gp(e.ReturnTime),
				fmt.Sprintf("[%s, %s]", g(e.Basin[0]), g(e.Basin[1])), gp(e.Barrier[0]), gp(e.Barrier[1])})
		}
		d.table(t)
		d.p(tx("Return time is 1/|f'(x*)| for an attracting equilibrium of order 1; the basin is the set of starting states that flow to it; a barrier is the rise of the potential V = −∫f dx from x* to the basin's edge."))
	}
	if c := n.Current; c != nil {
		d.pf("From the current state %s: %s.", withUnit(g(c.X), unit), transitJSON(c))
	}
	for _, f := range n.Faults {
		d.pf("Undefined at nominal values: %s.", f)
	}
	if r.Figures != nil && len(r.Figures.Band.X) > 0 {
		var marks []eqMark
		for _, e := range n.Equilibria {
			marks = append(marks, eqMark{label: e.Label, class: e.Class, side: e.AttractsFrom, x: e.X})
		}
		f := r.Figures
		d.figure("rate-band", fmt.Sprintf("The rate d%s/dt = f(%s) at nominal values (solid), with the median, the 25–75%% and the 5–95%% range of f over the first %d draws at each %s; each nominal equilibrium is marked on f = 0 by its class.",
			symbol, symbol, f.Band.Draws, symbol),
			func() (*chart, error) { return rateBandChart(f, symbol, unit, marks) })
	}
}

func transitJSON(c *CurrentJSON) string {
	switch c.Fate {
	case "stays":
		if c.MovesTo != "" {
			return "already at " + c.MovesTo
		}
		return "already at an equilibrium"
	case "approaches":
		return fmt.Sprintf("moves to %s (x* = %s), 99%% of the way after time %s", c.MovesTo, gp(c.Target), gp(c.TimeTo1Pct))
	case "exits below":
		return fmt.Sprintf("leaves the domain through its lower end %s after time %s", gp(c.Target), gp(c.TimeTo1Pct))
	case "exits above":
		return fmt.Sprintf("leaves the domain through its upper end %s after time %s", gp(c.Target), gp(c.TimeTo1Pct))
	case "singular":
		return fmt.Sprintf("runs into a point where the rate law is undefined (x = %s)", gp(c.Target))
	case "outside":
		return "starts where the rate law is undefined"
	}
	return c.Fate
}

func probabilitySection(d *document, r *AssessJSON, unit string) {
	d.h2("How likely each equilibrium holds")
	if len(r.Equilibria) == 0 {
		d.p(tx("No equilibrium is tracked: there is none in the domain at nominal values."))
		return
	}
	d.pf("Shares of the %d assessed draws in which each nominal equilibrium exists (is not lost at a fold on the way from nominal values), attracts from both sides, or attracts from one side only; 95%% intervals in brackets.", r.Assessed)
	t := table{head: []string{"", "nominal x*" + inUnit(unit), "nominal class", "exists", "attracting", "semistable", "draws exists / attracting"},
		right: []bool{false, true, false, true, true, true, true}}
	for _, e := range r.Equilibria {
		t.rows = append(t.rows, []string{e.Label, g(e.NominalX), e.NominalClass,
			pctCI(e.PExists, e.PExistsCI, r.Assessed), pctCI(e.PAttracting, e.PAttractingCI, r.Assessed),
			pctCI(e.PSemistable, e.PSemistableCI, r.Assessed), fmt.Sprintf("%d / %d", e.ExistsCount, e.AttractingCount)})
	}
	d.table(t)
	if r.Untracked.Count > 0 {
		d.pf("An equilibrium absent at nominal values appears in %s of draws.", pctCI(r.Untracked.P, r.Untracked.CI, r.Assessed))
	}
	f := r.Figures
	if f == nil {
		return
	}
	for k, h := range f.Slopes {
		if len(h.Counts) == 0 || k >= len(r.Equilibria) {
			continue
		}
		var nominal *float64
		if r.Nominal != nil && k < len(r.Nominal.Equilibria) {
			s := r.Nominal.Equilibria[k].Slope
			nominal = &s
		}
		h := h
		out := ""
		if h.Below+h.Above > 0 {
			out = fmt.Sprintf(" (%s outside the plotted range: %d below, %d above)", plural(h.Below+h.Above, "draw", "draws"), h.Below, h.Above)
		}
		d.figure("slope-"+h.Label, fmt.Sprintf("The slope f'(x*) at %s over the %d draws where it exists%s. Left of zero it attracts, right of zero it repels; the solid line is its nominal slope.",
			h.Label, h.N, out),
			func() (*chart, error) {
				return histogramChart(h.Label+": slope f'(x*) over draws", "f'(x*) at "+h.Label+" [1/time]", h.Edges, h.Counts,
					fmt.Sprintf("draws (%d)", h.N), nominal, "nominal slope", true)
			})
	}
}

func regimeSection(d *document, r *AssessJSON) {
	d.h2("Regimes")
	d.p(tx("A regime is the ordered pattern of classes of all equilibria in a draw, from low to high state."))
	t := table{head: []string{"pattern", "share of draws", "draws"}, right: []bool{false, true, true}}
	for _, g := range r.Regimes {
		t.rows = append(t.rows, []string{regimeName(g.Pattern), pctCI(g.P, g.CI, r.Assessed), fmt.Sprint(g.Count)})
	}
	d.table(t)
}

func certificationSection(d *document, r *AssessJSON) {
	c := r.Certification
	if c == nil {
		return
	}
	d.h2("Certification")
	d.pf("Every assessed draw was checked by %s. A certified draw has exactly the equilibria reported, each proven, and no other in the domain.", c.Method)
	if c.Unresolved == 0 {
		d.pf("Certified: %s of %d checked draws; none was left unresolved.", pctCI(c.Certified.P, c.Certified.CI, c.Checked), c.Checked)
	} else {
		d.pf("Certified: %s of %d checked draws. Unresolved: %s, the widest interval left %s; in those intervals the verdict comes from the higher-order test at the located point and is not certified.",
			pctCI(c.Certified.P, c.Certified.CI, c.Checked), c.Checked, plural(c.Unresolved, "draw", "draws"), g(c.MaxWidth))
	}
	t := table{head: []string{"regime", "share of all checked draws", "share of certified draws"}, right: []bool{false, true, true}}
	rows := map[string][2]string{}
	var order []string
	for _, g := range c.Regimes {
		k := regimeName(g.Pattern)
		if _, ok := rows[k]; !ok {
			order = append(order, k)
		}
		rows[k] = [2]string{pctCI(g.P, g.CI, c.Checked), "–"}
	}
	for _, g := range c.CertifiedRegimes {
		k := regimeName(g.Pattern)
		v, ok := rows[k]
		if !ok {
			order = append(order, k)
			v[0] = "–"
		}
		v[1] = pctCI(g.P, g.CI, c.Certified.Count)
		rows[k] = v
	}
	for _, k := range order {
		t.rows = append(t.rows, []string{k, rows[k][0], rows[k][1]})
	}
	d.table(t)
	d.p(tx("Regimes over all checked draws come from the scan; regimes over certified draws from the certification, which proves simple roots only, so a certified draw holds attracting and repelling equilibria alone."))
	if c.Disagreeing == 0 {
		d.p(tx("Scan and certification agree in every checked draw."))
		return
	}
	var items []string
	for _, k := range c.Disagreements {
		items = append(items, fmt.Sprintf("%s: %s (first: %s).", k.Reason, plural(k.Draws, "draw", "draws"), ints(k.First)))
	}
	d.pf("Scan and certification disagree in %s; each is listed under Warnings with the command that replays it.", plural(c.Disagreeing, "draw", "draws"))
	d.list(textItems(items)...)
}

func currentSection(d *document, r *AssessJSON, unit string) {
	c := r.Current
	if c == nil {
		return
	}
	d.h2("Outcome from the current state")
	d.pf("Where the state ends when started at the scenario's current state %s, read off each draw's phase line.", withUnit(g(c.X), unit))
	t := table{head: []string{"destination", "share of draws", "draws"}, right: []bool{false, true, true}}
	for _, o := range c.Outcomes {
		t.rows = append(t.rows, []string{o.Label, pctCI(o.P, o.CI, r.Assessed), fmt.Sprint(o.Count)})
	}
	d.table(t)
}

func resilienceSection(d *document, r *AssessJSON, unit string) {
	if len(r.Equilibria) == 0 {
		return
	}
	d.h2("Resilience")
	d.p(tx("Quantiles (5% / median / 95%) over the draws where each figure is defined: position and slope where the equilibrium exists; return time, basin width and barrier where it attracts (the barrier toward the nearer threshold between basins, not toward a domain end)."))
	t := table{head: []string{"", "x*" + inUnit(unit), "slope f'(x*)", "return time", "basin width", "barrier"},
		right: []bool{false, true, true, true, true, true}}
	for _, e := range r.Equilibria {
		t.rows = append(t.rows, []string{e.Label, q3(e.XQuantiles), q3(e.SlopeQuantiles), q3(e.ReturnTimeQ), q3(e.BasinWidthQ), q3(e.BarrierQuantile)})
	}
	d.table(t)
}

func screeningDocSection(d *document, r *AssessJSON) {
	s := r.Sensitivity
	if s == nil || len(s.Equilibria) == 0 {
		return
	}
	d.h2("Which inputs drive each verdict")
	d.pf("Screening over the first %d successful draws: the split distance D is the Kolmogorov–Smirnov distance between an input's values in the draws where the equilibrium attracts and where it does not (Spear & Hornberger 1980); ρ is Spearman's rank correlation with the equilibrium's position and PRCC the partial rank correlation (Iman & Conover 1980).", s.Kept)
	d.list(textItems(screenReading(s, r.Equilibria))...)
	hasCurrent := len(s.Equilibria) > 0 && len(s.Equilibria[0].Parameters) > 0 && s.Equilibria[0].Parameters[0].SplitCurrent != nil
	head := []string{"", "input", "attracts: split D"}
	right := []bool{false, false, true}
	if hasCurrent {
		head, right = append(head, "ends here: split D"), append(right, true)
	}
	head, right = append(head, "ρ with x*", "PRCC with x*", "ρ with slope"), append(right, true, true, true)
	t := table{head: head, right: right}
	var fixed []string
	for i, e := range s.Equilibria {
		for _, p := range e.Parameters {
			if p.Fixed {
				if i == 0 {
					fixed = append(fixed, p.Parameter)
				}
				continue
			}
			row := []string{e.Label, p.Parameter, splitText(p.SplitAttracting)}
			if hasCurrent && p.SplitCurrent != nil {
				row = append(row, splitText(*p.SplitCurrent))
			} else if hasCurrent {
				row = append(row, "–")
			}
			row = append(row, f2p(p.RankCorrPosition), f2p(p.PRCCPosition), f2p(p.RankCorrSlope))
			t.rows = append(t.rows, row)
		}
	}
	d.table(t)
	if len(fixed) > 0 {
		d.pf("Fixed parameters have no effect and are not listed: %s.", strings.Join(fixed, ", "))
	}
	for _, e := range s.Equilibria {
		var bars []barItem
		for _, p := range e.Parameters {
			if p.Fixed || p.SplitAttracting.Distance == nil {
				continue
			}
			bars = append(bars, barItem{label: p.Parameter, value: *p.SplitAttracting.Distance})
		}
		if len(bars) == 0 {
			continue
		}
		sortBars(bars)
		label := e.Label
		d.figure("inputs-"+label, fmt.Sprintf("Inputs ranked by how strongly they separate the draws where %s attracts from those where it does not (split distance D, 0 to 1).", label),
			func() (*chart, error) {
				return barsChart("Which inputs decide whether "+label+" attracts", "split distance D", "", "", bars)
			})
	}
}

func sortBars(bars []barItem) {
	for i := 1; i < len(bars); i++ {
		for j := i; j > 0 && bars[j].value > bars[j-1].value; j-- {
			bars[j], bars[j-1] = bars[j-1], bars[j]
		}
	}
}

func splitText(s SplitJSON) string {
	if s.Distance == nil {
		return "–"
	}
	p := "p –"
	if s.P != nil {
		p = pval(*s.P)
	}
	return fmt.Sprintf("%.2f (%s)", *s.Distance, p)
}

func f2p(v *float64) string {
	if v == nil {
		return "–"
	}
	return f2(*v)
}

func convergenceSection(d *document, r *AssessJSON) {
	d.h2("Convergence")
	c := r.Convergence
	text := fmt.Sprintf("%d draws in %s; the widest 95%% half-width of any probability reported is %.4g.",
		r.Draws, plural(int64(c.Batches), "batch", "batches"), c.MaxHalfWidth)
	if c.TargetHalfWidth != nil {
		state := "was reached"
		if !c.Reached {
			state = "was NOT reached before the draw limit"
		}
		text += fmt.Sprintf(" The target half-width %s %s.", g(*c.TargetHalfWidth), state)
	}
	d.p(tx(text))
	f := r.Figures
	if f == nil || len(f.Running) == 0 || len(r.Equilibria) == 0 {
		return
	}
	d.p(tx("The estimate of each equilibrium's nominal verdict as draws were added (in percent):"))
	head := []string{"draws"}
	right := []bool{true}
	var ss []series
	for k, e := range r.Equilibria {
		name, pick := runningVerdict(e.NominalClass)
		head, right = append(head, e.Label+" "+name), append(right, true)
		s := series{label: e.Label + " " + name}
		for _, cp := range f.Running {
			s.draws = append(s.draws, float64(cp.Draws))
			s.k = append(s.k, pick(cp)[k])
			s.n = append(s.n, cp.Succeeded)
		}
		ss = append(ss, s)
	}
	t := table{head: head, right: right}
	for i, cp := range f.Running {
		row := []string{fmt.Sprint(cp.Draws)}
		for _, s := range ss {
			if s.n[i] == 0 {
				row = append(row, "–")
				continue
			}
			row = append(row, pc(float64(s.k[i])/float64(s.n[i])))
		}
		t.rows = append(t.rows, row)
	}
	d.table(t)
	d.figure("convergence", "The running estimate of each equilibrium's nominal verdict against the number of draws, with its 95% interval; a settled estimate runs flat inside a narrowing band.",
		func() (*chart, error) { return convergenceChart(ss) })
}

// runningVerdict picks the verdict followed for an equilibrium of the
// given nominal class: attracting for stable, semistable for semistable,
// existence otherwise.
func runningVerdict(class string) (string, func(CheckpointJSON) []int64) {
	switch {
	case strings.HasPrefix(class, "stable"):
		return "attracting", func(c CheckpointJSON) []int64 { return c.Attracting }
	case strings.HasPrefix(class, "semistable"):
		return "semistable", func(c CheckpointJSON) []int64 { return c.Semistable }
	}
	return "exists", func(c CheckpointJSON) []int64 { return c.Exists }
}

func requirementSection(d *document, reqs []RequirementJSON) {
	if len(reqs) == 0 {
		return
	}
	d.h2("Requirements")
	met := 0
	for _, q := range reqs {
		if q.Met {
			met++
		}
	}
	d.pf("%d of %d requirements met. Each is judged on the end of the 95%% interval, not on the estimate: a lower bound for ≥ and >, an upper bound for ≤ and <.", met, len(reqs))
	t := table{head: []string{"requirement", "verdict", "bound judged", "margin", "estimate", "draws"}, right: []bool{false, false, true, true, true, true}}
	for _, q := range reqs {
		v := "met"
		if !q.Met {
			v = "NOT MET"
		}
		t.rows = append(t.rows, []string{q.Requirement, v, q.Side + " " + gp(q.Bound), gp(q.Margin), g(q.Estimate), fmt.Sprintf("%d of %d", q.Count, q.N)})
	}
	d.table(t)
}

func warningSection(d *document, r *AssessJSON) {
	lines := affixed("Warning: ", "", r.Warnings)
	if r.Nominal != nil {
		lines = append(lines, affixed("At nominal values: ", "", r.Nominal.Warnings)...)
	}
	lines = append(lines, affixed("", ".", countedLines(countedOf(r.Failures), countedOf(r.Faults), "draw", "draws", "first"))...)
	troubleSection(d, "Warnings and failures", lines, noDrawTrouble)
}

// noDrawTrouble closes the warnings of a run of draws that raised none.
const noDrawTrouble = "The run raised no warning, and every draw was assessed without numeric trouble."
