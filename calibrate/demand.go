package calibrate

import (
	"fmt"
	"math"
	"slices"
	"strings"
	"time"

	"gonum.org/v1/gonum/mat"

	"wxstress/calendar"
	"wxstress/diagnose"
	"wxstress/model"
)

// The demand model (see model.Demand):
//
//	D(t) = β0 + Σ weekday dummies + βhol·holiday + βH·max(TbH − T, 0) + βC·max(T − TbC, 0) + u(t)
//
// with Monday the reference day, u(t) an AR(1). The change-point forms are
// the inverse models of ASHRAE Guideline 14 (3p heating, 3p cooling, 4p with
// one balance point and a slope on either side, 5p with TbH ≤ TbC and a flat
// stretch between). Balance points come from a grid search, the other
// coefficients from ordinary least squares at each grid point.

// DemandSettings choose the demand model's form and record its unit. A nil
// *DemandSettings means the form is chosen by BIC and the unit is left empty
// (to be set before the model is written).
type DemandSettings struct {
	// Form is "" or "auto" (the valid change-point form with the lowest
	// BIC), or one of model.AllDemandForms to fix it.
	Form string
	// Unit is the demand unit as the user states it, e.g. "GJ/day"; it is
	// stored in the model and shown in reports.
	Unit string
}

// Balance-point search and acceptance levels.
const (
	// BalanceStep is the grid step of the balance-point search, in degrees
	// of the data's units.
	BalanceStep = 0.1
	// The search covers the balance points between these percentiles of
	// the fitted days' temperatures (R's default, type 7, definition): a
	// change point beyond them would rest on a twentieth of the days.
	searchLow, searchHigh = 0.05, 0.95
	// significantT is the |t| below which a slope is reported as not
	// significantly different from zero (about the 5 % two-sided level).
	significantT = 2.0
	// minNoisePairs is the fewest consecutive-day residual pairs behind φ.
	minNoisePairs = 30
	// maxProfilePoints is the largest grid whose RSS profiles are stored
	// in the model file.
	maxProfilePoints = 1000
	// holdoutDays is the length of the held-out final stretch of the
	// out-of-sample check.
	holdoutDays = 365
)

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
	// GuidelineEdition names the source of the definitions and levels.
	GuidelineEdition = "ASHRAE Guideline 14-2014 (from memory): CV(RMSE) = 100·√(Σ(y−ŷ)²/(n−p))/ȳ, " +
		"NMBE = 100·Σ(y−ŷ)/((n−p)·ȳ); calibration levels CV(RMSE) ≤ 15 %, |NMBE| ≤ 5 % for monthly data and " +
		"CV(RMSE) ≤ 30 %, |NMBE| ≤ 10 % for hourly data; daily values are held to the hourly levels, " +
		"monthly sums of the daily fit to the monthly levels"
)

// Validate checks the settings and names the valid choices.
func (s *DemandSettings) Validate() error {
	switch s.Form {
	case "", "auto":
		return nil
	}
	if !model.DemandForm(s.Form).Valid() {
		return fmt.Errorf("calibrate: demand form %q: want auto, %s", s.Form, strings.Join(model.DemandFormNames(), ", "))
	}
	return nil
}

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

// DemandDays are the days of a demand history that have both a load and a
// temperature, in date order.
type DemandDays struct {
	Dates   []calendar.Date
	Temp    []float64 // daily mean temperature, in Units
	Load    []float64
	Holiday []bool
	Units   Units
	// MissingTemperature counts the days with a load whose temperature is
	// missing (a gap in the temperature record); they are left out.
	MissingTemperature int
	Demand             *DemandSeries
	Temps              *Series
}

