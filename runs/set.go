package runs

import (
	"cmp"
	"fmt"
	"slices"

	"mixdepth/scan"
	"mixdepth/tables"
)

// Member is one table of a Set, with the instances it holds.
type Member struct {
	Path  string
	Table *tables.Table
	// IDs are the finished instances of the table (TableInstances).
	IDs []int
}

// Set is the tables of one run (its parts, or partial tables), checked to
// belong together: the same columns, the same run parameters, and no
// instance in two tables.
type Set struct {
	Members []Member
	// Done is the union of the members' instances, ascending.
	Done []int
	// Instances is the whole run's instance count (metadata key instances),
	// or 0 when the tables do not record it.
	Instances int
	// Parts is N when every table records a part K/N with the same N, and 0
	// otherwise.
	Parts int
}

// ReadSet reads the tables at paths and returns them as a Set (see NewSet).
func ReadSet(paths ...string) (*Set, error) {
	ts := make([]*tables.Table, len(paths))
	for i, p := range paths {
		t, err := tables.Read(p)
		if err != nil {
			return nil, err
		}
		ts[i] = t
	}
	return NewSet(paths, ts)
}

// NewSet checks that the tables ts (named paths in errors) come from one run
// and returns them as a Set: tables with other columns are ErrColumns, a
// different run parameter is a *DifferentRunError, an instance in two tables
// a *DuplicateError. It panics if paths and ts differ in length or are
// empty.
func NewSet(paths []string, ts []*tables.Table) (*Set, error) {
	if len(paths) != len(ts) || len(ts) == 0 {
		panic(fmt.Sprintf("runs: NewSet with %d paths and %d tables", len(paths), len(ts)))
	}
	set := &Set{}
	owner := map[int]string{}
	for i, t := range ts {
		path := paths[i]
		if i > 0 {
			base := set.Members[0]
			if err := sameColumns(base.Table.Fields, t.Fields); err != nil {
				return nil, fmt.Errorf("%w: %s and %s (%v): only tables of one run can be combined", ErrColumns, base.Path, path, err)
			}
			if err := SameRun(base.Table.Meta, t.Meta, base.Path, path); err != nil {
				return nil, err
			}
		}
		ids, err := TableInstances(t)
		if err != nil {
			return nil, fmt.Errorf("runs: %s: %w", path, err)
		}
		for _, id := range ids {
			if prev, dup := owner[id]; dup {
				return nil, &DuplicateError{Keys: []string{"instance"}, Values: []int64{int64(id)}, PathA: prev, PathB: path}
			}
			owner[id] = path
		}
		set.Members = append(set.Members, Member{Path: path, Table: t, IDs: ids})
		set.Done = append(set.Done, ids...)
	}
	slices.Sort(set.Done)
	meta := set.Members[0].Table.Meta
	if _, ok := meta.Get("instances"); ok {
		n, err := MetaInt(meta, "instances")
		if err != nil || n < 1 {
			return nil, fmt.Errorf("runs: %s: metadata instances is not a positive whole number", set.Members[0].Path)
		}
		set.Instances = n
		if len(set.Done) > 0 {
			if last := set.Done[len(set.Done)-1]; last >= n {
				return nil, fmt.Errorf("runs: %s holds instance %d but the run has only %d instances", owner[last], last, n)
			}
		}
	}
	for i, m := range set.Members {
		spec, _ := m.Table.Meta.Get("part")
		p, err := ParsePart(spec)
		if err != nil || (i > 0 && p.N != set.Parts) {
			set.Parts = 0
			break
		}
		set.Parts = p.N
	}
	return set, nil
}

// Missing returns the instances of the whole run that no table holds.
func (s *Set) Missing() []int {
	var out []int
	j := 0
	for id := 0; id < s.Instances; id++ {
		for j < len(s.Done) && s.Done[j] < id {
			j++
		}
		if j == len(s.Done) || s.Done[j] != id {
			out = append(out, id)
		}
	}
	return out
}

// MissingParts returns the parts that the missing instances belong to,
// ascending, or nil when the tables do not record a common part count of 2
// or more.
func (s *Set) MissingParts(missing []int) []Part {
	if s.Parts < 2 {
		return nil
	}
	var ks []int
	for _, id := range missing {
		ks = append(ks, id%s.Parts)
	}
	slices.Sort(ks)
	ks = slices.Compact(ks)
	parts := make([]Part, len(ks))
	for i, k := range ks {
		parts[i] = Part{k, s.Parts}
	}
	return parts
}

