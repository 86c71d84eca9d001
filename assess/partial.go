package assess

import (
	"cmp"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"slices"

	"holdfast/assess/agg"
)

// Partial is the mergeable state of a Monte Carlo run or of one shard of
// it: integer counts and exact quantile sketches, with no draw kept.
// Merging the partials of every shard gives the same Result as one run
// over all draws, whatever the order of merging.
type Partial struct {
	// Draws is the number of draws this partial covers: the shard's first
	// Draws draws.
	Draws int
	// Shard and Shards say which draws: those with index i mod Shards =
	// Shard (Shards = 1 for a whole run).
	Shard, Shards int
	// Planned is the number of the shard's draws planned when the state
	// was taken (Draws for a finished shard; more in a checkpoint), and
	// Batches the number of finished batches (see UntilHalfWidth).
	Planned, Batches int
	agg              *aggregate
}

// Complete reports whether the partial covers every draw it planned.
func (p *Partial) Complete() bool { return p.Draws == p.Planned }

// Shard selects the draws of one shard of a run: those whose index i
// satisfies i mod N = K.
type Shard struct{ K, N int }

// RunPartial runs the draws of one shard (opt.Shard; the whole run when
// N is 0) and returns their mergeable state.
func RunPartial(ctx context.Context, m *Model, opt Options) (*Partial, error) {
	if opt.UntilHalfWidth > 0 {
		return nil, errors.New("until-halfwidth cannot be split into shards: its stopping rule needs every draw")
	}
	sh := opt.Shard
	if sh.N == 0 {
		sh = Shard{0, 1}
	}
	if sh.N < 1 || sh.K < 0 || sh.K >= sh.N {
		return nil, fmt.Errorf("shard %d/%d: want 0 ≤ K < N", sh.K, sh.N)
	}
	e, err := newEngine(m, opt)
	if err != nil {
		return nil, err
	}
	n := sh.Size(opt.Draws)
	done, conv, err := e.run(ctx, opt, sh, n, n)
	if err != nil {
		return nil, err
	}
	return &Partial{Draws: done, Planned: done, Batches: conv.Batches, Shard: sh.K, Shards: sh.N, agg: e.total}, nil
}

// Size is the number of the run's draws i < draws in the shard, those
// with i mod N = K (all of them for the zero Shard, the whole run).
func (sh Shard) Size(draws int) int {
	switch {
	case sh.N <= 1:
		return draws
	case draws <= sh.K:
		return 0
	}
	return (draws-sh.K-1)/sh.N + 1
}

// Merge combines the partials of all shards of one run into its Result.
// Every shard 0..N−1 must be present exactly once, all with the same shard
// count; opt must be the run's options (draws, seed, plan), which the
// caller checks against the parts' records. It is a Merger fed every part.
func Merge(m *Model, opt Options, parts []*Partial) (*Result, error) {
	if len(parts) == 0 {
		return nil, errors.New("merge: no parts")
	}
	mg, err := NewMerger(m, opt)
	if err != nil {
		return nil, err
	}
	for _, p := range parts {
		if err := mg.Add(p); err != nil {
			return nil, err
		}
	}
	return mg.Result()
}

// Merger combines the partials of the shards of one run one at a time, so
// that a merge of many shards holds one partial at a time, and its cost
// grows linearly in the shards.
type Merger struct {
	m       *Model
	opt     Options
	nominal *Snapshot
	total   *aggregate
	n       int    // shard count, from the first part
	seen    []bool // shards added
}

// NewMerger returns a Merger for the run of m with options opt.
func NewMerger(m *Model, opt Options) (*Merger, error) {
	nominal, err := m.Analyze(m.Nominal)
	if err != nil {
		return nil, err
	}
	return &Merger{m: m, opt: opt, nominal: nominal, total: newAggregate(len(nominal.Equilibria))}, nil
}

// Add merges one finished shard: it must have the shard count of the
// first, not be given twice, and cover its share of the run's draws.
func (mg *Merger) Add(p *Partial) error {
	if mg.seen == nil {
		if p.Shards < 1 || p.Shards > MaxDraws {
			return fmt.Errorf("merge: shard count %d", p.Shards)
		}
		mg.n, mg.seen = p.Shards, make([]bool, p.Shards)
	}
	n := mg.n
	switch {
	case p.Shards != n:
		return fmt.Errorf("merge: shard %d/%d does not belong with shards of %d", p.Shard, p.Shards, n)
	case p.Shard < 0 || p.Shard >= n:
		return fmt.Errorf("merge: shard %d/%d out of range", p.Shard, n)
	case mg.seen[p.Shard]:
		return fmt.Errorf("merge: shard %d/%d given twice", p.Shard, n)
	case !p.Complete():
		return fmt.Errorf("merge: shard %d/%d is a checkpoint (%d of %d draws), not a finished shard", p.Shard, n, p.Draws, p.Planned)
	}
	if want := (Shard{p.Shard, n}).Size(mg.opt.Draws); p.Draws != want {
		return fmt.Errorf("merge: shard %d/%d covers %d draws, want %d of %d", p.Shard, n, p.Draws, want, mg.opt.Draws)
	}
	if len(p.agg.tracked) != len(mg.nominal.Equilibria) {
		return fmt.Errorf("merge: shard %d/%d tracks %d equilibria, the scenario %d", p.Shard, n, len(p.agg.tracked), len(mg.nominal.Equilibria))
	}
	mg.seen[p.Shard] = true
	mg.total.merge(p.agg)
	return nil
}

