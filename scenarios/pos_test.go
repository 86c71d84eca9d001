package scenarios

import (
	"testing"
)

func scenarioWithRate(rateLines string) string {
	return "holdfast: 1\ntitle: t\nstate: {symbol: x, domain: [0, 1]}\n" + rateLines +
		"parameters:\n  r: {value: 1}\n"
}

// byteAt returns the byte of src at position p.
func byteAt(src []byte, p Pos) (byte, bool) {
	ix := newSrcIndex(src)
	if p.Line < 1 || p.Line > len(ix.starts) || p.Col < 1 {
		return 0, false
	}
	off := ix.starts[p.Line-1] + p.Col - 1
	if off >= len(src) {
		return 0, false
	}
	return src[off], true
}

// TestRateOffsetPos checks that every non-blank byte of the decoded rate
// maps to the same byte in the file, for each way of writing a scalar.
func TestRateOffsetPos(t *testing.T) {
	cases := []struct {
		name  string
		lines string
		style Style
		start Pos
	}{
		{"plain", "rate: r*x*(1 - x)\n", Plain, Pos{4, 7}},
		{"double", "rate: \"r*x*(1 - x)\"\n", DoubleQuoted, Pos{4, 8}},
		{"single", "rate: 'r*x*(1 - x)'\n", SingleQuoted, Pos{4, 8}},
		{"single with quote", "rate: 'r*x*(1 - x) + ''s'''\n", SingleQuoted, Pos{4, 8}},
		{"literal", "rate: |\n  r*x*(1 - x)\n    - 2*x\n", Literal, Pos{5, 3}},
		{"literal after blank line", "rate: |-\n\n  r*x*(1 - x)\n", Literal, Pos{5, 1}}, // the text starts with the blank line's "\n"
		{"folded", "rate: >\n  r*x*(1 - x)\n  - 2*x\n", Folded, Pos{5, 3}},
		{"plain multiline", "rate: r*x*(1 - x)\n  - 2*x\n", Plain, Pos{4, 7}},
		{"double multiline", "rate: \"r*x*(1 - x)\n  - 2*x\"\n", DoubleQuoted, Pos{4, 8}},
		{"multibyte before", "rate: {a: \"é\"}\n", DoubleQuoted, Pos{}},
		{"flow mapping", "define: {u: \"x + 1\"}\nrate: \"u\"\n", DoubleQuoted, Pos{5, 8}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			src := []byte(scenarioWithRate(c.lines))
			s, err := Parse("r.yaml", src, nil)
			if c.start == (Pos{}) {
				if err == nil {
					t.Fatal("a mapping was accepted as the rate")
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			if s.RateStyle != c.style || s.RatePos != c.start {
				t.Errorf("style %v at %v, want %v at %v", s.RateStyle, s.RatePos, c.style, c.start)
			}
			for off := 0; off < len(s.Rate); off++ {
				ch := s.Rate[off]
				if isBlank(ch) {
					continue
				}
				p := s.RateOffsetPos(off)
				if got, ok := byteAt(src, p); !ok || got != ch {
					t.Errorf("offset %d (%q) maps to %v holding %q", off, ch, p, got)
				}
			}
			// Just after the expression.
			end := s.RateOffsetPos(len(s.Rate))
			if !end.IsValid() {
				t.Errorf("end position %v", end)
			}
		})
	}
}

// TestEscapes checks double-quoted escape sequences, which decode to other
// bytes than the file holds (YAML 1.2 §5.7).
func TestEscapes(t *testing.T) {
	src := []byte(scenarioWithRate("rate: \"a\\tb\\x41c\\u00e9d\\\n  e\"\n"))
	s, err := Parse("r.yaml", src, nil)
	if err != nil {
		t.Fatal(err)
	}
	// An escaped line break joins the lines without a space.
	if s.Rate != "a\tbAcéde" {
		t.Fatalf("rate %q", s.Rate)
	}
	// rate: "a\tb\x41c\u00e9d\
	// 1234567890123456789012345
	want := map[int]Pos{
		0: {4, 8},  // a
		1: {4, 9},  // \t
		2: {4, 11}, // b
		3: {4, 12}, // \x41
		4: {4, 16}, // c
		5: {4, 17}, // \u00e9, first byte
		6: {4, 17}, // \u00e9, second byte
		7: {4, 23}, // d
		8: {5, 3},  // e
	}
	for off, p := range want {
		if got := s.RateOffsetPos(off); got != p {
			t.Errorf("offset %d: %v, want %v", off, got, p)
		}
	}
	if got := s.DefineOffsetPos(3, 0); got != (Pos{}) {
		t.Errorf("DefineOffsetPos out of range = %v", got)
	}
}

func TestEscapeLen(t *testing.T) {
	for _, c := range []struct {
		in       string
		raw, dec int
	}{
		{`\n`, 2, 1}, {`\x41`, 4, 1}, {`\xe9`, 4, 2}, {`\u00e9`, 6, 2}, {`\u20ac`, 6, 3},
		{`\U0001F600`, 10, 4}, {`\N`, 2, 2}, {`\L`, 2, 3}, {"\\\n", 2, 0}, {"\\\r\n", 3, 0},
		{`\`, 1, 0}, {`\x4`, 3, 1}, {`\uD800`, 6, 3},
	} {
		raw, dec := escapeLen([]byte(c.in))
		if raw != c.raw || dec != c.dec {
			t.Errorf("escapeLen(%q) = %d, %d, want %d, %d", c.in, raw, dec, c.raw, c.dec)
		}
	}
}

func TestSrcIndex(t *testing.T) {
	src := []byte("\uFEFFab\r\ncé\rd\u2028e\n")
	ix := newSrcIndex(src)
	if len(ix.starts) != 5 {
		t.Fatalf("%d lines, want 5", len(ix.starts))
	}
	for _, c := range []struct {
		line, col int
		want      Pos
	}{
		{1, 1, Pos{1, 4}}, // after the byte order mark
		{1, 2, Pos{1, 5}},
		{2, 3, Pos{2, 4}}, // é is two bytes
		{3, 1, Pos{3, 1}},
		{4, 1, Pos{4, 1}},
		{9, 1, Pos{9, 1}}, // out of range: unchanged
		{2, 99, Pos{2, 4}},
	} {
		if got := ix.fromYAML(c.line, c.col); got != c.want {
			t.Errorf("fromYAML(%d, %d) = %v, want %v", c.line, c.col, got, c.want)
		}
	}
	if p := ix.pos(len(src) + 10); p.Line != 5 {
		t.Errorf("pos past the end = %v", p)
	}
	if s := Style(9).String(); s != "Style(9)" {
		t.Errorf("Style(9) = %s", s)
	}
}
