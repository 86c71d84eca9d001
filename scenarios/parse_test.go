package scenarios

import (
	"errors"
	"holdfast/internal/suggest"
	"math"
	"slices"
	"strings"
	"testing"
	"testing/fstest"

	"holdfast/sample"
)

// oneParam returns a scenario whose only parameter a has the given spec
// (a flow mapping).
func oneParam(spec string) string {
	return "holdfast: 1\n" +
		"title: one parameter\n" +
		"state: {symbol: x, domain: [0, 1]}\n" +
		"rate: \"a - x\"\n" +
		"parameters:\n" +
		"  a: " + spec + "\n"
}

func must(d sample.Distribution, err error) sample.Distribution {
	if err != nil {
		panic(err)
	}
	return d
}

// TestDistributionKinds decodes one parameter of every kind and checks the
// distribution built (against the same constructor called directly), the
// nominal value (the median, from closed forms cited per case) and the
// arguments kept for display.
func TestDistributionKinds(t *testing.T) {
	csv := fstest.MapFS{
		"data/growth.csv": {Data: []byte("\uFEFF# yearly estimates (illustrative)\nyear, rate, other\n2019, 0.4, 1\n2020,0.2,\n2021, , 3\n2022,0.3,4\n")},
	}
	cases := []struct {
		name, spec string
		kind       string
		want       sample.Distribution // built directly; nil for fixed
		nominal    float64
		args       []string
	}{
		{"fixed", "{value: 2.5, unit: m, note: measured}", "fixed", nil, 2.5, []string{"value"}},
		{"fixed with its nominal", "{value: 2.5, nominal: 2.5, unit: m, note: measured}", "fixed", nil, 2.5, []string{"value"}},
		// Median of a normal distribution is its mean (symmetry).
		{"normal", "{dist: normal, mean: 2, sd: 0.5}", "normal",
			must(sample.NewNormal(2, 0.5)), 2, []string{"mean", "sd"}},
		// Truncation symmetric about the mean keeps the median at the mean.
		{"normal truncated", "{dist: normal, mean: 2, sd: 0.5, min: 0, max: 4}", "normal",
			must(sample.Truncate(must(sample.NewNormal(2, 0.5)), 0, 4)), 2, []string{"mean", "sd", "min", "max"}},
		{"normal one-sided", "{dist: normal, max: 4, mean: 2, sd: 0.5}", "normal",
			must(sample.Truncate(must(sample.NewNormal(2, 0.5)), math.Inf(-1), 4)), math.NaN(), []string{"max", "mean", "sd"}},
		// ln X ~ N(ln median, ln² gsd): the median is given directly.
		{"lognormal median", "{dist: lognormal, median: 3, gsd: 2}", "lognormal",
			must(sample.NewLognormalMedian(3, 2)), 3, []string{"median", "gsd"}},
		// Johnson, Kotz & Balakrishnan (1994) ch. 14: σ² = ln(1 + cv²),
		// μ = ln m − σ²/2, so the median e^μ = m / sqrt(1 + cv²).
		{"lognormal mean", "{dist: lognormal, mean: 1, sd: 0.5}", "lognormal",
			must(sample.NewLognormalMean(1, 0.5)), 1 / math.Sqrt(1.25), []string{"mean", "sd"}},
		// Uniform median (a + b)/2.
		{"uniform", "{dist: uniform, min: 1, max: 5}", "uniform",
			must(sample.NewUniform(1, 5)), 3, []string{"min", "max"}},
		// Log-uniform median sqrt(a b): ln X is uniform on [ln a, ln b].
		{"loguniform", "{dist: loguniform, min: 1, max: 100}", "loguniform",
			must(sample.NewLogUniform(1, 100)), 10, []string{"min", "max"}},
		// Triangular (a, c, b) with c < (a+b)/2: F(x) = 1 − (b−x)²/((b−a)(b−c))
		// above c, so the median is b − sqrt((b−a)(b−c)/2) = 4 − √6.
		{"triangular", "{dist: triangular, min: 0, mode: 1, max: 4}", "triangular",
			must(sample.NewTriangular(0, 1, 4)), 4 - math.Sqrt(6), []string{"min", "mode", "max"}},
		// A PERT with the mode at the centre is symmetric: median = mode.
		{"pert", "{dist: pert, min: 0, mode: 5, max: 10}", "pert",
			must(sample.NewPERT(0, 5, 10)), 5, []string{"min", "mode", "max"}},
		// Beta(α, α) is symmetric about the middle of its range.
		{"beta", "{dist: beta, alpha: 2, beta: 2}", "beta",
			must(sample.NewBeta(2, 2, 0, 1)), 0.5, []string{"alpha", "beta"}},
		{"beta scaled", "{dist: beta, alpha: 3, beta: 3, min: 10, max: 20}", "beta",
			must(sample.NewBeta(3, 3, 10, 20)), 15, []string{"alpha", "beta", "min", "max"}},
		// Gamma with shape 1 is exponential: median = scale·ln 2 = ln 2 / rate.
		{"gamma scale", "{dist: gamma, shape: 1, scale: 2}", "gamma",
			must(sample.NewGammaScale(1, 2)), 2 * math.Ln2, []string{"shape", "scale"}},
		{"gamma rate", "{dist: gamma, shape: 1, rate: 4, max: 10}", "gamma",
			must(sample.Truncate(must(sample.NewGammaRate(1, 4)), math.Inf(-1), 10)), math.NaN(), []string{"shape", "rate", "max"}},
		// Discrete: P(X ≤ 2) = 2/4 = 1/2, so the lower median is 2.
		{"discrete", "{dist: discrete, values: [1, 2, 3], weights: [1, 1, 2]}", "discrete",
			must(sample.NewDiscrete([]float64{1, 2, 3}, []float64{1, 1, 2})), 2, nil},
		// Empirical step quantile x₍⌈np⌉₎ (Hyndman & Fan 1996, type 1):
		// n = 3, p = 1/2 gives the 2nd smallest, 3.
		{"empirical samples", "{dist: empirical, samples: [5, 1, 3]}", "empirical",
			must(sample.NewEmpirical([]float64{5, 1, 3})), 3, nil},
		// Blank cells are skipped and comment lines ignored.
		{"empirical csv", "{dist: empirical, file: data/growth.csv, column: rate, nominal: 0.3}", "empirical",
			must(sample.NewEmpirical([]float64{0.4, 0.2, 0.3})), 0.3, nil},
		{"explicit nominal", "{dist: uniform, min: 1, max: 5, nominal: 1.5}", "uniform",
			must(sample.NewUniform(1, 5)), 1.5, []string{"min", "max"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			s, err := Parse("k.yaml", []byte(oneParam(c.spec)), csv)
			if err != nil {
				t.Fatal(err)
			}
			if len(s.Params) != 1 {
				t.Fatalf("%d parameters", len(s.Params))
			}
			p := s.Params[0]
			if p.Name != "a" || p.Kind != c.kind || p.Fixed != (c.want == nil) {
				t.Errorf("name %q kind %q fixed %v", p.Name, p.Kind, p.Fixed)
			}
			if c.want == nil {
				if p.Dist != nil || p.Value != c.nominal || p.Unit != "m" || p.Note != "measured" {
					t.Errorf("fixed parameter decoded as %+v", p)
				}
			} else {
				if p.Dist == nil {
					t.Fatal("no distribution")
				}
				if got, want := p.Dist.String(), c.want.String(); got != want {
					t.Errorf("distribution %s, want %s", got, want)
				}
				for _, q := range []float64{0.01, 0.3, 0.5, 0.9} {
					if got, want := p.Dist.Quantile(q), c.want.Quantile(q); got != want {
						t.Errorf("Quantile(%v) = %v, want %v", q, got, want)
					}
				}
			}
			want := c.nominal
			if math.IsNaN(want) { // no closed form: the distribution's own median
				want = c.want.Median()
			}
			if math.Abs(p.Nominal-want) > 1e-12*math.Max(1, math.Abs(want)) {
				t.Errorf("nominal %v, want %v", p.Nominal, want)
			}
			var names []string
			for _, a := range p.Args {
				names = append(names, a.Name)
				if !a.Pos.IsValid() {
					t.Errorf("arg %s has no position", a.Name)
				}
			}
			if !slices.Equal(names, c.args) {
				t.Errorf("args %v, want %v", names, c.args)
			}
		})
	}
}

