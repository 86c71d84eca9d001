package expr

import (
	"fmt"
	names "holdfast/internal/suggest"
	"math"
	"strings"
	"testing"
)

// sexpr prints a syntax tree fully parenthesized in prefix form.
func sexpr(n node) string {
	switch n := n.(type) {
	case *numLit:
		return n.lit
	case *constRef:
		return n.name
	case *varRef:
		return n.name
	case *unaryExpr:
		return "(neg " + sexpr(n.x) + ")"
	case *binaryExpr:
		return fmt.Sprintf("(%c %s %s)", n.op, sexpr(n.x), sexpr(n.y))
	case *callExpr:
		parts := []string{funcTable(n.fn).name}
		for _, a := range n.args {
			parts = append(parts, sexpr(a))
		}
		return "(" + strings.Join(parts, " ") + ")"
	}
	return "?"
}

var testEnv = Env{State: "x", Params: []string{"a", "b", "c"}}

func mustCompile(t testing.TB, rate string, env Env) *Program {
	t.Helper()
	p, err := Compile(rate, env)
	if err != nil {
		t.Fatalf("Compile(%q): %v", rate, err)
	}
	return p
}

// TestPrecedence checks the parse tree and the value of each form. The
// conventions are those of mathematical notation as also used by Fortran's
// ** and Python's ** (Python Language Reference §6.5, from memory): the
// power operator is right-associative and binds tighter than a sign on its
// left and looser than a sign on its right. The values are verified by
// hand: 2^(3^2) = 2^9 = 512, whereas (2^3)^2 = 64.
func TestPrecedence(t *testing.T) {
	theta := []float64{10, 3, 2} // a, b, c
	const x = 3.0
	tests := []struct {
		src, tree string
		want      float64
	}{
		{"-x^2", "(neg (^ x 2))", -9},
		{"2^3^2", "(^ 2 (^ 3 2))", 512},
		{"(2^3)^2", "(^ (^ 2 3) 2)", 64},
		{"a-b-c", "(- (- a b) c)", 5},
		{"a/b/c", "(/ (/ a b) c)", 10.0 / 3 / 2},
		{"a-b+c", "(+ (- a b) c)", 9},
		{"2^-1", "(^ 2 (neg 1))", 0.5},
		{"-2^-2", "(neg (^ 2 (neg 2)))", -0.25},
		{"2^-x^2", "(^ 2 (neg (^ x 2)))", 1.0 / 512},
		{"a+b*c", "(+ a (* b c))", 16},
		{"a*b+c", "(+ (* a b) c)", 32},
		{"a*b^c", "(* a (^ b c))", 90},
		{"-a*b", "(* (neg a) b)", -30},
		{"+x", "x", 3},
		{"--x", "(neg (neg x))", 3},
		{"x*-a", "(* x (neg a))", -30},
		{"(-2)^2", "(^ (neg 2) 2)", 4},
		{"a - -b", "(- a (neg b))", 13},
		{"1.5e-3*a", "(* 1.5e-3 a)", 0.015},
		{".5 + 5.", "(+ .5 5.)", 5.5},
		{"pi - e", "(- pi e)", math.Pi - math.E},
		{"exp(-x^2)", "(exp (neg (^ x 2)))", math.Exp(-9)},
		{"pow(b, c)^2", "(^ (pow b c) 2)", 81},
		{"x^b^-1", "(^ x (^ b (neg 1)))", math.Pow(3, 1.0/3)},
	}
	for _, tc := range tests {
		p := mustCompile(t, tc.src, testEnv)
		if got := sexpr(p.exprs[len(p.exprs)-1].root); got != tc.tree {
			t.Errorf("%s: tree %s, want %s", tc.src, got, tc.tree)
		}
		got := p.NewMachine().Eval(x, theta)
		if math.Abs(got-tc.want) > 1e-15*math.Abs(tc.want) {
			t.Errorf("%s = %v, want %v", tc.src, got, tc.want)
		}
	}
}

