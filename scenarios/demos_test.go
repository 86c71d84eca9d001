package scenarios

import (
	"math"
	"slices"
	"strings"
	"testing"
)

// equilibrium is a root of f found by the scan in phaseLine.
type equilibrium struct {
	x      float64
	stable bool // f > 0 just below and f < 0 just above (or one side at a domain end)
}

// phaseLine finds the sign changes of f on a grid of n intervals over
// [lo, hi], refines each by bisection, and classifies it by the signs of f
// on either side — the phase-line test for a one-variable flow
// (Strogatz, Nonlinear Dynamics and Chaos, ch. 2). A grid point where f is
// exactly zero counts as a root. Kept simple on purpose: this is a check
// of the demo numbers, not the solver.
func phaseLine(f func(float64) float64, lo, hi float64, n int) []equilibrium {
	var out []equilibrium
	h := (hi - lo) / float64(n)
	sign := func(x float64) float64 { return math.Copysign(1, f(x)) }
	for i := 0; i <= n; i++ {
		a := lo + float64(i)*h
		if f(a) == 0 {
			below := i == 0 || f(a-h/2) > 0
			above := i == n || f(a+h/2) < 0
			out = append(out, equilibrium{a, below && above})
			continue
		}
		if i == n {
			break
		}
		b := a + h
		if f(b) == 0 || sign(a) == sign(b) {
			continue
		}
		l, r := a, b
		for range 100 {
			m := l + (r-l)/2
			if sign(m) == sign(l) {
				l = m
			} else {
				r = m
			}
		}
		out = append(out, equilibrium{l + (r-l)/2, f(a) > 0})
	}
	return out
}

func nominal(t *testing.T, s *Scenario, name string) float64 {
	t.Helper()
	i := s.ParamIndex(name)
	if i < 0 {
		t.Fatalf("%s: no parameter %s", s.File, name)
	}
	return s.Params[i].Nominal
}

// TestDemos checks what every demo promises: an illustrative title and
// summary, a note on every parameter, a current state, uncertain
// parameters; and it verifies the behaviour at nominal values with the
// rate law written out by hand in Go.
func TestDemos(t *testing.T) {
	names := Demos()
	if want := []string{"fishery", "lake", "reactor", "tank"}; !slices.Equal(names, want) {
		t.Fatalf("Demos() = %v, want %v", names, want)
	}
	correlated := 0
	for _, name := range names {
		s, err := LoadDemo(name)
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		if s.File != "demo:"+name || !strings.Contains(s.Title, "illustrative") ||
			!strings.Contains(s.Summary, "illustrat") || !s.State.HasCurrent {
			t.Errorf("%s: file %q title %q, current given %v", name, s.File, s.Title, s.State.HasCurrent)
		}
		uncertain := 0
		for _, p := range s.Params {
			if p.Note == "" || !strings.Contains(p.Note, "illustrative") {
				t.Errorf("%s: parameter %s has no note marked illustrative", name, p.Name)
			}
			if !p.Fixed {
				uncertain++
			}
		}
		if uncertain < 2 {
			t.Errorf("%s: %d uncertain parameters", name, uncertain)
		}
		correlated += len(s.Correlations)
		viaLoad, err := Load("demo:" + name)
		if err != nil || viaLoad.Title != s.Title {
			t.Errorf("Load(demo:%s): %v", name, err)
		}
	}
	if correlated == 0 {
		t.Error("no demo has a correlation")
	}
	if _, err := LoadDemo("lak"); err == nil || !strings.Contains(err.Error(), `did you mean "lake"?`) {
		t.Errorf("LoadDemo(lak) = %v", err)
	}
	if _, err := DemoSource("../demos/lake"); err == nil {
		t.Error("DemoSource accepted a path")
	}
}

// pattern lists the classes of equilibria in increasing order, "S" for
// attracting and "U" for repelling.
func pattern(eq []equilibrium) string {
	var b strings.Builder
	for _, e := range eq {
		if e.stable {
			b.WriteByte('S')
		} else {
			b.WriteByte('U')
		}
	}
	return b.String()
}

