package scenarios

import (
	"fmt"
	"holdfast/internal/suggest"
	"slices"
	"strings"
)

// Reserved lists the names the rate-law language keeps for its constants
// and functions; the state symbol, parameters and defines may not use them.
var reserved = []string{
	"pi", "e", "exp", "log", "log10", "sqrt", "abs", "pow", "min", "max",
	"sin", "cos", "tan", "atan", "sinh", "cosh", "tanh",
}

// IsReserved reports whether name is a constant or function of the
// rate-law language (pi, e, exp, log, ...), which a scenario may not use as
// the name of its state, a parameter or a define.
func IsReserved(name string) bool { return slices.Contains(reserved, name) }

// IsIdentifier reports whether name has the form [A-Za-z_][A-Za-z0-9_]*.
func IsIdentifier(name string) bool {
	if name == "" {
		return false
	}
	for i := 0; i < len(name); i++ {
		c := name[i]
		switch {
		case c == '_', 'a' <= c && c <= 'z', 'A' <= c && c <= 'Z':
		case '0' <= c && c <= '9' && i > 0:
		default:
			return false
		}
	}
	return true
}

// checkName returns a message when name cannot name a state, parameter or
// define, and "" when it can.
func checkName(name string) string {
	switch {
	case !IsIdentifier(name):
		return fmt.Sprintf("%s is not a valid name (letters, digits and _, not starting with a digit)", quoteShort(name))
	case IsReserved(name):
		return fmt.Sprintf("%q is reserved: the rate law uses it as a function or constant", name)
	}
	return ""
}

// maxCandidates bounds the work of one suggestion: with more candidates
// than this (a scenario with thousands of parameters) nearest gives none.
const maxCandidates = 256

// nearest returns the candidate closest to word by edit distance (ignoring
// case) when it is close enough to be a likely misspelling, and "" otherwise.
// Ties go to the earlier candidate.
func nearest(word string, cands []string) string {
	if len(cands) > maxCandidates {
		return ""
	}
	w := strings.ToLower(word)
	best, bestD := "", -1
	for _, c := range cands {
		if c == word {
			continue
		}
		lc := strings.ToLower(c)
		d := suggest.Distance(w, lc)
		long := max(len(w), len(lc))
		ok := d <= 2 && 2*d <= long || 3*d <= long ||
			len(w) >= 3 && (strings.HasPrefix(lc, w) || strings.HasPrefix(w, lc) && len(lc) >= 3)
		if ok && (bestD < 0 || d < bestD) {
			best, bestD = c, d
		}
	}
	return best
}

// didYouMean returns "; did you mean "x"?" for the nearest candidate, or "".
func didYouMean(word string, cands []string) string {
	if near := nearest(word, cands); near != "" {
		return fmt.Sprintf("; did you mean %q?", near)
	}
	return ""
}

// quoteShort quotes s for a message, cutting it to 40 bytes.
func quoteShort(s string) string {
	const n = 40
	if len(s) > n {
		cut := n
		for cut > 0 && s[cut]&0xC0 == 0x80 { // do not split a UTF-8 sequence
			cut--
		}
		return fmt.Sprintf("%q…", s[:cut])
	}
	return fmt.Sprintf("%q", s)
}
