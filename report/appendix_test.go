package report

import (
	"bytes"
	"context"
	"encoding/json"
	"encoding/xml"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"testing"

	"golang.org/x/net/html"

	"holdfast/assess"
	"holdfast/assess/agg"
	"holdfast/assess/gate"
	"holdfast/assess/sensitivity"
	"holdfast/assess/summary"
	"holdfast/assess/tipping"
	"holdfast/sample"
	"holdfast/scenarios"
)

// The results these tests render are made once, by the engine on the lake
// demo (illustrative numbers), the way the assess and sensitivity
// commands make them.
var (
	fixtureOnce          sync.Once
	assessRaw, sensRaw   []byte
	fixtureErr           error
	fixtureRequirements  = []string{"E1 attracting >= 0.9", "E3 exists >= 0.99"}
	fixtureCommandAssess = []string{"holdfast", "assess", "demo:lake", "--draws", "600", "--seed", "5"}
)

func fixtures(t testing.TB) (assessJSON, sensJSON []byte) {
	t.Helper()
	fixtureOnce.Do(func() { assessRaw, sensRaw, fixtureErr = makeFixtures() })
	if fixtureErr != nil {
		t.Fatal(fixtureErr)
	}
	return assessRaw, sensRaw
}

func makeFixtures() ([]byte, []byte, error) {
	s, err := scenarios.LoadDemo("lake")
	if err != nil {
		return nil, nil, err
	}
	m, err := assess.Compile(s)
	if err != nil {
		return nil, nil, err
	}
	col, err := summary.NewCollector(m, summary.Config{PilotDraws: 200})
	if err != nil {
		return nil, nil, err
	}
	screen := sensitivity.NewScreen(m, 0)
	opt := assess.Options{Draws: 600, Seed: 5, Plan: sample.LHS, Extra: col.Extra,
		Sink: func(b []assess.Draw) error { screen.Add(b); return col.Add(b) }}
	r, err := assess.Run(context.Background(), m, opt)
	if err != nil {
		return nil, nil, err
	}
	doc := NewAssessJSON("test", s.File, s.Title, r)
	doc.Sensitivity = NewScreeningJSON(screen.Result())
	doc.SetRun(RunInfo{Command: fixtureCommandAssess, Scenario: s})
	doc.Settings = NewSettingsJSON(opt)
	doc.Figures = NewFiguresJSON(col.Summary())
	reqs, err := gate.ParseAll(fixtureRequirements)
	if err != nil {
		return nil, nil, err
	}
	outs, err := doc.Judge(reqs)
	if err != nil {
		return nil, nil, err
	}
	doc.Requirements = NewRequirementsJSON(outs)
	var a bytes.Buffer
	if err := WriteJSON(&a, doc); err != nil {
		return nil, nil, err
	}
	sr, err := sensitivity.Run(context.Background(), m, sensitivity.Options{Target: "E3", Base: 64, Seed: 2})
	if err != nil {
		return nil, nil, err
	}
	sd := NewSensitivityJSON("test", s.File, s.Title, sr)
	sd.SetRun(RunInfo{Command: []string{"holdfast", "sensitivity", "demo:lake", "--target", "E3", "--base", "64"}, Scenario: s})
	var b bytes.Buffer
	if err := WriteJSON(&b, sd); err != nil {
		return nil, nil, err
	}
	return a.Bytes(), b.Bytes(), nil
}

// fixtureCommandSweep is the command line recorded in the sweep fixture.
var fixtureCommandSweep = []string{"holdfast", "sweep", "demo:lake", "--driver", "L", "--from", "0.05", "--to", "0.4", "--track", "E1",
	"--draws", "300", "--seed", "5", "--steps", "5"}

var (
	sweepOnce sync.Once
	sweepRaw  []byte
	sweepErr  error
)

