package report

import (
	"io"
	"os"
	"path/filepath"
	"testing"

	"holdfast/assess"
	"holdfast/assess/study"
)

// FuzzLoadResult checks that reading a result file never panics, and
// that every result it accepts renders as Markdown and HTML without
// panicking. The seed corpus (testdata/fuzz/FuzzLoadResult) holds an
// assess, a sensitivity and a sweep result of the lake demo; the seeds
// below are small or damaged files.
func FuzzLoadResult(f *testing.F) {
	f.Add([]byte(`{"format": "holdfast-result", "schema": 1, "kind": "assess", "scenario_sha256": "e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855", "scenario_text": ""}`))
	f.Add([]byte(`{"format": "holdfast-result", "schema": 1, "kind": "sensitivity", "scenario_sha256": "e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855", "scenario_text": "", "indices": [{}], "chart": {"bars": [{"label": "a", "value": 1}]}}`))
	f.Add([]byte(`{"format": "holdfast-result", "schema": 1, "kind": "sweep", "scenario_sha256": "e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855", "scenario_text": "", "from": 0, "to": 1, "limit": {"risk": 0.05, "where": "in range", "ci_where": ["unbounded", "beyond end"]}, "critical": {"quantiles_where": {"5": "at start", "25": "in range", "50": "in range", "75": "in range", "95": "beyond end"}, "histogram": {"edges": [0, 1], "counts": [3]}}, "curve": [{"value": 0.5, "regimes": [{"pattern": []}]}]}`))
	f.Add([]byte(`{"format": "holdfast-result", "schema": 1, "kind": "equilibria", "scenario_text": ""}`))
	f.Add([]byte(`{"format": "holdfast-result", "schema": 2}`))
	f.Add([]byte(`[]`))
	f.Add([]byte("\x00\xff"))
	f.Fuzz(func(t *testing.T, data []byte) {
		s, err := LoadResult(data)
		if err != nil {
			if _, ok := err.(*ResultError); !ok {
				t.Fatalf("error of type %T: %v", err, err)
			}
			return
		}
		if err := WriteMarkdown(io.Discard, s, func(n string) string { return n + ".svg" }); err != nil {
			t.Fatal(err)
		}
		if err := WriteHTML(io.Discard, s, false); err != nil {
			t.Fatal(err)
		}
	})
}

func FuzzLoadPart(f *testing.F) {
	// The path of holdfast merge and --resume: a part file is read, its
	// scenario parsed again and its state restored; none may panic, and
	// every error of the loader is a *ResultError.
	if seed, err := os.ReadFile(filepath.Join("testdata", "part-tank.json")); err == nil {
		f.Add(seed)
	}
	f.Add([]byte(`{"format": "holdfast-result", "schema": 1, "kind": "partial", "scenario_sha256": "e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855", "scenario_text": "", "run": {"shards": 1}, "state": {"engine": {"draws": 0, "planned": 0, "shards": 1, "regimes": [], "tracked": [], "outcomes": [0, 0, 0, 0, 0]}}}`))
	f.Add([]byte(`{"format": "holdfast-result", "schema": 1, "kind": "checkpoint"}`))
	f.Fuzz(func(t *testing.T, data []byte) {
		p, err := LoadPart(data, KindPart)
		if err != nil {
			if _, ok := err.(*ResultError); !ok {
				t.Fatalf("error of type %T: %v", err, err)
			}
			return
		}
		s, err := p.Parse()
		if err != nil {
			return
		}
		m, err := assess.Compile(s)
		if err != nil {
			return
		}
		st, err := study.New(m, study.Config{Certify: p.Run.Certify})
		if err != nil {
			return
		}
		st.Restore(p.State)
	})
}
