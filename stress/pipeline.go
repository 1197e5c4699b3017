package stress

import (
	"context"
	"errors"
	"fmt"
	"math"
	"path/filepath"
	"slices"
	"strconv"
	"strings"

	"wxstress/calendar"
	"wxstress/calibrate"
	"wxstress/hedge"
	"wxstress/internal/numfmt"
	"wxstress/model"
	"wxstress/scenarios"
	"wxstress/sim"
)

// Job is one stress test from its inputs: a temperature record to fit or a
// fitted model, optionally a demand history to fit or a fitted demand
// model, the scenarios, and the simulation's configuration. The one
// pipeline every command and report test runs:
//
//	record ─► temperature fit ─┐
//	demand history ─► demand fit (on the record's temperatures) ─┤
//	                              └─► baseline + scenarios (common random numbers) ─► Result
type Job struct {
	// The temperature model: Model, or Temps fitted with Fit. Temps is
	// fitted only without a Model and when Fit is set or the job
	// simulates; otherwise it only gives the demand history its
	// temperatures.
	Temps *calibrate.Series
	Fit   *calibrate.Settings
	Model *model.File

	// Optional demand: a history fitted with DemandFit on Temps'
	// temperatures, or a fitted model. Holidays are simulated as holidays.
	DemandHistory *calibrate.DemandSeries
	DemandFit     *calibrate.DemandSettings
	Demand        *model.Demand
	Holidays      *calibrate.Holidays

	// Config is the simulation; Paths = 0 fits only. Year 0 means the
	// model's default target year; Demand and Holidays are filled in from
	// the job.
	Config     sim.Config
	Scenarios  []*scenarios.Scenario
	Thresholds []sim.Threshold
	// Detail is how many baseline paths are kept whole (fan chart,
	// load-duration curve); 0 keeps none unless a demand model needs the
	// load-duration curve, which keeps DetailPaths; NoDetail keeps none
	// even then (for outputs that show neither).
	Detail int
	// Normals asks for each historical demand year under normal weather
	// (needs a demand history), with NormalPaths paths per year.
	Normals bool
	// Observed runs the seasons under way at the model's data end from Temps
	// (and, with demand, the demand history's loads): their observed days
	// count as they were and the rest is simulated from the state at the data
	// end (a conditional start).
	Observed bool
	// ObservedLoads are the loads a season under way counts with a demand
	// model given as such (with a demand history, its own loads are used).
	ObservedLoads *calibrate.DemandDays
	// History asks for the record's own complete seasons beside the model
	// (needs Temps and a simulation).
	History bool
	// Hedge evaluates the retailer's exposure and contracts on the
	// baseline's paths (its periods are added to the simulation's); the
	// burn price uses the record's seasons when History is set.
	// HedgeOptions nil means hedge.DefaultOptions.
	Hedge        *hedge.File
	HedgeOptions *hedge.Options
	// Design lists the planning standards (T of 1-in-T, years) of the design
	// day, the SnapDays-day cold snap (DefaultSnapDays when 0), the design-day
	// demand and the snap's demand energy.
	Design   []float64
	SnapDays int
	// Growth is the demand's growth in per cent a year, from the demand
	// record's end to the target year: the simulated demand is scaled by
	// (1 + Growth/100)^(target year − the record's last year).
	Growth float64
	// CapacityTargets are solved for the capacity that meets them (needs
	// demand).
	CapacityTargets []CapacityTarget
	// Uncertainty asks for parameter uncertainty by a parametric bootstrap
	// (needs Temps, the record the model describes, and a simulation).
	Uncertainty *Uncertainty

	// ToolVersion is stamped on the fitted model files.
	ToolVersion string
	// MaxMemory refuses, before any work, a simulation whose estimated
	// memory (MemoryEstimate) is above it; 0 means no limit.
	MaxMemory int64
}

// DetailPaths is how many paths the fan chart and the load-duration curve
// keep whole by default: a run of at most that many keeps them all, so its
// load-duration curve and its tail tables come from the same paths and
// agree (the busiest day's quantiles are the peak-day demand's). Larger
// runs keep the first DetailPaths (about 35 MB of daily values for a year
// of temperature and demand). NormalPaths is how many synthetic years
// weather normalization draws for each historical year.
const (
	DetailPaths = 20000
	NormalPaths = 1000
	NoDetail    = -1
)

