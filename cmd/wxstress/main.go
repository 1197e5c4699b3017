// Command wxstress calibrates a daily-temperature model to a station's
// history, simulates synthetic years from it, and reports degree-day and
// demand tails. Run "wxstress help" for the subcommands.
package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"os/signal"
	"strings"
	"syscall"

	"wxstress/stress"
)

// version is the tool version written into every output's manifest.
const version = "0.1.0"

// Exit codes.
const (
	exitOK          = 0
	exitFailure     = 1
	exitUsage       = 2
	exitInterrupted = 130
)

// command is one subcommand.
type command struct {
	name    string
	summary string
	run     func(ctx context.Context, args []string, stdout, stderr io.Writer) error
}

func commands() []command {
	return []command{
		{"demo", "run the whole job on built-in invented data", runDemoCmd},
		{"fit", "calibrate a temperature model to a daily CSV", runFitCmd},
		{"fit-demand", "fit a change-point demand model to daily load and temperature", runFitDemandCmd},
		{"simulate", "draw synthetic years and report degree-day and demand tail tables", runSimulateCmd},
		{"backtest", "check the pipeline out of sample on the record's last seasons", runBacktestCmd},
		{"scenarios", "list the built-in scenarios, or check scenario files", runScenariosCmd},
		{"version", "print the tool version", runVersionCmd},
		{"help", "show help for wxstress or a subcommand", runHelpCmd},
	}
}

func main() {
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	code := run(ctx, os.Args[1:], os.Stdout, os.Stderr)
	stop()
	os.Exit(code)
}

// run dispatches to a subcommand and maps its error to an exit code.
func run(ctx context.Context, args []string, stdout, stderr io.Writer) int {
	if len(args) == 0 {
		writeMainUsage(stderr)
		return exitUsage
	}
	name := args[0]
	switch name {
	case "-h", "--help":
		name = "help"
	case "--version":
		name = "version"
	}
	for _, c := range commands() {
		if c.name == name {
			out := &stickyWriter{w: stdout}
			err := c.run(ctx, args[1:], out, stderr)
			if err == nil && out.err != nil {
				err = fmt.Errorf("writing the output: %w", out.err)
			}
			return exitCode(err, ctx, stderr)
		}
	}
	fmt.Fprintf(stderr, "wxstress: unknown command %q\n\n", name)
	writeMainUsage(stderr)
	return exitUsage
}

// stickyWriter remembers the first write error, so that a command whose
// output could not be written (a closed pipe, a full disk) fails with exit 1
// even where it does not check each write.
type stickyWriter struct {
	w   io.Writer
	err error
}

func (s *stickyWriter) Write(p []byte) (int, error) {
	if s.err != nil {
		return 0, s.err
	}
	n, err := s.w.Write(p)
	if err != nil {
		s.err = err
	}
	return n, err
}

// usageError marks an error in how the tool was called (exit 2).
type usageError struct{ msg string }

func (e *usageError) Error() string { return e.msg }

func usagef(format string, a ...any) error { return &usageError{fmt.Sprintf(format, a...)} }

// errHelpShown means the help text was printed on request (exit 0).
var errHelpShown = errors.New("help shown")

func exitCode(err error, ctx context.Context, stderr io.Writer) int {
	var ue *usageError
	switch {
	case err == nil, errors.Is(err, errHelpShown):
		return exitOK
	case ctx.Err() != nil || errors.Is(err, context.Canceled):
		fmt.Fprintln(stderr, "wxstress: interrupted; no output was written")
		return exitInterrupted
	case errors.As(err, &ue):
		// The command's name first, kept although "backtest" and
		// "scenarios" are also package names cleanMessage drops.
		msg, help := cleanMessage(err.Error()), "wxstress help"
		if cmd, rest, ok := strings.Cut(err.Error(), ": "); ok && helpFor(err.Error()) != help {
			msg, help = cmd+": "+cleanMessage(rest), helpFor(err.Error())
		}
		fmt.Fprintf(stderr, "wxstress: %s\n(run '%s' for usage)\n", msg, help)
		return exitUsage
	case errors.Is(err, stress.ErrJob): // inputs that do not go together: how the tool was called
		msg := strings.Replace(cleanMessage(err.Error()), strings.TrimPrefix(stress.ErrJob.Error(), "stress: ")+": ", "", 1)
		fmt.Fprintf(stderr, "wxstress: %s\n(run 'wxstress help' for usage)\n", msg)
		return exitUsage
	}
	fmt.Fprintf(stderr, "wxstress: %s\n", cleanMessage(err.Error()))
	return exitFailure
}

// helpFor is the help command for a usage message: the command's own page
// when the message starts with the command's name ("simulate: ...").
func helpFor(msg string) string {
	if cmd, _, ok := strings.Cut(msg, ": "); ok {
		switch cmd {
		case "simulate", "fit", "fit-demand", "backtest", "scenarios", "demo":
			return "wxstress help " + cmd
		}
	}
	return "wxstress help"
}

// internalPackages are the package names library errors start with; a
// person reading a message has no use for them.
var internalPackages = map[string]bool{"backtest": true, "calendar": true, "calibrate": true, "diagnose": true,
	"evidence": true, "extremes": true, "hedge": true, "model": true, "outputs": true, "scenarios": true, "shocks": true,
	"sim": true, "statespace": true, "stress": true}

// cleanMessage drops the package prefixes ("stress: ", "sim: ") from the
// colon-separated parts of an error message.
func cleanMessage(msg string) string {
	parts := strings.Split(msg, ": ")
	out := parts[:0]
	for i, p := range parts {
		if internalPackages[p] && i < len(parts)-1 {
			continue
		}
		out = append(out, p)
	}
	return strings.Join(out, ": ")
}
