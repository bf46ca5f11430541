package main

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"strings"
	"testing"

	"github.com/spf13/pflag"

	"mixdepth/moments"
	"mixdepth/scan"
	"mixdepth/sim"
)

// TestExitCode: exitCode maps errors to the exit statuses of the README
// (0 success, 1 a failure while running, 2 bad usage or input, 130
// interrupted), finding the library sentinels through any wrapping, and
// prints a non-nil error on one line.
func TestExitCode(t *testing.T) {
	wrap := func(err error) error { return fmt.Errorf("outer: %w", fmt.Errorf("inner\nsecond line: %w", err)) }
	for _, c := range []struct {
		name string
		err  error
		want int
	}{
		{"nil", nil, 0},
		{"help", pflag.ErrHelp, 0},
		{"usage", badInput("--depths x: bad"), 2},
		{"sim memory", wrap(sim.ErrTooLarge), 2},
		{"moments size", wrap(moments.ErrTooLarge), 2},
		{"no exact moments", wrap(moments.ErrNoExactMoments), 2},
		{"scan config", wrap(scan.ErrConfig), 2},
		{"interrupted", errInterrupted, 130},
		{"cancelled", wrap(context.Canceled), 130},
		{"other", errors.New("disk full"), 1},
	} {
		var stderr bytes.Buffer
		if got := exitCode(c.err, &stderr); got != c.want {
			t.Errorf("%s: exit %d, want %d", c.name, got, c.want)
		}
		out := stderr.String()
		if c.want == 0 {
			if out != "" {
				t.Errorf("%s: printed %q, want nothing", c.name, out)
			}
			continue
		}
		if !strings.HasPrefix(out, "mixdepth: ") || strings.Count(out, "\n") != 1 {
			t.Errorf("%s: printed %q, want one line starting with mixdepth:", c.name, out)
		}
	}
}
