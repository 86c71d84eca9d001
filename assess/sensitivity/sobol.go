package sensitivity

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"runtime"
	"slices"
	"sync"

	"gonum.org/v1/gonum/stat"
)

// DefaultReplicates is the number of bootstrap replicates when
// BootstrapOptions.Replicates is 0.
const DefaultReplicates = 1000

// BootstrapOptions controls the bootstrap intervals of Sobol.
type BootstrapOptions struct {
	// Replicates is the number of bootstrap replicates (0:
	// DefaultReplicates; negative: no intervals).
	Replicates int
	// Level is the confidence level of the intervals (0: 0.95).
	Level float64
	// Seed fixes the resampling: replicate r depends only on (Seed, r).
	Seed uint64
	// Workers is the number of goroutines (0: all cores). The result does
	// not depend on it.
	Workers int
}

// Estimate holds first-order and total Sobol' indices of k inputs with
// their bootstrap intervals. An index is NaN when the output does not vary
// over the rows used (there is no variance to apportion).
type Estimate struct {
	First, Total     []float64
	FirstCI, TotalCI [][2]float64
	// Mean and Variance are those of the output over the rows of A and B.
	Mean, Variance float64
	// Rows is the number of base rows used: those whose k+2 outputs are all
	// finite. Dropped is the number left out.
	Rows, Dropped int
	// Replicates is the number of bootstrap replicates whose variance was
	// positive (the intervals' sample).
	Replicates int
}

// Sobol estimates first-order and total Sobol' indices (Sobol' 1993,
// Mathematical Modeling and Computational Experiment 1:407) from model
// outputs on the design of Saltelli et al. (2010): fA[j] = f(A_j),
// fB[j] = f(B_j) and fAB[l][j] = f(A_B^(l)_j) for base rows j = 0…N−1 and
// inputs l = 0…k−1 (see Design). With V the variance of the 2N outputs of A
// and B and c their mean,
//
//	first order (Saltelli et al. 2010, Table 2 (b)):
//	    S_l  = (1/N) Σ_j (f(B)_j − c)·(f(A_B^(l))_j − f(A)_j) / V
//	total effect (Jansen 1999, Computer Physics Communications 117:35;
//	Saltelli et al. 2010, Table 2 (f)):
//	    ST_l = (1/(2N)) Σ_j (f(A)_j − f(A_B^(l))_j)² / V
//
// Centring f(B) by c leaves the first-order estimator's expectation
// unchanged (E f(A_B^(l)) = E f(A)) and removes the output mean's
// contribution to its variance (common practice, no source).
//
// Rows with a non-finite output in any of their k+2 runs are left out
// (Estimate.Dropped); at least 2 complete rows are needed.
//
// The intervals are bootstrap percentile intervals (Efron & Tibshirani,
// An Introduction to the Bootstrap, 1993, ch. 13) over the base rows, as
// Archer, Saltelli & Sobol' (1997, J. Statist. Comput. Simul. 58:99)
// propose for these indices: each replicate resamples N rows with
// replacement, keeping each row's k+2 outputs together. With a
// quasi-random base the rows are not independent, and the intervals
// describe the spread of plain Monte Carlo estimates of the same size,
// which is wider than that of the quasi-random estimate (conservative).
func Sobol(fA, fB []float64, fAB [][]float64, opt BootstrapOptions) (*Estimate, error) {
	n, k := len(fA), len(fAB)
	if len(fB) != n {
		return nil, fmt.Errorf("sobol: %d outputs of A but %d of B", n, len(fB))
	}
	if k == 0 {
		return nil, errors.New("sobol: no mixed matrices (no inputs)")
	}
	y := make([]float64, n*(k+2))
	for l, col := range fAB {
		if len(col) != n {
			return nil, fmt.Errorf("sobol: %d outputs of A_B^(%d), want %d", len(col), l+1, n)
		}
	}
	for j := range n {
		r := y[j*(k+2) : (j+1)*(k+2)]
		r[0], r[1] = fA[j], fB[j]
		for l := range k {
			r[2+l] = fAB[l][j]
		}
	}
	return sobolRows(y, k, opt)
}

