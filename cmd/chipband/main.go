// Command chipband plans 2.5D roughing toolpaths, checks the radial
// engagement of any G-code program and predicts cycle time on the user's
// machine.
//
// Usage:
//
//	chipband demo [-o DIR]
//	chipband plan JOB --strategy layered|banded -o OUT.nc [--report R.json]
//	chipband compare JOB [--machine M] [--json]
//	chipband time --machine M PROGRAM.nc [--json]
//	chipband check JOB PROGRAM.nc [--json]
//	chipband offset --distance D IN.wkt
//
// Exit status is 0 on success, 2 for bad input or usage and 1 for any other
// failure.
package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"os/signal"
	"sort"
)

// command is one subcommand of the tool.
type command struct {
	summary string
	run     func(ctx context.Context, args []string, stdout, stderr io.Writer) error
}

func commands() map[string]command {
	return map[string]command{
		"demo":    {"plan the built-in demo part both ways and write the pictures", runDemo},
		"plan":    {"plan one roughing strategy for a job and write G-code", runPlan},
		"compare": {"plan both strategies, time them and recommend one per feature", runCompare},
		"time":    {"predict the cycle time of a G-code program on a machine", runTime},
		"check":   {"simulate a G-code program and report its radial engagement", runCheck},
		"offset":  {"offset a WKT or GeoJSON shape by a distance", runOffset},
	}
}

// inputError marks a failure caused by the user's input (exit status 2).
type inputError struct{ err error }

func (e inputError) Error() string { return e.err.Error() }
func (e inputError) Unwrap() error { return e.err }

// badInput marks err as caused by the user's input or flags.
func badInput(err error) error {
	if err == nil {
		return nil
	}
	return inputError{err}
}

// badInputf formats a bad-input error.
func badInputf(format string, args ...any) error { return badInput(fmt.Errorf(format, args...)) }

func main() {
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	code := run(ctx, os.Args[1:], os.Stdout, os.Stderr)
	stop()
	os.Exit(code)
}

// run executes the tool with args and returns the exit status.
func run(ctx context.Context, args []string, stdout, stderr io.Writer) int {
	cmds := commands()
	if len(args) == 0 || args[0] == "-h" || args[0] == "--help" || args[0] == "help" {
		usage(stderr, cmds)
		if len(args) == 0 {
			return 2
		}
		return 0
	}
	c, ok := cmds[args[0]]
	if !ok {
		fmt.Fprintf(stderr, "chipband: unknown command %q\n", args[0])
		usage(stderr, cmds)
		return 2
	}
	err := c.run(ctx, args[1:], stdout, stderr)
	switch {
	case err == nil:
		return 0
	case errors.Is(err, flag.ErrHelp):
		return 0
	}
	fmt.Fprintf(stderr, "chipband %s: %v\n", args[0], err)
	var ie inputError
	if errors.As(err, &ie) {
		return 2
	}
	return 1
}

func usage(w io.Writer, cmds map[string]command) {
	fmt.Fprintln(w, "usage: chipband COMMAND [flags] [files]")
	fmt.Fprintln(w, "\ncommands:")
	names := make([]string, 0, len(cmds))
	for n := range cmds {
		names = append(names, n)
	}
	sort.Strings(names)
	for _, n := range names {
		fmt.Fprintf(w, "  %-8s %s\n", n, cmds[n].summary)
	}
	fmt.Fprintln(w, "\nRun 'chipband COMMAND --help' for the flags of one command.")
}

// newFlags returns a flag set for a subcommand whose errors are returned,
// not printed and exited on.
func newFlags(name, synopsis string, stderr io.Writer) *flag.FlagSet {
	fs := flag.NewFlagSet(name, flag.ContinueOnError)
	fs.SetOutput(stderr)
	fs.Usage = func() {
		fmt.Fprintf(stderr, "usage: chipband %s\n", synopsis)
		fs.PrintDefaults()
	}
	return fs
}

// parseFlags parses args allowing flags after positional arguments, and
// marks flag errors as bad input.
func parseFlags(fs *flag.FlagSet, args []string) ([]string, error) {
	var pos []string
	for {
		if err := fs.Parse(args); err != nil {
			if errors.Is(err, flag.ErrHelp) {
				return nil, err
			}
			return nil, badInput(err)
		}
		args = fs.Args()
		if len(args) == 0 {
			return pos, nil
		}
		pos = append(pos, args[0])
		args = args[1:]
	}
}
