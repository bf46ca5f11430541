package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"
	"strings"

	"mixdepth/circuits"
	"mixdepth/plots"
	"mixdepth/sampling"
	"mixdepth/scan"
	"mixdepth/sim"
	"mixdepth/stats"
	"mixdepth/tables"
)

func init() {
	register(command{name: "pt-plot", summary: "plot the output probabilities of a scan's circuits against the Porter–Thomas law", run: runPTPlot})
}

// ptRelTol is the relative difference allowed between a collision
// probability re-simulated by pt-plot and the one its table records. The
// gates are the same, applied in the same order; but scan reads out several
// depths from one run, applying the final single-qubit layer (if any) for
// each readout and undoing it, which perturbs the state by rounding, about
// 1e-16 per readout, and the sums may split differently across goroutines.
// 1e-12 is far above that and far below any real mismatch (another seed or
// circuit changes Z in the first digits).
const ptRelTol = 1e-12

func runPTPlot(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	fs := newFlags("pt-plot", "mixdepth pt-plot FILE --out PLOT.png|PLOT.svg: FILE is a per-instance scan table.\n\nRebuilds the circuits of a per-instance scan table from its metadata, simulates some of its\ninstances again to one depth, and draws the histogram of the rescaled output probabilities D·p\nagainst the Porter–Thomas density e^(−x) and the exact finite-D Haar law. Each re-simulated\ninstance is checked against the collision probability the table records.",
		"mixdepth pt-plot scan.parquet --depth 8 --instances 20 --out pt-depth8.png", stdout)
	depth := fs.Int("depth", 0, "depth to simulate (default: the table's anti-concentration depth, else its deepest depth)")
	instances := fs.Int("instances", 20, "number of the run's instances to simulate (the lowest ids)")
	out := fs.String("out", "", "plot file, FILE.png or FILE.svg (required)")
	workers := fs.Int("workers", defaultWorkers(), "worker goroutines for large states")
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if fs.NArg() != 1 {
		return badInput("pt-plot takes one table file (got %d arguments): mixdepth pt-plot FILE --out PLOT.png", fs.NArg())
	}
	if *out == "" {
		return badInput("pt-plot: --out PLOT.png or --out PLOT.svg is required")
	}
	if err := plots.CheckPath(*out); err != nil {
		return usageError{fmt.Errorf("--out: %w", err)}
	}
	if *instances < 1 {
		return badInput("--instances %d: must be at least 1", *instances)
	}
	if *depth < 0 {
		return badInput("--depth %d: must be positive", *depth)
	}
	if *workers < 1 {
		return badInput("--workers %d: must be at least 1", *workers)
	}
	path := fs.Arg(0)
	t, err := tables.Read(path)
	if err != nil {
		return usageError{err}
	}
	s, err := setupFromMeta(t.Meta)
	if err != nil {
		return usageError{fmt.Errorf("%s: %w", path, err)}
	}
	seed, err := metaUint(t.Meta, "seed")
	if err != nil {
		return usageError{fmt.Errorf("%s: %w", path, err)}
	}
	var records []scan.Record
	if cmd, _ := t.Meta.Get("command"); cmd == "scan" {
		if records, err = scanRecords(t); err != nil {
			return badInput("%s: a scan table without the scan columns: %v", path, err)
		}
	}
	d := *depth
	if d == 0 {
		if len(records) == 0 {
			return badInput("%s holds no scan rows to choose a depth from: give --depth D", path)
		}
		d = defaultPTDepth(t.Meta, s.graph.Qubits, records)
	}
	if err := checkCircuitDepth(s, d); err != nil {
		return err
	}
	ids, err := tableInstances(t)
	if err != nil {
		return usageError{fmt.Errorf("%s: %w", path, err)}
	}
	if len(ids) == 0 {
		return badInput("%s lists no finished instances", path)
	}
	if len(ids) > *instances {
		ids = ids[:*instances]
	}
	recorded := map[int]float64{}
	for _, r := range records {
		if r.Depth == d {
			recorded[r.Instance] = r.Collision
		}
	}

	n := s.graph.Qubits
	dim := 1 << n
	st, err := sim.NewState(n, float64(len(ids))*float64(dim)*8)
	if err != nil {
		if errors.Is(err, sim.ErrTooLarge) {
			return usageError{err}
		}
		return err
	}
	probs := make([][]float64, len(ids))
	scratch := make([]float64, dim)
	ks := make([]float64, len(ids))
	checked := 0
	for k, id := range ids {
		if ctx.Err() != nil {
			return errInterrupted
		}
		probs[k] = instanceProbabilities(st, s, seed, id, d, *workers, make([]float64, dim))
		ks[k] = stats.KSHaar(probs[k], scratch)
		if want, ok := recorded[id]; ok {
			got := stats.Collision(probs[k])
			if math.Abs(got-want) > ptRelTol*math.Abs(want) {
				return badInput("%s: instance %d at depth %d simulates to Z = %.17g but the table records %.17g: its metadata does not rebuild its circuits (an edited table, or one from another mixdepth version)", path, id, d, got, want)
			}
			checked++
		}
	}
	title := fmt.Sprintf("%s, %s schedule, %s gates: depth %d (D = %d)", s.graph.Name, s.schedule.Kind(), s.ensemble.Name(), d, dim)
	if err := plots.PorterThomasPlot(*out, probs, d, title); err != nil {
		return err
	}
	fmt.Fprintf(stdout, "Porter–Thomas plot of %d instance(s) × %d outcomes at depth %d: mean KS distance to Beta(1, D−1) %.4f; %d instance(s) matched the table's collision probability → %s\n",
		len(ids), dim, d, stats.Summarize(ks).Mean, checked, *out)
	return nil
}

