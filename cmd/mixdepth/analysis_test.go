package main

import (
	"context"
	"encoding/csv"
	"encoding/json"
	"image/png"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"slices"
	"strconv"
	"strings"
	"testing"

	"github.com/apache/arrow-go/v18/arrow"
	"github.com/apache/arrow-go/v18/arrow/array"
	"github.com/apache/arrow-go/v18/arrow/ipc"
	"github.com/apache/arrow-go/v18/arrow/memory"
	"github.com/apache/arrow-go/v18/parquet"
	"github.com/apache/arrow-go/v18/parquet/compress"
	"github.com/apache/arrow-go/v18/parquet/file"
	"github.com/apache/arrow-go/v18/parquet/pqarrow"

	"mixdepth/circuits"
	"mixdepth/tables"
)

// A small run used throughout: 6 qubits, 3 depths, 12 instances; a few
// hundred milliseconds.
var smallRun = []string{"--graph", "grid:2x3", "--depths", "1,3,6", "--instances", "12", "--seed", "5", "--workers", "1"}

// mustRun runs the command line and fails the test unless it exits 0.
func mustRun(t *testing.T, args ...string) string {
	t.Helper()
	stdout, stderr, code := runCLI(t, args...)
	if code != 0 {
		t.Fatalf("%v: exit %d: %s", args, code, stderr)
	}
	return stdout
}

// wantExit2 runs the command line, expects exit status 2 with one
// "mixdepth: " line on stderr containing every fragment, and returns it.
func wantExit2(t *testing.T, args []string, fragments ...string) string {
	t.Helper()
	stdout, stderr, code := runCLI(t, args...)
	if code != 2 {
		t.Fatalf("%v: exit %d, want 2; stderr %q", args, code, stderr)
	}
	if stdout != "" {
		t.Errorf("%v: stdout not empty: %q", args, stdout)
	}
	lines := strings.Split(strings.TrimRight(stderr, "\n"), "\n")
	if len(lines) != 1 || !strings.HasPrefix(lines[0], "mixdepth: ") {
		t.Errorf("%v: want one 'mixdepth: ' line on stderr, got %q", args, stderr)
	}
	for _, f := range fragments {
		if !strings.Contains(stderr, f) {
			t.Errorf("%v: stderr %q does not mention %q", args, stderr, f)
		}
	}
	return stderr
}

func readTable(t *testing.T, path string) *tables.Table {
	t.Helper()
	tab, err := tables.Read(path)
	if err != nil {
		t.Fatal(err)
	}
	return tab
}

// equalRowsExactly reports the first difference between the columns of two
// tables, comparing floats bit for bit.
func equalRowsExactly(t *testing.T, got, want *tables.Table) {
	t.Helper()
	if len(got.Fields) != len(want.Fields) {
		t.Fatalf("%d columns, want %d", len(got.Fields), len(want.Fields))
	}
	for j, f := range want.Fields {
		if got.Fields[j].Name != f.Name || got.Fields[j].Type != f.Type {
			t.Fatalf("column %d is %s %s, want %s %s", j, got.Fields[j].Name, got.Fields[j].Type, f.Name, f.Type)
		}
	}
	if got.Len() != want.Len() {
		t.Fatalf("%d rows, want %d", got.Len(), want.Len())
	}
	for j, f := range want.Fields {
		for i := range want.Len() {
			a, b := cell(got, j, i), cell(want, j, i)
			if x, ok := a.(float64); ok {
				if math.Float64bits(x) != math.Float64bits(b.(float64)) {
					t.Fatalf("row %d column %s: %v, want %v (bit for bit)", i, f.Name, a, b)
				}
				continue
			}
			if a != b {
				t.Fatalf("row %d column %s: %v, want %v", i, f.Name, a, b)
			}
		}
	}
}

// metaWithout returns the metadata pairs whose keys are not in drop.
func metaWithout(m tables.Meta, drop ...string) [][2]string {
	var out [][2]string
	for i, k := range m.Keys {
		if !slices.Contains(drop, k) {
			out = append(out, [2]string{k, m.Values[i]})
		}
	}
	return out
}

