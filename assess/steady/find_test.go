package steady

import (
	"errors"
	"math"
	"math/rand/v2"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// want is one expected equilibrium. NaN fields are not checked.
type want struct {
	x     float64
	cls   Class
	order int
	side  Side
	slope float64
}

func near(a, b, tol float64) bool { return math.Abs(a-b) <= tol }

// checkEquilibria compares res with ws: same count, x within tol (0 means
// the documented root tolerance 1e-12·|x| + 1e-12·(hi − lo)), class, order,
// side and slope (relative 1e-9 or absolute 1e-12).
func checkEquilibria(t *testing.T, res *Result, ws []want, tol float64) {
	t.Helper()
	tolAt := func(x float64) float64 {
		if tol > 0 {
			return tol
		}
		return 1e-12*math.Abs(x) + 1e-12*(res.Hi-res.Lo)
	}
	if len(res.Equilibria) != len(ws) {
		t.Fatalf("found %d equilibria %v, want %d %v", len(res.Equilibria), xs(res), len(ws), ws)
	}
	for i, w := range ws {
		q := res.Equilibria[i]
		if !near(q.X, w.x, tolAt(w.x)) {
			t.Errorf("equilibrium %d at %.15g, want %.15g ± %g", i, q.X, w.x, tolAt(w.x))
		}
		if q.Class != w.cls || q.AttractsFrom != w.side {
			t.Errorf("equilibrium %d at %.10g: %v from %q, want %v from %q", i, q.X, q.Class, q.AttractsFrom, w.cls, w.side)
		}
		if w.order >= 0 && q.Order != w.order {
			t.Errorf("equilibrium %d at %.10g: order %d, want %d", i, q.X, q.Order, w.order)
		}
		if !math.IsNaN(w.slope) && !near(q.Slope, w.slope, 1e-9*math.Abs(w.slope)+1e-12) {
			t.Errorf("equilibrium %d at %.10g: slope %.15g, want %.15g", i, q.X, q.Slope, w.slope)
		}
	}
	for _, w := range res.Warnings {
		t.Errorf("unexpected warning: %s", w)
	}
}

func xs(res *Result) []float64 {
	var out []float64
	for _, q := range res.Equilibria {
		out = append(out, q.X)
	}
	return out
}

func mustFind(t *testing.T, f Func, lo, hi float64) *Result {
	t.Helper()
	res, err := Find(f, lo, hi, DefaultOptions())
	if err != nil {
		t.Fatal(err)
	}
	return res
}

// lambertW solves w e^w = z by Halley's iteration from w0 (independent of
// the package; used for the Semenov roots θ = −W(−δ)).
func lambertW(z, w0 float64) float64 {
	w := w0
	for i := 0; i < 100; i++ {
		ew := math.Exp(w)
		f := w*ew - z
		dw := f / (ew*(w+1) - (w+2)*f/(2*w+2))
		w -= dw
		if math.Abs(dw) < 1e-16*math.Max(1, math.Abs(w)) {
			break
		}
	}
	return w
}

// realRoots returns the sorted real eigenvalues in [lo, hi] of the
// companion matrix of the monic polynomial x^n + a[n−1] x^(n−1) + … + a[0]
// (gonum mat.Eigen), with imaginary parts below imTol.
func realRoots(t *testing.T, a []float64, lo, hi, imTol float64) []float64 {
	t.Helper()
	n := len(a)
	c := mat.NewDense(n, n, nil)
	for i := 1; i < n; i++ {
		c.Set(i, i-1, 1)
	}
	for i := 0; i < n; i++ {
		c.Set(i, n-1, -a[i])
	}
	var eig mat.Eigen
	if !eig.Factorize(c, mat.EigenNone) {
		t.Fatal("companion eigen-decomposition failed")
	}
	var out []float64
	for _, v := range eig.Values(nil) {
		if math.Abs(imag(v)) <= imTol && real(v) >= lo && real(v) <= hi {
			out = append(out, real(v))
		}
	}
	slices.Sort(out)
	return out
}

// monic divides p by its leading coefficient and drops it.
func monic(p poly) []float64 {
	n := len(p) - 1
	a := make([]float64, n)
	for i := range a {
		a[i] = p[i] / p[n]
	}
	return a
}

// lakeFold returns the fold point P of the shallow-lake law on the branch
// (lo, hi) of 2P/(1+P²)² = b, by bisection (f' = 0).
func lakeFold(b, lo, hi float64) float64 {
	g := func(p float64) float64 { return 2*p/((1+p*p)*(1+p*p)) - b }
	glo := g(lo)
	for i := 0; i < 200; i++ {
		m := 0.5 * (lo + hi)
		if (g(m) > 0) == (glo > 0) {
			lo = m
		} else {
			hi = m
		}
	}
	return 0.5 * (lo + hi)
}

func TestTextbookLaws(t *testing.T) {
	nan := math.NaN()
	// Schaefer (1954): x* = K/2 (1 ± sqrt(1 − 4H/(rK))), f'(x) = r(1 − 2x/K).
	r, K, H := 1.0, 1.0, 0.16
	hLo := K / 2 * (1 - math.Sqrt(1-4*H/(r*K)))
	hHi := K / 2 * (1 + math.Sqrt(1-4*H/(r*K)))
	// Semenov (1928): θ = δ e^θ ⇔ θ = −W(−δ); lower branch W0, upper W−1;
	// f'(θ*) = δ e^θ* − 1 = θ* − 1.
	sLo := -lambertW(-0.2, -0.3)
	sHi := -lambertW(-0.2, -3)
	// Carpenter, Ludwig & Brock (1999): f = 0 ⇔ −bP³ + (a+1)P² − bP + a = 0;
	// f'(P) = −b + 2P/(1+P²)².
	la, lb := 0.06, 0.52
	lakeRoots := realRoots(t, []float64{-la / lb, 1, -(la + 1) / lb}, 0, 3, 1e-12)
	lslope := func(p, b float64) float64 { return -b + 2*p/((1+p*p)*(1+p*p)) }
	// a = 0, b < 1/2: 0 and P± = (1 ± sqrt(1 − 4b²))/(2b).
	b0 := 0.45
	pm := (1 - math.Sqrt(1-4*b0*b0)) / (2 * b0)
	pp := (1 + math.Sqrt(1-4*b0*b0)) / (2 * b0)

	cases := []struct {
		name   string
		src    string
		f      Func
		lo, hi float64
		tol    float64
		want   []want
	}{
		{"logistic", "Verhulst: 0 repelling with f' = r, K attracting with f' = −r",
			logistic(0.8, 10), 0, 12, 0,
			[]want{{0, Unstable, 1, None, 0.8}, {10, Stable, 1, None, -0.8}}},
		{"harvest below fold", "Schaefer (1954): lower repelling, upper attracting",
			harvest(r, K, H), 0, 1.2, 0,
			[]want{{hLo, Unstable, 1, None, r * (1 - 2*hLo/K)}, {hHi, Stable, 1, None, r * (1 - 2*hHi/K)}}},
		{"harvest at fold", "Schaefer (1954): H = rK/4, one equilibrium at K/2 attracting from above",
			harvest(r, K, r*K/4), 0, 1.2, 1e-9,
			[]want{{K / 2, Semistable, 2, Above, nan}}},
		{"harvest above fold", "Schaefer (1954): H > rK/4, no equilibrium",
			harvest(r, K, 0.3), 0, 1.2, 0, nil},
		{"allee", "Allee effect: 0 attracting, A repelling, K attracting; f' = −r, r(1 − A/K), −r(K/A − 1)",
			allee(1, 2, 10), 0, 12, 0,
			[]want{{0, Stable, 1, None, -1}, {2, Unstable, 1, None, 0.8}, {10, Stable, 1, None, -4}}},
		{"semenov below", "Semenov (1928): δ < 1/e, lower attracting, upper repelling",
			semenov(0.2), 0, 5, 0,
			[]want{{sLo, Stable, 1, None, sLo - 1}, {sHi, Unstable, 1, None, sHi - 1}}},
		{"semenov at 1/e", "Semenov (1928); Frank-Kamenetskii (1969): δ = 1/e, θ = 1 attracting from below only",
			semenov(1 / math.E), 0, 5, 1e-7,
			[]want{{1, Semistable, 2, Below, nan}}},
		{"semenov above", "Semenov (1928): δ > 1/e, no equilibrium (thermal runaway)",
			semenov(0.4), 0, 5, 0, nil},
		{"-x^3", "Strogatz ch. 2: x' = −x³ attracting, third order decides",
			poly{0, 0, 0, -1}, -0.7, 1.3, 0, []want{{0, Stable, 3, None, 0}}},
		{"-x^3 at grid point", "Strogatz ch. 2: x' = −x³ (root on a scan point)",
			poly{0, 0, 0, -1}, -1, 1, 0, []want{{0, Stable, 3, None, 0}}},
		{"x^3", "Strogatz ch. 2: x' = x³ repelling",
			poly{0, 0, 0, 1}, -0.7, 1.3, 0, []want{{0, Unstable, 3, None, 0}}},
		{"x^2", "Strogatz ch. 2: x' = x² attracting from below only",
			poly{0, 0, 1}, -0.7, 1.3, 0, []want{{0, Semistable, 2, Below, 0}}},
		{"-x^2", "Strogatz ch. 2: x' = −x² attracting from above only (mirror image)",
			poly{0, 0, -1}, -0.7, 1.3, 0, []want{{0, Semistable, 2, Above, 0}}},
		{"x^4", "DESIGN.md rule, n = 4 even, f⁽⁴⁾ > 0: attracting from below",
			poly{0, 0, 0, 0, 1}, -0.7, 1.3, 1e-6, []want{{0, Semistable, 4, Below, nan}}},
		{"-x^5", "DESIGN.md rule, n = 5 odd, f⁽⁵⁾ < 0: attracting",
			poly{0, 0, 0, 0, 0, -1}, -0.7, 1.3, 1e-6, []want{{0, Stable, 5, None, nan}}},
		{"rx - x^3 at r = 0", "Strogatz ch. 3 (pitchfork at r = 0): attracting at 0, third order",
			poly{0, 0, 0, -1}, -0.55, 0.8, 0, []want{{0, Stable, 3, None, 0}}},
		{"x^8", "DESIGN.md: all derivatives up to order 7 vanish → degenerate",
			poly{0, 0, 0, 0, 0, 0, 0, 0, 1}, -0.7, 1.3, 1e-3, []want{{0, Degenerate, 0, None, nan}}},
		{"-x^9", "DESIGN.md: all derivatives up to order 7 vanish → degenerate",
			poly{0, 0, 0, 0, 0, 0, 0, 0, 0, -1}, -0.7, 1.3, 1e-3, []want{{0, Degenerate, 0, None, nan}}},
		{"tiny slope", "exact law 1e-12 x: hyperbolic however small f' is (no fixed 1e-9 threshold)",
			poly{0, 1e-12}, -0.7, 1.3, 0, []want{{0, Unstable, 1, None, 1e-12}}},
		{"tiny curvature", "exact law 1e-20 x²: still semistable, order 2",
			poly{0, 0, 1e-20}, -0.7, 1.3, 1e-9, []want{{0, Semistable, 2, Below, nan}}},
		{"shallow lake", "Carpenter, Ludwig & Brock (1999): three equilibria; roots of the cubic by gonum companion eigenvalues",
			lake(la, lb), 0, 3, 1e-10,
			[]want{
				{lakeRoots[0], Stable, 1, None, lslope(lakeRoots[0], lb)},
				{lakeRoots[1], Unstable, 1, None, lslope(lakeRoots[1], lb)},
				{lakeRoots[2], Stable, 1, None, lslope(lakeRoots[2], lb)},
			}},
		{"shallow lake a=0", "Carpenter, Ludwig & Brock (1999): a = 0, b < 1/2, the high state persists",
			lake(0, b0), 0, 5, 0,
			[]want{{0, Stable, 1, None, -b0}, {pm, Unstable, 1, None, lslope(pm, b0)}, {pp, Stable, 1, None, lslope(pp, b0)}}},
		{"shallow lake cusp", "Carpenter, Ludwig & Brock (1999): cusp b = 3√3/8, a = 1/8 (from f = f' = f'' = 0): triple root at 1/√3",
			lake(0.125, 3*math.Sqrt(3)/8), 0, 3, 1e-5,
			[]want{{1 / math.Sqrt(3), Stable, 3, None, nan}}},
	}
	if len(lakeRoots) != 3 {
		t.Fatalf("companion matrix gave %d lake roots, want 3", len(lakeRoots))
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			checkEquilibria(t, mustFind(t, tc.f, tc.lo, tc.hi), tc.want, tc.tol)
		})
	}
}

