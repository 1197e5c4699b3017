package render

import (
	"bytes"
	"cmp"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"maps"
	"math"
	"runtime"
	"slices"
	"strconv"
	"strings"
	"time"

	"golang.org/x/sync/errgroup"

	"wxstress/calendar"
	"wxstress/evidence"
	"wxstress/hedge"
	"wxstress/internal/numfmt"
	"wxstress/sim"
	"wxstress/stress"
)

// Manifest records what produced an output. It leaves out the worker count
// and the wall time on purpose: neither may change a result.
type Manifest struct {
	// SnapDays is the design cold snap's length (0 without design figures).
	SnapDays int `json:"snap_days,omitempty"`
	// RunID names the run that wrote a set of outputs (all files of one run
	// carry the same id).
	RunID       string   `json:"run_id,omitempty"`
	Tool        string   `json:"tool"`
	ToolVersion string   `json:"tool_version"`
	ModelFile   string   `json:"model_file"`
	ModelSHA256 string   `json:"model_sha256"`
	DataSHA256  string   `json:"data_sha256,omitempty"`
	Seed        uint64   `json:"seed"`
	Paths       int      `json:"paths"`
	Year        int      `json:"year"`
	Start       string   `json:"start"`
	Periods     []string `json:"periods"`
	// PeriodDates are the periods' first and last days in the target year.
	PeriodDates []PeriodDates `json:"period_dates,omitempty"`
	// SimulatedDays is the days stepped per path, burn-in included.
	SimulatedDays int      `json:"simulated_days"`
	Units         string   `json:"units"`
	HDDBase       float64  `json:"hdd_base"`
	CDDBase       float64  `json:"cdd_base"`
	ColdBelow     float64  `json:"cold_below"`
	Shocks        string   `json:"shocks"`
	Scenarios     []string `json:"scenarios"`
	DemandModel   string   `json:"demand_model,omitempty"`
	DemandSHA256  string   `json:"demand_sha256,omitempty"`
	Capacity      float64  `json:"capacity,omitempty"`
	// DemandGrowth is the factor demand was scaled by, (1 + g/100)^years
	// for a growth of g % a year (DemandGrowthPerCent) from the demand
	// record's end to the target year; 0 without growth.
	DemandGrowth        float64 `json:"demand_growth_factor,omitempty"`
	DemandGrowthPerCent float64 `json:"demand_growth_per_cent_a_year,omitempty"`
	Quantiles           string  `json:"quantile_convention"`
	Caution             string  `json:"caution"`
	// Warnings are the run's own cautions (stress.Result.Warnings).
	Warnings []string `json:"warnings,omitempty"`
	// ParameterUncertainty says how the run used refitted models
	// (--uncertainty): bands beside the tables, or paths spread over them.
	ParameterUncertainty string `json:"parameter_uncertainty,omitempty"`
	// Inputs are the run's other input files (history, season under way,
	// loads, hedges, scenario files) with their hashes.
	Inputs []ManifestInput `json:"inputs,omitempty"`
}

// ManifestInput is an input file of a run: what it is, its name and its
// SHA-256.
type ManifestInput struct {
	Role   string `json:"role"`
	File   string `json:"file"`
	SHA256 string `json:"sha256,omitempty"`
}

// QuantileConvention describes how quantiles are computed, for manifests.
const QuantileConvention = "Hyndman-Fan type 4 (linear interpolation of the empirical CDF); " +
	"expected shortfall = mean of the worst ceil((1-a)N) paths; return level 1-in-T = adverse quantile 1-1/T"

// SimReport is what the simulate renderers show: one result for the table,
// CSV and JSON forms.
type SimReport struct {
	Manifest Manifest
	// Periods are the run's periods with their dates in the target year.
	Periods   []sim.Period
	Rows      []sim.Row // the baseline
	Scenarios []ScenarioReport
	Planning  *Planning // with a demand model
	// History is the record's own seasons beside the model; nil without a
	// record.
	History *stress.HistoricalSeasons
	// Bands are the parameter-uncertainty bands of Rows (band mode) from
	// Refits refitted models; Mixed says the paths were spread over the
	// refitted models instead.
	Bands  []stress.RowBands
	Refits int
	Mixed  bool
	// Uncertainty words Refits and Mixed for the manifest and the summary
	// ("" without refits).
	Uncertainty string
	// Design and Capacities are the planner's design figures and solved
	// capacities.
	Design     []stress.DesignRow
	Capacities []stress.CapacityRow
	// Extremes is the GEV check of the simulated extremes (with a record).
	Extremes []stress.ExtremeCheck
	// InSeason is each period's observed part in a run of seasons under way.
	InSeason []sim.PeriodObserved
	// Hedge is the hedge evaluation of HedgeFile; nil without one.
	Hedge     *hedge.Result
	HedgeFile *hedge.File
}

// ScenarioReport is one scenario's tail tables and their changes against
// the baseline (Changes[i] belongs to Rows[i] and to the baseline's Rows[i]).
type ScenarioReport struct {
	Name        string
	Description string
	What        []string // what the scenario changes, in units
	Rows        []sim.Row
	Changes     []sim.Change
}

// jsonRow is an index row of the JSON output.
type jsonRow struct {
	Name      string             `json:"name"`
	Key       string             `json:"key"`
	Period    string             `json:"period"`
	Unit      string             `json:"unit"`
	Adverse   string             `json:"adverse"`
	Mean      float64            `json:"mean"`
	SD        float64            `json:"sd"`
	MeanSE    float64            `json:"mean_se"`
	Quantiles map[string]float64 `json:"quantiles"`
	// VaR, ES and return levels are left out for the day of the peak (a
	// date has no adverse side).
	VaR95        *float64           `json:"var95,omitempty"`
	VaR99        *float64           `json:"var99,omitempty"`
	ES95         *float64           `json:"es95,omitempty"`
	ES99         *float64           `json:"es99,omitempty"`
	ReturnLevels periodMap[float64] `json:"return_levels,omitempty"`
	Exceedance   []jsonExceed       `json:"exceedance,omitempty"`
	Change       *jsonChange        `json:"change_vs_baseline,omitempty"`
	// MonteCarloSE holds the standard errors of the tail numbers from the
	// paths run (null where the paths cannot bound a quantile).
	MonteCarloSE *jsonMCSE `json:"monte_carlo_se,omitempty"`
	// Band is the parameter-uncertainty band of the tail numbers (with
	// --uncertainty in band mode).
	Band *jsonRowBands `json:"band,omitempty"`
	// Dates is, for the day of the peak, the median date and the share of
	// paths in each month (its tail numbers count days of the period).
	Dates *jsonDates `json:"dates,omitempty"`
}

