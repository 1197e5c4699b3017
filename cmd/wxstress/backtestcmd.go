package main

import (
	"context"
	"io"
	"path/filepath"
	"strings"
	"time"

	"github.com/spf13/pflag"

	"wxstress/backtest"
	"wxstress/calibrate"
	"wxstress/internal/render"
	"wxstress/internal/report"
	"wxstress/model"
	"wxstress/sim"
)

var backtestUsage = helpText{
	usage: "wxstress backtest --temps FILE.csv [--origins N] [--period P ...] [--paths M] [flags]",
	about: `Check the whole pipeline out of sample. For each of the last N complete periods
of the record (default 30 of each kind, fewer when the record is short; the
first needs 5 years of record before it), fit the model to the data that end
the day before the period starts, simulate the period from that day
(conditional start), and place the realised HDD and CDD in the simulated
distribution; with --demand and --load also the season's demand energy and
peak-day demand (the demand model fitted once; its realised values from the
load file). The model's structure (harmonics, AR order, slow part, shock
family) is chosen once, by the automatic fit on the record before the
earliest origin; each origin is then refitted with that structure. Reports the
coverage of the central 50 % and 90 % bands with binomial p-values, the
Kolmogorov–Smirnov test and the sd of probit(PIT), and the CRPS of the model
against the climatology of the earlier seasons.`,
	examples: `  wxstress backtest --temps station.csv
  wxstress backtest --temps station.csv --units F --origins 40 --period year --period heating --period jan
  wxstress backtest --temps station.csv --paths 5000 --format json > backtest.json
  wxstress backtest --temps station.csv --report backtest.html`,
}

type backtestOptions struct {
	temps, units, format string
	report               string
	force                bool
	demand, load         string
	origins, paths       int
	seed                 uint64
	periods              []string
	hddBase, cddBase     float64
	fs                   *pflag.FlagSet
	readOpts             calibrate.ReadOptions
}

func newBacktestFlags(o *backtestOptions) *pflag.FlagSet {
	fs := pflag.NewFlagSet("backtest", pflag.ContinueOnError)
	fs.StringVar(&o.temps, "temps", "", "daily temperature CSV (required)")
	fs.StringVar(&o.units, "units", "", "units of the data: C or F (default C; data that look like °F are flagged: a warning, or an error past ±60)")
	fs.IntVar(&o.origins, "origins", backtest.DefaultOrigins, "the last N complete periods of each kind")
	fs.StringArrayVar(&o.periods, "period", nil, "period `P` to backtest, repeatable (default: year, heating); "+sim.PeriodForms)
	fs.IntVar(&o.paths, "paths", backtest.DefaultPaths, "simulated years per origin")
	fs.Uint64Var(&o.seed, "seed", 1, "random seed")
	fs.Float64Var(&o.hddBase, "hdd-base", 0, "HDD base temperature (default 18 °C or 65 °F)")
	fs.Float64Var(&o.cddBase, "cdd-base", 0, "CDD base temperature (default 18 °C or 65 °F)")
	fs.StringVar(&o.format, "format", "table", "output: table or json")
	fs.StringVar(&o.demand, "demand", "", "with --load: a demand model from 'wxstress fit-demand'; adds season energy and peak-day demand")
	fs.StringVar(&o.load, "load", "", "with --demand: the daily demand CSV (as fit-demand reads it) whose seasons are the realised values")
	fs.StringVar(&o.report, "report", "", "also write an HTML report (PIT histograms, realised values over the forecast band) here")
	fs.BoolVar(&o.force, "force", false, "replace an existing report file")
	o.fs = fs
	return fs
}

