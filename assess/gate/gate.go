// Package gate reads and judges requirements on a run's probabilities,
// for reviews that must fail a pipeline when an equilibrium is not sure
// enough to hold.
//
// # Grammar
//
// A requirement names a tracked equilibrium, a verdict about it, a
// comparison and a probability:
//
//	requirement = label verdict comparison probability
//	label       = "E" positive integer without leading zeros   (E1, E2, …)
//	verdict     = "exists" | "attracting" | "semistable" | "current"
//	comparison  = ">=" | ">" | "<=" | "<" | "≥" | "≤"
//	probability = decimal number in [0, 1], or in [0, 100] followed by "%"
//
// Tokens are separated by spaces or tabs (required only between the label
// and the verdict), e.g. "E2 attracting >= 0.95", "E1 exists>99%",
// "E3 current <= 0.05". The verdict "current" is the probability that the
// state, started at the scenario's current state, ends at the equilibrium.
//
// # Judgement
//
// A requirement is judged on the 95% interval the run reports, not on the
// point estimate: "≥ p" and "> p" hold when the interval's lower end is at
// least (above) p, "≤ p" and "< p" when its upper end is at most (below)
// p. So a requirement holds only when the data make it clear at that
// level, and more draws can turn a failed requirement into a met one only
// by narrowing the interval. Requirements no interval can meet (≥ 1, > 1,
// ≤ 0, < 0) are rejected when read.
package gate

import (
	"fmt"
	"holdfast/internal/suggest"
	"math"
	"strconv"
	"strings"
	"unicode/utf8"
)

// Verdict is the event whose probability a requirement bounds.
type Verdict int

const (
	// Exists: the equilibrium exists in a draw.
	Exists Verdict = iota
	// Attracting: it exists and attracts from both sides (class stable).
	Attracting
	// Semistable: it exists and attracts from one side only.
	Semistable
	// Current: the state started at the scenario's current state ends
	// there.
	Current
	numVerdicts
)

var verdictNames = [numVerdicts]string{"exists", "attracting", "semistable", "current"}

// String returns "exists", "attracting", "semistable" or "current".
func (v Verdict) String() string {
	if v >= 0 && v < numVerdicts {
		return verdictNames[v]
	}
	return "Verdict(" + strconv.Itoa(int(v)) + ")"
}

// Op is a comparison.
type Op int

const (
	// AtLeast is ">=": judged on the interval's lower end.
	AtLeast Op = iota
	// Above is ">": judged on the interval's lower end.
	Above
	// AtMost is "<=": judged on the interval's upper end.
	AtMost
	// Below is "<": judged on the interval's upper end.
	Below
)

// String returns ">=", ">", "<=" or "<".
func (o Op) String() string {
	switch o {
	case AtLeast:
		return ">="
	case Above:
		return ">"
	case AtMost:
		return "<="
	case Below:
		return "<"
	}
	return "Op(" + strconv.Itoa(int(o)) + ")"
}

// lower reports whether the comparison is judged on the lower end.
func (o Op) lower() bool { return o == AtLeast || o == Above }

// Requirement is a parsed requirement.
type Requirement struct {
	// Text is the requirement as written.
	Text      string
	Label     string
	Verdict   Verdict
	Op        Op
	Threshold float64
}

// String returns the requirement in canonical form, e.g.
// "E2 attracting >= 0.95". Parse reads it back to the same requirement.
func (r Requirement) String() string {
	return fmt.Sprintf("%s %s %s %s", r.Label, r.Verdict, r.Op, strconv.FormatFloat(r.Threshold, 'g', -1, 64))
}

// SyntaxError reports a requirement that cannot be read: the input, the
// 1-based column (in characters) of the fault, and what is wrong.
type SyntaxError struct {
	Input string
	Col   int
	Msg   string
}

func (e *SyntaxError) Error() string {
	return fmt.Sprintf("requirement %q: col %d: %s", e.Input, e.Col, e.Msg)
}

// MaxLen bounds the length of a requirement in bytes.
const MaxLen = 200

// Parse reads one requirement (see the package documentation for the
// grammar). Errors are *SyntaxError.
func Parse(s string) (Requirement, error) {
	p := &parser{src: s}
	if len(s) > MaxLen {
		return Requirement{}, p.fail(0, fmt.Sprintf("longer than %d bytes", MaxLen))
	}
	if !utf8.ValidString(s) {
		return Requirement{}, p.fail(0, "not valid UTF-8 text")
	}
	r := Requirement{Text: s}
	p.space()
	if p.eof() {
		return r, p.fail(p.pos, `empty; want e.g. "E2 attracting >= 0.95"`)
	}
	var err error
	if r.Label, err = p.label(); err != nil {
		return r, err
	}
	if p.space() == 0 {
		if p.eof() {
			return r, p.fail(p.pos, "missing verdict after "+r.Label+" (want "+verdictList+")")
		}
		return r, p.fail(p.pos, "want a space after the label "+r.Label)
	}
	if r.Verdict, err = p.verdict(); err != nil {
		return r, err
	}
	p.space()
	if r.Op, err = p.op(); err != nil {
		return r, err
	}
	p.space()
	probAt := p.pos
	if r.Threshold, err = p.prob(); err != nil {
		return r, err
	}
	p.space()
	if !p.eof() {
		return r, p.fail(p.pos, fmt.Sprintf("unexpected %q after the probability", p.src[p.pos:]))
	}
	if msg := impossible(r.Op, r.Threshold); msg != "" {
		return r, p.fail(probAt, msg)
	}
	return r, nil
}