// bandPaths caps the paths each refitted model is simulated with for the
// bands: with common random numbers across refits the band is the
// parameters' spread, and more paths only refine the tails a little.
const bandPaths = 20000

// Result is everything a stress test produced; renderers take it whole.
type Result struct {
	Fit   *calibrate.Result // nil when the job gave a model or fitted none
	Model *model.File       // nil when the job needs none

	DemandFit  *calibrate.DemandResult // nil without a demand history
	Demand     *model.Demand           // nil without demand
	DemandDays *calibrate.DemandDays   // the history joined to the record's temperatures

	Set     *Set               // nil when the job only fits
	Normals []sim.YearNormal   // with Job.Normals
	History *HistoricalSeasons // with Job.History
	// Extremes set the GEV of the record's coldest and hottest days beside
	// the simulated levels (with Job.History).
	Extremes []ExtremeCheck
	// Refits are the bootstrap's refitted models and Bands the 90 %
	// confidence bands of the baseline's tail numbers (band mode).
	Refits     []*model.File
	Bands      []RowBands
	Design     []DesignRow   // with Job.Design
	Capacities []CapacityRow // with Job.CapacityTargets
	Hedge      *hedge.Result // with Job.Hedge
	HedgeFile  *hedge.File   // Job.Hedge
	// Warnings are the run's own cautions, in words: a target year far from
	// the record, demand growth applied backwards, a demand model fitted
	// with another temperature file than the model.
	Warnings []string
}

// ErrJob is wrapped by errors about a job's inputs (as opposed to its data).
var ErrJob = errors.New("stress: bad job")

