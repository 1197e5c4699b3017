package render

import (
	"fmt"
	"io"
	"math"
	"strings"

	"wxstress/internal/numfmt"
	"wxstress/model"
	"wxstress/sim"
)

// bandText lists the noise's σ by temperature band.
func bandText(n model.DemandNoise, u string, dec int, unit string) string {
	var parts []string
	for i, s := range n.BandSigma {
		var where string
		switch {
		case i == 0:
			where = "below " + Num(n.BandEdges[0], 1) + " " + u
		case i == len(n.BandSigma)-1:
			where = "from " + Num(n.BandEdges[i-1], 1) + " " + u
		default:
			where = Num(n.BandEdges[i-1], 1) + " to " + Num(n.BandEdges[i], 1)
		}
		parts = append(parts, where+": "+Num(s, dec))
	}
	return strings.Join(parts, "; ") + " " + unit
}

// DemandSummary writes the readable summary of a fitted demand model.
func DemandSummary(w io.Writer, m *model.Demand) error { return DemandSummaryWith(w, m, nil) }

// DemandSummaryWith is DemandSummary with the weather-normalized history
// (NormalsTable) before the warnings and the caution; nil normals leave it
// out.
func DemandSummaryWith(w io.Writer, m *model.Demand, normals []sim.YearNormal) error {
	e := &errWriter{w: w}
	u := "°" + m.TemperatureUnits
	d := m.Data
	dec := LoadDecimals(m.Fit.MeanLoad)
	e.printf("%s\n", Wrap(fmt.Sprintf("Demand record  %s, with temperatures from %s (%s)", d.DemandFile, d.TemperatureFile, u), "  "))
	line := fmt.Sprintf("  %s to %s: %d rows, %d days fitted; %d without a load, %d without a temperature; %d holidays",
		d.FirstDate, d.LastDate, d.Rows, d.Days, d.MissingLoad, d.MissingTemperature, d.Holidays)
	switch {
	case d.HolidaysFile != "" && d.HolidayColumn != "":
		line += fmt.Sprintf(" (column %s and %s)", d.HolidayColumn, d.HolidaysFile)
	case d.HolidaysFile != "":
		line += fmt.Sprintf(" (from %s)", d.HolidaysFile)
	case d.HolidayColumn != "":
		line += fmt.Sprintf(" (column %s)", d.HolidayColumn)
	}
	e.printf("%s\n", Wrap(line+"; loads in "+m.Unit, "    "))
	if list := HolidayListText(d); list != "" {
		e.printf("%s\n", Wrap(fmt.Sprintf("  holidays from %s: %s", d.HolidaysFile, list), "    "))
	}

	writeDemandForms(e, m, u)

	e.printf("\nCoefficients (%s; standard errors by OLS, conditional on the balance points)\n", m.Unit)
	rows := [][]string{demandCoefRow("base load β0 (a Monday, not a holiday)", m.Intercept, m.SE.Intercept, dec)}
	for i := 1; i < 7; i++ {
		rows = append(rows, demandCoefRow(Weekdays[i]+" (vs Monday)", m.Weekday[i], m.SE.Weekday[i], dec))
	}
	rows = append(rows, demandCoefRow("holiday", m.Holiday, m.SE.Holiday, dec))
	if m.Heating.Present {
		rows = append(rows, demandCoefRow(fmt.Sprintf("heating slope βH, per %s below %.1f %s", u, m.Heating.BalancePoint, u),
			m.Heating.Slope, m.Heating.SlopeSE, dec+1))
	}
	if m.Cooling.Present {
		rows = append(rows, demandCoefRow(fmt.Sprintf("cooling slope βC, per %s above %.1f %s", u, m.Cooling.BalancePoint, u),
			m.Cooling.Slope, m.Cooling.SlopeSE, dec+1))
	}
	e.table([]string{"term", "estimate", "s.e.", "t"}, rows)
	e.printf("  balance points: %s\n", demandBalanceText(m, u))
	if dg := m.Diagnostics; dg != nil {
		e.printf("%s\n", Wrap(fmt.Sprintf("  the standard errors assume independent residuals; the residuals' lag-1 "+
			"autocorrelation is %.2f, so they understate the uncertainty", dg.ACF1), "  "))
	}

	f := m.Fit
	e.printf("\nFit  R² = %.4f; RMSE = %s %s (n = %d, p = %d); mean load %s %s\n",
		f.R2, Num(f.RMSE, dec), m.Unit, f.N, f.Parameters, Num(f.MeanLoad, dec), m.Unit)
	e.printf("CV(RMSE) and NMBE beside the calibration levels of ASHRAE Guideline 14-2014\n")
	rows = rows[:0]
	var heldOut string
	for _, c := range f.Checks {
		result := "meets"
		if !c.Pass {
			result = "FAILS"
		}
		data := c.Data
		if d, span, ok := strings.Cut(data, ": "); ok { // "daily, held out: 2025-01-01 to 2025-12-31"
			data, heldOut = d, span
		}
		rows = append(rows, []string{data, fmt.Sprint(c.N), fmt.Sprint(c.P), Num(c.CVRMSE, 2), DemandPercent(c.NMBE),
			fmt.Sprintf("%s: ≤ %.0f %%, ±%.0f %%", c.Level, c.CVRMSEMax, c.NMBEMax), result})
	}
	e.table([]string{"compared", "n", "p", "CV(RMSE) %", "NMBE %", "guideline level", "level"}, rows)
	if heldOut != "" {
		e.printf("  held out: %s\n", heldOut)
	}
	e.printf("%s\n", Wrap("  CV(RMSE) = 100·√(Σ(y − ŷ)²/(n − p))/ȳ and NMBE = 100·Σ(y − ŷ)/((n − p)·ȳ), p the model's "+
		"parameters (coefficients and balance points). The guideline's levels are for monthly (CV(RMSE) ≤ 15 %, "+
		"|NMBE| ≤ 5 %) and hourly (≤ 30 %, ±10 %) data; daily values are held to the hourly levels, the daily fit's "+
		"sums over the calendar months it covers fully to the monthly ones. In sample, NMBE of a least-squares fit is 0 "+
		"by construction; the held-out last year, predicted by a refit (grid search included) to the days before it, "+
		"is the informative check (p = 0 where the model was not fitted to the values).", "  "))

	n := m.Noise
	if n.Scale == "bands" {
		e.printf("\n%s\n", Wrap(fmt.Sprintf("Residual noise u(t) = φ·u(t−1) + σ(T)·z(t): φ = %.3f (s.e. %.3f), σ by temperature "+
			"band (%s), from %d pairs of consecutive days", n.Phi, n.PhiSE, bandText(n, u, dec, m.Unit), n.Pairs), "  "))
	} else if n.Scale == "load" {
		e.printf("\nResidual noise u(t) = φ·u(t−1) + σ·E(t)/Ē·z(t): φ = %.3f (s.e. %.3f), σ = %s %s at the mean expected load Ē = %s,\n"+
			"  in proportion to the day's expected load E(t); from %d pairs of consecutive days\n",
			n.Phi, n.PhiSE, Num(n.Sigma, dec), m.Unit, numfmt.Fixed(n.MeanLoad, 0), n.Pairs)
	} else {
		e.printf("\n%s\n", Wrap(fmt.Sprintf("Residual noise u(t) = φ·u(t−1) + σ·z(t): φ = %.3f (s.e. %.3f), σ = %s %s, from %d "+
			"pairs of consecutive days", n.Phi, n.PhiSE, Num(n.Sigma, dec), m.Unit, n.Pairs), "  "))
	}
	if len(n.Choice) > 1 {
		rows = [][]string{}
		for _, c := range n.Choice {
			rows = append(rows, []string{map[string]string{"constant": "constant σ", "load": "σ in proportion to the expected load",
				"bands": "σ by temperature quarter"}[c.Scale], Num(c.LogLik, 1), fmt.Sprint(c.Params), Num(c.AIC, 1), Mark(c.Chosen)})
		}
		e.table([]string{"noise scale", "log-likelihood", "parameters", "AIC", ""}, rows)
	}
	if c := n.Cold; c != nil {
		line := fmt.Sprintf("  On the coldest 5%% of days (%d, mean below %s %s) the innovations' sd is %s against %s from the noise model",
			c.Days, Num(c.Below, 1), u, numfmt.Fixed(c.Observed, 0), numfmt.Fixed(c.Model, 0))
		if r := c.Model / c.Observed; r < 0.9 {
			line += fmt.Sprintf(": the model's peak-day spread is too narrow (its sd %.0f %% of the observed)", 100*r)
		} else {
			line += fmt.Sprintf(" (its sd %.0f %% of the observed)", 100*c.Model/c.Observed)
		}
		e.printf("%s\n", Wrap(line, "  "))
	}
	if dg := m.Diagnostics; dg != nil {
		rows = [][]string{
			{"lag-1 autocorrelation of the residuals", Num(dg.ACF1, 3), "", "", ""},
			lbRow("Ljung–Box Q(10) on the residuals", dg.LjungBoxResiduals),
			lbRow("Ljung–Box Q(10) on the AR(1) innovations", dg.LjungBoxInnovations),
			lbRow("Jarque–Bera on the innovations", dg.JarqueBera),
			{"skewness of the innovations", Num(dg.Skewness, 3), "", "", ""},
			{"excess kurtosis of the innovations", Num(dg.ExcessKurtosis, 3), "", "", ""},
		}
		e.table([]string{"test", "statistic", "df", "p-value", "at 5 %"}, rows)
		if dg.LjungBoxInnovations.P < 0.05 {
			e.printf("  the AR(1) innovations are still autocorrelated: some day-to-day structure (for example weekday " +
				"effects that change with the season) is not in the model\n")
		}
	}

	writeNormals(e, normals, m.Unit)
	if len(m.Warnings) > 0 {
		e.printf("\nWarnings\n")
		for _, w := range m.Warnings {
			e.printf("%s\n", Wrap("  - "+w, "    "))
		}
	}
	e.printf("\n%s\n", Wrap(Caution, ""))
	return e.err
}

