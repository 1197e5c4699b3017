package render

import (
	"fmt"
	"math"
	"strings"

	"wxstress/internal/numfmt"
	"wxstress/model"
	"wxstress/sim"
	"wxstress/stress"
)

// historyShown reports whether a row of the record's seasons is worth a
// line: an index that occurs in the period, not one that is zero in nineteen
// of twenty seasons of the record and averages below one in the model (CDD
// in winter, cold days in summer). The JSON keeps every row.
func historyShown(r stress.HistoryRow) bool {
	return !(r.P95 == 0 && r.ModelMean < 1)
}

// HistoryTable lays out the record's own seasons beside the model: the
// distribution of each index over the record's complete seasons (moved along
// the fitted trend to the target year) against the model's, and, in notes,
// the model's probability of the record's three worst seasons. The terminal
// and the HTML report show the same cells.
func HistoryTable(h *stress.HistoricalSeasons, units string) (title string, header []string, rows [][]string, notes []string) {
	title = fmt.Sprintf("The record's own seasons beside the model (each moved along the fitted trend to %d: %+.2f °%s a decade)",
		h.TargetYear, 10*h.ShiftPerYear, units)
	if h.ClimateRun {
		title += "; the model side from a climate-start run, as the record's seasons are draws from the climate"
	}
	header = []string{"index", "period", "unit", "seasons", "record mean", "model mean", "mean band", "record mean vs band",
		"record sd", "model sd", "sd band", "record sd vs band", "record P5 / P95", "worst (year)"}
	for _, r := range h.Rows {
		if !historyShown(r) {
			continue
		}
		worst := ""
		if len(r.Worst) > 0 {
			worst = fmt.Sprintf("%s (%d)", numfmt.Fixed(r.Worst[0].Value, 1), r.Worst[0].Year)
		}
		// The sds and their band to two significant digits of the smallest,
		// so that a verdict is visible in the numbers beside it.
		d := apartDecimals(sdDecimals(min(r.SD, r.ModelSD, r.SDBand[0])), r.SD, r.SDBand)
		md := apartDecimals(1, r.Mean, r.MeanBand)
		rows = append(rows, []string{r.Index.Info().Name, r.Period, r.Index.Info().Unit(model.Units(units), ""), fmt.Sprint(len(r.Values)),
			numfmt.Fixed(r.Mean, md), numfmt.Fixed(r.ModelMean, md), numfmt.Fixed(r.MeanBand[0], md) + " to " + numfmt.Fixed(r.MeanBand[1], md),
			r.MeanVerdict, numfmt.Fixed(r.SD, d), numfmt.Fixed(r.ModelSD, d),
			numfmt.Fixed(r.SDBand[0], d) + "–" + numfmt.Fixed(r.SDBand[1], d), r.SDVerdict,
			recordP5P95(r), worst})
	}
	for _, r := range h.Rows {
		if historyShown(r) && len(r.Values) < minQuantileSeasons {
			notes = append(notes, fmt.Sprintf("record P5 / P95: not shown from fewer than %d seasons (a P5 of %d seasons is "+
				"its lowest by another name).", minQuantileSeasons, len(r.Values)))
			break
		}
	}
	notes = append(notes, "mean band and sd band: 5–95 % of the mean and of the sd of that many seasons drawn from the simulated "+
		"years; a record mean outside its band says the model's level is wrong for that index (too mild: the record's "+
		"seasons are worse on average), a record sd outside its band that the model's spread is.")
	for _, r := range h.Rows {
		if !historyShown(r) || (r.Index != sim.HDD && r.Index != sim.CDD && r.Index != sim.Coldest) {
			continue
		}
		var parts []string
		for _, w := range r.Worst {
			if w.Prob <= 0 {
				parts = append(parts, fmt.Sprintf("%d: %s, no simulated year as extreme (model probability below 1 in %s)",
					w.Year, numfmt.Fixed(w.Value, 1), numfmt.Number(float64(h.Paths))))
				continue
			}
			parts = append(parts, fmt.Sprintf("%d: %s, model probability %s (1 in %s)", w.Year, numfmt.Fixed(w.Value, 1),
				numfmt.Prob(w.Prob), oneIn(w.Prob)))
		}
		notes = append(notes, fmt.Sprintf("worst %s, %s: %s", r.Index.Info().Name, r.Period, strings.Join(parts, "; ")))
	}
	return title, header, rows, notes
}

