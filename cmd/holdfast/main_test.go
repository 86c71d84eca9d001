package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func TestBadCatalogueThroughCommands(t *testing.T) {
	// Every malformed scenario in testdata/bad, through each command that
	// reads scenarios: exit status 2, the expected first error line, no
	// stack trace, nothing on stdout, no file written.
	outDir := t.TempDir()
	expectBadCatalogue(t,
		[]string{"equilibria"},
		[]string{"assess", "--draws", "10", "--out", filepath.Join(outDir, "r.json"), "--draws-csv", filepath.Join(outDir, "d.csv")},
		[]string{"assess", "--draws", "10", "--certify", "--shard", "1/2", "--out", filepath.Join(outDir, "part-{shard}.json")},
		[]string{"assess", "--draws", "10", "--checkpoint", filepath.Join(outDir, "state.json"), "--report", filepath.Join(outDir, "r.html")},
	)
	noneLeft(t, outDir)
}

func TestBadFlags(t *testing.T) {
	// Usage errors: exit 2 with a message naming the flag, nothing on
	// stdout, no stack trace, no file written.
	outDir := t.TempDir()
	out := filepath.Join(outDir, "r.json")
	cases := []struct {
		args []string
		want string
	}{
		{[]string{"assess", "demo:lake", "--draws", "0", "--out", out}, "--draws"},
		{[]string{"assess", "demo:lake", "--draws", "ten", "--out", out}, "--draws"},
		{[]string{"assess", "demo:lake", "--seed", "-3", "--out", out}, "--seed"},
		{[]string{"assess", "demo:lake", "--plan", "grid", "--out", out}, "--plan"},
		{[]string{"assess", "demo:lake", "--set", "Z=1", "--out", out}, `unknown parameter "Z"`},
		{[]string{"assess", "demo:lake", "--set", "L=abc", "--out", out}, "not a number"},
		{[]string{"assess", "demo:lake", "--set", "L", "--out", out}, "name=value"},
		{[]string{"assess", "demo:lake", "--format", "xml", "--out", out}, "--format"},
		{[]string{"assess", "demo:lake", "--until-halfwidth", "0.7", "--out", out}, "--until-halfwidth"},
		{[]string{"assess", "demo:lake", "--workers", "-1", "--out", out}, "--workers"},
		{[]string{"assess", "demo:nosuch", "--out", out}, "nosuch"},
		{[]string{"assess", "demo:lake", "--out", outDir}, "directory"},
		{[]string{"equilibria"}, "arg"},
		{[]string{"equilibria", "no-such-file.yaml"}, "no-such-file.yaml"},
		{[]string{"equilibria", "demo:lake", "--set", "s=NaN"}, "finite"},
		{[]string{"nosuchcommand"}, "unknown command"},
		{[]string{"demos", "nosuch"}, `unknown demo "nosuch"`},
		{[]string{"assess", "demo:lake", "--workers", "20000", "--out", out}, "--workers must be 0 (all cores) to 1024"},
		{[]string{"assess", "demo:lake", "--until-halfwidth", "0.01", "--max-draws", "9000000000", "--out", out}, "--max-draws must be at most"},
		{[]string{"demos", "lake", "fishery"}, "at most 1 arg"},
		{[]string{"merge", "--format", "xml", "--out", out, "part.json"}, "--format"},
		{[]string{"merge", "--quiet", "part.json"}, "part.json"},
		{[]string{"assess", "demo:lake", "--check-sides", "--certify=false", "--out", out}, "--check-sides"},
		{[]string{"assess", "demo:lake", "--certify=maybe", "--out", out}, "--certify"},
	}
	for _, c := range cases {
		expectBad(t, c.args, c.want)
	}
	noneLeft(t, outDir)
}

func TestEquilibriaDemos(t *testing.T) {
	for _, demo := range []string{"lake", "fishery", "reactor", "tank"} {
		stdout := runOK(t, "equilibria", "demo:"+demo)
		if !strings.Contains(stdout, "qualified expert") {
			t.Errorf("%s: table lacks the caution notice", demo)
		}
	}
}

func TestEquilibriaJSONShape(t *testing.T) {
	stdout := runOK(t, "equilibria", "demo:lake", "--format", "json")
	var doc struct {
		Equilibria []map[string]any `json:"equilibria"`
		Current    map[string]any   `json:"current"`
		Caution    string           `json:"caution"`
	}
	if err := json.Unmarshal([]byte(stdout), &doc); err != nil {
		t.Fatal(err)
	}
	if len(doc.Equilibria) != 3 {
		t.Fatalf("lake demo: %d equilibria, want 3", len(doc.Equilibria))
	}
	for _, key := range []string{"x", "slope", "class", "order", "attracts_from", "return_time", "basin"} {
		if _, ok := doc.Equilibria[0][key]; !ok {
			t.Errorf("equilibrium lacks %q", key)
		}
	}
	for _, key := range []string{"x", "moves_to", "time_to_1pct"} {
		if _, ok := doc.Current[key]; !ok {
			t.Errorf("current lacks %q", key)
		}
	}
	if doc.Current["moves_to"] != "E3" {
		t.Errorf("lake demo from 1.2 moves to %v, want E3 (the demo's threshold is at 1)", doc.Current["moves_to"])
	}
	if doc.Caution == "" {
		t.Error("JSON lacks the caution")
	}
}

func TestSetOverrides(t *testing.T) {
	// Lake demo with the loading raised well past the upper fold: only the
	// turbid state remains (Carpenter, Ludwig & Brock 1999: the clear state
	// is lost beyond the fold in loading).
	stdout := runOK(t, "equilibria", "demo:lake", "--set", "L=0.3", "--format", "json")
	var doc struct {
		Equilibria []struct {
			X     float64 `json:"x"`
			Class string  `json:"class"`
		} `json:"equilibria"`
	}
	if err := json.Unmarshal([]byte(stdout), &doc); err != nil {
		t.Fatal(err)
	}
	if len(doc.Equilibria) != 1 || doc.Equilibria[0].Class != "stable" || doc.Equilibria[0].X < 1 {
		t.Errorf("L=0.3: got %+v, want one stable turbid state", doc.Equilibria)
	}
}

func TestAssessDeterministicAcrossWorkers(t *testing.T) {
	// Draw i depends only on (seed, i): the same JSON for 1 and 8 workers.
	sameAcrossWorkers(t, []string{"assess", "demo:lake", "--draws", "3000", "--seed", "11", "--format", "json"}, "1", "8")
}

func TestAssessWritesFiles(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "sub", "lake.json")
	csvPath := filepath.Join(dir, "draws.csv")
	runOK(t, "assess", "demo:lake", "--draws", "500", "--out", out, "--draws-csv", csvPath, "--quiet")
	raw, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	var doc map[string]any
	if err := json.Unmarshal(raw, &doc); err != nil {
		t.Fatal(err)
	}
	for _, key := range []string{"draws", "failed_draws", "seed", "plan", "equilibria", "regimes", "current"} {
		if _, ok := doc[key]; !ok {
			t.Errorf("result lacks %q", key)
		}
	}
	rows, err := os.ReadFile(csvPath)
	if err != nil {
		t.Fatal(err)
	}
	if n := strings.Count(string(rows), "\n"); n != 501 {
		t.Errorf("draws CSV has %d lines, want header + 500", n)
	}
	left, _ := filepath.Glob(filepath.Join(dir, ".*tmp*"))
	if len(left) != 0 {
		t.Errorf("temporary files left: %v", left)
	}
}
