package expr

import (
	"math"
	"math/big"
	"math/rand/v2"
	"slices"
	"testing"
)

// inBig reports whether the exact value ref lies in iv, allowing the
// reference's own rounding (refTol).
func inBig(iv Interval, ref *big.Float) bool {
	tol := bf(refTol(ref))
	lo := badd(bf(iv.Lo), bnew().Neg(tol))
	hi := badd(bf(iv.Hi), tol)
	if math.IsInf(iv.Lo, -1) {
		lo = nil
	}
	if math.IsInf(iv.Hi, 1) {
		hi = nil
	}
	return (lo == nil || lo.Cmp(ref) <= 0) && (hi == nil || ref.Cmp(hi) <= 0)
}

// checkEnclosure compares Interval and IntervalSlope on the box
// [x − r, x + r] with the math/big values of f and f' at points of the box
// (its ends, its middle and random points): every exact value must lie in
// the enclosures. It returns the number of points checked.
func checkEnclosure(t *testing.T, rng *rand.Rand, p *Program, m *Machine, x, r float64, theta []float64) int {
	t.Helper()
	box := Interval{x - r, x + r}
	f := m.Interval(box, theta)
	fs, df, _ := m.IntervalSlope(box, theta)
	if f.IsEmpty() != fs.IsEmpty() {
		t.Errorf("%s on %v: Interval %v, IntervalSlope %v", p.Rate(), box, f, fs)
	}
	pts := []float64{box.Lo, box.Hi, x}
	for i := 0; i < 3; i++ {
		pts = append(pts, box.Lo+(box.Hi-box.Lo)*rng.Float64())
	}
	n := 0
	for _, y := range pts {
		ref, err := refTaylor(p, y, theta, 1)
		if err != nil {
			continue // f is not defined (analytic) at y
		}
		if !inBig(f, ref[0]) {
			rf, _ := ref[0].Float64()
			t.Errorf("%s θ=%s: f(%v) = %v not in enclosure %v over %v", p.Rate(), fmtGs(theta), y, rf, f, box)
		}
		if !inBig(fs, ref[0]) {
			rf, _ := ref[0].Float64()
			t.Errorf("%s θ=%s: f(%v) = %v not in IntervalSlope enclosure %v over %v", p.Rate(), fmtGs(theta), y, rf, fs, box)
		}
		if !inBig(df, ref[1]) {
			rf, _ := ref[1].Float64()
			t.Errorf("%s θ=%s: f'(%v) = %v not in enclosure %v over %v", p.Rate(), fmtGs(theta), y, rf, df, box)
		}
		pv := m.Interval(Point(y), theta)
		if !inBig(pv, ref[0]) {
			rf, _ := ref[0].Float64()
			t.Errorf("%s θ=%s: f(%v) = %v not in point enclosure %v", p.Rate(), fmtGs(theta), y, rf, pv)
		}
		n++
	}
	return n
}

// boxRadii are the half-widths of the random boxes, from a point to wide.
var boxRadii = []float64{0, 1e-13, 1e-7, 1e-3, 0.05, 0.5}

// TestIntervalEnclosesBigRef: the interval enclosures of f and f' contain
// the exact values, computed with Go's arbitrary-precision math/big at 400
// bits (bigref_test.go), at random points of random boxes, for the laws of
// the Taylor bound tests (every instruction) and random expressions.
func TestIntervalEnclosesBigRef(t *testing.T) {
	rng := rand.New(rand.NewPCG(17, 19))
	draws := 40 * *boundScale
	checked := 0
	for _, tc := range boundCases {
		env := Env{State: "x", Params: []string{"a", "b", "c", "q"}, Defines: tc.defines}
		p := mustCompile(t, tc.rate, env)
		m := p.NewMachine()
		for i := 0; i < draws; i++ {
			x := tc.xlo + (tc.xhi-tc.xlo)*rng.Float64()
			theta := []float64{0.1 + 1.9*rng.Float64(), 0.1 + 1.9*rng.Float64(), 0.1 + 1.9*rng.Float64(), 1 + 4*rng.Float64()}
			r := boxRadii[rng.IntN(len(boxRadii))] * (tc.xhi - tc.xlo)
			checked += checkEnclosure(t, rng, p, m, x, r, theta)
		}
	}
	n := 300
	if testing.Short() {
		n = 60
	}
	n *= *boundScale
	env := Env{State: "x", Params: []string{"a", "b", "q"}}
	for i := 0; i < n; i++ {
		p := mustCompile(t, randomExpr(rng, 4), env)
		m := p.NewMachine()
		for j := 0; j < 4; j++ {
			x := -2 + 4*rng.Float64()
			theta := []float64{-1 + 3*rng.Float64(), 0.1 + 2*rng.Float64(), 0.5 + 3*rng.Float64()}
			checked += checkEnclosure(t, rng, p, m, x, boxRadii[rng.IntN(len(boxRadii))], theta)
		}
	}
	if checked < 1000 {
		t.Errorf("only %d points checked", checked)
	}
	t.Logf("%d points checked", checked)
}

