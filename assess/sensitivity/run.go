package sensitivity

import (
	"cmp"
	"context"
	"fmt"
	"math"
	"math/bits"
	"slices"
	"strings"

	"holdfast/assess"
	"holdfast/assess/steady"
	"holdfast/sample"
)

// Options controls a sensitivity run.
type Options struct {
	// Target is the label of the tracked equilibrium (E1, E2, … at nominal
	// values).
	Target string
	// Output is the figure of the target that is analysed.
	Output Output
	// Base is the number of base rows N of the Saltelli design; the run
	// costs N·(k+2) model runs for k uncertain inputs (plus 2N with
	// correlated inputs, see Run). At least MinBase(k).
	Base int
	// Seed fixes the design, the bootstrap and the screening draws.
	Seed uint64
	// Workers is the number of goroutines (0: all cores). The result does
	// not depend on it.
	Workers int
	// Replicates is the number of bootstrap replicates (0:
	// DefaultReplicates).
	Replicates int
	// ScreenCap bounds the draws kept for the screening measures (0:
	// DefaultScreenCap).
	ScreenCap int
	// Progress, when set, receives the engine's progress.
	Progress func(done, planned int)
}

// InputError reports a request that cannot be honoured as given: an
// unknown target, an output the target does not have, a base size too
// small for the number of inputs, or no uncertain input at all.
type InputError struct{ Msg string }

func (e *InputError) Error() string { return e.Msg }

func inputErr(format string, a ...any) error { return &InputError{Msg: fmt.Sprintf(format, a...)} }

// MinBase is the smallest base size accepted for k uncertain inputs:
// max(64, 10k). With fewer rows the intervals are too wide to rank by
// (common practice, no source).
func MinBase(k int) int { return max(64, 10*k) }

// Ranking measures.
const (
	ByTotal    = "total index"
	BySplit    = "split distance"
	ByRankCorr = "rank correlation"
	ByNone     = "parameter order"
)

// Row is one parameter's line of the ranking.
type Row struct {
	Parameter string
	Fixed     bool
	// First and Total are the first-order and total Sobol' indices with
	// their bootstrap intervals (0 for fixed parameters; NaN when not
	// computed).
	First, Total     float64
	FirstCI, TotalCI [2]float64
	// RankCorr and PRCC are the Spearman and partial rank correlations of
	// the parameter with the output over the screening draws.
	RankCorr, PRCC float64
	// Split is the split test on the verdict named by Result.SplitOn.
	Split Split
	// Elasticity is the local elasticity at nominal values of the target's
	// position (ElasticityOf "x*") or slope ("slope").
	Elasticity float64
	// Rank is the 1-based place in the ranking.
	Rank int
}

// Result is the outcome of a sensitivity run.
type Result struct {
	Target string
	// TargetX and TargetClass describe the target at nominal values.
	TargetX     float64
	TargetClass steady.Class
	Output      Output
	Names       []string
	// Uncertain is the number k of uncertain inputs.
	Uncertain int
	// Base is N; Runs the model runs of the Saltelli design, N·(k+2);
	// ScreenRuns those of a separate screening run (correlated inputs
	// only, else 0).
	Base, Runs, ScreenRuns int
	Plan                   sample.PlanKind
	Seed                   uint64
	// FailedRuns counts model runs whose evaluation failed.
	FailedRuns int64
	// Failed lists the failed model runs by reason and Faults the
	// numeric faults met inside successful runs (poles and undefined
	// stretches of the rate law) by reason, both summed over the
	// Saltelli design and the screening run; Faulted counts the model
	// runs with numeric trouble. Each entry keeps the smallest indices
	// (at most 5) for replay: indices below Runs are runs of the
	// Saltelli design (see Design.Role), and index Runs + i is draw i of
	// the screening run (correlated inputs only).
	Failed, Faults []assess.Counted
	Faulted        int64
	// Indices is the Sobol' estimate (nil when it could not be made).
	Indices *Estimate
	Level   float64
	// Correlated names the parameters the scenario correlates; Sobol'
	// indices are then those of the inputs made independent.
	Correlated []string
	// RankedBy is the measure of the ranking: ByTotal, BySplit,
	// ByRankCorr or ByNone.
	RankedBy string
	// SplitOn is the verdict of the split test: the output itself when it
	// is a yes/no verdict, else Attracting.
	SplitOn Output
	// ElasticityOf is "x*" or "slope".
	ElasticityOf string
	// Rows are the parameters in ranking order.
	Rows []Row
	// Screening holds the screening measures for every tracked
	// equilibrium.
	Screening *Screening
	// Local holds the local view at nominal values for every equilibrium.
	Local []LocalEq
	// Reading is the ranking in a few plain sentences.
	Reading []string
	// Notes qualify the result (dropped rows, caps, design choices).
	Notes []string
	// Warnings are the engine's warnings: those of the Saltelli design's
	// run, then those of the screening run that differ, prefixed
	// "screening run: ".
	Warnings []string

	minority int // runs of A and B with the less frequent verdict
}

