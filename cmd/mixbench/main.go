// Command mixbench measures, in one run and on the same cores, the memory
// bandwidth of the machine (a triad loop), the throughput of two-qubit gates
// on the state vector, the exact moment engine, an end-to-end scan, and —
// when Debian's python3-numpy is installed — the plain-numpy scan of
// scripts/numpy_scan.py doing the same work. It prints a table, or one JSON
// document with --json. Run it from the repository root as scripts/bench
// (or go run ./cmd/mixbench); --help lists the flags.
//
// Absolute times are not stable on a shared machine; the ratios measured in
// the same run are the figures to compare (bandwidth_fraction, numpy_ratio).
package main

import (
	"context"
	"errors"
	"fmt"
	"os"
	"os/signal"
	"syscall"
)

func main() {
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	defer stop()
	err := run(ctx, os.Args[1:], os.Stdout, os.Stderr)
	if err == nil {
		return
	}
	fmt.Fprintln(os.Stderr, "mixbench:", err)
	var ue usageError
	if errors.As(err, &ue) {
		os.Exit(2)
	}
	os.Exit(1)
}
