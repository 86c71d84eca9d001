package scenarios

import (
	"sort"
	"strconv"
	"unicode/utf8"
)

// Style is the way a YAML scalar is written. An expression's Style, with its
// position and the file's bytes, lets OffsetPos map a byte offset inside the
// expression back to a file position.
type Style int

const (
	Plain        Style = iota // rate: L - s*P
	SingleQuoted              // rate: 'L - s*P'
	DoubleQuoted              // rate: "L - s*P"
	Literal                   // rate: |
	Folded                    // rate: >
)

var styleNames = [...]string{"plain", "single-quoted", "double-quoted", "literal", "folded"}

// String returns the style's name, such as "double-quoted".
func (s Style) String() string {
	if s >= 0 && int(s) < len(styleNames) {
		return styleNames[s]
	}
	return "Style(" + strconv.Itoa(int(s)) + ")"
}

// srcIndex converts between byte offsets in a file and positions. Lines
// are broken where the YAML parser breaks them (LF, CRLF, CR, NEL, LS, PS),
// so that line numbers agree with those the parser reports.
type srcIndex struct {
	src    []byte
	starts []int // byte offset of the start of each line
	ends   []int // byte offset of the line break ending each line but the last
	bom    int   // length of a leading UTF-8 byte order mark (0 or 3)
}

func newSrcIndex(src []byte) *srcIndex {
	ix := &srcIndex{src: src, starts: []int{0}}
	if len(src) >= 3 && src[0] == 0xEF && src[1] == 0xBB && src[2] == 0xBF {
		ix.bom = 3
	}
	for i := 0; i < len(src); {
		if n := lineBreak(src[i:]); n > 0 {
			ix.ends = append(ix.ends, i)
			i += n
			ix.starts = append(ix.starts, i)
			continue
		}
		i++
	}
	return ix
}

// lineBreak returns the length of the line break at the start of b, or 0.
func lineBreak(b []byte) int {
	switch {
	case len(b) == 0:
		return 0
	case b[0] == '\n':
		return 1
	case b[0] == '\r':
		if len(b) > 1 && b[1] == '\n' {
			return 2
		}
		return 1
	case len(b) >= 2 && b[0] == 0xC2 && b[1] == 0x85: // NEL
		return 2
	case len(b) >= 3 && b[0] == 0xE2 && b[1] == 0x80 && (b[2] == 0xA8 || b[2] == 0xA9): // LS, PS
		return 3
	}
	return 0
}

// lineEnd returns the byte offset where line (1-based) ends, before its
// line break.
func (ix *srcIndex) lineEnd(line int) int {
	if line >= 1 && line <= len(ix.ends) {
		return ix.ends[line-1]
	}
	return len(ix.src)
}

// fromYAML converts a position reported by the YAML parser (1-based line
// and 1-based column counted in characters) to a Pos with a byte column.
func (ix *srcIndex) fromYAML(line, col int) Pos {
	if line < 1 || line > len(ix.starts) || col < 1 {
		return Pos{Line: max(line, 0), Col: max(col, 0)}
	}
	start := ix.starts[line-1]
	off := start
	if line == 1 {
		off += ix.bom
	}
	end := ix.lineEnd(line)
	for i := 1; i < col && off < end; i++ {
		_, n := utf8.DecodeRune(ix.src[off:end])
		off += n
	}
	return Pos{Line: line, Col: off - start + 1}
}

// offset returns the byte offset of p, clamped to the file.
func (ix *srcIndex) offset(p Pos) int {
	if p.Line < 1 {
		return 0
	}
	if p.Line > len(ix.starts) {
		return len(ix.src)
	}
	off := ix.starts[p.Line-1] + max(p.Col, 1) - 1
	return min(off, len(ix.src))
}

// pos returns the position of byte offset off.
func (ix *srcIndex) pos(off int) Pos {
	off = min(max(off, 0), len(ix.src))
	line := sort.Search(len(ix.starts), func(i int) bool { return ix.starts[i] > off })
	return Pos{Line: line, Col: off - ix.starts[line-1] + 1}
}

// exprPos returns the file position of byte off of text, the decoded value
// of a scalar of the given style whose content begins at start. It walks
// the raw file bytes and the decoded text together: equal bytes pair up,
// escape sequences of double-quoted scalars pair with the bytes they
// decode to, and raw bytes without a counterpart (quotes, indentation, line
// breaks folded away) are skipped. The result is exact for one-line
// scalars and for literal blocks, and lands on the right line for folded
// ones. For off ≥ len(text) it returns the position just after the text.
func (ix *srcIndex) exprPos(start Pos, style Style, text string, off int) Pos {
	return ix.pos(ix.exprOffset(ix.offset(start), style, text, off))
}

func (ix *srcIndex) exprOffset(r int, style Style, text string, off int) int {
	src := ix.src
	off = max(off, 0)
	last := r
	for d := 0; d < len(text); {
		if r >= len(src) {
			return len(src)
		}
		c := src[r]
		if style == DoubleQuoted && c == '\\' {
			raw, dec := escapeLen(src[r:])
			if dec > 0 && off < d+dec {
				return r
			}
			d += dec
			r += raw
			if dec > 0 {
				last = r
			}
			continue
		}
		if c == text[d] {
			if d == off {
				return r
			}
			d++
			r++
			last = r
			continue
		}
		if isBlank(c) || !isBlank(text[d]) {
			r++
			continue
		}
		// Decoded white space where the file has none: a folded line break.
		if d == off {
			return r
		}
		d++
	}
	return last
}

func isBlank(c byte) bool { return c == ' ' || c == '\t' || c == '\r' || c == '\n' }

// escapeLen returns the number of raw bytes of the double-quoted escape
// sequence at the start of b (which begins with a backslash) and the number
// of bytes it decodes to (YAML 1.2 §5.7).
func escapeLen(b []byte) (raw, dec int) {
	if len(b) < 2 {
		return len(b), 0
	}
	hex := 0
	switch b[1] {
	case '\n':
		return 2, 0
	case '\r':
		if len(b) > 2 && b[2] == '\n' {
			return 3, 0
		}
		return 2, 0
	case 'N', '_': // U+0085, U+00A0
		return 2, 2
	case 'L', 'P': // U+2028, U+2029
		return 2, 3
	case 'x':
		hex = 2
	case 'u':
		hex = 4
	case 'U':
		hex = 8
	default:
		return 2, 1
	}
	raw = min(2+hex, len(b))
	v, err := strconv.ParseUint(string(b[2:raw]), 16, 32)
	if err != nil {
		return raw, 1
	}
	n := utf8.RuneLen(rune(v))
	if n < 0 {
		n = utf8.RuneLen(utf8.RuneError)
	}
	return raw, n
}
