package expr

import (
	"flag"
	"math"
	"math/big"
	"math/rand/v2"
	"strconv"
	"testing"
)

// boundScale multiplies the number of random samples of the math/big
// reference checks (go test -run ErrorBound -bound.scale 20).
var boundScale = flag.Int("bound.scale", 1, "multiply the random samples of the error-bound tests")

// boundOrders are the orders at which the bounds are checked: the unrolled
// low-order rules (taylorlow.go) and the general ones.
var boundOrders = []int{1, 2, MaxOrder}

// checkBound compares c[k] and e[k] with the reference coefficients and
// returns how many were checked and the largest error/bound ratio.
func checkBound(t *testing.T, what string, c, e []float64, ref bser) (checked int, worst float64) {
	t.Helper()
	for k := range c {
		if math.IsInf(e[k], 1) || math.IsNaN(c[k]) {
			continue
		}
		diff := new(big.Float).SetPrec(refPrec).Sub(bf(c[k]), ref[k])
		df, _ := diff.Abs(diff).Float64()
		if df > e[k]+refTol(ref[k]) {
			rf, _ := ref[k].Float64()
			t.Errorf("%s, order %d: c[%d] = %v, exact %v, error %.3g > bound %.3g",
				what, len(c)-1, k, c[k], rf, df, e[k])
		}
		if e[k] > 0 && df > 0 {
			worst = math.Max(worst, df/e[k])
		}
		checked++
	}
	return checked, worst
}

// boundCases exercise every instruction of the Taylor back end.
var boundCases = []struct {
	rate    string
	defines []Define
	xlo     float64 // x is drawn from [xlo, xhi]
	xhi     float64
}{
	{rate: "a - b*x + x^2/(1+x^2)", xlo: -2, xhi: 3},             // shallow lake (Carpenter et al. 1999)
	{rate: "a*x*(1-x/b)", xlo: -2, xhi: 3},                       // logistic (Verhulst)
	{rate: "a*exp(x) - x", xlo: -2, xhi: 3},                      // Semenov
	{rate: "c*x^q/(b^q + x^q)", xlo: 0.05, xhi: 3},               // Hill term, parameter exponent
	{rate: "a - b*x + c*x^q/(1 + x^q)", xlo: 0.05, xhi: 3},       // lake with Hill exponent
	{rate: "exp(sin(x)*a) - log(1+x^2)", xlo: -3, xhi: 3},        //
	{rate: "sqrt(x^2+a) * cos(b*x)", xlo: -3, xhi: 3},            //
	{rate: "tan(x/3) + atan(a*x - 1)", xlo: -3, xhi: 3},          //
	{rate: "sinh(x/2) - cosh(x/3) + tanh(a*x)", xlo: -3, xhi: 3}, //
	{rate: "log10(x^2 + 1)*0.1 + pi*e*x^3", xlo: -3, xhi: 3},     //
	{rate: "pow(x+2, a) - x^-3", xlo: -1.5, xhi: 3},              //
	{rate: "(x+3)^(x/2) + 2^x*0.3 + e^x", xlo: -2, xhi: 3},       // exponent depends on x
	{rate: "abs(x - a) + min(x, b) - max(x^2, c)", xlo: -2, xhi: 3},
	{rate: "1/(x - 1.1) + x^7 - 3*x^5 + 0.1*x^64", xlo: -1, xhi: 1},
	{rate: "exp(-x^2/2)/sqrt(2*pi)", xlo: -3, xhi: 3},
	{rate: "x^2.5 + x^-1.5 + sqrt(x)", xlo: 0.01, xhi: 3},
	{rate: "h*g + exp(-g)", defines: []Define{{"g", "a*x/(1+x)"}, {"h", "g^2 - b"}}, xlo: 0, xhi: 3},
	{rate: "sin(50*x) + cos(x*1e3)/1e3 + tan(x)", xlo: -1.5, xhi: 1.5},
	{rate: "exp(30*x) - exp(29.9*x)", xlo: -1, xhi: 1}, // cancellation
	{rate: "(x - 1)^3 * (a - x)^2", xlo: 0, xhi: 2},
}

