// Package sample provides the random-input side of holdfast: univariate
// distributions sampled by inversion, sampling plans that fill the open unit
// cube (plain random, Latin hypercube, randomized quasi-Monte Carlo), rank
// correlation through a Gaussian copula, and reproducible per-draw random
// streams.
//
// Everything is built so that draw i depends only on (seed, i): a Design maps
// a draw index to a parameter vector with no shared mutable state, so any
// number of workers, in any order, and any sharding of the index range give
// the same draws. Memory is O(k) for k uncertain parameters whatever the
// number of draws: no N×k sample matrix is ever built.
//
// The pieces:
//
//   - Distribution and its constructors (NewNormal, NewPERT, Truncate, ...):
//     quantile functions, with an UpperTail for precise upper tails.
//   - Plan (NewPlan): point i of a random, Latin hypercube or scrambled
//     Sobol' design in the open unit cube (0, 1)^k.
//   - Design (NewDesign): parameters (uncertain or fixed), Spearman rank
//     correlations through a Gaussian copula, and a Plan; Draw(i, θ) fills
//     a parameter vector without allocating.
//   - Stream: the reproducible random generator of draw i, for other
//     per-draw randomness.
//
// Distributions are sampled by inversion, x = Q(u), where Q is the quantile
// function (inverse CDF). Inversion keeps the stratification of Latin
// hypercube and quasi-Monte Carlo points and makes truncation exact: a
// distribution truncated to [lo, hi] is sampled as Q(F(lo) + u (F(hi) − F(lo))),
// computed on the upper-tail scale when the interval lies in the upper tail so
// that far-tail truncation keeps its precision.
package sample