func TestEmpiricalCSVRecordsSource(t *testing.T) {
	dir := fstest.MapFS{"g.csv": {Data: []byte("rate\n1\n2\n")}}
	s, err := Parse("sub/k.yaml", []byte(oneParam("{dist: empirical, file: ./g.csv, column: rate}")), dir)
	if err != nil {
		t.Fatal(err)
	}
	if p := s.Params[0]; p.DataFile != "g.csv" || p.DataColumn != "rate" {
		t.Errorf("DataFile %q DataColumn %q", p.DataFile, p.DataColumn)
	}
}

// TestFullScenario checks every field of a scenario that uses them all,
// including file order of parameters and defines.
func TestFullScenario(t *testing.T) {
	src := `holdfast: 1
title: Everything (illustrative)
summary: free text
state:
  symbol: P
  unit: g/m^3
  domain: [0, 5]
  current: 1.2
rate: "L - s*P + load"
define:
  load: "L*(1 + w)"
  extra: 'load^2'
parameters:
  w: {value: 0.1, unit: "-", note: weight}
  s: {dist: normal, mean: 0.6, sd: 0.05, min: 0}
  L: {dist: lognormal, median: 0.1, gsd: 1.3, unit: g/m^3/yr}
  q: {dist: triangular, min: 2, mode: 4, max: 6, nominal: 4}
correlations:
  - [s, q, -0.3]
  - [L, s, 0.2]
`
	s, err := Parse("all.yaml", []byte(src), nil)
	if err != nil {
		t.Fatal(err)
	}
	if s.File != "all.yaml" || string(s.Source) != src || s.Version != 1 ||
		s.Title != "Everything (illustrative)" || s.Summary != "free text" {
		t.Errorf("header: %q %q %d %q %q", s.File, s.Source[:10], s.Version, s.Title, s.Summary)
	}
	st := s.State
	if st.Symbol != "P" || st.Unit != "g/m^3" || st.Domain != [2]float64{0, 5} ||
		!st.HasCurrent || st.Current != 1.2 ||
		st.SymbolPos != (Pos{5, 11}) || st.DomainPos != (Pos{7, 11}) || st.CurrentPos != (Pos{8, 12}) {
		t.Errorf("state %+v", st)
	}
	if s.Rate != "L - s*P + load" || s.RatePos != (Pos{9, 8}) || s.RateStyle != DoubleQuoted {
		t.Errorf("rate %q at %v (%v)", s.Rate, s.RatePos, s.RateStyle)
	}
	if len(s.Defines) != 2 || s.Defines[0] != (Define{Name: "load", Pos: Pos{11, 3}, Expr: "L*(1 + w)", ExprPos: Pos{11, 10}, ExprStyle: DoubleQuoted}) ||
		s.Defines[1].Name != "extra" || s.Defines[1].ExprStyle != SingleQuoted || s.Defines[1].ExprPos != (Pos{12, 11}) {
		t.Errorf("defines %+v", s.Defines)
	}
	var names []string
	for _, p := range s.Params {
		names = append(names, p.Name)
	}
	if !slices.Equal(names, []string{"w", "s", "L", "q"}) {
		t.Errorf("parameter order %v", names)
	}
	if i := s.ParamIndex("L"); i != 2 || s.Params[i].Unit != "g/m^3/yr" || s.Params[i].Pos != (Pos{16, 3}) {
		t.Errorf("ParamIndex(L) = %d", i)
	}
	if s.ParamIndex("nope") != -1 {
		t.Error("ParamIndex of an unknown name")
	}
	if w := s.Params[0]; w.Unit != "-" || w.Note != "weight" || !w.Fixed || w.Nominal != 0.1 {
		t.Errorf("w = %+v", w)
	}
	if q := s.Params[3]; !q.NominalGiven || q.Nominal != 4 {
		t.Errorf("q nominal %v given %v", q.Nominal, q.NominalGiven)
	}
	want := []Correlation{{"s", "q", -0.3, Pos{19, 5}}, {"L", "s", 0.2, Pos{20, 5}}}
	if !slices.Equal(s.Correlations, want) {
		t.Errorf("correlations %+v", s.Correlations)
	}
	if got := s.Nominals(); len(got) != 4 || got[0] != 0.1 || got[3] != 4 {
		t.Errorf("Nominals %v", got)
	}
}