// TestTaylorErrorBound checks e[k] ≥ |c[k] − exact| for random inputs, the
// exact coefficients from a math/big evaluation at 400 bits (bigref_test.go),
// at orders 1, 2 (the unrolled rules) and MaxOrder.
func TestTaylorErrorBound(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	draws := 150 * *boundScale
	for _, tc := range boundCases {
		env := Env{State: "x", Params: []string{"a", "b", "c", "q"}, Defines: tc.defines}
		p, err := Compile(tc.rate, env)
		if err != nil {
			t.Fatalf("%s: %v", tc.rate, err)
		}
		m := p.NewMachine()
		checked, worst := 0, make([]float64, len(boundOrders))
		for i := 0; i < draws; i++ {
			x := tc.xlo + (tc.xhi-tc.xlo)*rng.Float64()
			theta := []float64{0.1 + 1.9*rng.Float64(), 0.1 + 1.9*rng.Float64(), 0.1 + 1.9*rng.Float64(), 1 + 4*rng.Float64()}
			ref, err := refTaylor(p, x, theta, MaxOrder)
			if err != nil {
				continue
			}
			for o, d := range boundOrders {
				c, e := make([]float64, d+1), make([]float64, d+1)
				m.Taylor(x, theta, c, e)
				what := tc.rate + " at x=" + fmtG(x) + " θ=" + fmtGs(theta)
				n, w := checkBound(t, what, c, e, ref)
				checked += n
				worst[o] = math.Max(worst[o], w)
			}
		}
		if checked < draws {
			t.Errorf("%s: only %d coefficients checked", tc.rate, checked)
		}
		t.Logf("%-40s %5d coefficients, largest error/bound at orders %v: %.3g", tc.rate, checked, boundOrders, worst)
	}
}

func fmtG(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }

func fmtGs(xs []float64) string {
	s := "["
	for i, x := range xs {
		if i > 0 {
			s += " "
		}
		s += fmtG(x)
	}
	return s + "]"
}

// randomExpr builds a random rate-law source over x, a, b, q with every
// operator and function of the language.
func randomExpr(rng *rand.Rand, depth int) string {
	if depth == 0 || rng.IntN(4) == 0 {
		switch rng.IntN(6) {
		case 0, 1:
			return "x"
		case 2:
			return "a"
		case 3:
			return "b"
		case 4:
			return []string{"0.3", "2", "1.5e-1", "pi", "e", "7"}[rng.IntN(6)]
		}
		return "(x - b)"
	}
	sub := func() string { return randomExpr(rng, depth-1) }
	switch rng.IntN(12) {
	case 0:
		return "(" + sub() + " + " + sub() + ")"
	case 1:
		return "(" + sub() + " - " + sub() + ")"
	case 2, 3:
		return sub() + "*" + sub()
	case 4:
		return sub() + "/(1 + " + sub() + "^2)"
	case 5:
		return "(" + sub() + ")^" + []string{"2", "3", "-1", "q", "0.5", "1.7"}[rng.IntN(6)]
	case 6:
		return "-" + sub()
	case 7:
		f := []string{"exp", "sin", "cos", "atan", "tanh", "sinh", "cosh", "tan"}[rng.IntN(8)]
		return f + "(" + sub() + "/4)"
	case 8:
		f := []string{"log", "log10", "sqrt"}[rng.IntN(3)]
		return f + "(1 + " + sub() + "^2)"
	case 9:
		f := []string{"min", "max", "pow"}[rng.IntN(3)]
		if f == "pow" {
			return "pow(1 + " + sub() + "^2, " + sub() + "/3)"
		}
		return f + "(" + sub() + ", " + sub() + ")"
	case 10:
		return "abs(" + sub() + ")"
	}
	return sub() + " - " + sub()
}