// jsonDates is a DateSpread in the JSON output.
type jsonDates struct {
	Median      calendar.Date      `json:"median"`
	MonthShares map[string]float64 `json:"month_shares"` // by month name, "January" ...
}

// jsonMCSE is the Monte Carlo error of a row's tail numbers.
type jsonMCSE struct {
	Quantiles    map[string]*float64 `json:"quantiles"`
	ReturnLevels periodMap[*float64] `json:"return_levels,omitempty"`
	VaR95        *float64            `json:"var95,omitempty"`
	VaR99        *float64            `json:"var99,omitempty"`
	ES95         *float64            `json:"es95,omitempty"`
	ES99         *float64            `json:"es99,omitempty"`
}

// periodMap is a JSON object keyed by return period ("2", "20", "100"),
// written in increasing order of the period rather than of the text.
type periodMap[V any] map[string]V

func (m periodMap[V]) MarshalJSON() ([]byte, error) {
	keys := slices.Collect(maps.Keys(m))
	slices.SortFunc(keys, func(a, b string) int {
		x, _ := strconv.ParseFloat(a, 64)
		y, _ := strconv.ParseFloat(b, 64)
		return cmp.Compare(x, y)
	})
	var b bytes.Buffer
	b.WriteByte('{')
	for i, k := range keys {
		if i > 0 {
			b.WriteByte(',')
		}
		kb, _ := json.Marshal(k)
		vb, err := json.Marshal(m[k])
		if err != nil {
			return nil, err
		}
		b.Write(kb)
		b.WriteByte(':')
		b.Write(vb)
	}
	b.WriteByte('}')
	return b.Bytes(), nil
}

// finitePtr is v, or nil (JSON null) when v is not finite.
func finitePtr(v float64) *float64 {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return nil
	}
	return &v
}

func toJSONMCSE(t sim.Tail, date bool) *jsonMCSE {
	if len(t.QuantileSE) == 0 {
		return nil
	}
	m := &jsonMCSE{Quantiles: map[string]*float64{}}
	for i, p := range sim.TailQuantileProbs() {
		m.Quantiles[fmt.Sprintf("%.2f", p)] = finitePtr(t.QuantileSE[i])
	}
	if date {
		return m
	}
	m.VaR95, m.VaR99, m.ES95, m.ES99 = finitePtr(t.VaR95SE), finitePtr(t.VaR99SE), finitePtr(t.ES95SE), finitePtr(t.ES99SE)
	m.ReturnLevels = periodMap[*float64]{}
	for i, T := range t.ReturnPeriods {
		m.ReturnLevels[periodKey(T)] = finitePtr(t.ReturnLevelSE[i])
	}
	return m
}

// jsonChange is a scenario row's change against the baseline.
type jsonChange struct {
	Mean          float64 `json:"mean"`
	MeanSE        float64 `json:"mean_se"`
	IndependentSE float64 `json:"independent_se"`
	P50           float64 `json:"p50"`
	// The adverse side's changes, left out for the day of the peak.
	VaR95 *float64 `json:"var95,omitempty"` // adverse 95 % quantile, as es95
	VaR99 *float64 `json:"var99,omitempty"`
	ES95  *float64 `json:"es95,omitempty"`
	RL20  *float64 `json:"return_level_20,omitempty"`
}

type jsonScenario struct {
	Name        string    `json:"name"`
	Description string    `json:"description"`
	Changes     []string  `json:"changes"`
	Indices     []jsonRow `json:"indices"`
}

type jsonExceed struct {
	Threshold   float64 `json:"threshold"`
	Probability float64 `json:"probability"`
	SE          float64 `json:"se"`
}

// AdverseSide is "high" or "low": the side of an index's values that is
// adverse; "none" for the day of the peak, a date.
func AdverseSide(r sim.Row) string {
	if r.Index == sim.PeakDay {
		return "none"
	}
	if r.Info.HighIsAdverse {
		return "high"
	}
	return "low"
}

// baseRows is the baseline's JSON rows with their parameter bands.
func baseRows(r *SimReport) []jsonRow {
	rows := toJSONRows(r.Rows)
	for k := range rows {
		if k < len(r.Bands) && r.Rows[k].Index != sim.PeakDay { // a date has no band of its VaR
			rows[k].Band = toJSONBands(r.Bands[k])
		}
	}
	return rows
}

func toJSONRows(rows []sim.Row) []jsonRow {
	out := make([]jsonRow, len(rows))
	for i, r := range rows {
		t := r.Tail
		date := r.Index == sim.PeakDay
		j := jsonRow{Name: r.Name, Key: r.Info.Key, Period: r.Period, Unit: r.Unit, Adverse: AdverseSide(r),
			Mean: t.Mean, SD: t.SD, MeanSE: t.MeanSE, Quantiles: map[string]float64{}, MonteCarloSE: toJSONMCSE(t, date)}
		for _, p := range sim.TailQuantileProbs() {
			j.Quantiles[fmt.Sprintf("%.2f", p)] = t.Quantile(p)
		}
		if !date {
			j.VaR95, j.VaR99, j.ES95, j.ES99 = &t.VaR95, &t.VaR99, &t.ES95, &t.ES99
			j.ReturnLevels = periodMap[float64]{}
			for _, T := range t.ReturnPeriods {
				j.ReturnLevels[periodKey(T)] = t.ReturnLevel(T)
			}
		}
		for _, e := range t.Exceedances {
			j.Exceedance = append(j.Exceedance, jsonExceed{e.Threshold, e.Prob, e.SE})
		}
		if d := r.Dates; d != nil {
			j.Dates = &jsonDates{Median: d.Median, MonthShares: map[string]float64{}}
			for _, m := range d.Months {
				j.Dates.MonthShares[m.Month.String()] = m.Share
			}
		}
		out[i] = j
	}
	return out
}

