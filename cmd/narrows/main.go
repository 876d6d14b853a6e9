// Command narrows finds where a road network fails the trips people make:
// pairs of districts between which vehicles travel in numbers, slowly and on
// long detours, day after day; and whether a change to the network (a new
// link road, a widened bridge) made such a weakness go away.
//
// Usage:
//
//	narrows regions  --osm FILE --out regions.geojson
//	narrows ingest   --regions regions.geojson --trips FILE... --out graphs.parquet
//	narrows place    --regions regions.geojson --trips SHARD --out placed/
//	narrows aggregate --regions regions.geojson --placed placed/ --out graphs.parquet
//	narrows scan     --graphs graphs.parquet --out findings.json
//	narrows compare  --graphs graphs.parquet --before D1..D2 --after D3..D4 --out report.xlsx
//	narrows run      study.toml
//	narrows demo     [--dir DIR]
//	narrows simulate --size town|city --out DIR
//
// Run "narrows help COMMAND" for a command's options.
package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"os/signal"
	"strings"
	"syscall"
)

// Exit codes.
const (
	exitOK    = 0
	exitError = 1 // bad input or a failed step
	exitUsage = 2 // bad command line
)

// version is the tool's version, written into every report.
const version = "0.1.0"

// command is one subcommand.
type command struct {
	name    string
	summary string
	// run parses args and does the work. It returns a usageError for
	// command-line mistakes.
	run func(ctx context.Context, env *environment, args []string) error
}

// environment is what a command may touch besides its arguments: kept in a
// struct so tests can run commands in-process with their own streams.
type environment struct {
	stdout, stderr io.Writer
	// interactive reports whether stderr is a terminal (progress bars).
	interactive bool
	// files is what the running command reads and writes (set by
	// dispatch for each command).
	files *runFiles
}

// usageError marks a command-line mistake (exit code 2).
type usageError struct{ msg string }

func (e usageError) Error() string { return e.msg }

func usagef(format string, args ...any) error { return usageError{fmt.Sprintf(format, args...)} }

func commands() []command {
	return []command{
		{"regions", "split an OpenStreetMap extract into regions bounded by major roads", runRegions},
		{"ingest", "project trips or GPS traces onto per-day region graphs", runIngest},
		{"place", "place one shard of trips in regions, local days and windows (ingest's first half, for parallel runs)", runPlace},
		{"aggregate", "aggregate placed trips into per-day region graphs (ingest's second half)", runAggregate},
		{"scan", "find the weak links that recur in one period", runScan},
		{"compare", "compare two periods and write the workbook, map layers and HTML page", runCompare},
		{"run", "run a whole study from a study file (TOML)", runStudy},
		{"check", "check a study file and its inputs without running it", runCheck},
		{"appraise", "re-route a finding's trips with candidate links and rank the links", runAppraise},
		{"explore", "explore a study on a local web page: refine the scan and save the choices", runExplore},
		{"demo", "generate a fictional town with a known weakness and run its study", runDemo},
		{"simulate", "generate a fictional town and simulated trips", runSimulate},
		{"version", "print the version", func(_ context.Context, env *environment, _ []string) error {
			fmt.Fprintln(env.stdout, "narrows", version)
			return nil
		}},
	}
}

func main() {
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	defer stop()
	// The first interrupt cancels the work (outputs are never half-written);
	// a second one, should a step not notice, ends the process at once.
	go func() {
		<-ctx.Done()
		stop()
	}()
	env := &environment{stdout: os.Stdout, stderr: os.Stderr, interactive: stderrIsTerminal()}
	os.Exit(dispatch(ctx, env, os.Args[1:]))
}