func TestDemoLakeBistable(t *testing.T) {
	s, err := LoadDemo("lake")
	if err != nil {
		t.Fatal(err)
	}
	if s.Rate != "L - s*P + r*P^q/(m^q + P^q)" {
		t.Fatalf("rate law changed to %q: update the Go closure", s.Rate)
	}
	L, sd, r, m, q := nominal(t, s, "L"), nominal(t, s, "s"), nominal(t, s, "r"), nominal(t, s, "m"), nominal(t, s, "q")
	f := func(P float64) float64 {
		return L - sd*P + r*math.Pow(P, q)/(math.Pow(m, q)+math.Pow(P, q))
	}
	eq := phaseLine(f, s.State.Domain[0], s.State.Domain[1], 5000)
	// Carpenter, Ludwig & Brock (1999): within the loading window the lake
	// model has clear (attracting), threshold (repelling) and turbid
	// (attracting) equilibria.
	if got := pattern(eq); got != "SUS" {
		t.Fatalf("lake at nominal values: %v, want attracting, repelling, attracting", eq)
	}
	// Analytic: with r = m = 1, q = 4, L = 0.1, s = 0.6, P = 1 gives
	// f = 0.1 − 0.6 + 1/2 = 0 and f'(1) = −s + r q m^q/(m^q+1)² = −0.6 + 1 > 0.
	if math.Abs(eq[1].x-1) > 1e-9 {
		t.Errorf("threshold at %v, want 1", eq[1].x)
	}
	// The present state lies in the turbid state's basin.
	if c := s.State.Current; !(c > eq[1].x && c < eq[2].x) {
		t.Errorf("current %v not between the threshold %v and the turbid state %v", c, eq[1].x, eq[2].x)
	}
}

func TestDemoFisheryDepensation(t *testing.T) {
	s, err := LoadDemo("fishery")
	if err != nil {
		t.Fatal(err)
	}
	if s.Rate != "r*N*(N/A - 1)*(1 - N/K) - catch" || len(s.Defines) != 1 || s.Defines[0].Expr != "H*N/(c + N)" {
		t.Fatalf("rate law changed to %q, %v: update the Go closure", s.Rate, s.Defines)
	}
	r, A, K, H, c := nominal(t, s, "r"), nominal(t, s, "A"), nominal(t, s, "K"), nominal(t, s, "H"), nominal(t, s, "c")
	f := func(N float64) float64 { return r*N*(N/A-1)*(1-N/K) - H*N/(c+N) }
	eq := phaseLine(f, s.State.Domain[0], s.State.Domain[1], 15000)
	// Allee effect f = r x (x/A − 1)(1 − x/K) (REFERENCE-CHECKS: 0
	// attracting, A repelling, K attracting); a saturating catch keeps the
	// pattern and moves the threshold up and the high state down.
	if got := pattern(eq); got != "SUS" {
		t.Fatalf("fishery at nominal values: %v, want attracting 0, repelling, attracting", eq)
	}
	// Analytic at the nominal values r = 0.4, A = 15, K ≈ 100, H = 20,
	// c = 10: 0.4 (N/15 − 1)(1 − N/100)(10 + N) = 20 holds at N = 40 and
	// N = 90 (0.4·(5/3)·0.6·50 = 20, 0.4·5·0.1·100 = 20). K's nominal is the
	// median of a normal truncated 5 sd below the mean, 100 to 1e-7.
	for i, want := range []float64{0, 40, 90} {
		if math.Abs(eq[i].x-want) > 1e-3 {
			t.Errorf("equilibrium %d at %v, want %v", i, eq[i].x, want)
		}
	}
	if cur := s.State.Current; !(cur > eq[1].x) {
		t.Errorf("current %v below the collapse threshold %v", cur, eq[1].x)
	}
}