func (o *backtestOptions) validate() error {
	if o.temps == "" {
		return usagef("backtest: --temps is required")
	}
	if o.format != "table" && o.format != "json" {
		return usagef("backtest: --format %q: want table or json", o.format)
	}
	if (o.demand == "") != (o.load == "") {
		return usagef("backtest: --demand and --load go together")
	}
	if o.origins < 3 || o.origins > 500 {
		return usagef("backtest: --origins %d: want 3..500", o.origins)
	}
	if o.paths < 100 || o.paths > 1_000_000 {
		return usagef("backtest: --paths %d: want 100..1000000", o.paths)
	}
	for i, p := range o.periods {
		// The same days under two names ("jan" and "JAN", heating and
		// 11-01:03-31) would count their evidence twice.
		for _, q := range o.periods[:i] {
			a, errA := sim.ParsePeriod(p, 2001)
			b, errB := sim.ParsePeriod(q, 2001)
			if errA == nil && errB == nil && a.From == b.From && a.To == b.To {
				return usagef("backtest: --period %q is the same days as %q: list it once", p, q)
			}
		}
		// In a leap year and in another, as simulate: 02-29:02-29 has a
		// day only in the first.
		for _, y := range []int{2000, 2001} {
			if _, err := sim.ParsePeriod(p, y); err != nil {
				return usagef("backtest: --period: %v", strings.TrimPrefix(err.Error(), "sim: "))
			}
		}
	}
	for _, b := range []struct {
		flag string
		v    float64
	}{{"--hdd-base", o.hddBase}, {"--cdd-base", o.cddBase}} {
		// The same range as simulate's: wider than any station's daily
		// means in either scale.
		if !(b.v >= -100 && b.v <= 200) {
			return usagef("backtest: %s %v: want a temperature from −100 to 200 in the data's degrees", b.flag, b.v)
		}
	}
	if o.units != "" {
		u, err := model.ParseUnits(o.units)
		if err != nil {
			return usagef("backtest: --units %q: want C or F (also degC, degF, °C, °F)", o.units)
		}
		o.readOpts.Units = u
	}
	return nil
}

func runBacktestCmd(ctx context.Context, args []string, stdout, _ io.Writer) error {
	var o backtestOptions
	if err := parseFlags(newBacktestFlags(&o), backtestUsage, args, stdout); err != nil {
		return err
	}
	if err := o.validate(); err != nil {
		return err
	}
	plan := newOutputPlan(ctx, o.force, o.temps, o.demand, o.load)
	if err := plan.check(o.report); err != nil {
		return err
	}
	defer plan.abort()
	series, err := interruptible(ctx, func() (*calibrate.Series, error) { return calibrate.ReadFile(o.temps, o.readOpts) })
	if err != nil {
		return err
	}
	b := sim.BasesFor(series.Units)
	if o.fs.Changed("hdd-base") {
		b.HDD = o.hddBase
	}
	if o.fs.Changed("cdd-base") {
		b.CDD = o.cddBase
	}
	opt := backtest.Options{Origins: o.origins, Periods: o.periods, Paths: o.paths, Seed: o.seed, Bases: b}
	if o.demand != "" {
		if opt.Demand, _, err = readDemandModel(o.demand); err != nil {
			return err
		}
		if err := opt.Demand.CheckUnits(string(series.Units)); err != nil {
			return usagef("backtest: %v", err) // two inputs that do not go together, as in simulate
		}
		if opt.Loads, err = calibrate.ReadDemandFile(o.load, calibrate.DemandReadOptions{}); err != nil {
			return err
		}
	}
	res, err := interruptible(ctx, func() (*backtest.Result, error) { return backtest.Run(ctx, series, opt) })
	if err != nil {
		return err
	}
	if o.report != "" {
		meta := report.BacktestMeta{Title: "Backtest of " + filepath.Base(o.temps), Created: time.Now(), Units: string(series.Units),
			Inputs: []report.InputFile{{Role: "temperatures", Name: o.temps, SHA256: series.SHA256}}}
		if err := plan.add(o.report, func(w io.Writer) error { return report.WriteBacktest(w, res, meta) }); err != nil {
			return err
		}
	}
	if err := plan.commit(ctx); err != nil {
		return err
	}
	if o.format == "json" {
		return render.BacktestJSON(stdout, res, map[string]any{"tool": "wxstress", "tool_version": version,
			"data_file": o.temps, "data_sha256": series.SHA256, "seed": o.seed, "paths": o.paths, "caution": render.Caution})
	}
	return render.BacktestTables(stdout, res, o.temps, string(series.Units))
}
