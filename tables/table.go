package tables

import (
	"bytes"
	"context"
	"encoding/base64"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"os"
	"strings"

	"github.com/apache/arrow-go/v18/arrow"
	"github.com/apache/arrow-go/v18/arrow/array"
	"github.com/apache/arrow-go/v18/arrow/ipc"
	"github.com/apache/arrow-go/v18/parquet"
	"github.com/apache/arrow-go/v18/parquet/file"
	"github.com/apache/arrow-go/v18/parquet/metadata"
	"github.com/apache/arrow-go/v18/parquet/pqarrow"
)

// Errors returned by the typed column accessors of Table.
var (
	ErrNoColumn   = errors.New("tables: no such column")
	ErrColumnType = errors.New("tables: wrong column type")
)

// Table is a whole table in memory. Columns[j] holds the values of Fields[j]
// as a []int64, []float64 or []string; all columns have the same length.
// Valid[j] is nil when column j has no nulls, and otherwise tells for each
// row whether the value is present; a null holds the zero value in Columns.
type Table struct {
	Fields  []Field
	Meta    Meta
	Columns []any
	Valid   [][]bool
}

// Len returns the number of rows.
func (t *Table) Len() int {
	if len(t.Columns) == 0 {
		return 0
	}
	return columnLen(t.Columns[0])
}

// columnLen returns the length of a column, or -1 if it is not a column type.
func columnLen(col any) int {
	switch col := col.(type) {
	case []int64:
		return len(col)
	case []float64:
		return len(col)
	case []string:
		return len(col)
	}
	return -1
}

// Column returns the index of the column with the given name and whether
// there is one.
func (t *Table) Column(name string) (int, bool) {
	for j, f := range t.Fields {
		if f.Name == name {
			return j, true
		}
	}
	return -1, false
}

// Int64s returns the values of the named Int64 column. The error wraps
// ErrNoColumn or ErrColumnType.
func (t *Table) Int64s(name string) ([]int64, error) {
	return column[[]int64](t, name, Int64)
}

// Float64s returns the values of the named Float64 column. The error wraps
// ErrNoColumn or ErrColumnType.
func (t *Table) Float64s(name string) ([]float64, error) {
	return column[[]float64](t, name, Float64)
}

// Strings returns the values of the named String column. The error wraps
// ErrNoColumn or ErrColumnType.
func (t *Table) Strings(name string) ([]string, error) {
	return column[[]string](t, name, String)
}

func column[S any](t *Table, name string, want Type) (S, error) {
	var zero S
	j, ok := t.Column(name)
	if !ok {
		return zero, fmt.Errorf("%w: %q", ErrNoColumn, name)
	}
	col, ok := t.Columns[j].(S)
	if !ok || t.Fields[j].Type != want {
		return zero, fmt.Errorf("%w: %q is %s, not %s", ErrColumnType, name, t.Fields[j].Type, want)
	}
	return col, nil
}

// check panics if t is inconsistent, and returns its length otherwise.
func (t *Table) check() int {
	checkFields(t.Fields)
	if len(t.Columns) != len(t.Fields) {
		panic(fmt.Sprintf("tables: table has %d columns for %d fields", len(t.Columns), len(t.Fields)))
	}
	if t.Valid != nil && len(t.Valid) != len(t.Fields) {
		panic(fmt.Sprintf("tables: table has %d validity lists for %d fields", len(t.Valid), len(t.Fields)))
	}
	n := t.Len()
	for j, f := range t.Fields {
		col := t.Columns[j]
		var ok bool
		switch f.Type {
		case Int64:
			_, ok = col.([]int64)
		case Float64:
			_, ok = col.([]float64)
		case String:
			_, ok = col.([]string)
		}
		if !ok {
			panic(fmt.Sprintf("tables: column %q is a %T, not %s values", f.Name, col, f.Type))
		}
		if columnLen(col) != n {
			panic(fmt.Sprintf("tables: column %q has %d rows, column %q has %d", f.Name, columnLen(col), t.Fields[0].Name, n))
		}
		if t.Valid != nil && t.Valid[j] != nil && len(t.Valid[j]) != n {
			panic(fmt.Sprintf("tables: validity of column %q has length %d for %d rows", f.Name, len(t.Valid[j]), n))
		}
	}
	return n
}

