package main

import (
	"context"
	"fmt"
	"io"

	"github.com/spf13/pflag"

	"wxstress/scenarios"
)

var scenariosUsage = helpText{
	usage: "wxstress scenarios [FILE.toml ...]",
	about: `List the built-in scenarios and what each changes, in units; with files, check
them (strictly: unknown keys, wrong types and out-of-range values are errors
with the file, line and key) and describe them. Use a scenario with
'wxstress simulate --scenario NAME|FILE'. Built-in scenarios are in °C; on a
°F model their degrees convert (1 °C = 1.8 °F).`,
	examples: `  wxstress scenarios
  wxstress scenarios scenarios/cold_spell.toml my_stress.toml`,
}

func newScenariosFlags() *pflag.FlagSet {
	return pflag.NewFlagSet("scenarios", pflag.ContinueOnError)
}

func runScenariosCmd(_ context.Context, args []string, stdout, _ io.Writer) error {
	fs := newScenariosFlags()
	fs.SetOutput(io.Discard)
	if err := fs.Parse(args); err != nil {
		if err == pflag.ErrHelp {
			writeUsage(stdout, scenariosUsage, fs)
			return errHelpShown
		}
		return usagef("scenarios: %v", err)
	}
	var list []scenarios.Scenario
	if fs.NArg() == 0 {
		fmt.Fprintln(stdout, "Built-in scenarios (use with: wxstress simulate --scenario NAME)")
		list = scenarios.Builtins()
	}
	for _, f := range fs.Args() {
		s, err := scenarios.Load(f)
		if err != nil {
			return err
		}
		list = append(list, *s)
	}
	for _, s := range list {
		fmt.Fprintf(stdout, "\n%s — %s\n", s.Name, s.Description)
		for _, line := range s.Describe() {
			fmt.Fprintf(stdout, "  • %s\n", line)
		}
	}
	return nil
}
