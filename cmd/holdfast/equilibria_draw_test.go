package main

import (
	"encoding/csv"
	"encoding/json"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"holdfast/assess"
	"holdfast/sample"
	"holdfast/scenarios"
)

// equilibriaJSON is the part of `holdfast equilibria --format json` the
// tests read.
type equilibriaJSON struct {
	Title      string `json:"title"`
	Parameters []struct {
		Name  string  `json:"name"`
		Value float64 `json:"value"`
	} `json:"parameters"`
	Equilibria []struct {
		Class string `json:"class"`
	} `json:"equilibria"`
}

func replayDraw(t *testing.T, args ...string) equilibriaJSON {
	t.Helper()
	stdout := runOK(t, append([]string{"equilibria", "demo:lake", "--format", "json"}, args...)...)
	var doc equilibriaJSON
	if err := json.Unmarshal([]byte(stdout), &doc); err != nil {
		t.Fatalf("%v: %v\n%s", args, err, stdout)
	}
	return doc
}

func TestEquilibriaDrawIsTheDesignsDraw(t *testing.T) {
	// The replayed parameters are those of the sampling design that
	// holdfast assess builds from the same seed, plan and number of draws.
	s, err := scenarios.LoadDemo("lake")
	if err != nil {
		t.Fatal(err)
	}
	m, err := assess.Compile(s)
	if err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		args  []string
		kind  sample.PlanKind
		n, i  int
		seed  uint64
		title string
	}{
		{[]string{"--draw", "17", "--seed", "3"}, sample.LHS, 10000, 17, 3, "draw 17 of seed 3, lhs plan, 10000 draws"},
		{[]string{"--draw", "0"}, sample.LHS, 10000, 0, 1, "draw 0 of seed 1"},
		{[]string{"--draw", "999", "--seed", "9", "--plan", "qmc", "--draws", "1024"}, sample.QMC, 1024, 999, 9, "qmc plan"},
		{[]string{"--draw", "5000", "--plan", "random", "--draws", "100"}, sample.Random, 100, 5000, 1, "random plan"},
	}
	for _, c := range cases {
		d, err := m.Design(c.kind, c.n, c.seed)
		if err != nil {
			t.Fatal(err)
		}
		want := make([]float64, len(m.Names))
		d.Draw(c.i, want)
		doc := replayDraw(t, c.args...)
		if len(doc.Parameters) != len(want) {
			t.Fatalf("%v: %d parameters", c.args, len(doc.Parameters))
		}
		for j, p := range doc.Parameters {
			if p.Name != m.Names[j] || p.Value != want[j] {
				t.Errorf("%v: %s = %v, design gives %s = %v", c.args, p.Name, p.Value, m.Names[j], want[j])
			}
		}
		if !strings.Contains(doc.Title, c.title) {
			t.Errorf("%v: title %q", c.args, doc.Title)
		}
	}
}

func TestEquilibriaDrawReplaysAssess(t *testing.T) {
	// A draw of holdfast assess (its row in --draws-csv) is replayed with
	// the same parameters, bit for bit, and the same regime.
	dir := t.TempDir()
	csvPath := filepath.Join(dir, "draws.csv")
	runOK(t, "assess", "demo:lake", "--seed", "5", "--draws", "40", "--draws-csv", csvPath, "--quiet", "--format", "json")
	f, err := os.Open(csvPath)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	rows, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	header := rows[0]
	col := func(name string) int {
		for k, h := range header {
			if h == name {
				return k
			}
		}
		t.Fatalf("no column %q in %v", name, header)
		return -1
	}
	for _, i := range []int{0, 23, 39} {
		row := rows[1+i]
		if row[0] != strconv.Itoa(i) {
			t.Fatalf("row %d is draw %s", i, row[0])
		}
		doc := replayDraw(t, "--seed", "5", "--draws", "40", "--draw", strconv.Itoa(i))
		for _, p := range doc.Parameters {
			want, err := strconv.ParseFloat(row[col(p.Name)], 64)
			if err != nil {
				t.Fatal(err)
			}
			if p.Value != want {
				t.Errorf("draw %d: %s = %v, assess drew %v", i, p.Name, p.Value, want)
			}
		}
		var classes []string
		for _, e := range doc.Equilibria {
			classes = append(classes, e.Class)
		}
		if got, want := strings.Join(classes, "/"), row[col("regime")]; got != want {
			t.Errorf("draw %d: regime %q, assess found %q", i, got, want)
		}
	}
}

func TestEquilibriaDrawBadFlags(t *testing.T) {
	cases := []struct {
		args []string
		want string
	}{
		{[]string{"--seed", "3"}, "--draw"},
		{[]string{"--plan", "qmc"}, "--draw"},
		{[]string{"--draws", "10"}, "--draw"},
		{[]string{"--draw", "-1"}, "--draw"},
		{[]string{"--draw", "2", "--draws", "0"}, "--draws"},
		{[]string{"--draw", "2", "--plan", "grid"}, "--plan"},
		{[]string{"--draw", "x"}, "--draw"},
	}
	for _, c := range cases {
		expectBad(t, append([]string{"equilibria", "demo:lake"}, c.args...), c.want)
	}
}
