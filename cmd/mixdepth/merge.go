package main

import (
	"cmp"
	"context"
	"fmt"
	"io"
	"slices"
	"strconv"
	"strings"

	"mixdepth/tables"
)

func init() {
	register(command{name: "merge", summary: "merge the shard tables of one run into one table", run: runMerge})
}

func runMerge(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	fs := newFlags("merge", "mixdepth merge --out FILE SHARD...: each SHARD is a table written by scan or sample.\n\nCombines the per-instance tables of one run (the shards of 'scan --shard K/N', or partial tables)\ninto one table whose rows equal those of the same run done at once. The inputs must share every\nrun parameter but the shard; each instance must come from exactly one input; and a missing\ninstance is an error unless --allow-partial is given.",
		"mixdepth merge --out scan.parquet shard-0.parquet shard-1.parquet shard-2.parquet", stdout)
	out := fs.String("out", "", "write the merged table to FILE.arrow or FILE.parquet (required)")
	allowPartial := fs.Bool("allow-partial", false, "write the table even when instances are missing, marked partial=true")
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if *out == "" {
		return badInput("merge: --out FILE.arrow or --out FILE.parquet is required")
	}
	if fs.NArg() == 0 {
		return badInput("merge: name the shard tables to merge: mixdepth merge --out FILE SHARD...")
	}
	run, err := readRun(fs.Args())
	if err != nil {
		return err
	}
	first := run.tables[0].t
	// Fail on an unwritable --out before the work of combining the rows.
	w, err := tables.Create(*out, first.Fields, first.Meta)
	if err != nil {
		return usageError{fmt.Errorf("--out: %w", err)}
	}
	w.Abort()
	missing := run.missing()
	if len(missing) > 0 && !*allowPartial {
		return badInput("instances %s of %d are missing%s: merge every shard of the run, or pass --allow-partial to write a partial table", briefIDs(missing), run.instances, run.missingShards(missing))
	}
	merged, err := mergeTables(run)
	if err != nil {
		return err
	}
	merged.Meta.Set("shard", shardSpec{0, 1}.String())
	merged.Meta.Set("partial", strconv.FormatBool(len(missing) > 0))
	merged.Meta.Set("instances_done", formatIDs(run.done))
	if err := tables.WriteTable(*out, merged); err != nil {
		return err
	}
	state := "complete"
	if len(missing) > 0 {
		state = "partial, missing " + briefIDs(missing)
		fmt.Fprintf(stderr, "mixdepth: note: %s is partial: instances %s are missing\n", *out, briefIDs(missing))
	}
	fmt.Fprintf(stdout, "Merged %d table(s): %d rows, instances %s (%s) → %s\n", len(run.tables), merged.Len(), briefIDs(run.done), state, *out)
	return nil
}

// runTable is one table of a run with the instances it holds.
type runTable struct {
	path string
	t    *tables.Table
	ids  []int
}

// runSet holds the tables of one run, checked to belong together.
type runSet struct {
	tables []runTable
	// done is the union of the instances of the tables, ascending.
	done []int
	// instances is the full run's instance count (the instances key), or
	// 0 when the tables do not record it.
	instances int
	// shards is N when every table records a shard K/N with the same N,
	// and 0 otherwise.
	shards int
}

// runKeysFree are the metadata keys that may differ between the tables of
// one run: every other key is a run parameter.
var runKeysFree = map[string]bool{"command_line": true, "shard": true, "partial": true, "instances_done": true}

