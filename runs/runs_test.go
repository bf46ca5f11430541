package runs_test

import (
	"context"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"reflect"
	"slices"
	"strings"
	"testing"

	"mixdepth/circuits"
	"mixdepth/runs"
	"mixdepth/scan"
	"mixdepth/stats"
	"mixdepth/tables"
)

// writeGateFile writes a gate-set file: the CZ entangler with a finite
// single-qubit set {I, X} (flip = false) or {X, I} (flip = true: another
// file with the same matrices in another order, a different ensemble).
func writeGateFile(t *testing.T, path string, flip bool) {
	t.Helper()
	id, x := `[[[1,0],[0,0]],[[0,0],[1,0]]]`, `[[[0,0],[1,0]],[[1,0],[0,0]]]`
	if flip {
		id, x = x, id
	}
	cz := `[[[1,0],[0,0],[0,0],[0,0]],[[0,0],[1,0],[0,0],[0,0]],[[0,0],[0,0],[1,0],[0,0]],[[0,0],[0,0],[0,0],[-1,0]]]`
	if err := os.WriteFile(path, []byte(`{"entangler": `+cz+`, "single_qubit": [`+id+`, `+x+`]}`), 0o644); err != nil {
		t.Fatal(err)
	}
}

// sameCircuits fails unless a and b build the same gates, step by step, and
// the same final layer, for a few instances.
func sameCircuits(t *testing.T, a, b *runs.Spec) {
	t.Helper()
	for _, id := range []int{0, 3} {
		ba := circuits.NewBuilder(a.Schedule, a.Ensemble, a.Seed, id)
		bb := circuits.NewBuilder(b.Schedule, b.Ensemble, b.Seed, id)
		for step := range 10 {
			if ga, gb := ba.Next(nil), bb.Next(nil); !reflect.DeepEqual(ga, gb) {
				t.Fatalf("instance %d step %d differs", id, step)
			}
		}
		la, okA := circuits.FinalLayer(a.Ensemble, a.Graph.Qubits, a.Seed, id, 10, nil)
		lb, okB := circuits.FinalLayer(b.Ensemble, b.Graph.Qubits, b.Seed, id, 10, nil)
		if okA != okB || !reflect.DeepEqual(la, lb) {
			t.Fatalf("instance %d: final layers differ", id)
		}
	}
}

