package calibrate

import (
	"fmt"
	"math"
	"strings"

	"golang.org/x/sync/errgroup"
	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat"
	"gonum.org/v1/gonum/stat/distuv"

	"wxstress/calendar"
	"wxstress/diagnose"
	"wxstress/model"
	"wxstress/shocks"
	"wxstress/statespace"
)

// Settings choose the model's structure. A nil *Settings means the defaults:
// harmonics by BIC, AR order by BIC, slow part "auto", trend "auto", shock
// family by AIC.
type Settings struct {
	Harmonics int    // 1..4; 0 chooses by BIC among 1..4
	AROrder   int    // 1..5; 0 chooses by BIC (with the slow part in the model)
	Slow      string // "auto" (default), "on" or "none"
	Trend     string // "auto" (default), "linear" or "none"
	Shocks    string // "auto" (default), "normal", "t", "skew-t" or "bootstrap"
	// Method is "exact" (default: exact Gaussian likelihood by the Kalman
	// filter, with the slow part) or "cls": the lean path of conditional
	// least squares for a fast AR alone (order table on one common sample,
	// monthly σ from the residuals), no slow part and no spread bands.
	Method string
	// Lean is the path for repeated refits (backtests, bootstraps): the
	// structure is given — Harmonics, AROrder, Slow ("on" or "none") and a
	// parametric Shocks family must be set — and the fit skips the order
	// tables, the likelihood-ratio test, the spread bands, the standard
	// errors and the residual diagnostics (Diagnostics is nil). Start, when
	// set, is a previous fit of the same structure to start from.
	Lean  bool
	Start *model.File
}

// Limits and rules of the fit.
const (
	MaxHarmonics = 4
	MaxAROrder   = 5
	// MinTrendYears is the record length from which "auto" keeps a linear
	// trend. Annual mean temperatures wander with a standard deviation of
	// roughly 0.5–0.8 °C from year to year, so over a record of N years the
	// slope's standard error is about 0.6·√(12/N³) °C a year: 0.35 °C per
	// decade at N = 15, already above the 0.1–0.3 °C per decade of observed
	// warming, and several °C per decade at N = 4. Below 15 years a fitted
	// slope is mostly weather, and extrapolating it to a target year would
	// shift every simulated day by that error.
	MinTrendYears = 15
	// ARAdviceMargin is the BIC improvement that counts as a clear
	// preference for a higher AR order (10: "very strong" evidence on the
	// Kass–Raftery scale).
	ARAdviceMargin = 10
	acfLags        = 30
	qqPoints       = 200
)

// decade is the trend column's scale in the design matrix: t/decade keeps
// the columns of comparable size, which conditions the QR solve.
const decade = 10 * calendar.DaysPerYear

// Validate checks the settings and names the valid choices.
func (s *Settings) Validate() error {
	if s.Harmonics < 0 || s.Harmonics > MaxHarmonics {
		return fmt.Errorf("calibrate: harmonics %d: want auto or 1..%d", s.Harmonics, MaxHarmonics)
	}
	if s.AROrder < 0 || s.AROrder > MaxAROrder {
		return fmt.Errorf("calibrate: AR order %d: want auto or 1..%d (seasonal spread comes from the slow part, not from more lags)", s.AROrder, MaxAROrder)
	}
	switch s.Slow {
	case "", SlowAuto, SlowOn, SlowNone:
	default:
		return fmt.Errorf("calibrate: slow %q: want auto, on or none", s.Slow)
	}
	if s.Lean && (s.Harmonics == 0 || s.AROrder == 0 || (s.Slow != SlowOn && s.Slow != SlowNone) ||
		s.Shocks == "" || s.Shocks == "auto" || s.Shocks == model.FamilyBootstrap || s.Method == "cls") {
		return fmt.Errorf("calibrate: the lean fit needs the harmonics, the AR order, --slow on or none and a parametric shock family")
	}
	switch s.Method {
	case "", "exact":
	case "cls":
		if s.Slow == SlowOn {
			return fmt.Errorf("calibrate: the slow part needs the exact likelihood, not conditional least squares")
		}
	default:
		return fmt.Errorf("calibrate: method %q: want exact or cls", s.Method)
	}
	switch s.Trend {
	case "", "auto", "linear", "none":
	default:
		return fmt.Errorf("calibrate: trend %q: want auto, linear or none", s.Trend)
	}
	if _, known := model.LookupFamily(s.Shocks); !known && s.Shocks != "" && s.Shocks != "auto" {
		names := model.FamilyNames()
		return fmt.Errorf("calibrate: shocks %q: want auto, %s or %s", s.Shocks,
			strings.Join(names[:len(names)-1], ", "), names[len(names)-1])
	}
	return nil
}

