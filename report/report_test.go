package report

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"errors"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"holdfast/assess"
	"holdfast/assess/steady"
)

func TestPercentFormatting(t *testing.T) {
	// Shares that round to 0 or 100 stay distinguishable from exact ones
	// (common practice, no source).
	cases := map[float64]string{0: "0", 1: "100", 0.0001: "<0.1", 0.9999: ">99.9", 0.1234: "12.3"}
	for v, want := range cases {
		if got := pc(v); got != want {
			t.Errorf("pc(%v) = %q, want %q", v, got, want)
		}
	}
}

func TestNonFiniteBecomesNull(t *testing.T) {
	var b bytes.Buffer
	snap := &assess.Snapshot{
		Names: []string{"a"}, Theta: []float64{1}, Domain: [2]float64{0, 1},
		Equilibria: []assess.Equilibrium{{Label: "E1", Equilibrium: steady.Equilibrium{
			X: 0.5, Slope: 1, Class: steady.Unstable, Order: 1, ReturnTime: math.NaN(),
			Basin: [2]float64{0.5, 0.5}, Barrier: [2]float64{0, math.Inf(1)}, Span: [2]float64{0.5, 0.5},
		}}},
	}
	if err := WriteJSON(&b, NewEquilibriaJSON("s.yaml", "t", snap)); err != nil {
		t.Fatal(err)
	}
	var doc map[string]any
	if err := json.Unmarshal(b.Bytes(), &doc); err != nil {
		t.Fatalf("invalid JSON: %v\n%s", err, b.String())
	}
	e := doc["equilibria"].([]any)[0].(map[string]any)
	if e["return_time"] != nil || e["barrier"].([]any)[1] != nil {
		t.Errorf("NaN/Inf must be null: %v", e)
	}
	if e["attracts_from"] != "" {
		t.Errorf("attracts_from must be empty unless semistable, got %v", e["attracts_from"])
	}
}

func TestTablesCarryTheCaution(t *testing.T) {
	var b bytes.Buffer
	snap := &assess.Snapshot{Names: []string{"a"}, Theta: []float64{1}, Domain: [2]float64{0, 1}}
	if err := EquilibriaTable(&b, "title", "m", snap); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(b.String(), Caution) || !strings.Contains(b.String(), "No equilibrium") {
		t.Errorf("table:\n%s", b.String())
	}
}

func TestDrawsCSVIsReadable(t *testing.T) {
	var b bytes.Buffer
	w := NewDrawsCSV(&b, []string{"a", "b"}, []string{"E1"})
	block := []assess.Draw{
		{Index: 0, Theta: []float64{1, 2}, Tracked: []assess.TrackedDraw{{Exists: true, X: 0.5, Class: steady.Semistable, Side: steady.Below}},
			Pattern: []steady.Class{steady.Semistable}, Outcome: "E1"},
		{Index: 1, Theta: []float64{3, 4}, Tracked: []assess.TrackedDraw{{}}, Failed: "parameter not finite"},
	}
	if err := w.Write(block); err != nil {
		t.Fatal(err)
	}
	rows, err := csv.NewReader(&b).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	want := [][]string{
		{"draw", "a", "b", "E1_exists", "E1_x", "E1_class", "regime", "destination", "failed"},
		{"0", "1", "2", "1", "0.5", "semistable-below", "semistable", "E1", ""},
		{"1", "3", "4", "0", "", "", "", "", "parameter not finite"},
	}
	for i := range want {
		if strings.Join(rows[i], ",") != strings.Join(want[i], ",") {
			t.Errorf("row %d = %v, want %v", i, rows[i], want[i])
		}
	}
}

func TestStagedFilesAppearWholeOrNotAtAll(t *testing.T) {
	dir := t.TempDir()
	target := filepath.Join(dir, "deep", "out.json")
	err := WriteFileAtomic(target, func(w io.Writer) error {
		io.WriteString(w, "partial")
		return errors.New("boom")
	})
	if err == nil {
		t.Fatal("want the write error")
	}
	if _, err := os.Stat(target); !os.IsNotExist(err) {
		t.Errorf("failed write left %s", target)
	}
	left, _ := filepath.Glob(filepath.Join(dir, "deep", ".*"))
	if len(left) != 0 {
		t.Errorf("temporary files left: %v", left)
	}
	if err := WriteFileAtomic(target, func(w io.Writer) error { _, err := io.WriteString(w, "ok"); return err }); err != nil {
		t.Fatal(err)
	}
	if b, _ := os.ReadFile(target); string(b) != "ok" {
		t.Errorf("content %q", b)
	}
	// Never overwrite an input.
	if err := WriteFileAtomic(target, func(w io.Writer) error { return nil }, target); err == nil {
		t.Error("overwrote a protected input")
	}
}
