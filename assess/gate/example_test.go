package gate_test

import (
	"fmt"

	"holdfast/assess/gate"
)

// A review requires the threshold state E2 of a scenario to attract in at
// least 95% of the plausible parameter sets, judged on the lower end of
// the run's 95% interval (illustrative numbers).
func ExampleParse() {
	r, err := gate.Parse("E2 attracting >= 0.95")
	if err != nil {
		fmt.Println(err)
		return
	}
	o := r.Judge(gate.Estimate{Count: 1930, N: 2000, P: 0.965, CI: [2]float64{0.9562, 0.9723}})
	fmt.Println(o)
	o = r.Judge(gate.Estimate{Count: 192, N: 200, P: 0.96, CI: [2]float64{0.9229, 0.9797}})
	fmt.Println(o)
	_, err = gate.Parse("E2 atracting >= 0.95")
	fmt.Println(err)
	// Output:
	// E2 attracting >= 0.95: met: lower 95% bound 0.9562 (estimate 0.965, 1930 of 2000 draws)
	// E2 attracting >= 0.95: not met: lower 95% bound 0.9229 is 0.0271 below 0.95 (estimate 0.96, 192 of 200 draws)
	// requirement "E2 atracting >= 0.95": col 4: unknown verdict "atracting" (want exists, attracting, semistable or current); did you mean "attracting"?
}
