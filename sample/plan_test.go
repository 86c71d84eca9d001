package sample

import (
	"math"
	"math/bits"
	"sync"
	"testing"
)

func TestParsePlan(t *testing.T) {
	for _, k := range []PlanKind{Random, LHS, QMC} {
		got, err := ParsePlan(k.String())
		if err != nil || got != k {
			t.Errorf("ParsePlan(%q) = %v, %v", k.String(), got, err)
		}
	}
	if _, err := ParsePlan("sobol"); err == nil {
		t.Error("ParsePlan(sobol): no error")
	}
	for _, c := range []struct {
		kind PlanKind
		n, k int
	}{{Random, 0, 1}, {LHS, 10, -1}, {QMC, 10, MaxQMCDim + 1}, {PlanKind(9), 10, 1}} {
		if _, err := NewPlan(c.kind, c.n, c.k, 1); err == nil {
			t.Errorf("NewPlan(%v, %d, %d): no error", c.kind, c.n, c.k)
		}
	}
}

// TestOpenUnitCube: every coordinate of every plan lies in (0, 1).
func TestOpenUnitCube(t *testing.T) {
	if openUnit(0) <= 0 || openUnit(math.MaxUint64) >= 1 {
		t.Fatalf("openUnit range [%g, %g]", openUnit(0), openUnit(math.MaxUint64))
	}
	for _, kind := range []PlanKind{Random, LHS, QMC} {
		p, err := NewPlan(kind, 3000, 7, 42)
		if err != nil {
			t.Fatal(err)
		}
		u := make([]float64, 7)
		for i := range 3000 {
			p.Point(i, u)
			for j, v := range u {
				if !(v > 0 && v < 1) {
					t.Fatalf("%v: point %d coordinate %d = %g", kind, i, j, v)
				}
			}
		}
	}
}

// TestLHSStrata: each of the n equal-probability strata of every marginal
// holds exactly one of the n points (McKay, Beckman & Conover 1979), for
// every replicate of n points.
func TestLHSStrata(t *testing.T) {
	for _, n := range []int{1, 2, 3, 7, 64, 100, 1000, 4097} {
		const k = 5
		p, err := NewPlan(LHS, n, k, uint64(n))
		if err != nil {
			t.Fatal(err)
		}
		u := make([]float64, k)
		for rep := range 2 {
			hit := make([][]bool, k)
			for j := range hit {
				hit[j] = make([]bool, n)
			}
			for i := rep * n; i < (rep+1)*n; i++ {
				p.Point(i, u)
				for j, v := range u {
					s := int(v * float64(n))
					if hit[j][s] {
						t.Fatalf("n=%d replicate %d: coordinate %d, stratum %d holds two points", n, rep, j, s)
					}
					hit[j][s] = true
				}
			}
		}
	}
}

// TestLHSPermutationsDiffer: the strata orders of different coordinates
// and seeds are not the same permutation (a pseudo-randomness smoke check,
// common practice, no source).
func TestLHSPermutationsDiffer(t *testing.T) {
	const n = 1000
	p1, _ := NewPlan(LHS, n, 2, 1)
	p2, _ := NewPlan(LHS, n, 2, 2)
	u1, u2 := make([]float64, 2), make([]float64, 2)
	same01, sameSeed := 0, 0
	for i := range n {
		p1.Point(i, u1)
		p2.Point(i, u2)
		if int(u1[0]*n) == int(u1[1]*n) {
			same01++
		}
		if int(u1[0]*n) == int(u2[0]*n) {
			sameSeed++
		}
	}
	// A random permutation has about one fixed point relative to another.
	if same01 > 10 || sameSeed > 10 {
		t.Errorf("coordinates agree on %d strata, seeds on %d (of %d)", same01, sameSeed, n)
	}
}

