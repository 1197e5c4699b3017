package model

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"strings"
	"time"

	"wxstress/calendar"
	"wxstress/internal/atomicfile"
)

// maxLoad bounds a demand model's loads and effects (in its unit).
const maxLoad = 1e15

// DemandSchema identifies the demand model file; DemandSchemaVersion is
// bumped on any change a version-1 reader could misread. A reader accepts
// files whose schema_version is at most its own.
const (
	DemandSchema        = "wxstress-demand"
	DemandSchemaVersion = 1
)

// Demand is the demand model file: daily demand as a function of the day's
// mean temperature T (in TemperatureUnits, the units of the temperature
// model it goes with), the weekday and public holidays, in Unit (for
// example GJ/day):
//
//	D(t) = β0 + w(weekday) + βhol·holiday + βH·max(TbH − T, 0) + βC·max(T − TbC, 0) + u(t)
//	u(t) = φ·u(t−1) + σ·z(t),  z ~ N(0, 1)
//
// β0 is the load of a Monday that is not a holiday with T between the
// balance points; w(Monday) = 0. Heating terms are absent from the
// cooling-only form and cooling terms from the heating-only form; in the heating-and-cooling
// form TbH = TbC.
//
// Values of Demand are plain data, safe to share between goroutines for
// reading.
type Demand struct {
	Schema           string `json:"schema"`
	SchemaVersion    int    `json:"schema_version"`
	ToolVersion      string `json:"tool_version"`
	Unit             string `json:"unit"`              // demand unit as the user stated it, e.g. "GJ/day"
	TemperatureUnits string `json:"temperature_units"` // a Units: "C" or "F"
	Form             string `json:"form"`              // a DemandForm
	FormRule         string `json:"form_rule"`         // how the form was chosen

	Intercept float64     `json:"intercept"` // β0, Unit
	Weekday   [7]float64  `json:"weekday"`   // added to β0, Monday (0) .. Sunday (6), Unit
	Holiday   float64     `json:"holiday"`   // βhol, Unit; 0 when the data had no holidays
	Heating   ChangePoint `json:"heating"`
	Cooling   ChangePoint `json:"cooling"`
	Noise     DemandNoise `json:"noise"`

	// SE holds the standard errors of the coefficients other than the
	// slopes (those are in Heating and Cooling).
	SE DemandSE `json:"standard_errors"`

	Fit      DemandFit  `json:"fit"`
	Data     DemandData `json:"data"`
	Warnings []string   `json:"warnings"` // never null: [] when there are none

	// Forms compares the constant model and every change-point form by
	// BIC; Profile is the grid search's residual sum of squares, left out
	// when the grid has more than 1000 points.
	Forms       []FormScore        `json:"forms,omitempty"`
	Profile     []DemandProfile    `json:"profile,omitempty"`
	Diagnostics *DemandDiagnostics `json:"diagnostics,omitempty"`
}

// ChangePoint is one side of the change-point model: a balance point and
// the slope beyond it, in Unit per degree. In the file, all three values
// are null when the form has no such side.
type ChangePoint struct {
	Present      bool    // the form has this side; not stored, implied by the nulls
	BalancePoint float64 // TbH or TbC, in TemperatureUnits
	Slope        float64 // βH or βC: extra demand per degree beyond the balance point
	// SlopeSE is the ordinary least-squares standard error of Slope,
	// conditional on the balance points (which were chosen by grid search
	// and are treated as known).
	SlopeSE float64
}

type changePointJSON struct {
	BalancePoint *float64 `json:"balance_point"`
	Slope        *float64 `json:"slope"`
	SlopeSE      *float64 `json:"slope_se"`
}

// MarshalJSON writes null values for an absent side.
func (c ChangePoint) MarshalJSON() ([]byte, error) {
	var j changePointJSON
	if c.Present {
		j = changePointJSON{&c.BalancePoint, &c.Slope, &c.SlopeSE}
	}
	return json.Marshal(j)
}

