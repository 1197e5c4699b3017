package main

import (
	"context"
	"fmt"
	"io"
	"strings"

	"github.com/spf13/pflag"

	"wxstress/calibrate"
	"wxstress/model"
	"wxstress/stress"
)

var fitDemandUsage = helpText{
	usage: "wxstress fit-demand --temps FILE.csv --demand FILE.csv --load-unit UNIT [--out demand.json] [flags]",
	about: `Fit a change-point model of daily demand to the daily mean temperature:

  D = β0 + weekday terms + βhol·holiday + βH·max(TbH − T, 0) + βC·max(T − TbC, 0) + u

with Monday the reference day and u an AR(1). The forms are the inverse
change-point models of ASHRAE Guideline 14: heating-only, cooling-only, heating-and-cooling (one
balance point, a slope on either side) and heating-and-cooling-band (TbH ≤ TbC, flat between).
Balance points are searched in 0.1° steps between the 5th and 95th
percentiles of temperature; the form is chosen by BIC unless --form fixes it.
The summary shows the BIC of every form, the coefficients with standard
errors, R², CV(RMSE) and NMBE beside the guideline's calibration levels, and
residual diagnostics.

The demand CSV needs a header with a date column (YYYY-MM-DD) and a load
column (load, demand, consumption or value), and may have a holiday column
(1/0, true/false, yes/no). Empty, NA and -9999 loads are gaps. --holidays adds
a holiday list of dates and yearly rules: one per line, or CSV with a date
column, a rule column or both (and optionally a name column). A date is
YYYY-MM-DD; a rule is one of
  fixed 12-25      25 December every year
  4 Thu Nov        fourth Thursday of November (1..4; 1st..4th; first..fourth)
  last Mon May     last Monday of May
  easter -2        Easter Sunday −2 days (easter, easter +1, easter +39, ...)
Rules give their day in every year of the demand record.
The temperature CSV is read as by 'wxstress fit'; every demand day must lie
within it, and days without a temperature are left out.`,
	examples: `  wxstress fit-demand --temps station.csv --demand sendout.csv --load-unit GJ/day --out demand.json
  wxstress fit-demand --temps station.csv --demand meter.csv --load-column sendout_gj --load-unit GJ/day
  wxstress fit-demand --temps station.csv --demand load.csv --load-unit MWh/day --holidays holidays.txt --form heating-and-cooling-band
  wxstress fit-demand --temps station.csv --demand load.csv --load-unit MWh/day --units F --format json
  wxstress fit-demand --temps station.csv --demand sendout.csv --load-unit GJ/day --model model.json`,
}

type fitDemandOptions struct {
	temps, demand, holidays string
	loadColumn              string
	unit, form, units       string
	out, format             string
	modelPath               string
	noise                   string
	force                   bool
	settings                calibrate.DemandSettings
	readOpts                calibrate.ReadOptions
}

func newFitDemandFlags(o *fitDemandOptions) *pflag.FlagSet {
	fs := pflag.NewFlagSet("fit-demand", pflag.ContinueOnError)
	o.addFlags(fs)
	return fs
}

func (o *fitDemandOptions) addFlags(fs *pflag.FlagSet) {
	fs.StringVar(&o.temps, "temps", "", "daily temperature CSV (required)")
	fs.StringVar(&o.demand, "demand", "", "daily demand CSV: date, load and an optional holiday column (required)")
	fs.StringVar(&o.unit, "load-unit", "", "unit of the loads, e.g. GJ/day or MWh/day (required; recorded in the model)")
	fs.StringVar(&o.loadColumn, "load-column", "", "the demand CSV's load column (default: one named load, demand, consumption or value)")
	fs.StringVar(&o.holidays, "holidays", "", "holiday dates and rules (fixed 12-25, 4 Thu Nov, last Mon May, easter -2): one per line, or CSV with a date and/or rule column")
	fs.StringVar(&o.noise, "noise", "auto", "scale of the residual noise: auto (by AIC), constant, load (in proportion to the expected load: the multiplicative form) or bands (σ by temperature quarter)")
	fs.StringVar(&o.form, "form", "auto", "change-point form: auto (by BIC), "+strings.Join(model.DemandFormNames(), ", "))
	fs.StringVar(&o.units, "units", "", "units of the temperatures: C or F (default C; data that look like °F are flagged: a warning, or an error past ±60)")
	fs.StringVar(&o.out, "out", "", "write the demand model file (JSON) here")
	fs.StringVar(&o.format, "format", "table", "what to print: table or json (the model file)")
	fs.BoolVar(&o.force, "force", false, "replace an existing output file")
	fs.StringVar(&o.modelPath, "model", "", "temperature model of the same station (from 'wxstress fit'): adds each year's weather-normalized demand")
}

