package main

import (
	"context"
	"fmt"
	"io"
	"strings"
	"unicode/utf8"

	"github.com/spf13/pflag"

	"wxstress/internal/render"
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

// wrapColumns is the width help pages keep within.
const wrapColumns = 100

// helpText is a subcommand's hand-written usage: the text before and after
// the flag list.
type helpText struct {
	usage, about, examples string
}

func writeUsage(w io.Writer, h helpText, fs *pflag.FlagSet) {
	fmt.Fprintf(w, "Usage:\n%s\n\n%s\n\nFlags:\n", fitLines("  "+h.usage), fitLines(strings.TrimSpace(h.about)))
	fmt.Fprint(w, fs.FlagUsagesWrapped(wrapColumns))
	fmt.Fprintf(w, "\nExamples:\n%s\n\nExit status:\n  0 success, 1 failure (bad data, I/O), 2 usage error, 130 interrupted.\n",
		fitLines(strings.TrimRight(h.examples, "\n")))
}

// fitLines keeps a help text within wrapColumns: a long command line is
// continued with a backslash (so that it still pastes into a shell), a long
// line of prose is wrapped with a hanging indent.
func fitLines(text string) string {
	lines := strings.Split(text, "\n")
	for i, l := range lines {
		if utf8.RuneCountInString(l) <= wrapColumns {
			continue
		}
		if body := strings.TrimLeft(l, " "); strings.HasPrefix(body, "wxstress ") {
			lines[i] = continueCommand(l)
		} else {
			lines[i] = render.Wrap(l, l[:len(l)-len(body)]+"  ")
		}
	}
	return strings.Join(lines, "\n")
}

// continueCommand breaks a shell command between its flags (a flag stays
// with its value) so that no line passes wrapColumns, ending each broken
// line with " \\".
func continueCommand(cmd string) string {
	lead := cmd[:len(cmd)-len(strings.TrimLeft(cmd, " "))]
	var groups []string
	for _, word := range strings.Fields(cmd) {
		if n := len(groups); n > 0 && !strings.HasPrefix(word, "-") && strings.HasPrefix(groups[n-1], "-") &&
			!strings.Contains(groups[n-1], " ") {
			groups[n-1] += " " + word // the flag's value
			continue
		}
		groups = append(groups, word)
	}
	var out []string
	line := lead
	for _, g := range groups {
		switch {
		case strings.TrimSpace(line) == "":
			line += g
		case utf8.RuneCountInString(line+" "+g) > wrapColumns-2:
			out = append(out, line+" \\")
			line = lead + "    " + g
		default:
			line += " " + g
		}
	}
	return strings.Join(append(out, line), "\n")
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