// TestFromMetaRebuildsSpec: the metadata of a Spec rebuilds the same
// circuits, for every kind of option; a gate set read from a file is
// rebuilt from the metadata alone after the file was removed or edited.
func TestFromMetaRebuildsSpec(t *testing.T) {
	dir := t.TempDir()
	labelled := filepath.Join(dir, "chip.edges")
	if err := os.WriteFile(labelled, []byte("QA QB\nQB QC\nQC QD\nQD QA\nQA QC\nQC QE\nQE QD\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	gates := filepath.Join(dir, "gates.json")
	writeGateFile(t, gates, false)
	for _, o := range []runs.Options{
		{Graph: "grid:2x3", Seed: 1},
		{Graph: "ring:5", Gates: "clifford", Seed: 2},
		{Graph: "line:4", Schedule: "random-edge", Seed: 3},
		{Graph: "star:4", Gates: "cz+haar1", Seed: 4},
		{Graph: "line:5", Gates: gates, Seed: 5},
		{Seed: 6}, // the demo chip
		{Graph: "grid:3x3", Drop: "4,0-1", Seed: 8},
		{Graph: "honeycomb:1x2", Drop: "3-4", Seed: 9},
		{Graph: labelled, Drop: "QB,QA-QD", Seed: 10},
		{Graph: labelled, Schedule: "random-edge", Seed: 11},
	} {
		s, err := runs.NewSpec(o)
		if err != nil {
			t.Fatal(err)
		}
		meta := s.Meta("test")
		_, hasSet := meta.Get(runs.KeyGateSet)
		if hasSet != (o.Gates == gates) {
			t.Errorf("%+v: gate_set recorded %v; want it for a file's gate set only", o, hasSet)
		}
		back, err := runs.FromMeta(meta)
		if err != nil {
			t.Fatalf("%+v: %v", o, err)
		}
		if back.Graph.Digest() != s.Graph.Digest() || back.Seed != s.Seed || back.Ensemble.Name() != s.Ensemble.Name() || back.Layout != s.Layout {
			t.Errorf("%+v: rebuilt %+v", o, back)
		}
		if !reflect.DeepEqual(back.Graph.Labels, s.Graph.Labels) || !reflect.DeepEqual(back.Graph.Dropped, s.Graph.Dropped) {
			t.Errorf("%+v: labels %v dropped %v rebuilt as %v, %v", o, s.Graph.Labels, s.Graph.Dropped, back.Graph.Labels, back.Graph.Dropped)
		}
		if (o.Drop != "") != (len(s.Graph.Dropped) > 0) {
			t.Errorf("%+v: Dropped = %v", o, s.Graph.Dropped)
		}
		sameCircuits(t, s, back)
	}

	// Labels enter the digest: relabelled metadata is refused.
	ls, err := runs.NewSpec(runs.Options{Graph: labelled, Seed: 1})
	if err != nil {
		t.Fatal(err)
	}
	lm := ls.Meta("test")
	lm.Set(runs.KeyLabels, "QB,QA,QC,QD,QE")
	if _, err := runs.FromMeta(lm); err == nil || !strings.Contains(err.Error(), "graph_digest") {
		t.Errorf("relabelled metadata: %v", err)
	}

	s, err := runs.NewSpec(runs.Options{Graph: "line:5", Gates: gates, Seed: 7})
	if err != nil {
		t.Fatal(err)
	}
	meta := s.Meta("test")
	writeGateFile(t, gates, true) // edited after the table was written
	back, err := runs.FromMeta(meta)
	if err != nil {
		t.Fatal(err)
	}
	sameCircuits(t, s, back)
	if err := os.Remove(gates); err != nil { // moved away
		t.Fatal(err)
	}
	if back, err = runs.FromMeta(meta); err != nil {
		t.Fatal(err)
	}
	sameCircuits(t, s, back)

	enc, _ := meta.Get(runs.KeyGateSet)
	meta.Set(runs.KeyGateSet, strings.Replace(enc, "[-1,0]", "[1,0]", 1))
	if _, err := runs.FromMeta(meta); err == nil || !strings.Contains(err.Error(), runs.KeyGateSetDigest) {
		t.Errorf("altered gate_set: %v", err)
	}
}

// TestNewSpecErrors: each bad option is an *OptionError naming it.
func TestNewSpecErrors(t *testing.T) {
	for _, c := range []struct {
		o      runs.Options
		option string
	}{
		{runs.Options{Graph: "line:x"}, "graph"},
		{runs.Options{Graph: "line:4", Schedule: "brick"}, "schedule"},
		{runs.Options{Graph: "line:4", Gates: "no-such-set"}, "gates"},
		{runs.Options{Layout: filepath.Join(t.TempDir(), "none.json")}, "layout"},
	} {
		_, err := runs.NewSpec(c.o)
		var oe *runs.OptionError
		if !errors.As(err, &oe) || oe.Option != c.option {
			t.Errorf("%+v: %v, want an OptionError for %s", c.o, err, c.option)
		}
	}
}

// TestSameRunGateFiles: parts whose gate files hold different sets differ in
// gate_set, whatever their paths; the same content under another path (a
// part run from another folder) is the same run.
func TestSameRunGateFiles(t *testing.T) {
	dir := t.TempDir()
	a, b, c := filepath.Join(dir, "a.json"), filepath.Join(dir, "b.json"), filepath.Join(dir, "c.json")
	writeGateFile(t, a, false)
	writeGateFile(t, b, true)
	writeGateFile(t, c, false)
	meta := func(path string) tables.Meta {
		s, err := runs.NewSpec(runs.Options{Graph: "line:4", Gates: path, Seed: 1})
		if err != nil {
			t.Fatal(err)
		}
		return s.Meta("cmd " + path)
	}
	err := runs.SameRun(meta(a), meta(b), "p0", "p1")
	var dr *runs.DifferentRunError
	if !errors.As(err, &dr) || dr.Key != runs.KeyGateSet || dr.PathA != "p0" || dr.PathB != "p1" {
		t.Errorf("different gate files: %v, want a DifferentRunError on %s", err, runs.KeyGateSet)
	}
	if err := runs.SameRun(meta(a), meta(c), "p0", "p1"); err != nil {
		t.Errorf("the same gate set under two paths: %v", err)
	}
	builtin, _ := runs.NewSpec(runs.Options{Graph: "line:4", Gates: "cz+haar1", Seed: 1})
	if err := runs.SameRun(builtin.Meta(""), meta(a), "p0", "p1"); !errors.As(err, &dr) || dr.Key != "gates" {
		t.Errorf("a built-in set against a file's: %v, want the gates key", err)
	}
}

// TestIDsRoundTrip: FormatIDs and ParseIDs are inverse on ascending id lists,
// and ParseIDs refuses what FormatIDs never writes.
func TestIDsRoundTrip(t *testing.T) {
	for _, ids := range [][]int{nil, {0}, {0, 1, 2}, {3, 5, 6, 7, 10}, {0, 2, 4, 5}} {
		s := runs.FormatIDs(ids)
		back, err := runs.ParseIDs(s)
		if err != nil || !slices.Equal(back, ids) {
			t.Errorf("%v → %q → %v, %v", ids, s, back, err)
		}
	}
	if s := runs.FormatIDs([]int{0, 1, 2, 5, 7, 8}); s != "0-2,5,7-8" {
		t.Errorf("FormatIDs = %q, want 0-2,5,7-8", s)
	}
	for _, bad := range []string{"x", "3-1", "2,1", "0-3,3", "-1", fmt.Sprintf("0-%d", runs.MaxInstances)} {
		var le *runs.ListError
		if _, err := runs.ParseIDs(bad); !errors.As(err, &le) {
			t.Errorf("ParseIDs(%q) = %v, want a ListError", bad, err)
		}
	}
}

// TestParts: the parts K/N of a run cover its instances once each; K counts
// from 0, so N/N does not exist.
func TestParts(t *testing.T) {
	var all []int
	for k := range 3 {
		p, err := runs.ParsePart(fmt.Sprintf("%d/3", k))
		if err != nil {
			t.Fatal(err)
		}
		all = append(all, p.Instances(10)...)
	}
	slices.Sort(all)
	if !slices.Equal(all, runs.Whole.Instances(10)) {
		t.Errorf("parts cover %v", all)
	}
	for _, bad := range []string{"3/3", "1/0", "-1/2", "1", "a/b"} {
		if _, err := runs.ParsePart(bad); err == nil {
			t.Errorf("ParsePart(%q) accepted", bad)
		}
	}
	if p, err := runs.ParsePart(""); err != nil || !p.IsWhole() {
		t.Errorf(`ParsePart("") = %v, %v; want the whole run`, p, err)
	}
}

// scanTables simulates the instances of each part list of a small run and
// writes one table per list; it returns their paths, the run's metadata and
// the whole run's records.
func scanTables(t *testing.T, dir string, instances int, lists ...[]int) ([]string, *runs.ScanRun, []scan.Record) {
	t.Helper()
	spec, err := runs.NewSpec(runs.Options{Graph: "grid:2x3", Seed: 9})
	if err != nil {
		t.Fatal(err)
	}
	run := &runs.ScanRun{Spec: spec, Depths: []int{1, 3, 6}, Instances: instances, Eps: 0.05, Confidence: 0.95,
		Part: runs.Whole, Precision: scan.PrecisionDouble}
	simulate := func(ids []int) []scan.Record {
		recs, _, err := scan.Run(context.Background(), &scan.Config{Graph: spec.Graph, Schedule: spec.Schedule,
			Ensemble: spec.Ensemble, Depths: run.Depths, Instances: ids, Seed: spec.Seed, Workers: 1})
		if err != nil {
			t.Fatal(err)
		}
		return recs
	}
	var paths []string
	for i, ids := range lists {
		meta := run.Meta("test")
		runs.SetDone(&meta, ids, true)
		p := filepath.Join(dir, fmt.Sprintf("t%d.parquet", i))
		if err := runs.WriteScanTable(p, meta, simulate(ids), nil); err != nil {
			t.Fatal(err)
		}
		paths = append(paths, p)
	}
	return paths, run, simulate(runs.Whole.Instances(instances))
}

// TestMergeAndSummarize: tables holding disjoint instance sets merge to the
// rows of the whole run, bit for bit, and its curve is the whole run's
// (per-instance streams: the rows do not depend on how the run is split);
// a table given twice is a DuplicateError; missing instances are reported.
func TestMergeAndSummarize(t *testing.T) {
	dir := t.TempDir()
	paths, _, whole := scanTables(t, dir, 8, []int{5, 6, 7}, []int{0, 1, 2, 3, 4})
	set, err := runs.ReadSet(paths...)
	if err != nil {
		t.Fatal(err)
	}
	if m := set.Missing(); len(m) != 0 {
		t.Errorf("missing %v", m)
	}
	recs, err := set.ScanRecords()
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(recs, whole) {
		t.Fatal("records of the set differ from the whole run's")
	}
	if a, b := scan.Estimate(6, recs, stats.DefaultCriteria(0.05, 0.95)), scan.Estimate(6, whole, stats.DefaultCriteria(0.05, 0.95)); !reflect.DeepEqual(a, b) {
		t.Errorf("curves differ: %+v vs %+v", a, b)
	}
	merged, err := set.Merge()
	if err != nil {
		t.Fatal(err)
	}
	mrecs, err := runs.ScanRecords(merged)
	if err != nil || !reflect.DeepEqual(mrecs, whole) {
		t.Fatalf("merged rows differ from the whole run's (%v)", err)
	}
	for k, want := range map[string]string{"part": "0/1", "partial": "false", "instances_done": "0-7"} {
		if v, _ := merged.Meta.Get(k); v != want {
			t.Errorf("merged %s = %q, want %q", k, v, want)
		}
	}

	_, err = runs.ReadSet(paths[0], paths[1], paths[0])
	var dup *runs.DuplicateError
	if !errors.As(err, &dup) || dup.Values[0] != 5 || dup.PathA != paths[0] {
		t.Errorf("a table given twice: %v, want a DuplicateError on instance 5", err)
	}
	set, err = runs.ReadSet(paths[0])
	if err != nil {
		t.Fatal(err)
	}
	if m := set.Missing(); !slices.Equal(m, []int{0, 1, 2, 3, 4}) {
		t.Errorf("missing %v, want 0-4", m)
	}
}

// TestResumeExtends: a finished table of 5 instances continued with 8 runs
// only 5, 6, 7; a smaller count, another part or another depth list is a
// DifferentRunError naming the key.
func TestResumeExtends(t *testing.T) {
	dir := t.TempDir()
	paths, run, _ := scanTables(t, dir, 5, []int{0, 1, 2, 3, 4})
	run.Instances = 8
	prev, todo, err := runs.Resume(paths[0], run.Meta("again"), runs.Whole.Instances(8))
	if err != nil || len(prev) != 15 || !slices.Equal(todo, []int{5, 6, 7}) {
		t.Fatalf("extend to 8: %d records, todo %v, %v", len(prev), todo, err)
	}
	for _, c := range []struct {
		change func(r *runs.ScanRun)
		key    string
	}{
		{func(r *runs.ScanRun) { r.Instances = 4 }, "instances"},
		{func(r *runs.ScanRun) { r.Part = runs.Part{K: 1, N: 2} }, "part"},
		{func(r *runs.ScanRun) { r.Depths = []int{1, 3} }, "depths"},
		{func(r *runs.ScanRun) { r.Eps = 0.1 }, "eps"},
	} {
		r := *run
		c.change(&r)
		_, _, err := runs.Resume(paths[0], r.Meta("again"), r.Part.Instances(r.Instances))
		var dr *runs.DifferentRunError
		if !errors.As(err, &dr) || dr.Key != c.key || dr.PathB != paths[0] {
			t.Errorf("changed %s: %v", c.key, err)
		}
	}
}