// TestTaylorErrorBoundRandom repeats the check of TestTaylorErrorBound on
// random expressions against the same math/big reference.
func TestTaylorErrorBoundRandom(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 5))
	env := Env{State: "x", Params: []string{"a", "b", "q"}}
	n := 300
	if testing.Short() {
		n = 60
	}
	n *= *boundScale
	checked := 0
	worst := make([]float64, len(boundOrders))
	for i := 0; i < n; i++ {
		src := randomExpr(rng, 4)
		p, err := Compile(src, env)
		if err != nil {
			t.Fatalf("%s: %v", src, err)
		}
		m := p.NewMachine()
		for j := 0; j < 4; j++ {
			x := -2 + 4*rng.Float64()
			theta := []float64{-1 + 3*rng.Float64(), 0.1 + 2*rng.Float64(), 0.5 + 3*rng.Float64()}
			ref, err := refTaylor(p, x, theta, MaxOrder)
			if err != nil {
				continue
			}
			for o, d := range boundOrders {
				c, e := make([]float64, d+1), make([]float64, d+1)
				m.Taylor(x, theta, c, e)
				k, w := checkBound(t, src+" at x="+fmtG(x)+" θ="+fmtGs(theta), c, e, ref)
				checked += k
				worst[o] = math.Max(worst[o], w)
			}
		}
	}
	if checked < n {
		t.Errorf("only %d coefficients checked", checked)
	}
	t.Logf("%d coefficients checked; largest error/bound at orders %v: %.3g", checked, boundOrders, worst)
}

// refTol allows for the reference's own rounding (about 2^-400 relative per
// operation, accumulated over recurrences whose terms may cancel): 2^-300
// relative to max(1, |ref|).
func refTol(ref *big.Float) float64 {
	r, _ := ref.Float64()
	return 0x1p-300 * math.Max(1, math.Abs(r))
}

