package tables

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"io/fs"
	"math"
	"os"
	"path/filepath"
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
)

// checkedAllocator makes the package use a checked allocator for the rest of
// the test and asserts at its end that every Arrow buffer was released
// (the leak check of arrow-go's own tests, memory.NewCheckedAllocator with
// AssertSize(t, 0): common practice).
func checkedAllocator(t *testing.T) *memory.CheckedAllocator {
	t.Helper()
	mem := memory.NewCheckedAllocator(memory.NewGoAllocator())
	old := Allocator
	Allocator = mem
	t.Cleanup(func() {
		Allocator = old
		mem.AssertSize(t, 0)
	})
	return mem
}

// negZero is IEEE 754 negative zero: equal to +0 under ==, told apart only by
// its sign bit (IEEE 754-2008, section 3.4).
var negZero = math.Copysign(0, -1)

// sampleFields and sampleRows cover every column type, nulls, the special
// IEEE 754 values (NaN, ±Inf, −0, the smallest subnormal, the largest
// finite), the int64 extremes, the empty string and multi-byte UTF-8.
var sampleFields = []Field{
	{Name: "depth", Type: Int64, Unit: "layers", Doc: "number of gate layers"},
	{Name: "gate_count", Type: Int64, Nullable: true},
	{Name: "z", Type: Float64, Unit: "1/D", Doc: "collision probability"},
	{Name: "p", Type: Float64, Nullable: true, Unit: "probability"},
	{Name: "name", Type: String},
	{Name: "label", Type: String, Nullable: true, Doc: "free text"},
}

var sampleRows = [][]any{
	{int64(1), int64(10), 0.5, 0.25, "a", "ascii"},
	{int64(2), nil, math.NaN(), nil, "", ""},
	{int64(-3), int64(0), math.Inf(1), math.Inf(-1), "ünïcødé ψ", nil},
	{int64(math.MaxInt64), int64(math.MinInt64), negZero, negZero, "b", "null"},
	{4, 5, math.SmallestNonzeroFloat64, math.MaxFloat64, "c", "日本語"}, // int values are accepted for Int64
	{int64(0), nil, 1.0 / 3, nil, "d", nil},
	{int64(6), int64(6), 0.0, 0.0, "e", "f"},               // +0 beside −0 in the same column
	{int64(7), int64(7), otherNaN, otherNaN, "a", "ascii"}, // a second NaN payload; repeated strings
}

// otherNaN is a quiet NaN with a payload other than that of math.NaN(), to
// check that floats are stored bit for bit (IEEE 754-2008, section 6.2).
var otherNaN = math.Float64frombits(0x7ff8_0000_0000_0123)

// sampleMeta is deliberately not in sorted order, so that a sorted map would
// show up as a reordering.
func sampleMeta() Meta {
	var m Meta
	m.Set("tool_version", "mixdepth test")
	m.Set("command", "mixdepth run --graph line:4 --seed 7")
	m.Set("seed", "7")
	m.Set("graph_digest", "sha256:0123abcd")
	m.Set("a_last_key", "")
	return m
}

// normalize turns an int into an int64, the type the table stores.
func normalize(v any) any {
	if i, ok := v.(int); ok {
		return int64(i)
	}
	return v
}

// sameValue reports whether got and want are the same cell value; floats are
// compared by their bits so that NaN equals NaN and −0 differs from +0.
func sameValue(got, want any) bool {
	got, want = normalize(got), normalize(want)
	if g, ok := got.(float64); ok {
		w, ok := want.(float64)
		return ok && math.Float64bits(g) == math.Float64bits(w)
	}
	return got == want
}

// show formats a cell value for a test failure, floats with their bits.
func show(v any) string {
	if f, ok := v.(float64); ok {
		return fmt.Sprintf("%v (bits %#016x)", f, math.Float64bits(f))
	}
	return fmt.Sprintf("%#v", v)
}

// arrowCell returns cell i of an Arrow array as a Go value, nil for a null.
// It uses the Arrow array types directly, not the package's reader.
func arrowCell(t *testing.T, a arrow.Array, i int) any {
	t.Helper()
	if a.IsNull(i) {
		return nil
	}
	switch a := a.(type) {
	case *array.Int64:
		return a.Value(i)
	case *array.Float64:
		return a.Value(i)
	case *array.String:
		return a.Value(i)
	}
	t.Fatalf("unexpected Arrow array type %s", a.DataType())
	return nil
}

