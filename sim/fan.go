package sim

import (
	"context"
	"math/rand/v2"
	"slices"

	"golang.org/x/sync/errgroup"
	"gonum.org/v1/gonum/stat"

	"wxstress/calendar"
	"wxstress/evidence"
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
// paths, not millions. Paths and rows are shared out among cfg.Workers
// goroutines.
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
	if pl.demand != nil {
		demand, ranked = matrix(n, paths), matrix(n, paths)
	}
	g, gctx := errgroup.WithContext(ctx)
	g.SetLimit(cfg.Workers)
	for lo := 0; lo < paths; lo += BatchSize {
		hi := min(lo+BatchSize, paths)
		g.Go(func() error {
			if err := gctx.Err(); err != nil {
				return err
			}
			var rngs [4]rand.PCG
			bufs, dbufs := pl.buffers()
			year := make([]float64, n)
			for i := lo; i < hi; {
				k := 1
				if pl.fast1() && hi-i >= 4 {
					k = 4
				}
				pl.paths(&rngs, &bufs, &dbufs, cfg.Seed, i, k)
				for j := range k {
					for d := range n {
						temps[d][i+j] = bufs[j][off+d]
					}
					if dbuf := dbufs[j]; dbuf != nil {
						copy(year, dbuf[off:off+n])
						slices.Sort(year)
						for d := range n {
							demand[d][i+j] = dbuf[off+d]
							ranked[d][i+j] = year[n-1-d]
						}
					}
				}
				i += k
			}
			return nil
		})
	}
	if err := g.Wait(); err != nil {
		return nil, err
	}
	f := &Fan{Paths: paths}
	for d := range n {
		f.Dates = append(f.Dates, y.From+calendar.Date(d))
	}
	f.Q = quantilesByRow(temps, cfg.Workers)
	if pl.demand != nil {
		f.DemandQ, f.LoadDuration = quantilesByRow(demand, cfg.Workers), quantilesByRow(ranked, cfg.Workers)
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
// reorders: the few order statistics the quantiles read are selected, not
// the whole row sorted), on up to workers goroutines.
func quantilesByRow(rows [][]float64, workers int) [][]float64 {
	q := matrix(len(fanProbs), len(rows))
	var g errgroup.Group
	g.SetLimit(max(workers, 1))
	for r, row := range rows {
		g.Go(func() error {
			var ranks []int
			for _, p := range fanProbs {
				ranks = append(ranks, evidence.QuantileRanks(p, len(row))...)
			}
			evidence.SelectRanks(row, ranks)
			for k, p := range fanProbs {
				q[k][r] = evidence.SortedQuantile(p, row)
			}
			return nil
		})
	}
	g.Wait()
	return q
}
