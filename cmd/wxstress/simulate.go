package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"runtime/debug"
	"slices"
	"strconv"
	"strings"
	"time"

	"github.com/spf13/pflag"

	"wxstress/calibrate"
	"wxstress/hedge"
	"wxstress/internal/outputs"
	"wxstress/internal/render"
	"wxstress/internal/report"
	"wxstress/model"
	"wxstress/scenarios"
	"wxstress/sim"
	"wxstress/stress"
)

var simulateUsage = helpText{
	usage: "wxstress simulate --model model.json [--paths N] [--seed S] [flags]",
	about: `Draw N synthetic years for a target year from a fitted model and report tail
tables of degree days, the coldest and hottest day, cold days and the longest
cold spell for each period. Path i has its own random stream derived from
(seed, i): the same seed gives the same numbers for any --workers.

Periods: ` + sim.PeriodForms + `.
Default periods: year, heating, cooling. Periods that cross the year end are the
ones that end in the target year.`,
	examples: `  wxstress simulate --model model.json --paths 100000 --seed 7
  wxstress simulate --model model.json --year 2030 --period heating --period jan --period 12-15:01-15
  wxstress simulate --model model.json --start conditional --period jan --period 01-01:03-31 --exceed hdd:01-01:03-31:1500 --format json
  wxstress simulate --model model.json --scenario warm-1c --scenario scenarios/cold_spell.toml
  wxstress simulate --model model.json --demand demand.json --capacity 95000 --holidays holidays.txt
  wxstress simulate --model model.json --paths 1000000 --out results/
  wxstress simulate --model model.json --scenario warm-2c --report stress.html
  wxstress simulate --model model.json --history station.csv --period heating
  wxstress simulate --model model.json --history station.csv --uncertainty 50 --uncertainty-mode band
  wxstress simulate --model model.json --demand demand.json --history station.csv --hedge hedge.toml --out book/
  wxstress simulate --model model.json --demand demand.json --design 1-in-20,1-in-50 --capacity-target peak:1-in-20 --capacity-target days:1`,
}

type simulateOptions struct {
	modelPath string
	paths     int
	seed      uint64
	workers   int
	year      int
	start     string
	periods   []string
	hddBase   float64
	cddBase   float64
	coldBelow float64
	exceed    []string
	scenarios []string
	demand    string
	capacity  float64
	holidays  string
	history   string
	refits    int
	mode      string
	format    string
	out       string
	perPath   bool
	report    string
	force     bool
	detail    bool
	title     string
	maxMemory string
	hedgeFile string
	loading   float64
	observed  string
	obsLoad   string
	periodsT  []float64
	design    []string
	snapDays  int
	growth    float64
	targets   []string
	standards []float64
	capTarget []stress.CapacityTarget

	fs          *pflag.FlagSet
	memoryLimit int64
	thresholds  []sim.Threshold
	loaded      []*scenarios.Scenario
}

