package report

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"strings"

	"holdfast/assess"
	"holdfast/assess/agg"
	"holdfast/assess/steady"
	"holdfast/scenarios"
)

// ResultFormat is the marker that every holdfast result file carries in
// its "format" field.
const ResultFormat = "holdfast-result"

// SchemaVersion is the version of the result schema this holdfast writes,
// and the newest one it reads. It changes when a field changes meaning or
// is removed; new fields alone keep it.
const SchemaVersion = 1

// Result kinds: the command that wrote the result.
const (
	KindAssess      = "assess"
	KindSensitivity = "sensitivity"
	KindSweep       = "sweep"
	// KindEquilibria is the JSON of `holdfast equilibria`, which carries
	// the envelope but is not rendered as a report.
	KindEquilibria = "equilibria"
)

// Envelope is the head of every result file: what it is and how it was
// made. Each result type embeds it first and carries the scenario's full
// text in its own "scenario_text" field, so that a result file alone is
// enough to reproduce the run and to render it again.
type Envelope struct {
	Format  string `json:"format"`
	Schema  int    `json:"schema"`
	Kind    string `json:"kind"`
	Tool    string `json:"tool"`
	Version string `json:"version"`
	// Command is the command line, program name first, with every flag
	// given except --workers (which never changes a result).
	Command []string `json:"command"`
	// Scenario is the scenario as named on the command line (a path, or
	// demo:NAME); ScenarioSHA256 is the hex SHA-256 of its exact bytes.
	Scenario       string `json:"scenario"`
	ScenarioSHA256 string `json:"scenario_sha256"`
	Title          string `json:"title"`
}

func newEnvelope(kind, version, scenario, title string) Envelope {
	return Envelope{Format: ResultFormat, Schema: SchemaVersion, Kind: kind, Tool: "holdfast", Version: version,
		Command: []string{}, Scenario: scenario, Title: title}
}

// RunInfo is what a command knows about its run beyond the result: its
// command line and the scenario it read, and the holdfast version for a
// result whose constructor takes none (NewEquilibriaJSON).
type RunInfo struct {
	Command  []string
	Scenario *scenarios.Scenario
	// Version, when not empty, replaces the envelope's version.
	Version string
}

// stamp records the command line, the version and the scenario's hash,
// and returns the scenario's description and text.
func (e *Envelope) stamp(run RunInfo) (*ModelJSON, string) {
	e.Command = append([]string{}, run.Command...)
	if run.Version != "" {
		e.Version = run.Version
	}
	s := run.Scenario
	if s == nil {
		return nil, ""
	}
	e.ScenarioSHA256 = SHA256(s.Source)
	return NewModelJSON(s), string(s.Source)
}

// SHA256 returns the hex SHA-256 digest of b.
func SHA256(b []byte) string {
	sum := sha256.Sum256(b)
	return hex.EncodeToString(sum[:])
}

// ModelJSON describes the scenario as it was run (after any --set
// override): the rate law, the state and every input.
type ModelJSON struct {
	Rate         string            `json:"rate"`
	Defines      []DefineJSON      `json:"defines"`
	State        StateJSON         `json:"state"`
	Summary      string            `json:"summary"`
	Parameters   []InputJSON       `json:"parameters"`
	Correlations []CorrelationJSON `json:"correlations"`
}

// DefineJSON is a named sub-expression.
type DefineJSON struct {
	Name string `json:"name"`
	Expr string `json:"expr"`
}

// StateJSON is the state variable.
type StateJSON struct {
	Symbol  string     `json:"symbol"`
	Unit    string     `json:"unit"`
	Domain  [2]float64 `json:"domain"`
	Current *float64   `json:"current"`
}

// InputJSON is one parameter: fixed, or uncertain with its distribution.
type InputJSON struct {
	Name string `json:"name"`
	// Kind is "fixed" or the distribution kind; Distribution describes
	// the distribution with its arguments and any truncation.
	Kind         string    `json:"kind"`
	Distribution string    `json:"distribution"`
	Args         []ArgJSON `json:"args"`
	Nominal      float64   `json:"nominal"`
	NominalGiven bool      `json:"nominal_given"`
	Unit         string    `json:"unit"`
	Note         string    `json:"note"`
	// SetOnCommandLine marks a parameter fixed by --set.
	SetOnCommandLine bool   `json:"set_on_command_line"`
	DataFile         string `json:"data_file,omitempty"`
	DataColumn       string `json:"data_column,omitempty"`
}