// Run runs the job's pipeline. It stops at the next batch boundary when ctx
// is cancelled and returns ctx's error.
func Run(ctx context.Context, job *Job) (*Result, error) {
	if job.Config.Paths > 0 {
		if err := checkMemory(job, job.MaxMemory); err != nil {
			return nil, err
		}
	}
	fitTemps := job.Model == nil && job.Temps != nil && (job.Fit != nil || job.Config.Paths > 0)
	if job.Model == nil && !fitTemps && job.DemandHistory == nil {
		return nil, fmt.Errorf("%w: nothing to do: give a temperature record or a model", ErrJob)
	}
	if job.Model == nil && !fitTemps && job.Normals {
		return nil, fmt.Errorf("%w: weather normalization needs a temperature model", ErrJob)
	}
	if job.DemandHistory != nil && job.Temps == nil {
		return nil, fmt.Errorf("%w: a demand history is fitted on the record's temperatures: give the record", ErrJob)
	}
	if job.DemandHistory != nil && job.Demand != nil {
		return nil, fmt.Errorf("%w: give a demand history or a demand model, not both", ErrJob)
	}
	res := &Result{Model: job.Model, Demand: job.Demand}
	if fitTemps {
		fit, err := calibrate.Fit(job.Temps, job.Fit)
		if err != nil {
			return nil, err
		}
		fit.Model.ToolVersion = job.ToolVersion
		res.Fit, res.Model = fit, fit.Model
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	if job.DemandHistory != nil {
		days, err := calibrate.JoinDemand(job.DemandHistory, job.Temps)
		if err != nil {
			return nil, err
		}
		dfit, err := calibrate.FitDemand(days, job.DemandFit)
		if err != nil {
			return nil, err
		}
		dfit.Model.ToolVersion = job.ToolVersion
		res.DemandFit, res.Demand, res.DemandDays = dfit, dfit.Model, days
	}
	if res.Demand != nil && res.Model != nil {
		if err := res.Demand.CheckUnits(res.Model.Data.Units); err != nil {
			return nil, fmt.Errorf("%w: %v", ErrJob, err) // two inputs that do not go together
		}
	}
	if job.Temps != nil && job.Model != nil { // a record given beside a model: its history or season so far
		if err := checkRecord(res.Model, job.Temps); err != nil {
			return nil, err
		}
		for _, w := range job.Temps.Warnings {
			res.Warnings = append(res.Warnings, job.Temps.Name+": "+w)
		}
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	if job.Normals && res.DemandDays != nil {
		var err error
		res.Normals, err = sim.WeatherNormalize(ctx, res.Model, res.Demand,
			sim.Config{Seed: job.Config.Seed, Bases: sim.BasesFor(model.Units(res.Model.Data.Units))}, History(res.DemandDays), NormalPaths)
		if err != nil {
			return nil, err
		}
	}
	if job.Config.Paths == 0 {
		return res, nil
	}
	cfg := job.Config
	cfg.Year = sim.TargetYear(res.Model, cfg.Year, cfg.Periods)
	res.Warnings = append(res.Warnings, yearWarnings(res.Model, cfg.Year)...)
	if len(job.Design) > 0 {
		cfg.SnapDays = job.SnapDays
		if cfg.SnapDays == 0 {
			cfg.SnapDays = DefaultSnapDays
		}
		if cfg.ReturnPeriods == nil {
			cfg.ReturnPeriods = sim.TailReturnPeriods()
		}
		for _, T := range job.Design {
			if !slices.Contains(cfg.ReturnPeriods, T) {
				cfg.ReturnPeriods = append(cfg.ReturnPeriods, T)
			}
		}
	}
	if len(job.CapacityTargets) > 0 {
		if res.Demand == nil {
			return nil, fmt.Errorf("%w: capacity targets need a demand model", ErrJob)
		}
		cfg.TopDays = topDays
	}
	if job.Hedge != nil {
		if u := job.Hedge.Units; u != "" && u != res.Model.Data.Units {
			return nil, fmt.Errorf("%w: the hedge file %s is in °%s (its units key) but the model in °%s: its degree-day "+
				"strikes and plans would be read in the wrong degrees; rewrite them in °%s or use a °%s model",
				ErrJob, job.Hedge.Name, u, res.Model.Data.Units, res.Model.Data.Units, u)
		}
		cfg.Periods = withHedgePeriods(cfg.Periods, job.Hedge)
		for _, k := range job.Hedge.Needs() {
			if k.NeedsDemand() && res.Demand == nil {
				return nil, fmt.Errorf("%w: the hedge file's %s needs a demand model", ErrJob, k)
			}
		}
	}
	// A season under way first: the holidays below need the run's span,
	// which starts at the season's first day.
	if job.Observed {
		if job.Temps == nil {
			return nil, fmt.Errorf("%w: a season under way needs the observed record", ErrJob)
		}
		if job.Temps.End() < res.Model.Data.LastDate {
			// The file's days: bad data (exit 1), named like a day missing
			// inside the season.
			return nil, fmt.Errorf("%s: the observed record ends on %s, before the model's data end %s: a season "+
				"under way needs every day to it", job.Temps.Name, job.Temps.End(), res.Model.Data.LastDate)
		}
		cfg.Start = sim.StartConditional
		cfg.Observed = &sim.Observed{From: job.Temps.Start, Temps: job.Temps.Temps}
		days := res.DemandDays
		if days == nil {
			days = job.ObservedLoads
		}
		if days != nil && res.Demand != nil {
			loads := make([]float64, len(job.Temps.Temps))
			for i := range loads {
				loads[i] = math.NaN()
			}
			for i, d := range days.Dates {
				if k := int(d - job.Temps.Start); k >= 0 && k < len(loads) {
					loads[k] = days.Load[i]
				}
			}
			cfg.Observed.Loads = loads
		}
	}
	coldNoise := "" // said below when a period of the run has cold peak days
	if res.Demand != nil {
		cfg.Demand = res.Demand
		if err := job.holidays(res, &cfg); err != nil {
			return nil, err
		}
		for _, side := range []struct {
			name string
			c    model.ChangePoint
		}{{"heating", res.Demand.Heating}, {"cooling", res.Demand.Cooling}} {
			if side.c.Present && !(side.c.Slope > 0) {
				res.Warnings = append(res.Warnings, fmt.Sprintf("the demand model's %s slope is %s %s per degree, not positive: "+
					"its demand falls the further the temperature goes beyond the balance point, the opposite of a %s load",
					side.name, numfmt.Number(side.c.Slope), res.Demand.Unit, side.name))
			}
		}
		// The fit's check of the noise on the coldest days, where peak days
		// fall: a model too narrow there understates every peak-day figure.
		if c := res.Demand.Noise.Cold; c != nil && c.Observed > 0 && c.Model/c.Observed < 0.9 {
			coldNoise = fmt.Sprintf("demand noise on the record's coldest 5 %% of days is narrower than observed (sd %s "+
				"against %s %s): peak-day demand, design-day demand and capacities are likely too low",
				numfmt.Number(c.Model), numfmt.Number(c.Observed), res.Demand.Unit)
		}
		if res.Demand.Holiday != 0 && len(cfg.Holidays) == 0 {
			res.Warnings = append(res.Warnings, fmt.Sprintf("the demand model has a holiday effect of %s %s, but this run "+
				"has no holidays (--holidays FILE gives them): its years are simulated without any",
				numfmt.Number(res.Demand.Holiday), res.Demand.Unit))
		}
		if job.Growth != 0 {
			if !(job.Growth > -50 && job.Growth < 100) {
				return nil, fmt.Errorf("%w: demand growth %v %% a year: want −50 to 100", ErrJob, job.Growth)
			}
			years := cfg.Year - res.Demand.Data.LastDate.Year()
			cfg.Growth = math.Pow(1+job.Growth/100, float64(years))
			if years < 0 {
				res.Warnings = append(res.Warnings, fmt.Sprintf("demand growth of %s %% a year runs backwards: the target year %d is "+
					"%d years before the demand record's end (%d), so demand is scaled by %.3f",
					strconv.FormatFloat(job.Growth, 'f', -1, 64), cfg.Year, -years, res.Demand.Data.LastDate.Year(), cfg.Growth))
			}
		}
		if a, b := res.Demand.Data.TemperatureSHA256, res.Model.Data.SHA256; a != "" && b != "" && a != b {
			res.Warnings = append(res.Warnings, fmt.Sprintf("the demand model was fitted with another temperature file (%s) than "+
				"the temperature model (%s): its change points and slopes hold for that file's station",
				filepath.Base(res.Demand.Data.TemperatureFile), filepath.Base(res.Model.Data.File)))
		}
	}
	detail := job.Detail
	switch {
	case detail == 0 && cfg.Demand != nil:
		detail = DetailPaths
	case detail < 0:
		detail = 0
	}
	u := job.Uncertainty
	if u != nil {
		if job.Temps == nil {
			return nil, fmt.Errorf("%w: parameter uncertainty refits synthetic copies of the record: give the record", ErrJob)
		}
		if u.Mode != "" && u.Mode != UncertaintyBand && u.Mode != UncertaintyMix {
			return nil, fmt.Errorf("%w: uncertainty mode %q: want band or mix", ErrJob, u.Mode)
		}
		if u.Refits < 2 {
			return nil, fmt.Errorf("%w: parameter uncertainty needs at least 2 refits, got %d", ErrJob, u.Refits)
		}
		var err error
		if res.Refits, err = Refits(ctx, job.Temps, res.Model, u.Refits, cfg.Seed); err != nil {
			return nil, err
		}
	}
	var mix []*model.File
	if u != nil && u.Mode == UncertaintyMix {
		mix = res.Refits
	}
	set, err := simulate(ctx, res.Model, mix, cfg, job.Scenarios, job.Thresholds, detail)
	if err != nil {
		return nil, err
	}
	if u != nil && u.Mode != UncertaintyMix {
		bc := set.Config
		bc.Paths = min(bc.Paths, bandPaths)
		bc.Progress = nil
		if res.Bands, err = bands(ctx, res.Refits, bc, set.Rows, job.Design); err != nil {
			return nil, err
		}
		defer func() { withDesignBands(res.Design, set.Rows, res.Bands, job.Design) }()
	}
	res.Set = set
	res.Warnings = append(res.Warnings, underWayWarnings(res.Model, set.Config, set.Base.Periods)...)
	if coldNoise != "" && slices.ContainsFunc(set.Base.Periods, func(p sim.Period) bool {
		_, warm := sim.Season(set.Rows, p.Name)
		return !warm // a summer's peak days are not its coldest
	}) {
		res.Warnings = append(res.Warnings, coldNoise)
	}
	if len(job.Design) > 0 {
		res.Design = designRows(set.Rows, job.Design)
	}
	res.Capacities = solveCapacities(set.Base, job.CapacityTargets)
	if job.History && job.Temps != nil {
		ref, err := climateReference(ctx, res.Model, mix, set)
		if err != nil {
			return nil, err
		}
		if res.History, err = Historical(job.Temps, res.Model, ref); err != nil {
			return nil, err
		}
		res.History.ClimateRun = ref != set
		res.Extremes = extremeChecks(res.History, ref)
	}
	if job.Hedge != nil {
		if res.Hedge, err = evaluateHedge(job, set, res.History); err != nil {
			return nil, err
		}
		res.HedgeFile = job.Hedge
		for _, w := range res.Hedge.Warnings {
			res.Warnings = append(res.Warnings, "hedge file: "+w)
		}
		res.Warnings = append(res.Warnings, hedgeOverlap(job.Hedge, set.Base.Periods)...)
	}
	return res, nil
}

// underWayWarnings names the periods that were under way at the data end
// of a run that does not carry their recorded days (a climate start, no
// season under way): those days are simulated afresh, so the tails are
// those of a whole season in the target year's climate, not of this one
// as it stands. (A conditional start refuses such periods.)
func underWayWarnings(m *model.File, cfg sim.Config, periods []sim.Period) []string {
	end := m.Data.LastDate
	if cfg.Observed != nil {
		// A season under way asked for, but no period of the run is under
		// way at the data end (--year names a later one): the record only
		// sets the start state.
		for _, p := range periods {
			if p.From <= end && end < p.To {
				return nil
			}
		}
		return []string{fmt.Sprintf("no period of this run was under way at the data end (%s): the observed record "+
			"counts no days and only sets the start state, as --start conditional would", end)}
	}
	if cfg.Start == sim.StartConditional {
		return nil
	}
	var out []string
	for _, p := range periods {
		if p.From <= end && end < p.To {
			out = append(out, fmt.Sprintf("%s (%s to %s) began before the data end (%s): a climate start simulates "+
				"its first %d days afresh, so these are the tails of a whole season in the %d climate, not of this season "+
				"as it stands (--observed FILE carries the recorded days; --year %d gives the next season)",
				p.Name, p.From, p.To, end, int(end-p.From)+1, cfg.Year, cfg.Year+1))
		}
	}
	return out
}

// withHedgePeriods returns periods (the defaults when empty) with the
// hedge file's periods added, each once.
func withHedgePeriods(periods []string, h *hedge.File) []string {
	if len(periods) == 0 {
		periods = sim.DefaultPeriods()
	}
	out := slices.Clone(periods)
	for _, k := range h.Needs() {
		// Names match without regard to case, as periods do ("Heating").
		if !slices.ContainsFunc(out, func(p string) bool { return strings.EqualFold(p, k.Period) }) {
			out = append(out, k.Period)
		}
	}
	return out
}

// hedgeOverlap warns of the contracts whose period shares no day with the
// exposure's: they hedge another season (a "dec" contract in a book for
// heating Y reads December of Y, the next winter's).
func hedgeOverlap(f *hedge.File, periods []sim.Period) []string {
	if f.Exposure == nil {
		return nil
	}
	find := func(name string) (sim.Period, bool) {
		for _, p := range periods {
			if strings.EqualFold(p.Name, name) {
				return p, true
			}
		}
		return sim.Period{}, false
	}
	e, ok := find(f.Exposure.Period)
	if !ok {
		return nil
	}
	var out []string
	for _, c := range f.Contracts {
		if p, ok := find(c.Period); ok && (p.To < e.From || p.From > e.To) {
			out = append(out, fmt.Sprintf("hedge file: contract %q reads %s (%s to %s), which shares no day with the exposure's "+
				"%s (%s to %s): it hedges another season", c.Name, p.Name, p.From, p.To, e.Name, e.From, e.To))
		}
	}
	return out
}

// evaluateHedge prices the hedge file on the baseline's paths, with the
// record's seasons (moved to the target year) for the burn price.
func evaluateHedge(job *Job, set *Set, hist *HistoricalSeasons) (*hedge.Result, error) {
	values := map[hedge.Key][]float64{}
	var history map[hedge.Key][]float64
	for _, k := range job.Hedge.Needs() {
		for _, a := range set.Base.Aggregates {
			if a.Index.Info().Key == k.Index && strings.EqualFold(a.Period.Name, k.Period) {
				values[k] = a.Values
				if hist != nil && !k.NeedsDemand() {
					if history == nil {
						history = map[hedge.Key][]float64{}
					}
					for _, se := range hist.Seasons[a.Period.Name] { // the run's name for the period
						history[k] = append(history[k], se.Values[a.Index])
					}
				}
			}
		}
	}
	opt := hedge.DefaultOptions()
	if job.HedgeOptions != nil {
		opt = *job.HedgeOptions
	}
	opt.History = history
	return hedge.Evaluate(job.Hedge, values, &opt)
}

// holidays sets the simulated holidays: the job's list (dates repeated by
// month and day, rules in every simulated year), or the holidays of the
// demand history.
func (job *Job) holidays(res *Result, cfg *sim.Config) error {
	h := job.Holidays
	if h == nil && res.DemandDays != nil {
		cfg.Holidays = nil
		first, last, err := sim.SimulatedYears(res.Model, *cfg)
		if err != nil {
			return err
		}
		cfg.Holidays = calendar.HolidaysIn(Holidays(res.DemandDays), nil, first, last)
		return nil
	}
	if h == nil {
		return nil
	}
	first, last, err := sim.SimulatedYears(res.Model, *cfg)
	if err != nil {
		return err
	}
	cfg.Holidays = calendar.HolidaysIn(h.Dates, h.Rules, first, last)
	return nil
}

// climateReference returns the run the record's own seasons are compared
// with. They are draws from the climate, so a conditional run (a season
// under way, or the coming season from the state at the data end) would
// compare a narrower, shifted distribution with theirs: for those, it
// simulates the same model, paths and seed from a climate start, without
// observed days, demand or scenarios. Otherwise it returns set itself.
func climateReference(ctx context.Context, m *model.File, mix []*model.File, set *Set) (*Set, error) {
	c := set.Config
	if c.Start != sim.StartConditional && c.Observed == nil {
		return set, nil
	}
	return simulate(ctx, m, mix, sim.Config{Paths: c.Paths, Seed: c.Seed, Workers: c.Workers, Year: c.Year,
		Start: sim.StartClimate, Periods: c.Periods, Bases: c.Bases, SnapDays: c.SnapDays, ReturnPeriods: c.ReturnPeriods}, nil, nil, 0)
}

// FarYears is how far, in years, a target year may lie beyond the record's
// end before a run warns that the fitted trend and climate are carried that
// far; any target year before the record's start draws the warning.
const FarYears = 30

// yearWarnings cautions about a target year far from the record.
func yearWarnings(m *model.File, year int) []string {
	first, last := m.Data.FirstDate.Year(), m.Data.LastDate.Year()
	var gap int
	var where string
	switch {
	case year > last+FarYears:
		gap, where = year-last, "after the record's end"
	case year < first:
		gap, where = first-year, "before the record's start"
	default:
		return nil
	}
	years := "years"
	if gap == 1 {
		years = "year"
	}
	w := fmt.Sprintf("the target year %d is %d %s %s (%d–%d): ", year, gap, years, where, first, last)
	if m.Trend.Kind == "linear" && m.Trend.SlopePerYear != 0 {
		w += fmt.Sprintf("the fitted trend (%+.2f °%s a decade) is carried that far; treat its level as an extrapolation",
			10*m.Trend.SlopePerYear, m.Data.Units)
	} else {
		w += "the model has no trend, so that year's climate is taken to be the record's"
	}
	return []string{w}
}
