package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func TestSweepBadInput(t *testing.T) {
	// Bad input to sweep: exit 2, a message naming the problem, no stack
	// trace, nothing on stdout, no file written.
	outDir := t.TempDir()
	out := filepath.Join(outDir, "s.json")
	// with returns a sweep command line over the lake demo with the given
	// flags changed; "-" leaves a required flag out.
	with := func(kv ...string) []string {
		flags := map[string]string{"--driver": "L", "--from": "0.05", "--to": "0.4", "--track": "E1"}
		var extra []string
		for i := 0; i+1 < len(kv); i += 2 {
			if _, required := flags[kv[i]]; required {
				flags[kv[i]] = kv[i+1]
			} else {
				extra = append(extra, kv[i], kv[i+1])
			}
		}
		args := []string{"sweep", "demo:lake", "--draws", "50", "--steps", "0", "--out", out}
		for _, k := range []string{"--driver", "--from", "--to", "--track"} {
			if flags[k] != "-" {
				args = append(args, k, flags[k])
			}
		}
		return append(args, extra...)
	}
	cases := []struct {
		args []string
		want string
	}{
		{with("--driver", "Z"), `--driver: "Z" is not a parameter`},
		{with("--driver", "P"), `--driver: "P" is not a parameter`}, // the state symbol
		{with("--driver", "-"), `required flag(s) "driver" not set`},
		{with("--from", "0.2", "--to", "0.2"), "--to: the range is empty"},
		{with("--from", "-0.1"), "--from: -0.1 is outside the values L may take"},
		{with("--driver", "s", "--from", "0.5", "--to", "-1"), "--to: -1 is outside the values s may take"},
		{with("--driver", "q", "--from", "3", "--to", "7"), "--to: 7 is outside the values q may take"},
		{with("--from", "abc"), "--from"},
		{with("--to", "NaN"), "--to: must be a finite number"},
		{with("--track", "E7"), `--track: "E7" is not an equilibrium at nominal values (there are E1, E2, E3)`},
		{with("--track", "-"), `required flag(s) "track" not set`},
		{with("--risk", "0"), "--risk: must be in (0, 1)"},
		{with("--risk", "1"), "--risk: must be in (0, 1)"},
		{with("--risk", "1.5"), "--risk: must be in (0, 1)"},
		{with("--risk", "-0.05"), "--risk: must be in (0, 1)"},
		{with("--steps", "1"), "--steps"},
		{with("--draws", "0"), "--draws"},
		{with("--format", "xml"), "--format"},
		{with("--plan", "grid"), "--plan"},
		{with("--workers", "-2"), "--workers"},
		{with("--set", "L=abc"), "not a number"},
		{[]string{"sweep", "no-such-file.yaml", "--driver", "L", "--from", "0", "--to", "1", "--track", "E1"}, "no-such-file.yaml"},
		{[]string{"sweep"}, "arg"},
	}
	for _, c := range cases {
		expectBad(t, c.args, c.want)
	}
	noneLeft(t, outDir)
}

func TestSweepBadCatalogue(t *testing.T) {
	// Every malformed scenario in testdata/bad through sweep: exit 2 and
	// the catalogue's expected first line, before any sweep option is
	// looked at.
	expectBadCatalogue(t, []string{"sweep", "--driver", "a", "--from", "0", "--to", "1", "--track", "E1", "--draws", "10"})
}

func TestSweepJSONShape(t *testing.T) {
	stdout := runOK(t, "sweep", "demo:lake", "--driver", "L", "--from", "0.05", "--to", "0.4",
		"--track", "E1", "--draws", "400", "--steps", "3", "--risk", "0.1", "--format", "json")
	var doc struct {
		Driver   string `json:"driver"`
		Track    string `json:"track"`
		Critical struct {
			Kind                string              `json:"kind"`
			Quantiles           map[string]*float64 `json:"quantiles"`
			ShareWithoutTipping *float64            `json:"share_without_tipping"`
		} `json:"critical"`
		Limit struct {
			Risk  float64    `json:"risk"`
			Value *float64   `json:"value"`
			CI    []*float64 `json:"ci"`
		} `json:"limit"`
		Curve []struct {
			Value         *float64          `json:"value"`
			PAttracting   *float64          `json:"p_attracting"`
			PAttractingCI []float64         `json:"p_attracting_ci"`
			Regimes       []json.RawMessage `json:"regimes"`
		} `json:"curve"`
		Caution string `json:"caution"`
	}
	if err := json.Unmarshal([]byte(stdout), &doc); err != nil {
		t.Fatalf("invalid JSON: %v\n%s", err, stdout)
	}
	if doc.Driver != "L" || doc.Track != "E1" || doc.Critical.Kind != "fold" || doc.Critical.ShareWithoutTipping == nil {
		t.Errorf("header fields: %+v", doc)
	}
	for _, k := range []string{"5", "25", "50", "75", "95"} {
		if v, ok := doc.Critical.Quantiles[k]; !ok || v == nil || *v < 0.05 || *v > 0.4 {
			t.Errorf("critical quantile %q: %v", k, v)
		}
	}
	if doc.Limit.Risk != 0.1 || doc.Limit.Value == nil || len(doc.Limit.CI) != 2 || doc.Limit.CI[0] == nil || doc.Limit.CI[1] == nil ||
		!(*doc.Limit.CI[0] <= *doc.Limit.Value && *doc.Limit.Value <= *doc.Limit.CI[1]) {
		t.Errorf("limit: %+v", doc.Limit)
	}
	if len(doc.Curve) != 3 {
		t.Fatalf("%d curve points, want 3", len(doc.Curve))
	}
	for _, p := range doc.Curve {
		if p.Value == nil || p.PAttracting == nil || len(p.PAttractingCI) != 2 || len(p.Regimes) == 0 {
			t.Errorf("curve point: %+v", p)
		}
	}
	if !strings.Contains(doc.Caution, "qualified expert") {
		t.Errorf("JSON lacks the caution")
	}
}

func TestSweepTableAndFile(t *testing.T) {
	out := filepath.Join(t.TempDir(), "sweep.json")
	stdout := runOK(t, "sweep", "demo:reactor", "--driver", "a", "--from", "0.25", "--to", "0.08",
		"--track", "E1", "--draws", "300", "--steps", "2", "--out", out)
	for _, want := range []string{"Sweep of a from 0.25 to 0.08", "Safe limit at risk 5.0%", "qualified expert"} {
		if !strings.Contains(stdout, want) {
			t.Errorf("table lacks %q:\n%s", want, stdout)
		}
	}
	raw, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	var doc map[string]any
	if err := json.Unmarshal(raw, &doc); err != nil {
		t.Fatalf("file is not JSON: %v", err)
	}
}

func TestSweepDeterministicAcrossWorkers(t *testing.T) {
	sameAcrossWorkers(t, []string{"sweep", "demo:fishery", "--driver", "H", "--from", "15", "--to", "25", "--track", "E3",
		"--draws", "500", "--steps", "2", "--format", "json"}, "1", "3")
}
