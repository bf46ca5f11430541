package main

import (
	"bytes"
	"context"
	"errors"
	"strings"
	"testing"
)

// TestRunArguments checks the argument handling of run: --help prints the
// flags and succeeds; bad flags, bad values and stray arguments are usage
// errors (exit status 2) that name the problem.
func TestRunArguments(t *testing.T) {
	var stdout, stderr bytes.Buffer
	if err := run(context.Background(), []string{"--help"}, &stdout, &stderr); err != nil {
		t.Fatalf("--help: %v", err)
	}
	for _, want := range []string{"Usage: scripts/bench", "--scan-grid", "--large-depths", "--cpuprofile"} {
		if !strings.Contains(stdout.String(), want) {
			t.Errorf("--help lacks %q:\n%s", want, stdout.String())
		}
	}
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"--no-such-flag"}, "no-such-flag"},
		{[]string{"--from", "twenty"}, "--from"},
		{[]string{"extra"}, `unexpected argument "extra"`},
		{[]string{"--workers", "0"}, "--workers 0"},
		{[]string{"--numpy", "on"}, `--numpy "on"`},
		{[]string{"--large", "line:4", "--large-depths", "1,x"}, `--large-depths "1,x"`},
		{[]string{"--large", "line:4", "--precision", "half"}, `--precision "half"`},
	} {
		stdout.Reset()
		err := run(context.Background(), c.args, &stdout, &stderr)
		var ue usageError
		if !errors.As(err, &ue) || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%v: %v, want a usage error naming %q", c.args, err, c.want)
		}
		if stdout.Len() > 0 {
			t.Errorf("%v: printed %q", c.args, stdout.String())
		}
	}
}

// TestRunLarge runs the quick configuration, a one-instance --large scan of
// line:4 at two depths (milliseconds), and checks its report: one header
// and one line per depth with the gate counts of the brickwork (line:4 has
// 2 gates in class A and 1 in class B, so 2 then 3 gates).
func TestRunLarge(t *testing.T) {
	var stdout, stderr bytes.Buffer
	args := []string{"--large", "line:4", "--large-depths", "1,2", "--workers", "1", "--precision", "single"}
	if err := run(context.Background(), args, &stdout, &stderr); err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(stdout.String()), "\n")
	if len(lines) != 3 {
		t.Fatalf("want 3 lines, got:\n%s", stdout.String())
	}
	if !strings.HasPrefix(lines[0], "line:4 (4 qubits), single precision, 1 workers: ") {
		t.Errorf("header %q", lines[0])
	}
	for i, want := range []string{"depth 1: gates 2, Z/Z_H ", "depth 2: gates 3, Z/Z_H "} {
		if !strings.HasPrefix(lines[i+1], want) {
			t.Errorf("line %d: %q, want it to start with %q", i+1, lines[i+1], want)
		}
	}
	if err := run(context.Background(), []string{"--large", "nonsense:3"}, &stdout, &stderr); err == nil {
		t.Error("--large with a bad graph succeeded")
	}
}
