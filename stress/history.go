package stress

import (
	"fmt"
	"math"
	"math/rand/v2"
	"slices"

	"gonum.org/v1/gonum/stat"

	"wxstress/calendar"
	"wxstress/calibrate"
	"wxstress/model"
	"wxstress/sim"
)

// MaxSeasonGaps is the largest share of missing days a historical season may
// have; its missing days take the model's mean for the date.
const MaxSeasonGaps = 0.1

// sdBandDraws is the number of resampled sets of seasons behind the band of
// the historical sd.
const sdBandDraws = 2000

// Season is one complete historical period of the record with its
// temperatures moved along the fitted trend to the target year.
type Season struct {
	Year    int       // the year the period ends in
	Missing int       // days without a value (filled with the model's mean)
	Values  []float64 // temperature indices, indexed by sim.Index
}

// WorstSeason is one of the record's worst seasons of an index with the
// model's probability of a season at least as bad.
type WorstSeason struct {
	Year   int
	Value  float64
	Prob   float64 // share of simulated years at least as bad
	ProbSE float64 // binomial Monte Carlo s.e.
}

// HistoryRow compares one index of one period over the record's seasons
// with the simulated distribution.
type HistoryRow struct {
	Period string
	Index  sim.Index
	Years  []int
	Values []float64 // the seasons' values, moved to the target year

	Mean, SD, P5, P50, P95 float64
	Worst                  []WorstSeason // the three worst, worst first
	ModelMean, ModelSD     float64
	// SDBand is the 5–95 % range of the sd of len(Values) seasons drawn at
	// random from the simulated years: a historical SD outside it is
	// evidence that the model's spread is wrong for this index.
	SDBand [2]float64
	// SDVerdict is "inside", "model too narrow" or "model too wide".
	SDVerdict string
	// MeanBand is the 5–95 % range of the mean of len(Values) seasons
	// drawn at random from the simulated years (widened for the Monte Carlo
	// error of the model's own mean): a record mean outside it is evidence
	// that the model's level is wrong for this index (the design-day
	// temperature of a model whose coldest days are too mild).
	MeanBand [2]float64
	// MeanVerdict is "inside", "model too mild" (the record's seasons are
	// on average worse, on the index's adverse side, than the band allows)
	// or "model too severe".
	MeanVerdict string
	// MeanP and SDP are the two-sided resampling p-values of the record's
	// mean and sd against the same draws: (1 + draws at least as far out on
	// the record's side)/(1 + draws), doubled, at most 1. They take the
	// record's seasons as independent.
	MeanP, SDP float64
}

// HistoricalSeasons is the record's own seasons beside the model.
type HistoricalSeasons struct {
	TargetYear int
	// ShiftPerYear is the trend moved per year of distance to the target
	// year (0 without a trend), in the data's units.
	ShiftPerYear float64
	Seasons      map[string][]Season // by period name
	Rows         []HistoryRow
	// ClimateRun is set when the model side comes from a separate
	// climate-start run (same model, paths and seed) because the run itself
	// started from the state at the data end.
	ClimateRun bool
	// Paths is the number of simulated years behind the model side.
	Paths int
}

// Historical takes every complete period of set's configuration in the
// record s (the days before the model's data end), moves each day by the
// fitted trend to set's target year, T + b·(Y − y) with y the year the
// period ends in, computes the temperature indices with set's bases, and
// compares their distribution with the simulated one. Seasons missing more
// than MaxSeasonGaps of their days are left out.
func Historical(s *calibrate.Series, m *model.File, set *Set) (*HistoricalSeasons, error) {
	cfg := set.Config
	h := &HistoricalSeasons{TargetYear: cfg.Year, Seasons: map[string][]Season{}, Paths: cfg.Paths}
	if m.Trend.Kind == "linear" {
		h.ShiftPerYear = m.Trend.SlopePerYear
	}
	last := s.End()
	for _, name := range cfg.Periods {
		for y := s.Start.Year(); y <= last.Year(); y++ {
			p, err := sim.ParsePeriod(name, y)
			if err != nil {
				return nil, err
			}
			if p.From < s.Start || p.To > last {
				continue
			}
			shift := h.ShiftPerYear * float64(cfg.Year-y)
			days, missing := s.Span(p.From, p.To, func(d calendar.Date) float64 { return m.Mean(d.ModelTime()) })
			for i := range days {
				days[i] += shift
			}
			if float64(missing) > MaxSeasonGaps*float64(len(days)) {
				continue
			}
			h.Seasons[name] = append(h.Seasons[name], Season{Year: y, Missing: missing, Values: sim.TempIndices(days, cfg.Bases)})
		}
	}
	for _, name := range cfg.Periods {
		seasons := h.Seasons[name]
		if len(seasons) < 2 {
			continue
		}
		for _, x := range sim.TempIndexList() {
			col := column(set.Base, x, name)
			if col == nil {
				continue
			}
			row := HistoryRow{Period: name, Index: x}
			for _, se := range seasons {
				row.Years = append(row.Years, se.Year)
				row.Values = append(row.Values, se.Values[x])
			}
			summarizeHistory(&row, col, x.Info().HighIsAdverse, cfg.Seed)
			h.Rows = append(h.Rows, row)
		}
	}
	if len(h.Rows) == 0 {
		return nil, fmt.Errorf("stress: the record (%s to %s) holds fewer than two complete seasons of any period simulated", s.Start, last)
	}
	return h, nil
}