func newSimulateFlags(o *simulateOptions) *pflag.FlagSet {
	fs := pflag.NewFlagSet("simulate", pflag.ContinueOnError)
	fs.StringVar(&o.modelPath, "model", "", "model file written by 'wxstress fit' (required)")
	fs.IntVar(&o.paths, "paths", 10000, "number of synthetic years")
	fs.Uint64Var(&o.seed, "seed", 1, "random seed")
	fs.IntVar(&o.workers, "workers", 0, "worker goroutines (default: all cores); never changes results")
	fs.IntVar(&o.year, "year", 0, "target year (default: the season under way at the data end)")
	fs.StringVar(&o.start, "start", sim.StartClimate, "start state: climate (stationary, after a burn-in) or conditional (the last observed anomalies)")
	fs.StringArrayVar(&o.periods, "period", nil, "index period `P`, repeatable (default: year, heating, cooling)")
	fs.Float64Var(&o.hddBase, "hdd-base", 0, "HDD base temperature (default 18 °C or 65 °F, by the model's units)")
	fs.Float64Var(&o.cddBase, "cdd-base", 0, "CDD base temperature (default 18 °C or 65 °F)")
	fs.Float64Var(&o.coldBelow, "cold-below", 0, "a cold day has a mean below this (default 0 °C or 32 °F)")
	fs.StringArrayVar(&o.exceed, "exceed", nil, "report P(worse than a threshold) for `INDEX[:PERIOD]:VALUE`, repeatable")
	fs.StringArrayVar(&o.scenarios, "scenario", nil, "also simulate scenario `NAME|FILE` (a built-in name or a TOML file), repeatable; see 'wxstress scenarios'")
	fs.StringVar(&o.demand, "demand", "", "demand model from 'wxstress fit-demand': adds energy, peak-day demand, the day of the peak and planning tables")
	fs.Float64Var(&o.capacity, "capacity", 0, "with --demand: also count the days with demand above this (in the demand's unit)")
	fs.StringVar(&o.history, "history", "", "the station record (CSV, as for fit): set its own complete seasons, moved along the trend to the target year, beside the model")
	fs.IntVar(&o.refits, "uncertainty", 0, "with --history: parameter uncertainty from N refits to synthetic records of the model (parametric bootstrap; 20 to 1000, 100 usually enough)")
	fs.StringVar(&o.mode, "uncertainty-mode", stress.UncertaintyBand, "band: a 90% band beside the mean, VaR 95%, ES 95%, 1-in-20 and 1-in-50; mix: spread the paths over the refitted models (predictive tables)")
	fs.StringVar(&o.observed, "observed", "", "the station record (CSV, as for fit) to the model's data end: seasons under way count their observed days and simulate the rest from the data end (conditional start)")
	fs.StringVar(&o.obsLoad, "observed-load", "", "with --observed and --demand: the daily demand CSV whose loads the seasons under way count as they were")
	fs.Float64SliceVar(&o.periodsT, "return-periods", nil, "the `T,…` (years, > 1) of the 1-in-T return levels the tables list, e.g. 2,5,10,20,30,50,100")
	fs.Lookup("return-periods").DefValue = "2,5,10,20,50,100" // nil means these; shown as the default
	fs.StringSliceVar(&o.design, "design", nil, "planning `STANDARDS` of the design day, e.g. 1-in-20,1-in-50: the 1-in-T coldest day, k-day cold snap, peak-day demand and snap energy")
	fs.Float64Var(&o.growth, "growth", 0, "with --demand: load growth in per cent a year from the demand record's end to the target year")
	fs.IntVar(&o.snapDays, "snap-days", stress.DefaultSnapDays, "with --design: the length k of the design cold snap, in days")
	fs.StringArrayVar(&o.targets, "capacity-target", nil, "with --demand: solve the capacity for `TARGET` peak:1-in-T, days:x (days over a year) or any:p (probability of any day over); repeatable")
	fs.StringVar(&o.hedgeFile, "hedge", "", "evaluate the exposure and contracts of this hedge file (TOML) on the simulated years; its periods are simulated too")
	fs.Float64Var(&o.loading, "loading", 0.2, "with --hedge: λ of the loaded price, mean + λ·sd of the payout")
	fs.StringVar(&o.holidays, "holidays", "", "with --demand: holiday list as for fit-demand; dates repeat every simulated year by month and day, rules give their own day")
	fs.StringVar(&o.format, "format", "table", "output: table, csv or json")
	fs.BoolVar(&o.force, "force", false, "replace existing output files")
	fs.BoolVar(&o.detail, "detail", false, "print the full tail tables instead of the one-page summary")
	fs.StringVar(&o.title, "title", "", "with --report: the report's title (default: the station the model describes)")
	fs.StringVar(&o.maxMemory, "max-memory", "", "refuse a run whose estimated memory is above this, e.g. 8G (default: half the machine's memory)")
	fs.StringVar(&o.report, "report", "", "also write an HTML report (fit diagnostics, fan chart, tails, scenarios, demand) here")
	fs.StringVar(&o.out, "out", "", "also write the tail tables tails.json and tails.csv into this directory")
	fs.BoolVar(&o.perPath, "per-path", false, "with --out: also write paths.csv, every path's aggregates (about 230 bytes a path for the default periods, twice that with --demand)")
	o.fs = fs
	return fs
}