func (o *fitDemandOptions) validate() error {
	switch {
	case o.temps == "":
		return usagef("fit-demand: --temps is required")
	case o.demand == "":
		return usagef("fit-demand: --demand is required")
	case strings.TrimSpace(o.unit) == "":
		return usagef("fit-demand: --load-unit is required: the unit of the loads, e.g. GJ/day or MWh/day")
	}
	if o.format != "table" && o.format != "json" {
		return usagef("fit-demand: --format %q: want table or json", o.format)
	}
	if o.form != "auto" && !model.DemandForm(o.form).Valid() {
		return usagef("fit-demand: --form %q: want auto, %s", o.form, strings.Join(model.DemandFormNames(), ", "))
	}
	if o.units != "" {
		u, err := model.ParseUnits(o.units)
		if err != nil {
			return usagef("fit-demand: --units %q: want C or F (also degC, degF, °C, °F)", o.units)
		}
		o.readOpts.Units = u
	}
	switch o.noise {
	case "auto", "constant", "load", "bands":
	default:
		return usagef("fit-demand: --noise %q: want auto, constant, load or bands", o.noise)
	}
	o.settings = calibrate.DemandSettings{Form: o.form, Unit: strings.TrimSpace(o.unit), Noise: o.noise}
	return nil
}

func runFitDemandCmd(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	var o fitDemandOptions
	if err := parseFlags(newFitDemandFlags(&o), fitDemandUsage, args, stdout); err != nil {
		return err
	}
	if err := o.validate(); err != nil {
		return err
	}
	plan := newOutputPlan(ctx, o.force, o.temps, o.demand, o.holidays, o.modelPath)
	if err := plan.check(o.out); err != nil {
		return err
	}
	defer plan.abort()
	temps, err := interruptible(ctx, func() (*calibrate.Series, error) { return calibrate.ReadFile(o.temps, o.readOpts) })
	if err != nil {
		return err
	}
	dopt := calibrate.DemandReadOptions{LoadColumn: o.loadColumn}
	if o.holidays != "" {
		if dopt.Holidays, err = calibrate.ReadHolidaysFile(o.holidays); err != nil {
			return err
		}
		dopt.HolidaysName = o.holidays
	}
	demand, err := calibrate.ReadDemandFile(o.demand, dopt)
	if err != nil {
		return err
	}
	job := &stress.Job{Temps: temps, DemandHistory: demand, DemandFit: &o.settings, ToolVersion: version}
	if o.modelPath != "" && o.format != "json" {
		if job.Model, _, err = readModel(o.modelPath); err != nil {
			return err
		}
		job.Normals, job.Config.Seed = true, 1
	}
	out, err := runPipeline(ctx, job)
	if err != nil {
		return err
	}
	m := out.Demand
	if err := plan.addModel(o.out, m.MarshalIndent); err != nil {
		return err
	}
	if err := plan.commit(ctx); err != nil {
		return err
	}
	if err := emitDemand(stdout, stderr, m, o.format, out.Normals); err != nil {
		return err
	}
	if o.out != "" && o.format != "json" {
		fmt.Fprintf(stdout, "\nDemand model written to %s\n", o.out)
	}
	return nil
}