// partRun writes the single run and its three parts and returns their
// paths (single first).
func partRun(t *testing.T, dir string, args []string, ext string) (string, []string) {
	t.Helper()
	single := filepath.Join(dir, "single"+ext)
	mustRun(t, append(append([]string{"scan"}, args...), "--out", single)...)
	var parts []string
	for k := range 3 {
		p := filepath.Join(dir, "part-"+strconv.Itoa(k)+ext)
		mustRun(t, append(append([]string{"scan"}, args...), "--part", strconv.Itoa(k)+"/3", "--out", p)...)
		parts = append(parts, p)
	}
	return single, parts
}

// TestMergeParts: parts 0/3, 1/3 and 2/3 merged give the single run's rows
// bit for bit and its metadata but the command line, in either format and
// whatever order the parts are given in (instance i draws only from the
// stream of (seed, i), which makes each instance independent of the split).
func TestMergeParts(t *testing.T) {
	dir := t.TempDir()
	single, parts := partRun(t, dir, smallRun, ".parquet")
	want := readTable(t, single)
	for _, c := range []struct {
		out    string
		inputs []string
	}{
		{"merged.parquet", parts},
		{"merged.arrow", []string{parts[2], parts[0], parts[1]}},
	} {
		out := filepath.Join(dir, c.out)
		stdout := mustRun(t, append([]string{"merge", "--out", out}, c.inputs...)...)
		if !strings.Contains(stdout, "complete") || !strings.Contains(stdout, "36 rows") {
			t.Errorf("merge output %q", stdout)
		}
		got := readTable(t, out)
		equalRowsExactly(t, got, want)
		if g, w := metaWithout(got.Meta, "command_line"), metaWithout(want.Meta, "command_line"); !reflect.DeepEqual(g, w) {
			t.Errorf("%s metadata\n%v\nwant\n%v", c.out, g, w)
		}
	}
	// A merged table merges again, alone, to itself.
	again := filepath.Join(dir, "again.parquet")
	mustRun(t, "merge", "--out", again, filepath.Join(dir, "merged.arrow"))
	equalRowsExactly(t, readTable(t, again), want)
}

// TestMergeRefuses: tables of different runs, a missing part, a repeated
// part and bad usage are bad input (exit 2) naming the problem.
func TestMergeRefuses(t *testing.T) {
	dir := t.TempDir()
	_, parts := partRun(t, dir, smallRun, ".arrow")
	otherSeed := filepath.Join(dir, "seed6.arrow")
	mustRun(t, "scan", "--graph", "grid:2x3", "--depths", "1,3,6", "--instances", "12", "--seed", "6", "--workers", "1", "--part", "1/3", "--out", otherSeed)
	otherGraph := filepath.Join(dir, "line.arrow")
	mustRun(t, "scan", "--graph", "line:6", "--depths", "1,3,6", "--instances", "12", "--seed", "5", "--workers", "1", "--part", "1/3", "--out", otherGraph)
	out := filepath.Join(dir, "out.parquet")

	wantExit2(t, []string{"merge", "--out", out, parts[0], otherSeed, parts[2]}, "different runs", "seed", `"5"`, `"6"`)
	wantExit2(t, []string{"merge", "--out", out, parts[0], otherGraph, parts[2]}, "different runs", "graph", "grid:2x3", "line:6")
	wantExit2(t, []string{"merge", "--out", out, parts[0], parts[1]}, "missing", "2,5,8,11", "part 2/3", "--allow-partial")
	wantExit2(t, []string{"merge", "--out", out, parts[0], parts[1], parts[1], parts[2]}, "in both")
	wantExit2(t, []string{"merge", parts[0]}, "--out")
	wantExit2(t, []string{"merge", "--out", out}, "part tables")
	wantExit2(t, []string{"merge", "--out", filepath.Join(dir, "out.csv"), parts[0]}, ".arrow or .parquet")
	wantExit2(t, []string{"merge", "--out", out, filepath.Join(dir, "absent.arrow")}, "absent.arrow")
	if _, err := os.Stat(out); err == nil {
		t.Fatal("a refused merge wrote its output")
	}

	stdout, stderr, code := runCLI(t, "merge", "--allow-partial", "--out", out, parts[0], parts[2])
	if code != 0 || !strings.Contains(stdout, "partial") || !strings.Contains(stderr, "1,4,7,10") {
		t.Fatalf("--allow-partial: exit %d, stdout %q, stderr %q", code, stdout, stderr)
	}
	m := readTable(t, out).Meta
	for k, want := range map[string]string{"partial": "true", "instances_done": "0,2-3,5-6,8-9,11", "part": "0/1", "instances": "12"} {
		if v, _ := m.Get(k); v != want {
			t.Errorf("partial merge: %s = %q, want %q", k, v, want)
		}
	}
}

