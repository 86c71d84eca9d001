package assess

import (
	"context"
	"encoding/json"
	"fmt"
	"runtime"
	"testing"
	"time"

	"holdfast/sample"
)

// runLake runs benchDraws LHS draws of the lake demo on the given number
// of workers and returns the wall time.
func runLake(b *testing.B, m *Model, workers int) time.Duration {
	b.Helper()
	t0 := time.Now()
	if _, err := Run(context.Background(), m, Options{Draws: benchDraws, Seed: 1, Plan: sample.LHS, Workers: workers}); err != nil {
		b.Fatal(err)
	}
	return time.Since(t0)
}

// scalingWorkers is the worker counts of BenchmarkWorkersScaling: 1 and 2,
// and 4 on a machine with at least four cores.
func scalingWorkers() []int {
	if runtime.NumCPU() >= 4 {
		return []int{1, 2, 4}
	}
	return []int{1, 2}
}

// BenchmarkWorkersScaling measures the engine's throughput on the lake
// demo (20,000 LHS draws per run) against the number of workers. The
// sub-benchmarks workers=W time each count on its own; the sub-benchmark
// alternate runs every count once per iteration (in reversed order on odd
// iterations), so that load on a shared machine falls on all counts alike,
// and reports each count's draws/s and the speed-up over one worker
// ("speedup" for two workers, "speedup-w4" for four). The ideal speed-up is
// the worker count; the Go runtime's own goroutines and the in-order sink
// take a little of it.
//
//	go test -run '^$' -bench WorkersScaling -count 3 ./assess/
func BenchmarkWorkersScaling(b *testing.B) {
	m := lakeModel(b)
	counts := scalingWorkers()
	for _, w := range counts {
		b.Run(fmt.Sprintf("workers=%d", w), func(b *testing.B) {
			var total time.Duration
			for b.Loop() {
				total += runLake(b, m, w)
			}
			b.ReportMetric(float64(benchDraws*b.N)/total.Seconds(), "draws/s")
		})
	}
	b.Run("alternate", func(b *testing.B) {
		total := make([]time.Duration, len(counts))
		iter := 0
		for b.Loop() {
			for j := range counts {
				k := j
				if iter%2 == 1 { // odd iterations start with the most workers
					k = len(counts) - 1 - j
				}
				total[k] += runLake(b, m, counts[k])
			}
			iter++
		}
		for k, w := range counts {
			b.ReportMetric(float64(benchDraws*b.N)/total[k].Seconds(), fmt.Sprintf("draws/s-w%d", w))
		}
		b.ReportMetric(total[0].Seconds()/total[1].Seconds(), "speedup")
		if len(counts) > 2 {
			b.ReportMetric(total[0].Seconds()/total[2].Seconds(), "speedup-w4")
		}
	})
}

// shardDraws is the draws of each shard in BenchmarkMergeShards: one
// engine block, enough for the quantile sketches (dense over the range of
// their values) to reach about their full width.
const shardDraws = 1024

// lakeShards runs the lake demo as n shards of shardDraws draws each and
// returns the options of the whole run, the partials and their stored JSON.
func lakeShards(b *testing.B, m *Model, n int) (Options, []*Partial, [][]byte) {
	b.Helper()
	opt := Options{Draws: n * shardDraws, Seed: 1, Plan: sample.LHS, Workers: 2}
	parts := make([]*Partial, n)
	stored := make([][]byte, n)
	for k := range parts {
		o := opt
		o.Shard = Shard{k, n}
		p, err := RunPartial(context.Background(), m, o)
		if err != nil {
			b.Fatal(err)
		}
		if stored[k], err = json.Marshal(p); err != nil {
			b.Fatal(err)
		}
		parts[k] = p
	}
	return opt, parts, stored
}

// BenchmarkMergeShards measures the cost of merging N shards of a lake run
// for N = 1, 4, …, 256: merge times assess.Merge alone on partials held in
// memory; json+merge times what `holdfast merge` does, decoding the N
// stored parts and merging them. The partials are made once, outside the
// timer, with shardDraws draws each: the merge cost depends on the sketch
// widths, not on the draws per shard. Merging is linear in N, so ns/shard
// stays roughly constant (the fixed cost, the nominal analysis and the
// final read-out, shows at N = 1); JSON-B/shard is the size of one stored
// part.
//
//	go test -run '^$' -bench MergeShards -benchmem ./assess/
func BenchmarkMergeShards(b *testing.B) {
	m := lakeModel(b)
	for _, n := range []int{1, 4, 16, 64, 256} {
		opt, parts, stored := lakeShards(b, m, n)
		size := 0
		for _, s := range stored {
			size += len(s)
		}
		b.Run(fmt.Sprintf("merge/N=%d", n), func(b *testing.B) {
			for b.Loop() {
				if _, err := Merge(m, opt, parts); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N*n), "ns/shard")
		})
		b.Run(fmt.Sprintf("json+merge/N=%d", n), func(b *testing.B) {
			for b.Loop() {
				got := make([]*Partial, n)
				for k, s := range stored {
					got[k] = new(Partial)
					if err := json.Unmarshal(s, got[k]); err != nil {
						b.Fatal(err)
					}
				}
				if _, err := Merge(m, opt, got); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N*n), "ns/shard")
			b.ReportMetric(float64(size)/float64(n), "JSON-B/shard")
		})
	}
}
