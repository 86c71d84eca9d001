package expr

import (
	"errors"
	"fmt"
	"math"
	"math/big"
	"strconv"
	"strings"
)

// Limits on a source expression.
const (
	MaxSourceLen = 10000 // bytes per expression (the rate and each define)
	MaxDepth     = 100   // nesting levels: each parenthesis, call, sign and exponent is one level
)

// unitRoundoff is u = 2⁻⁵³, the unit roundoff of float64 round-to-nearest:
// a correctly rounded v is within u|v| of the exact value (Higham, Accuracy
// and Stability of Numerical Algorithms, 2nd ed., 2002, §2.2).
const unitRoundoff = 0x1p-53

// scope resolves names while one expression is parsed.
type scope struct {
	state   string
	params  map[string]int
	defines map[string]int // every define, by index
	order   []string       // define names in order
	cur     int            // index of the define being parsed; len(defines) for the rate
}

// candidates lists the names visible in the current expression, for
// "did you mean" suggestions, in a fixed order.
func (s *scope) candidates(params []string) []string {
	c := []string{s.state}
	c = append(c, params...)
	c = append(c, s.order[:s.cur]...)
	return append(c, constPi, constE)
}

// parser is a recursive-descent parser for one expression. Like go/parser
// it never panics on bad input; it stops at the first error.
//
// Grammar (EBNF):
//
//	expr    = term { ("+" | "-") term } .
//	term    = unary { ("*" | "/") unary } .
//	unary   = ("+" | "-") unary | power .
//	power   = primary [ "^" unary ] .
//	primary = number | name | name "(" [ expr { "," expr } ] ")" | "(" expr ")" .
//
// So ^ is right-associative and binds tighter than a leading sign: -x^2 is
// -(x^2), 2^3^2 is 2^(3^2) and 2^-1 is 2^(-1).
type parser struct {
	sc     scanner
	tok    token
	where  string
	scope  *scope
	params []string
	depth  int
	err    *Error
}

// parse parses and resolves src, the expression called where.
func parse(src, where string, sc *scope, params []string) (node, *Error) {
	if len(src) > MaxSourceLen {
		return nil, &Error{Src: src, Offset: MaxSourceLen, Where: where,
			Msg: fmt.Sprintf("expression is %d bytes long; the limit is %d", len(src), MaxSourceLen)}
	}
	p := &parser{sc: scanner{src: src}, where: where, scope: sc, params: params}
	p.next()
	if p.tok.kind == tEOF {
		return nil, &Error{Src: src, Offset: 0, Where: where, Msg: "empty expression"}
	}
	n := p.parseExpr()
	if p.err == nil && p.tok.kind != tEOF {
		switch t := p.tok; t.kind {
		case tRparen:
			p.fail(t.off, `unexpected ")" without matching "("`)
		case tIdent, tNumber, tLparen:
			p.fail(t.off, "missing operator before %s", t.describe())
		case tIllegal:
			p.fail(t.off, "%s", t.lit)
		default:
			p.fail(t.off, "unexpected %s", t.describe())
		}
	}
	if p.err != nil {
		return nil, p.err
	}
	return n, nil
}

func (p *parser) next() { p.tok = p.sc.next() }

// fail records the first error.
func (p *parser) fail(off int, format string, args ...any) {
	if p.err == nil {
		p.err = &Error{Src: p.sc.src, Offset: off, Where: p.where, Msg: fmt.Sprintf(format, args...)}
	}
}

// enter opens a nesting level at off; it fails beyond MaxDepth.
func (p *parser) enter(off int) bool {
	p.depth++
	if p.depth > MaxDepth {
		p.fail(off, "expression nested too deeply (more than %d levels)", MaxDepth)
		return false
	}
	return true
}

func (p *parser) leave() { p.depth-- }

func (p *parser) parseExpr() node {
	x := p.parseTerm()
	for p.err == nil && (p.tok.kind == tAdd || p.tok.kind == tSub) {
		op, off := p.tok.lit[0], p.tok.off
		p.next()
		y := p.parseTerm()
		x = &binaryExpr{off: off, op: op, x: x, y: y}
	}
	return x
}

func (p *parser) parseTerm() node {
	x := p.parseUnary()
	for p.err == nil && (p.tok.kind == tMul || p.tok.kind == tDiv) {
		op, off := p.tok.lit[0], p.tok.off
		p.next()
		y := p.parseUnary()
		x = &binaryExpr{off: off, op: op, x: x, y: y}
	}
	return x
}

func (p *parser) parseUnary() node {
	if p.tok.kind == tSub || p.tok.kind == tAdd {
		neg, off := p.tok.kind == tSub, p.tok.off
		p.next()
		if !p.enter(off) {
			return nil
		}
		x := p.parseUnary()
		p.leave()
		if neg {
			return &unaryExpr{off: off, x: x}
		}
		return x
	}
	return p.parsePower()
}

func (p *parser) parsePower() node {
	x := p.parsePrimary()
	if p.err == nil && p.tok.kind == tPow {
		off := p.tok.off
		p.next()
		if !p.enter(off) {
			return nil
		}
		y := p.parseUnary()
		p.leave()
		return &binaryExpr{off: off, op: '^', x: x, y: y}
	}
	return x
}

