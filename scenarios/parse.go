package scenarios

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"unicode/utf8"

	"go.yaml.in/yaml/v3"

	"holdfast/sample"
)

// Version is the scenario format version this package reads.
const Version = 1

// MaxFileSize is the largest scenario file, and the largest CSV file a
// scenario may name, in bytes (1 MiB).
const MaxFileSize = 1 << 20

// MaxCorrelations is the most correlations a scenario may list. It bounds
// the work of checking them (a Cholesky factorisation over the correlated
// parameters) far above any real need.
const MaxCorrelations = 200

// MaxParams and MaxDefines are the most parameters and named
// sub-expressions a scenario may give: far above any real need, they bound
// the per-draw work and memory a file can ask for.
const (
	MaxParams  = 500
	MaxDefines = 500
)

// DemoPrefix marks an embedded demo in a path given to Load: "demo:lake".
const DemoPrefix = "demo:"

// Load reads and parses the scenario file at path. A path that starts with
// DemoPrefix ("demo:lake") names an embedded demo instead (see LoadDemo);
// to read a file whose name starts that way, write "./demo:...". CSV files
// named by empirical parameters are read from the scenario's folder through
// an os.Root, so neither ".." nor a symbolic link can leave it.
//
// Problems with the scenario's content are returned as an ErrorList; a file
// that cannot be opened or read gives the *fs.PathError (or other I/O error)
// from the operating system.
func Load(path string) (*Scenario, error) {
	if name, ok := strings.CutPrefix(path, DemoPrefix); ok {
		return LoadDemo(name)
	}
	// A pipe or device would block or never end: only regular files.
	if fi, err := os.Stat(path); err == nil && !fi.Mode().IsRegular() {
		return nil, ErrorList{{File: path, Msg: notRegular(fi.Mode())}}
	}
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	data, err := io.ReadAll(io.LimitReader(f, MaxFileSize+1))
	if err != nil {
		return nil, fmt.Errorf("reading scenario: %w", err)
	}
	if len(data) > MaxFileSize {
		return nil, ErrorList{{File: path, Msg: tooBig("scenario file")}}
	}
	var dir fs.FS
	if root, err := os.OpenRoot(filepath.Dir(path)); err == nil {
		defer root.Close()
		dir = root.FS()
	}
	return Parse(path, data, dir)
}

// notRegular says what a path that is not a regular file is.
func notRegular(m fs.FileMode) string {
	switch {
	case m.IsDir():
		return "is a folder, not a scenario file"
	case m&fs.ModeNamedPipe != 0:
		return "is a named pipe, not a scenario file (give a regular file)"
	}
	return "is not a regular file (a device or socket?); give a regular scenario file"
}

func tooBig(what string) string {
	return fmt.Sprintf("%s is larger than the %d MiB limit", what, MaxFileSize>>20)
}

// Parse parses and validates a scenario held in data; file names it in
// error messages and in Scenario.File. CSV files named by empirical
// parameters are opened in dir, which is normally the scenario's folder; a
// nil dir allows none.
//
// Every problem is reported as an *Error with the file, line, column and
// field path, collected into a sorted ErrorList (at most MaxErrors). Parse
// never panics, whatever data holds.
func Parse(file string, data []byte, dir fs.FS) (*Scenario, error) {
	p := &parser{file: file, dir: dir, ix: newSrcIndex(data)}
	p.errs.file = file
	s := p.parse(data)
	if err := p.errs.err(); err != nil {
		return nil, err
	}
	s.Attached = p.attached
	return s, nil
}

// parser holds the state of one Parse call.
type parser struct {
	file     string
	dir      fs.FS
	ix       *srcIndex
	errs     errorSink
	attached map[string][]byte // CSV files read, by clean name
}

func (p *parser) errorf(n *yaml.Node, field, format string, args ...any) {
	p.errs.add(p.at(n), field, format, args...)
}

// at returns the position of node n.
func (p *parser) at(n *yaml.Node) Pos {
	if n == nil {
		return Pos{}
	}
	return p.ix.fromYAML(n.Line, n.Column)
}

// kv is one key: value pair of a mapping.
type kv struct {
	name     string
	key, val *yaml.Node
}

