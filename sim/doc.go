// Package sim draws synthetic years from a fitted temperature model and
// summarises them.
//
// A run precomputes, once, every per-day constant of the target span (the
// seasonal mean with the trend at that date, σ of the day's month, the
// period segments), then steps each path through the span:
//
//	X(t) = Σᵢ φᵢ X(t−i) + σ(t) ε(t),  T(t) = S(t) + X(t)
//
// keeping only aggregates (degree days, coldest and hottest day, cold days
// and the longest cold spell per period), so memory grows with paths ×
// aggregates and never with paths × days.
//
// Reproducibility: path i draws from its own PCG stream seeded from (seed,
// i) through SplitMix64, and writes only its own slots, so results are
// identical for any number of workers. Temperatures are in the model's units.
//
// Tail statistics (Summarize) use Hyndman–Fan type-4 quantiles (gonum
// stat.LinInterp) and the empirical expected shortfall on the adverse side.
package sim