// sweepFixture is the result file of a sweep of the lake demo's load
// (illustrative numbers), made the way the sweep command makes it.
func sweepFixture(t testing.TB) []byte {
	t.Helper()
	sweepOnce.Do(func() {
		s, err := scenarios.LoadDemo("lake")
		if err != nil {
			sweepErr = err
			return
		}
		m, err := assess.Compile(s)
		if err != nil {
			sweepErr = err
			return
		}
		r, err := tipping.Run(context.Background(), m, tipping.Options{Driver: "L", From: 0.05, To: 0.4, Track: "E1", Steps: 5,
			Risk: 0.05, Draws: 300, Seed: 5, Plan: sample.LHS})
		if err != nil {
			sweepErr = err
			return
		}
		doc := NewSweepJSON("test", s.File, s.Title, r)
		doc.SetRun(RunInfo{Command: fixtureCommandSweep, Scenario: s})
		var b bytes.Buffer
		sweepErr = WriteJSON(&b, doc)
		sweepRaw = b.Bytes()
	})
	if sweepErr != nil {
		t.Fatal(sweepErr)
	}
	return sweepRaw
}

func load(t testing.TB, raw []byte) *Saved {
	t.Helper()
	s, err := LoadResult(raw)
	if err != nil {
		t.Fatal(err)
	}
	return s
}

// edit decodes a result, changes it and encodes it again.
func edit(t *testing.T, raw []byte, change func(doc map[string]any)) []byte {
	t.Helper()
	var doc map[string]any
	if err := json.Unmarshal(raw, &doc); err != nil {
		t.Fatal(err)
	}
	change(doc)
	out, err := json.Marshal(doc)
	if err != nil {
		t.Fatal(err)
	}
	return out
}

func TestEnvelopeOfEveryResult(t *testing.T) {
	a, s := fixtures(t)
	for _, raw := range [][]byte{a, s, sweepFixture(t)} {
		var doc map[string]any
		if err := json.Unmarshal(raw, &doc); err != nil {
			t.Fatal(err)
		}
		for _, key := range []string{"format", "schema", "kind", "tool", "version", "command", "seed", "scenario", "scenario_sha256", "scenario_text", "model", "caution"} {
			if _, ok := doc[key]; !ok {
				t.Errorf("%v result lacks %q", doc["kind"], key)
			}
		}
		if doc["format"] != ResultFormat || doc["schema"] != float64(SchemaVersion) {
			t.Errorf("format %v schema %v", doc["format"], doc["schema"])
		}
		// The recorded hash is the SHA-256 of the embedded text; the
		// digest of the empty string is the FIPS 180-4 test vector
		// e3b0c442…b855 (NIST, "SHA-256 examples").
		if got := SHA256([]byte(doc["scenario_text"].(string))); got != doc["scenario_sha256"] {
			t.Errorf("hash %v, text hashes to %s", doc["scenario_sha256"], got)
		}
	}
	if SHA256(nil) != "e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855" {
		t.Error("SHA256 of the empty input")
	}
	sv := load(t, a)
	if sv.Kind != KindAssess || sv.Envelope().Scenario != "demo:lake" || !strings.Contains(sv.ScenarioText(), "rate:") {
		t.Errorf("saved %+v", sv.Envelope())
	}
	if f := sv.Assess.Figures; f == nil || len(f.Band.X) != summary.DefaultGridPoints || len(f.Slopes) != 3 || len(f.Running) == 0 {
		t.Errorf("figures missing: %+v", f)
	}
}

