// Package agg holds the streaming, mergeable aggregates of a Monte Carlo
// run: binomial proportions with confidence intervals, and a quantile sketch
// whose merge is exact and independent of order, so that a run split into
// blocks, workers or shards gives the same numbers as one pass.
package agg