// SimJSON writes the report as JSON: {"manifest", "indices", "scenarios"}.
func SimJSON(w io.Writer, r *SimReport) error {
	scen := make([]jsonScenario, len(r.Scenarios))
	for i, sc := range r.Scenarios {
		rows := toJSONRows(sc.Rows)
		for k, c := range sc.Changes {
			ch := &jsonChange{Mean: c.Mean, MeanSE: c.MeanSE, IndependentSE: c.IndependentSE, P50: c.P50}
			if sc.Rows[k].Index != sim.PeakDay { // a date has no adverse side
				ch.VaR95, ch.VaR99, ch.ES95, ch.RL20 = &c.VaR95, &c.VaR99, &c.ES95, &c.RL20
			}
			rows[k].Change = ch
		}
		scen[i] = jsonScenario{sc.Name, sc.Description, sc.What, rows}
	}
	mf := r.Manifest
	if mf.Scenarios == nil {
		mf.Scenarios = []string{} // [] rather than null: a list with none in it
	}
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(struct {
		Manifest  Manifest       `json:"manifest"`
		Indices   []jsonRow      `json:"indices"`
		Refits    int            `json:"parameter_refits,omitempty"`
		Mixed     bool           `json:"parameter_uncertainty_mixed,omitempty"`
		Scenarios []jsonScenario `json:"scenarios"`
		Planning  *jsonPlanning  `json:"planning,omitempty"`
		History   *jsonHistory   `json:"historical_seasons,omitempty"`
		Hedge     *jsonHedge     `json:"hedge,omitempty"`
		InSeason  []jsonInSeason `json:"in_season,omitempty"`
		Extremes  []jsonExtreme  `json:"extremes_check,omitempty"`
	}{mf, baseRows(r), r.Refits, r.Mixed, scen, toJSONPlanning(r), toJSONHistory(r.History), toJSONHedge(r),
		toJSONInSeason(r.InSeason), toJSONExtremes(r.Extremes)})
}

// Statistic is one named number of a tail table: its key in the CSV and the
// report's cell attributes, its label in tables, and how to read it from a
// tail.
type Statistic struct {
	Key, Label string
	Value      func(t sim.Tail) float64
	// SE reads the number's Monte Carlo standard error (nil for the mean's
	// and the sd's, which the CSV gives as mean_se and not at all).
	SE func(t sim.Tail) float64
	// Adverse is true for the numbers read on the adverse side (VaR, ES,
	// return levels), which a date does not have.
	Adverse bool
}

// Statistics lists the statistics of a tail table with the default return
// periods, in display order.
func Statistics() []Statistic { return StatisticsFor(sim.TailReturnPeriods()) }

// periodKey writes a return period for keys and labels: "20", "2.5".
func periodKey(T float64) string { return strconv.FormatFloat(T, 'f', -1, 64) }

// rowPeriods is the return periods the rows list (a run lists one set).
func rowPeriods(rows []sim.Row) []float64 {
	if len(rows) == 0 || rows[0].Tail.ReturnPeriods == nil {
		return sim.TailReturnPeriods()
	}
	return rows[0].Tail.ReturnPeriods
}

// StatisticsFor lists the statistics of a tail table listing the return
// periods periods, in display order.
func StatisticsFor(periods []float64) []Statistic {
	s := []Statistic{
		{Key: "mean", Label: "mean", Value: func(t sim.Tail) float64 { return t.Mean }},
		{Key: "sd", Label: "sd", Value: func(t sim.Tail) float64 { return t.SD }},
	}
	seAt := func(v func(t sim.Tail) []float64, i int) func(t sim.Tail) float64 {
		return func(t sim.Tail) float64 {
			if se := v(t); i < len(se) {
				return se[i]
			}
			return math.NaN()
		}
	}
	for i, p := range sim.TailQuantileProbs() {
		s = append(s, Statistic{Key: fmt.Sprintf("p%02.0f", 100*p), Label: fmt.Sprintf("P%.0f", 100*p),
			Value: func(t sim.Tail) float64 { return t.Quantile(p) },
			SE:    seAt(func(t sim.Tail) []float64 { return t.QuantileSE }, i)})
	}
	s = append(s,
		Statistic{"var95", "VaR 95%", func(t sim.Tail) float64 { return t.VaR95 }, func(t sim.Tail) float64 { return t.VaR95SE }, true},
		Statistic{"es95", "ES 95%", func(t sim.Tail) float64 { return t.ES95 }, func(t sim.Tail) float64 { return t.ES95SE }, true},
		Statistic{"var99", "VaR 99%", func(t sim.Tail) float64 { return t.VaR99 }, func(t sim.Tail) float64 { return t.VaR99SE }, true},
		Statistic{"es99", "ES 99%", func(t sim.Tail) float64 { return t.ES99 }, func(t sim.Tail) float64 { return t.ES99SE }, true},
	)
	for _, T := range periods {
		s = append(s, Statistic{Key: "rl" + periodKey(T), Label: "1-in-" + periodKey(T),
			Value: func(t sim.Tail) float64 { return t.ReturnLevel(T) },
			SE: func(t sim.Tail) float64 {
				if i := slices.Index(t.ReturnPeriods, T); i >= 0 && i < len(t.ReturnLevelSE) {
					return t.ReturnLevelSE[i]
				}
				return math.NaN()
			}, Adverse: true})
	}
	return s
}

// csvNumber writes a value for the CSV: the shortest digits that read back
// to it, never an exponent; empty where the JSON has null (a Monte Carlo
// error that cannot be bounded, +∞, or a NaN).
func csvNumber(v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return ""
	}
	return strconv.FormatFloat(v, 'f', -1, 64)
}

