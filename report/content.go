package report

import (
	"cmp"
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"holdfast/assess/agg"
)

// Shared pieces of the report documents.

// gp formats an optional number like g; nil prints as "–".
func gp(v *float64) string {
	if v == nil {
		return "–"
	}
	return g(*v)
}

// pctCI formats a share with its interval in percent: "78.0% (76.1–79.8)".
func pctCI(p float64, ci [2]float64, n int64) string {
	if n <= 0 {
		return "–"
	}
	return fmt.Sprintf("%s%% (%s–%s)", pc(p), pc(ci[0]), pc(ci[1]))
}

// propCI is the share k/n with its 95% interval as the run reports it.
func propCI(k, n int64) string {
	if n <= 0 {
		return "–"
	}
	pr := agg.Proportion{K: k, N: n}
	lo, hi := pr.Interval(0.95)
	return pctCI(pr.Estimate(), [2]float64{lo, hi}, n)
}

// q3 formats the 5, 50 and 95% quantiles.
func q3(q QuantilesJSON) string {
	if q.N == 0 || q.Q5 == nil || q.Q50 == nil || q.Q95 == nil {
		return "–"
	}
	return fmt.Sprintf("%s / %s / %s", g(*q.Q5), g(*q.Q50), g(*q.Q95))
}

// inUnit is " (unit)" for a column head, or "" without a unit.
func inUnit(unit string) string {
	if unit == "" {
		return ""
	}
	return " (" + unit + ")"
}

func withUnit(v, unit string) string {
	if unit == "" || v == "–" {
		return v
	}
	return v + " " + unit
}

func plural(n int64, one, many string) string {
	if n == 1 {
		return fmt.Sprintf("%d %s", n, one)
	}
	return fmt.Sprintf("%d %s", n, many)
}

// shellQuote quotes a word for a POSIX shell when it needs it.
func shellQuote(s string) string {
	if s == "" {
		return "''"
	}
	safe := true
	for _, r := range s {
		if !(r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' || r >= '0' && r <= '9' || strings.ContainsRune("-_./:=,+@%", r)) {
			safe = false
			break
		}
	}
	if safe {
		return s
	}
	return "'" + strings.ReplaceAll(s, "'", `'\''`) + "'"
}

func commandText(words []string) string {
	q := make([]string, len(words))
	for i, w := range words {
		q[i] = shellQuote(w)
	}
	return strings.Join(q, " ")
}

// planPhrase describes a sampling plan.
func planPhrase(plan string) string {
	switch plan {
	case "random":
		return "plain random sampling"
	case "lhs":
		return "Latin hypercube sampling (McKay, Beckman & Conover 1979)"
	case "qmc":
		return "randomized quasi-Monte Carlo: Sobol' points (Joe & Kuo 2008 direction numbers) with Owen scrambling (Owen 1995)"
	}
	return "plan " + plan
}

// scenarioSection writes the scenario's summary, rate law and state.
func scenarioSection(d *document, env *Envelope, m *ModelJSON) {
	d.h2("Scenario")
	if m == nil {
		d.pf("Scenario %s.", env.Scenario)
		return
	}
	if m.Summary != "" {
		d.p(tx(strings.Join(strings.Fields(m.Summary), " ")))
	}
	sym := m.State.Symbol
	d.p(tx("Rate law: "), cd("d"+sym+"/dt = "+m.Rate))
	if len(m.Defines) > 0 {
		var items [][]span
		for _, df := range m.Defines {
			items = append(items, []span{cd(df.Name + " = " + df.Expr)})
		}
		d.p(tx("with the named sub-expressions"))
		d.list(items...)
	}
	state := fmt.Sprintf("State %s", sym)
	if m.State.Unit != "" {
		state += " (" + m.State.Unit + ")"
	}
	state += fmt.Sprintf(" on the domain [%s, %s], where equilibria are sought", g(m.State.Domain[0]), g(m.State.Domain[1]))
	if m.State.Current != nil {
		state += fmt.Sprintf("; current state %s", withUnit(g(*m.State.Current), m.State.Unit))
	}
	d.p(tx(state + "."))
	d.p(tx("Scenario "), cd(env.Scenario), tx(", SHA-256 "), cd(env.ScenarioSHA256), tx("."))
}

// inputsSection writes the table of inputs and their correlations.
func inputsSection(d *document, m *ModelJSON) {
	d.h2("Inputs")
	if m == nil {
		d.p(tx("The result file does not describe the inputs."))
		return
	}
	t := table{head: []string{"parameter", "distribution", "nominal", "unit", "note"}, right: []bool{false, false, true}}
	nUnc := 0
	for _, p := range m.Parameters {
		dist := p.Distribution
		nominal := g(p.Nominal)
		switch {
		case p.Kind == "fixed" && p.SetOnCommandLine:
			dist = "fixed (set on the command line)"
		case p.Kind == "fixed":
			dist = "fixed"
		default:
			nUnc++
			if p.NominalGiven {
				nominal += " (stated)"
			} else {
				nominal += " (median)"
			}
		}
		if p.DataFile != "" {
			dist += fmt.Sprintf(" from column %s of %s", p.DataColumn, p.DataFile)
		}
		t.rows = append(t.rows, []string{p.Name, dist, nominal, p.Unit, p.Note})
	}
	d.pf("%s, %s. Nominal values are the stated ones, or else the median of the distribution; the equilibria E1, E2, … are numbered at them.",
		plural(int64(len(m.Parameters)), "parameter", "parameters"), plural(int64(nUnc), "of them uncertain", "of them uncertain"))
	d.table(t)
	if len(m.Correlations) == 0 {
		if nUnc > 1 {
			d.p(tx("The uncertain inputs are drawn independently (no correlations are stated)."))
		}
		return
	}
	var cs []string
	for _, c := range m.Correlations {
		cs = append(cs, fmt.Sprintf("%s and %s: %s", c.A, c.B, strconv.FormatFloat(c.Rho, 'g', -1, 64)))
	}
	d.pf("Rank (Spearman) correlations between inputs: %s; imposed on the draws by the distribution-free method of Iman & Conover (1982).", strings.Join(cs, "; "))
}

