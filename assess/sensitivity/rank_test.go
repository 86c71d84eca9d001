package sensitivity

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat"
)

func TestRanksShareTies(t *testing.T) {
	// Midranks (Kendall & Gibbons 1990): tied values share the mean
	// of the ranks they span.
	got := Ranks([]float64{3, 1, 2, 2, 5, 2})
	want := []float64{5, 1, 3, 3, 6, 3}
	for i := range want {
		if got[i] != want[i] {
			t.Fatalf("ranks %v, want %v", got, want)
		}
	}
}

func TestSpearmanWorkedExample(t *testing.T) {
	// IQ against hours of television per week for ten people, the worked
	// example of Spearman's coefficient in common textbook use (from
	// memory): ρ = −29/165 ≈ −0.1758. Verified here with the classic
	// no-ties formula ρ = 1 − 6Σd²/(n(n² − 1)) (Spearman 1904), computed
	// independently of Ranks.
	iq := []float64{106, 100, 86, 101, 99, 103, 97, 113, 112, 110}
	tv := []float64{7, 27, 2, 50, 28, 29, 20, 12, 6, 17}
	rankOf := func(x []float64, i int) float64 {
		r := 1.0
		for _, v := range x {
			if v < x[i] {
				r++
			}
		}
		return r
	}
	var d2 float64
	for i := range iq {
		d := rankOf(iq, i) - rankOf(tv, i)
		d2 += d * d
	}
	n := float64(len(iq))
	classic := 1 - 6*d2/(n*(n*n-1))
	if math.Abs(classic-(-29.0/165)) > 1e-12 {
		t.Fatalf("classic formula gives %v, recalled value −29/165", classic)
	}
	if got := Spearman(iq, tv); math.Abs(got-classic) > 1e-12 {
		t.Errorf("Spearman = %v, want %v", got, classic)
	}
	if got := Spearman([]float64{1, 1, 1}, []float64{1, 2, 3}); !math.IsNaN(got) {
		t.Errorf("constant sample: %v, want NaN", got)
	}
}

// prccByInverse computes partial rank correlations from the inverse P of
// the rank correlation matrix of (x_1 … x_p, y): ρ_{iy·rest} =
// −P_iy/√(P_ii P_yy) (from memory: the standard identity between partial
// correlations and the precision matrix; the test checks it against the
// regression computation of PartialRankCorrelation, an independent route).
func prccByInverse(x [][]float64, y []float64) []float64 {
	p := len(x)
	cols := append(append([][]float64{}, x...), y)
	r := make([][]float64, p+1)
	for i, c := range cols {
		r[i] = Ranks(c)
	}
	c := mat.NewSymDense(p+1, nil)
	for i := range p + 1 {
		for j := i; j < p+1; j++ {
			c.SetSym(i, j, stat.Correlation(r[i], r[j], nil))
		}
	}
	var inv mat.Dense
	if err := inv.Inverse(c); err != nil {
		panic(err)
	}
	out := make([]float64, p)
	for i := range p {
		out[i] = -inv.At(i, p) / math.Sqrt(inv.At(i, i)*inv.At(p, p))
	}
	return out
}

func TestPRCCMatchesPrecisionMatrix(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	const n = 500
	x := make([][]float64, 4)
	for i := range x {
		x[i] = make([]float64, n)
	}
	y := make([]float64, n)
	for r := range n {
		for i := range x {
			x[i][r] = rng.Float64()
		}
		x[2][r] += 0.5 * x[0][r] // correlated inputs
		y[r] = math.Exp(2*x[0][r]) - 3*x[1][r]*x[1][r] + 0.3*x[2][r] + 0.2*rng.NormFloat64()
	}
	got, err := PartialRankCorrelation(x, y)
	if err != nil {
		t.Fatal(err)
	}
	want := prccByInverse(x, y)
	for i := range want {
		if math.Abs(got[i]-want[i]) > 1e-10 {
			t.Errorf("PRCC[%d] = %.12f, precision-matrix route %.12f", i, got[i], want[i])
		}
	}
	// x[3] does not enter y: its PRCC is within 3 standard errors
	// (≈ 1/√n) of 0.
	if math.Abs(got[3]) > 3/math.Sqrt(n) {
		t.Errorf("irrelevant input: PRCC %.3f", got[3])
	}
	// One input: PRCC is Spearman's coefficient.
	one, err := PartialRankCorrelation(x[:1], y)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(one[0]-Spearman(x[0], y)) > 1e-12 {
		t.Errorf("one input: %v vs Spearman %v", one[0], Spearman(x[0], y))
	}
}

func TestPRCCEdgeCases(t *testing.T) {
	x := [][]float64{{1, 2, 3, 4, 5}, {2, 2, 2, 2, 2}, {5, 3, 4, 1, 2}}
	y := []float64{1, 4, 9, 16, 25} // monotone in x[0] alone
	got, err := PartialRankCorrelation(x, y)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(got[0]-1) > 1e-12 || !math.IsNaN(got[1]) {
		t.Errorf("PRCC = %v, want 1 for the driver and NaN for the constant column", got)
	}
	if _, err := PartialRankCorrelation(x, y[:3]); err == nil {
		t.Error("length mismatch: want an error")
	}
	if _, err := PartialRankCorrelation(x, []float64{1, 2, 3, 4}); err == nil {
		t.Error("too few samples: want an error")
	}
}