// SimCSV writes the report in long form, one number a line:
// scenario,index,period,unit,adverse,statistic,value ("baseline" for the
// fitted model), after "# key: value" manifest lines. A scenario's changes
// against the baseline are the statistics named "change_*".
func SimCSV(w io.Writer, r *SimReport) error {
	mf := r.Manifest
	if mf.Scenarios == nil {
		mf.Scenarios = []string{} // "none", not left out
	}
	if err := csvManifest(w, mf); err != nil {
		return err
	}
	cw := csv.NewWriter(w)
	cw.Write([]string{"scenario", "index", "period", "unit", "adverse", "statistic", "value"})
	stats := StatisticsFor(rowPeriods(r.Rows))
	write := func(scenario string, rows []sim.Row, changes []sim.Change, bands []stress.RowBands) {
		for k, row := range rows {
			unit := row.Unit
			put := func(stat string, v float64) {
				cw.Write([]string{scenario, row.Info.Key, row.Period, unit, AdverseSide(row), stat, csvNumber(v)})
			}
			date := row.Index == sim.PeakDay // a date: no adverse side
			for _, s := range stats {
				if s.Adverse && date {
					continue
				}
				put(s.Key, s.Value(row.Tail))
				if s.SE != nil {
					put(s.Key+":se", s.SE(row.Tail)) // empty when it cannot be bounded, as JSON's null
				}
			}
			put("mean_se", row.Tail.MeanSE)
			if k < len(bands) && !date {
				b := bands[k]
				for _, x := range []struct {
					key string
					b   stress.Band
				}{{"mean", b.Mean}, {"var95", b.VaR95}, {"es95", b.ES95}, {"rl20", b.RL20}, {"rl50", b.RL50}} {
					put(x.key+":band_lo", x.b.Lo)
					put(x.key+":band_hi", x.b.Hi)
				}
			}
			unit = "probability" // of a year beyond the threshold, which is in the index's unit
			for _, e := range row.Tail.Exceedances {
				key := "exceed:" + strconv.FormatFloat(e.Threshold, 'f', -1, 64)
				put(key, e.Prob)
				put(key+":se", e.SE)
			}
			unit = row.Unit
			if changes != nil {
				c := changes[k]
				for _, kv := range []struct {
					k string
					v float64
				}{{"change_mean", c.Mean}, {"change_mean_se", c.MeanSE}, {"change_mean_independent_se", c.IndependentSE},
					{"change_p50", c.P50}, {"change_var95", c.VaR95}, {"change_var99", c.VaR99}, {"change_es95", c.ES95},
					{"change_rl20", c.RL20}} {
					if date && kv.k != "change_mean" && kv.k != "change_mean_se" && kv.k != "change_mean_independent_se" &&
						kv.k != "change_p50" {
						continue // a date has no adverse side
					}
					put(kv.k, kv.v)
				}
			}
		}
	}
	write("baseline", r.Rows, nil, r.Bands)
	for _, sc := range r.Scenarios {
		write(sc.Name, sc.Rows, sc.Changes, nil)
	}
	g := csvNumber
	units := "°" + r.Manifest.Units
	demandUnit := demandUnitOf(r)
	for _, d := range r.Design { // the planner's design figures, each with its Monte Carlo s.e.
		T := "1-in-" + periodKey(d.T)
		for _, x := range []struct {
			what, unit string
			v, se      float64
		}{{"design-day", units, d.Coldest, d.ColdestSE}, {"cold-snap", units, d.Snap, d.SnapSE},
			{"demand", demandUnit, d.Peak, d.PeakSE}, {"snap-energy", EnergyUnit(demandUnit), d.SnapEnergy, d.SnapEnerSE}} {
			if math.IsNaN(x.v) || demandUnit == "" && x.unit != units {
				continue
			}
			adverse := "high"
			if x.unit == units {
				adverse = "low"
			}
			stat := x.what + ":" + T
			cw.Write([]string{"baseline", "design", d.Period, x.unit, adverse, stat, g(x.v)})
			cw.Write([]string{"baseline", "design", d.Period, x.unit, adverse, stat + ":se", g(x.se)})
		}
	}
	for _, c := range r.Capacities {
		cw.Write([]string{"baseline", "capacity", c.Period, demandUnit, "high", c.Target, g(c.Capacity)})
		cw.Write([]string{"baseline", "capacity", c.Period, demandUnit, "high", c.Target + ":se", g(c.SE)})
		// The share of years with more days over the capacity than a solve
		// counts (JSON saturated): above 0, a days target is a lower bound.
		cw.Write([]string{"baseline", "capacity", c.Period, "fraction of years", "high", c.Target + ":saturated", g(c.Saturated)})
		achievedUnit := "fraction of years" // peak and any targets
		if strings.HasPrefix(c.Target, "days:") {
			achievedUnit = "days a year"
		}
		cw.Write([]string{"baseline", "capacity", c.Period, achievedUnit, "high", c.Target + ":achieved", g(c.Achieved)})
	}
	if h := r.Hedge; h != nil { // the hedge evaluation, as in the JSON's hedge object
		cur := r.HedgeFile.Currency
		hedgeRow := func(period, unit, stat string, v float64) {
			if !math.IsNaN(v) {
				cw.Write([]string{"baseline", "hedge", period, unit, "none", stat, g(v)})
			}
		}
		for _, c := range h.Contracts {
			k := "contract:" + c.Contract.Name + ":"
			for _, x := range []struct {
				stat string
				v    float64
			}{{"mean_payout", c.Mean}, {"mean_payout:se", c.MeanSE}, {"sd", c.SD}, {"p01", c.P1}, {"p05", c.P5},
				{"p50", c.P50}, {"p95", c.P95}, {"p99", c.P99}, {"loaded_price", c.LoadedPrice},
				{"quantile_price", c.QuantilePrice}, {"burn_price", c.Burn}, {"burn_price:se", c.BurnSE}} {
				hedgeRow(c.Contract.Period, cur, k+x.stat, x.v)
			}
			hedgeRow(c.Contract.Period, "probability", k+"probability_of_payout", c.ProbPayout)
			hedgeRow(c.Contract.Period, "seasons", k+"burn_seasons", float64(c.Seasons))
			hedgeRow(c.Contract.Period, "contracts", k+"min_variance_quantity", c.MinVar.Quantity)
			hedgeRow(c.Contract.Period, "fraction", k+"min_variance_reduction", c.MinVar.VarianceReduction)
		}
		// The pricing options the prices depend on, as the JSON's loading
		// and quantile_level.
		hedgeRow("", "", "loading", h.Options.Loading)
		hedgeRow("", "probability", "quantile_level", h.Options.Level)
		period := "" // the net cost is the exposure's period's
		if e := r.HedgeFile.Exposure; e != nil {
			period = e.Period
		}
		risk := func(name string, rk hedge.Risk) {
			for _, x := range []struct {
				stat string
				v    float64
			}{{"mean", rk.Mean}, {"sd", rk.SD}, {"var95", rk.VaR95}, {"es95", rk.ES95}, {"es99", rk.ES99}} {
				hedgeRow(period, cur, "net_cost:"+name+":"+x.stat, x.v)
			}
		}
		risk("unhedged", h.Unhedged)
		risk("hedged", h.Hedged)
		for _, c := range h.Contracts {
			if !math.IsNaN(c.MinVar.Quantity) {
				risk(c.Contract.Name+" alone at the minimum-variance quantity", c.MinVar.Net)
			}
		}
		hedgeRow(period, "fraction", "variance_reduction", h.VarianceReduction)
	}
	if p := r.Planning; p != nil {
		f := g
		for rank := 1; p.LoadDuration != nil && rank <= len(p.LoadDuration[0]); rank++ {
			for k, q := range sim.FanQuantileProbs() {
				cw.Write([]string{"baseline", "load-duration", "year", p.Unit, "high",
					fmt.Sprintf("rank%d:p%02.0f", rank, 100*q), f(p.LoadDuration[k][rank-1])})
			}
		}
		for _, y := range p.Normals {
			for _, kv := range []struct {
				k string
				v float64
			}{{"actual", y.Actual}, {"model_at_actual_weather", y.AtActualWeather},
				{"model_at_normal_weather", y.AtNormalWeather}, {"weather_normalized", y.Normalized}} {
				cw.Write([]string{"baseline", "history", strconv.Itoa(y.Year), EnergyUnit(p.Unit), "", kv.k, f(kv.v)})
			}
		}
	}
	cw.Flush()
	return cw.Error()
}

