// Package assess is holdfast's numerical core above the single-draw
// analysis: it compiles a scenario into a Model (the rate law lowered by
// package assess/expr with the parameters in scenario order), analyses one
// parameter set with package assess/steady, and runs the Monte Carlo
// engine that draws parameter sets (package sample), follows the nominal
// equilibria into every draw, and aggregates the per-draw verdicts into
// probabilities with confidence intervals.
//
// Results are plain structs; nothing in this package prints.
package assess
