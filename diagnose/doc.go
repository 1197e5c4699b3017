// Package diagnose holds the residual checks a reviewer expects of a fitted
// daily temperature model: sample autocorrelations and partial
// autocorrelations, the Ljung–Box portmanteau test, moment-based normality
// checks (skewness, excess kurtosis, Jarque–Bera), the one-sample
// Kolmogorov–Smirnov test against a chosen shock distribution, and the points
// of a quantile-quantile comparison.
//
// # Conventions
//
// Series are plain []float64 on a daily grid. A missing day is NaN and is
// never an error: statistics built on single values skip it, statistics built
// on pairs of days (autocorrelations and what depends on them) use only the
// pairs where both days are present, as R's na.action = na.pass does. Values
// are unitless ratios or carry the units of the series (°C or °F); the
// functions do not care which.
//
// Degenerate data gives NaN, not a panic: a constant series, a series with no
// present values, or a lag with no complete pair of days. Renderers should
// show NaN as "not available". A panic, prefixed "diagnose: ", is kept
// for programmer misuse that no data can cause: a negative lag count, a
// Ljung–Box test with no degrees of freedom left, a nil distribution function.
//
// The tests (LjungBox, JarqueBera, KolmogorovSmirnov) return a model.Test,
// the statistic with its degrees of freedom and p-value, as the model file
// stores it.
//
// p-values are upper-tail probabilities computed from the survival function
// (gonum's stat/distuv), so very small p-values keep their relative accuracy
// rather than rounding to zero.
//
// # Concurrency
//
// All functions are pure: they read their inputs, never modify them, and keep
// no state, so they are safe for concurrent use as long as the distribution
// functions passed to KolmogorovSmirnov and QQ are.
package diagnose
