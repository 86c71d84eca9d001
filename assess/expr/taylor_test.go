package expr

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"sync"
	"testing"

	"gonum.org/v1/gonum/diff/fd"
)

func taylor(m *Machine, x float64, theta []float64) (c, e []float64) {
	c, e = make([]float64, MaxOrder+1), make([]float64, MaxOrder+1)
	m.Taylor(x, theta, c, e)
	return c, e
}

func near(got, want, tol float64) bool {
	return math.Abs(got-want) <= tol*math.Max(1, math.Abs(want))
}

// invPoly returns the Taylor coefficients at x0, orders 0..MaxOrder, of
// 1/(x^q + m^q) for an integer q ≥ 1, by partial fractions over the roots
// ρ_j = m·exp(iπ(2j+1)/q) of x^q = −m^q: 1/Q(x) = Σ_j 1/(Q'(ρ_j)(x − ρ_j))
// with Q'(ρ) = qρ^(q−1) (residue theorem for simple poles), and
// 1/(x0 + t − ρ) = Σ_k (−1)^k t^k / (x0 − ρ)^(k+1).
func invPoly(x0, m float64, q int) []float64 {
	out := make([]float64, MaxOrder+1)
	for j := 0; j < q; j++ {
		rho := complex(m, 0) * cmplx.Exp(complex(0, math.Pi*float64(2*j+1)/float64(q)))
		res := 1 / (complex(float64(q), 0) * cmplx.Pow(rho, complex(float64(q-1), 0)))
		for k := range out {
			term := res / cmplx.Pow(complex(x0, 0)-rho, complex(float64(k+1), 0))
			if k%2 == 1 {
				term = -term
			}
			out[k] += real(term)
		}
	}
	return out
}

// TestTaylorClosedForms compares the coefficients with hand-derived
// closed forms at several points, all orders up to 7.
func TestTaylorClosedForms(t *testing.T) {
	fact := func(k int) float64 { return math.Gamma(float64(k + 1)) }
	tests := []struct {
		name  string
		rate  string
		env   Env
		theta []float64
		xs    []float64
		want  func(x float64, k int) float64
	}{
		{
			// Verhulst logistic f = r x (1 − x/K): a quadratic, so
			// c = [r x − r x²/K, r − 2 r x/K, −r/K, 0, …].
			name: "logistic", rate: "r*x*(1 - x/K)",
			env: Env{State: "x", Params: []string{"r", "K"}}, theta: []float64{0.7, 3},
			xs: []float64{0, 0.5, 3, 4.2},
			want: func(x float64, k int) float64 {
				r, K := 0.7, 3.0
				return []float64{r*x - r*x*x/K, r - 2*r*x/K, -r / K, 0, 0, 0, 0, 0}[k]
			},
		},
		{
			// Shallow lake (Carpenter, Ludwig & Brock 1999):
			// f = a − b x + x²/(1+x²) = a − b x + 1 − g, g = 1/(1+x²) =
			// Im 1/(x − i), so g_k = Im((−1)^k/(x0 − i)^(k+1)).
			name: "shallow lake", rate: "a - b*P + P^2/(1 + P^2)",
			env: Env{State: "P", Params: []string{"a", "b"}}, theta: []float64{0.1, 0.52},
			xs: []float64{0, 0.3, 1, 2.7},
			want: func(x float64, k int) float64 {
				g := imag(cmplx.Pow(complex(x, -1), complex(-float64(k+1), 0)))
				if k%2 == 1 {
					g = -g
				}
				switch k {
				case 0:
					return 0.1 - 0.52*x + 1 - g
				case 1:
					return -0.52 - g
				}
				return -g
			},
		},
		{
			// Semenov (1928), dimensionless: f = δ e^x − x, so
			// c_1 = δ e^x − 1 and c_k = δ e^x / k! otherwise.
			name: "Semenov", rate: "delta*exp(theta) - theta",
			env: Env{State: "theta", Params: []string{"delta"}}, theta: []float64{0.2},
			xs: []float64{-1, 0, 1, 2.5},
			want: func(x float64, k int) float64 {
				v := 0.2 * math.Exp(x) / fact(k)
				switch k {
				case 0:
					return v - x
				case 1:
					return v - 1
				}
				return v
			},
		},
		{
			// Hill term r P^q/(m^q + P^q) with the exponent a parameter
			// (q = 2): = r − r m^q/(P^q + m^q); coefficients by invPoly.
			name: "Hill q=2", rate: "r*P^q/(m^q + P^q)",
			env: Env{State: "P", Params: []string{"r", "m", "q"}}, theta: []float64{0.8, 1.2, 2},
			xs: []float64{0.3, 1, 2.5},
			want: func(x float64, k int) float64 {
				if k == 0 {
					return 0.8 * x * x / (1.44 + x*x)
				}
				return -0.8 * 1.44 * invPoly(x, 1.2, 2)[k]
			},
		},
		{
			name: "Hill q=3", rate: "r*P^q/(m^q + P^q)",
			env: Env{State: "P", Params: []string{"r", "m", "q"}}, theta: []float64{0.8, 1.2, 3},
			xs: []float64{0.3, 1, 2.5},
			want: func(x float64, k int) float64 {
				if k == 0 {
					return 0.8 * x * x * x / (1.728 + x*x*x)
				}
				return -0.8 * 1.728 * invPoly(x, 1.2, 3)[k]
			},
		},
		{
			// Strogatz (2015) §2.4 normal form x' = r x − x³:
			// c = [r x − x³, r − 3x², −3x, −1, 0, …].
			name: "pitchfork", rate: "r*x - x^3",
			env: Env{State: "x", Params: []string{"r"}}, theta: []float64{0.5},
			xs: []float64{-1, 0, 0.7},
			want: func(x float64, k int) float64 {
				return []float64{0.5*x - x*x*x, 0.5 - 3*x*x, -3 * x, -1, 0, 0, 0, 0}[k]
			},
		},
	}
	for _, tc := range tests {
		m := mustCompile(t, tc.rate, tc.env).NewMachine()
		for _, x := range tc.xs {
			c, e := taylor(m, x, tc.theta)
			for k := range c {
				want := tc.want(x, k)
				if !near(c[k], want, 1e-13) {
					t.Errorf("%s at %v: c[%d] = %.17g, want %.17g", tc.name, x, k, c[k], want)
				}
				if math.IsInf(e[k], 0) || e[k] > 1e-12*math.Max(1, math.Abs(want)) {
					t.Errorf("%s at %v: bound e[%d] = %g unexpectedly large", tc.name, x, k, e[k])
				}
			}
		}
	}
}

