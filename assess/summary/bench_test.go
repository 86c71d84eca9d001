package summary

import (
	"context"
	"testing"
	"time"

	"holdfast/assess"
	"holdfast/sample"
	"holdfast/scenarios"
)

// BenchmarkCollectorOverhead times a run of the lake demo (illustrative
// numbers, 16384 draws; the band takes the first 4096) with the collector
// and the same run without it, alternately, so that load on a shared
// machine falls on both alike, and reports their ratio as
// "with/without".
func BenchmarkCollectorOverhead(b *testing.B) {
	s, err := scenarios.LoadDemo("lake")
	if err != nil {
		b.Fatal(err)
	}
	m, err := assess.Compile(s)
	if err != nil {
		b.Fatal(err)
	}
	// Both runs deliver draw records in order, as assess always does for
	// its screening measures.
	opt := assess.Options{Draws: 16384, Seed: 1, Plan: sample.LHS, Workers: 2, Sink: func([]assess.Draw) error { return nil }}
	var without, with time.Duration
	for range b.N {
		t0 := time.Now()
		if _, err := assess.Run(context.Background(), m, opt); err != nil {
			b.Fatal(err)
		}
		t1 := time.Now()
		c, err := NewCollector(m, Config{})
		if err != nil {
			b.Fatal(err)
		}
		o := opt
		o.Extra, o.Sink = c.Extra, c.Add
		if _, err := assess.Run(context.Background(), m, o); err != nil {
			b.Fatal(err)
		}
		c.Summary()
		without, with = without+t1.Sub(t0), with+time.Since(t1)
	}
	b.ReportMetric(float64(with)/float64(without), "with/without")
}
