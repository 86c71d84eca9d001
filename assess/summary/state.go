package summary

import (
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"slices"

	"holdfast/assess/agg"
)

// StateFormat names the layout of a Collector's saved state; it is the
// "format" member of every state MarshalJSON writes.
const StateFormat = "holdfast.summary.collector/1"

// stateJSON is a Collector's saved state. What the model fixes (the grid,
// the nominal curve) is not stored but checked: the configuration, the
// labels, whether there is a current state, and the grid's ends.
type stateJSON struct {
	Format  string           `json:"format"`
	Config  configJSON       `json:"config"`
	Labels  []string         `json:"labels"`
	Current bool             `json:"current_state"`
	Grid    []agg.ExactFloat `json:"grid_ends"`
	Band    bandJSON         `json:"band"`
	Slopes  []rawSketch      `json:"slopes"`
	Counts  countsJSON       `json:"counts"`
	Closed  []countsJSON     `json:"closed_checkpoints"`
}

type configJSON struct {
	GridPoints      int `json:"grid_points"`
	NominalPoints   int `json:"nominal_points"`
	BandDraws       int `json:"band_draws"`
	Bins            int `json:"bins"`
	PilotDraws      int `json:"pilot_draws"`
	FirstCheckpoint int `json:"first_checkpoint"`
}

type bandJSON struct {
	Draws     int64       `json:"draws"`
	Undefined []int64     `json:"undefined"`
	Sketches  []rawSketch `json:"sketches"`
}

type countsJSON struct {
	Draws      int64   `json:"draws"`
	Succeeded  int64   `json:"succeeded"`
	Exists     []int64 `json:"exists"`
	Attracting []int64 `json:"attracting"`
	Semistable []int64 `json:"semistable"`
	Ends       []int64 `json:"ends"`
}

// rawSketch holds an agg.Sketch in its own exact JSON form.
type rawSketch = json.RawMessage

func configToJSON(c Config) configJSON {
	return configJSON{c.GridPoints, c.NominalPoints, c.BandDraws, c.Bins, c.PilotDraws, c.FirstCheckpoint}
}

func (j *counts) toJSON() countsJSON {
	return countsJSON{
		Draws: j.draws, Succeeded: j.ok,
		Exists: j.exists, Attracting: j.attracting, Semistable: j.semistable, Ends: j.ends,
	}
}

func marshalSketches(sks []*agg.Sketch, what string) ([]rawSketch, error) {
	out := make([]rawSketch, len(sks))
	for i, sk := range sks {
		b, err := sk.MarshalJSON()
		if err != nil {
			return nil, fmt.Errorf("summary: %s %d: %w", what, i, err)
		}
		out[i] = b
	}
	return out, nil
}

// MarshalJSON writes the Collector's complete state: the same draws give
// the same bytes, and UnmarshalJSON restores a Collector that behaves
// exactly as this one (further Add and Merge calls included). The
// quantile sketches are stored in agg.Sketch's exact form (bucket
// counts), the counts as integers, and floats so that they read back bit
// for bit.
func (c *Collector) MarshalJSON() ([]byte, error) {
	if c == nil || c.cfg.GridPoints == 0 {
		return nil, errors.New("summary: collector not made by NewCollector")
	}
	st := stateJSON{
		Format:  StateFormat,
		Config:  configToJSON(c.cfg),
		Labels:  c.labels,
		Current: c.current,
		Grid:    []agg.ExactFloat{agg.ExactFloat(c.grid[0]), agg.ExactFloat(c.grid[len(c.grid)-1])},
		Band:    bandJSON{Draws: c.bandDraws, Undefined: c.undefined},
		Counts:  c.now.toJSON(),
		Closed:  make([]countsJSON, len(c.closed)),
	}
	if st.Labels == nil {
		st.Labels = []string{}
	}
	var err error
	if st.Band.Sketches, err = marshalSketches(c.band, "band sketch"); err != nil {
		return nil, err
	}
	if st.Slopes, err = marshalSketches(c.slopes, "slope sketch"); err != nil {
		return nil, err
	}
	for k := range c.closed {
		st.Closed[k] = c.closed[k].toJSON()
	}
	return json.Marshal(st)
}

// UnmarshalJSON restores a state written by MarshalJSON into a Collector
// made by NewCollector for the same model and configuration, replacing
// what it held. It checks that the stored configuration, labels, current
// state and grid match the Collector's, and that the stored counts are
// consistent (lengths, signs, and the relations between them); on any
// error the Collector is left unchanged.
func (c *Collector) UnmarshalJSON(b []byte) error {
	if c == nil || c.cfg.GridPoints == 0 {
		return errors.New("summary: collector not made by NewCollector")
	}
	var st stateJSON
	if err := agg.DecodeStrict(b, &st); err != nil {
		return fmt.Errorf("summary: reading collector state: %w", err)
	}
	r, err := c.restore(&st)
	if err != nil {
		return fmt.Errorf("summary: reading collector state: %w", err)
	}
	*c = *r
	return nil
}