// ArgJSON is one numeric field of a parameter as the file gives it.
type ArgJSON struct {
	Name  string  `json:"name"`
	Value float64 `json:"value"`
}

// CorrelationJSON is a rank correlation between two inputs.
type CorrelationJSON struct {
	A   string  `json:"a"`
	B   string  `json:"b"`
	Rho float64 `json:"rho"`
}

// NewModelJSON describes a scenario for a result file.
func NewModelJSON(s *scenarios.Scenario) *ModelJSON {
	m := &ModelJSON{
		Rate: s.Rate, Summary: strings.TrimSpace(s.Summary),
		Defines: []DefineJSON{}, Parameters: []InputJSON{}, Correlations: []CorrelationJSON{},
		State: StateJSON{Symbol: s.State.Symbol, Unit: s.State.Unit, Domain: s.State.Domain},
	}
	if s.State.HasCurrent {
		c := s.State.Current
		m.State.Current = &c
	}
	for _, d := range s.Defines {
		m.Defines = append(m.Defines, DefineJSON{Name: d.Name, Expr: d.Expr})
	}
	for _, p := range s.Params {
		in := InputJSON{
			Name: p.Name, Kind: p.Kind, Args: []ArgJSON{}, Nominal: p.Nominal, NominalGiven: p.NominalGiven,
			Unit: p.Unit, Note: p.Note, SetOnCommandLine: p.Overridden, DataFile: p.DataFile, DataColumn: p.DataColumn,
		}
		if p.Dist != nil {
			in.Distribution = p.Dist.String()
		}
		for _, a := range p.Args {
			in.Args = append(in.Args, ArgJSON{Name: a.Name, Value: a.Value})
		}
		m.Parameters = append(m.Parameters, in)
	}
	for _, c := range s.Correlations {
		m.Correlations = append(m.Correlations, CorrelationJSON{A: c.A, B: c.B, Rho: c.Rho})
	}
	return m
}

// SettingsJSON records the settings of a Monte Carlo run that its method
// section describes.
type SettingsJSON struct {
	DrawsRequested int      `json:"draws_requested"`
	Plan           string   `json:"plan"`
	Seed           uint64   `json:"seed"`
	UntilHalfWidth *float64 `json:"until_halfwidth"`
	MaxDraws       int      `json:"max_draws"`
	Confidence     float64  `json:"confidence"`
	Interval       string   `json:"interval"`
	// QuantileAccuracy is the relative accuracy of every reported quantile.
	QuantileAccuracy float64 `json:"quantile_relative_accuracy"`
	// ScanCells, ScanMaxDepth and RootRelTol are the equilibrium search's
	// initial grid, bisection depth limit and root tolerance.
	ScanCells    int     `json:"scan_cells"`
	ScanMaxDepth int     `json:"scan_max_depth"`
	RootRelTol   float64 `json:"root_rel_tol"`
	// MaxOrder is the highest derivative order the classification looks at.
	MaxOrder int `json:"max_order"`
}

// NewSettingsJSON records the settings of a run made with opt.
func NewSettingsJSON(opt assess.Options) *SettingsJSON {
	d := steady.DefaultOptions()
	s := &SettingsJSON{
		DrawsRequested: opt.Draws, Plan: opt.Plan.String(), Seed: opt.Seed,
		MaxDraws: opt.MaxDraws, Confidence: 0.95,
		Interval:         "Wilson score; Clopper–Pearson when the count is 0 or N",
		QuantileAccuracy: agg.Alpha,
		ScanCells:        d.Grid, ScanMaxDepth: d.MaxDepth, RootRelTol: d.RelTol, MaxOrder: 7,
	}
	if opt.UntilHalfWidth > 0 {
		s.UntilHalfWidth = num(opt.UntilHalfWidth)
		if s.MaxDraws == 0 {
			s.MaxDraws = min(100*opt.Draws, assess.MaxDraws)
		}
	}
	return s
}

