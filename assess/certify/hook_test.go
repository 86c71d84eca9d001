package certify

import (
	"context"
	"reflect"
	"slices"
	"strings"
	"testing"

	"holdfast/assess"
	"holdfast/assess/steady"
	"holdfast/sample"
	"holdfast/scenarios"
)

// scenario parses an inline test scenario.
func scenario(t *testing.T, yaml string) *assess.Model {
	t.Helper()
	s, err := scenarios.Parse("test.yaml", []byte(yaml), nil)
	if err != nil {
		t.Fatal(err)
	}
	m, err := assess.Compile(s)
	if err != nil {
		t.Fatal(err)
	}
	return m
}

// runCertified runs the engine with the hook and a Summary; each record
// is also checked to carry the hook's fields.
func runCertified(t *testing.T, m *assess.Model, opt assess.Options, hopt HookOptions) (*assess.Result, *Result, []DrawStatus) {
	t.Helper()
	hook, err := Hook(m, hopt)
	if err != nil {
		t.Fatal(err)
	}
	sum := NewSummary()
	var recs []DrawStatus
	opt.Extra = hook
	opt.Sink = func(block []assess.Draw) error {
		for i := range block {
			d, ok := Fields(&block[i])
			if !ok {
				t.Fatalf("draw %d: no certification fields in %v", block[i].Index, block[i].Extra)
			}
			recs = append(recs, d)
		}
		return sum.Add(block)
	}
	res, err := assess.Run(context.Background(), m, opt)
	if err != nil {
		t.Fatal(err)
	}
	return res, sum.Result(), recs
}

func TestHookLakeDemo(t *testing.T) {
	// The lake demo (illustrative numbers): every draw certified, no
	// disagreement, the regimes over all draws as the engine counts them,
	// and the same summary for one worker and three.
	m := demoModel(t, "lake")
	opt := assess.Options{Draws: 3000, Seed: 7, Plan: sample.LHS, Workers: 1}
	res, r1, recs := runCertified(t, m, opt, HookOptions{})
	if r1.Checked != res.Succeeded || r1.Draws != int64(opt.Draws) {
		t.Fatalf("checked %d of %d records, engine succeeded %d", r1.Checked, r1.Draws, res.Succeeded)
	}
	if r1.Certified.Count != r1.Checked || r1.Disagreeing != 0 {
		t.Errorf("certified %d of %d, disagreeing %d (%v)", r1.Certified.Count, r1.Checked, r1.Disagreeing, r1.Warnings())
	}
	if !reflect.DeepEqual(r1.Regimes, res.Regimes) {
		t.Errorf("regimes over all draws\n got %+v\nwant %+v (engine)", r1.Regimes, res.Regimes)
	}
	if !reflect.DeepEqual(r1.CertifiedRegimes, res.Regimes) {
		t.Errorf("all draws certified, so the certified regimes must equal the engine's:\n got %+v\nwant %+v", r1.CertifiedRegimes, res.Regimes)
	}
	for _, d := range recs {
		if d.Status != Certified || d.Boxes != 0 || d.MaxWidth != 0 || d.Flags != 0 || d.Evals < 3 {
			t.Fatalf("record %+v", d)
		}
	}
	opt.Workers = 3
	_, r3, _ := runCertified(t, m, opt, HookOptions{})
	if !reflect.DeepEqual(r1, r3) {
		t.Errorf("summary depends on the worker count:\n1: %+v\n3: %+v", r1, r3)
	}
}

// Strogatz ch. 2: f = x²(r − a x) has a double root at 0 (attracting from
// below only, since f ≈ r x² > 0 on both sides) and a simple attracting
// root at r/a. Interval arithmetic cannot certify the double root, so
// every draw is unresolved with 0 located; the scan's verdict there is
// kept, and the Dormand–Prince cross-check confirms it.
const doubleRootScenario = `holdfast: 1
title: double root at zero (test)
state:
  symbol: x
  domain: [-1, 2.3]
rate: "x^2*(r - a*x)"
parameters:
  r:
    dist: uniform
    min: 0.5
    max: 1.5
  a:
    value: 1
`

