package runs

import (
	"errors"
	"fmt"
	"maps"
	"math"
	"slices"
	"strconv"
	"strings"

	"mixdepth/scan"
	"mixdepth/stats"
	"mixdepth/tables"
)

// ScanRun is a Monte Carlo depth scan: its circuits and the parameters that
// every table of the run records.
type ScanRun struct {
	Spec            *Spec
	Depths          []int
	Instances       int
	Eps, Confidence float64
	// Rule and PTMargin are the verdict's criteria (stats.Criteria); Rule
	// "" is recorded as stats.RuleBoth.
	Rule      stats.Rule
	PTMargin  float64
	Part      Part
	Precision scan.Precision
	// Exact is set when the tables carry the exact E[Z] column.
	Exact bool
}

// Meta returns the table metadata of the scan: Spec.Meta followed by
// command (scan), depths, instances, eps, confidence, rule, pt_margin,
// part, precision and exact. The keys partial and instances_done are added by SetDone once the
// instances are known.
func (r *ScanRun) Meta(commandLine string) tables.Meta {
	m := r.Spec.Meta(commandLine)
	m.Set("command", "scan")
	m.Set("depths", FormatDepths(r.Depths))
	m.Set("instances", strconv.Itoa(r.Instances))
	m.Set("eps", strconv.FormatFloat(r.Eps, 'g', -1, 64))
	m.Set("confidence", strconv.FormatFloat(r.Confidence, 'g', -1, 64))
	rule := r.Rule
	if rule == "" {
		rule = stats.RuleBoth
	}
	m.Set("rule", string(rule))
	m.Set("pt_margin", strconv.FormatFloat(r.PTMargin, 'g', -1, 64))
	m.Set("part", r.Part.String())
	m.Set("precision", string(r.Precision))
	m.Set("exact", strconv.FormatBool(r.Exact))
	return m
}

// SetDone records in m which instances a table holds: partial (whether some
// instance of its part is missing) and instances_done (FormatIDs of done).
func SetDone(m *tables.Meta, done []int, partial bool) {
	m.Set("partial", strconv.FormatBool(partial))
	m.Set("instances_done", FormatIDs(done))
}

// FormatDepths writes depths as "2,4,8", a list that ParseDepths reads back.
func FormatDepths(v []int) string {
	s := make([]string, len(v))
	for i, x := range v {
		s[i] = strconv.Itoa(x)
	}
	return strings.Join(s, ",")
}

// scanFields are the columns of the per-instance scan table.
var scanFields = []tables.Field{
	{Name: "depth", Type: tables.Int64, Unit: "layers (gates for random-edge)", Doc: "circuit depth (layers, or gates for random-edge)"},
	{Name: "gate_count", Type: tables.Int64, Unit: "gates", Doc: "two-qubit gates applied up to this depth"},
	{Name: "instance", Type: tables.Int64, Doc: "instance id; its random stream depends only on (seed, instance)"},
	{Name: "collision", Type: tables.Float64, Unit: "probability", Doc: "collision probability Z = Σ p(x)²"},
	{Name: "collision_ratio", Type: tables.Float64, Doc: "Z / Z_H with Z_H = 2/(D+1)"},
	{Name: "pt_ks", Type: tables.Float64, Doc: "Kolmogorov–Smirnov distance of the output probabilities to Beta(1, D−1)"},
	{Name: "ideal_xeb", Type: tables.Float64, Doc: "linear XEB of an ideal sampler, D·Z − 1"},
}

// scanExactField is the extra column of a scan with the exact E[Z].
var scanExactField = tables.Field{Name: "collision_exact", Type: tables.Float64, Unit: "probability", Doc: "exact ensemble average E[Z] at this depth (scan --exact)"}

// ScanFields returns the columns of a per-instance scan table: depth,
// gate_count, instance, collision, collision_ratio, pt_ks, ideal_xeb, and
// collision_exact when exact is set. The slice is new on every call.
func ScanFields(exact bool) []tables.Field {
	f := slices.Clone(scanFields)
	if exact {
		f = append(f, scanExactField)
	}
	return f
}