func writeHistory(e *errWriter, h *stress.HistoricalSeasons, units string) {
	if h == nil || len(h.Rows) == 0 {
		return
	}
	title, header, rows, notes := HistoryTable(h, units)
	e.printf("\n%s\n", title)
	e.table(header, rows)
	for _, n := range notes {
		e.printf("  %s\n", n)
	}
}

// recordP5P95 is the record's P5 / P95, or "—" from fewer than
// minQuantileSeasons seasons, where they are the extremes by another name.
func recordP5P95(r stress.HistoryRow) string {
	if len(r.Values) < minQuantileSeasons {
		return "—"
	}
	return numfmt.Fixed(r.P5, 1) + " / " + numfmt.Fixed(r.P95, 1)
}

// minQuantileSeasons is the fewest seasons whose P5 and P95 the history
// table shows: below 10, the 5 % and 95 % points fall within a season of
// the ends (common practice).
const minQuantileSeasons = 10

// sdDecimals is the decimals that show the smallest of a set of sds (lo)
// to two significant digits: at least one, at most four.
func sdDecimals(lo float64) int {
	if !(lo > 0) {
		return 1
	}
	return min(max(1, 1-int(math.Floor(math.Log10(lo)))), 4)
}

// apartDecimals raises d until v and the band edges it lies outside of read
// apart ("3.3 against 2.4–3.3" says nothing), to at most four decimals.
func apartDecimals(d int, v float64, band [2]float64) int {
	for _, edge := range band {
		for d < 4 && (v > band[1] && edge == band[1] || v < band[0] && edge == band[0]) &&
			numfmt.Fixed(v, d) == numfmt.Fixed(edge, d) {
			d++
		}
	}
	return d
}

// oneIn writes a probability as a return period in years: "137", or
// "more than N" when no simulated year was as bad.
func oneIn(p float64) string {
	switch {
	case p <= 0:
		return "more than the paths run"
	case p >= 0.5:
		return "not rare: most simulated years are at least as bad"
	}
	return numfmt.Number(float64(int(1/p + 0.5)))
}

// jsonHistory is the record's seasons in the JSON output.
type jsonHistory struct {
	TargetYear   int                     `json:"target_year"`
	ShiftPerYear float64                 `json:"trend_shift_per_year"`
	ClimateRun   bool                    `json:"model_from_climate_start_run"`
	Rows         []jsonHistoryRow        `json:"rows"`
	Seasons      map[string][]jsonSeason `json:"seasons"`
}

type jsonHistoryRow struct {
	Index     string            `json:"index"`
	Period    string            `json:"period"`
	Seasons   int               `json:"seasons"`
	Mean      float64           `json:"mean"`
	SD        float64           `json:"sd"`
	P05       float64           `json:"p05"`
	P50       float64           `json:"p50"`
	P95       float64           `json:"p95"`
	ModelMean float64           `json:"model_mean"`
	ModelSD   float64           `json:"model_sd"`
	MeanBand  [2]float64        `json:"mean_band_90"`
	MeanVerd  string            `json:"mean_verdict"`
	MeanP     float64           `json:"mean_p"`
	SDP       float64           `json:"sd_p"`
	SDBand    [2]float64        `json:"sd_band_90"`
	Verdict   string            `json:"sd_verdict"`
	Worst     []jsonWorstSeason `json:"worst"`
}

type jsonWorstSeason struct {
	Year   int     `json:"year"`
	Value  float64 `json:"value"`
	Prob   float64 `json:"model_probability"`
	ProbSE float64 `json:"model_probability_se"`
}

type jsonSeason struct {
	Year    int                `json:"year"`
	Missing int                `json:"missing_days"`
	Values  map[string]float64 `json:"values"`
}

func toJSONHistory(h *stress.HistoricalSeasons) *jsonHistory {
	if h == nil {
		return nil
	}
	j := &jsonHistory{TargetYear: h.TargetYear, ShiftPerYear: h.ShiftPerYear, ClimateRun: h.ClimateRun, Seasons: map[string][]jsonSeason{}}
	for _, r := range h.Rows {
		row := jsonHistoryRow{Index: r.Index.Info().Key, Period: r.Period, Seasons: len(r.Values), Mean: r.Mean, SD: r.SD,
			P05: r.P5, P50: r.P50, P95: r.P95, ModelMean: r.ModelMean, ModelSD: r.ModelSD, MeanBand: r.MeanBand, MeanVerd: r.MeanVerdict, MeanP: r.MeanP, SDP: r.SDP, SDBand: r.SDBand,
			Verdict: r.SDVerdict}
		for _, w := range r.Worst {
			row.Worst = append(row.Worst, jsonWorstSeason{w.Year, w.Value, w.Prob, w.ProbSE})
		}
		j.Rows = append(j.Rows, row)
	}
	for name, ss := range h.Seasons {
		for _, s := range ss {
			v := map[string]float64{}
			for _, x := range sim.TempIndexList() {
				v[x.Info().Key] = s.Values[x]
			}
			j.Seasons[name] = append(j.Seasons[name], jsonSeason{s.Year, s.Missing, v})
		}
	}
	return j
}