// TestLakeFolds: at each fold (f = 0 and f' = 0, Carpenter, Ludwig & Brock
// 1999) one equilibrium is semistable; the side follows from
// f″ = 2(1 − 3P²)/(1 + P²)³ (analytic): from below when P < 1/√3.
func TestLakeFolds(t *testing.T) {
	b := 0.52
	for _, fold := range []struct {
		name   string
		lo, hi float64
		side   Side
	}{
		{"lower fold", 0, 1 / math.Sqrt(3), Below},
		{"upper fold", 1 / math.Sqrt(3), 5, Above},
	} {
		t.Run(fold.name, func(t *testing.T) {
			p := lakeFold(b, fold.lo, fold.hi)
			a := b*p - p*p/(1+p*p)
			res := mustFind(t, lake(a, b), 0, 3)
			if len(res.Equilibria) != 2 {
				t.Fatalf("found %v, want the fold point and one simple equilibrium", xs(res))
			}
			found := false
			for _, q := range res.Equilibria {
				if near(q.X, p, 1e-6) {
					found = true
					if q.Class != Semistable || q.Order != 2 || q.AttractsFrom != fold.side {
						t.Errorf("fold at %.10g: %v order %d from %q, want semistable order 2 from %q",
							q.X, q.Class, q.Order, q.AttractsFrom, fold.side)
					}
				} else if q.Class != Stable {
					t.Errorf("simple equilibrium at %.10g is %v, want stable", q.X, q.Class)
				}
			}
			if !found {
				t.Errorf("no equilibrium near the fold %.10g: %v", p, xs(res))
			}
		})
	}
}