// topFields are the top-level fields, in the order a scenario gives them.
var topFields = []string{"holdfast", "title", "summary", "state", "rate", "define", "parameters", "correlations"}

var stateFields = []string{"symbol", "unit", "domain", "current"}

func (p *parser) parse(data []byte) *Scenario {
	if !p.checkText(data) {
		return nil
	}
	root := p.decodeYAML(data)
	if root == nil {
		return nil
	}
	if root.Kind != yaml.MappingNode {
		p.errorf(root, "", "a scenario is a mapping of fields (%s), got %s",
			strings.Join(topFields, ", "), describe(root))
		return nil
	}
	top := p.pairs(root, "")
	fields := map[string]kv{}
	for _, f := range top {
		fields[f.name] = f
	}
	s := &Scenario{File: p.file, Source: data}
	// The version comes first: a missing or newer one means the rest of
	// the file is not ours to judge, so its error is reported alone.
	earlier := p.errs.list
	p.errs.list = nil
	if !p.version(root, fields, s) {
		return nil
	}
	p.errs.list = earlier
	for _, f := range top {
		if !containsStr(topFields, f.name) {
			p.unknownField(f, "", topFields, "")
		}
	}
	s.Title, _ = p.requiredText(root, fields, "title", "a one-line title")
	if f, ok := fields["summary"]; ok {
		s.Summary, _ = p.text(f.val, "summary")
	}
	p.state(root, fields, s)
	if f, ok := fields["rate"]; ok {
		if r, ok := p.text(f.val, "rate"); ok {
			if strings.TrimSpace(r) == "" {
				p.errorf(f.val, "rate", "must not be blank")
			}
			s.Rate, s.RatePos, s.RateStyle = r, p.exprStart(f.val, r), styleOf(f.val)
		}
	} else {
		p.errorf(root, "rate", "missing: the rate law, such as rate: \"r*x*(1 - x/K)\"")
	}
	if f, ok := fields["define"]; ok {
		p.defines(f.val, s)
	}
	if f, ok := fields["parameters"]; ok {
		p.params(f.val, s)
	}
	p.checkNames(s)
	if f, ok := fields["correlations"]; ok {
		p.correlations(f.val, s)
		if len(p.errs.list) == 0 {
			p.consistent(f.val, s)
		}
	}
	return s
}

// checkText rejects data that is too large, empty, or not UTF-8 text.
func (p *parser) checkText(data []byte) bool {
	if len(data) > MaxFileSize {
		p.errs.add(Pos{}, "", "%s", tooBig("scenario file"))
		return false
	}
	if len(bytes.TrimSpace(data)) == 0 {
		p.errs.add(Pos{}, "", "file is empty; a scenario starts with \"holdfast: 1\"")
		return false
	}
	if i := bytes.IndexByte(data, 0); i >= 0 {
		p.errs.add(p.ix.pos(i), "", "file is binary, not text (NUL byte); a scenario is UTF-8 YAML text")
		return false
	}
	if !utf8.Valid(data) {
		i := 0
		for i < len(data) {
			r, n := utf8.DecodeRune(data[i:])
			if r == utf8.RuneError && n == 1 {
				break
			}
			i += n
		}
		p.errs.add(p.ix.pos(i), "", "file is not valid UTF-8 text; a scenario is UTF-8 YAML text")
		return false
	}
	return true
}

var yamlLineRE = regexp.MustCompile(`^yaml: line (\d+): (.*)$`)

// parserProblems are the messages of the YAML package's parser stage
// (parserc.go), whose line numbers count from 0; those of its scanner stage
// count from 1.
var parserProblems = []string{
	"did not find expected <stream-start>",
	"did not find expected <document start>",
	"did not find expected ',' or ']'",
	"did not find expected ',' or '}'",
	"did not find expected '-' indicator",
	"did not find expected key",
	"did not find expected node content",
	"found duplicate %YAML directive",
	"found duplicate %TAG directive",
	"found incompatible YAML document",
	"found undefined tag handle",
}

