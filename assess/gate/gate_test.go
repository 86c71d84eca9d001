package gate

import (
	"errors"
	"math"
	"strings"
	"testing"
)

func TestParseGood(t *testing.T) {
	cases := []struct {
		in    string
		label string
		v     Verdict
		op    Op
		thr   float64
	}{
		{"E2 attracting >= 0.95", "E2", Attracting, AtLeast, 0.95},
		{"  E1   exists>0.5 ", "E1", Exists, Above, 0.5},
		{"E3 current <= 0.05", "E3", Current, AtMost, 0.05},
		{"E10 semistable < 0.2", "E10", Semistable, Below, 0.2},
		{"E2 attracting ≥ 95%", "E2", Attracting, AtLeast, 0.95},
		{"E2\tattracting\t≤\t5%", "E2", Attracting, AtMost, 0.05},
		{"E1 exists >= 0", "E1", Exists, AtLeast, 0},
		{"E1 exists <= 1", "E1", Exists, AtMost, 1},
		{"E1 exists >= .9", "E1", Exists, AtLeast, 0.9},
		{"E1 exists >= 9.5e-1", "E1", Exists, AtLeast, 0.95},
		{"E1 exists>=100%", "", 0, 0, 0}, // impossible: see TestParseBad
	}
	for _, c := range cases[:len(cases)-1] {
		r, err := Parse(c.in)
		if err != nil {
			t.Errorf("%q: %v", c.in, err)
			continue
		}
		if r.Label != c.label || r.Verdict != c.v || r.Op != c.op || math.Abs(r.Threshold-c.thr) > 1e-15 || r.Text != c.in {
			t.Errorf("%q: got %+v", c.in, r)
		}
		back, err := Parse(r.String())
		if err != nil || back.Label != r.Label || back.Verdict != r.Verdict || back.Op != r.Op || back.Threshold != r.Threshold {
			t.Errorf("%q: canonical %q reads back as %+v, %v", c.in, r.String(), back, err)
		}
	}
}

func TestParseBad(t *testing.T) {
	cases := []struct {
		in   string
		col  int
		want string
	}{
		{"", 1, "empty"},
		{"   ", 4, "empty"},
		{"E2", 3, "missing verdict"},
		{"E2 ", 4, "missing verdict"},
		{"E2 atracting >= 0.95", 4, `unknown verdict "atracting"`},
		{"E2 atracting >= 0.95", 4, `did you mean "attracting"?`},
		{"E2 stable >= 0.95", 4, `unknown verdict "stable"`},
		{"e2 attracting >= 0.95", 1, `did you mean "E2"?`},
		{"E0 exists >= 0.5", 1, "not an equilibrium label"},
		{"E02 exists >= 0.5", 1, "not an equilibrium label"},
		{"Ex exists >= 0.5", 1, "not an equilibrium label"},
		{"X exists >= 0.5", 1, "not an equilibrium label"},
		{">= 0.5", 1, "want an equilibrium label"},
		{"E2 attracting", 14, "missing comparison"},
		{"E2 attracting = 0.95", 15, `"=" is not a comparison`},
		{"E2 attracting == 0.95", 15, `"=" is not a comparison`},
		{"E2 attracting => 0.95", 15, `"=" is not a comparison`},
		{"E2 attracting ~ 0.95", 15, "want a comparison"},
		{"E2 attracting >=", 17, "missing probability"},
		{"E2 attracting >= high", 18, "want a probability"},
		{"E2 attracting >= 95", 18, "write 95%"},
		{"E2 attracting >= 1.5", 18, "not between 0 and 1"},
		{"E2 attracting >= -0.1", 18, "not between 0 and 1"},
		{"E2 attracting >= 120%", 18, "not a percentage"},
		{"E2 attracting >= 0.9.5", 18, "not a number"},
		{"E2 attracting >= 0.95 and more", 23, "unexpected"},
		{"E2 attracting >= 0.95%%", 23, "unexpected"},
		{"E2 attracting >= 1", 18, "can never be met"},
		{"E2 attracting > 1", 17, "can never be met"},
		{"E2 attracting <= 0", 18, "can never be met"},
		{"E2 attracting < 0%", 17, "can never be met"},
		{"E2 attracting >= 100%", 18, "can never be met"},
		{"E2attracting >= 0.9", 1, "not an equilibrium label"},
		{"E2 ≥ 0.9", 4, "missing verdict"},
		{"E2 exists >= \xff", 1, "UTF-8"},
		{strings.Repeat("E", 300), 1, "longer than"},
	}
	for _, c := range cases {
		_, err := Parse(c.in)
		var se *SyntaxError
		if !errors.As(err, &se) {
			t.Errorf("%q: error %v, want a SyntaxError", c.in, err)
			continue
		}
		if se.Col != c.col || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%q: %v (col %d), want col %d and %q", c.in, err, se.Col, c.col, c.want)
		}
	}
}

