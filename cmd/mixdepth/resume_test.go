package main

import (
	"bytes"
	"context"
	"math"
	"path/filepath"
	"reflect"
	"slices"
	"strings"
	"testing"
	"time"

	"mixdepth/tables"
)

// TestInterruptAndResume: a scan stopped by a signal (a cancelled context)
// exits 130 and leaves a valid table marked partial that holds whole
// instances only; --resume with the same flags completes it to exactly the
// rows of an uninterrupted run (per-instance streams keyed by (seed, instance)).
func TestInterruptAndResume(t *testing.T) {
	dir := t.TempDir()
	flags := []string{"scan", "--graph", "grid:3x4", "--depths", "2,6,12", "--instances", "600", "--seed", "9"}
	full := filepath.Join(dir, "full.parquet")
	if _, stderr, code := runCLI(t, append(flags, "--out", full)...); code != 0 {
		t.Fatalf("uninterrupted run: %s", stderr)
	}
	want, err := tables.Read(full)
	if err != nil {
		t.Fatal(err)
	}

	for _, delay := range []time.Duration{0, 150 * time.Millisecond} {
		part := filepath.Join(dir, "part.parquet")
		ctx, cancel := context.WithCancel(context.Background())
		if delay == 0 {
			cancel() // stopped before any instance finished
		} else {
			time.AfterFunc(delay, cancel)
		}
		var out, errb bytes.Buffer
		code := exitCode(run(ctx, append(flags, "--out", part), &out, &errb), &errb)
		cancel()
		got, err := tables.Read(part)
		if err != nil {
			t.Fatalf("delay %v: the partial table is not readable: %v", delay, err)
		}
		partial, _ := got.Meta.Get("partial")
		if code == 0 && delay > 0 {
			t.Logf("the run finished within %v; only the resume of a complete table is checked", delay)
		} else if code != 130 || partial != "true" {
			t.Fatalf("delay %v: exit %d, partial=%q; want 130 and true (%s)", delay, code, partial, errb.String())
		}
		// Whole instances only: every instance present has all three depths.
		inst, _ := got.Int64s("instance")
		count := map[int64]int{}
		for _, id := range inst {
			count[id]++
		}
		for id, c := range count {
			if c != 3 {
				t.Fatalf("instance %d has %d of 3 depths in the partial table", id, c)
			}
		}
		if _, stderr, code := runCLI(t, append(flags, "--resume", part)...); code != 0 {
			t.Fatalf("resume: exit %d: %s", code, stderr)
		}
		got, err = tables.Read(part)
		if err != nil {
			t.Fatal(err)
		}
		if got.Len() != want.Len() {
			t.Fatalf("resumed table has %d rows, want %d", got.Len(), want.Len())
		}
		for c := range want.Fields {
			switch w := want.Columns[c].(type) {
			case []int64:
				g := got.Columns[c].([]int64)
				for i := range w {
					if g[i] != w[i] {
						t.Fatalf("column %s row %d: %d vs %d", want.Fields[c].Name, i, g[i], w[i])
					}
				}
			case []float64:
				g := got.Columns[c].([]float64)
				for i := range w {
					if math.Float64bits(g[i]) != math.Float64bits(w[i]) {
						t.Fatalf("column %s row %d: %v vs %v", want.Fields[c].Name, i, g[i], w[i])
					}
				}
			}
		}
		if p, _ := got.Meta.Get("partial"); p != "false" {
			t.Errorf("resumed table still partial=%q", p)
		}
	}
}

// TestResumeExtends: a finished table continued with --resume and a larger
// --instances gains the new instances with their own streams, so its rows
// are those of a fresh run of the larger count, bit for bit; for a part too.
// Any other changed parameter, or a smaller count, is bad input naming it.
func TestResumeExtends(t *testing.T) {
	dir := t.TempDir()
	base := []string{"scan", "--graph", "grid:2x3", "--depths", "1,3,6", "--seed", "4", "--workers", "1"}
	with := func(extra ...string) []string { return append(slices.Clone(base), extra...) }
	for _, part := range []string{"0/1", "1/3"} {
		fresh := filepath.Join(dir, "fresh.parquet")
		mustRun(t, with("--instances", "15", "--part", part, "--out", fresh)...)
		table := filepath.Join(dir, "table.parquet")
		mustRun(t, with("--instances", "6", "--part", part, "--out", table)...)
		_, stderr, code := runCLI(t, with("--instances", "15", "--part", part, "--resume", table)...)
		if code != 0 {
			t.Fatalf("part %s: extend: exit %d: %s", part, code, stderr)
		}
		if !strings.Contains(stderr, "to run") {
			t.Errorf("part %s: no resume note: %q", part, stderr)
		}
		got, want := readTable(t, table), readTable(t, fresh)
		equalRowsExactly(t, got, want)
		if !reflect.DeepEqual(metaWithout(got.Meta, "command_line"), metaWithout(want.Meta, "command_line")) {
			t.Errorf("part %s: metadata of the extended table\n%v\nof the fresh run\n%v", part, got.Meta, want.Meta)
		}
	}
	table := filepath.Join(dir, "table.parquet")
	mustRun(t, with("--instances", "6", "--out", table)...)
	wantExit2(t, with("--instances", "4", "--resume", table), "another run", "instances", `"6"`, `"4"`)
	wantExit2(t, with("--instances", "9", "--eps", "0.1", "--resume", table), "another run", "eps")
	wantExit2(t, append(with("--instances", "9", "--resume", table), "--seed", "5"), "another run", "seed")
	wantExit2(t, with("--instances", "9", "--part", "1/2", "--resume", table), "another run", "part")
}
