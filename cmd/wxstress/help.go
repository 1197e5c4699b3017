package main

import (
	"context"
	"fmt"
	"io"
	"strings"

	"github.com/spf13/pflag"
)

func writeMainUsage(w io.Writer) {
	fmt.Fprint(w, `wxstress — daily-temperature stress testing for energy demand

Usage:
  wxstress <command> [flags]

Commands:
`)
	for _, c := range commands() {
		fmt.Fprintf(w, "  %-10s %s\n", c.name, c.summary)
	}
	fmt.Fprint(w, `
Run 'wxstress help <command>' for a command's flags and examples.

Exit status: 0 success, 1 failure (bad data, I/O), 2 usage error, 130 interrupted.

Outputs are statistical scenarios, not forecasts.
`)
}

func runHelpCmd(_ context.Context, args []string, stdout, _ io.Writer) error {
	if len(args) == 0 {
		writeMainUsage(stdout)
		return nil
	}
	switch args[0] {
	case "fit":
		writeUsage(stdout, fitUsage, newFitFlags(&fitOptions{}))
	case "simulate":
		writeUsage(stdout, simulateUsage, newSimulateFlags(&simulateOptions{}))
	case "fit-demand":
		writeUsage(stdout, fitDemandUsage, newFitDemandFlags(&fitDemandOptions{}))
	case "scenarios":
		writeUsage(stdout, scenariosUsage, newScenariosFlags(new(scenariosOptions)))
	case "demo":
		writeUsage(stdout, demoUsage, newDemoFlags(&demoOptions{}))
	case "backtest":
		writeUsage(stdout, backtestUsage, newBacktestFlags(&backtestOptions{}))
	case "version", "help":
		writeMainUsage(stdout)
	default:
		return usagef("help: unknown command %q", args[0])
	}
	return nil
}

// helpText is a subcommand's hand-written usage: the text before and after
// the flag list.
type helpText struct {
	usage, about, examples string
}

func writeUsage(w io.Writer, h helpText, fs *pflag.FlagSet) {
	fmt.Fprintf(w, "Usage:\n  %s\n\n%s\n\nFlags:\n", h.usage, strings.TrimSpace(h.about))
	fs.SetOutput(w)
	fs.PrintDefaults()
	fmt.Fprintf(w, "\nExamples:\n%s\n\nExit status:\n  0 success, 1 failure (bad data, I/O), 2 usage error, 130 interrupted.\n",
		strings.TrimRight(h.examples, "\n"))
}

// parseFlags parses args and turns -h and flag errors into the right exits.
func parseFlags(fs *pflag.FlagSet, h helpText, args []string, stdout io.Writer) error {
	fs.SetOutput(io.Discard)
	if err := fs.Parse(args); err != nil {
		if err == pflag.ErrHelp {
			writeUsage(stdout, h, fs)
			return errHelpShown
		}
		return usagef("%s: %v", fs.Name(), err)
	}
	if fs.NArg() > 0 {
		return usagef("%s: unexpected argument %q", fs.Name(), fs.Arg(0))
	}
	return nil
}

func runVersionCmd(_ context.Context, args []string, stdout, _ io.Writer) error {
	if len(args) > 0 {
		return usagef("version takes no arguments")
	}
	fmt.Fprintf(stdout, "wxstress %s\n", version)
	return nil
}
