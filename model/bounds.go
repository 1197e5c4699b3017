package model

import (
	"fmt"
	"strconv"
	"strings"
)

// Bounds Validate puts on a model file, in the data's units (°C or °F). They
// are far outside anything a fit of a real station record gives, and chosen
// so that every simulated value stays finite, whatever the number of paths:
//
//	|T| ≤ |S| + |X|
//	|S| ≤ MaxLevel + 1·300 + 12·MaxAmplitude + 50 + 60 ≈ 2 110
//	      (|b| ≤ 1 a year over at most 300 years from the epoch, the target
//	      years being 1800..2300; 12 harmonics; the scenario's monthly shift
//	      and event)
//	|X| ≤ max|ε| · MaxSigma · Σⱼ|ψⱼ|,  Σⱼ|ψⱼ| ≤ (1 − ρ)^−p ≤ 1000⁵ = 10¹⁵
//
// where ρ ≤ MaxRootModulus is the largest modulus of the AR's roots and
// p ≤ 5 its order (1/φ(z) = Πᵢ 1/(1 − rᵢz), so Σ|ψⱼ| ≤ Πᵢ 1/(1 − |rᵢ|)), and
// max|ε| is MaxShock for the bootstrap and below 10⁸ for the parametric
// families (their sampling table stops at the 2⁻⁵⁴ quantile, which for the
// unit-variance t with ν > 2 is below 10⁸). So |T| < 10²⁵; a year's degree
// days stay below 10²⁸, and sums of their squares over 10⁹ paths below 10⁶⁵,
// far from the float64 limit of 1.8·10³⁰⁸. For an AR(1) the anomaly's
// standard deviation, σ/√(1 − φ²), is at most 100/√(1 − 0.999²) ≈ 2 237.
const (
	// MaxLevel bounds |trend.intercept|, the level at the epoch.
	MaxLevel = 500.0
	// MaxSlopePerYear bounds |trend.slope_per_year|.
	MaxSlopePerYear = 1.0
	// MaxAmplitude bounds each harmonic's amplitude √(c² + s²): the largest
	// seasonal swings on Earth are about 30 °C (54 °F) from the mean.
	MaxAmplitude = 100.0
	// MaxSigma bounds each month's innovation σ; fitted values are a few
	// degrees.
	MaxSigma = 100.0
	// MaxAnomaly bounds |ar.last_anomalies|, observed daily anomalies.
	MaxAnomaly = 500.0
	// MaxRootModulus bounds the largest modulus of the AR's roots: below 1
	// for stationarity, and at most 0.999 so that StationaryGain's 10 000
	// lags hold all but about 0.999²⁰⁰⁰⁰ ≈ 2·10⁻⁹ of the variance, and the
	// simulator's longest burn-in (5 000 days) leaves at most 0.999⁵⁰⁰⁰ ≈
	// 0.7 % of the starting state.
	MaxRootModulus = 0.999
	// MaxShock bounds |z| of the bootstrap's standardized innovations. A
	// value standardized by the root mean square of n values is at most √n
	// in size (Samuelson, 1968, The American Statistician 22(5)), so 200
	// admits any month with up to 40 000 days of record.
	MaxShock = 200.0
	// MaxDF bounds ν; at ν = 1000 the t is indistinguishable from the normal.
	MaxDF = 1000.0
	// MinSkew and MaxSkew bound ξ (1 is symmetric).
	MinSkew, MaxSkew = 0.1, 10.0
	// MaxShift bounds |scenario.monthly_shift|; MaxEventDelta bounds
	// |scenario.events[].delta| (a scenario's 30 °C spell is 54 °F).
	MaxShift      = 50.0
	MaxEventDelta = 60.0
	// MinDataYear and MaxDataYear bound the years of data.first_date and
	// data.last_date: instrumental records start in the 17th century, and
	// the simulator's target years end in 2300.
	MinDataYear, MaxDataYear = 1600, 2299
)

// CheckPhi reports whether φ₁..φₚ is an AR the simulator runs: finite
// coefficients whose companion roots all have modulus at most
// MaxRootModulus. Its message starts with the coefficients; callers prefix
// the key. Validate and the scenario checks share it.
func CheckPhi(phi []float64) error {
	for i, v := range phi {
		if !finite(v) {
			return fmt.Errorf("φ%d = %v is not a finite number", i+1, v)
		}
	}
	switch r := SpectralRadius(phi); {
	case r >= 1:
		return fmt.Errorf("φ = %s is not stationary (largest root modulus %.4f ≥ 1)", phiText(phi), r)
	case r > MaxRootModulus:
		return fmt.Errorf("φ = %s is too persistent (largest root modulus %.5f > %g): anomalies would last for years",
			phiText(phi), r, MaxRootModulus)
	}
	return nil
}

// phiText writes AR coefficients for a message: "1.4327", "0.6, −0.2".
func phiText(phi []float64) string {
	parts := make([]string, len(phi))
	for i, v := range phi {
		parts[i] = strconv.FormatFloat(v, 'g', 5, 64)
	}
	return strings.Join(parts, ", ")
}
