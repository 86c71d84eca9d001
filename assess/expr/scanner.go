package expr

import (
	"fmt"
	"unicode/utf8"
)

// tokenKind classifies a token of the rate-law language.
type tokenKind uint8

const (
	tEOF     tokenKind = iota
	tIllegal           // lit holds the error message
	tNumber
	tIdent
	tAdd    // +
	tSub    // -
	tMul    // *
	tDiv    // /
	tPow    // ^
	tLparen // (
	tRparen // )
	tComma  // ,
)

// token is one lexical unit; off is the byte offset of its first byte in the
// source, as in go/token.
type token struct {
	kind tokenKind
	off  int
	lit  string // source text (number, name) or message (tIllegal)
}

// describe names a token for an error message, e.g. `name "x"`.
func (t token) describe() string {
	switch t.kind {
	case tEOF:
		return "end of expression"
	case tNumber:
		return "number " + t.lit
	case tIdent:
		return fmt.Sprintf("name %q", t.lit)
	}
	return fmt.Sprintf("%q", t.lit)
}

// scanner splits a source into tokens, in the manner of go/scanner: it
// never fails, reporting bad input as tIllegal tokens.
type scanner struct {
	src string
	off int
}

func isLetter(c byte) bool { return c == '_' || 'a' <= c && c <= 'z' || 'A' <= c && c <= 'Z' }
func isDigit(c byte) bool  { return '0' <= c && c <= '9' }

// lookalike returns the ASCII operator meant by a Unicode character that is
// often pasted from typeset formulas, or "".
func lookalike(r rune) string {
	switch r {
	case '\u2212', '\u2013': // minus sign, en dash
		return "-"
	case '\u00d7', '\u00b7', '\u22c5': // multiplication sign, middle dot, dot operator
		return "*"
	case '\u00f7': // division sign
		return "/"
	}
	return ""
}

// punct returns the kind of a one-byte operator or punctuation token.
func punct(c byte) (tokenKind, bool) {
	switch c {
	case '+':
		return tAdd, true
	case '-':
		return tSub, true
	case '*':
		return tMul, true
	case '/':
		return tDiv, true
	case '^':
		return tPow, true
	case '(':
		return tLparen, true
	case ')':
		return tRparen, true
	case ',':
		return tComma, true
	}
	return tEOF, false
}

// next returns the next token.
func (s *scanner) next() token {
	for s.off < len(s.src) {
		switch s.src[s.off] {
		case ' ', '\t', '\n', '\r':
			s.off++
			continue
		}
		break
	}
	start := s.off
	if start >= len(s.src) {
		return token{kind: tEOF, off: start}
	}
	c := s.src[start]
	switch {
	case isLetter(c):
		end := start + 1
		for end < len(s.src) && (isLetter(s.src[end]) || isDigit(s.src[end])) {
			end++
		}
		s.off = end
		return token{kind: tIdent, off: start, lit: s.src[start:end]}
	case isDigit(c) || c == '.' && start+1 < len(s.src) && isDigit(s.src[start+1]):
		return s.number()
	}
	s.off++
	if k, ok := punct(c); ok {
		if c == '*' && s.off < len(s.src) && s.src[s.off] == '*' {
			s.off++
			return token{kind: tIllegal, off: start, lit: `unexpected "**"; write powers with "^", e.g. x^2`}
		}
		return token{kind: k, off: start, lit: string(c)}
	}
	if c < utf8.RuneSelf {
		if c < ' ' || c == 0x7f {
			return token{kind: tIllegal, off: start, lit: fmt.Sprintf("unexpected control character %U", rune(c))}
		}
		return token{kind: tIllegal, off: start, lit: fmt.Sprintf("unexpected character %q", rune(c))}
	}
	r, size := utf8.DecodeRuneInString(s.src[start:])
	s.off = start + size
	if r == utf8.RuneError && size == 1 {
		return token{kind: tIllegal, off: start, lit: "invalid UTF-8 encoding"}
	}
	if ascii := lookalike(r); ascii != "" {
		return token{kind: tIllegal, off: start, lit: fmt.Sprintf("unexpected character %q (%U); use ASCII %q", r, r, ascii)}
	}
	return token{kind: tIllegal, off: start, lit: fmt.Sprintf("unexpected character %q (%U)", r, r)}
}

// number scans digits [ "." digits ] [ ("e"|"E") ["+"|"-"] digits ].
func (s *scanner) number() token {
	src, start := s.src, s.off
	i := start
	for i < len(src) && isDigit(src[i]) {
		i++
	}
	if i < len(src) && src[i] == '.' {
		i++
		for i < len(src) && isDigit(src[i]) {
			i++
		}
	}
	bad := ""
	if i < len(src) && (src[i] == 'e' || src[i] == 'E') {
		i++
		if i < len(src) && (src[i] == '+' || src[i] == '-') {
			i++
		}
		if i < len(src) && isDigit(src[i]) {
			for i < len(src) && isDigit(src[i]) {
				i++
			}
		} else {
			bad = "exponent has no digits"
		}
	}
	if bad == "" && i < len(src) && (src[i] == '.' || isDigit(src[i])) {
		bad = "more than one decimal point"
	}
	if bad != "" {
		if bad != "exponent has no digits" {
			// Swallow the rest of the malformed literal so the message shows it whole.
			for i < len(src) && (isDigit(src[i]) || src[i] == '.') {
				i++
			}
		}
		s.off = i
		return token{kind: tIllegal, off: start, lit: fmt.Sprintf("malformed number %q: %s", src[start:i], bad)}
	}
	s.off = i
	return token{kind: tNumber, off: start, lit: src[start:i]}
}
