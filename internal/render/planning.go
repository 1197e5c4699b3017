package render

import (
	"fmt"
	"io"
	"slices"

	"wxstress/internal/numfmt"
	"wxstress/sim"
)

// loadDurationRanks are the ranks of the load-duration curve the tables show.
var loadDurationRanks = [...]int{1, 2, 3, 5, 10, 20, 30, 60, 90, 120, 180, 270, 365}

// LoadDurationRanks returns the ranks of the load-duration curve the tables
// show (a copy).
func LoadDurationRanks() []int { return slices.Clone(loadDurationRanks[:]) }

// Planning is what a capacity planner reads beside the tail tables: the peak
// day at the usual design levels, the load-duration curve and the weather-
// normalized history.
type Planning struct {
	Unit string // demand unit, e.g. GJ/day
	// LoadDuration is from the first LoadDurationPaths paths of the baseline:
	// Bands[k][r] is quantile sim.FanQuantileProbs()[k] of the (r+1)-th highest day.
	LoadDurationPaths int
	LoadDuration      [][]float64
	Normals           []sim.YearNormal
}

// peakLevel is one row of the design-peak table.
type peakLevel struct {
	Period                    string
	P50, P90, In20, In50, Max float64
}

// peakLevels picks the peak-day rows out of rows: P50 ("50/50"), P90
// ("90/10"), and the 1-in-20 and 1-in-50 return levels.
func peakLevels(rows []sim.Row) []peakLevel {
	var out []peakLevel
	for _, r := range rows {
		if r.Index != sim.PeakDemand {
			continue
		}
		t := r.Tail
		out = append(out, peakLevel{r.Period, t.Quantile(0.50), t.Quantile(0.90), t.ReturnLevel(20), t.ReturnLevel(50), t.ES99})
	}
	return out
}

// writePlanning writes the planner's tables.
func writePlanning(e *errWriter, r *SimReport) {
	p := r.Planning
	levels := peakLevels(r.Rows)
	if p == nil || len(levels) == 0 {
		return
	}
	e.printf("\nPeak-day demand for capacity planning (%s)\n", p.Unit)
	rows := [][]string{}
	for _, l := range levels {
		rows = append(rows, []string{l.Period, Num(l.P50, 0), Num(l.P90, 0), Num(l.In20, 0), Num(l.In50, 0), Num(l.Max, 0)})
	}
	e.table([]string{"period", "50/50 (P50)", "90/10 (P90)", "1-in-20", "1-in-50", "ES 99%"}, rows)
	e.printf("  50/50 and 90/10: the peak exceeded in one year in two and in one in ten (common practice in " +
		"resource planning); 1-in-20 and 1-in-50: the levels gas network planning sizes to (common practice).\n")
	if p.LoadDuration != nil {
		e.printf("\nLoad-duration curve of %d (the n-th highest day of the year, %s paths; %s)\n",
			r.Manifest.Year, numfmt.Number(float64(p.LoadDurationPaths)), p.Unit)
		rows = rows[:0]
		for _, rank := range loadDurationRanks {
			if rank > len(p.LoadDuration[0]) {
				break
			}
			line := []string{fmt.Sprint(rank)}
			for k := range sim.FanQuantileProbs() {
				line = append(line, Num(p.LoadDuration[k][rank-1], 0))
			}
			rows = append(rows, line)
		}
		header := []string{"n-th highest day"}
		for _, q := range sim.FanQuantileProbs() {
			header = append(header, fmt.Sprintf("P%.0f", 100*q))
		}
		e.table(header, rows)
		if !slices.Contains(r.Manifest.Periods, "year") {
			e.printf("%s\n", Wrap("  The curve is the calendar year's, simulated for it over the run's periods and the year: "+
				"its busiest day is the year's peak, not the peak of the periods above, and its years are other draws than "+
				"the tables' (a run starting on another day).", "  "))
		}
	}
	writeNormals(e, p.Normals, p.Unit)
}

// NormalsTable writes the weather-normalized history as a terminal table.
func NormalsTable(w io.Writer, normals []sim.YearNormal, unit string) error {
	e := &errWriter{w: w}
	writeNormals(e, normals, unit)
	return e.err
}

