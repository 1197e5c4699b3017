package sim

import (
	"context"
	"fmt"
	"math"
	"math/bits"
	"math/rand/v2"
	"runtime"

	"golang.org/x/sync/errgroup"

	"wxstress/calendar"
	"wxstress/model"
	"wxstress/shocks"
)

// Config is a simulation run.
type Config struct {
	Paths   int    // number of synthetic years, > 0
	Seed    uint64 // results depend on Seed and Paths only, never on Workers
	Workers int    // goroutines; 0 means runtime.GOMAXPROCS(0)
	Year    int    // target year; 0 means the year after the data end
	Start   string // StartClimate (default) or StartConditional
	// Periods names the index periods (see ParsePeriod); nil means
	// DefaultPeriods().
	Periods []string
	Bases   Bases
	// Demand, when set, adds daily demand D = Expected(T, weekday,
	// holiday) + u, u an AR(1), and the demand indices of each period.
	Demand *model.Demand
	// Holidays are the days simulated as holidays (demand only); see
	// calendar.HolidaysIn and SimulatedYears.
	Holidays []calendar.Date
	// Capacity, when positive, adds the index "days over capacity" (demand
	// above Capacity, in the demand's unit).
	Capacity float64
	// Growth scales the simulated demand (not the observed loads of a
	// season under way) by this factor; 0 means 1.
	Growth float64
	// SnapDays, when positive, adds the indices ColdSnap (the lowest mean of
	// SnapDays consecutive days of each period) and, with demand,
	// SnapEnergy (the highest demand over SnapDays consecutive days).
	SnapDays int
	// TopDays, when positive with demand, keeps each path's TopDays highest
	// daily demands of each period (Result.Top), for capacity targets.
	TopDays int
	// ReturnPeriods are the T (years, > 1) of the 1-in-T return levels the
	// tail tables list; nil means TailReturnPeriods.
	ReturnPeriods []float64
	// Observed, with a conditional start, are the observed daily means of a
	// season under way: periods that began by the model's data end count
	// their observed days as they were and simulate the rest from the state
	// at the data end. It must hold every day from the earliest period's
	// start to the data end.
	Observed *Observed
	// Progress, when set, is called after each batch with the number of
	// paths that batch finished; it is called from several goroutines.
	Progress func(paths int)
}

// maxPaths bounds a run's path count (each path keeps its aggregates).
const maxPaths = 1_000_000_000

// Observed are observed daily means from From on (NaN for a gap), and, for
// a run with demand, the observed daily loads of the same days (nil
// without; NaN for a gap).
type Observed struct {
	From  calendar.Date
	Temps []float64
	Loads []float64
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
	// Top holds, with Config.TopDays, each path's highest daily demands of
	// each period, highest first: Top[k][i·TopDays : (i+1)·TopDays] for
	// period k, path i.
	Top [][]float32
	// InSeason describes, for a run with observed days (Config.Observed),
	// each period's observed part: one entry per period, in order.
	InSeason []PeriodObserved
}

// PeriodObserved is the observed part of a period under way: its days to
// the data end and the temperature indices over them (by Index).
type PeriodObserved struct {
	Period string
	Days   int
	Values []float64
}

