// Package evidence holds the statistics that say how far a simulated answer
// can be trusted: scores and calibration checks of a forecast backtest, and
// the Monte Carlo error of tail statistics.
//
// # Forecast scores
//
// A backtest compares, for each held-out period (a Case), the sample of
// values the model simulated with the value then observed.
//
// CRPS is the continuous ranked probability score in the kernel form
//
//	CRPS(F, y) = E|X − y| − ½ E|X − X′|,  X, X′ ~ F independent
//
// (Gneiting and Raftery 2007, JASA 102, 359–378, eq. 21), in the units of the
// values; lower is better and 0 is a perfect point forecast. From a sample
// it is estimated with the "fair" divisor n(n−1) for the pair term, which is
// unbiased for the score of the distribution the sample came from (Ferro
// 2014, Q. J. R. Meteorol. Soc. 140, 1917–1923, from memory). The model's
// samples are Monte Carlo draws from its predictive distribution, and it is
// that distribution we want to score, not the finite sample; the plug-in
// divisor n² (CRPSEmpirical) scores the step function instead and penalises
// small samples by about ½E|X − X′|/n. The climatological reference (by
// default the other cases' observed values) is scored the same way so that
// the two are comparable. CRPSNormal is the closed form for a normal forecast
// (Gneiting et al. 2005, Mon. Wea. Rev. 133, 1098–1118).
//
// PIT is the probability integral transform with ties split at the mid-rank,
// (#{xᵢ < y} + ½#{xᵢ = y})/n. For a calibrated forecast PITs are close to
// uniform on [0, 1] (exactly so as the sample size grows).
//
// # Calibration summary and verdict
//
// SummarizePIT (and Evaluate, which calls it) counts the PITs inside the
// central 50 % band [0.25, 0.75] and the central 90 % band [0.05, 0.95]
// (closed intervals) and tests each count against Binomial(M, 0.5) and
// Binomial(M, 0.9) with the two-sided exact test of BinomialTest (the
// minimum-likelihood p-value of R's binom.test). A sign test of the PITs
// above ½ against Binomial(M′, ½), M′ the PITs not equal to ½, checks bias.
// It also reports the Kolmogorov–Smirnov test of the PITs against the
// uniform distribution and the standard deviation of the probits Φ⁻¹(PIT),
// each PIT clamped to [½/m, 1 − ½/m] for its sample size m (half a rank
// inside the range, so a value beyond every sample value stays finite).
//
// The verdict, with M cases and level VerdictLevel = 0.05:
//
//   - M < MinCases (10): "too few cases to judge the spread" (and, if the
//     sign test below rejects, which it can from 6 cases on, its words);
//   - else if the 90 % band test rejects: "too narrow" when fewer than 90 %
//     of the PITs are inside (realised values fall outside the band more
//     often than M·0.1), "too wide" when more are;
//   - else if the 50 % band test rejects: "too narrow" or "too wide" in the
//     same way with the central 50 % band;
//   - else "no evidence against the spread at 5 %" (not "about right":
//     with a few cases the tests have little power);
//   - and, whatever the spread, if the sign test rejects, the verdict adds
//     "forecast too low" (realised values above the forecast median more
//     often than M′/2) or "forecast too high".
//
// Each test alone falsely rejects a calibrated forecast at most 5 % of the
// time; with three tests the chance of some warning is higher: 9 to 11 % in
// simulation with 15, 30 and 60 cases. The KS test and the probit sd are reported
// but do not enter the verdict: with mid-rank PITs of finite samples the KS
// p-value is approximate.
//
// # Monte Carlo error of tail statistics
//
// Quantile gives a type 4 quantile (as sim.Summarize) with a
// distribution-free interval between two order statistics X₍J₎ and X₍K₎
// and the standard error (X₍K₎ − X₍J₎)/(2z), z = 1.96 for an interval of
// exactly 95 % and Φ⁻¹(½ + ½c) for the coverage c ≥ 95 % the integer ranks
// reach. Shortfall gives the expected shortfall as the
// mean of the worst ⌈α·N⌉ paths (as sim.Summarize) with its asymptotic
// standard error from the tail sample. PathsNeeded turns a standard error
// into the number of paths that reaches a target one.
//
// # Concurrency
//
// All functions are pure: they read their inputs, never modify them and keep
// no state, so they are safe for concurrent use.
package evidence