// TestLibraryAccuracy checks the accuracy model of Go's math functions that
// the error bounds rely on (rounding.go: lib, trigReduce, powLib) against
// the math/big reference, on this platform (on amd64 Exp and Log are
// assembly versions whose sources state no accuracy).
func TestLibraryAccuracy(t *testing.T) {
	rng := rand.New(rand.NewPCG(21, 22))
	n := 1000 // also run with 100000 per function: largest error/model 0.69 (tan)
	if testing.Short() {
		n = 200
	}
	type fn struct {
		name  string
		f     func(float64) float64
		ref   func(*big.Float) *big.Float
		bound func(x, v float64) float64
		lo    float64
		hi    float64
	}
	sin := func(x *big.Float) *big.Float { s, _ := bsincos(x); return s }
	cos := func(x *big.Float) *big.Float { _, c := bsincos(x); return c }
	fns := []fn{
		{"exp", math.Exp, bexp, func(x, v float64) float64 { return lib(v, 4) }, -700, 700},
		{"log", math.Log, blog, func(x, v float64) float64 { return lib(v, 3) }, 1e-300, 1e300},
		{"log near 1", math.Log, blog, func(x, v float64) float64 { return lib(v, 3) }, 0.5, 2},
		{"log10", math.Log10, func(x *big.Float) *big.Float { return bquo(blog(x), blog(bint(10))) },
			func(x, v float64) float64 { return lib(v, 4) }, 1e-300, 1e300},
		{"sin", math.Sin, sin, func(x, v float64) float64 { return lib(v, 4) + trigReduce(x) }, -100, 100},
		{"cos", math.Cos, cos, func(x, v float64) float64 { return lib(v, 4) + trigReduce(x) }, -100, 100},
		{"tan", math.Tan, func(x *big.Float) *big.Float { s, c := bsincos(x); return bquo(s, c) },
			func(x, v float64) float64 { return lib(v, 4) + trigReduce(x)*(1+v*v) }, -100, 100},
		{"sin large", math.Sin, sin, func(x, v float64) float64 { return lib(v, 4) + trigReduce(x) }, 1 << 29, 1e15},
		{"cos large", math.Cos, cos, func(x, v float64) float64 { return lib(v, 4) + trigReduce(x) }, 1 << 29, 1e15},
		{"tan large", math.Tan, func(x *big.Float) *big.Float { s, c := bsincos(x); return bquo(s, c) },
			func(x, v float64) float64 { return lib(v, 4) + trigReduce(x)*(1+v*v) }, 1 << 29, 1e15},
		{"atan", math.Atan, batan, func(x, v float64) float64 { return lib(v, 4) }, -50, 50},
		{"sinh", math.Sinh, func(x *big.Float) *big.Float {
			return bquo(bsub(bexp(x), bexp(bnew().Neg(x))), bint(2))
		}, func(x, v float64) float64 { return lib(v, 6) }, -700, 700},
		{"cosh", math.Cosh, func(x *big.Float) *big.Float {
			return bquo(badd(bexp(x), bexp(bnew().Neg(x))), bint(2))
		}, func(x, v float64) float64 { return lib(v, 6) }, -700, 700},
		{"tanh", math.Tanh, func(x *big.Float) *big.Float {
			e2 := bexp(bmul(bint(2), x))
			return bquo(bsub(e2, bint(1)), badd(e2, bint(1)))
		}, func(x, v float64) float64 { return lib(v, 4) }, -20, 20},
	}
	for _, f := range fns {
		worst := 0.0
		for i := 0; i < n; i++ {
			var x float64
			if f.lo > 0 { // log-uniform
				x = math.Exp(math.Log(f.lo) + (math.Log(f.hi)-math.Log(f.lo))*rng.Float64())
			} else {
				x = f.lo + (f.hi-f.lo)*rng.Float64()
				if i%3 == 0 {
					x *= 1e-3 // small arguments too
				}
			}
			v := f.f(x)
			d := new(big.Float).SetPrec(refPrec).Sub(bf(v), f.ref(bf(x)))
			df, _ := d.Abs(d).Float64()
			b := f.bound(x, v)
			if df > b {
				t.Errorf("%s(%v) = %v: error %.3g > model %.3g", f.name, x, v, df, b)
			}
			worst = math.Max(worst, df/b)
		}
		t.Logf("%-10s largest error/model %.3f", f.name, worst)
	}
	// Subnormal arguments: Go's amd64 Log does not renormalise them, so the
	// model (logLib, powLib for non-integer exponents) must give +Inf there.
	for _, x := range []float64{5e-324, 1e-310, 0x1p-1023} {
		d := new(big.Float).SetPrec(refPrec).Sub(bf(math.Log(x)), blog(bf(x)))
		df, _ := d.Abs(d).Float64()
		if df > lib(math.Log(x), 3) && !math.IsInf(logLib(math.Log(x), x, 3), 1) {
			t.Errorf("log(%v): error %.3g, model %.3g", x, df, logLib(math.Log(x), x, 3))
		}
		if !math.IsInf(powLib(x, 1.5, math.Pow(x, 1.5)), 1) || !math.IsInf(logLib(math.Log(x), x, 3), 1) {
			t.Errorf("subnormal %v: model finite", x)
		}
		t.Logf("log(%v) = %v: error %.3g (model +Inf)", x, math.Log(x), df)
	}
	// Pow: powLib against exp(b log a).
	worst := 0.0
	for i := 0; i < n; i++ {
		a := math.Exp(-5 + 10*rng.Float64())
		b := -30 + 60*rng.Float64()
		if i%2 == 0 {
			b = math.Round(b) // the repeated-squaring path alone
		}
		v := math.Pow(a, b)
		d := new(big.Float).SetPrec(refPrec).Sub(bf(v), bpow0(bf(a), bf(b)))
		df, _ := d.Abs(d).Float64()
		if bd := powLib(a, b, v); df > bd {
			t.Errorf("pow(%v, %v) = %v: error %.3g > model %.3g", a, b, v, df, bd)
		} else {
			worst = math.Max(worst, df/bd)
		}
	}
	t.Logf("%-10s largest error/model %.3f", "pow", worst)
}