// writeNormals writes the weather-normalized history.
func writeNormals(e *errWriter, normals []sim.YearNormal, unit string) {
	if len(normals) == 0 {
		return
	}
	u := EnergyUnit(unit)
	e.printf("\nWeather-normalized demand by historical year (%s)\n", u)
	rows := [][]string{}
	for _, y := range normals {
		rows = append(rows, []string{fmt.Sprint(y.Year), fmt.Sprint(y.Days), Num(y.Actual, 0), Num(y.AtActualWeather, 0),
			Num(y.AtNormalWeather, 0), Num(y.Normalized, 0), fmt.Sprintf("%+.1f%%", 100*(y.Actual/y.Normalized-1))})
	}
	e.table([]string{"year", "days", "actual", "model, actual", "model, normal", "weather-normalized",
		"weather effect"}, rows)
	e.printf("%s\n", Wrap("  model, actual and model, normal: the demand model at the year's actual weather and at normal "+
		"weather (the mean over climatological simulations of that year, with the trend at that year and the same calendar); "+
		"weather-normalized = actual − (model, actual) + (model, normal); weather effect = actual / weather-normalized − 1, "+
		"the share of the year's demand its weather added (+) or saved (−)", "  "))
}

// EnergyUnit is the unit of a period's energy for daily loads in unit
// ("GJ" for "GJ/day").
func EnergyUnit(unit string) string {
	return sim.Energy.Info().Unit("C", unit)
}

// jsonPlanning is the planning object of the JSON output.
type jsonPlanning struct {
	Unit              string            `json:"unit"`
	PeakDay           []jsonPeak        `json:"peak_day"`
	LoadDurationPaths int               `json:"load_duration_paths,omitempty"`
	LoadDuration      []jsonRank        `json:"load_duration,omitempty"`
	Normals           []jsonNormalYear  `json:"weather_normalized,omitempty"`
	Design            []jsonDesign      `json:"design,omitempty"`
	Capacity          []jsonCapacity    `json:"capacity,omitempty"`
	Notes             map[string]string `json:"notes"`
}

type jsonPeak struct {
	Period string  `json:"period"`
	P50    float64 `json:"p50"`
	P90    float64 `json:"p90"`
	In20   float64 `json:"return_level_20"`
	In50   float64 `json:"return_level_50"`
	ES99   float64 `json:"es99"`
}

type jsonRank struct {
	Rank      int                `json:"rank"`
	Quantiles map[string]float64 `json:"quantiles"`
}

type jsonNormalYear struct {
	Year            int     `json:"year"`
	Days            int     `json:"days"`
	Actual          float64 `json:"actual"`
	AtActualWeather float64 `json:"model_at_actual_weather"`
	AtNormalWeather float64 `json:"model_at_normal_weather"`
	Normalized      float64 `json:"weather_normalized"`
}

func toJSONPlanning(r *SimReport) *jsonPlanning {
	p := r.Planning
	if p == nil {
		if len(r.Design) == 0 {
			return nil
		}
		return &jsonPlanning{Design: toJSONDesign(r.Design), Notes: map[string]string{}}
	}
	j := &jsonPlanning{Unit: p.Unit, LoadDurationPaths: p.LoadDurationPaths, Notes: map[string]string{
		"p50": "50/50 peak: exceeded one year in two", "p90": "90/10 peak: exceeded one year in ten",
		"return_level_20": "1-in-20 peak", "return_level_50": "1-in-50 peak"},
		Design: toJSONDesign(r.Design), Capacity: toJSONCapacity(r.Capacities)}
	for _, l := range peakLevels(r.Rows) {
		j.PeakDay = append(j.PeakDay, jsonPeak{l.Period, l.P50, l.P90, l.In20, l.In50, l.Max})
	}
	if p.LoadDuration != nil {
		for rank := 1; rank <= len(p.LoadDuration[0]); rank++ {
			q := map[string]float64{}
			for k, pr := range sim.FanQuantileProbs() {
				q[fmt.Sprintf("%.2f", pr)] = p.LoadDuration[k][rank-1]
			}
			j.LoadDuration = append(j.LoadDuration, jsonRank{rank, q})
		}
	}
	for _, y := range p.Normals {
		j.Normals = append(j.Normals, jsonNormalYear{y.Year, y.Days, y.Actual, y.AtActualWeather, y.AtNormalWeather, y.Normalized})
	}
	return j
}