// JoinDemand pairs each demand day that has a load with its temperature.
// Every such day must lie within the temperature record; the first that does
// not is reported (as an ErrorList holding a *PosError at its date field,
// with the count of such days). A day whose temperature is missing is left
// out and counted. Fewer than MinDemandDays joined days is an error wrapping
// ErrFit.
func JoinDemand(d *DemandSeries, s *Series) (*DemandDays, error) {
	out := &DemandDays{Units: s.Units, Demand: d, Temps: s}
	first, outside := -1, 0
	for i, date := range d.Dates {
		if math.IsNaN(d.Load[i]) {
			continue
		}
		if date < s.Start || date > s.End() {
			outside++
			if first < 0 {
				first = i
			}
			continue
		}
		t := s.Temps[date-s.Start]
		if math.IsNaN(t) {
			out.MissingTemperature++
			continue
		}
		out.Dates = append(out.Dates, date)
		out.Temp = append(out.Temp, t)
		out.Load = append(out.Load, d.Load[i])
		out.Holiday = append(out.Holiday, d.Holiday[i])
	}
	if first >= 0 {
		more := ""
		if outside > 1 {
			more = fmt.Sprintf(" (%d demand days with a load are outside it)", outside)
		}
		return nil, ErrorList{{File: d.Name, Line: int(d.Line[first]), Column: int(d.Column[first]), Field: d.DateColumn,
			Msg: fmt.Sprintf("date %s is not covered by the temperature record %s (%s to %s)%s",
				d.Dates[first], s.Name, s.Start, s.End(), more)}}
	}
	if len(out.Dates) < MinDemandDays {
		return nil, fmt.Errorf("%s: %w: only %d demand days have both a load and a temperature in %s; at least %d are needed",
			d.Name, ErrFit, len(out.Dates), s.Name, MinDemandDays)
	}
	return out, nil
}

// DemandResult is a fitted demand model with the days it was fitted to.
type DemandResult struct {
	Model    *model.Demand
	Days     *DemandDays
	Fitted   []float64 // the deterministic part on each day
	Residual []float64 // u = load − fitted
}

// FitDemand fits the demand model to the joined days. The model's
// tool_version is left for the caller to set.
//
// For every form the balance points are searched on a grid of BalanceStep
// between the 5th and 95th percentiles of the temperatures (TbH ≤ TbC for
// 5p), with the other coefficients by least squares at each point, keeping
// the point of least residual sum of squares; forms are compared by BIC,
// counting each balance point as a parameter. With Form "auto" the form
// with the lowest BIC among those whose slopes are positive is chosen, and
// it must beat the constant model (no temperature terms) by BIC; otherwise
// FitDemand returns an error wrapping ErrFit. A fixed form is always
// fitted, and what would stop the automatic choice becomes a warning in the
// model.
func FitDemand(days *DemandDays, set *DemandSettings) (*DemandResult, error) {
	if set == nil {
		set = &DemandSettings{}
	}
	if err := set.Validate(); err != nil {
		return nil, err
	}
	name := days.Demand.Name
	f, err := newDemandFitter(days.Dates, days.Temp, days.Load, days.Holiday)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", name, err)
	}
	m := &model.Demand{
		Schema: model.DemandSchema, SchemaVersion: model.DemandSchemaVersion,
		Unit: set.Unit, TemperatureUnits: string(days.Units),
		Warnings: []string{},
	}

	// Every form's best grid point, and the constant model.
	constant := model.FormScore{Form: "constant", RSS: f.yy, Parameters: f.k, BIC: demandBIC(f.n, f.yy, f.k), Valid: true}
	m.Forms = append(m.Forms, constant)
	best := map[string]gridBest{}
	for _, form := range model.DemandFormNames() {
		b := f.search(form)
		best[form] = b
		m.Forms = append(m.Forms, b.score(form, f))
		if len(f.heat) <= maxProfilePoints {
			m.Profile = append(m.Profile, f.profiles(form, b)...)
		}
	}
	chosen, err := chooseForm(m, set.Form, constant)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", name, err)
	}
	m.Form = chosen
	b := best[chosen]
	if !b.ok {
		return nil, fmt.Errorf("%s: %w: the %s form has no usable balance point in the search range", name, ErrFit, chosen)
	}
	fit, err := f.olsAt(chosen, b.tbH, b.tbC)
	if err != nil {
		return nil, fmt.Errorf("%s: %w: %s form at the chosen balance points: %v", name, ErrFit, chosen, err)
	}
	f.fill(m, chosen, fit, b.tbH, b.tbC)

	res := &DemandResult{Model: m, Days: days, Fitted: make([]float64, f.n), Residual: make([]float64, f.n)}
	for i, date := range days.Dates {
		res.Fitted[i] = m.Expected(days.Temp[i], date.Weekday(), days.Holiday[i])
		res.Residual[i] = days.Load[i] - res.Fitted[i]
	}
	p := fit.k() + model.DemandForm(chosen).BalancePoints()
	mean := f.meanLoad()
	m.Fit = model.DemandFit{
		N: f.n, Parameters: p, R2: fit.R2(), RMSE: math.Sqrt(fit.RSS / float64(f.n-p)), MeanLoad: mean,
		CVRMSE: CVRMSE(days.Load, res.Fitted, p), NMBE: NMBE(days.Load, res.Fitted, p),
		BIC: demandBIC(f.n, fit.RSS, p), Guideline: GuidelineEdition,
	}
	m.Fit.Checks = append(m.Fit.Checks, guidelineCheck("daily, in sample", f.n, p, "hourly", m.Fit.CVRMSE, m.Fit.NMBE))
	if c, ok := monthlyCheck(days, res.Fitted); ok {
		m.Fit.Checks = append(m.Fit.Checks, c)
	}
	if c, ok := holdoutCheck(days, chosen); ok {
		m.Fit.Checks = append(m.Fit.Checks, c)
	}
	if err := fitNoise(m, days.Dates, res.Residual); err != nil {
		return nil, fmt.Errorf("%s: %w", name, err)
	}
	m.Data = demandData(days, f.n)
	m.Diagnostics.SearchRange = [2]float64{f.gridValue(0), f.gridValue(len(f.heat) - 1)}
	m.Diagnostics.SearchStep = BalanceStep
	m.Warnings = append(demandDataWarnings(days, f), m.Warnings...)
	warnFit(m, f, set.Form)
	return res, nil
}

