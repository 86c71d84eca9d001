package certify

import (
	"math"
	"testing"

	"holdfast/assess/steady"
)

func TestDormandPrinceOrderConditions(t *testing.T) {
	// The coefficients were recalled (from memory); check them against
	// the Runge–Kutta order conditions (Butcher; Hairer, Nørsett & Wanner,
	// Solving ODEs I, §II.2): row sums Σ_j a_ij = c_i; for the
	// fifth-order weights the conditions of the trees up to order 5 used
	// below, for the embedded weights those up to order 4.
	const tol = 1e-14
	for i := range dpA {
		s := 0.0
		for _, a := range dpA[i] {
			s += a
		}
		if math.Abs(s-dpC[i]) > tol {
			t.Errorf("row %d: Σa = %v, c = %v", i, s, dpC[i])
		}
	}
	sum := func(b [7]float64, g func(i int) float64) float64 {
		s := 0.0
		for i := range b {
			s += b[i] * g(i)
		}
		return s
	}
	ac := func(i int, k float64) float64 { // Σ_j a_ij c_j^k
		s := 0.0
		for j := 0; j < i; j++ {
			s += dpA[i][j] * math.Pow(dpC[j], k)
		}
		return s
	}
	type cond struct {
		name  string
		g     func(i int) float64
		want  float64
		order int
	}
	conds := []cond{
		{"Σb", func(int) float64 { return 1 }, 1, 1},
		{"Σbc", func(i int) float64 { return dpC[i] }, 1.0 / 2, 2},
		{"Σbc²", func(i int) float64 { return dpC[i] * dpC[i] }, 1.0 / 3, 3},
		{"Σbac", func(i int) float64 { return ac(i, 1) }, 1.0 / 6, 3},
		{"Σbc³", func(i int) float64 { return math.Pow(dpC[i], 3) }, 1.0 / 4, 4},
		{"Σbc·ac", func(i int) float64 { return dpC[i] * ac(i, 1) }, 1.0 / 8, 4},
		{"Σbac²", func(i int) float64 { return ac(i, 2) }, 1.0 / 12, 4},
		{"Σbc⁴", func(i int) float64 { return math.Pow(dpC[i], 4) }, 1.0 / 5, 5},
		{"Σbc²·ac", func(i int) float64 { return dpC[i] * dpC[i] * ac(i, 1) }, 1.0 / 10, 5},
		{"Σbac³", func(i int) float64 { return ac(i, 3) }, 1.0 / 20, 5},
	}
	for _, c := range conds {
		if got := sum(dpB, c.g); math.Abs(got-c.want) > tol {
			t.Errorf("fifth order: %s = %v, want %v", c.name, got, c.want)
		}
		if c.order <= 4 {
			if got := sum(dpB4, c.g); math.Abs(got-c.want) > tol {
				t.Errorf("fourth order: %s = %v, want %v", c.name, got, c.want)
			}
		}
	}
	// FSAL: the last stage is the fifth-order solution.
	for j := range 6 {
		if dpA[6][j] != dpB[j] {
			t.Errorf("a_7%d = %v, b_%d = %v", j+1, dpA[6][j], j+1, dpB[j])
		}
	}
}

func TestDormandPrinceConvergence(t *testing.T) {
	// x' = −x, x(0) = 1 has x(5) = e^{−5}. With fixed steps the global
	// error of a fifth-order method falls by about 2⁵ = 32 when h halves
	// (the ratios approach 32 from above: 39, 36, 34).
	f := func(x float64) float64 { return -x }
	errAt := func(n int) float64 {
		h := 5 / float64(n)
		x := 1.0
		k := f(x)
		for range n {
			x, _, k = dopriStep(f, x, h, k)
		}
		return math.Abs(x - math.Exp(-5))
	}
	for _, n := range []int{20, 40, 80} {
		r := errAt(n) / errAt(2*n)
		if r < 28 || r > 42 {
			t.Errorf("error ratio %v from %d to %d steps, want about 32", r, n, 2*n)
		}
	}
	// Adaptive: x' = −x from 1 reaches e^{−t}; stop at x ≤ e^{−3}.
	var steps int
	end := math.Exp(-3)
	got := integrate(func(x float64) float64 { return -x }, 1, 0.01, 1e-10, 1e-12, 10000, func(x float64) int {
		steps++
		if x <= end {
			return 1
		}
		return 0
	})
	if got != 1 || steps > 200 {
		t.Errorf("adaptive decay: outcome %d after %d steps", got, steps)
	}
}

func TestCheckSidesHyperbolic(t *testing.T) {
	// Logistic growth (Verhulst): 0 repelling, K attracting.
	l := newLaw(t, "r*x*(1 - x/K)", []string{"r", "K"}, 1, 2)
	res, err := steady.Find(l, -1, 3, steady.DefaultOptions())
	if err != nil {
		t.Fatal(err)
	}
	want := []Approach{Repelled, Approached}
	for k := range res.Equilibria {
		sd := CheckSides(l, res.Equilibria, k, -1, 3, SimOptions{})
		if sd.Below != want[k] || sd.Above != want[k] || !sd.Agree {
			t.Errorf("equilibrium %v: %+v, want %v on both sides", res.Equilibria[k].X, sd, want[k])
		}
	}
	// At a domain end only the inner side is tested.
	sd := CheckSides(l, []steady.Equilibrium{{X: 3, Class: steady.Stable, Span: [2]float64{3, 3}}}, 0, 1, 3, SimOptions{})
	if sd.Above != NotTested || !sd.Checked() {
		t.Errorf("domain end: %+v", sd)
	}
	if _, err := (SimOptions{RelTol: 1}).withDefaults(); err == nil {
		t.Error("RelTol 1 accepted")
	}
}