// UnmarshalJSON reads a side; a null balance point means absent.
func (c *ChangePoint) UnmarshalJSON(b []byte) error {
	var j changePointJSON
	dec := json.NewDecoder(bytes.NewReader(b))
	dec.DisallowUnknownFields()
	if err := dec.Decode(&j); err != nil {
		return err
	}
	*c = ChangePoint{Present: j.BalancePoint != nil}
	if j.BalancePoint != nil {
		c.BalancePoint = *j.BalancePoint
	}
	if j.Slope != nil {
		c.Slope = *j.Slope
	}
	if j.SlopeSE != nil {
		c.SlopeSE = *j.SlopeSE
	}
	return nil
}

// DemandNoise is the AR(1) residual u(t) = φ·u(t−1) + σ·z(t), z ~ N(0, 1).
type DemandNoise struct {
	Phi   float64 `json:"phi"`
	PhiSE float64 `json:"phi_se"`
	Sigma float64 `json:"sigma"` // innovation standard deviation, Unit
	// Last is u on Data.LastDate (0 when that day has no residual), for
	// simulations that start from the end of the record.
	Last float64 `json:"last_residual"`
	// Pairs is the number of consecutive-day residual pairs behind φ.
	Pairs int `json:"pairs"`
	// Scale is how the innovations' sd depends on the day: "constant" (σ
	// every day; also an empty value, in older files), "load" (σ·E(t)/Ē:
	// in proportion to the day's expected load E(t), Ē its mean over the
	// record, so that cold days with high loads vary more) or "bands" (one
	// σ per temperature band). The fit chooses by AIC.
	Scale    string  `json:"scale,omitempty"`
	MeanLoad float64 `json:"mean_expected_load,omitempty"` // Ē, for Scale "load"
	// BandEdges and BandSigma give, for Scale "bands", the sd of each
	// temperature band: BandSigma[i] below BandEdges[i] (and above the edge
	// before), the last above the last edge (temperature units).
	BandEdges []float64    `json:"band_edges,omitempty"`
	BandSigma []float64    `json:"band_sigma,omitempty"`
	Choice    []NoiseScore `json:"scale_choice,omitempty"`
	// Cold compares, on the coldest 5 % of the record's days, the sd of the
	// innovations with what the chosen scale gives there.
	Cold *NoiseCheck `json:"cold_days_check,omitempty"`
}

// NoiseScore is one candidate scale of the demand noise with its Gaussian
// log-likelihood on the innovations.
type NoiseScore struct {
	Scale  string  `json:"scale"`
	Sigma  float64 `json:"sigma"`
	LogLik float64 `json:"loglik"`
	Params int     `json:"params"`
	AIC    float64 `json:"aic"`
	Chosen bool    `json:"chosen"`
}

// NoiseCheck is the spread of the innovations on the coldest days against
// the spread the noise model gives them.
type NoiseCheck struct {
	Days     int     `json:"days"`
	Below    float64 `json:"temperature_below"` // the days with a mean below this
	Observed float64 `json:"observed_sd"`
	Model    float64 `json:"model_sd"`
}

// NoiseSigma returns the innovations' sd on a day whose expected load is
// e and whose mean temperature is t: σ, σ·e/Ē for the load scale, or the
// sd of t's band.
func (n DemandNoise) NoiseSigma(e, t float64) float64 {
	switch n.Scale {
	case "load":
		if n.MeanLoad > 0 {
			return n.Sigma * math.Max(e, 0) / n.MeanLoad
		}
	case "bands":
		i := 0
		for i < len(n.BandEdges) && t >= n.BandEdges[i] {
			i++
		}
		if i < len(n.BandSigma) {
			return n.BandSigma[i]
		}
	}
	return n.Sigma
}