func (p *parser) parsePrimary() node {
	t := p.tok
	switch t.kind {
	case tNumber:
		p.next()
		return p.number(t)
	case tIdent:
		p.next()
		if p.tok.kind == tLparen {
			return p.parseCall(t)
		}
		return p.resolve(t)
	case tLparen:
		p.next()
		if !p.enter(t.off) {
			return nil
		}
		x := p.parseExpr()
		p.leave()
		if p.err != nil {
			return nil
		}
		if p.tok.kind != tRparen {
			_, col, _, _ := locate(p.sc.src, t.off)
			p.fail(p.tok.off, `expected ")" to match "(" at col %d, found %s`, col, p.tok.describe())
			return nil
		}
		p.next()
		return x
	case tIllegal:
		p.fail(t.off, "%s", t.lit)
	default:
		p.fail(t.off, "expected operand, found %s", t.describe())
	}
	return nil
}

// number converts a literal, recording how far the float64 is from the
// decimal value written.
func (p *parser) number(t token) node {
	v, err := strconv.ParseFloat(t.lit, 64)
	if err != nil {
		if errors.Is(err, strconv.ErrRange) && math.IsInf(v, 0) {
			p.fail(t.off, "number %s is too large (float64 holds at most %.4g)", t.lit, math.MaxFloat64)
		} else if !errors.Is(err, strconv.ErrRange) {
			p.fail(t.off, "malformed number %q", t.lit)
		}
		if p.err != nil {
			return nil
		}
	}
	n := &numLit{off: t.off, lit: t.lit, val: v}
	if !exactLiteral(t.lit, v) {
		// Correct rounding: |v - lit| ≤ u|v|, or the least subnormal on underflow.
		n.err = max(unitRoundoff*math.Abs(v), 0x1p-1074)
	}
	return n
}

// exactLiteral reports whether the decimal literal lit equals the float64
// v exactly. A float64 is a dyadic rational whose exact decimal form has a
// decimal exponent within ±1100, so larger written exponents (which would
// make the rational comparison slow) are inexact unless the digits are all
// zero.
func exactLiteral(lit string, v float64) bool {
	mant, exp, hasExp := lit, 0, false
	if i := strings.IndexAny(lit, "eE"); i >= 0 {
		mant, hasExp = lit[:i], true
		e, err := strconv.Atoi(lit[i+1:])
		if err != nil {
			e = math.MaxInt32 // beyond any int: certainly out of range
		}
		exp = e
	}
	if strings.Trim(mant, "0.") == "" {
		return v == 0
	}
	if hasExp && (exp > 1100+len(lit) || exp < -1100-len(lit)) {
		return false
	}
	r, ok := new(big.Rat).SetString(lit)
	return ok && r.Cmp(new(big.Rat).SetFloat64(v)) == 0
}

func (p *parser) parseCall(name token) node {
	fn := lookupFunc(name.lit)
	if fn == fnNone {
		switch {
		case name.lit == constPi || name.lit == constE:
			p.fail(name.off, "%q is a constant, not a function", name.lit)
		case p.known(name.lit):
			p.fail(name.off, "%q is not a function (write %s*(...) to multiply)", name.lit, name.lit)
		default:
			msg := fmt.Sprintf("unknown function %q", name.lit)
			if s := suggest(name.lit, funcNames()); s != "" {
				msg += fmt.Sprintf(" (did you mean %q?)", s)
			}
			p.fail(name.off, "%s", msg)
		}
		return nil
	}
	info := funcTable(fn)
	lparen := p.tok.off
	p.next()
	if !p.enter(lparen) {
		return nil
	}
	var args []node
	if p.tok.kind != tRparen {
		for {
			a := p.parseExpr()
			if p.err != nil {
				return nil
			}
			args = append(args, a)
			if p.tok.kind != tComma {
				break
			}
			p.next()
		}
	}
	p.leave()
	if p.tok.kind != tRparen {
		p.fail(p.tok.off, `expected ")" or "," in call of %s, found %s`, info.name, p.tok.describe())
		return nil
	}
	p.next()
	if len(args) != info.arity {
		plural := "s"
		if info.arity == 1 {
			plural = ""
		}
		p.fail(name.off, "%s takes %d argument%s, found %d", info.name, info.arity, plural, len(args))
		return nil
	}
	return &callExpr{off: name.off, fn: fn, args: args}
}

// known reports whether name is the state, a parameter or any define.
func (p *parser) known(name string) bool {
	_, isParam := p.scope.params[name]
	_, isDef := p.scope.defines[name]
	return name == p.scope.state || isParam || isDef
}

// resolve binds a name that is not called.
func (p *parser) resolve(t token) node {
	name, sc := t.lit, p.scope
	switch name {
	case constPi:
		return &constRef{off: t.off, name: name, val: math.Pi, err: unitRoundoff * math.Pi}
	case constE:
		return &constRef{off: t.off, name: name, val: math.E, err: unitRoundoff * math.E}
	case sc.state:
		return &varRef{off: t.off, name: name, kind: symState}
	}
	if i, ok := sc.params[name]; ok {
		return &varRef{off: t.off, name: name, kind: symParam, index: i}
	}
	if i, ok := sc.defines[name]; ok {
		switch {
		case i < sc.cur:
			return &varRef{off: t.off, name: name, kind: symDefine, index: i}
		case i == sc.cur:
			p.fail(t.off, "define %q refers to itself", name)
		default:
			p.fail(t.off, "define %q is used before it is defined (a define may use only earlier defines)", name)
		}
		return nil
	}
	if lookupFunc(name) != fnNone {
		p.fail(t.off, "%s is a function; call it with parentheses, e.g. %s(x)", name, name)
		return nil
	}
	msg := fmt.Sprintf("unknown name %q", name)
	if s := suggest(name, sc.candidates(p.params)); s != "" {
		msg += fmt.Sprintf(" (did you mean %q?)", s)
	}
	p.fail(t.off, "%s", msg)
	return nil
}