// readRun reads the tables at paths and checks that they come from one run:
// the same columns, the same run parameters (every metadata key but those of
// runKeysFree), and no instance in two tables. Every failure is bad input
// naming the file and, for a different run, the parameter.
func readRun(paths []string) (*runSet, error) {
	run := &runSet{}
	owner := map[int]string{}
	for i, path := range paths {
		t, err := tables.Read(path)
		if err != nil {
			return nil, usageError{err}
		}
		if i > 0 {
			base := run.tables[0]
			if err := sameColumns(base.t.Fields, t.Fields); err != nil {
				return nil, badInput("%s and %s have different columns (%v): only tables of one run can be combined", base.path, path, err)
			}
			if key, a, b, differ := runDifference(base.t.Meta, t.Meta); differ {
				return nil, badInput("%s and %s come from different runs: their %s differs (%s vs %s); only shards of one run, with the same flags but --shard, can be combined", base.path, path, key, a, b)
			}
		}
		ids, err := tableInstances(t)
		if err != nil {
			return nil, usageError{fmt.Errorf("%s: %w", path, err)}
		}
		for _, id := range ids {
			if prev, dup := owner[id]; dup {
				return nil, badInput("instance %d is in both %s and %s: give each shard once (every instance must come from exactly one table)", id, prev, path)
			}
			owner[id] = path
		}
		run.tables = append(run.tables, runTable{path: path, t: t, ids: ids})
		run.done = append(run.done, ids...)
	}
	slices.Sort(run.done)
	meta := run.tables[0].t.Meta
	if _, ok := meta.Get("instances"); ok {
		n, err := metaInt(meta, "instances")
		if err != nil || n < 1 {
			return nil, badInput("%s: metadata instances is not a positive whole number", run.tables[0].path)
		}
		run.instances = n
		if len(run.done) > 0 {
			if last := run.done[len(run.done)-1]; last >= n {
				return nil, badInput("%s holds instance %d but the run has only %d instances", owner[last], last, n)
			}
		}
	}
	for i, rt := range run.tables {
		spec, _ := rt.t.Meta.Get("shard")
		sh, err := parseShard(spec)
		if err != nil || (i > 0 && sh.n != run.shards) {
			run.shards = 0
			break
		}
		run.shards = sh.n
	}
	return run, nil
}

// missing returns the instances of the full run that no table holds.
func (r *runSet) missing() []int {
	var out []int
	j := 0
	for id := 0; id < r.instances; id++ {
		for j < len(r.done) && r.done[j] < id {
			j++
		}
		if j == len(r.done) || r.done[j] != id {
			out = append(out, id)
		}
	}
	return out
}

// missingShards names the shards the missing instances belong to, as
// " (shard 2/3 not given?)", when the tables record their shards.
func (r *runSet) missingShards(missing []int) string {
	if r.shards < 2 {
		return ""
	}
	var ks []int
	for _, id := range missing {
		ks = append(ks, id%r.shards)
	}
	slices.Sort(ks)
	ks = slices.Compact(ks)
	names := make([]string, len(ks))
	for i, k := range ks {
		names[i] = shardSpec{k, r.shards}.String()
	}
	return " (shard " + strings.Join(names, ", ") + " not given, or interrupted?)"
}

// runDifference returns the first run parameter in which b differs from a,
// in the order of a's keys and then b's, with both values quoted ("absent"
// for a missing key).
func runDifference(a, b tables.Meta) (key, va, vb string, differ bool) {
	quote := func(m tables.Meta, k string) (string, bool) {
		v, ok := m.Get(k)
		if !ok {
			return "absent", false
		}
		return strconv.Quote(v), true
	}
	for _, k := range a.Keys {
		if runKeysFree[k] {
			continue
		}
		x, _ := quote(a, k)
		y, _ := quote(b, k)
		if x != y {
			return k, x, y, true
		}
	}
	for _, k := range b.Keys {
		if _, inA := a.Get(k); !inA && !runKeysFree[k] {
			y, _ := quote(b, k)
			return k, "absent", y, true
		}
	}
	return "", "", "", false
}

// sameColumns returns an error unless a and b name the same columns with
// the same types in the same order.
func sameColumns(a, b []tables.Field) error {
	if len(a) != len(b) {
		return fmt.Errorf("%d columns vs %d", len(a), len(b))
	}
	for i := range a {
		if a[i].Name != b[i].Name || a[i].Type != b[i].Type {
			return fmt.Errorf("column %d is %s %s vs %s %s", i, a[i].Name, a[i].Type, b[i].Name, b[i].Type)
		}
	}
	return nil
}

