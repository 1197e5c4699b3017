package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"strings"

	"github.com/spf13/pflag"

	"wxstress/internal/render"
	"wxstress/scenarios"
	"wxstress/sim"
)

var scenariosUsage = helpText{
	usage: "wxstress scenarios [--model model.json [--year Y]] [NAME|FILE.toml ...]",
	about: `List the built-in scenarios and what each changes, in units; with files, check
them (strictly: unknown keys, wrong types and out-of-range values are errors
with the file, line and key; two scenarios may not share a name) and describe
them. With --model, each scenario is also applied to the model for the target
year, with the checks 'wxstress simulate' makes, and the description shows
what the scenario does to that model. Use a scenario with
'wxstress simulate --scenario NAME|FILE'. Built-in scenarios are in °C; on a
°F model their degrees convert (1 °C = 1.8 °F).`,
	examples: `  wxstress scenarios
  wxstress scenarios scenarios/cold_spell.toml my_stress.toml
  wxstress scenarios --model model.json --year 2030 my_stress.toml`,
}

type scenariosOptions struct {
	modelPath string
	year      int
}

func newScenariosFlags(o *scenariosOptions) *pflag.FlagSet {
	fs := pflag.NewFlagSet("scenarios", pflag.ContinueOnError)
	fs.StringVar(&o.modelPath, "model", "", "also apply each scenario to this model, as simulate does")
	fs.IntVar(&o.year, "year", 0, "with --model: target year (default: the year simulate would choose from the data end)")
	return fs
}

func runScenariosCmd(_ context.Context, args []string, stdout, _ io.Writer) error {
	var o scenariosOptions
	fs := newScenariosFlags(&o)
	fs.SetOutput(io.Discard)
	if err := fs.Parse(args); err != nil {
		if err == pflag.ErrHelp {
			writeUsage(stdout, scenariosUsage, fs)
			return errHelpShown
		}
		return usagef("scenarios: %v", err)
	}
	if o.year != 0 && o.modelPath == "" {
		return usagef("scenarios: --year needs --model")
	}
	if o.year != 0 && (o.year < 1800 || o.year > 2300) {
		return usagef("scenarios: --year %d: want a year in 1800..2300", o.year)
	}
	var list []*scenarios.Scenario
	if fs.NArg() == 0 {
		fmt.Fprintln(stdout, "Built-in scenarios (use with: wxstress simulate --scenario NAME)")
		for _, s := range scenarios.Builtins() {
			list = append(list, &s)
		}
	} else {
		var err error
		if list, err = scenarios.LookupAll(fs.Args()); errors.Is(err, scenarios.ErrUnknown) {
			return usagef("scenarios: %s", strings.TrimPrefix(err.Error(), scenarios.ErrUnknown.Error()+": "))
		} else if err != nil {
			return err
		}
	}
	describe := (*scenarios.Scenario).Describe
	var unsuited error // the first named built-in that does not suit the model
	if o.modelPath != "" {
		m, _, err := readModel(o.modelPath)
		if err != nil {
			return err
		}
		year := sim.TargetYear(m, o.year, nil)
		why := map[*scenarios.Scenario]string{}
		for _, s := range list {
			if _, err := s.Apply(m, year); errors.Is(err, scenarios.ErrUnsuited) {
				// Described as not for this model; an error only when named.
				msg := strings.TrimPrefix(err.Error(), scenarios.ErrUnsuited.Error()+": ")
				_, why[s], _ = strings.Cut(msg, "does not suit this model: ")
				if unsuited == nil && fs.NArg() > 0 {
					unsuited = usagef("scenarios: %s", msg)
				}
			} else if err != nil {
				return err
			}
		}
		describe = func(s *scenarios.Scenario) []string {
			if w, ok := why[s]; ok {
				return []string{"not for this model: " + w}
			}
			return s.DescribeFor(m, year)
		}
	}
	for i, s := range list {
		head := s.Name
		if s.Description != "" {
			head += " — " + s.Description
		}
		if f := s.File(); f != "" {
			head += " (" + f + ")"
		}
		if i > 0 || fs.NArg() == 0 {
			fmt.Fprintln(stdout) // a blank line between scenarios, and after the built-ins' title
		}
		fmt.Fprintf(stdout, "%s\n", render.Wrap(head, "  "))
		for _, line := range describe(s) {
			fmt.Fprintf(stdout, "%s\n", render.Wrap("  • "+line, "    "))
		}
	}
	return unsuited
}