func csvManifest(w io.Writer, m Manifest) error {
	b, err := json.Marshal(m)
	if err != nil {
		return err
	}
	var kv map[string]any
	dec := json.NewDecoder(bytes.NewReader(b))
	dec.UseNumber() // numbers as written (a seed of 20240101, not 2.0240101e+07)
	dec.Decode(&kv)
	e := &errWriter{w: w, raw: true}
	if m.RunID != "" {
		e.printf("# run_id: %s\n", m.RunID)
	}
	for _, k := range []string{"tool", "tool_version", "model_file", "model_sha256", "data_sha256", "seed", "paths", "year",
		"start", "periods", "units", "hdd_base", "cdd_base", "cold_below", "shocks", "scenarios", "demand_model",
		"demand_sha256", "capacity", "snap_days", "simulated_days", "quantile_convention", "caution"} {
		switch v := kv[k].(type) {
		case nil: // absent or null: not applying
		case []any:
			parts := make([]string, len(v))
			for i, x := range v {
				parts[i] = fmt.Sprint(x)
			}
			if len(parts) == 0 {
				parts = []string{"none"}
			}
			e.printf("# %s: %s\n", k, strings.Join(parts, ", "))
		default:
			e.printf("# %s: %v\n", k, v)
		}
	}
	if m.DemandGrowth != 0 {
		e.printf("# demand_growth_per_cent_a_year: %v\n# demand_growth_factor: %v\n", m.DemandGrowthPerCent, m.DemandGrowth)
	}
	if len(m.PeriodDates) > 0 {
		parts := make([]string, len(m.PeriodDates))
		for i, p := range m.PeriodDates {
			parts[i] = fmt.Sprintf("%s %s..%s", p.Name, p.From, p.To)
		}
		e.printf("# period_dates: %s\n", strings.Join(parts, ", "))
	}
	for _, in := range m.Inputs {
		e.printf("# input: %s: %s %s\n", in.Role, in.File, in.SHA256)
	}
	for _, w := range m.Warnings {
		e.printf("# warning: %s\n", w)
	}
	return e.err
}

// GrowthLine words a run's demand growth; "" without growth.
func GrowthLine(m Manifest) string {
	if m.DemandGrowth == 0 {
		return ""
	}
	return fmt.Sprintf("Demand growth of %s %% a year, applied to %d: demand scaled by %s", numfmt.Number(m.DemandGrowthPerCent),
		m.Year, numfmt.Fixed(m.DemandGrowth, 3))
}

// SimTables writes one terminal table per period: statistics down, indices
// across.
func SimTables(w io.Writer, r *SimReport) error {
	e := &errWriter{w: w}
	m := r.Manifest
	// Worded as the summary's run line.
	e.printf("%s\n", Wrap(fmt.Sprintf("%s synthetic years of %d (%s start, seed %d); bases: HDD %g °%s, CDD %g °%s, cold day "+
		"below %g °%s", numfmt.Number(float64(m.Paths)), m.Year, m.Start, m.Seed, m.HDDBase, m.Units, m.CDDBase, m.Units,
		m.ColdBelow, m.Units), "  "))
	if g := GrowthLine(m); g != "" {
		e.printf("%s\n", g)
	}
	for _, w := range m.Warnings {
		e.printf("%s\n", Wrap("Warning: "+w, "  "))
	}
	writeInSeason(e, r)
	for _, group := range byPeriod(r.Rows) {
		e.printf("\nPeriod: %s%s\n", group[0].Period, r.periodSpan(group[0].Period))
		weather, demand := splitDemand(group)
		writeTailTable(e, weather)
		var dates []sim.Row
		demand = slices.DeleteFunc(demand, func(r sim.Row) bool {
			if r.Dates != nil {
				dates = append(dates, r)
			}
			return r.Index == sim.PeakDay
		})
		if len(demand) > 0 {
			writeTailTable(e, demand)
		}
		for _, r := range dates {
			e.printf("  %s\n", DatesText(r))
		}
		for _, row := range group {
			for _, x := range row.Tail.Exceedances {
				e.printf("  %s\n", ExceedLine(row, x))
			}
		}
	}
	writePlanning(e, r)
	writeDesign(e, r)
	writeHedge(e, r)
	writeBands(e, r)
	writeHistory(e, r.History, r.Manifest.Units)
	writeExtremes(e, r)
	if len(r.Scenarios) > 0 {
		writeComparison(e, r)
	}
	e.printf("\nVaR and ES are on the adverse side (ES = mean of the worst 5%% or 1%% of years); 1-in-T is the level\n" +
		"passed on the adverse side once in T years on average. Quantiles: Hyndman–Fan type 4.\n")
	if T := longestReturnPeriod(r.Rows); T >= float64(r.Manifest.Paths) {
		// N(1 − 1/T) ≥ N − 1: the type-4 quantile lies between the two
		// most extreme paths, whatever T.
		e.printf("%s\n", Wrap(fmt.Sprintf("A 1-in-T level with T of %s years or more lies, with %s paths, between the two "+
			"most extreme simulated years: it says nothing of the tail beyond them; run more paths (--paths).",
			numfmt.Number(float64(r.Manifest.Paths)), numfmt.Number(float64(r.Manifest.Paths))), "  "))
	}
	e.printf("%s\n", Caution)
	return e.err
}