// ErrDamaged is wrapped by the errors of Read and ReadMeta for a file that
// opens but cannot be read as a table of this tool: a damaged, truncated or
// unfinished file, another format under a table name, a column of a type
// that tables do not hold, a null in a column that cannot be null, or rows
// whose content checksum disagrees with the one recorded at writing.
var ErrDamaged = errors.New("tables: not a complete table of this tool (a damaged or unfinished file, or another format with this name)")

// Read reads the whole table at path; the extension chooses the format as in
// Create. Errors name the file; a file that opens but does not read as a
// table gives an error wrapping ErrDamaged. Every record batch is validated
// before its values are used, a panic inside the Arrow or Parquet readers is
// recovered and reported as damage, and a table written by Create is
// checked against the content checksum it records (see checksumKey; an
// Arrow table written before the checksum existed is read unverified).
func Read(path string) (*Table, error) {
	form, err := formatOf(path)
	if err != nil {
		return nil, err
	}
	var t *Table
	err = withFile(path, func(f *os.File) error {
		var err error
		switch form {
		case arrowFormat:
			t, err = readArrow(f)
		case parquetFormat:
			t, err = readParquet(f)
		}
		return err
	})
	if err != nil {
		return nil, readError(path, err)
	}
	return t, nil
}

// ReadMeta reads the run metadata and the fields of the table at path
// without reading its rows. Its errors are those of Read.
func ReadMeta(path string) (Meta, []Field, error) {
	form, err := formatOf(path)
	if err != nil {
		return Meta{}, nil, err
	}
	var t *Table
	err = withFile(path, func(fd *os.File) error {
		switch form {
		case arrowFormat:
			if err := checkArrowFile(fd, fileSize(fd)); err != nil {
				return err
			}
			return withArrowReader(fd, func(r *ipc.FileReader) error {
				var err error
				if t, err = newTable(r.Schema()); err != nil {
					return err
				}
				if r.NumRecords() == 0 {
					if sealed(r.Schema()) {
						return errUnsealed
					}
					return nil
				}
				// The schema checksum is in the last batch's metadata.
				rec, err := r.RecordBatch(r.NumRecords() - 1)
				if err != nil {
					return err
				}
				return t.checkSchema(batchMeta(rec), sealed(r.Schema()))
			})
		case parquetFormat:
			return withParquetReader(fd, func(r *pqarrow.FileReader) error {
				s, err := r.Schema()
				if err == nil {
					t, err = newTable(s)
				}
				if err != nil {
					return err
				}
				return t.checkSchema(parquetSums(r.ParquetReader().MetaData().KeyValueMetadata()), sealed(s))
			})
		}
		return nil
	})
	if err != nil {
		return Meta{}, nil, readError(path, err)
	}
	return t.Meta, t.Fields, nil
}

// openError marks a failure to open or stat the file itself, which is not
// damage.
type openError struct{ err error }

func (e openError) Error() string { return e.err.Error() }
func (e openError) Unwrap() error { return e.err }

// readError names path in err; every error but a failure to open the file
// wraps ErrDamaged.
func readError(path string, err error) error {
	var oe openError
	if errors.As(err, &oe) {
		return fmt.Errorf("tables: read %q: %w", path, oe.err)
	}
	return &damagedError{path: path, err: err}
}

// damagedError is the error of Read and ReadMeta for a damaged file: it
// matches ErrDamaged and wraps the reader's cause.
type damagedError struct {
	path string
	err  error
}

func (e *damagedError) Error() string {
	return fmt.Sprintf("tables: read %q: %s: %v", e.path, strings.TrimPrefix(ErrDamaged.Error(), "tables: "), e.err)
}
func (e *damagedError) Unwrap() []error { return []error{ErrDamaged, e.err} }

