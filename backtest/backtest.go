// Package backtest checks the whole temperature pipeline out of sample, by
// rolling origin: for each of the last complete periods of a record it fits
// the model to the data that end the day before the period starts, simulates
// the period from the state at that day (a conditional start), and places the
// realised index value in the simulated distribution (its PIT). The PITs,
// interval coverage and CRPS against the climatology of the earlier seasons
// are summarised by package evidence (Gneiting & Raftery 2007, JASA 102).
//
// Origins run in parallel; results do not depend on the worker count.
// Nothing here prints.
package backtest

import (
	"context"
	"errors"
	"fmt"
	"math"
	"runtime"
	"slices"
	"sync"

	"golang.org/x/sync/errgroup"
	"gonum.org/v1/gonum/stat"

	"wxstress/calendar"
	"wxstress/calibrate"
	"wxstress/evidence"
	"wxstress/model"
	"wxstress/sim"
	"wxstress/stress"
)

// Defaults.
const (
	DefaultOrigins = 30
	DefaultPaths   = 20000
	// MinTrainYears is the shortest record an origin's fit may use.
	MinTrainYears = 5
	// MaxMissing is the largest share of missing days a realised period may
	// have; its missing days are filled with the origin model's mean.
	MaxMissing = 0.1
)

// DefaultPeriods are the periods backtested when none is named.
func DefaultPeriods() []string { return []string{"year", "heating"} }

// Options configure a backtest. Zero values take the defaults.
type Options struct {
	Origins int      // the last N complete periods of each name
	Periods []string // period names (sim.ParsePeriod)
	Paths   int      // simulated years per origin
	Seed    uint64
	Bases   sim.Bases // zero: the units' defaults
	Fit     *calibrate.Settings
	Workers int // origins fitted at once; 0 = GOMAXPROCS
	// Demand and Loads, when both set, add the season's demand energy and
	// peak-day demand: each origin simulates demand with the demand model
	// (fitted once, on its own record), holidays from the load record, and
	// the realised values are the loads of the period (origins whose period
	// the load record does not cover are left out of the demand rows).
	Demand *model.Demand
	Loads  *calibrate.DemandSeries
	// Refit fits one origin's record; nil means: the structure chosen by
	// calibrate.Fit with Fit on the record before the earliest origin, then
	// a lean refit of that structure for every origin.
	Refit func(*calibrate.Series, *calibrate.Settings) (*model.File, error)
}

// Origin is one held-out period.
type Origin struct {
	Year          int     // the year the period ends in
	Realized      float64 // the index over the period in the record
	Missing       int     // days of the period without a value
	PIT           float64
	P05, P50, P95 float64 // of the simulated distribution
}

// Row is one index of one period over all its origins.
type Row struct {
	Index    sim.Index
	Period   string
	Origins  []Origin // oldest first
	Evidence *evidence.Backtest
}

// Result is a backtest.
type Result struct {
	Options Options // as run, defaults filled in
	Rows    []Row
}

// ErrShort is returned when the record holds no origin.
var ErrShort = errors.New("backtest: record too short")

// tempIndices and demandIndices are backtested for each period.
var (
	tempIndices   = []sim.Index{sim.HDD, sim.CDD}
	demandIndices = []sim.Index{sim.Energy, sim.PeakDemand}
)