// Weekdays names the days of the week in the demand model's order
// (model.Demand.Weekday[0] is Monday).
var Weekdays = [7]string{"Monday", "Tuesday", "Wednesday", "Thursday", "Friday", "Saturday", "Sunday"}

func writeDemandForms(e *errWriter, m *model.Demand, u string) {
	if len(m.Forms) == 0 {
		return
	}
	e.printf("\nChange-point form: %s\n%s\n", m.Form, Wrap("  "+m.FormRule, "  "))
	search := "  "
	if dg := m.Diagnostics; dg != nil {
		search = fmt.Sprintf("  balance points searched from %.1f to %.1f %s (5th to 95th percentile of temperature) in %.1f %s steps; ",
			dg.SearchRange[0], dg.SearchRange[1], u, dg.SearchStep, u)
	}
	e.printf("%s\n", Wrap(search+"each form at its best grid point; BIC counts each balance point as a parameter (lower is better)", "  "))
	best := math.Inf(1)
	for _, s := range m.Forms {
		if s.BIC < best && s.RSS > 0 {
			best = s.BIC
		}
	}
	var rows [][]string
	var notes []string // a form's remark under the table, not in a column
	for _, s := range m.Forms {
		bp := make([]string, len(s.BalancePoints))
		for i, v := range s.BalancePoints {
			bp[i] = fmt.Sprintf("%.1f", v)
		}
		sl := make([]string, len(s.Slopes))
		for i, v := range s.Slopes {
			sl[i] = Num(v, 1) // thousands separated, as the coefficients below
		}
		var note []string
		if s.Chosen {
			note = append(note, "chosen")
		}
		if s.Note != "" {
			notes = append(notes, Wrap("  "+s.Form+": "+s.Note, "    "))
		}
		bic, delta := "—", "—"
		if s.RSS > 0 {
			bic, delta = Num(s.BIC, 1), Num(s.BIC-best, 1)
		}
		rows = append(rows, []string{s.Form, strings.Join(bp, ", "), strings.Join(sl, ", "), fmt.Sprint(s.Parameters),
			bic, delta, strings.Join(note, "; ")})
	}
	e.printf("  slopes in %s per %s; p the parameters\n", m.Unit, u)
	e.table([]string{"form", "balance points " + u, "slopes", "p", "BIC", "ΔBIC", ""}, rows)
	for _, n := range notes {
		e.printf("%s\n", n)
	}
}

