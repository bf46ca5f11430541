package tables

import (
	"bufio"
	"fmt"
	"io/fs"

	"github.com/apache/arrow-go/v18/arrow"
	"github.com/apache/arrow-go/v18/arrow/array"
	"github.com/apache/arrow-go/v18/arrow/ipc"
	"github.com/apache/arrow-go/v18/parquet"
	"github.com/apache/arrow-go/v18/parquet/compress"
	"github.com/apache/arrow-go/v18/parquet/pqarrow"

	"mixdepth/internal/atomicfile"
)

// DefaultBatchRows is the number of rows in a record batch (a Parquet row
// group) unless Writer.BatchRows says otherwise.
const DefaultBatchRows = 1 << 16

// bufferSize is the size of the write buffer in front of the temporary file.
const bufferSize = 1 << 20

// batchWriter is the part of ipc.FileWriter and pqarrow.FileWriter that a
// Writer uses.
type batchWriter interface {
	Write(arrow.RecordBatch) error
	Close() error
}

// Writer writes a table row by row. It buffers rows in Arrow builders and
// writes a record batch every BatchRows rows to a temporary file next to the
// destination; Close renames the finished file onto the destination. A Writer
// is not safe for concurrent use.
type Writer struct {
	// BatchRows is the number of rows per record batch (per row group in
	// Parquet). Create sets it to DefaultBatchRows; it may be changed at any
	// time, and values below 1 mean DefaultBatchRows.
	BatchRows int

	path    string
	fields  []Field
	file    *atomicfile.File
	buf     *bufio.Writer
	out     batchWriter
	builder *array.RecordBuilder
	columns []array.Builder
	sum     *rowHash // content checksum of the rows appended (see checksumKey)
	schema  string   // schema checksum of the fields and metadata (see schemaKey)
	pending int      // rows in the builders
	rows    int      // rows appended
	err     error    // first error while writing a batch
	done    bool     // Close or Abort was called
}

// Create starts a table at path with the given columns and run metadata. The
// extension of path chooses the format (.arrow or .parquet, in any case); any
// other name gives a *FormatError. The data go to a temporary file in the
// directory of path, which must exist and be writable; nothing appears at
// path until Close succeeds. Create panics if a field has no name, a
// duplicate name or an invalid type, or if meta has more keys than values or
// fewer.
func Create(path string, fields []Field, meta Meta) (*Writer, error) {
	checkFields(fields)
	md := meta.arrow()
	md = arrow.NewMetadata(append(md.Keys(), sealKey), append(md.Values(), sealValue))
	form, err := formatOf(path)
	if err != nil {
		return nil, err
	}
	file, err := createTemp(path)
	if err != nil {
		return nil, err
	}
	w := &Writer{
		BatchRows: DefaultBatchRows,
		path:      path,
		fields:    append([]Field(nil), fields...),
		file:      file,
		buf:       bufio.NewWriterSize(file, bufferSize),
		sum:       newRowHash(),
		schema:    schemaChecksum(fields, meta),
	}

	afs := make([]arrow.Field, len(fields))
	for i, f := range fields {
		afs[i] = f.arrowField()
	}
	schema := arrow.NewSchema(afs, &md)
	mem := allocator()
	// The sink is the bufio.Writer, not the file: pqarrow closes a sink that
	// is an io.Closer, and the file must stay open for the fsync in Close.
	switch form {
	case arrowFormat:
		w.out, err = ipc.NewFileWriter(w.buf, ipc.WithSchema(schema), ipc.WithAllocator(mem))
	case parquetFormat:
		opts := []parquet.WriterProperty{
			parquet.WithAllocator(mem),
			parquet.WithCompression(compress.Codecs.Zstd),
		}
		for _, f := range fields {
			if f.Type == Float64 {
				// The dictionary encoder of arrow-go v18.8.0 keys floats
				// so that all NaNs collapse into one; plain encoding
				// keeps every value bit for bit.
				opts = append(opts, parquet.WithDictionaryFor(f.Name, false))
			}
		}
		props := parquet.NewWriterProperties(opts...)
		w.out, err = pqarrow.NewFileWriter(schema, w.buf, props,
			pqarrow.NewArrowWriterProperties(pqarrow.WithStoreSchema(), pqarrow.WithAllocator(mem)))
	}
	if err != nil {
		file.Abort()
		return nil, fmt.Errorf("tables: create %q: %w", path, err)
	}
	w.builder = array.NewRecordBuilder(mem, schema)
	w.columns = w.builder.Fields()
	return w, nil
}

// createTemp creates an empty temporary file beside path (see
// atomicfile.Create for its mode and name).
func createTemp(path string) (*atomicfile.File, error) {
	f, err := atomicfile.Create(path)
	if err != nil {
		return nil, fmt.Errorf("tables: cannot create %q: %w", path, err)
	}
	return f, nil
}

