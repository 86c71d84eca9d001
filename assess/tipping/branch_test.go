package tipping

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"

	"holdfast/assess/expr"
	"holdfast/assess/steady"
)

// testDrawer compiles rate with the given parameters and returns a drawer
// whose law sweeps parameter driver from a to b, on the state domain
// [lo, hi], with allowed driver values [alo, ahi].
func testDrawer(t *testing.T, rate string, names []string, theta []float64, driver string, a, b, lo, hi, alo, ahi float64) *drawer {
	t.Helper()
	p, err := expr.Compile(rate, expr.Env{State: "x", Params: names})
	if err != nil {
		t.Fatal(err)
	}
	j := -1
	for i, n := range names {
		if n == driver {
			j = i
		}
	}
	l := newLaw(p, j, a, b-a)
	copy(l.theta, theta)
	fopt := steady.DefaultOptions()
	fopt.NoBarriers = true
	fz, err := steady.NewFinder(fopt)
	if err != nil {
		t.Fatal(err)
	}
	sw := &sweep{opt: Options{From: a, To: b}, allowed: [2]float64{alo, ahi}}
	return &drawer{sw: sw, l: l, fz: fz, tr: tracer{l: l, lo: lo, hi: hi, w: hi - lo}}
}

func TestBranchEventsAgainstAnalyticResults(t *testing.T) {
	inf := math.Inf(1)
	cases := []struct {
		name     string
		rate     string
		names    []string
		theta    []float64
		driver   string
		a, b     float64
		lo, hi   float64
		x0       float64 // equilibrium at d = a
		kind     Kind
		d, x     float64 // expected event (driver value, state)
		tol      float64 // on d
		ret      Return
		dReturn  float64
		alo, ahi float64
	}{
		// Schaefer (1954): logistic growth with constant harvest H folds at
		// H = rK/4, x = K/2; past it the stock declines out of the domain.
		{"harvest", "r*x*(1 - x/K) - H", []string{"r", "K", "H"}, []float64{1, 4, 0}, "H", 0, 2, 0, 6,
			4, Fold, 1, 2, 1e-10, Escapes, math.NaN(), -inf, inf},
		{"harvest r=0.7 K=3", "r*x*(1 - x/K) - H", []string{"r", "K", "H"}, []float64{0.7, 3, 0}, "H", 0.1, 1, 0, 6,
			1.5 * (1 + math.Sqrt(1-4*0.1/(0.7*3))), Fold, 0.7 * 3 / 4, 1.5, 1e-10, Escapes, math.NaN(), -inf, inf},
		// Semenov (1928): θ' = δe^θ − θ has its fold at δ = 1/e, θ = 1;
		// past it the temperature runs away out of the domain.
		{"semenov", "delta*exp(x) - x", []string{"delta"}, []float64{0.1}, "delta", 0.1, 1, 0, 10,
			0.11183255915896297, Fold, 1 / math.E, 1, 1e-10, Escapes, math.NaN(), 0, inf},
		// The same fold approached by reducing a cooling coefficient c in
		// θ' = δe^θ − cθ: f = f' = 0 give θ = 1, c = δe (a sweep down).
		{"semenov cooling down", "delta*exp(x) - c*x", []string{"delta", "c"}, []float64{0.2, 1}, "c", 1, 0.3, 0, 10,
			0.2591711018190737, Fold, 0.2 * math.E, 1, 1e-10, Escapes, math.NaN(), 0, inf},
		// Transcritical normal form x' = x(c − d) − x² (Strogatz, Nonlinear
		// Dynamics and Chaos, §3.2): the branch x = c − d crosses x = 0 at
		// d = c and exchanges stability with it.
		{"transcritical", "x*(c - d) - x^2", []string{"c", "d"}, []float64{1, 0}, "d", 0, 2, -2, 2,
			1, Exchange, 1, 0, 1e-6, NotApplicable, math.NaN(), -inf, inf},
		// Supercritical pitchfork x' = (c − d)x − x³ (Strogatz §3.4): the
		// branch x = √(c − d) turns at d = c, where ∂f/∂d = −x vanishes too:
		// a branch point, the stability passes to x = 0.
		{"pitchfork", "(c - d)*x - x^3", []string{"c", "d"}, []float64{1, 0}, "d", 0, 2, -2, 2,
			1, Exchange, 1, 0, 1e-6, NotApplicable, math.NaN(), -inf, inf},
		// x' = d − x: the equilibrium x = d leaves the domain [0, 1] at d = 1.
		{"boundary", "d - x", []string{"d"}, []float64{0}, "d", 0.5, 2, 0, 1,
			0.5, Boundary, 1, 1, 1e-12, NotApplicable, math.NaN(), -inf, inf},
		// No fold before H = rK/4 = 1.
		{"no tipping", "r*x*(1 - x/K) - H", []string{"r", "K", "H"}, []float64{1, 4, 0}, "H", 0, 0.9, 0, 6,
			4, None, math.NaN(), math.NaN(), 0, NotApplicable, math.NaN(), -inf, inf},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			p := testDrawer(t, c.rate, c.names, c.theta, c.driver, c.a, c.b, c.lo, c.hi, c.alo, c.ahi)
			ev := p.tr.trace(c.x0, 0, 1, 1)
			if ev.kind != c.kind {
				t.Fatalf("kind %v at d = %v, x = %v; want %v", ev.kind, p.l.driver(ev.t), ev.x, c.kind)
			}
			if c.kind == None {
				return
			}
			if d := p.l.driver(ev.t); math.Abs(d-c.d) > c.tol*math.Max(1, math.Abs(c.d)) {
				t.Errorf("event at d = %.15g, want %.15g", d, c.d)
			}
			if math.Abs(ev.x-c.x) > math.Sqrt(c.tol)*(c.hi-c.lo) {
				t.Errorf("event at x = %.15g, want %.15g", ev.x, c.x)
			}
			if c.kind == Fold {
				ret, tr := p.hysteresis(ev)
				if ret != c.ret {
					t.Errorf("return %v (t %v), want %v", ret, tr, c.ret)
				}
			}
		})
	}
}

