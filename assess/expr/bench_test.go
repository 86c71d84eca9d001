package expr

import (
	"math"
	"testing"
)

// The benchmark model: the shallow-lake rate with a Hill recycling term
// and the exponent q a parameter (illustrative values).
const lakeRate = "L - s*P + r*P^q/(m^q + P^q)"

var (
	lakeEnv   = Env{State: "P", Params: []string{"L", "s", "r", "m", "q"}}
	lakeTheta = []float64{0.05, 0.5, 1, 1, 4.3}
	sink      float64
)

// nativeLake is the hand-written Go reference, with P^q computed once.
func nativeLake(P float64, th []float64) float64 {
	L, s, r, m, q := th[0], th[1], th[2], th[3], th[4]
	pq := math.Pow(P, q)
	return L - s*P + r*pq/(math.Pow(m, q)+pq)
}

func TestNativeLakeAgrees(t *testing.T) {
	m := mustCompile(t, lakeRate, lakeEnv).NewMachine()
	for _, x := range []float64{0.1, 0.7, 1.3, 2.9} {
		if got, want := m.Eval(x, lakeTheta), nativeLake(x, lakeTheta); !near(got, want, 1e-15) {
			t.Errorf("Eval(%v) = %v, native %v", x, got, want)
		}
	}
}

func BenchmarkEvalCompiled(b *testing.B) {
	m := mustCompile(b, lakeRate, lakeEnv).NewMachine()
	b.ReportAllocs()
	i := 0
	for b.Loop() {
		sink += m.Eval(0.5+0.125*float64(i&15), lakeTheta)
		i++
	}
}

func BenchmarkEvalNative(b *testing.B) {
	b.ReportAllocs()
	i := 0
	for b.Loop() {
		sink += nativeLake(0.5+0.125*float64(i&15), lakeTheta)
		i++
	}
}

func benchTaylor(b *testing.B, order int) {
	m := mustCompile(b, lakeRate, lakeEnv).NewMachine()
	c, e := make([]float64, order+1), make([]float64, order+1)
	b.ReportAllocs()
	i := 0
	for b.Loop() {
		m.Taylor(0.5+0.125*float64(i&15), lakeTheta, c, e)
		sink += c[order]
		i++
	}
}

// benchTaylorNewTheta changes θ (the exponent q) at every call, so that
// nothing computed from θ alone can be kept between calls.
func benchTaylorNewTheta(b *testing.B, order int) {
	m := mustCompile(b, lakeRate, lakeEnv).NewMachine()
	c, e := make([]float64, order+1), make([]float64, order+1)
	th := append([]float64(nil), lakeTheta...)
	b.ReportAllocs()
	i := 0
	for b.Loop() {
		th[4] = lakeTheta[4] + 0.001*float64(i&1)
		m.Taylor(0.5+0.125*float64(i&15), th, c, e)
		sink += c[order]
		i++
	}
}

func BenchmarkTaylor(b *testing.B) {
	b.Run("order=1", func(b *testing.B) { benchTaylor(b, 1) })
	b.Run("order=2", func(b *testing.B) { benchTaylor(b, 2) })
	b.Run("order=7", func(b *testing.B) { benchTaylor(b, 7) })
	b.Run("order=1,newtheta", func(b *testing.B) { benchTaylorNewTheta(b, 1) })
	b.Run("order=2,newtheta", func(b *testing.B) { benchTaylorNewTheta(b, 2) })
}

func BenchmarkParamGrad(b *testing.B) {
	m := mustCompile(b, lakeRate, lakeEnv).NewMachine()
	df, dfx := make([]float64, 5), make([]float64, 5)
	b.ReportAllocs()
	i := 0
	for b.Loop() {
		sink += m.ParamGrad(0.5+0.125*float64(i&15), lakeTheta, df, dfx)
		i++
	}
}

func BenchmarkSlope(b *testing.B) {
	m := mustCompile(b, lakeRate, lakeEnv).NewMachine()
	b.ReportAllocs()
	i := 0
	for b.Loop() {
		f, fx := m.Slope(0.5+0.125*float64(i&15), lakeTheta)
		sink += f + fx
		i++
	}
}
