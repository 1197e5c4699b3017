package render

import (
	"fmt"
	"io"
	"slices"
	"strings"
	"time"

	"wxstress/internal/numfmt"
	"wxstress/model"
	"wxstress/stress"
)

// Caution is the statement every report carries.
const Caution = "These are statistical scenarios, not forecasts. Capacity, reliability and hedging decisions " +
	"remain subject to local codes, regulators' planning standards and licensed professional judgement."

// FitSummary writes the readable summary of a fitted model.
func FitSummary(w io.Writer, f *model.File) error { return FitSummaryWith(w, f, nil) }

// AnnualSEText is the trend slope's standard error from the regression on
// annual means, as ", 0.828 from 4 annual means (2 degrees of freedom)" ("" with
// fewer than three complete years): on a few years its degrees of freedom
// say how little it rests on.
func AnnualSEText(est model.TrendEstimate) string {
	if est.Years < 3 {
		return ""
	}
	df := strings.Replace(Plural(est.Years-2, "degree"), " ", Glue, 1) // the number kept with its noun when wrapped
	return fmt.Sprintf(", %.3f from %d annual means (%s of freedom)", est.SEAnnual, est.Years, df)
}

// FitSummaryWith is FitSummary with the GEV check of the model's extreme
// days (from a short simulation of the fitted model) after the diagnostics.
func FitSummaryWith(w io.Writer, f *model.File, checks []stress.ExtremeCheck) error {
	e := &errWriter{w: w}
	u := "°" + f.Data.Units
	d := f.Data
	e.printf("Station record  %s\n", d.File)
	e.printf("%s\n", Wrap(fmt.Sprintf("  %s to %s: %d days, %d missing (longest gap %s); daily mean = %s; units %s",
		d.FirstDate, d.LastDate, d.Days, d.Missing, Plural(d.LongestGap, "day"), d.MeanFrom, u), "  "))

	e.printf("\nSeasonal mean  S(t) = a + b·t + Σ harmonics, period %.2f days, t in days since %s\n",
		f.Seasonal.PeriodDays, f.Trend.Epoch)
	e.printf("  level a = %.3f %s; R² = %.4f\n", f.Trend.Intercept, u, f.Seasonal.R2)
	est := f.Trend.Estimate
	e.printf("  trend: %s; fitted slope %+.3f %s/decade\n", f.Trend.Kind, est.PerDecade, u)
	e.printf("%s\n", Wrap(fmt.Sprintf("    s.e. %.3f OLS, %.3f allowing for day-to-day autocorrelation%s", est.SEOLS,
		est.SEAdjusted, AnnualSEText(est)), "      "))
	e.printf("%s\n", Wrap("  "+f.Trend.Rule, "    "))
	rows := [][]string{}
	for _, h := range f.Seasonal.Harmonics {
		rows = append(rows, []string{fmt.Sprint(h.K), Num(h.Amplitude, 3), Num(h.Phase, 4),
			Num(h.PeakDayOfYear, 1), DayName(h.PeakDayOfYear)})
	}
	e.table([]string{"harmonic", "amplitude " + u, "phase θ (rad)", "first peak (day of year)", "date"}, rows)
	e.printf("  whole cycle: warmest on day %.1f (%s), coldest on day %.1f (%s)\n",
		f.Seasonal.PeakDayOfYear, DayName(f.Seasonal.PeakDayOfYear),
		f.Seasonal.TroughDayOfYear, DayName(f.Seasonal.TroughDayOfYear))

	dg := f.Diagnostics
	if dg != nil {
		title, head, rows := HarmonicsTable(dg)
		e.printf("\n%s\n", Wrap(title, "  "))
		e.table(head, rows)
	}

	if f.Slow != nil {
		e.printf("\nAnomaly X(t) = Y(t) + F(t): fast part Y an AR(%d), slow part F an AR(1)\n", len(f.AR.Phi))
	} else {
		e.printf("\nAnomaly X(t): AR(%d), no slow part\n", len(f.AR.Phi))
	}
	rows = rows[:0]
	for i, v := range f.AR.Phi {
		rows = append(rows, []string{fmt.Sprintf("φ%d", i+1), Num(v, 4), Num(f.AR.PhiSE[i], 4)})
	}
	if sl := f.Slow; sl != nil {
		se := func(v float64, d int) string {
			if v > 0 {
				return Num(v, d)
			}
			return "—"
		}
		rows = append(rows,
			[]string{"φ_slow", Num(sl.Phi, 4), se(sl.PhiSE, 4)},
			[]string{"  e-folding time", fmt.Sprintf("%.0f days", sl.EFoldingDays), ""},
			[]string{"  stationary sd of F", Num(sl.SD, 3) + " " + u, se(sl.SDSE, 3)},
			[]string{"  F at the data end", fmt.Sprintf("%+.2f ± %.2f %s", sl.State, sl.StateSD, u), ""})
	}
	e.table([]string{"coefficient", "estimate", "s.e."}, rows)
	if dg != nil && dg.SlowChoice != nil {
		c := dg.SlowChoice
		e.printf("%s\n", Wrap("Slow part: "+c.Rule, "  "))
		if c.Setting != "none" {
			e.table([]string{"model", "log-lik", "BIC", ""}, [][]string{
				{"with the slow part", Num(c.LogLikWith, 1), Num(c.BICWith, 1), Mark(c.Kept)},
				{"fast AR alone", Num(c.LogLikWithout, 1), Num(c.BICWithout, 1), Mark(!c.Kept)},
			})
			line := fmt.Sprintf("  likelihood ratio %.2f, p-value %s (from ½χ²₁ + ½χ²₂: s_F = 0 lies on the boundary)", c.LR, PValue(c.P))
			if c.AnnualSpreadGain != 0 { // 0: not computed (no 365-day windows, or an older model file)
				line += "; with the slow part the model's sd of 365-day means is " + numfmt.Percent(c.AnnualSpreadGain) + " wider"
			}
			e.printf("%s\n", Wrap(line, "    "))
		}
	}
	if dg != nil {
		if f.Slow != nil || (dg.SlowChoice != nil && dg.SlowChoice.Setting != "none") {
			e.printf("AR order of the fast part by BIC (exact likelihood, slow part in the model;\n" +
				"  orders above 1 with the slow part held)\n")
		} else {
			e.printf("AR order by BIC (exact likelihood)\n")
		}
		e.table([]string{"p", "BIC", ""}, orderRows(dg.ARTable))
	}

	e.printf("\nFast-part innovation volatility σ by month (%s, with 95%% band)\n", u)
	rows = rows[:0]
	v := f.Volatility
	for m := range 12 {
		rows = append(rows, []string{time.Month(m + 1).String()[:3], Num(v.Monthly[m], 3),
			Num(v.Band[m][0], 3) + "–" + Num(v.Band[m][1], 3), fmt.Sprint(v.Count[m])})
	}
	e.table([]string{"month", "σ", "95% band", "innovations"}, rows)

	e.printf("\nShocks: %s\n", ShockText(f.Shocks))
	if dg != nil {
		rows = rows[:0]
		for _, s := range dg.ShockTable {
			if f, _ := model.LookupFamily(s.Family); !f.Parametric() {
				rows = append(rows, []string{s.Family, "—", "—", "—", "—", Mark(s.Chosen)})
				continue
			}
			rows = append(rows, []string{s.Family, Num(s.LogLik, 1), fmt.Sprint(s.Params), Num(s.AIC, 1),
				ShapeText(s), Mark(s.Chosen)})
		}
		e.table([]string{"family", "log-lik", "shape params", "AIC", "shape", ""}, rows)
		writeDiagnostics(e, f)
		if len(checks) > 0 {
			header, rows, notes := ExtremesTable(checks, f.Data.Units, false)
			e.printf("\nExtreme days checked by extreme-value theory (the model simulated for %d)\n", checks[0].Year)
			e.table(header, rows)
			e.printf("%s\n", Wrap("  "+strings.Join(notes, " "), "  "))
		}
	}
	if warns := FitWarnings(f, checks); len(warns) > 0 {
		e.printf("\nWarnings\n")
		for _, w := range warns {
			e.printf("%s\n", wrap("  - "+w, wrapWidth, "    "))
		}
	} else {
		e.printf("\nWarnings: none\n")
	}
	e.printf("\n%s\n", Wrap(Caution, ""))
	return e.err
}