func TestDomainEnds(t *testing.T) {
	// Verhulst: roots 0 and K exactly at the domain ends.
	checkEquilibria(t, mustFind(t, logistic(1, 1), 0, 1),
		[]want{{0, Unstable, 1, None, 1}, {1, Stable, 1, None, -1}}, 0)
	// Only hi is a root, on a domain not aligned with the roots.
	checkEquilibria(t, mustFind(t, logistic(1, 1), 0.37, 1),
		[]want{{1, Stable, 1, None, -1}}, 0)
	// Only lo.
	checkEquilibria(t, mustFind(t, logistic(1, 1), 0, 0.61),
		[]want{{0, Unstable, 1, None, 1}}, 0)
}

func TestPolesAndUndefined(t *testing.T) {
	t.Run("pole", func(t *testing.T) {
		// 1/(x−1) − 1: pole at 1, root at 2 with f' = −1 (analytic).
		res := mustFind(t, recipShift(), 0, 3)
		checkEquilibria(t, res, []want{{2, Stable, 1, None, -1}}, 1e-11)
		if len(res.Poles) != 1 || !near(res.Poles[0], 1, 1e-9) {
			t.Errorf("poles %v, want [1]", res.Poles)
		}
		q := res.Equilibria[0]
		if !q.BasinAtSingular[0] || !near(q.Basin[0], 1, 1e-9) || q.Basin[1] != 3 || !q.BasinAtDomainEnd[1] {
			t.Errorf("basin %v at-end %v at-singular %v, want (1, 3] bounded by the pole", q.Basin, q.BasinAtDomainEnd, q.BasinAtSingular)
		}
		// Barrier to hi: −∫_2^3 (1/(x−1) − 1) dx = 1 − ln 2 (analytic).
		if !math.IsNaN(q.Barrier[0]) || !near(q.Barrier[1], 1-math.Ln2, 1e-10) {
			t.Errorf("barrier %v, want [NaN, 1 − ln 2]", q.Barrier)
		}
	})
	t.Run("log undefined below 0", func(t *testing.T) {
		// −log x: NaN for x < 0, +Inf at 0, root at 1 with f' = −1.
		res := mustFind(t, negLog(), -1, 3)
		checkEquilibria(t, res, []want{{1, Stable, 1, None, -1}}, 0)
		if len(res.Undefined) != 1 || res.Undefined[0].Lo != -1 || !near(res.Undefined[0].Hi, 0, 1e-9) {
			t.Errorf("undefined %v, want [−1, 0]", res.Undefined)
		}
		if len(res.Poles) != 0 {
			t.Errorf("poles %v, want none (the infinity at 0 bounds the undefined interval)", res.Poles)
		}
	})
	t.Run("undefined hole", func(t *testing.T) {
		// −log(x² − 1/4): undefined on (−1/2, 1/2), roots ±√(5/4);
		// f' = −2x/(x² − 1/4): +√(5/4) attracting, −√(5/4) repelling.
		f := jetFunc{
			eval: func(x float64) float64 { return -math.Log(x*x - 0.25) },
			jet:  func(x jet) jet { return x.mul(x).addc(-0.25).log().scale(-1) },
		}
		r := math.Sqrt(1.25)
		res := mustFind(t, f, -2, 2)
		checkEquilibria(t, res, []want{{-r, Unstable, 1, None, 2 * r}, {r, Stable, 1, None, -2 * r}}, 0)
		if len(res.Undefined) != 1 || !near(res.Undefined[0].Lo, -0.5, 1e-9) || !near(res.Undefined[0].Hi, 0.5, 1e-9) {
			t.Errorf("undefined %v, want [−0.5, 0.5]", res.Undefined)
		}
	})
	t.Run("nowhere defined", func(t *testing.T) {
		res := mustFind(t, negLog(), -2, -1)
		if len(res.Equilibria) != 0 || len(res.Undefined) != 1 || res.Undefined[0] != (Interval{-2, -1}) {
			t.Errorf("got %v undefined %v, want nothing and [−2, −1]", xs(res), res.Undefined)
		}
	})
}