// TableInstances returns the finished instance ids of a table: its
// instances_done key, or the distinct ids of its instance column when the
// key is absent. It checks that every row belongs to a listed instance.
func TableInstances(t *tables.Table) ([]int, error) {
	col, err := t.Int64s("instance")
	if err != nil {
		return nil, fmt.Errorf("runs: not a per-instance table: %w", err)
	}
	var inRows []int
	for _, v := range col {
		inRows = append(inRows, int(v))
	}
	slices.Sort(inRows)
	inRows = slices.Compact(inRows)
	spec, ok := t.Meta.Get("instances_done")
	if !ok {
		return inRows, nil
	}
	ids, err := ParseIDs(spec)
	if err != nil {
		return nil, fmt.Errorf("runs: metadata instances_done: %w", err)
	}
	listed := map[int]bool{}
	for _, id := range ids {
		listed[id] = true
	}
	for _, id := range inRows {
		if !listed[id] {
			return nil, fmt.Errorf("runs: rows of instance %d, which instances_done (%q) does not list", id, spec)
		}
	}
	if len(inRows) != len(ids) {
		return nil, fmt.Errorf("runs: instances_done lists %d instances but the rows hold %d: the table is damaged; rewrite it from its parts", len(ids), len(inRows))
	}
	return ids, nil
}

// ScanRecords returns the per-instance records of a set of scan tables
// (command scan), sorted by (depth, instance) as one scan of the same
// instances returns them, after checking that every depth has one record per
// instance (CheckComplete).
func (s *Set) ScanRecords() ([]scan.Record, error) {
	first := s.Members[0]
	if cmd, _ := first.Table.Meta.Get("command"); cmd != "scan" {
		return nil, fmt.Errorf("runs: %s was written by %q, not scan: only per-instance scan tables hold scan records", first.Path, cmd)
	}
	var records []scan.Record
	for _, m := range s.Members {
		recs, err := scanRecords(m.Table)
		if err != nil {
			return nil, fmt.Errorf("runs: %s is not a per-instance scan table: %w", m.Path, err)
		}
		records = append(records, recs...)
	}
	if len(records) == 0 {
		return nil, fmt.Errorf("runs: the tables hold no rows")
	}
	if err := CheckComplete(records, len(s.Done)); err != nil {
		return nil, err
	}
	SortRecords(records)
	return records, nil
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

// Merge returns one table with the rows of every member, in the order the
// commands write them ((instance, shot) for sample tables, (depth, instance)
// for scan tables, else instance), so that a merge of all the parts equals
// the whole run done at once. Its metadata is the first member's with part
// 0/1, partial (some instance of the run missing) and instances_done. A row
// key that occurs twice is a *DuplicateError.
func (s *Set) Merge() (*tables.Table, error) {
	first := s.Members[0]
	keys, err := mergeKeys(first.Table)
	if err != nil {
		return nil, fmt.Errorf("runs: %s: %w", first.Path, err)
	}
	out := &tables.Table{
		Fields: slices.Clone(first.Table.Fields),
		Meta: tables.Meta{Keys: slices.Clone(first.Table.Meta.Keys),
			Values: slices.Clone(first.Table.Meta.Values)},
		Columns: make([]any, len(first.Table.Fields)),
		Valid:   make([][]bool, len(first.Table.Fields)),
	}
	total := 0
	for _, m := range s.Members {
		total += m.Table.Len()
	}
	for j := range out.Fields {
		out.Columns[j], out.Valid[j] = concatColumn(s.Members, j, total)
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
			e := &DuplicateError{Keys: keys, Values: make([]int64, len(keys))}
			for k := range keys {
				e.Values[k] = keyCols[k][perm[i]]
			}
			return nil, e
		}
	}
	for j := range out.Columns {
		out.Columns[j] = permuteColumn(out.Columns[j], perm)
		if out.Valid[j] != nil {
			out.Valid[j] = permute(out.Valid[j], perm)
		}
	}
	out.Meta.Set("part", Whole.String())
	SetDone(&out.Meta, s.Done, len(s.Missing()) > 0)
	return out, nil
}

// concatColumn joins column j of every member, with its validity list (nil
// when no table has a null in the column).
func concatColumn(ms []Member, j, total int) (any, []bool) {
	var valid []bool
	anyNull := false
	for _, m := range ms {
		if m.Table.Valid != nil && m.Table.Valid[j] != nil {
			anyNull = true
		}
	}
	if anyNull {
		valid = make([]bool, 0, total)
		for _, m := range ms {
			if m.Table.Valid != nil && m.Table.Valid[j] != nil {
				valid = append(valid, m.Table.Valid[j]...)
			} else {
				for range m.Table.Len() {
					valid = append(valid, true)
				}
			}
		}
	}
	switch ms[0].Table.Columns[j].(type) {
	case []int64:
		return concat[int64](ms, j, total), valid
	case []float64:
		return concat[float64](ms, j, total), valid
	case []string:
		return concat[string](ms, j, total), valid
	}
	panic(fmt.Sprintf("runs: column %d has Go type %T", j, ms[0].Table.Columns[j]))
}

func concat[T any](ms []Member, j, total int) []T {
	out := make([]T, 0, total)
	for _, m := range ms {
		out = append(out, m.Table.Columns[j].([]T)...)
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
	panic(fmt.Sprintf("runs: column of Go type %T", col))
}

// permute returns v reordered so that element i is v[perm[i]].
func permute[T any](v []T, perm []int) []T {
	out := make([]T, len(v))
	for i, p := range perm {
		out[i] = v[p]
	}
	return out
}
