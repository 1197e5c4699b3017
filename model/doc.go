// Package model defines the model file: the versioned contract between
// fitting (package calibrate) and simulating (package sim). It holds the
// parameters of the daily temperature model
//
//	T(t) = S(t) + X(t)
//	S(t) = a + b·t + Σₖ [cₖ cos(kωt) + sₖ sin(kωt)],  ω = 2π / 365.25
//	X(t) = Σᵢ φᵢ X(t−i) + σ(month of t) ε(t)
//
// with t in days since 2000-01-01 and temperatures in the data's units, the
// provenance of the data, and the fit's diagnostics. Demand is the demand
// model file: a change-point load model of daily demand against the daily
// mean temperature, with AR(1) noise. Read validates what it
// reads and names the offending key in its errors; Write is atomic.
//
// Values of File are plain data and safe to share between goroutines for
// reading.
package model
