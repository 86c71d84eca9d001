package report

import (
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"holdfast/assess"
	"holdfast/assess/certify"
	"holdfast/assess/gate"
	"holdfast/assess/sensitivity"
)

// AssessJSON is the JSON form of a Monte Carlo result. With the envelope,
// the settings, the scenario's description and text (SetRun) and the plot
// summaries (Figures) it is a result file that holdfast report renders.
type AssessJSON struct {
	Envelope
	Draws       int   `json:"draws"`
	Assessed    int64 `json:"assessed_draws"`
	FailedDraws int64 `json:"failed_draws"`
	// FaultedDraws counts the assessed draws that met numeric trouble
	// (listed in Faults by reason).
	FaultedDraws int64  `json:"faulted_draws"`
	Seed         uint64 `json:"seed"`
	Plan         string `json:"plan"`
	// Settings, Model and Nominal describe the run for a report's inputs,
	// method and nominal sections.
	Settings    *SettingsJSON   `json:"settings"`
	Model       *ModelJSON      `json:"model"`
	Nominal     *NominalJSON    `json:"nominal"`
	Equilibria  []TrackedJSON   `json:"equilibria"`
	Regimes     []RegimeJSON    `json:"regimes"`
	Untracked   ProbJSON        `json:"new_equilibria"`
	Current     *OutcomesJSON   `json:"current,omitempty"`
	Failures    []CountedJSON   `json:"failures"`
	Faults      []CountedJSON   `json:"faults"`
	Convergence ConvergenceJSON `json:"convergence"`
	Warnings    []string        `json:"warnings"`
	// Sensitivity holds the screening measures (see NewScreeningJSON).
	Sensitivity *ScreeningJSON `json:"sensitivity,omitempty"`
	// Certification holds the interval certification of every draw
	// (holdfast assess --certify; absent without it).
	Certification *CertificationJSON `json:"certification,omitempty"`
	// Figures holds the summaries the report's plots are drawn from.
	Figures *FiguresJSON `json:"figures"`
	// Requirements holds the --require gates judged on this result.
	Requirements []RequirementJSON `json:"requirements,omitempty"`
	// ScenarioText is the scenario file's full text (its SHA-256 is in
	// the envelope).
	ScenarioText string `json:"scenario_text"`
	Caution      string `json:"caution"`
}

// SetRun records the command line and the scenario (hash, description
// and full text).
func (d *AssessJSON) SetRun(run RunInfo) {
	d.Model, d.ScenarioText = d.Envelope.stamp(run)
}

// QuantilesJSON holds the 5, 25, 50, 75 and 95% quantiles of a figure over
// the draws where it is defined (n of them); null when n = 0.
type QuantilesJSON struct {
	N   int64    `json:"n"`
	Q5  *float64 `json:"5"`
	Q25 *float64 `json:"25"`
	Q50 *float64 `json:"50"`
	Q75 *float64 `json:"75"`
	Q95 *float64 `json:"95"`
}

func quantilesJSON(q assess.Quantiles) QuantilesJSON {
	return QuantilesJSON{N: q.N, Q5: num(q.Q[0]), Q25: num(q.Q[1]), Q50: num(q.Q[2]), Q75: num(q.Q[3]), Q95: num(q.Q[4])}
}

// TrackedJSON is one nominal equilibrium followed through the draws.
type TrackedJSON struct {
	Label           string        `json:"label"`
	NominalX        float64       `json:"nominal_x"`
	NominalClass    string        `json:"nominal_class"`
	PExists         float64       `json:"p_exists"`
	PExistsCI       [2]float64    `json:"p_exists_ci"`
	PAttracting     float64       `json:"p_attracting"`
	PAttractingCI   [2]float64    `json:"p_attracting_ci"`
	PSemistable     float64       `json:"p_semistable"`
	PSemistableCI   [2]float64    `json:"p_semistable_ci"`
	ExistsCount     int64         `json:"exists_count"`
	AttractingCount int64         `json:"attracting_count"`
	SemistableCount int64         `json:"semistable_count"`
	XQuantiles      QuantilesJSON `json:"x_quantiles"`
	SlopeQuantiles  QuantilesJSON `json:"slope_quantiles"`
	ReturnTimeQ     QuantilesJSON `json:"return_time_quantiles"`
	BasinWidthQ     QuantilesJSON `json:"basin_width_quantiles"`
	BarrierQuantile QuantilesJSON `json:"barrier_quantiles"`
}