// TestIntervalOperators checks the rules one operator at a time on boxes
// whose exact ranges follow from elementary calculus (monotone pieces,
// extrema of sin and cos at π/2 + kπ, poles of tan and 1/x, domains of log
// and sqrt): the enclosure must contain the exact range [lo, hi] and be
// tight to a few ulps of it (a bound given as ±Inf must be infinite).
func TestIntervalOperators(t *testing.T) {
	inf := math.Inf(1)
	cases := []struct {
		src      string
		box      Interval
		lo, hi   float64 // exact range (from calculus)
		cont     bool
		dlo, dhi float64 // exact range of f' (NaN: not checked)
	}{
		{"x^2", Interval{-1, 2}, 0, 4, true, -2, 4}, // even power: minimum 0 inside
		{"x*x", Interval{-3, -1}, 1, 9, true, -6, -2},
		{"x^4", Interval{-2, 1}, 0, 16, true, -32, 4},
		{"x^-2", Interval{-2, -1}, 0.25, 1, true, 0.25, 2},
		{"x^-2", Interval{-1, 2}, 0.25, inf, false, math.NaN(), math.NaN()}, // pole at 0
		{"1/x", Interval{0.5, 2}, 0.5, 2, true, -4, -0.25},
		{"1/x", Interval{0, 2}, 0.5, inf, false, math.NaN(), math.NaN()}, // y > 0 only
		{"1/x", Interval{-2, 0}, -inf, -0.5, false, math.NaN(), math.NaN()},
		{"1/x", Interval{-1, 2}, -inf, inf, false, math.NaN(), math.NaN()},
		{"(x+1)/(x-3)", Interval{0, 1}, -1, -1.0 / 3, true, -1, -4.0 / 9},
		{"sin(x)", Interval{0, 10}, -1, 1, true, -1, 1}, // several periods
		{"sin(x)", Interval{0.25, 1}, math.Sin(0.25), math.Sin(1), true, math.Cos(1), math.Cos(0.25)},
		{"sin(x)", Interval{1, 2}, math.Sin(1), 1, true, math.Cos(2), math.Cos(1)},                 // maximum at π/2
		{"sin(x)", Interval{100, 101}, math.Sin(100), math.Sin(101), true, math.NaN(), math.NaN()}, // monotone: 100 mod 2π ≈ 5.75
		{"cos(x)", Interval{-0.5, 0.5}, math.Cos(0.5), 1, true, -math.Sin(0.5), math.Sin(0.5)},     // maximum at 0
		{"cos(x)", Interval{3, 3.5}, -1, math.Cos(3.5), true, math.NaN(), math.NaN()},              // minimum at π
		{"cos(x)", Interval{2*math.Pi - 0.1, 2*math.Pi + 0.1}, math.Cos(0.1), 1, true, math.NaN(), math.NaN()},
		{"tan(x)", Interval{-1, 1}, math.Tan(-1), math.Tan(1), true, 1, 1 + math.Tan(1)*math.Tan(1)},
		{"tan(x)", Interval{1, 2}, -inf, inf, false, math.NaN(), math.NaN()}, // pole at π/2
		{"log(x)", Interval{1, math.E}, 0, 1, true, 1 / math.E, 1},
		{"log(x)", Interval{0, 1}, -inf, 0, false, math.NaN(), math.NaN()}, // edge of the domain
		{"log(x)", Interval{-1, 2}, -inf, math.Log(2), false, 0.5, inf},    // partly outside
		{"log10(x)", Interval{10, 100}, 1, 2, true, 0.01 / math.Ln10, 0.1 / math.Ln10},
		{"sqrt(x)", Interval{0, 4}, 0, 2, true, 0.25, inf},   // derivative unbounded at 0
		{"sqrt(x)", Interval{-1, 4}, 0, 2, false, 0.25, inf}, // partly outside
		{"x^0.5", Interval{-1, 4}, 0, 2, false, 0.25, inf},
		{"x^2.5", Interval{0, 4}, 0, 32, true, 0, 20},
		{"exp(x)", Interval{-1, 2}, math.Exp(-1), math.Exp(2), true, math.Exp(-1), math.Exp(2)},
		{"cosh(x)", Interval{-1, 2}, 1, math.Cosh(2), true, math.Sinh(-1), math.Sinh(2)}, // minimum at 0
		{"sinh(x)", Interval{-1, 2}, math.Sinh(-1), math.Sinh(2), true, 1, math.Cosh(2)},
		{"tanh(x)", Interval{-1, 2}, math.Tanh(-1), math.Tanh(2), true, math.NaN(), math.NaN()},
		{"atan(x)", Interval{-1, 2}, -math.Pi / 4, math.Atan(2), true, 0.2, 1},
		{"abs(x)", Interval{-3, 2}, 0, 3, true, -1, 1},
		{"min(x, 1)", Interval{-3, 2}, -3, 1, true, 0, 1},
		{"max(x, 1)", Interval{2, 3}, 2, 3, true, 1, 1},
		{"pow(x, x)", Interval{1, 2}, 1, 4, true, 1, 4 * (1 + math.Log(2))},
		{"x/(1 + x)", Interval{1, 2}, 0.5, 2.0 / 3, true, 1.0 / 9, 0.25},         // saturating: monotone rule
		{"3*x^2/(2 + x^2)", Interval{-1, 2}, 0, 2, true, math.NaN(), math.NaN()}, // u = x² ≥ 0
	}
	env := Env{State: "x"}
	for _, c := range cases {
		m := mustCompile(t, c.src, env).NewMachine()
		f, df, cont := m.IntervalSlope(c.box, nil)
		if !(f.Lo <= c.lo && c.hi <= f.Hi) {
			t.Errorf("%s on %v: %v does not contain [%v, %v]", c.src, c.box, f, c.lo, c.hi)
		}
		tight := func(got, want float64) bool {
			if math.IsInf(want, 0) {
				return got == want
			}
			return math.Abs(got-want) <= 1e-14*math.Max(1, math.Abs(want))
		}
		if !tight(f.Lo, c.lo) || !tight(f.Hi, c.hi) {
			t.Errorf("%s on %v: %v is not tight around [%v, %v]", c.src, c.box, f, c.lo, c.hi)
		}
		if cont != c.cont {
			t.Errorf("%s on %v: cont = %v, want %v", c.src, c.box, cont, c.cont)
		}
		if !math.IsNaN(c.dlo) && !(df.Lo <= c.dlo && c.dhi <= df.Hi) {
			t.Errorf("%s on %v: f' enclosure %v does not contain [%v, %v]", c.src, c.box, df, c.dlo, c.dhi)
		}
	}
}

