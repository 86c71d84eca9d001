package main

import (
	"bytes"
	"encoding/json"
	"flag"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"holdfast/report"
)

var update = flag.Bool("update", false, "rewrite the golden files in testdata/golden")

// golden compares got with the golden file name (rewriting it with
// -update); differences are reviewed in the diff.
func golden(t *testing.T, dir, name string, got []byte) {
	t.Helper()
	path := filepath.Join(dir, name)
	if *update {
		if err := os.MkdirAll(dir, 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(path, got, 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	want, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("%v (run go test ./cmd/holdfast -run Golden -update to create it)", err)
	}
	if !bytes.Equal(got, want) {
		gl, wl := strings.Split(string(got), "\n"), strings.Split(string(want), "\n")
		for i := range min(len(gl), len(wl)) {
			if gl[i] != wl[i] {
				t.Fatalf("%s differs at line %d:\n got: %s\nwant: %s\n(run go test ./cmd/holdfast -run Golden -update and review the diff)", name, i+1, gl[i], wl[i])
			}
		}
		t.Fatalf("%s differs in length: %d lines, want %d", name, len(gl), len(wl))
	}
}

func goldenDir(t *testing.T) string {
	t.Helper()
	dir, err := filepath.Abs(filepath.Join("..", "..", "testdata", "golden"))
	if err != nil {
		t.Fatal(err)
	}
	return dir
}

func TestGoldenMarkdownReports(t *testing.T) {
	// The Markdown reports of demo runs with fixed seeds (illustrative
	// numbers). Paths are relative, so the recorded command line is the
	// same wherever the test runs.
	gdir := goldenDir(t)
	inTempDir(t)
	// check runs the command, which writes the report file md, and
	// compares that with the golden file name.
	check := func(name, md string, args ...string) {
		t.Helper()
		runOK(t, args...)
		golden(t, gdir, name, mustRead(t, md))
	}
	check("assess-lake.md", "lake.md", "assess", "demo:lake", "--draws", "1500", "--seed", "7", "--report", "lake.md",
		"--require", "E1 attracting >= 0.9", "--quiet")
	check("sensitivity-lake.md", "lake-sensitivity.md", "sensitivity", "demo:lake", "--target", "E3", "--base", "128", "--seed", "3",
		"--report", "lake-sensitivity.md", "--quiet")
	check("sweep-lake.md", "lake-sweep.md", "sweep", "demo:lake", "--driver", "L", "--from", "0.05", "--to", "0.4", "--track", "E1",
		"--draws", "400", "--seed", "7", "--steps", "5", "--report", "lake-sweep.md", "--quiet")
}

// readTree returns every file under dir by relative path.
func readTree(t *testing.T, dir string) map[string][]byte {
	t.Helper()
	files := map[string][]byte{}
	err := filepath.WalkDir(dir, func(p string, d os.DirEntry, err error) error {
		if err != nil || d.IsDir() {
			return err
		}
		rel, _ := filepath.Rel(dir, p)
		files[rel], err = os.ReadFile(p)
		return err
	})
	if err != nil {
		t.Fatal(err)
	}
	return files
}

func TestReRenderingASavedResultIsByteIdentical(t *testing.T) {
	// assess --report writes the reports from the result as the file
	// holds it; holdfast report on that file, in another folder, gives the
	// same bytes for the Markdown, the HTML and every plot.
	root := t.TempDir()
	// sameTree checks that folder a holds at least atLeast files besides
	// the result file, among them those named in want, and folder b the
	// same files, byte for byte.
	sameTree := func(a, b, result string, atLeast int, want ...string) {
		t.Helper()
		x, y := readTree(t, a), readTree(t, b)
		delete(x, result)
		if len(x) < atLeast || len(x) != len(y) {
			t.Fatalf("%s: files %d and %d", filepath.Base(a), len(x), len(y))
		}
		for name, data := range x {
			if !bytes.Equal(data, y[name]) {
				t.Errorf("%s: %s differs after re-rendering", filepath.Base(a), name)
			}
		}
		for _, name := range want {
			if _, ok := x[filepath.FromSlash(name)]; !ok {
				t.Errorf("%s: no %s", filepath.Base(a), name)
			}
		}
	}
	first, second := filepath.Join(root, "first"), filepath.Join(root, "second")
	os.MkdirAll(first, 0o755)
	t.Chdir(first)
	runOK(t, "assess", "demo:fishery", "--draws", "800", "--seed", "3", "--out", "r.json",
		"--report", "r.md", "--report", "r.html", "--png", "--quiet")
	t.Chdir(root)
	runOK(t, "report", filepath.Join("first", "r.json"), "--md", filepath.Join("second", "r.md"),
		"--html", filepath.Join("second", "r.html"), "--png", "--quiet")
	sameTree(first, second, "r.json", 6, "r.md", "r.html", "r-plots/rate-band.svg", "r-plots/rate-band.png", "r-plots/convergence.svg")
	// The sensitivity result re-renders the same way.
	t.Chdir(first)
	runOK(t, "sensitivity", "demo:fishery", "--target", "E3", "--output", "position", "--base", "64", "--out", "s.json", "--report", "s.html", "--quiet")
	runOK(t, "report", "s.json", "--html", "s2.html", "--quiet")
	x, _ := os.ReadFile("s.html")
	y, _ := os.ReadFile("s2.html")
	if len(x) == 0 || !bytes.Equal(x, y) {
		t.Error("sensitivity HTML differs after re-rendering")
	}
	// And so does the sweep result, with every plot.
	sweepDir, again := filepath.Join(root, "sweep"), filepath.Join(root, "sweep-again")
	os.MkdirAll(sweepDir, 0o755)
	t.Chdir(sweepDir)
	runOK(t, "sweep", "demo:reactor", "--driver", "a", "--from", "0.25", "--to", "0.08", "--track", "E1",
		"--draws", "200", "--steps", "3", "--seed", "4", "--out", "w.json", "--report", "w.md", "--report", "w.html", "--png", "--quiet")
	t.Chdir(root)
	runOK(t, "report", filepath.Join("sweep", "w.json"), "--md", filepath.Join("sweep-again", "w.md"),
		"--html", filepath.Join("sweep-again", "w.html"), "--png", "--quiet")
	sameTree(sweepDir, again, "w.json", 0, "w.md", "w.html", "w-plots/critical-values.svg", "w-plots/critical-values.png", "w-plots/curve-attracting.svg")
}

func TestRequireGateExitStatus(t *testing.T) {
	// The lake demo with 400 draws, seed 7 (illustrative numbers): E1
	// attracts in about 98% of draws, E2 never does, E3 in about 80%.
	dir := t.TempDir()
	saved := filepath.Join(dir, "lake.json")
	runOK(t, "assess", "demo:lake", "--draws", "400", "--seed", "7", "--out", saved, "--quiet")
	cases := []struct {
		reqs   []string
		code   int
		stderr []string // each must appear
		lines  int      // lines on stderr
	}{
		{nil, 0, nil, 0},
		{[]string{"E1 attracting >= 0.9"}, 0, nil, 0},
		{[]string{"E1 exists>90%", "E2 attracting <= 0.05", "E3 current <= 0.95"}, 0, nil, 0},
		{[]string{"E3 attracting >= 0.95"}, exitGate, []string{"holdfast: requirement not met: E3 attracting >= 0.95: lower 95% bound", "below 0.95 (estimate"}, 1},
		{[]string{"E1 attracting >= 0.9", "E3 attracting >= 0.95", "E2 exists < 0.5"}, exitGate,
			[]string{"E3 attracting >= 0.95", "holdfast: requirement not met: E2 exists < 0.5: upper 95% bound", "above 0.5"}, 2},
		{[]string{"E2 atracting >= 0.9"}, exitBad, []string{`unknown verdict "atracting"`, `did you mean "attracting"?`}, 1},
		{[]string{"E7 exists >= 0.5"}, exitBad, []string{"unknown equilibrium E7 (the tracked equilibria are E1, E2, E3)"}, 1},
		{[]string{"E1 exists >= 1"}, exitBad, []string{"can never be met"}, 1},
	}
	for _, c := range cases {
		for _, cmd := range [][]string{
			{"assess", "demo:lake", "--draws", "400", "--seed", "7", "--format", "json"},
			{"report", saved, "--quiet"},
		} {
			args := append([]string{}, cmd...)
			for _, r := range c.reqs {
				args = append(args, "--require", r)
			}
			if cmd[0] == "report" && len(c.reqs) == 0 {
				continue // report needs something to do
			}
			stdout, stderr, code := holdfast(t, args...)
			if code != c.code {
				t.Errorf("%v: exit %d, want %d\n%s", args, code, c.code, stderr)
			}
			for _, w := range c.stderr {
				if !strings.Contains(stderr, w) {
					t.Errorf("%v: stderr %q lacks %q", args, stderr, w)
				}
			}
			if n := strings.Count(stderr, "\n"); n != c.lines {
				t.Errorf("%v: %d stderr lines, want %d:\n%s", args, n, c.lines, stderr)
			}
			noTrace(t, stderr)
			if cmd[0] == "assess" && c.code != exitBad {
				var doc struct {
					Requirements []map[string]any `json:"requirements"`
				}
				if err := json.Unmarshal([]byte(stdout), &doc); err != nil || len(doc.Requirements) != len(c.reqs) {
					t.Errorf("%v: JSON requirements %v (%v)", args, doc.Requirements, err)
				}
			}
		}
	}
	// Without a current state the verdict "current" is bad input.
	noCurrent := lakeWithoutCurrent(t, dir, "nc.yaml")
	expectBad(t, []string{"assess", noCurrent, "--draws", "50", "--require", "E1 current >= 0.1"}, "needs a current state")
	// A sensitivity result has no probabilities to gate.
	sens := filepath.Join(dir, "s.json")
	runOK(t, "sensitivity", "demo:lake", "--target", "E3", "--base", "64", "--out", sens, "--quiet")
	expectBad(t, []string{"report", sens, "--require", "E3 exists >= 0.5"}, "requirements apply to assess results")
}

func TestTerminalOutputHasNoColourOffTerminal(t *testing.T) {
	stdout, _, code := holdfast(t, "assess", "demo:lake", "--draws", "300", "--require", "E1 attracting >= 0.9", "--require", "E3 attracting >= 0.99")
	if code != exitGate {
		t.Fatalf("exit %d", code)
	}
	if strings.Contains(stdout, "\x1b[") {
		t.Error("colour codes written to a non-terminal")
	}
	i, j := strings.Index(stdout, "Requirements (judged"), strings.Index(stdout, "Caution:")
	if i < 0 || j < i || !strings.Contains(stdout, "E3 attracting >= 0.99: NOT MET: lower 95% bound") {
		t.Errorf("the table must list the requirements before the caution:\n%s", stdout)
	}
	t.Setenv("NO_COLOR", "")
	if painter(os.Stdout).On {
		t.Error("colour with NO_COLOR set")
	}
}

func TestReportBadInput(t *testing.T) {
	dir := t.TempDir()
	good := filepath.Join(dir, "good.json")
	runOK(t, "assess", "demo:lake", "--draws", "200", "--out", good, "--quiet")
	raw, _ := os.ReadFile(good)
	write := func(name string, data []byte) string {
		p := filepath.Join(dir, name)
		os.WriteFile(p, data, 0o644)
		return p
	}
	var doc map[string]any
	json.Unmarshal(raw, &doc)
	alter := func(name string, change func(map[string]any)) string {
		var d map[string]any
		json.Unmarshal(raw, &d)
		change(d)
		b, _ := json.Marshal(d)
		return write(name, b)
	}
	scenario := write("lake.yaml", []byte("holdfast: 1\n"))
	out := filepath.Join(dir, "out", "r.md")
	cases := []struct {
		args []string
		want string
	}{
		{[]string{"report", scenario, "--md", out}, "not JSON: not a holdfast result file"},
		{[]string{"report", write("other.json", []byte(`{"results": []}`)), "--md", out}, "not a holdfast result file"},
		{[]string{"report", alter("newer.json", func(d map[string]any) { d["schema"] = 99 }), "--md", out}, "written by a newer holdfast (result schema 99"},
		{[]string{"report", write("cut.json", raw[:len(raw)*2/3]), "--md", out}, "truncated"},
		{[]string{"report", alter("edited.json", func(d map[string]any) { d["scenario_text"] = d["scenario_text"].(string) + "# edited\n" }), "--md", out}, "does not match its recorded SHA-256"},
		{[]string{"report", alter("eq.json", func(d map[string]any) { d["kind"] = "equilibria" }), "--md", out}, "does not render equilibria results"},
		{[]string{"report", alter("sweep.json", func(d map[string]any) { d["kind"] = "sweep" }), "--md", out}, "inconsistent result file: sweep range"},
		{[]string{"report", filepath.Join(dir, "none.json"), "--md", out}, "none.json: no such file"},
		{[]string{"report", dir, "--md", out}, "is a directory"},
		{[]string{"report", good}, "nothing to do"},
		{[]string{"report", good, "--png"}, "nothing to do"},
		{[]string{"report", good, "--md", good}, "refusing to overwrite an input file"},
		{[]string{"report", good, "--md", filepath.Join(dir, "x.md"), "--html", filepath.Join(dir, "x.md")}, "cannot be the same file"},
		{[]string{"report", good, "--html", dir}, "is a directory"},
		{[]string{"report", good, "--plots", good}, "is a file, not a folder"},
		{[]string{"report"}, "arg"},
		{[]string{"assess", "demo:lake", "--draws", "50", "--report", filepath.Join(dir, "r.pdf")}, "want a file ending in .md or .html"},
		{[]string{"assess", "demo:lake", "--draws", "50", "--report", filepath.Join(dir, "a.md"), "--report", filepath.Join(dir, "b.md")}, "already asked for"},
		{[]string{"assess", "demo:lake", "--draws", "50", "--png"}, "--png needs"},
		{[]string{"assess", "demo:lake", "--draws", "50", "--report", dir + string(filepath.Separator) + ".html", "--plots", good}, "is a file, not a folder"},
		{[]string{"sensitivity", "demo:lake", "--target", "E3", "--base", "64", "--report", filepath.Join(dir, "s.txt")}, "want a file ending in .md or .html"},
		{[]string{"sweep", "demo:lake", "--driver", "L", "--from", "0.05", "--to", "0.3", "--track", "E1", "--draws", "20", "--report", filepath.Join(dir, "w.txt")}, "want a file ending in .md or .html"},
		{[]string{"sweep", "demo:lake", "--driver", "L", "--from", "0.05", "--to", "0.3", "--track", "E1", "--draws", "20", "--png"}, "--png needs"},
		{[]string{"sweep", "demo:lake", "--driver", "L", "--from", "0.05", "--to", "0.3", "--track", "E1", "--draws", "20", "--report", good + ".md", "--plots", good}, "is a file, not a folder"},
	}
	for _, c := range cases {
		expectBad(t, c.args, c.want)
	}
	// The JSON of holdfast equilibria carries the envelope but is refused
	// clearly, leaving no report.
	eqOut := runOK(t, "equilibria", "demo:lake", "--format", "json")
	expectBad(t, []string{"report", write("equilibria.json", []byte(eqOut)), "--md", out}, "does not render equilibria results")
	if _, err := os.Stat(filepath.Join(dir, "out", "r.md")); err == nil {
		t.Error("a refused result left a report")
	}
	// A sweep result renders; it has no probabilities to gate.
	sw := filepath.Join(dir, "sweep.json")
	runOK(t, "sweep", "demo:lake", "--driver", "L", "--from", "0.05", "--to", "0.3", "--track", "E1", "--draws", "40", "--out", sw, "--quiet")
	swMD := filepath.Join(dir, "sweep-report", "sweep.md")
	if stdout, stderr, code := holdfast(t, "report", sw, "--md", swMD); code != 0 || !strings.Contains(stdout, "Wrote ") || !strings.Contains(stdout, "qualified expert") {
		t.Errorf("sweep result: exit %d: %s%s", code, stdout, stderr)
	}
	if b, err := os.ReadFile(swMD); err != nil || !strings.Contains(string(b), "## Tipping distribution") {
		t.Errorf("sweep report: %v", err)
	}
	expectBad(t, []string{"report", sw, "--require", "E1 exists >= 0.5"}, "requirements apply to assess results")
	if b, _ := os.ReadFile(good); !bytes.Equal(b, raw) {
		t.Error("the result file was overwritten")
	}
	// Report paths in missing folders are created; the scenario file is
	// never overwritten, whatever the paths.
	deep := filepath.Join(dir, "a", "b", "c", "r.html")
	runOK(t, "report", good, "--html", deep, "--quiet")
	if _, err := os.Stat(deep); err != nil {
		t.Error(err)
	}
	scen := write("own.yaml", mustRead(t, filepath.Join("..", "..", "scenarios", "demos", "lake.yaml")))
	before, _ := os.ReadFile(scen)
	runOK(t, "assess", scen, "--draws", "50", "--report", filepath.Join(dir, "own.md"), "--plots", filepath.Dir(scen), "--quiet")
	if after, _ := os.ReadFile(scen); !bytes.Equal(before, after) {
		t.Error("the scenario file changed")
	}
}

func TestCommandLineIsRecorded(t *testing.T) {
	// Every flag given is recorded in name order, repeated ones in the
	// order given, except those that never change a result (--workers,
	// --format, outputs), so that one run, its shards merged and a
	// resumed run record the same command.
	stdout := runOK(t, "assess", "demo:tank", "--draws", "64", "--seed", "9", "--workers", "3",
		"--set", "Kp=2", "--set", "hs=1.5", "--plan", "qmc", "--format", "json")
	var doc struct {
		Command []string `json:"command"`
		Kind    string   `json:"kind"`
		Seed    uint64   `json:"seed"`
		Model   struct {
			Parameters []struct {
				Name string `json:"name"`
				Set  bool   `json:"set_on_command_line"`
			} `json:"parameters"`
		} `json:"model"`
	}
	if err := json.Unmarshal([]byte(stdout), &doc); err != nil {
		t.Fatal(err)
	}
	want := "holdfast assess demo:tank --draws 64 --plan qmc --seed 9 --set Kp=2 --set hs=1.5"
	if cmd := strings.Join(doc.Command, " "); cmd != want {
		t.Errorf("command %q\n want %q", cmd, want)
	}
	if doc.Kind != "assess" || doc.Seed != 9 {
		t.Errorf("kind %q seed %d", doc.Kind, doc.Seed)
	}
	for _, p := range doc.Model.Parameters {
		if (p.Name == "Kp" || p.Name == "hs") != p.Set {
			t.Errorf("%s: set_on_command_line %v", p.Name, p.Set)
		}
	}
}

func TestEquilibriaJSONEnvelope(t *testing.T) {
	// The JSON of holdfast equilibria opens with the envelope of every
	// result, and keeps the keys of its analysis.
	stdout := runOK(t, "equilibria", "demo:lake", "--format", "json")
	var doc map[string]any
	if err := json.Unmarshal([]byte(stdout), &doc); err != nil {
		t.Fatal(err)
	}
	for key, want := range map[string]any{"format": report.ResultFormat, "schema": float64(report.SchemaVersion), "kind": report.KindEquilibria,
		"tool": "holdfast", "scenario": "demo:lake", "title": "Nutrient-loaded lake (illustrative numbers)"} {
		if doc[key] != want {
			t.Errorf("%s = %v, want %v", key, doc[key], want)
		}
	}
	for _, key := range []string{"version", "command", "scenario_sha256", "scenario_text", "equilibria", "current", "parameters", "caution"} {
		if _, ok := doc[key]; !ok {
			t.Errorf("no %q", key)
		}
	}
	if !strings.HasPrefix(stdout, "{\n  \"format\": \"holdfast-result\",") {
		t.Error("the envelope must come first")
	}
}
