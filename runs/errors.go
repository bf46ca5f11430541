package runs

import (
	"errors"
	"fmt"
	"strconv"
	"strings"

	"mixdepth/tables"
)

// DifferentRunError reports two tables, or a table and the run being
// started, that differ in a run parameter, and so cannot be combined.
type DifferentRunError struct {
	// Key is the metadata key of the parameter.
	Key string
	// A and B are its values in the first and the second table; AbsentA and
	// AbsentB are set when a table has no such key.
	A, B             string
	AbsentA, AbsentB bool
	// PathA and PathB name the tables; PathA is "" when A is the run being
	// started (Resume).
	PathA, PathB string
}

// Error names the parameter, both values and both tables.
func (e *DifferentRunError) Error() string {
	quote := func(v string, absent bool) string {
		if absent {
			return "absent"
		}
		return strconv.Quote(v)
	}
	a, b := quote(e.A, e.AbsentA), quote(e.B, e.AbsentB)
	if e.PathA == "" {
		return fmt.Sprintf("runs: %s comes from another run: its %s is %s, this run's is %s", e.PathB, e.Key, b, a)
	}
	return fmt.Sprintf("runs: %s and %s come from different runs: their %s differs (%s vs %s)", e.PathA, e.PathB, e.Key, a, b)
}

// DuplicateError reports a row, or a whole instance, that occurs in more than
// one place among the tables of a run.
type DuplicateError struct {
	// Keys name the columns that identify the row ("instance" alone for an
	// instance held by two tables; "depth", "instance" for a scan row) and
	// Values their values.
	Keys   []string
	Values []int64
	// PathA and PathB name the two tables that hold an instance, when known.
	PathA, PathB string
}

// Error names the repeated row or instance and, when known, its tables.
func (e *DuplicateError) Error() string {
	parts := make([]string, len(e.Keys))
	for k, name := range e.Keys {
		parts[k] = name + " " + strconv.FormatInt(e.Values[k], 10)
	}
	row := strings.Join(parts, ", ")
	if e.PathA != "" {
		return fmt.Sprintf("runs: %s is in both %s and %s: every instance must come from exactly one table", row, e.PathA, e.PathB)
	}
	return fmt.Sprintf("runs: the row (%s) occurs twice among the inputs: each row must come from exactly one table", row)
}

// ErrColumns marks tables whose columns differ, which no run writes.
var ErrColumns = errors.New("runs: different columns")

// ErrValue is wrapped by the error for a scan table row whose values cannot
// come from a scan (a collision probability outside [1/D, 1], a negative
// depth, a non-finite statistic): a damaged table.
var ErrValue = errors.New("runs: impossible value in a scan table")

// difference returns the first run parameter in which b differs from a, in
// the order of a's keys and then b's, skipping the keys for which skip is
// true. The gates key of two tables that both record a gate_set is a label
// (the path the file had), not a parameter: their content, gate_set, is
// compared instead.
func difference(a, b tables.Meta, skip func(string) bool) *DifferentRunError {
	_, ga := a.Get(KeyGateSet)
	_, gb := b.Get(KeyGateSet)
	ignore := func(k string) bool {
		return !IsParameter(k) || (skip != nil && skip(k)) || (k == "gates" && ga && gb)
	}
	for _, k := range a.Keys {
		if ignore(k) {
			continue
		}
		x, _ := a.Get(k)
		y, ok := b.Get(k)
		if !ok || x != y {
			return &DifferentRunError{Key: k, A: x, B: y, AbsentB: !ok}
		}
	}
	for _, k := range b.Keys {
		if _, inA := a.Get(k); !inA && !ignore(k) {
			y, _ := b.Get(k)
			return &DifferentRunError{Key: k, B: y, AbsentA: true}
		}
	}
	return nil
}

// SameRun returns a *DifferentRunError naming the first run parameter (see
// IsParameter) in which the metadata b of the table at pathB differs from a,
// that of the table at pathA, and nil when they describe one run.
func SameRun(a, b tables.Meta, pathA, pathB string) error {
	if e := difference(a, b, nil); e != nil {
		e.PathA, e.PathB = pathA, pathB
		return e
	}
	return nil
}