func writeDiagnostics(e *errWriter, f *model.File) {
	dg := f.Diagnostics
	u := "°" + f.Data.Units
	e.printf("\nDiagnostics of the standardized innovations z\n")
	rows := [][]string{
		lbRow("Ljung–Box Q(10) on z", dg.LjungBoxZ10),
		lbRow("Ljung–Box Q(20) on z", dg.LjungBoxZ20),
		lbRow("Ljung–Box Q(10) on z²", dg.LjungBoxZ210),
		lbRow("Ljung–Box Q(20) on z²", dg.LjungBoxZ220),
		lbRow("Jarque–Bera", dg.JarqueBera),
		{"Kolmogorov–Smirnov D vs " + dg.KSFamily, Num(dg.KS.Stat, 4), "", PValue(dg.KS.P), verdict(dg.KS.P)},
		{"skewness", Num(dg.Skewness, 3), "", "", ""},
		{"excess kurtosis", Num(dg.ExcessKurtosis, 3), "", "", ""},
	}
	e.table([]string{"test", "statistic", "df", "p-value", "at 5 %"}, rows)
	e.printf("\nPersistence: autocorrelation of X (95%% bound ±%.3f)\n", dg.ACFBound)
	rows = rows[:0]
	for _, lag := range []int{1, 2, 3, 5, 10, 20, 30} {
		if lag <= len(dg.ACF) {
			rows = append(rows, []string{fmt.Sprint(lag), Num(dg.ACF[lag-1], 3), Num(dg.PACF[lag-1], 3)})
		}
	}
	e.table([]string{"lag (days)", "ACF", "PACF"}, rows)
	e.printf("\nSpread of window-mean anomalies: data against model (%s)\n", u)
	e.printf("  band: 5–95 %% of the sd in records of this length and gaps simulated from the fitted model\n")
	rows = rows[:0]
	fastBand := false
	for _, s := range dg.Spread {
		if s.Windows < 2 {
			rows = append(rows, []string{fmt.Sprintf("%d-day means", s.Days), fmt.Sprint(s.Windows), "—", "—", "—", "too few windows"})
			continue
		}
		row := []string{fmt.Sprintf("%d-day means", s.Days), fmt.Sprint(s.Windows),
			Num(s.Observed, 3), Num(s.Model, 3), Num(s.Band[0], 3) + "–" + Num(s.Band[1], 3), s.Verdict}
		if s.BandFastOnly != nil {
			fastBand = true
			row = append(row, Num(s.BandFastOnly[0], 3)+"–"+Num(s.BandFastOnly[1], 3))
		}
		rows = append(rows, row)
	}
	head := []string{"window", "windows", "observed sd", "model sd", "90% band", "observed"}
	if fastBand {
		head = append(head, "band, no slow part")
		for i := range rows {
			for len(rows[i]) < len(head) {
				rows[i] = append(rows[i], "")
			}
		}
	}
	e.table(head, rows)
}

