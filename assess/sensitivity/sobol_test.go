package sensitivity

import (
	"fmt"
	"math"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"
)

// onDesign evaluates f on every run of the Saltelli design of n rows and
// returns the outputs as Sobol takes them.
func onDesign(t testing.TB, n, k int, seed uint64, f func(u []float64) float64) (fA, fB []float64, fAB [][]float64) {
	t.Helper()
	d, err := NewDesign(n, k, seed)
	if err != nil {
		t.Fatal(err)
	}
	fA, fB = make([]float64, n), make([]float64, n)
	fAB = make([][]float64, k)
	for l := range fAB {
		fAB[l] = make([]float64, n)
	}
	u := make([]float64, k)
	for i := range d.Runs() {
		d.Point(i, u)
		row, role := d.Role(i)
		v := f(u)
		switch role {
		case RoleA:
			fA[row] = v
		case RoleB:
			fB[row] = v
		default:
			fAB[role-2][row] = v
		}
	}
	return fA, fB, fAB
}

// ishigami is Y = sin X1 + a sin² X2 + b X3⁴ sin X1 with Xi = π(2u_i − 1)
// ~ U(−π, π), a = 7, b = 0.1 (Ishigami & Homma 1990).
func ishigami(u []float64) float64 {
	x1, x2, x3 := math.Pi*(2*u[0]-1), math.Pi*(2*u[1]-1), math.Pi*(2*u[2]-1)
	s2 := math.Sin(x2)
	return math.Sin(x1) + 7*s2*s2 + 0.1*x3*x3*x3*x3*math.Sin(x1)
}

// ishigamiIndices derives the analytic indices. With a = 7, b = 0.1
// (Ishigami & Homma 1990), derived here:
//
//	V   = a²/8 + bπ⁴/5 + b²π⁸/18 + 1/2
//	V1  = (1 + bπ⁴/5)²/2,  V2 = a²/8,  V3 = 0,
//	V13 = b²π⁸(1/18 − 1/50) = 8b²π⁸/225 (the only interaction),
//
// each from E[X⁴] = π⁴/5, E[X⁸] = π⁸/9 for X ~ U(−π, π) and E sin² = 1/2,
// E sin⁴ = 3/8. Totals: ST1 = (V1 + V13)/V, ST2 = V2/V, ST3 = V13/V.
func ishigamiIndices() (s, st [3]float64) {
	const a, b = 7.0, 0.1
	p4, p8 := math.Pow(math.Pi, 4), math.Pow(math.Pi, 8)
	v := a*a/8 + b*p4/5 + b*b*p8/18 + 0.5
	v1 := (1 + b*p4/5) * (1 + b*p4/5) / 2
	v2 := a * a / 8
	v13 := 8 * b * b * p8 / 225
	return [3]float64{v1 / v, v2 / v, 0}, [3]float64{(v1 + v13) / v, v2 / v, v13 / v}
}

func TestIshigamiAnalyticValues(t *testing.T) {
	// REFERENCE-CHECKS.md, Ishigami & Homma (1990): S = 0.3139, 0.4424, 0;
	// ST = 0.5576, 0.4424, 0.2437 — reproduced by the derivation above.
	s, st := ishigamiIndices()
	want := [6]float64{0.3139, 0.4424, 0, 0.5576, 0.4424, 0.2437}
	got := [6]float64{s[0], s[1], s[2], st[0], st[1], st[2]}
	for i := range want {
		if math.Abs(got[i]-want[i]) > 6e-5 {
			t.Errorf("index %d: derived %.5f, published %.4f", i, got[i], want[i])
		}
	}
}

// gFunction is Sobol's g = Π (|4u_i − 2| + a_i)/(1 + a_i) (Saltelli &
// Sobol' 1995).
func gFunction(a []float64) func(u []float64) float64 {
	return func(u []float64) float64 {
		g := 1.0
		for i, ai := range a {
			g *= (math.Abs(4*u[i]-2) + ai) / (1 + ai)
		}
		return g
	}
}

// gIndices: V_i = 1/(3(1 + a_i)²), V = Π(1 + V_i) − 1, S_i = V_i/V
// (Saltelli & Sobol' 1995). Each factor has mean 1 and variance V_i, so
// the variance of the product without factor i is Π_{j≠i}(1 + V_j) − 1 and
// the total index is ST_i = V_i Π_{j≠i}(1 + V_j)/V (Homma & Saltelli 1996,
// Reliability Engineering & System Safety 52:1).
func gIndices(a []float64) (s, st []float64) {
	vi := make([]float64, len(a))
	prod := 1.0
	for i, ai := range a {
		vi[i] = 1 / (3 * (1 + ai) * (1 + ai))
		prod *= 1 + vi[i]
	}
	v := prod - 1
	for i := range a {
		s = append(s, vi[i]/v)
		st = append(st, vi[i]*prod/(1+vi[i])/v)
	}
	return s, st
}

