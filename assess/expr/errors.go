package expr

import (
	"fmt"
	names "holdfast/internal/suggest"
	"strings"
	"unicode/utf8"
)

// Error is a compile error: a message about a byte offset in one
// expression of a model.
type Error struct {
	Src    string // the expression's source text ("" for a problem with Env itself)
	Offset int    // byte offset in Src of the problem; -1 when there is no position
	Msg    string // the message, without position
	Where  string // "rate", the name of a define, or "env"
}

// Error renders the message with its line and column and, when the error has
// a position, the source line with a caret under the offending byte:
//
//	rate, col 5: unknown name "sx" (did you mean "s"?)
//	    L - sx*P
//	        ^
//
// Columns count characters (runes) from 1; lines are shown only for
// multi-line sources. Tabs in the source are kept in the caret line so the
// caret lines up in any tab width; long lines are cut around the offset.
func (e *Error) Error() string {
	if e.Offset < 0 || e.Offset > len(e.Src) {
		return e.Where + ": " + e.Msg
	}
	line, col, text, caretPrefix := locate(e.Src, e.Offset)
	var b strings.Builder
	b.WriteString(e.Where)
	if strings.Contains(e.Src, "\n") {
		fmt.Fprintf(&b, ", line %d", line)
	}
	fmt.Fprintf(&b, ", col %d: %s", col, e.Msg)
	if strings.TrimSpace(text) != "" {
		b.WriteString("\n    ")
		b.WriteString(text)
		b.WriteString("\n    ")
		b.WriteString(caretPrefix)
		b.WriteString("^")
	}
	return b.String()
}

// maxShown is the widest source line (in runes) shown whole in an error.
const maxShown = 72

// locate returns the 1-based line and rune column of off in src, the text of
// that line made printable (cut to a window around off when long), and the
// blanks that put a caret under off in that text.
func locate(src string, off int) (line, col int, text, prefix string) {
	line = 1 + strings.Count(src[:off], "\n")
	start := strings.LastIndexByte(src[:off], '\n') + 1
	end := strings.IndexByte(src[off:], '\n')
	if end < 0 {
		end = len(src)
	} else {
		end += off
	}
	if end > start && src[end-1] == '\r' && off < end {
		end--
	}
	// Split the line into printable runes and find the caret's rune index.
	var runes []rune
	caret := -1
	for i := start; i < end; {
		if i >= off && caret < 0 {
			caret = len(runes)
		}
		r, size := utf8.DecodeRuneInString(src[i:])
		switch {
		case r == '\t':
		case r == utf8.RuneError && size == 1, r < ' ', r == 0x7f:
			r = utf8.RuneError
		}
		runes = append(runes, r)
		i += size
	}
	if caret < 0 {
		caret = len(runes) // offset at end of line or of source
	}
	col = caret + 1
	// Cut long lines to a window around the caret.
	lo, hi := 0, len(runes)
	if hi > maxShown {
		lo = max(0, caret-maxShown/2)
		hi = min(len(runes), lo+maxShown)
		lo = max(0, hi-maxShown)
	}
	var t, p strings.Builder
	if lo > 0 {
		t.WriteString("...")
		p.WriteString("   ")
	}
	for i := lo; i < hi; i++ {
		t.WriteRune(runes[i])
		if i < caret {
			if runes[i] == '\t' {
				p.WriteByte('\t')
			} else {
				p.WriteByte(' ')
			}
		}
	}
	if hi < len(runes) {
		t.WriteString("...")
	}
	return line, col, t.String(), p.String()
}

// suggest returns the candidate nearest to name by edit distance when it is
// close enough to be a likely misspelling (distance at most a third of the
// name's length, at least 1, and less than the name's length), else "".
// Ties go to a candidate with the same first letter, then to the earlier
// candidate, so suggestions are deterministic.
func suggest(name string, cands []string) string {
	best, bestD, bestSame := "", -1, false
	limit := max(1, utf8.RuneCountInString(name)/3)
	for _, c := range cands {
		if c == name || c == "" {
			continue
		}
		d := names.Distance(name, c)
		if d > limit || d >= utf8.RuneCountInString(name) {
			continue
		}
		same := c[0] == name[0]
		if bestD < 0 || d < bestD || d == bestD && same && !bestSame {
			best, bestD, bestSame = c, d, same
		}
	}
	return best
}
