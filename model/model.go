package model

import (
	"bytes"
	"encoding/json"
	"math"

	"wxstress/calendar"
)

// Schema identifies the model file format; SchemaVersion is bumped on any
// change a version-1 reader could misread. A reader accepts files whose
// schema_version is at most its own. Version 2 added the slow part ("slow").
const (
	Schema        = "wxstress-model"
	SchemaVersion = 2
)

// File is the model file: everything the simulator needs, the provenance of
// the data it came from, and the fit's diagnostics. Temperatures are in
// Data.Units throughout (°C or °F); time t counts days from Trend.Epoch.
//
//	T(t) = S(t) + X(t)
//	S(t) = a + b·t + Σₖ [cₖ cos(kωt) + sₖ sin(kωt)],  ω = 2π / period_days
//	X(t) = Y(t) + F(t)
//	Y(t) = Σᵢ φᵢ Y(t−i) + σ(month of t) ε(t),  ε zero-mean, unit-variance   (fast part)
//	F(t) = φ_s F(t−1) + s_F √(1 − φ_s²) η(t),  η ~ N(0, 1)                  (slow part, optional)
type File struct {
	Schema        string   `json:"schema"`
	SchemaVersion int      `json:"schema_version"`
	ToolVersion   string   `json:"tool_version"`
	Data          Data     `json:"data"`
	Trend         Trend    `json:"trend"`
	Seasonal      Seasonal `json:"seasonal"`
	AR            AR       `json:"ar"`
	// Slow is the slow part F; nil (null in the file) when the model has none.
	Slow       *Slow      `json:"slow"`
	Volatility Volatility `json:"volatility"`
	Shocks     Shocks     `json:"shocks"`
	// Scenario is what a scenario added that the fitted parameters cannot
	// express; nil for a fitted model.
	Scenario    *Scenario    `json:"scenario,omitempty"`
	Diagnostics *Diagnostics `json:"diagnostics,omitempty"`
}

// Scenario holds the parts of a scenario the simulator applies itself: a
// level shift by calendar month (added to S) and injected events (added to
// T on top of the simulated anomaly).
type Scenario struct {
	Name         string      `json:"name"`
	MonthlyShift [12]float64 `json:"monthly_shift"`
	Events       []Event     `json:"events,omitempty"`
}

// Event is a spell of Days days whose daily mean is moved by Delta (negative
// for a cold spell), starting on a day drawn uniformly from Window (a
// period of the form MM-DD:MM-DD; one that crosses the year end starts in
// the year before the target year), in a year with probability Probability.
type Event struct {
	Days        int     `json:"days"`
	Delta       float64 `json:"delta"`
	Window      string  `json:"window"`
	Probability float64 `json:"probability"`
}

// Data describes the record the model was fitted to.
type Data struct {
	File        string        `json:"file"`
	SHA256      string        `json:"sha256"`
	FirstDate   calendar.Date `json:"first_date"`
	LastDate    calendar.Date `json:"last_date"`
	Units       string        `json:"units"` // a Units: "C" or "F"
	MeanFrom    string        `json:"mean_from"`
	Days        int           `json:"days"`    // days from first to last date
	Missing     int           `json:"missing"` // of which without a value
	LongestGap  int           `json:"longest_gap_days"`
	Warnings    []string      `json:"warnings,omitempty"`
	Description string        `json:"description,omitempty"`
}

// Trend is the linear part of S: a + b·t, t in days since Epoch.
type Trend struct {
	Kind      string        `json:"kind"` // "linear" or "none"
	Epoch     calendar.Date `json:"epoch"`
	Intercept float64       `json:"intercept"` // a: level at Epoch without the seasonal cycle
	// SlopePerYear is b·365.25 (zero when Kind is "none"); the units are the
	// data's units per year.
	SlopePerYear float64 `json:"slope_per_year"`
	// Estimate is the slope as fitted with a linear term, reported whether
	// or not the model keeps it.
	Estimate TrendEstimate `json:"estimate"`
	Rule     string        `json:"rule"` // why the trend was kept or dropped
}