// linear is Y = Σ c_i X_i with X_i = σ_i Φ⁻¹(u_i) independent normals:
// S_i = ST_i = c_i²σ_i² / Σ c_j²σ_j² (REFERENCE-CHECKS.md, linear model).
var (
	linC     = []float64{1, 2, -1, 0.5}
	linSigma = []float64{1, 0.5, 2, 1}
)

func linear(u []float64) float64 {
	var y float64
	for i, c := range linC {
		y += c * linSigma[i] * distuv.UnitNormal.Quantile(u[i])
	}
	return y
}

func linearIndices() (s, st []float64) {
	var v float64
	for i, c := range linC {
		v += c * c * linSigma[i] * linSigma[i]
	}
	for i, c := range linC {
		s = append(s, c*c*linSigma[i]*linSigma[i]/v)
	}
	return s, s
}

type sobolCase struct {
	name  string
	k     int
	f     func([]float64) float64
	s, st []float64
}

func sobolCases() []sobolCase {
	is, ist := ishigamiIndices()
	ga := []float64{0, 1, 4.5, 9, 99, 99}
	gs, gst := gIndices(ga)
	ls, lst := linearIndices()
	return []sobolCase{
		{"Ishigami", 3, ishigami, is[:], ist[:]},
		{"G-function", len(ga), gFunction(ga), gs, gst},
		{"linear", len(linC), linear, ls, lst},
	}
}

func TestSobolIntervalsCoverAnalyticValues(t *testing.T) {
	// At the test's base size N = 4096 every 95% bootstrap interval must
	// contain the analytic index.
	const n = 4096
	for _, c := range sobolCases() {
		fA, fB, fAB := onDesign(t, n, c.k, 3, c.f)
		est, err := Sobol(fA, fB, fAB, BootstrapOptions{Seed: 5})
		if err != nil {
			t.Fatal(err)
		}
		for l := range c.k {
			if ci := est.FirstCI[l]; !(ci[0] <= c.s[l] && c.s[l] <= ci[1]) {
				t.Errorf("%s: S%d = %.4f, interval [%.4f, %.4f] misses analytic %.4f", c.name, l+1, est.First[l], ci[0], ci[1], c.s[l])
			}
			if ci := est.TotalCI[l]; !(ci[0] <= c.st[l] && c.st[l] <= ci[1]) {
				t.Errorf("%s: ST%d = %.4f, interval [%.4f, %.4f] misses analytic %.4f", c.name, l+1, est.Total[l], ci[0], ci[1], c.st[l])
			}
		}
		if est.Rows != n || est.Dropped != 0 {
			t.Errorf("%s: rows %d dropped %d", c.name, est.Rows, est.Dropped)
		}
	}
}

func TestSobolConvergesWithBaseSize(t *testing.T) {
	// The largest error over all indices, averaged over 4 seeds, must
	// shrink as N grows: by more than 16× from N = 2⁸ to 2¹⁴ (plain Monte
	// Carlo gives about 8×, the N^(−1/2) rate; the quasi-random base does
	// better).
	for _, c := range sobolCases() {
		var errs []float64
		for _, n := range []int{1 << 8, 1 << 11, 1 << 14} {
			var sum float64
			for seed := uint64(1); seed <= 4; seed++ {
				fA, fB, fAB := onDesign(t, n, c.k, seed, c.f)
				est, err := Sobol(fA, fB, fAB, BootstrapOptions{Replicates: -1})
				if err != nil {
					t.Fatal(err)
				}
				worst := 0.0
				for l := range c.k {
					worst = math.Max(worst, math.Abs(est.First[l]-c.s[l]))
					worst = math.Max(worst, math.Abs(est.Total[l]-c.st[l]))
				}
				sum += worst
			}
			errs = append(errs, sum/4)
		}
		t.Logf("%s: mean largest error at N = 2^8, 2^11, 2^14: %.4g", c.name, errs)
		if !(errs[1] < errs[0] && errs[2] < errs[1] && errs[2] < errs[0]/16) {
			t.Errorf("%s: errors %v do not shrink with N", c.name, errs)
		}
		if errs[2] > 0.01 {
			t.Errorf("%s: error %.4f at N = 2^14", c.name, errs[2])
		}
	}
}

