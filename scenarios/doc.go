// Package scenarios reads holdfast scenario files: YAML documents that
// state a one-variable rate law dx/dt = f(x; θ), the range of the state x,
// and a fixed value or a distribution for every parameter θ_k.
//
// # Format version 1
//
//	holdfast: 1                       # format version, required
//	title: Nutrient-loaded lake (illustrative numbers)
//	summary: free text, optional
//	state:
//	  symbol: P                       # the state's name in the rate law
//	  unit: g/m^3                     # optional, free text
//	  domain: [0, 5]                  # where equilibria are sought; finite, lo < hi
//	  current: 1.2                    # optional present state, inside the domain
//	rate: "L - s*P + r*P^q/(m^q + P^q)"
//	define:                           # optional named sub-expressions, in order
//	  load: "L*(1 + w)"
//	parameters:                       # in file order
//	  L: {value: 0.1, unit: g/m^3/yr, note: where the value came from}
//	  s: {dist: normal, mean: 0.6, sd: 0.05, min: 0}
//	  q: {dist: triangular, min: 2, mode: 4, max: 6, nominal: 4}
//	correlations:                     # optional Spearman rank correlations, in (-1, 1)
//	  - [s, q, -0.3]
//
// A parameter is fixed (value) or uncertain (dist). The kinds and their
// fields are
//
//	normal      mean, sd
//	lognormal   median, gsd (> 1)   or   mean, sd
//	uniform     min, max
//	loguniform  min, max (0 < min)
//	triangular  min, mode, max
//	pert        min, mode, max
//	beta        alpha, beta, optional min, max (default 0, 1)
//	gamma       shape, and scale or rate
//	discrete    values, weights (lists of equal length)
//	empirical   samples (a list), or file and column of a CSV file
//
// For normal, lognormal, gamma, discrete and empirical, min and/or max
// truncate the distribution; for the others they are its own bounds. Every
// parameter may carry unit, note and nominal: the value of the nominal
// case, which for an uncertain parameter must lie in the support and
// defaults to the median, and for a fixed one is its value (nominal may
// only repeat it). The distributions are built, and their arguments
// checked, by package holdfast/sample.
//
// The state symbol, parameters and defines must have distinct names of the
// form [A-Za-z_][A-Za-z0-9_]* that are not functions or constants of the
// rate law (pi, e, exp, log, log10, sqrt, abs, pow, min, max, sin, cos,
// tan, atan, sinh, cosh, tanh). This package does not compile the rate law
// or the defines; it keeps their text and position (Scenario.RateOffsetPos
// maps an offset in the text back to the file).
//
// # Strictness and errors
//
// Decoding is strict: unknown fields (with a suggestion of the nearest
// known one), missing or mistyped fields, duplicate keys, impossible
// distribution arguments, mixed alternative forms, and bad correlations are
// all errors. Each is an *Error formatted like Go's go/scanner errors,
//
//	lake.yaml:12:9: parameters.s.sd: must be > 0 (got -0.05)
//
// with the line, the byte column and the path of the field; Parse collects
// them into a sorted ErrorList of at most MaxErrors. Empty files, binary or
// non-UTF-8 data, files over MaxFileSize, YAML syntax errors, several YAML
// documents and YAML aliases are rejected with a clear message; Parse never
// panics.
//
// An empirical distribution may read its samples from a CSV file with a
// header row (lines starting with # are comments, blank cells are skipped).
// The file name is relative to the scenario's folder and may not leave it:
// absolute paths and ".." are refused, and Load opens the folder with
// os.Root so that symbolic links cannot escape either.
//
// # Demos
//
// Demos lists scenarios embedded in the program (lake, fishery, reactor,
// tank), each an invented setting with illustrative numbers; LoadDemo
// parses one, and Load accepts "demo:NAME" for it.
package scenarios
