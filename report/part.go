package report

import (
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"strings"
	"testing/fstest"

	"holdfast/assess/study"
	"holdfast/scenarios"
)

// Kinds of the files that hold a run's state rather than its result.
const (
	// KindPart is one shard of a sharded assess run (holdfast assess
	// --shard), which holdfast merge combines.
	KindPart = "partial"
	// KindCheckpoint is the saved state of an assess run in progress
	// (--checkpoint), which --resume continues.
	KindCheckpoint = "checkpoint"
)

// PartJSON is the file of one shard of a sharded assess run, or the
// checkpoint of a run in progress: the envelope (whose command line leaves
// out --shard and every flag that only names outputs, so that it is the
// command of the single run), the run's settings, the scenario's full text
// with the CSV files it read, and the study's exact state.
type PartJSON struct {
	Envelope
	Run          PartRunJSON       `json:"run"`
	State        *study.State      `json:"state"`
	ScenarioText string            `json:"scenario_text"`
	Attached     map[string]string `json:"attached_files,omitempty"`
}

// PartRunJSON holds every setting that must agree between the parts of
// one run (and between a checkpoint and the run resuming it).
type PartRunJSON struct {
	Sets           []string `json:"sets"`
	Draws          int      `json:"draws"`
	Seed           uint64   `json:"seed"`
	Plan           string   `json:"plan"`
	UntilHalfWidth float64  `json:"until_halfwidth"`
	MaxDraws       int      `json:"max_draws"`
	Certify        bool     `json:"certify"`
	CheckSides     bool     `json:"check_sides"`
	Requires       []string `json:"requires"`
	Shard          int      `json:"shard"`
	Shards         int      `json:"shards"`
}

// NewPartJSON makes a part (kind KindPart) or checkpoint (KindCheckpoint)
// file of the run described by run and settings, holding st.
func NewPartJSON(kind, version string, run RunInfo, settings PartRunJSON, st *study.State) *PartJSON {
	p := &PartJSON{Envelope: newEnvelope(kind, version, "", ""), Run: settings, State: st}
	if p.Run.Sets == nil {
		p.Run.Sets = []string{}
	}
	if p.Run.Requires == nil {
		p.Run.Requires = []string{}
	}
	if s := run.Scenario; s != nil {
		p.Scenario, p.Title = s.File, s.Title
		for name, b := range s.Attached {
			if p.Attached == nil {
				p.Attached = map[string]string{}
			}
			p.Attached[name] = string(b)
		}
	}
	_, p.ScenarioText = p.stamp(run)
	return p
}

// Parse parses the part's scenario again from its stored text and files,
// without --set overrides (the caller applies Run.Sets).
func (p *PartJSON) Parse() (*scenarios.Scenario, error) {
	dir := fstest.MapFS{}
	for name, text := range p.Attached {
		dir[name] = &fstest.MapFile{Data: []byte(text)}
	}
	return scenarios.Parse(p.Scenario, []byte(p.ScenarioText), dir)
}

// ReadPart reads and checks a part or checkpoint file (want is KindPart
// or KindCheckpoint). Every error is a *ResultError naming the file.
func ReadPart(path, want string) (*PartJSON, error) {
	return readAndLoad(path, kindName(want), func(data []byte) (*PartJSON, error) { return LoadPart(data, want) })
}

// LoadPart decodes and checks a part or checkpoint file (see ReadPart).
func LoadPart(data []byte, want string) (*PartJSON, error) {
	bad := func(format string, a ...any) error { return &ResultError{Msg: fmt.Sprintf(format, a...)} }
	trimmed, probe, err := probeResult(data)
	if err != nil {
		return nil, err
	}
	if probe.Kind != want {
		switch want {
		case KindPart:
			return nil, bad("is a %s file, not a part of a sharded run (written by holdfast assess --shard)", kindName(probe.Kind))
		default:
			return nil, bad("is a %s file, not a checkpoint (written by holdfast assess --checkpoint)", kindName(probe.Kind))
		}
	}
	if probe.ScenarioText == nil || !strings.EqualFold(SHA256([]byte(*probe.ScenarioText)), probe.ScenarioSHA256) {
		return nil, bad("the embedded scenario text is missing or does not match its recorded SHA-256: the file was changed after holdfast wrote it")
	}
	p := &PartJSON{}
	if err := json.Unmarshal(trimmed, p); err != nil {
		return nil, bad("malformed %s file: %v", kindName(want), err)
	}
	r := p.Run
	switch {
	case p.State == nil || p.State.Engine == nil:
		return nil, bad("malformed %s file: no state", kindName(want))
	case r.Shards < 1 || r.Shard < 0 || r.Shard >= r.Shards:
		return nil, bad("malformed %s file: shard %d/%d", kindName(want), r.Shard, r.Shards)
	case p.State.Engine.Shard != r.Shard || p.State.Engine.Shards != r.Shards:
		return nil, bad("malformed %s file: its state is of shard %d/%d, its settings say %d/%d",
			kindName(want), p.State.Engine.Shard, p.State.Engine.Shards, r.Shard, r.Shards)
	case want == KindPart && !p.State.Engine.Complete():
		return nil, bad("holds %d of its %d draws: the shard did not finish", p.State.Engine.Draws, p.State.Engine.Planned)
	}
	return p, nil
}