// withFile opens the regular file at path and calls read with it. A panic in
// read (inside arrow-go, on bytes it did not expect) is recovered and
// returned as an error: a damaged file must never crash the caller.
func withFile(path string, read func(*os.File) error) (err error) {
	fd, err := os.Open(path)
	if err != nil {
		return openError{err}
	}
	defer fd.Close()
	if fi, err := fd.Stat(); err != nil {
		return openError{err}
	} else if !fi.Mode().IsRegular() {
		return openError{fmt.Errorf("%s is not a regular file", path)}
	}
	defer func() {
		if p := recover(); p != nil {
			err = fmt.Errorf("the reader failed on its bytes (%v)", p)
		}
	}()
	return read(fd)
}

// checkParquetSchema verifies the Arrow schema that pqarrow stores in the
// footer of pf before pqarrow decodes it (see checkArrowFile for why), and
// that it is there.
func checkParquetSchema(pf *file.Reader) error {
	v := pf.MetaData().KeyValueMetadata().FindValue("ARROW:schema")
	if v == nil {
		// Create has always stored it (pqarrow.WithStoreSchema); a footer
		// without it lost its key-value metadata (a damaged length or
		// field header in the footer drops the whole list, units and run
		// metadata with it) or comes from another program.
		return errors.New("no stored Arrow schema (ARROW:schema) in the Parquet footer, which every table of this tool has")
	}
	data, err := base64.StdEncoding.DecodeString(*v)
	if err != nil {
		data, err = base64.RawStdEncoding.DecodeString(*v)
	}
	if err != nil {
		return fmt.Errorf("stored Arrow schema: %w", err)
	}
	if err := checkSchemaMessage(data); err != nil {
		return fmt.Errorf("stored Arrow schema: %w", err)
	}
	return nil
}

// fileSize returns the size of the open file fd, or 0 if it cannot be
// read (the readers then fail on it).
func fileSize(fd *os.File) int64 {
	fi, err := fd.Stat()
	if err != nil {
		return 0
	}
	return fi.Size()
}

// withArrowReader calls f with an Arrow IPC file reader of fd, once the
// schema at the start of the file has been found equal to the footer's
// (sameArrowSchemas).
func withArrowReader(fd *os.File, f func(*ipc.FileReader) error) error {
	r, err := ipc.NewFileReader(fd, ipc.WithAllocator(allocator()))
	if err != nil {
		return err
	}
	defer r.Close()
	if err := sameArrowSchemas(fd, fileSize(fd), r.Schema()); err != nil {
		return err
	}
	return f(r)
}

// sameArrowSchemas checks that the schema message at the start of the Arrow
// IPC file fd of the given size (after the 8 bytes of "ARROW1" and padding; Arrow IPC "File
// format") equals footer, the footer's copy, which the file reader uses.
// The two copies are written together, so a difference is damage, and the
// check gives the first copy, otherwise unread, a purpose: a flipped byte in
// either is caught.
func sameArrowSchemas(fd io.ReaderAt, size int64, footer *arrow.Schema) error {
	var head [8]byte
	if _, err := fd.ReadAt(head[:], 8); err != nil {
		return fmt.Errorf("schema message: %w", err)
	}
	n := int64(int32(binary.LittleEndian.Uint32(head[4:])))
	if binary.LittleEndian.Uint32(head[:4]) != 0xFFFFFFFF || n <= 0 || n > size-16 {
		return errors.New("no schema message at the start of the Arrow IPC file")
	}
	data := make([]byte, 8+n)
	if _, err := fd.ReadAt(data, 8); err != nil {
		return fmt.Errorf("schema message: %w", err)
	}
	if err := checkSchemaMessage(data); err != nil {
		return fmt.Errorf("schema message: %w", err)
	}
	sr, err := ipc.NewReader(bytes.NewReader(data), ipc.WithAllocator(allocator()))
	if err != nil {
		return fmt.Errorf("schema message: %w", err)
	}
	defer sr.Release()
	a, err := newTable(sr.Schema())
	if err != nil {
		return err
	}
	b, err := newTable(footer)
	if err != nil {
		return err
	}
	if schemaChecksum(a.Fields, a.Meta) != schemaChecksum(b.Fields, b.Meta) {
		return errors.New("the schema at the start of the Arrow IPC file differs from the footer's copy")
	}
	return nil
}

