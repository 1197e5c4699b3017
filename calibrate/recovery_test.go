package calibrate

import (
	"bytes"
	"math"
	"math/rand/v2"
	"testing"
	"time"

	"wxstress/calendar"
	"wxstress/demo"
	"wxstress/model"
)

// TestRecoversDemoTruth fits the invented Kestrel Bay record, whose
// generating parameters are in demo/TRUTH.md (written by demo/gen), and
// checks that the fit finds them. Tolerances are a few standard errors of
// each estimate on 71 years of data, stated beside each check. The record
// also has a slow component (persistence 0.985, sd 0.6 °C), which the fit
// must find beside the fast AR(1) of φ = 0.72.
func TestRecoversDemoTruth(t *testing.T) {
	if testing.Short() {
		t.Skip("fits the 71-year demo record")
	}
	t.Parallel()
	s, err := ReadCSV(bytes.NewReader(demo.Station()), demo.StationFile, ReadOptions{Units: Celsius})
	if err != nil {
		t.Fatal(err)
	}
	res, err := Fit(s, nil)
	if err != nil {
		t.Fatal(err)
	}
	m := res.Model
	check := func(what string, got, want, tol float64) {
		t.Helper()
		if math.Abs(got-want) > tol {
			t.Errorf("%s = %.4f, truth %.4f (tolerance %.4f)", what, got, want, tol)
		}
	}
	// Annual means scatter ≈ 0.56 °C about the trend: s.e. of a 71-year
	// slope ≈ 0.032 °C/decade; three of them ≈ 0.1.
	check("trend per decade", m.Trend.Estimate.PerDecade, 0.2, 0.1)
	check("annual amplitude", m.Seasonal.Harmonics[0].Amplitude, 11.0, 0.15)
	check("peak day of the annual harmonic", m.Seasonal.Harmonics[0].PeakDayOfYear, 206, 2)
	if len(m.Seasonal.Harmonics) < 2 {
		t.Errorf("BIC kept %d harmonics; the truth has a second one of 0.8 °C", len(m.Seasonal.Harmonics))
	}
	if len(m.AR.Phi) != 1 {
		t.Errorf("BIC chose AR(%d); the truth's fast part is an AR(1)", len(m.AR.Phi))
	}
	check("fast φ", m.AR.Phi[0], 0.72, 0.015)
	// The tolerances for the slow part: ±0.01 and ±0.2 °C (its
	// standard errors here are about 0.004 and 0.1).
	if m.Slow == nil {
		t.Fatalf("slow part not kept: %+v", m.Diagnostics.SlowChoice)
	}
	check("φ_slow", m.Slow.Phi, 0.985, 0.01)
	check("sd of the slow part", m.Slow.SD, 0.6, 0.2)
	for _, w := range m.Diagnostics.Spread {
		if w.Verdict != "inside" {
			t.Errorf("%d-day spread: observed %.3f, band %.3f–%.3f: %s", w.Days, w.Observed, w.Band[0], w.Band[1], w.Verdict)
		}
	}
	// σ(t) = 2.35 + 0.65 cos(ω(t − 14)): about 2.99 in January, 1.71 in July.
	check("σ January", m.Volatility.Monthly[0], 2.99, 0.12)
	check("σ July", m.Volatility.Monthly[6], 1.71, 0.10)
	if m.Shocks.Family != model.FamilySkewT {
		t.Errorf("AIC chose %s; the truth is a skewed t", m.Shocks.Family)
	}
	check("ν", m.Shocks.DF, 10, 2.5)
	check("ξ", m.Shocks.Skew, 0.85, 0.03)
	if m.Data.Missing != 15 || m.Data.LongestGap != 6 {
		t.Errorf("gaps: %d missing, longest %d; the truth has 15 and 6", m.Data.Missing, m.Data.LongestGap)
	}
}

// TestPeriodDrift is the reason the period is 365.25 days (common practice):
// on a 160-year series whose cycle follows the calendar, a harmonic fitted
// with a 365-day period puts the seasonal peak about a quarter day later for
// every year from the epoch, ≈ 37 days between the first and the last
// decade; with 365.25 days the peak stays put (to within the one-day step of
// the skipped leap day of 1900).
func TestPeriodDrift(t *testing.T) {
	t.Parallel()
	r := rand.New(rand.NewPCG(1, 2))
	start := calendar.FromYMD(1861, time.January, 1)
	end := calendar.FromYMD(2020, time.December, 31)
	s := &Series{Name: "synthetic", Start: start, Units: Celsius}
	for d := start; d <= end; d++ {
		// Warmest on 20 July (day 201) every calendar year.
		phase := 2 * math.Pi * float64(d.DayOfYear()-201) / float64(calendar.DaysIn(d.Year()))
		s.Temps = append(s.Temps, 10+11*math.Cos(phase)+r.NormFloat64())
	}
	decade := func(from int) []int {
		var idx []int
		for i := range s.Temps {
			if y := s.Date(i).Year(); y >= from && y < from+10 {
				idx = append(idx, i)
			}
		}
		return idx
	}
	peak := func(idx []int, period float64) float64 {
		fit, err := ols(design(s, idx, 1, false, period), values(s, idx))
		if err != nil {
			t.Fatal(err)
		}
		_, se := meanParams(fit, 1, false, period)
		return se.Harmonics[0].PeakDayOfYear
	}
	for _, c := range []struct {
		period   float64
		lo, hi   float64
		describe string
	}{
		{365, 33, 42, "a quarter day a year over 150 years"},
		// 1900 was not a leap year (the Gregorian century rule), so the
		// 1860s sit one day off a 365.25-day cycle: a step of one day, not
		// a drift.
		{calendar.DaysPerYear, -1.5, 1.5, "no drift beyond the 1900 calendar step"},
	} {
		drift := peak(decade(2011), c.period) - peak(decade(1861), c.period)
		if drift < c.lo || drift > c.hi {
			t.Errorf("period %.2f: the peak moved %.1f days from the 1860s to the 2010s; want %s (%.0f..%.0f)",
				c.period, drift, c.describe, c.lo, c.hi)
		}
	}
}