// rareVerdict is the count of the less frequent verdict in the runs of A
// and B below which the indices are flagged as imprecise (common
// practice, no source).
const rareVerdict = 50

// Run ranks the uncertain inputs of the model by their effect on one
// output of the target equilibrium.
//
// Sobol' indices: the model is run on the Saltelli design of opt.Base rows
// (Design) through the Monte Carlo engine (assess.Run with Points and
// Sink, so with its workers, tracking and determinism); each run's output
// is read from its draw record and the indices are estimated by Sobol.
// Each uncertain input is mapped from the unit cube by inversion of its
// marginal distribution, with any correlations of the scenario removed:
// Sobol' indices are defined for independent inputs.
//
// Screening measures come from the runs of A and B (2N draws of the
// independent inputs) at no extra cost; when the scenario correlates
// inputs, from a separate run of 2N draws with the scenario's own design
// (Latin hypercube, correlations kept), and the ranking then uses them
// (the split distance for yes/no outputs, the rank correlation for
// continuous ones) rather than the indices.
//
// Memory holds one output per model run, N·(k+2) numbers (8 MB for
// N = 2¹⁷, k = 6), plus at most ScreenCap draws for the screening
// measures; the engine itself streams.
//
// A problem with the request is returned as an *InputError before any
// model run.
func Run(ctx context.Context, m *assess.Model, opt Options) (*Result, error) {
	var unc []int
	for i, p := range m.Scenario.Params {
		if p.Dist != nil {
			unc = append(unc, i)
		}
	}
	k := len(unc)
	if opt.Output < 0 || opt.Output >= numOutputs {
		return nil, inputErr("unknown output %d", int(opt.Output))
	}
	if k == 0 {
		return nil, inputErr("no uncertain inputs: every parameter of the scenario is fixed, so there is nothing to rank")
	}
	if opt.Base < MinBase(k) {
		return nil, inputErr("base size %d is too small for %d uncertain inputs: need at least %d (max(64, 10 per input))", opt.Base, k, MinBase(k))
	}
	if opt.Base > MaxBase || opt.Base*(k+2) > assess.MaxDraws {
		return nil, inputErr("base size %d is too large: at most %d rows, and at most %d model runs in all", opt.Base, MaxBase, assess.MaxDraws)
	}
	nominal, err := m.Analyze(m.Nominal)
	if err != nil {
		return nil, err
	}
	target := -1
	for i, e := range nominal.Equilibria {
		if e.Label == opt.Target {
			target = i
		}
	}
	if target < 0 {
		return nil, inputErr("%s", unknownTarget(opt.Target, nominal))
	}
	if opt.Output == Current && !m.Scenario.State.HasCurrent {
		return nil, inputErr("output current needs a current state (state.current) in the scenario, and %s has none", m.Scenario.File)
	}

	// The Saltelli design on the independent marginals.
	params := make([]sample.Param, len(m.Scenario.Params))
	for i, p := range m.Scenario.Params {
		params[i] = sample.Param{Name: p.Name, Dist: p.Dist, Value: p.Value}
	}
	indep, err := sample.NewDesign(params, nil, sample.Random, 1, opt.Seed)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", m.Scenario.File, err)
	}
	d, err := NewDesign(opt.Base, k, opt.Seed)
	if err != nil {
		return nil, err
	}
	res := &Result{
		Target: opt.Target, TargetX: nominal.Equilibria[target].X, TargetClass: nominal.Equilibria[target].Class,
		Output: opt.Output, Names: m.Names, Uncertain: k,
		Base: opt.Base, Runs: d.Runs(), Plan: d.Plan(), Seed: opt.Seed,
		Level: 0.95, SplitOn: Attracting, ElasticityOf: "slope",
	}
	if opt.Output.Indicator() {
		res.SplitOn = opt.Output
	}
	if opt.Output == Position || opt.Output == Current {
		res.ElasticityOf = "x*"
	}
	for _, c := range m.Scenario.Correlations {
		for _, n := range []string{c.A, c.B} {
			if !slices.Contains(res.Correlated, n) {
				res.Correlated = append(res.Correlated, n)
			}
		}
	}
	independent := len(res.Correlated) == 0

	y := make([]float64, d.Runs())
	screen := NewScreen(m, opt.ScreenCap)
	out := opt.Output
	sink := func(block []assess.Draw) error {
		for i := range block {
			rec := &block[i]
			y[rec.Index] = out.value(rec, target, opt.Target)
			if row, role := d.Role(rec.Index); independent && role <= RoleB {
				// Screened by their place among the A and B rows, so
				// that the cap counts screened draws, not design runs.
				r := *rec
				r.Index = 2*row + role
				screen.add(&r)
			}
		}
		return nil
	}
	points := func(i int, theta []float64) {
		u := theta[:k]
		d.Point(i, u)
		indep.Map(u, theta)
	}
	run, err := assess.Run(ctx, m, assess.Options{
		Draws: d.Runs(), Seed: opt.Seed, Plan: d.Plan(), Workers: opt.Workers,
		Points: points, Sink: sink, Progress: opt.Progress,
	})
	if err != nil {
		return nil, err
	}
	res.FailedRuns = int64(run.Draws) - run.Succeeded
	res.Faulted = run.Faulted
	res.Warnings = slices.Clone(run.Warnings)
	failed, faults := map[string]*assess.Counted{}, map[string]*assess.Counted{}
	mergeCounts(failed, run.Failed, 0)
	mergeCounts(faults, run.Faults, 0)
	if !independent {
		res.ScreenRuns = 2 * opt.Base
		sr, err := assess.Run(ctx, m, assess.Options{
			Draws: res.ScreenRuns, Seed: opt.Seed, Plan: sample.LHS, Workers: opt.Workers,
			Sink: screen.Add, Progress: opt.Progress,
		})
		if err != nil {
			return nil, err
		}
		res.FailedRuns += int64(sr.Draws) - sr.Succeeded
		res.Faulted += sr.Faulted
		mergeCounts(failed, sr.Failed, res.Runs)
		mergeCounts(faults, sr.Faults, res.Runs)
		for _, w := range sr.Warnings {
			if !slices.Contains(run.Warnings, w) {
				res.Warnings = append(res.Warnings, "screening run: "+w)
			}
		}
	}
	res.Failed, res.Faults = sortedCounts(failed), sortedCounts(faults)
	res.Screening = screen.Result()
	res.Local = Local(m, nominal)

	est, err := sobolRows(y, k, BootstrapOptions{Replicates: opt.Replicates, Seed: opt.Seed, Workers: opt.Workers})
	if err != nil {
		res.Notes = append(res.Notes, "Sobol' indices not computed: "+err.Error())
	} else {
		res.Indices = est
	}
	if opt.Output.Indicator() {
		var ones, zeros int
		for i, v := range y {
			if _, role := d.Role(i); role <= RoleB {
				switch v {
				case 1:
					ones++
				case 0:
					zeros++
				}
			}
		}
		res.minority = min(ones, zeros)
	}
	res.rows(unc, target)
	res.rank(independent)
	res.notes(opt, independent)
	res.Reading = reading(res)
	return res, nil
}