// DemandSE holds ordinary least-squares standard errors, conditional on
// the balance points. Weekday[0] (Monday, the reference) is 0; Holiday is 0
// when no holiday was in the data.
type DemandSE struct {
	Intercept float64    `json:"intercept"`
	Weekday   [7]float64 `json:"weekday"`
	Holiday   float64    `json:"holiday"`
}

// DemandFit describes how well the model reproduces the data it was fitted
// to. CV(RMSE) and NMBE are in percent, as ASHRAE Guideline 14 states them:
//
//	CV(RMSE) = 100 · √(Σ(yᵢ − ŷᵢ)² / (n − p)) / ȳ
//	NMBE     = 100 · Σ(yᵢ − ŷᵢ) / ((n − p) · ȳ)
//
// with n days and p the model's parameters (coefficients and balance
// points).
type DemandFit struct {
	N          int     `json:"n"`          // days in the fit
	Parameters int     `json:"parameters"` // p: coefficients + balance points
	R2         float64 `json:"r2"`
	RMSE       float64 `json:"rmse"`      // √(RSS/(n − p)), Unit
	MeanLoad   float64 `json:"mean_load"` // ȳ, Unit
	CVRMSE     float64 `json:"cv_rmse"`   // percent
	NMBE       float64 `json:"nmbe"`      // percent
	BIC        float64 `json:"bic"`
	Guideline  string  `json:"guideline"` // the edition and levels used
	// Checks compare CV(RMSE) and NMBE with the guideline's calibration
	// levels: the daily fit, its monthly sums, and a held-out final year.
	Checks []GuidelineCheck `json:"checks"`
}

// GuidelineCheck is one comparison of CV(RMSE) and NMBE (percent) with an
// acceptance level of ASHRAE Guideline 14.
type GuidelineCheck struct {
	// Data says what was compared: "daily, in sample", "monthly sums, in
	// sample" (calendar months every day of which was fitted) or "daily,
	// held out: FIRST to LAST" (the last year, predicted by a refit to the
	// days before it).
	Data      string  `json:"data"`
	N         int     `json:"n"`     // values compared
	P         int     `json:"p"`     // parameters subtracted in the denominators
	Level     string  `json:"level"` // "hourly" or "monthly": which of the guideline's levels
	CVRMSE    float64 `json:"cv_rmse"`
	NMBE      float64 `json:"nmbe"`
	CVRMSEMax float64 `json:"cv_rmse_max"`
	NMBEMax   float64 `json:"nmbe_max"` // |NMBE| at most this
	Pass      bool    `json:"pass"`
}

// DemandData describes the records the model was fitted to.
type DemandData struct {
	DemandFile        string `json:"demand_file"`
	DemandSHA256      string `json:"demand_sha256"`
	TemperatureFile   string `json:"temperature_file"`
	TemperatureSHA256 string `json:"temperature_sha256"`
	HolidaysFile      string `json:"holidays_file,omitempty"`
	// HolidayColumn is the demand file's holiday column, "" without one.
	HolidayColumn string        `json:"holiday_column,omitempty"`
	FirstDate     calendar.Date `json:"first_date"` // first day used
	LastDate      calendar.Date `json:"last_date"`  // last day used
	Rows          int           `json:"rows"`       // data rows of the demand file
	Days          int           `json:"days"`       // days used in the fit
	MissingLoad   int           `json:"missing_load"`
	// MissingTemperature counts days with a load but no temperature,
	// dropped from the fit.
	MissingTemperature int `json:"missing_temperature"`
	Holidays           int `json:"holidays"` // holiday days among those used
	// HolidayListDates and HolidayRules describe the holiday list
	// (HolidaysFile), when one was given: how many dates it lists as such,
	// and its yearly rules in words ("fourth Thursday of November").
	HolidayListDates int      `json:"holiday_list_dates,omitempty"`
	HolidayRules     []string `json:"holiday_rules,omitempty"`
}