// Result is a fitted model with the series it came from.
type Result struct {
	Model   *model.File
	Series  *Series
	Fitted  []float64 // S(t) on the series' grid
	Anomaly []float64 // X = T − S on the grid, NaN where T is missing
	Z       []float64 // standardized innovations on the grid, NaN where undefined
}

// Fit calibrates the temperature model (see model.File) to s:
//
//	T(t) = S(t) + X(t),  X(t) = Y(t) + F(t)
//	S(t) = a + b·t + Σₖ [cₖ cos(kωt) + sₖ sin(kωt)],  ω = 2π/365.25
//	Y(t) = Σᵢ φᵢ Y(t−i) + σ(month of t)·ε(t)
//	F(t) = φ_s F(t−1) + s_F √(1 − φ_s²)·η(t)
//
// S by least squares (harmonics and trend per set), the fast AR Y and the
// slow part F by exact likelihood (package statespace; with Method "cls",
// Y alone by conditional least squares), and the family of the unit-variance
// shocks ε by maximum likelihood on the standardized innovations. The
// model's tool_version is left for the caller to set.
func Fit(s *Series, set *Settings) (*Result, error) {
	if set == nil {
		set = &Settings{}
	}
	if err := set.Validate(); err != nil {
		return nil, err
	}
	obs := observed(s)
	if len(obs) < 2*365 {
		return nil, fmt.Errorf("%s: %w: %d days with values, at least 730 needed", s.Name, ErrFit, len(obs))
	}
	// The day-to-day persistence is fitted on consecutive days: a record
	// observed every other day has none.
	pairs := 0
	for i := 1; i < len(obs); i++ {
		if obs[i] == obs[i-1]+1 {
			pairs++
		}
	}
	if pairs < minPairs {
		return nil, fmt.Errorf("%s: %w: only %d pairs of consecutive days with values, at least %d needed: the day-to-day "+
			"persistence is fitted on consecutive days", s.Name, ErrFit, pairs, minPairs)
	}
	if lo, hi := minMaxObserved(s.Temps); lo == hi {
		return nil, fmt.Errorf("%s: %w: every value is %v: a record without day-to-day variation has no climate to fit", s.Name, ErrFit, lo)
	}
	years := float64(len(s.Temps)) / calendar.DaysPerYear
	trendKind, rule := chooseTrend(set.Trend, years)

	f := &model.File{
		Schema:        model.Schema,
		SchemaVersion: model.SchemaVersion,
		Data:          dataInfo(s),
		Diagnostics:   &model.Diagnostics{Observations: len(obs)},
	}
	d := f.Diagnostics

	// Mean model: harmonics by BIC unless fixed. The BIC that chooses is
	// that of the regression prewhitened by the residuals' lag-1
	// autocorrelation ρ (Cochrane–Orcutt): daily anomalies persist, and
	// an OLS BIC that takes the days as independent credits a smooth term
	// with about (1 + ρ)/(1 − ρ) times the evidence it has (New York
	// 2012–2015: four harmonics by OLS, one prewhitened, as a
	// leave-one-year-out check prefers). The OLS BIC is shown beside it.
	// One Householder QR of [x | y] for the largest model gives every
	// nested model's residual sum of squares (nestedLS), so the table costs
	// two QRs and the chosen model a third for its standard errors.
	var mean olsFit
	k := set.Harmonics
	y := values(s, obs)
	trend := trendKind == "linear"
	if set.Lean {
		fit, err := ols(design(s, obs, k, trend, calendar.DaysPerYear), y)
		if err != nil {
			return nil, fmt.Errorf("%s: %w: mean model with %d harmonics: %w", s.Name, ErrFit, k, err)
		}
		for K := 1; K <= MaxHarmonics; K++ {
			row := model.OrderScore{Order: K}
			if K == k {
				row.BIC = fit.BIC()
			}
			d.HarmonicsTable = append(d.HarmonicsTable, row)
		}
		mean = fit
	} else {
		x := design(s, obs, MaxHarmonics, trend, calendar.DaysPerYear)
		all := make([]int, len(y))
		for i := range all {
			all[i] = i
		}
		olsRSS, beta, err := nestedLS(x, y, all, 0)
		if err != nil {
			return nil, fmt.Errorf("%s: %w: mean model with %d harmonics: %w", s.Name, ErrFit, MaxHarmonics, err)
		}
		// Too few pairs of consecutive days (a record with every other
		// day missing) leave no ρ: the OLS BIC chooses alone.
		rho, pairs := residualRho(x, y, obs, beta)
		_, cols := x.Dims()
		prewhiten := len(pairs) > cols+2 && !math.IsNaN(rho) && math.Abs(rho) < 1
		var pwRSS []float64
		if prewhiten {
			d.HarmonicsRho = rho
			if pwRSS, _, err = nestedLS(x, y, pairs, rho); err != nil {
				return nil, fmt.Errorf("%s: %w: mean model, prewhitened: %w", s.Name, ErrFit, err)
			}
		}
		base := cols - 2*MaxHarmonics // the intercept, and the trend when fitted
		for K := 1; K <= MaxHarmonics; K++ {
			c := base + 2*K
			row := model.OrderScore{Order: K, BIC: lsBIC(olsRSS[c], len(y), c)}
			if prewhiten {
				row.BIC, row.BICIndependent = lsBIC(pwRSS[c], len(pairs), c), row.BIC
			}
			d.HarmonicsTable = append(d.HarmonicsTable, row)
			if set.Harmonics == 0 && (K == 1 || row.BIC < d.HarmonicsTable[k-1].BIC) || set.Harmonics == K {
				k = K
			}
		}
		if mean, err = ols(design(s, obs, k, trend, calendar.DaysPerYear), y); err != nil {
			return nil, fmt.Errorf("%s: %w: mean model with %d harmonics: %w", s.Name, ErrFit, k, err)
		}
	}
	d.HarmonicsTable[k-1].Chosen = true
	f.Trend, f.Seasonal = meanParams(mean, k, trendKind == "linear", calendar.DaysPerYear)
	annual, annualSE, nYears := annualSlope(s, f.Seasonal)
	if trendKind == "linear" && (set.Trend == "" || set.Trend == "auto") && nYears >= 3 && math.Abs(annual) < annualSE {
		// Extrapolating a slope lowers the level's mean squared error at
		// the target year only when |slope| exceeds its standard error
		// (the usual bias–variance argument for keeping a regressor).
		trendKind = "none"
		rule = fmt.Sprintf("auto: linear trend dropped: the slope from annual means, %.2f per decade, is within its standard error (%.2f), "+
			"so extrapolating it would add more error than it removes", annual, annualSE)
		var err error
		if mean, err = ols(design(s, obs, k, false, calendar.DaysPerYear), values(s, obs)); err != nil {
			return nil, fmt.Errorf("%s: %w: mean model: %w", s.Name, ErrFit, err)
		}
		f.Trend, f.Seasonal = meanParams(mean, k, false, calendar.DaysPerYear)
	}
	f.Trend.Rule = rule
	f.Seasonal.R2 = mean.R2()

	// The slope as fitted with a trend term, reported whichever way the
	// model goes.
	withTrend := mean
	if trendKind != "linear" {
		var err error
		if withTrend, err = ols(design(s, obs, k, true, calendar.DaysPerYear), values(s, obs)); err != nil {
			return nil, fmt.Errorf("%s: %w: trend estimate: %w", s.Name, ErrFit, err)
		}
	}

	res := &Result{Model: f, Series: s, Fitted: make([]float64, len(s.Temps)), Anomaly: make([]float64, len(s.Temps))}
	if set.Lean {
		return fitLean(res, s, set, f)
	}
	for i := range s.Temps {
		res.Fitted[i] = f.Mean(s.Date(i).ModelTime())
		res.Anomaly[i] = s.Temps[i] - res.Fitted[i]
	}
	x := res.Anomaly
	d.ACF = diagnose.ACF(x, acfLags)
	d.PACF = diagnose.PACF(d.ACF)
	d.ACFBound = diagnose.ConfidenceBound(len(obs))
	f.Trend.Estimate = trendEstimate(withTrend, d.ACF[0])
	f.Trend.Estimate.SEAnnual, f.Trend.Estimate.Years = annualSE, nYears

	// Starting values: conditional least squares for each AR order, the
	// monthly σ of the AR(1)'s innovations.
	clsPhi := make([][]float64, MaxAROrder)
	for q := 1; q <= MaxAROrder; q++ {
		xm, y := lagged(x, q, q)
		fit, err := ols(xm, y)
		if err != nil {
			return nil, fmt.Errorf("%s: %w: AR(%d): %w", s.Name, ErrFit, q, err)
		}
		clsPhi[q-1] = fit.Beta
		if model.SpectralRadius(fit.Beta) >= 0.999 {
			clsPhi[q-1] = make([]float64, q)
			clsPhi[q-1][0] = 0.7
		}
	}
	if err := monthlySigma(s, innovations(x, clsPhi[0]), &f.Volatility); err != nil {
		return nil, err
	}
	proj, err := newProjector(design(s, obs, k, trendKind == "linear", calendar.DaysPerYear), obs)
	if err != nil {
		return nil, fmt.Errorf("%s: %w: %w", s.Name, ErrFit, err)
	}
	if set.Method == "cls" {
		if err := fitCLS(s, x, set, f, d); err != nil {
			return nil, err
		}
		z := innovations(x, f.AR.Phi)
		for i, v := range z {
			z[i] = v / f.Volatility.Monthly[s.Date(i).Month()-1]
		}
		return finishFit(res, s, z, set, f, d)
	}
	start := statespace.Params{Phi: clsPhi[0], Sigma: f.Volatility.Monthly}
	af, err := fitAnomaly(s, x, set, start, clsPhi, proj, d)
	if err != nil {
		return nil, err
	}
	prm := af.chosen.Params
	p := len(prm.Phi)
	d.ARPairs = af.chosen.N
	f.AR = model.AR{Phi: prm.Phi, PhiSE: make([]float64, p), Last: lastAnomalies(x, p)}
	for i := range p {
		f.AR.PhiSE[i] = finiteOr0(af.chosen.SE[i])
	}
	if prm.HasSlow() {
		mean, sd := af.filtered.SlowState(prm)
		f.Slow = &model.Slow{Phi: prm.PhiSlow, SD: prm.SDSlow, EFoldingDays: prm.EFolding(), State: mean, StateSD: sd,
			PhiSE: finiteOr0(af.chosen.SE[p]), SDSE: finiteOr0(af.chosen.SE[p+1])}
		if w := shortSlowAdvice(f.Slow, len(s.Temps), f.Data.Units, true, d.SlowChoice.SpreadTooNarrow); w != "" && d.SlowAdvice == "" {
			d.SlowAdvice = w
		}
	}

	// Monthly σ from the likelihood, standardized innovations from the
	// filter: z(t) = v(t)/√f(t), the fast part's shocks when the slow
	// part's daily innovations are small beside σ.
	z := af.filtered.Z
	setVolatility(&f.Volatility, prm.Sigma, z, s)
	return finishFit(res, s, z, set, f, d)
}

