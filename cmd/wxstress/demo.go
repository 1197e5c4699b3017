package main

import (
	"bytes"
	"context"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"fmt"
	"io"

	"github.com/spf13/pflag"

	"wxstress/calibrate"
	"wxstress/cmd/wxstress/render"
	"wxstress/demo"
	"wxstress/scenarios"
	"wxstress/sim"
)

var demoUsage = helpText{
	usage: "wxstress demo [flags]",
	about: `Run the whole job on the built-in, invented record of ` + demo.StationName + `
(71 years of daily means, ` + demo.StationFile + `): fit the temperature model,
print its summary, simulate synthetic years for the year after the record ends
under today's climate and four built-in scenarios (warm-1c, trend-2050,
volatile-winter, cold-spell-10d), and print the tail tables side by side.
The data are invented for demonstration.`,
	examples: `  wxstress demo
  wxstress demo --paths 100000 --seed 7 --model-out kestrel_model.json`,
}

type demoOptions struct {
	modelOut string
	paths    int
	seed     uint64
}

func newDemoFlags(o *demoOptions) *pflag.FlagSet {
	fs := pflag.NewFlagSet("demo", pflag.ContinueOnError)
	fs.StringVar(&o.modelOut, "model-out", "", "also write the fitted model file here")
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
	series, err := calibrate.ReadCSV(bytes.NewReader(demo.Station()), demo.StationFile, calibrate.ReadOptions{Units: calibrate.Celsius})
	if err != nil {
		return fmt.Errorf("demo data: %w", err)
	}
	fmt.Fprintf(stdout, "wxstress demo: %s (invented data)\n\n== 1. Fit ==\n\n", demo.StationName)
	res, err := fitSeries(series, nil)
	if err != nil {
		return err
	}
	m := res.Model
	m.Data.Description = demo.StationName + " (invented demonstration data)"
	if err := emitFit(stdout, stderr, m, "table", o.modelOut); err != nil {
		return err
	}

	b, err := json.MarshalIndent(m, "", "  ")
	if err != nil {
		return err
	}
	sum := sha256.Sum256(append(b, '\n'))
	var scens []*scenarios.Scenario
	for _, name := range demoScenarios {
		sc, err := scenarios.Lookup(name)
		if err != nil {
			return err
		}
		scens = append(scens, sc)
	}
	cfg := sim.Config{Paths: o.paths, Seed: o.seed, Bases: sim.DefaultBases(m.Data.Units)}
	rep, out, err := simulateAll(ctx, stderr, m, cfg, scens, nil)
	if err != nil {
		return err
	}
	name := o.modelOut
	if name == "" {
		name = "(demo model, not written)"
	}
	rep.Manifest = manifest(m, name, hex.EncodeToString(sum[:]), out)
	rep.Manifest.Scenarios = demoScenarios
	fmt.Fprintf(stdout, "\n== 2. Simulate: baseline and scenarios ==\n\n")
	return render.SimTables(stdout, rep)
}

// demoScenarios are the built-in scenarios the demo runs beside the baseline.
var demoScenarios = []string{"warm-1c", "trend-2050", "volatile-winter", "cold-spell-10d"}
