package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"strconv"
	"strings"

	"mixdepth/runs"
	"mixdepth/tables"
)

func init() {
	register(command{name: "merge", summary: "merge the part tables of one run into one table", run: runMerge})
}

func runMerge(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	fs := newFlags("merge --out FILE PART...", "Each PART is a table written by scan or sample.\n\nCombines the per-instance tables of one run (the parts of 'scan --part K/N' or\n'sample --part K/N', or partial tables) into one table whose rows equal those of the same run\ndone at once. The inputs must share every run parameter but the part; each instance must come\nfrom exactly one input; and a missing instance is an error unless --allow-partial is given.",
		"mixdepth merge --out scan.parquet part-0.parquet part-1.parquet part-2.parquet", stdout)
	out := fs.String("out", "", "write the merged table to FILE.arrow or FILE.parquet (required)")
	allowPartial := fs.Bool("allow-partial", false, "write the table even when instances are missing, marked partial=true")
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if *out == "" {
		return badInput("merge: --out FILE.arrow or --out FILE.parquet is required")
	}
	if fs.NArg() == 0 {
		return badInput("merge: name the part tables to merge: mixdepth merge --out FILE PART...")
	}
	var files ioCheck
	for _, p := range fs.Args() {
		files.input("part", p)
	}
	files.output("out", *out)
	if err := files.check(fs); err != nil {
		return err
	}
	run, err := readRun(fs.Args())
	if err != nil {
		return err
	}
	first := run.Members[0].Table
	// Fail on an unwritable --out before the work of combining the rows.
	w, err := tables.Create(*out, first.Fields, first.Meta)
	if err != nil {
		return usageError{fmt.Errorf("--out: %w", err)}
	}
	w.Abort()
	missing := run.Missing()
	if len(missing) > 0 && !*allowPartial {
		return badInput("instances %s of %d are missing%s: merge every part of the run, or pass --allow-partial to write a partial table", briefIDs(missing), run.Instances, missingParts(run, missing))
	}
	merged, err := run.Merge()
	if err != nil {
		return usageError{err}
	}
	if err := tables.WriteTable(*out, merged); err != nil {
		return err
	}
	state := "complete"
	if len(missing) > 0 {
		state = "partial, missing " + briefIDs(missing)
		fmt.Fprintf(stderr, "mixdepth: note: %s is partial: instances %s are missing\n", *out, briefIDs(missing))
	}
	fmt.Fprintf(stdout, "Merged %d table(s): %d rows, instances %s (%s) → %s\n", len(run.Members), merged.Len(), briefIDs(run.Done), state, *out)
	return nil
}

// readRun reads the tables of one run (runs.ReadSet); every failure is bad
// input naming the file and, for a different run, the parameter.
func readRun(paths []string) (*runs.Set, error) {
	set, err := runs.ReadSet(paths...)
	var dr *runs.DifferentRunError
	var dup *runs.DuplicateError
	switch {
	case errors.As(err, &dr):
		return nil, usageError{fmt.Errorf("%w; only parts of one run, with the same flags but --part, can be combined", err)}
	case errors.As(err, &dup):
		return nil, usageError{fmt.Errorf("%w: give each part once", err)}
	case err != nil:
		return nil, usageError{err}
	}
	return set, nil
}

// missingParts names the parts the missing instances belong to, as
// " (part 2/3 not given, or interrupted?)", when the tables record them.
func missingParts(run *runs.Set, missing []int) string {
	parts := run.MissingParts(missing)
	if len(parts) == 0 {
		return ""
	}
	names := make([]string, len(parts))
	for i, p := range parts {
		names[i] = p.String()
	}
	return " (part " + strings.Join(names, ", ") + " not given, or interrupted?)"
}

// briefIDs writes ids as formatIDs does, cut after about 60 characters and
// followed by their number, for messages.
func briefIDs(ids []int) string {
	s := formatIDs(ids)
	if len(s) <= 60 {
		return s
	}
	cut := strings.LastIndexByte(s[:60], ',')
	return s[:cut] + ",… (" + strconv.Itoa(len(ids)) + " in all)"
}