func TestSet(t *testing.T) {
	s, err := LoadDemo("reactor")
	if err != nil {
		t.Fatal(err)
	}
	if err := s.Set("Ea", 9500); err != nil {
		t.Fatal(err)
	}
	p := s.Params[s.ParamIndex("Ea")]
	if !p.Fixed || p.Kind != "fixed" || p.Dist != nil || p.Value != 9500 || p.Nominal != 9500 || !p.Overridden || p.Unit != "K" {
		t.Errorf("after Set: %+v", p)
	}
	if len(s.Correlations) != 0 {
		t.Errorf("correlation with a fixed parameter kept: %v", s.Correlations)
	}
	for _, c := range []struct {
		name string
		v    float64
		want string
	}{
		{"ea", 1, `unknown parameter "ea"; did you mean "Ea"?`},
		{"T", 1, `unknown parameter "T" (it is the state symbol)`},
		{"x", 1, `unknown parameter "x" (it is a define, not a parameter)`},
		{"zzzz", 1, `unknown parameter "zzzz"`},
		{"J", math.Inf(1), "parameter J: value must be a finite number, got +Inf"},
	} {
		err := s.Set(c.name, c.v)
		if err == nil || err.Error() != c.want {
			t.Errorf("Set(%q, %v) = %v, want %s", c.name, c.v, err, c.want)
		}
	}
}