func TestContinuum(t *testing.T) {
	// plateau: f ≡ 0 on [1, 2], 1 − x below, 2 − x above.
	res := mustFind(t, plateau{}, 0, 3)
	if len(res.Equilibria) != 1 {
		t.Fatalf("found %v, want one degenerate span", xs(res))
	}
	q := res.Equilibria[0]
	if q.Class != Degenerate || !near(q.Span[0], 1, 1e-9) || !near(q.Span[1], 2, 1e-9) || q.Note == "" {
		t.Errorf("got %v span %v note %q, want degenerate on [1, 2]", q.Class, q.Span, q.Note)
	}
	if q.Basin != [2]float64{0, 3} || q.BasinAtDomainEnd != [2]bool{true, true} {
		t.Errorf("basin %v %v, want the whole domain", q.Basin, q.BasinAtDomainEnd)
	}
	// V(0) − V(1) = ∫_0^1 (1 − x) dx = 1/2; V(3) − V(2) = −∫_2^3 (2 − x) dx = 1/2 (analytic).
	if !near(q.Barrier[0], 0.5, 1e-9) || !near(q.Barrier[1], 0.5, 1e-9) {
		t.Errorf("barrier %v, want [0.5 0.5]", q.Barrier)
	}
	// f ≡ 0 everywhere: one span, the whole domain.
	res = mustFind(t, poly{0}, -1, 2)
	if len(res.Equilibria) != 1 || res.Equilibria[0].Span != [2]float64{-1, 2} || res.Equilibria[0].Class != Degenerate {
		t.Errorf("f ≡ 0: got %+v", res.Equilibria)
	}
}

func TestClosePairs(t *testing.T) {
	// Factored form keeps the pair resolvable: both roots, the lower
	// attracting (f' = r1 − r2 < 0), the upper repelling (analytic).
	for _, d := range []float64{1e-6, 1e-8, 1e-10} {
		r1, r2 := 0.3, 0.3+d
		res := mustFind(t, factored(1, r1, r2), 0, 1)
		checkEquilibria(t, res, []want{{r1, Stable, 1, None, nan()}, {r2, Unstable, 1, None, nan()}}, 2e-12)
	}
	// Monomial form 1e-7 apart: resolvable, each root to its conditioning
	// e0/|f'| ≈ 1e-9 (analytic roots of the construction).
	res := mustFind(t, fromRoots(1, 0.3, 0.3+1e-7), 0, 1)
	checkEquilibria(t, res, []want{{0.3, Stable, 1, None, nan()}, {0.3 + 1e-7, Unstable, 1, None, nan()}}, 1e-9)
	// Monomial form 1e-8 apart: f at the dip is below the rounding error:
	// one touching root with a note (or both, if resolved).
	res = mustFind(t, fromRoots(1, 0.3, 0.3+1e-8), 0, 1)
	switch len(res.Equilibria) {
	case 1:
		q := res.Equilibria[0]
		if !near(q.X, 0.3+5e-9, 2e-8) || q.Class != Semistable || !strings.Contains(q.Note, "touching") {
			t.Errorf("unresolved pair: %+v", q)
		}
	case 2:
		if !near(res.Equilibria[0].X, 0.3, 1e-8) || !near(res.Equilibria[1].X, 0.3+1e-8, 1e-8) {
			t.Errorf("resolved pair at %v", xs(res))
		}
	default:
		t.Errorf("found %v, want the pair near 0.3", xs(res))
	}
	// Double root with exact dyadic coefficients: semistable, order 2.
	res = mustFind(t, fromRoots(1, 0.375, 0.375, -0.5), -1, 1)
	checkEquilibria(t, res, []want{{-0.5, Unstable, 1, None, nan()}, {0.375, Semistable, 2, Below, nan()}}, 1e-9)
}

