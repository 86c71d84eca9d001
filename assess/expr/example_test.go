package expr_test

import (
	"fmt"
	"math"

	"holdfast/assess/expr"
)

// Compile a rate law once, then evaluate it and its Taylor coefficients
// through a Machine. The model is the scaled shallow-lake phosphorus rate
// with a Hill recycling term; the parameter values are illustrative.
func ExampleCompile() {
	env := expr.Env{State: "P", Params: []string{"L", "s", "r", "m", "q"}}
	p, err := expr.Compile("L - s*P + r*P^q/(m^q + P^q)", env)
	if err != nil {
		fmt.Println(err)
		return
	}
	m := p.NewMachine()
	theta := []float64{0.05, 0.5, 1, 1, 4} // illustrative

	fmt.Printf("f(0.8) = %.6f\n", m.Eval(0.8, theta))

	// c[k] = f^(k)(P)/k!, with e[k] bounding the rounding error of c[k].
	c, e := make([]float64, 4), make([]float64, 4)
	m.Taylor(0.8, theta, c, e)
	for k := range c {
		fmt.Printf("c[%d] = %+.6f vanishes=%v\n", k, c[k], math.Abs(c[k]) <= e[k])
	}

	// Errors point into the source.
	_, err = expr.Compile("L - sx*P", env)
	fmt.Println(err)
	// Output:
	// f(0.8) = -0.059421
	// c[0] = -0.059421 vanishes=false
	// c[1] = +0.530714 vanishes=false
	// c[2] = +0.435070 vanishes=false
	// c[3] = -1.829468 vanishes=false
	// rate, col 5: unknown name "sx" (did you mean "s"?)
	//     L - sx*P
	//         ^
}

// Diagnose names the operation where a non-finite value arose.
func ExampleMachine_Diagnose() {
	env := expr.Env{State: "x", Params: []string{"a"}, Defines: []expr.Define{{Name: "g", Src: "log(x - a)"}}}
	p, err := expr.Compile("x*g", env)
	if err != nil {
		fmt.Println(err)
		return
	}
	m := p.NewMachine()
	fmt.Println(m.Diagnose(2, []float64{1}))
	f := m.Diagnose(0.5, []float64{1})
	fmt.Println(f.Kind, "in", f.Where, "at byte", f.Offset)
	// Output:
	// <nil>
	// log of non-positive in g at byte 0
}