// decodeYAML parses data as exactly one YAML document and returns its root
// node, or nil after reporting why it cannot.
func (p *parser) decodeYAML(data []byte) (root *yaml.Node) {
	doc, extra, err := decodeDocs(data)
	switch {
	case err == io.EOF:
		p.errs.add(Pos{}, "", "file holds no YAML content (only comments); a scenario starts with \"holdfast: 1\"")
		return nil
	case err != nil:
		msg := err.Error()
		var pos Pos
		if m := yamlLineRE.FindStringSubmatch(msg); m != nil {
			line, _ := strconv.Atoi(m[1])
			pos, msg = Pos{Line: line}, m[2]
		} else {
			msg = strings.TrimPrefix(msg, "yaml: ")
		}
		if containsStr(parserProblems, msg) {
			// The YAML package reports the lines of parser (as opposed to
			// scanner) errors counted from 0, and leaves out line 0.
			pos.Line++
		}
		if pos.Line >= 1 && pos.Line <= len(p.ix.starts) && bytes.HasPrefix(data[p.ix.starts[pos.Line-1]:], []byte("\t")) {
			msg += " (YAML indents with spaces, not tabs)"
		}
		p.errs.add(pos, "", "YAML syntax: %s", msg)
		return nil
	case extra != nil:
		p.errorf(extra, "", "a second YAML document; a scenario file holds one document (remove the extra ---)")
		return nil
	}
	if aliases := p.findAliases(doc, 0); aliases {
		return nil
	}
	root = doc
	if root.Kind == yaml.DocumentNode {
		if len(root.Content) == 0 {
			p.errorf(root, "", "file holds no YAML content")
			return nil
		}
		root = root.Content[0]
	}
	return root
}

// decodeDocs decodes the first YAML document of data into a node and
// reports a second one if present. A panic inside the YAML package is
// turned into an error.
func decodeDocs(data []byte) (doc, extra *yaml.Node, err error) {
	defer func() {
		if r := recover(); r != nil {
			doc, extra, err = nil, nil, fmt.Errorf("yaml: the YAML parser failed on this input (%v)", r)
		}
	}()
	dec := yaml.NewDecoder(bytes.NewReader(data))
	doc = new(yaml.Node)
	if err := dec.Decode(doc); err != nil {
		return nil, nil, err
	}
	next := new(yaml.Node)
	switch err := dec.Decode(next); {
	case err == io.EOF:
		return doc, nil, nil
	case err != nil:
		return nil, nil, err
	}
	return doc, next, nil
}

// findAliases reports the first alias in the tree. Aliases are refused: a
// scenario has no use for them, and refusing them rules out alias
// expansion bombs.
func (p *parser) findAliases(n *yaml.Node, depth int) bool {
	if n == nil {
		return false
	}
	if n.Kind == yaml.AliasNode {
		p.errorf(n, "", "YAML aliases (*%s) are not allowed in a scenario; write the value out", n.Value)
		return true
	}
	for _, c := range n.Content {
		if p.findAliases(c, depth+1) {
			return true
		}
	}
	return false
}

// pairs returns the key: value pairs of mapping n, reporting keys that are
// not plain names and keys given twice (the first one wins).
func (p *parser) pairs(n *yaml.Node, path string) []kv {
	var out []kv
	seen := map[string]*yaml.Node{}
	for i := 0; i+1 < len(n.Content); i += 2 {
		k, v := n.Content[i], n.Content[i+1]
		if k.Kind != yaml.ScalarNode {
			p.errorf(k, path, "keys must be names, got %s", describe(k))
			continue
		}
		if k.ShortTag() == "!!merge" {
			p.errorf(k, join(path, k.Value), "YAML merge keys (<<) are not allowed in a scenario")
			continue
		}
		if first, dup := seen[k.Value]; dup {
			fp := p.at(first)
			p.errorf(k, join(path, k.Value), "duplicate key, first given at line %d", fp.Line)
			continue
		}
		seen[k.Value] = k
		out = append(out, kv{name: k.Value, key: k, val: v})
	}
	return out
}

// unknownField reports a key that is not one of known, with a suggestion.
// what, when not empty, says whose fields known lists.
func (p *parser) unknownField(f kv, path string, known []string, what string) {
	msg := "unknown field" + didYouMean(f.name, known)
	if !strings.Contains(msg, "did you mean") {
		if what == "" {
			what = "known fields"
		}
		msg += fmt.Sprintf(" (%s: %s)", what, strings.Join(known, ", "))
	}
	p.errorf(f.key, join(path, f.name), "%s", msg)
}