func TestLoadResultRejectsWhatIsNotARenderableResult(t *testing.T) {
	a, _ := fixtures(t)
	cases := []struct {
		name string
		data []byte
		want string
	}{
		{"empty", nil, "empty file"},
		{"yaml scenario", []byte("holdfast: 1\ntitle: x\n"), "not JSON"},
		{"other JSON", []byte(`{"a": 1}`), `no "format": "holdfast-result" marker`},
		{"JSON array", []byte(`[1, 2]`), "not a holdfast result file"},
		{"older holdfast", []byte(`{"tool": "holdfast", "version": "0.0.1", "draws": 5}`), "older holdfast"},
		{"other format", edit(t, a, func(d map[string]any) { d["format"] = "other-tool" }), `format "other-tool"`},
		{"newer schema", edit(t, a, func(d map[string]any) { d["schema"] = SchemaVersion + 1 }), "written by a newer holdfast (result schema 2"},
		{"bad schema", edit(t, a, func(d map[string]any) { d["schema"] = "one" }), "not a schema version"},
		{"truncated", a[:len(a)/2], "truncated"},
		{"truncated early", a[:40], "truncated"},
		{"garbled", []byte(`{"format": "holdfast-result", "schema": 1,, "kind": "assess"}`), "malformed JSON"},
		{"scenario edited", edit(t, a, func(d map[string]any) {
			d["scenario_text"] = strings.Replace(d["scenario_text"].(string), "median: 0.1", "median: 0.2", 1)
		}), "does not match its recorded SHA-256"},
		{"no scenario text", edit(t, a, func(d map[string]any) { delete(d, "scenario_text") }), "no embedded scenario text"},
		{"sweep without envelope", []byte(`{"tool": "holdfast", "version": "0.1.0-dev", "driver": "L", "curve": []}`), "older holdfast"},
		{"equilibria", edit(t, a, func(d map[string]any) { d["kind"] = KindEquilibria }), "does not render equilibria results"},
		{"assess as sweep", edit(t, a, func(d map[string]any) { d["kind"] = KindSweep }), "inconsistent result file: sweep range"},
		{"sweep histogram shape", edit(t, sweepFixture(t), func(d map[string]any) {
			h := d["critical"].(map[string]any)["histogram"].(map[string]any)
			h["counts"] = h["counts"].([]any)[1:]
		}), "critical-value histogram"},
		{"sweep histogram edges", edit(t, sweepFixture(t), func(d map[string]any) {
			e := d["critical"].(map[string]any)["histogram"].(map[string]any)["edges"].([]any)
			e[0], e[1] = e[1], e[0]
		}), "edges not increasing"},
		{"sweep curve probability", edit(t, sweepFixture(t), func(d map[string]any) {
			d["curve"].([]any)[2].(map[string]any)["p_attracting"] = -0.1
		}), "curve attracting"},
		{"sweep where", edit(t, sweepFixture(t), func(d map[string]any) {
			d["limit"].(map[string]any)["where"] = "somewhere"
		}), `where "somewhere"`},
		{"sweep risk", edit(t, sweepFixture(t), func(d map[string]any) {
			d["limit"].(map[string]any)["risk"] = 1.5
		}), "safe limit at risk 1.5"},
		{"sweep scenario edited", edit(t, sweepFixture(t), func(d map[string]any) {
			d["scenario_text"] = d["scenario_text"].(string) + "# edited\n"
		}), "does not match its recorded SHA-256"},
		{"unknown kind", edit(t, a, func(d map[string]any) { d["kind"] = "forecast" }), `unknown result kind "forecast" (want assess, sensitivity or sweep)`},
		{"wrong type", edit(t, a, func(d map[string]any) { d["draws"] = "many" }), "malformed assess result"},
		{"band shape", edit(t, a, func(d map[string]any) {
			b := d["figures"].(map[string]any)["rate_band"].(map[string]any)
			b["q50"] = b["q50"].([]any)[1:]
		}), "inconsistent result file: rate band"},
		{"histogram shape", edit(t, a, func(d map[string]any) {
			h := d["figures"].(map[string]any)["slope_histograms"].([]any)[0].(map[string]any)
			h["counts"] = h["counts"].([]any)[1:]
		}), "edges for"},
		{"probability", edit(t, a, func(d map[string]any) {
			d["equilibria"].([]any)[0].(map[string]any)["p_exists"] = 1.5
		}), "inconsistent result file: E1 exists"},
		{"huge coordinate", edit(t, a, func(d map[string]any) {
			d["figures"].(map[string]any)["rate_band"].(map[string]any)["q5"].([]any)[3] = 1e300
		}), "rate band value"},
		{"running counts", edit(t, a, func(d map[string]any) {
			cp := d["figures"].(map[string]any)["running"].([]any)[0].(map[string]any)
			cp["exists"] = []any{1}
		}), "running counts for 1 of 3"},
	}
	for _, c := range cases {
		_, err := LoadResult(c.data)
		var re *ResultError
		if !errors.As(err, &re) || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want one mentioning %q", c.name, err, c.want)
		}
	}
	// ReadResult names the file.
	dir := t.TempDir()
	p := filepath.Join(dir, "r.json")
	os.WriteFile(p, a[:len(a)-20], 0o644)
	if _, err := ReadResult(p); err == nil || !strings.HasPrefix(err.Error(), p+": truncated") {
		t.Errorf("ReadResult: %v", err)
	}
	if _, err := ReadResult(dir); err == nil || !strings.Contains(err.Error(), "is a directory") {
		t.Errorf("ReadResult of a folder: %v", err)
	}
	if _, err := ReadResult(filepath.Join(dir, "none.json")); err == nil || !strings.Contains(err.Error(), "no such file") {
		t.Errorf("ReadResult of a missing file: %v", err)
	}
}