func TestJudgeOnTheIntervalEnd(t *testing.T) {
	// Wilson 95% interval of 81/263 is 0.2553–0.3662 and of 15/148
	// 0.0624–0.1605 (Newcombe 1998, Statistics in Medicine 17:857, worked
	// examples); the judgement uses the interval end, not the estimate.
	e81 := Estimate{Count: 81, N: 263, P: 81.0 / 263, CI: [2]float64{0.2553, 0.3662}}
	e15 := Estimate{Count: 15, N: 148, P: 15.0 / 148, CI: [2]float64{0.0624, 0.1605}}
	cases := []struct {
		req    string
		e      Estimate
		met    bool
		margin float64
		line   string
	}{
		{"E1 exists >= 0.25", e81, true, 0.0053, "E1 exists >= 0.25: met: lower 95% bound 0.2553 (estimate 0.308, 81 of 263 draws)"},
		{"E1 exists >= 0.3", e81, false, -0.0447, "E1 exists >= 0.3: not met: lower 95% bound 0.2553 is 0.0447 below 0.3 (estimate 0.308, 81 of 263 draws)"},
		{"E1 exists > 0.2553", e81, false, 0, "equals 0.2553"},
		{"E1 exists >= 0.2553", e81, true, 0, "met"},
		{"E2 attracting <= 0.2", e15, true, 0.0395, "upper 95% bound 0.1605"},
		{"E2 attracting < 0.15", e15, false, -0.0105, "E2 attracting < 0.15: not met: upper 95% bound 0.1605 is 0.0105 above 0.15"},
		{"E2 current <= 0.1605", e15, true, 0, "met"},
		{"E2 current < 0.1605", e15, false, 0, "equals"},
		{"E3 exists >= 0.5", Estimate{}, false, math.NaN(), "E3 exists >= 0.5: not met: no draw was assessed"},
	}
	for _, c := range cases {
		r, err := Parse(c.req)
		if err != nil {
			t.Fatal(err)
		}
		o := r.Judge(c.e)
		if o.Met != c.met {
			t.Errorf("%s: met %v, want %v", c.req, o.Met, c.met)
		}
		if !(math.IsNaN(c.margin) && math.IsNaN(o.Margin)) && math.Abs(o.Margin-c.margin) > 1e-12 {
			t.Errorf("%s: margin %v, want %v", c.req, o.Margin, c.margin)
		}
		if !strings.Contains(o.String(), c.line) || strings.Contains(o.String(), "\n") {
			t.Errorf("%s: line %q, want %q", c.req, o.String(), c.line)
		}
	}
}

func TestParseAll(t *testing.T) {
	rs, err := ParseAll([]string{"E1 exists >= 0.5", "E2 attracting < 0.1"})
	if err != nil || len(rs) != 2 {
		t.Fatalf("%v %v", rs, err)
	}
	if _, err := ParseAll([]string{"E1 exists >= 0.5", "E2"}); err == nil {
		t.Error("bad second requirement accepted")
	}
}

func TestNames(t *testing.T) {
	if Verdict(9).String() != "Verdict(9)" || Op(9).String() != "Op(9)" || Current.String() != "current" || Below.String() != "<" {
		t.Error("names")
	}
}