// methodHead starts the Method section; without recorded settings it
// says so and reports false (the section ends there).
func methodHead(d *document, recorded bool) bool {
	d.h2("Method")
	if !recorded {
		d.p(tx("The result file does not record the run's settings."))
	}
	return recorded
}

// limitsSection states what the results do not say.
func limitsSection(d *document, extra ...string) {
	d.h2("What these results do not say")
	items := [][]span{
		{tx("The probabilities are shares of parameter draws under the distributions in the inputs table. Other distributions, correlations or fixed values give other numbers; inputs held fixed contribute no uncertainty at all.")},
		{tx("They concern the rate law as written. Processes it leaves out, a changing environment or a different model structure are not covered, and no probability here measures how well the model fits the real system.")},
		{tx("The 95% intervals cover the Monte Carlo sampling error only: not errors in the inputs, in the model, or in the data behind them.")},
	}
	for _, e := range extra {
		items = append(items, []span{tx(e)})
	}
	d.list(items...)
}

// reproductionSection gives the command, the versions and the scenario
// text.
func reproductionSection(d *document, env *Envelope, text string, m *ModelJSON) {
	d.h2("Reproduction")
	if len(env.Command) > 0 {
		d.p(tx("The command that produced this result (flags that never change a result, such as the number of workers, output files, shards and checkpoints, are left out):"))
		d.code("sh", commandText(env.Command))
	}
	d.pf("holdfast %s, result schema %d. Draw i depends only on the seed and i, so the same command on the same scenario gives the same numbers.", env.Version, env.Schema)
	if strings.HasPrefix(env.Scenario, "demo:") {
		d.p(tx("The scenario "), cd(env.Scenario), tx(" is embedded in holdfast; its text as run, SHA-256 "), cd(env.ScenarioSHA256), tx(":"))
	} else {
		d.p(tx("The scenario file "), cd(env.Scenario), tx(" as run, SHA-256 "), cd(env.ScenarioSHA256), tx("; save it under that name to run the command again:"))
	}
	d.code("yaml", text)
	if m != nil {
		var files []string
		for _, p := range m.Parameters {
			if p.DataFile != "" && !slices.Contains(files, p.DataFile) {
				files = append(files, p.DataFile)
			}
		}
		if len(files) > 0 {
			d.pf("The scenario also reads %s beside it; keep that file with the scenario.", strings.Join(files, ", "))
		}
	}
}

// screenReading says in plain words which inputs sway each verdict, from
// the screening measures of an assess run.
func screenReading(s *ScreeningJSON, tracked []TrackedJSON) []string {
	var out []string
	for k, e := range s.Equilibria {
		type pd struct {
			name string
			d, p float64
		}
		var splits []pd
		var best string
		bestRho := 0.0
		for _, p := range e.Parameters {
			if p.Fixed {
				continue
			}
			if p.SplitAttracting.Distance != nil && p.SplitAttracting.P != nil {
				splits = append(splits, pd{p.Parameter, *p.SplitAttracting.Distance, *p.SplitAttracting.P})
			}
			if r := p.RankCorrPosition; r != nil && math.Abs(*r) > math.Abs(bestRho) {
				best, bestRho = p.Parameter, *r
			}
		}
		slices.SortStableFunc(splits, func(a, b pd) int { return cmp.Compare(b.d, a.d) })
		var sb strings.Builder
		var strong []pd
		for _, s := range splits {
			if s.p < 0.01 && s.d >= 0.1 {
				strong = append(strong, s)
			}
		}
		switch {
		case len(splits) == 0:
			always := "in every draw or in none"
			if k < len(tracked) && tracked[k].Label == e.Label {
				switch tracked[k].PAttracting {
				case 0:
					always = "in no draw"
				case 1:
					always = "in every draw"
				}
			}
			fmt.Fprintf(&sb, "%s attracts %s, so no input sways that verdict.", e.Label, always)
		case len(strong) == 0:
			fmt.Fprintf(&sb, "Whether %s attracts shows no clear dependence on any single input (no split distance of at least 0.1 with p < 0.01).", e.Label)
		default:
			fmt.Fprintf(&sb, "Whether %s attracts turns most on %s (split distance %.2f, %s)", e.Label, strong[0].name, strong[0].d, pval(strong[0].p))
			if len(strong) > 1 {
				var rest []string
				for _, s := range strong[1:min(len(strong), 3)] {
					rest = append(rest, fmt.Sprintf("%s (%.2f)", s.name, s.d))
				}
				sb.WriteString(", then " + strings.Join(rest, " and "))
			}
			sb.WriteString(".")
		}
		if best != "" && math.Abs(bestRho) >= 0.3 {
			dir := "rises"
			if bestRho < 0 {
				dir = "falls"
			}
			fmt.Fprintf(&sb, " Its position %s most with %s (rank correlation %.2f).", dir, best, bestRho)
		}
		out = append(out, sb.String())
	}
	return out
}
