package main

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"time"

	"github.com/spf13/pflag"

	"wxstress/calibrate"
	"wxstress/demo"
	"wxstress/internal/numfmt"
	"wxstress/internal/render"
	"wxstress/internal/report"
	"wxstress/model"
	"wxstress/scenarios"
	"wxstress/sim"
	"wxstress/stress"
)

var demoUsage = helpText{
	usage: "wxstress demo [--dir DIR] [--force] [--paths N] [--seed S]",
	about: `Run the whole job on built-in, invented data: the 71-year daily record of
` + demo.StationName + ` and five years of ` + demo.Retailer + `'s daily gas send-out.
It fits the temperature model, fits the demand model, simulates the year after
the record under today's climate and four built-in scenarios (warm-1c,
trend-2050, volatile-winter, cold-spell-10d) with demand, design days and a
capacity, and prints a one-page summary of the key figures, the planner's
lines, the scenario comparison and the warnings (--detail: the fit summaries,
every tail table, the planning tables and the weather-normalized history).
Its outputs (model.json, demand.json, tails.json, tails.csv, paths.csv and
the HTML report report.html) go to a new directory (wxstress-demo, or
wxstress-demo-2, ... if that exists) or to --dir, which it never overwrites
without --force. The data are invented for demonstration.`,
	examples: `  wxstress demo
  wxstress demo --dir /tmp/kestrel --force --paths 100000 --seed 7
  wxstress demo --detail`,
}

type demoOptions struct {
	dir    string
	force  bool
	detail bool
	paths  int
	seed   uint64
}

// demoCapacity is the invented retailer's contracted daily capacity, GJ/day.
const demoCapacity = 120000

func newDemoFlags(o *demoOptions) *pflag.FlagSet {
	fs := pflag.NewFlagSet("demo", pflag.ContinueOnError)
	fs.StringVar(&o.dir, "dir", "", "directory for the outputs (default: the first free of wxstress-demo, wxstress-demo-2, ...)")
	fs.BoolVar(&o.detail, "detail", false, "print the fit summaries and the full tables instead of the one-page summary")
	fs.BoolVar(&o.force, "force", false, "replace the outputs in an existing directory")
	fs.IntVar(&o.paths, "paths", 10000, "number of synthetic years")
	fs.Uint64Var(&o.seed, "seed", 1, "random seed")
	return fs
}

