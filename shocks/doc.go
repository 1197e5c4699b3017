// Package shocks provides the unit-variance shock distributions of the
// temperature anomaly model, their maximum-likelihood fits, and a fast
// sampler.
//
// The daily anomaly follows X(t) = φ X(t−1) + σ(month) ε(t), where the shock
// ε has mean 0 and variance 1, so that σ carries all the scale and ε only the
// shape. Shocks are dimensionless. Three families are provided:
//
//   - Normal: the standard normal, f(z) = exp(−z²/2)/√(2π).
//   - StudentT: Student's t with ν > 2 degrees of freedom scaled by
//     √((ν−2)/ν), f(z) = Γ((ν+1)/2)/(Γ(ν/2)√(π(ν−2))) · (1 + z²/(ν−2))^(−(ν+1)/2);
//     its kurtosis is 3 + 6/(ν−4) for ν > 4.
//   - SkewT: the Fernández–Steel two-piece skewed t with skew ξ > 0,
//     standardized to mean 0 and variance 1 as in R fGarch's dsstd: with g
//     the unit-variance t density, m₁ = 2√(ν−2)/((ν−1)B(½, ν/2)),
//     μ = m₁(ξ − 1/ξ), s = √((1 − m₁²)(ξ² + 1/ξ²) + 2m₁² − 1) and
//     y = s·z + μ, f(z) = 2s/(ξ + 1/ξ) · g(y·ξ^(−sign y)). ξ = 1 is the
//     symmetric t; ξ < 1 gives the longer lower tail (cold outbreaks in a
//     temperature anomaly), ξ > 1 the longer upper tail.
//
// FitNormal, FitStudentT and FitSkewT fit a family to standardized
// innovations by maximum likelihood (Nelder–Mead on transformed parameters
// that keep ν in (2.05, 300) and ξ in (0.2, 5)). Mean and variance are not
// estimated: the shocks are assumed standardized already. Fit.AIC compares
// the families.
//
// A Table turns 64 random bits into a shock by interpolating a tabulated
// quantile function, in a few nanoseconds and without allocating; see Table
// for its accuracy. The distributions' own Quantile is exact to about 10⁻¹⁰
// relative and costs microseconds.
//
// Concurrency: Normal, StudentT and SkewT are plain values and safe for
// concurrent use. A Table is read-only after NewTable and safe for concurrent
// use; each goroutine brings its own random source. The fitting functions do
// not retain or modify their input.
//
// Parameter values outside a family's domain (ν ≤ 2, ξ ≤ 0, probabilities
// outside [0, 1]) are programming errors and panic; bad data passed to a fit
// (too few values, NaN or ±Inf) is reported as an error.
package shocks