// FitWarnings lists what should make a reader doubt a fitted model, in the
// words the fit summary prints them: the data's warnings, the AR-order
// advice, a slow part left out that would widen the annual spread, window spreads outside the model's band (with the remedy that
// moves them) and model return levels outside the GEV interval of checks.
// The fit summary, its stderr and the report's warnings row show this list.
func FitWarnings(f *model.File, checks []stress.ExtremeCheck) []string {
	warns := slices.Clone(f.Data.Warnings)
	dg := f.Diagnostics
	if dg == nil {
		return warns
	}
	for _, a := range []string{dg.ARAdvice, dg.SlowAdvice} {
		if a != "" {
			warns = append(warns, a)
		}
	}
	var narrow, wide []string
	for _, s := range dg.Spread {
		switch s.Verdict {
		case "too narrow":
			narrow = append(narrow, fmt.Sprint(s.Days))
		case "too wide":
			wide = append(wide, fmt.Sprint(s.Days))
		}
	}
	switch {
	case len(narrow) > 0 && f.Slow == nil:
		warns = append(warns, fmt.Sprintf("the data's spread over %s days lies above the model's band: seasonal and annual sums will be "+
			"too narrow; refit with --slow on (more AR lags do not add low-frequency spread)", andList(narrow)))
	case len(narrow) > 0:
		warns = append(warns, fmt.Sprintf("the data's spread over %s days lies above the model's band even with the slow part: "+
			"treat tail tables over that span as narrow", andList(narrow)))
	}
	if len(wide) > 0 {
		warns = append(warns, fmt.Sprintf("the data's spread over %s days lies below the model's band: the model is wider than the record at that span", andList(wide)))
	}
	return append(warns, gevWarnings(checks)...)
}