// TestTaylorVanishing uses the error bounds the way the classifier does
// (a coefficient vanishes when |c[k]| ≤ e[k]) on textbook equilibria.
func TestTaylorVanishing(t *testing.T) {
	tests := []struct {
		name, rate string
		env        Env
		theta      []float64
		x          float64
		order      int // first non-vanishing order
	}{
		// Verhulst: x* = K with f' = −r.
		{"logistic at K", "r*x*(1 - x/K)", Env{State: "x", Params: []string{"r", "K"}}, []float64{0.3, 7.1}, 7.1, 1},
		// Semenov: at δ = 1/e the equilibria merge at θ = 1, f'' = 1 > 0
		// (REFERENCE-CHECKS; δ e^θ − θ, f' = δe^θ − 1 = 0, f'' = δe^θ = 1).
		{"Semenov fold", "delta*exp(theta) - theta", Env{State: "theta", Params: []string{"delta"}}, []float64{1 / math.E}, 1, 2},
		// Strogatz ch. 2: x' = −x³, third order decides.
		{"cubic", "-x^3", Env{State: "x"}, nil, 0, 3},
		// Schaefer (1954): fold of r x (1 − x/K) − H at H = rK/4, x = K/2.
		{"Schaefer fold", "r*x*(1 - x/K) - r*K/4", Env{State: "x", Params: []string{"r", "K"}}, []float64{0.9, 10}, 5, 2},
	}
	for _, tc := range tests {
		m := mustCompile(t, tc.rate, tc.env).NewMachine()
		c, e := taylor(m, tc.x, tc.theta)
		first := -1
		for k := range c {
			if math.Abs(c[k]) > e[k] {
				first = k
				break
			}
		}
		if first != tc.order {
			t.Errorf("%s: first non-vanishing order %d, want %d (c = %v, e = %v)", tc.name, first, tc.order, c[:4], e[:4])
		}
	}
}

// fdCases cover every function of the language with parameters.
var fdCases = []string{
	"L - s*P + r*P^q/(m^q + P^q)",
	"exp(-P/r)*sin(3*P) + cos(P*s)",
	"log(1 + P^2)*tan(P/3) + log10(m + P^2)",
	"sqrt(m + P^2) - atan(q*P - 1) + abs(P - 7)",
	"sinh(P/2)*cosh(P/3) - tanh(s*P)",
	"pow(P + 3, P/q) + min(P, 9) - max(-P^2, -50)",
	"L/(1 + exp(-(P - m)/s)) - P^-2 + P^-3.5",
}