const verdictList = "exists, attracting, semistable or current"

// impossible names a requirement that no interval can meet.
func impossible(op Op, t float64) string {
	switch {
	case op == AtLeast && t == 1, op == Above && t >= 1:
		return fmt.Sprintf("%s %s can never be met: the lower 95%% bound is below 1 for any number of draws", op, fmtProb(t))
	case op == AtMost && t == 0, op == Below && t <= 0:
		return fmt.Sprintf("%s %s can never be met: the upper 95%% bound is above 0 for any number of draws", op, fmtProb(t))
	}
	return ""
}

type parser struct {
	src string
	pos int
}

func (p *parser) eof() bool { return p.pos >= len(p.src) }

// col converts a byte offset to a 1-based character column.
func (p *parser) col(off int) int { return utf8.RuneCountInString(p.src[:min(off, len(p.src))]) + 1 }

func (p *parser) fail(off int, msg string) error {
	return &SyntaxError{Input: p.src, Col: p.col(off), Msg: msg}
}

// space skips spaces and tabs and returns how many.
func (p *parser) space() int {
	n := 0
	for !p.eof() && (p.src[p.pos] == ' ' || p.src[p.pos] == '\t') {
		p.pos++
		n++
	}
	return n
}

// word returns the run of bytes up to the next space, tab, comparison
// sign or digit-free boundary.
func (p *parser) word() string {
	start := p.pos
	for !p.eof() {
		c := p.src[p.pos]
		if c == ' ' || c == '\t' || c == '<' || c == '>' || c == '=' || strings.HasPrefix(p.src[p.pos:], "≥") || strings.HasPrefix(p.src[p.pos:], "≤") {
			break
		}
		p.pos++
	}
	return p.src[start:p.pos]
}

func (p *parser) label() (string, error) {
	start := p.pos
	w := p.word()
	if w == "" {
		return "", p.fail(start, "want an equilibrium label such as E1 first")
	}
	if w[0] != 'E' {
		msg := fmt.Sprintf("%q is not an equilibrium label; want E1, E2, … (as numbered at nominal values)", w)
		if w[0] == 'e' && len(w) > 1 && isDigits(w[1:]) {
			msg += fmt.Sprintf("; did you mean %q?", "E"+w[1:])
		}
		return "", p.fail(start, msg)
	}
	num := w[1:]
	if num == "" || !isDigits(num) || num[0] == '0' || len(num) > 6 {
		return "", p.fail(start, fmt.Sprintf("%q is not an equilibrium label; want E followed by a number from 1 (E1, E2, …)", w))
	}
	return w, nil
}

func isDigits(s string) bool {
	for i := 0; i < len(s); i++ {
		if s[i] < '0' || s[i] > '9' {
			return false
		}
	}
	return s != ""
}

func (p *parser) verdict() (Verdict, error) {
	start := p.pos
	w := p.word()
	for v, name := range verdictNames {
		if w == name {
			return Verdict(v), nil
		}
	}
	if w == "" {
		return 0, p.fail(start, "missing verdict (want "+verdictList+")")
	}
	msg := fmt.Sprintf("unknown verdict %q (want %s)", w, verdictList)
	if near := nearest(strings.ToLower(w)); near != "" {
		msg += fmt.Sprintf("; did you mean %q?", near)
	}
	return 0, p.fail(start, msg)
}

func (p *parser) op() (Op, error) {
	rest := p.src[p.pos:]
	for _, c := range []struct {
		tok string
		op  Op
	}{{">=", AtLeast}, {"≥", AtLeast}, {"<=", AtMost}, {"≤", AtMost}, {">", Above}, {"<", Below}} {
		if strings.HasPrefix(rest, c.tok) {
			p.pos += len(c.tok)
			return c.op, nil
		}
	}
	if rest == "" {
		return 0, p.fail(p.pos, "missing comparison (want >=, >, <= or <) and probability")
	}
	if strings.HasPrefix(rest, "=") {
		return 0, p.fail(p.pos, `"=" is not a comparison here; want >=, >, <= or <`)
	}
	return 0, p.fail(p.pos, fmt.Sprintf("want a comparison (>=, >, <= or <), got %q", firstWord(rest)))
}

