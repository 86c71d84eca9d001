package gate

import (
	"math"
	"testing"
)

// FuzzRequire checks that Parse never panics, that every requirement it
// accepts reads back from its canonical form, and that judging it against
// any estimate does not panic and stays consistent with its margin.
func FuzzRequire(f *testing.F) {
	for _, s := range []string{
		"E2 attracting >= 0.95", "E1 exists>99%", "E3 current <= 0.05", "E1 semistable < 1e-3",
		"E2 ≥ 0.9", "e2 attracting >= 0.9", "E2 attracting >= 95", "E2 attracting >= 1",
		"E999999 exists > 0", "E1 exists >= 0.5 extra", "", "\xff", "E1 exists >= 0x1p-2",
		"E1 exists >= NaN", "E1 exists >= Inf", "E1 exists <= 1e-400",
	} {
		f.Add(s, int64(5), int64(10), 0.3, 0.7)
	}
	f.Fuzz(func(t *testing.T, s string, k, n int64, lo, hi float64) {
		r, err := Parse(s)
		if err != nil {
			if err.Error() == "" {
				t.Fatal("empty error message")
			}
			return
		}
		if r.Threshold < 0 || r.Threshold > 1 || math.IsNaN(r.Threshold) {
			t.Fatalf("%q: threshold %v", s, r.Threshold)
		}
		back, err := Parse(r.String())
		if err != nil || back.Label != r.Label || back.Verdict != r.Verdict || back.Op != r.Op || back.Threshold != r.Threshold {
			t.Fatalf("%q: canonical %q reads back as %+v, %v", s, r.String(), back, err)
		}
		o := r.Judge(Estimate{Count: k, N: n, P: 0.5, CI: [2]float64{lo, hi}})
		if o.Met && !(o.Margin >= 0) {
			t.Fatalf("%q: met with margin %v", s, o.Margin)
		}
		_ = o.String()
	})
}
