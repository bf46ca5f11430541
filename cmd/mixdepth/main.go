package main

import (
	"context"
	"os"
	"os/signal"
	"syscall"

	"mixdepth/internal/atomicfile"
)

func main() {
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	defer stop()
	// The first signal asks the run to stop and save what is complete; a
	// second one ends the process at once, after removing the temporary
	// file of any table or plot being written, so that no half file stays.
	go func() {
		<-ctx.Done()
		stop()
		again := make(chan os.Signal, 1)
		signal.Notify(again, os.Interrupt, syscall.SIGTERM)
		<-again
		atomicfile.RemovePending()
		os.Stderr.WriteString("mixdepth: interrupted twice: stopped without saving\n")
		os.Exit(130)
	}()
	os.Exit(exitCode(run(ctx, os.Args[1:], os.Stdout, os.Stderr), os.Stderr))
}