// ProbJSON is a probability with its 95% interval and counts.
type ProbJSON struct {
	P     float64    `json:"p"`
	CI    [2]float64 `json:"ci"`
	Count int64      `json:"count"`
}

func probJSON(p assess.Probability) ProbJSON {
	return ProbJSON{P: zeroNaN(p.P), CI: [2]float64{zeroNaN(p.CI[0]), zeroNaN(p.CI[1])}, Count: p.Count}
}

// zeroNaN maps the NaN of an empty sample to 0 for JSON (counts say n = 0).
func zeroNaN(v float64) float64 {
	if math.IsNaN(v) {
		return 0
	}
	return v
}

// RegimeJSON is one ordered pattern of classes.
type RegimeJSON struct {
	Pattern []string   `json:"pattern"`
	P       float64    `json:"p"`
	CI      [2]float64 `json:"ci"`
	Count   int64      `json:"count"`
}

// OutcomesJSON lists where the state goes from the current state.
type OutcomesJSON struct {
	X        float64       `json:"x"`
	Outcomes []OutcomeJSON `json:"outcomes"`
}

// OutcomeJSON is one destination.
type OutcomeJSON struct {
	Label string     `json:"label"`
	P     float64    `json:"p"`
	CI    [2]float64 `json:"ci"`
	Count int64      `json:"count"`
}

// CountedJSON is a failure or fault reason with its draw count and the
// first draw indices, for replay.
type CountedJSON struct {
	Reason string `json:"reason"`
	Draws  int64  `json:"draws"`
	First  []int  `json:"first_draws"`
}

// ConvergenceJSON reports the batches and the widest 95% half-width.
type ConvergenceJSON struct {
	TargetHalfWidth *float64 `json:"target_halfwidth"`
	Reached         bool     `json:"reached"`
	Batches         int      `json:"batches"`
	MaxHalfWidth    float64  `json:"max_halfwidth"`
}

func countedJSON(cs []assess.Counted) []CountedJSON {
	out := []CountedJSON{}
	for _, c := range cs {
		out = append(out, CountedJSON{Reason: c.Reason, Draws: c.Draws, First: c.First})
	}
	return out
}

// NewAssessJSON converts a Monte Carlo result for JSON output.
func NewAssessJSON(version, scenario, title string, r *assess.Result) *AssessJSON {
	out := &AssessJSON{
		Envelope:     newEnvelope(KindAssess, version, scenario, title),
		Draws:        r.Draws,
		Assessed:     r.Succeeded,
		FailedDraws:  int64(r.Draws) - r.Succeeded,
		FaultedDraws: r.Faulted,
		Nominal:      newNominalJSON(r.Nominal),
		Seed:         r.Seed,
		Plan:         r.Plan.String(),
		Equilibria:   []TrackedJSON{},
		Regimes:      []RegimeJSON{},
		Untracked:    probJSON(r.Untracked),
		Failures:     countedJSON(r.Failed),
		Faults:       countedJSON(r.Faults),
		Convergence: ConvergenceJSON{
			TargetHalfWidth: num(r.Convergence.Target),
			Reached:         r.Convergence.Reached,
			Batches:         r.Convergence.Batches,
			MaxHalfWidth:    zeroNaN(r.Convergence.MaxHalfWidth),
		},
		Warnings: append([]string{}, r.Warnings...),
		Caution:  Caution,
	}
	if r.Convergence.Target == 0 {
		out.Convergence.TargetHalfWidth = nil
	}
	for _, t := range r.Tracked {
		e, a, s := probJSON(t.Exists), probJSON(t.Attracting), probJSON(t.Semistable)
		out.Equilibria = append(out.Equilibria, TrackedJSON{
			Label: t.Label, NominalX: t.NominalX, NominalClass: className(t.NominalClass.String(), t.NominalSide.String()),
			PExists: e.P, PExistsCI: e.CI,
			PAttracting: a.P, PAttractingCI: a.CI,
			PSemistable: s.P, PSemistableCI: s.CI,
			ExistsCount: e.Count, AttractingCount: a.Count, SemistableCount: s.Count,
			XQuantiles:      quantilesJSON(t.X),
			SlopeQuantiles:  quantilesJSON(t.Slope),
			ReturnTimeQ:     quantilesJSON(t.ReturnTime),
			BasinWidthQ:     quantilesJSON(t.BasinWidth),
			BarrierQuantile: quantilesJSON(t.Barrier),
		})
	}
	out.Regimes = regimesJSON(r.Regimes)
	if r.Outcomes != nil {
		c := &OutcomesJSON{X: r.Nominal.Current.From}
		for _, o := range r.Outcomes {
			p := probJSON(o.P)
			c.Outcomes = append(c.Outcomes, OutcomeJSON{Label: o.Label, P: p.P, CI: p.CI, Count: p.Count})
		}
		out.Current = c
	}
	return out
}

