// Package statespace holds the temperature anomaly model of wxstress as a
// linear Gaussian state-space model, its exact likelihood by the Kalman
// filter, and its maximum-likelihood fit.
//
// The anomaly X (temperature minus its seasonal mean) is the sum of a fast
// and an optional slow part:
//
//	X(t) = Y(t) + F(t)
//	Y(t) = Σᵢ₌₁..ₚ φᵢ Y(t−i) + σ(m(t)) ε(t),     ε ~ N(0, 1)     fast: days
//	F(t) = φ_s F(t−1) + s_F √(1 − φ_s²) η(t),  η ~ N(0, 1)     slow: weeks to months
//
// with σ(m) one value per calendar month m(t) of day t, and s_F the
// stationary standard deviation of F. The state is (Y(t), …, Y(t−p+1), F(t));
// X is observed without measurement error, and a missing day (NaN) only
// predicts. The filter starts from the stationary law of the state, with the
// fast part's variance at the first day's σ, so the likelihood is exact and
// gaps need no special care (Harvey 1989, Forecasting, Structural Time Series
// Models and the Kalman Filter, ch. 3; Durbin & Koopman 2012, Time Series
// Analysis by State Space Methods, §4.3 and §4.10 — from memory).
//
// A sum of AR(1)s with very different persistence is the usual practical
// stand-in for the long memory of surface temperature (Granger 1980, J.
// Econometrics 14): the slow part carries the season-to-season spread that
// an AR fitted to day-to-day persistence cannot.
//
// The shocks ε of the fitted model may be fat-tailed and skewed; the fit is
// Gaussian (quasi-) maximum likelihood, and the caller fits a shock family to
// the standardized one-step innovations afterwards.
//
// Functions here are pure and safe for concurrent use; nothing prints.
package statespace