// defaultPTDepth is the anti-concentration depth of the table's summary at
// its own eps and confidence, or its deepest depth when none qualifies.
func defaultPTDepth(meta tables.Meta, qubits int, records []scan.Record) int {
	eps, conf := metaFloatOr(meta, "eps", fallbackEps), metaFloatOr(meta, "confidence", fallbackConfidence)
	sum := scan.Estimate(qubits, records, conf, eps)
	if sum.Found {
		return sum.Depth
	}
	return sum.Rows[len(sum.Rows)-1].Depth
}

// instanceProbabilities simulates instance id of the run described by s and
// seed to the given depth as scan does, final single-qubit layer included
// (sampling.Build), and returns the output probabilities in dst.
func instanceProbabilities(st *sim.State, s *setup, seed uint64, id, depth, workers int, dst []float64) []float64 {
	return sampling.Build(s.schedule, s.ensemble, s.graph.Qubits, seed, id, depth).Probabilities(st, dst, workers)
}

// tableInstances returns the finished instance ids of a table: its
// instances_done key, or the distinct ids of its instance column when the
// key is absent. It checks that every row belongs to a listed instance.
func tableInstances(t *tables.Table) ([]int, error) {
	col, err := t.Int64s("instance")
	if err != nil {
		return nil, fmt.Errorf("not a per-instance table: %w", err)
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
	ids, err := parseIDs(spec)
	if err != nil {
		return nil, fmt.Errorf("metadata instances_done: %w", err)
	}
	listed := map[int]bool{}
	for _, id := range ids {
		listed[id] = true
	}
	for _, id := range inRows {
		if !listed[id] {
			return nil, fmt.Errorf("rows of instance %d, which instances_done (%q) does not list", id, spec)
		}
	}
	if len(inRows) != len(ids) {
		return nil, fmt.Errorf("instances_done lists %d instances but the rows hold %d: the table is damaged; rewrite it from its shards", len(ids), len(inRows))
	}
	return ids, nil
}

// setupFromMeta rebuilds the circuits of a run from the metadata of a table
// it wrote (see runMeta): the graph from qubits, graph and edges, checked
// against graph_digest; the layered schedule from layers, or the random-edge
// schedule; the gate ensemble from gates. Errors name the key at fault.
func setupFromMeta(meta tables.Meta) (*setup, error) {
	get := func(key string) (string, error) {
		v, ok := meta.Get(key)
		if !ok {
			return "", fmt.Errorf("metadata has no %q key: not a table written by a mixdepth command that builds circuits", key)
		}
		return v, nil
	}
	name, err := get("graph")
	if err != nil {
		return nil, err
	}
	qubits, err := metaInt(meta, "qubits")
	if err != nil {
		return nil, err
	}
	edgeSpec, err := get("edges")
	if err != nil {
		return nil, err
	}
	edges, err := parseEdges(edgeSpec)
	if err != nil {
		return nil, fmt.Errorf("metadata edges: %w", err)
	}
	g, err := circuits.NewGraph(name, qubits, edges)
	if err != nil {
		return nil, fmt.Errorf("metadata edges: %w", err)
	}
	digest, err := get("graph_digest")
	if err != nil {
		return nil, err
	}
	if digest != g.Digest() {
		return nil, fmt.Errorf("metadata edges give graph digest %s but graph_digest is %s: the metadata was altered", g.Digest(), digest)
	}
	s := &setup{graph: g}
	s.layout, _ = meta.Get("layout")
	kind, err := get("schedule")
	if err != nil {
		return nil, err
	}
	switch kind {
	case "layered":
		spec, err := get("layers")
		if err != nil {
			return nil, err
		}
		var classes [][]circuits.Edge
		for i, part := range strings.Split(spec, ";") {
			class, err := parseEdges(part)
			if err != nil || len(class) == 0 {
				return nil, fmt.Errorf("metadata layers: layer %d (%q) is not a list a-b,c-d,…", i, part)
			}
			for _, e := range class {
				if !g.HasEdge(e.A, e.B) {
					return nil, fmt.Errorf("metadata layers: layer %d uses %d-%d, which is not an edge of the graph", i, e.A, e.B)
				}
			}
			classes = append(classes, class)
		}
		s.schedule = &circuits.Layered{Classes: classes}
	case "random-edge":
		s.schedule = &circuits.RandomEdge{Edges: g.Edges}
	default:
		return nil, fmt.Errorf("metadata schedule %q: expected layered or random-edge", kind)
	}
	gates, err := get("gates")
	if err != nil {
		return nil, err
	}
	if s.ensemble, err = circuits.NewEnsemble(gates); err != nil {
		return nil, fmt.Errorf("metadata gates: %w", err)
	}
	return s, nil
}

// parseEdges reads the "a-b,c-d,…" form written by formatEdges.
func parseEdges(spec string) ([]circuits.Edge, error) {
	if spec == "" {
		return nil, nil
	}
	var edges []circuits.Edge
	for _, item := range strings.Split(spec, ",") {
		as, bs, ok := strings.Cut(item, "-")
		a, err1 := strconv.Atoi(as)
		b, err2 := strconv.Atoi(bs)
		if !ok || err1 != nil || err2 != nil {
			return nil, fmt.Errorf("%q is not an edge a-b", item)
		}
		edges = append(edges, circuits.Edge{A: a, B: b})
	}
	return edges, nil
}

// metaInt reads an integer metadata value.
func metaInt(meta tables.Meta, key string) (int, error) {
	v, ok := meta.Get(key)
	if !ok {
		return 0, fmt.Errorf("metadata has no %q key", key)
	}
	n, err := strconv.Atoi(v)
	if err != nil {
		return 0, fmt.Errorf("metadata %s %q is not a whole number", key, v)
	}
	return n, nil
}

// metaUint reads an unsigned integer metadata value, such as the seed.
func metaUint(meta tables.Meta, key string) (uint64, error) {
	v, ok := meta.Get(key)
	if !ok {
		return 0, fmt.Errorf("metadata has no %q key", key)
	}
	n, err := strconv.ParseUint(v, 10, 64)
	if err != nil {
		return 0, fmt.Errorf("metadata %s %q is not a whole number", key, v)
	}
	return n, nil
}

// metaFloatOr reads a float metadata value, or returns def when the key is
// absent or unreadable (tables written before the key existed).
func metaFloatOr(meta tables.Meta, key string, def float64) float64 {
	v, ok := meta.Get(key)
	if !ok {
		return def
	}
	x, err := strconv.ParseFloat(v, 64)
	if err != nil {
		return def
	}
	return x
}
