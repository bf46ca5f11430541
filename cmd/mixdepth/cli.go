package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"mixdepth/internal/crash"
	"os"
	"slices"
	"strings"

	"github.com/spf13/pflag"

	"mixdepth/circuits"
	"mixdepth/moments"
	"mixdepth/runs"
	"mixdepth/sampling"
	"mixdepth/scan"
	"mixdepth/sim"
	"mixdepth/tables"
)

// version is the tool version recorded in every table.
const version = runs.Version

// command is one subcommand.
type command struct {
	name    string
	summary string
	run     func(ctx context.Context, args []string, stdout, stderr io.Writer) error
}

// commands is filled by the init functions of the subcommand files.
var commands []command

func register(c command) { commands = append(commands, c) }

// usageError marks bad usage or bad input: exit status 2.
type usageError struct{ err error }

func (e usageError) Error() string { return e.err.Error() }
func (e usageError) Unwrap() error { return e.err }

// badInput wraps err (or a formatted message) as a usage error.
func badInput(format string, args ...any) error {
	return usageError{fmt.Errorf(format, args...)}
}

// errInterrupted ends a run stopped by a signal: exit status 130.
var errInterrupted = errors.New("interrupted")

// badInputErrors are the library sentinels that mean bad input (exit
// status 2): the request cannot be run as given, and the message says why.
// This is the one place where library errors become exit statuses.
var badInputErrors = []error{
	sim.ErrTooLarge, tables.ErrDamaged, runs.ErrValue,
	moments.ErrTooLarge,
	moments.ErrNoExactMoments, moments.ErrEngine, moments.ErrOrder, circuits.ErrNoiseRate,
	scan.ErrConfig,
	circuits.ErrCalibration,
	sampling.ErrConfig, sampling.ErrNoiseRange, sampling.ErrCircuitFile, sampling.ErrCircuitMismatch, sampling.ErrEmpty, sampling.ErrColumn, sampling.ErrColumnType, sampling.ErrNull, sampling.ErrNotNumber, sampling.ErrBitstring, sampling.ErrInstance, sampling.ErrProbability, sampling.ErrMismatch,
}

// exitCode prints err on one line and returns the exit status: 0 success,
// 1 a failure while running, 2 bad usage or input (a usageError or one of
// badInputErrors), 130 interrupted, exitPanic (70) a crash inside the tool,
// printed with its stack after the message.
func exitCode(err error, stderr io.Writer) int {
	if err == nil || errors.Is(err, pflag.ErrHelp) {
		return 0
	}
	msg := strings.ReplaceAll(err.Error(), "\n", " ")
	fmt.Fprintln(stderr, "mixdepth: "+msg)
	var ue usageError
	var pe *crash.Error
	switch {
	case errors.As(err, &pe):
		stderr.Write(pe.Stack) // for the bug report
		return exitPanic
	case errors.As(err, &ue), slices.ContainsFunc(badInputErrors, func(s error) bool { return errors.Is(err, s) }):
		return 2
	case errors.Is(err, errInterrupted), errors.Is(err, context.Canceled):
		return 130
	}
	return 1
}

// run dispatches to a subcommand. A panic in the command's goroutine
// becomes a *crash.Error (exit status exitPanic), and a failed write of the
// report to stdout an error (exit status 1) even when the command ignored it.
func run(ctx context.Context, args []string, stdout, stderr io.Writer) (err error) {
	defer recovered(&err)
	out := &reportWriter{w: stdout}
	err = dispatch(ctx, args, out, stderr)
	if err == nil && out.err != nil {
		err = fmt.Errorf("writing the report to standard output: %w", out.err)
	}
	return err
}

// dispatch runs the subcommand named by args[0].
func dispatch(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	if len(args) == 0 || args[0] == "help" || args[0] == "-h" || args[0] == "--help" {
		if len(args) > 1 {
			return run(ctx, []string{args[1], "--help"}, stdout, stderr)
		}
		printOverview(stdout)
		return nil
	}
	if args[0] == "version" || args[0] == "--version" {
		fmt.Fprintln(stdout, "mixdepth", version)
		return nil
	}
	i := slices.IndexFunc(commands, func(c command) bool { return c.name == args[0] })
	if i < 0 {
		return badInput("unknown command %q: run 'mixdepth help' for the list", args[0])
	}
	return commands[i].run(ctx, args[1:], stdout, stderr)
}

func printOverview(w io.Writer) {
	fmt.Fprintln(w, "mixdepth: how deep must random circuits on your chip be?")
	fmt.Fprintln(w)
	fmt.Fprintln(w, "Usage: mixdepth COMMAND [flags]   (mixdepth help COMMAND for its flags)")
	fmt.Fprintln(w)
	fmt.Fprintln(w, "Commands:")
	for _, c := range commands {
		fmt.Fprintf(w, "  %-10s %s\n", c.name, c.summary)
	}
}

// newFlags returns a flag set whose --help prints usage, example and flags.
// synopsis is the command name followed by its arguments, if it takes any
// ("score FILE", "merge --out FILE PART..."); the flag set is named by its
// first word, and --help prints "Usage: mixdepth SYNOPSIS [flags]" once, so
// usage should not repeat it.
func newFlags(synopsis, usage, example string, stdout io.Writer) *pflag.FlagSet {
	name, _, _ := strings.Cut(synopsis, " ")
	fs := pflag.NewFlagSet(name, pflag.ContinueOnError)
	fs.SortFlags = false
	fs.SetOutput(io.Discard)
	fs.Usage = func() {
		fmt.Fprintf(stdout, "Usage: mixdepth %s [flags]\n\n%s\n\nExample:\n  %s\n\nFlags:\n", synopsis, usage, example)
		fs.SetOutput(stdout)
		fs.PrintDefaults()
		fs.SetOutput(io.Discard)
	}
	return fs
}

// parseFlags parses args; errors become usage errors, --help prints usage.
// Numeric flags are read strictly (strictFlags).
func parseFlags(fs *pflag.FlagSet, args []string) error {
	strictFlags(fs)
	if err := fs.Parse(args); err != nil {
		if errors.Is(err, pflag.ErrHelp) {
			return err // pflag has printed the usage
		}
		return badInput("%s: %v (see 'mixdepth help %s')", fs.Name(), err, fs.Name())
	}
	return nil
}

// commandLine is the command line recorded in table metadata.
func commandLine() string { return strings.Join(os.Args, " ") }
