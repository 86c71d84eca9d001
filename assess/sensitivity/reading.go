package sensitivity

import (
	"fmt"
	"math"
	"strings"
	"unicode"
	"unicode/utf8"
)

// Thresholds of the plain-language reading. A total index of 0.05 is a
// usual screening threshold for "matters" (common practice, no source);
// an input "has no detectable effect" when the upper end of its total
// index's interval is below it.
const (
	mattersAt     = 0.05
	interactsAt   = 0.05 // total − first order above which interactions are named
	dominantShare = 0.5
)

// subject is the output in words.
func subject(r *Result) string {
	switch r.Output {
	case Attracting:
		return fmt.Sprintf("whether %s attracts", r.Target)
	case Position:
		return fmt.Sprintf("the position of %s", r.Target)
	case Slope:
		return fmt.Sprintf("the slope f' at %s", r.Target)
	case Current:
		return fmt.Sprintf("whether the state ends at %s from the current state", r.Target)
	}
	return r.Output.String()
}

func capital(s string) string {
	c, n := utf8.DecodeRuneInString(s)
	return string(unicode.ToUpper(c)) + s[n:]
}

func pText(p float64) string {
	if p < 0.001 {
		return "p < 0.001"
	}
	return fmt.Sprintf("p = %.2g", p)
}

func list(names []string) string {
	switch len(names) {
	case 0:
		return ""
	case 1:
		return names[0]
	}
	return strings.Join(names[:len(names)-1], ", ") + " and " + names[len(names)-1]
}

// reading turns the ranking into a few plain sentences, e.g. "Whether E1
// attracts turns mostly on s (total index 0.71)." and "q matters only
// through its interaction with s."
func reading(r *Result) []string {
	var out []string
	subj := subject(r)
	var uncertain, fixed []Row
	for _, w := range r.Rows {
		if w.Fixed {
			fixed = append(fixed, w)
		} else {
			uncertain = append(uncertain, w)
		}
	}
	switch r.RankedBy {
	case ByTotal:
		out = append(out, readTotal(subj, uncertain)...)
	case BySplit:
		out = append(out, readSplit(r, subj, uncertain)...)
	case ByRankCorr:
		out = append(out, readCorr(subj, uncertain)...)
	default:
		if e := r.Indices; e != nil && e.Variance == 0 {
			out = append(out, capital(fmt.Sprintf("%s does not vary over the runs (always %g), so no input can be said to drive it.", subj, e.Mean)))
		} else {
			out = append(out, "No measure could be computed, so the inputs are listed in scenario order.")
		}
	}
	if len(fixed) > 0 {
		var names []string
		for _, w := range fixed {
			names = append(names, w.Parameter)
		}
		out = append(out, fmt.Sprintf("Fixed in the scenario, so contributing nothing here: %s.", list(names)))
	}
	return out
}