// TestSummarize: summarize recomputes scan's summary from the per-instance
// table, the same JSON document and the same text, from the whole run or
// from its parts; --eps overrides the recorded threshold.
func TestSummarize(t *testing.T) {
	dir := t.TempDir()
	single, parts := partRun(t, dir, smallRun, ".parquet")
	scanDoc := scanJSONOf(t, smallRun...)
	for name, files := range map[string][]string{"single": {single}, "parts": parts} {
		stdout := mustRun(t, append([]string{"summarize", "--json"}, files...)...)
		var doc scanJSON
		if err := json.Unmarshal([]byte(stdout), &doc); err != nil {
			t.Fatal(err)
		}
		if !reflect.DeepEqual(doc, scanDoc) {
			t.Errorf("%s: summarize --json\n%+v\nscan --json\n%+v", name, doc, scanDoc)
		}
	}
	scanText := mustRun(t, append([]string{"scan"}, smallRun...)...)
	if got := mustRun(t, "summarize", single); got != scanText {
		t.Errorf("summarize text\n%s\nscan text\n%s", got, scanText)
	}
	var loose scanJSON
	if err := json.Unmarshal([]byte(mustRun(t, "summarize", "--json", "--eps", "0.5", single)), &loose); err != nil {
		t.Fatal(err)
	}
	if loose.Eps != 0.5 {
		t.Errorf("--eps 0.5 gave eps %v", loose.Eps)
	}
	// One part alone is a summary of its own instances, with a note.
	stdout, stderr, code := runCLI(t, "summarize", "--json", parts[1])
	var part scanJSON
	if code != 0 || json.Unmarshal([]byte(stdout), &part) != nil || part.Instances != 4 || !strings.Contains(stderr, "4 of the run's 12") {
		t.Errorf("one part: exit %d, instances %d, stderr %q", code, part.Instances, stderr)
	}
	other := filepath.Join(dir, "other.parquet")
	mustRun(t, "scan", "--graph", "grid:2x3", "--depths", "1,3,6", "--instances", "12", "--seed", "6", "--workers", "1", "--part", "1/3", "--out", other)
	wantExit2(t, []string{"summarize", parts[0], other}, "different runs", "seed")
	wantExit2(t, []string{"summarize"}, "at least one")
	wantExit2(t, []string{"summarize", "--confidence", "2", single}, "--confidence")
}

// TestShow: the text, CSV and JSON forms of a table hold its metadata,
// columns and exact values.
func TestShow(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "t.arrow")
	mustRun(t, append(append([]string{"scan"}, smallRun...), "--out", path)...)
	tab := readTable(t, path)

	text := mustRun(t, "show", path, "--limit", "3")
	for _, want := range []string{"Arrow IPC table, 36 rows, 7 columns", "graph_digest", "instances_done", "0-11", "collision_ratio", "Kolmogorov–Smirnov", "Rows 1–3 of 36", "… 33 more rows"} {
		if !strings.Contains(text, want) {
			t.Errorf("show text lacks %q:\n%s", want, text)
		}
	}
	if def := mustRun(t, "show", path); !strings.Contains(def, "Rows 1–20 of 36") {
		t.Errorf("text default is not 20 rows:\n%s", def)
	}

	records, err := csv.NewReader(strings.NewReader(mustRun(t, "show", "--format", "csv", path))).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if len(records) != 1+tab.Len() || strings.Join(records[0], ",") != "depth,gate_count,instance,collision,collision_ratio,pt_ks,ideal_xeb" {
		t.Fatalf("csv: %d records, header %v", len(records), records[0])
	}
	z, _ := tab.Float64s("collision")
	inst, _ := tab.Int64s("instance")
	for i, rec := range records[1:] {
		got, err := strconv.ParseFloat(rec[3], 64)
		if err != nil || math.Float64bits(got) != math.Float64bits(z[i]) || rec[2] != strconv.FormatInt(inst[i], 10) {
			t.Fatalf("csv row %d: %v, want collision %v instance %d", i, rec, z[i], inst[i])
		}
	}

	var doc struct {
		RowsTotal int               `json:"rows_total"`
		RowsShown int               `json:"rows_shown"`
		Metadata  map[string]string `json:"metadata"`
		Columns   []map[string]any  `json:"columns"`
		Rows      []map[string]any  `json:"rows"`
	}
	if err := json.Unmarshal([]byte(mustRun(t, "show", "--format", "json", "--limit", "5", path)), &doc); err != nil {
		t.Fatal(err)
	}
	if doc.RowsTotal != 36 || doc.RowsShown != 5 || len(doc.Rows) != 5 || len(doc.Columns) != 7 {
		t.Fatalf("json: total %d shown %d rows %d columns %d", doc.RowsTotal, doc.RowsShown, len(doc.Rows), len(doc.Columns))
	}
	if doc.Metadata["seed"] != "5" || doc.Metadata["graph"] != "grid:2x3" {
		t.Errorf("json metadata %v", doc.Metadata)
	}
	for i, row := range doc.Rows {
		if row["collision"].(float64) != z[i] || int64(row["instance"].(float64)) != inst[i] {
			t.Errorf("json row %d: %v", i, row)
		}
	}
	wantExit2(t, []string{"show", "--format", "xml", path}, "--format")
	wantExit2(t, []string{"show", filepath.Join(dir, "absent.parquet")}, "absent.parquet")
	wantExit2(t, []string{"show"}, "one table")
}