func runDemoCmd(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	var o demoOptions
	if err := parseFlags(newDemoFlags(&o), demoUsage, args, stdout); err != nil {
		return err
	}
	if o.paths < stress.MinPaths || o.paths > stress.MaxPaths {
		return usagef("demo: --paths must be a number from %d to %d, got %d", stress.MinPaths, stress.MaxPaths, o.paths)
	}
	if o.dir == "" {
		o.dir = freeDir("wxstress-demo")
	}
	if err := claimDir(o.dir, o.force); err != nil {
		return err
	}
	plan := newOutputPlan(ctx, o.force)
	if err := plan.checkDir(o.dir, demoFiles...); err != nil {
		return err
	}
	defer plan.abort()
	start := time.Now()
	series, err := calibrate.ReadCSV(bytes.NewReader(demo.Station()), demo.StationFile, calibrate.ReadOptions{Units: calibrate.Celsius})
	if err != nil {
		return fmt.Errorf("demo data: %w", err)
	}
	dem, err := calibrate.ReadDemand(bytes.NewReader(demo.Demand()), demo.DemandFile, calibrate.DemandReadOptions{})
	if err != nil {
		return fmt.Errorf("demo data: %w", err)
	}
	var scens []*scenarios.Scenario
	for _, name := range demoScenarios {
		sc, err := scenarios.Lookup(name)
		if err != nil {
			return err
		}
		scens = append(scens, sc)
	}
	job := &stress.Job{
		Temps: series, Fit: &calibrate.Settings{},
		DemandHistory: dem, DemandFit: &calibrate.DemandSettings{Form: "auto", Unit: demo.DemandUnit},
		Config:    sim.Config{Paths: o.paths, Seed: o.seed, Bases: sim.BasesFor(model.Celsius), Capacity: demoCapacity},
		Scenarios: scens, Detail: stress.DetailPaths, Normals: true, History: true, Observed: true, ToolVersion: version,
		Uncertainty: &stress.Uncertainty{Refits: demoRefits}, MaxMemory: stress.DefaultMemoryLimit(),
		Design: demoDesign, CapacityTargets: []stress.CapacityTarget{demoTarget},
	}
	stop := attachProgress(&job.Config, stderr, 1+len(scens))
	res, err := runPipeline(ctx, job)
	stop()
	if err != nil {
		return err
	}
	m, d, runs := res.Model, res.Demand, res.Set
	m.Data.Description = demo.StationName + " (invented demonstration data)"
	year := runs.Config.Year

	modelPath, demandPath := filepath.Join(o.dir, "model.json"), filepath.Join(o.dir, "demand.json")
	modelJSON, err := m.MarshalIndent()
	if err != nil {
		return err
	}
	demandJSON, err := d.MarshalIndent()
	if err != nil {
		return err
	}
	rep, out := render.NewSimReport(res), runs.Base
	rep.Manifest = manifest(m, modelPath, bytesSHA(modelJSON), out)
	rep.Manifest.RunID = plan.runID()
	rep.Manifest.Scenarios = demoScenarios
	rep.Manifest.ParameterUncertainty = rep.Uncertainty
	rep.Manifest.Warnings = res.Warnings
	rep.Manifest.DemandModel, rep.Manifest.DemandSHA256 = filepath.Base(demandPath), bytesSHA(demandJSON)
	// The built-in record serves as the history and the season so far; the
	// demand history is its loads.
	rep.Manifest.Inputs = []render.ManifestInput{
		{Role: "station record (history, season under way)", File: demo.StationFile, SHA256: series.SHA256},
		{Role: "demand history (loads so far)", File: demo.DemandFile, SHA256: dem.SHA256},
	}
	reportPath := filepath.Join(o.dir, "report.html")
	meta := report.Meta{
		Title:   fmt.Sprintf("%s and %s: %s synthetic years of %d (invented data)", demo.StationName, demo.Retailer, numfmt.Number(float64(o.paths)), year),
		Created: time.Now(), RunTime: time.Since(start),
		Inputs: []report.InputFile{
			{Role: "temperatures", Name: demo.StationFile, SHA256: series.SHA256},
			{Role: "demand history", Name: demo.DemandFile, SHA256: dem.SHA256},
			{Role: "model", Name: modelPath, SHA256: rep.Manifest.ModelSHA256},
			{Role: "demand model", Name: demandPath, SHA256: rep.Manifest.DemandSHA256},
		},
		Manifest: rep.Manifest, Retailer: demo.Retailer,
	}
	if err := plan.addBytes(modelPath, modelJSON); err != nil {
		return err
	}
	if err := plan.addBytes(demandPath, demandJSON); err != nil {
		return err
	}
	if err := addSimDir(plan, o.dir, rep, out, true); err != nil {
		return err
	}
	if err := addReport(plan, reportPath, res, meta); err != nil {
		return err
	}
	if err := plan.commit(ctx); err != nil {
		return err
	}

	if !o.detail {
		fmt.Fprintf(stdout, "wxstress demo: %s and %s (invented data), heating season 2026\n", demo.StationName, demo.Retailer)
		fmt.Fprintf(stdout, "%s\n", render.Wrap("Demand: "+render.DemandLine(d), "  "))
		if err := render.SimSummary(stdout, rep, m); err != nil {
			return err
		}
	} else {
		fmt.Fprintf(stdout, "wxstress demo: %s and %s (invented data)\n\n== 1. Temperature model ==\n\n",
			demo.StationName, demo.Retailer)
		if err := emitFit(stdout, stderr, m, "table", res.Extremes...); err != nil {
			return err
		}
		fmt.Fprintf(stdout, "\nModel written to %s\n", modelPath)
		fmt.Fprintf(stdout, "\n== 2. Demand model: %s ==\n\n", demo.Retailer)
		if err := emitDemand(stdout, io.Discard, d, "table", nil); err != nil {
			return err
		}
		fmt.Fprintf(stdout, "\nDemand model written to %s\n", demandPath)
		fmt.Fprintf(stdout, "\n== 3. Simulation: %s synthetic years of %d, baseline and scenarios, with demand ==\n\n", numfmt.Number(float64(o.paths)), year)
		if err := render.SimTables(stdout, rep); err != nil {
			return err
		}
	}
	fmt.Fprintf(stdout, "\n%s\n", render.Wrap(fmt.Sprintf("Outputs in %s: model.json, demand.json, tails.json, tails.csv, paths.csv, report.html", o.dir), "  "))
	fmt.Fprintf(stdout, "Report: %s\n", reportPath)
	return nil
}

// demoFiles are the files the demo writes into its directory.
var demoFiles = []string{"model.json", "demand.json", "tails.json", "tails.csv", "paths.csv", "report.html"}

// demoRefits is the number of bootstrap refits behind the demo's parameter
// bands: enough for a 90 % band, few enough to keep the demo quick.
const demoRefits = 20

// demoDesign are the planning standards of the demo's design day, and
// demoTarget the peak-day capacity target it solves.
var (
	demoDesign = []float64{20, 50}
	demoTarget = stress.CapacityTarget{Kind: "peak", Value: 20, Text: "peak:1-in-20"}
)

// demoScenarios are the built-in scenarios the demo runs beside the baseline.
var demoScenarios = []string{"warm-1c", "trend-2050", "volatile-winter", "cold-spell-10d"}

// freeDir returns base, or base-2, base-3, ..., the first that does not
// exist yet.
func freeDir(base string) string {
	dir := base
	for i := 2; ; i++ {
		if _, err := os.Stat(dir); errors.Is(err, fs.ErrNotExist) {
			return dir
		}
		dir = fmt.Sprintf("%s-%d", base, i)
	}
}

// claimDir refuses an existing, non-empty dir unless force is set (the
// outputs make the directory when they are written).
func claimDir(dir string, force bool) error {
	entries, err := os.ReadDir(dir)
	switch {
	case errors.Is(err, fs.ErrNotExist):
		return nil
	case err != nil:
		return err
	case len(entries) > 0 && !force:
		return fmt.Errorf("%s already exists and is not empty: choose another --dir, or --force to replace its outputs", dir)
	}
	return nil
}

// normalPaths is how many climatological years weather normalization
// simulates for each historical year.
