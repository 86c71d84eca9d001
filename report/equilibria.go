package report

import (
	"fmt"
	"io"
	"math"
	"strings"

	"holdfast/assess"
	"holdfast/assess/steady"
)

// EquilibriaJSON is the JSON form of a single-parameter-set analysis. It
// carries the envelope of every result (kind "equilibria"); SetRun records
// the version, the command line and the scenario. holdfast report does not
// render it.
type EquilibriaJSON struct {
	Envelope
	Model      *ModelJSON        `json:"model"`
	Parameters []ParamValueJSON  `json:"parameters"`
	Domain     [2]float64        `json:"domain"`
	Equilibria []EquilibriumJSON `json:"equilibria"`
	Current    *CurrentJSON      `json:"current,omitempty"`
	Undefined  []steady.Interval `json:"undefined,omitempty"`
	Poles      []float64         `json:"poles,omitempty"`
	Faults     []string          `json:"faults,omitempty"`
	Warnings   []string          `json:"warnings"`
	// ScenarioText is the scenario file's full text (its SHA-256 is in
	// the envelope).
	ScenarioText string `json:"scenario_text"`
	Caution      string `json:"caution"`
}

// SetRun records the holdfast version (run.Version), the command line and
// the scenario (hash, description and full text).
func (d *EquilibriaJSON) SetRun(run RunInfo) {
	d.Model, d.ScenarioText = d.Envelope.stamp(run)
}

// ParamValueJSON is one parameter value used.
type ParamValueJSON struct {
	Name  string  `json:"name"`
	Value float64 `json:"value"`
}

// EquilibriumJSON is one classified equilibrium. Numbers that do not apply
// (a return time of a non-attracting equilibrium) are null.
type EquilibriumJSON struct {
	Label        string      `json:"label"`
	X            float64     `json:"x"`
	Slope        float64     `json:"slope"`
	Class        string      `json:"class"`
	Order        int         `json:"order"`
	AttractsFrom string      `json:"attracts_from"`
	ReturnTime   *float64    `json:"return_time"`
	Basin        [2]float64  `json:"basin"`
	Barrier      [2]*float64 `json:"barrier"`
	Span         *[2]float64 `json:"span,omitempty"`
	Note         string      `json:"note,omitempty"`
}

// CurrentJSON is the motion from the current state.
type CurrentJSON struct {
	X          float64  `json:"x"`
	Fate       string   `json:"fate"`
	MovesTo    string   `json:"moves_to"`
	Target     *float64 `json:"target"`
	TimeTo1Pct *float64 `json:"time_to_1pct"`
}

// num maps NaN and ±Inf to null.
func num(v float64) *float64 {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return nil
	}
	return &v
}

// NewEquilibriaJSON converts a snapshot for JSON output. Its envelope
// names the scenario and title; SetRun adds the version, the command line
// and the scenario's hash and text.
func NewEquilibriaJSON(scenario, title string, s *assess.Snapshot) *EquilibriaJSON {
	out := &EquilibriaJSON{
		Envelope:  newEnvelope(KindEquilibria, "", scenario, title),
		Domain:    s.Domain,
		Undefined: s.Undefined,
		Poles:     s.Poles,
		Faults:    s.Faults,
		Warnings:  append([]string{}, s.Warnings...),
		Caution:   Caution,
	}
	for i, n := range s.Names {
		out.Parameters = append(out.Parameters, ParamValueJSON{Name: n, Value: s.Theta[i]})
	}
	out.Equilibria = []EquilibriumJSON{}
	for _, e := range s.Equilibria {
		ej := EquilibriumJSON{
			Label:        e.Label,
			X:            e.X,
			Slope:        e.Slope,
			Class:        e.Class.String(),
			Order:        e.Order,
			AttractsFrom: e.AttractsFrom.String(),
			ReturnTime:   num(e.ReturnTime),
			Basin:        e.Basin,
			Barrier:      [2]*float64{num(e.Barrier[0]), num(e.Barrier[1])},
			Note:         e.Note,
		}
		if e.Span[0] != e.Span[1] {
			sp := e.Span
			ej.Span = &sp
		}
		out.Equilibria = append(out.Equilibria, ej)
	}
	if c := s.Current; c != nil {
		out.Current = &CurrentJSON{
			X:          c.From,
			Fate:       c.Fate.String(),
			MovesTo:    c.MovesTo,
			Target:     num(c.Target),
			TimeTo1Pct: num(c.TimeTo1Pct),
		}
	}
	return out
}

// g formats a number compactly for tables; NaN prints as "–".
func g(v float64) string {
	if math.IsNaN(v) {
		return "–"
	}
	return fmt.Sprintf("%.6g", v)
}

// EquilibriaTable writes the snapshot as a terminal table followed by the
// current-state line, faults, warnings and the caution notice.
func EquilibriaTable(w io.Writer, title, unit string, s *assess.Snapshot) error {
	if title != "" {
		fmt.Fprintf(w, "%s\n", title)
	}
	var params []string
	for i, n := range s.Names {
		params = append(params, fmt.Sprintf("%s=%s", n, g(s.Theta[i])))
	}
	fmt.Fprintf(w, "Parameters: %s\n", strings.Join(params, ", "))
	fmt.Fprintf(w, "Domain: [%s, %s]%s\n\n", g(s.Domain[0]), g(s.Domain[1]), unitSuffix(unit))
	if len(s.Equilibria) == 0 {
		fmt.Fprintf(w, "No equilibrium in the domain.\n")
	} else {
		var rows [][]string
		for _, e := range s.Equilibria {
			rows = append(rows, []string{
				e.Label, g(e.X), attractsClass(e.Class.String(), e.AttractsFrom.String()), fmt.Sprint(e.Order), g(e.Slope), g(e.ReturnTime),
				fmt.Sprintf("[%s, %s]", g(e.Basin[0]), g(e.Basin[1])), g(e.Barrier[0]), g(e.Barrier[1]),
			})
		}
		head := []string{"", "x*", "class", "order", "slope f'(x*)", "return time", "basin", "barrier below", "barrier above"}
		if err := writeTable(w, head, rows); err != nil {
			return err
		}
	}
	if c := s.Current; c != nil {
		fmt.Fprintf(w, "\nFrom the current state %s: %s\n", g(c.From), describeTransit(c))
	}
	printLines(w, "Undefined: ", s.Faults)
	printLines(w, "Warning: ", s.Warnings)
	fmt.Fprintf(w, "\n%s\n", Caution)
	return nil
}

func unitSuffix(unit string) string {
	if unit == "" {
		return ""
	}
	return " " + unit
}

func describeTransit(c *assess.Transit) string {
	switch c.Fate {
	case steady.Stays:
		if c.MovesTo != "" {
			return "already at " + c.MovesTo
		}
		return "already at an equilibrium"
	case steady.Approaches:
		return fmt.Sprintf("moves to %s (x* = %s); 99%% of the way after time %s", c.MovesTo, g(c.Target), g(c.TimeTo1Pct))
	case steady.ExitsBelow:
		return fmt.Sprintf("leaves the domain through its lower end %s after time %s", g(c.Target), g(c.TimeTo1Pct))
	case steady.ExitsAbove:
		return fmt.Sprintf("leaves the domain through its upper end %s after time %s", g(c.Target), g(c.TimeTo1Pct))
	case steady.Singular:
		return fmt.Sprintf("runs into a point where the rate law is undefined (x = %s)", g(c.Target))
	}
	return "starts where the rate law is undefined"
}