// withParquetReader calls f with a Parquet file reader of fd.
func withParquetReader(fd *os.File, f func(*pqarrow.FileReader) error) error {
	mem := allocator()
	pf, err := file.NewParquetReader(fd, file.WithReadProps(parquet.NewReaderProperties(mem)))
	if err != nil {
		return err
	}
	defer pf.Close()
	if err := checkParquetSchema(pf); err != nil {
		return err
	}
	r, err := pqarrow.NewFileReader(pf, pqarrow.ArrowReadProperties{BatchSize: DefaultBatchRows}, mem)
	if err != nil {
		return err
	}
	return f(r)
}

func readArrow(fd *os.File) (*Table, error) {
	if err := checkArrowFile(fd, fileSize(fd)); err != nil {
		return nil, err
	}
	var t *Table
	err := withArrowReader(fd, func(r *ipc.FileReader) error {
		var err error
		if t, err = newTable(r.Schema()); err != nil {
			return err
		}
		var want *string
		if sealed(r.Schema()) && r.NumRecords() == 0 {
			return errUnsealed
		}
		for i := range r.NumRecords() {
			rec, err := r.RecordBatch(i) // valid until the next call; not ours to release
			if err != nil {
				return err
			}
			md := batchMeta(rec)
			if sum, ok := md.Get(checksumKey); ok {
				if i != r.NumRecords()-1 {
					return fmt.Errorf("record batch %d of %d carries the content checksum, which only the last one holds", i, r.NumRecords())
				}
				want = &sum
			}
			if i == r.NumRecords()-1 {
				if err := t.checkSchema(md, sealed(r.Schema())); err != nil {
					return err
				}
				if _, ok := md.Get(checksumKey); !ok && sealed(r.Schema()) {
					return errUnsealed
				}
			}
			if err := t.appendBatch(rec); err != nil {
				return err
			}
		}
		return t.checkContent(want)
	})
	return t, err
}

// batchMeta returns the custom metadata of an Arrow record batch, where the
// last batch of a table written by Create holds its checksums (see
// checksumKey).
func batchMeta(rec arrow.RecordBatch) Meta {
	if rm, ok := rec.(arrow.RecordBatchWithMetadata); ok {
		return metaFrom(rm.Metadata())
	}
	return Meta{}
}

// checkSchema compares the fields and run metadata of t with the schema
// checksum in md, when md has one (see schemaKey); a sealed table must have
// one (sealKey).
func (t *Table) checkSchema(md Meta, sealed bool) error {
	want, ok := md.Get(schemaKey)
	if !ok && sealed {
		return errUnsealed
	}
	if ok {
		if got := schemaChecksum(t.Fields, t.Meta); got != want {
			return fmt.Errorf("schema checksum %s, not the %s recorded when the table was written: its columns or run metadata changed", got, want)
		}
	}
	return nil
}

// parquetSums returns the schema checksum of a Parquet footer's key-value
// metadata as a Meta for checkSchema.
func parquetSums(kv metadata.KeyValueMetadata) Meta {
	var m Meta
	if v := kv.FindValue(schemaKey); v != nil {
		m.Set(schemaKey, *v)
	}
	return m
}

// checkContent compares the rows of t with the content checksum want, when
// not nil (see checksumKey).
func (t *Table) checkContent(want *string) error {
	if want != nil {
		if got := t.checksum(); got != *want {
			return fmt.Errorf("content checksum %s, not the %s recorded when the table was written", got, *want)
		}
	}
	return nil
}

func readParquet(fd *os.File) (*Table, error) {
	var t *Table
	err := withParquetReader(fd, func(r *pqarrow.FileReader) error {
		s, err := r.Schema()
		if err != nil {
			return err
		}
		if t, err = newTable(s); err != nil {
			return err
		}
		rr, err := r.GetRecordReader(context.Background(), nil, nil)
		if err != nil {
			return err
		}
		defer rr.Release()
		for rr.Next() {
			if err := t.appendBatch(rr.RecordBatch()); err != nil {
				return err
			}
		}
		if err := rr.Err(); err != nil && !errors.Is(err, io.EOF) {
			return err
		}
		kv := r.ParquetReader().MetaData().KeyValueMetadata()
		if err := t.checkSchema(parquetSums(kv), sealed(s)); err != nil {
			return err
		}
		want := kv.FindValue(checksumKey)
		if want == nil && sealed(s) {
			return errUnsealed
		}
		return t.checkContent(want)
	})
	return t, err
}