// TestFunctions evaluates every function at a point whose value is known.
// Values: Abramowitz & Stegun, Handbook of Mathematical Functions (1964),
// tables 4.x (from memory; each also checked against Go's math package,
// an independent implementation, to 1e-15) and exact identities.
func TestFunctions(t *testing.T) {
	tests := []struct {
		src       string
		want, lib float64
	}{
		{"exp(1)", 2.718281828459045, math.E},
		{"log(10)", 2.302585092994046, math.Ln10},
		{"log10(2)", 0.3010299956639812, math.Log10(2)},
		{"sqrt(2)", 1.4142135623730951, math.Sqrt2},
		{"abs(-2.5)", 2.5, 2.5},
		{"pow(2, 10)", 1024, 1024},
		{"pow(2, 0.5)", 1.4142135623730951, math.Sqrt2},
		{"min(3, -1)", -1, -1},
		{"max(3, -1)", 3, 3},
		{"sin(pi/6)", 0.5, 0.5},
		{"cos(pi/3)", 0.5, 0.5},
		{"tan(pi/4)", 1, 1},
		{"atan(1)", math.Pi / 4, math.Atan(1)},
		{"sinh(1)", 1.1752011936438014, math.Sinh(1)},
		{"cosh(1)", 1.5430806348152437, math.Cosh(1)},
		{"tanh(1)", 0.7615941559557649, math.Tanh(1)},
		{"e", 2.718281828459045, math.E},
		{"pi", 3.141592653589793, math.Pi},
	}
	for _, tc := range tests {
		// Through a parameter, so the call is evaluated at run time, and
		// as a constant, so it is folded at compile time.
		for _, src := range []string{tc.src, tc.src + " + 0*x"} {
			got := mustCompile(t, src, testEnv).NewMachine().Eval(1, []float64{0, 0, 0})
			if math.Abs(got-tc.want) > 1e-15*math.Abs(tc.want) || math.Abs(tc.lib-tc.want) > 1e-15*math.Abs(tc.want) {
				t.Errorf("%s = %v, want %v (math: %v)", src, got, tc.want, tc.lib)
			}
		}
	}
}

