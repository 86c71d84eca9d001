package scenarios_test

import (
	"fmt"

	"holdfast/scenarios"
)

func ExampleParse() {
	src := []byte(`holdfast: 1
title: Logistic growth with harvest (illustrative)
state: {symbol: x, unit: t, domain: [0, 120], current: 80}
rate: "r*x*(1 - x/K) - H"
parameters:
  r: {dist: normal, mean: 0.5, sd: 0.05, min: 0, note: growth rate per year}
  K: {value: 100, unit: t}
  H: {dist: uniform, min: 5, max: 10, unit: t/yr}
`)
	s, err := scenarios.Parse("harvest.yaml", src, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(s.Title)
	fmt.Printf("%s' = %s, %s in %v\n", s.State.Symbol, s.Rate, s.State.Symbol, s.State.Domain)
	for _, p := range s.Params {
		if p.Fixed {
			fmt.Printf("%s = %g\n", p.Name, p.Value)
			continue
		}
		fmt.Printf("%s ~ %s, nominal %g\n", p.Name, p.Dist, p.Nominal)
	}
	// Output:
	// Logistic growth with harvest (illustrative)
	// x' = r*x*(1 - x/K) - H, x in [0 120]
	// r ~ normal(mean=0.5, sd=0.05) truncated to [0, +Inf), nominal 0.5
	// K = 100
	// H ~ uniform(min=5, max=10), nominal 7.5
}

func ExampleParse_errors() {
	src := []byte(`holdfast: 1
title: A few mistakes
state: {symbol: x, domain: [0, 1]}
rate: "r*x*(1 - x)"
parameters:
  r: {dist: normal, mean: 0.5, sd: -0.1}
  q: {dist: triangle, min: 0, mode: 1, max: 2}
`)
	_, err := scenarios.Parse("mistakes.yaml", src, nil)
	fmt.Println(err)
	// Output:
	// mistakes.yaml:6:36: parameters.r.sd: must be > 0 (got -0.1)
	// mistakes.yaml:7:13: parameters.q.dist: unknown distribution "triangle"; did you mean "triangular"? (known: normal, lognormal, uniform, loguniform, triangular, pert, beta, gamma, discrete, empirical)
}

func ExampleLoadDemo() {
	s, err := scenarios.LoadDemo("lake")
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(scenarios.Demos())
	fmt.Println(s.File, "-", s.Title)
	if err := s.Set("L", 0.12); err != nil { // a --set override
		fmt.Println(err)
	}
	i := s.ParamIndex("L")
	fmt.Println(s.Params[i].Name, s.Params[i].Kind, s.Params[i].Nominal)
	// Output:
	// [fishery lake reactor tank]
	// demo:lake - Nutrient-loaded lake (illustrative numbers)
	// L fixed 0.12
}