func nan() float64 { return math.NaN() }

// TestRandomPolynomials compares with gonum's companion-matrix eigenvalues
// (a reference library): well-separated random real roots, a complex pair,
// close pairs 1e-8 apart (factored form) and dyadic double roots.
func TestRandomPolynomials(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for trial := 0; trial < 200; trial++ {
		n := 1 + rng.IntN(6)
		var roots []float64
		for len(roots) < n {
			r := -1 + 2*rng.Float64()
			ok := true
			for _, s := range roots {
				if math.Abs(r-s) < 0.05 {
					ok = false
				}
			}
			if ok {
				roots = append(roots, r)
			}
		}
		slices.Sort(roots)
		p := fromRoots(1-2*float64(rng.IntN(2)), roots...)
		if trial%3 == 0 {
			// Multiply by a positive quadratic (complex pair u ± iv).
			u, v := -1+2*rng.Float64(), 0.05+rng.Float64()
			q := make(poly, len(p)+2)
			for i, a := range p {
				q[i] += a * (u*u + v*v)
				q[i+1] -= a * 2 * u
				q[i+2] += a
			}
			p = q
		}
		ref := realRoots(t, monic(p), -1.25, 1.25, 1e-7)
		res := mustFind(t, p, -1.25, 1.25)
		got := xs(res)
		if len(got) != len(ref) {
			t.Fatalf("trial %d: found %v, companion eigenvalues %v (roots %v)", trial, got, ref, roots)
		}
		for i := range ref {
			if !near(got[i], ref[i], 1e-9) {
				t.Errorf("trial %d: root %d at %.15g, eigenvalue %.15g", trial, i, got[i], ref[i])
			}
			// The class from the sign of p' (analytic derivative).
			d := 0.0
			for k := len(p) - 1; k >= 1; k-- {
				d = d*got[i] + float64(k)*p[k]
			}
			cls := Stable
			if d > 0 {
				cls = Unstable
			}
			if res.Equilibria[i].Class != cls || res.Equilibria[i].Order != 1 {
				t.Errorf("trial %d: root %.10g is %v order %d, p' = %g", trial, got[i], res.Equilibria[i].Class, res.Equilibria[i].Order, d)
			}
		}
		for _, w := range res.Warnings {
			t.Errorf("trial %d: warning %s", trial, w)
		}
	}
	// Close pairs 1e-8 apart among other roots, in factored form: both
	// members found (construction), the eigenvalues agree at their own
	// accuracy for such pairs (about sqrt(u) ≈ 1e-8).
	for trial := 0; trial < 50; trial++ {
		c := -0.8 + 1.6*rng.Float64()
		roots := []float64{c, c + 1e-8}
		for len(roots) < 4 {
			r := -1 + 2*rng.Float64()
			if math.Abs(r-c) > 0.1 {
				roots = append(roots, r)
			}
		}
		slices.Sort(roots)
		res := mustFind(t, factored(1, roots...), -1.25, 1.25)
		got := xs(res)
		if len(got) != len(roots) {
			t.Fatalf("pair trial %d: found %v, want %v", trial, got, roots)
		}
		for i := range roots {
			if !near(got[i], roots[i], 4e-12) { // RelTol·|x| + RelTol·(hi − lo)
				t.Errorf("pair trial %d: root %d at %.15g, want %.15g", trial, i, got[i], roots[i])
			}
		}
		ref := realRoots(t, monic(fromRoots(1, roots...)), -1.25, 1.25, 1e-6)
		for _, e := range ref {
			i := 0
			for j := range got {
				if math.Abs(got[j]-e) < math.Abs(got[i]-e) {
					i = j
				}
			}
			if !near(got[i], e, 1e-6) {
				t.Errorf("pair trial %d: eigenvalue %.12g has no root nearby (%v)", trial, e, got)
			}
		}
	}
	// Double roots at dyadic points (exact coefficients): semistable, order 2.
	for _, tc := range []struct{ d, s float64 }{{0.25, -0.5}, {-0.625, 0.75}, {0.5, 0.125}} {
		p := fromRoots(1, tc.d, tc.d, tc.s)
		res := mustFind(t, p, -1, 1)
		ref := realRoots(t, monic(p), -1, 1, 1e-6)
		if len(res.Equilibria) != 2 || len(ref) < 2 {
			t.Fatalf("double root %g: found %v, eigenvalues %v", tc.d, xs(res), ref)
		}
		for _, q := range res.Equilibria {
			if near(q.X, tc.d, 1e-9) {
				if q.Class != Semistable || q.Order != 2 {
					t.Errorf("double root %g: %v order %d", tc.d, q.Class, q.Order)
				}
			} else if !near(q.X, tc.s, 4e-12) {
				t.Errorf("double root %g: unexpected root %.15g", tc.d, q.X)
			}
		}
	}
}