// TestErrors lists every class of compile error with its exact message and
// caret column (1-based, in characters).
func TestErrors(t *testing.T) {
	long := strings.Repeat("x+", 5001) + "x"
	deep := strings.Repeat("(", 101) + "x" + strings.Repeat(")", 101)
	tests := []struct {
		name, rate string
		defines    []Define
		where      string
		col        int // 0: no position
		msg        string
	}{
		{"empty", "", nil, "rate", 1, "empty expression"},
		{"blank", "  \t", nil, "rate", 1, "empty expression"},
		{"too long", long, nil, "rate", 10001, "expression is 10003 bytes long; the limit is 10000"},
		{"too deep", deep, nil, "rate", 101, "expression nested too deeply (more than 100 levels)"},
		{"deep signs", strings.Repeat("-", 101) + "x", nil, "rate", 101, "expression nested too deeply (more than 100 levels)"},
		{"illegal char", "x # 2", nil, "rate", 3, `unexpected character '#'`},
		{"control char", "x\x01", nil, "rate", 2, "unexpected control character U+0001"},
		{"bad utf8", "x+\xff", nil, "rate", 3, "invalid UTF-8 encoding"},
		{"unicode minus", "a − x", nil, "rate", 3, `unexpected character '−' (U+2212); use ASCII "-"`},
		{"unicode letter", "θ*x", nil, "rate", 1, `unexpected character 'θ' (U+03B8)`},
		{"double star", "x ** 2", nil, "rate", 3, `unexpected "**"; write powers with "^", e.g. x^2`},
		{"exponent digits", "1e+x", nil, "rate", 1, `malformed number "1e+": exponent has no digits`},
		{"two points", "x*1.2.3", nil, "rate", 3, `malformed number "1.2.3": more than one decimal point`},
		{"too large", "1e400*x", nil, "rate", 1, "number 1e400 is too large (float64 holds at most 1.798e+308)"},
		{"operand at end", "x +", nil, "rate", 4, "expected operand, found end of expression"},
		{"operand paren", "x*)", nil, "rate", 3, `expected operand, found ")"`},
		{"empty parens", "()", nil, "rate", 2, `expected operand, found ")"`},
		{"two operators", "x+*2", nil, "rate", 3, `expected operand, found "*"`},
		{"unclosed", "a*(x - b", nil, "rate", 9, `expected ")" to match "(" at col 3, found end of expression`},
		{"unmatched", "x)", nil, "rate", 2, `unexpected ")" without matching "("`},
		{"stray comma", "x, a", nil, "rate", 2, `unexpected ","`},
		{"missing operator", "2x", nil, "rate", 2, `missing operator before name "x"`},
		{"missing operator num", "x 2", nil, "rate", 3, "missing operator before number 2"},
		{"missing operator paren", "2 (x)", nil, "rate", 3, `missing operator before "("`},
		{"unknown name", "a - bx*x", nil, "rate", 5, `unknown name "bx" (did you mean "b"?)`},
		{"unknown far", "a - zzz", nil, "rate", 5, `unknown name "zzz"`},
		{"unknown function", "expp(x)", nil, "rate", 1, `unknown function "expp" (did you mean "exp"?)`},
		{"unknown function far", "foo(x)", nil, "rate", 1, `unknown function "foo"`},
		{"not a function", "a(x+1)", nil, "rate", 1, `"a" is not a function (write a*(...) to multiply)`},
		{"constant called", "pi(2)", nil, "rate", 1, `"pi" is a constant, not a function`},
		{"function uncalled", "exp + 1", nil, "rate", 1, "exp is a function; call it with parentheses, e.g. exp(x)"},
		{"arity one", "exp(x, 1)", nil, "rate", 1, "exp takes 1 argument, found 2"},
		{"arity two", "2*pow(x)", nil, "rate", 3, "pow takes 2 arguments, found 1"},
		{"arity zero", "sin()", nil, "rate", 1, "sin takes 1 argument, found 0"},
		{"call unclosed", "min(x, a", nil, "rate", 9, `expected ")" or "," in call of min, found end of expression`},
		{"trailing comma", "max(x,)", nil, "rate", 7, `expected operand, found ")"`},
		{"define error", "g", []Define{{"g", "a*/x"}}, "g", 3, `expected operand, found "/"`},
		{"define self", "g", []Define{{"g", "1 + g"}}, "g", 5, `define "g" refers to itself`},
		{"define later", "g", []Define{{"g", "h*2"}, {"h", "x"}}, "g", 1, `define "h" is used before it is defined (a define may use only earlier defines)`},
		{"define typo", "gain*x", []Define{{"gain", "a/b"}}, "", 0, ""},
		{"define typo 2", "gian*x", []Define{{"gain", "a/b"}}, "rate", 1, `unknown name "gian" (did you mean "gain"?)`},
	}
	for _, tc := range tests {
		env := testEnv
		env.Defines = tc.defines
		_, err := Compile(tc.rate, env)
		if tc.msg == "" {
			if err != nil {
				t.Errorf("%s: unexpected error %v", tc.name, err)
			}
			continue
		}
		e, ok := err.(*Error)
		if !ok {
			t.Errorf("%s: error %v (%T), want *Error", tc.name, err, err)
			continue
		}
		if e.Msg != tc.msg || e.Where != tc.where {
			t.Errorf("%s: got %s: %q, want %s: %q", tc.name, e.Where, e.Msg, tc.where, tc.msg)
		}
		_, col, _, _ := locate(e.Src, e.Offset)
		if col != tc.col {
			t.Errorf("%s: col %d, want %d", tc.name, col, tc.col)
		}
		// The rendered header always names the expression and column.
		if want := fmt.Sprintf("%s, col %d: %s", tc.where, tc.col, tc.msg); !strings.HasPrefix(e.Error(), want) {
			t.Errorf("%s: Error() = %q, want prefix %q", tc.name, e.Error(), want)
		}
	}
	// The limits themselves are accepted.
	for _, src := range []string{
		strings.Repeat("(", 100) + "x" + strings.Repeat(")", 100),
		strings.Repeat("x+", 4999) + "xx", // 10000 bytes: "xx" is unknown, but past the length check
	} {
		_, err := Compile(src, testEnv)
		if err != nil && strings.Contains(err.Error(), "limit") || err != nil && strings.Contains(err.Error(), "deeply") {
			t.Errorf("limit rejected: %v", err)
		}
	}
}