// chooseForm picks the form and records the rule, or says why none fits.
func chooseForm(m *model.Demand, setting string, constant model.FormScore) (string, error) {
	var best *model.FormScore
	for i := range m.Forms[1:] {
		s := &m.Forms[i+1]
		if s.Valid && (best == nil || s.BIC < best.BIC) {
			best = s
		}
	}
	if setting != "" && setting != "auto" {
		for i := range m.Forms {
			if m.Forms[i].Form == setting {
				m.Forms[i].Chosen = true
			}
		}
		m.FormRule = "form fixed by the user"
		return setting, nil
	}
	if best == nil {
		var why []string
		for _, s := range m.Forms[1:] {
			why = append(why, s.Form+": "+s.Note)
		}
		return "", fmt.Errorf("%w: no change-point form fits: in every form's best fit a slope is not positive (%s); "+
			"demand does not rise with cold or with heat in these data", ErrFit, strings.Join(why, "; "))
	}
	if best.BIC >= constant.BIC {
		return "", fmt.Errorf("%w: demand shows no dependence on temperature: no change-point form beats the constant "+
			"model (weekday and holiday terms only) by BIC (best, %s: %.1f; constant: %.1f); fix the form to fit "+
			"one anyway", ErrFit, best.Form, best.BIC, constant.BIC)
	}
	best.Chosen = true
	m.FormRule = fmt.Sprintf("auto: lowest BIC among the forms with positive slopes (%s, %.1f below the constant model)",
		best.Form, constant.BIC-best.BIC)
	return best.Form, nil
}

// warnFit adds the warnings about the chosen fit: slopes that are not
// positive or not significant, a form no better than the constant model,
// balance points at the edge of the search range.
func warnFit(m *model.Demand, f *demandFitter, setting string) {
	warn := func(format string, a ...any) { m.Warnings = append(m.Warnings, fmt.Sprintf(format, a...)) }
	u := model.Units(m.TemperatureUnits).Symbol()
	for _, side := range []struct {
		name, sense string
		c           model.ChangePoint
	}{{"heating", "colder", m.Heating}, {"cooling", "warmer", m.Cooling}} {
		c := side.c
		if !c.Present {
			continue
		}
		if !(c.Slope > 0) {
			warn("the %s slope is %.4g %s per %s, not positive: demand does not rise as it gets %s, so the %s form does not suit these data",
				side.name, c.Slope, m.Unit, u, side.sense, m.Form)
		} else if c.SlopeSE > 0 && c.Slope/c.SlopeSE < significantT {
			warn("the %s slope (%.4g ± %.2g %s per %s) is not significantly different from zero (t = %.2f < %.0f)",
				side.name, c.Slope, c.SlopeSE, m.Unit, u, c.Slope/c.SlopeSE, significantT)
		}
		lo, hi := f.gridValue(0), f.gridValue(len(f.heat)-1)
		if c.BalancePoint <= lo || c.BalancePoint >= hi {
			warn("the %s balance point %.1f %s is at the edge of the search range %.1f to %.1f %s (the 5th to 95th "+
				"percentiles of temperature): the change point may lie outside the usual temperatures of the record",
				side.name, c.BalancePoint, u, lo, hi, u)
		}
	}
	if setting != "" && setting != "auto" {
		var con, mine model.FormScore
		for _, s := range m.Forms {
			switch s.Form {
			case "constant":
				con = s
			case m.Form:
				mine = s
			}
		}
		if mine.BIC >= con.BIC {
			warn("the %s form does not beat the constant model (weekday and holiday terms only) by BIC (%.1f against %.1f): "+
				"demand shows no clear dependence on temperature", m.Form, mine.BIC, con.BIC)
		}
	}
}

