package main

import (
	"context"
	"fmt"
	"io"
	"path/filepath"
	"strconv"
	"time"

	"github.com/spf13/pflag"

	"wxstress/calendar"
	"wxstress/calibrate"
	"wxstress/internal/report"
	"wxstress/model"
	"wxstress/sim"
	"wxstress/stress"
)

var fitUsage = helpText{
	usage: "wxstress fit --temps FILE.csv [--out model.json] [flags]",
	about: `Calibrate the daily temperature model to a station's history: trend, seasonal
cycle (period 365.25 days), an anomaly with a fast AR part and a slow part
(weeks to months), monthly volatility and shock family, with diagnostics. The CSV needs a header with a date column (YYYY-MM-DD) and
either a daily mean column (tavg, tmean, temp, ...) or max and min columns
(tmax/tmin, temp_max/temp_min, max/min, ...); with both, the mean is
(max + min)/2 unless --mean-column names a column. Missing values (empty, NA,
NaN, -9999) are gaps.`,
	examples: `  wxstress fit --temps station.csv --out model.json
  wxstress fit --temps station.csv --units F --harmonics 2 --ar 2 --slow on --shocks t
  wxstress fit --temps station.csv --format json > model.json
  wxstress fit --temps station.csv --out model.json --report fit.html`,
}

type fitOptions struct {
	temps, out, format   string
	units, meanColumn    string
	harmonics, ar, trend string
	slow, shocks, report string
	force                bool
	settings             calibrate.Settings
	readOpts             calibrate.ReadOptions
}

func newFitFlags(o *fitOptions) *pflag.FlagSet {
	fs := pflag.NewFlagSet("fit", pflag.ContinueOnError)
	o.addFlags(fs)
	return fs
}

func (o *fitOptions) addFlags(fs *pflag.FlagSet) {
	fs.StringVar(&o.temps, "temps", "", "daily temperature CSV (required)")
	fs.StringVar(&o.out, "out", "", "write the model file (JSON) here")
	fs.StringVar(&o.format, "format", "table", "what to print: table or json (the model file)")
	fs.StringVar(&o.units, "units", "", "units of the data: C or F (default C; data that look like °F are flagged: a warning, or an error past ±60)")
	fs.StringVar(&o.meanColumn, "mean-column", "", "use this column as the daily mean instead of (max + min)/2")
	fs.StringVar(&o.harmonics, "harmonics", "auto", "seasonal harmonics: auto (by BIC) or 1..4")
	fs.StringVar(&o.ar, "ar", "auto", "AR order of the anomaly's fast part: auto (by BIC, with the slow part in the model) or 1..5")
	fs.StringVar(&o.slow, "slow", "auto", "slow part of the anomaly (weeks to months): auto (kept when a likelihood-ratio test or the spread check asks for it), on or none")
	fs.StringVar(&o.trend, "trend", "auto", "trend: auto (linear from 15 years of data), linear or none")
	fs.StringVar(&o.shocks, "shocks", "auto", "shock family: auto (by AIC), normal, t, skew-t or bootstrap")
	fs.StringVar(&o.report, "report", "", "also write an HTML report of the data and the fit here")
	fs.BoolVar(&o.force, "force", false, "replace existing output files")
}

// fitCheckPaths is the size of fit's check simulation: enough for the
// 1-in-50 coldest day to within a few hundredths of a degree.
const fitCheckPaths = 10000

func (o *fitOptions) validate() error {
	if o.temps == "" {
		return usagef("fit: --temps is required")
	}
	if o.format != "table" && o.format != "json" {
		return usagef("fit: --format %q: want table or json", o.format)
	}
	if o.units != "" {
		u, err := model.ParseUnits(o.units)
		if err != nil {
			return usagef("fit: --units %q: want C or F (also degC, degF, °C, °F)", o.units)
		}
		o.readOpts.Units = u
	}
	o.readOpts.MeanColumn = o.meanColumn
	if o.harmonics != "auto" {
		k, err := strconv.Atoi(o.harmonics)
		if err != nil || k < 1 || k > calibrate.MaxHarmonics {
			return usagef("fit: --harmonics %q: want auto or 1..%d", o.harmonics, calibrate.MaxHarmonics)
		}
		o.settings.Harmonics = k
	}
	if o.ar != "auto" {
		p, err := strconv.Atoi(o.ar)
		if err != nil || p < 1 || p > calibrate.MaxAROrder {
			return usagef("fit: --ar %q: want auto or 1..%d (season-to-season spread comes from --slow, not from more lags)",
				o.ar, calibrate.MaxAROrder)
		}
		o.settings.AROrder = p
	}
	switch o.slow {
	case calibrate.SlowAuto, calibrate.SlowOn, calibrate.SlowNone:
		o.settings.Slow = o.slow
	default:
		return usagef("fit: --slow %q: want auto, on or none", o.slow)
	}
	o.settings.Trend = o.trend
	o.settings.Shocks = o.shocks
	if err := o.settings.Validate(); err != nil {
		return usagef("fit: %v", err)
	}
	return nil
}

func runFitCmd(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	var o fitOptions
	if err := parseFlags(newFitFlags(&o), fitUsage, args, stdout); err != nil {
		return err
	}
	if err := o.validate(); err != nil {
		return err
	}
	plan := newOutputPlan(ctx, o.force, o.temps)
	if err := plan.check(o.out, o.report); err != nil {
		return err
	}
	defer plan.abort()
	start := time.Now()
	series, err := interruptible(ctx, func() (*calibrate.Series, error) { return calibrate.ReadFile(o.temps, o.readOpts) })
	if err != nil {
		return err
	}
	// A short simulation of the fitted model for the GEV check of its
	// extreme days against the record's own winter minima and summer maxima.
	// (Fifteen seasons at least: shorter records skip the check.)
	job := &stress.Job{Temps: series, Fit: &o.settings, ToolVersion: version}
	if float64(len(series.Temps)) >= 16*calendar.DaysPerYear {
		job.History = true
		job.Config = sim.Config{Paths: fitCheckPaths, Seed: 1, Periods: []string{"heating", "cooling"}, Bases: sim.BasesFor(series.Units)}
	}
	out, err := runPipeline(ctx, job)
	if err != nil {
		return err
	}
	m := out.Model
	if err := plan.addModel(o.out, m.MarshalIndent); err != nil {
		return err
	}
	if o.report != "" {
		meta := report.Meta{
			Title: "Temperature model of " + filepath.Base(o.temps), Created: time.Now(), RunTime: time.Since(start),
			Inputs: []report.InputFile{{Role: "temperatures", Name: o.temps, SHA256: series.SHA256}},
		}
		if err := addReport(plan, o.report, out, meta); err != nil {
			return err
		}
	}
	if err := plan.commit(ctx); err != nil {
		return err
	}
	if err := emitFit(stdout, stderr, m, o.format, out.Extremes...); err != nil {
		return err
	}
	if o.format != "json" {
		if o.out != "" {
			fmt.Fprintf(stdout, "\nModel written to %s\n", o.out)
		}
		if o.report != "" {
			fmt.Fprintf(stdout, "Report written to %s\n", o.report)
		}
	}
	return nil
}