// lakeFolds returns the fold points (P, a) of P' = a − bP + P²/(1 + P²)
// for the given b, from f = 0 and f' = 0 (Carpenter, Ludwig & Brock
// 1999): f' = 0 gives b(1 + P²)² = 2P, the quartic bP⁴ + 2bP² − 2P + b = 0,
// whose positive real roots are taken from gonum's eigenvalues of the
// companion matrix (a reference library); f = 0 then gives
// a = bP − P²/(1 + P²).
func lakeFolds(t *testing.T, b float64) (p, a []float64) {
	t.Helper()
	// Monic: P⁴ + 0P³ + 2P² − (2/b)P + 1.
	coef := []float64{1, -2 / b, 2, 0} // c0, c1, c2, c3
	comp := mat.NewDense(4, 4, nil)
	for i := 1; i < 4; i++ {
		comp.Set(i, i-1, 1)
	}
	for i := 0; i < 4; i++ {
		comp.Set(i, 3, -coef[i])
	}
	var eig mat.Eigen
	if !eig.Factorize(comp, mat.EigenNone) {
		t.Fatal("eigen decomposition failed")
	}
	for _, v := range eig.Values(nil) {
		if math.Abs(imag(v)) < 1e-9 && real(v) > 0 {
			p = append(p, real(v))
		}
	}
	if len(p) != 2 {
		t.Fatalf("b = %v: %d positive real fold points, want 2", b, len(p))
	}
	if p[0] > p[1] {
		p[0], p[1] = p[1], p[0]
	}
	for _, P := range p {
		a = append(a, b*P-P*P/(1+P*P))
	}
	return p, a
}

func TestShallowLakeFoldsAndHysteresis(t *testing.T) {
	// Shallow-lake model P' = a − bP + P²/(1 + P²) (Carpenter, Ludwig &
	// Brock 1999, Ecological Applications 9:751), loading a swept up from
	// a small value with the clear state tracked. It folds at the lower
	// fold point; the turbid state it falls to vanishes at the upper fold
	// point, the return fold. For b < 1/2 that return fold lies at a < 0,
	// outside the physical range a ≥ 0: reducing the loading alone cannot
	// restore the clear state (irreversible). For 1/2 < b < 3√3/8 both
	// folds lie at a > 0 (reversible, with a hysteresis window between).
	for _, c := range []struct {
		b    float64
		want Return
	}{{0.45, Irreversible}, {0.3698, Irreversible}, {0.6, Reversible}, {0.62, Reversible}} {
		P, A := lakeFolds(t, c.b)
		if (A[1] < 0) != (c.want == Irreversible) {
			t.Fatalf("b = %v: analytic return fold a = %v contradicts the expected %v", c.b, A[1], c.want)
		}
		a0 := math.Max(A[1], 0) + 0.25*(A[0]-math.Max(A[1], 0)) // below the lower fold
		p := testDrawer(t, "a - b*x + x^2/(1 + x^2)", []string{"a", "b"}, []float64{a0, c.b}, "a", a0, 0.3, 0, 5, 0, math.Inf(1))
		// The clear state at a0: the lowest root, from the finder.
		p.l.at(0)
		res, err := p.fz.Find(frozen{p.l}, 0, 5)
		if err != nil || len(res.Equilibria) < 1 {
			t.Fatalf("b = %v: %v %v", c.b, err, res)
		}
		ev := p.tr.trace(res.Equilibria[0].X, 0, 1, 1)
		if ev.kind != Fold {
			t.Fatalf("b = %v: %v, want a fold", c.b, ev.kind)
		}
		if d := p.l.driver(ev.t); math.Abs(d-A[0]) > 1e-10 || math.Abs(ev.x-P[0]) > 1e-6 {
			t.Errorf("b = %v: fold at (a, P) = (%.12g, %.9g), analytic (%.12g, %.9g)", c.b, d, ev.x, A[0], P[0])
		}
		ret, tr := p.hysteresis(ev)
		if ret != c.want {
			t.Errorf("b = %v: %v, want %v", c.b, ret, c.want)
		}
		if d := p.l.driver(tr); math.Abs(d-A[1]) > 1e-10 {
			t.Errorf("b = %v: return fold at a = %.12g, analytic %.12g", c.b, d, A[1])
		}
	}
}
