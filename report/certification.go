package report

import (
	"fmt"
	"io"
	"strings"

	"holdfast/assess/certify"
)

// CertificationJSON is the interval certification of a Monte Carlo run
// (holdfast assess --certify): how many draws were proven to have exactly
// the equilibria the scan found, the regimes over all checked draws and
// over the certified ones alone, and the draws where scan and
// certification disagree, by index for replay.
type CertificationJSON struct {
	Method string `json:"method"`
	// Checked is the number of successful draws that were certified or
	// left unresolved; Certified the share of them that were certified.
	Checked   int64    `json:"checked_draws"`
	Certified ProbJSON `json:"certified"`
	// Unresolved draws kept an interval that may hold a multiple root or
	// a cluster; MaxWidth is the widest such interval.
	Unresolved int64   `json:"unresolved_draws"`
	MaxWidth   float64 `json:"max_unresolved_width"`
	// Regimes are over all checked draws (from the scan), Certified
	// regimes over the certified draws alone (every root proven).
	Regimes          []RegimeJSON `json:"regimes_all"`
	CertifiedRegimes []RegimeJSON `json:"regimes_certified"`
	// Disagreeing counts the draws where scan and certification differ,
	// by kind with the first draw indices, and lists the first ones.
	Disagreeing   int64             `json:"disagreeing_draws"`
	Disagreements []CountedJSON     `json:"disagreements"`
	Listed        []DisagreeingJSON `json:"listed"`
	EvalsPerDraw  float64           `json:"interval_evaluations_per_draw"`
}

// DisagreeingJSON is one draw whose scan and certification disagree.
type DisagreeingJSON struct {
	Draw  int      `json:"draw"`
	Kinds []string `json:"kinds"`
}

// CertificationMethod describes the certification for a report.
const CertificationMethod = "interval branch and prune over the domain with outward-rounded interval arithmetic: boxes whose enclosure of f excludes 0 hold no equilibrium; a box where f is monotone and changes sign, confirmed by an interval Newton step, holds exactly one; the rest is bisected to a width limit and reported unresolved"

// NewCertificationJSON converts a certification summary (nil gives nil).
func NewCertificationJSON(r *certify.Result) *CertificationJSON {
	if r == nil {
		return nil
	}
	c := &CertificationJSON{
		Method:           CertificationMethod,
		Checked:          r.Checked,
		Certified:        probJSON(r.Certified),
		Unresolved:       r.Unresolved,
		MaxWidth:         r.MaxWidth,
		Regimes:          regimesJSON(r.Regimes),
		CertifiedRegimes: regimesJSON(r.CertifiedRegimes),
		Disagreeing:      r.Disagreeing,
		Disagreements:    countedJSON(r.ByKind),
		Listed:           []DisagreeingJSON{},
		EvalsPerDraw:     r.EvalsPerDraw,
	}
	for _, d := range r.Listed {
		c.Listed = append(c.Listed, DisagreeingJSON{Draw: d.Draw, Kinds: kindNames(d.Flags)})
	}
	return c
}

func kindNames(flags certify.Kind) []string {
	out := []string{}
	for k := certify.MissedByScan; k <= certify.SidesDiffer; k <<= 1 {
		if flags&k != 0 {
			out = append(out, k.String())
		}
	}
	return out
}

// CertificationWarnings returns one warning per listed disagreeing draw,
// with the command that replays it (replay: the command's words up to the
// draw index, e.g. "holdfast equilibria lake.yaml --seed 7 --plan lhs
// --draws 10000 --draw").
func CertificationWarnings(c *CertificationJSON, replay string) []string {
	if c == nil {
		return nil
	}
	var w []string
	for _, d := range c.Listed {
		w = append(w, fmt.Sprintf("draw %d: scan and certification disagree (%s); replay it with: %s %d",
			d.Draw, strings.Join(d.Kinds, "; "), replay, d.Draw))
	}
	if n := c.Disagreeing - int64(len(c.Listed)); n > 0 {
		w = append(w, fmt.Sprintf("%d more draws where scan and certification disagree (the first %d are listed)", n, len(c.Listed)))
	}
	return w
}

// certificationLines writes the terminal summary of a certification.
func certificationLines(w io.Writer, c *CertificationJSON) error {
	if c == nil {
		return nil
	}
	fmt.Fprintf(w, "\nCertification (interval arithmetic, every draw):\n")
	fmt.Fprintf(w, "Certified draws: %s of %d checked: every equilibrium in the domain proven, and no other.\n",
		pctProb(c.Certified), c.Checked)
	if c.Unresolved > 0 {
		fmt.Fprintf(w, "Unresolved: %d draws, each with an interval (widest %s) that may hold a multiple root or a cluster; their verdicts there are not certified.\n",
			c.Unresolved, g(c.MaxWidth))
	}
	if len(c.CertifiedRegimes) > 0 {
		var rows [][]string
		for _, r := range c.CertifiedRegimes {
			rows = append(rows, []string{regimeName(r.Pattern), pctProb(ProbJSON{P: r.P, CI: r.CI, Count: r.Count})})
		}
		if err := writeTable(w, []string{"regime over certified draws", "share of certified draws"}, rows); err != nil {
			return err
		}
	}
	if c.Disagreeing == 0 {
		fmt.Fprintf(w, "Scan and certification agree in every checked draw.\n")
	}
	return nil
}

// pctProb formats a stored probability as a percentage with its interval.
func pctProb(p ProbJSON) string {
	return fmt.Sprintf("%s%% (%s–%s)", pc(p.P), pc(p.CI[0]), pc(p.CI[1]))
}

func (c *CertificationJSON) check() error {
	if c == nil {
		return nil
	}
	if c.Checked < 0 || c.Unresolved < 0 || c.Unresolved > c.Checked || c.Disagreeing < 0 ||
		c.Certified.Count < 0 || c.Certified.Count > c.Checked || !okProb(c.Certified.P) ||
		!okProb(c.Certified.CI[0]) || !okProb(c.Certified.CI[1]) || !okCoord(c.MaxWidth) || c.MaxWidth < 0 {
		return inconsistent("certification counts out of range")
	}
	for _, rs := range [][]RegimeJSON{c.Regimes, c.CertifiedRegimes} {
		for _, r := range rs {
			if !okProb(r.P) || r.Count < 0 || r.Count > c.Checked {
				return inconsistent("certification regime out of range")
			}
		}
	}
	return nil
}
