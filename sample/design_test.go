package sample

import (
	"errors"
	"math"
	"reflect"
	"runtime"
	"sort"
	"sync"
	"testing"

	"gonum.org/v1/gonum/stat"
	"gonum.org/v1/gonum/stat/distuv"
)

// ranks returns the ranks 1..n of x (no ties expected for continuous data).
func ranks(x []float64) []float64 {
	idx := make([]int, len(x))
	for i := range idx {
		idx[i] = i
	}
	sort.Slice(idx, func(a, b int) bool { return x[idx[a]] < x[idx[b]] })
	r := make([]float64, len(x))
	for rank, i := range idx {
		r[i] = float64(rank + 1)
	}
	return r
}

// spearman is the Pearson correlation of the ranks (Spearman 1904), with
// gonum's stat.Correlation.
func spearman(x, y []float64) float64 {
	return stat.Correlation(ranks(x), ranks(y), nil)
}

func testParams(t *testing.T) []Param {
	must := mustFn(t)
	return []Param{
		{Name: "r", Dist: must(NewLognormalMedian(0.5, 1.3))},
		{Name: "K", Value: 100},
		{Name: "a", Dist: must(NewNormal(0, 1))},
		{Name: "b", Dist: must(NewGammaScale(2, 1))},
		{Name: "c", Dist: must(NewPERT(0, 1, 5))},
		{Name: "h", Value: -2},
		{Name: "d", Dist: must(NewUniform(0, 1))},
	}
}

// TestCopulaSpearman: the achieved Spearman correlation matches the target
// within sampling error. Reference idea: Iman & Conover (1982), rank
// correlation induced through normal scores; the conversion
// ρ = 2 sin(πρ_s/6) is Pearson's (1907) bivariate-normal relation. The
// standard error of a sample Spearman coefficient is about 1/√(n−1) under
// independence and smaller under correlation (Kendall & Stuart, from
// memory; the bound is used only as a tolerance), so 4/√n is generous.
func TestCopulaSpearman(t *testing.T) {
	const n = 20000
	corr := []Correlation{{"a", "b", 0.7}, {"c", "b", -0.4}, {"r", "d", 0.3}}
	for _, kind := range []PlanKind{Random, LHS, QMC} {
		d, err := NewDesign(testParams(t), corr, kind, n, 5)
		if err != nil {
			t.Fatal(err)
		}
		cols := make([][]float64, d.Dim())
		for j := range cols {
			cols[j] = make([]float64, n)
		}
		theta := make([]float64, d.Dim())
		for i := range n {
			d.Draw(i, theta)
			for j, v := range theta {
				cols[j][i] = v
			}
		}
		tol := 4 / math.Sqrt(n)
		col := map[string]int{"r": 0, "a": 2, "b": 3, "c": 4, "d": 6}
		check := func(x, y string, want float64) {
			if got := spearman(cols[col[x]], cols[col[y]]); math.Abs(got-want) > tol {
				t.Errorf("%v: Spearman(%s, %s) = %.4f, want %.2f ± %.3f", kind, x, y, got, want, tol)
			}
		}
		check("a", "b", 0.7)
		check("b", "c", -0.4)
		check("r", "d", 0.3)
		check("a", "d", 0)
		// a–c is implied by the normal-scale matrix: ρ_ac = 0 there, so
		// its Spearman coefficient is 0 as well.
		check("a", "c", 0)
		// Fixed parameters are constant.
		for i := range n {
			if cols[1][i] != 100 || cols[5][i] != -2 {
				t.Fatalf("%v: fixed parameters changed in draw %d", kind, i)
			}
		}
		// Marginals are untouched by the copula: KS of the correlated
		// normal "a" and gamma "b" against gonum's CDFs at α = 0.01
		// (Massey 1951).
		if D := ksStatistic(cols[2], distuv.UnitNormal.CDF); D > ksCritical01(n) {
			t.Errorf("%v: marginal of a: KS D = %.4f", kind, D)
		}
		if D := ksStatistic(cols[3], distuv.Gamma{Alpha: 2, Beta: 1}.CDF); D > ksCritical01(n) {
			t.Errorf("%v: marginal of b: KS D = %.4f", kind, D)
		}
	}
}

// TestCopulaNotPD: ρ_s = 0.9 for a–b and b–c with −0.9 for a–c has no
// joint distribution: on the normal scale ρ = 2 sin(π·0.9/6) ≈ 0.908 and
// x = (1, −1, 1) gives xᵀRx = 3 − 6ρ < 0 (derived below), so R is not
// positive definite. The error names a, b and c and not the unrelated,
// consistent pair r–d.
func TestCopulaNotPD(t *testing.T) {
	corr := []Correlation{{"r", "d", 0.5}, {"a", "b", 0.9}, {"b", "c", 0.9}, {"a", "c", -0.9}}
	_, err := NewDesign(testParams(t), corr, Random, 10, 1)
	var ce *CorrelationError
	if !errors.As(err, &ce) {
		t.Fatalf("error %v, want *CorrelationError", err)
	}
	if want := []string{"a", "b", "c"}; !reflect.DeepEqual(ce.Params, want) {
		t.Errorf("error names %v, want %v (%v)", ce.Params, want, err)
	}
	// xᵀRx = 3 + 2(x_a x_b ρ_ab + x_b x_c ρ_bc + x_a x_c ρ_ac) = 3 − 6ρ.
	rho := 2 * math.Sin(math.Pi*0.9/6)
	if q := 3 - 6*rho; q >= 0 {
		t.Errorf("xᵀRx = %g, expected negative", q)
	}
}