// TestTableRoundTripCLI: a table written by the CLI reads back with arrow-go
// directly (the IPC file reader and the Parquet reader) with the values that
// tables.Read returns; the Parquet file is zstd-compressed and stores the
// Arrow schema; every Arrow buffer is released (memory.CheckedAllocator with
// AssertSize(t, 0), arrow-go's own leak check: common practice).
func TestTableRoundTripCLI(t *testing.T) {
	mem := memory.NewCheckedAllocator(memory.NewGoAllocator())
	old := tables.Allocator
	tables.Allocator = mem
	defer func() { tables.Allocator = old }()
	defer mem.AssertSize(t, 0)

	dir := t.TempDir()
	arrowPath, parquetPath := filepath.Join(dir, "t.arrow"), filepath.Join(dir, "t.parquet")
	mustRun(t, append(append([]string{"scan"}, smallRun...), "--out", arrowPath)...)
	mustRun(t, "merge", "--out", parquetPath, arrowPath)
	want := readTable(t, arrowPath)
	equalRowsExactly(t, readTable(t, parquetPath), want)

	// Arrow IPC with arrow-go's reader.
	f, err := os.Open(arrowPath)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	r, err := ipc.NewFileReader(f, ipc.WithAllocator(mem))
	if err != nil {
		t.Fatal(err)
	}
	var ipcRecs []arrow.RecordBatch
	for i := range r.NumRecords() {
		rec, err := r.RecordBatch(i)
		if err != nil {
			t.Fatal(err)
		}
		rec.Retain()
		ipcRecs = append(ipcRecs, rec)
	}
	checkArrowSchema(t, r.Schema(), want)
	compareRecords(t, "arrow IPC", ipcRecs, want)
	for _, rec := range ipcRecs {
		rec.Release()
	}
	r.Close()

	// Parquet with arrow-go's reader, and its file metadata.
	pf, err := file.OpenParquetFile(parquetPath, false, file.WithReadProps(parquet.NewReaderProperties(mem)))
	if err != nil {
		t.Fatal(err)
	}
	defer pf.Close()
	if pf.MetaData().KeyValueMetadata().FindValue("ARROW:schema") == nil {
		t.Error("Parquet file does not store the Arrow schema")
	}
	for rg := range pf.NumRowGroups() {
		for c := range pf.MetaData().Schema.NumColumns() {
			cc, err := pf.MetaData().RowGroup(rg).ColumnChunk(c)
			if err != nil {
				t.Fatal(err)
			}
			if cc.Compression() != compress.Codecs.Zstd {
				t.Errorf("row group %d column %d compressed with %v, want zstd", rg, c, cc.Compression())
			}
		}
	}
	fr, err := pqarrow.NewFileReader(pf, pqarrow.ArrowReadProperties{BatchSize: 1024}, mem)
	if err != nil {
		t.Fatal(err)
	}
	tbl, err := fr.ReadTable(context.Background())
	if err != nil {
		t.Fatal(err)
	}
	defer tbl.Release()
	// The run metadata is in the Arrow schema the file stores (the table
	// read from it carries the columns only).
	schema, err := fr.Schema()
	if err != nil {
		t.Fatal(err)
	}
	checkArrowSchema(t, schema, want)
	tr := array.NewTableReader(tbl, 1024)
	defer tr.Release()
	var pqRecs []arrow.RecordBatch
	for tr.Next() {
		rec := tr.RecordBatch()
		rec.Retain()
		pqRecs = append(pqRecs, rec)
	}
	compareRecords(t, "Parquet", pqRecs, want)
	for _, rec := range pqRecs {
		rec.Release()
	}
}