func TestSobolBootstrapIndependentOfWorkers(t *testing.T) {
	fA, fB, fAB := onDesign(t, 512, 3, 1, ishigami)
	var prev string
	for _, w := range []int{1, 2, 7} {
		est, err := Sobol(fA, fB, fAB, BootstrapOptions{Seed: 9, Workers: w, Replicates: 200})
		if err != nil {
			t.Fatal(err)
		}
		got := fmt.Sprint(est.FirstCI, est.TotalCI)
		if prev != "" && got != prev {
			t.Errorf("workers %d: intervals %s differ from %s", w, got, prev)
		}
		prev = got
	}
}

func TestSobolDropsIncompleteRows(t *testing.T) {
	// A NaN in any run of a row drops the whole row; the rest is the same
	// estimate as without that row.
	fA, fB, fAB := onDesign(t, 256, 3, 1, ishigami)
	fAB[1][10] = math.NaN()
	est, err := Sobol(fA, fB, fAB, BootstrapOptions{Replicates: -1})
	if err != nil {
		t.Fatal(err)
	}
	if est.Rows != 255 || est.Dropped != 1 {
		t.Fatalf("rows %d dropped %d, want 255 and 1", est.Rows, est.Dropped)
	}
	del := func(x []float64) []float64 { return append(append([]float64(nil), x[:10]...), x[11:]...) }
	ref, err := Sobol(del(fA), del(fB), [][]float64{del(fAB[0]), del(fAB[1]), del(fAB[2])}, BootstrapOptions{Replicates: -1})
	if err != nil {
		t.Fatal(err)
	}
	for l := range 3 {
		if est.First[l] != ref.First[l] || est.Total[l] != ref.Total[l] {
			t.Errorf("input %d: %v/%v vs %v/%v", l, est.First[l], est.Total[l], ref.First[l], ref.Total[l])
		}
	}
}

func TestSobolConstantOutput(t *testing.T) {
	n := 64
	one := make([]float64, n)
	for i := range one {
		one[i] = 1
	}
	est, err := Sobol(one, one, [][]float64{one, one}, BootstrapOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if est.Variance != 0 || !math.IsNaN(est.First[0]) || !math.IsNaN(est.TotalCI[1][0]) {
		t.Errorf("constant output: %+v", est)
	}
	if _, err := Sobol(one[:1], one[:1], [][]float64{one[:1]}, BootstrapOptions{}); err == nil {
		t.Error("one row: want an error")
	}
	if _, err := Sobol(one, one[:3], [][]float64{one}, BootstrapOptions{}); err == nil {
		t.Error("length mismatch: want an error")
	}
}

func TestDesignMixesColumns(t *testing.T) {
	// Saltelli et al. (2010) §3: A_B^(l) is A with column l from B.
	const n, k = 8, 3
	d, err := NewDesign(n, k, 2)
	if err != nil {
		t.Fatal(err)
	}
	if d.Runs() != n*(k+2) {
		t.Fatalf("runs %d", d.Runs())
	}
	a, b, ab := make([]float64, k), make([]float64, k), make([]float64, k)
	for row := range n {
		d.Point(row*(k+2)+RoleA, a)
		d.Point(row*(k+2)+RoleB, b)
		for l := range k {
			d.Point(row*(k+2)+2+l, ab)
			for c := range k {
				want := a[c]
				if c == l {
					want = b[c]
				}
				if ab[c] != want {
					t.Errorf("row %d, A_B^(%d) column %d = %v, want %v", row, l, c, ab[c], want)
				}
			}
		}
		for c := range k {
			if a[c] == b[c] || !(a[c] > 0 && a[c] < 1) {
				t.Errorf("row %d column %d: A %v, B %v", row, c, a[c], b[c])
			}
		}
	}
	// The first 2^m rows of A are balanced: one point per stratum of width
	// 1/n in every column (the (0, m, s)-net property of the Sobol' points).
	for c := range k {
		seen := make([]bool, n)
		for row := range n {
			d.Point(row*(k+2), a)
			s := int(a[c] * n)
			if seen[s] {
				t.Errorf("column %d: stratum %d holds two points", c, s)
			}
			seen[s] = true
		}
	}
	if _, err := NewDesign(1, 3, 0); err == nil {
		t.Error("1 row: want an error")
	}
	if _, err := NewDesign(8, 0, 0); err == nil {
		t.Error("no inputs: want an error")
	}
}