func (o *simulateOptions) validate() error {
	if o.modelPath == "" {
		return usagef("simulate: --model is required")
	}
	if (o.year != 0 || o.fs.Changed("year")) && (o.year < 1800 || o.year > 2300) {
		return usagef("simulate: --year %d: want a year from 1800 to 2300", o.year)
	}
	for _, b := range []struct {
		flag string
		v    float64
	}{{"--hdd-base", o.hddBase}, {"--cdd-base", o.cddBase}, {"--cold-below", o.coldBelow}} {
		// Wider than any station's daily means in either scale: outside
		// is a typo, not a base.
		if !(b.v >= -100 && b.v <= 200) {
			return usagef("simulate: %s %v: want a temperature from −100 to 200 in the model's degrees", b.flag, b.v)
		}
	}
	for _, f := range []struct{ flag, needs, given string }{
		{"loading", "hedge", o.hedgeFile}, {"title", "report", o.report},
	} {
		if o.fs.Changed(f.flag) && f.given == "" {
			return usagef("simulate: --%s goes with --%s", f.flag, f.needs)
		}
	}
	if o.fs.Changed("snap-days") && len(o.design) == 0 {
		return usagef("simulate: --snap-days goes with --design")
	}
	if o.fs.Changed("uncertainty-mode") && o.refits == 0 {
		return usagef("simulate: --uncertainty-mode goes with --uncertainty")
	}
	if o.observed != "" && o.fs.Changed("start") && o.start == sim.StartClimate {
		return usagef("simulate: --observed starts the run from the data end (a season under way): --start climate contradicts it")
	}
	if o.detail && o.format != "table" {
		return usagef("simulate: --detail is for --format table (csv and json always hold every table)")
	}
	o.memoryLimit = stress.DefaultMemoryLimit()
	if o.maxMemory != "" {
		v, err := stress.ParseBytes(o.maxMemory)
		if err != nil {
			return usagef("simulate: --max-memory %q: want a size such as 8G or 800M", o.maxMemory)
		}
		o.memoryLimit = v
	}
	if o.paths < stress.MinPaths || o.paths > stress.MaxPaths {
		return usagef("simulate: --paths must be a number from %d to %d, got %d", stress.MinPaths, stress.MaxPaths, o.paths)
	}
	if o.workers < 0 {
		return usagef("simulate: --workers must be positive, got %d", o.workers)
	}
	if !(o.capacity >= 0 && o.capacity <= 1e15) || o.capacity > 0 && o.demand == "" {
		return usagef("simulate: --capacity %v: needs --demand and a positive value of at most 10¹⁵", o.capacity)
	}
	if o.refits != 0 && (o.refits < 20 || o.refits > 1000) {
		// Fewer refits give a "90 % band" that is mostly noise: at 2 to 5
		// most bands missed the point estimate itself.
		return usagef("simulate: --uncertainty %d: want 20..1000 refits (a 90%% band needs 20 or more)", o.refits)
	}
	if o.refits > 0 && o.history == "" {
		return usagef("simulate: --uncertainty refits synthetic copies of the record: give it with --history")
	}
	if o.mode != stress.UncertaintyBand && o.mode != stress.UncertaintyMix {
		return usagef("simulate: --uncertainty-mode %q: want band or mix", o.mode)
	}
	if math.IsNaN(o.loading) || math.IsInf(o.loading, 0) || o.loading < 0 {
		return usagef("simulate: --loading %v: want a finite number ≥ 0", o.loading)
	}
	for _, d := range o.design {
		T, err := stress.ParseStandard(d)
		if err != nil {
			return usagef("simulate: --design %q: want 1-in-T with T a number of years above 1 and at most 1,000,000, e.g. 1-in-20", d)
		}
		o.standards = append(o.standards, T)
	}
	if o.snapDays < 1 || o.snapDays > 31 {
		return usagef("simulate: --snap-days %d: want 1..31", o.snapDays)
	}
	for _, tg := range o.targets {
		c, err := stress.ParseCapacityTarget(tg)
		if err != nil {
			return usagef("simulate: --capacity-target %q: want peak:1-in-T (T above 1, at most 1,000,000), days:x (0 ≤ x ≤ 10) or any:p (0 < p < 1)", tg)
		}
		o.capTarget = append(o.capTarget, c)
	}
	if math.IsNaN(o.growth) || o.growth <= -50 || o.growth >= 100 {
		return usagef("simulate: --growth %v: want a per-cent growth a year between −50 and 100", o.growth)
	}
	if o.growth != 0 && o.demand == "" {
		return usagef("simulate: --growth needs --demand")
	}
	if len(o.capTarget) > 0 && o.demand == "" {
		return usagef("simulate: --capacity-target needs --demand")
	}
	if o.perPath && o.out == "" {
		return usagef("simulate: --per-path writes paths.csv into the --out directory: give --out")
	}
	if err := sim.CheckReturnPeriods(o.periodsT); err != nil {
		return usagef("simulate: --return-periods: %v", strings.TrimPrefix(err.Error(), "sim: "))
	}
	if o.obsLoad != "" && (o.observed == "" || o.demand == "") {
		return usagef("simulate: --observed-load goes with --observed and --demand")
	}
	if o.observed != "" && o.history != "" && o.observed != o.history {
		return usagef("simulate: --observed and --history name one record: give the same file, or one of them")
	}
	if o.holidays != "" && o.demand == "" {
		return usagef("simulate: --holidays needs --demand")
	}
	if o.start != sim.StartClimate && o.start != sim.StartConditional {
		return usagef("simulate: --start %q: want climate or conditional", o.start)
	}
	switch o.format {
	case "table", "csv", "json":
	default:
		return usagef("simulate: --format %q: want table, csv or json", o.format)
	}
	for _, p := range o.periods {
		if _, err := sim.ParsePeriod(p, 2000); err != nil {
			return usagef("simulate: --period: %v", strings.TrimPrefix(err.Error(), "sim: "))
		}
	}
	loaded, err := scenarios.LookupAll(o.scenarios)
	if errors.Is(err, scenarios.ErrUnknown) {
		return usagef("simulate: --scenario: %s", strings.TrimPrefix(err.Error(), scenarios.ErrUnknown.Error()+": "))
	}
	if err != nil {
		return err // a bad file is a data error (exit 1), like a bad model file
	}
	o.loaded = loaded
	for _, s := range o.exceed {
		th, err := sim.ParseThreshold(s)
		if err != nil {
			return usagef("simulate: --exceed: %v", strings.TrimPrefix(err.Error(), "sim: "))
		}
		if err := o.checkThreshold(s, th); err != nil {
			return err
		}
		o.thresholds = append(o.thresholds, th)
	}
	return nil
}

