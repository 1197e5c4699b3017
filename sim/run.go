package sim

import (
	"context"
	"fmt"
	"math"
	"math/bits"
	"math/rand/v2"
	"runtime"

	"golang.org/x/sync/errgroup"

	"wxstress/model"
)

// Config is a simulation run.
type Config struct {
	Paths   int    // number of synthetic years, > 0
	Seed    uint64 // results depend on Seed and Paths only, never on Workers
	Workers int    // goroutines; 0 means runtime.GOMAXPROCS(0)
	Year    int    // target year; 0 means the year after the data end
	Start   string // StartClimate (default) or StartConditional
	// Periods names the index periods (see ParsePeriod); nil means
	// DefaultPeriods.
	Periods []string
	Bases   Bases
	// Progress, when set, is called after each batch with the number of
	// paths that batch finished; it is called from several goroutines.
	Progress func(paths int)
}

// BatchSize is the number of paths a worker takes at a time.
const BatchSize = 2048

// Aggregate is one index of one period, with its value on every path.
type Aggregate struct {
	Index  Index
	Period Period
	Values []float64 // Values[i] is path i's value
}

// Result holds the aggregates of a run.
type Result struct {
	Config     Config // as run, with defaults filled in
	Periods    []Period
	Aggregates []Aggregate // period-major: all indices of Periods[0], then Periods[1], ...
	// SimulatedDays is the number of days stepped per path, including the
	// burn-in or the days between the data end and the first period.
	SimulatedDays int
}

// Validate checks a configuration against a model and fills in defaults.
func (c *Config) Validate(m *model.File) error {
	if c.Paths <= 0 {
		return fmt.Errorf("sim: paths must be positive, got %d", c.Paths)
	}
	if c.Workers < 0 {
		return fmt.Errorf("sim: workers must be positive, got %d", c.Workers)
	}
	if c.Workers == 0 {
		c.Workers = runtime.GOMAXPROCS(0)
	}
	if c.Year == 0 {
		c.Year = m.Data.LastDate.Year() + 1
	}
	if c.Year < 1800 || c.Year > 2300 {
		return fmt.Errorf("sim: target year %d outside 1800..2300", c.Year)
	}
	switch c.Start {
	case "":
		c.Start = StartClimate
	case StartClimate, StartConditional:
	default:
		return fmt.Errorf("sim: start %q: want %s or %s", c.Start, StartClimate, StartConditional)
	}
	if len(c.Periods) == 0 {
		c.Periods = DefaultPeriods
	}
	for _, v := range []float64{c.Bases.HDD, c.Bases.CDD, c.Bases.ColdBelow} {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return fmt.Errorf("sim: degree-day bases and the cold threshold must be finite")
		}
	}
	return nil
}