func TestDemoReactorRunaway(t *testing.T) {
	s, err := LoadDemo("reactor")
	if err != nil {
		t.Fatal(err)
	}
	if s.Rate != "J*x/(1 + x) - a*(T - Ta)" || len(s.Defines) != 1 || s.Defines[0].Expr != "D*exp(Ea*(1/Tr - 1/T))" {
		t.Fatalf("rate law changed to %q, %v: update the Go closure", s.Rate, s.Defines)
	}
	J, a, Ta, Tr, D, Ea := nominal(t, s, "J"), nominal(t, s, "a"), nominal(t, s, "Ta"), nominal(t, s, "Tr"), nominal(t, s, "D"), nominal(t, s, "Ea")
	f := func(T float64) float64 {
		x := D * math.Exp(Ea*(1/Tr-1/T))
		return J*x/(1+x) - a*(T-Ta)
	}
	eq := phaseLine(f, s.State.Domain[0], s.State.Domain[1], 20000)
	// Semenov (1928): Arrhenius heat release against linear heat removal
	// gives a low attracting and a higher repelling state; with reactant
	// consumption the release saturates and a third, high attracting state
	// appears (van Heerden 1953, from memory — verified here numerically).
	if got := pattern(eq); got != "SUS" {
		t.Fatalf("reactor at nominal values: %v, want attracting, repelling, attracting", eq)
	}
	// The high state cannot exceed Ta + J/a (full conversion, analytic bound).
	if hi := eq[2].x; hi > Ta+J/a {
		t.Errorf("high state %v above the adiabatic bound %v", hi, Ta+J/a)
	}
	if cur := s.State.Current; !(cur < eq[1].x) {
		t.Errorf("current %v not in the low state's basin (threshold %v)", cur, eq[1].x)
	}
	if len(s.Correlations) != 1 || s.Correlations[0] != (Correlation{"D", "Ea", 0.5, s.Correlations[0].Pos}) {
		t.Errorf("correlations %v", s.Correlations)
	}
}

func TestDemoTankSetpoint(t *testing.T) {
	s, err := LoadDemo("tank")
	if err != nil {
		t.Fatal(err)
	}
	if s.Rate != "(u - c*sqrt(h))/Ar" || len(s.Defines) != 1 || s.Defines[0].Expr != "max(0, min(qmax, q0 + Kp*(hs - h)))" {
		t.Fatalf("rate law changed to %q, %v: update the Go closure", s.Rate, s.Defines)
	}
	Ar, c, qmax, q0, Kp, hs := nominal(t, s, "Ar"), nominal(t, s, "c"), nominal(t, s, "qmax"), nominal(t, s, "q0"), nominal(t, s, "Kp"), nominal(t, s, "hs")
	f := func(h float64) float64 {
		u := math.Max(0, math.Min(qmax, q0+Kp*(hs-h)))
		return (u - c*math.Sqrt(h)) / Ar
	}
	eq := phaseLine(f, s.State.Domain[0], s.State.Domain[1], 4000)
	if got := pattern(eq); got != "S" {
		t.Fatalf("tank at nominal values: %v, want one attracting state", eq)
	}
	// Analytic: the bias q0 equals the nominal outflow c·sqrt(hs) to 1e-3
	// (0.6·sqrt(1.5) = 0.7348), so the level settles within
	// |q0 − c·sqrt(hs)| / (Kp + c/(2 sqrt(hs))) < 0.001 m of the setpoint.
	if math.Abs(eq[0].x-hs) > 1e-3 {
		t.Errorf("level settles at %v, setpoint %v", eq[0].x, hs)
	}
	// With the weakest pump the actuator saturates and the level drops
	// below the setpoint: qmax = 0.7 < 0.7348 needed at hs.
	qmax = 0.7
	low := phaseLine(f, s.State.Domain[0], s.State.Domain[1], 4000)
	if len(low) != 1 || !(low[0].x < hs-0.1) {
		t.Errorf("saturated pump: %v, want one state well below %v", low, hs)
	}
}