// TestTaylorFiniteDifferences compares the coefficients with gonum's
// finite differences (diff/fd, central formulas for the first and second
// derivative) at random points: c[1] ≈ f', 2c[2] ≈ f”, and for higher
// orders (k+1)c[k+1] ≈ d c[k]/dx, since c[k] = f⁽ᵏ⁾/k!.
func TestTaylorFiniteDifferences(t *testing.T) {
	env := Env{State: "P", Params: []string{"L", "s", "r", "m", "q"}}
	rng := rand.New(rand.NewPCG(1, 2))
	for _, rate := range fdCases {
		p := mustCompile(t, rate, env)
		m := p.NewMachine()
		for i := 0; i < 20; i++ {
			x := 0.2 + 2.5*rng.Float64()
			theta := []float64{0.1 + rng.Float64(), 0.5 + rng.Float64(), 0.5 + rng.Float64(), 0.5 + rng.Float64(), 1 + 3*rng.Float64()}
			c, _ := taylor(m, x, theta)
			f := func(x float64) float64 { return m.Eval(x, theta) }
			d1 := fd.Derivative(f, x, &fd.Settings{Formula: fd.Central})
			d2 := fd.Derivative(f, x, &fd.Settings{Formula: fd.Central2nd})
			if !near(c[1], d1, 1e-6) {
				t.Errorf("%s at %v: c[1] = %v, fd.Central %v", rate, x, c[1], d1)
			}
			if !near(2*c[2], d2, 1e-4) {
				t.Errorf("%s at %v: 2c[2] = %v, fd.Central2nd %v", rate, x, 2*c[2], d2)
			}
			for k := 1; k < MaxOrder; k++ {
				ck := func(x float64) float64 {
					cc, _ := taylor(m, x, theta)
					return cc[k]
				}
				dk := fd.Derivative(ck, x, &fd.Settings{Formula: fd.Central, Step: 1e-5})
				if want := float64(k+1) * c[k+1]; !near(dk, want, 1e-5) {
					t.Errorf("%s at %v: (%d)c[%d] = %v, fd of c[%d] %v", rate, x, k+1, k+1, want, k, dk)
				}
			}
		}
	}
}

// TestParamGrad compares ∂f/∂θ_j and ∂²f/∂x∂θ_j with gonum central
// differences of Eval and of Taylor's c[1] = ∂f/∂x.
func TestParamGrad(t *testing.T) {
	env := Env{State: "P", Params: []string{"L", "s", "r", "m", "q"}}
	rng := rand.New(rand.NewPCG(3, 4))
	df, dfx := make([]float64, 5), make([]float64, 5)
	for _, rate := range append(fdCases, "q^P + L^(s*P) + pow(m, 2.5)*P") {
		p := mustCompile(t, rate, env)
		m := p.NewMachine()
		for i := 0; i < 20; i++ {
			x := 0.2 + 2.5*rng.Float64()
			theta := []float64{0.1 + rng.Float64(), 0.5 + rng.Float64(), 0.5 + rng.Float64(), 0.5 + rng.Float64(), 1 + 3*rng.Float64()}
			f := m.ParamGrad(x, theta, df, dfx)
			if ev := m.Eval(x, theta); f != ev {
				t.Errorf("%s: ParamGrad value %v != Eval %v", rate, f, ev)
			}
			for j := range theta {
				th := append([]float64(nil), theta...)
				at := func(v float64) []float64 { th[j] = v; return th }
				fj := func(v float64) float64 { return m.Eval(x, at(v)) }
				fxj := func(v float64) float64 {
					c := make([]float64, 2)
					m.Taylor(x, at(v), c, nil)
					return c[1]
				}
				want := fd.Derivative(fj, theta[j], &fd.Settings{Formula: fd.Central})
				wantx := fd.Derivative(fxj, theta[j], &fd.Settings{Formula: fd.Central})
				if !near(df[j], want, 1e-6) {
					t.Errorf("%s: ∂f/∂%s = %v, fd %v", rate, env.Params[j], df[j], want)
				}
				if !near(dfx[j], wantx, 1e-6) {
					t.Errorf("%s: ∂²f/∂x∂%s = %v, fd %v", rate, env.Params[j], dfx[j], wantx)
				}
				if !p.Uses(j) && (df[j] != 0 || dfx[j] != 0) {
					t.Errorf("%s: unused parameter %s has gradient %v, %v", rate, env.Params[j], df[j], dfx[j])
				}
			}
		}
	}
}