// Append adds a row. The values go with the fields in order: an int64 or int
// for an Int64 column, a float64 for a Float64 column, a string for a String
// column, or nil for a null in a Nullable column. Append panics if the number
// of values is not the number of fields, if a value has another type, or if
// the Writer is closed. An error while writing a batch is kept and returned
// by Close.
func (w *Writer) Append(values ...any) {
	if w.done {
		panic("tables: Append after Close or Abort")
	}
	if len(values) != len(w.fields) {
		panic(fmt.Sprintf("tables: Append got %d values for %d fields", len(values), len(w.fields)))
	}
	// Check the whole row first so that a panic leaves no partial row behind.
	for i, v := range values {
		checkValue(w.fields[i], v)
	}
	batch := w.BatchRows
	if batch < 1 {
		batch = DefaultBatchRows
	}
	// An Arrow table writes a full batch only when the next row comes, so
	// that the last batch, which Close writes with the checksum, has rows.
	if _, ok := w.out.(*ipc.FileWriter); ok && w.pending >= batch {
		w.flush()
	}
	for i, v := range values {
		w.sum.add(v)
		switch v := v.(type) {
		case nil:
			w.columns[i].AppendNull()
		case int64:
			w.columns[i].(*array.Int64Builder).Append(v)
		case int:
			w.columns[i].(*array.Int64Builder).Append(int64(v))
		case float64:
			w.columns[i].(*array.Float64Builder).Append(v)
		case string:
			w.columns[i].(*array.StringBuilder).Append(v)
		}
	}
	w.pending++
	w.rows++
	if _, ok := w.out.(*ipc.FileWriter); !ok && w.pending >= batch {
		w.flush()
	}
}

// checkValue panics if v does not fit field f.
func checkValue(f Field, v any) {
	ok := false
	switch v.(type) {
	case nil:
		if !f.Nullable {
			panic(fmt.Sprintf("tables: nil value for field %q, which is not Nullable", f.Name))
		}
		return
	case int64, int:
		ok = f.Type == Int64
	case float64:
		ok = f.Type == Float64
	case string:
		ok = f.Type == String
	}
	if !ok {
		panic(fmt.Sprintf("tables: value of type %T for %s field %q", v, f.Type, f.Name))
	}
}

// flush writes the buffered rows as one record batch. After the first error
// it only empties the builders.
func (w *Writer) flush() {
	if w.pending == 0 {
		return
	}
	rec := w.builder.NewRecordBatch()
	defer rec.Release()
	w.pending = 0
	if w.err == nil {
		w.err = w.out.Write(rec)
	}
}

// flushLast writes the buffered rows of an Arrow IPC table as its last
// record batch (with no rows only for an empty table), which carries the
// content checksum of every row in its custom metadata (see checksumKey).
func (w *Writer) flushLast() {
	rec := w.builder.NewRecordBatch()
	defer rec.Release()
	w.pending = 0
	if w.err != nil {
		return
	}
	md := arrow.NewMetadata([]string{checksumKey, schemaKey}, []string{w.sum.String(), w.schema})
	last := array.NewRecordBatchWithMetadata(rec.Schema(), rec.Columns(), rec.NumRows(), md)
	defer last.Release()
	w.err = w.out.Write(last)
}

// Rows returns the number of rows appended so far.
func (w *Writer) Rows() int { return w.rows }

// Close writes the buffered rows and the file footer, syncs the temporary
// file to disk and renames it onto the destination, replacing any file there.
// On any error the temporary file is removed, the destination is left as it
// was, and the error is returned. Close after Close or Abort returns an error
// wrapping fs.ErrClosed.
func (w *Writer) Close() error {
	if w.done {
		return fmt.Errorf("tables: close %q: %w", w.path, fs.ErrClosed)
	}
	w.done = true
	if _, ok := w.out.(*ipc.FileWriter); ok {
		w.flushLast()
	} else {
		w.flush()
	}
	w.builder.Release()
	err := w.err
	if pw, ok := w.out.(*pqarrow.FileWriter); ok && err == nil {
		err = pw.AppendKeyValueMetadata(checksumKey, w.sum.String())
		if err == nil {
			err = pw.AppendKeyValueMetadata(schemaKey, w.schema)
		}
	}
	if e := w.out.Close(); err == nil { // always called: it releases memory
		err = e
	}
	if err == nil {
		err = w.buf.Flush()
	}
	if err == nil {
		err = w.file.Commit()
	}
	if err != nil {
		w.file.Abort() // removes the temporary file if Commit was not reached
		return fmt.Errorf("tables: write %q: %w", w.path, err)
	}
	return nil
}

// Abort discards the table: it removes the temporary file and leaves the
// destination as it was. It does nothing after Close or Abort, so callers may
// defer it right after Create.
func (w *Writer) Abort() {
	if w.done {
		return
	}
	w.done = true
	w.builder.Release()
	w.out.Close() // releases the writer's memory; the output is discarded
	w.file.Abort()
}

// WriteTable writes t to path through Create, Append and Close. A nil
// t.Valid, or a nil entry in it, means a column without nulls. It panics if
// t is inconsistent: a column count other than the field count, a column of
// the wrong Go type or length, or a validity list of the wrong length.
func WriteTable(path string, t *Table) error {
	n := t.check()
	w, err := Create(path, t.Fields, t.Meta)
	if err != nil {
		return err
	}
	defer w.Abort()
	row := make([]any, len(t.Fields))
	for i := range n {
		for j, col := range t.Columns {
			if j < len(t.Valid) && t.Valid[j] != nil && !t.Valid[j][i] {
				row[j] = nil
				continue
			}
			switch col := col.(type) {
			case []int64:
				row[j] = col[i]
			case []float64:
				row[j] = col[i]
			case []string:
				row[j] = col[i]
			}
		}
		w.Append(row...)
	}
	return w.Close()
}