// mergeKeys returns the columns that order the rows of a merged table:
// (instance, shot) for sample tables, (depth, instance) for per-depth
// tables such as scan's, else instance alone, as the commands write them.
func mergeKeys(t *tables.Table) ([]string, error) {
	has := func(name string) bool {
		j, ok := t.Column(name)
		return ok && t.Fields[j].Type == tables.Int64
	}
	if !has("instance") {
		return nil, fmt.Errorf("no int64 instance column: only per-instance tables can be merged")
	}
	switch {
	case has("shot"):
		return []string{"instance", "shot"}, nil
	case has("depth"):
		return []string{"depth", "instance"}, nil
	}
	return []string{"instance"}, nil
}

// mergeTables concatenates the rows of the run's tables, sorted by
// mergeKeys, with the metadata of the first table. A key that occurs twice
// is bad input.
func mergeTables(run *runSet) (*tables.Table, error) {
	first := run.tables[0]
	keys, err := mergeKeys(first.t)
	if err != nil {
		return nil, badInput("%s: %v", first.path, err)
	}
	out := &tables.Table{
		Fields: slices.Clone(first.t.Fields),
		Meta: tables.Meta{Keys: slices.Clone(first.t.Meta.Keys),
			Values: slices.Clone(first.t.Meta.Values)},
		Columns: make([]any, len(first.t.Fields)),
		Valid:   make([][]bool, len(first.t.Fields)),
	}
	total := 0
	for _, rt := range run.tables {
		total += rt.t.Len()
	}
	for j := range out.Fields {
		out.Columns[j], out.Valid[j] = concatColumn(run.tables, j, total)
	}
	keyCols := make([][]int64, len(keys))
	for k, name := range keys {
		keyCols[k], _ = out.Int64s(name)
	}
	perm := make([]int, total)
	for i := range perm {
		perm[i] = i
	}
	compare := func(x, y int) int {
		for _, col := range keyCols {
			if c := cmp.Compare(col[x], col[y]); c != 0 {
				return c
			}
		}
		return 0
	}
	slices.SortStableFunc(perm, compare)
	for i := 1; i < total; i++ {
		if compare(perm[i-1], perm[i]) == 0 {
			parts := make([]string, len(keys))
			for k, name := range keys {
				parts[k] = fmt.Sprintf("%s %d", name, keyCols[k][perm[i]])
			}
			return nil, badInput("the row (%s) occurs twice among the inputs: each row must come from exactly one table", strings.Join(parts, ", "))
		}
	}
	for j := range out.Columns {
		out.Columns[j] = permuteColumn(out.Columns[j], perm)
		if out.Valid[j] != nil {
			out.Valid[j] = permute(out.Valid[j], perm)
		}
	}
	return out, nil
}

// concatColumn joins column j of every table, with its validity list (nil
// when no table has a null in the column).
func concatColumn(ts []runTable, j, total int) (any, []bool) {
	var valid []bool
	anyNull := false
	for _, rt := range ts {
		if rt.t.Valid != nil && rt.t.Valid[j] != nil {
			anyNull = true
		}
	}
	if anyNull {
		valid = make([]bool, 0, total)
		for _, rt := range ts {
			if rt.t.Valid != nil && rt.t.Valid[j] != nil {
				valid = append(valid, rt.t.Valid[j]...)
			} else {
				for range rt.t.Len() {
					valid = append(valid, true)
				}
			}
		}
	}
	switch ts[0].t.Columns[j].(type) {
	case []int64:
		return concat[int64](ts, j, total), valid
	case []float64:
		return concat[float64](ts, j, total), valid
	case []string:
		return concat[string](ts, j, total), valid
	}
	panic(fmt.Sprintf("mixdepth: column %d has Go type %T", j, ts[0].t.Columns[j]))
}

func concat[T any](ts []runTable, j, total int) []T {
	out := make([]T, 0, total)
	for _, rt := range ts {
		out = append(out, rt.t.Columns[j].([]T)...)
	}
	return out
}

func permuteColumn(col any, perm []int) any {
	switch col := col.(type) {
	case []int64:
		return permute(col, perm)
	case []float64:
		return permute(col, perm)
	case []string:
		return permute(col, perm)
	}
	panic(fmt.Sprintf("mixdepth: column of Go type %T", col))
}

// permute returns v reordered so that element i is v[perm[i]].
func permute[T any](v []T, perm []int) []T {
	out := make([]T, len(v))
	for i, p := range perm {
		out[i] = v[p]
	}
	return out
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