func TestRenderingIsByteIdentical(t *testing.T) {
	// Rendering the same saved result twice gives the same bytes, and so
	// does a result decoded and encoded again (the file round-trips).
	a, s := fixtures(t)
	for _, raw := range [][]byte{a, s, sweepFixture(t)} {
		var md1, md2, h1, h2 bytes.Buffer
		if err := WriteMarkdown(&md1, load(t, raw), func(n string) string { return "p/" + n + ".svg" }); err != nil {
			t.Fatal(err)
		}
		var again bytes.Buffer
		sv := load(t, raw)
		var doc any = sv.Assess
		if sv.Sensitivity != nil {
			doc = sv.Sensitivity
		}
		if sv.Sweep != nil {
			doc = sv.Sweep
		}
		if err := WriteJSON(&again, doc); err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(again.Bytes(), raw) {
			t.Errorf("%s result does not round-trip through its file form", sv.Kind)
		}
		WriteMarkdown(&md2, load(t, again.Bytes()), func(n string) string { return "p/" + n + ".svg" })
		if md1.String() != md2.String() {
			t.Errorf("%s: Markdown differs between renderings", sv.Kind)
		}
		WriteHTML(&h1, load(t, raw), true)
		WriteHTML(&h2, load(t, raw), true)
		if h1.String() != h2.String() {
			t.Errorf("%s: HTML differs between renderings", sv.Kind)
		}
	}
}

func TestMarkdownCarriesEverySection(t *testing.T) {
	a, s := fixtures(t)
	var b bytes.Buffer
	if err := WriteMarkdown(&b, load(t, a), func(n string) string { return "lake-plots/" + n + ".svg" }); err != nil {
		t.Fatal(err)
	}
	md := b.String()
	for _, want := range []string{
		"# Nutrient-loaded lake (illustrative numbers)\n",
		"> **Caution.** These verdicts come from a model",
		"## Key figures", "## Scenario", "## Inputs", "| L | lognormal(median=0.1, gsd=1.3) | 0.1 (median) | g/m^3/yr |",
		"## Method", "Latin hypercube sampling", "seed 5", "Wilson", "## Equilibria at nominal values",
		"## How likely each equilibrium holds", "## Regimes", "## Outcome from the current state", "## Resilience",
		"## Which inputs drive each verdict", "## Convergence", "## Requirements", "E3 exists \\>= 0.99 | NOT MET",
		"## Warnings and failures", "## What these results do not say", "## Reproduction",
		"```sh\nholdfast assess demo:lake --draws 600 --seed 5\n```", "```yaml\nholdfast: 1\n",
		"![Figure 1](lake-plots/rate-band.svg)", "![Figure 2](lake-plots/slope-E1.svg)", "(lake-plots/convergence.svg)",
	} {
		if !strings.Contains(md, want) {
			t.Errorf("Markdown lacks %q", want)
		}
	}
	if strings.Count(md, "**Caution.**") != 2 || strings.Index(md, "**Caution.**") > strings.Index(md, "## Key figures") {
		t.Error("the caution must come up front (and again at the end)")
	}
	b.Reset()
	if err := WriteMarkdown(&b, load(t, s), nil); err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"## Reading", "## Ranking", "Saltelli design", "## Local view at nominal values", "*Figure 1. Inputs ranked by", "holdfast sensitivity demo:lake --target E3 --base 64"} {
		if !strings.Contains(b.String(), want) {
			t.Errorf("sensitivity Markdown lacks %q", want)
		}
	}
	if strings.Contains(b.String(), "![") {
		t.Error("no image links without plot files")
	}
}