// tableCell returns cell (i, j) of a Table, nil for a null.
func tableCell(tb *Table, i, j int) any {
	if tb.Valid[j] != nil && !tb.Valid[j][i] {
		return nil
	}
	switch col := tb.Columns[j].(type) {
	case []int64:
		return col[i]
	case []float64:
		return col[i]
	case []string:
		return col[i]
	}
	return nil
}

func writeRows(t *testing.T, path string, fields []Field, meta Meta, rows [][]any) {
	t.Helper()
	w, err := Create(path, fields, meta)
	if err != nil {
		t.Fatal(err)
	}
	defer w.Abort()
	for _, r := range rows {
		w.Append(r...)
	}
	if w.Rows() != len(rows) {
		t.Errorf("Rows() = %d, want %d", w.Rows(), len(rows))
	}
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
}

// checkTable compares a Table read back with what was written.
func checkTable(t *testing.T, tb *Table, fields []Field, meta Meta, rows [][]any) {
	t.Helper()
	if !slices.Equal(tb.Fields, fields) {
		t.Errorf("fields:\n got %+v\nwant %+v", tb.Fields, fields)
	}
	if !slices.Equal(tb.Meta.Keys, meta.Keys) || !slices.Equal(tb.Meta.Values, meta.Values) {
		t.Errorf("meta:\n got %q %q\nwant %q %q", tb.Meta.Keys, tb.Meta.Values, meta.Keys, meta.Values)
	}
	if tb.Len() != len(rows) {
		t.Fatalf("Len() = %d, want %d", tb.Len(), len(rows))
	}
	for j := range fields {
		hasNull := false
		for i, r := range rows {
			hasNull = hasNull || r[j] == nil
			if got := tableCell(tb, i, j); !sameValue(got, r[j]) {
				t.Errorf("row %d column %q: got %s, want %s", i, fields[j].Name, show(got), show(r[j]))
			}
		}
		if !hasNull && tb.Valid[j] != nil {
			t.Errorf("column %q has no nulls but a validity list", fields[j].Name)
		}
	}
}

// checkArrowSchema checks an Arrow schema read by arrow-go itself.
func checkArrowSchema(t *testing.T, s *arrow.Schema, fields []Field, meta Meta) {
	t.Helper()
	md := s.Metadata()
	// Create appends the seal (sealKey), which Read leaves out of Meta.
	keys, values := append(slices.Clone(meta.Keys), sealKey), append(slices.Clone(meta.Values), sealValue)
	if !slices.Equal(md.Keys(), keys) || !slices.Equal(md.Values(), values) {
		t.Errorf("schema metadata: got %q %q, want %q %q", md.Keys(), md.Values(), keys, values)
	}
	if s.NumFields() != len(fields) {
		t.Fatalf("schema has %d fields, want %d", s.NumFields(), len(fields))
	}
	want := map[Type]arrow.DataType{Int64: arrow.PrimitiveTypes.Int64, Float64: arrow.PrimitiveTypes.Float64, String: arrow.BinaryTypes.String}
	for j, f := range fields {
		af := s.Field(j)
		if af.Name != f.Name || !arrow.TypeEqual(af.Type, want[f.Type]) || af.Nullable != f.Nullable {
			t.Errorf("field %d: got %s %s nullable=%v, want %s %s nullable=%v", j, af.Name, af.Type, af.Nullable, f.Name, want[f.Type], f.Nullable)
		}
		unit := ""
		if i := af.Metadata.FindKey("unit"); i >= 0 {
			unit = af.Metadata.Values()[i]
		}
		if unit != f.Unit {
			t.Errorf("field %q: unit metadata %q, want %q", f.Name, unit, f.Unit)
		}
	}
}

// checkArrowColumns compares the chunks of each column with the rows.
func checkArrowColumns(t *testing.T, columns [][]arrow.Array, fields []Field, rows [][]any) {
	t.Helper()
	for j, chunks := range columns {
		i := 0
		for _, a := range chunks {
			for k := range a.Len() {
				if i >= len(rows) {
					t.Fatalf("column %q has more than %d rows", fields[j].Name, len(rows))
				}
				if got := arrowCell(t, a, k); !sameValue(got, rows[i][j]) {
					t.Errorf("arrow-go: row %d column %q: got %s, want %s", i, fields[j].Name, show(got), show(rows[i][j]))
				}
				i++
			}
		}
		if i != len(rows) {
			t.Errorf("arrow-go: column %q has %d rows, want %d", fields[j].Name, i, len(rows))
		}
	}
}