// restore builds a Collector from a decoded state, on c's model-derived
// fields.
func (c *Collector) restore(st *stateJSON) (*Collector, error) {
	if st.Format != StateFormat {
		return nil, fmt.Errorf("format %q, want %q", st.Format, StateFormat)
	}
	if name, a, b := configDiff(st.Config, configToJSON(c.cfg)); name != "" {
		return nil, fmt.Errorf("config %s %d, collector %d", name, a, b)
	}
	if !slices.Equal(c.labels, st.Labels) {
		return nil, fmt.Errorf("labels %v, collector has %v", st.Labels, c.labels)
	}
	if st.Current != c.current {
		return nil, fmt.Errorf("current state %v, collector %v", st.Current, c.current)
	}
	if len(st.Grid) != 2 {
		return nil, fmt.Errorf("%d grid ends, want 2", len(st.Grid))
	}
	if lo, hi := float64(st.Grid[0]), float64(st.Grid[1]); !sameBits(lo, c.grid[0]) || !sameBits(hi, c.grid[len(c.grid)-1]) {
		return nil, fmt.Errorf("grid [%v, %v], collector [%v, %v]", lo, hi, c.grid[0], c.grid[len(c.grid)-1])
	}
	nt, ng := len(c.labels), len(c.grid)
	r := &Collector{
		cfg: c.cfg, grid: c.grid, labels: c.labels, current: c.current, nomX: c.nomX, nomF: c.nomF,
	}
	var err error
	if r.now, err = st.Counts.counts(nt, c.current); err != nil {
		return nil, fmt.Errorf("counts: %w", err)
	}
	if len(st.Closed) > 0 {
		if _, ok := c.threshold(len(st.Closed) - 1); !ok {
			return nil, fmt.Errorf("%d closed checkpoints: too many", len(st.Closed))
		}
	}
	r.closed = make([]counts, len(st.Closed))
	for k := range st.Closed {
		if r.closed[k], err = st.Closed[k].counts(nt, c.current); err != nil {
			return nil, fmt.Errorf("checkpoint %d: %w", k, err)
		}
		if k > 0 && !r.closed[k-1].within(&r.closed[k]) {
			return nil, fmt.Errorf("checkpoint %d: counts fall below checkpoint %d's", k, k-1)
		}
	}
	if n := len(r.closed); n > 0 && !r.closed[n-1].within(&r.now) {
		return nil, fmt.Errorf("checkpoint %d: counts exceed the totals", n-1)
	}

	bd := st.Band
	if bd.Draws < 0 || bd.Draws > r.now.ok {
		return nil, fmt.Errorf("band of %d draws out of %d successful", bd.Draws, r.now.ok)
	}
	if len(bd.Undefined) != ng || len(bd.Sketches) != ng {
		return nil, fmt.Errorf("band: %d undefined counts and %d sketches, want %d", len(bd.Undefined), len(bd.Sketches), ng)
	}
	r.bandDraws, r.undefined = bd.Draws, bd.Undefined
	if r.band, err = unmarshalSketches(bd.Sketches, "band sketch"); err != nil {
		return nil, err
	}
	for g, u := range r.undefined {
		if u < 0 || u > bd.Draws || r.band[g].Count() != bd.Draws-u {
			return nil, fmt.Errorf("band point %d: %d values and %d undefined, want %d in all", g, r.band[g].Count(), u, bd.Draws)
		}
	}
	if len(st.Slopes) != nt {
		return nil, fmt.Errorf("%d slope sketches, want %d", len(st.Slopes), nt)
	}
	if r.slopes, err = unmarshalSketches(st.Slopes, "slope sketch"); err != nil {
		return nil, err
	}
	for k, sk := range r.slopes {
		if sk.Count() > r.now.exists[k] {
			return nil, fmt.Errorf("slope sketch %d: %d slopes, %s exists in %d draws", k, sk.Count(), c.labels[k], r.now.exists[k])
		}
	}
	return r, nil
}

func unmarshalSketches(raw []rawSketch, what string) ([]*agg.Sketch, error) {
	out := make([]*agg.Sketch, len(raw))
	for i, b := range raw {
		out[i] = agg.NewSketch()
		if err := out[i].UnmarshalJSON(b); err != nil {
			return nil, fmt.Errorf("%s %d: %w", what, i, err)
		}
	}
	return out, nil
}