// TestSobolNets: the first 2^m points of an Owen-scrambled Sobol' sequence
// put exactly one point in each interval [s/2^m, (s+1)/2^m) of every
// coordinate, and coordinates 1 and 2 form a (0, m, 2)-net: exactly one
// point in every elementary box of area 2^−m (Sobol' 1967; Niederreiter,
// Random Number Generation and Quasi-Monte Carlo Methods, 1992, ch. 4).
// Owen scrambling preserves both properties (Owen 1995).
func TestSobolNets(t *testing.T) {
	const m = 10
	const n = 1 << m
	p, err := NewPlan(QMC, n, MaxQMCDim, 7)
	if err != nil {
		t.Fatal(err)
	}
	pts := make([][]float64, n)
	for i := range pts {
		pts[i] = make([]float64, MaxQMCDim)
		p.Point(i, pts[i])
	}
	for j := range MaxQMCDim {
		hit := make([]bool, n)
		for i := range pts {
			s := int(pts[i][j] * n)
			if hit[s] {
				t.Fatalf("coordinate %d: interval %d/%d holds two points", j, s, n)
			}
			hit[s] = true
		}
	}
	for m1 := 0; m1 <= m; m1++ {
		m2 := m - m1
		hit := make(map[[2]int]bool, n)
		for i := range pts {
			box := [2]int{int(pts[i][0] * float64(int(1)<<m1)), int(pts[i][1] * float64(int(1)<<m2))}
			if hit[box] {
				t.Fatalf("boxes 2^-%d × 2^-%d: box %v holds two points", m1, m2, box)
			}
			hit[box] = true
		}
	}
}

// TestJoeKuoTable checks the transcribed direction-number table
// structurally: each row's polynomial x^s + a₁x^(s−1) + … + a_(s−1)x + 1 is
// primitive over GF(2) (its root has multiplicative order 2^s − 1), the
// rows list, for every degree the table covers completely, all primitive
// polynomials of that degree in increasing order of a (Joe & Kuo 2008, §3,
// use them in that order), and every m_i is odd and below 2^i (Bratley &
// Fox 1988). The count of primitive polynomials of degree s is
// φ(2^s − 1)/s (Lidl & Niederreiter, Finite Fields, Thm 3.5), computed
// here rather than recalled.
func TestJoeKuoTable(t *testing.T) {
	byDegree := map[int][]uint64{}
	for r, row := range joeKuo {
		s, a, _, err := parseJoeKuo(row)
		if err != nil {
			t.Fatalf("row %d: %v", r, err)
		}
		if !primitiveGF2(s, a) {
			t.Errorf("row %d (dimension %d): polynomial s=%d a=%d is not primitive", r, r+2, s, a)
		}
		byDegree[s] = append(byDegree[s], a)
	}
	last := len(joeKuo) - 1
	lastDegree, _, _, _ := parseJoeKuo(joeKuo[last])
	for s := 1; s <= lastDegree; s++ {
		var all []uint64
		for a := uint64(0); a < 1<<(s-1); a++ {
			if primitiveGF2(s, a) {
				all = append(all, a)
			}
		}
		if want := eulerPhi(1<<s-1) / uint64(s); uint64(len(all)) != want {
			t.Fatalf("degree %d: found %d primitive polynomials, φ(2^s−1)/s = %d", s, len(all), want)
		}
		got := byDegree[s]
		if s < lastDegree && len(got) != len(all) {
			t.Errorf("degree %d: table has %d polynomials, want all %d", s, len(got), len(all))
		}
		for i := range got {
			if got[i] != all[i] {
				t.Errorf("degree %d: polynomial %d is a=%d, want a=%d", s, i, got[i], all[i])
				break
			}
		}
	}
}