// finishFit fits the shock family to the standardized innovations z and
// adds the diagnostics that depend on them.
func finishFit(res *Result, s *Series, z []float64, set *Settings, f *model.File, d *model.Diagnostics) (*Result, error) {
	p := len(f.AR.Phi)
	var zc []float64
	byMonth := make([][]float64, 12)
	for i, v := range z {
		if math.IsNaN(v) {
			continue
		}
		m := int(s.Date(i).Month()) - 1
		zc = append(zc, v)
		byMonth[m] = append(byMonth[m], v)
	}
	if len(zc) < 30 {
		return nil, fmt.Errorf("%s: %w: only %d standardized innovations", s.Name, ErrFit, len(zc))
	}
	res.Z = z

	dist, err := chooseShocks(set.Shocks, zc, byMonth, f, d)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", s.Name, err)
	}

	d.LjungBoxZ10 = diagnose.LjungBox(z, 10, p)
	d.LjungBoxZ20 = diagnose.LjungBox(z, 20, p)
	z2 := make([]float64, len(z))
	for i, v := range z {
		z2[i] = v * v
	}
	d.LjungBoxZ210 = diagnose.LjungBox(z2, 10, 0)
	d.LjungBoxZ220 = diagnose.LjungBox(z2, 20, 0)
	d.JarqueBera = diagnose.JarqueBera(zc)
	d.Skewness = diagnose.Skewness(zc)
	d.ExcessKurtosis = diagnose.ExcessKurtosis(zc)
	d.KS = diagnose.KolmogorovSmirnov(zc, dist.CDF)
	d.QQTheoretical, d.QQSample = diagnose.QQPoints(zc, dist.Quantile, qqPoints)
	d.Climatology = climatology(s)
	return res, nil
}