// Run simulates cfg.Paths synthetic years from m. It stops at the next batch
// boundary when ctx is cancelled and returns ctx's error.
func Run(ctx context.Context, m *model.File, cfg Config) (*Result, error) {
	pl, periods, err := prepare(m, &cfg)
	if err != nil {
		return nil, err
	}
	res := &Result{Config: cfg, Periods: periods, SimulatedDays: pl.n}
	for _, p := range periods {
		for x := range numTempIndices {
			res.Aggregates = append(res.Aggregates, Aggregate{Index: x, Period: p, Values: make([]float64, cfg.Paths)})
		}
	}
	out := make([][]float64, len(res.Aggregates))
	for i := range res.Aggregates {
		out[i] = res.Aggregates[i].Values
	}

	g, gctx := errgroup.WithContext(ctx)
	g.SetLimit(cfg.Workers)
	for lo := 0; lo < cfg.Paths; lo += BatchSize {
		hi := min(lo+BatchSize, cfg.Paths)
		g.Go(func() error {
			if err := gctx.Err(); err != nil {
				return err
			}
			var rng rand.PCG
			segs := make([]segStats, len(pl.segs))
			buf := make([]float64, pl.n)
			for i := lo; i < hi; i++ {
				seedPath(&rng, cfg.Seed, i)
				pl.temps(&rng, buf)
				pl.accumulate(buf, segs)
				pl.collect(segs, out, i)
			}
			if cfg.Progress != nil {
				cfg.Progress(hi - lo)
			}
			return nil
		})
	}
	if err := g.Wait(); err != nil {
		return nil, err
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	return res, nil
}

// prepare validates cfg (filling in its defaults), resolves its periods and
// builds the run's plan.
func prepare(m *model.File, cfg *Config) (*plan, []Period, error) {
	if err := cfg.Validate(m); err != nil {
		return nil, nil, err
	}
	periods := make([]Period, len(cfg.Periods))
	for i, name := range cfg.Periods {
		p, err := ParsePeriod(name, cfg.Year)
		if err != nil {
			return nil, nil, err
		}
		periods[i] = p
	}
	pl, err := newPlan(m, cfg, periods)
	return pl, periods, err
}

// segStats are one path's accumulators over one segment.
type segStats struct {
	hdd, cdd float64
	lo, hi   float64 // coldest and hottest daily mean
	cold     int     // cold days
	best     int     // longest run of cold days inside the segment
	prefix   int     // cold days at the segment's start
	suffix   int     // cold days at its end
	length   int
}

// temps fills buf (pl.n days) with one path's daily temperatures: the AR
// anomaly driven by the day's shock, plus the seasonal mean. AR(1) with
// tabulated shocks, the common case, has its own loop.
func (pl *plan) temps(rng *rand.PCG, buf []float64) {
	mean, sd := pl.mean[:len(buf)], pl.sd[:len(buf)]
	if pl.table != nil && pl.p == 1 {
		tab, phi, x := pl.table, pl.phi[0], pl.x0[0]
		for d := range buf {
			x = phi*x + sd[d]*tab.Draw(rng.Uint64())
			buf[d] = mean[d] + x
		}
		return
	}
	p1, p2, p3, p4, p5 := pl.phi[0], pl.phi[1], pl.phi[2], pl.phi[3], pl.phi[4]
	x1, x2, x3, x4, x5 := pl.x0[0], pl.x0[1], pl.x0[2], pl.x0[3], pl.x0[4]
	for d := range buf {
		u := rng.Uint64()
		var z float64
		if pl.table != nil {
			z = pl.table.Draw(u)
		} else {
			hi, _ := bits.Mul64(u, pl.poolLen[d])
			z = pl.pool[pl.poolOff[d]+int32(hi)]
		}
		x := p1*x1 + p2*x2 + p3*x3 + p4*x4 + p5*x5 + sd[d]*z
		x5, x4, x3, x2, x1 = x4, x3, x2, x1, x
		buf[d] = mean[d] + x
	}
}

// accumulate reduces one path's temperatures to its segment statistics.
func (pl *plan) accumulate(buf []float64, segs []segStats) {
	b := pl.bases
	for s, sg := range pl.segs {
		st := segStats{lo: math.Inf(1), hi: math.Inf(-1), length: sg.hi - sg.lo}
		run, alive := 0, 1
		for _, t := range buf[sg.lo:sg.hi] {
			st.hdd += max(b.HDD-t, 0)
			st.cdd += max(t-b.CDD, 0)
			if t < st.lo {
				st.lo = t
			}
			if t > st.hi {
				st.hi = t
			}
			c := 0
			if t < b.ColdBelow {
				c = 1
			}
			run = (run + 1) * c
			st.best = max(st.best, run)
			st.cold += c
			alive &= c
			st.prefix += alive
		}
		st.suffix = run
		segs[s] = st
	}
}

// collect merges a path's segments into its period aggregates, written at
// position i of each output column.
func (pl *plan) collect(segs []segStats, out [][]float64, i int) {
	for k, span := range pl.pspan {
		hdd, cdd := 0.0, 0.0
		lo, hi := math.Inf(1), math.Inf(-1)
		cold, best, run := 0, 0, 0
		for _, st := range segs[span[0]:span[1]] {
			hdd += st.hdd
			cdd += st.cdd
			lo, hi = min(lo, st.lo), max(hi, st.hi)
			cold += st.cold
			if st.prefix == st.length { // all cold: the run goes on
				run += st.length
				best = max(best, run)
				continue
			}
			best = max(best, run+st.prefix, st.best)
			run = st.suffix
		}
		best = max(best, run)
		o := out[k*int(numTempIndices):]
		o[HDD][i], o[CDD][i] = hdd, cdd
		o[Coldest][i], o[Hottest][i] = lo, hi
		o[ColdDays][i], o[ColdSpell][i] = float64(cold), float64(best)
	}
}
