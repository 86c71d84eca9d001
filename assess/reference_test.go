package assess

import (
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"

	"holdfast/assess/steady"
	"holdfast/scenarios"
)

// model builds a Model from scenario text: the state symbol, domain, rate
// law and fixed parameters.
func model(t testing.TB, symbol string, lo, hi float64, rate string, params ...any) *Model {
	t.Helper()
	var b strings.Builder
	fmt.Fprintf(&b, "holdfast: 1\ntitle: reference case\nstate: {symbol: %s, domain: [%v, %v]}\nrate: %q\n", symbol, lo, hi, rate)
	if len(params) > 0 {
		b.WriteString("parameters:\n")
		for i := 0; i < len(params); i += 2 {
			switch v := params[i+1].(type) {
			case float64:
				fmt.Fprintf(&b, "  %s: {value: %v}\n", params[i], strconvG(v))
			case string:
				fmt.Fprintf(&b, "  %s: %s\n", params[i], v)
			}
		}
	}
	s, err := scenarios.Parse("reference.yaml", []byte(b.String()), nil)
	if err != nil {
		t.Fatalf("scenario: %v\n%s", err, b.String())
	}
	m, err := Compile(s)
	if err != nil {
		t.Fatalf("compile: %v", err)
	}
	return m
}

func strconvG(v float64) string { return fmt.Sprintf("%.17g", v) }

type wantEq struct {
	x     float64
	class steady.Class
	order int
	side  steady.Side
}

func checkEquilibria(t *testing.T, name string, m *Model, want []wantEq, tol float64) {
	t.Helper()
	snap, err := m.Analyze(m.Nominal)
	if err != nil {
		t.Fatalf("%s: %v", name, err)
	}
	if len(snap.Equilibria) != len(want) {
		t.Fatalf("%s: %d equilibria %v, want %d", name, len(snap.Equilibria), snap.Equilibria, len(want))
	}
	for i, w := range want {
		e := snap.Equilibria[i]
		if math.Abs(e.X-w.x) > tol*math.Max(1, math.Abs(w.x)) || e.Class != w.class || e.Order != w.order || e.AttractsFrom != w.side {
			t.Errorf("%s E%d: x=%v %v order %d from %q; want x=%v %v order %d from %q",
				name, i+1, e.X, e.Class, e.Order, e.AttractsFrom, w.x, w.class, w.order, w.side)
		}
	}
}