// checkHTML parses page with golang.org/x/net/html's tokenizer and checks
// that every element is closed in order (void elements excepted, SVG's
// self-closing ones allowed), and that nothing refers outside the page.
func checkHTML(t *testing.T, page string) {
	t.Helper()
	void := map[string]bool{"meta": true, "br": true, "hr": true, "img": true, "link": true, "input": true, "wbr": true, "col": true, "area": true, "base": true, "source": true}
	z := html.NewTokenizer(strings.NewReader(page))
	var stack []string
	inStyle := false
	for {
		tt := z.Next()
		if tt == html.ErrorToken {
			if z.Err() != io.EOF {
				t.Fatalf("tokenizer: %v", z.Err())
			}
			break
		}
		tok := z.Token()
		switch tt {
		case html.StartTagToken:
			switch tok.Data {
			case "script", "iframe", "object", "embed", "link", "img", "base", "audio", "video":
				t.Errorf("element <%s> in a self-contained report", tok.Data)
			}
			if !void[tok.Data] {
				stack = append(stack, tok.Data)
			}
			inStyle = tok.Data == "style"
		case html.EndTagToken:
			if len(stack) == 0 || stack[len(stack)-1] != tok.Data {
				t.Fatalf("</%s> closes %v", tok.Data, stack)
			}
			stack = stack[:len(stack)-1]
			inStyle = false
		case html.TextToken:
			if inStyle && (strings.Contains(tok.Data, "url(") || strings.Contains(tok.Data, "@import")) {
				t.Error("style refers outside the page")
			}
		}
		for _, a := range tok.Attr {
			k, v := strings.ToLower(a.Key), strings.ToLower(a.Val)
			if k == "src" || k == "href" || strings.HasSuffix(k, ":href") || k == "srcset" || k == "action" {
				t.Errorf("attribute %s=%q refers elsewhere", a.Key, a.Val)
			}
			if strings.Contains(v, "http:") || strings.Contains(v, "https:") || strings.Contains(v, "url(") {
				t.Errorf("attribute %s=%q refers elsewhere", a.Key, a.Val)
			}
		}
	}
	if len(stack) != 0 {
		t.Errorf("unclosed elements %v", stack)
	}
	if strings.Contains(page, "http://") || strings.Contains(page, "https://") {
		t.Error("page names a URL")
	}
	doc, err := html.Parse(strings.NewReader(page))
	if err != nil || doc == nil {
		t.Fatalf("html.Parse: %v", err)
	}
}

func TestHTMLIsWellFormedAndSelfContained(t *testing.T) {
	a, s := fixtures(t)
	for _, raw := range [][]byte{a, s, sweepFixture(t)} {
		var b bytes.Buffer
		if err := WriteHTML(&b, load(t, raw), true); err != nil {
			t.Fatal(err)
		}
		page := b.String()
		checkHTML(t, page)
		for _, want := range []string{"<!DOCTYPE html>", "<style>", `<aside class="caution"><strong>Caution.</strong> These verdicts`, "<figure>\n<svg viewBox=", "@media print", "</html>\n"} {
			if !strings.Contains(page, want) {
				t.Errorf("HTML lacks %q", want)
			}
		}
		if strings.Contains(page, "<?xml") || strings.Contains(page, "xmlns") {
			t.Error("inline SVG keeps its XML prolog or namespaces")
		}
	}
}

// svgTexts parses an SVG document as XML and returns its text elements.
func svgTexts(t *testing.T, name string, doc []byte) []string {
	t.Helper()
	d := xml.NewDecoder(bytes.NewReader(doc))
	var texts []string
	var root string
	inText := false
	for {
		tok, err := d.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("%s: not well-formed XML: %v", name, err)
		}
		switch v := tok.(type) {
		case xml.StartElement:
			if root == "" {
				root = v.Name.Local
			}
			inText = v.Name.Local == "text"
		case xml.EndElement:
			inText = false
		case xml.CharData:
			if inText {
				texts = append(texts, string(v))
			}
		}
	}
	if root != "svg" {
		t.Errorf("%s: root element %q, want svg", name, root)
	}
	return texts
}