// checkThreshold refuses an --exceed the run cannot answer: a demand index
// without --demand, days over capacity without --capacity, the cold snap
// without --design, or a period the run does not simulate (a hedge file may
// add periods, so those are checked only without one).
func (o *simulateOptions) checkThreshold(s string, th sim.Threshold) error {
	x := th.Index
	switch {
	case x.NeedsDemand() && o.demand == "":
		return usagef("simulate: --exceed %s: %s needs --demand", s, x.Info().Name)
	case x == sim.OverCapacity && o.capacity == 0:
		return usagef("simulate: --exceed %s: days over capacity needs --capacity", s)
	case (x == sim.ColdSnap || x == sim.SnapEnergy) && len(o.design) == 0:
		return usagef("simulate: --exceed %s: the %d-day snap indices need --design", s, o.snapDays)
	}
	periods := o.periods
	if len(periods) == 0 {
		periods = sim.DefaultPeriods()
	}
	if th.Period != "" && o.hedgeFile == "" && !slices.Contains(periods, th.Period) {
		return usagef("simulate: --exceed %s: period %q is not simulated; the run's periods are %s (add it with --period)",
			s, th.Period, strings.Join(periods, ", "))
	}
	return nil
}

// config builds the simulation settings for model m.
func (o *simulateOptions) config(m *model.File) sim.Config {
	b := sim.BasesFor(model.Units(m.Data.Units))
	if o.fs.Changed("hdd-base") {
		b.HDD = o.hddBase
	}
	if o.fs.Changed("cdd-base") {
		b.CDD = o.cddBase
	}
	if o.fs.Changed("cold-below") {
		b.ColdBelow = o.coldBelow
	}
	return sim.Config{Paths: o.paths, Seed: o.seed, Workers: o.workers, Year: o.year, Start: o.start, ReturnPeriods: o.periodsT,
		Periods: o.periods, Bases: b}
}