// demandDataWarnings reports what the data left out or could not inform.
func demandDataWarnings(days *DemandDays, f *demandFitter) []string {
	var w []string
	d := days.Demand
	w = append(w, d.Warnings...)
	for _, s := range days.Temps.Warnings {
		w = append(w, "temperatures: "+s)
	}
	if d.Missing > 0 {
		w = append(w, fmt.Sprintf("%d demand days have no load (gaps); they are left out", d.Missing))
	}
	if days.MissingTemperature > 0 {
		w = append(w, fmt.Sprintf("%d demand days have no temperature in %s; they are left out", days.MissingTemperature, days.Temps.Name))
	}
	if f.holCol < 0 {
		w = append(w, "no holidays in the fitted days: the holiday effect is not estimated (0); mark holidays with a holiday column or --holidays")
	}
	for wd := 1; wd < 7; wd++ {
		if f.wdCol[wd] < 0 {
			w = append(w, fmt.Sprintf("no %ss in the fitted days: their effect is not estimated (0)", weekdayName(wd)))
		}
	}
	return w
}

func demandData(days *DemandDays, n int) model.DemandData {
	d := days.Demand
	hol := 0
	for _, h := range days.Holiday {
		if h {
			hol++
		}
	}
	return model.DemandData{
		DemandFile: d.Name, DemandSHA256: d.SHA256,
		TemperatureFile: days.Temps.Name, TemperatureSHA256: days.Temps.SHA256,
		HolidaysFile: d.HolidaysFile, HolidayListDates: d.HolidayListDates, HolidayRules: d.HolidayRules,
		FirstDate: days.Dates[0], LastDate: days.Dates[n-1],
		Rows: len(d.Dates), Days: n, MissingLoad: d.Missing, MissingTemperature: days.MissingTemperature,
		Holidays: hol,
	}
}

// weekdayName returns the name of weekday i counted from Monday = 0.
func weekdayName(i int) string { return time.Weekday((i + 1) % 7).String() }

// demandBIC is the Gaussian BIC of a least-squares fit, n·ln(2π·RSS/n) + n + (k + 1)·ln n
// with k the coefficients and balance points (σ² counted too), as olsFit.BIC.
func demandBIC(n int, rss float64, k int) float64 {
	nf := float64(n)
	return nf*math.Log(2*math.Pi*rss/nf) + nf + float64(k+1)*math.Log(nf)
}

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