// longestReturnPeriod is the largest T the rows' tail tables list (0
// without any).
func longestReturnPeriod(rows []sim.Row) float64 {
	T := 0.0
	for _, r := range rows {
		for _, t := range r.Tail.ReturnPeriods {
			T = max(T, t)
		}
	}
	return T
}

// writeTailTable writes one table: statistics down, the rows' indices across.
func writeTailTable(e *errWriter, group []sim.Row) {
	header := []string{"statistic"}
	for _, row := range group {
		header = append(header, fmt.Sprintf("%s (%s)", row.Name, row.Unit))
	}
	var rows [][]string
	for _, s := range StatisticsFor(rowPeriods(group)) {
		line := []string{s.Label}
		for _, row := range group {
			line = append(line, TableNum(s.Value(row.Tail)))
		}
		rows = append(rows, line)
	}
	adverse := []string{"adverse side"}
	for _, row := range group {
		adverse = append(adverse, AdverseSide(row))
	}
	e.table(header, append(rows, adverse))
	for _, w := range monteCarloWarnings(group) {
		e.printf("  %s\n", w)
	}
}

// mcTolerance is the Monte Carlo standard error, as a share of the index's
// sd, above which a tail number is flagged: beyond it the paths run do not
// support the digits a table shows.
const mcTolerance = 0.05

// mcFlag is a tail number whose Monte Carlo standard error exceeds
// mcTolerance of its index's sd.
type mcFlag struct {
	row    sim.Row
	stat   string  // "ES 99%", "1-in-50" or "1-in-100"
	value  float64 // the statistic
	se     float64 // its Monte Carlo s.e.
	target float64 // the s.e. mcTolerance allows
	paths  int     // paths that would bring se to target; 0 if no run could
}

// monteCarloFlags finds, for each row, the far-tail number (ES 99%, 1-in-50,
// 1-in-100) with the largest Monte Carlo error, when that error exceeds
// mcTolerance of the index's sd (s.e. ∝ 1/√paths gives the paths needed).
func monteCarloFlags(group []sim.Row) []mcFlag {
	var out []mcFlag
	for _, r := range group {
		t := r.Tail
		if len(t.ReturnLevelSE) == 0 || !(t.SD > 0) || r.Index == sim.PeakDay || !occurs(r, group) {
			continue // no spread, a date, or an index that hardly occurs or means nothing in the period (July's HDD)
		}
		f := mcFlag{row: r, target: mcTolerance * t.SD}
		for _, c := range []struct {
			name  string
			v, se float64
		}{{"ES 99%", t.ES99, t.ES99SE}, {"1-in-50", t.ReturnLevel(50), t.ReturnLevelError(50)},
			{"1-in-100", t.ReturnLevel(100), t.ReturnLevelError(100)}} {
			if c.se > f.se {
				f.se, f.stat, f.value = c.se, c.name, c.v
			}
		}
		if f.se <= f.target {
			continue
		}
		if !math.IsInf(f.se, 1) {
			f.paths = evidence.PathsNeeded(f.se, t.N, f.target)
		}
		out = append(out, f)
	}
	return out
}

// monteCarloWarnings words monteCarloFlags for the detailed tables.
func monteCarloWarnings(group []sim.Row) []string {
	var out []string
	for _, f := range monteCarloFlags(group) {
		need := "more paths (--paths)"
		if f.paths > 0 {
			need = "about " + numfmt.RoundUp(f.paths) + " paths"
		}
		value := numfmt.Value(f.value, f.se) + " " + numfmt.SE(f.se)
		if math.IsInf(f.se, 0) {
			value = numfmt.Number(f.value) + ", with too few paths beyond it to estimate its error,"
		}
		out = append(out, fmt.Sprintf("Monte Carlo error: the %s of %s is %s from %s paths, more than a twentieth of its sd; %s would bring it to %s",
			f.stat, f.row.Name, value, numfmt.Number(float64(f.row.Tail.N)), need, targetSE(f.se, f.target)))
	}
	return out
}

// targetSE writes the error a Monte Carlo warning aims at, told apart from
// the error se it has: "± 11 … would bring it to ± 11" reads as no change,
// so where the two round alike the target takes a third significant digit.
func targetSE(se, target float64) string {
	t := numfmt.SE(target)
	if t == numfmt.SE(se) && target > 0 {
		t = "± " + numfmt.Fixed(target, max(0, 2-int(math.Floor(math.Log10(target)))))
	}
	return t
}

// splitDemand separates the weather indices of a period from its demand
// indices.
func splitDemand(group []sim.Row) (weather, demand []sim.Row) {
	for _, r := range group {
		if r.Index >= sim.Energy {
			demand = append(demand, r)
		} else {
			weather = append(weather, r)
		}
	}
	return weather, demand
}

// byPeriod groups rows by period, keeping their order.
func byPeriod(rows []sim.Row) [][]sim.Row {
	var out [][]sim.Row
	for _, r := range rows {
		if n := len(out); n > 0 && out[n-1][0].Period == r.Period {
			out[n-1] = append(out[n-1], r)
			continue
		}
		out = append(out, []sim.Row{r})
	}
	return out
}