// join builds a field path.
func join(path, name string) string {
	if path == "" {
		return name
	}
	return path + "." + name
}

func index(path string, i int) string { return path + "[" + strconv.Itoa(i) + "]" }

func containsStr(list []string, s string) bool {
	for _, x := range list {
		if x == s {
			return true
		}
	}
	return false
}

// version checks the holdfast field. It returns false after reporting an
// error that should end the parse.
func (p *parser) version(root *yaml.Node, fields map[string]kv, s *Scenario) bool {
	f, ok := fields["holdfast"]
	if !ok {
		p.errorf(root, "holdfast", "missing format version: a scenario starts with \"holdfast: %d\"", Version)
		return false
	}
	if f.val.Kind != yaml.ScalarNode || (f.val.ShortTag() != "!!int" && f.val.ShortTag() != "!!float") {
		p.errorf(f.val, "holdfast", "expected the format version number %d, got %s", Version, describe(f.val))
		return false
	}
	var v float64
	if err := f.val.Decode(&v); err != nil || v != math.Trunc(v) || v < 1 || v > 1e6 {
		p.errorf(f.val, "holdfast", "unknown format version %s (this program reads version %d)", f.val.Value, Version)
		return false
	}
	if v > Version {
		p.errorf(f.val, "holdfast", "format version %d is newer than this program reads (version %d); update holdfast", int(v), Version)
		return false
	}
	s.Version = int(v)
	return true
}

// describe names the kind of a node's value for "expected X, got Y".
func describe(n *yaml.Node) string {
	switch n.Kind {
	case yaml.SequenceNode:
		return "a list"
	case yaml.MappingNode:
		return "a mapping"
	case yaml.AliasNode:
		return "an alias"
	case yaml.DocumentNode:
		return "a document"
	case yaml.ScalarNode:
		switch n.ShortTag() {
		case "!!null":
			return "nothing (an empty value)"
		case "!!str":
			return "text " + quoteShort(n.Value)
		case "!!bool":
			return "the boolean " + n.Value
		case "!!int", "!!float":
			return "the number " + n.Value
		}
		return "a value tagged " + n.ShortTag()
	}
	return "an unexpected YAML node"
}

// text decodes a scalar as text. Numbers and booleans are taken as written;
// an empty value, a list or a mapping is an error.
func (p *parser) text(n *yaml.Node, path string) (string, bool) {
	if n.Kind == yaml.ScalarNode {
		switch n.ShortTag() {
		case "!!str", "!!int", "!!float", "!!bool", "!!timestamp":
			return n.Value, true
		}
	}
	p.errorf(n, path, "expected text, got %s", describe(n))
	return "", false
}

// requiredText decodes a required, non-blank text field of mapping m.
func (p *parser) requiredText(m *yaml.Node, fields map[string]kv, name, what string) (string, bool) {
	f, ok := fields[name]
	if !ok {
		p.errorf(m, name, "missing: %s", what)
		return "", false
	}
	t, ok := p.text(f.val, name)
	if ok && strings.TrimSpace(t) == "" {
		p.errorf(f.val, name, "must not be blank")
		return "", false
	}
	return t, ok
}

// number decodes a finite number.
func (p *parser) number(n *yaml.Node, path string) (float64, bool) {
	if n.Kind != yaml.ScalarNode || (n.ShortTag() != "!!int" && n.ShortTag() != "!!float") {
		p.errorf(n, path, "expected a number, got %s", describe(n))
		return 0, false
	}
	var v float64
	if err := n.Decode(&v); err != nil {
		p.errorf(n, path, "expected a number, got %s", quoteShort(n.Value))
		return 0, false
	}
	if math.IsNaN(v) || math.IsInf(v, 0) {
		p.errorf(n, path, "must be a finite number, got %s", n.Value)
		return 0, false
	}
	return v, true
}