// dispatch runs the command named by args[0] and returns the exit code.
func dispatch(ctx context.Context, env *environment, args []string) int {
	if len(args) == 0 {
		printUsage(env.stderr)
		return exitUsage
	}
	name := args[0]
	if name == "help" || name == "-h" || name == "--help" || name == "-help" {
		if len(args) > 1 {
			return dispatch(ctx, env, []string{args[1], "--help"})
		}
		printUsage(env.stdout)
		return exitOK
	}
	for _, c := range commands() {
		if c.name != name {
			continue
		}
		cenv := *env
		cenv.files = newRunFiles(env.stderr)
		cenv.files.ctx = ctx
		err := c.run(ctx, &cenv, args[1:])
		if interrupted(ctx, env.stderr, name, err, cenv.files) {
			return exitInterrupted
		}
		switch {
		case err == nil:
			return exitOK
		case errors.Is(err, flag.ErrHelp):
			return exitOK
		}
		var ue usageError
		if errors.As(err, &ue) {
			fmt.Fprintf(env.stderr, "narrows %s: %s\nRun 'narrows help %s' for usage.\n", name, errorText(err), name)
			return exitUsage
		}
		fmt.Fprintf(env.stderr, "narrows %s: %s\n", name, errorText(err))
		return exitError
	}
	fmt.Fprintf(env.stderr, "narrows: unknown command %q\n\n", name)
	printUsage(env.stderr)
	return exitUsage
}

func printUsage(w io.Writer) {
	fmt.Fprintln(w, "narrows finds where a road network fails the trips people make.")
	fmt.Fprintln(w)
	fmt.Fprintln(w, "Usage: narrows COMMAND [options]")
	fmt.Fprintln(w)
	fmt.Fprintln(w, "Commands:")
	for _, c := range commands() {
		fmt.Fprintf(w, "  %-9s %s\n", c.name, c.summary)
	}
	fmt.Fprintln(w)
	fmt.Fprintln(w, "Run 'narrows help COMMAND' for a command's options.")
	fmt.Fprintln(w, "Start with 'narrows demo' to see a whole study on a fictional town.")
}

// newFlagSet returns a flag set that reports errors instead of exiting and
// prints its usage with a one-line synopsis.
func newFlagSet(env *environment, name, synopsis string) *flag.FlagSet {
	fs := flag.NewFlagSet(name, flag.ContinueOnError)
	fs.SetOutput(env.stderr)
	fs.Usage = func() {
		fmt.Fprintf(fs.Output(), "Usage: narrows %s %s\n\nOptions:\n", name, synopsis)
		fs.PrintDefaults()
	}
	return fs
}

// parseFlags parses args, turning flag errors into usage errors. --help
// returns flag.ErrHelp after printing usage to stdout.
func parseFlags(env *environment, fs *flag.FlagSet, args []string) error {
	return parseFlagsWithRest(env, fs, args, nil)
}

// listFlag is a repeatable string flag.
type listFlag []string

func (l *listFlag) String() string     { return fmt.Sprint([]string(*l)) }
func (l *listFlag) Set(s string) error { *l = append(*l, s); return nil }

// parseFlagsWithRest is parseFlags for commands that take a list of files:
// arguments that are not options, wherever they stand, go to rest. With
// rest nil, such an argument is a usage error.
func parseFlagsWithRest(env *environment, fs *flag.FlagSet, args []string, rest func([]string)) error {
	for _, a := range args {
		if a == "-h" || a == "--help" || a == "-help" {
			fs.SetOutput(env.stdout)
			fs.Usage()
			return flag.ErrHelp
		}
	}
	// Silence the flag package's own message; dispatch prints ours.
	fs.SetOutput(io.Discard)
	defer fs.SetOutput(env.stderr)
	for {
		if err := fs.Parse(args); err != nil {
			return flagError(err)
		}
		args = fs.Args()
		i := 0
		for i < len(args) && (len(args[i]) == 0 || args[i][0] != '-') {
			i++
		}
		if i > 0 {
			if rest == nil {
				return usagef("unexpected argument %q", args[0])
			}
			rest(args[:i])
		}
		if i == len(args) {
			return nil
		}
		args = args[i:]
	}
}

// flagError is a usage error with the flag package's message, the flag
// named with two dashes as in the rest of narrows' messages.
func flagError(err error) error {
	msg := err.Error()
	for _, before := range []string{"for flag -", "for -", "defined: -", "argument: -"} {
		if i := strings.Index(msg, before); i >= 0 {
			msg = msg[:i+len(before)] + "-" + msg[i+len(before):]
			break
		}
	}
	return usageError{msg}
}