// checkArrowSchema checks the column names and the run metadata of a schema
// read by arrow-go against the table.
func checkArrowSchema(t *testing.T, s *arrow.Schema, want *tables.Table) {
	t.Helper()
	for j, f := range want.Fields {
		if s.Field(j).Name != f.Name {
			t.Errorf("column %d is %q, want %q", j, s.Field(j).Name, f.Name)
		}
	}
	md := s.Metadata()
	for i, k := range want.Meta.Keys {
		if j := md.FindKey(k); j < 0 || md.Values()[j] != want.Meta.Values[i] {
			t.Errorf("schema metadata %q missing or different", k)
		}
	}
}

// compareRecords checks that the record batches hold the table's rows.
func compareRecords(t *testing.T, what string, recs []arrow.RecordBatch, want *tables.Table) {
	t.Helper()
	row := 0
	for _, rec := range recs {
		for i := range int(rec.NumRows()) {
			for j := range want.Fields {
				var got any
				switch a := rec.Column(j).(type) {
				case *array.Int64:
					got = a.Value(i)
				case *array.Float64:
					got = a.Value(i)
				default:
					t.Fatalf("%s: column %d is %T", what, j, a)
				}
				w := cell(want, j, row)
				if x, ok := got.(float64); ok && math.Float64bits(x) != math.Float64bits(w.(float64)) || !ok && got != w {
					t.Fatalf("%s row %d column %d: %v, want %v", what, row, j, got, w)
				}
			}
			row++
		}
	}
	if row != want.Len() {
		t.Errorf("%s: %d rows, want %d", what, row, want.Len())
	}
}

// TestSetupFromMeta: the circuits rebuilt from a table's metadata are those
// of the flags that wrote it: same graph, schedule and gates, step by step.
func TestSetupFromMeta(t *testing.T) {
	layout := writeFile(t, t.TempDir(), "grid.json",
		`{"qubits": 6, "layers": [[[0,1],[3,4]], [[1,2],[4,5]], [[0,3],[1,4],[2,5]]]}`)
	for _, cf := range []circuitFlags{
		{graph: "grid:2x3", schedule: "layered", gates: "haar", seed: 1},
		{graph: "ring:5", schedule: "layered", gates: "haar", seed: 2},
		{graph: "complete:4", schedule: "layered", gates: "haar", seed: 3},
		{graph: "line:4", schedule: "random-edge", gates: "haar", seed: 4},
		{layout: layout, schedule: "layered", gates: "haar", seed: 5},
		{graph: "star:4", schedule: "layered", gates: "cz+haar1", seed: 6},
		{schedule: "layered", gates: "haar", seed: 7}, // the demo chip
	} {
		s, err := cf.resolve(context.Background())
		if err != nil {
			t.Fatal(err)
		}
		got, err := setupFromMeta(runMeta(s, &cf))
		if err != nil {
			t.Fatalf("%+v: %v", cf, err)
		}
		if got.describe() != s.describe() || got.graph.Digest() != s.graph.Digest() || !reflect.DeepEqual(got.graph.Edges, s.graph.Edges) {
			t.Errorf("%+v: rebuilt %q, want %q", cf, got.describe(), s.describe())
		}
		a := circuits.NewBuilder(s.schedule, s.ensemble, cf.seed, 3)
		b := circuits.NewBuilder(got.schedule, got.ensemble, cf.seed, 3)
		for step := range 12 {
			ga, gb := a.Next(nil), b.Next(nil)
			if !reflect.DeepEqual(ga, gb) {
				t.Fatalf("%+v: step %d differs", cf, step)
			}
		}
	}
	var m tables.Meta
	m.Set("graph", "line:3")
	if _, err := setupFromMeta(m); err == nil || !strings.Contains(err.Error(), "qubits") {
		t.Errorf("metadata without qubits: %v", err)
	}
	s, _ := (&circuitFlags{graph: "line:4", schedule: "layered", gates: "haar"}).resolve(context.Background())
	meta := runMeta(s, &circuitFlags{graph: "line:4"})
	meta.Set("edges", "0-1,1-2,2-3,3-0")
	if _, err := setupFromMeta(meta); err == nil || !strings.Contains(err.Error(), "graph_digest") {
		t.Errorf("altered edges: %v", err)
	}
}