// Validate checks a configuration against a model and fills in defaults.
func (c *Config) Validate(m *model.File) error {
	if c.Paths <= 0 || c.Paths > maxPaths {
		return fmt.Errorf("sim: paths must be from 1 to %d, got %d", maxPaths, c.Paths)
	}
	if err := CheckReturnPeriods(c.ReturnPeriods); err != nil {
		return err
	}
	if math.IsNaN(c.Growth) || c.Growth < 0 || c.Growth > 100 || math.IsInf(c.Growth, 0) {
		return fmt.Errorf("sim: demand growth factor %v: want a positive factor", c.Growth)
	}
	if c.SnapDays < 0 || c.SnapDays > 366 || c.TopDays < 0 || c.TopDays > 366 {
		return fmt.Errorf("sim: snap days %d and top days %d: want 0..366", c.SnapDays, c.TopDays)
	}
	if c.Workers < 0 {
		return fmt.Errorf("sim: workers must be positive, got %d", c.Workers)
	}
	if c.Workers == 0 {
		c.Workers = runtime.GOMAXPROCS(0)
	}
	c.Year = TargetYear(m, c.Year, c.Periods)
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
		c.Periods = DefaultPeriods()
	}
	if c.Demand != nil {
		if err := c.Demand.CheckUnits(m.Data.Units); err != nil {
			return err
		}
	}
	if c.Capacity < 0 || math.IsNaN(c.Capacity) || math.IsInf(c.Capacity, 0) || c.Capacity > 0 && c.Demand == nil {
		return fmt.Errorf("sim: a capacity must be positive and needs a demand model")
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
	res := &Result{Config: cfg, Periods: periods, SimulatedDays: pl.n - len(pl.obs)}
	if len(pl.obs) > 0 {
		end := pl.first + calendar.Date(len(pl.obs)) - 1
		for _, p := range periods {
			o := PeriodObserved{Period: p.Name}
			if p.From <= end {
				lo, hi := int(p.From-pl.first), int(min(p.To, end)-pl.first)+1
				o.Days, o.Values = hi-lo, TempIndices(pl.obs[lo:hi], cfg.Bases)
				if pl.obsLoad != nil {
					energy, peak := 0.0, math.Inf(-1)
					for _, v := range pl.obsLoad[lo:hi] {
						energy, peak = energy+v, max(peak, v)
					}
					o.Values = append(o.Values, energy, peak) // at Energy and PeakDemand
				}
			}
			res.InSeason = append(res.InSeason, o)
		}
	}
	for _, p := range periods {
		for _, x := range pl.indices {
			res.Aggregates = append(res.Aggregates, Aggregate{Index: x, Period: p, Values: make([]float64, cfg.Paths)})
		}
	}
	out := make([][]float64, len(res.Aggregates))
	for i := range res.Aggregates {
		out[i] = res.Aggregates[i].Values
	}
	if pl.topDays > 0 {
		res.Top = make([][]float32, len(periods))
		for k := range res.Top {
			res.Top[k] = make([]float32, cfg.Paths*pl.topDays)
		}
	}

	g, gctx := errgroup.WithContext(ctx)
	g.SetLimit(cfg.Workers)
	for lo := 0; lo < cfg.Paths; lo += BatchSize {
		hi := min(lo+BatchSize, cfg.Paths)
		g.Go(func() error {
			if err := gctx.Err(); err != nil {
				return err
			}
			var rngs [4]rand.PCG
			bufs, dbufs := pl.buffers()
			segs := make([]segStats, len(pl.segs))
			for i := lo; i < hi; {
				k := 1
				if pl.fast1() && hi-i >= 4 {
					k = 4
				}
				pl.paths(&rngs, &bufs, &dbufs, cfg.Seed, i, k)
				for j := range k {
					buf, dbuf := bufs[j], dbufs[j]
					pl.accumulate(buf, segs)
					if dbuf != nil {
						pl.accumulateDemand(dbuf, segs)
					}
					pl.collect(segs, out, i+j)
					if pl.snapDays > 0 {
						pl.snaps(buf, dbuf, out, i+j)
					}
					if pl.topDays > 0 {
						pl.top(dbuf, res.Top, i+j)
					}
				}
				i += k
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
	periods, err := validPeriods(m, cfg)
	if err != nil {
		return nil, nil, err
	}
	pl, err := newPlan(m, cfg, periods)
	return pl, periods, err
}

// validPeriods validates cfg, filling in its defaults, and resolves its
// periods.
func validPeriods(m *model.File, cfg *Config) ([]Period, error) {
	if err := cfg.Validate(m); err != nil {
		return nil, err
	}
	periods := make([]Period, len(cfg.Periods))
	for i, name := range cfg.Periods {
		p, err := ParsePeriod(name, cfg.Year)
		if err != nil {
			return nil, err
		}
		for _, q := range periods[:i] {
			if q.From == p.From && q.To == p.To { // "jan" and "JAN", or heating and 11-01:03-31
				if q.Name == p.Name {
					return nil, fmt.Errorf("%w %q is listed twice", ErrPeriod, name)
				}
				return nil, fmt.Errorf("%w %q is the same days as %q (%s to %s): list it once", ErrPeriod, name, q.Name, p.From, p.To)
			}
		}
		if cfg.SnapDays > p.Days() {
			// A k-day cold snap has no window in a shorter period: its
			// lowest k-day mean would be +∞.
			return nil, fmt.Errorf("%w %q has %d days, fewer than the %d-day cold snap (--snap-days)", ErrPeriod, name,
				p.Days(), cfg.SnapDays)
		}
		periods[i] = p
	}
	return periods, nil
}

// SimulatedYears returns the first and last calendar year of the days a run
// of cfg on m simulates, the years whose holidays it needs (calendar.HolidaysIn):
// the last is the target year; the first is earlier when a period crosses
// the year end (the heating season of Y starts in Y−1), by the burn-in of a
// climatological start, or back to the day after the data end for a
// conditional start. Errors are those Run would return for cfg.
func SimulatedYears(m *model.File, cfg Config) (first, last int, err error) {
	periods, err := validPeriods(m, &cfg)
	if err != nil {
		return 0, 0, err
	}
	start, _, end, err := simulatedSpan(m, &cfg, periods)
	if err != nil {
		return 0, 0, err
	}
	return start.Year(), end.Year(), nil
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

	// Demand; accumulateDemand fills these after accumulate.
	energy float64 // total
	peak   float64 // highest day
	peakAt int     // index of that day
	over   int     // days above capacity
}

// temps fills buf (pl.n days) with one path's daily temperatures: the AR
// anomaly driven by the day's shock, the slow part when the model has one,
// plus the seasonal mean.
//
// Random bits: the slow part's start (when the model has one) takes one
// 64-bit draw; then each 64-bit draw serves two days, its low 32 bits the
// first and its high 32 bits the second. Without a slow part a day's 32
// bits are the fast shock's (Table.Draw32: p resolution 2⁻³²); with one,
// the low etaBits pick the slow part's shock η and the other 27 the fast
// shock's p (resolution 2⁻²⁷, the extreme shocks at p = 2⁻²⁸ ≈ 3.7·10⁻⁹).
func (pl *plan) temps(rng *rand.PCG, buf []float64) {
	n, x, f := pl.start(rng, buf)
	pl.simulate(rng, buf[n:], n, x, f)
}

// start copies the observed days of a season under way into buf and
// returns how many there are, the fast AR state x before the first
// simulated day and the slow part's start f (drawn from rng).
func (pl *plan) start(rng *rand.PCG, buf []float64) (int, [maxAR]float64, float64) {
	x, f := pl.x0, 0.0
	if pl.slow {
		f = pl.f0Mean + pl.f0SD*pl.startNormal.Draw(rng.Uint64())
		if pl.conditional {
			for i := range pl.p {
				x[i] -= f
			}
		}
	}
	return copy(buf, pl.obs), x, f
}

// shockWord is the part of a day's 32 random bits the fast shock reads:
// all of them without a slow part, else the top 27 with the etaBits below
// set to the middle of their range (so p is the cell's midpoint).
func shockWord(w uint32, slow bool) uint32 {
	if slow {
		return w&^(etaLevels-1) | etaLevels/2
	}
	return w
}

// simulate fills buf with the simulated days from day off of the plan on,
// from the AR state x0 and the slow part's start f.
func (pl *plan) simulate(rng *rand.PCG, buf []float64, off int, x0 [maxAR]float64, f float64) {
	mean, sd := pl.mean[off:off+len(buf)], pl.sd[off:off+len(buf)]
	if pl.fast1() {
		pl.simulate1(rng, buf, mean, sd, x0[0], f)
		return
	}
	p1, p2, p3, p4, p5 := pl.phi[0], pl.phi[1], pl.phi[2], pl.phi[3], pl.phi[4]
	x1, x2, x3, x4, x5 := x0[0], x0[1], x0[2], x0[3], x0[4]
	phiS, qEta := pl.phiS, &pl.qEta // zero without a slow part: f stays 0
	var u uint64
	for d := range buf {
		if d&1 == 0 {
			u = rng.Uint64()
		} else {
			u >>= 32
		}
		w := uint32(u)
		sw := shockWord(w, pl.slow)
		var z float64
		if pl.table != nil {
			z = pl.table.Draw32(sw)
		} else {
			// The bootstrap index: the top bits of sw·L (a multiply-shift
			// map of 32 bits onto the pool of L).
			z = pl.pool[pl.poolOff[off+d]+int32(uint64(sw)*pl.poolLen[off+d]>>32)]
		}
		x := p1*x1 + p2*x2 + p3*x3 + p4*x4 + p5*x5 + sd[d]*z
		x5, x4, x3, x2, x1 = x4, x3, x2, x1, x
		f = phiS*f + qEta[w&(etaLevels-1)]
		buf[d] = mean[d] + x + f
	}
}

// fast1 reports whether the run takes the AR(1) loops with a shock table
// (simulate1 and simulate4), the common case.
func (pl *plan) fast1() bool { return pl.table != nil && pl.p == 1 }

// simulate1 is simulate for an AR(1) with a shock table. Its arithmetic is
// simulate4's for one path, so a path's numbers do not depend on which of
// the two ran it.
func (pl *plan) simulate1(rng *rand.PCG, buf, mean, sd []float64, x, f float64) {
	tab, phi := pl.table, pl.phi[0]
	var u uint64
	if !pl.slow {
		for d := range buf {
			if d&1 == 0 {
				u = rng.Uint64()
			} else {
				u >>= 32
			}
			z, ok := tab.Central(uint32(u))
			if !ok {
				z = tab.Tail32(uint32(u))
			}
			x = phi*x + sd[d]*z
			buf[d] = mean[d] + x
		}
		return
	}
	phiS, qEta := pl.phiS, &pl.qEta
	for d := range buf {
		if d&1 == 0 {
			u = rng.Uint64()
		} else {
			u >>= 32
		}
		w := uint32(u)
		z, ok := tab.Central27(w) // Central(shockWord(w, true))
		if !ok {
			z = tab.Tail32(shockWord(w, true))
		}
		x = phi*x + sd[d]*z
		f = phiS*f + qEta[w&(etaLevels-1)]
		buf[d] = mean[d] + x + f
	}
}

// simulate4 is simulate1 for four paths at once: their recursions and
// random streams are independent, so the processor overlaps the latency of
// one path's step with the others'. Every path gets the numbers simulate1
// would give it. The day's step is written out for each half of the draws
// (and the odd last day): a loop over the halves or a helper the compiler
// will not inline keeps the states in memory and costs twice the time.
func (pl *plan) simulate4(rngs *[4]rand.PCG, bufs *[4][]float64, n int, x [4]float64, f [4]float64) {
	tab, phi := pl.table, pl.phi[0]
	m := pl.n - n
	mean, sd := pl.mean[n:pl.n], pl.sd[n:pl.n]
	b0, b1, b2, b3 := bufs[0][n:pl.n], bufs[1][n:pl.n], bufs[2][n:pl.n], bufs[3][n:pl.n]
	b0, b1, b2, b3 = b0[:m], b1[:m], b2[:m], b3[:m]
	sd, mean = sd[:m], mean[:m]
	r0, r1, r2, r3 := &rngs[0], &rngs[1], &rngs[2], &rngs[3]
	x0, x1, x2, x3 := x[0], x[1], x[2], x[3]
	var u0, u1, u2, u3 uint64
	var s, mu, z0, z1, z2, z3 float64
	var w0, w1, w2, w3 uint32
	var ok0, ok1, ok2, ok3 bool
	if !pl.slow {
		// Two days per iteration, the low and the high halves of the draws.
		d := 0
		for ; d+1 < m; d += 2 {
			u0, u1, u2, u3 = r0.Uint64(), r1.Uint64(), r2.Uint64(), r3.Uint64()
			s, mu = sd[d], mean[d]
			w0, w1, w2, w3 = uint32(u0), uint32(u1), uint32(u2), uint32(u3)
			z0, ok0 = tab.Central(w0)
			z1, ok1 = tab.Central(w1)
			z2, ok2 = tab.Central(w2)
			z3, ok3 = tab.Central(w3)
			if !(ok0 && ok1 && ok2 && ok3) {
				z0, z1, z2, z3 = tail4(tab, z0, z1, z2, z3, ok0, ok1, ok2, ok3, w0, w1, w2, w3)
			}
			x0, x1, x2, x3 = phi*x0+s*z0, phi*x1+s*z1, phi*x2+s*z2, phi*x3+s*z3
			b0[d], b1[d], b2[d], b3[d] = mu+x0, mu+x1, mu+x2, mu+x3
			s, mu = sd[d+1], mean[d+1]
			w0, w1, w2, w3 = uint32(u0>>32), uint32(u1>>32), uint32(u2>>32), uint32(u3>>32)
			z0, ok0 = tab.Central(w0)
			z1, ok1 = tab.Central(w1)
			z2, ok2 = tab.Central(w2)
			z3, ok3 = tab.Central(w3)
			if !(ok0 && ok1 && ok2 && ok3) {
				z0, z1, z2, z3 = tail4(tab, z0, z1, z2, z3, ok0, ok1, ok2, ok3, w0, w1, w2, w3)
			}
			x0, x1, x2, x3 = phi*x0+s*z0, phi*x1+s*z1, phi*x2+s*z2, phi*x3+s*z3
			b0[d+1], b1[d+1], b2[d+1], b3[d+1] = mu+x0, mu+x1, mu+x2, mu+x3
		}
		if d < m {
			u0, u1, u2, u3 = r0.Uint64(), r1.Uint64(), r2.Uint64(), r3.Uint64()
			s, mu = sd[d], mean[d]
			w0, w1, w2, w3 = uint32(u0), uint32(u1), uint32(u2), uint32(u3)
			z0, ok0 = tab.Central(w0)
			z1, ok1 = tab.Central(w1)
			z2, ok2 = tab.Central(w2)
			z3, ok3 = tab.Central(w3)
			if !(ok0 && ok1 && ok2 && ok3) {
				z0, z1, z2, z3 = tail4(tab, z0, z1, z2, z3, ok0, ok1, ok2, ok3, w0, w1, w2, w3)
			}
			x0, x1, x2, x3 = phi*x0+s*z0, phi*x1+s*z1, phi*x2+s*z2, phi*x3+s*z3
			b0[d], b1[d], b2[d], b3[d] = mu+x0, mu+x1, mu+x2, mu+x3
		}
		return
	}
	phiS, qEta := pl.phiS, &pl.qEta
	f0, f1, f2, f3 := f[0], f[1], f[2], f[3]
	// Two days per iteration, the low and the high halves of the draws.
	d := 0
	for ; d+1 < m; d += 2 {
		u0, u1, u2, u3 = r0.Uint64(), r1.Uint64(), r2.Uint64(), r3.Uint64()
		s, mu = sd[d], mean[d]
		w0, w1, w2, w3 = uint32(u0), uint32(u1), uint32(u2), uint32(u3)
		z0, ok0 = tab.Central27(w0)
		z1, ok1 = tab.Central27(w1)
		z2, ok2 = tab.Central27(w2)
		z3, ok3 = tab.Central27(w3)
		if !(ok0 && ok1 && ok2 && ok3) {
			z0, z1, z2, z3 = tail4(tab, z0, z1, z2, z3, ok0, ok1, ok2, ok3,
				shockWord(w0, true), shockWord(w1, true), shockWord(w2, true), shockWord(w3, true))
		}
		x0, x1, x2, x3 = phi*x0+s*z0, phi*x1+s*z1, phi*x2+s*z2, phi*x3+s*z3
		f0 = phiS*f0 + qEta[u0&(etaLevels-1)]
		f1 = phiS*f1 + qEta[u1&(etaLevels-1)]
		f2 = phiS*f2 + qEta[u2&(etaLevels-1)]
		f3 = phiS*f3 + qEta[u3&(etaLevels-1)]
		b0[d], b1[d], b2[d], b3[d] = mu+x0+f0, mu+x1+f1, mu+x2+f2, mu+x3+f3
		s, mu = sd[d+1], mean[d+1]
		w0, w1, w2, w3 = uint32(u0>>32), uint32(u1>>32), uint32(u2>>32), uint32(u3>>32)
		z0, ok0 = tab.Central27(w0)
		z1, ok1 = tab.Central27(w1)
		z2, ok2 = tab.Central27(w2)
		z3, ok3 = tab.Central27(w3)
		if !(ok0 && ok1 && ok2 && ok3) {
			z0, z1, z2, z3 = tail4(tab, z0, z1, z2, z3, ok0, ok1, ok2, ok3,
				shockWord(w0, true), shockWord(w1, true), shockWord(w2, true), shockWord(w3, true))
		}
		x0, x1, x2, x3 = phi*x0+s*z0, phi*x1+s*z1, phi*x2+s*z2, phi*x3+s*z3
		f0 = phiS*f0 + qEta[u0>>32&(etaLevels-1)]
		f1 = phiS*f1 + qEta[u1>>32&(etaLevels-1)]
		f2 = phiS*f2 + qEta[u2>>32&(etaLevels-1)]
		f3 = phiS*f3 + qEta[u3>>32&(etaLevels-1)]
		b0[d+1], b1[d+1], b2[d+1], b3[d+1] = mu+x0+f0, mu+x1+f1, mu+x2+f2, mu+x3+f3
	}
	if d < m {
		u0, u1, u2, u3 = r0.Uint64(), r1.Uint64(), r2.Uint64(), r3.Uint64()
		s, mu = sd[d], mean[d]
		w0, w1, w2, w3 = uint32(u0), uint32(u1), uint32(u2), uint32(u3)
		z0, ok0 = tab.Central27(w0)
		z1, ok1 = tab.Central27(w1)
		z2, ok2 = tab.Central27(w2)
		z3, ok3 = tab.Central27(w3)
		if !(ok0 && ok1 && ok2 && ok3) {
			z0, z1, z2, z3 = tail4(tab, z0, z1, z2, z3, ok0, ok1, ok2, ok3,
				shockWord(w0, true), shockWord(w1, true), shockWord(w2, true), shockWord(w3, true))
		}
		x0, x1, x2, x3 = phi*x0+s*z0, phi*x1+s*z1, phi*x2+s*z2, phi*x3+s*z3
		f0 = phiS*f0 + qEta[u0&(etaLevels-1)]
		f1 = phiS*f1 + qEta[u1&(etaLevels-1)]
		f2 = phiS*f2 + qEta[u2&(etaLevels-1)]
		f3 = phiS*f3 + qEta[u3&(etaLevels-1)]
		b0[d], b1[d], b2[d], b3[d] = mu+x0+f0, mu+x1+f1, mu+x2+f2, mu+x3+f3
	}
}

// tail4 replaces the shocks of simulate4 whose words fall outside the
// central table (one in 32) by the tail table's.
func tail4(tab *shocks.Table, z0, z1, z2, z3 float64, ok0, ok1, ok2, ok3 bool, w0, w1, w2, w3 uint32) (float64, float64, float64, float64) {
	if !ok0 {
		z0 = tab.Tail32(w0)
	}
	if !ok1 {
		z1 = tab.Tail32(w1)
	}
	if !ok2 {
		z2 = tab.Tail32(w2)
	}
	if !ok3 {
		z3 = tab.Tail32(w3)
	}
	return z0, z1, z2, z3
}

// path simulates path i of a run with the given seed: temperatures into
// buf, and demand into dbuf when the run has a demand model.
func (pl *plan) path(rng *rand.PCG, seed uint64, i int, buf, dbuf []float64) {
	seedPath(rng, seed, i)
	pl.temps(rng, buf)
	pl.finish(rng, seed, i, buf, dbuf)
}

// temps4 fills bufs with the temperatures of paths i to i+3 (fast1 runs):
// what temps gives each of them alone.
func (pl *plan) temps4(rngs *[4]rand.PCG, bufs *[4][]float64, seed uint64, i int) {
	var x, f [4]float64
	n := 0
	for k := range rngs {
		seedPath(&rngs[k], seed, i+k)
		var xk [maxAR]float64
		n, xk, f[k] = pl.start(&rngs[k], bufs[k])
		x[k] = xk[0]
	}
	pl.simulate4(rngs, bufs, n, x, f)
}

// buffers returns a worker's day buffers for four paths: temperatures and,
// with a demand model, demand.
func (pl *plan) buffers() (bufs, dbufs [4][]float64) {
	for k := range bufs {
		bufs[k] = make([]float64, pl.n)
		if pl.demand != nil {
			dbufs[k] = make([]float64, pl.n)
		}
	}
	return bufs, dbufs
}

// paths simulates paths i to i+k−1 of a run with the given seed (k is 1,
// or 4 for fast1 plans): temperatures into bufs and, with a demand model,
// demand into dbufs. Every path gets what path gives it alone.
func (pl *plan) paths(rngs *[4]rand.PCG, bufs, dbufs *[4][]float64, seed uint64, i, k int) {
	if k == 4 {
		pl.temps4(rngs, bufs, seed, i)
	} else {
		seedPath(&rngs[0], seed, i)
		pl.temps(&rngs[0], bufs[0])
	}
	if len(pl.events) > 0 {
		for j := range k {
			seedPath(&rngs[j], seed^eventSalt, i+j)
			pl.inject(&rngs[j], bufs[j])
		}
	}
	if pl.demand == nil {
		return
	}
	n := 0
	for j := range k {
		seedPath(&rngs[j], seed^demandSalt, i+j)
		n = copy(dbufs[j], pl.obsLoad) // a season under way: its observed loads first
	}
	if k == 4 {
		outs := [4][]float64{dbufs[0][n:pl.n], dbufs[1][n:pl.n], dbufs[2][n:pl.n], dbufs[3][n:pl.n]}
		demandShocks4(pl.normal, rngs, &outs)
	} else {
		demandShocks(pl.normal, &rngs[0], dbufs[0][n:pl.n])
	}
	for j := range k {
		pl.demandLoads(bufs[j], dbufs[j], n)
	}
}

// finish adds what follows a path's temperatures in buf: the scenario's
// events and, when the run has a demand model, the demand into dbuf. Each
// has its own stream, so rng's state on entry does not matter.
func (pl *plan) finish(rng *rand.PCG, seed uint64, i int, buf, dbuf []float64) {
	if len(pl.events) > 0 {
		seedPath(rng, seed^eventSalt, i)
		pl.inject(rng, buf)
	}
	if dbuf != nil {
		seedPath(rng, seed^demandSalt, i)
		pl.demandPath(rng, buf, dbuf)
	}
}

// demandSalt separates the demand noise's random stream from the others.
const demandSalt = 0xde3a2d5a17

// demandPath fills dbuf with one path's daily demand for temperatures buf
// (demandShocks, then demandLoads).
func (pl *plan) demandPath(rng *rand.PCG, buf, dbuf []float64) {
	n := copy(dbuf, pl.obsLoad) // a season under way: its observed loads first
	demandShocks(pl.normal, rng, dbuf[n:len(buf)])
	pl.demandLoads(buf, dbuf, n)
}

// demandShocks fills out with the demand noise's unit shocks from rng; one
// 64-bit draw serves two days, as for the temperatures.
func demandShocks(tab *shocks.Table, rng *rand.PCG, out []float64) {
	var u uint64
	for i := range out {
		if i&1 == 0 {
			u = rng.Uint64()
		} else {
			u >>= 32
		}
		z, ok := tab.Central(uint32(u))
		if !ok {
			z = tab.Tail32(uint32(u))
		}
		out[i] = z
	}
}

// demandShocks4 is demandShocks for four paths at once, so that their
// random streams overlap.
func demandShocks4(tab *shocks.Table, rngs *[4]rand.PCG, outs *[4][]float64) {
	r0, r1, r2, r3 := &rngs[0], &rngs[1], &rngs[2], &rngs[3]
	o0, o1, o2, o3 := outs[0], outs[1], outs[2], outs[3]
	m := len(o0)
	o1, o2, o3 = o1[:m], o2[:m], o3[:m]
	var u0, u1, u2, u3 uint64
	var z0, z1, z2, z3 float64
	var w0, w1, w2, w3 uint32
	var ok0, ok1, ok2, ok3 bool
	i := 0
	for ; i+1 < m; i += 2 {
		u0, u1, u2, u3 = r0.Uint64(), r1.Uint64(), r2.Uint64(), r3.Uint64()
		w0, w1, w2, w3 = uint32(u0), uint32(u1), uint32(u2), uint32(u3)
		z0, ok0 = tab.Central(w0)
		z1, ok1 = tab.Central(w1)
		z2, ok2 = tab.Central(w2)
		z3, ok3 = tab.Central(w3)
		if !(ok0 && ok1 && ok2 && ok3) {
			z0, z1, z2, z3 = tail4(tab, z0, z1, z2, z3, ok0, ok1, ok2, ok3, w0, w1, w2, w3)
		}
		o0[i], o1[i], o2[i], o3[i] = z0, z1, z2, z3
		w0, w1, w2, w3 = uint32(u0>>32), uint32(u1>>32), uint32(u2>>32), uint32(u3>>32)
		z0, ok0 = tab.Central(w0)
		z1, ok1 = tab.Central(w1)
		z2, ok2 = tab.Central(w2)
		z3, ok3 = tab.Central(w3)
		if !(ok0 && ok1 && ok2 && ok3) {
			z0, z1, z2, z3 = tail4(tab, z0, z1, z2, z3, ok0, ok1, ok2, ok3, w0, w1, w2, w3)
		}
		o0[i+1], o1[i+1], o2[i+1], o3[i+1] = z0, z1, z2, z3
	}
	if i < m {
		u0, u1, u2, u3 = r0.Uint64(), r1.Uint64(), r2.Uint64(), r3.Uint64()
		w0, w1, w2, w3 = uint32(u0), uint32(u1), uint32(u2), uint32(u3)
		z0, ok0 = tab.Central(w0)
		z1, ok1 = tab.Central(w1)
		z2, ok2 = tab.Central(w2)
		z3, ok3 = tab.Central(w3)
		if !(ok0 && ok1 && ok2 && ok3) {
			z0, z1, z2, z3 = tail4(tab, z0, z1, z2, z3, ok0, ok1, ok2, ok3, w0, w1, w2, w3)
		}
		o0[i], o1[i], o2[i], o3[i] = z0, z1, z2, z3
	}
}

// demandLoads turns the unit shocks in dbuf[n:] into loads: the expected
// load plus AR(1) noise of the day's scale σ, times the growth factor. The
// recursion u(t) = φ·u(t−1) + σ(t)·z(t) is stepped as u(t) = φ²·u(t−2) +
// φ·e(t−1) + e(t), two interleaved chains, so that each waits on a
// multiply-add only every other day.
func (pl *plan) demandLoads(buf, dbuf []float64, n int) {
	if n == len(buf) {
		return
	}
	temps, out := buf[n:], dbuf[n:len(buf)]
	out = out[:len(temps)]
	ex := pl.expectation(n, len(buf))
	phi, scale := pl.demand.Noise.Phi, pl.growth
	phi2 := phi * phi
	base := ex.base[:len(temps)]
	hbp, cbp, hs, cs := ex.heatBP, ex.coolBP, ex.heatSlope2, ex.coolSlope2
	// The day's innovation e = σ·z with σ by the noise's scale; one loop
	// for each scale, every constant in a register. The first day takes
	// one ordinary step from u0.
	prev, u1, e1 := pl.u0, pl.u0, 0.0 // u(t−2), u(t−1) and e(t−1)
	switch pl.noiseKind {
	case noiseConstant:
		sigma := pl.demand.Noise.Sigma
		for i, t := range temps {
			e := out[i] * sigma
			v := phi2*prev + (phi*e1 + e)
			if i == 0 {
				v = phi*u1 + e
			}
			a, b := hbp-t, t-cbp // expectation.at
			out[i] = scale * (base[i] + hs*(a+math.Abs(a)) + cs*(b+math.Abs(b)) + v)
			prev, u1, e1 = u1, v, e
		}
	case noiseLoad:
		k := pl.loadSigma
		for i, t := range temps {
			a, b := hbp-t, t-cbp
			x := base[i] + hs*(a+math.Abs(a)) + cs*(b+math.Abs(b))
			e := out[i] * (k * max(x, 0))
			v := phi2*prev + (phi*e1 + e)
			if i == 0 {
				v = phi*u1 + e
			}
			out[i] = scale * (x + v)
			prev, u1, e1 = u1, v, e
		}
	default:
		edges, sig := pl.bandEdges, pl.bandSigma
		var s4 [4]float64
		three := len(edges) == 3 // the quartile bands calibrate fits
		if three {
			s4 = [4]float64(sig)
		}
		for i, t := range temps {
			var sg float64
			if three {
				// Each comparison as a 0 or 1 (a set-on-condition, not a
				// branch: which band a day falls in is a coin toss).
				k0, k1, k2 := 0, 0, 0
				if t >= edges[0] {
					k0 = 1
				}
				if t >= edges[1] {
					k1 = 1
				}
				if t >= edges[2] {
					k2 = 1
				}
				sg = s4[(k0+k1+k2)&3]
			} else {
				k := 0
				for _, edge := range edges {
					c := 0
					if t >= edge {
						c = 1
					}
					k += c
				}
				sg = sig[k]
			}
			e := out[i] * sg
			v := phi2*prev + (phi*e1 + e)
			if i == 0 {
				v = phi*u1 + e
			}
			a, b := hbp-t, t-cbp
			out[i] = scale * (base[i] + hs*(a+math.Abs(a)) + cs*(b+math.Abs(b)) + v)
			prev, u1, e1 = u1, v, e
		}
	}
}

// expectation holds the demand model's expected load (model.Demand.
// Expected) for days lo to hi of the plan: the days' calendar terms and the
// change points, with the slopes halved (zero for an absent side) for the
// branch-free form — a shoulder-season day is a coin toss to a branch
// predictor.
type expectation struct {
	base                   []float64
	heatBP, coolBP         float64
	heatSlope2, coolSlope2 float64
}

func (pl *plan) expectation(lo, hi int) expectation {
	return expectation{pl.dayBase[lo:hi], pl.heatBP, pl.coolBP, pl.heatSlope2, pl.coolSlope2}
}

// at is the expected load on the i-th day of the range at temperature t.
func (x expectation) at(i int, t float64) float64 {
	a, b := x.heatBP-t, t-x.coolBP
	return x.base[i] + x.heatSlope2*(a+math.Abs(a)) + x.coolSlope2*(b+math.Abs(b))
}

// accumulateDemand adds one path's demand statistics to its segments.
func (pl *plan) accumulateDemand(dbuf []float64, segs []segStats) {
	capacity := pl.capacity
	for s, sg := range pl.segs {
		st := &segs[s]
		st.energy, st.peak, st.peakAt, st.over = demandStats(dbuf[sg.lo:sg.hi], capacity)
		st.peakAt += sg.lo
	}
}

// demandStats returns the total of days, the highest day and its index, and
// the number of days above capacity. Its own function keeps the loop's
// values in registers; two sums halve the add-latency chain.
func demandStats(days []float64, capacity float64) (energy, peak float64, at, over int) {
	var s0, s1 float64
	// The peak as an ordered integer (orderedBits), so that keeping the
	// highest day and its index compiles to conditional moves: a new peak
	// is rare but unpredictable.
	pk := orderedBits(int64(math.Float64bits(math.Inf(-1))))
	i := 0
	for ; i+1 < len(days); i += 2 {
		v, w := days[i], days[i+1]
		s0 += v
		s1 += w
		kv, kw := orderedBits(int64(math.Float64bits(v))), orderedBits(int64(math.Float64bits(w)))
		if kv > pk {
			pk = kv
			at = i
		}
		if kw > pk {
			pk = kw
			at = i + 1
		}
		c := 0
		if v > capacity {
			c = 1
		}
		if w > capacity {
			c++
		}
		over += c
	}
	if i < len(days) {
		v := days[i]
		s0 += v
		if k := orderedBits(int64(math.Float64bits(v))); k > pk {
			pk, at = k, i
		}
		if v > capacity {
			over++
		}
	}
	return s0 + s1, math.Float64frombits(uint64(orderedBits(pk))), at, over
}

// eventSalt separates the events' random stream from the temperature
// shocks', so a scenario with events shares the baseline's shocks (common
// random numbers).
const eventSalt = 0x5ce7a510e7e47

// inject adds the scenario's events to one path's temperatures.
func (pl *plan) inject(rng *rand.PCG, buf []float64) {
	for _, e := range pl.events {
		occur := rng.Uint64()
		pick := rng.Uint64()
		if !e.always && occur >= e.threshold {
			continue
		}
		off, _ := bits.Mul64(pick, uint64(e.hi-e.lo+1))
		start := e.lo + int(off)
		for d := max(start, len(pl.obs)); d < min(start+e.days, len(buf)); d++ { // observed days stay as they were
			buf[d] += e.delta
		}
	}
}

// accumulate reduces one path's temperatures to its segment statistics.
// This loop runs for every day of every path, so it is written for the
// machine: two passes with few live values each (no register spills), the
// degree days as max(x, 0) = (x + |x|)/2 (no branch, no NaN handling), the
// cold-run counter branch-free.
func (pl *plan) accumulate(buf []float64, segs []segStats) {
	b := pl.bases
	for s, sg := range pl.segs {
		days := buf[sg.lo:sg.hi]
		var st segStats
		if b.HDD == b.CDD {
			st = sameBaseStats(days, b.HDD, b.ColdBelow)
		} else {
			st = segmentStats(days, b.HDD, b.CDD, b.ColdBelow)
		}
		st.length = len(days)
		segs[s] = st
	}
}

// orderedBits maps a float64 to an int64 of the same order (negative
// floats have their magnitude bits flipped), so that the lowest and
// highest day are integer min and max, which compile to conditional
// moves: a new record is rare but unpredictable, and a mispredicted branch
// costs more than the moves. It is its own inverse.
func orderedBits(x int64) int64 { return x ^ int64(uint64(x>>63)>>1) }

// sameBaseStats returns the statistics of a segment's days when the HDD
// and CDD bases are equal (the usual case): with a = base − t, the day's
// HDD is (a + |a|)/2 and its CDD (|a| − a)/2, one absolute value for both
// and exact zeros on the days without. Each day's values stay in
// registers, and a cold day and a new record are coin tosses to a branch
// predictor, so the loop has no branch but its own.
func sameBaseStats(days []float64, base, cold float64) segStats {
	var h, c float64 // twice the degree days
	lo, hi := orderedBits(int64(math.Float64bits(math.Inf(1)))), orderedBits(int64(math.Float64bits(math.Inf(-1))))
	var count, best, prefix, run int
	alive := -1 // all ones while every day so far was cold
	for _, t := range days {
		a := base - t
		m := math.Abs(a)
		h += a + m
		c += m - a
		k := orderedBits(int64(math.Float64bits(t)))
		lo, hi = min(lo, k), max(hi, k)
		d := 0
		if t < cold {
			d = 1
		}
		run = (run + 1) & -d
		best = max(best, run)
		count += d
		alive &= -d
		prefix -= alive
	}
	return segStats{hdd: h / 2, cdd: c / 2, lo: math.Float64frombits(uint64(orderedBits(lo))),
		hi: math.Float64frombits(uint64(orderedBits(hi))), cold: count, best: best, prefix: prefix, suffix: run}
}

// segmentStats is sameBaseStats for different HDD and CDD bases.
func segmentStats(days []float64, hb, cb, cold float64) segStats {
	var h, c float64
	lo, hi := orderedBits(int64(math.Float64bits(math.Inf(1)))), orderedBits(int64(math.Float64bits(math.Inf(-1))))
	var count, best, prefix, run int
	alive := -1
	for _, t := range days {
		a, b := hb-t, t-cb
		h += a + math.Abs(a)
		c += b + math.Abs(b)
		k := orderedBits(int64(math.Float64bits(t)))
		lo, hi = min(lo, k), max(hi, k)
		d := 0
		if t < cold {
			d = 1
		}
		run = (run + 1) & -d
		best = max(best, run)
		count += d
		alive &= -d
		prefix -= alive
	}
	return segStats{hdd: h / 2, cdd: c / 2, lo: math.Float64frombits(uint64(orderedBits(lo))),
		hi: math.Float64frombits(uint64(orderedBits(hi))), cold: count, best: best, prefix: prefix, suffix: run}
}

// collect merges a path's segments into its period aggregates, written at
// position i of each output column.
func (pl *plan) collect(segs []segStats, out [][]float64, i int) {
	nx := len(pl.indices)
	for k, span := range pl.pspan {
		hdd, cdd := 0.0, 0.0
		lo, hi := math.Inf(1), math.Inf(-1)
		cold, best, run := 0, 0, 0
		energy, peak, peakAt, over := 0.0, math.Inf(-1), 0, 0
		for _, st := range segs[span[0]:span[1]] {
			hdd += st.hdd
			cdd += st.cdd
			lo, hi = min(lo, st.lo), max(hi, st.hi)
			cold += st.cold
			energy += st.energy
			over += st.over
			if st.peak > peak {
				peak, peakAt = st.peak, st.peakAt
			}
			if st.prefix == st.length { // all cold: the run goes on
				run += st.length
				best = max(best, run)
				continue
			}
			best = max(best, run+st.prefix, st.best)
			run = st.suffix
		}
		best = max(best, run)
		o := out[k*nx:]
		o[HDD][i], o[CDD][i] = hdd, cdd
		o[Coldest][i], o[Hottest][i] = lo, hi
		o[ColdDays][i], o[ColdSpell][i] = float64(cold), float64(best)
		if pl.demand != nil {
			o[Energy][i], o[PeakDemand][i] = energy, peak
			o[PeakDay][i] = float64(peakAt - pl.segs[span[0]].lo + 1)
			if !math.IsInf(pl.capacity, 1) {
				o[OverCapacity][i] = float64(over)
			}
		}
	}
}

// snaps writes path i's cold-snap indices: for each period the lowest mean
// of snapDays consecutive days (windows inside the period) and, with
// demand, the highest demand over snapDays consecutive days.
func (pl *plan) snaps(buf, dbuf []float64, out [][]float64, i int) {
	nx, k := len(pl.indices), pl.snapDays
	for p, r := range pl.periodDays {
		lo, hi := r[0], r[1]
		cold, energy := math.Inf(1), math.Inf(-1)
		if hi-lo >= k {
			t, e := 0.0, 0.0
			for d := lo; d < lo+k; d++ {
				t += buf[d]
				if dbuf != nil {
					e += dbuf[d]
				}
			}
			cold, energy = t, e
			for d := lo + k; d < hi; d++ {
				t += buf[d] - buf[d-k]
				cold = min(cold, t)
				if dbuf != nil {
					e += dbuf[d] - dbuf[d-k]
					energy = max(energy, e)
				}
			}
			cold /= float64(k)
		}
		out[p*nx+pl.snapPos][i] = cold
		if dbuf != nil {
			out[p*nx+pl.snapPos+1][i] = energy
		}
	}
}

// top writes path i's topDays highest daily demands of each period into
// top, highest first.
func (pl *plan) top(dbuf []float64, top [][]float32, i int) {
	k := pl.topDays
	for p, r := range pl.periodDays {
		dst := top[p][i*k : (i+1)*k]
		for j := range dst {
			dst[j] = float32(math.Inf(-1))
		}
		for _, v := range dbuf[r[0]:r[1]] {
			x := float32(v)
			if x <= dst[k-1] {
				continue
			}
			j := k - 1
			for j > 0 && dst[j-1] < x {
				dst[j] = dst[j-1]
				j--
			}
			dst[j] = x
		}
	}
}
