// Package summary collects, during a Monte Carlo run, the compact figures
// that reports draw from a saved result without keeping any draw and
// without running the model again:
//
//   - the rate-curve band: f(x; θ) on a fixed grid of x values across the
//     domain for each successful draw among the first BandDraws, summarised
//     per grid point by a mergeable quantile sketch (package assess/agg,
//     the DDSketch of Masson, Rim & Lee 2019) read at the 5, 25, 50, 75
//     and 95% levels, beside the rate curve at nominal values;
//   - per tracked equilibrium, a histogram of the slope f'(x*) over the
//     draws where it exists, on fixed bins chosen from the first draws
//     (the 0.5% and 99.5% order statistics of a pilot, widened to include
//     zero) with counts below and above the binned range kept;
//   - the running counts behind each probability (exists, attracting,
//     semistable, ends there from the current state) at the checkpoints
//     n = 2^k draws and at the end, from which a report draws how each
//     estimate settled as draws were added.
//
// A Collector hooks into the engine through assess.Options.Extra (which
// evaluates f on the grid in the workers) and assess.Options.Sink (which
// receives the draw records in draw order). Everything it keeps depends
// only on the draws and their order, never on the worker that assessed
// them, so a Summary is the same for any number of workers.
//
// Nothing in this package prints.
package summary