// unknownTarget describes the labels there are.
func unknownTarget(label string, nominal *assess.Snapshot) string {
	if len(nominal.Equilibria) == 0 {
		return "no equilibrium in the domain at nominal values, so there is no target to follow"
	}
	var have []string
	for _, e := range nominal.Equilibria {
		have = append(have, fmt.Sprintf("%s (%s at %.4g)", e.Label, e.Class, e.X))
	}
	what := fmt.Sprintf("unknown target %q", label)
	if label == "" {
		what = "no target equilibrium given"
	}
	return what + "; the equilibria at nominal values are " + strings.Join(have, ", ")
}

// rows fills one row per parameter, in parameter order.
func (r *Result) rows(unc []int, target int) {
	var meas, split *Measures
	if r.Screening != nil {
		meas = r.Screening.Of(r.Target, r.Output)
		split = r.Screening.Of(r.Target, r.SplitOn)
	}
	var local *LocalEq
	if target < len(r.Local) {
		local = &r.Local[target]
	}
	nan2 := [2]float64{math.NaN(), math.NaN()}
	r.Rows = make([]Row, len(r.Names))
	for p, name := range r.Names {
		row := Row{Parameter: name, First: math.NaN(), Total: math.NaN(), FirstCI: nan2, TotalCI: nan2,
			RankCorr: math.NaN(), PRCC: math.NaN(), Split: Split{D: math.NaN(), P: math.NaN()}, Elasticity: math.NaN()}
		j := slices.Index(unc, p)
		row.Fixed = j < 0
		if row.Fixed {
			row.First, row.Total, row.FirstCI, row.TotalCI = 0, 0, [2]float64{}, [2]float64{}
		} else if e := r.Indices; e != nil {
			row.First, row.Total, row.FirstCI, row.TotalCI = e.First[j], e.Total[j], e.FirstCI[j], e.TotalCI[j]
		}
		if meas != nil {
			row.RankCorr, row.PRCC = meas.Spearman[p], meas.PRCC[p]
		}
		if split != nil {
			row.Split = split.Split[p]
		}
		if local != nil {
			lp := local.Params[p]
			row.Elasticity = lp.SlopeElasticity
			if r.ElasticityOf == "x*" {
				row.Elasticity = lp.XElasticity
			}
		}
		r.Rows[p] = row
	}
}