func TestIntervalSpecialCases(t *testing.T) {
	// Logistic growth f = r x (1 − x/K) (Verhulst) vanishes exactly at
	// x = 0: the point enclosure is exactly [0, 0].
	m := mustCompile(t, "r*x*(1 - x/K)", Env{State: "x", Params: []string{"r", "K"}}).NewMachine()
	if f := m.Interval(Point(0), []float64{0.7, 3.1}); f != (Interval{}) {
		t.Errorf("logistic at 0: %v, want exactly [0, 0]", f)
	}
	// Exact values at 0 (and log at 1) stay exact: sin 0 = tan 0 = sinh 0 =
	// tanh 0 = atan 0 = log 1 = 0, cos 0 = cosh 0 = exp 0 = 1.
	m = mustCompile(t, "sin(x) + tan(x) + sinh(x) + tanh(x) + atan(x) + log(x + 1) + cos(x) + cosh(x) + exp(x) - 3", Env{State: "x"}).NewMachine()
	if f := m.Interval(Point(0), nil); f != (Interval{}) {
		t.Errorf("exact values at 0: %v, want exactly [0, 0]", f)
	}
	// Undefined everywhere on the box: empty.
	m = mustCompile(t, "log(x) + 1", Env{State: "x"}).NewMachine()
	if f := m.Interval(Interval{-2, -1}, nil); !f.IsEmpty() {
		t.Errorf("log on [-2, -1]: %v, want empty", f)
	}
	// A literal that is not a float64 (0.1) is an interval around it, so the
	// exact product 10·0.1 = 1 is enclosed.
	m = mustCompile(t, "x*0.1 - 1", Env{State: "x"}).NewMachine()
	if f := m.Interval(Point(10), nil); !f.Contains(0) {
		t.Errorf("10·0.1 − 1: %v does not contain the exact 0", f)
	}
	// x^0 = 1 and 1^y = 1 as math.Pow has them, even where the other
	// operand is undefined.
	m = mustCompile(t, "pow(log(x), 0) + pow(1, log(x))", Env{State: "x"}).NewMachine()
	if f := m.Interval(Point(-1), nil); !f.Contains(2) || f.Width() > 1e-15 {
		t.Errorf("pow(NaN, 0) + pow(1, NaN): %v, want 2 as Eval", f)
	}
}