func TestBasinsAndBarriers(t *testing.T) {
	// x − x³ on [−2, 2]: −1, 1 attracting (f' = −2), 0 repelling;
	// V = −x²/2 + x⁴/4 (analytic): V(0) − V(±1) = 1/4, V(±2) − V(±1) = 9/4.
	res := mustFind(t, poly{0, 1, 0, -1}, -2, 2)
	checkEquilibria(t, res, []want{{-1, Stable, 1, None, -2}, {0, Unstable, 1, None, 1}, {1, Stable, 1, None, -2}}, 0)
	type fig struct {
		basin   [2]float64
		end     [2]bool
		barrier [2]float64
		rt      float64
	}
	wants := []fig{
		{[2]float64{-2, 0}, [2]bool{true, false}, [2]float64{2.25, 0.25}, 0.5},
		{[2]float64{0, 0}, [2]bool{false, false}, [2]float64{0, 0}, math.NaN()},
		{[2]float64{0, 2}, [2]bool{false, true}, [2]float64{0.25, 2.25}, 0.5},
	}
	for i, w := range wants {
		q := res.Equilibria[i]
		if q.Basin != w.basin || q.BasinAtDomainEnd != w.end {
			t.Errorf("x=%g: basin %v %v, want %v %v", q.X, q.Basin, q.BasinAtDomainEnd, w.basin, w.end)
		}
		for s := 0; s < 2; s++ {
			if !near(q.Barrier[s], w.barrier[s], 1e-12) {
				t.Errorf("x=%g: barrier %v, want %v", q.X, q.Barrier, w.barrier)
			}
		}
		if !(math.IsNaN(w.rt) && math.IsNaN(q.ReturnTime)) && !near(q.ReturnTime, w.rt, 1e-12) {
			t.Errorf("x=%g: return time %g, want %g", q.X, q.ReturnTime, w.rt)
		}
	}
	// Verhulst r = 1, K = 10 on [0, 12]: V = −x²/2 + x³/30;
	// V(0) − V(10) = 50/3, V(12) − V(10) = 34/15 (analytic).
	res = mustFind(t, logistic(1, 10), 0, 12)
	q := res.Equilibria[1]
	if !near(q.Barrier[0], 50.0/3, 1e-11) || !near(q.Barrier[1], 34.0/15, 1e-11) {
		t.Errorf("logistic barriers %v, want [50/3 34/15]", q.Barrier)
	}
	// Semistable x² on [−1, 2]: one-sided basin [−1, 0], V(−1) − V(0) = 1/3.
	res = mustFind(t, poly{0, 0, 1}, -1, 2)
	q = res.Equilibria[0]
	if q.Basin != [2]float64{-1, 0} || !near(q.Barrier[0], 1.0/3, 1e-12) || q.Barrier[1] != 0 {
		t.Errorf("x²: basin %v barrier %v, want [−1 0] and [1/3 0]", q.Basin, q.Barrier)
	}
	// Shallow lake (illustrative a = 0.06, b = 0.52): ∫ f dP = aP − bP²/2 +
	// P − arctan P (analytic), so V(edge) − V(x*) = F(x*) − F(edge).
	la, lb := 0.06, 0.52
	F := func(p float64) float64 { return la*p - lb*p*p/2 + p - math.Atan(p) }
	res = mustFind(t, lake(la, lb), 0, 3)
	if len(res.Equilibria) != 3 {
		t.Fatalf("lake: %v", xs(res))
	}
	for _, q := range res.Equilibria {
		for s := 0; s < 2; s++ {
			want := F(q.X) - F(q.Basin[s])
			if !near(q.Barrier[s], want, 1e-9*math.Abs(want)+1e-13) {
				t.Errorf("lake x*=%.6g: barrier[%d] %.15g, analytic %.15g", q.X, s, q.Barrier[s], want)
			}
		}
	}
	// Semenov δ = 0.2: ∫ f dθ = δe^θ − θ²/2 (analytic); the lower, stable
	// equilibrium's basin is [0, θ_upper].
	G := func(th float64) float64 { return 0.2*math.Exp(th) - th*th/2 }
	res = mustFind(t, semenov(0.2), 0, 5)
	q = res.Equilibria[0]
	for s := 0; s < 2; s++ {
		want := G(q.X) - G(q.Basin[s])
		if !near(q.Barrier[s], want, 1e-9*math.Abs(want)) {
			t.Errorf("semenov: barrier[%d] %.15g, analytic %.15g", s, q.Barrier[s], want)
		}
	}
	// Barriers switched off.
	opt := DefaultOptions()
	opt.NoBarriers = true
	res, err := Find(poly{0, 1, 0, -1}, -2, 2, opt)
	if err != nil || !math.IsNaN(res.Equilibria[0].Barrier[0]) {
		t.Errorf("NoBarriers: %v %v", err, res.Equilibria[0].Barrier)
	}
}