func chooseTrend(setting string, years float64) (kind, rule string) {
	switch setting {
	case "linear":
		return "linear", "linear trend requested"
	case "none":
		return "none", "no trend requested"
	}
	if years >= MinTrendYears {
		return "linear", fmt.Sprintf("auto: record of %.1f years ≥ %d, linear trend kept", years, MinTrendYears)
	}
	return "none", fmt.Sprintf("auto: record of %.1f years < %d, trend not fitted: over so short a record the slope is "+
		"mostly year-to-year weather (its estimate is reported only as information)", years, MinTrendYears)
}

func dataInfo(s *Series) model.Data {
	missing, longest := s.Gaps()
	return model.Data{
		File: s.Name, SHA256: s.SHA256, FirstDate: s.Start, LastDate: s.End(), Units: string(s.Units),
		MeanFrom: s.MeanFrom, Days: len(s.Temps), Missing: missing, LongestGap: longest, Warnings: s.Warnings,
	}
}

// residualRho returns the lag-1 autocorrelation of the residuals of y on x
// with coefficients beta, over the pairs of consecutive observed days,
// Σ r(t)r(t−1) / Σ r(t−1)² (NaN without any), and those pairs (the index of
// each pair's later day).
func residualRho(x *mat.Dense, y []float64, obs []int, beta []float64) (float64, []int) {
	r := make([]float64, len(y))
	for i := range y {
		row := x.RawRowView(i)[:len(beta)]
		v := y[i]
		for j, b := range beta {
			v -= row[j] * b
		}
		r[i] = v
	}
	var num, den float64
	var pairs []int
	for i := 1; i < len(y); i++ {
		if obs[i] == obs[i-1]+1 {
			num += r[i] * r[i-1]
			den += r[i-1] * r[i-1]
			pairs = append(pairs, i)
		}
	}
	if den == 0 {
		return math.NaN(), pairs
	}
	return num / den, pairs
}

