package report

import (
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"
	"time"

	"wxstress/internal/render"
	"wxstress/model"
	"wxstress/sim"
)

// demandCurveDay is the weekday whose fitted load the report draws as "an
// ordinary weekday": mid-week, away from Monday and Friday effects.
const demandCurveDay = time.Wednesday

// NewDemandView describes a fitted demand model for the report: the
// observed daily pairs (temps, loads; NaN pairs are skipped when plotted),
// the fitted load of an ordinary weekday over the observed temperature
// range, the facts a reviewer checks (form, balance points, slopes, fit
// quality against ASHRAE Guideline 14, noise) and the model's warnings.
func NewDemandView(retailer string, m *model.Demand, temps, loads []float64) *DemandView {
	v := &DemandView{Retailer: retailer, Unit: m.Unit, Form: m.Form, Temps: temps, Loads: loads,
		Warnings: slices.Clone(m.Warnings)}
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, t := range temps {
		if !math.IsNaN(t) && !math.IsInf(t, 0) {
			lo, hi = min(lo, t), max(hi, t)
		}
	}
	if hi >= lo {
		const steps = 200
		lo, hi = math.Floor(lo-1), math.Ceil(hi+1)
		for k := 0; k <= steps; k++ {
			t := lo + (hi-lo)*float64(k)/steps
			v.CurveT = append(v.CurveT, t)
			v.CurveLoad = append(v.CurveLoad, m.Expected(t, demandCurveDay, false))
		}
	}
	u, deg := m.Unit, "°"+m.TemperatureUnits
	dec := render.LoadDecimals(m.Fit.MeanLoad)
	d := m.Data
	fact := func(k, format string, a ...any) { v.Facts = append(v.Facts, [2]string{k, fmt.Sprintf(format, a...)}) }
	fact("data", "%s, %s to %s, %d days fitted (%d holidays)", d.DemandFile, d.FirstDate, d.LastDate, d.Days, d.Holidays)
	if list := render.HolidayListText(d); list != "" {
		fact("holiday list", "%s: %s", d.HolidaysFile, list)
	}
	fact("change-point form", "%s: %s", m.Form, m.FormRule)
	fact("base load β0", "%s %s (a Monday that is not a holiday, between the balance points)", render.Num(m.Intercept, dec), u)
	if m.Heating.Present {
		fact("heating", "%s %s per %s below %.1f %s (s.e. %s)", render.Num(m.Heating.Slope, dec+1), u, deg,
			m.Heating.BalancePoint, deg, render.Num(m.Heating.SlopeSE, dec+1))
	}
	if m.Cooling.Present {
		fact("cooling", "%s %s per %s above %.1f %s (s.e. %s)", render.Num(m.Cooling.Slope, dec+1), u, deg,
			m.Cooling.BalancePoint, deg, render.Num(m.Cooling.SlopeSE, dec+1))
	}
	var wd []string
	for i := 1; i < 7; i++ {
		wd = append(wd, fmt.Sprintf("%s %+.*f", render.Weekdays[i][:3], dec, m.Weekday[i]))
	}
	fact("weekday terms (vs Monday)", "%s", strings.Join(wd, ", "))
	fact("holiday term", "%+.*f %s", dec, m.Holiday, u)
	f := m.Fit
	fact("fit", "R² = %.4f, RMSE = %s %s, CV(RMSE) = %.2f %%, NMBE = %s %%, n = %d, p = %d", f.R2, render.Num(f.RMSE, dec), u,
		f.CVRMSE, render.DemandPercent(f.NMBE), f.N, f.Parameters)
	for _, c := range f.Checks {
		verdict := "meets"
		if !c.Pass {
			verdict = "fails"
		}
		fact("ASHRAE Guideline 14, "+c.Data, "CV(RMSE) %.2f %%, NMBE %s %%: %s the %s level (CV(RMSE) ≤ %.0f %%, |NMBE| ≤ %.0f %%)",
			c.CVRMSE, render.DemandPercent(c.NMBE), verdict, c.Level, c.CVRMSEMax, c.NMBEMax)
	}
	fact("residual noise", "AR(1): φ = %.3f (s.e. %.3f), σ = %s %s", m.Noise.Phi, m.Noise.PhiSE, render.Num(m.Noise.Sigma, dec), u)
	return v
}

// demandUnit is the daily demand unit of the report, "" when unknown.
func (r *report) demandUnit() string {
	switch {
	case r.in.Sim != nil && r.in.Sim.Planning != nil && r.in.Sim.Planning.Unit != "":
		return r.in.Sim.Planning.Unit
	case r.in.Demand != nil:
		return r.in.Demand.Unit
	}
	if r.in.Sim != nil {
		for _, row := range r.in.Sim.Rows {
			if row.Index == sim.PeakDemand {
				return row.Unit
			}
		}
	}
	return ""
}