// WriteScanTable writes the per-instance records atomically to path (.arrow
// or .parquet), with the exact E[Z] of each depth as the collision_exact
// column when exact is not nil (exact[d] for depth d).
func WriteScanTable(path string, meta tables.Meta, records []scan.Record, exact map[int]float64) error {
	w, err := tables.Create(path, ScanFields(exact != nil), meta)
	if err != nil {
		return fmt.Errorf("runs: writing %s: %w", path, err)
	}
	defer w.Abort()
	for _, r := range records {
		if exact != nil {
			w.Append(r.Depth, r.GateCount, r.Instance, r.Collision, r.Ratio, r.KS, r.XEBIdeal, exact[r.Depth])
			continue
		}
		w.Append(r.Depth, r.GateCount, r.Instance, r.Collision, r.Ratio, r.KS, r.XEBIdeal)
	}
	return w.Close()
}

// ScanRecords reads the per-instance records of a scan table, in row order.
func ScanRecords(t *tables.Table) ([]scan.Record, error) {
	recs, err := scanRecords(t)
	if err != nil {
		return nil, fmt.Errorf("runs: not a per-instance scan table: %w", err)
	}
	return recs, nil
}

// scanRecords is ScanRecords with the columns' own errors.
func scanRecords(t *tables.Table) ([]scan.Record, error) {
	depth, err1 := t.Int64s("depth")
	gates, err2 := t.Int64s("gate_count")
	inst, err3 := t.Int64s("instance")
	z, err4 := t.Float64s("collision")
	ratio, err5 := t.Float64s("collision_ratio")
	ks, err6 := t.Float64s("pt_ks")
	xeb, err7 := t.Float64s("ideal_xeb")
	if _, ok := t.Column("ideal_xeb"); !ok {
		// Tables written before the column took score's name.
		xeb, err7 = t.Float64s("xeb_ideal")
	}
	if err := errors.Join(err1, err2, err3, err4, err5, err6, err7); err != nil {
		return nil, err
	}
	// Z = Σ p² lies in [1/D, 1] for a normalized state (Cauchy–Schwarz);
	// collisionSlack allows the rounding of single-precision runs (about
	// 1e-6 relative, see --precision) with a margin.
	const collisionSlack = 1e-5
	lo := 0.0
	if n, err := MetaInt(t.Meta, "qubits"); err == nil && n >= 1 && n <= 1000 {
		lo = math.Ldexp(1, -n) * (1 - collisionSlack)
	}
	recs := make([]scan.Record, t.Len())
	for i := range recs {
		r := scan.Record{Depth: int(depth[i]), GateCount: int(gates[i]), Instance: int(inst[i]),
			Collision: z[i], Ratio: ratio[i], KS: ks[i], XEBIdeal: xeb[i]}
		var bad string
		switch {
		case r.Depth < 1 || r.Depth > MaxDepth || r.GateCount < 0 || r.Instance < 0 || r.Instance >= MaxInstances:
			bad = fmt.Sprintf("depth %d, gate_count %d, instance %d out of range", r.Depth, r.GateCount, r.Instance)
		case !(r.Collision >= lo && r.Collision <= 1+collisionSlack):
			bad = fmt.Sprintf("collision %v outside [1/D, 1]", r.Collision)
		case !(r.KS >= 0 && r.KS <= 1):
			bad = fmt.Sprintf("pt_ks %v outside [0, 1]", r.KS)
		case math.IsNaN(r.Ratio) || math.IsInf(r.Ratio, 0) || math.IsNaN(r.XEBIdeal) || math.IsInf(r.XEBIdeal, 0):
			bad = "collision_ratio or ideal_xeb not finite"
		}
		if bad != "" {
			return nil, fmt.Errorf("%w: row %d: %s", ErrValue, i+1, bad)
		}
		recs[i] = r
	}
	return recs, nil
}

// SortRecords sorts records in place by (depth, instance), the order in
// which scan.Run returns them and a scan table holds them, so that
// scan.Estimate adds the same numbers in the same order.
func SortRecords(records []scan.Record) {
	slices.SortFunc(records, func(x, y scan.Record) int {
		if x.Depth != y.Depth {
			return x.Depth - y.Depth
		}
		return x.Instance - y.Instance
	})
}