// column returns the baseline's values of index x for the named period.
func column(r *sim.Result, x sim.Index, period string) []float64 {
	for _, a := range r.Aggregates {
		if a.Index == x && a.Period.Name == period {
			return a.Values
		}
	}
	return nil
}

func summarizeHistory(row *HistoryRow, sims []float64, high bool, seed uint64) {
	v := row.Values
	row.Mean, row.SD = stat.MeanStdDev(v, nil)
	sorted := slices.Clone(v)
	slices.Sort(sorted)
	q := func(p float64) float64 { return stat.Quantile(p, stat.LinInterp, sorted, nil) }
	row.P5, row.P50, row.P95 = q(0.05), q(0.5), q(0.95)
	row.ModelMean, row.ModelSD = stat.MeanStdDev(sims, nil)

	order := make([]int, len(v))
	for i := range order {
		order[i] = i
	}
	slices.SortStableFunc(order, func(a, b int) int {
		if high {
			return cmpFloat(v[b], v[a])
		}
		return cmpFloat(v[a], v[b])
	})
	n := float64(len(sims))
	for _, i := range order[:min(3, len(order))] {
		k := 0
		for _, s := range sims {
			if high && s >= v[i] || !high && s <= v[i] {
				k++
			}
		}
		p := float64(k) / n
		row.Worst = append(row.Worst, WorstSeason{Year: row.Years[i], Value: v[i], Prob: p, ProbSE: math.Sqrt(p * (1 - p) / n)})
	}

	// The sampling ranges of the mean and sd of len(v) seasons under the
	// model: n seasons drawn from the m simulated years, their spread about
	// its middle widened by √(1 + n/m) for the Monte Carlo error of the
	// model's own figure (the variance of a difference of two independent
	// means, s²/n + s²/m; the same first-order factor for the sd).
	r := rand.New(rand.NewPCG(seed, 0x4157))
	means, sds := make([]float64, sdBandDraws), make([]float64, sdBandDraws)
	draw := make([]float64, len(v))
	for b := range sds {
		for j := range draw {
			draw[j] = sims[r.IntN(len(sims))]
		}
		means[b], sds[b] = stat.MeanStdDev(draw, nil)
	}
	slices.Sort(means)
	slices.Sort(sds)
	f := math.Sqrt(1 + float64(len(v))/float64(len(sims)))
	for _, d := range [][]float64{means, sds} {
		c := d[len(d)/2]
		for i := range d {
			d[i] = c + f*(d[i]-c) // keeps the order
		}
	}
	row.MeanP, row.SDP = resampledP(means, row.Mean), resampledP(sds, row.SD)
	row.MeanBand = [2]float64{stat.Quantile(0.05, stat.LinInterp, means, nil), stat.Quantile(0.95, stat.LinInterp, means, nil)}
	row.SDBand = [2]float64{stat.Quantile(0.05, stat.LinInterp, sds, nil), stat.Quantile(0.95, stat.LinInterp, sds, nil)}
	worse, better := row.Mean > row.MeanBand[1], row.Mean < row.MeanBand[0]
	if !high {
		worse, better = better, worse
	}
	switch {
	case worse:
		row.MeanVerdict = "model too mild"
	case better:
		row.MeanVerdict = "model too severe"
	default:
		row.MeanVerdict = "inside"
	}
	switch {
	case row.SD > row.SDBand[1]:
		row.SDVerdict = "model too narrow"
	case row.SD < row.SDBand[0]:
		row.SDVerdict = "model too wide"
	default:
		row.SDVerdict = "inside"
	}
}

// resampledP is the two-sided p-value of v among the resampled values
// draws: 2·(1 + the draws on v's side of it, v included)/(1 + len(draws)),
// the smaller side, at most 1.
func resampledP(draws []float64, v float64) float64 {
	below, above := 0, 0
	for _, d := range draws {
		if d <= v {
			below++
		}
		if d >= v {
			above++
		}
	}
	return min(1, 2*float64(1+min(below, above))/float64(1+len(draws)))
}

func cmpFloat(a, b float64) int {
	switch {
	case a < b:
		return -1
	case a > b:
		return 1
	}
	return 0
}

// SeasonDates returns the first and last day of the named period ending in
// year y (for reports).
func SeasonDates(name string, y int) (calendar.Date, calendar.Date, error) {
	p, err := sim.ParsePeriod(name, y)
	return p.From, p.To, err
}