// TestTaylorSpecial checks the documented behaviour at singular points
// and kinks. Expected values are derived by hand in the comments.
func TestTaylorSpecial(t *testing.T) {
	nan := math.NaN()
	inf := math.Inf(1)
	tests := []struct {
		rate  string
		theta []float64 // a, b, c
		x     float64
		want  []float64 // orders 0..3; NaN means NaN, inf means ±Inf or NaN
	}{
		{"x^a", []float64{2, 0, 0}, 0, []float64{0, 0, 1, 0}},         // x² at 0, through math.Pow rules
		{"x^a", []float64{3, 0, 0}, 0, []float64{0, 0, 0, 1}},         //
		{"x^a", []float64{2.5, 0, 0}, 0, []float64{0, nan, nan, nan}}, // not analytic at 0
		{"(x+b)^a", []float64{0.5, 0, 0}, 0, []float64{0, nan, nan, nan}},
		{"b^a + x", []float64{0.5, 0, 0}, 0, []float64{0, 1, 0, 0}},    // constant base: no derivative
		{"x^a", []float64{-1, 0, 0}, 0, []float64{inf, nan, nan, nan}}, // pole
		{"x^a", []float64{2, 0, 0}, -2, []float64{4, -4, 1, 0}},        // negative base, integer exponent
		{"sqrt(x)", nil, 0, []float64{0, inf, inf, inf}},
		{"log(x)", nil, 0, []float64{inf, inf, inf, inf}},
		{"1/x", nil, 0, []float64{inf, inf, inf, inf}},
		// abs, min, max follow the branch valid for t → 0⁺:
		{"abs(x)", nil, 0, []float64{0, 1, 0, 0}},
		{"abs(-x)", nil, 0, []float64{0, 1, 0, 0}},
		{"abs(x^2 - 1)", nil, 1, []float64{0, 2, 1, 0}},   // x = 1+t: 2t + t²
		{"abs(x^2 - 1)", nil, -1, []float64{0, 2, -1, 0}}, // x = −1+t: |−2t + t²|
		{"min(x, 2 - x)", nil, 1, []float64{1, -1, 0, 0}}, // for t > 0 the min is 2 − x
		{"max(x, 2 - x)", nil, 1, []float64{1, 1, 0, 0}},  //
		{"max(x^3, 0)", nil, 0, []float64{0, 0, 0, 1}},    // x³ > 0 for t > 0
		{"min(x^2, 0*x)", nil, 0, []float64{0, 0, 0, 0}},  // 0 ≤ x²
	}
	env := Env{State: "x", Params: []string{"a", "b", "c"}}
	for _, tc := range tests {
		theta := tc.theta
		if theta == nil {
			theta = []float64{0, 0, 0}
		}
		m := mustCompile(t, tc.rate, env).NewMachine()
		c, e := make([]float64, 4), make([]float64, 4)
		m.Taylor(tc.x, theta, c, e)
		for k, w := range tc.want {
			ok := c[k] == w
			switch {
			case math.IsNaN(w):
				ok = math.IsNaN(c[k]) && math.IsInf(e[k], 1)
			case math.IsInf(w, 0):
				ok = math.IsNaN(c[k]) || math.IsInf(c[k], 0)
			}
			if !ok {
				t.Errorf("%s at x=%v θ=%v: c = %v, want %v", tc.rate, tc.x, theta, c, tc.want)
				break
			}
		}
	}
}

// TestTaylorMatchesEval checks that c[0] is Eval's value bit for bit, at
// every order, on random expressions and points.
func TestTaylorMatchesEval(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 9))
	env := Env{State: "x", Params: []string{"a", "b", "q"}}
	for i := 0; i < 300; i++ {
		src := randomExpr(rng, 4)
		m := mustCompile(t, src, env).NewMachine()
		for j := 0; j < 5; j++ {
			x := -3 + 6*rng.Float64()
			theta := []float64{-2 + 4*rng.Float64(), -2 + 4*rng.Float64(), 4 * rng.Float64()}
			v := m.Eval(x, theta)
			for d := 0; d <= MaxOrder; d++ {
				c := make([]float64, d+1)
				m.Taylor(x, theta, c, nil)
				if !sameFloat(c[0], v) {
					t.Fatalf("%s at %v: c[0] = %v, Eval = %v", src, x, c[0], v)
				}
			}
		}
	}
}