// FormScore is one row of the form table: the best fit of a form over the
// balance-point grid. Form "constant" is the model without temperature.
type FormScore struct {
	Form          string    `json:"form"`
	BalancePoints []float64 `json:"balance_points"` // TbH and/or TbC; one value for heating-and-cooling
	Slopes        []float64 `json:"slopes"`         // βH and/or βC
	RSS           float64   `json:"rss"`
	Parameters    int       `json:"parameters"` // coefficients + balance points
	BIC           float64   `json:"bic"`
	// Valid is false when a slope is not positive; such a form is never
	// chosen automatically.
	Valid  bool   `json:"valid"`
	Note   string `json:"note,omitempty"`
	Chosen bool   `json:"chosen"`
}

// DemandProfile is the grid search's minimum residual sum of squares at each
// balance point from Start in steps of Step: for a one-sided form over its balance
// point (Side "heating" or "cooling"), for the heating-and-cooling form over its one balance
// point (Side "both"), for the heating-and-cooling-band form over one balance point, minimised over
// the other (one profile with Side "heating", one with "cooling").
type DemandProfile struct {
	Form  string    `json:"form"`
	Side  string    `json:"side"`
	Start float64   `json:"start"`
	Step  float64   `json:"step"`
	RSS   []float64 `json:"rss"` // NaN-free; a grid point without a fit holds the largest value
}

// DemandDiagnostics describe the residuals of the fit.
type DemandDiagnostics struct {
	ACF1 float64 `json:"acf1"` // lag-1 autocorrelation of the residuals
	// LjungBoxResiduals tests the residuals u (lag 10); LjungBoxInnovations
	// the AR(1) innovations z·σ (lag 10, one fitted coefficient).
	LjungBoxResiduals   Test    `json:"ljung_box_residuals_10"`
	LjungBoxInnovations Test    `json:"ljung_box_innovations_10"`
	JarqueBera          Test    `json:"jarque_bera_innovations"`
	Skewness            float64 `json:"skewness_innovations"`
	ExcessKurtosis      float64 `json:"excess_kurtosis_innovations"`
	// SearchRange is the balance-point grid: the 5th and 95th percentiles
	// of the fitted days' temperatures, rounded inwards to the step.
	SearchRange [2]float64 `json:"search_range"`
	SearchStep  float64    `json:"search_step"`
}

// Expected returns the deterministic part of the demand,
// β0 + w(weekday) + βhol·holiday + βH·max(TbH − T, 0) + βC·max(T − TbC, 0),
// for a day of mean temperature t (in TemperatureUnits). It does not
// allocate. It panics if weekday is not in time.Sunday..time.Saturday.
func (d *Demand) Expected(t float64, weekday time.Weekday, holiday bool) float64 {
	if uint(weekday) > uint(time.Saturday) {
		panic("model: weekday out of range")
	}
	v := d.Intercept + d.Weekday[(weekday+6)%7]
	if holiday {
		v += d.Holiday
	}
	if d.Heating.Present && t < d.Heating.BalancePoint {
		v += d.Heating.Slope * (d.Heating.BalancePoint - t)
	}
	if d.Cooling.Present && t > d.Cooling.BalancePoint {
		v += d.Cooling.Slope * (t - d.Cooling.BalancePoint)
	}
	return v
}

// CheckUnits returns an error unless units (a temperature model's
// data.units, "C" or "F") are the demand model's temperature units.
func (d *Demand) CheckUnits(units string) error {
	if units != d.TemperatureUnits {
		return fmt.Errorf("model: the demand model's balance points are in %s but the temperatures are in %s: refit one of them in the other's units",
			Units(d.TemperatureUnits).Symbol(), Units(units).Symbol())
	}
	return nil
}

// demandRequired are the dotted paths every demand file must carry (the
// heating and cooling keys are checked against the form in Validate).
var demandRequired = []string{
	"schema", "schema_version", "unit", "temperature_units", "form",
	"intercept", "weekday", "holiday", "heating", "cooling",
	"noise.phi", "noise.sigma", "fit.cv_rmse", "fit.nmbe",
}