func TestFromState(t *testing.T) {
	ln100 := math.Log(100)
	// Linear x' = −k(x − a): T = ln(100)/k (analytic).
	k, a := 0.7, 1.3
	lin := poly{k * a, -k}
	// Verhulst closed form: t(x) = (1/r) ln(x (K − x0) / (x0 (K − x))).
	r, K := 0.5, 10.0
	logT := func(x0 float64) float64 {
		x1 := K + 0.01*(x0-K)
		return math.Log(x1*(K-x0)/(x0*(K-x1))) / r
	}
	// Toward a pole: −1/(x − 1) from 0.5 reaches 1 after ∫ (1 − x) dx = 1/8.
	toPole := jetFunc{
		eval: func(x float64) float64 { return -1 / (x - 1) },
		jet:  func(x jet) jet { return jconst(x.n, -1).div(x.addc(-1)) },
	}
	cases := []struct {
		name   string
		src    string
		f      Func
		lo, hi float64
		x0     float64
		fate   Fate
		target float64
		time   float64
	}{
		{"linear from above", "analytic ln(100)/k", lin, -5, 5, 4, Approaches, a, ln100 / k},
		{"linear from below", "analytic ln(100)/k", lin, -5, 5, -3, Approaches, a, ln100 / k},
		{"linear at equilibrium", "x0 = x*", lin, -5, 5, a, Stays, a, 0},
		{"logistic from below", "Verhulst closed form", logistic(r, K), 0, 12, 1, Approaches, K, logT(1)},
		{"logistic from above", "Verhulst closed form", logistic(r, K), 0, 12, 11.5, Approaches, K, logT(11.5)},
		{"cubic target", "x' = −x³: ∫_1^0.01 −dx/x³ = (10⁴ − 1)/2 (analytic)",
			poly{0, 0, 0, -1}, -2, 2, 1, Approaches, 0, (1e4 - 1) / 2},
		{"exit above", "x' = 1: time 1.5 to hi (analytic)", poly{1}, 0, 2, 0.5, ExitsAbove, 2, 1.5},
		{"exit below", "x' = −x on [0.5, 2]: ln 2 from 1 to 0.5 (analytic)", poly{0, -1}, 0.5, 2, 1, ExitsBelow, 0.5, math.Ln2},
		{"into pole", "x' = −1/(x−1): ∫_0.5^1 (1 − x) dx = 1/8 (analytic)", toPole, 0, 3, 0.5, Singular, 1, 0.125},
		{"outside", "x0 outside the domain", lin, -5, 5, 7, Outside, math.NaN(), math.NaN()},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			res := mustFind(t, tc.f, tc.lo, tc.hi)
			tr := FromState(tc.f, res, tc.x0)
			if tr.Fate != tc.fate {
				t.Fatalf("fate %v, want %v (%+v)", tr.Fate, tc.fate, tr)
			}
			if math.IsNaN(tc.time) {
				if !math.IsNaN(tr.Time) {
					t.Errorf("time %g, want NaN", tr.Time)
				}
				return
			}
			if !near(tr.Target, tc.target, 1e-9) {
				t.Errorf("target %.12g, want %.12g", tr.Target, tc.target)
			}
			if !near(tr.Time, tc.time, 1e-9*tc.time+1e-12) {
				t.Errorf("time %.15g, want %.15g", tr.Time, tc.time)
			}
		})
	}
}

// lying reports f = −x but a Taylor slope of +1: the derivative test then
// disagrees with the phase line.
type lying struct{}

func (lying) Eval(x float64) float64 { return -x }
func (lying) Taylor(x float64, c, e []float64) {
	clear(c)
	clear(e)
	c[0] = -x
	if len(c) > 1 {
		c[1] = 1
	}
}

func TestPhaseLineWarning(t *testing.T) {
	res := mustFind2(t, lying{}, -1, 1)
	if len(res.Equilibria) != 1 || res.Equilibria[0].Class != Unstable {
		t.Fatalf("got %+v", res.Equilibria)
	}
	if len(res.Warnings) != 1 || !strings.Contains(res.Warnings[0], "phase") && !strings.Contains(res.Warnings[0], "sign") {
		t.Errorf("warnings %q, want one phase-line disagreement", res.Warnings)
	}
}

func mustFind2(t *testing.T, f Func, lo, hi float64) *Result {
	t.Helper()
	res, err := Find(f, lo, hi, DefaultOptions())
	if err != nil {
		t.Fatal(err)
	}
	return res
}

type panicky struct{}

func (panicky) Eval(float64) float64                 { panic("boom") }
func (panicky) Taylor(float64, []float64, []float64) { panic("boom") }

func TestErrors(t *testing.T) {
	for _, d := range [][2]float64{{1, 1}, {2, 1}, {math.NaN(), 1}, {0, math.Inf(1)}, {-1e308, 1e308}} {
		if _, err := Find(poly{1}, d[0], d[1], DefaultOptions()); !errors.Is(err, ErrDomain) {
			t.Errorf("domain %v: err %v, want ErrDomain", d, err)
		}
	}
	if _, err := Find(nil, 0, 1, DefaultOptions()); err == nil {
		t.Error("nil f: no error")
	}
	if _, err := Find(panicky{}, 0, 1, DefaultOptions()); err == nil {
		t.Error("panicking f: no error")
	}
	bad := []func(*Options){
		func(o *Options) { o.Grid = 1 },
		func(o *Options) { o.MaxDepth = -1 },
		func(o *Options) { o.RelTol = 0 },
		func(o *Options) { o.AbsTol = -1 },
		func(o *Options) { o.QuadNodes = 1 },
		func(o *Options) { o.QuadRelTol = 0 },
		func(o *Options) { o.MaxCalls = 10 },
	}
	for i, mod := range bad {
		o := DefaultOptions()
		mod(&o)
		if _, err := NewFinder(o); err == nil {
			t.Errorf("bad option %d accepted", i)
		}
	}
	// A tiny call budget stops with a warning, not an error.
	o := DefaultOptions()
	o.MaxCalls = 100
	res, err := Find(plateau{}, 0, 3, o)
	if err != nil || len(res.Warnings) == 0 {
		t.Errorf("budget: err %v warnings %v", err, res.Warnings)
	}
}