// Saved is a result file read back: its kind and the decoded result.
type Saved struct {
	Kind        string
	Assess      *AssessJSON
	Sensitivity *SensitivityJSON
	Sweep       *SweepJSON
}

// Envelope returns the result's envelope.
func (s *Saved) Envelope() *Envelope {
	switch {
	case s.Assess != nil:
		return &s.Assess.Envelope
	case s.Sensitivity != nil:
		return &s.Sensitivity.Envelope
	case s.Sweep != nil:
		return &s.Sweep.Envelope
	}
	return &Envelope{}
}

// ScenarioText returns the scenario's full text.
func (s *Saved) ScenarioText() string {
	switch {
	case s.Assess != nil:
		return s.Assess.ScenarioText
	case s.Sensitivity != nil:
		return s.Sensitivity.ScenarioText
	case s.Sweep != nil:
		return s.Sweep.ScenarioText
	}
	return ""
}

// ResultError reports a result file that cannot be read back.
type ResultError struct {
	File string
	Msg  string
}

func (e *ResultError) Error() string {
	if e.File == "" {
		return e.Msg
	}
	return e.File + ": " + e.Msg
}

// MaxResultBytes bounds the size of a result file read back.
const MaxResultBytes = 256 << 20

// ReadResult reads and checks a result file (see LoadResult).
func ReadResult(path string) (*Saved, error) {
	return readAndLoad(path, "result", LoadResult)
}

// readAndLoad reads the file (what names its kind in errors, see
// readFile) and decodes it with load; a *ResultError from load is given
// the file's name.
func readAndLoad[T any](path, what string, load func([]byte) (*T, error)) (*T, error) {
	data, err := readFile(path, what)
	if err != nil {
		return nil, err
	}
	v, err := load(data)
	if err != nil {
		var re *ResultError
		if errors.As(err, &re) {
			re.File = path
		}
		return nil, err
	}
	return v, nil
}

// readFile reads a file of at most MaxResultBytes; errors are
// *ResultError naming the file.
func readFile(path, what string) ([]byte, error) {
	if fi, err := os.Stat(path); err == nil && !fi.Mode().IsRegular() && !fi.IsDir() {
		return nil, &ResultError{File: path, Msg: "is not a regular file (a pipe or device would block): not a " + what + " file"}
	}
	f, err := os.Open(path)
	if err != nil {
		return nil, &ResultError{File: path, Msg: strings.TrimPrefix(err.Error(), "open "+path+": ")}
	}
	defer f.Close()
	if fi, err := f.Stat(); err == nil && fi.IsDir() {
		return nil, &ResultError{File: path, Msg: "is a directory, not a " + what + " file"}
	}
	data, err := io.ReadAll(io.LimitReader(f, MaxResultBytes+1))
	if err != nil {
		return nil, &ResultError{File: path, Msg: err.Error()}
	}
	return data, nil
}