func (p *parser) prob() (float64, error) {
	start := p.pos
	for !p.eof() && strings.IndexByte("0123456789.eE+-", p.src[p.pos]) >= 0 {
		p.pos++
	}
	text := p.src[start:p.pos]
	if text == "" {
		if p.eof() {
			return 0, p.fail(start, "missing probability after the comparison")
		}
		return 0, p.fail(start, fmt.Sprintf("want a probability such as 0.95 or 95%%, got %q", firstWord(p.src[start:])))
	}
	v, err := strconv.ParseFloat(text, 64)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, p.fail(start, fmt.Sprintf("%q is not a number", text))
	}
	if !p.eof() && p.src[p.pos] == '%' {
		p.pos++
		if v < 0 || v > 100 {
			return 0, p.fail(start, fmt.Sprintf("%s%% is not a percentage between 0 and 100", text))
		}
		return v / 100, nil
	}
	if v < 0 || v > 1 {
		msg := fmt.Sprintf("probability %s is not between 0 and 1", text)
		if v > 1 && v <= 100 {
			msg += fmt.Sprintf(" (for a percentage write %s%%)", text)
		}
		return 0, p.fail(start, msg)
	}
	return v, nil
}

func firstWord(s string) string {
	if i := strings.IndexAny(s, " \t"); i >= 0 {
		return s[:i]
	}
	return s
}

// nearest returns the verdict within two edits of w, or "".
func nearest(w string) string {
	best, bd := "", 3
	for _, name := range verdictNames {
		if d := suggest.Distance(w, name); d < bd {
			best, bd = name, d
		}
	}
	return best
}

// ParseAll reads several requirements; the first error is returned.
func ParseAll(texts []string) ([]Requirement, error) {
	var out []Requirement
	for _, t := range texts {
		r, err := Parse(t)
		if err != nil {
			return nil, err
		}
		out = append(out, r)
	}
	return out, nil
}

// Estimate is a probability as a run reports it: Count of N draws, the
// estimate P and its 95% interval CI.
type Estimate struct {
	Count, N int64
	P        float64
	CI       [2]float64
}

// Outcome is a requirement judged against an estimate.
type Outcome struct {
	Requirement
	Estimate
	// Bound is the interval end judged: the lower one for ">=" and ">",
	// the upper one for "<=" and "<" (NaN when no draw was assessed).
	Bound float64
	// Met tells whether the requirement holds.
	Met bool
	// Margin is how far Bound lies on the good side of the threshold:
	// positive or zero when met (for ">=" and "<="), negative by the
	// shortfall when not.
	Margin float64
}

// Judge judges the requirement against the estimate.
func (r Requirement) Judge(e Estimate) Outcome {
	o := Outcome{Requirement: r, Estimate: e, Bound: math.NaN(), Margin: math.NaN()}
	if e.N <= 0 || math.IsNaN(e.CI[0]) || math.IsNaN(e.CI[1]) {
		return o
	}
	if r.Op.lower() {
		o.Bound = e.CI[0]
		o.Margin = o.Bound - r.Threshold
	} else {
		o.Bound = e.CI[1]
		o.Margin = r.Threshold - o.Bound
	}
	switch r.Op {
	case AtLeast, AtMost:
		o.Met = o.Margin >= 0
	default:
		o.Met = o.Margin > 0
	}
	return o
}

// String describes the outcome in one line, saying for a requirement not
// met which bound fell short and by how much, e.g.
//
//	E2 attracting >= 0.95: not met: lower 95% bound 0.912 is 0.038 below 0.95 (estimate 0.934, 1868 of 2000 draws)
func (o Outcome) String() string {
	head := o.Requirement.String()
	if o.N <= 0 || math.IsNaN(o.Bound) {
		return head + ": not met: no draw was assessed"
	}
	side, dir := "lower", "below"
	if !o.Op.lower() {
		side, dir = "upper", "above"
	}
	tail := fmt.Sprintf("(estimate %s, %d of %d draws)", fmtProb(o.P), o.Count, o.N)
	if o.Met {
		return fmt.Sprintf("%s: met: %s 95%% bound %s %s", head, side, fmtProb(o.Bound), tail)
	}
	if o.Margin == 0 {
		return fmt.Sprintf("%s: not met: %s 95%% bound %s equals %s %s", head, side, fmtProb(o.Bound), fmtProb(o.Threshold), tail)
	}
	return fmt.Sprintf("%s: not met: %s 95%% bound %s is %s %s %s %s", head, side, fmtProb(o.Bound),
		fmtProb(math.Abs(o.Margin)), dir, fmtProb(o.Threshold), tail)
}

// fmtProb formats a probability with four significant digits.
func fmtProb(v float64) string { return strconv.FormatFloat(v, 'g', 4, 64) }