func TestReferenceEquilibriaThroughTheCompiler(t *testing.T) {
	// Each case goes scenario text → compiler → Taylor arithmetic →
	// equilibrium search → classification.
	const S, U, SS, D = steady.Stable, steady.Unstable, steady.Semistable, steady.Degenerate
	sqrt := math.Sqrt
	cases := []struct {
		name   string
		lo, hi float64
		rate   string
		params []any
		want   []wantEq
		tol    float64
	}{
		// Verhulst logistic: 0 repelling (f' = r), K attracting (f' = −r).
		{"logistic", -1, 20, "r*x*(1 - x/K)", []any{"r", 0.7, "K", 10.0},
			[]wantEq{{0, U, 1, 0}, {10, S, 1, 0}}, 1e-12},
		// Schaefer (1954): harvest below the fold, x* = K/2 (1 ± sqrt(1 − 4H/(rK))).
		{"harvest below fold", 0, 10, "r*x*(1 - x/K) - H", []any{"r", 1.0, "K", 4.0, "H", 0.75},
			[]wantEq{{2 * (1 - sqrt(1-0.75)), U, 1, 0}, {2 * (1 + sqrt(1-0.75)), S, 1, 0}}, 1e-12},
		// Schaefer (1954): at H = rK/4 one equilibrium at K/2, attracting from above.
		{"harvest at fold", 0, 10, "r*x*(1 - x/K) - H", []any{"r", 1.0, "K", 4.0, "H", 1.0},
			[]wantEq{{2, SS, 2, steady.Above}}, 1e-7},
		{"harvest above fold", 0, 10, "r*x*(1 - x/K) - H", []any{"r", 1.0, "K", 4.0, "H", 1.1},
			nil, 0},
		// Allee effect: 0 attracting, A repelling, K attracting.
		{"Allee", -0.5, 12, "r*x*(x/A - 1)*(1 - x/K)", []any{"r", 0.5, "A", 2.0, "K", 10.0},
			[]wantEq{{0, S, 1, 0}, {2, U, 1, 0}, {10, S, 1, 0}}, 1e-12},
		// Semenov (1928): δ < 1/e, two equilibria, lower attracting.
		{"Semenov below", 0, 5, "delta*exp(theta) - theta", []any{"delta", 0.2},
			nil, 0},
		// Semenov at δ = 1/e (rounded to float64): one equilibrium at θ = 1,
		// attracting from below only.
		{"Semenov critical", 0, 5, "delta*exp(theta) - theta", []any{"delta", math.Exp(-1)},
			[]wantEq{{1, SS, 2, steady.Below}}, 1e-7},
		{"Semenov above", 0, 5, "delta*exp(theta) - theta", []any{"delta", 0.4},
			nil, 0},
		// Strogatz, Nonlinear Dynamics and Chaos, ch. 2–3: normal forms.
		{"x' = -x^3", -1, 1, "-x^3", nil, []wantEq{{0, S, 3, 0}}, 1e-4},
		{"x' = x^3", -1, 1, "x^3", nil, []wantEq{{0, U, 3, 0}}, 1e-4},
		{"x' = x^2", -1, 1, "x^2", nil, []wantEq{{0, SS, 2, steady.Below}}, 1e-6},
		{"x' = r x - x^3 at r = 0", -1, 1, "r*x - x^3", []any{"r", 0.0}, []wantEq{{0, S, 3, 0}}, 1e-4},
		// Shallow lake with no loading and b < 1/2 (Carpenter, Ludwig & Brock
		// 1999): 0 attracting, threshold and the turbid state from
		// bP² − P + b = 0, i.e. P = 0.5 and P = 2 at b = 0.4; the turbid
		// state persists with the loading removed (irreversibility).
		{"shallow lake a=0", 0, 4, "a - b*P + P^2/(1 + P^2)", []any{"a", 0.0, "b", 0.4},
			[]wantEq{{0, S, 1, 0}, {0.5, U, 1, 0}, {2, S, 1, 0}}, 1e-12},
	}
	for _, c := range cases {
		sym := "x"
		switch {
		case strings.Contains(c.rate, "theta"):
			sym = "theta"
		case strings.Contains(c.rate, "P"):
			sym = "P"
		}
		m := model(t, sym, c.lo, c.hi, c.rate, c.params...)
		switch c.name {
		case "Semenov below":
			// Two roots of δe^θ = θ for δ = 0.2: check by the equation itself.
			snap, _ := m.Analyze(m.Nominal)
			if len(snap.Equilibria) != 2 || snap.Equilibria[0].Class != S || snap.Equilibria[1].Class != U {
				t.Errorf("Semenov δ=0.2: %+v, want attracting then repelling", snap.Equilibria)
			}
			for _, e := range snap.Equilibria {
				if r := 0.2*math.Exp(e.X) - e.X; math.Abs(r) > 1e-12 {
					t.Errorf("Semenov root %v leaves residual %v", e.X, r)
				}
			}
			continue
		}
		checkEquilibria(t, c.name, m, c.want, c.tol)
	}
}

