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
// seed and periods: the same years as that Run's when its periods start by
// 1 January) and returns their daily quantiles of the target year. It keeps paths × days values, so it is for a few thousand
// paths, not millions. Paths and rows are shared out among cfg.Workers
// goroutines.
func RunFan(ctx context.Context, m *model.File, cfg Config, paths int) (*Fan, error) {
	// The run's own periods, with the year: the same first day as the run
	// whenever its periods start by 1 January of the target year (the
	// default ones do), so the same random numbers day by day and the same
	// years as the run's first paths. A run of later periods alone (the
	// cooling season) starts later than the year, and its fan then comes
	// from other draws of the same model.
	periods := slices.Clone(cfg.Periods)
	if len(periods) == 0 {
		periods = DefaultPeriods()
	}
	if !slices.Contains(periods, "year") {
		periods = append(periods, "year")
	}
	cfg.Paths, cfg.Periods = paths, periods
	pl, resolved, err := prepare(m, &cfg)
	if err != nil {
		return nil, err
	}
	y := resolved[slices.Index(periods, "year")]
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
			// Paths are gathered day by day in blocks of fanBlock and then
			// written to the day rows a block at a time: a path written
			// straight into the rows would touch a cache line of every row.
			blk := newFanRows(n, pl.demand != nil)
			for i := lo; i < hi; {
				k := 1
				if pl.fast1() && hi-i >= 4 {
					k = 4
				}
				if blk.paths+k > fanBlock {
					blk.flush(i-blk.paths, temps, demand, ranked)
				}
				pl.paths(&rngs, &bufs, &dbufs, cfg.Seed, i, k)
				for j := range k {
					c := blk.paths
					for d, v := range bufs[j][off : off+n] {
						blk.temps[d*fanBlock+c] = v
					}
					if dbuf := dbufs[j]; dbuf != nil {
						copy(year, dbuf[off:off+n])
						slices.Sort(year)
						for d, v := range dbuf[off : off+n] {
							blk.demand[d*fanBlock+c] = v
							blk.ranked[d*fanBlock+c] = year[n-1-d]
						}
					}
					blk.paths++
				}
				i += k
			}
			blk.flush(hi-blk.paths, temps, demand, ranked)
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

// fanBlock is the number of paths RunFan gathers before writing them out.
const fanBlock = 32

// fanRows holds up to fanBlock paths' days, day-major: value d·fanBlock + c
// is day d of the block's path c.
type fanRows struct {
	paths                 int
	temps, demand, ranked []float64
}

func newFanRows(days int, demand bool) *fanRows {
	b := &fanRows{temps: make([]float64, days*fanBlock)}
	if demand {
		b.demand, b.ranked = make([]float64, days*fanBlock), make([]float64, days*fanBlock)
	}
	return b
}

// flush writes the block's paths, the first of which is path first, into
// the day rows and empties the block.
func (b *fanRows) flush(first int, temps, demand, ranked [][]float64) {
	for d := range temps {
		copy(temps[d][first:first+b.paths], b.temps[d*fanBlock:])
		if b.demand != nil {
			copy(demand[d][first:first+b.paths], b.demand[d*fanBlock:])
			copy(ranked[d][first:first+b.paths], b.ranked[d*fanBlock:])
		}
	}
	b.paths = 0
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