// ExtremesTable lays out the GEV check of the simulated extremes: for the
// coldest and hottest day, the GEV's 1-in-T level from the record's own
// seasons with its profile-likelihood 95 % interval beside the model's.
func ExtremesTable(checks []stress.ExtremeCheck, units string, conditional bool) (header []string, rows [][]string, notes []string) {
	header = []string{"index", "period", "seasons", "T", "GEV level [95% interval]", "model level", "model"}
	for _, c := range checks {
		if c.Err != "" {
			notes = append(notes, fmt.Sprintf("%s, %s: no GEV fitted (%s)", c.Index.Info().Name, c.Period, c.Err))
			continue
		}
		for _, l := range c.Levels {
			ci := "—"
			if !math.IsNaN(l.Lo) {
				ci = fmt.Sprintf("[%s, %s]", numfmt.Fixed(l.Lo, 1), numfmt.Fixed(l.Hi, 1))
			}
			verdict := "inside"
			switch {
			case math.IsNaN(l.Lo):
				verdict = "no interval"
			case l.Outside:
				verdict = l.OutsideSide + " the interval"
			}
			rows = append(rows, []string{c.Index.Info().Name, c.Period, fmt.Sprint(c.Seasons), "1-in-" + periodKey(l.T),
				fmt.Sprintf("%s %s", numfmt.Fixed(l.GEV, 1), ci), numfmt.ValueSE(l.Model, l.ModelSE), verdict})
		}
	}
	notes = append(notes, fmt.Sprintf("The GEV is fitted by maximum likelihood to each season's coldest (or hottest) daily mean in "+
		"the record, moved to the target year's trend level (°%s); a model level outside the 95 %% profile-likelihood "+
		"interval is evidence that the model's extreme days are off.", units))
	if conditional { // said only where the run itself starts from the data end
		notes = append(notes, "The model levels come from a climate-start run (the record's seasons are climatology): this "+
			"run, from the state at the data end, can differ, as its design days do.")
	}
	return header, rows, notes
}

func writeExtremes(e *errWriter, r *SimReport) {
	if len(r.Extremes) == 0 {
		return
	}
	header, rows, notes := ExtremesTable(r.Extremes, r.Manifest.Units, r.Manifest.Start == sim.StartConditional)
	e.printf("\nExtreme days checked by extreme-value theory\n")
	e.table(header, rows)
	for _, n := range notes {
		e.printf("  %s\n", n)
	}
}

type jsonExtreme struct {
	Index   string             `json:"index"`
	Period  string             `json:"period"`
	Seasons int                `json:"seasons"`
	GEV     map[string]float64 `json:"gev,omitempty"` // mu, sigma, xi (of the negated minima for the coldest day)
	Levels  []jsonExtremeLevel `json:"levels,omitempty"`
	Error   string             `json:"error,omitempty"`
}

type jsonExtremeLevel struct {
	T       float64  `json:"t"`
	GEV     float64  `json:"gev"`
	Lo      *float64 `json:"gev_lo_95"`
	Hi      *float64 `json:"gev_hi_95"`
	Model   float64  `json:"model"`
	ModelSE *float64 `json:"model_se"`
	Outside bool     `json:"model_outside"`
}

func toJSONExtremes(checks []stress.ExtremeCheck) []jsonExtreme {
	var out []jsonExtreme
	for _, c := range checks {
		j := jsonExtreme{Index: c.Index.Info().Key, Period: c.Period, Seasons: c.Seasons, Error: c.Err}
		if c.Err == "" {
			j.GEV = map[string]float64{"mu": c.GEV.Mu, "sigma": c.GEV.Sigma, "xi": c.GEV.Xi}
		}
		for _, l := range c.Levels {
			j.Levels = append(j.Levels, jsonExtremeLevel{l.T, l.GEV, finitePtr(l.Lo), finitePtr(l.Hi), l.Model, finitePtr(l.ModelSE), l.Outside})
		}
		out = append(out, j)
	}
	return out
}