// quietNumber decodes a finite number without reporting errors.
func (p *parser) quietNumber(n *yaml.Node) (float64, bool) {
	if n.Kind != yaml.ScalarNode || (n.ShortTag() != "!!int" && n.ShortTag() != "!!float") {
		return 0, false
	}
	var v float64
	if err := n.Decode(&v); err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, false
	}
	return v, true
}

// numbers decodes a list of finite numbers.
func (p *parser) numbers(n *yaml.Node, path string) ([]float64, bool) {
	if n.Kind != yaml.SequenceNode {
		p.errorf(n, path, "expected a list of numbers, got %s", describe(n))
		return nil, false
	}
	out := make([]float64, len(n.Content))
	ok := true
	for i, c := range n.Content {
		v, good := p.number(c, index(path, i))
		out[i] = v
		ok = ok && good
	}
	return out, ok
}

// mapping checks that n is a mapping and returns its pairs.
func (p *parser) mapping(n *yaml.Node, path, example string) ([]kv, bool) {
	if n.Kind != yaml.MappingNode {
		p.errorf(n, path, "expected a mapping%s, got %s", example, describe(n))
		return nil, false
	}
	return p.pairs(n, path), true
}

// styleOf returns the Style of a scalar node.
func styleOf(n *yaml.Node) Style {
	switch {
	case n.Style&yaml.DoubleQuotedStyle != 0:
		return DoubleQuoted
	case n.Style&yaml.SingleQuotedStyle != 0:
		return SingleQuoted
	case n.Style&yaml.LiteralStyle != 0:
		return Literal
	case n.Style&yaml.FoldedStyle != 0:
		return Folded
	}
	return Plain
}

// exprStart returns the position of the first byte of the decoded value
// of scalar n in the file.
func (p *parser) exprStart(n *yaml.Node, text string) Pos {
	start := p.at(n)
	off := p.ix.offset(start)
	switch styleOf(n) {
	case SingleQuoted, DoubleQuoted:
		off++
	case Literal, Folded:
		if start.Line < len(p.ix.starts) {
			off = p.ix.starts[start.Line]
		} else {
			off = len(p.ix.src)
		}
	}
	return p.ix.pos(p.ix.exprOffset(off, styleOf(n), text, 0))
}

// state decodes the state mapping.
func (p *parser) state(root *yaml.Node, fields map[string]kv, s *Scenario) {
	f, ok := fields["state"]
	if !ok {
		p.errorf(root, "state", "missing: the state variable, such as state: {symbol: x, domain: [0, 10]}")
		return
	}
	pairs, ok := p.mapping(f.val, "state", " such as {symbol: x, domain: [0, 10]}")
	if !ok {
		return
	}
	st := &s.State
	have := map[string]kv{}
	for _, g := range pairs {
		if !containsStr(stateFields, g.name) {
			p.unknownField(g, "state", stateFields, "")
			continue
		}
		have[g.name] = g
	}
	if g, ok := have["symbol"]; ok {
		if sym, ok := p.text(g.val, "state.symbol"); ok {
			if msg := checkName(sym); msg != "" {
				p.errorf(g.val, "state.symbol", "%s", msg)
			} else {
				st.Symbol, st.SymbolPos = sym, p.at(g.val)
			}
		}
	} else {
		p.errorf(f.val, "state.symbol", "missing: the state's name in the rate law, such as symbol: x")
	}
	if g, ok := have["unit"]; ok {
		st.Unit, _ = p.text(g.val, "state.unit")
	}
	domainOK := false
	if g, ok := have["domain"]; ok {
		domainOK = p.domain(g.val, st)
	} else {
		p.errorf(f.val, "state.domain", "missing: the interval searched for equilibria, such as domain: [0, 10]")
	}
	if g, ok := have["current"]; ok {
		if v, ok := p.number(g.val, "state.current"); ok {
			st.Current, st.HasCurrent, st.CurrentPos = v, true, p.at(g.val)
			if domainOK && (v < st.Domain[0] || v > st.Domain[1]) {
				p.errorf(g.val, "state.current", "%s lies outside the domain [%s, %s]",
					num(v), num(st.Domain[0]), num(st.Domain[1]))
			}
		}
	}
}

