package sample_test

import (
	"fmt"
	"math"

	"holdfast/sample"
)

// Illustrative settings: a growth rate known as a median with a geometric
// spread, a carrying capacity judged min/mode/max, a harvest that cannot
// be negative, and a fixed time scale; growth and capacity are given a
// rank correlation of 0.5.
func ExampleNewDesign() {
	r, _ := sample.NewLognormalMedian(0.4, 1.25)
	K, _ := sample.NewPERT(80, 100, 150)
	h0, _ := sample.NewNormal(5, 2)
	h, _ := sample.Truncate(h0, 0, math.Inf(1))
	params := []sample.Param{
		{Name: "r", Dist: r},
		{Name: "K", Dist: K},
		{Name: "H", Dist: h},
		{Name: "tau", Value: 1},
	}
	corr := []sample.Correlation{{A: "r", B: "K", Rho: 0.5}}
	d, err := sample.NewDesign(params, corr, sample.LHS, 1000, 2024)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(h)
	theta := make([]float64, d.Dim())
	d.Nominal(theta)
	fmt.Printf("nominal %v %.4g\n", d.Names(), theta)
	for i := range 3 {
		d.Draw(i, theta)
		fmt.Printf("draw %d  %.4g\n", i, theta)
	}
	// Output:
	// normal(mean=5, sd=2) truncated to [0, +Inf)
	// nominal [r K H tau] [0.4 103.8 5.016 1]
	// draw 0  [0.5171 102.7 4.947 1]
	// draw 1  [0.3619 100.2 5.578 1]
	// draw 2  [0.3555 99.91 4.38 1]
}

// Truncation far in a tail keeps full precision: the median of a standard
// normal restricted to [10, ∞) lies just above 10.
func ExampleTruncate() {
	n, _ := sample.NewNormal(0, 1)
	t, _ := sample.Truncate(n, 10, math.Inf(1))
	fmt.Println(t)
	fmt.Printf("median %.6f\n", t.Median())
	// Output:
	// normal(mean=0, sd=1) truncated to [10, +Inf)
	// median 10.068412
}

func ExampleParsePlan() {
	k, err := sample.ParsePlan("qmc")
	fmt.Println(k, err)
	_, err = sample.ParsePlan("grid")
	fmt.Println(err)
	// Output:
	// qmc <nil>
	// unknown sampling plan "grid" (want one of random, lhs, qmc)
}

func ExampleNewDiscrete() {
	d, _ := sample.NewDiscrete([]float64{1, 2, 3}, []float64{1, 2, 1})
	fmt.Println(d, d.Median(), d.CDF(2), d.Quantile(0.8))
	// Output:
	// discrete(1:1, 2:2, 3:1) 2 0.75 3
}
