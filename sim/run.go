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
			var rng rand.PCG
			segs := make([]segStats, len(pl.segs))
			buf := make([]float64, pl.n)
			var dbuf []float64
			if pl.demand != nil {
				dbuf = make([]float64, pl.n)
			}
			for i := lo; i < hi; i++ {
				pl.path(&rng, cfg.Seed, i, buf, dbuf)
				pl.accumulate(buf, segs)
				if dbuf != nil {
					pl.accumulateDemand(dbuf, segs)
				}
				pl.collect(segs, out, i)
				if pl.snapDays > 0 {
					pl.snaps(buf, dbuf, out, i)
				}
				if pl.topDays > 0 {
					pl.top(dbuf, res.Top, i)
				}
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
// plus the seasonal mean. AR(1) with tabulated shocks, the common case, has
// its own loops. The slow part's start is one draw from rng before the
// days; the models without one draw nothing extra, so their streams are as
// they were.
func (pl *plan) temps(rng *rand.PCG, buf []float64) {
	if n := len(pl.obs); n > 0 {
		// A season under way: its observed days, then the simulation from
		// the data end.
		copy(buf, pl.obs)
		pl.simulate(rng, buf[n:], n)
		return
	}
	pl.simulate(rng, buf, 0)
}

// simulate fills buf with the simulated days from day off of the plan on.
func (pl *plan) simulate(rng *rand.PCG, buf []float64, off int) {
	mean, sd := pl.mean[off:off+len(buf)], pl.sd[off:off+len(buf)]
	x0 := pl.x0
	f := 0.0
	if pl.slow {
		f = pl.f0Mean + pl.f0SD*pl.startNormal.Draw(rng.Uint64())
		if pl.conditional {
			for i := range pl.p {
				x0[i] -= f
			}
		}
	}
	if pl.table != nil && pl.p == 1 {
		tab, phi, x := pl.table, pl.phi[0], x0[0]
		if !pl.slow {
			for d := range buf {
				x = phi*x + sd[d]*tab.Draw(rng.Uint64())
				buf[d] = mean[d] + x
			}
			return
		}
		eta, phiS, q := pl.eta, pl.phiS, pl.slowQ
		for d := range buf {
			u := rng.Uint64()
			x = phi*x + sd[d]*tab.Draw(u)
			f = phiS*f + q*eta[u&(etaLevels-1)]
			buf[d] = mean[d] + x + f
		}
		return
	}
	p1, p2, p3, p4, p5 := pl.phi[0], pl.phi[1], pl.phi[2], pl.phi[3], pl.phi[4]
	x1, x2, x3, x4, x5 := x0[0], x0[1], x0[2], x0[3], x0[4]
	phiS, q := pl.phiS, pl.slowQ // zero without a slow part: f stays 0
	var eta *[etaLevels]float64
	if pl.slow {
		eta = pl.eta
	} else {
		eta = &zeroEta
	}
	for d := range buf {
		u := rng.Uint64()
		var z float64
		if pl.table != nil {
			z = pl.table.Draw(u)
		} else {
			// The bootstrap index takes the top bits (a 64×64 high product),
			// so the low bits stay free for η.
			hi, _ := bits.Mul64(u, pl.poolLen[off+d])
			z = pl.pool[pl.poolOff[off+d]+int32(hi)]
		}
		x := p1*x1 + p2*x2 + p3*x3 + p4*x4 + p5*x5 + sd[d]*z
		x5, x4, x3, x2, x1 = x4, x3, x2, x1, x
		f = phiS*f + q*eta[u&(etaLevels-1)]
		buf[d] = mean[d] + x + f
	}
}

// zeroEta stands in for the η grid without a slow part.
var zeroEta [etaLevels]float64

// path simulates path i of a run with the given seed: temperatures into
// buf, and demand into dbuf when the run has a demand model.
func (pl *plan) path(rng *rand.PCG, seed uint64, i int, buf, dbuf []float64) {
	seedPath(rng, seed, i)
	pl.temps(rng, buf)
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

// demandPath fills dbuf with one path's daily demand for temperatures buf.
func (pl *plan) demandPath(rng *rand.PCG, buf, dbuf []float64) {
	d := pl.demand
	phi, sigma, tab := d.Noise.Phi, d.Noise.Sigma, pl.normal
	u := pl.u0
	wd, hol := pl.weekday[:len(buf)], pl.holiday[:len(buf)]
	n := copy(dbuf, pl.obsLoad) // a season under way: its observed loads first
	scale := pl.growth
	if d.Noise.Scale == "" || d.Noise.Scale == "constant" {
		for i := n; i < len(buf); i++ {
			u = phi*u + sigma*tab.Draw(rng.Uint64())
			dbuf[i] = scale * (d.Expected(buf[i], wd[i], hol[i]) + u)
		}
		return
	}
	// Noise whose scale follows the day (its expected load or temperature).
	for i := n; i < len(buf); i++ {
		e := d.Expected(buf[i], wd[i], hol[i])
		u = phi*u + d.Noise.NoiseSigma(e, buf[i])*tab.Draw(rng.Uint64())
		dbuf[i] = scale * (e + u)
	}
}

// accumulateDemand adds one path's demand statistics to its segments.
func (pl *plan) accumulateDemand(dbuf []float64, segs []segStats) {
	capacity := pl.capacity
	for s, sg := range pl.segs {
		st := &segs[s]
		sum, peak, at, over := 0.0, math.Inf(-1), sg.lo, 0
		for i, v := range dbuf[sg.lo:sg.hi] {
			sum += v
			if v > peak {
				peak, at = v, sg.lo+i
			}
			if v > capacity {
				over++
			}
		}
		st.energy, st.peak, st.peakAt, st.over = sum, peak, at, over
	}
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
	hb, cb, cold := pl.bases.HDD, pl.bases.CDD, pl.bases.ColdBelow
	for s, sg := range pl.segs {
		days := buf[sg.lo:sg.hi]
		// Two interleaved sums per index halve the add-latency chain.
		var h0, h1, c0, c1 float64 // twice the degree days, even and odd days
		lo, hi := math.Inf(1), math.Inf(-1)
		i := 0
		for ; i+1 < len(days); i += 2 {
			t, u := days[i], days[i+1]
			a, b := hb-t, hb-u
			h0 += a + math.Abs(a)
			h1 += b + math.Abs(b)
			a, b = t-cb, u-cb
			c0 += a + math.Abs(a)
			c1 += b + math.Abs(b)
			lo, hi = min3(lo, t, u), max3(hi, t, u)
		}
		if i < len(days) {
			t := days[i]
			a, b := hb-t, t-cb
			h0 += a + math.Abs(a)
			c0 += b + math.Abs(b)
			lo, hi = min3(lo, t, t), max3(hi, t, t)
		}
		hdd2, cdd2 := h0+h1, c0+c1
		var count, best, prefix, run int
		alive := -1 // all ones while every day so far was cold
		for _, t := range days {
			c := 0
			if t < cold {
				c = 1
			}
			run = (run + 1) & -c
			best = max(best, run)
			count += c
			alive &= -c
			prefix -= alive
		}
		segs[s] = segStats{hdd: hdd2 / 2, cdd: cdd2 / 2, lo: lo, hi: hi, cold: count, best: best, prefix: prefix,
			suffix: run, length: len(days)}
	}
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

// min3 and max3 compare plainly (the simulated values are never NaN), which
// compiles to branches the predictor gets right almost always.
func min3(a, b, c float64) float64 {
	if b < a {
		a = b
	}
	if c < a {
		a = c
	}
	return a
}

func max3(a, b, c float64) float64 {
	if b > a {
		a = b
	}
	if c > a {
		a = c
	}
	return a
}