func kindName(kind string) string {
	switch kind {
	case KindPart:
		return "part"
	case KindCheckpoint:
		return "checkpoint"
	case "":
		return "result"
	}
	return kind + " result"
}

// SameRun reports how b differs from a as a run: the first setting that
// differs, named, or "" when both belong to the same run. Shard indices
// are not compared.
func SameRun(a, b *PartJSON) string {
	ra, rb := a.Run, b.Run
	type field struct {
		name string
		x, y any
	}
	for _, f := range []field{
		{"holdfast version", a.Version, b.Version},
		{"scenario text (SHA-256)", short(a.ScenarioSHA256) + "…", short(b.ScenarioSHA256) + "…"},
		{"--set values", strings.Join(ra.Sets, " "), strings.Join(rb.Sets, " ")},
		{"--draws", ra.Draws, rb.Draws},
		{"--seed", ra.Seed, rb.Seed},
		{"--plan", ra.Plan, rb.Plan},
		{"--until-halfwidth", ra.UntilHalfWidth, rb.UntilHalfWidth},
		{"--max-draws", ra.MaxDraws, rb.MaxDraws},
		{"--certify", ra.Certify, rb.Certify},
		{"--check-sides", ra.CheckSides, rb.CheckSides},
		{"--require", strings.Join(ra.Requires, "; "), strings.Join(rb.Requires, "; ")},
		{"shard count", ra.Shards, rb.Shards},
	} {
		if fmt.Sprint(f.x) != fmt.Sprint(f.y) {
			return fmt.Sprintf("%s %q, not %q", f.name, fmt.Sprint(f.y), fmt.Sprint(f.x))
		}
	}
	return ""
}

// CheckParts checks that the parts (read from the files names) are the
// shards of one run, each exactly once (see PartChecker).
func CheckParts(names []string, parts []*PartJSON) error {
	var c PartChecker
	for i, p := range parts {
		if err := c.Add(names[i], p); err != nil {
			return err
		}
	}
	return c.Done()
}

// PartChecker checks, one part at a time, that parts are the shards of
// one run, each exactly once: it names the file whose settings differ from
// the first's and what differs, duplicate shards with both files, and (in
// Done) missing shards. It keeps only the first part's head.
type PartChecker struct {
	first     PartJSON // without its state
	firstName string
	byShard   []string
	given     int
}

// Add checks one part, read from the file name.
func (c *PartChecker) Add(name string, p *PartJSON) error {
	if c.byShard == nil {
		c.first, c.firstName = *p, name
		c.first.State, c.first.Attached = nil, nil
		c.byShard = make([]string, p.Run.Shards)
	} else if d := SameRun(&c.first, p); d != "" {
		return fmt.Errorf("%s does not belong with %s: %s", name, c.firstName, d)
	}
	k := p.Run.Shard
	if c.byShard[k] != "" {
		return fmt.Errorf("%s and %s are both shard %d of %d", c.byShard[k], name, k, len(c.byShard))
	}
	c.byShard[k] = name
	c.given++
	return nil
}

// Done reports missing shards.
func (c *PartChecker) Done() error {
	if c.byShard == nil {
		return errors.New("no part files given")
	}
	n := len(c.byShard)
	var missing []string
	for k, name := range c.byShard {
		if name == "" {
			missing = append(missing, fmt.Sprint(k))
		}
	}
	if len(missing) > 0 {
		what := "shard " + missing[0]
		if len(missing) > 1 {
			what = "shards " + strings.Join(missing, ", ")
		}
		return fmt.Errorf("%s of %d missing (given %d part files); run the missing shards with the same command and --shard K/%d", what, n, c.given, n)
	}
	return nil
}

// WritePart writes a part or checkpoint file: compact JSON (its state is
// for holdfast, not for reading) and a final newline.
func WritePart(w io.Writer, p *PartJSON) error {
	b, err := json.Marshal(p)
	if err != nil {
		return err
	}
	_, err = w.Write(append(b, '\n'))
	return err
}