// sobolRows is Sobol on outputs in run order (row j at y[j(k+2):], roles
// as in Design).
func sobolRows(y []float64, k int, opt BootstrapOptions) (*Estimate, error) {
	w := k + 2
	if len(y)%w != 0 {
		return nil, fmt.Errorf("sobol: %d outputs is not a multiple of k+2 = %d", len(y), w)
	}
	if opt.Level == 0 {
		opt.Level = 0.95
	}
	if !(opt.Level > 0 && opt.Level < 1) {
		return nil, fmt.Errorf("sobol: confidence level must be in (0, 1), got %v", opt.Level)
	}
	if opt.Replicates == 0 {
		opt.Replicates = DefaultReplicates
	}
	// Keep complete rows only.
	rows := make([]float64, 0, len(y))
	for j := 0; j < len(y); j += w {
		r := y[j : j+w]
		if !slices.ContainsFunc(r, func(v float64) bool { return math.IsNaN(v) || math.IsInf(v, 0) }) {
			rows = append(rows, r...)
		}
	}
	n := len(rows) / w
	est := &Estimate{
		First: make([]float64, k), Total: make([]float64, k),
		FirstCI: make([][2]float64, k), TotalCI: make([][2]float64, k),
		Rows: n, Dropped: len(y)/w - n,
	}
	if n < 2 {
		return nil, fmt.Errorf("sobol: %d complete base rows, need at least 2", n)
	}
	// Mean of A and B (two-pass for accuracy).
	var c float64
	for j := range n {
		c += rows[j*w] + rows[j*w+1]
	}
	c /= float64(2 * n)
	est.Mean = c
	acc := newSobolSums(k)
	for j := range n {
		acc.add(rows[j*w:(j+1)*w], c)
	}
	est.Variance = acc.indices(n, est.First, est.Total)
	for l := range k {
		est.FirstCI[l] = [2]float64{math.NaN(), math.NaN()}
		est.TotalCI[l] = est.FirstCI[l]
	}
	if opt.Replicates < 0 || est.Variance == 0 {
		return est, nil
	}
	reps := opt.Replicates
	first := make([][]float64, k) // [l][r]
	total := make([][]float64, k)
	for l := range k {
		first[l] = make([]float64, reps)
		total[l] = make([]float64, reps)
	}
	workers := opt.Workers
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	workers = min(workers, reps)
	var wg sync.WaitGroup
	for wk := range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			acc := newSobolSums(k)
			s1, st := make([]float64, k), make([]float64, k)
			var src rand.PCG
			for r := wk; r < reps; r += workers {
				a, b := replicateSeeds(opt.Seed, uint64(r))
				src.Seed(a, b)
				rng := rand.New(&src)
				acc.reset()
				for range n {
					j := rng.IntN(n)
					acc.add(rows[j*w:(j+1)*w], c)
				}
				acc.indices(n, s1, st)
				for l := range k {
					first[l][r], total[l][r] = s1[l], st[l]
				}
			}
		}()
	}
	wg.Wait()
	lo, hi := (1-opt.Level)/2, (1+opt.Level)/2
	for l := range k {
		f := dropNaN(first[l])
		t := dropNaN(total[l])
		est.Replicates = len(f)
		if len(f) < reps/2 || len(f) < 2 {
			continue
		}
		slices.Sort(f)
		slices.Sort(t)
		est.FirstCI[l] = [2]float64{stat.Quantile(lo, stat.LinInterp, f, nil), stat.Quantile(hi, stat.LinInterp, f, nil)}
		est.TotalCI[l] = [2]float64{stat.Quantile(lo, stat.LinInterp, t, nil), stat.Quantile(hi, stat.LinInterp, t, nil)}
	}
	return est, nil
}

// sobolSums accumulates the sums of one estimate, shifted by the mean c.
type sobolSums struct {
	s1, s2 float64   // Σ (y − c), Σ (y − c)² over A and B
	fo, to []float64 // Σ (f(B) − c)(f(AB) − f(A)), Σ (f(A) − f(AB))²
}

func newSobolSums(k int) *sobolSums {
	return &sobolSums{fo: make([]float64, k), to: make([]float64, k)}
}

func (s *sobolSums) reset() {
	s.s1, s.s2 = 0, 0
	clear(s.fo)
	clear(s.to)
}

func (s *sobolSums) add(r []float64, c float64) {
	a, b := r[0]-c, r[1]-c
	s.s1 += a + b
	s.s2 += a*a + b*b
	for l, ab := range r[2:] {
		d := ab - r[0]
		s.fo[l] += b * d
		s.to[l] += d * d
	}
}

// indices fills the indices from the sums of n rows and returns the
// variance; the indices are NaN when it is 0.
func (s *sobolSums) indices(n int, first, total []float64) float64 {
	m := s.s1 / float64(2*n)
	v := s.s2/float64(2*n) - m*m
	if !(v > 0) {
		v = 0
	}
	for l := range first {
		if v == 0 {
			first[l], total[l] = math.NaN(), math.NaN()
			continue
		}
		first[l] = s.fo[l] / float64(n) / v
		total[l] = s.to[l] / float64(2*n) / v
	}
	return v
}

func dropNaN(x []float64) []float64 {
	out := make([]float64, 0, len(x))
	for _, v := range x {
		if !math.IsNaN(v) {
			out = append(out, v)
		}
	}
	return out
}

// replicateSeeds returns the PCG seed words of bootstrap replicate r: the
// pair (seed, r) hashed by the SplitMix64 finaliser (Steele, Lea & Flood,
// OOPSLA 2014), in a domain of its own.
func replicateSeeds(seed, r uint64) (uint64, uint64) {
	const domain = 0xbe5466cf34e90c6c // digits of π, continuing sample's
	h := splitmix(splitmix(seed^domain) ^ r)
	return h, splitmix(h ^ 0x9e3779b97f4a7c15)
}

func splitmix(z uint64) uint64 {
	z += 0x9e3779b97f4a7c15
	z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9
	z = (z ^ (z >> 27)) * 0x94d049bb133111eb
	return z ^ (z >> 31)
}