// checkMagic checks the leading and trailing magic bytes of a file. Arrow IPC
// file format: "ARROW1" padded to 8 bytes at the start and "ARROW1" at the
// end (Apache Arrow Columnar Format specification, "IPC File Format").
// Parquet: "PAR1" at both ends (Apache Parquet format specification, "File
// Format").
func checkMagic(t *testing.T, path string) {
	t.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	head, tail := []byte("PAR1"), []byte("PAR1")
	if strings.HasSuffix(path, ".arrow") {
		head, tail = []byte("ARROW1\x00\x00"), []byte("ARROW1")
	}
	if !bytes.HasPrefix(data, head) || !bytes.HasSuffix(data, tail) {
		t.Errorf("%s: magic bytes missing (first %q, last %q)", path, data[:min(8, len(data))], data[max(0, len(data)-6):])
	}
}

// readWithArrowGo reads a table file with arrow-go's own readers, not with
// Read, and returns the schema and the chunks of each column. The Parquet
// path reads the stored Arrow schema (pqarrow.ReadTable).
func readWithArrowGo(t *testing.T, path string, mem memory.Allocator) (*arrow.Schema, [][]arrow.Array, func()) {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	if strings.HasSuffix(path, ".arrow") {
		r, err := ipc.NewFileReader(f, ipc.WithAllocator(mem))
		if err != nil {
			t.Fatal(err)
		}
		defer r.Close()
		cols := make([][]arrow.Array, r.Schema().NumFields())
		var recs []arrow.RecordBatch
		for i := range r.NumRecords() {
			rec, err := r.RecordBatchAt(i)
			if err != nil {
				t.Fatal(err)
			}
			recs = append(recs, rec)
			for j := range cols {
				cols[j] = append(cols[j], rec.Column(j))
			}
		}
		return r.Schema(), cols, func() {
			for _, rec := range recs {
				rec.Release()
			}
		}
	}
	pf, err := file.NewParquetReader(f, file.WithReadProps(parquet.NewReaderProperties(mem)))
	if err != nil {
		t.Fatal(err)
	}
	fr, err := pqarrow.NewFileReader(pf, pqarrow.ArrowReadProperties{}, mem)
	if err != nil {
		t.Fatal(err)
	}
	// The schema, with the run metadata, comes from FileReader.Schema: in
	// arrow-go v18.8.0 the schema of the table from ReadTable carries the
	// field metadata but not the schema metadata.
	s, err := fr.Schema()
	if err != nil {
		t.Fatal(err)
	}
	tbl, err := fr.ReadTable(context.Background())
	if err != nil {
		t.Fatal(err)
	}
	cols := make([][]arrow.Array, tbl.NumCols())
	for j := range cols {
		cols[j] = tbl.Column(j).Data().Chunks()
	}
	return s, cols, tbl.Release
}

func TestRoundTrip(t *testing.T) {
	for _, ext := range []string{".arrow", ".parquet"} {
		t.Run(ext, func(t *testing.T) {
			mem := checkedAllocator(t)
			path := filepath.Join(t.TempDir(), "sample"+ext)
			meta := sampleMeta()
			writeRows(t, path, sampleFields, meta, sampleRows)
			checkMagic(t, path)

			tb, err := Read(path)
			if err != nil {
				t.Fatal(err)
			}
			checkTable(t, tb, sampleFields, meta, sampleRows)

			gotMeta, gotFields, err := ReadMeta(path)
			if err != nil {
				t.Fatal(err)
			}
			if !slices.Equal(gotFields, sampleFields) || !slices.Equal(gotMeta.Keys, meta.Keys) || !slices.Equal(gotMeta.Values, meta.Values) {
				t.Errorf("ReadMeta: got %+v %+v", gotMeta, gotFields)
			}

			s, cols, release := readWithArrowGo(t, path, mem)
			defer release()
			checkArrowSchema(t, s, sampleFields, meta)
			checkArrowColumns(t, cols, sampleFields, sampleRows)
		})
	}
}