// TestErrors checks messages that the catalogue does not: several errors
// at once, their order, and the cut after MaxErrors.
func TestErrors(t *testing.T) {
	cases := []struct {
		name, src string
		want      []string
	}{
		{"several sorted", "holdfast: 1\ntitle:\nstate: {symbol: pi, domain: [0, 1], current: 2, unts: 3}\nrate: \"\"\ndefine: {y: \"\", pi: 1}\n", []string{
			"t.yaml:2:7: title: expected text, got nothing (an empty value)",
			`t.yaml:3:17: state.symbol: "pi" is reserved: the rate law uses it as a function or constant`,
			"t.yaml:3:46: state.current: 2 lies outside the domain [0, 1]",
			`t.yaml:3:49: state.unts: unknown field; did you mean "unit"?`,
			"t.yaml:4:7: rate: must not be blank",
			"t.yaml:5:13: define.y: must not be blank",
			`t.yaml:5:17: define.pi: "pi" is reserved: the rate law uses it as a function or constant`,
		}},
		{"parser error line", "holdfast: 1\ntitle: x\n- a\n", []string{
			"t.yaml:3: YAML syntax: did not find expected key"}},
		{"unclosed flow", "holdfast: 1\ntitle: x\nstate: {symbol: x, domain: [0, 1]\nrate: x\n", []string{
			"t.yaml:3: YAML syntax: did not find expected ',' or '}'"}},
		{"tab", "holdfast: 1\ntitle: x\nstate:\n\tsymbol: x\n", []string{
			"t.yaml:4: YAML syntax: found character that cannot start any token (YAML indents with spaces, not tabs)"}},
		{"not a mapping", "- holdfast: 1\n", []string{
			"t.yaml:1:1: a scenario is a mapping of fields (holdfast, title, summary, state, rate, define, parameters, correlations), got a list"}},
		{"version text", "holdfast: \"1\"\n", []string{
			`t.yaml:1:11: holdfast: expected the format version number 1, got text "1"`}},
		{"version fraction", "holdfast: 1.5\ntitle: x\n", []string{
			"t.yaml:1:11: holdfast: unknown format version 1.5 (this program reads version 1)"}},
		{"fixed with sd", oneParam("{value: 1, sd: 2}"), []string{
			"t.yaml:6:17: parameters.a.sd: not a field of a fixed parameter (its fields: value, unit, note, nominal); for an uncertain one give dist instead of value"}},
		{"fixed with nominal", oneParam("{value: 1, nominal: 2}"), []string{
			"t.yaml:6:26: parameters.a.nominal: a fixed parameter's nominal is its value (1); remove nominal"}},
		{"field of another kind", oneParam("{dist: normal, mean: 1, sd: 2, mode: 3}"), []string{
			"t.yaml:6:37: parameters.a.mode: not a field of a normal distribution (its fields: mean, sd, min, max)"}},
		{"list element", oneParam("{dist: discrete, values: [1, .nan], weights: [1, 1]}"), []string{
			"t.yaml:6:35: parameters.a.values[1]: must be a finite number, got .nan"}},
		{"neither value nor dist", oneParam("{unit: m}"), []string{
			"t.yaml:6:6: parameters.a: missing value or dist: give value: for a fixed parameter or dist: for an uncertain one"}},
		{"not a mapping param", oneParam("0.5"), []string{
			"t.yaml:6:6: parameters.a: expected a mapping such as {value: 0.1} or {dist: normal, mean: 0.6, sd: 0.05}, got the number 0.5"}},
		{"lognormal neither", oneParam("{dist: lognormal}"), []string{
			"t.yaml:6:6: parameters.a: a lognormal distribution needs median and gsd, or mean and sd"}},
		{"lognormal half", oneParam("{dist: lognormal, median: 2}"), []string{
			"t.yaml:6:6: parameters.a.gsd: missing; a lognormal distribution needs median and gsd, or mean and sd"}},
		{"empirical file and samples", oneParam("{dist: empirical, samples: [1, 2], file: a.csv, column: x}"), []string{
			"t.yaml:6:41: parameters.a.file: give samples or file and column, not both forms"}},
		{"empirical no folder", oneParam("{dist: empirical, file: a.csv, column: x}"), []string{
			"t.yaml:6:30: parameters.a.file: cannot read CSV files here (the scenario was not read from a folder); give samples: as a list"}},
		{"empirical too few", oneParam("{dist: empirical, samples: [1]}"), []string{
			"t.yaml:6:33: parameters.a.samples: must hold at least 2 values (got 1)"}},
		{"correlation forms", oneParam("{dist: normal, mean: 1, sd: 1}") + "correlations: [[a, a, 0.5], [a, b], {x: 1}]\n", []string{
			"t.yaml:7:16: correlations[0]: parameter a cannot be correlated with itself",
			"t.yaml:7:29: correlations[1]: expected [name, name, rho], got a list of 2 items",
			"t.yaml:7:37: correlations[2]: expected [name, name, rho], got a mapping",
		}},
		{"perfect correlation", "holdfast: 1\ntitle: t\nstate: {symbol: x, domain: [0, 1]}\nrate: x\nparameters:\n  a: {dist: uniform, min: 0, max: 1}\n  b: {dist: uniform, min: 0, max: 1}\ncorrelations: [[a, b, -1]]\n", []string{
			"t.yaml:8:23: correlations[0]: rank correlation must lie strictly between -1 and 1, got -1"}},
		{"truncation outside support", oneParam("{dist: gamma, shape: 1, scale: 1, max: -1}"), []string{
			"t.yaml:6:45: parameters.a.max: (-Inf, -1] lies outside the support of gamma(shape=1, scale=1)"}},
		{"domain length", "holdfast: 1\ntitle: t\nstate: {symbol: x, domain: [0]}\nrate: x\n", []string{
			"t.yaml:3:28: state.domain: expected two numbers [lo, hi], got 1"}},
		{"domain scalar", "holdfast: 1\ntitle: t\nstate: {symbol: x, domain: 5}\nrate: x\n", []string{
			"t.yaml:3:28: state.domain: expected a list [lo, hi], got the number 5"}},
		{"domain overflow", "holdfast: 1\ntitle: t\nstate: {symbol: x, domain: [-1e308, 1e308]}\nrate: x\n", []string{
			"t.yaml:3:28: state.domain: the width hi − lo overflows, got [-1e+308, 1e+308]"}},
		{"long name", "holdfast: 1\ntitle: t\nstate: {symbol: x, domain: [0, 1]}\nrate: x\nparameters:\n  a_very_long_parameter_name_that-goes-on-and-on: {value: 1}\n", []string{
			`t.yaml:6:3: parameters.a_very_long_parameter_name_that-goes-on-and-on: "a_very_long_parameter_name_that-goes-on-"… is not a valid name (letters, digits and _, not starting with a digit)`}},
		{"duplicate nested key", oneParam("{dist: normal, mean: 1, sd: 1, mean: 2}"), []string{
			"t.yaml:6:37: parameters.a.mean: duplicate key, first given at line 6"}},
		{"missing state and title", "holdfast: 1\nrate: x\n", []string{
			"t.yaml:1:1: state: missing: the state variable, such as state: {symbol: x, domain: [0, 10]}",
			"t.yaml:1:1: title: missing: a one-line title",
		}},
		{"define named like state", "holdfast: 1\ntitle: t\nstate: {symbol: x, domain: [0, 1]}\nrate: x\ndefine: {x: \"1\"}\n", []string{
			"t.yaml:5:10: define.x: name x is already the state symbol"}},
		{"multibyte column", "holdfast: 1\ntitle: t\nstate: {symbol: x, domain: [0, 1]}\nrate: x\nparameters:\n  a: {note: \"Σ café\", value: x}\n", []string{
			// "  a: {note: "Σ café", value: " is 29 characters and 31 bytes.
			`t.yaml:6:32: parameters.a.value: expected a number, got text "x"`}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := Parse("t.yaml", []byte(c.src), nil)
			if err == nil {
				t.Fatal("no error")
			}
			got := strings.Split(err.Error(), "\n")
			if !slices.Equal(got, c.want) {
				t.Errorf("errors\n got: %s\nwant: %s", strings.Join(got, "\n      "), strings.Join(c.want, "\n      "))
			}
		})
	}
}