// TestEnvErrors checks the validation of declared names.
func TestEnvErrors(t *testing.T) {
	tests := []struct {
		env Env
		msg string
	}{
		{Env{State: ""}, `env: state symbol "" is not a valid name (letters, digits and _, not starting with a digit)`},
		{Env{State: "2x"}, `env: state symbol "2x" is not a valid name (letters, digits and _, not starting with a digit)`},
		{Env{State: "x", Params: []string{"exp"}}, `env: parameter "exp" is reserved (a built-in function or constant)`},
		{Env{State: "e"}, `env: state symbol "e" is reserved (a built-in function or constant)`},
		{Env{State: "x", Params: []string{"a", "a"}}, `env: parameter "a" is declared twice`},
		{Env{State: "x", Params: []string{"x"}}, `env: parameter "x" has the same name as the state symbol`},
		{Env{State: "x", Params: []string{"a"}, Defines: []Define{{"a", "1"}}}, `env: define "a" has the same name as the parameter`},
		{Env{State: "x", Defines: []Define{{"pi", "1"}}}, `env: define "pi" is reserved (a built-in function or constant)`},
	}
	for _, tc := range tests {
		_, err := Compile("1", tc.env)
		if err == nil || err.Error() != tc.msg {
			t.Errorf("%+v: error %v, want %s", tc.env, err, tc.msg)
		}
		if e, ok := err.(*Error); !ok || e.Offset != -1 {
			t.Errorf("%+v: want *Error without position, got %#v", tc.env, err)
		}
	}
}

// TestErrorRendering checks the caret line for tabs, multibyte
// characters, several lines and long lines.
func TestErrorRendering(t *testing.T) {
	tests := []struct {
		err  Error
		want string
	}{
		{Error{Src: "L - sx*P", Offset: 4, Msg: `unknown name "sx" (did you mean "s"?)`, Where: "rate"},
			"rate, col 5: unknown name \"sx\" (did you mean \"s\"?)\n    L - sx*P\n        ^"},
		{Error{Src: "a\t+ q", Offset: 4, Msg: "m", Where: "rate"},
			"rate, col 5: m\n    a\t+ q\n     \t  ^"},
		{Error{Src: "é·x + y", Offset: 5, Msg: "m", Where: "g"}, // é and · take two bytes each
			"g, col 4: m\n    é·x + y\n       ^"},
		{Error{Src: "a +\n  b $", Offset: 8, Msg: "m", Where: "rate"},
			"rate, line 2, col 5: m\n      b $\n        ^"},
		{Error{Src: "a +\r\n  b $", Offset: 9, Msg: "m", Where: "rate"},
			"rate, line 2, col 5: m\n      b $\n        ^"},
		{Error{Src: "x +", Offset: 3, Msg: "m", Where: "rate"},
			"rate, col 4: m\n    x +\n       ^"},
		{Error{Src: "\xff", Offset: 0, Msg: "m", Where: "rate"},
			"rate, col 1: m\n    \uFFFD\n    ^"},
		{Error{Offset: -1, Msg: "m", Where: "env"}, "env: m"},
	}
	for _, tc := range tests {
		if got := tc.err.Error(); got != tc.want {
			t.Errorf("got\n%s\nwant\n%s", got, tc.want)
		}
	}
	// A long line is cut to a window that keeps the caret under its byte.
	src := strings.Repeat("a+", 100) + "$" + strings.Repeat("+a", 100)
	e := &Error{Src: src, Offset: 200, Msg: "m", Where: "rate"}
	lines := strings.Split(e.Error(), "\n")
	if len(lines) != 3 || !strings.HasPrefix(lines[1], "    ...") || !strings.HasSuffix(lines[1], "...") {
		t.Fatalf("long line not cut: %q", lines)
	}
	if c := strings.Index(lines[2], "^"); c < 0 || lines[1][c] != '$' {
		t.Errorf("caret not under '$':\n%s", e.Error())
	}
	if len([]rune(lines[1])) > maxShown+4+6 {
		t.Errorf("window too wide: %d runes", len([]rune(lines[1])))
	}
}

