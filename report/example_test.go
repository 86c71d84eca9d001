package report_test

import (
	"bytes"
	"fmt"
	"strings"

	"holdfast/report"
)

// Read a result file back and render its Markdown report. The result here
// is a bare one, with an empty scenario text (whose SHA-256 is the FIPS
// 180-4 digest of the empty message); holdfast report does the same with
// the files that assess --out writes.
func ExampleLoadResult() {
	raw := []byte(`{"format": "holdfast-result", "schema": 1, "kind": "assess",
	  "tool": "holdfast", "version": "0.1.0-dev", "command": ["holdfast", "assess", "stock.yaml"],
	  "scenario": "stock.yaml", "title": "Harvested stock (illustrative numbers)",
	  "scenario_sha256": "e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855",
	  "scenario_text": "", "draws": 10, "assessed_draws": 10, "seed": 1, "plan": "lhs"}`)
	saved, err := report.LoadResult(raw)
	if err != nil {
		fmt.Println(err)
		return
	}
	var md bytes.Buffer
	if err := report.WriteMarkdown(&md, saved, nil); err != nil {
		fmt.Println(err)
		return
	}
	lines := strings.Split(md.String(), "\n")
	fmt.Println(saved.Kind)
	fmt.Println(lines[0])
	fmt.Println(lines[2])

	// The same file with its scenario text edited is refused.
	_, err = report.LoadResult(bytes.Replace(raw, []byte(`"scenario_text": ""`), []byte(`"scenario_text": "x"`), 1))
	fmt.Println(err != nil)
	// Output:
	// assess
	// # Harvested stock (illustrative numbers)
	// Equilibrium assessment by holdfast 0.1.0-dev of scenario `stock.yaml`: 10 parameter draws (lhs, seed 1), 10 assessed.
	// true
}