// TrendEstimate is a fitted slope with its standard errors, per decade.
type TrendEstimate struct {
	PerDecade float64 `json:"per_decade"`
	// SEOLS is the ordinary least-squares standard error, which assumes
	// independent residuals and so understates the uncertainty.
	SEOLS float64 `json:"se_ols_per_decade"`
	// SEAdjusted widens SEOLS for lag-1 autocorrelation r of the residuals
	// by √((1 + r)/(1 − r)) (the effective-sample-size correction). It
	// ignores dependence beyond a few days and so still understates.
	SEAdjusted float64 `json:"se_adjusted_per_decade"`
	// SEAnnual is the slope's standard error from an ordinary regression
	// of calendar-year mean anomalies on the year: it holds under the
	// low-frequency dependence that daily residuals hide. 0 with fewer than
	// 3 complete years.
	SEAnnual float64 `json:"se_annual_means_per_decade"`
	Years    int     `json:"complete_years"` // years behind SEAnnual
}

// Slope returns b, the slope per day.
func (t Trend) Slope() float64 { return t.SlopePerYear / calendar.DaysPerYear }

// Seasonal is the truncated Fourier series of S.
type Seasonal struct {
	PeriodDays float64    `json:"period_days"`
	Harmonics  []Harmonic `json:"harmonics"`
	// PeakDayOfYear and TroughDayOfYear locate the maximum and minimum of
	// the whole seasonal cycle (all harmonics), 1-based and fractional.
	PeakDayOfYear   float64 `json:"peak_day_of_year"`
	TroughDayOfYear float64 `json:"trough_day_of_year"`
	R2              float64 `json:"r2"` // of the mean model T ≈ S
}

// Harmonic k of the seasonal cycle: c cos(kωt) + s sin(kωt) = α sin(kωt + θ).
type Harmonic struct {
	K         int     `json:"k"`
	Cos       float64 `json:"cos"`
	Sin       float64 `json:"sin"`
	Amplitude float64 `json:"amplitude"` // α = √(c² + s²)
	Phase     float64 `json:"phase"`     // θ = atan2(c, s), radians
	// PeakDayOfYear is the first maximum of this harmonic alone, 1-based
	// (1 January = 1), fractional.
	PeakDayOfYear float64 `json:"peak_day_of_year"`
}

// AR is the autoregression of the anomaly's fast part.
type AR struct {
	Phi   []float64 `json:"phi"`    // φ₁..φₚ
	PhiSE []float64 `json:"phi_se"` // standard errors from the likelihood's curvature
	// Last holds the last p anomalies of the record, most recent first
	// (Last[0] is X on Data.LastDate); missing ones are 0.
	Last []float64 `json:"last_anomalies"`
}

// Slow is the slow part of the anomaly, an AR(1) with persistence close to
// 1 whose stationary standard deviation is SD:
//
//	F(t) = φ_s F(t−1) + s_F √(1 − φ_s²) η(t),  η ~ N(0, 1)
type Slow struct {
	Phi float64 `json:"phi"` // φ_s
	SD  float64 `json:"sd"`  // s_F, data units
	// PhiSE and SDSE are standard errors from the likelihood's curvature
	// (0 where it was not positive definite).
	PhiSE float64 `json:"phi_se"`
	SDSE  float64 `json:"sd_se"`
	// EFoldingDays is −1/ln φ_s, the lag at which F's autocorrelation has
	// fallen to 1/e (information; Phi is what the simulator uses).
	EFoldingDays float64 `json:"e_folding_days"`
	// State and StateSD are the Kalman-filtered mean and standard deviation
	// of F on Data.LastDate: where a conditional start begins.
	State   float64 `json:"state"`
	StateSD float64 `json:"state_sd"`
}