func TestPlotsAreValidSVGWithTheirSeries(t *testing.T) {
	a, s := fixtures(t)
	want := map[string][]string{
		"rate-band":   {"f at nominal values", "median over 600 draws", "25–75% of draws", "5–95% of draws", "f = 0", "attracting (stable)", "repelling (unstable)", "E1", "E2", "E3", "P [g/m^3]"},
		"slope-E1":    {"draws (", "f' = 0", "nominal slope", "f'(x*) at E1 [1/time]"},
		"slope-E2":    {"nominal slope"},
		"slope-E3":    {"nominal slope"},
		"inputs-E1":   {"split distance D", "L", "s", "q"},
		"inputs-E3":   {"split distance D"},
		"convergence": {"E1 attracting", "E2 exists", "E3 attracting", "95% interval", "draws (log scale)"},
		"ranking":     {"interval", "first-order index", "total index"},
		// The sweep's: the critical values with the safe limit, and the
		// probability curve with its band.
		"critical-values":  {"Critical values of L for E1", "L [g/m^3/yr]", "draws (300)", "safe limit at 5.0% risk"},
		"curve-attracting": {"P(E1 attracting) along L", "95% interval", "probability"},
	}
	seen := map[string]bool{}
	for _, raw := range [][]byte{a, s, sweepFixture(t)} {
		plots, err := Plots(load(t, raw), true)
		if err != nil {
			t.Fatal(err)
		}
		for _, p := range plots {
			if p.Err != nil {
				t.Errorf("%s: %v", p.Name, p.Err)
				continue
			}
			seen[p.Name] = true
			texts := strings.Join(svgTexts(t, p.Name, p.SVG), "\n")
			for _, w := range want[p.Name] {
				if !strings.Contains(texts, w) {
					t.Errorf("%s: no text %q in\n%s", p.Name, w, texts)
				}
			}
			if !bytes.HasPrefix(p.PNG, []byte("\x89PNG\r\n\x1a\n")) {
				t.Errorf("%s: PNG signature missing", p.Name)
			}
			if !strings.Contains(string(p.SVG), "font-family:'Liberation Sans',Arial,Helvetica,sans-serif") {
				t.Errorf("%s: no font fallback", p.Name)
			}
		}
	}
	for name := range want {
		if !seen[name] {
			t.Errorf("no plot %s", name)
		}
	}
	// The band's series: both bands filled, the nominal curve in teal.
	plots, _ := Plots(load(t, a), false)
	band := string(plots[0].SVG)
	for _, col := range []string{"fill:#C4E0DB", "fill:#86C1B8", "stroke:#0E6E73", "stroke:#A0522D"} {
		if !strings.Contains(band, col) {
			t.Errorf("rate band lacks %s", col)
		}
	}
}

func TestSweepAndClassPlots(t *testing.T) {
	// The plots a sweep report will use, and the marks of every class.
	x := []float64{0.05, 0.1, 0.15, 0.2}
	c, err := curveChart("P(E1 lost) along L", "L [g/m^3/yr]", "P(E1 lost)", x, []float64{0, 0.1, 0.5, 0.9}, []float64{0, 0.05, 0.4, 0.85}, []float64{0.02, 0.15, 0.6, 0.95})
	if err != nil {
		t.Fatal(err)
	}
	doc, err := c.svg()
	if err != nil {
		t.Fatal(err)
	}
	if texts := strings.Join(svgTexts(t, "curve", doc), "\n"); !strings.Contains(texts, "P(E1 lost)") || !strings.Contains(texts, "95% interval") {
		t.Errorf("curve texts %s", texts)
	}
	limit := 0.11
	c, err = histogramChart("Critical values of L", "L [g/m^3/yr]", []float64{0.05, 0.1, 0.15, 0.2}, []int64{3, 10, 4}, "draws (17)", &limit, "safe limit at 5% risk", false)
	if err != nil {
		t.Fatal(err)
	}
	doc, _ = c.svg()
	if texts := strings.Join(svgTexts(t, "critical", doc), "\n"); !strings.Contains(texts, "safe limit at 5% risk") || strings.Contains(texts, "f' = 0") {
		t.Errorf("critical-value texts %s", texts)
	}
	f := &FiguresJSON{Band: BandJSON{X: []float64{}}, Nominal: CurveJSON{X: []float64{0, 1, 2}, F: []*float64{num(1), nil, num(-1)}}}
	marks := []eqMark{{"E1", "semistable", "below", 0.5}, {"E2", "semistable", "above", 1}, {"E3", "degenerate", "", 1.5}}
	c, err = rateBandChart(f, "x", "", marks)
	if err != nil {
		t.Fatal(err)
	}
	doc, _ = c.svg()
	texts := strings.Join(svgTexts(t, "classes", doc), "\n")
	for _, w := range []string{"attracting from below only", "attracting from above only", "degenerate", "dx/dt = f(x)"} {
		if !strings.Contains(texts, w) {
			t.Errorf("class plot lacks %q", w)
		}
	}
	if strings.Contains(texts, "5–95% of draws") {
		t.Error("no band legend without a band")
	}
}