// PathsCSV writes the per-path aggregates: one row a path, one column an
// index of a period ("heating.hdd"). Values are written in the shortest
// form that reads back to the same float64 (strconv's 'g', −1). Rows are
// formatted in blocks on all processors and written in order, so the file
// is the same whatever the processor count.
func PathsCSV(w io.Writer, res *sim.Result, h *hedge.Result) error {
	header := []string{"path"}
	var cols [][]float64
	var counts []bool // columns of whole numbers (days), written as integers
	for _, a := range res.Aggregates {
		header = append(header, a.Period.Name+"."+a.Index.Info().Key)
		cols = append(cols, a.Values)
		counts = append(counts, a.Index == sim.ColdDays || a.Index == sim.ColdSpell || a.Index == sim.PeakDay || a.Index == sim.OverCapacity)
	}
	if h != nil {
		// The hedge's per-path values: the exposure cost, each contract's
		// payout (one contract bought) and the net cost.
		header = append(header, "hedge.exposure_cost")
		cols = append(cols, h.Cost)
		for _, c := range h.Contracts {
			header = append(header, "hedge.payout."+strings.ReplaceAll(c.Contract.Name, ",", " "))
			cols = append(cols, c.Payoffs)
		}
		header = append(header, "hedge.net_cost")
		cols = append(cols, h.Net)
	}
	counts = append(counts, make([]bool, len(cols)-len(counts))...)
	cw := csv.NewWriter(w) // the header's names may need quoting; the numbers never do
	cw.Write(header)
	cw.Flush()
	if err := cw.Error(); err != nil {
		return err
	}
	const block = 4096 // rows formatted by one goroutine at a time
	n := res.Config.Paths
	workers := runtime.GOMAXPROCS(0)
	format := func(b []byte, from, to int) []byte {
		b = b[:0]
		for i := from; i < to; i++ {
			b = strconv.AppendInt(b, int64(i), 10)
			for j, c := range cols {
				b = append(b, ',')
				if v := c[i]; counts[j] && v == math.Trunc(v) && math.Abs(v) < 1<<53 {
					b = strconv.AppendInt(b, int64(v), 10)
				} else {
					// The shortest digits that read back to v, never with an
					// exponent (a season's energy of 2.06e+07 GJ reads
					// 20565659.072489783).
					b = strconv.AppendFloat(b, v, 'f', -1, 64)
				}
			}
			b = append(b, '\n')
		}
		return b
	}
	// Rounds of workers·block rows: while the workers format one round,
	// this goroutine writes the one before (two sets of buffers).
	var sets [2][][]byte
	for k := range sets {
		sets[k] = make([][]byte, workers)
	}
	write := func(set [][]byte) error {
		for _, b := range set {
			if len(b) > 0 {
				if _, err := w.Write(b); err != nil {
					return err
				}
			}
		}
		return nil
	}
	var pending [][]byte // formatted, not yet written
	for r, lo := 0, 0; lo < n; r, lo = r+1, lo+block*workers {
		set := sets[r%2]
		var g errgroup.Group
		for k := range workers {
			from := min(lo+k*block, n)
			to := min(from+block, n)
			g.Go(func() error {
				set[k] = format(set[k], from, to)
				return nil
			})
		}
		err := write(pending)
		g.Wait()
		if err != nil {
			return err
		}
		pending = set
	}
	return write(pending)
}

// jsonInSeason is a period's observed part in the JSON output.
type jsonInSeason struct {
	Period string             `json:"period"`
	Days   int                `json:"observed_days"`
	Values map[string]float64 `json:"observed,omitempty"`
}

func toJSONInSeason(in []sim.PeriodObserved) []jsonInSeason {
	var out []jsonInSeason
	for _, o := range in {
		j := jsonInSeason{Period: o.Period, Days: o.Days}
		if o.Days > 0 {
			j.Values = map[string]float64{}
			for x, v := range o.Values {
				j.Values[sim.Index(x).Info().Key] = v
			}
		}
		out = append(out, j)
	}
	return out
}

// writeInSeason says, for a run of seasons under way, how much of each
// period was observed and its indices so far.
func writeInSeason(e *errWriter, r *SimReport) {
	if len(r.InSeason) == 0 {
		return
	}
	e.printf("\nSeasons under way: the observed days count as they were; the rest is simulated from the data end\n")
	rows := [][]string{}
	for _, o := range r.InSeason {
		if o.Days == 0 {
			rows = append(rows, []string{o.Period, "0", "—", "—", "—"})
			continue
		}
		energy := "—"
		if len(o.Values) > int(sim.Energy) {
			energy = numfmt.Fixed(o.Values[sim.Energy], 0)
		}
		rows = append(rows, []string{o.Period, fmt.Sprint(o.Days), numfmt.Fixed(o.Values[sim.HDD], 1), numfmt.Fixed(o.Values[sim.CDD], 1), energy})
	}
	deg := "°" + r.Manifest.Units + "·day"
	header := []string{"period", "days observed", "HDD so far (" + deg + ")", "CDD so far (" + deg + ")"}
	if u := demandUnitOf(r); u != "" {
		header = append(header, "energy so far ("+EnergyUnit(u)+")")
	} else {
		for i := range rows { // no demand model: no energy column
			rows[i] = rows[i][:len(header)]
		}
	}
	e.table(header, rows)
}

// ExceedLine words an exceedance with its index, period, threshold and
// unit: "P(HDD, heating > 2,300 °C·day) = 0.082 ± 0.0019".
func ExceedLine(row sim.Row, x sim.Exceedance) string {
	return fmt.Sprintf("P(%s, %s %s %s%s%s) = %s", row.Name, row.Period, map[bool]string{true: ">", false: "<"}[row.Info.HighIsAdverse],
		numfmt.Number(x.Threshold), Glue, row.Unit, ExceedText(x, row.Tail.N))
}

// ExceedText writes an exceedance probability with its Monte Carlo s.e.,
// or, when no path or every path passed the threshold (where the s.e. is 0
// and says nothing), how many paths that rests on: "0 (none of 10,000
// years)".
func ExceedText(x sim.Exceedance, paths int) string {
	switch x.Prob {
	case 0:
		return "0 (none of " + numfmt.Number(float64(paths)) + " years)"
	case 1:
		return "1 (all " + numfmt.Number(float64(paths)) + " years)"
	}
	return numfmt.Value(x.Prob, x.SE) + " " + numfmt.SE(x.SE)
}