// fitNoise fits the AR(1) u(t) = φ·u(t−1) + σ·z(t) to the residuals by
// conditional least squares on consecutive fitted days, and fills the
// residual diagnostics.
func fitNoise(m *model.Demand, dates []calendar.Date, r []float64) error {
	var x, y []float64
	for i := 1; i < len(r); i++ {
		if dates[i] == dates[i-1]+1 {
			x, y = append(x, r[i-1]), append(y, r[i])
		}
	}
	if len(y) < minNoisePairs {
		return fmt.Errorf("%w: only %d pairs of consecutive days for the residuals' AR(1); at least %d needed",
			ErrFit, len(y), minNoisePairs)
	}
	ar, err := ols(mat.NewDense(len(x), 1, x), y)
	if err != nil {
		return fmt.Errorf("%w: residual AR(1): %v", ErrFit, err)
	}
	phi := ar.Beta[0]
	if !(math.Abs(phi) < 1) {
		return fmt.Errorf("%w: the residuals' AR(1) φ = %.4f is not stationary", ErrFit, phi)
	}
	sigma := math.Sqrt(ar.RSS / float64(ar.N-1))
	if !(sigma > 0) {
		return fmt.Errorf("%w: the residuals' AR(1) innovations have no spread (does the model fit exactly?)", ErrFit)
	}
	m.Noise = model.DemandNoise{Phi: phi, PhiSE: ar.SE[0], Sigma: sigma, Last: r[len(r)-1], Pairs: ar.N}

	// Residuals and innovations on a complete daily grid, NaN for gaps.
	first := dates[0]
	grid := make([]float64, int(dates[len(dates)-1]-first)+1)
	innov := make([]float64, len(grid))
	for i := range grid {
		grid[i], innov[i] = math.NaN(), math.NaN()
	}
	for i, d := range dates {
		grid[d-first] = r[i]
	}
	var e []float64
	for i := 1; i < len(grid); i++ {
		if !math.IsNaN(grid[i]) && !math.IsNaN(grid[i-1]) {
			innov[i] = grid[i] - phi*grid[i-1]
			e = append(e, innov[i])
		}
	}
	dg := &model.DemandDiagnostics{
		ACF1:                diagnose.ACF(grid, 1)[0],
		LjungBoxResiduals:   diagnose.LjungBox(grid, 10, 0),
		LjungBoxInnovations: diagnose.LjungBox(innov, 10, 1),
		JarqueBera:          diagnose.JarqueBera(e),
		Skewness:            diagnose.Skewness(e),
		ExcessKurtosis:      diagnose.ExcessKurtosis(e),
	}
	m.Diagnostics = dg
	for _, v := range []float64{dg.ACF1, dg.LjungBoxResiduals.P, dg.LjungBoxInnovations.P, dg.JarqueBera.P, dg.Skewness, dg.ExcessKurtosis} {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return fmt.Errorf("%w: residual diagnostics are undefined (constant residuals?)", ErrFit)
		}
	}
	return nil
}

// demandFitter holds what the grid search shares between grid points: the
// fixed regressors Z (intercept, weekday dummies, holiday), the load y and
// both residualised on Z, and, for every grid value g, the heating column
// h = max(g − T, 0) and cooling column c = max(T − g, 0) reduced to the
// few numbers the least-squares solution needs.
//
// By the Frisch–Waugh–Lovell theorem the residual sum of squares of y on
// [Z, h, c] is that of ỹ on [h̃, c̃], where ˜ is the residual on Z, so each
// grid point costs a 2×2 solve: h̃ᵀh̃, c̃ᵀc̃, h̃ᵀỹ and c̃ᵀỹ depend on one
// balance point only, and h̃ᵀc̃ = hᵀc − (Zᵀh)ᵀ(ZᵀZ)⁻¹(Zᵀc) where hᵀc = 0
// whenever TbH ≤ TbC (no day is both below TbH and above TbC).
type demandFitter struct {
	n, k   int
	dates  []calendar.Date
	temp   []float64
	y      []float64
	hol    []bool
	z      *mat.Dense
	qr     mat.QR
	wdCol  [7]int // column of each weekday's dummy (Monday = 0), -1 for none
	holCol int    // column of the holiday dummy, -1 for none
	yy     float64
	yt     []float64 // ỹ
	lo10   int       // first grid value in tenths of a degree
	heat   []gridSide
	cool   []gridSide
}

// gridSide is one change-point column at one grid value, reduced.
type gridSide struct {
	ok  bool      // the column is not (numerically) within the span of Z
	zt  []float64 // Zᵀx
	w   []float64 // (ZᵀZ)⁻¹Zᵀx, the least-squares coefficients of x on Z
	xx  float64   // x̃ᵀx̃
	xy  float64   // x̃ᵀỹ
	max float64   // largest |x|, for the scale of xx
}