// TestParquetLayout checks the Parquet file itself with the low-level
// parquet reader: zstd on every column chunk, the Arrow schema stored under
// "ARROW:schema" (the key the Arrow Parquet readers look for: common
// practice), and REQUIRED columns for fields that are not Nullable.
func TestParquetLayout(t *testing.T) {
	checkedAllocator(t)
	path := filepath.Join(t.TempDir(), "layout.parquet")
	writeRows(t, path, sampleFields, sampleMeta(), sampleRows)
	pf, err := file.OpenParquetFile(path, false)
	if err != nil {
		t.Fatal(err)
	}
	defer pf.Close()
	md := pf.MetaData()
	if md.KeyValueMetadata().FindValue("ARROW:schema") == nil {
		t.Error("no ARROW:schema key in the Parquet key/value metadata")
	}
	if v := md.KeyValueMetadata().FindValue("seed"); v == nil || *v != "7" {
		t.Errorf("run metadata seed not in the Parquet key/value metadata: %v", v)
	}
	if pf.NumRowGroups() != 1 {
		t.Fatalf("%d row groups, want 1", pf.NumRowGroups())
	}
	rg := md.RowGroup(0)
	for j, f := range sampleFields {
		cc, err := rg.ColumnChunk(j)
		if err != nil {
			t.Fatal(err)
		}
		if cc.Compression() != compress.Codecs.Zstd {
			t.Errorf("column %q compressed with %s, want zstd", f.Name, cc.Compression())
		}
		rep := md.Schema.Column(j).SchemaNode().RepetitionType()
		want := parquet.Repetitions.Required
		if f.Nullable {
			want = parquet.Repetitions.Optional
		}
		if rep != want {
			t.Errorf("column %q has repetition %s, want %s", f.Name, rep, want)
		}
	}
}

// TestManyBatches writes more rows than fit one batch and checks the batch
// split (record batches in Arrow, row groups in Parquet) and every value.
func TestManyBatches(t *testing.T) {
	const n, batch = 150_000, 10_000
	fields := []Field{
		{Name: "i", Type: Int64},
		{Name: "x", Type: Float64},
		{Name: "y", Type: Float64, Nullable: true},
		{Name: "s", Type: String},
	}
	rows := make([][]any, n)
	for i := range rows {
		var y any = math.Sqrt(float64(i))
		if i%7 == 3 {
			y = nil
		}
		rows[i] = []any{int64(i), float64(i) * 0.1, y, strconv.Itoa(i)}
	}
	for _, ext := range []string{".arrow", ".parquet"} {
		t.Run(ext, func(t *testing.T) {
			mem := checkedAllocator(t)
			path := filepath.Join(t.TempDir(), "many"+ext)
			w, err := Create(path, fields, Meta{})
			if err != nil {
				t.Fatal(err)
			}
			defer w.Abort()
			w.BatchRows = batch
			for _, r := range rows[:batch/2] {
				w.Append(r...)
			}
			// Evidence that the builders use the injected allocator, so that
			// the final AssertSize(t, 0) is a real check.
			if mem.CurrentAlloc() == 0 {
				t.Error("no memory taken from Allocator while rows are buffered")
			}
			for _, r := range rows[batch/2:] {
				w.Append(r...)
			}
			if err := w.Close(); err != nil {
				t.Fatal(err)
			}

			tb, err := Read(path)
			if err != nil {
				t.Fatal(err)
			}
			checkTable(t, tb, fields, Meta{}, rows)
			if tb.Valid[2] == nil {
				t.Error("column y has nulls but no validity list")
			}

			var batches int
			if ext == ".arrow" {
				f, err := os.Open(path)
				if err != nil {
					t.Fatal(err)
				}
				defer f.Close()
				r, err := ipc.NewFileReader(f, ipc.WithAllocator(mem))
				if err != nil {
					t.Fatal(err)
				}
				batches = r.NumRecords()
				r.Close()
			} else {
				pf, err := file.OpenParquetFile(path, false)
				if err != nil {
					t.Fatal(err)
				}
				batches = pf.NumRowGroups()
				pf.Close()
			}
			if batches != n/batch {
				t.Errorf("%d batches, want %d", batches, n/batch)
			}
		})
	}
}