// writeDemand writes section 5: the demand model, the planning tables and
// plots, and the demand indices.
func (r *report) writeDemand() error {
	in := r.in
	if d := in.Demand; d != nil {
		who := d.Retailer
		if who == "" {
			who = "The demand series"
		}
		r.printf("<p>%s: daily demand in %s modelled as a base load plus weekday and holiday terms plus heating and "+
			"cooling slopes beyond balance-point temperatures (a change-point model, form %s), with an AR(1) error. "+
			"Each synthetic year of temperature becomes a synthetic year of demand, which gives the period's energy "+
			"and its peak day.</p>\n", esc(who), esc(d.Unit), esc(d.Form))
		f, ok, err := demandFigure(d, r.units)
		if err != nil {
			return err
		}
		if ok {
			r.writeFigure(f)
		}
		if len(d.Facts) > 0 {
			r.kvTable("demand-model", "Demand model", d.Facts)
		}
		if len(d.Warnings) > 0 {
			r.raw("<ul class=\"verdicts\">\n")
			for _, w := range d.Warnings {
				r.printf("<li class=\"warn\">Warning: %s</li>\n", esc(w))
			}
			r.raw("</ul>\n")
		}
	}
	if in.Sim == nil {
		return nil
	}
	if err := r.writePlanning(); err != nil {
		return err
	}
	for k, g := range byPeriodOf(demandRows(in.Sim.Rows)) {
		r.printf("<h3 id=\"%s\">Demand, period %s</h3>\n", r.uniqueID("demand-"+g[0].Period), esc(r.periodText(g[0].Period)))
		r.tailTable("baseline", g, "Demand tail table, baseline, "+g[0].Period)
		figs, notes, err := r.indexFigures(g)
		if err != nil {
			return err
		}
		r.writeFigures(figs, notes, k == 0, fmt.Sprintf("Histograms and exceedance curves of demand, %s (%d plots)",
			g[0].Period, len(figs)))
	}
	r.writeNormals()
	return nil
}

// writePlanning writes the design peaks, the daily demand fan and the
// load-duration curve.
func (r *report) writePlanning() error {
	in := r.in
	var peaks []sim.Row
	for _, row := range in.Sim.Rows {
		if row.Index == sim.PeakDemand && row.Info.Key == "peak" {
			peaks = append(peaks, row)
		}
	}
	var p *render.Planning
	if in.Sim.Planning != nil {
		p = in.Sim.Planning
	}
	hasFan := in.Fan != nil && len(in.Fan.DemandQ) == len(sim.FanProbs)
	hasLD := p != nil && len(p.LoadDuration) == len(sim.FanProbs) && len(p.LoadDuration[0]) > 0
	if len(peaks) == 0 && !hasFan && !hasLD {
		return nil
	}
	unit := r.demandUnit()
	capacity := in.Sim.Manifest.Capacity
	r.raw("<h3 id=\"planning\">Peak day and load duration for capacity planning</h3>\n")
	if len(peaks) > 0 {
		r.raw("<p>The 50/50 peak is exceeded in one year in two and the 90/10 peak in one year in ten (common practice " +
			"in resource planning); the 1-in-20 and 1-in-50 peaks are the levels network planning sizes to; ES 99% is " +
			"the mean peak of the worst 1 % of years.</p>\n")
		r.printf("<div class=\"wide\"><table class=\"planning\">\n<caption>Peak-day demand (%s)</caption>\n"+
			"<thead><tr><th scope=\"col\">period</th><th scope=\"col\" class=\"n\">50/50 (P50)</th><th scope=\"col\" class=\"n\">90/10 (P90)</th>"+
			"<th scope=\"col\" class=\"n\">1-in-20</th><th scope=\"col\" class=\"n\">1-in-50</th><th scope=\"col\" class=\"n\">ES 99%%</th></tr></thead>\n<tbody>\n",
			esc(unit))
		for _, row := range peaks {
			t := row.Tail
			r.printf("<tr><th scope=\"row\">%s</th>", esc(row.Period))
			for _, c := range []struct {
				stat string
				v    float64
			}{{"p50", t.Quantiles[4]}, {"p90", t.Quantiles[6]}, {"rl20", t.ReturnLevels[3]}, {"rl50", t.ReturnLevels[4]},
				{"es99", t.ES99}} {
				r.printf("<td class=\"n\"%s>%s</td>", cellAttrs("baseline", row, c.stat), fixed(c.v, valueDecimals))
			}
			r.raw("</tr>\n")
		}
		r.raw("</tbody></table></div>\n")
		if capacity > 0 {
			r.printf("<p>Capacity: %g %s; the tables below count the days above it in each synthetic year.</p>\n", capacity, esc(unit))
		}
	}
	if hasFan || hasLD {
		r.raw("<div class=\"grid\">\n")
		if hasFan {
			f, err := demandFanFigure(in.Fan, unit, capacity)
			if err != nil {
				return err
			}
			r.writeFigure(f)
		}
		if hasLD {
			f, err := loadDurationFigure(p, unit, capacity, in.Sim.Manifest.Year)
			if err != nil {
				return err
			}
			r.writeFigure(f)
		}
		r.raw("</div>\n")
	}
	if hasLD {
		r.loadDurationTable(p, unit)
	}
	return nil
}