func newDemandFitter(dates []calendar.Date, temp, load []float64, hol []bool) (*demandFitter, error) {
	n := len(dates)
	f := &demandFitter{n: n, dates: dates, temp: temp, y: load, hol: hol, holCol: -1}
	var count [7]int
	anyHol := false
	for i, d := range dates {
		count[(d.Weekday()+6)%7]++
		anyHol = anyHol || hol[i]
	}
	f.k = 1
	f.wdCol[0] = -1
	for wd := 1; wd < 7; wd++ {
		f.wdCol[wd] = -1
		if count[wd] > 0 {
			f.wdCol[wd] = f.k
			f.k++
		}
	}
	if anyHol {
		f.holCol = f.k
		f.k++
	}
	if n <= f.k+4 {
		return nil, fmt.Errorf("%w: %d days are too few for %d coefficients", ErrFit, n, f.k+4)
	}
	f.z = mat.NewDense(n, f.k, nil)
	for i, d := range dates {
		row := f.z.RawRowView(i)
		row[0] = 1
		if c := f.wdCol[(d.Weekday()+6)%7]; c > 0 {
			row[c] = 1
		}
		if hol[i] && f.holCol > 0 {
			row[f.holCol] = 1
		}
	}
	f.qr.Factorize(f.z)
	w, err := f.project(load)
	if err != nil {
		return nil, err
	}
	f.yt = make([]float64, n)
	for i := range load {
		f.yt[i] = load[i] - f.fitZ(i, w)
		f.yy += f.yt[i] * f.yt[i]
	}

	lo, hi := quantile7(temp, searchLow), quantile7(temp, searchHigh)
	f.lo10 = int(math.Ceil(roundTo(lo*10, 6)))
	hi10 := int(math.Floor(roundTo(hi*10, 6)))
	if hi10 <= f.lo10 {
		return nil, fmt.Errorf("%w: the temperatures hardly vary (5th to 95th percentile %.2f to %.2f): no balance point can be found",
			ErrFit, lo, hi)
	}
	g := hi10 - f.lo10 + 1
	f.heat, f.cool = make([]gridSide, g), make([]gridSide, g)
	x := make([]float64, n)
	for j := range g {
		tb := f.gridValue(j)
		for i, t := range temp {
			x[i] = max(tb-t, 0)
		}
		f.heat[j] = f.reduce(x)
		for i, t := range temp {
			x[i] = max(t-tb, 0)
		}
		f.cool[j] = f.reduce(x)
	}
	return f, nil
}

// gridValue returns the j-th grid balance point. Dividing whole tenths
// gives the same floating-point values as (lo:hi)/10 in R.
func (f *demandFitter) gridValue(j int) float64 { return float64(f.lo10+j) / 10 }

func roundTo(v float64, digits int) float64 {
	s := math.Pow(10, float64(digits))
	return math.Round(v*s) / s
}

// quantile7 is the p-quantile by linear interpolation between order
// statistics, R's quantile(type = 7). gonum's stat.Quantile offers types 1
// and 4 only; type 7 (R's and NumPy's default) keeps the balance-point search
// range identical to the R script that checks it.
func quantile7(x []float64, p float64) float64 {
	s := slices.Clone(x)
	slices.Sort(s)
	h := float64(len(s)-1) * p
	lo := int(math.Floor(h))
	if lo+1 >= len(s) {
		return s[len(s)-1]
	}
	return s[lo] + (h-float64(lo))*(s[lo+1]-s[lo])
}

// project returns the least-squares coefficients of v on Z.
func (f *demandFitter) project(v []float64) ([]float64, error) {
	var w mat.Dense
	if err := f.qr.SolveTo(&w, false, mat.NewVecDense(f.n, v)); err != nil {
		return nil, fmt.Errorf("%w: weekday and holiday terms: %v", ErrFit, errRankDeficient)
	}
	out := make([]float64, f.k)
	for j := range out {
		out[j] = w.At(j, 0)
	}
	return out, nil
}

// fitZ returns row i of Z times w.
func (f *demandFitter) fitZ(i int, w []float64) float64 {
	v := 0.0
	for j, zj := range f.z.RawRowView(i) {
		v += zj * w[j]
	}
	return v
}

// reduce residualises a change-point column x on Z.
func (f *demandFitter) reduce(x []float64) gridSide {
	s := gridSide{zt: make([]float64, f.k)}
	for i, v := range x {
		s.max = max(s.max, math.Abs(v))
		for j, zj := range f.z.RawRowView(i) {
			s.zt[j] += zj * v
		}
	}
	if s.max == 0 {
		return s
	}
	w, err := f.project(x)
	if err != nil {
		return s
	}
	s.w = w
	for i, v := range x {
		r := v - f.fitZ(i, w)
		s.xx += r * r
		s.xy += r * f.yt[i]
	}
	// A column (nearly) within the span of Z, e.g. nonzero on a single
	// day, carries no information about a slope.
	s.ok = s.xx > 1e-10*s.max*s.max*float64(f.n)
	return s
}