// rank orders the rows: uncertain parameters by the ranking measure
// (largest first, undefined last, ties in parameter order), then the
// fixed ones in parameter order.
func (r *Result) rank(independent bool) {
	e := r.Indices
	switch {
	case independent && e != nil && e.Variance > 0:
		r.RankedBy = ByTotal
	case r.Output.Indicator() && r.anyFinite(func(w Row) float64 { return w.Split.D }):
		r.RankedBy = BySplit
	case r.anyFinite(func(w Row) float64 { return w.RankCorr }):
		r.RankedBy = ByRankCorr
	default:
		r.RankedBy = ByNone
	}
	key := func(w Row) float64 {
		var v float64
		switch r.RankedBy {
		case ByTotal:
			v = w.Total
		case BySplit:
			v = w.Split.D
		case ByRankCorr:
			v = math.Abs(w.RankCorr)
		}
		if w.Fixed || math.IsNaN(v) {
			return math.Inf(-1)
		}
		return v
	}
	slices.SortStableFunc(r.Rows, func(a, b Row) int {
		if a.Fixed != b.Fixed {
			if a.Fixed {
				return 1
			}
			return -1
		}
		ka, kb := key(a), key(b)
		switch {
		case ka > kb:
			return -1
		case ka < kb:
			return 1
		}
		return 0
	})
	for i := range r.Rows {
		r.Rows[i].Rank = i + 1
	}
}

