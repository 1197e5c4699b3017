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
trend-2050, volatile-winter, cold-spell-10d) with demand, and prints the fit
summaries, the tail tables, the planning tables, the scenario comparison and
the weather-normalized history. Its outputs (model.json, demand.json,
tails.json, tails.csv, paths.csv) go to a new directory (wxstress-demo, or
wxstress-demo-2, ... if that exists) or to --dir, which it never overwrites
without --force. The data are invented for demonstration.`,
	examples: `  wxstress demo
  wxstress demo --dir /tmp/kestrel --force --paths 100000 --seed 7`,
}

type demoOptions struct {
	dir   string
	force bool
	paths int
	seed  uint64
}

// demoCapacity is the invented retailer's contracted daily capacity, GJ/day.
const demoCapacity = 120000

func newDemoFlags(o *demoOptions) *pflag.FlagSet {
	fs := pflag.NewFlagSet("demo", pflag.ContinueOnError)
	fs.StringVar(&o.dir, "dir", "", "directory for the outputs (default: the first free of wxstress-demo, wxstress-demo-2, ...)")
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
	if o.paths <= 0 {
		return usagef("demo: --paths must be a positive number, got %d", o.paths)
	}
	if o.dir == "" {
		o.dir = freeDir("wxstress-demo")
	}
	if err := claimDir(o.dir, o.force); err != nil {
		return err
	}
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
		Scenarios: scens, Detail: stress.DetailPaths, Normals: true, History: true, ToolVersion: version,
		Uncertainty: &stress.Uncertainty{Refits: demoRefits},
	}
	stop := attachProgress(&job.Config, stderr, 1+len(scens))
	res, err := stress.Run(ctx, job)
	stop()
	if err != nil {
		return err
	}
	m, d, runs := res.Model, res.Demand, res.Set
	m.Data.Description = demo.StationName + " (invented demonstration data)"
	year := runs.Config.Year

	fmt.Fprintf(stdout, "wxstress demo: %s and %s (invented data)\n\n== 1. Temperature model ==\n\n",
		demo.StationName, demo.Retailer)
	modelPath := filepath.Join(o.dir, "model.json")
	if err := emitFit(stdout, stderr, m, "table", modelPath); err != nil {
		return err
	}
	fmt.Fprintf(stdout, "\n== 2. Demand model: %s ==\n\n", demo.Retailer)
	demandPath := filepath.Join(o.dir, "demand.json")
	if err := emitDemand(stdout, io.Discard, d, "table", demandPath); err != nil {
		return err
	}
	rep, out := render.NewSimReport(res), runs.Base
	rep.Manifest = manifest(m, modelPath, fileSHA(modelPath), out)
	rep.Manifest.Scenarios = demoScenarios
	rep.Manifest.DemandModel, rep.Manifest.DemandSHA256 = demandPath, fileSHA(demandPath)
	fmt.Fprintf(stdout, "\n== 3. Simulation: %d synthetic years of %d, baseline and scenarios, with demand ==\n\n", o.paths, year)
	if err := render.SimTables(stdout, rep); err != nil {
		return err
	}
	if err := writeSimDir(o.dir, rep, out); err != nil {
		return err
	}
	reportPath := filepath.Join(o.dir, "report.html")
	meta := report.Meta{
		Title:   fmt.Sprintf("%s and %s: %d synthetic years of %d (invented data)", demo.StationName, demo.Retailer, o.paths, year),
		Created: time.Now(), RunTime: time.Since(start),
		Inputs: []report.InputFile{
			{Role: "temperatures", Name: demo.StationFile, SHA256: series.SHA256},
			{Role: "demand history", Name: demo.DemandFile, SHA256: dem.SHA256},
			{Role: "model", Name: modelPath, SHA256: fileSHA(modelPath)},
			{Role: "demand model", Name: demandPath, SHA256: fileSHA(demandPath)},
		},
		Manifest: rep.Manifest, Retailer: demo.Retailer,
	}
	if err := writeReport(reportPath, res, meta); err != nil {
		return err
	}
	fmt.Fprintf(stdout, "\nOutputs in %s: model.json, demand.json, tails.json, tails.csv, paths.csv, report.html\n", o.dir)
	fmt.Fprintf(stdout, "Report: %s\n", reportPath)
	return nil
}

// demoRefits is the number of bootstrap refits behind the demo's parameter
// bands: enough for a 90 % band, few enough to keep the demo quick.
const demoRefits = 20

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

// claimDir makes dir for a run's outputs; an existing, non-empty dir is
// refused unless force is set.
func claimDir(dir string, force bool) error {
	entries, err := os.ReadDir(dir)
	switch {
	case errors.Is(err, fs.ErrNotExist):
		return os.MkdirAll(dir, 0o755)
	case err != nil:
		return err
	case len(entries) > 0 && !force:
		return fmt.Errorf("%s already exists and is not empty: choose another --dir, or --force to replace its outputs", dir)
	}
	return nil
}

// normalPaths is how many climatological years weather normalization
// simulates for each historical year.