// primitiveGF2 reports whether x^s + Σ a_k x^(s−k) + 1 (a_k the bits of a,
// a₁ most significant) is primitive: x has order exactly 2^s − 1 modulo it.
func primitiveGF2(s int, a uint64) bool {
	poly := uint64(1)<<s | a<<1 | 1
	mul := func(x, y uint64) uint64 {
		var r uint64
		for ; y != 0; y >>= 1 {
			if y&1 != 0 {
				r ^= x
			}
			x <<= 1
			if x>>s&1 != 0 {
				x ^= poly
			}
		}
		return r
	}
	pow := func(e uint64) uint64 {
		r, b := uint64(1), uint64(2)
		if s == 1 {
			b = 1 // x ≡ 1 mod (x + 1)
		}
		for ; e != 0; e >>= 1 {
			if e&1 != 0 {
				r = mul(r, b)
			}
			b = mul(b, b)
		}
		return r
	}
	order := uint64(1)<<s - 1
	if pow(order) != 1 {
		return false
	}
	for _, q := range primeFactors(order) {
		if pow(order/q) == 1 {
			return false
		}
	}
	return true
}

func primeFactors(n uint64) []uint64 {
	var f []uint64
	for q := uint64(2); q*q <= n; q++ {
		if n%q == 0 {
			f = append(f, q)
			for n%q == 0 {
				n /= q
			}
		}
	}
	if n > 1 {
		f = append(f, n)
	}
	return f
}

func eulerPhi(n uint64) uint64 {
	r := n
	for _, q := range primeFactors(n) {
		r = r / q * (q - 1)
	}
	return r
}

// TestSobolFirstPoints checks the unscrambled construction against points
// derived by hand from the direction numbers: coordinate 2 has m = (1, 3),
// polynomial x + 1, so v₁ = 1/2, v₂ = 3/4, v₃ = v₁ ⊕ v₁/2 = 1/2 ⊕ 1/4 … and
// point i is the XOR of v_b over the set bits of i (Bratley & Fox 1988);
// the first points in natural order are (0,0), (1/2,1/2), (1/4,3/4),
// (3/4,1/4), (1/8,5/8) (the same point set as the Gray-code order of
// Antonov & Saleev 1979 for every power-of-two prefix).
func TestSobolFirstPoints(t *testing.T) {
	var v0, v1 [32]uint32
	if err := sobolDirections(0, &v0); err != nil {
		t.Fatal(err)
	}
	if err := sobolDirections(1, &v1); err != nil {
		t.Fatal(err)
	}
	want := [][2]float64{{0, 0}, {0.5, 0.5}, {0.25, 0.75}, {0.75, 0.25}, {0.125, 0.625}}
	for i, w := range want {
		x := float64(sobolCoord(&v0, uint64(i))) * 0x1p-32
		y := float64(sobolCoord(&v1, uint64(i))) * 0x1p-32
		if x != w[0] || y != w[1] {
			t.Errorf("point %d = (%g, %g), want %v", i, x, y, w)
		}
	}
}

// TestQMCBeatsRandom: on the smooth integrand Π 2u_j, whose integral over
// the unit cube is 1, scrambled Sobol' points give a much smaller error
// than plain Monte Carlo (common practice, no source; Owen 1997 gives the
// O(n^(−3/2+ε)) RMSE of scrambled nets for smooth integrands). On the
// additive integrand Σ u_j (integral k/2) Latin hypercube sampling removes
// the main effects, the whole variance here (McKay, Beckman & Conover 1979;
// Stein 1987), so it too is far more accurate than random sampling.
func TestQMCBeatsRandom(t *testing.T) {
	const n, k, reps = 4096, 5, 20
	integrands := []struct {
		name  string
		f     func([]float64) float64
		exact float64
	}{
		{"product", func(u []float64) float64 {
			f := 1.0
			for _, v := range u {
				f *= 2 * v
			}
			return f
		}, 1},
		{"sum", func(u []float64) float64 {
			f := 0.0
			for _, v := range u {
				f += v
			}
			return f
		}, k / 2.0},
	}
	u := make([]float64, k)
	rmse := map[string]float64{}
	for _, g := range integrands {
		for _, kind := range []PlanKind{Random, LHS, QMC} {
			ss := 0.0
			for r := range reps {
				p, _ := NewPlan(kind, n, k, uint64(1000+r))
				sum := 0.0
				for i := range n {
					p.Point(i, u)
					sum += g.f(u)
				}
				e := sum/n - g.exact
				ss += e * e
			}
			rmse[g.name+" "+kind.String()] = math.Sqrt(ss / reps)
		}
	}
	t.Logf("RMSE %v", rmse)
	if !(rmse["product qmc"] < rmse["product random"]/10) {
		t.Errorf("product: QMC RMSE %.3g not 10× below random %.3g", rmse["product qmc"], rmse["product random"])
	}
	if !(rmse["sum lhs"] < rmse["sum random"]/10) {
		t.Errorf("sum: LHS RMSE %.3g not 10× below random %.3g", rmse["sum lhs"], rmse["sum random"])
	}
}