// newTable returns an empty Table for an Arrow schema.
func newTable(s *arrow.Schema) (*Table, error) {
	t := &Table{
		Meta:    metaFrom(s.Metadata()),
		Fields:  make([]Field, s.NumFields()),
		Columns: make([]any, s.NumFields()),
		Valid:   make([][]bool, s.NumFields()),
	}
	for j, af := range s.Fields() {
		f, err := fieldFrom(af)
		if err != nil {
			return nil, err
		}
		t.Fields[j] = f
		switch f.Type {
		case Int64:
			t.Columns[j] = []int64{}
		case Float64:
			t.Columns[j] = []float64{}
		case String:
			t.Columns[j] = []string{}
		}
	}
	return t, nil
}

// appendBatch appends the rows of rec, which must have the schema of t.
func (t *Table) appendBatch(rec arrow.RecordBatch) error {
	if int(rec.NumCols()) != len(t.Fields) {
		return fmt.Errorf("record batch has %d columns for %d fields", rec.NumCols(), len(t.Fields))
	}
	if err := array.ValidateRecordFull(rec); err != nil {
		return err
	}
	n := t.Len() // rows before this batch
	for j, arr := range rec.Columns() {
		switch col := t.Columns[j].(type) {
		case []int64:
			a, ok := arr.(*array.Int64)
			if !ok {
				return fmt.Errorf("column %q holds %s, not int64", t.Fields[j].Name, arr.DataType())
			}
			start := len(col)
			col = append(col, a.Int64Values()...)
			for i := range a.Len() {
				if a.IsNull(i) {
					col[start+i] = 0 // the value under a null is unspecified
				}
			}
			t.Columns[j] = col
		case []float64:
			a, ok := arr.(*array.Float64)
			if !ok {
				return fmt.Errorf("column %q holds %s, not float64", t.Fields[j].Name, arr.DataType())
			}
			start := len(col)
			col = append(col, a.Float64Values()...)
			for i := range a.Len() {
				if a.IsNull(i) {
					col[start+i] = 0
				}
			}
			t.Columns[j] = col
		case []string:
			a, ok := arr.(*array.String)
			if !ok {
				return fmt.Errorf("column %q holds %s, not utf8", t.Fields[j].Name, arr.DataType())
			}
			t.Columns[j] = appendStrings(col, a)
		}
		if arr.NullN() > 0 && !t.Fields[j].Nullable {
			return fmt.Errorf("column %q cannot hold nulls but has %d", t.Fields[j].Name, arr.NullN())
		}
		t.Valid[j] = appendValid(t.Valid[j], n, arr)
	}
	return nil
}

// appendStrings appends the values of a to col. The values are copied into
// one Go string per batch, because the Arrow buffers belong to the allocator
// and are freed on Release.
func appendStrings(col []string, a *array.String) []string {
	data := string(a.ValueBytes())
	offs := a.ValueOffsets()
	base := offs[0]
	for i := range a.Len() {
		if a.IsNull(i) {
			col = append(col, "")
			continue
		}
		col = append(col, data[offs[i]-base:offs[i+1]-base])
	}
	return col
}

// appendValid extends the validity list of a column that had n rows before
// arr was appended. It stays nil while the column has no nulls.
func appendValid(valid []bool, n int, arr arrow.Array) []bool {
	if valid == nil && arr.NullN() == 0 {
		return nil
	}
	if valid == nil {
		valid = make([]bool, n, n+arr.Len())
		for i := range valid {
			valid[i] = true
		}
	}
	for i := range arr.Len() {
		valid = append(valid, arr.IsValid(i))
	}
	return valid
}