func TestShallowLakeCusp(t *testing.T) {
	// Carpenter, Ludwig & Brock (1999): f = a − bP + P²/(1+P²). The folds
	// solve f = 0 and f' = 0: b = 2P/(1+P²)², a = bP − P²/(1+P²). Just
	// inside the fold window there are three equilibria, just outside one.
	b := 0.45
	// Fold points for b = 0.45: 2P/(1+P²)² = 0.45.
	// 2P/(1+P²)² peaks at P = 1/√3 with the cusp value 3√3/8, so each
	// side of the peak holds one fold point; bisect for it.
	var folds []float64
	g := func(P float64) float64 { return 2*P/math.Pow(1+P*P, 2) - b }
	for _, br := range [][2]float64{{0, 1 / math.Sqrt(3)}, {1 / math.Sqrt(3), 10}} {
		lo, hi := br[0], br[1]
		for k := 0; k < 200; k++ {
			mid := (lo + hi) / 2
			if (g(mid) > 0) == (g(lo) > 0) {
				lo = mid
			} else {
				hi = mid
			}
		}
		P := (lo + hi) / 2
		folds = append(folds, b*P-P*P/(1+P*P))
	}
	aLo, aHi := math.Min(folds[0], folds[1]), math.Max(folds[0], folds[1])
	for _, c := range []struct {
		a float64
		n int
	}{{aLo - 1e-3, 1}, {aLo + 1e-3, 3}, {(aLo + aHi) / 2, 3}, {aHi - 1e-3, 3}, {aHi + 1e-3, 1}} {
		m := model(t, "P", -1, 5, "a - b*P + P^2/(1 + P^2)", "a", c.a, "b", b)
		snap, err := m.Analyze(m.Nominal)
		if err != nil {
			t.Fatal(err)
		}
		if len(snap.Equilibria) != c.n {
			t.Errorf("a=%v (window [%v, %v]): %d equilibria, want %d", c.a, aLo, aHi, len(snap.Equilibria), c.n)
		}
	}
	// The window closes at the cusp b = 3√3/8 ≈ 0.6495: beyond it one
	// equilibrium for every loading.
	for _, a := range []float64{0, 0.02, 0.05, 0.1, 0.2} {
		m := model(t, "P", 0, 5, "a - b*P + P^2/(1 + P^2)", "a", a, "b", 0.66)
		snap, _ := m.Analyze(m.Nominal)
		if len(snap.Equilibria) != 1 {
			t.Errorf("b=0.66 > cusp, a=%v: %d equilibria, want 1", a, len(snap.Equilibria))
		}
	}
}

func TestRandomPolynomialsAgainstCompanionEigenvalues(t *testing.T) {
	// Reference library: gonum's eigenvalues of the companion matrix give
	// the real roots of a polynomial; compare with the compiled rate law.
	rng := rand.New(rand.NewPCG(5, 6))
	for trial := 0; trial < 40; trial++ {
		n := 2 + rng.IntN(4)
		roots := make([]float64, n)
		for i := range roots {
			roots[i] = math.Round((rng.Float64()*8-4)*100) / 100
		}
		slices.Sort(roots)
		roots = slices.Compact(roots)
		// Expand Π (x − r_i) into coefficients, highest first.
		coef := []float64{1}
		for _, r := range roots {
			next := make([]float64, len(coef)+1)
			for i, c := range coef {
				next[i] += c
				next[i+1] -= c * r
			}
			coef = next
		}
		var terms []string
		deg := len(coef) - 1
		for i, c := range coef {
			terms = append(terms, fmt.Sprintf("(%.17g)*x^%d", c, deg-i))
		}
		m := model(t, "x", -5, 5, strings.Join(terms, " + "))
		snap, err := m.Analyze(m.Nominal)
		if err != nil {
			t.Fatal(err)
		}
		// Companion matrix of the monic polynomial.
		cm := mat.NewDense(deg, deg, nil)
		for j := 0; j < deg; j++ {
			cm.Set(0, j, -coef[j+1])
		}
		for i := 1; i < deg; i++ {
			cm.Set(i, i-1, 1)
		}
		var eig mat.Eigen
		if !eig.Factorize(cm, mat.EigenNone) {
			t.Fatal("eigen failed")
		}
		var ref []float64
		for _, v := range eig.Values(nil) {
			if math.Abs(imag(v)) < 1e-9 && real(v) >= -5 && real(v) <= 5 {
				ref = append(ref, real(v))
			}
		}
		slices.Sort(ref)
		if len(ref) != len(snap.Equilibria) {
			t.Errorf("roots %v: found %d, eigenvalues give %v", roots, len(snap.Equilibria), ref)
			continue
		}
		for i, e := range snap.Equilibria {
			if math.Abs(e.X-ref[i]) > 1e-8 {
				t.Errorf("roots %v: E%d = %v, eigenvalue %v", roots, i+1, e.X, ref[i])
			}
		}
	}
}
