package sim

import (
	"context"
	"math/rand/v2"
	"slices"

	"gonum.org/v1/gonum/stat"

	"wxstress/calendar"
	"wxstress/model"
)

// FanProbs are the daily quantiles a fan chart shows.
var FanProbs = []float64{0.05, 0.25, 0.50, 0.75, 0.95}

// Fan holds daily quantiles of the simulated temperature over the target
// year: Q[k][d] is quantile FanProbs[k] on Dates[d].
type Fan struct {
	Dates []calendar.Date
	Q     [][]float64
}

// RunFan simulates paths whole years (the first paths of a run with cfg's
// seed, so they are the same years as a Run's) and returns the daily
// quantiles of temperature across them. It keeps paths × days values, so it
// is for a few thousand paths, not millions.
func RunFan(ctx context.Context, m *model.File, cfg Config, paths int) (*Fan, error) {
	cfg.Paths, cfg.Periods = paths, []string{"year"}
	pl, periods, err := prepare(m, &cfg)
	if err != nil {
		return nil, err
	}
	y := periods[0]
	n := y.Days()
	off := int(y.From - pl.first)
	days := make([][]float64, n) // days[d][path]
	for d := range days {
		days[d] = make([]float64, paths)
	}
	var rng rand.PCG
	buf := make([]float64, pl.n)
	for i := range paths {
		if i%1024 == 0 {
			if err := ctx.Err(); err != nil {
				return nil, err
			}
		}
		pl.path(&rng, cfg.Seed, i, buf, nil)
		for d := range n {
			days[d][i] = buf[off+d]
		}
	}
	f := &Fan{Q: make([][]float64, len(FanProbs))}
	for d := range n {
		f.Dates = append(f.Dates, y.From+calendar.Date(d))
		slices.Sort(days[d])
	}
	for k, p := range FanProbs {
		f.Q[k] = make([]float64, n)
		for d := range n {
			f.Q[k][d] = stat.Quantile(p, stat.LinInterp, days[d], nil)
		}
	}
	return f, nil
}