func sameFloat(a, b float64) bool {
	return math.Float64bits(a) == math.Float64bits(b) || math.IsNaN(a) && math.IsNaN(b)
}

func TestUses(t *testing.T) {
	env := Env{State: "x", Params: []string{"a", "b", "c", "d", "K"},
		Defines: []Define{{"g", "b*2"}, {"h", "c"}}}
	p := mustCompile(t, "a*x + g + (K - K)", env)
	want := []bool{true, true, false, false, true}
	for j, w := range want {
		if p.Uses(j) != w {
			t.Errorf("Uses(%d) = %v, want %v", j, p.Uses(j), w)
		}
	}
	if p.Uses(-1) || p.Uses(5) || p.NumParams() != 5 {
		t.Errorf("out-of-range Uses or NumParams wrong")
	}
}

// TestDefinesShared checks that a define is computed once: the lowered
// program holds one exp instruction however often g is used.
func TestDefinesShared(t *testing.T) {
	env := Env{State: "x", Params: []string{"a"}, Defines: []Define{{"g", "exp(a*x)"}, {"h", "g*g"}}}
	p := mustCompile(t, "g + h + g/h", env)
	n := 0
	for _, in := range p.code {
		if in.op == opExp {
			n++
		}
	}
	if n != 1 {
		t.Errorf("%d exp instructions, want 1", n)
	}
	got := p.NewMachine().Eval(0.3, []float64{2})
	g := math.Exp(0.6)
	if want := g + g*g + g/(g*g); !near(got, want, 1e-15) {
		t.Errorf("Eval = %v, want %v", got, want)
	}
}

// TestFolding checks constant folding and the lowering of integer powers.
func TestFolding(t *testing.T) {
	p := mustCompile(t, "x*(2^10 - exp(0) - 3*pi/pi) + x^3 + x^-2", testEnv)
	for _, in := range p.code {
		switch in.op {
		case opPow, opExp:
			t.Errorf("instruction %v not folded or lowered", in.op)
		}
	}
	const x = 1.7
	if got, want := p.NewMachine().Eval(x, []float64{0, 0, 0}), x*1020+x*x*x+1/(x*x); !near(got, want, 1e-15) {
		t.Errorf("Eval = %v, want %v", got, want)
	}
}

func TestNoAllocs(t *testing.T) {
	env := Env{State: "P", Params: []string{"L", "s", "r", "m", "q"}}
	m := mustCompile(t, "L - s*P + r*P^q/(m^q + P^q) + abs(sin(P))", env).NewMachine()
	theta := []float64{0.1, 0.5, 1, 1, 2.5}
	c, e := make([]float64, 8), make([]float64, 8)
	df, dfx := make([]float64, 5), make([]float64, 5)
	for name, f := range map[string]func(){
		"Eval":      func() { m.Eval(0.7, theta) },
		"Taylor":    func() { m.Taylor(0.7, theta, c, e) },
		"Taylor2":   func() { m.Taylor(0.7, theta, c[:3], e[:3]) },
		"Taylor2θ":  func() { theta[4] += 0.25; m.Taylor(0.7, theta, c[:3], e[:3]) },
		"ParamGrad": func() { m.ParamGrad(0.7, theta, df, dfx) },
		"Diagnose":  func() { m.Diagnose(0.7, theta) },
	} {
		if n := testing.AllocsPerRun(100, f); n != 0 {
			t.Errorf("%s: %v allocations per call", name, n)
		}
	}
}

// TestConcurrent shares one Program between goroutines, each with its own
// Machine (run with -race).
func TestConcurrent(t *testing.T) {
	env := Env{State: "P", Params: []string{"L", "s", "r", "m", "q"}}
	p := mustCompile(t, "L - s*P + r*P^q/(m^q + P^q)", env)
	theta := []float64{0.1, 0.5, 1, 1, 8}
	want := p.NewMachine().Eval(0.9, theta)
	var wg sync.WaitGroup
	for g := 0; g < 8; g++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			m := p.NewMachine()
			c := make([]float64, 8)
			for i := 0; i < 200; i++ {
				m.Taylor(0.9, theta, c, nil)
				if c[0] != want || m.Eval(0.9, theta) != want {
					t.Error("concurrent result differs")
					return
				}
			}
		}()
	}
	wg.Wait()
}