func TestEmptyTable(t *testing.T) {
	for _, ext := range []string{".arrow", ".parquet"} {
		t.Run(ext, func(t *testing.T) {
			checkedAllocator(t)
			path := filepath.Join(t.TempDir(), "empty"+ext)
			writeRows(t, path, sampleFields, sampleMeta(), nil)
			tb, err := Read(path)
			if err != nil {
				t.Fatal(err)
			}
			checkTable(t, tb, sampleFields, sampleMeta(), nil)
		})
	}
}

// TestWriteTable writes a Table read from one format into the other and
// checks that nothing changed.
func TestWriteTable(t *testing.T) {
	checkedAllocator(t)
	dir := t.TempDir()
	src, dst := filepath.Join(dir, "a.arrow"), filepath.Join(dir, "b.parquet")
	writeRows(t, src, sampleFields, sampleMeta(), sampleRows)
	tb, err := Read(src)
	if err != nil {
		t.Fatal(err)
	}
	if err := WriteTable(dst, tb); err != nil {
		t.Fatal(err)
	}
	back, err := Read(dst)
	if err != nil {
		t.Fatal(err)
	}
	checkTable(t, back, sampleFields, sampleMeta(), sampleRows)
}

// dirNames lists the names in dir, including hidden temporary files.
func dirNames(t *testing.T, dir string) []string {
	t.Helper()
	entries, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	var names []string
	for _, e := range entries {
		names = append(names, e.Name())
	}
	return names
}

func TestCreateMissingDirectory(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "missing", "t.parquet")
	_, err := Create(path, sampleFields, Meta{})
	if err == nil {
		t.Fatal("Create in a missing directory succeeded")
	}
	if !errors.Is(err, fs.ErrNotExist) || !strings.HasPrefix(err.Error(), "tables: ") || !strings.Contains(err.Error(), filepath.Dir(path)) {
		t.Errorf("unclear error: %v", err)
	}
	if names := dirNames(t, dir); len(names) != 0 {
		t.Errorf("Create left %q behind", names)
	}
}

func TestCreateUnwritableDirectory(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "ro")
	if err := os.Mkdir(dir, 0o555); err != nil {
		t.Fatal(err)
	}
	defer os.Chmod(dir, 0o755)
	if err := os.WriteFile(filepath.Join(dir, "probe"), nil, 0o644); err == nil {
		t.Skip("the directory is writable anyway (running as root?)")
	}
	_, err := Create(filepath.Join(dir, "t.arrow"), sampleFields, Meta{})
	if err == nil || !errors.Is(err, fs.ErrPermission) || !strings.Contains(err.Error(), "cannot write in directory") {
		t.Errorf("Create in a read-only directory: %v", err)
	}
}

func TestCreateUnknownFormat(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "x.csv")
	_, err := Create(path, sampleFields, Meta{})
	want := `tables: unknown table format "` + path + `": use a name ending in .arrow or .parquet`
	if err == nil || err.Error() != want {
		t.Errorf("Create: got %v, want %s", err, want)
	}
	var fe *FormatError
	if !errors.As(err, &fe) || fe.Path != path {
		t.Errorf("Create error is not a *FormatError for %q: %#v", path, err)
	}
	if _, err := Read(path); !errors.As(err, &fe) {
		t.Errorf("Read: got %v, want a *FormatError", err)
	}
	if _, _, err := ReadMeta(path); !errors.As(err, &fe) {
		t.Errorf("ReadMeta: got %v, want a *FormatError", err)
	}
	if names := dirNames(t, dir); len(names) != 0 {
		t.Errorf("Create left %q behind", names)
	}
}

func TestAbort(t *testing.T) {
	checkedAllocator(t)
	for _, ext := range []string{".arrow", ".parquet"} {
		dir := t.TempDir()
		w, err := Create(filepath.Join(dir, "t"+ext), sampleFields, sampleMeta())
		if err != nil {
			t.Fatal(err)
		}
		for _, r := range sampleRows {
			w.Append(r...)
		}
		if len(dirNames(t, dir)) != 1 {
			t.Errorf("%s: want exactly one temporary file while writing, have %q", ext, dirNames(t, dir))
		}
		w.Abort()
		w.Abort() // a second Abort is a no-op
		if names := dirNames(t, dir); len(names) != 0 {
			t.Errorf("%s: Abort left %q behind", ext, names)
		}
		if err := w.Close(); !errors.Is(err, fs.ErrClosed) {
			t.Errorf("%s: Close after Abort: got %v, want fs.ErrClosed", ext, err)
		}
	}
}