func regimesJSON(rs []assess.Regime) []RegimeJSON {
	out := []RegimeJSON{}
	for _, g := range rs {
		p := probJSON(g.P)
		out = append(out, RegimeJSON{Pattern: g.Pattern, P: p.P, CI: p.CI, Count: p.Count})
	}
	return out
}

// pct formats a probability as a percentage with its interval.
func pct(p assess.Probability) string {
	if p.N == 0 {
		return "–"
	}
	return fmt.Sprintf("%s%% (%s–%s)", pc(p.P), pc(p.CI[0]), pc(p.CI[1]))
}

// pc formats a share in percent with one decimal, keeping shares that
// round to 0 or 100 distinguishable from exact ones.
func pc(v float64) string {
	switch {
	case v == 0:
		return "0"
	case v == 1:
		return "100"
	case v < 0.0005:
		return "<0.1"
	case v > 0.9995:
		return ">99.9"
	}
	return fmt.Sprintf("%.1f", 100*v)
}

// AssessTable writes the compact terminal summary of a Monte Carlo result.
func AssessTable(w io.Writer, title, unit string, r *assess.Result) error {
	return AssessTableScreened(w, title, unit, r, nil)
}

// AssessTableScreened is AssessTable with a section on which inputs drive
// each verdict, from the screening measures s (none when s is nil).
func AssessTableScreened(w io.Writer, title, unit string, r *assess.Result, s *sensitivity.Screening) error {
	return AssessTableGated(w, title, unit, r, s, nil, Painter{})
}

// AssessTableGated is AssessTableScreened with the verdicts of judged
// requirements (painted by p) before the caution.
func AssessTableGated(w io.Writer, title, unit string, r *assess.Result, s *sensitivity.Screening, outs []gate.Outcome, p Painter) error {
	return AssessTableCertified(w, title, unit, r, s, nil, outs, p)
}