// RecordInstances returns the distinct instance ids of records, ascending.
func RecordInstances(records []scan.Record) []int {
	var ids []int
	for _, r := range records {
		ids = append(ids, r.Instance)
	}
	slices.Sort(ids)
	return slices.Compact(ids)
}

// CheckComplete checks that every depth has exactly one record per instance,
// instances records in all, as a scan writes them, so that each depth's mean
// is over the same instances. A repeated (depth, instance) is a
// *DuplicateError.
func CheckComplete(records []scan.Record, instances int) error {
	perDepth := map[int]int{}
	seen := map[[2]int]bool{}
	var order []int
	for _, r := range records {
		key := [2]int{r.Depth, r.Instance}
		if seen[key] {
			return &DuplicateError{Keys: []string{"depth", "instance"}, Values: []int64{int64(r.Depth), int64(r.Instance)}}
		}
		seen[key] = true
		if perDepth[r.Depth] == 0 {
			order = append(order, r.Depth)
		}
		perDepth[r.Depth]++
	}
	for _, d := range order {
		if perDepth[d] != instances {
			return fmt.Errorf("runs: depth %d has %d rows for %d instances: the tables are not whole per-instance scan tables", d, perDepth[d], instances)
		}
	}
	return nil
}

// Resume reads the scan table at path, left by an interrupted or finished
// scan, checks that it comes from the run whose metadata is want, and
// returns its records and the ids of ids that it does not hold yet. Every run
// parameter must agree, and so must the part; only the instance count may
// grow: a table of M₀ instances continued with M ≥ M₀ gains the instances
// M₀…M−1 with their own streams, so the result equals a fresh run of M. A
// mismatch is a *DifferentRunError (PathA "").
func Resume(path string, want tables.Meta, ids []int) (previous []scan.Record, todo []int, err error) {
	t, err := tables.Read(path)
	if err != nil {
		return nil, nil, err
	}
	if e := difference(want, t.Meta, func(k string) bool { return k == "instances" }); e != nil {
		e.PathB = path
		return nil, nil, e
	}
	for _, k := range []string{"part", "instances"} {
		a, okA := want.Get(k)
		b, okB := t.Meta.Get(k)
		differ := a != b || okA != okB
		if k == "instances" && okA && okB {
			na, errA := strconv.Atoi(a)
			nb, errB := strconv.Atoi(b)
			differ = errA != nil || errB != nil || nb > na
		}
		if differ {
			return nil, nil, &DifferentRunError{Key: k, A: a, B: b, AbsentA: !okA, AbsentB: !okB, PathB: path}
		}
	}
	recs, err := scanRecords(t)
	if err != nil {
		return nil, nil, fmt.Errorf("runs: %s is not a per-instance scan table: %w", path, err)
	}
	// Refuse what summarize and merge refuse: an instance list in the
	// metadata that disagrees with the rows, or a depth without a record of
	// every finished instance.
	done, err := TableInstances(t)
	if err != nil {
		return nil, nil, fmt.Errorf("%s: %w", path, err)
	}
	if err := CheckComplete(recs, len(done)); err != nil {
		return nil, nil, fmt.Errorf("runs: %s: %w", path, err)
	}
	have := map[int]bool{}
	for _, id := range done {
		have[id] = true
	}
	for _, id := range ids {
		if !have[id] {
			todo = append(todo, id)
		}
	}
	return recs, todo, nil
}

// ExactRatios returns the exact E[Z]/Z_H of each depth, in ascending depth
// order, from the collision_exact column that scan --exact writes, or nil
// when the tables carry none (so a plot of the merged tables shows what scan
// --plot showed). qubits gives Z_H = 2/(D+1).
func (s *Set) ExactRatios(limit float64) []float64 {
	byDepth := map[int]float64{}
	for _, m := range s.Members {
		z, err := m.Table.Float64s(scanExactField.Name)
		if err != nil {
			return nil
		}
		d, err := m.Table.Int64s("depth")
		if err != nil {
			return nil
		}
		for i := range z {
			byDepth[int(d[i])] = z[i]
		}
	}
	depths := slices.Sorted(maps.Keys(byDepth))
	out := make([]float64, len(depths))
	for i, d := range depths {
		out[i] = byDepth[d] / limit
	}
	return out
}