// TestEditDistance: classic values. kitten→sitting = 3 is Levenshtein's
// textbook example (e.g. Jurafsky & Martin, Speech and Language
// Processing, §2.5; from memory, verified by hand: k→s, e→i, +g);
// a transposition costs 1 in the Damerau distance (Damerau 1964).
func TestEditDistance(t *testing.T) {
	tests := []struct {
		a, b string
		d    int
	}{
		{"kitten", "sitting", 3},
		{"flaw", "lawn", 2},
		{"", "abc", 3},
		{"exp", "epx", 1},
		{"ab", "ba", 1},
		{"sx", "s", 1},
		{"same", "same", 0},
	}
	for _, tc := range tests {
		if d := names.Distance(tc.a, tc.b); d != tc.d {
			t.Errorf("editDistance(%q, %q) = %d, want %d", tc.a, tc.b, d, tc.d)
		}
	}
	if s := suggest("K", []string{"k"}); s != "" {
		t.Errorf("one-letter name got suggestion %q", s)
	}
	if s := suggest("lgo", funcNames()); s != "log" {
		t.Errorf("suggest(lgo) = %q, want log", s)
	}
}

func TestReserved(t *testing.T) {
	for _, name := range []string{"pi", "e", "exp", "log", "log10", "sqrt", "abs", "pow", "min", "max",
		"sin", "cos", "tan", "atan", "sinh", "cosh", "tanh"} {
		if !Reserved(name) {
			t.Errorf("Reserved(%q) = false", name)
		}
	}
	for _, name := range []string{"x", "E", "Pi", "ln", "exp2", ""} {
		if Reserved(name) {
			t.Errorf("Reserved(%q) = true", name)
		}
	}
}

// TestLiteralErrors checks the bound on the distance between a literal and
// its float64: zero for literals that are float64 values (0.5 = 2⁻¹,
// 1.25 = 5·2⁻², 2⁻¹⁰⁷⁴ written out), u|v| otherwise; huge exponents are
// handled without forming 10^|exp|.
func TestLiteralErrors(t *testing.T) {
	tests := []struct {
		lit   string
		exact bool
	}{
		{"0.5", true}, {"1.25", true}, {"3", true}, {"0e99999999", true}, {"0.000", true},
		{"4.9406564584124654417656879286822137236505980e-324", false},
		{"0.1", false}, {"1e-99999999", false}, {"1e23", false},
		{"9007199254740993", false}, // 2⁵³+1 is not a float64
		{"9007199254740992", true},  // 2⁵³ is
		{"1024e-3", false},
		{"0.0009765625", true}, // 2⁻¹⁰
	}
	for _, tc := range tests {
		p := mustCompile(t, tc.lit+"*x", testEnv)
		n := p.exprs[len(p.exprs)-1].root.(*binaryExpr).x.(*numLit)
		if (n.err == 0) != tc.exact {
			t.Errorf("%s: err = %g, want exact=%v", tc.lit, n.err, tc.exact)
		}
	}
}