func TestIntervalArithmeticMethods(t *testing.T) {
	a, b := Interval{-1, 2}, Interval{3, 4}
	if got := a.Mul(b); !(got.Lo <= -4 && got.Hi >= 8 && got.Lo > -4.0001 && got.Hi < 8.0001) {
		t.Errorf("[-1,2]·[3,4] = %v", got)
	}
	if got := b.Div(a); got.Lo != math.Inf(-1) || got.Hi != math.Inf(1) {
		t.Errorf("[3,4]/[-1,2] = %v, want the whole line", got)
	}
	if got := a.Intersect(b); !got.IsEmpty() {
		t.Errorf("disjoint intersection %v", got)
	}
	if got := a.Hull(b); got != (Interval{-1, 4}) {
		t.Errorf("hull %v", got)
	}
	if got := a.Add(b).Sub(b); !(got.Lo <= -1 && got.Hi >= 2) {
		t.Errorf("(a+b)−b = %v does not contain a", got)
	}
	// Outward rounding: 0.1 + 0.2 is not a float64 sum; the enclosure of
	// the exact sum of the two float64 values holds it.
	s := Point(0.1).Add(Point(0.2))
	ex := badd(bf(0.1), bf(0.2))
	if !inBig(s, ex) || s.Lo == s.Hi {
		t.Errorf("0.1+0.2: %v", s)
	}
	if NextDown(math.Inf(1)) != math.MaxFloat64 || NextUp(math.Inf(-1)) != -math.MaxFloat64 {
		t.Error("NextDown(+Inf) or NextUp(−Inf)")
	}
	for _, x := range []float64{1, -1, 0x1p-1074, -0x1p-1074, 0, math.MaxFloat64, 3.7e-310} {
		if d := NextDown(x); d != math.Nextafter(x, math.Inf(-1)) && !(x == 0 && d == -0x1p-1074) {
			t.Errorf("NextDown(%v) = %v, math.Nextafter %v", x, d, math.Nextafter(x, math.Inf(-1)))
		}
	}
}

func TestIntervalDoesNotAllocate(t *testing.T) {
	m := mustCompile(t, lakeRate, lakeEnv).NewMachine()
	th := append([]float64(nil), lakeTheta...)
	allocs := testing.AllocsPerRun(100, func() {
		th[0] += 1e-3 // a new θ each time: the θ-only part runs too
		m.Interval(Interval{0.2, 0.9}, th)
		m.IntervalSlope(Interval{0.2, 0.9}, th)
	})
	if allocs != 0 {
		t.Errorf("%v allocations per call", allocs)
	}
}

func BenchmarkIntervalSlope(b *testing.B) {
	m := mustCompile(b, lakeRate, lakeEnv).NewMachine()
	var s Interval
	i := 0
	for b.Loop() {
		x := 0.05 + float64(i&15)*0.3
		f, _, _ := m.IntervalSlope(Interval{x, x + 0.1}, lakeTheta)
		s = f
		i++
	}
	sink = s.Lo
}

func BenchmarkIntervalPoint(b *testing.B) {
	m := mustCompile(b, lakeRate, lakeEnv).NewMachine()
	var s Interval
	i := 0
	for b.Loop() {
		s = m.Interval(Point(0.05+float64(i&15)*0.3), lakeTheta)
		i++
	}
	sink = s.Lo
}