// TestPTPlot: pt-plot re-simulates instances of a scan table, checks them
// against the recorded collision probabilities, and writes valid pictures;
// a table whose metadata no longer matches its values is refused.
func TestPTPlot(t *testing.T) {
	dir := t.TempDir()
	table := filepath.Join(dir, "scan.parquet")
	mustRun(t, append(append([]string{"scan"}, smallRun...), "--out", table)...)
	pngPath := filepath.Join(dir, "pt.png")
	stdout := mustRun(t, "pt-plot", table, "--depth", "6", "--instances", "10", "--out", pngPath)
	if !strings.Contains(stdout, "10 instance(s) × 64 outcomes at depth 6") || !strings.Contains(stdout, "10 instance(s) matched") {
		t.Errorf("pt-plot output %q", stdout)
	}
	f, err := os.Open(pngPath)
	if err != nil {
		t.Fatal(err)
	}
	cfg, err := png.DecodeConfig(f)
	f.Close()
	if err != nil || cfg.Width < 900 {
		t.Errorf("pt.png: %v, %+v", err, cfg)
	}
	svgPath := filepath.Join(dir, "pt.svg")
	mustRun(t, "pt-plot", table, "--out", svgPath) // default depth: the run's recommendation or deepest
	svg, err := os.ReadFile(svgPath)
	if err != nil || !strings.Contains(string(svg), "<svg") || !strings.Contains(string(svg), "Porter–Thomas") {
		t.Errorf("pt.svg: %v, %d bytes", err, len(svg))
	}

	// The same table with another seed in its metadata: the circuits rebuilt
	// from it are different, and the check against the rows catches it.
	tab := readTable(t, table)
	tab.Meta.Set("seed", "6")
	forged := filepath.Join(dir, "forged.parquet")
	if err := tables.WriteTable(forged, tab); err != nil {
		t.Fatal(err)
	}
	wantExit2(t, []string{"pt-plot", forged, "--depth", "3", "--out", pngPath}, "does not rebuild its circuits")
	wantExit2(t, []string{"pt-plot", table, "--out", filepath.Join(dir, "pt.jpg")}, ".png or .svg")
	wantExit2(t, []string{"pt-plot", table}, "--out")
	wantExit2(t, []string{"pt-plot", table, "--instances", "0", "--out", pngPath}, "--instances")
}

// TestPTPlotFinalLayer: for a gate set that ends with a single-qubit layer
// (circuits.Finisher), pt-plot applies the layer as scan does, so the
// re-simulated collision probabilities match the table.
func TestPTPlotFinalLayer(t *testing.T) {
	dir := t.TempDir()
	table := filepath.Join(dir, "cz.arrow")
	mustRun(t, "scan", "--graph", "line:4", "--gates", "cz+haar1", "--depths", "2,5", "--instances", "6", "--workers", "1", "--out", table)
	stdout := mustRun(t, "pt-plot", table, "--depth", "5", "--out", filepath.Join(dir, "cz.png"))
	if !strings.Contains(stdout, "6 instance(s) matched") {
		t.Errorf("pt-plot output %q", stdout)
	}
}

func TestBriefIDs(t *testing.T) {
	var even []int
	for i := 0; i < 100; i += 2 {
		even = append(even, i)
	}
	got := briefIDs(even)
	if !strings.HasPrefix(got, "0,2,4,") || !strings.HasSuffix(got, ",… (50 in all)") || len(got) > 80 {
		t.Errorf("briefIDs(0,2,…,98) = %q", got)
	}
	if got := briefIDs([]int{0, 1, 2, 5}); got != "0-2,5" {
		t.Errorf("briefIDs short = %q", got)
	}
}