func TestTooManyErrors(t *testing.T) {
	var b strings.Builder
	b.WriteString("holdfast: 1\ntitle: t\nstate: {symbol: x, domain: [0, 1]}\nrate: x\nparameters:\n")
	for i := range 15 {
		b.WriteString("  p" + string(rune('a'+i)) + ": {value: \"no\"}\n")
	}
	_, err := Parse("t.yaml", []byte(b.String()), nil)
	var list ErrorList
	if !errors.As(err, &list) {
		t.Fatalf("%v is not an ErrorList", err)
	}
	if len(list) != MaxErrors+1 {
		t.Fatalf("%d errors, want %d", len(list), MaxErrors+1)
	}
	if got, want := list[MaxErrors].Error(), "t.yaml:16:15: too many errors (5 more not shown)"; got != want {
		t.Errorf("last error %q, want %q", got, want)
	}
}

func TestTooManyCorrelations(t *testing.T) {
	src := oneParam("{dist: normal, mean: 1, sd: 1}") + "correlations:\n" + strings.Repeat("  - [a, b, 0.1]\n", MaxCorrelations+1)
	_, err := Parse("t.yaml", []byte(src), nil)
	if want := "t.yaml:8:3: correlations: 201 correlations; at most 200 are allowed"; err == nil || err.Error() != want {
		t.Errorf("got %v, want %s", err, want)
	}
}