// nestedLS fits y on x over the given rows, prewhitened by ρ when ρ ≠ 0 (a
// row i then stands for y(i) − ρ·y(i−1) on x(i) − ρ·x(i−1): Cochrane and
// Orcutt 1949, from memory), by one Householder QR of [x | y]. R's last
// column holds Qᵀy, so the residual sum of squares of the model of x's
// first j columns is the sum of the squares of its entries from j on:
// rss[j] for j = 1..k. beta is the full model's coefficients.
func nestedLS(x *mat.Dense, y []float64, rows []int, rho float64) (rss, beta []float64, err error) {
	_, k := x.Dims()
	if len(rows) <= k {
		return nil, nil, errRankDeficient
	}
	data := make([]float64, len(rows)*(k+1))
	for r, i := range rows {
		out := data[r*(k+1) : (r+1)*(k+1)]
		copy(out, x.RawRowView(i)[:k])
		out[k] = y[i]
		if rho != 0 {
			prev := x.RawRowView(i - 1)[:k]
			for j := range k {
				out[j] -= rho * prev[j]
			}
			out[k] -= rho * y[i-1]
		}
	}
	var qr mat.QR
	qr.Factorize(mat.NewDense(len(rows), k+1, data))
	var r mat.Dense
	qr.RTo(&r)
	rss = make([]float64, k+1)
	for j := 1; j <= k; j++ {
		for i := j; i <= k; i++ {
			rss[j] += r.At(i, k) * r.At(i, k)
		}
		if !(rss[j] > 0) {
			return nil, nil, errRankDeficient
		}
	}
	// R[:k,:k]·beta = (Qᵀy)[:k], by back substitution.
	beta = make([]float64, k)
	for i := k - 1; i >= 0; i-- {
		v := r.At(i, k)
		for j := i + 1; j < k; j++ {
			v -= r.At(i, j) * beta[j]
		}
		if r.At(i, i) == 0 {
			return nil, nil, errRankDeficient
		}
		beta[i] = v / r.At(i, i)
	}
	return rss, beta, nil
}

// lsBIC is a least-squares fit's BIC from its residual sum of squares, n
// rows and k coefficients, as olsFit.BIC (R's BIC of an lm, σ counted).
func lsBIC(rss float64, n, k int) float64 {
	nf := float64(n)
	return nf*math.Log(2*math.Pi*rss/nf) + nf + float64(k+1)*math.Log(nf)
}

func observed(s *Series) []int {
	idx := make([]int, 0, len(s.Temps))
	for i, v := range s.Temps {
		if !math.IsNaN(v) {
			idx = append(idx, i)
		}
	}
	return idx
}

func values(s *Series, idx []int) []float64 {
	y := make([]float64, len(idx))
	for j, i := range idx {
		y[j] = s.Temps[i]
	}
	return y
}

// design returns the mean model's regressors [1, t/decade, cos kωt, sin kωt],
// ω = 2π/period, for the days idx. The model always uses the mean calendar
// year; the period is a parameter so tests can show what another one does.
func design(s *Series, idx []int, harmonics int, trend bool, period float64) *mat.Dense {
	cols := 1 + 2*harmonics
	if trend {
		cols++
	}
	x := mat.NewDense(len(idx), cols, nil)
	w := 2 * math.Pi / period
	for r, i := range idx {
		t := s.Date(i).ModelTime()
		row := x.RawRowView(r)
		row[0] = 1
		c := 1
		if trend {
			row[1] = t / decade
			c = 2
		}
		for k := 1; k <= harmonics; k++ {
			row[c] = math.Cos(float64(k) * w * t)
			row[c+1] = math.Sin(float64(k) * w * t)
			c += 2
		}
	}
	return x
}

