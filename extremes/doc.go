// Package extremes fits the generalized extreme value (GEV) distribution to
// block maxima or minima by maximum likelihood and reports return levels with
// delta-method standard errors and profile-likelihood confidence intervals.
// It serves to compare a temperature model's simulated extremes with a
// record's own annual or seasonal extremes (summer maxima, winter minima).
//
// Parameterisation and formulas follow Coles (2001), An Introduction to
// Statistical Modeling of Extreme Values, Springer, chapter 3 (equation and
// section numbers below are from memory):
//
//	G(z) = exp{−[1 + ξ(z − μ)/σ]^(−1/ξ)},  1 + ξ(z − μ)/σ > 0, σ > 0   (eq. 3.2)
//	G(z) = exp{−exp[−(z − μ)/σ]}                                    (ξ → 0, Gumbel)
//
//	ℓ(μ, σ, ξ) = −n·log σ − (1 + 1/ξ)·Σ log[1 + ξ(zᵢ − μ)/σ] − Σ [1 + ξ(zᵢ − μ)/σ]^(−1/ξ)   (eq. 3.7)
//
// The T-block return level is the level exceeded by the block maximum with
// probability p = 1/T in any one block:
//
//	z_p = μ − σ/ξ·[1 − y_p^(−ξ)],  y_p = −log(1 − p);  z_p = μ − σ·log y_p when ξ = 0   (eq. 3.4)
//
// Near ξ = 0 the terms log(1 + ξs)/ξ and (y^(−ξ) − 1)/ξ and their derivatives
// in ξ are evaluated by their power series in ξs (when |ξs| < 10⁻⁴, and a
// little further for the derivatives), elsewhere by log1p and expm1, so the
// likelihood, its gradient and the return levels are smooth and accurate
// across ξ = 0; there is no separate Gumbel branch to switch to.
//
// Fit standardises the sample, starts from the Gumbel method-of-moments
// values (σ = √6·s/π, μ = x̄ − 0.5772·σ, ξ = 0) and maximises ℓ over
// (μ, log σ, ξ) with gonum's Nelder–Mead followed by BFGS on the analytic
// gradient. Standard errors come from the inverse observed information, a
// central finite-difference Jacobian (gonum/diff/fd) of the analytic gradient.
// The delta method (§3.3.3) gives the standard error of a return level.
//
// Profile-likelihood intervals (§3.3.4): for a return level, μ is rewritten
// as z_p + σ/ξ·[1 − y_p^(−ξ)] and ℓ is maximised over (σ, ξ) with z_p fixed;
// the interval holds the z_p whose deviance 2{ℓ̂ − ℓ_p(z_p)} stays below
// the χ²₁ quantile of the confidence level (3.8415 for 95 %). Its bounds are
// found by stepping out from ẑ_p in multiples of the delta-method standard
// error and then by root finding. These intervals are usually asymmetric,
// longer on the upper side, which the delta method cannot show. ShapeInterval
// does the same for ξ.
//
// Block minima (§3.2): min(X₁, …, X_n) = −max(−X₁, …, −X_n), so FitMinima
// fits the GEV to the negated values; a minima return level is the level the
// block minimum falls below with probability 1/T in any one block, the
// negated return level of that fit, and its interval (lo, hi) is (−hi, −lo)
// of the negated fit's.
//
// Units: μ, σ and return levels are in the data's units (°F data give °F
// levels); ξ is dimensionless; return periods count blocks (years for annual
// maxima, winters for winter minima). The log-likelihood is that of the data
// as given, so it changes by −n·log c when the data are multiplied by c.
//
// Misuse panics: a GEV with σ ≤ 0, probabilities outside [0, 1], a return
// period T ≤ 1, a confidence level outside (0, 1). Bad data (fewer than
// MinValues values, NaN or ±Inf, no spread) and failed fits are errors.
//
// Concurrency: GEV is a plain value. A FitResult or MinimaFit does not
// change after it is made and is safe for concurrent use; each profile
// computation keeps its own state. Fit copies its input and does not modify it.
package extremes