// loadDurationTable writes the load-duration curve at LoadDurationRanks,
// cells identified as in SimCSV (index "load-duration", statistic
// "rankN:pQQ").
func (r *report) loadDurationTable(p *render.Planning, unit string) {
	r.printf("<div class=\"wide\"><table class=\"load-duration\">\n<caption>Load-duration curve: the n-th highest day "+
		"of the year (%s), across %d synthetic years</caption>\n<thead><tr><th scope=\"col\">n-th highest day</th>",
		esc(unit), p.LoadDurationPaths)
	for _, q := range sim.FanProbs {
		r.printf("<th scope=\"col\" class=\"n\">P%.0f</th>", 100*q)
	}
	r.raw("</tr></thead>\n<tbody>\n")
	row := sim.Row{Period: "year", Info: sim.Info{Key: "load-duration"}}
	for _, rank := range render.LoadDurationRanks {
		if rank > len(p.LoadDuration[0]) {
			break
		}
		r.printf("<tr><th scope=\"row\">%d</th>", rank)
		for k, q := range sim.FanProbs {
			r.printf("<td class=\"n\"%s>%s</td>", cellAttrs("baseline", row, fmt.Sprintf("rank%d:p%02.0f", rank, 100*q)),
				fixed(p.LoadDuration[k][rank-1], valueDecimals))
		}
		r.raw("</tr>\n")
	}
	r.raw("</tbody></table></div>\n")
}

// writeNormals writes the weather-normalized history, cells identified as
// in SimCSV (index "history", period the year).
func (r *report) writeNormals() {
	p := r.in.Sim.Planning
	if p == nil || len(p.Normals) == 0 {
		return
	}
	u := render.EnergyUnit(p.Unit)
	r.raw("<h3 id=\"history\">Weather-normalized demand of the historical years</h3>\n<p>Each year's observed demand " +
		"with the weather's effect taken out: weather-normalized = actual − model at the actual weather + model at " +
		"normal weather (the mean over climatological simulations of that year, with the trend of that year and the " +
		"same calendar). A positive weather effect means the year's weather raised demand.</p>\n")
	r.printf("<div class=\"wide\"><table class=\"history\">\n<caption>Demand by historical year (%s)</caption>\n"+
		"<thead><tr><th scope=\"col\">year</th><th scope=\"col\" class=\"n\">days</th><th scope=\"col\" class=\"n\">actual</th>"+
		"<th scope=\"col\" class=\"n\">model, actual weather</th><th scope=\"col\" class=\"n\">model, normal weather</th>"+
		"<th scope=\"col\" class=\"n\">weather-normalized</th><th scope=\"col\" class=\"n\">weather effect</th></tr></thead>\n<tbody>\n", esc(u))
	for _, y := range p.Normals {
		row := sim.Row{Period: strconv.Itoa(y.Year), Info: sim.Info{Key: "history"}}
		r.printf("<tr><th scope=\"row\">%d</th><td class=\"n\">%d</td>", y.Year, y.Days)
		for _, c := range []struct {
			stat string
			v    float64
		}{{"actual", y.Actual}, {"model_at_actual_weather", y.AtActualWeather}, {"model_at_normal_weather", y.AtNormalWeather},
			{"weather_normalized", y.Normalized}} {
			r.printf("<td class=\"n\"%s>%s</td>", cellAttrs("baseline", row, c.stat), fixed(c.v, valueDecimals))
		}
		effect := "—"
		if y.Normalized != 0 {
			effect = fmt.Sprintf("%+.1f %%", 100*(y.Actual/y.Normalized-1))
		}
		r.printf("<td class=\"n\">%s</td></tr>\n", effect)
	}
	r.raw("</tbody></table></div>\n")
}