// meanParams turns the mean model's coefficients into the model's trend and
// seasonal parts.
func meanParams(fit olsFit, harmonics int, trend bool, period float64) (model.Trend, model.Seasonal) {
	tr := model.Trend{Kind: "none", Epoch: calendar.Epoch, Intercept: fit.Beta[0]}
	c := 1
	if trend {
		tr.Kind = "linear"
		tr.SlopePerYear = fit.Beta[1] / 10
		c = 2
	}
	se := model.Seasonal{PeriodDays: period}
	w := se.Omega()
	for k := 1; k <= harmonics; k++ {
		a, b := fit.Beta[c], fit.Beta[c+1]
		theta := math.Atan2(a, b)
		// α sin(kωt + θ) peaks first where kωt + θ = π/2 (mod 2π).
		peak := math.Mod(math.Pi/2-theta, 2*math.Pi)
		if peak < 0 {
			peak += 2 * math.Pi
		}
		se.Harmonics = append(se.Harmonics, model.Harmonic{
			K: k, Cos: a, Sin: b, Amplitude: math.Hypot(a, b), Phase: theta,
			PeakDayOfYear: 1 + peak/(float64(k)*w),
		})
		c += 2
	}
	se.PeakDayOfYear, se.TroughDayOfYear = extremes(se)
	return tr, se
}

// extremes locates the maximum and minimum of the seasonal cycle on a grid of
// 0.01 day over one period (t = 0 is 1 January, day of year 1).
func extremes(s model.Seasonal) (peak, trough float64) {
	const step = 0.01
	hi, lo := math.Inf(-1), math.Inf(1)
	for t := 0.0; t < s.PeriodDays; t += step {
		v := s.At(t)
		if v > hi {
			hi, peak = v, t
		}
		if v < lo {
			lo, trough = v, t
		}
	}
	return 1 + peak, 1 + trough
}

// trendEstimate reports the slope of a fit with a trend column, per decade,
// with its OLS standard error and one widened for the residuals' lag-1
// autocorrelation r1: the effective sample size n(1 − r1)/(1 + r1).
func trendEstimate(fit olsFit, r1 float64) model.TrendEstimate {
	adj := math.Sqrt((1 + r1) / (1 - r1))
	if !(r1 > -1 && r1 < 1) {
		adj = math.NaN()
	}
	return model.TrendEstimate{PerDecade: fit.Beta[1], SEOLS: fit.SE[1], SEAdjusted: fit.SE[1] * adj}
}

// lagged returns the AR(q) regression x_t on x_{t−1..t−q} over the days t
// where x_t and its first maxLag lags are all present, so that tables for
// different q share one sample when maxLag is their largest q.
func lagged(x []float64, q, maxLag int) (*mat.Dense, []float64) {
	var rows []int
	for t := maxLag; t < len(x); t++ {
		ok := true
		for j := 0; j <= maxLag && ok; j++ {
			ok = !math.IsNaN(x[t-j])
		}
		if ok {
			rows = append(rows, t)
		}
	}
	xm := mat.NewDense(max(len(rows), 1), q, nil)
	y := make([]float64, len(rows))
	for r, t := range rows {
		y[r] = x[t]
		for j := 1; j <= q; j++ {
			xm.Set(r, j-1, x[t-j])
		}
	}
	if len(rows) == 0 {
		return mat.NewDense(1, q, nil), nil
	}
	return xm, y
}

// innovations returns e_t = x_t − Σ φ_j x_{t−j} on the grid, NaN where any
// term is missing.
func innovations(x, phi []float64) []float64 {
	e := make([]float64, len(x))
	for t := range x {
		if t < len(phi) {
			e[t] = math.NaN()
			continue
		}
		v := x[t]
		for j, p := range phi {
			v -= p * x[t-j-1]
		}
		e[t] = v
	}
	return e
}

// lastAnomalies returns the last p anomalies, most recent first, with
// missing values replaced by 0 (the anomaly's mean).
func lastAnomalies(x []float64, p int) []float64 {
	out := make([]float64, p)
	for j := range p {
		if i := len(x) - 1 - j; i >= 0 && !math.IsNaN(x[i]) {
			out[j] = x[i]
		}
	}
	return out
}

// setVolatility sets the monthly σ with their 95 % chi-square bands, the
// counts being the days with a standardized innovation in each month.
func setVolatility(v *model.Volatility, sigma [12]float64, z []float64, s *Series) {
	var n [12]int
	for i, x := range z {
		if !math.IsNaN(x) {
			n[s.Date(i).Month()-1]++
		}
	}
	v.Kind = "monthly"
	for m, sd := range sigma {
		chi := distuv.ChiSquared{K: float64(max(n[m]-1, 1))}
		v.Monthly[m], v.Count[m] = sd, n[m]
		v.Band[m] = [2]float64{
			sd * math.Sqrt(chi.K/chi.Quantile(0.975)),
			sd * math.Sqrt(chi.K/chi.Quantile(0.025)),
		}
	}
}