func TestDesignErrors(t *testing.T) {
	must := mustFn(t)
	n01 := must(NewNormal(0, 1))
	base := []Param{{Name: "a", Dist: n01}, {Name: "b", Dist: n01}, {Name: "f", Value: 1}}
	cases := []struct {
		name   string
		params []Param
		corr   []Correlation
		corrEr bool
	}{
		{"empty name", []Param{{Name: "", Dist: n01}}, nil, false},
		{"duplicate name", []Param{{Name: "a", Dist: n01}, {Name: "a", Value: 1}}, nil, false},
		{"fixed NaN", []Param{{Name: "a", Value: math.NaN()}}, nil, false},
		{"unknown", base, []Correlation{{"a", "zz", 0.1}}, true},
		{"self", base, []Correlation{{"a", "a", 0.1}}, true},
		{"fixed", base, []Correlation{{"a", "f", 0.1}}, true},
		{"rho 1", base, []Correlation{{"a", "b", 1}}, true},
		{"rho NaN", base, []Correlation{{"a", "b", math.NaN()}}, true},
		{"duplicate pair", base, []Correlation{{"a", "b", 0.1}, {"b", "a", 0.2}}, true},
	}
	for _, c := range cases {
		_, err := NewDesign(c.params, c.corr, Random, 10, 1)
		var ce *CorrelationError
		if err == nil || errors.As(err, &ce) != c.corrEr {
			t.Errorf("%s: error %v", c.name, err)
		}
	}
}

// TestDesignDeterminism: Draw(i) is the same in any order, from any
// goroutine, and equals Map of the plan's point; Draw does not allocate.
func TestDesignDeterminism(t *testing.T) {
	const n = 300
	corr := []Correlation{{"a", "b", 0.7}}
	for _, kind := range []PlanKind{Random, LHS, QMC} {
		d, err := NewDesign(testParams(t), corr, kind, n, 9)
		if err != nil {
			t.Fatal(err)
		}
		want := make([][]float64, n)
		for i := range n {
			want[i] = make([]float64, d.Dim())
			d.Draw(i, want[i])
		}
		var wg sync.WaitGroup
		bad := make(chan int, n)
		for w := range 3 {
			wg.Add(1)
			go func() {
				defer wg.Done()
				theta := make([]float64, d.Dim())
				for i := n - 1 - w; i >= 0; i -= 3 {
					d.Draw(i, theta)
					if !reflect.DeepEqual(theta, want[i]) {
						bad <- i
						return
					}
				}
			}()
		}
		wg.Wait()
		close(bad)
		for i := range bad {
			t.Errorf("%v: draw %d differs across goroutines/order", kind, i)
		}
		u := make([]float64, d.Uncertain())
		theta := make([]float64, d.Dim())
		d.Plan().Point(17, u)
		d.Map(u, theta)
		if !reflect.DeepEqual(theta, want[17]) {
			t.Errorf("%v: Map(Point(17)) = %v, Draw(17) = %v", kind, theta, want[17])
		}
		i := 0
		if a := testing.AllocsPerRun(100, func() { d.Draw(i, theta); i++ }); a != 0 {
			t.Errorf("%v: Draw allocates %v times", kind, a)
		}
	}
}

func TestNominal(t *testing.T) {
	d, err := NewDesign(testParams(t), nil, LHS, 10, 1)
	if err != nil {
		t.Fatal(err)
	}
	theta := make([]float64, d.Dim())
	d.Nominal(theta)
	// Medians: lognormal median 0.5, N(0,1) median 0, uniform(0,1) ½.
	if theta[0] != 0.5 || theta[1] != 100 || theta[2] != 0 || theta[5] != -2 || theta[6] != 0.5 {
		t.Errorf("nominal %v", theta)
	}
	if got := d.Names(); !reflect.DeepEqual(got, []string{"r", "K", "a", "b", "c", "h", "d"}) {
		t.Errorf("names %v", got)
	}
	if d.Uncertain() != 5 || d.Dim() != 7 {
		t.Errorf("Uncertain %d Dim %d", d.Uncertain(), d.Dim())
	}
}

// TestMillionDraws: a million draws stream through O(k) memory; the heap
// grows by far less than 100 MB (here: bounded at 1 MB) because nothing is
// materialised per draw (a requirement of the engine, no source).
func TestMillionDraws(t *testing.T) {
	if testing.Short() {
		t.Skip("long")
	}
	const n = 1_000_000
	d, err := NewDesign(testParams(t), []Correlation{{"a", "b", 0.5}}, QMC, n, 1)
	if err != nil {
		t.Fatal(err)
	}
	var before, after runtime.MemStats
	runtime.GC()
	runtime.ReadMemStats(&before)
	theta := make([]float64, d.Dim())
	sum := 0.0
	for i := range n {
		d.Draw(i, theta)
		sum += theta[2]
	}
	runtime.ReadMemStats(&after)
	if grown := after.TotalAlloc - before.TotalAlloc; grown > 1<<20 {
		t.Errorf("%d bytes allocated over %d draws", grown, n)
	}
	// The mean of the N(0, 1) parameter is 0 within 4 standard errors of
	// plain Monte Carlo (QMC is far better; common practice, no source).
	if m := sum / n; math.Abs(m) > 4/math.Sqrt(n) {
		t.Errorf("mean of a = %g", m)
	}
}
