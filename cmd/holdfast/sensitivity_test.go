package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func TestSensitivityBadInput(t *testing.T) {
	// Bad requests: exit 2 with a message naming the problem, no stack
	// trace, nothing on stdout, no file written.
	dir := t.TempDir()
	out := filepath.Join(dir, "s.json")
	noCurrent := lakeWithoutCurrent(t, t.TempDir(), "no-current.yaml")
	cases := []struct {
		args []string
		want string
	}{
		{[]string{"sensitivity", "demo:lake", "--target", "E9", "--out", out}, `unknown target "E9"; the equilibria at nominal values are E1 (stable`},
		{[]string{"sensitivity", "demo:lake", "--out", out}, "--target is required"},
		{[]string{"sensitivity", noCurrent, "--target", "E1", "--output", "current", "--out", out}, "needs a current state"},
		{[]string{"sensitivity", "demo:lake", "--target", "E1", "--output", "speed", "--out", out}, `--output: unknown output "speed"`},
		{[]string{"sensitivity", "demo:lake", "--target", "E1", "--base", "40", "--out", out}, "base size 40 is too small for 3 uncertain inputs"},
		{[]string{"sensitivity", "demo:lake", "--target", "E1", "--base", "1", "--out", out}, "--base"},
		{[]string{"sensitivity", "demo:lake", "--target", "E1", "--set", "L=0.1", "--set", "s=0.6", "--set", "q=4", "--out", out}, "no uncertain inputs"},
		{[]string{"sensitivity", "demo:lake", "--target", "E1", "--format", "xml", "--out", out}, "--format"},
		{[]string{"sensitivity", "demo:lake", "--target", "E1", "--workers", "-2", "--out", out}, "--workers"},
		{[]string{"sensitivity", "demo:nosuch", "--target", "E1", "--out", out}, "nosuch"},
		{[]string{"sensitivity", "demo:lake", "--target", "E1", "--out", dir}, "directory"},
		{[]string{"sensitivity"}, "arg"},
	}
	for _, c := range cases {
		expectBad(t, c.args, c.want)
	}
	noneLeft(t, dir)
}

func TestSensitivityBadCatalogue(t *testing.T) {
	// Every malformed scenario of testdata/bad fails in sensitivity as in
	// the other commands: exit 2 with the catalogue's first error line.
	expectBadCatalogue(t, []string{"sensitivity", "--target", "E1", "--base", "64"})
}

func TestSensitivityJSON(t *testing.T) {
	stdout := runOK(t, "sensitivity", "demo:lake", "--target", "E1", "--output", "current", "--base", "256", "--format", "json")
	var doc struct {
		Target  string           `json:"target"`
		Output  string           `json:"output"`
		Runs    int              `json:"runs"`
		Indices []map[string]any `json:"indices"`
		Caution string           `json:"caution"`
	}
	if err := json.Unmarshal([]byte(stdout), &doc); err != nil {
		t.Fatal(err)
	}
	// 3 uncertain inputs: N·(k+2) = 256·5 runs.
	if doc.Target != "E1" || doc.Output != "current" || doc.Runs != 1280 || doc.Caution == "" {
		t.Errorf("target %q output %q runs %d", doc.Target, doc.Output, doc.Runs)
	}
	if len(doc.Indices) != 5 {
		t.Fatalf("%d rows, want all 5 parameters", len(doc.Indices))
	}
	for _, row := range doc.Indices {
		for _, key := range []string{"parameter", "first_order", "first_order_ci", "total", "total_ci", "rank_corr", "split_distance", "split_p", "elasticity", "rank"} {
			if _, ok := row[key]; !ok {
				t.Errorf("row %v lacks %q", row["parameter"], key)
			}
		}
		if name := row["parameter"]; (name == "r" || name == "m") && (row["total"] != 0.0 || row["first_order"] != 0.0) {
			t.Errorf("fixed %v: %v", name, row)
		}
	}
	// The lake's state ends at E1 from 1.2 only where the threshold E2
	// rises above 1.2: the loss rate s leads (illustrative demo).
	if doc.Indices[0]["parameter"] != "s" {
		t.Errorf("top input %v, want s", doc.Indices[0]["parameter"])
	}
}

func TestSensitivityDeterministicAcrossWorkers(t *testing.T) {
	sameAcrossWorkers(t, []string{"sensitivity", "demo:reactor", "--target", "E1", "--base", "128", "--format", "json"}, "1", "4")
}

func TestSensitivityTableAndFile(t *testing.T) {
	out := filepath.Join(t.TempDir(), "sens.json")
	stdout := runOK(t, "sensitivity", "demo:fishery", "--target", "E3", "--output", "position", "--base", "128", "--out", out)
	for _, want := range []string{"qualified expert", "Reading:", "c (fixed)", "Local view"} {
		if !strings.Contains(stdout, want) {
			t.Errorf("table lacks %q:\n%s", want, stdout)
		}
	}
	raw, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	if !json.Valid(raw) {
		t.Error("--out file is not JSON")
	}
}

func TestAssessReportsScreening(t *testing.T) {
	stdout := runOK(t, "assess", "demo:lake", "--draws", "600", "--format", "json")
	var doc struct {
		Sensitivity struct {
			Kept       int `json:"draws_used"`
			Equilibria []struct {
				Label      string           `json:"label"`
				Parameters []map[string]any `json:"parameters"`
			} `json:"equilibria"`
		} `json:"sensitivity"`
	}
	if err := json.Unmarshal([]byte(stdout), &doc); err != nil {
		t.Fatal(err)
	}
	s := doc.Sensitivity
	if s.Kept != 600 || len(s.Equilibria) != 3 || len(s.Equilibria[0].Parameters) != 5 {
		t.Fatalf("screening %+v", s)
	}
	for _, key := range []string{"split_attracting", "split_current", "rank_corr_position", "prcc_position", "rank_corr_slope"} {
		if _, ok := s.Equilibria[0].Parameters[0][key]; !ok {
			t.Errorf("screening lacks %q", key)
		}
	}
	table, _, _ := holdfast(t, "assess", "demo:lake", "--draws", "600")
	if !strings.Contains(table, "Which inputs drive each verdict") {
		t.Errorf("assess table lacks the screening section")
	}
}
