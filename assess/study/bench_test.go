package study

import (
	"bufio"
	"context"
	"os"
	"runtime"
	"strconv"
	"strings"
	"testing"

	"holdfast/assess"
	"holdfast/sample"
	"holdfast/scenarios"
)

// benchDrawsEnv overrides the draws of BenchmarkTenMillionDrawsMemory for
// quick trials.
const benchDrawsEnv = "HOLDFAST_BENCH_DRAWS"

// procStatusMB returns a memory figure of /proc/self/status ("VmHWM",
// "VmRSS") in MB (2^20 bytes), and false where the file or the line is
// missing (outside Linux).
func procStatusMB(key string) (float64, bool) {
	f, err := os.Open("/proc/self/status")
	if err != nil {
		return 0, false
	}
	defer f.Close()
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		rest, ok := strings.CutPrefix(sc.Text(), key+":")
		if !ok {
			continue
		}
		kb, err := strconv.ParseFloat(strings.TrimSuffix(strings.TrimSpace(rest), " kB"), 64)
		if err != nil {
			return 0, false
		}
		return kb / 1024, true
	}
	return 0, false
}

// BenchmarkTenMillionDrawsMemory runs 10,000,000 LHS draws of the lake
// demo on all cores as `holdfast assess` runs them: a Study (the report
// figures' collector, the screening and, with HOLDFAST_BENCH_CERTIFY=1,
// the certification) takes every draw, and a further sink counts them. It reports
// draws/s and memory: peakRSS-MB is the process's peak resident set
// (VmHWM of /proc/self/status, Linux only) after the run, hwm-before-MB
// the same figure before it and rss-before-MB the resident set then;
// heapsys-MB and sys-MB are runtime.MemStats HeapSys and Sys after the
// run. Memory must not grow with the draws: compare with a run of fewer
// draws.
//
// VmHWM is process-wide: it includes the setup and every benchmark run
// earlier in the same process. The benchmark first tries to reset it
// (writing 5 to /proc/self/clear_refs, Linux ≥ 4.0), but run it alone:
//
//	go test -run '^$' -bench TenMillion -benchtime 1x ./assess/
//
// HOLDFAST_BENCH_DRAWS=1000000 (say) changes the number of draws. The run
// takes minutes, so -short skips it.
func BenchmarkTenMillionDrawsMemory(b *testing.B) {
	if testing.Short() {
		b.Skip("10,000,000 draws: skipped with -short")
	}
	draws := 10_000_000
	if v := os.Getenv(benchDrawsEnv); v != "" {
		n, err := strconv.Atoi(v)
		if err != nil || n < 1 || n > assess.MaxDraws {
			b.Fatalf("%s=%q: want a number of draws in [1, %d]", benchDrawsEnv, v, assess.MaxDraws)
		}
		draws = n
	}
	s, err := scenarios.LoadDemo("lake")
	if err != nil {
		b.Fatal(err)
	}
	m, err := assess.Compile(s)
	if err != nil {
		b.Fatal(err)
	}
	runtime.GC()
	// Best effort: reset the peak resident set to the current one.
	_ = os.WriteFile("/proc/self/clear_refs", []byte("5"), 0)
	hwm0, okHWM := procStatusMB("VmHWM")
	rss0, okRSS := procStatusMB("VmRSS")
	var seen, failed int
	cfg := Config{Certify: os.Getenv("HOLDFAST_BENCH_CERTIFY") == "1"}
	for b.Loop() {
		st, err := New(m, cfg)
		if err != nil {
			b.Fatal(err)
		}
		seen, failed = 0, 0
		opt := assess.Options{Draws: draws, Seed: 1, Plan: sample.LHS}
		opt.Sink = func(block []assess.Draw) error {
			for i := range block {
				seen++
				if block[i].Failed != "" {
					failed++
				}
			}
			return nil
		}
		if _, err := st.Run(context.Background(), opt); err != nil {
			b.Fatal(err)
		}
	}
	if seen != draws {
		b.Fatalf("sink saw %d draws, want %d", seen, draws)
	}
	b.ReportMetric(float64(draws*b.N)/b.Elapsed().Seconds(), "draws/s")
	b.ReportMetric(float64(failed), "failed-draws")
	if hwm, ok := procStatusMB("VmHWM"); ok && okHWM {
		b.ReportMetric(hwm0, "hwm-before-MB")
		b.ReportMetric(hwm, "peakRSS-MB")
	}
	if okRSS {
		b.ReportMetric(rss0, "rss-before-MB")
	}
	var ms runtime.MemStats
	runtime.ReadMemStats(&ms)
	b.ReportMetric(float64(ms.HeapSys)/(1<<20), "heapsys-MB")
	b.ReportMetric(float64(ms.Sys)/(1<<20), "sys-MB")
}