// LoadResult decodes and checks a result file: it must be a holdfast
// result ("format": "holdfast-result") of a schema this holdfast reads,
// complete, of a kind it renders, with an embedded scenario text that
// still matches its recorded SHA-256, and internally consistent. Every
// error is a *ResultError.
func LoadResult(data []byte) (*Saved, error) {
	bad := func(format string, a ...any) error { return &ResultError{Msg: fmt.Sprintf(format, a...)} }
	trimmed, probe, err := probeResult(data)
	if err != nil {
		return nil, err
	}
	switch probe.Kind {
	case KindAssess, KindSensitivity, KindSweep:
	case KindPart:
		return nil, bad("is one part of a sharded run, not a result: merge all the parts with holdfast merge, then render the merged result")
	case KindCheckpoint:
		return nil, bad("is the checkpoint of an unfinished run, not a result: finish the run with its command and --resume")
	case KindEquilibria:
		return nil, bad("holdfast report does not render equilibria results (the JSON of holdfast equilibria): it renders the results of assess, sensitivity and sweep saved with --out; for a report that includes the equilibria at nominal values, run holdfast assess with --report")
	default:
		return nil, bad("unknown result kind %q (want %s, %s or %s)", probe.Kind, KindAssess, KindSensitivity, KindSweep)
	}
	if probe.ScenarioText == nil {
		return nil, bad("no embedded scenario text: the result cannot be reproduced from this file")
	}
	if got := SHA256([]byte(*probe.ScenarioText)); !strings.EqualFold(got, probe.ScenarioSHA256) {
		return nil, bad("the embedded scenario text does not match its recorded SHA-256 (%s…, text hashes to %s…): the file was changed after holdfast wrote it",
			short(probe.ScenarioSHA256), short(got))
	}
	s := &Saved{Kind: probe.Kind}
	switch probe.Kind {
	case KindAssess:
		s.Assess = &AssessJSON{}
		err = decodeChecked(trimmed, s.Assess)
	case KindSensitivity:
		s.Sensitivity = &SensitivityJSON{}
		err = decodeChecked(trimmed, s.Sensitivity)
	case KindSweep:
		s.Sweep = &SweepJSON{}
		err = decodeChecked(trimmed, s.Sweep)
	}
	if err != nil {
		var re *ResultError
		if errors.As(err, &re) {
			return nil, err
		}
		return nil, bad("malformed %s result: %v", probe.Kind, err)
	}
	return s, nil
}

// decodeChecked decodes a result's JSON into v and checks what it holds.
func decodeChecked(data []byte, v interface{ check() error }) error {
	if err := json.Unmarshal(data, v); err != nil {
		return err
	}
	return v.check()
}

// resultProbe is the head of a result file.
type resultProbe struct {
	Format         *string `json:"format"`
	Schema         any     `json:"schema"`
	Kind           string  `json:"kind"`
	Tool           string  `json:"tool"`
	ScenarioSHA256 string  `json:"scenario_sha256"`
	ScenarioText   *string `json:"scenario_text"`
}

// probeResult checks what every holdfast result file shares: JSON, the
// format marker, a schema this holdfast reads. It returns the trimmed
// data and the file's head.
func probeResult(data []byte) ([]byte, *resultProbe, error) {
	bad := func(format string, a ...any) error { return &ResultError{Msg: fmt.Sprintf(format, a...)} }
	if len(data) > MaxResultBytes {
		return nil, nil, bad("larger than %d MiB: not a holdfast result file", MaxResultBytes>>20)
	}
	trimmed := bytes.TrimSpace(data)
	if len(trimmed) == 0 {
		return nil, nil, bad("empty file: not a holdfast result file")
	}
	if !json.Valid(trimmed) {
		var v any
		err := json.Unmarshal(trimmed, &v)
		if trimmed[0] == '{' && (errors.Is(err, io.ErrUnexpectedEOF) || strings.Contains(fmt.Sprint(err), "unexpected end of JSON input")) {
			return nil, nil, bad("truncated: the JSON ends before the result is complete")
		}
		if trimmed[0] == '{' {
			return nil, nil, bad("malformed JSON (%v): not a holdfast result file, or damaged", err)
		}
		return nil, nil, bad("not JSON: not a holdfast result file")
	}
	probe := &resultProbe{}
	if trimmed[0] != '{' || json.Unmarshal(trimmed, probe) != nil {
		return nil, nil, bad("not a holdfast result file (want a JSON object with \"format\": %q)", ResultFormat)
	}
	if probe.Format == nil {
		if probe.Tool == "holdfast" {
			return nil, nil, bad("written by an older holdfast, before result files carried a schema version; run the command again to save a result that holdfast report can read")
		}
		return nil, nil, bad("not a holdfast result file (no \"format\": %q marker)", ResultFormat)
	}
	if *probe.Format != ResultFormat {
		return nil, nil, bad("not a holdfast result file (format %q, want %q)", *probe.Format, ResultFormat)
	}
	schema, ok := probe.Schema.(float64)
	if !ok || schema != math.Trunc(schema) || schema < 1 {
		return nil, nil, bad("result schema %v is not a schema version", jsonText(probe.Schema))
	}
	if schema > SchemaVersion {
		return nil, nil, bad("written by a newer holdfast (result schema %v; this holdfast reads schema %d and older): use a newer holdfast", schema, SchemaVersion)
	}
	return trimmed, probe, nil
}

