package calibrate

import (
	"fmt"
	"math"
	"strconv"
	"strings"
	"time"

	"gonum.org/v1/gonum/mat"

	"wxstress/calendar"
	"wxstress/diagnose"
	"wxstress/model"
)

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
	// Noise fixes the noise's scale: "constant", "load" (the multiplicative
	// form: innovations in proportion to the expected load) or "bands"; ""
	// or "auto" chooses by AIC.
	Noise string
}

// Acceptance levels of the demand fit.
const (
	// significantT is the |t| below which a slope is reported as not
	// significantly different from zero (about the 5 % two-sided level).
	significantT = 2.0
	// minNoisePairs is the fewest consecutive-day residual pairs behind φ.
	minNoisePairs = 30
	// maxProfilePoints is the largest grid whose RSS profiles are stored
	// in the model file.
	maxProfilePoints = 1000
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

// DemandResult is a fitted demand model with the days it was fitted to:
// Fitted is D(t) − u(t), the load the model expects on each day, and
// Residual is u(t).
type DemandResult struct {
	Model    *model.Demand
	Days     *DemandDays
	Fitted   []float64 // the deterministic part on each day
	Residual []float64 // u = load − fitted
}

// FitDemand fits the demand model (see model.Demand) to the joined days:
//
//	D(t) = β0 + w(weekday) + βhol·holiday + βH·max(TbH − T, 0) + βC·max(T − TbC, 0) + u(t)
//	u(t) = φ·u(t−1) + σ·z(t)
//
// with D the day's load in the demand unit, T its mean temperature in the
// data's units (balance points TbH, TbC in the same units, slopes βH, βC in
// demand unit per degree), w(Monday) = 0, and holiday 1 on a holiday. The
// change-point forms are the inverse models of ASHRAE Guideline 14:
// heating-only (no cooling term), cooling-only (no heating term), heating-and-cooling (one
// balance point, TbH = TbC, a slope on either side) and heating-and-cooling-band (TbH ≤ TbC, flat
// between). The model's tool_version is left for the caller to set.
//
// For every form the balance points are searched on a grid of BalanceStep
// between the 5th and 95th percentiles of the temperatures (TbH ≤ TbC for
// heating-and-cooling-band), with the other coefficients by least squares at each point, keeping
// the point of least residual sum of squares; forms are compared by BIC,
// counting each balance point as a parameter. With Form "auto" the form
// with the lowest BIC among those whose slopes are positive is chosen, and
// it must beat the constant model (no temperature terms) by BIC; otherwise
// FitDemand returns an error wrapping ErrFit. A fixed form is always
// fitted, and what would stop the automatic choice becomes a warning in the
// model. The residuals' AR(1) is fitted by conditional least squares on
// pairs of consecutive days.
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
		return nil, fmt.Errorf("%s: %w: %s form at the chosen balance points: %w", name, ErrFit, chosen, err)
	}
	f.fill(m, chosen, fit, b.tbH, b.tbC)
	if m.Intercept < 0 && m.Intercept > -1e-9*f.meanLoad() {
		m.Intercept = 0 // a zero base load, fitted to rounding
	}
	if !(m.Intercept >= 0) {
		// Demand below zero on a mild Monday: a model the simulator
		// refuses, most likely loads net of generation or in a mixed unit.
		return nil, fmt.Errorf("%s: %w: the %s form's base load (demand at the balance point on a Monday) comes out at %s %s; "+
			"a demand model needs it at 0 or above (are the loads net of generation, or in more than one unit?)", name, ErrFit, chosen,
			strconv.FormatFloat(m.Intercept, 'g', 6, 64), set.Unit)
	}

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
	chooseNoiseScale(m, days, res.Fitted, res.Residual, set.Noise)
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
		HolidaysFile: d.HolidaysFile, HolidayColumn: d.HolidayColumn, HolidayListDates: d.HolidayListDates, HolidayRules: d.HolidayRules,
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
		return fmt.Errorf("%w: residual AR(1): %w", ErrFit, err)
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