// counts checks stored counts for nt tracked equilibria: lengths, signs,
// and succeeded ≤ draws, attracting + semistable ≤ exists ≤ succeeded,
// and ends summed ≤ succeeded (none without a current state).
func (j *countsJSON) counts(nt int, current bool) (counts, error) {
	for _, v := range [][]int64{j.Exists, j.Attracting, j.Semistable, j.Ends} {
		if len(v) != nt {
			return counts{}, fmt.Errorf("%d counts per kind, want %d", len(v), nt)
		}
	}
	if j.Draws < 0 || j.Succeeded < 0 || j.Succeeded > j.Draws {
		return counts{}, fmt.Errorf("%d succeeded of %d draws", j.Succeeded, j.Draws)
	}
	rest := j.Succeeded
	for k := range nt {
		e, a, s, n := j.Exists[k], j.Attracting[k], j.Semistable[k], j.Ends[k]
		if e < 0 || a < 0 || s < 0 || n < 0 || e > j.Succeeded || a > e-s {
			return counts{}, fmt.Errorf("equilibrium %d: exists %d, attracting %d, semistable %d of %d", k, e, a, s, j.Succeeded)
		}
		if n > rest || (!current && n != 0) {
			return counts{}, fmt.Errorf("equilibrium %d: ends there in %d draws, too many", k, n)
		}
		rest -= n
	}
	n := newCounts(nt)
	n.draws, n.ok = j.Draws, j.Succeeded
	copy(n.exists, j.Exists)
	copy(n.attracting, j.Attracting)
	copy(n.semistable, j.Semistable)
	copy(n.ends, j.Ends)
	return n, nil
}

// within reports whether every count of a is at most b's.
func (a *counts) within(b *counts) bool {
	if a.draws > b.draws || a.ok > b.ok {
		return false
	}
	for k := range a.exists {
		if a.exists[k] > b.exists[k] || a.attracting[k] > b.attracting[k] ||
			a.semistable[k] > b.semistable[k] || a.ends[k] > b.ends[k] {
			return false
		}
	}
	return true
}

func sameBits(a, b float64) bool { return math.Float64bits(a) == math.Float64bits(b) }

// configDiff names the first field where two configurations differ,
// with its two values ("" when none does).
func configDiff(a, b configJSON) (string, int, int) {
	for _, f := range []struct {
		name string
		a, b int
	}{
		{"GridPoints", a.GridPoints, b.GridPoints},
		{"NominalPoints", a.NominalPoints, b.NominalPoints},
		{"BandDraws", a.BandDraws, b.BandDraws},
		{"Bins", a.Bins, b.Bins},
		{"PilotDraws", a.PilotDraws, b.PilotDraws},
		{"FirstCheckpoint", a.FirstCheckpoint, b.FirstCheckpoint},
	} {
		if f.a != f.b {
			return f.name, f.a, f.b
		}
	}
	return "", 0, 0
}

// Merge adds the draws o has seen into c, as if c had seen them too; o is
// not changed. The draws of c and o must be disjoint (shards of one run,
// or the pieces before and after a restored state); then the merged
// Summary is identical to that of one Collector fed all the draws,
// whatever the order and grouping of the merges. Merge fails, leaving c
// unchanged, when the two differ in configuration, labels, current state,
// grid or nominal curve (they were made for different models or
// settings), and when o is c.
func (c *Collector) Merge(o *Collector) error {
	switch {
	case c == nil || c.cfg.GridPoints == 0 || o == nil || o.cfg.GridPoints == 0:
		return errors.New("summary: merge: collector not made by NewCollector")
	case c == o:
		return errors.New("summary: merge: a collector cannot be merged into itself")
	}
	if name, a, b := configDiff(configToJSON(c.cfg), configToJSON(o.cfg)); name != "" {
		return fmt.Errorf("summary: merge: configs differ: %s %d and %d", name, a, b)
	}
	switch {
	case !slices.Equal(c.labels, o.labels):
		return fmt.Errorf("summary: merge: labels differ: %v and %v", c.labels, o.labels)
	case c.current != o.current:
		return fmt.Errorf("summary: merge: current state differs: %v and %v", c.current, o.current)
	case !slices.EqualFunc(c.grid, o.grid, sameBits):
		return fmt.Errorf("summary: merge: grids differ: [%v, %v] and [%v, %v]",
			c.grid[0], c.grid[len(c.grid)-1], o.grid[0], o.grid[len(o.grid)-1])
	case !slices.EqualFunc(c.nomX, o.nomX, sameBits) || !slices.EqualFunc(c.nomF, o.nomF, sameBits):
		return errors.New("summary: merge: nominal rate curves differ")
	}
	c.bandDraws += o.bandDraws
	for g := range c.band {
		c.band[g].Merge(o.band[g])
		c.undefined[g] += o.undefined[g]
	}
	for k := range c.slopes {
		c.slopes[k].Merge(o.slopes[k])
	}
	// A threshold still open in one collector takes its totals there.
	for k := range max(len(c.closed), len(o.closed)) {
		if k == len(c.closed) {
			c.closed = append(c.closed, c.now.clone())
		}
		on := &o.now
		if k < len(o.closed) {
			on = &o.closed[k]
		}
		c.closed[k].merge(on)
	}
	c.now.merge(&o.now)
	return nil
}
