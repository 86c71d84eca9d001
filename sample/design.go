package sample

import (
	"fmt"
	"math"
	"strings"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/mathext"
)

// Param describes one model parameter: drawn from Dist, or fixed at Value
// when Dist is nil.
type Param struct {
	Name  string
	Dist  Distribution
	Value float64
}

// Correlation is a target Spearman rank correlation Rho, in (−1, 1),
// between the uncertain parameters named A and B.
type Correlation struct {
	A, B string
	Rho  float64
}

// CorrelationError reports correlations that cannot be honoured. Params
// names the parameters involved, in parameter order.
type CorrelationError struct {
	Params []string
	Msg    string
}

// Error returns "correlation of a, b: msg".
func (e *CorrelationError) Error() string {
	return "correlation of " + strings.Join(e.Params, ", ") + ": " + e.Msg
}

// Design turns a draw index into a full parameter vector θ: a Plan gives a
// point of the unit cube for the uncertain parameters, a Gaussian copula
// imposes the requested rank correlations, and each marginal is sampled by
// inversion; fixed parameters keep their value. θ has one entry per Param,
// in the order given to NewDesign. Draw i depends only on (seed, i), and a
// Design is safe for concurrent use.
//
// Rank correlation uses the normal (Gaussian) copula: with z = Φ⁻¹(u) for
// the correlated coordinates, z′ = L z where L Lᵀ = R is the Cholesky
// factor of the normal-scale correlation matrix, and u′ = Φ(z′). A target
// Spearman coefficient ρ_s is converted to the normal-scale Pearson
// coefficient ρ = 2 sin(πρ_s/6), the inverse of Pearson's (1907) relation
// ρ_s = (6/π) arcsin(ρ/2) for the bivariate normal (see Kruskal 1958).
// Because rank correlation is invariant under the increasing marginal
// transforms, the target is met in expectation for continuous marginals
// (discrete marginals with ties give somewhat less). This is the
// distribution-free idea of Iman & Conover (1982) applied per draw, so it
// needs no stored sample. Correlated coordinates keep their marginal
// distributions exactly but, unlike uncorrelated ones, not the LHS or QMC
// stratification.
type Design struct {
	names []string
	dists []Distribution // per uncertain coordinate j
	idx   []int          // θ index of uncertain coordinate j (increasing)
	fixed []int          // θ indices of fixed parameters
	value []float64      // their values
	cidx  []int          // θ indices of correlated coordinates
	chol  []float64      // lower-triangular factor, row-major, len(cidx)²
	plan  *Plan
}

// NewDesign validates the parameters and correlations and returns a design
// of n draws with the given plan kind and seed. Parameter names must be
// non-empty and distinct; a fixed Value must be finite. Each correlation
// must name two different uncertain parameters, at most once per pair, with
// |Rho| < 1; the implied matrix must be positive definite, or a
// *CorrelationError names the parameters of the inconsistent block.
func NewDesign(params []Param, corr []Correlation, kind PlanKind, n int, seed uint64) (*Design, error) {
	d := &Design{names: make([]string, len(params))}
	pos := make(map[string]int, len(params))
	for t, p := range params {
		if p.Name == "" {
			return nil, fmt.Errorf("parameter %d: empty name", t+1)
		}
		if _, dup := pos[p.Name]; dup {
			return nil, fmt.Errorf("parameter %q: defined twice", p.Name)
		}
		pos[p.Name] = t
		d.names[t] = p.Name
		if p.Dist == nil {
			if math.IsNaN(p.Value) || math.IsInf(p.Value, 0) {
				return nil, fmt.Errorf("parameter %q: fixed value must be finite (got %s)", p.Name, num(p.Value))
			}
			d.fixed = append(d.fixed, t)
			d.value = append(d.value, p.Value)
			continue
		}
		d.idx = append(d.idx, t)
		d.dists = append(d.dists, p.Dist)
	}
	if err := d.correlate(params, pos, corr); err != nil {
		return nil, err
	}
	plan, err := NewPlan(kind, n, len(d.idx), seed)
	if err != nil {
		return nil, err
	}
	d.plan = plan
	return d, nil
}

// correlate builds the Cholesky factor of the normal-scale correlation
// matrix over the parameters that appear in corr.
func (d *Design) correlate(params []Param, pos map[string]int, corr []Correlation) error {
	if len(corr) == 0 {
		return nil
	}
	type pair struct{ a, b int }
	seen := map[pair]bool{}
	inSet := map[int]bool{}
	for _, c := range corr {
		names := []string{c.A, c.B}
		ta, okA := pos[c.A]
		tb, okB := pos[c.B]
		switch {
		case !okA || !okB:
			missing := c.A
			if okA {
				missing = c.B
			}
			return &CorrelationError{Params: names, Msg: fmt.Sprintf("unknown parameter %q", missing)}
		case ta == tb:
			return &CorrelationError{Params: names[:1], Msg: "a parameter cannot be correlated with itself"}
		case params[ta].Dist == nil || params[tb].Dist == nil:
			fixed := c.A
			if params[ta].Dist != nil {
				fixed = c.B
			}
			return &CorrelationError{Params: names, Msg: fmt.Sprintf("%q is fixed, not uncertain", fixed)}
		case math.IsNaN(c.Rho) || !(math.Abs(c.Rho) < 1):
			return &CorrelationError{Params: names, Msg: fmt.Sprintf("Spearman coefficient must lie strictly between -1 and 1 (got %s)", num(c.Rho))}
		}
		key := pair{min(ta, tb), max(ta, tb)}
		if seen[key] {
			return &CorrelationError{Params: names, Msg: "pair given more than once"}
		}
		seen[key] = true
		inSet[ta], inSet[tb] = true, true
	}
	for t := range params {
		if inSet[t] {
			d.cidx = append(d.cidx, t)
		}
	}
	m := len(d.cidx)
	at := make(map[int]int, m)
	for r, t := range d.cidx {
		at[t] = r
	}
	R := mat.NewSymDense(m, nil)
	for r := range m {
		R.SetSym(r, r, 1)
	}
	for _, c := range corr {
		// Pearson (1907): ρ_s = (6/π) arcsin(ρ/2) ⇔ ρ = 2 sin(πρ_s/6).
		R.SetSym(at[pos[c.A]], at[pos[c.B]], 2*math.Sin(math.Pi*c.Rho/6))
	}
	var ch mat.Cholesky
	ok := ch.Factorize(R)
	if ok {
		var L mat.TriDense
		ch.LTo(&L)
		d.chol = make([]float64, m*m)
		for r := range m {
			for c := 0; c <= r; c++ {
				d.chol[r*m+c] = L.At(r, c)
			}
		}
		for r := range m {
			if !(d.chol[r*m+r] > 1e-10) {
				ok = false
			}
		}
	}
	if !ok {
		return &CorrelationError{
			Params: d.blame(R),
			Msg:    "the requested rank correlations are inconsistent (their normal-scale matrix is not positive definite, so no joint distribution has them); weaken or remove one of them",
		}
	}
	return nil
}