// ChangeText writes a change of the mean with its paired Monte Carlo
// standard error: "+12.3 ± 1.8", or "+1.0 (exact)" when the error is
// rounding noise (a level shift moves the coldest day by exactly its size),
// or "|change| < 0.05" when change and error are both below the tables'
// one decimal.
func ChangeText(mean, se float64) string {
	if se <= 1e-9*max(1, math.Abs(mean)) {
		return fmt.Sprintf("%+.1f %s", mean, numfmt.Exact)
	}
	if math.Abs(mean)+2*se < 0.05 {
		// Below the tables' one decimal, error included: a scenario that
		// hardly reaches this period (a winter change seen in summer
		// through the slow part's memory).
		return "|change| < 0.05"
	}
	// Common random numbers can make the s.e. of a shift's change tiny; the
	// change itself needs no more than four significant figures.
	v := numfmt.Value(mean, max(se, 1e-3*math.Abs(mean)))
	if mean > 0 && v != "0" {
		v = "+" + v
	}
	return v + " " + numfmt.SE(se)
}

// writeComparison writes, for each period and index, the baseline and every
// scenario side by side with the change of the mean and its paired s.e.
func writeComparison(e *errWriter, r *SimReport) {
	e.printf("\nScenarios (same seed and paths as the baseline: common random numbers)\n")
	for _, sc := range r.Scenarios {
		e.printf("  %s: %s\n", sc.Name, strings.Join(sc.What, "; "))
	}
	e.printf("  1-in-20 and 1-in-100 are the adverse P95 and P99 (P5 and P1 where low is adverse); the change of " +
		"the mean has its paired Monte Carlo s.e.\n")
	for k, base := range r.Rows {
		if base.Index == sim.PeakDay {
			continue // a date: its spread is under the period's tables
		}
		e.printf("\n%s, %s (%s)\n", base.Name, base.Period, base.Unit)
		rows := [][]string{compRow("baseline", base.Tail, "")}
		for _, sc := range r.Scenarios {
			c := sc.Changes[k]
			rows = append(rows, compRow(sc.Name, sc.Rows[k].Tail, ChangeText(c.Mean, c.MeanSE)))
		}
		e.table([]string{"scenario", "mean", "P50", "1-in-20", "1-in-100", "ES 95%", "change of mean ± s.e."}, rows)
	}
}

func compRow(name string, t sim.Tail, change string) []string {
	return []string{name, TableNum(t.Mean), TableNum(t.Quantile(0.50)), TableNum(t.VaR95), TableNum(t.VaR99), TableNum(t.ES95), change}
}

// NewSimReport lays out a stress run's simulation for the renderers: the
// baseline's and the scenarios' tail tables with their changes, and with a
// demand model the planning tables (load-duration curve, weather-normalized
// history). The manifest is left for the caller. It panics if res has no
// simulation set.
func NewSimReport(res *stress.Result) *SimReport {
	s := res.Set
	if s == nil {
		panic("render: NewSimReport needs a result with a simulation set")
	}
	r := &SimReport{Periods: s.Base.Periods, Rows: s.Rows, History: res.History, Bands: res.Bands, Refits: len(res.Refits), Hedge: res.Hedge,
		HedgeFile: res.HedgeFile, InSeason: s.Base.InSeason, Extremes: res.Extremes,
		Design: res.Design, Capacities: res.Capacities}
	r.Mixed = len(res.Refits) > 0 && len(res.Bands) == 0
	switch {
	case r.Mixed:
		r.Uncertainty = fmt.Sprintf("the paths are spread over %d models refitted to synthetic records (predictive tables)", r.Refits)
	case r.Refits > 0:
		r.Uncertainty = fmt.Sprintf("90%% bands from %d models refitted to synthetic records", r.Refits)
	}
	for _, run := range s.Scenarios {
		sc := run.Scenario
		r.Scenarios = append(r.Scenarios, ScenarioReport{Name: sc.Name, Description: sc.Description, What: run.What,
			Rows: run.Rows, Changes: run.Changes})
	}
	if d := s.Config.Demand; d != nil {
		r.Planning = &Planning{Unit: d.Unit, Normals: res.Normals}
		if s.Fan != nil {
			r.Planning.LoadDurationPaths, r.Planning.LoadDuration = s.Fan.Paths, s.Fan.LoadDuration
		}
	}
	return r
}

// PeriodDates is a period's first and last day in the manifest.
type PeriodDates struct {
	Name string        `json:"name"`
	From calendar.Date `json:"from"`
	To   calendar.Date `json:"to"`
}

// SpanText words a period's dates: "1 Nov 2025 to 31 Mar 2026", the year
// once when both ends share it ("1 May to 30 Sep 2026").
func SpanText(p sim.Period) string {
	fy, fm, fd := p.From.YMD()
	ty, tm, td := p.To.YMD()
	from := fmt.Sprintf("%d %s", fd, fm.String()[:3])
	if fy != ty {
		from += fmt.Sprintf(" %d", fy)
	}
	return fmt.Sprintf("%s to %d %s %d", from, td, tm.String()[:3], ty)
}

// periodSpan is " (SpanText)" of the run's period named name, or "".
func (r *SimReport) periodSpan(name string) string {
	for _, p := range r.Periods {
		if p.Name == name {
			return " (" + SpanText(p) + ")"
		}
	}
	return ""
}

// DatesText words the date spread of a row (the day of the peak): the
// median date and the months that hold at least 1 % of the paths.
func DatesText(r sim.Row) string {
	d := r.Dates
	var parts []string
	var shown []time.Month
	rest := 0.0
	for _, m := range d.Months {
		if m.Share >= 0.01 {
			parts = append(parts, fmt.Sprintf("%s %s", m.Month.String()[:3], numfmt.Percent(m.Share)))
			shown = append(shown, m.Month)
		} else {
			rest += m.Share
		}
	}
	if rest > 0 {
		parts = append(parts, "other months "+numfmt.Percent(rest))
	}
	// A median date means something only when the peaks fall in one run
	// of months: a calendar year's fall at both its ends (two winters).
	where := "median " + d.Median.Time().Format("2 Jan 2006")
	for i := 1; i < len(shown); i++ {
		if shown[i] != shown[i-1]%12+1 {
			where = "in separate parts of the period (no single median)"
			break
		}
	}
	return fmt.Sprintf("%s: %s; by month %s", strings.ToUpper(r.Name[:1])+r.Name[1:], where, strings.Join(parts, ", "))
}
