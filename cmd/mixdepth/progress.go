package main

import (
	"io"

	"github.com/schollz/progressbar/v3"

	"mixdepth/runs"
)

// progressFlagHelp is the help of --progress in every command that runs
// instances.
const progressFlagHelp = "off a terminal, write a progress line (instances done, rate, time left) to stderr every 30 s from the start; without it such lines begin after a minute"

// startProgress shows the progress of total instances on stderr: a bar on a
// terminal, else a runs.Progress line every 30 s (after a quiet minute
// unless asked). tick records one finished instance; stop ends the display.
func startProgress(stderr io.Writer, asked bool, desc string, total int) (tick, stop func()) {
	if total <= 0 {
		return func() {}, func() {}
	}
	if isTerminal(stderr) {
		bar := progressbar.NewOptions(total, progressbar.OptionSetWriter(stderr),
			progressbar.OptionSetDescription(desc), progressbar.OptionShowCount(),
			progressbar.OptionClearOnFinish())
		return func() { _ = bar.Add(1) }, func() { _ = bar.Finish() }
	}
	p := runs.NewProgress(stderr, "instances", total, !asked)
	p.Start()
	return p.Done, p.Stop
}