func TestErrorFormat(t *testing.T) {
	for _, c := range []struct {
		e    Error
		want string
	}{
		{Error{"a.yaml", Pos{3, 4}, "state.domain", "bad"}, "a.yaml:3:4: state.domain: bad"},
		{Error{"a.yaml", Pos{3, 0}, "", "bad"}, "a.yaml:3: bad"},
		{Error{"a.yaml", Pos{}, "", "bad"}, "a.yaml: bad"},
		{Error{"", Pos{3, 4}, "f", "bad"}, "3:4: f: bad"},
		{Error{"", Pos{}, "", "bad"}, "bad"},
	} {
		if got := c.e.Error(); got != c.want {
			t.Errorf("%+v.Error() = %q, want %q", c.e, got, c.want)
		}
	}
	if ErrorList(nil).Err() != nil {
		t.Error("empty ErrorList.Err() is not nil")
	}
	l := ErrorList{{File: "b", Pos: Pos{1, 1}, Msg: "x"}, {File: "a", Pos: Pos{2, 1}, Msg: "y"}, {File: "a", Pos: Pos{1, 5}, Msg: "z"}}
	l.Sort()
	if got, want := l.Error(), "a:1:5: z\na:2:1: y\nb:1:1: x"; got != want {
		t.Errorf("sorted list %q, want %q", got, want)
	}
}

