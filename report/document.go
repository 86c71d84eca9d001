package report

import (
	"fmt"
	"html"
	"io"
	"strings"
)

// A document is the content of a report, independent of its output
// format: the Markdown and the HTML writers render the same blocks, so the
// two reports carry the same content.
type document struct {
	title   string
	blocks  []block
	figures []*figure
}

// span is a run of inline text.
type span struct {
	kind spanKind
	text string
}

type spanKind int

const (
	plainSpan spanKind = iota
	codeSpan
	strongSpan
)

func tx(s string) span { return span{plainSpan, s} }
func cd(s string) span { return span{codeSpan, s} }
func st(s string) span { return span{strongSpan, s} }

type block interface{ isBlock() }

type heading struct {
	level int
	text  string
}

type paragraph struct{ spans []span }

type bullets struct{ items [][]span }

type table struct {
	head  []string
	right []bool // right-aligned (numeric) columns
	rows  [][]string
}

// rowCell is column i of row r, empty where the row is short.
func rowCell(r []string, i int) string {
	if i < len(r) {
		return r[i]
	}
	return ""
}

// isRight reports whether column i is right-aligned.
func (t table) isRight(i int) bool { return i < len(t.right) && t.right[i] }

type codeBlock struct {
	lang, text string
}

// notice is the caution box.
type notice struct{ lead, text string }

// figure is a plot with its caption; draw makes it.
type figure struct {
	name    string // file stem, e.g. "rate-band"
	number  int
	caption string
	draw    func() (*chart, error)
}

func (heading) isBlock()   {}
func (paragraph) isBlock() {}
func (bullets) isBlock()   {}
func (table) isBlock()     {}
func (codeBlock) isBlock() {}
func (notice) isBlock()    {}
func (*figure) isBlock()   {}

func (d *document) h2(text string)  { d.blocks = append(d.blocks, heading{2, text}) }
func (d *document) h3(text string)  { d.blocks = append(d.blocks, heading{3, text}) }
func (d *document) p(spans ...span) { d.blocks = append(d.blocks, paragraph{spans}) }
func (d *document) pf(f string, a ...any) {
	d.p(tx(fmt.Sprintf(f, a...)))
}
func (d *document) list(items ...[]span) {
	if len(items) > 0 {
		d.blocks = append(d.blocks, bullets{items})
	}
}
func (d *document) code(lang, text string) { d.blocks = append(d.blocks, codeBlock{lang, text}) }
func (d *document) caution() {
	text := strings.TrimPrefix(Caution, "Caution: ")
	d.blocks = append(d.blocks, notice{"Caution.", strings.ToUpper(text[:1]) + text[1:]})
}
func (d *document) table(t table) { d.blocks = append(d.blocks, t) }
func (d *document) figure(name, caption string, mk func() (*chart, error)) {
	f := &figure{name: name, number: len(d.figures) + 1, caption: caption, draw: mk}
	d.figures = append(d.figures, f)
	d.blocks = append(d.blocks, f)
}

// writeMarkdown renders the document as Markdown that reads on any viewer:
// ATX headings, pipe tables, fenced code, and images linked by link(name)
// ("" when the figure has no file).
func (d *document) writeMarkdown(w io.Writer, link func(name string) string) error {
	var b strings.Builder
	b.WriteString("# " + mdEscape(d.title) + "\n")
	for _, bl := range d.blocks {
		b.WriteString("\n")
		switch v := bl.(type) {
		case heading:
			b.WriteString(strings.Repeat("#", v.level) + " " + mdEscape(v.text) + "\n")
		case paragraph:
			b.WriteString(mdLineStart(mdSpans(v.spans)) + "\n")
		case bullets:
			for _, it := range v.items {
				b.WriteString("- " + mdSpans(it) + "\n")
			}
		case table:
			mdTable(&b, v)
		case codeBlock:
			fence := "```"
			for strings.Contains(v.text, fence) {
				fence += "`"
			}
			b.WriteString(fence + v.lang + "\n" + strings.TrimRight(v.text, "\n") + "\n" + fence + "\n")
		case notice:
			b.WriteString("> **" + mdEscape(v.lead) + "** " + mdEscape(v.text) + "\n")
		case *figure:
			cap := fmt.Sprintf("Figure %d. %s", v.number, v.caption)
			if l := link(v.name); l != "" {
				fmt.Fprintf(&b, "![Figure %d](%s)\n\n", v.number, mdLink(l))
			}
			b.WriteString("*" + mdEscape(cap) + "*\n")
		}
	}
	_, err := io.WriteString(w, b.String())
	return err
}

