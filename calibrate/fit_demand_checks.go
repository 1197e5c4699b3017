package calibrate

import (
	"fmt"
	"math"
	"slices"

	"wxstress/calendar"
	"wxstress/model"
)

// ASHRAE Guideline 14's calibration checks of the demand fit: CV(RMSE) and
// NMBE in sample, on calendar-month sums and on a held-out final year.

// Calibration acceptance levels of ASHRAE Guideline 14-2014 (Measurement of
// Energy, Demand, and Water Savings), from memory: a calibrated model has
// |NMBE| ≤ 5 % and CV(RMSE) ≤ 15 % on monthly data, |NMBE| ≤ 10 % and
// CV(RMSE) ≤ 30 % on hourly data. The guideline states no daily level; wxstress
// holds daily values to the hourly levels (daily residuals keep the day-to-day
// weather noise that monthly sums average out) and the daily fit's calendar-
// month sums to the monthly levels.
const (
	MonthlyCVRMSEMax = 15.0
	MonthlyNMBEMax   = 5.0
	HourlyCVRMSEMax  = 30.0
	HourlyNMBEMax    = 10.0
	// GuidelineEdition names the source of the definitions and levels
	// (the levels are quoted from memory; the README's sources say so).
	GuidelineEdition = "ASHRAE Guideline 14-2014: CV(RMSE) = 100·√(Σ(y−ŷ)²/(n−p))/ȳ, " +
		"NMBE = 100·Σ(y−ŷ)/((n−p)·ȳ); calibration levels CV(RMSE) ≤ 15 %, |NMBE| ≤ 5 % for monthly data and " +
		"CV(RMSE) ≤ 30 %, |NMBE| ≤ 10 % for hourly data; daily values are held to the hourly levels, " +
		"monthly sums of the daily fit to the monthly levels"
)

// holdoutDays is the length of the held-out final stretch of the
// out-of-sample check.
const holdoutDays = 365

// CVRMSE returns the coefficient of variation of the root-mean-square error
// in percent, as ASHRAE Guideline 14 defines it:
// 100·√(Σ(yᵢ − ŷᵢ)²/(n − p))/ȳ. It panics if the lengths differ or p ≥ n.
func CVRMSE(observed, predicted []float64, p int) float64 {
	n, mean := checkGuidelineArgs(observed, predicted, p)
	ss := 0.0
	for i, y := range observed {
		r := y - predicted[i]
		ss += r * r
	}
	return 100 * math.Sqrt(ss/float64(n-p)) / mean
}

// NMBE returns the normalized mean bias error in percent, as ASHRAE
// Guideline 14 defines it: 100·Σ(yᵢ − ŷᵢ)/((n − p)·ȳ); positive when the
// model predicts too little. It panics if the lengths differ or p ≥ n.
func NMBE(observed, predicted []float64, p int) float64 {
	n, mean := checkGuidelineArgs(observed, predicted, p)
	s := 0.0
	for i, y := range observed {
		s += y - predicted[i]
	}
	return 100 * s / (float64(n-p) * mean)
}

func checkGuidelineArgs(observed, predicted []float64, p int) (n int, mean float64) {
	n = len(observed)
	if len(predicted) != n {
		panic("calibrate: observed and predicted differ in length")
	}
	if p < 0 || p >= n {
		panic("calibrate: parameter count must be in 0..n−1")
	}
	for _, y := range observed {
		mean += y
	}
	return n, mean / float64(n)
}

// guidelineCheck compares CV(RMSE) and NMBE with the guideline's levels
// for data of level ("monthly" or "hourly").
func guidelineCheck(data string, n, p int, level string, cv, nmbe float64) model.GuidelineCheck {
	c := model.GuidelineCheck{Data: data, N: n, P: p, Level: level, CVRMSE: cv, NMBE: nmbe}
	switch level {
	case "monthly":
		c.CVRMSEMax, c.NMBEMax = MonthlyCVRMSEMax, MonthlyNMBEMax
	default:
		c.CVRMSEMax, c.NMBEMax = HourlyCVRMSEMax, HourlyNMBEMax
	}
	c.Pass = cv <= c.CVRMSEMax && math.Abs(nmbe) <= c.NMBEMax
	return c
}

// monthlyCheck sums the loads and the fitted values over each calendar month
// whose every day was fitted, and compares them with the guideline's monthly
// levels. The parameters were fitted to days, not to these sums, so no
// degrees of freedom are subtracted (p = 0). It needs three such months.
func monthlyCheck(days *DemandDays, fitted []float64) (model.GuidelineCheck, bool) {
	var obs, pred []float64
	for i := 0; i < len(days.Dates); {
		y, mo, _ := days.Dates[i].YMD()
		start := calendar.FromYMD(y, mo, 1)
		end := calendar.FromYMD(y, mo+1, 1) - 1
		j, so, sp := i, 0.0, 0.0
		for j < len(days.Dates) && days.Dates[j] <= end {
			so += days.Load[j]
			sp += fitted[j]
			j++
		}
		if days.Dates[i] == start && j-i == int(end-start)+1 {
			obs, pred = append(obs, so), append(pred, sp)
		}
		i = j
	}
	if len(obs) < 3 {
		return model.GuidelineCheck{}, false
	}
	return guidelineCheck("monthly sums, in sample", len(obs), 0, "monthly", CVRMSE(obs, pred, 0), NMBE(obs, pred, 0)), true
}

// holdoutCheck refits the form (grid search included) to all but the last
// holdoutDays days and predicts those; the predictions were not fitted to
// them, so p = 0. It needs MinDemandDays days before the held-out stretch.
func holdoutCheck(days *DemandDays, form string) (model.GuidelineCheck, bool) {
	n := len(days.Dates)
	cut := days.Dates[n-1] - holdoutDays
	split, _ := slices.BinarySearch(days.Dates, cut+1)
	if split < MinDemandDays || n-split < holdoutDays/2 {
		return model.GuidelineCheck{}, false
	}
	f, err := newDemandFitter(days.Dates[:split], days.Temp[:split], days.Load[:split], days.Holiday[:split])
	if err != nil {
		return model.GuidelineCheck{}, false
	}
	b := f.search(form)
	if !b.ok {
		return model.GuidelineCheck{}, false
	}
	fit, err := f.olsAt(form, b.tbH, b.tbC)
	if err != nil {
		return model.GuidelineCheck{}, false
	}
	var m model.Demand
	f.fill(&m, form, fit, b.tbH, b.tbC)
	pred := make([]float64, n-split)
	for i := split; i < n; i++ {
		pred[i-split] = m.Expected(days.Temp[i], days.Dates[i].Weekday(), days.Holiday[i])
	}
	data := fmt.Sprintf("daily, held out: %s to %s", days.Dates[split], days.Dates[n-1])
	return guidelineCheck(data, n-split, 0, "hourly", CVRMSE(days.Load[split:], pred, 0), NMBE(days.Load[split:], pred, 0)), true
}