func readTotal(subj string, rows []Row) []string {
	var out []string
	var matter []Row
	for _, w := range rows {
		if w.Total >= mattersAt {
			matter = append(matter, w)
		}
	}
	switch {
	case len(matter) == 0:
		out = append(out, capital(fmt.Sprintf("%s turns on no single input: every total index is below %.2f.", subj, mattersAt)))
	case matter[0].Total >= dominantShare && (len(matter) == 1 || matter[1].Total < dominantShare*matter[0].Total):
		out = append(out, capital(fmt.Sprintf("%s turns mostly on %s (total index %.2f).", subj, matter[0].Parameter, matter[0].Total)))
	default:
		var parts []string
		for _, w := range matter {
			parts = append(parts, fmt.Sprintf("%s (%.2f)", w.Parameter, w.Total))
		}
		out = append(out, capital(fmt.Sprintf("%s is shared among %s (total indices).", subj, list(parts))))
	}
	// Interactions: an interaction term of i and j adds to both total
	// indices, so when exactly two inputs show one they interact with each
	// other.
	var inter []Row
	for _, w := range matter {
		if w.Total-w.First >= interactsAt {
			inter = append(inter, w)
		}
	}
	var only, mostly []string
	for _, w := range inter {
		switch {
		case w.First < 0.1*w.Total || w.FirstCI[0] <= 0:
			only = append(only, w.Parameter)
		case w.First < 0.5*w.Total:
			mostly = append(mostly, w.Parameter)
		}
	}
	if len(inter) == 2 {
		for _, group := range []struct {
			how   string
			names []string
		}{{"only", only}, {"mostly", mostly}} {
			for _, name := range group.names {
				other := inter[0].Parameter
				if other == name {
					other = inter[1].Parameter
				}
				out = append(out, fmt.Sprintf("%s matters %s through its interaction with %s.", name, group.how, other))
			}
		}
	} else {
		for _, group := range []struct {
			how   string
			names []string
		}{{"only", only}, {"mostly", mostly}} {
			switch len(group.names) {
			case 0:
			case 1:
				out = append(out, fmt.Sprintf("%s matters %s through interactions with other inputs.", group.names[0], group.how))
			default:
				out = append(out, fmt.Sprintf("%s matter %s through interactions with other inputs.", list(group.names), group.how))
			}
		}
	}
	var sum float64
	for _, w := range rows {
		sum += w.First
	}
	if len(rows) > 1 && sum < 0.8 {
		out = append(out, fmt.Sprintf("The first-order indices sum to %.2f: interactions between inputs carry roughly %.0f%% of the variance.", sum, 100*math.Max(0, 1-sum)))
	}
	var none []string
	for _, w := range rows {
		hi := w.TotalCI[1]
		if math.IsNaN(hi) {
			hi = w.Total
		}
		if hi < mattersAt {
			none = append(none, w.Parameter)
		}
	}
	if len(none) > 0 {
		out = append(out, fmt.Sprintf("%s: no detectable effect (the 95%% interval of the total index stays below %.2f).", list(none), mattersAt))
	}
	return out
}

func readSplit(r *Result, subj string, rows []Row) []string {
	var sig []Row
	for _, w := range rows {
		if w.Split.P < 0.05 {
			sig = append(sig, w)
		}
	}
	verdict := subject(&Result{Output: r.SplitOn, Target: r.Target})
	if len(sig) == 0 {
		return []string{fmt.Sprintf("No input tells the draws apart by %s (no split test significant at 5%%).", verdict)}
	}
	first := sig[0]
	s := fmt.Sprintf("%s is told apart most clearly by %s (split distance %.2f, %s)", capital(verdict), first.Parameter, first.Split.D, pText(first.Split.P))
	if len(sig) > 1 {
		var parts []string
		for _, w := range sig[1:] {
			parts = append(parts, fmt.Sprintf("%s (%.2f)", w.Parameter, w.Split.D))
		}
		s += ", then by " + list(parts)
	}
	out := []string{s + "."}
	var none []string
	for _, w := range rows {
		if !(w.Split.P < 0.05) {
			none = append(none, w.Parameter)
		}
	}
	if len(none) > 0 {
		out = append(out, fmt.Sprintf("%s: no significant split at 5%%.", list(none)))
	}
	return out
}

func readCorr(subj string, rows []Row) []string {
	w := rows[0]
	dir := "rises"
	if w.RankCorr < 0 {
		dir = "falls"
	}
	out := []string{capital(fmt.Sprintf("%s follows %s most closely: it %s with %s (Spearman %.2f).", subj, w.Parameter, dir, w.Parameter, w.RankCorr))}
	var weak []string
	for _, w := range rows {
		if !(math.Abs(w.RankCorr) >= 0.1) {
			weak = append(weak, w.Parameter)
		}
	}
	if len(weak) > 0 {
		out = append(out, fmt.Sprintf("%s: rank correlation below 0.1 in size.", list(weak)))
	}
	return out
}
