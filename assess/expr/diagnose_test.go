package expr

import (
	"math"
	"testing"
)

// TestDiagnose checks the fault kind, operation and position for each
// reason. The expected faults follow from IEEE 754 arithmetic (log 0 = −∞,
// √−1 = NaN, 1/0 = ∞, e^1000 > MaxFloat64 ≈ 1.8e308) as implemented by Go's
// math package.
func TestDiagnose(t *testing.T) {
	env := Env{State: "x", Params: []string{"a", "K"}, Defines: []Define{{"g", "log(x - a)"}, {"h", "g*2"}}}
	nan, inf := math.NaN(), math.Inf(1)
	tests := []struct {
		rate  string
		x     float64
		theta []float64
		want  *Fault
	}{
		{"log(x)", 1, []float64{0, 1}, nil},
		{"log(x)", -1, []float64{0, 1}, &Fault{FaultLogDomain, "log", "rate", 0}},
		{"2 + log10(x)", 0, []float64{0, 1}, &Fault{FaultLogDomain, "log10", "rate", 4}},
		{"x*sqrt(x - a)", 0, []float64{1, 1}, &Fault{FaultSqrtDomain, "sqrt", "rate", 2}},
		{"a/(x - K)", 2, []float64{1, 2}, &Fault{FaultDivZero, "/", "rate", 1}},
		{"x^a", 0, []float64{-1, 0}, &Fault{FaultDivZero, "^", "rate", 1}},
		{"x^-2", 0, []float64{0, 0}, &Fault{FaultDivZero, "^", "rate", 1}}, // lowered to 1/(x*x)
		{"x^a", -2, []float64{0.5, 0}, &Fault{FaultPowDomain, "^", "rate", 1}},
		{"pow(x, a)", -2, []float64{1.5, 0}, &Fault{FaultPowDomain, "pow", "rate", 0}},
		{"exp(x) - 1", 1000, []float64{0, 0}, &Fault{FaultOverflow, "exp", "rate", 0}},
		{"x*x*x", 1e200, []float64{0, 0}, &Fault{FaultOverflow, "*", "rate", 1}},
		{"x^3", 1e200, []float64{0, 0}, &Fault{FaultOverflow, "^", "rate", 1}},
		{"cosh(x)", -800, []float64{0, 0}, &Fault{FaultOverflow, "cosh", "rate", 0}},
		{"x*K", 1, []float64{0, nan}, &Fault{FaultNaNOperand, "K", "rate", 2}},
		{"a + x", inf, []float64{0, 0}, &Fault{FaultInfOperand, "x", "rate", 4}},
		// Absorbed faults are not reported: exp(−1/0⁺) = exp(−∞) = 0.
		{"exp(-1/x)", 0, []float64{0, 0}, nil},
		{"exp(-1/x)", math.Copysign(0, -1), []float64{0, 0}, &Fault{FaultDivZero, "/", "rate", 6}},
		// ∞ − ∞ is traced to the left operand's cause.
		{"1/x - 1/x", 0, []float64{0, 0}, &Fault{FaultDivZero, "/", "rate", 1}},
		{"exp(x) - 1/(x - 1000)", 1000, []float64{0, 0}, &Fault{FaultOverflow, "exp", "rate", 0}},
		// In a define: Where names it, Offset is in its source.
		{"h + 1", 1, []float64{2, 0}, &Fault{FaultLogDomain, "log", "g", 0}},
		// Constant subexpressions are folded by the compiler, but Diagnose
		// still finds them in the source.
		{"x + log(0)", 1, []float64{0, 0}, &Fault{FaultLogDomain, "log", "rate", 4}},
		{"x + 0^-1", 1, []float64{0, 0}, &Fault{FaultDivZero, "^", "rate", 5}},
	}
	for _, tc := range tests {
		m := mustCompile(t, tc.rate, env).NewMachine()
		got := m.Diagnose(tc.x, tc.theta)
		switch {
		case got == nil && tc.want == nil:
		case got == nil || tc.want == nil || *got != *tc.want:
			t.Errorf("%s at x=%v θ=%v: Diagnose = %v, want %v", tc.rate, tc.x, tc.theta, got, tc.want)
		}
	}
}

// TestDiagnoseAgreesWithEval: the checked evaluation repeats Eval's
// operations, so Diagnose reports a fault exactly when Eval is not finite.
func TestDiagnoseAgreesWithEval(t *testing.T) {
	env := Env{State: "x", Params: []string{"a", "b", "q"}}
	for i, src := range []string{"1/x", "log(x*a)", "sqrt(x - b)", "x^q", "exp(x*300)", "(x - a)^-3", "pow(x, 1/q)"} {
		m := mustCompile(t, src, env).NewMachine()
		for _, x := range []float64{-3, -1, 0, 0.5, 1, 3} {
			for _, a := range []float64{-1, 0, 2} {
				theta := []float64{a, 1, 2.5}
				v := m.Eval(x, theta)
				f := m.Diagnose(x, theta)
				if (f == nil) != finite(v) {
					t.Errorf("%d %s at x=%v a=%v: Eval %v, Diagnose %v", i, src, x, a, v, f)
				}
				if f != nil && f.Kind == FaultUndefined {
					t.Errorf("%s: unexplained fault", src)
				}
			}
		}
	}
}

func TestFaultKindString(t *testing.T) {
	want := map[FaultKind]string{
		FaultLogDomain:  "log of non-positive",
		FaultSqrtDomain: "sqrt of negative",
		FaultDivZero:    "division by zero",
		FaultPowDomain:  "pow of negative base to non-integer power",
		FaultOverflow:   "overflow",
		FaultNaNOperand: "NaN operand",
		FaultInfOperand: "infinite operand",
	}
	for k, s := range want {
		if k.String() != s {
			t.Errorf("%d: %q, want %q", k, k.String(), s)
		}
	}
	f := &Fault{FaultDivZero, "/", "rate", 3}
	if got := f.String(); got != `division by zero at "/" (rate, byte 3)` {
		t.Errorf("Fault.String() = %q", got)
	}
}