// TestMergeSampleParts: the parts of a sample run (rows keyed by instance
// and shot) merge to the single run's rows bit for bit, with noise so that
// every stream matters.
func TestMergeSampleParts(t *testing.T) {
	dir := t.TempDir()
	args := []string{"sample", "--graph", "line:4", "--depth", "4", "--instances", "5", "--shots", "30", "--gate-error", "0.02", "--trajectories", "3", "--seed", "11", "--workers", "1"}
	single := filepath.Join(dir, "single.arrow")
	mustRun(t, append(args, "--out", single)...)
	var parts []string
	for k := range 2 {
		p := filepath.Join(dir, "s"+strconv.Itoa(k)+".parquet")
		mustRun(t, append(args, "--part", strconv.Itoa(k)+"/2", "--out", p)...)
		parts = append(parts, p)
	}
	out := filepath.Join(dir, "merged.arrow")
	mustRun(t, "merge", "--out", out, parts[1], parts[0])
	want := readTable(t, single)
	got := readTable(t, out)
	equalRowsExactly(t, got, want)
	if g, w := metaWithout(got.Meta, "command_line"), metaWithout(want.Meta, "command_line"); !reflect.DeepEqual(g, w) {
		t.Errorf("metadata\n%v\nwant\n%v", g, w)
	}
}

// gateFileJSON is a gate-set file: CZ with Haar single-qubit gates, or with
// the entangler's sign flipped on |11⟩ (another file, another ensemble).
func gateFileJSON(flip bool) string {
	last := "[-1, 0]"
	if flip {
		last = "[1, 0]"
	}
	return `{"entangler": [[[1, 0], [0, 0], [0, 0], [0, 0]], [[0, 0], [1, 0], [0, 0], [0, 0]],
		[[0, 0], [0, 0], [1, 0], [0, 0]], [[0, 0], [0, 0], [0, 0], ` + last + `]], "single_qubit": "haar"}`
}

// TestGateFileTables: a table made with a gate-set file records the set's
// content, so that pt-plot and summarize rebuild its circuits after the file
// was edited or moved away (pt-plot re-simulates and checks every
// instance's collision probability), and parts made with different gate
// files refuse to merge, naming the gate_set key.
func TestGateFileTables(t *testing.T) {
	dir := t.TempDir()
	gates := writeFile(t, dir, "gates.json", gateFileJSON(false))
	args := []string{"scan", "--graph", "line:4", "--gates", gates, "--depths", "2,5", "--instances", "6", "--workers", "1"}
	table := filepath.Join(dir, "scan.parquet")
	mustRun(t, append(args, "--out", table)...)
	summary := mustRun(t, "summarize", table)
	writeFile(t, dir, "gates.json", gateFileJSON(true)) // edited afterwards
	if stdout := mustRun(t, "pt-plot", table, "--depth", "5", "--out", filepath.Join(dir, "a.png")); !strings.Contains(stdout, "6 instance(s) matched") {
		t.Errorf("pt-plot after an edit: %q", stdout)
	}
	if err := os.Remove(gates); err != nil { // moved away
		t.Fatal(err)
	}
	if stdout := mustRun(t, "pt-plot", table, "--depth", "2", "--out", filepath.Join(dir, "b.png")); !strings.Contains(stdout, "6 instance(s) matched") {
		t.Errorf("pt-plot without the file: %q", stdout)
	}
	if got := mustRun(t, "summarize", table); got != summary {
		t.Errorf("summarize without the file\n%s\nwant\n%s", got, summary)
	}

	a := writeFile(t, dir, "a.json", gateFileJSON(false))
	b := writeFile(t, dir, "b.json", gateFileJSON(true))
	var parts []string
	for k, g := range []string{a, b} {
		p := filepath.Join(dir, "part-"+strconv.Itoa(k)+".parquet")
		mustRun(t, "scan", "--graph", "line:4", "--gates", g, "--depths", "2,5", "--instances", "6", "--workers", "1", "--part", strconv.Itoa(k)+"/2", "--out", p)
		parts = append(parts, p)
	}
	wantExit2(t, []string{"merge", "--out", filepath.Join(dir, "m.parquet"), parts[0], parts[1]}, "different runs", "gate_set")
}
