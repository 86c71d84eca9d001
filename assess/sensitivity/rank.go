package sensitivity

import (
	"cmp"
	"errors"
	"fmt"
	"math"
	"slices"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat"
)

// Ranks returns the ranks 1…n of x in ascending order, ties sharing the
// mean of the ranks they span (midranks; Kendall & Gibbons, Rank
// Correlation Methods, 5th ed., 1990). x must not hold NaN.
func Ranks(x []float64) []float64 {
	n := len(x)
	type pair struct {
		v float64
		i int
	}
	p := make([]pair, n)
	for i, v := range x {
		p[i] = pair{v, i}
	}
	// Equal values get equal ranks, so the sort need not be stable.
	slices.SortFunc(p, func(a, b pair) int { return cmp.Compare(a.v, b.v) })
	r := make([]float64, n)
	for i := 0; i < n; {
		j := i + 1
		for j < n && p[j].v == p[i].v {
			j++
		}
		// Positions i…j−1 hold equal values: ranks i+1…j, mean (i+1+j)/2.
		mid := float64(i+1+j) / 2
		for _, q := range p[i:j] {
			r[q.i] = mid
		}
		i = j
	}
	return r
}

// Spearman returns Spearman's rank correlation coefficient of x and y
// (Spearman 1904): Pearson's correlation of their midranks, which is the
// tie-corrected coefficient (Kendall & Gibbons 1990). It is NaN when
// either sample is constant or the lengths differ or are below 2.
func Spearman(x, y []float64) float64 {
	if len(x) != len(y) || len(x) < 2 {
		return math.NaN()
	}
	rx, ry := Ranks(x), Ranks(y)
	if constant(rx) || constant(ry) {
		return math.NaN()
	}
	return stat.Correlation(rx, ry, nil)
}

func constant(x []float64) bool {
	for _, v := range x {
		if v != x[0] {
			return false
		}
	}
	return true
}

// PartialRankCorrelation returns the partial rank correlation coefficient
// (PRCC) of each input column x[i] with the output y: the correlation of
// the residuals left when the ranks of x[i] and the ranks of y are each
// regressed by least squares on the ranks of all other inputs (Iman &
// Conover 1980, Communications in Statistics A 9:1749). It measures the
// monotone association of x[i] and y with the linear effect of the other
// inputs on both removed. The regressions use the QR factorisation of gonum/mat.
//
// Every column must have len(y) values; n = len(y) must exceed the number
// of columns plus one. A coefficient is NaN when its column or y is
// constant, or when the other columns explain its ranks completely;
// constant columns are left out of the other coefficients' regressions.
func PartialRankCorrelation(x [][]float64, y []float64) ([]float64, error) {
	p, n := len(x), len(y)
	for i, c := range x {
		if len(c) != n {
			return nil, fmt.Errorf("prcc: input %d has %d values, output %d", i+1, len(c), n)
		}
	}
	if p == 0 {
		return nil, errors.New("prcc: no inputs")
	}
	if n < p+2 {
		return nil, fmt.Errorf("prcc: %d samples for %d inputs, need at least %d", n, p, p+2)
	}
	ranks := make([][]float64, p+1)
	for i, c := range x {
		ranks[i] = centred(Ranks(c))
	}
	ranks[p] = centred(Ranks(y))
	return prccRanks(ranks), nil
}

// prccRanks is PartialRankCorrelation on centred ranks: the inputs' in
// ranks[:p], the output's in ranks[p].
func prccRanks(ranks [][]float64) []float64 {
	p := len(ranks) - 1
	n := len(ranks[p])
	out := make([]float64, p)
	flat := make([]bool, p+1)
	for i, r := range ranks {
		flat[i] = constant(r)
	}
	ey, ex := make([]float64, n), make([]float64, n)
	for i := range p {
		if flat[i] || flat[p] {
			out[i] = math.NaN()
			continue
		}
		// Design: the centred ranks of the other non-constant inputs
		// (centring stands in for the intercept).
		var others []int
		for q := range p {
			if q != i && !flat[q] {
				others = append(others, q)
			}
		}
		if len(others) == 0 {
			copy(ex, ranks[i])
			copy(ey, ranks[p])
		} else {
			z := mat.NewDense(n, len(others), nil)
			for col, q := range others {
				for r := range n {
					z.Set(r, col, ranks[q][r])
				}
			}
			var qr mat.QR
			qr.Factorize(z)
			if c := qr.Cond(); math.IsInf(c, 0) || c > 1e12 {
				out[i] = math.NaN()
				continue
			}
			if !residual(&qr, z, ranks[i], ex) || !residual(&qr, z, ranks[p], ey) {
				out[i] = math.NaN()
				continue
			}
		}
		var sxy, sxx, syy float64
		for r := range n {
			sxy += ex[r] * ey[r]
			sxx += ex[r] * ex[r]
			syy += ey[r] * ey[r]
		}
		// Residuals at rounding level mean the ranks are fully explained.
		if !(sxx > 1e-18*float64(n*n*n)) || !(syy > 1e-18*float64(n*n*n)) {
			out[i] = math.NaN()
			continue
		}
		out[i] = sxy / math.Sqrt(sxx*syy)
	}
	return out
}

// residual stores b − Z β̂ in e, β̂ the least-squares solution.
func residual(qr *mat.QR, z *mat.Dense, b, e []float64) bool {
	n, _ := z.Dims()
	bv := mat.NewVecDense(n, slices.Clone(b))
	var beta mat.VecDense
	if err := qr.SolveVecTo(&beta, false, bv); err != nil {
		return false
	}
	var fit mat.VecDense
	fit.MulVec(z, &beta)
	for r := range n {
		e[r] = b[r] - fit.AtVec(r)
	}
	return true
}

// centred subtracts the mean from x in place and returns it.
func centred(x []float64) []float64 {
	m := stat.Mean(x, nil)
	for i := range x {
		x[i] -= m
	}
	return x
}