// TestAbortAfterClose checks that the deferred Abort of the usual pattern
// leaves the finished table alone.
func TestAbortAfterClose(t *testing.T) {
	checkedAllocator(t)
	dir := t.TempDir()
	path := filepath.Join(dir, "t.arrow")
	w, err := Create(path, sampleFields, sampleMeta())
	if err != nil {
		t.Fatal(err)
	}
	w.Append(sampleRows[0]...)
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
	w.Abort()
	if names := dirNames(t, dir); !slices.Equal(names, []string{"t.arrow"}) {
		t.Errorf("directory holds %q, want only t.arrow", names)
	}
	if tb, err := Read(path); err != nil || tb.Len() != 1 {
		t.Errorf("Read after Close and Abort: %v", err)
	}
}

// TestExistingFile checks the write-to-temporary-then-rename pattern (common
// practice; rename replaces the destination atomically per POSIX.1-2017
// rename()): the old content stays at path while writing and after Abort,
// and Close replaces it.
func TestExistingFile(t *testing.T) {
	checkedAllocator(t)
	for _, ext := range []string{".arrow", ".parquet"} {
		dir := t.TempDir()
		path := filepath.Join(dir, "t"+ext)
		old := []byte("previous results")
		if err := os.WriteFile(path, old, 0o644); err != nil {
			t.Fatal(err)
		}
		sameAsOld := func(when string) {
			t.Helper()
			if got, err := os.ReadFile(path); err != nil || !bytes.Equal(got, old) {
				t.Errorf("%s %s: content at path is %q (%v), want the old content", ext, when, got, err)
			}
		}

		w, err := Create(path, sampleFields, sampleMeta())
		if err != nil {
			t.Fatal(err)
		}
		for _, r := range sampleRows {
			w.Append(r...)
		}
		sameAsOld("while writing")
		w.Abort()
		sameAsOld("after Abort")

		w, err = Create(path, sampleFields, sampleMeta())
		if err != nil {
			t.Fatal(err)
		}
		for _, r := range sampleRows {
			w.Append(r...)
		}
		sameAsOld("before Close")
		if err := w.Close(); err != nil {
			t.Fatal(err)
		}
		tb, err := Read(path)
		if err != nil {
			t.Fatal(err)
		}
		checkTable(t, tb, sampleFields, sampleMeta(), sampleRows)
		if names := dirNames(t, dir); !slices.Equal(names, []string{"t" + ext}) {
			t.Errorf("%s: directory holds %q, want only the table", ext, names)
		}
	}
}

// TestCloseError makes the final rename fail: a non-empty directory appears
// at the destination after Create, and rename(2) cannot replace a directory
// by a file (EISDIR; POSIX.1-2017 rename()). Close must report it and
// remove the temporary file.
func TestCloseError(t *testing.T) {
	checkedAllocator(t)
	for _, ext := range []string{".arrow", ".parquet"} {
		dir := t.TempDir()
		path := filepath.Join(dir, "t"+ext)
		w, err := Create(path, sampleFields, sampleMeta())
		if err != nil {
			t.Fatal(err)
		}
		for _, r := range sampleRows {
			w.Append(r...)
		}
		if err := os.Mkdir(path, 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(filepath.Join(path, "keep"), []byte("x"), 0o644); err != nil {
			t.Fatal(err)
		}
		err = w.Close()
		if err == nil || !strings.HasPrefix(err.Error(), "tables: write ") || !strings.Contains(err.Error(), path) {
			t.Errorf("%s: Close: got %v, want an error naming %s", ext, err, path)
		}
		if names := dirNames(t, dir); !slices.Equal(names, []string{"t" + ext}) {
			t.Errorf("%s: directory holds %q, want only the directory in the way", ext, names)
		}
		if names := dirNames(t, path); !slices.Equal(names, []string{"keep"}) {
			t.Errorf("%s: the directory in the way now holds %q", ext, names)
		}
		w.Abort() // no-op after a failed Close
	}
}

func TestCreateOnDirectory(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "d.arrow")
	if err := os.Mkdir(path, 0o755); err != nil {
		t.Fatal(err)
	}
	if _, err := Create(path, sampleFields, Meta{}); err == nil || !strings.Contains(err.Error(), "is a directory") {
		t.Errorf("Create onto a directory: %v", err)
	}
	if names := dirNames(t, dir); !slices.Equal(names, []string{"d.arrow"}) {
		t.Errorf("Create left %q behind", names)
	}
}

