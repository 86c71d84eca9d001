// Package study runs a whole Monte Carlo assessment as `holdfast assess`
// makes it: the engine (assess.Run) together with the screening measures
// (sensitivity.Screen), the summaries behind the report's figures
// (summary.Collector) and, when asked, the interval certification of every
// draw (certify.Hook with certify.Summary), all from the same draws.
//
// Its state is the engine's mergeable state (assess.Partial) with each
// collector's: integer counts, exact-merge sketches and, for the screening,
// the draws of index below a fixed cap. A run split into shards (draw i in
// shard i mod N) therefore merges into exactly the result of one run, and a
// run saved at a checkpoint resumes to exactly the result of an
// uninterrupted one (common practice for exact mergeable aggregates, no
// source).
package study

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"

	"holdfast/assess"
	"holdfast/assess/certify"
	"holdfast/assess/sensitivity"
	"holdfast/assess/summary"
)

// Config selects what a study collects besides the engine's aggregates.
type Config struct {
	// Certify attaches the interval certification of every draw.
	Certify bool
	// CertifyOptions tunes it (zero value: the defaults).
	CertifyOptions certify.HookOptions
	// ScreenCap bounds the draws of the screening measures (0: the
	// default, sensitivity.DefaultScreenCap).
	ScreenCap int
	// Figures sizes the report's summaries (zero value: the defaults).
	Figures summary.Config
}

// Study is one assessment's collectors over one model. It is not safe for
// concurrent use; the engine calls its sink from one goroutine.
type Study struct {
	m       *assess.Model
	cfg     Config
	screen  *sensitivity.Screen
	collect *summary.Collector
	cert    *certify.Summary
	hook    func() func(*assess.Func, *assess.Draw)
}

// New returns a Study of the model with empty collectors.
func New(m *assess.Model, cfg Config) (*Study, error) {
	if m == nil {
		return nil, errors.New("study: nil model")
	}
	collect, err := summary.NewCollector(m, cfg.Figures)
	if err != nil {
		return nil, err
	}
	s := &Study{m: m, cfg: cfg, screen: sensitivity.NewScreen(m, cfg.ScreenCap), collect: collect}
	if cfg.Certify {
		if s.hook, err = certify.Hook(m, cfg.CertifyOptions); err != nil {
			return nil, err
		}
		s.cert = certify.NewSummary()
	}
	return s, nil
}

// Options returns opt with the study's hooks attached: its Extra (the
// figures' hook, then the certification's, which reads its fields from the
// end of each record) and a Sink feeding every collector, then also (which
// may be nil: --draws-csv, for instance).
func (s *Study) Options(opt assess.Options, also func(block []assess.Draw) error) assess.Options {
	var cert func(block []assess.Draw) error
	if s.cert != nil {
		cert = s.cert.Add
	}
	opt.Extra = assess.ChainExtra(s.collect.Extra, s.hook)
	opt.Sink = assess.ChainSinks(s.screen.Add, s.collect.Add, cert, also)
	return opt
}

// Outcome is a finished study.
type Outcome struct {
	Result    *assess.Result
	Screening *sensitivity.Screening
	Figures   *summary.Summary
	// Certification is nil when the study does not certify.
	Certification *certify.Result
}

func (s *Study) outcome(r *assess.Result) *Outcome {
	o := &Outcome{Result: r, Screening: s.screen.Result(), Figures: s.collect.Summary()}
	if s.cert != nil {
		o.Certification = s.cert.Result()
	}
	return o
}

// Run runs the whole study with opt (its Extra and Sink are set here; a
// Sink already in opt is kept and fed after the collectors). With
// opt.Resume, the collectors must have been restored first (Restore).
func (s *Study) Run(ctx context.Context, opt assess.Options) (*Outcome, error) {
	opt = s.Options(opt, opt.Sink)
	r, err := assess.Run(ctx, s.m, opt)
	if err != nil {
		return nil, err
	}
	return s.outcome(r), nil
}

// RunShard runs the draws of one shard (opt.Shard) and returns the
// study's state for Merge.
func (s *Study) RunShard(ctx context.Context, opt assess.Options) (*State, error) {
	opt = s.Options(opt, opt.Sink)
	p, err := assess.RunPartial(ctx, s.m, opt)
	if err != nil {
		return nil, err
	}
	return s.State(p)
}

// State is the mergeable, storable state of a study: the engine's and
// every collector's, in their exact stored forms.
type State struct {
	Engine        *assess.Partial `json:"engine"`
	Screening     json.RawMessage `json:"screening"`
	Figures       json.RawMessage `json:"figures"`
	Certification json.RawMessage `json:"certification,omitempty"`
}