// Volatility is σ(t), the innovation standard deviation by calendar month.
type Volatility struct {
	Kind    string      `json:"kind"`    // "monthly"
	Monthly [12]float64 `json:"monthly"` // January..December, in data units
	Count   [12]int     `json:"count"`   // innovations behind each value
	// Band is an approximate 95 % interval for each σ (normal theory: the
	// chi-square interval of a variance).
	Band [12][2]float64 `json:"band_95"`
}

// Shocks is the distribution of the unit-variance innovations ε. In the
// file, df is null where it does not apply (normal, bootstrap) and skew is 1
// for the symmetric families and null for the bootstrap, so that scripts
// always find both keys.
type Shocks struct {
	Family string  // a Family's Name
	DF     float64 // ν, for the families that use it ("t", "skew-t")
	Skew   float64 // ξ, for the families that use it ("skew-t"; 1 = symmetric, < 1 = longer cold tail)
	// ByMonth holds the standardized innovations of each calendar month,
	// for "bootstrap" only.
	ByMonth [][]float64
}

type shocksJSON struct {
	Family  string      `json:"family"`
	DF      *float64    `json:"df"`
	Skew    *float64    `json:"skew"`
	ByMonth [][]float64 `json:"by_month,omitempty"`
}

// MarshalJSON writes df and skew as described on Shocks.
func (s Shocks) MarshalJSON() ([]byte, error) {
	j := shocksJSON{Family: s.Family, ByMonth: s.ByMonth}
	one := 1.0
	if f, ok := LookupFamily(s.Family); ok {
		if f.UsesDF {
			j.DF = &s.DF
		}
		switch {
		case f.UsesSkew:
			j.Skew = &s.Skew
		case f.Parametric():
			j.Skew = &one
		}
	}
	return json.Marshal(j)
}

// UnmarshalJSON reads df and skew, null meaning not applicable.
func (s *Shocks) UnmarshalJSON(b []byte) error {
	var j shocksJSON
	dec := json.NewDecoder(bytes.NewReader(b))
	dec.DisallowUnknownFields()
	if err := dec.Decode(&j); err != nil {
		return err
	}
	*s = Shocks{Family: j.Family, ByMonth: j.ByMonth}
	if j.DF != nil {
		s.DF = *j.DF
	}
	if j.Skew != nil {
		s.Skew = *j.Skew
	}
	return nil
}

// Omega returns ω = 2π / period.
func (s Seasonal) Omega() float64 { return 2 * math.Pi / s.PeriodDays }

// Mean returns S(t), the expected temperature at model time t (days since the epoch).
func (f *File) Mean(t float64) float64 {
	return f.Trend.Intercept + f.Trend.Slope()*t + f.Seasonal.At(t)
}

// At returns the seasonal cycle alone, Σₖ [cₖ cos(kωt) + sₖ sin(kωt)], at model time t.
func (s Seasonal) At(t float64) float64 {
	w := s.Omega()
	v := 0.0
	for _, h := range s.Harmonics {
		kw := float64(h.K) * w * t
		v += h.Cos*math.Cos(kw) + h.Sin*math.Sin(kw)
	}
	return v
}

// ImpulseResponse returns the AR's response to a unit shock, ψ₀ = 1,
// ψⱼ = Σᵢ φᵢ ψⱼ₋ᵢ, until it falls below 1e-12 (at most 10 000 lags).
func ImpulseResponse(phi []float64) []float64 {
	psi := []float64{1}
	for j := 1; j < 10000; j++ {
		v := 0.0
		for i, p := range phi {
			if j-i-1 >= 0 {
				v += p * psi[j-i-1]
			}
		}
		psi = append(psi, v)
		if j > len(phi) && math.Abs(v) < 1e-12 && math.Abs(psi[j-1]) < 1e-12 {
			break
		}
	}
	return psi
}

// StationaryGain is Σψⱼ², the stationary variance of the AR driven by unit
// innovations (1/(1 − φ²) for an AR(1)).
func StationaryGain(phi []float64) float64 {
	sum := 0.0
	for _, v := range ImpulseResponse(phi) {
		sum += v * v
	}
	return sum
}