// gridBest is a form's best grid point.
type gridBest struct {
	ok       bool
	i, j     int // heating and cooling grid indexes (-1 when the form has no such side)
	tbH, tbC float64
	bH, bC   float64 // slopes
	rss      float64
	profH    []float64 // minimum RSS at each heating grid value (5p: over the cooling one)
	profC    []float64
}

// pair returns the RSS and slopes of y on [Z, h_i, c_j] for grid indexes
// with i ≤ j; ok is false for a degenerate pair.
func (f *demandFitter) pair(i, j int) (rss, bH, bC float64, ok bool) {
	h, c := &f.heat[i], &f.cool[j]
	if !h.ok || !c.ok {
		return 0, 0, 0, false
	}
	x := 0.0 // h̃ᵀc̃ = −(Zᵀh)ᵀ(ZᵀZ)⁻¹(Zᵀc), since hᵀc = 0 for TbH ≤ TbC
	for k, v := range h.zt {
		x -= v * c.w[k]
	}
	det := h.xx*c.xx - x*x
	if !(det > 1e-12*h.xx*c.xx) {
		return 0, 0, 0, false
	}
	bH = (c.xx*h.xy - x*c.xy) / det
	bC = (h.xx*c.xy - x*h.xy) / det
	return f.yy - (bH*h.xy + bC*c.xy), bH, bC, true
}

// search finds the form's grid point of least RSS (the first on ties).
func (f *demandFitter) search(form string) gridBest {
	g := len(f.heat)
	b := gridBest{i: -1, j: -1, rss: math.Inf(1)}
	profile := func() []float64 {
		p := make([]float64, g)
		for k := range p {
			p[k] = math.Inf(1)
		}
		return p
	}
	take := func(rss float64, i, j int, bH, bC float64) {
		if rss < b.rss {
			b = gridBest{ok: true, i: i, j: j, bH: bH, bC: bC, rss: rss, profH: b.profH, profC: b.profC}
		}
	}
	switch form {
	case model.Form3PHeating, model.Form3PCooling:
		sides := f.heat
		if form == model.Form3PCooling {
			sides = f.cool
		}
		prof := profile()
		for k, s := range sides {
			if !s.ok {
				continue
			}
			beta := s.xy / s.xx
			prof[k] = f.yy - beta*s.xy
			if form == model.Form3PHeating {
				take(prof[k], k, -1, beta, 0)
			} else {
				take(prof[k], -1, k, 0, beta)
			}
		}
		if form == model.Form3PHeating {
			b.profH = prof
		} else {
			b.profC = prof
		}
	case model.Form4P:
		prof := profile()
		for k := range g {
			if rss, bH, bC, ok := f.pair(k, k); ok {
				prof[k] = rss
				take(rss, k, k, bH, bC)
			}
		}
		b.profH = prof
	case model.Form5P:
		ph, pc := profile(), profile()
		for i := range g {
			for j := i; j < g; j++ {
				if rss, bH, bC, ok := f.pair(i, j); ok {
					ph[i] = min(ph[i], rss)
					pc[j] = min(pc[j], rss)
					take(rss, i, j, bH, bC)
				}
			}
		}
		b.profH, b.profC = ph, pc
	default:
		panic("calibrate: unknown demand form " + form)
	}
	if b.i >= 0 {
		b.tbH = f.gridValue(b.i)
	}
	if b.j >= 0 {
		b.tbC = f.gridValue(b.j)
	}
	return b
}