func (p *parser) domain(n *yaml.Node, st *State) bool {
	const path = "state.domain"
	if n.Kind != yaml.SequenceNode {
		p.errorf(n, path, "expected a list [lo, hi], got %s", describe(n))
		return false
	}
	if len(n.Content) != 2 {
		p.errorf(n, path, "expected two numbers [lo, hi], got %d", len(n.Content))
		return false
	}
	lo, ok1 := p.number(n.Content[0], index(path, 0))
	hi, ok2 := p.number(n.Content[1], index(path, 1))
	if !ok1 || !ok2 {
		return false
	}
	if !(lo < hi) {
		p.errorf(n, path, "lower end must be below upper end, got [%s, %s]", num(lo), num(hi))
		return false
	}
	if math.IsInf(hi-lo, 0) {
		p.errorf(n, path, "the width hi − lo overflows, got [%s, %s]", num(lo), num(hi))
		return false
	}
	st.Domain, st.DomainPos = [2]float64{lo, hi}, p.at(n)
	return true
}

// withinLimit reports whether count entries of a list or mapping are
// within limit, and reports the error at n otherwise.
func (p *parser) withinLimit(n *yaml.Node, path string, count, limit int, what string) bool {
	if count <= limit {
		return true
	}
	p.errorf(n, path, "%d %s, more than the limit of %d", count, what, limit)
	return false
}

// defines decodes the define mapping.
func (p *parser) defines(n *yaml.Node, s *Scenario) {
	pairs, ok := p.mapping(n, "define", " of name: expression, such as {load: \"L*(1 + w)\"}")
	if !ok {
		return
	}
	if !p.withinLimit(n, "define", len(pairs), MaxDefines, "named expressions") {
		return
	}
	for _, f := range pairs {
		path := join("define", f.name)
		if msg := checkName(f.name); msg != "" {
			p.errorf(f.key, path, "%s", msg)
			continue
		}
		e, ok := p.text(f.val, path)
		if !ok {
			continue
		}
		if strings.TrimSpace(e) == "" {
			p.errorf(f.val, path, "must not be blank")
			continue
		}
		s.Defines = append(s.Defines, Define{
			Name: f.name, Pos: p.at(f.key),
			Expr: e, ExprPos: p.exprStart(f.val, e), ExprStyle: styleOf(f.val),
		})
	}
}

// params decodes the parameters mapping.
func (p *parser) params(n *yaml.Node, s *Scenario) {
	pairs, ok := p.mapping(n, "parameters", " of name: spec, such as {K: {value: 100}}")
	if !ok {
		return
	}
	if !p.withinLimit(n, "parameters", len(pairs), MaxParams, "parameters") {
		return
	}
	for _, f := range pairs {
		path := join("parameters", f.name)
		if msg := checkName(f.name); msg != "" {
			p.errorf(f.key, path, "%s", msg)
			continue
		}
		if par, ok := p.param(f, path); ok {
			s.Params = append(s.Params, par)
		} else {
			// Keep the name, so that correlations naming it do not also
			// report it as unknown.
			s.Params = append(s.Params, Param{Name: f.name, Pos: p.at(f.key), Kind: "invalid"})
		}
	}
}

// checkNames reports a parameter or define that shares its name with the
// state or with each other.
func (p *parser) checkNames(s *Scenario) {
	sym := s.State.Symbol
	defLine := map[string]int{}
	for _, d := range s.Defines {
		if d.Name == sym && sym != "" {
			p.errs.add(d.Pos, join("define", d.Name), "name %s is already the state symbol", d.Name)
		}
		defLine[d.Name] = d.Pos.Line
	}
	for _, par := range s.Params {
		path := join("parameters", par.Name)
		switch line, isDef := defLine[par.Name]; {
		case par.Name == sym && sym != "":
			p.errs.add(par.Pos, path, "name %s is already the state symbol", par.Name)
		case isDef:
			p.errs.add(par.Pos, path, "name %s is already a define (line %d)", par.Name, line)
		}
	}
}