func short(h string) string {
	if len(h) > 12 {
		return h[:12]
	}
	if h == "" {
		return "(none)"
	}
	return h
}

func jsonText(v any) string {
	b, err := json.Marshal(v)
	if err != nil || len(b) > 40 {
		return "(unreadable)"
	}
	return string(b)
}

// maxCoord bounds every coordinate a plot draws, so that spans and
// paddings stay finite.
const maxCoord = 1e150

func inconsistent(format string, a ...any) error {
	return &ResultError{Msg: "inconsistent result file: " + fmt.Sprintf(format, a...)}
}

func okProb(v float64) bool { return v >= 0 && v <= 1 }

func okCoord(v float64) bool { return math.Abs(v) <= maxCoord }

func okPtr(v *float64) bool { return v == nil || okCoord(*v) }

// check validates an assess result read back, so that rendering can
// trust its shapes and ranges.
func (d *AssessJSON) check() error {
	if d.Draws < 0 || d.Assessed < 0 || d.Assessed > int64(d.Draws) || d.FailedDraws < 0 || d.FaultedDraws < 0 || d.FaultedDraws > d.Assessed {
		return inconsistent("draw counts (draws %d, assessed %d)", d.Draws, d.Assessed)
	}
	if err := d.Certification.check(); err != nil {
		return err
	}
	probs := func(what string, p float64, ci [2]float64) error {
		if !okProb(p) || !okProb(ci[0]) || !okProb(ci[1]) || ci[0] > ci[1] {
			return inconsistent("%s: probability %v with interval %v", what, p, ci)
		}
		return nil
	}
	n := len(d.Equilibria)
	for _, e := range d.Equilibria {
		for _, c := range []struct {
			what string
			p    float64
			ci   [2]float64
		}{{"exists", e.PExists, e.PExistsCI}, {"attracting", e.PAttracting, e.PAttractingCI}, {"semistable", e.PSemistable, e.PSemistableCI}} {
			if err := probs(e.Label+" "+c.what, c.p, c.ci); err != nil {
				return err
			}
		}
		if !okCoord(e.NominalX) {
			return inconsistent("%s: nominal position %v", e.Label, e.NominalX)
		}
	}
	for _, r := range d.Regimes {
		if err := probs("regime", r.P, r.CI); err != nil {
			return err
		}
	}
	if d.Current != nil {
		for _, o := range d.Current.Outcomes {
			if err := probs("outcome "+o.Label, o.P, o.CI); err != nil {
				return err
			}
		}
	}
	if m := d.Model; m != nil {
		if !okCoord(m.State.Domain[0]) || !okCoord(m.State.Domain[1]) || !(m.State.Domain[0] < m.State.Domain[1]) {
			return inconsistent("domain %v", m.State.Domain)
		}
	}
	if nom := d.Nominal; nom != nil {
		for _, e := range nom.Equilibria {
			if !okCoord(e.X) || !okCoord(e.Slope) {
				return inconsistent("nominal equilibrium %s at %v", e.Label, e.X)
			}
		}
	}
	if f := d.Figures; f != nil {
		if err := f.check(n); err != nil {
			return err
		}
	}
	return nil
}