func mdTable(b *strings.Builder, t table) {
	cell := func(s string) string {
		s = strings.ReplaceAll(s, "\n", " ")
		if s == "" {
			return " "
		}
		return mdEscape(s)
	}
	b.WriteString("|")
	for _, h := range t.head {
		b.WriteString(" " + cell(h) + " |")
	}
	b.WriteString("\n|")
	for i := range t.head {
		if t.isRight(i) {
			b.WriteString(" ---: |")
		} else {
			b.WriteString(" --- |")
		}
	}
	b.WriteString("\n")
	for _, r := range t.rows {
		b.WriteString("|")
		for i := range t.head {
			b.WriteString(" " + cell(rowCell(r, i)) + " |")
		}
		b.WriteString("\n")
	}
}

var mdEscaper = strings.NewReplacer(
	`\`, `\\`, "`", "\\`", "*", `\*`, "_", `\_`, "[", `\[`, "]", `\]`,
	"<", `\<`, ">", `\>`, "|", `\|`,
)

// mdEscape escapes the characters that Markdown would read as markup.
func mdEscape(s string) string { return mdEscaper.Replace(s) }

// mdLineStart escapes what would start a heading, list or quote at the
// start of a paragraph.
func mdLineStart(s string) string {
	if s == "" {
		return s
	}
	switch s[0] {
	case '#', '-', '+', '=':
		return `\` + s
	}
	i := 0
	for i < len(s) && s[i] >= '0' && s[i] <= '9' {
		i++
	}
	if i > 0 && i < len(s) && (s[i] == '.' || s[i] == ')') {
		return s[:i] + `\` + s[i:]
	}
	return s
}

func mdSpans(spans []span) string {
	var b strings.Builder
	for _, s := range spans {
		switch s.kind {
		case codeSpan:
			t := strings.ReplaceAll(s.text, "\n", " ")
			fence := "`"
			for strings.Contains(t, fence) {
				fence += "`"
			}
			if strings.HasPrefix(t, "`") || strings.HasSuffix(t, "`") {
				t = " " + t + " "
			}
			b.WriteString(fence + t + fence)
		case strongSpan:
			b.WriteString("**" + mdEscape(s.text) + "**")
		default:
			b.WriteString(mdEscape(s.text))
		}
	}
	return b.String()
}

// mdLink makes a relative path safe inside a Markdown link.
func mdLink(p string) string {
	return strings.NewReplacer(" ", "%20", "(", "%28", ")", "%29").Replace(p)
}

// writeHTML renders the document as one self-contained HTML page: inline
// CSS, the plots as inline SVG (svg(name), "" when a figure has none), no
// script and no reference to anything outside the file.
func (d *document) writeHTML(w io.Writer, svg func(f *figure) string) error {
	var b strings.Builder
	b.WriteString("<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n")
	b.WriteString("<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n")
	b.WriteString("<meta name=\"generator\" content=\"holdfast\">\n")
	b.WriteString("<title>" + html.EscapeString(d.title) + "</title>\n<style>\n" + pageCSS + "</style>\n</head>\n<body>\n<main>\n")
	b.WriteString("<h1>" + html.EscapeString(d.title) + "</h1>\n")
	for _, bl := range d.blocks {
		switch v := bl.(type) {
		case heading:
			fmt.Fprintf(&b, "<h%d>%s</h%d>\n", v.level, html.EscapeString(v.text), v.level)
		case paragraph:
			b.WriteString("<p>" + htmlSpans(v.spans) + "</p>\n")
		case bullets:
			b.WriteString("<ul>\n")
			for _, it := range v.items {
				b.WriteString("<li>" + htmlSpans(it) + "</li>\n")
			}
			b.WriteString("</ul>\n")
		case table:
			htmlTable(&b, v)
		case codeBlock:
			cls := ""
			if v.lang != "" {
				cls = ` class="lang-` + html.EscapeString(v.lang) + `"`
			}
			b.WriteString("<pre><code" + cls + ">" + html.EscapeString(strings.TrimRight(v.text, "\n")) + "</code></pre>\n")
		case notice:
			b.WriteString("<aside class=\"caution\"><strong>" + html.EscapeString(v.lead) + "</strong> " + html.EscapeString(v.text) + "</aside>\n")
		case *figure:
			b.WriteString("<figure>\n")
			if s := svg(v); s != "" {
				b.WriteString(s + "\n")
			}
			fmt.Fprintf(&b, "<figcaption>Figure %d. %s</figcaption>\n</figure>\n", v.number, html.EscapeString(v.caption))
		}
	}
	b.WriteString("</main>\n</body>\n</html>\n")
	_, err := io.WriteString(w, b.String())
	return err
}