func demandBalanceText(m *model.Demand, u string) string {
	switch {
	case m.Form == model.FormHeatingCooling:
		return fmt.Sprintf("one, Tb = %.1f %s (heating below, cooling above)", m.Heating.BalancePoint, u)
	case m.Heating.Present && m.Cooling.Present:
		return fmt.Sprintf("heating TbH = %.1f %s, cooling TbC = %.1f %s (flat between)", m.Heating.BalancePoint, u,
			m.Cooling.BalancePoint, u)
	case m.Heating.Present:
		return fmt.Sprintf("heating TbH = %.1f %s (no cooling term)", m.Heating.BalancePoint, u)
	}
	return fmt.Sprintf("cooling TbC = %.1f %s (no heating term)", m.Cooling.BalancePoint, u)
}

// demandCoefRow formats a coefficient with its standard error and t ratio; a zero
// standard error means the term was not estimated.
func demandCoefRow(name string, v, se float64, dec int) []string {
	if se == 0 {
		return []string{name, Num(v, dec), "—", "—"}
	}
	return []string{name, Num(v, dec), Num(se, dec), Num(v/se, 1)}
}

// DemandPercent formats a percentage to two decimals, without a sign on a value that
// rounds to zero.
func DemandPercent(v float64) string {
	if math.Abs(v) < 0.005 {
		return "0.00"
	}
	return Num(v, 2)
}

// LoadDecimals picks decimals for loads of this size: four significant
// digits at the mean, at least none.
func LoadDecimals(mean float64) int {
	if !(mean > 0) {
		return 2
	}
	return max(0, 3-int(math.Floor(math.Log10(mean))))
}

// HolidayListText describes the holiday list a demand model was fitted with:
// "3 dates, 4 rules (fourth Thursday of November, …)"; "" when the model
// records none (no list, or a file written before rules).
func HolidayListText(d model.DemandData) string {
	if d.HolidayListDates+len(d.HolidayRules) == 0 {
		return ""
	}
	s := Plural(d.HolidayListDates, "date")
	if n := len(d.HolidayRules); n > 0 {
		s += fmt.Sprintf(", %s (%s)", Plural(n, "rule"), strings.Join(d.HolidayRules, ", "))
	}
	return s
}

// Plural writes a count and a noun, with an s unless the count is 1.
func Plural(n int, noun string) string {
	if n == 1 {
		return "1 " + noun
	}
	return fmt.Sprintf("%d %ss", n, noun)
}