// correlations decodes the correlations list.
func (p *parser) correlations(n *yaml.Node, s *Scenario) {
	const path = "correlations"
	if n.Kind != yaml.SequenceNode {
		p.errorf(n, path, "expected a list of [name, name, rho] triples, got %s", describe(n))
		return
	}
	names := make([]string, 0, len(s.Params))
	byName := make(map[string]int, len(s.Params))
	for i, par := range s.Params {
		names = append(names, par.Name)
		if _, dup := byName[par.Name]; !dup {
			byName[par.Name] = i
		}
	}
	if len(n.Content) > MaxCorrelations {
		p.errorf(n, path, "%d correlations; at most %d are allowed", len(n.Content), MaxCorrelations)
		return
	}
	type pair struct{ a, b string }
	seen := map[pair]int{}
	for i, c := range n.Content {
		path := index(path, i)
		if c.Kind != yaml.SequenceNode || len(c.Content) != 3 {
			p.errorf(c, path, "expected [name, name, rho], got %s", describeTriple(c))
			continue
		}
		var ab [2]string
		ok := true
		for k := range 2 {
			e := c.Content[k]
			name, good := p.text(e, path)
			if !good {
				ok = false
				continue
			}
			ab[k] = name
			j, known := byName[name]
			switch {
			case !known:
				p.errorf(e, path, "unknown parameter %s%s", quoteShort(name), didYouMean(name, names))
				ok = false
			case s.Params[j].Kind == "invalid":
				ok = false // already reported
			case s.Params[j].Fixed:
				p.errorf(e, path, "parameter %s is fixed (value); only uncertain parameters (dist) can be correlated", name)
				ok = false
			}
		}
		rho, good := p.number(c.Content[2], path)
		if good && !(rho > -1 && rho < 1) {
			p.errorf(c.Content[2], path, "rank correlation must lie strictly between -1 and 1, got %s", num(rho))
			good = false
		}
		if !ok || !good {
			continue
		}
		if ab[0] == ab[1] {
			p.errorf(c, path, "parameter %s cannot be correlated with itself", ab[0])
			continue
		}
		key := pair{min(ab[0], ab[1]), max(ab[0], ab[1])}
		if line, dup := seen[key]; dup {
			p.errorf(c, path, "pair %s, %s already given at line %d", ab[0], ab[1], line)
			continue
		}
		pos := p.at(c)
		seen[key] = pos.Line
		s.Correlations = append(s.Correlations, Correlation{A: ab[0], B: ab[1], Rho: rho, Pos: pos})
	}
}

// consistent checks that the correlations, taken together, are possible:
// package sample must find their normal-scale matrix positive definite
// (see sample.NewDesign). The error points at the last correlation within
// the inconsistent block, the one that most likely closed it.
func (p *parser) consistent(n *yaml.Node, s *Scenario) {
	params := make([]sample.Param, len(s.Params))
	for i, par := range s.Params {
		params[i] = sample.Param{Name: par.Name, Dist: par.Dist, Value: par.Value}
	}
	corr := make([]sample.Correlation, len(s.Correlations))
	for i, c := range s.Correlations {
		corr[i] = sample.Correlation{A: c.A, B: c.B, Rho: c.Rho}
	}
	_, err := sample.NewDesign(params, corr, sample.Random, 1, 0)
	if err == nil {
		return
	}
	ce, ok := errAs[*sample.CorrelationError](err)
	if !ok {
		p.errorf(n, "correlations", "%v", err)
		return
	}
	for i := len(s.Correlations) - 1; i >= 0; i-- {
		if c := s.Correlations[i]; containsStr(ce.Params, c.A) && containsStr(ce.Params, c.B) {
			p.errs.add(c.Pos, index("correlations", i), "%s", err)
			return
		}
	}
	p.errorf(n, "correlations", "%v", err)
}

func describeTriple(n *yaml.Node) string {
	if n.Kind == yaml.SequenceNode {
		return fmt.Sprintf("a list of %d items", len(n.Content))
	}
	return describe(n)
}

// num formats x in the shortest form that reads back exactly.
func num(x float64) string {
	switch {
	case math.IsInf(x, 1):
		return "+Inf"
	case math.IsInf(x, -1):
		return "-Inf"
	}
	return strconv.FormatFloat(x, 'g', -1, 64)
}

// errAs returns err (or the error it wraps) as a T, if it is one.
func errAs[T error](err error) (T, bool) {
	var t T
	ok := errors.As(err, &t)
	return t, ok
}
