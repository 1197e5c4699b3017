package sim

import (
	"context"
	"math/rand/v2"
	"slices"

	"gonum.org/v1/gonum/stat"

	"wxstress/calendar"
	"wxstress/model"
)

// fanProbs are the probabilities of the daily quantiles a fan chart shows.
var fanProbs = [...]float64{0.05, 0.25, 0.50, 0.75, 0.95}

// FanQuantileProbs returns the probabilities of the daily quantiles a Fan
// holds, in increasing order (a copy).
func FanQuantileProbs() []float64 { return slices.Clone(fanProbs[:]) }

// Fan holds daily detail of the target year across paths: Q[k][d] is the
// quantile FanQuantileProbs()[k] of the temperature on Dates[d]. With a
// demand model it also holds the demand's daily quantiles (DemandQ), its
// daily mean (DemandMean) and the load-duration curve: LoadDuration[k][r]
// is quantile FanQuantileProbs()[k] across paths of the year's (r+1)-th
// highest daily demand.
type Fan struct {
	Paths        int // years behind the quantiles
	Dates        []calendar.Date
	Q            [][]float64
	DemandQ      [][]float64
	DemandMean   []float64
	LoadDuration [][]float64
}

// RunFan simulates paths whole years (the first paths of a run with cfg's
// seed, so they are the same years as a Run's) and returns their daily
// quantiles. It keeps paths × days values, so it is for a few thousand
// paths, not millions.
func RunFan(ctx context.Context, m *model.File, cfg Config, paths int) (*Fan, error) {
	cfg.Paths, cfg.Periods = paths, []string{"year"}
	pl, periods, err := prepare(m, &cfg)
	if err != nil {
		return nil, err
	}
	y := periods[0]
	n := y.Days()
	off := int(y.From - pl.first)
	temps := matrix(n, paths) // temps[d][path]
	var demand, ranked [][]float64
	var dbuf []float64
	if pl.demand != nil {
		demand, ranked, dbuf = matrix(n, paths), matrix(n, paths), make([]float64, pl.n)
	}
	var rng rand.PCG
	buf := make([]float64, pl.n)
	for i := range paths {
		if i%1024 == 0 {
			if err := ctx.Err(); err != nil {
				return nil, err
			}
		}
		pl.path(&rng, cfg.Seed, i, buf, dbuf)
		for d := range n {
			temps[d][i] = buf[off+d]
		}
		if dbuf != nil {
			year := slices.Clone(dbuf[off : off+n])
			slices.Sort(year)
			for d := range n {
				demand[d][i] = dbuf[off+d]
				ranked[d][i] = year[n-1-d]
			}
		}
	}
	f := &Fan{Paths: paths}
	for d := range n {
		f.Dates = append(f.Dates, y.From+calendar.Date(d))
	}
	f.Q = quantilesByRow(temps)
	if pl.demand != nil {
		f.DemandQ, f.LoadDuration = quantilesByRow(demand), quantilesByRow(ranked)
		for _, row := range demand {
			f.DemandMean = append(f.DemandMean, stat.Mean(row, nil))
		}
	}
	return f, nil
}

func matrix(rows, cols int) [][]float64 {
	m := make([][]float64, rows)
	for i := range m {
		m[i] = make([]float64, cols)
	}
	return m
}

// quantilesByRow returns q[k][r], quantile fanProbs[k] of rows[r] (which it
// sorts).
func quantilesByRow(rows [][]float64) [][]float64 {
	q := matrix(len(fanProbs), len(rows))
	for r, row := range rows {
		slices.Sort(row)
		for k, p := range fanProbs {
			q[k][r] = stat.Quantile(p, stat.LinInterp, row, nil)
		}
	}
	return q
}