func (r *Result) anyFinite(f func(Row) float64) bool {
	for _, w := range r.Rows {
		if v := f(w); !w.Fixed && !math.IsNaN(v) && !math.IsInf(v, 0) {
			return true
		}
	}
	return false
}

func (r *Result) notes(opt Options, independent bool) {
	if !independent {
		r.Notes = append(r.Notes, fmt.Sprintf(
			"the scenario correlates %s. Sobol' indices assume independent inputs: those shown were computed with the correlations removed and describe that independent model. The ranking uses the %s on %d draws that keep the correlations.",
			strings.Join(r.Correlated, ", "), r.RankedBy, r.ScreenRuns))
	}
	if e := r.Indices; e != nil {
		if e.Dropped > 0 {
			why := "a failed run"
			if r.Output == Position || r.Output == Slope {
				why = fmt.Sprintf("%s lost or a failed run", r.Target)
			}
			r.Notes = append(r.Notes, fmt.Sprintf(
				"in %d of %d base rows the output was undefined in at least one run (%s); the indices use the %d complete rows and describe the parameter sets where it is defined",
				e.Dropped, r.Base, why, e.Rows))
		}
		if e.Variance == 0 {
			r.Notes = append(r.Notes, fmt.Sprintf("the output is %g in every run: there is no variance to apportion", e.Mean))
		}
	}
	if r.Output.Indicator() && r.Indices != nil && r.Indices.Variance > 0 {
		if n := r.minority; n < rareVerdict {
			r.Notes = append(r.Notes, fmt.Sprintf("the verdict differs from the usual one in only %d of the %d runs of A and B: indices of so rare an event are imprecise (see the interval widths); a larger base size helps", n, 2*r.Indices.Rows))
		}
	}
	if r.Plan != sample.QMC {
		r.Notes = append(r.Notes, fmt.Sprintf("%d inputs are more than the quasi-random generator supports; the base design is a Latin hypercube", r.Uncertain))
	} else if bits.OnesCount(uint(r.Base)) != 1 {
		r.Notes = append(r.Notes, fmt.Sprintf("the quasi-random base is best balanced when the base size is a power of two; %d is not", r.Base))
	}
	if s := r.Screening; s != nil && s.Capped {
		r.Notes = append(r.Notes, fmt.Sprintf("the screening measures use the %d successful draws among the first %d (the cap) of %d; the rest were not kept", s.Kept, s.Cap, s.Seen))
	}
	if r.FailedRuns > 0 {
		r.Notes = append(r.Notes, fmt.Sprintf("%d model runs failed and were left out", r.FailedRuns))
	}
}

// keepIndices is the number of smallest indices kept per reason, as the
// engine keeps them.
const keepIndices = 5

// mergeCounts adds the counts of src to dst by reason, with its indices
// moved by offset, keeping the smallest keepIndices indices.
func mergeCounts(dst map[string]*assess.Counted, src []assess.Counted, offset int) {
	for _, c := range src {
		d := dst[c.Reason]
		if d == nil {
			d = &assess.Counted{Reason: c.Reason}
			dst[c.Reason] = d
		}
		d.Draws += c.Draws
		for _, i := range c.First {
			d.First = append(d.First, i+offset)
		}
		slices.Sort(d.First)
		d.First = d.First[:min(len(d.First), keepIndices)]
	}
}

// sortedCounts lists the counts by decreasing number, then by reason.
func sortedCounts(m map[string]*assess.Counted) []assess.Counted {
	out := make([]assess.Counted, 0, len(m))
	for _, c := range m {
		out = append(out, *c)
	}
	slices.SortFunc(out, func(x, y assess.Counted) int {
		return cmp.Or(cmp.Compare(y.Draws, x.Draws), cmp.Compare(x.Reason, y.Reason))
	})
	return out
}
