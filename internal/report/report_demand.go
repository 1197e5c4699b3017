package report

import (
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"
	"time"

	"wxstress/internal/numfmt"
	"wxstress/internal/render"
	"wxstress/model"
	"wxstress/sim"
)

// demandCurveDay is the weekday whose fitted load the report draws as "an
// ordinary weekday": mid-week, away from Monday and Friday effects.
const demandCurveDay = time.Wednesday

// newDemandView describes a fitted demand model for the report: the
// observed daily pairs (temps, loads; NaN pairs are skipped when plotted),
// the fitted load of an ordinary weekday over the observed temperature
// range, the facts a reviewer checks (form, balance points, slopes, fit
// quality against ASHRAE Guideline 14, noise) and the model's warnings.
func newDemandView(retailer string, m *model.Demand, temps, loads []float64) *DemandView {
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
func (b *builder) demandUnit() string {
	switch {
	case b.in.Sim != nil && b.in.Sim.Planning != nil && b.in.Sim.Planning.Unit != "":
		return b.in.Sim.Planning.Unit
	case b.in.Demand != nil:
		return b.in.Demand.Unit
	}
	if b.in.Sim != nil {
		for _, row := range b.in.Sim.Rows {
			if row.Index == sim.PeakDemand {
				return row.Unit
			}
		}
	}
	return ""
}

// demandView is section 5: the demand model, the planning tables and plots,
// and the demand indices.
type demandView struct {
	Model    *demandModelView // nil without a fitted demand model
	Planning *planningBlock   // nil when there is nothing to plan with
	Periods  []periodBlock
	History  *historyBlock // nil without weather-normalized years
}

// demandModelView describes the fitted demand model.
type demandModelView struct {
	Who, Unit, Form string
	Figure          *figView
	Facts           *kvTable // nil without facts
	Warnings        []string
}

func (b *builder) demandSection() (any, error) {
	in := b.in
	v := &demandView{}
	if d := in.Demand; d != nil {
		mv := &demandModelView{Who: d.Retailer, Unit: d.Unit, Form: d.Form, Warnings: d.Warnings}
		if mv.Who == "" {
			mv.Who = "The demand series"
		}
		f, ok, err := demandFigure(d, b.units)
		if err != nil {
			return nil, err
		}
		if ok {
			mv.Figure = b.figure(f)
		}
		if len(d.Facts) > 0 {
			mv.Facts = &kvTable{"demand-model", "Demand model", d.Facts}
		}
		v.Model = mv
	}
	if in.Sim == nil {
		return v, nil
	}
	var err error
	if v.Planning, err = b.planning(); err != nil {
		return nil, err
	}
	v.Periods, err = b.periodBlocks(demandRows(in.Sim.Rows), "demand-", "Demand, period ", "Demand tail table, baseline, ",
		"Histograms and exceedance curves of demand")
	if err != nil {
		return nil, err
	}
	v.History = b.history()
	return v, nil
}

// planningBlock is what the template "planning" shows: the design peaks,
// the daily demand fan and the load-duration curve.
type planningBlock struct {
	Unit         string
	Peaks        []peakRow
	Capacity     string // "" without a capacity
	Figures      []*figView
	LoadDuration *loadDurationTable // nil without the curve
}

// peakRow is one period's design peaks.
type peakRow struct {
	Period string
	Cells  []numCell
}

// loadDurationTable is the load-duration curve at LoadDurationRanks, cells
// identified as in SimCSV (index "load-duration", statistic "rankN:pQQ").
type loadDurationTable struct {
	Unit  string
	Paths int
	Probs []string // column heads, "P5" ...
	Ranks []rankRow
}

// rankRow is the n-th highest day's quantiles across the synthetic years.
type rankRow struct {
	Rank  int
	Cells []numCell
}

// planning lays out the design peaks, the daily demand fan and the
// load-duration curve; nil when the run has none of them.
func (b *builder) planning() (*planningBlock, error) {
	in := b.in
	var peaks []sim.Row
	for _, row := range in.Sim.Rows {
		if row.Index == sim.PeakDemand && row.Info.Key == "peak-demand" {
			peaks = append(peaks, row)
		}
	}
	p := in.Sim.Planning
	hasFan := in.Fan != nil && len(in.Fan.DemandQ) == len(sim.FanQuantileProbs())
	hasLD := p != nil && len(p.LoadDuration) == len(sim.FanQuantileProbs()) && len(p.LoadDuration[0]) > 0
	if len(peaks) == 0 && !hasFan && !hasLD {
		return nil, nil
	}
	unit := b.demandUnit()
	capacity := in.Sim.Manifest.Capacity
	v := &planningBlock{Unit: unit}
	for _, row := range peaks {
		t := row.Tail
		pr := peakRow{Period: row.Period}
		for _, c := range []struct {
			stat string
			v    float64
		}{{"p50", t.Quantile(0.50)}, {"p90", t.Quantile(0.90)}, {"rl20", t.ReturnLevel(20)}, {"rl50", t.ReturnLevel(50)},
			{"es99", t.ES99}} {
			pr.Cells = append(pr.Cells, newNumCell("baseline", row, c.stat, value(c.v)))
		}
		v.Peaks = append(v.Peaks, pr)
	}
	if capacity > 0 {
		v.Capacity = numfmt.Number(capacity) + " " + unit
	}
	if hasFan {
		f, err := demandFanFigure(in.Fan, unit, capacity)
		if err != nil {
			return nil, err
		}
		v.Figures = append(v.Figures, b.figure(f))
	}
	if hasLD {
		f, err := loadDurationFigure(p, unit, capacity, in.Sim.Manifest.Year)
		if err != nil {
			return nil, err
		}
		v.Figures = append(v.Figures, b.figure(f))
		v.LoadDuration = newLoadDurationTable(p, unit)
	}
	return v, nil
}

func newLoadDurationTable(p *render.Planning, unit string) *loadDurationTable {
	t := &loadDurationTable{Unit: unit, Paths: p.LoadDurationPaths}
	for _, q := range sim.FanQuantileProbs() {
		t.Probs = append(t.Probs, fmt.Sprintf("P%.0f", 100*q))
	}
	row := sim.Row{Period: "year", Info: sim.Info{Key: "load-duration"}}
	for _, rank := range render.LoadDurationRanks() {
		if rank > len(p.LoadDuration[0]) {
			break
		}
		rr := rankRow{Rank: rank}
		for k, q := range sim.FanQuantileProbs() {
			rr.Cells = append(rr.Cells, newNumCell("baseline", row, fmt.Sprintf("rank%d:p%02.0f", rank, 100*q),
				value(p.LoadDuration[k][rank-1])))
		}
		t.Ranks = append(t.Ranks, rr)
	}
	return t
}

// historyBlock is what the template "history" shows: the weather-normalized
// history, cells identified as in SimCSV (index "history", period the
// year).
type historyBlock struct {
	Unit  string // of a year's energy
	Years []historyYear
}

// historyYear is one historical year's demand.
type historyYear struct {
	Year, Days int
	Cells      []numCell
	Effect     string // the weather's effect in per cent, "—" when undefined
}

func (b *builder) history() *historyBlock {
	p := b.in.Sim.Planning
	if p == nil || len(p.Normals) == 0 {
		return nil
	}
	h := &historyBlock{Unit: render.EnergyUnit(p.Unit)}
	for _, y := range p.Normals {
		row := sim.Row{Period: strconv.Itoa(y.Year), Info: sim.Info{Key: "history"}}
		hy := historyYear{Year: y.Year, Days: y.Days, Effect: "—"}
		for _, c := range []struct {
			stat string
			v    float64
		}{{"actual", y.Actual}, {"model_at_actual_weather", y.AtActualWeather}, {"model_at_normal_weather", y.AtNormalWeather},
			{"weather_normalized", y.Normalized}} {
			hy.Cells = append(hy.Cells, newNumCell("baseline", row, c.stat, value(c.v)))
		}
		if y.Normalized != 0 {
			hy.Effect = fmt.Sprintf("%+.1f %%", 100*(y.Actual/y.Normalized-1))
		}
		h.Years = append(h.Years, hy)
	}
	return h
}
