package main

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"runtime"
	"runtime/pprof"
	"strings"

	"github.com/spf13/pflag"

	"mixdepth/scan"
)

// usageError is a bad flag or flag value: exit status 2.
type usageError struct{ error }

func (e usageError) Unwrap() error { return e.error }

// run is the whole program: it parses args (without the program name),
// writes the table or the JSON document to stdout and progress to stderr.
// --help prints the flags to stdout and returns nil; a bad flag returns a
// usageError.
func run(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	fs := pflag.NewFlagSet("mixbench", pflag.ContinueOnError)
	fs.SetOutput(io.Discard)
	fs.Usage = func() {
		fmt.Fprintf(stdout, "Usage: scripts/bench [flags]  (or go run ./cmd/mixbench [flags], from the repository root)\n\n"+
			"Measures memory bandwidth, gate throughput, the moment engine and an end-to-end scan on this machine.\n\nFlags:\n")
		fs.SetOutput(stdout)
		fs.PrintDefaults()
		fs.SetOutput(io.Discard)
	}
	asJSON := fs.Bool("json", false, "print one JSON document instead of the table")
	from := fs.Int("from", 20, "smallest state size (qubits) for gate throughput")
	to := fs.Int("to", 26, "largest state size (qubits) for gate throughput")
	grid := fs.String("scan-grid", "4x6", "grid of the end-to-end scan (RxC)")
	depth := fs.Int("scan-depth", 20, "the scan reads out depths 1..this")
	instances := fs.Int("scan-instances", 2, "instances of the scan")
	numpy := fs.String("numpy", "auto", "auto: run the numpy baseline when python3 has numpy; off: skip it")
	momentN := fs.String("moments", "24,26", "qubit counts for the moment engine")
	mpsBonds := fs.String("mps-bonds", "16,32,64,128", "bond dimensions for the MPS two-site update")
	workers := fs.Int("workers", runtime.NumCPU(), "goroutines for every measurement")
	large := fs.String("large", "", "only run a one-instance scan of GRAPH (e.g. grid:5x6, line:31) at --large-depths and report its time")
	largeDepths := fs.String("large-depths", "1", "depths of the --large scan: a list like 1,2,4")
	precision := fs.String("precision", "double", "precision of the --large scan: double or single")
	targets := fs.Int("targets", 3, "rounds of each performance target (scan depths, read-out, fused brickwork, demo, noisy sampling), each a ratio of two timings alternated in one run; 0 skips them")
	profile := fs.String("cpuprofile", "", "write a CPU profile (go tool pprof) of the whole run to FILE")
	if err := fs.Parse(args); err != nil {
		if errors.Is(err, pflag.ErrHelp) {
			return nil // the usage went to stdout
		}
		return usageError{fmt.Errorf("%v (see 'scripts/bench --help')", err)}
	}
	if fs.NArg() > 0 {
		return usageError{fmt.Errorf("unexpected argument %q: every setting is a flag (see 'scripts/bench --help')", fs.Arg(0))}
	}
	if *workers < 1 {
		return usageError{fmt.Errorf("--workers %d: give at least 1", *workers)}
	}
	if *targets < 0 {
		return usageError{fmt.Errorf("--targets %d: give 0 (skip) or more rounds", *targets)}
	}
	if *numpy != "auto" && *numpy != "off" {
		return usageError{fmt.Errorf("--numpy %q: give auto or off", *numpy)}
	}
	if *profile != "" {
		f, err := os.Create(*profile)
		if err != nil {
			return err
		}
		if err := pprof.StartCPUProfile(f); err != nil {
			f.Close()
			return err
		}
		defer func() {
			pprof.StopCPUProfile()
			f.Close()
		}()
	}
	if *large != "" {
		depths, err := parseDepths(*largeDepths)
		if err != nil {
			return usageError{err}
		}
		prec := scan.Precision(*precision)
		if prec != scan.PrecisionDouble && prec != scan.PrecisionSingle {
			return usageError{fmt.Errorf("--precision %q: give double or single", *precision)}
		}
		return largeScan(ctx, stdout, *large, depths, prec, *workers)
	}
	r, err := measure(ctx, stderr, benchConfig{
		from: *from, to: *to, moments: *momentN, mpsBonds: *mpsBonds, grid: *grid, depth: *depth, instances: *instances,
		numpy: *numpy != "off", workers: *workers, targets: *targets,
	})
	if err != nil {
		return err
	}
	if *asJSON {
		enc := json.NewEncoder(stdout)
		enc.SetIndent("", "  ")
		return enc.Encode(r)
	}
	printTable(stdout, r)
	return nil
}

// parseDepths reads a comma-separated list of depths such as 1,2,4.
func parseDepths(list string) ([]int, error) {
	var depths []int
	for _, f := range strings.Split(list, ",") {
		var d int
		if _, err := fmt.Sscan(f, &d); err != nil {
			return nil, fmt.Errorf("--large-depths %q: %w", list, err)
		}
		depths = append(depths, d)
	}
	return depths, nil
}