// ReadDemand reads and validates a demand model file.
func ReadDemand(path string) (*Demand, error) {
	b, err := os.ReadFile(path)
	if err != nil {
		return nil, err
	}
	return DecodeDemand(b, path)
}

// DecodeDemand parses and validates demand-model JSON; name is used in
// messages. Errors about the content are *KeyError naming the key and wrap
// ErrInvalid.
func DecodeDemand(b []byte, name string) (*Demand, error) {
	raw, err := decodeHeader(b, name, DemandSchema, DemandSchemaVersion, demandRequired, "demand model file")
	if err != nil {
		return nil, err
	}
	if w, ok := raw["weekday"].([]any); !ok || len(w) != 7 {
		return nil, &KeyError{name, "weekday", "want 7 values, Monday first"}
	}
	formName, _ := raw["form"].(string)
	form := DemandForm(formName)
	if !form.Valid() {
		return nil, &KeyError{name, "form", fmt.Sprintf("is %q, want one of %s", raw["form"], strings.Join(DemandFormNames(), ", "))}
	}
	for _, sd := range []struct {
		side string
		has  bool
	}{{"heating", form.HasHeating()}, {"cooling", form.HasCooling()}} {
		side, has := sd.side, sd.has
		sub, _ := raw[side].(map[string]any)
		for _, k := range []string{"balance_point", "slope"} {
			v, ok := sub[k]
			switch {
			case !ok:
				return nil, &KeyError{name, side + "." + k, "missing (null when the form has no " + side + " side)"}
			case has && v == nil:
				return nil, &KeyError{name, side + "." + k, fmt.Sprintf("is null, but form %q has a %s side", form, side)}
			case !has && v != nil:
				return nil, &KeyError{name, side + "." + k, fmt.Sprintf("must be null: form %q has no %s side", form, side)}
			}
		}
	}
	var d Demand
	if err := decodeStrict(b, name, &d); err != nil {
		return nil, err
	}
	if d.Warnings == nil {
		d.Warnings = []string{}
	}
	if err := d.Validate(name); err != nil {
		return nil, err
	}
	return &d, nil
}

