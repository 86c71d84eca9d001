package sensitivity

import (
	"math"
	"slices"

	"gonum.org/v1/gonum/stat"
)

// Split is the regional sensitivity split test of Spear & Hornberger
// (1980, Water Research 14:43) for one input and one yes/no verdict: the
// two-sample Kolmogorov–Smirnov distance D between the input's values in
// the draws where the verdict holds (N1 of them) and where it does not
// (N0), and the p-value of D under the hypothesis that the input does not
// matter (both samples from one distribution). D and P are NaN when either
// group is empty (the verdict does not vary).
type Split struct {
	D, P   float64
	N1, N0 int
}

// KSTest returns the two-sample Kolmogorov–Smirnov statistic
// D = sup_x |F_a(x) − F_b(x)| of the samples a and b (computed by gonum's
// stat.KolmogorovSmirnov, which handles ties) and its asymptotic p-value
// Q_KS(λ) with λ = (√nₑ + 0.12 + 0.11/√nₑ)·D and nₑ = n_a·n_b/(n_a + n_b),
// the small-sample correction of Stephens (1970, J. Roy. Statist. Soc. B
// 32:115) as given in Press et al., Numerical Recipes, 3rd ed., 2007,
// §14.3.3. See KolmogorovQ. With ties (discrete inputs) the p-value is
// conservative. Both are NaN when a sample is empty. a and b are not
// modified.
func KSTest(a, b []float64) (d, p float64) {
	if len(a) == 0 || len(b) == 0 {
		return math.NaN(), math.NaN()
	}
	x, y := slices.Clone(a), slices.Clone(b)
	slices.Sort(x)
	slices.Sort(y)
	// gonum accumulates the empirical CDFs by sums of 1/n, which can end
	// a few ulps above 1.
	d = math.Min(stat.KolmogorovSmirnov(x, nil, y, nil), 1)
	ne := float64(len(x)) * float64(len(y)) / float64(len(x)+len(y))
	sq := math.Sqrt(ne)
	return d, KolmogorovQ((sq + 0.12 + 0.11/sq) * d)
}

// KolmogorovQ returns Q_KS(λ) = P(K > λ) for Kolmogorov's limiting
// distribution of √n·D (Kolmogorov 1933; Smirnov 1948, Ann. Math.
// Statist. 19:279):
//
//	Q_KS(λ) = 2 Σ_{j≥1} (−1)^{j−1} exp(−2j²λ²)                  (λ ≥ 1)
//	1 − Q_KS(λ) = (√(2π)/λ) Σ_{j≥1} exp(−(2j−1)²π²/(8λ²))       (λ < 1)
//
// The two series are equal (Jacobi's theta transformation); each is used
// where it converges fast (both forms are given by Marsaglia, Tsang &
// Wang 2003, J. Statist. Software 8(18)). The result is clamped to
// [0, 1].
func KolmogorovQ(lambda float64) float64 {
	switch {
	case math.IsNaN(lambda):
		return math.NaN()
	case lambda <= 0:
		return 1
	case lambda < 1:
		return clamp01(1 - kolmogorovCDFSmall(lambda))
	}
	return clamp01(kolmogorovQLarge(lambda))
}

// kolmogorovQLarge is the alternating series, accurate for λ ≳ 0.6.
func kolmogorovQLarge(lambda float64) float64 {
	var sum float64
	sign := 1.0
	for j := 1; j <= 100; j++ {
		t := math.Exp(-2 * float64(j*j) * lambda * lambda)
		sum += sign * t
		if t < 1e-17*sum || t == 0 {
			break
		}
		sign = -sign
	}
	return 2 * sum
}

// kolmogorovCDFSmall is the theta-transformed series of 1 − Q_KS,
// accurate for λ ≲ 1.5.
func kolmogorovCDFSmall(lambda float64) float64 {
	var sum float64
	c := math.Pi * math.Pi / (8 * lambda * lambda)
	for j := 1; j <= 100; j++ {
		m := float64(2*j - 1)
		t := math.Exp(-m * m * c)
		sum += t
		if t < 1e-17*sum || t == 0 {
			break
		}
	}
	return math.Sqrt(2*math.Pi) / lambda * sum
}

func clamp01(v float64) float64 {
	return math.Max(0, math.Min(1, v))
}
