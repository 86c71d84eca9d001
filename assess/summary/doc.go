// Package summary collects, during a Monte Carlo run, the compact figures
// that reports draw from a saved result without keeping any draw and
// without running the model again:
//
//   - the rate-curve band: f(x; θ) on a fixed grid of x values across the
//     domain for each successful draw of index below BandDraws, summarised
//     per grid point by a mergeable quantile sketch (package assess/agg,
//     the DDSketch of Masson, Rim & Lee 2019) read at the 5, 25, 50, 75
//     and 95% levels, beside the rate curve at nominal values;
//   - per tracked equilibrium, a histogram of the slope f'(x*) over the
//     draws where it exists: every slope enters a quantile sketch, and the
//     bins are fixed when the Summary is read, from the sketch's 0.5% and
//     99.5% quantiles widened to include zero, with counts below and
//     above the binned range kept (counts exact up to the sketch's 0.1%
//     relative resolution at the bin edges);
//   - the running counts behind each probability (exists, attracting,
//     semistable, ends there from the current state) over the draws of
//     index below each checkpoint c = FirstCheckpoint·2^k and over all
//     draws, from which a report draws how each estimate settled as draws
//     were added.
//
// A Collector hooks into the engine through assess.Options.Extra (which
// evaluates f on the grid in the workers) and assess.Options.Sink (which
// receives the draw records). Its state is a sum over draws, each placed
// by its global index (rec.Index), never by the worker that assessed it
// or by its arrival: integer counts, sketches that merge exactly, and,
// per checkpoint already passed, the counts over the draws below it (a
// checkpoint not yet passed takes the totals). Hence:
//
//   - a Summary is the same for any number of workers;
//   - a run split into shards (draws i ≡ K mod N), each with its own
//     Collector, merged with Merge in any order and grouping, gives the
//     Summary (reflect.DeepEqual) of one Collector fed every draw, and so
//     does a run cut into pieces of consecutive draws;
//   - MarshalJSON saves the complete state exactly (deterministic bytes,
//     floats bit for bit) and UnmarshalJSON, on a Collector made by
//     NewCollector for the same model and configuration, restores it, so
//     a run checkpointed after draws [0, a) and resumed with [a, b) ends
//     with the Collector, and the saved bytes, of an uninterrupted run.
//
// Nothing in this package prints.
package summary
