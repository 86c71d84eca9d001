// Package sensitivity ranks the uncertain inputs of a scenario by how much
// each drives a verdict: whether a tracked equilibrium attracts, where it
// lies, how steep the rate law is there, and where the state ends from the
// current state.
//
// It offers three views, each with its source:
//
//   - Variance-based (Sobol') indices from the sampling design of
//     Saltelli et al. (2010): first-order indices by the Saltelli (2010)
//     estimator and total indices by the Jansen (1999) estimator, on two
//     independent quasi-random base matrices and the k mixed ones
//     (N·(k+2) model runs), with bootstrap percentile intervals (Archer,
//     Saltelli & Sobol' 1997). See Design, Sobol and Run.
//   - Screening measures from an ordinary Monte Carlo run at no extra model
//     cost: Spearman rank correlation, partial rank correlation (Iman &
//     Conover 1980) and, for yes/no verdicts, the regional split test of
//     Spear & Hornberger (1980), the two-sample Kolmogorov–Smirnov distance
//     with its asymptotic p-value. See Screen, which is fed the engine's
//     per-draw records.
//   - The local view at nominal values from the rate-law compiler's exact
//     parameter derivatives: ∂x*/∂θ = −(∂f/∂θ)/(∂f/∂x) and the change of
//     the slope f'(x*), as elasticities. See Local.
//
// The estimators are pure functions on arrays (Sobol, Spearman,
// PartialRankCorrelation, KSTest); Run drives the Monte Carlo engine of
// package assess through assess.Options.Points and Sink, so model runs use
// the engine's workers and its determinism: the result depends only on the
// scenario, the options and the seed, never on the number of workers.
//
// Nothing in this package prints.
package sensitivity