// monthlySigma sets σ for each calendar month: the sample standard deviation
// (n − 1) of that month's innovations, with a 95 % chi-square band.
func monthlySigma(s *Series, e []float64, v *model.Volatility) error {
	byMonth := make([][]float64, 12)
	for i, x := range e {
		if !math.IsNaN(x) {
			m := s.Date(i).Month() - 1
			byMonth[m] = append(byMonth[m], x)
		}
	}
	v.Kind = "monthly"
	for m, xs := range byMonth {
		n := len(xs)
		if n < 10 {
			return fmt.Errorf("%s: %w: month %d has %d innovations (days with the previous days present); at least 10 needed",
				s.Name, ErrFit, m+1, n)
		}
		sd := stat.StdDev(xs, nil)
		if !(sd > 0) {
			return fmt.Errorf("%s: %w: month %d: innovations have no spread (constant data?)", s.Name, ErrFit, m+1)
		}
		chi := distuv.ChiSquared{K: float64(n - 1)}
		v.Monthly[m], v.Count[m] = sd, n
		v.Band[m] = [2]float64{
			sd * math.Sqrt(float64(n-1)/chi.Quantile(0.975)),
			sd * math.Sqrt(float64(n-1)/chi.Quantile(0.025)),
		}
	}
	return nil
}

// chooseShocks fits the parametric families, fills the family table and the
// model's shocks, and returns the parametric distribution z is compared with.
func chooseShocks(setting string, z []float64, byMonth [][]float64, f *model.File, d *model.Diagnostics) (shocks.Dist, error) {
	var fams []model.Family
	for _, fam := range model.Families() {
		if fam.Parametric() {
			fams = append(fams, fam)
		}
	}
	// The families are fitted concurrently (each search is sequential);
	// the results keep the registry's order.
	fits, params := make([]shocks.Fit, len(fams)), make([]model.Shocks, len(fams))
	var g errgroup.Group
	for i, fam := range fams {
		g.Go(func() error {
			var err error
			fits[i], params[i], err = fam.Fit(z)
			return err
		})
	}
	if err := g.Wait(); err != nil {
		return nil, err
	}
	best := 0
	for i, fit := range fits {
		if fit.AIC() < fits[best].AIC() {
			best = i
		}
	}
	chosen := best
	for i, sh := range params {
		if sh.Family == setting {
			chosen = i
		}
	}
	for i, fit := range fits {
		row := model.FamilyScore{
			Family: params[i].Family, LogLik: fit.LogLik, Params: fit.Params, AIC: fit.AIC(),
			Chosen: i == chosen && setting != model.FamilyBootstrap,
		}
		row.DF, row.Skew = params[i].DF, params[i].Skew
		d.ShockTable = append(d.ShockTable, row)
	}
	d.KSFamily = params[chosen].Family
	if setting == model.FamilyBootstrap {
		f.Shocks = model.Shocks{Family: model.FamilyBootstrap, ByMonth: byMonth}
		d.ShockTable = append(d.ShockTable, model.FamilyScore{Family: model.FamilyBootstrap, Chosen: true})
		return fits[chosen].Dist, nil
	}
	f.Shocks = params[chosen]
	return fits[chosen].Dist, nil
}

func finiteOr0(v float64) float64 {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return 0
	}
	return v
}

// climatology returns the mean observed temperature by day of year.
func climatology(s *Series) []float64 {
	sum, n := make([]float64, 366), make([]int, 366)
	for i, v := range s.Temps {
		if !math.IsNaN(v) {
			d := s.Date(i).DayOfYear() - 1
			sum[d] += v
			n[d]++
		}
	}
	for d := range sum {
		if n[d] > 0 {
			sum[d] /= float64(n[d])
		} else if d > 0 {
			sum[d] = sum[d-1] // day 366 of a record without a leap year
		}
	}
	return sum
}