// mustPanic checks that f panics with a message starting "tables: ".
func mustPanic(t *testing.T, name string, f func()) {
	t.Helper()
	defer func() {
		t.Helper()
		r := recover()
		if s, ok := r.(string); !ok || !strings.HasPrefix(s, "tables: ") {
			t.Errorf("%s: got panic %#v, want a message starting \"tables: \"", name, r)
		}
	}()
	f()
}

func TestAppendPanics(t *testing.T) {
	checkedAllocator(t)
	path := filepath.Join(t.TempDir(), "t.arrow")
	w, err := Create(path, sampleFields, Meta{})
	if err != nil {
		t.Fatal(err)
	}
	defer w.Abort()
	good := sampleRows[0]
	mustPanic(t, "too few values", func() { w.Append(good[:5]...) })
	mustPanic(t, "too many values", func() { w.Append(append(slices.Clone(good), 1)...) })
	bad := func(j int, v any) []any { r := slices.Clone(good); r[j] = v; return r }
	mustPanic(t, "float for Int64", func() { w.Append(bad(0, 1.0)...) })
	mustPanic(t, "int for Float64", func() { w.Append(bad(2, 1)...) })
	mustPanic(t, "int32 for Int64", func() { w.Append(bad(0, int32(1))...) })
	mustPanic(t, "[]byte for String", func() { w.Append(bad(4, []byte("a"))...) })
	// A bad value in the last column must not leave the earlier ones appended.
	mustPanic(t, "nil for a non-Nullable field", func() { w.Append(bad(4, nil)...) })
	w.Append(good...)
	if w.Rows() != 1 {
		t.Errorf("Rows() = %d after one good row", w.Rows())
	}
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
	tb, err := Read(path)
	if err != nil {
		t.Fatal(err)
	}
	checkTable(t, tb, sampleFields, Meta{}, sampleRows[:1])
	mustPanic(t, "Append after Close", func() { w.Append(good...) })
}

func TestCreatePanics(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "t.arrow")
	cases := []struct {
		name   string
		fields []Field
		meta   Meta
	}{
		{"no name", []Field{{Type: Int64}}, Meta{}},
		{"duplicate name", []Field{{Name: "a", Type: Int64}, {Name: "a", Type: String}}, Meta{}},
		{"zero type", []Field{{Name: "a"}}, Meta{}},
		{"meta lengths", []Field{{Name: "a", Type: Int64}}, Meta{Keys: []string{"k"}}},
	}
	for _, c := range cases {
		mustPanic(t, c.name, func() { Create(path, c.fields, c.meta) })
	}
	if names := dirNames(t, dir); len(names) != 0 {
		t.Errorf("Create left %q behind", names)
	}
}

func TestReadErrorsNameTheFile(t *testing.T) {
	checkedAllocator(t)
	dir := t.TempDir()
	missing := filepath.Join(dir, "missing.parquet")
	if _, err := Read(missing); err == nil || !errors.Is(err, fs.ErrNotExist) || !strings.Contains(err.Error(), missing) {
		t.Errorf("Read of a missing file: %v", err)
	}
	for _, ext := range []string{".arrow", ".parquet"} {
		junk := filepath.Join(dir, "junk"+ext)
		if err := os.WriteFile(junk, []byte("this is not a table file at all"), 0o644); err != nil {
			t.Fatal(err)
		}
		if _, err := Read(junk); err == nil || !strings.HasPrefix(err.Error(), "tables: read ") || !strings.Contains(err.Error(), junk) {
			t.Errorf("Read of a junk file: %v", err)
		}
		if _, _, err := ReadMeta(junk); err == nil || !strings.Contains(err.Error(), junk) {
			t.Errorf("ReadMeta of a junk file: %v", err)
		}
	}
}