func TestJudgeOnAnAssessResult(t *testing.T) {
	// Wilson 95% interval of 81/263 is 0.2553–0.3662 (Newcombe 1998,
	// Statistics in Medicine 17:857); the gate judges on its lower end.
	pr := agg.Proportion{K: 81, N: 263}
	lo, hi := pr.Interval(0.95)
	if math.Abs(lo-0.2553) > 5e-5 || math.Abs(hi-0.3662) > 5e-5 {
		t.Fatalf("interval %v–%v", lo, hi)
	}
	d := &AssessJSON{Assessed: 263, Equilibria: []TrackedJSON{{Label: "E1", PExists: pr.Estimate(), PExistsCI: [2]float64{lo, hi}, ExistsCount: 81}},
		Current: &OutcomesJSON{Outcomes: []OutcomeJSON{{Label: "E1", P: pr.Estimate(), CI: [2]float64{lo, hi}, Count: 81}}}}
	reqs, _ := gate.ParseAll([]string{"E1 exists >= 0.25", "E1 exists >= 0.26", "E1 current <= 0.37", "E1 attracting < 0.5"})
	outs, err := d.Judge(reqs)
	if err != nil {
		t.Fatal(err)
	}
	got := fmt.Sprint(outs[0].Met, outs[1].Met, outs[2].Met, outs[3].Met)
	if got != "true false true true" {
		t.Errorf("verdicts %s", got)
	}
	err = GateFailure(outs)
	if err == nil || !strings.Contains(err.Error(), "requirement not met: E1 exists >= 0.26: lower 95% bound 0.2553 is 0.0047") {
		t.Errorf("gate failure %v", err)
	}
	if GateFailure(outs[:1]) != nil {
		t.Error("all met must give no error")
	}
	var ge *GateError
	if _, err := d.Judge([]gate.Requirement{{Text: "E4 exists >= 0.5", Label: "E4"}}); !errors.As(err, &ge) || !strings.Contains(err.Error(), "tracked equilibria are E1") {
		t.Errorf("unknown label: %v", err)
	}
	d.Current = nil
	if _, err := d.Judge([]gate.Requirement{{Text: "E1 current >= 0.5", Label: "E1", Verdict: gate.Current}}); !errors.As(err, &ge) || !strings.Contains(err.Error(), "needs a current state") {
		t.Errorf("current without a current state: %v", err)
	}
	var b bytes.Buffer
	RequirementLines(&b, outs, Painter{On: true})
	if !strings.Contains(b.String(), "\x1b[32mmet\x1b[0m") || !strings.Contains(b.String(), "\x1b[1;31mNOT MET\x1b[0m") {
		t.Errorf("painted lines %q", b.String())
	}
	b.Reset()
	RequirementLines(&b, outs, Painter{})
	if strings.Contains(b.String(), "\x1b") {
		t.Error("colour with the painter off")
	}
}

