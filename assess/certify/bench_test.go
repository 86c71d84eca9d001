package certify

import (
	"context"
	"math"
	"testing"
	"time"

	"holdfast/assess"
	"holdfast/assess/steady"
	"holdfast/sample"
	"holdfast/scenarios"
)

func demoModel(tb testing.TB, name string) *assess.Model {
	tb.Helper()
	s, err := scenarios.LoadDemo(name)
	if err != nil {
		tb.Fatal(err)
	}
	m, err := assess.Compile(s)
	if err != nil {
		tb.Fatal(err)
	}
	return m
}

// certifiedOptions returns engine options with the certification hook and
// its summary attached.
func certifiedOptions(tb testing.TB, m *assess.Model, opt assess.Options) (assess.Options, *Summary) {
	tb.Helper()
	hook, err := Hook(m, HookOptions{})
	if err != nil {
		tb.Fatal(err)
	}
	sum := NewSummary()
	opt.Extra = hook
	opt.Sink = sum.Add
	return opt, sum
}

const benchDraws = 20000

// BenchmarkCertifiedMonteCarlo runs the Monte Carlo engine on each demo
// scenario, the same 20,000 draws on two workers, without and with the
// certification hook (and its summary sink), alternating within each
// iteration so that both see the same machine load. It reports the time
// of each run and their ratio (target: at most 2).
func BenchmarkCertifiedMonteCarlo(b *testing.B) {
	for _, name := range []string{"lake", "reactor", "fishery", "tank"} {
		b.Run(name, func(b *testing.B) {
			m := demoModel(b, name)
			plain := assess.Options{Draws: benchDraws, Seed: 1, Plan: sample.Random, Workers: 2}
			cert, sum := certifiedOptions(b, m, plain)
			var tPlain, tCert time.Duration
			for b.Loop() {
				t0 := time.Now()
				if _, err := assess.Run(context.Background(), m, plain); err != nil {
					b.Fatal(err)
				}
				t1 := time.Now()
				if _, err := assess.Run(context.Background(), m, cert); err != nil {
					b.Fatal(err)
				}
				tPlain += t1.Sub(t0)
				tCert += time.Since(t1)
			}
			n := float64(b.N)
			b.ReportMetric(tPlain.Seconds()/n*1e3, "plain-ms")
			b.ReportMetric(tCert.Seconds()/n*1e3, "certified-ms")
			b.ReportMetric(tCert.Seconds()/tPlain.Seconds(), "ratio")
			r := sum.Result()
			b.ReportMetric(r.Certified.P, "certified-share")
			b.ReportMetric(r.EvalsPerDraw, "evals/draw")
		})
	}
}

// BenchmarkCertify times, on one core, the certification of one lake
// draw (certify; certify-near with the scan's equilibria as positions, as
// the hook has them) beside the equilibrium search that the engine runs
// for the same draw (find, with the engine's settings).
func BenchmarkCertify(b *testing.B) {
	m := demoModel(b, "lake")
	d, err := m.Design(sample.Random, 4096, 1)
	if err != nil {
		b.Fatal(err)
	}
	thetas := make([][]float64, 4096)
	near := make([][]float64, 4096)
	for i := range thetas {
		thetas[i] = make([]float64, len(m.Names))
		d.Draw(i, thetas[i])
		res, err := steady.Find(m.Func(thetas[i]), m.Domain[0], m.Domain[1], steady.DefaultOptions())
		if err != nil {
			b.Fatal(err)
		}
		for _, e := range res.Equilibria {
			near[i] = append(near[i], e.X)
		}
	}
	th := make([]float64, len(m.Names))
	certify := func(b *testing.B, withNear bool) {
		ch, err := NewChecker(Options{RootWidth: math.Inf(1)})
		if err != nil {
			b.Fatal(err)
		}
		fn := Bind(m.Program.NewMachine(), th)
		evals, i := 0, 0
		for b.Loop() {
			copy(th, thetas[i&4095])
			var pos []float64
			if withNear {
				pos = near[i&4095]
			}
			rep, err := ch.CertifyNear(fn, m.Domain[0], m.Domain[1], pos)
			if err != nil {
				b.Fatal(err)
			}
			evals += rep.Evals
			i++
		}
		b.ReportMetric(float64(evals)/float64(i), "evals/draw")
	}
	b.Run("certify", func(b *testing.B) { certify(b, false) })
	b.Run("certify-near", func(b *testing.B) { certify(b, true) })
	b.Run("find", func(b *testing.B) {
		fopt := steady.DefaultOptions()
		fopt.QuadRelTol = 1e-6
		fopt.ThresholdBarriersOnly = true
		fz, err := steady.NewFinder(fopt)
		if err != nil {
			b.Fatal(err)
		}
		f := m.Func(th)
		i := 0
		for b.Loop() {
			copy(th, thetas[i&4095])
			if _, err := fz.Find(f, m.Domain[0], m.Domain[1]); err != nil {
				b.Fatal(err)
			}
			i++
		}
	})
}