func TestCSVErrors(t *testing.T) {
	dir := fstest.MapFS{
		"ragged.csv": {Data: []byte("a,b\n1,2\n3\n")},
		"inf.csv":    {Data: []byte("a\n1\nInf\n")},
		"empty.csv":  {Data: []byte("")},
		"nul.csv":    {Data: []byte("a\n1\x00\n")},
		"quote.csv":  {Data: []byte("a\n\"1\n")},
		"folder/x":   {Data: []byte("a\n1\n")},
		"big.csv":    {Data: make([]byte, MaxFileSize+1)},
		"one.csv":    {Data: []byte("a\n1\n")},
	}
	for _, c := range []struct{ file, want string }{
		{"ragged.csv", "ragged.csv:3:1: parameters.a: CSV: wrong number of fields"},
		{"inf.csv", `inf.csv:3:1: parameters.a: column a: "Inf" is not a finite number`},
		{"empty.csv", "empty.csv: parameters.a: file is empty; expected a header row naming the columns"},
		{"nul.csv", "nul.csv:2:2: parameters.a: file is binary, not text (NUL byte)"},
		{"quote.csv", `quote.csv:2:4: parameters.a: CSV: extraneous or missing " in quoted-field`},
		{"folder", `k.yaml:6:30: parameters.a.file: "folder" is a folder, not a CSV file`},
		{"missing.csv", `k.yaml:6:30: parameters.a.file: no file "missing.csv" in the scenario's folder`},
		{"big.csv", "k.yaml:6:30: parameters.a.file: CSV file big.csv is larger than the 1 MiB limit"},
		{"one.csv", "k.yaml:6:49: parameters.a.column: must hold at least 2 values (got 1)"},
		{`a\b.csv`, `k.yaml:6:30: parameters.a.file: "a\\b.csv": separate folder names with /`},
	} {
		_, err := Parse("k.yaml", []byte(oneParam("{dist: empirical, file: '"+c.file+"', column: a}")), dir)
		if err == nil || err.Error() != c.want {
			t.Errorf("%s:\n got: %v\nwant: %s", c.file, err, c.want)
		}
	}
}

func TestKinds(t *testing.T) {
	if got := Kinds(); len(got) != len(kinds) {
		t.Errorf("Kinds() = %v, table has %d", got, len(kinds))
	}
	for _, k := range Kinds() {
		if _, ok := kinds[k]; !ok {
			t.Errorf("kind %s has no table entry", k)
		}
	}
}

func TestNames(t *testing.T) {
	for _, c := range []struct {
		name string
		ok   bool
	}{{"x", true}, {"_a1", true}, {"K2", true}, {"2x", false}, {"", false}, {"a-b", false}, {"é", false}, {"exp", false}, {"Exp", true}} {
		if got := checkName(c.name) == ""; got != c.ok {
			t.Errorf("checkName(%q) ok = %v, want %v", c.name, got, c.ok)
		}
	}
	// Levenshtein (1966) distances checked by hand: kitten → sitting is 3
	// (two substitutions and one insertion), the classic example.
	if d := suggest.Distance("kitten", "sitting"); d != 3 {
		t.Errorf("Distance(kitten, sitting) = %d, want 3", d)
	}
	for _, c := range []struct {
		word string
		want string
	}{{"paramters", "parameters"}, {"corelations", "correlations"}, {"param", "parameters"}, {"zzz", ""}, {"Normal", "normal"}, {"triangle", "triangular"}} {
		if got := nearest(c.word, slices.Concat(topFields, kindNames)); got != c.want {
			t.Errorf("nearest(%q) = %q, want %q", c.word, got, c.want)
		}
	}
}