// Run backtests the record s.
func Run(ctx context.Context, s *calibrate.Series, opt Options) (*Result, error) {
	if opt.Origins <= 0 {
		opt.Origins = DefaultOrigins
	}
	if len(opt.Periods) == 0 {
		opt.Periods = DefaultPeriods()
	}
	if opt.Paths <= 0 {
		opt.Paths = DefaultPaths
	}
	if opt.Bases == (sim.Bases{}) {
		opt.Bases = sim.BasesFor(s.Units)
	}
	var jobs []job
	for _, name := range opt.Periods {
		n := 0
		for y := s.End().Year(); y >= s.Start.Year() && n < opt.Origins; y-- {
			p, err := sim.ParsePeriod(name, y)
			if err != nil {
				return nil, err
			}
			if p.To > s.End() {
				continue
			}
			if float64(p.From-s.Start) < MinTrainYears*calendar.DaysPerYear {
				break
			}
			jobs = append(jobs, job{name, p})
			n++
		}
	}
	if len(jobs) == 0 {
		return nil, fmt.Errorf("%w: %s to %s has no complete period after %d years of record", ErrShort, s.Start, s.End(), MinTrainYears)
	}
	if opt.Refit == nil {
		var err error
		if opt.Refit, err = leanRefit(s, jobs[0].p.From, jobs, opt.Fit); err != nil {
			return nil, err
		}
	}

	// One fit per cut date: periods that start on the same day share it.
	var mu sync.Mutex
	fits := map[calendar.Date]*fitOnce{}
	fitFor := func(cut calendar.Date) *fitOnce {
		mu.Lock()
		defer mu.Unlock()
		f := fits[cut]
		if f == nil {
			f = &fitOnce{}
			fits[cut] = f
		}
		return f
	}

	indices := tempIndices
	withDemand := opt.Demand != nil && opt.Loads != nil
	var loads map[calendar.Date]float64
	var holidays []calendar.Date
	if withDemand {
		indices = append(slices.Clone(tempIndices), demandIndices...)
		loads = map[calendar.Date]float64{}
		for i, d := range opt.Loads.Dates {
			if !math.IsNaN(opt.Loads.Load[i]) {
				loads[d] = opt.Loads.Load[i]
			}
			if opt.Loads.Holiday[i] {
				holidays = append(holidays, d)
			}
		}
	}
	type outcome struct {
		origin   []Origin    // by indices
		sample   [][]float64 // the simulated values, by indices
		skipped  bool
		noDemand bool // the load record does not cover the period
	}
	out := make([]outcome, len(jobs))
	g, gctx := errgroup.WithContext(ctx)
	if opt.Workers > 0 {
		g.SetLimit(opt.Workers)
	} else {
		g.SetLimit(runtime.GOMAXPROCS(0))
	}
	for i, j := range jobs {
		g.Go(func() error {
			if err := gctx.Err(); err != nil {
				return err
			}
			train := truncate(s, j.p.From)
			f := fitFor(j.p.From)
			m, err := f.do(func() (*model.File, error) { return opt.Refit(train, opt.Fit) })
			if err != nil {
				return fmt.Errorf("backtest: fit on the record to %s: %w", j.p.From-1, err)
			}
			days, missing := realized(s, m, j.p)
			if float64(missing) > MaxMissing*float64(len(days)) {
				out[i].skipped = true
				return nil
			}
			cfg := sim.Config{Paths: opt.Paths, Seed: opt.Seed, Workers: 1, Year: j.p.To.Year(), Start: sim.StartConditional,
				Periods: []string{j.period}, Bases: opt.Bases}
			energy, peak, covered := 0.0, math.Inf(-1), withDemand
			for d := j.p.From; covered && d <= j.p.To; d++ {
				v, ok := loads[d]
				energy, peak, covered = energy+v, max(peak, v), ok
			}
			out[i].noDemand = !covered
			job := &stress.Job{Model: m, Config: cfg}
			if covered {
				job.Demand = opt.Demand
				job.Holidays = &calibrate.Holidays{Dates: holidays}
			}
			run, err := stress.Run(gctx, job)
			if err != nil {
				return fmt.Errorf("backtest: %s %d: %w", j.period, j.p.To.Year(), err)
			}
			res := run.Set.Base
			vals := sim.TempIndices(days, opt.Bases)
			out[i].origin = make([]Origin, len(indices))
			out[i].sample = make([][]float64, len(indices))
			for k, x := range indices {
				var v float64
				switch {
				case x == sim.Energy && covered:
					v = energy
				case x == sim.PeakDemand && covered:
					v = peak
				case x >= sim.Energy:
					continue // not covered by the load record
				default:
					v = vals[x]
				}
				sample := aggregate(res, x)
				sorted := slices.Clone(sample)
				slices.Sort(sorted)
				q := func(p float64) float64 { return stat.Quantile(p, stat.LinInterp, sorted, nil) }
				out[i].origin[k] = Origin{Year: j.p.To.Year(), Realized: v, Missing: missing,
					PIT: evidence.PIT(sample, v), P05: q(0.05), P50: q(0.5), P95: q(0.95)}
				out[i].sample[k] = sample
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

	r := &Result{Options: opt}
	for _, name := range opt.Periods {
		clim, err := seasons(s, name, opt.Bases)
		if err != nil {
			return nil, err
		}
		if withDemand {
			clim.addDemand(opt.Loads, name)
		}
		for k, x := range indices {
			row := Row{Index: x, Period: name}
			var cases []evidence.Case
			allZero := true
			for i, j := range jobs {
				if j.period != name || out[i].skipped || x >= sim.Energy && out[i].noDemand {
					continue
				}
				o := out[i].origin[k]
				row.Origins = append(row.Origins, o)
				cases = append(cases, evidence.Case{Sample: out[i].sample[k], Observed: o.Realized,
					Reference: clim.before(o.Year, x)})
				allZero = allZero && o.Realized == 0
			}
			if len(row.Origins) < 3 || allZero {
				continue // too few origins, or an index that does not occur in the period
			}
			// Oldest first, the cases in the same order.
			order := make([]int, len(row.Origins))
			for i := range order {
				order[i] = i
			}
			slices.SortFunc(order, func(a, b int) int { return row.Origins[a].Year - row.Origins[b].Year })
			origins, sorted := make([]Origin, len(order)), make([]evidence.Case, len(order))
			for i, o := range order {
				origins[i], sorted[i] = row.Origins[o], cases[o]
			}
			row.Origins = origins
			if row.Evidence, err = evidence.Evaluate(sorted); err != nil {
				return nil, fmt.Errorf("backtest: %s %s: %w", name, x.Info().Key, err)
			}
			r.Rows = append(r.Rows, row)
		}
	}
	if len(r.Rows) == 0 {
		return nil, fmt.Errorf("%w: no period has 3 complete seasons to test before the record's end, each with the "+
			"years of data before it that a fit needs: give a longer record", ErrTooShort)
	}
	return r, nil
}

// ErrTooShort is wrapped by the error for a record with too few seasons to
// backtest.
var ErrTooShort = errors.New("backtest: record too short")

// climate holds a period's index values in every complete season of the
// record without missing days, by the year the season ends in.
type climate struct {
	years  []int
	values [][]float64 // by season, indexed by sim.Index
}

func seasons(s *calibrate.Series, name string, b sim.Bases) (*climate, error) {
	c := &climate{}
	for y := s.Start.Year(); y <= s.End().Year(); y++ {
		p, err := sim.ParsePeriod(name, y)
		if err != nil {
			return nil, err
		}
		if p.From < s.Start || p.To > s.End() {
			continue
		}
		days := s.Temps[int(p.From-s.Start) : int(p.To-s.Start)+1]
		if slices.ContainsFunc(days, math.IsNaN) {
			continue
		}
		c.years = append(c.years, y)
		c.values = append(c.values, sim.TempIndices(days, b))
	}
	return c, nil
}

// addDemand adds the periods' demand energy and peak-day demand from the
// load record, for the seasons it covers completely; seasons it does not
// cover keep NaN there (and drop out of the climatology of those indices).
func (c *climate) addDemand(l *calibrate.DemandSeries, name string) {
	byDate := map[calendar.Date]float64{}
	for i, d := range l.Dates {
		if !math.IsNaN(l.Load[i]) {
			byDate[d] = l.Load[i]
		}
	}
	for i, y := range c.years {
		p, _ := sim.ParsePeriod(name, y)
		energy, peak, ok := 0.0, math.Inf(-1), true
		for d := p.From; ok && d <= p.To; d++ {
			var v float64
			v, ok = byDate[d]
			energy, peak = energy+v, max(peak, v)
		}
		for len(c.values[i]) <= int(sim.PeakDemand) {
			c.values[i] = append(c.values[i], math.NaN())
		}
		if ok {
			c.values[i][sim.Energy], c.values[i][sim.PeakDemand] = energy, peak
		}
	}
}

// before returns index x in the seasons that ended before year: the
// climatological forecast for that origin; nil when fewer than two.
func (c *climate) before(year int, x sim.Index) []float64 {
	var v []float64
	for i, y := range c.years {
		if y < year && int(x) < len(c.values[i]) && !math.IsNaN(c.values[i][x]) {
			v = append(v, c.values[i][x])
		}
	}
	if len(v) < 2 {
		return nil
	}
	return v
}

type job struct {
	period string
	p      sim.Period
}

// leanRefit chooses the model's structure (harmonics, AR order, slow part,
// shock family) with the full automatic fit on the record before the
// earliest origin, so that no origin's choices see its own period, and
// returns a refit of that structure by the lean path, started from that
// fit.
func leanRefit(s *calibrate.Series, _ calendar.Date, jobs []job, set *calibrate.Settings) (func(*calibrate.Series, *calibrate.Settings) (*model.File, error), error) {
	first := jobs[0].p.From
	for _, j := range jobs {
		first = min(first, j.p.From)
	}
	base, err := calibrate.Fit(truncate(s, first), set)
	if err != nil {
		return nil, fmt.Errorf("backtest: fit on the record to %s: %w", first-1, err)
	}
	m := base.Model
	lean := calibrate.Settings{Harmonics: len(m.Seasonal.Harmonics), AROrder: len(m.AR.Phi), Slow: calibrate.SlowNone,
		Trend: m.Trend.Kind, Shocks: m.Shocks.Family, Lean: true, Start: m}
	if m.Slow != nil {
		lean.Slow = calibrate.SlowOn
	}
	if lean.Shocks == model.FamilyBootstrap {
		lean.Shocks = m.Diagnostics.KSFamily // the best parametric family
	}
	return func(tr *calibrate.Series, _ *calibrate.Settings) (*model.File, error) {
		r, err := calibrate.Fit(tr, &lean)
		if err != nil {
			return nil, err
		}
		return r.Model, nil
	}, nil
}

// fitOnce fits one cut date once, whichever origin asks first.
type fitOnce struct {
	once sync.Once
	m    *model.File
	err  error
}

func (f *fitOnce) do(fit func() (*model.File, error)) (*model.File, error) {
	f.once.Do(func() { f.m, f.err = fit() })
	return f.m, f.err
}

// truncate returns the record up to the day before cut, without trailing
// missing days.
func truncate(s *calibrate.Series, cut calendar.Date) *calibrate.Series {
	n := int(cut - s.Start)
	for n > 0 && math.IsNaN(s.Temps[n-1]) {
		n--
	}
	t := *s
	t.Temps = s.Temps[:n:n]
	return &t
}

// realized returns the record's days of p, missing ones filled with m's
// mean for the date, and the number filled.
func realized(s *calibrate.Series, m *model.File, p sim.Period) ([]float64, int) {
	return s.Span(p.From, p.To, func(d calendar.Date) float64 { return m.Mean(d.ModelTime()) })
}

func aggregate(r *sim.Result, x sim.Index) []float64 {
	for _, a := range r.Aggregates {
		if a.Index == x {
			return a.Values
		}
	}
	panic("backtest: no aggregate for " + x.Info().Key)
}