func (f *FiguresJSON) check(nTracked int) error {
	b := f.Band
	g := len(b.X)
	for _, col := range [][]*float64{b.Q5, b.Q25, b.Q50, b.Q75, b.Q95} {
		if len(col) != g {
			return inconsistent("rate band: %d grid points but %d quantiles", g, len(col))
		}
		for _, v := range col {
			if !okPtr(v) {
				return inconsistent("rate band value %v", *v)
			}
		}
	}
	if len(b.N) != g || len(b.Undefined) != g {
		return inconsistent("rate band: %d grid points, %d counts", g, len(b.N))
	}
	for i, x := range b.X {
		if !okCoord(x) || (i > 0 && !(x > b.X[i-1])) {
			return inconsistent("rate band grid not increasing at %d", i)
		}
	}
	c := f.Nominal
	if len(c.X) != len(c.F) {
		return inconsistent("nominal curve: %d x values, %d rates", len(c.X), len(c.F))
	}
	for i, x := range c.X {
		if !okCoord(x) || !okPtr(c.F[i]) || (i > 0 && !(x > c.X[i-1])) {
			return inconsistent("nominal curve at point %d", i)
		}
	}
	if len(f.Slopes) > nTracked {
		return inconsistent("%d slope histograms for %d equilibria", len(f.Slopes), nTracked)
	}
	for _, h := range f.Slopes {
		if len(h.Edges) == 0 && len(h.Counts) == 0 {
			continue
		}
		if len(h.Edges) != len(h.Counts)+1 {
			return inconsistent("slope histogram %s: %d edges for %d bins", h.Label, len(h.Edges), len(h.Counts))
		}
		for i, e := range h.Edges {
			if !okCoord(e) || (i > 0 && !(e > h.Edges[i-1])) {
				return inconsistent("slope histogram %s: edges not increasing", h.Label)
			}
		}
		for _, k := range h.Counts {
			if k < 0 {
				return inconsistent("slope histogram %s: negative count", h.Label)
			}
		}
	}
	var last int64
	for _, cp := range f.Running {
		if cp.Draws <= last || cp.Succeeded < 0 || cp.Succeeded > cp.Draws {
			return inconsistent("running counts at %d draws", cp.Draws)
		}
		last = cp.Draws
		for _, col := range [][]int64{cp.Exists, cp.Attracting, cp.Semistable} {
			if len(col) != nTracked {
				return inconsistent("running counts for %d of %d equilibria", len(col), nTracked)
			}
		}
		if cp.Current != nil && len(cp.Current) != nTracked {
			return inconsistent("running counts from the current state for %d of %d equilibria", len(cp.Current), nTracked)
		}
		for _, col := range [][]int64{cp.Exists, cp.Attracting, cp.Semistable, cp.Current} {
			for _, k := range col {
				if k < 0 || k > cp.Succeeded {
					return inconsistent("running count %d of %d draws", k, cp.Succeeded)
				}
			}
		}
	}
	return nil
}

// check validates a sensitivity result read back.
func (d *SensitivityJSON) check() error {
	if d.FaultedDraws < 0 || d.FaultedDraws > int64(d.Runs) {
		return inconsistent("faulted runs %d of %d", d.FaultedDraws, d.Runs)
	}
	if len(d.Chart.Bars) > len(d.Indices)+1000 {
		return inconsistent("%d bars", len(d.Chart.Bars))
	}
	for _, b := range d.Chart.Bars {
		for _, v := range []*float64{b.Value, b.Lo, b.Hi, b.Second} {
			if !okPtr(v) {
				return inconsistent("bar %s value %v", b.Label, *v)
			}
		}
	}
	if m := d.Model; m != nil && !(m.State.Domain[0] < m.State.Domain[1]) {
		return inconsistent("domain %v", m.State.Domain)
	}
	return nil
}