// Validate checks that the parameters describe a model the simulator can
// run: a known form with the sides it implies, finite coefficients,
// TbH ≤ TbC (equal for heating-and-cooling), |φ| < 1 and σ > 0. name is used in messages.
func (d *Demand) Validate(name string) error {
	bad := func(key, format string, a ...any) error {
		return &KeyError{name, key, fmt.Sprintf(format, a...)}
	}
	if strings.TrimSpace(d.Unit) == "" {
		return bad("unit", "empty: state the demand unit, e.g. \"GJ/day\"")
	}
	if !Units(d.TemperatureUnits).Valid() {
		return bad("temperature_units", "is %q, want \"C\" or \"F\"", d.TemperatureUnits)
	}
	form := DemandForm(d.Form)
	if !form.Valid() {
		return bad("form", "is %q, want one of %s", d.Form, strings.Join(DemandFormNames(), ", "))
	}
	if d.Heating.Present != form.HasHeating() {
		return bad("heating.balance_point", "does not match form %q", d.Form)
	}
	if d.Cooling.Present != form.HasCooling() {
		return bad("cooling.balance_point", "does not match form %q", d.Form)
	}
	// Loads are bounded by maxLoad: far beyond any send-out, and small
	// enough that a year's sums and their squares stay finite.
	if !(d.Intercept >= 0 && d.Intercept <= maxLoad) {
		return bad("intercept", "%v: want a base load from 0 to 10¹⁵ (demand at the balance point, on a Monday)", d.Intercept)
	}
	for i, v := range d.Weekday {
		if !(math.Abs(v) <= maxLoad) {
			return bad(fmt.Sprintf("weekday[%d]", i), "%v: want a finite effect within ±10¹⁵", v)
		}
	}
	if !(math.Abs(d.Holiday) <= maxLoad) {
		return bad("holiday", "%v: want a finite effect within ±10¹⁵", d.Holiday)
	}
	for _, side := range []struct {
		key string
		c   ChangePoint
	}{{"heating", d.Heating}, {"cooling", d.Cooling}} {
		if !side.c.Present {
			continue
		}
		if !finite(side.c.BalancePoint) || math.Abs(side.c.BalancePoint) > 200 {
			return bad(side.key+".balance_point", "%v is not a plausible temperature", side.c.BalancePoint)
		}
		// A slope of the wrong sign is taken (a form fixed by the user may
		// fit one, with the fit's warning); the run warns of it.
		if !(math.Abs(side.c.Slope) <= maxLoad) {
			return bad(side.key+".slope", "%v: want a finite slope within ±10¹⁵ per degree", side.c.Slope)
		}
	}
	switch d.Form {
	case FormHeatingCooling:
		if d.Heating.BalancePoint != d.Cooling.BalancePoint {
			return bad("cooling.balance_point", "%v differs from heating.balance_point %v: the heating-and-cooling form has one balance point",
				d.Cooling.BalancePoint, d.Heating.BalancePoint)
		}
	case FormHeatingCoolingBand:
		if d.Heating.BalancePoint > d.Cooling.BalancePoint {
			return bad("cooling.balance_point", "%v is below heating.balance_point %v: the heating-and-cooling-band form needs TbH ≤ TbC",
				d.Cooling.BalancePoint, d.Heating.BalancePoint)
		}
	}
	if !finite(d.Noise.Phi) || math.Abs(d.Noise.Phi) >= 1 {
		return bad("noise.phi", "φ = %v, must be in (−1, 1) for a stationary AR(1)", d.Noise.Phi)
	}
	switch d.Noise.Scale {
	case "", "constant":
	case "load":
		if !(d.Noise.MeanLoad > 0) || !finite(d.Noise.MeanLoad) {
			return bad("noise.mean_expected_load", "%v, must be positive for the load scale", d.Noise.MeanLoad)
		}
	case "bands":
		if len(d.Noise.BandSigma) != len(d.Noise.BandEdges)+1 || len(d.Noise.BandEdges) == 0 {
			return bad("noise.band_sigma", "want one σ more than band_edges")
		}
		for i, v := range d.Noise.BandSigma {
			if !(v > 0) || !finite(v) {
				return bad(fmt.Sprintf("noise.band_sigma[%d]", i), "σ = %v, must be positive and finite", v)
			}
		}
		for i, v := range d.Noise.BandEdges {
			if !finite(v) || i > 0 && v <= d.Noise.BandEdges[i-1] {
				return bad("noise.band_edges", "must be finite and increasing")
			}
		}
	default:
		return bad("noise.scale", "is %q, want \"constant\", \"load\" or \"bands\"", d.Noise.Scale)
	}
	if !(d.Noise.Sigma > 0) || !finite(d.Noise.Sigma) {
		return bad("noise.sigma", "σ = %v, must be positive and finite", d.Noise.Sigma)
	}
	if !finite(d.Noise.Last) {
		return bad("noise.last_residual", "not a finite number")
	}
	return nil
}

// Write writes the demand model file atomically (a temporary file renamed
// into place).
func (d *Demand) Write(path string) error {
	b, err := d.MarshalIndent()
	if err != nil {
		return err
	}
	return atomicfile.WriteFile(path, b)
}

// MarshalIndent returns the file's JSON, indented, with a final newline.
func (d *Demand) MarshalIndent() ([]byte, error) {
	c := *d
	if c.Warnings == nil {
		c.Warnings = []string{}
	}
	b, err := json.MarshalIndent(&c, "", "  ")
	if err != nil {
		return nil, fmt.Errorf("model: encoding the demand model: %w", err)
	}
	return append(b, '\n'), nil
}