// Result returns the merged run's Result once every shard is in, and
// names the missing shards otherwise.
func (mg *Merger) Result() (*Result, error) {
	if mg.seen == nil {
		return nil, errors.New("merge: no parts")
	}
	var missing []int
	for k, ok := range mg.seen {
		if !ok {
			missing = append(missing, k)
		}
	}
	if len(missing) > 0 {
		return nil, fmt.Errorf("merge: shards %v of %d missing", missing, mg.n)
	}
	return mg.total.finish(mg.m, mg.nominal, mg.opt, mg.opt.Draws, Convergence{Batches: 1}), nil
}

// Stored forms.

type countedJSON struct {
	Reason string `json:"reason"`
	N      int64  `json:"n"`
	First  []int  `json:"first"`
}

type trackedAggJSON struct {
	Exists     int64       `json:"exists"`
	Attracting int64       `json:"attracting"`
	Semistable int64       `json:"semistable"`
	X          *agg.Sketch `json:"x"`
	Slope      *agg.Sketch `json:"slope"`
	ReturnTime *agg.Sketch `json:"return_time"`
	Basin      *agg.Sketch `json:"basin_width"`
	Barrier    *agg.Sketch `json:"barrier"`
}

type partialJSON struct {
	Draws      int              `json:"draws"`
	Planned    int              `json:"planned"`
	Batches    int              `json:"batches"`
	Shard      int              `json:"shard"`
	Shards     int              `json:"shards"`
	N          int64            `json:"assessed"`
	Warned     int64            `json:"warned"`
	Faulted    int64            `json:"faulted"`
	ScanMissed int64            `json:"scan_missed"`
	Untracked  int64            `json:"untracked"`
	Failed     []countedJSON    `json:"failed"`
	Faults     []countedJSON    `json:"faults"`
	Regimes    [][2]uint64      `json:"regimes"`
	Tracked    []trackedAggJSON `json:"tracked"`
	Outcomes   []int64          `json:"outcomes"`
}

func countedList(m map[string]*counted) []countedJSON {
	out := []countedJSON{}
	for r, c := range m {
		out = append(out, countedJSON{Reason: r, N: c.n, First: c.first})
	}
	slices.SortFunc(out, func(a, b countedJSON) int { return cmp.Compare(a.Reason, b.Reason) })
	return out
}

// MarshalJSON writes the partial's exact state (deterministically: maps
// are written sorted).
func (p *Partial) MarshalJSON() ([]byte, error) {
	a := p.agg
	j := partialJSON{
		Draws: p.Draws, Planned: p.Planned, Batches: p.Batches, Shard: p.Shard, Shards: p.Shards,
		N: a.n, Warned: a.warned, Faulted: a.faulted, ScanMissed: a.scanMissed, Untracked: a.untracked,
		Failed: countedList(a.failed), Faults: countedList(a.faults),
		Regimes: [][2]uint64{}, Outcomes: a.outcomes,
	}
	for k, v := range a.regimes {
		j.Regimes = append(j.Regimes, [2]uint64{k, uint64(v)})
	}
	slices.SortFunc(j.Regimes, func(x, y [2]uint64) int { return cmp.Compare(x[0], y[0]) })
	for _, t := range a.tracked {
		j.Tracked = append(j.Tracked, trackedAggJSON{t.exists, t.attracting, t.semistable, t.x, t.slope, t.returnTime, t.basin, t.barrier})
	}
	return json.Marshal(j)
}

// UnmarshalJSON reads a partial written by MarshalJSON, checking counts.
func (p *Partial) UnmarshalJSON(b []byte) error {
	var j partialJSON
	if err := json.Unmarshal(b, &j); err != nil {
		return err
	}
	if j.Shards < 1 || j.Shard < 0 || j.Shard >= j.Shards || j.Draws < 0 || j.Planned < j.Draws || j.Planned > MaxDraws ||
		j.Batches < 0 || j.N < 0 || j.N > int64(j.Draws) || j.Warned < 0 || j.Warned > j.N || j.Faulted < 0 || j.Faulted > j.N {
		return errors.New("partial: inconsistent shard or draw counts")
	}
	a := newAggregate(len(j.Tracked))
	a.n, a.warned, a.faulted, a.scanMissed, a.untracked = j.N, j.Warned, j.Faulted, j.ScanMissed, j.Untracked
	for _, c := range j.Failed {
		a.failed[c.Reason] = &counted{n: c.N, first: c.First}
	}
	for _, c := range j.Faults {
		a.faults[c.Reason] = &counted{n: c.N, first: c.First}
	}
	var inRegimes int64
	for _, r := range j.Regimes {
		a.regimes[r[0]] = int64(r[1])
		inRegimes += int64(r[1])
	}
	if inRegimes != a.n {
		return fmt.Errorf("partial: regimes count %d draws, assessed %d", inRegimes, a.n)
	}
	for k, t := range j.Tracked {
		if t.X == nil || t.Slope == nil || t.ReturnTime == nil || t.Basin == nil || t.Barrier == nil {
			return errors.New("partial: tracked equilibrium without its sketches")
		}
		if t.Exists > a.n || t.Attracting > t.Exists || t.Semistable > t.Exists {
			return errors.New("partial: tracked counts out of range")
		}
		a.tracked[k] = trackedAgg{t.Exists, t.Attracting, t.Semistable, t.X, t.Slope, t.ReturnTime, t.Basin, t.Barrier}
	}
	if len(j.Outcomes) != len(a.outcomes) {
		return errors.New("partial: outcome list of the wrong length")
	}
	copy(a.outcomes, j.Outcomes)
	*p = Partial{Draws: j.Draws, Planned: j.Planned, Batches: j.Batches, Shard: j.Shard, Shards: j.Shards, agg: a}
	return nil
}