// The derivative of the Hill term x^q/(1 + x^q), q = 4, is
// g(x) = 4x³/(1 + x⁴)², which decreases for x > (3/5)^(1/4) ≈ 0.88
// (elementary calculus: g'(x) has the sign of 3(1 + x⁴) − 8x⁴). On
// [1, 1.156] its range is [g(1.156), g(1)] = [0.7957…, 1]; the enclosure
// h(1 − h)·q/x of the saturating rule is within a few per cent of it,
// where the general quotient rule gives about five times the width.
func TestIntervalSaturatingTight(t *testing.T) {
	p := mustCompile(t, "c*x^q/(b^q + x^q)", Env{State: "x", Params: []string{"b", "c", "q"}})
	m := p.NewMachine()
	g := func(x float64) float64 { return 4 * x * x * x / ((1 + x*x*x*x) * (1 + x*x*x*x)) }
	box := Interval{1, 1.156}
	_, df, cont := m.IntervalSlope(box, []float64{1, 1, 4})
	lo, hi := g(box.Hi), g(box.Lo)
	if !cont || df.Lo > lo || df.Hi < hi {
		t.Fatalf("derivative enclosure %v misses [%v, %v]", df, lo, hi)
	}
	if w := df.Hi - df.Lo; w > 1.05*(hi-lo) {
		t.Errorf("derivative enclosure %v of width %v, range width %v", df, w, hi-lo)
	}
}

// TestIntervalSaturating checks the monotone rule for k·u/(c + u) terms
// (findSat) against the math/big reference, with c of either sign, c
// depending on x, u negative, and boxes where the rule's conditions fail.
func TestIntervalSaturating(t *testing.T) {
	rng := rand.New(rand.NewPCG(23, 29))
	env := Env{State: "x", Params: []string{"a", "b", "c", "q"}}
	cases := []struct {
		src string
		// logForm: the derivative's form h(1 − h)·u'/u applies (u a
		// power or an exponential, with or without a factor); skip: the
		// product k·u is skipped on boxes, and run where the rule does
		// not apply.
		logForm, skip bool
	}{
		{"a*x/(b + x)", false, true},                 // Michaelis–Menten
		{"x/(x + b)", false, false},                  // order of the sum
		{"c*x^q/(b^q + x^q)", true, true},            // Hill
		{"(x - 2)/(b + (x - 2))", false, false},      // u of either sign
		{"x/(x + (-b))", false, false},               // c < 0
		{"2*exp(x)/(1 + exp(x))", true, true},        // constant factor, Arrhenius-like
		{"x/(x + x^2) + x^2/(a + x^2)", true, false}, // c depending on x
		{"a*x/(b + x) - c*x", false, true},           // inside a larger law
		{"c*(a*x^q)/(b + a*x^q)", true, true},
		{"q*x^a/(b + x^a)", true, true}, // non-integer exponent, x < 0 on some boxes
		{"a*exp(q*x - 3)/(b + exp(q*x - 3))", true, true},
		{"c*(a*exp(-x))/(b + a*exp(-x))", true, true},
		{"x^q/(x^q + (-b))", true, false},        // c < 0: u + c changes sign on some boxes
		{"a*(x - 2)/(b + (x - 2))", false, true}, // u of either sign: k·u run on such boxes
		// Integer powers, lowered to products (x of either sign).
		{"x^2/(b + x^2)", true, false}, // the budworm's predation term
		{"c*x^3/(b + x^3)", true, true},
		{"a*x^4/(b^4 + x^4)", true, true},
		{"(a/x^2)/(b + a/x^2)", true, false},
		{"c*(-x^2)/((-x^2) + (-b))", true, true},
	}
	n := 0
	for _, tc := range cases {
		src := tc.src
		p := mustCompile(t, src, env)
		sat := p.NewMachine().iv.sat
		if !slices.ContainsFunc(sat, func(s satTerm) bool { return s.ok }) {
			t.Errorf("%s: no saturating term recognised", src)
		}
		if got := slices.ContainsFunc(sat, func(s satTerm) bool { return s.ok && s.logForm }); got != tc.logForm {
			t.Errorf("%s: logarithmic derivative form %v, want %v", src, got, tc.logForm)
		}
		if got := slices.ContainsFunc(sat, func(s satTerm) bool { return s.skip }); got != tc.skip {
			t.Errorf("%s: product k·u skipped %v, want %v", src, got, tc.skip)
		}
		m := p.NewMachine()
		for i := 0; i < 60; i++ {
			x := -3 + 8*rng.Float64()
			theta := []float64{0.1 + 2*rng.Float64(), 0.1 + 2*rng.Float64(), 0.1 + 2*rng.Float64(), 1 + 4*rng.Float64()}
			n += checkEnclosure(t, rng, p, m, x, boxRadii[rng.IntN(len(boxRadii))]*4, theta)
		}
	}
	t.Logf("%d points checked", n)
}
