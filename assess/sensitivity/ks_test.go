package sensitivity

import (
	"math"
	"math/rand/v2"
	"testing"
)

func TestKolmogorovSeriesAgree(t *testing.T) {
	// The alternating series and its theta-transformed form are two
	// expressions of one function (Jacobi's imaginary transformation; see
	// Marsaglia, Tsang & Wang 2003); each is checked against the other
	// where both converge.
	for lambda := 0.5; lambda <= 2.0; lambda += 0.05 {
		a := kolmogorovQLarge(lambda)
		b := 1 - kolmogorovCDFSmall(lambda)
		if math.Abs(a-b) > 1e-12 {
			t.Errorf("λ = %.2f: series %.15f vs %.15f", lambda, a, b)
		}
	}
}

func TestKolmogorovCriticalValues(t *testing.T) {
	// Asymptotic critical values of √n·D (Smirnov 1948; from memory): 1.2238 at 10%, 1.3581 at 5%, 1.6276 at 1%. The series
	// themselves are checked in TestKolmogorovSeriesAgree.
	for _, c := range []struct{ lambda, q float64 }{{1.2238, 0.10}, {1.3581, 0.05}, {1.6276, 0.01}} {
		if got := KolmogorovQ(c.lambda); math.Abs(got-c.q) > 2e-4 {
			t.Errorf("Q(%v) = %.5f, want %v", c.lambda, got, c.q)
		}
	}
	if KolmogorovQ(0) != 1 || KolmogorovQ(10) > 1e-80 || !math.IsNaN(KolmogorovQ(math.NaN())) {
		t.Error("limits")
	}
}

func TestKSTestHandExample(t *testing.T) {
	// Worked by hand: F_a − F_b at 1, 2, 3, 4 is 0.25, 0.5, 0.75 − 0.2,
	// 1 − 0.4, so D = 0.6; n_e = 4·5/9.
	d, p := KSTest([]float64{4, 1, 3, 2}, []float64{3, 4, 5, 6, 7})
	if math.Abs(d-0.6) > 1e-15 {
		t.Errorf("D = %v, want 0.6", d)
	}
	ne := 20.0 / 9
	lam := (math.Sqrt(ne) + 0.12 + 0.11/math.Sqrt(ne)) * 0.6
	if math.Abs(p-KolmogorovQ(lam)) > 1e-15 {
		t.Errorf("p = %v", p)
	}
	if d, p := KSTest(nil, []float64{1}); !math.IsNaN(d) || !math.IsNaN(p) {
		t.Error("empty sample: want NaN")
	}
}

func TestKSTestLevel(t *testing.T) {
	// Under the null hypothesis (both samples from one distribution) the
	// test rejects at 5% in about 5% of trials: 600 trials, two samples of
	// 80 and 120; a binomial(600, 0.05) count lies in [14, 48] with
	// probability > 0.999. The asymptotic p-value with Stephens' correction
	// is slightly conservative at these sizes.
	rng := rand.New(rand.NewPCG(7, 7))
	reject := 0
	a, b := make([]float64, 80), make([]float64, 120)
	for range 600 {
		for i := range a {
			a[i] = rng.NormFloat64()
		}
		for i := range b {
			b[i] = rng.NormFloat64()
		}
		if _, p := KSTest(a, b); p < 0.05 {
			reject++
		}
	}
	if reject < 14 || reject > 48 {
		t.Errorf("rejected %d of 600 at 5%%", reject)
	}
	// A shift of one standard deviation is found every time.
	for i := range b {
		b[i] = rng.NormFloat64() + 1
	}
	if _, p := KSTest(a, b); p > 1e-4 {
		t.Errorf("shifted samples: p = %v", p)
	}
}
