package steady

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"
)

func dump(t *testing.T, name string, f Func, lo, hi float64) {
	res, err := Find(f, lo, hi, DefaultOptions())
	if err != nil {
		fmt.Println("ERR", name, err)
		return
	}
	fmt.Printf("== %s [%g,%g] evals=%d taylor=%d\n", name, lo, hi, res.Evals, res.TaylorCalls)
	for _, q := range res.Equilibria {
		fmt.Printf("  x=%.15g err=%.2g slope=%.6g %v ord=%d from=%q basin=%v barrier=%v %s\n", q.X, q.XErr, q.Slope, q.Class, q.Order, q.AttractsFrom.String(), q.Basin, q.Barrier, q.Note)
	}
	fmt.Println("  undef", res.Undefined, "poles", res.Poles)
	for _, w := range res.Warnings {
		fmt.Println("  W:", w)
	}
}

type garbage struct{ r *rand.Rand }

func (g garbage) Eval(x float64) float64 { return g.r.NormFloat64() }
func (g garbage) Taylor(x float64, c, e []float64) {
	for k := range c {
		c[k] = g.r.NormFloat64()
		e[k] = math.Abs(g.r.NormFloat64()) * 1e-3
		if g.r.IntN(10) == 0 {
			c[k] = math.NaN()
		}
		if g.r.IntN(10) == 0 {
			c[k] = math.Inf(1)
		}
	}
}

func TestScratch(t *testing.T) {
	jf := func(ev func(float64) float64, j func(jet) jet) jetFunc { return jetFunc{eval: ev, jet: j} }
	dump(t, "const", poly{3}, 0, 1)
	dump(t, "x", poly{0, 1}, 0, 1)
	dump(t, "tiny domain", poly{-1, 1}, 1-1e-10, 1+1e-10)
	dump(t, "huge domain", logistic(1, 1e5), -1e6, 1e6)
	dump(t, "exp overflow", jf(func(x float64) float64 { return math.Exp(x) - 2 }, func(x jet) jet { return x.exp().addc(-2) }), -10, 1000)
	dump(t, "1/x", jf(func(x float64) float64 { return 1 / x }, func(x jet) jet { return jconst(x.n, 1).div(x) }), -1, 1)
	dump(t, "1/x^2-1", jf(func(x float64) float64 { return 1/(x*x) - 1 }, func(x jet) jet { return jconst(x.n, 1).div(x.mul(x)).addc(-1) }), -2, 2)
	dump(t, "1/x^2-1 off", jf(func(x float64) float64 { return 1/(x*x) - 1 }, func(x jet) jet { return jconst(x.n, 1).div(x.mul(x)).addc(-1) }), -2.1, 2)
	dump(t, "tan", jf(math.Tan, func(x jet) jet { s, c := x.sincos(); return s.div(c) }), 0.1, 10)
	sq := func(x jet) jet { // sqrt via exp(log/2)
		return x.log().scale(0.5).exp()
	}
	dump(t, "sqrt(x)(1-x)", jf(func(x float64) float64 { return math.Sqrt(x) * (1 - x) }, func(x jet) jet { return sq(x).mul(x.scale(-1).addc(1)) }), 0, 2)
	dump(t, "sqrt(x)(1-x) neg", jf(func(x float64) float64 { return math.Sqrt(x) * (1 - x) }, func(x jet) jet { return sq(x).mul(x.scale(-1).addc(1)) }), -1, 2)
	dump(t, "nan", jf(func(x float64) float64 { return math.NaN() }, func(x jet) jet { return jconst(x.n, math.NaN()) }), 0, 1)
	dump(t, "inf", jf(func(x float64) float64 { return math.Inf(1) }, func(x jet) jet { return jconst(x.n, math.Inf(1)) }), 0, 1)
	dump(t, "xsin(1/x)", jf(func(x float64) float64 { return x * math.Sin(1/x) }, func(x jet) jet { s, _ := jconst(x.n, 1).div(x).sincos(); return x.mul(s) }), 0.01, 1)
	dump(t, "step", plateauStep{}, 0, 2)
	for i := 0; i < 200; i++ {
		res, err := Find(garbage{rand.New(rand.NewPCG(uint64(i), 1))}, -1, 1, DefaultOptions())
		if err != nil {
			t.Fatal(err)
		}
		_ = res
	}
	fmt.Println("garbage ok")
}

type plateauStep struct{}

func (plateauStep) Eval(x float64) float64 {
	if x < 1 {
		return 1
	}
	return -1
}
func (p plateauStep) Taylor(x float64, c, e []float64) {
	clear(c)
	clear(e)
	c[0] = p.Eval(x)
}