// AssessTableCertified is AssessTableGated with the summary of the
// interval certification c (none when c is nil).
func AssessTableCertified(w io.Writer, title, unit string, r *assess.Result, s *sensitivity.Screening, c *CertificationJSON, outs []gate.Outcome, p Painter) error {
	if title != "" {
		fmt.Fprintf(w, "%s\n", title)
	}
	fmt.Fprintf(w, "%d draws (plan %s, seed %d); %d assessed, %d failed. Intervals are 95%%.\n\n",
		r.Draws, r.Plan, r.Seed, r.Succeeded, int64(r.Draws)-r.Succeeded)
	if len(r.Tracked) == 0 {
		fmt.Fprintf(w, "No equilibrium in the domain at nominal values.\n")
	} else {
		var rows [][]string
		for _, e := range r.Tracked {
			rng := "–"
			if e.X.N > 0 {
				rng = fmt.Sprintf("%s … %s", g(e.X.Q[0]), g(e.X.Q[4]))
			}
			rows = append(rows, []string{e.Label, g(e.NominalX), classFrom(e.NominalClass.String(), e.NominalSide.String()),
				pct(e.Exists), pct(e.Attracting), rng, g(e.Slope.Q[2])})
		}
		head := []string{"", "nominal x*", "nominal class", "exists", "attracting", "x* 5%…95%" + unitSuffix(unit), "median slope"}
		if err := writeTable(w, head, rows); err != nil {
			return err
		}
	}
	fmt.Fprintf(w, "\nRegimes (classes of all equilibria, low to high):\n")
	var rows [][]string
	for _, g := range r.Regimes {
		rows = append(rows, []string{regimeName(g.Pattern), pct(g.P)})
	}
	if err := writeTable(w, []string{"pattern", "share of draws"}, rows); err != nil {
		return err
	}
	if r.Untracked.Count > 0 {
		fmt.Fprintf(w, "Draws with an equilibrium absent at nominal values: %s\n", pct(r.Untracked))
	}
	if r.Outcomes != nil {
		fmt.Fprintf(w, "\nFrom the current state %s%s the state ends at:\n", g(r.Nominal.Current.From), unitSuffix(unit))
		var rows [][]string
		for _, o := range r.Outcomes {
			rows = append(rows, []string{o.Label, pct(o.P)})
		}
		if err := writeTable(w, []string{"destination", "share of draws"}, rows); err != nil {
			return err
		}
	}
	if err := certificationLines(w, c); err != nil {
		return err
	}
	if s != nil {
		if err := screeningSection(w, s); err != nil {
			return err
		}
	}
	printLines(w, "", countedLines(r.Failed, r.Faults, "draw", "draws", "first"))
	if c := r.Convergence; c.Target > 0 {
		state := "reached"
		if !c.Reached {
			state = "NOT reached (draw limit hit)"
		}
		fmt.Fprintf(w, "Convergence: target half-width %g %s after %d batches; widest half-width %.4g\n", c.Target, state, c.Batches, c.MaxHalfWidth)
	}
	printLines(w, "Warning: ", r.Warnings)
	RequirementLines(w, outs, p)
	fmt.Fprintf(w, "\n%s\n", Caution)
	return nil
}

// DrawsCSV streams per-draw records as CSV: the draw index, every
// parameter, then each tracked equilibrium's existence, position and class,
// the regime pattern, the destination from the current state and a failure
// reason; with Certified set, also the draw's certification (certified,
// unresolved, or empty for a failed draw) and the widest unresolved
// interval.
type DrawsCSV struct {
	// Certified adds the certification columns (set before the first
	// Write; the records must carry the certification hook's fields).
	Certified bool
	w         *csv.Writer
	row       []string
	header    bool
	names     []string
	labels    []string
}

// NewDrawsCSV returns a writer for the given parameter names and tracked
// labels.
func NewDrawsCSV(w io.Writer, names, labels []string) *DrawsCSV {
	return &DrawsCSV{w: csv.NewWriter(w), names: names, labels: labels}
}

// Write writes one block of records (the engine's Sink).
func (d *DrawsCSV) Write(block []assess.Draw) error {
	if !d.header {
		h := []string{"draw"}
		h = append(h, d.names...)
		for _, l := range d.labels {
			h = append(h, l+"_exists", l+"_x", l+"_class")
		}
		h = append(h, "regime", "destination", "failed")
		if d.Certified {
			h = append(h, "certification", "unresolved_width")
		}
		if err := d.w.Write(h); err != nil {
			return err
		}
		d.header = true
	}
	for i := range block {
		r := &block[i]
		d.row = append(d.row[:0], strconv.Itoa(r.Index))
		for _, v := range r.Theta {
			d.row = append(d.row, strconv.FormatFloat(v, 'g', -1, 64))
		}
		for k := range d.labels {
			if k >= len(r.Tracked) || !r.Tracked[k].Exists {
				d.row = append(d.row, "0", "", "")
				continue
			}
			t := r.Tracked[k]
			d.row = append(d.row, "1", strconv.FormatFloat(t.X, 'g', -1, 64), className(t.Class.String(), t.Side.String()))
		}
		classes := make([]string, len(r.Pattern))
		for j, c := range r.Pattern {
			classes[j] = c.String()
		}
		d.row = append(d.row, strings.Join(classes, "/"), r.Outcome, r.Failed)
		if d.Certified {
			status, width := "", ""
			if st, ok := certify.Fields(r); ok {
				switch st.Status {
				case certify.Certified:
					status = "certified"
				case certify.Unresolved:
					status, width = "unresolved", strconv.FormatFloat(st.MaxWidth, 'g', -1, 64)
				}
			}
			d.row = append(d.row, status, width)
		}
		if err := d.w.Write(d.row); err != nil {
			return err
		}
	}
	d.w.Flush()
	return d.w.Error()
}