func TestFinderReuseAllocs(t *testing.T) {
	opt := DefaultOptions()
	opt.NoBarriers = true
	fz, err := NewFinder(opt)
	if err != nil {
		t.Fatal(err)
	}
	var f Func = lakeFunc{0.06, 0.52} // boxed once, outside the measured calls
	first, _ := fz.Find(f, 0, 3)
	want := slices.Clone(first.Equilibria)
	allocs := testing.AllocsPerRun(50, func() {
		if _, err := fz.Find(f, 0, 3); err != nil {
			t.Fatal(err)
		}
	})
	if allocs > 0 {
		t.Errorf("%g allocations per call on a warm Finder, want 0", allocs)
	}
	res, _ := fz.Find(f, 0, 3)
	if len(res.Equilibria) != len(want) {
		t.Fatalf("reuse changed the result")
	}
	for i := range want {
		if res.Equilibria[i].X != want[i].X || res.Equilibria[i].Class != want[i].Class {
			t.Errorf("reuse changed equilibrium %d", i)
		}
	}
}

func TestStrings(t *testing.T) {
	for c, s := range map[Class]string{Stable: "stable", Unstable: "unstable", Semistable: "semistable", Degenerate: "degenerate"} {
		if c.String() != s {
			t.Errorf("%d: %q", c, c.String())
		}
	}
	for sd, s := range map[Side]string{None: "", Below: "below", Above: "above"} {
		if sd.String() != s {
			t.Errorf("%d: %q", sd, sd.String())
		}
	}
}

// sinLaw is sin(w x + φ) + c; its roots are analytic:
// x = (asin(−c) − φ + 2πk)/w and (π − asin(−c) − φ + 2πk)/w.
func sinLaw(w, ph, c float64) jetFunc {
	return jetFunc{
		eval: func(x float64) float64 { return math.Sin(w*x+ph) + c },
		jet: func(x jet) jet {
			s, _ := x.scale(w).addc(ph).sincos()
			return s.addc(c)
		},
	}
}

func sinRoots(w, ph, c, lo, hi float64) []float64 {
	var out []float64
	as := math.Asin(-c)
	for k := -100; k <= 100; k++ {
		for _, t := range []float64{as, math.Pi - as} {
			x := (t - ph + 2*math.Pi*float64(k)) / w
			if x >= lo && x <= hi {
				out = append(out, x)
			}
		}
	}
	slices.Sort(out)
	return slices.Compact(out)
}

// bumpLaw is c − exp(−((x − m)/s)²), with roots m ± s sqrt(−ln c) (analytic).
func bumpLaw(c, m, s float64) jetFunc {
	return jetFunc{
		eval: func(x float64) float64 { d := (x - m) / s; return c - math.Exp(-d*d) },
		jet: func(x jet) jet {
			d := x.addc(-m).scale(1 / s)
			return d.mul(d).scale(-1).exp().scale(-1).addc(c)
		},
	}
}

// TestResolution: laws that vary much faster than the initial grid (up to
// six sine periods per grid cell) are resolved by the adaptive
// subdivision; Gaussian bumps down to a third of a grid cell wide are
// found. Narrower features that leave no trace at the grid points are a
// documented limit (Options.Grid).
func TestResolution(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 9))
	for trial := 0; trial < 300; trial++ {
		w := 1 + 40*rng.Float64()
		ph := 2 * math.Pi * rng.Float64()
		c := -0.9 + 1.8*rng.Float64()
		ref := sinRoots(w, ph, c, 0, 1)
		res := mustFind(t, sinLaw(w, ph, c), 0, 1)
		got := xs(res)
		if len(got) != len(ref) {
			t.Fatalf("sin(%gx + %g) + %g: found %v, analytic %v", w, ph, c, got, ref)
		}
		for i := range ref {
			if !near(got[i], ref[i], 2e-12) {
				t.Errorf("sin(%gx + %g) + %g: root %.15g, analytic %.15g", w, ph, c, got[i], ref[i])
			}
		}
	}
	h := 1.0 / float64(DefaultOptions().Grid)
	for trial := 0; trial < 300; trial++ {
		s := h * (0.35 + 2*rng.Float64())
		m := rng.Float64()
		c := 0.1 + 0.8*rng.Float64()
		r := s * math.Sqrt(-math.Log(c))
		var ref []float64
		for _, x := range []float64{m - r, m + r} {
			if x >= 0 && x <= 1 {
				ref = append(ref, x)
			}
		}
		res := mustFind(t, bumpLaw(c, m, s), 0, 1)
		got := xs(res)
		if len(got) != len(ref) {
			t.Fatalf("bump s=%g m=%g c=%g: found %v, analytic %v", s, m, c, got, ref)
		}
		for i := range ref {
			if !near(got[i], ref[i], 2e-12) {
				t.Errorf("bump s=%g m=%g c=%g: root %.15g, analytic %.15g", s, m, c, got[i], ref[i])
			}
		}
	}
}