func runSimulateCmd(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	var o simulateOptions
	if err := parseFlags(newSimulateFlags(&o), simulateUsage, args, stdout); err != nil {
		return err
	}
	if err := o.validate(); err != nil {
		return err
	}
	plan := newOutputPlan(ctx, o.force, append([]string{o.modelPath, o.demand, o.holidays, o.history, o.hedgeFile, o.observed, o.obsLoad},
		o.scenarios...)...)
	if o.out != "" {
		if err := plan.checkDir(o.out, outFiles(o.perPath)...); err != nil {
			return err
		}
		if _, err := os.Lstat(filepath.Join(o.out, pathsFile)); err == nil && !o.perPath {
			// The set of files in the directory must come from one run.
			return &outputs.RefusedError{Path: filepath.Join(o.out, pathsFile),
				Reason: "it is an earlier run's per-path file: give --per-path (and --force) to replace it with this run's, or remove it"}
		}
	}
	if err := plan.check(o.report); err != nil {
		return err
	}
	defer plan.abort()
	m, sum, err := readModel(o.modelPath)
	if err != nil {
		return err
	}
	job := &stress.Job{Model: m, Config: o.config(m), Scenarios: o.loaded, Thresholds: o.thresholds, MaxMemory: o.memoryLimit}
	if o.memoryLimit > 0 {
		debug.SetMemoryLimit(o.memoryLimit) // the collector works harder near the limit the estimate is held to
	}
	baseWarnings := job.Config.Bases.Implausible(model.Units(m.Data.Units))
	for _, w := range m.Data.Warnings { // the record's own (units that look like the other scale, gaps)
		baseWarnings = append(baseWarnings, "the model's record: "+w)
	}
	if dg := m.Diagnostics; dg != nil && dg.SlowAdvice != "" {
		advice := dg.SlowAdvice
		if o.start != sim.StartConditional && o.observed == "" && advice == calibrate.ShortSlowAdvice(m, true) {
			advice = calibrate.ShortSlowAdvice(m, false) // a climate run does not use the state at the data end
		}
		baseWarnings = append(baseWarnings, "the model's fit: "+advice)
	}

	var demandSum string
	if o.demand != "" {
		if job.Demand, demandSum, err = readDemandModel(o.demand); err != nil {
			return err
		}
		job.Config.Capacity = o.capacity
		if o.holidays != "" {
			if job.Holidays, err = calibrate.ReadHolidaysFile(o.holidays); err != nil {
				return err
			}
		}
	}
	switch {
	case o.report != "":
		job.Detail = stress.DetailPaths
	case o.format == "table" && !o.detail && o.out == "":
		// The one-page summary shows no load-duration curve: do not keep
		// 20 000 whole paths for one (a quarter of a demand run's time).
		job.Detail = stress.NoDetail
	}
	if o.history != "" {
		job.Temps, err = interruptible(ctx, func() (*calibrate.Series, error) {
			return calibrate.ReadFile(o.history, calibrate.ReadOptions{Units: model.Units(m.Data.Units)})
		})
		if err != nil {
			return err
		}
		if m.Data.SHA256 != "" && job.Temps.SHA256 != m.Data.SHA256 {
			if o.refits > 0 {
				// The refits take the record's length and gaps: another
				// record's would band the model with the wrong sampling error.
				return usagef("simulate: --uncertainty refits records like the model's own: %s is not the record the model was fitted to (%s)",
					o.history, filepath.Base(m.Data.File))
			}
			baseWarnings = append(baseWarnings, fmt.Sprintf("%s is not the record the model was fitted to (%s); its seasons are "+
				"compared all the same", filepath.Base(o.history), filepath.Base(m.Data.File)))
		}
		job.History = true
	}
	if o.observed != "" {
		job.History = true // the record's seasons: beside the model, and the hedges' burn price
		if job.Temps == nil {
			job.Temps, err = interruptible(ctx, func() (*calibrate.Series, error) {
				return calibrate.ReadFile(o.observed, calibrate.ReadOptions{Units: model.Units(m.Data.Units)})
			})
			if err != nil {
				return err
			}
		}
		if job.Temps.End() > m.Data.LastDate { // with the run's other cautions: summary, stderr, manifest
			baseWarnings = append(baseWarnings, fmt.Sprintf("%s goes on past the model's data end %s; the run starts there "+
				"(refit the model to use the later days)", filepath.Base(o.observed), m.Data.LastDate))
		}
		job.Observed = true
		if o.obsLoad != "" {
			loads, err := calibrate.ReadDemandFile(o.obsLoad, calibrate.DemandReadOptions{})
			if err != nil {
				return err
			}
			days, err := calibrate.JoinDemand(loads, job.Temps)
			if err != nil {
				return err
			}
			job.ObservedLoads = days
		}
	}
	if o.refits > 0 {
		job.Uncertainty = &stress.Uncertainty{Refits: o.refits, Mode: o.mode}
	}
	job.Design, job.SnapDays, job.CapacityTargets, job.Growth = o.standards, o.snapDays, o.capTarget, o.growth
	if o.hedgeFile != "" {
		if job.Hedge, err = hedge.Load(o.hedgeFile); err != nil {
			return err
		}
		for _, k := range job.Hedge.Needs() {
			if k.NeedsDemand() && o.demand == "" {
				return usagef("simulate: the hedge file %s reads %s, which needs --demand", o.hedgeFile, k)
			}
		}
		opt := hedge.DefaultOptions()
		opt.Loading = o.loading
		job.HedgeOptions = &opt
	}
	start := time.Now()
	stop := attachProgress(&job.Config, stderr, 1+len(o.loaded))
	out, err := runPipeline(ctx, job)
	stop()
	if errors.Is(err, sim.ErrPeriod) {
		for _, p := range o.periods {
			if strings.Contains(err.Error(), strconv.Quote(p)) {
				return usagef("simulate: %v", err) // a --period of the command line
			}
		}
		if o.hedgeFile != "" {
			return fmt.Errorf("%s: %w", o.hedgeFile, err) // a contract's period: the file's data
		}
		return usagef("simulate: %v", err)
	}
	switch {
	case errors.Is(err, sim.ErrStart):
		return usagef("simulate: %s", strings.TrimPrefix(err.Error(), sim.ErrStart.Error()+": "))
	case errors.Is(err, sim.ErrObserved):
		return fmt.Errorf("%s: %w", o.observed, err) // the file's days
	case err != nil:
		return err
	}
	rep, res := render.NewSimReport(out), out.Set.Base
	rep.Manifest = manifest(m, o.modelPath, sum, res)
	if o.out != "" || o.report != "" {
		rep.Manifest.RunID = plan.runID() // names the set of files written together
	}
	rep.Manifest.Scenarios = o.scenarios
	rep.Manifest.ParameterUncertainty = rep.Uncertainty
	rep.Manifest.Warnings = append(slices.Clone(baseWarnings), out.Warnings...)
	for _, in := range []struct{ role, file string }{{"station record (history)", o.history},
		{"station record (season under way)", o.observed}, {"loads (season under way)", o.obsLoad},
		{"hedges", o.hedgeFile}, {"holidays", o.holidays}} {
		if in.file != "" {
			rep.Manifest.Inputs = append(rep.Manifest.Inputs, render.ManifestInput{Role: in.role, File: filepath.Base(in.file), SHA256: fileSHA(in.file)})
		}
	}
	for _, f := range o.scenarios {
		if sum := fileSHA(f); sum != "" { // a file, not a built-in name
			rep.Manifest.Inputs = append(rep.Manifest.Inputs, render.ManifestInput{Role: "scenario", File: filepath.Base(f), SHA256: sum})
		}
	}
	if o.growth != 0 {
		rep.Manifest.DemandGrowthPerCent = o.growth
	}
	if o.demand != "" {
		rep.Manifest.DemandModel, rep.Manifest.DemandSHA256 = filepath.Base(o.demand), demandSum
	}
	if o.out != "" {
		if err := addSimDir(plan, o.out, rep, res, o.perPath); err != nil {
			return err
		}
	}
	if o.report != "" {
		meta := report.Meta{
			Title: o.reportTitle(m, rep.Manifest.Year), Created: time.Now(), RunTime: time.Since(start),
			Inputs:   []report.InputFile{{Role: "model", Name: o.modelPath, SHA256: sum}},
			Manifest: rep.Manifest,
		}
		if o.demand != "" {
			meta.Inputs = append(meta.Inputs, report.InputFile{Role: "demand model", Name: o.demand, SHA256: demandSum})
		}
		for _, f := range o.scenarios {
			if sum := fileSHA(f); sum != "" {
				meta.Inputs = append(meta.Inputs, report.InputFile{Role: "scenario", Name: f, SHA256: sum})
			}
		}
		for _, in := range rep.Manifest.Inputs {
			if in.Role != "scenario" { // listed above
				meta.Inputs = append(meta.Inputs, report.InputFile{Role: in.Role, Name: in.File, SHA256: in.SHA256})
			}
		}
		if err := addReport(plan, o.report, out, meta); err != nil {
			return err
		}
	}
	if err := plan.commit(ctx); err != nil {
		return err
	}
	switch o.format {
	case "json", "csv":
		for _, w := range rep.Manifest.Warnings { // in the manifest too; said where a person looks
			warn(stderr, w)
		}
		if o.format == "json" {
			return render.SimJSON(stdout, rep)
		}
		return render.SimCSV(stdout, rep)
	}
	print := render.SimTables
	if !o.detail {
		print = func(w io.Writer, r *render.SimReport) error { return render.SimSummary(w, r, m) }
	}
	if err := print(stdout, rep); err != nil {
		return err
	}
	if o.out != "" {
		fmt.Fprintf(stdout, "\nWrote %s to %s\n", strings.Join(outFiles(o.perPath), ", "), o.out)
	}
	if o.report != "" {
		fmt.Fprintf(stdout, "Report written to %s\n", o.report)
	}
	return nil
}

// reportTitle is --title, or names the station the model describes (the
// model file's name when the fit recorded no description).
func (o *simulateOptions) reportTitle(m *model.File, year int) string {
	if o.title != "" {
		return o.title
	}
	station := m.Data.Description
	if station == "" {
		station = filepath.Base(m.Data.File)
	}
	return fmt.Sprintf("Synthetic years of %d: %s", year, station)
}