// fitCLS is the lean path: the fast AR by conditional least squares, the
// order table on one common sample, monthly σ from the residuals, and the
// spread table without bands.
func fitCLS(s *Series, x []float64, set *Settings, f *model.File, d *model.Diagnostics) error {
	p := max(set.AROrder, 1)
	d.ARTable = d.ARTable[:0]
	for q := 1; q <= MaxAROrder; q++ {
		xm, y := lagged(x, q, MaxAROrder)
		fit, err := ols(xm, y)
		if err != nil {
			return fmt.Errorf("%s: %w: AR(%d): %w", s.Name, ErrFit, q, err)
		}
		d.ARTable = append(d.ARTable, model.OrderScore{Order: q, BIC: fit.BIC(), Chosen: q == p})
	}
	xm, y := lagged(x, p, p)
	ar, err := ols(xm, y)
	if err != nil {
		return fmt.Errorf("%s: %w: AR(%d): %w", s.Name, ErrFit, p, err)
	}
	d.ARPairs = ar.N
	f.AR = model.AR{Phi: ar.Beta, PhiSE: ar.SE, Last: lastAnomalies(x, p)}
	if r := model.SpectralRadius(ar.Beta); r >= 1 {
		return fmt.Errorf("%s: %w: fitted AR(%d) %v is not stationary", s.Name, ErrFit, p, ar.Beta)
	}
	if err := monthlySigma(s, innovations(x, ar.Beta), &f.Volatility); err != nil {
		return err
	}
	prm := statespace.Params{Phi: f.AR.Phi, Sigma: f.Volatility.Monthly}
	for _, L := range SpreadWindows {
		sd, starts := windowSD(x, L)
		ws := model.WindowSpread{Days: L, Windows: len(starts)}
		if len(starts) >= 2 {
			ws.Observed, ws.Model, ws.Verdict = sd, modelWindowSD(s, prm, L, starts), "not checked"
		}
		d.Spread = append(d.Spread, ws)
	}
	return nil
}

// minPairs is the fewest pairs of consecutive observed days a fit takes:
// a year's worth, for the AR part and the harmonics' prewhitening.
const minPairs = 365

// Below SlowShortYears years, or SlowShortSpans e-folding times, of record a
// kept slow part is poorly determined, and the fit says so.
const (
	SlowShortYears = 15
	SlowShortSpans = 20
)

// ShortSlowAdvice is the fit's caution about m's slow part when the record
// behind it is too short to pin it down ("" otherwise): worded for a run
// from the data end (conditional), which carries the slow part's state
// forward, or for one from the climate, which uses only its spread.
func ShortSlowAdvice(m *model.File, conditional bool) string {
	if m.Slow == nil {
		return ""
	}
	var narrow []int
	if m.Diagnostics != nil && m.Diagnostics.SlowChoice != nil {
		narrow = m.Diagnostics.SlowChoice.SpreadTooNarrow
	}
	return shortSlowAdvice(m.Slow, int(m.Data.LastDate-m.Data.FirstDate)+1, m.Data.Units, conditional, narrow)
}

// shortSlowAdvice cautions about a slow part fitted to a record too short to
// pin it down: its spread, and its state at the data end that a
// conditional start carries forward, rest on a few of its own time spans.
func shortSlowAdvice(sl *model.Slow, days int, units string, conditional bool, narrow []int) string {
	years := float64(days) / calendar.DaysPerYear
	spans := float64(days) / sl.EFoldingDays
	if years >= SlowShortYears && spans >= SlowShortSpans {
		return ""
	}
	w := fmt.Sprintf("the slow part rests on %.1f years, %.0f of its e-folding times (%.0f days): its sd (%.2f ± %.2f °%s)",
		years, spans, sl.EFoldingDays, sl.SD, sl.SDSE, units)
	if conditional {
		// What the state does to the coming months: its expected effect on
		// the mean of the next 90 days, state·mean(φ^t, t = 1..90).
		phi, g := sl.Phi, 0.0
		for t := 1; t <= 90; t++ {
			g += math.Pow(phi, float64(t))
		}
		w += fmt.Sprintf(" and its state at the data end (%+.2f ± %.2f °%s), which a conditional start carries forward "+
			"(%+.1f °%s on the mean of the next 90 days; a climate start does not use it), are poorly determined",
			sl.State, sl.StateSD, units, sl.State*g/90, units)
	} else {
		w += ", and with it the spread of seasons and years, is poorly determined"
	}
	if len(narrow) > 0 {
		// The fast AR alone is no remedy: it fails the record's own spread.
		days := fmt.Sprintf("%d-day spread lies", narrow[0])
		if len(narrow) > 1 {
			days = fmt.Sprintf("%d- and %d-day spreads lie", narrow[0], narrow[len(narrow)-1])
			if len(narrow) > 2 {
				days = fmt.Sprintf("spreads of %s days lie", joinInts(narrow))
			}
		}
		return w + fmt.Sprintf("; the fast AR alone (--slow none) is no way out: without the slow part the record's %s "+
			"above the model's band, so seasonal and annual tails are uncertain either way; read them with their "+
			"parameter band (--uncertainty N with --history)", days)
	}
	return w + "; compare with --slow none"
}

// minMaxObserved returns the smallest and largest values of x, missing days
// (NaN) aside.
func minMaxObserved(x []float64) (lo, hi float64) {
	lo, hi = math.Inf(1), math.Inf(-1)
	for _, v := range x {
		if !math.IsNaN(v) {
			lo, hi = min(lo, v), max(hi, v)
		}
	}
	return lo, hi
}