func TestHookUnresolvedDraws(t *testing.T) {
	m := scenario(t, doubleRootScenario)
	opt := assess.Options{Draws: 200, Seed: 3, Plan: sample.Random, Workers: 2}
	res, r, recs := runCertified(t, m, opt, HookOptions{Simulate: true})
	if r.Certified.Count != 0 || r.Unresolved != r.Checked || r.Checked != res.Succeeded {
		t.Fatalf("certified %d, unresolved %d of %d", r.Certified.Count, r.Unresolved, r.Checked)
	}
	if r.Disagreeing != 0 {
		t.Errorf("disagreements: %v", r.Warnings())
	}
	if r.MaxWidth <= 0 || r.MaxWidth > 1e-3 {
		t.Errorf("widest unresolved interval %v", r.MaxWidth)
	}
	for _, d := range recs {
		// One certified root (r/a, stable) and one unresolved interval.
		if d.Status != Unresolved || d.Roots != 1 || d.Repelling != 0 || d.Boxes != 1 {
			t.Fatalf("record %+v", d)
		}
	}
	if len(r.CertifiedRegimes) != 0 {
		t.Errorf("certified regimes %+v over no certified draw", r.CertifiedRegimes)
	}
	// 0 attracts from below (f ≈ r x² > 0 on both sides), named as the
	// engine names it.
	want := []string{"semistable-below", steady.Stable.String()}
	if len(r.Regimes) != 1 || !slices.Equal(r.Regimes[0].Pattern, want) {
		t.Errorf("regimes %+v, want %v", r.Regimes, want)
	}
}

// A Gaussian bump of width 0.002 that the scan's grid cannot see (steady:
// features narrower than about a third of a cell can be missed): the
// certification finds its two roots, c ± w·sqrt(ln 2) (analytic), and
// reports each draw where the scan missed them, by index, so that it can
// be replayed from the seed.
const bumpScenario = `holdfast: 1
title: narrow bump (test)
state:
  symbol: x
  domain: [0, 1]
rate: "-0.5 + exp(-((x - c)/w)^2)"
parameters:
  c:
    dist: uniform
    min: 0.3
    max: 0.4
  w:
    value: 0.002
`

func TestHookReportsScanMisses(t *testing.T) {
	m := scenario(t, bumpScenario)
	opt := assess.Options{Draws: 300, Seed: 11, Plan: sample.LHS, Workers: 2}
	_, r, recs := runCertified(t, m, opt, HookOptions{})
	if r.Disagreeing == 0 {
		t.Skip("the scan found every bump; nothing to report")
	}
	if len(r.ByKind) != 1 || r.ByKind[0].Reason != MissedByScan.String() || r.ByKind[0].Draws != r.Disagreeing {
		t.Errorf("by kind %+v", r.ByKind)
	}
	// Replay the first listed draw: the design gives its parameters.
	d, err := m.Design(opt.Plan, opt.Draws, opt.Seed)
	if err != nil {
		t.Fatal(err)
	}
	i := r.Listed[0].Draw
	if recs[i].Flags != MissedByScan {
		t.Fatalf("record %d flags %v", i, recs[i].Flags)
	}
	theta := make([]float64, len(m.Names))
	d.Draw(i, theta)
	f := m.Func(theta)
	found, err := steady.Find(f, 0, 1, steady.DefaultOptions())
	if err != nil {
		t.Fatal(err)
	}
	rep, err := Check(Bind(m.Program.NewMachine(), theta), 0, 1, found.Equilibria, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if len(rep.Roots) != 2 || len(rep.Disagreements) == 0 || rep.Disagreements[0].Kind != MissedByScan {
		t.Errorf("replay of draw %d: roots %+v, disagreements %+v", i, rep.Roots, rep.Disagreements)
	}
	if w := r.Warnings(); len(w) == 0 || !strings.Contains(w[0], "draw ") {
		t.Errorf("warnings %v", w)
	}
}

func TestHookErrors(t *testing.T) {
	if _, err := Hook(nil, HookOptions{}); err == nil {
		t.Error("nil model accepted")
	}
	m := demoModel(t, "lake")
	if _, err := Hook(m, HookOptions{Options: Options{MinWidth: -1}}); err == nil {
		t.Error("bad options accepted")
	}
	if _, err := Hook(m, HookOptions{Sim: SimOptions{Offset: 3}}); err == nil {
		t.Error("bad simulation options accepted")
	}
	// A failed draw gets status 0; a record without fields decodes as
	// absent.
	var rec assess.Draw
	if _, ok := Fields(&rec); ok {
		t.Error("empty record decoded")
	}
	hook, _ := Hook(m, HookOptions{})
	run := hook()
	rec = assess.Draw{Failed: "parameter not finite", Extra: []float64{42}}
	run(m.Func(m.Nominal), &rec)
	d, ok := Fields(&rec)
	if !ok || d.Status != 0 || len(rec.Extra) != 1+ExLen || rec.Extra[0] != 42 {
		t.Errorf("failed draw: %+v %v (fields must follow earlier hooks' values)", d, rec.Extra)
	}
}
