package expr_test

import (
	"fmt"

	"holdfast/assess/expr"
)

// Enclose f(x) = x² − 2 and f'(x) = 2x over the box [1.4, 1.5]: f' > 0
// throughout and f changes sign between the ends, so the box holds
// exactly one root (√2).
func ExampleMachine_IntervalSlope() {
	p, err := expr.Compile("x^2 - 2", expr.Env{State: "x"})
	if err != nil {
		fmt.Println(err)
		return
	}
	m := p.NewMachine()
	f, df, cont := m.IntervalSlope(expr.Interval{Lo: 1.4, Hi: 1.5}, nil)
	fmt.Printf("f  in [%.4f, %.4f]\nf' in [%.4f, %.4f]\ncontinuous: %v\n", f.Lo, f.Hi, df.Lo, df.Hi, cont)
	lo, hi := m.Interval(expr.Point(1.4), nil), m.Interval(expr.Point(1.5), nil)
	fmt.Printf("f(1.4) < 0: %v, f(1.5) > 0: %v\n", lo.Hi < 0, hi.Lo > 0)
	// Output:
	// f  in [-0.0400, 0.2500]
	// f' in [2.8000, 3.0000]
	// continuous: true
	// f(1.4) < 0: true, f(1.5) > 0: true
}