func TestReportFilesAllOrNothing(t *testing.T) {
	a, _ := fixtures(t)
	dir := t.TempDir()
	md := filepath.Join(dir, "deep", "er", "lake.md")
	rs, err := PrepareReports(ReportOptions{Markdown: md, HTML: filepath.Join(dir, "web", "lake.html")})
	if err != nil {
		t.Fatal(err)
	}
	if err := rs.Write(load(t, a)); err != nil {
		t.Fatal(err)
	}
	if len(rs.Written()) != 9 {
		t.Errorf("written %v", rs.Written())
	}
	raw, err := os.ReadFile(md)
	if err != nil || !strings.Contains(string(raw), "](lake-plots/rate-band.svg)") {
		t.Errorf("Markdown %v: links to its plots folder?", err)
	}
	if _, err := os.Stat(filepath.Join(dir, "deep", "er", "lake-plots", "slope-E2.svg")); err != nil {
		t.Error(err)
	}
	// Refusals before anything is written.
	input := filepath.Join(dir, "in.json")
	os.WriteFile(input, a, 0o644)
	for _, o := range []ReportOptions{
		{Markdown: input, Protect: []string{input}},
		{Markdown: filepath.Join(dir, "x.md"), HTML: filepath.Join(dir, "x.md")},
		{HTML: dir},
		{HTML: filepath.Join(dir, "y.html"), PlotsDir: input},
	} {
		if rs, err := PrepareReports(o); err == nil {
			rs.Abort()
			t.Errorf("%+v accepted", o)
		}
	}
	if _, err := os.Stat(filepath.Join(dir, "y.html")); err == nil {
		t.Error("a refused report left its file")
	}
	for _, c := range []struct {
		in      []string
		md, htm string
		bad     bool
	}{
		{[]string{"a.md", "b.HTML"}, "a.md", "b.HTML", false},
		{[]string{"a.markdown"}, "a.markdown", "", false},
		{[]string{"a.md", "b.md"}, "", "", true},
		{[]string{"a.pdf"}, "", "", true},
	} {
		md, htm, err := SortReportPaths(c.in)
		if (err != nil) != c.bad || md != c.md || htm != c.htm {
			t.Errorf("%v: %q %q %v", c.in, md, htm, err)
		}
	}
}

func TestMarkdownEscapes(t *testing.T) {
	cases := map[string]string{
		"x* and f'(x*)": `x\* and f'(x\*)`,
		"a|b_c [d] <e>": `a\|b\_c \[d\] \<e\>`,
		"back`tick\\":   "back\\`tick\\\\",
	}
	for in, want := range cases {
		if got := mdEscape(in); got != want {
			t.Errorf("mdEscape(%q) = %q, want %q", in, got, want)
		}
	}
	for in, want := range map[string]string{"# no": `\# no`, "- no": `\- no`, "12. no": `12\. no`, "12 yes": "12 yes", "": ""} {
		if got := mdLineStart(in); got != want {
			t.Errorf("mdLineStart(%q) = %q, want %q", in, got, want)
		}
	}
	if got := mdSpans([]span{cd("a`b")}); got != "``a`b``" {
		t.Errorf("code span %q", got)
	}
	d := &document{title: "t"}
	d.code("", "```\ninside\n")
	var b bytes.Buffer
	d.writeMarkdown(&b, nil)
	if !strings.Contains(b.String(), "````\n```\ninside\n````") {
		t.Errorf("fence %q", b.String())
	}
	if shellQuote("E1 attracting >= 0.95") != "'E1 attracting >= 0.95'" || shellQuote("demo:lake") != "demo:lake" || shellQuote("it's") != `'it'\''s'` {
		t.Error("shell quoting")
	}
}

func TestFailedPlotIsNamedInItsCaption(t *testing.T) {
	// A plot the library cannot draw (it panics on some degenerate data)
	// leaves its caption with the reason instead of failing the report.
	d := &document{title: "t"}
	d.figure("boom", "A plot.", func() (*chart, error) { panic("no range") })
	d.figure("err", "Another.", func() (*chart, error) { return nil, errors.New("bad data") })
	plots := drawPlots(d, false)
	if plots[0].Err == nil || plots[1].Err == nil {
		t.Fatal("errors not reported")
	}
	annotate(d, plots)
	var b bytes.Buffer
	d.writeMarkdown(&b, func(string) string { return "" })
	for _, want := range []string{"A plot. (The plot could not be drawn: plot boom: no range.)", "Another. (The plot could not be drawn: bad data.)"} {
		if !strings.Contains(b.String(), want) {
			t.Errorf("Markdown lacks %q:\n%s", want, b.String())
		}
	}
}