// TestRandomPlanUniform: one coordinate of the random plan passes the KS
// test against U(0, 1) at α = 0.01 (Massey 1951).
func TestRandomPlanUniform(t *testing.T) {
	const n = 5000
	p, _ := NewPlan(Random, n, 3, 9)
	u := make([]float64, 3)
	for j := range 3 {
		x := make([]float64, n)
		for i := range x {
			p.Point(i, u)
			x[i] = u[j]
		}
		if D := ksStatistic(x, func(v float64) float64 { return v }); D > ksCritical01(n) {
			t.Errorf("coordinate %d: KS D = %.4f > %.4f", j, D, ksCritical01(n))
		}
	}
}

// TestDeterminism: Point(i) does not depend on call order or goroutine,
// and Stream(seed, i) is reproducible, while neighbouring indices and
// seeds differ.
func TestDeterminism(t *testing.T) {
	const n, k = 500, 4
	for _, kind := range []PlanKind{Random, LHS, QMC} {
		p, _ := NewPlan(kind, n, k, 3)
		fwd := make([][]float64, n)
		for i := range n {
			fwd[i] = make([]float64, k)
			p.Point(i, fwd[i])
		}
		u := make([]float64, k)
		for i := n - 1; i >= 0; i-- {
			p.Point(i, u)
			for j := range u {
				if u[j] != fwd[i][j] {
					t.Fatalf("%v: point %d differs in reverse order", kind, i)
				}
			}
		}
		var wg sync.WaitGroup
		errs := make(chan int, n)
		for w := range 4 {
			wg.Add(1)
			go func() {
				defer wg.Done()
				v := make([]float64, k)
				for i := w; i < n; i += 4 {
					p.Point(i, v)
					for j := range v {
						if v[j] != fwd[i][j] {
							errs <- i
							return
						}
					}
				}
			}()
		}
		wg.Wait()
		close(errs)
		for i := range errs {
			t.Errorf("%v: point %d differs under concurrency", kind, i)
		}
		q, _ := NewPlan(kind, n, k, 4)
		q.Point(0, u)
		if u[0] == fwd[0][0] {
			t.Errorf("%v: seeds 3 and 4 give the same first coordinate", kind)
		}
	}

	a, b := Stream(11, 5), Stream(11, 5)
	for range 10 {
		if a.Uint64() != b.Uint64() {
			t.Fatal("Stream(11, 5) not reproducible")
		}
	}
	// Neighbouring streams: their first outputs agree in about half the bits
	// (SplitMix64 avalanche; common practice, no source).
	for i := range 100 {
		x, y := Stream(11, i).Uint64(), Stream(11, i+1).Uint64()
		if d := bits.OnesCount64(x ^ y); d < 10 || d > 54 {
			t.Errorf("Stream(11, %d) and (11, %d) differ in only %d bits", i, i+1, d)
		}
	}
}

// TestPointAllocs: Point does not allocate.
func TestPointAllocs(t *testing.T) {
	for _, kind := range []PlanKind{Random, LHS, QMC} {
		p, _ := NewPlan(kind, 1000, 6, 1)
		u := make([]float64, 6)
		i := 0
		if a := testing.AllocsPerRun(100, func() { p.Point(i, u); i++ }); a != 0 {
			t.Errorf("%v: %v allocations per Point", kind, a)
		}
	}
}