// gevWarnings lists the model return levels outside the GEV's interval.
func gevWarnings(checks []stress.ExtremeCheck) []string {
	var warns []string
	for _, c := range checks {
		for _, l := range c.Levels {
			if l.Outside {
				warns = append(warns, fmt.Sprintf("%s, %s: the model's 1-in-%s lies %s the GEV's 95 %% interval", c.Index.Info().Name,
					c.Period, periodKey(l.T), l.OutsideSide))
			}
		}
	}
	return warns
}

func lbRow(name string, t model.Test) []string {
	return []string{name, Num(t.Stat, 2), Num(t.DF, 0), PValue(t.P), verdict(t.P)}
}

func verdict(p float64) string {
	if p < 0.05 {
		return "rejected"
	}
	return "not rejected"
}

// HarmonicsTable lays out the harmonics table: the prewhitened BIC that
// chooses K and, beside it, the OLS BIC that takes the days as independent
// (files from before the prewhitening have only the latter, as BIC). The
// terminal and the report show the same cells.
func HarmonicsTable(dg *model.Diagnostics) (title string, head []string, rows [][]string) {
	if dg.HarmonicsRho == 0 {
		return "Harmonics by BIC (lower is better)", []string{"K", "BIC", ""}, orderRows(dg.HarmonicsTable)
	}
	title = fmt.Sprintf("Harmonics by BIC (lower is better) of the mean model with AR(1) errors: the regression prewhitened "+
		"by the residuals' lag-1 autocorrelation ρ = %.3f; beside it the OLS BIC, which takes the days as independent and "+
		"so favours more harmonics", dg.HarmonicsRho)
	rows = orderRows(dg.HarmonicsTable)
	for i, r := range dg.HarmonicsTable {
		rows[i] = append(rows[i][:2], Num(r.BICIndependent, 1), rows[i][2])
	}
	return title, []string{"K", "BIC", "OLS BIC", ""}, rows
}

func orderRows(s []model.OrderScore) [][]string {
	best := 0
	for i, r := range s {
		if r.BIC < s[best].BIC {
			best = i
		}
	}
	rows := make([][]string, len(s))
	for i, r := range s {
		note := []string{}
		if r.Chosen {
			note = append(note, "fitted")
		}
		if i == best {
			note = append(note, "lowest")
		}
		rows[i] = []string{fmt.Sprint(r.Order), Num(r.BIC, 1), strings.Join(note, ", ")}
	}
	return rows
}

// Mark is the note beside the chosen row of a model-choice table.
func Mark(b bool) string {
	if b {
		return "chosen"
	}
	return ""
}

// ShapeText is the family's shape parameters as reports show them.
func ShapeText(s model.FamilyScore) string { return s.ShapeText() }

// ShockText describes a model's shock family with its parameters.
func ShockText(s model.Shocks) string { return s.Text() }

// DayName turns a fractional day of year into a date label, e.g. "25 Jul".
func DayName(doy float64) string {
	d := time.Date(2001, time.January, 1, 0, 0, 0, 0, time.UTC).AddDate(0, 0, int(doy)-1)
	return d.Format("2 Jan")
}

// andList joins words as "a", "a and b" or "a, b and c".
func andList(words []string) string {
	if len(words) < 2 {
		return strings.Join(words, "")
	}
	return strings.Join(words[:len(words)-1], ", ") + " and " + words[len(words)-1]
}
