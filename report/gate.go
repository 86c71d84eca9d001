package report

import (
	"fmt"
	"io"
	"strings"

	"holdfast/assess/gate"
)

// RequirementJSON is a --require gate judged on a result: the requirement
// in canonical form, the interval end judged ("lower" or "upper"), its
// value, whether it is met and by what margin (negative: the shortfall),
// with the estimate and counts behind it and the one-line verdict.
type RequirementJSON struct {
	Requirement string   `json:"requirement"`
	Side        string   `json:"side"`
	Bound       *float64 `json:"bound"`
	Met         bool     `json:"met"`
	Margin      *float64 `json:"margin"`
	Estimate    float64  `json:"estimate"`
	Count       int64    `json:"count"`
	N           int64    `json:"n"`
	Line        string   `json:"line"`
}

// GateError reports a requirement that cannot be judged on a result: an
// equilibrium label the result does not track, or the verdict "current"
// without a current state.
type GateError struct{ Msg string }

func (e *GateError) Error() string { return e.Msg }

// CheckRequirements reports the first requirement that cannot be judged
// on an assess result with the given tracked labels (and a current state
// or not), as a *GateError.
func CheckRequirements(reqs []gate.Requirement, labels []string, hasCurrent bool) error {
	for _, r := range reqs {
		if !contains(labels, r.Label) {
			known := "none: no equilibrium at nominal values"
			if len(labels) > 0 {
				known = strings.Join(labels, ", ")
			}
			return &GateError{Msg: fmt.Sprintf("--require %q: unknown equilibrium %s (the tracked equilibria are %s)", r.Text, r.Label, known)}
		}
		if r.Verdict == gate.Current && !hasCurrent {
			return &GateError{Msg: fmt.Sprintf("--require %q: the verdict current needs a current state in the scenario", r.Text)}
		}
	}
	return nil
}

func contains(list []string, s string) bool {
	for _, v := range list {
		if v == s {
			return true
		}
	}
	return false
}

// Judge judges the requirements on an assess result, in the order given.
// A requirement that cannot be judged is a *GateError.
func (d *AssessJSON) Judge(reqs []gate.Requirement) ([]gate.Outcome, error) {
	var labels []string
	for _, e := range d.Equilibria {
		labels = append(labels, e.Label)
	}
	if err := CheckRequirements(reqs, labels, d.Current != nil); err != nil {
		return nil, err
	}
	var out []gate.Outcome
	for _, r := range reqs {
		out = append(out, r.Judge(d.estimate(r)))
	}
	return out, nil
}

func (d *AssessJSON) estimate(r gate.Requirement) gate.Estimate {
	e := gate.Estimate{N: d.Assessed}
	if r.Verdict == gate.Current {
		if d.Current != nil {
			for _, o := range d.Current.Outcomes {
				if o.Label == r.Label {
					e.Count, e.P, e.CI = o.Count, o.P, o.CI
				}
			}
		}
		return e
	}
	for _, t := range d.Equilibria {
		if t.Label != r.Label {
			continue
		}
		switch r.Verdict {
		case gate.Exists:
			e.Count, e.P, e.CI = t.ExistsCount, t.PExists, t.PExistsCI
		case gate.Attracting:
			e.Count, e.P, e.CI = t.AttractingCount, t.PAttracting, t.PAttractingCI
		case gate.Semistable:
			e.Count, e.P, e.CI = t.SemistableCount, t.PSemistable, t.PSemistableCI
		}
	}
	return e
}

// NewRequirementsJSON converts judged requirements for a result file.
func NewRequirementsJSON(outs []gate.Outcome) []RequirementJSON {
	var rs []RequirementJSON
	for _, o := range outs {
		side := "lower"
		if o.Op == gate.AtMost || o.Op == gate.Below {
			side = "upper"
		}
		rs = append(rs, RequirementJSON{
			Requirement: o.Requirement.String(), Side: side, Bound: num(o.Bound), Met: o.Met, Margin: num(o.Margin),
			Estimate: o.P, Count: o.Count, N: o.N, Line: o.String(),
		})
	}
	return rs
}

// Painter colours a few words of terminal output (the verdicts of
// requirements); with On false it leaves text as it is. Commands turn it
// on only when standard output is a terminal and NO_COLOR is not set.
type Painter struct{ On bool }

// Good paints s green.
func (p Painter) Good(s string) string { return p.paint("32", s) }

// Bad paints s bold red.
func (p Painter) Bad(s string) string { return p.paint("1;31", s) }

func (p Painter) paint(code, s string) string {
	if !p.On {
		return s
	}
	return "\x1b[" + code + "m" + s + "\x1b[0m"
}

// RequirementLines writes one line per judged requirement, its verdict
// painted.
func RequirementLines(w io.Writer, outs []gate.Outcome, p Painter) {
	if len(outs) == 0 {
		return
	}
	fmt.Fprintf(w, "\nRequirements (judged on the end of the 95%% interval):\n")
	for _, o := range outs {
		line := o.String()
		head := o.Requirement.String() + ": "
		rest := strings.TrimPrefix(line, head)
		switch {
		case strings.HasPrefix(rest, "met:"):
			rest = p.Good("met") + strings.TrimPrefix(rest, "met")
		case strings.HasPrefix(rest, "not met"):
			rest = p.Bad("NOT MET") + strings.TrimPrefix(rest, "not met")
		}
		fmt.Fprintf(w, "  %s%s\n", head, rest)
	}
}

// GateFailure returns the error for requirements not met: one line per
// failed requirement saying which and by how much, or nil when all are
// met.
func GateFailure(outs []gate.Outcome) error {
	var lines []string
	for _, o := range outs {
		if !o.Met {
			lines = append(lines, "requirement not met: "+strings.Replace(o.String(), ": not met: ", ": ", 1))
		}
	}
	if len(lines) == 0 {
		return nil
	}
	return &gateFailure{lines: lines}
}

type gateFailure struct{ lines []string }

// Error joins the lines; each after the first repeats the program prefix
// so that every line reads on its own in a log.
func (g *gateFailure) Error() string { return strings.Join(g.lines, "\nholdfast: ") }