func htmlSpans(spans []span) string {
	var b strings.Builder
	for _, s := range spans {
		t := html.EscapeString(s.text)
		switch s.kind {
		case codeSpan:
			b.WriteString("<code>" + t + "</code>")
		case strongSpan:
			b.WriteString("<strong>" + t + "</strong>")
		default:
			b.WriteString(t)
		}
	}
	return b.String()
}

func htmlTable(b *strings.Builder, t table) {
	cls := func(i int) string {
		if t.isRight(i) {
			return ` class="num"`
		}
		return ""
	}
	b.WriteString("<table>\n<thead><tr>")
	for i, h := range t.head {
		b.WriteString("<th" + cls(i) + ">" + html.EscapeString(h) + "</th>")
	}
	b.WriteString("</tr></thead>\n<tbody>\n")
	for _, r := range t.rows {
		b.WriteString("<tr>")
		for i := range t.head {
			b.WriteString("<td" + cls(i) + ">" + html.EscapeString(rowCell(r, i)) + "</td>")
		}
		b.WriteString("</tr>\n")
	}
	b.WriteString("</tbody>\n</table>\n")
}

// pageCSS is the report's own style: a paper-white column on a warm grey
// ground, serif body text with sans-serif headings and tables, teal
// accents, tabular figures in numeric columns, and print rules that keep
// tables and figures whole. Only locally installed fonts are named.
const pageCSS = `:root{--ink:#22313f;--muted:#5b6b78;--rule:#d9d4c7;--accent:#0e6e73;--warn:#8a3b12}
*{box-sizing:border-box}
body{margin:0;background:#f3f1ec;color:var(--ink);font:16px/1.55 Georgia,"Times New Roman",serif}
main{max-width:54rem;margin:0 auto;padding:2.5rem 2.2rem 4rem;background:#fff;min-height:100vh}
h1,h2,h3,table,figcaption,.caution{font-family:"Liberation Sans","Helvetica Neue",Arial,sans-serif}
h1{font-size:1.65rem;line-height:1.25;margin:0 0 .8rem;padding-bottom:.45rem;border-bottom:3px solid var(--accent)}
h2{font-size:1.2rem;margin:2.3rem 0 .6rem;color:var(--accent);border-bottom:1px solid var(--rule);padding-bottom:.2rem}
h3{font-size:1rem;margin:1.6rem 0 .4rem}
p,ul{margin:.55rem 0}
table{border-collapse:collapse;margin:.8rem 0 1.3rem;font-size:13.5px;line-height:1.4;width:100%}
th{text-align:left;border-bottom:2px solid var(--ink);padding:.3rem .5rem;vertical-align:bottom}
td{border-bottom:1px solid var(--rule);padding:.28rem .5rem;vertical-align:top}
.num{text-align:right;font-variant-numeric:tabular-nums;white-space:nowrap}
tbody tr:nth-child(even){background:#faf9f6}
.caution{border-left:5px solid var(--warn);background:#fbf1e8;padding:.75rem 1rem;margin:1.1rem 0;font-size:14.5px}
code{font-family:"Liberation Mono",Menlo,Consolas,monospace;font-size:.9em;background:#f3f1ec;padding:0 .2em}
pre{background:#f7f5f0;border:1px solid var(--rule);padding:.75rem;overflow-x:auto;white-space:pre-wrap;overflow-wrap:anywhere}
pre code{background:none;padding:0;font-size:12.5px;line-height:1.45}
figure{margin:1.3rem 0}
figure svg{display:block;width:100%;height:auto}
figcaption{font-size:13px;color:var(--muted);margin-top:.35rem}
@media print{
body{background:#fff;font-size:10.5pt}
main{max-width:none;padding:0;min-height:0}
h2,h3{break-after:avoid}
table,pre,figure,.caution{break-inside:avoid}
tbody tr:nth-child(even){background:none}
@page{margin:16mm 15mm}
}
`

// titledDocument starts a document with the given title, or fallback when
// the title is empty.
func titledDocument(title, fallback string) *document {
	if title == "" {
		title = fallback
	}
	return &document{title: title}
}