func (b gridBest) score(form string, f *demandFitter) model.FormScore {
	s := model.FormScore{Form: form, Parameters: f.k + model.DemandForm(form).Params()}
	if !b.ok {
		s.Note = "no usable balance point in the search range"
		return s
	}
	s.RSS = b.rss
	s.BIC = demandBIC(f.n, b.rss, s.Parameters)
	var bad []string
	switch form {
	case model.Form3PHeating:
		s.BalancePoints, s.Slopes = []float64{b.tbH}, []float64{b.bH}
	case model.Form3PCooling:
		s.BalancePoints, s.Slopes = []float64{b.tbC}, []float64{b.bC}
	case model.Form4P:
		s.BalancePoints, s.Slopes = []float64{b.tbH}, []float64{b.bH, b.bC}
	case model.Form5P:
		s.BalancePoints, s.Slopes = []float64{b.tbH, b.tbC}, []float64{b.bH, b.bC}
	}
	if model.DemandForm(form).HasHeating() && !(b.bH > 0) {
		bad = append(bad, fmt.Sprintf("heating slope %.4g is not positive", b.bH))
	}
	if model.DemandForm(form).HasCooling() && !(b.bC > 0) {
		bad = append(bad, fmt.Sprintf("cooling slope %.4g is not positive", b.bC))
	}
	s.Valid = len(bad) == 0
	s.Note = strings.Join(bad, "; ")
	return s
}

// profiles returns the RSS profiles of a form's search, with grid points
// that had no fit set to the largest value found (JSON has no infinity).
func (f *demandFitter) profiles(form string, b gridBest) []model.DemandProfile {
	var out []model.DemandProfile
	for _, p := range []struct {
		side string
		rss  []float64
	}{{"heating", b.profH}, {"cooling", b.profC}} {
		if p.rss == nil {
			continue
		}
		side := p.side
		if form == model.Form4P {
			side = "both"
		}
		top := 0.0
		for _, v := range p.rss {
			if !math.IsInf(v, 1) {
				top = max(top, v)
			}
		}
		rss := slices.Clone(p.rss)
		for k, v := range rss {
			if math.IsInf(v, 1) {
				rss[k] = top
			}
		}
		out = append(out, model.DemandProfile{Form: form, Side: side, Start: f.gridValue(0), Step: BalanceStep, RSS: rss})
	}
	return out
}

// design returns [Z, h, c] for the form at the balance points (columns
// absent from the form are left out).
func (f *demandFitter) design(form string, tbH, tbC float64) *mat.Dense {
	cols := f.k + model.DemandForm(form).Slopes()
	x := mat.NewDense(f.n, cols, nil)
	for i, t := range f.temp {
		row := x.RawRowView(i)
		copy(row, f.z.RawRowView(i))
		c := f.k
		if model.DemandForm(form).HasHeating() {
			row[c] = max(tbH-t, 0)
			c++
		}
		if model.DemandForm(form).HasCooling() {
			if form == model.Form4P {
				tbC = tbH
			}
			row[c] = max(t-tbC, 0)
		}
	}
	return x
}

// olsAt fits the form at fixed balance points by QR least squares.
func (f *demandFitter) olsAt(form string, tbH, tbC float64) (olsFit, error) {
	return ols(f.design(form, tbH, tbC), f.y)
}

// fill copies a fit's coefficients into the model.
func (f *demandFitter) fill(m *model.Demand, form string, fit olsFit, tbH, tbC float64) {
	m.Intercept, m.SE.Intercept = fit.Beta[0], fit.SE[0]
	for wd := 1; wd < 7; wd++ {
		m.Weekday[wd], m.SE.Weekday[wd] = 0, 0
		if c := f.wdCol[wd]; c > 0 {
			m.Weekday[wd], m.SE.Weekday[wd] = fit.Beta[c], fit.SE[c]
		}
	}
	m.Holiday, m.SE.Holiday = 0, 0
	if f.holCol > 0 {
		m.Holiday, m.SE.Holiday = fit.Beta[f.holCol], fit.SE[f.holCol]
	}
	c := f.k
	m.Heating, m.Cooling = model.ChangePoint{}, model.ChangePoint{}
	if model.DemandForm(form).HasHeating() {
		m.Heating = model.ChangePoint{Present: true, BalancePoint: tbH, Slope: fit.Beta[c], SlopeSE: fit.SE[c]}
		c++
	}
	if model.DemandForm(form).HasCooling() {
		if form == model.Form4P {
			tbC = tbH
		}
		m.Cooling = model.ChangePoint{Present: true, BalancePoint: tbC, Slope: fit.Beta[c], SlopeSE: fit.SE[c]}
	}
}

func (f *demandFitter) meanLoad() float64 {
	s := 0.0
	for _, v := range f.y {
		s += v
	}
	return s / float64(f.n)
}

// k returns the number of regression coefficients of a fit.
func (o olsFit) k() int { return len(o.Beta) }
