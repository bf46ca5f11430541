package runs_test

import (
	"context"
	"errors"
	"fmt"
	"log"
	"os"
	"path/filepath"

	"mixdepth/runs"
	"mixdepth/scan"
	"mixdepth/stats"
)

// A run of 40 instances split into two parts, each simulated and written to
// its own table as a job of a job array would; the parts are then merged and
// summarized, and the merged rows equal those of the whole run done at once.
func ExampleSet_Merge() {
	dir, err := os.MkdirTemp("", "runs-example")
	if err != nil {
		log.Fatal(err)
	}
	defer os.RemoveAll(dir)

	spec, err := runs.NewSpec(runs.Options{Graph: "line:6", Seed: 1})
	if err != nil {
		log.Fatal(err)
	}
	const instances = 40
	depths := []int{2, 4, 8}
	simulate := func(ids []int) []scan.Record {
		recs, _, err := scan.Run(context.Background(), &scan.Config{Graph: spec.Graph, Schedule: spec.Schedule,
			Ensemble: spec.Ensemble, Depths: depths, Instances: ids, Seed: spec.Seed, Workers: 1})
		if err != nil {
			log.Fatal(err)
		}
		return recs
	}

	var paths []string
	for k := range 2 {
		part := runs.Part{K: k, N: 2}
		run := &runs.ScanRun{Spec: spec, Depths: depths, Instances: instances, Eps: 0.05, Confidence: 0.95,
			Part: part, Precision: scan.PrecisionDouble}
		meta := run.Meta("example")
		ids := part.Instances(instances)
		runs.SetDone(&meta, ids, false)
		path := filepath.Join(dir, fmt.Sprintf("part-%d.arrow", k))
		if err := runs.WriteScanTable(path, meta, simulate(ids), nil); err != nil {
			log.Fatal(err)
		}
		paths = append(paths, path)
	}

	set, err := runs.ReadSet(paths...)
	if err != nil {
		log.Fatal(err)
	}
	merged, err := set.Merge()
	if err != nil {
		log.Fatal(err)
	}
	partial, _ := merged.Meta.Get("partial")
	fmt.Printf("merged %d rows of instances %s, partial %s\n", merged.Len(), runs.FormatIDs(set.Done), partial)

	records, err := set.ScanRecords()
	if err != nil {
		log.Fatal(err)
	}
	whole := simulate(runs.Whole.Instances(instances))
	same := len(records) == len(whole)
	for i := range whole {
		same = same && records[i] == whole[i]
	}
	fmt.Println("records equal to the whole run:", same)
	curve := scan.Estimate(spec.Graph.Qubits, records, stats.DefaultCriteria(0.05, 0.95))
	for _, r := range curve.Rows {
		fmt.Printf("depth %d: R = %.3f\n", r.Depth, r.Ratio)
	}
	// Output:
	// merged 120 rows of instances 0-39, partial false
	// records equal to the whole run: true
	// depth 2: R = 1.809
	// depth 4: R = 1.349
	// depth 8: R = 1.050
}

// Two tables written with different seeds are not parts of one run: the
// error names the parameter.
func ExampleDifferentRunError() {
	a, _ := runs.NewSpec(runs.Options{Graph: "ring:5", Seed: 1})
	b, _ := runs.NewSpec(runs.Options{Graph: "ring:5", Seed: 2})
	err := runs.SameRun(a.Meta("first"), b.Meta("second"), "a.arrow", "b.arrow")
	var dr *runs.DifferentRunError
	if errors.As(err, &dr) {
		fmt.Println(dr.Key, dr.A, dr.B)
	}
	fmt.Println(err)
	// Output:
	// seed 1 2
	// runs: a.arrow and b.arrow come from different runs: their seed differs ("1" vs "2")
}