// blame finds the first pivot p at which a plain Cholesky factorisation of
// R breaks down (pivot ≤ 1e-10) and returns the names of the parameters
// among the leading p+1 that are connected to p through nonzero
// correlations: the leading block up to p is not positive definite, while
// the block before p is.
func (d *Design) blame(R *mat.SymDense) []string {
	m := len(d.cidx)
	L := make([]float64, m*m)
	p := m - 1
pivots:
	for r := range m {
		for c := 0; c <= r; c++ {
			s := R.At(r, c)
			for q := range c {
				s -= L[r*m+q] * L[c*m+q]
			}
			if r == c {
				if !(s > 1e-10) {
					p = r
					break pivots
				}
				L[r*m+r] = math.Sqrt(s)
			} else {
				L[r*m+c] = s / L[c*m+c]
			}
		}
	}
	// Connected component of p in the correlation graph on 0..p.
	in := make([]bool, p+1)
	in[p] = true
	for changed := true; changed; {
		changed = false
		for a := 0; a <= p; a++ {
			for b := 0; b <= p; b++ {
				if in[a] && !in[b] && R.At(a, b) != 0 {
					in[b], changed = true, true
				}
			}
		}
	}
	var names []string
	for r := 0; r <= p; r++ {
		if in[r] {
			names = append(names, d.names[d.cidx[r]])
		}
	}
	return names
}

// Dim returns the number of parameters, the length of θ.
func (d *Design) Dim() int { return len(d.names) }

// Uncertain returns the number of uncertain parameters k, the dimension of
// the plan's unit cube.
func (d *Design) Uncertain() int { return len(d.idx) }

// Names returns the parameter names in θ order.
func (d *Design) Names() []string { return append([]string(nil), d.names...) }

// Plan returns the design's sampling plan.
func (d *Design) Plan() *Plan { return d.plan }

// Draw fills theta (length ≥ Dim()) with draw i. It does not allocate.
func (d *Design) Draw(i int, theta []float64) {
	theta = theta[:len(d.names)]
	d.plan.Point(i, theta[:len(d.idx)])
	d.mapUnit(theta[:len(d.idx)], theta)
}

// Map fills theta (length ≥ Dim()) from a point u of the open unit cube of
// dimension Uncertain(), applying the copula and the marginal quantiles; it
// is Draw without the plan, for callers that build their own unit points
// (for example the two matrices of a Saltelli sensitivity design). u may be
// theta[:Uncertain()] or not overlap theta. It does not allocate.
func (d *Design) Map(u, theta []float64) {
	theta = theta[:len(d.names)]
	d.mapUnit(u[:len(d.idx)], theta)
}

func (d *Design) mapUnit(u, theta []float64) {
	// Scatter u into θ from the last coordinate down: idx[j] ≥ j, so this
	// is safe when u aliases theta[:k].
	for j := len(d.idx) - 1; j >= 0; j-- {
		theta[d.idx[j]] = u[j]
	}
	if m := len(d.cidx); m > 0 {
		for _, t := range d.cidx {
			theta[t] = mathext.NormalQuantile(theta[t])
		}
		// z′ = L z in place, from the last row up: row r reads z_c, c ≤ r,
		// which are not yet overwritten.
		for r := m - 1; r >= 0; r-- {
			s := 0.0
			row := d.chol[r*m : r*m+r+1]
			for c, l := range row {
				s += l * theta[d.cidx[c]]
			}
			theta[d.cidx[r]] = clampOpen(0.5 * math.Erfc(-s/math.Sqrt2))
		}
	}
	for j, t := range d.idx {
		theta[t] = d.dists[j].Quantile(theta[t])
	}
	for f, t := range d.fixed {
		theta[t] = d.value[f]
	}
}

// clampOpen keeps a copula probability inside the range a plan produces,
// [2⁻⁵³, 1 − 2⁻⁵³], so that unbounded marginals stay finite.
func clampOpen(u float64) float64 {
	if u < minUnit {
		return minUnit
	}
	if u > maxUnit {
		return maxUnit
	}
	return u
}

// Nominal fills theta (length ≥ Dim()) with the nominal parameter values:
// fixed values, and the median of each uncertain parameter.
func (d *Design) Nominal(theta []float64) {
	for j, t := range d.idx {
		theta[t] = d.dists[j].Median()
	}
	for f, t := range d.fixed {
		theta[t] = d.value[f]
	}
}