// State returns the study's state with the engine's partial p: the
// collectors are encoded now, so call it when they have seen exactly the
// draws p covers (from Options.Checkpoint, or after the run).
func (s *Study) State(p *assess.Partial) (*State, error) {
	eng, err := json.Marshal(p)
	if err != nil {
		return nil, fmt.Errorf("study state: %w", err)
	}
	st := &State{Engine: new(assess.Partial)}
	if err := json.Unmarshal(eng, st.Engine); err != nil {
		return nil, fmt.Errorf("study state: %w", err)
	}
	if st.Screening, err = json.Marshal(s.screen); err != nil {
		return nil, fmt.Errorf("study state: screening: %w", err)
	}
	if st.Figures, err = json.Marshal(s.collect); err != nil {
		return nil, fmt.Errorf("study state: figures: %w", err)
	}
	if s.cert != nil {
		if st.Certification, err = json.Marshal(s.cert); err != nil {
			return nil, fmt.Errorf("study state: certification: %w", err)
		}
	}
	return st, nil
}

// Checkpoint returns an assess.Options.Checkpoint function that hands the
// study's state to save.
func (s *Study) Checkpoint(save func(*State) error) func(*assess.Partial) error {
	return func(p *assess.Partial) error {
		st, err := s.State(p)
		if err != nil {
			return err
		}
		return save(st)
	}
}

// Restore sets the study's collectors from a stored state and returns the
// engine's partial, to resume from (assess.Options.Resume) or to merge.
func (s *Study) Restore(st *State) (*assess.Partial, error) {
	if st == nil || st.Engine == nil {
		return nil, errors.New("study state: no engine state")
	}
	if err := json.Unmarshal(st.Screening, s.screen); err != nil {
		return nil, fmt.Errorf("study state: screening: %w", err)
	}
	if err := json.Unmarshal(st.Figures, s.collect); err != nil {
		return nil, fmt.Errorf("study state: figures: %w", err)
	}
	switch {
	case s.cert != nil && st.Certification == nil:
		return nil, errors.New("study state: made without certification, but the run certifies")
	case s.cert == nil && st.Certification != nil:
		return nil, errors.New("study state: made with certification, but the run does not certify")
	case s.cert != nil:
		if err := json.Unmarshal(st.Certification, s.cert); err != nil {
			return nil, fmt.Errorf("study state: certification: %w", err)
		}
	}
	return st.Engine, nil
}

// merge adds another study's collectors into s.
func (s *Study) merge(o *Study) error {
	if err := s.screen.Merge(o.screen); err != nil {
		return fmt.Errorf("screening: %w", err)
	}
	if err := s.collect.Merge(o.collect); err != nil {
		return fmt.Errorf("figures: %w", err)
	}
	if s.cert != nil {
		if err := s.cert.Merge(o.cert); err != nil {
			return fmt.Errorf("certification: %w", err)
		}
	}
	return nil
}

// Merge combines the states of every shard of one run (opt: the run's
// draws, seed and plan) into the study's outcome, identical to the
// outcome of one run over all draws. Shards missing, given twice or of
// another shard count are named (assess.Merger). It is a Merger fed every
// state.
func Merge(m *assess.Model, cfg Config, opt assess.Options, states []*State) (*Outcome, error) {
	if len(states) == 0 {
		return nil, errors.New("merge: no parts")
	}
	mg, err := NewMerger(m, cfg, opt)
	if err != nil {
		return nil, err
	}
	for i, st := range states {
		if err := mg.Add(st); err != nil {
			return nil, fmt.Errorf("part %d: %w", i+1, err)
		}
	}
	return mg.Outcome()
}

// Merger combines the states of the shards of one run one at a time:
// memory holds the merged collectors and one shard's state, and the cost
// grows linearly in the shards.
type Merger struct {
	m      *assess.Model
	cfg    Config
	engine *assess.Merger
	total  *Study
}

// NewMerger returns a Merger for the study of m with cfg, of the run with
// options opt.
func NewMerger(m *assess.Model, cfg Config, opt assess.Options) (*Merger, error) {
	eng, err := assess.NewMerger(m, opt)
	if err != nil {
		return nil, err
	}
	total, err := New(m, cfg)
	if err != nil {
		return nil, err
	}
	return &Merger{m: m, cfg: cfg, engine: eng, total: total}, nil
}

// Add merges one finished shard's state.
func (mg *Merger) Add(st *State) error {
	s, err := New(mg.m, mg.cfg)
	if err != nil {
		return err
	}
	p, err := s.Restore(st)
	if err != nil {
		return err
	}
	if err := mg.engine.Add(p); err != nil {
		return err
	}
	if err := mg.total.merge(s); err != nil {
		return fmt.Errorf("merge: shard %d/%d: %w", p.Shard, p.Shards, err)
	}
	return nil
}

// Outcome returns the merged study once every shard is in.
func (mg *Merger) Outcome() (*Outcome, error) {
	r, err := mg.engine.Result()
	if err != nil {
		return nil, err
	}
	return mg.total.outcome(r), nil
}