// check validates a sweep result read back.
func (d *SweepJSON) check() error {
	if !okCoord(d.From) || !okCoord(d.To) || d.From == d.To {
		return inconsistent("sweep range %v to %v", d.From, d.To)
	}
	if !okPtr(d.Allowed[0]) || !okPtr(d.Allowed[1]) || !okCoord(d.TrackX) {
		return inconsistent("allowed values or nominal position")
	}
	c := &d.Critical
	if d.Draws < 0 || c.N < 0 || c.N > int64(d.Draws) || d.FailedDraws < 0 {
		return inconsistent("draw counts (draws %d, assessed %d)", d.Draws, c.N)
	}
	if d.FaultedDraws < 0 || d.FaultedDraws > int64(d.Draws)*int64(max(len(d.Curve), 1)) {
		return inconsistent("faulted draws %d", d.FaultedDraws)
	}
	for _, p := range d.Curve {
		if p.FaultedDraws < 0 || p.FaultedDraws > int64(d.Draws) {
			return inconsistent("curve point faulted draws %d", p.FaultedDraws)
		}
	}
	for k, n := range c.Counts {
		if n < 0 || n > int64(d.Draws) {
			return inconsistent("%d draws of kind %q", n, k)
		}
	}
	probs := func(what string, p float64, ci [2]float64) error {
		if !okProb(p) || !okProb(ci[0]) || !okProb(ci[1]) || ci[0] > ci[1] {
			return inconsistent("%s: probability %v with interval %v", what, p, ci)
		}
		return nil
	}
	where := map[string]bool{"in range": true, "at start": true, "beyond end": true, "unbounded": true}
	q, qw := c.Quantiles, c.Where
	for _, v := range []struct {
		v *float64
		w string
	}{{q.Q5, qw.Q5}, {q.Q25, qw.Q25}, {q.Q50, qw.Q50}, {q.Q75, qw.Q75}, {q.Q95, qw.Q95},
		{d.Limit.Value, d.Limit.Where}, {d.Limit.CI[0], d.Limit.CIWhere[0]}, {d.Limit.CI[1], d.Limit.CIWhere[1]}} {
		if !okPtr(v.v) || !where[v.w] {
			return inconsistent("critical value %s where %q", gp(v.v), v.w)
		}
	}
	if !(d.Limit.Risk > 0 && d.Limit.Risk < 1) || !okProb(d.Limit.Coverage) {
		return inconsistent("safe limit at risk %v", d.Limit.Risk)
	}
	h := &d.Hysteresis
	type share struct {
		what string
		p    float64
		ci   [2]float64
	}
	checks := []share{
		{"no tipping in range", c.ShareWithoutTipping, c.ShareWithoutTippingCI}, {"lost at start", c.ShareLostAtStart, c.ShareLostAtStartCI},
		{"reversible", h.Reversible.P, h.Reversible.CI}, {"irreversible", h.Irreversible.P, h.Irreversible.CI},
		{"escapes", h.Escapes.P, h.Escapes.CI}, {"unresolved", h.Unresolved.P, h.Unresolved.CI},
	}
	for _, p := range d.Curve {
		if !okCoord(p.Value) {
			return inconsistent("curve point at %v", p.Value)
		}
		checks = append(checks, share{"curve exists", p.PExists, p.PExistsCI}, share{"curve attracting", p.PAttracting, p.PAttractingCI})
		for _, g := range p.Regimes {
			if err := probs("regime", g.P, g.CI); err != nil {
				return err
			}
		}
	}
	for _, k := range checks {
		if err := probs(k.what, k.p, k.ci); err != nil {
			return err
		}
	}
	for _, qs := range []QuantilesJSON{h.ReturnFold, h.Width} {
		for _, v := range []*float64{qs.Q5, qs.Q25, qs.Q50, qs.Q75, qs.Q95} {
			if !okPtr(v) {
				return inconsistent("hysteresis quantile %v", *v)
			}
		}
	}
	hg := &c.Histogram
	if len(hg.Edges) != 0 || len(hg.Counts) != 0 {
		if len(hg.Edges) != len(hg.Counts)+1 {
			return inconsistent("critical-value histogram: %d edges for %d bins", len(hg.Edges), len(hg.Counts))
		}
		for i, e := range hg.Edges {
			if !okCoord(e) || (i > 0 && !(e > hg.Edges[i-1])) {
				return inconsistent("critical-value histogram: edges not increasing")
			}
		}
		for _, k := range hg.Counts {
			if k < 0 {
				return inconsistent("critical-value histogram: negative count")
			}
		}
	}
	if m := d.Model; m != nil {
		if !okCoord(m.State.Domain[0]) || !okCoord(m.State.Domain[1]) || !(m.State.Domain[0] < m.State.Domain[1]) {
			return inconsistent("domain %v", m.State.Domain)
		}
	}
	return nil
}