func TestColumnAccessors(t *testing.T) {
	checkedAllocator(t)
	path := filepath.Join(t.TempDir(), "t.parquet")
	writeRows(t, path, sampleFields, Meta{}, sampleRows)
	tb, err := Read(path)
	if err != nil {
		t.Fatal(err)
	}
	if j, ok := tb.Column("z"); !ok || j != 2 {
		t.Errorf("Column(z) = %d, %v, want 2, true", j, ok)
	}
	if _, ok := tb.Column("nope"); ok {
		t.Error("Column(nope) found a column")
	}
	d, err := tb.Int64s("depth")
	if err != nil || len(d) != len(sampleRows) || d[3] != math.MaxInt64 {
		t.Errorf("Int64s(depth) = %v, %v", d, err)
	}
	z, err := tb.Float64s("z")
	if err != nil || len(z) != len(sampleRows) || z[0] != 0.5 {
		t.Errorf("Float64s(z) = %v, %v", z, err)
	}
	s, err := tb.Strings("name")
	if err != nil || len(s) != len(sampleRows) || s[2] != "ünïcødé ψ" {
		t.Errorf("Strings(name) = %q, %v", s, err)
	}
	if _, err := tb.Float64s("nope"); !errors.Is(err, ErrNoColumn) || !strings.Contains(err.Error(), `"nope"`) {
		t.Errorf("Float64s(nope): %v", err)
	}
	if _, err := tb.Float64s("depth"); !errors.Is(err, ErrColumnType) || !strings.Contains(err.Error(), "int64") {
		t.Errorf("Float64s(depth): %v", err)
	}
	if _, err := tb.Int64s("name"); !errors.Is(err, ErrColumnType) {
		t.Errorf("Int64s(name): %v", err)
	}
	if _, err := tb.Strings("z"); !errors.Is(err, ErrColumnType) {
		t.Errorf("Strings(z): %v", err)
	}
}

func TestMeta(t *testing.T) {
	var m Meta
	m.Set("b", "1")
	m.Set("a", "2")
	m.Set("b", "3") // replaces in place, keeps the position
	if !slices.Equal(m.Keys, []string{"b", "a"}) || !slices.Equal(m.Values, []string{"3", "2"}) {
		t.Errorf("after Set: %q %q", m.Keys, m.Values)
	}
	if v, ok := m.Get("b"); !ok || v != "3" {
		t.Errorf("Get(b) = %q, %v", v, ok)
	}
	if _, ok := m.Get("c"); ok {
		t.Error("Get(c) found a value")
	}
	if m.Len() != 2 {
		t.Errorf("Len() = %d", m.Len())
	}
}

func ExampleCreate() {
	dir, err := os.MkdirTemp("", "tables-example")
	if err != nil {
		fmt.Println(err)
		return
	}
	defer os.RemoveAll(dir)
	path := filepath.Join(dir, "collision.parquet")

	var meta Meta
	meta.Set("tool_version", "example")
	meta.Set("seed", "1")
	w, err := Create(path, []Field{
		{Name: "depth", Type: Int64, Unit: "layers"},
		{Name: "z_ratio", Type: Float64, Nullable: true, Doc: "mean collision probability over 2/(D+1)"},
	}, meta)
	if err != nil {
		fmt.Println(err)
		return
	}
	defer w.Abort() // a no-op once Close has succeeded
	w.Append(1, 1.75)
	w.Append(2, nil)
	w.Append(3, 1.0625)
	if err := w.Close(); err != nil {
		fmt.Println(err)
		return
	}

	t, err := Read(path)
	if err != nil {
		fmt.Println(err)
		return
	}
	depth, _ := t.Int64s("depth")
	ratio, _ := t.Float64s("z_ratio")
	fmt.Println(t.Meta.Keys, t.Meta.Values)
	fmt.Println(t.Fields[0].Unit, depth, ratio, t.Valid[1])
	// Output:
	// [tool_version seed] [example 1]
	// layers [1 2 3] [1.75 0 1.0625] [true false true]
}

func BenchmarkAppend(b *testing.B) {
	fields := []Field{
		{Name: "instance", Type: Int64},
		{Name: "depth", Type: Int64},
		{Name: "z", Type: Float64},
		{Name: "graph", Type: String},
	}
	for _, ext := range []string{".arrow", ".parquet"} {
		b.Run(ext[1:], func(b *testing.B) {
			path := filepath.Join(b.TempDir(), "bench"+ext)
			w, err := Create(path, fields, Meta{})
			if err != nil {
				b.Fatal(err)
			}
			defer w.Abort()
			b.ReportAllocs()
			b.SetBytes(3*8 + int64(len("line:12")))
			for i := range b.N {
				w.Append(i, i%64, 1/float64(i+1), "line:12")
			}
			if err := w.Close(); err != nil {
				b.Fatal(err)
			}
		})
	}
}
