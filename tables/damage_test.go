package tables

import (
	"bytes"
	"encoding/binary"
	"errors"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"slices"
	"strings"
	"testing"

	"github.com/apache/arrow-go/v18/arrow"
	"github.com/apache/arrow-go/v18/arrow/array"
	"github.com/apache/arrow-go/v18/arrow/ipc"
	"github.com/apache/arrow-go/v18/arrow/memory"
)

// flipSweep writes the sample table as name, then flips each byte in turn
// (XOR mask) and reads the file with Read and ReadMeta. No flip may panic out
// of the package; a failure must wrap ErrDamaged and name the file. It
// returns the number of flips that read without error, that failed, and that
// failed through a panic recovered inside the package.
func flipSweep(t *testing.T, name string, mask byte) (ok, failed, recovered int) {
	t.Helper()
	dir := t.TempDir()
	path := filepath.Join(dir, name)
	writeRows(t, path, sampleFields, sampleMeta(), sampleRows)
	orig, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	want, err := Read(path)
	if err != nil {
		t.Fatal(err)
	}
	data := make([]byte, len(orig))
	for i := range orig {
		copy(data, orig)
		data[i] ^= mask
		if err := os.WriteFile(path, data, 0o644); err != nil {
			t.Fatal(err)
		}
		reads := []func() error{func() error {
			got, err := Read(path)
			if err == nil && !sameTable(got, want) {
				t.Errorf("%s: flipping byte %d of %d (mask %#x) reads silently as another table", name, i, len(orig), mask)
			}
			return err
		}}
		if i%8 == 0 { // ReadMeta takes a subset of Read's path; a sample keeps the test fast
			reads = append(reads, func() error { _, _, err := ReadMeta(path); return err })
		}
		for _, read := range reads {
			var err error
			func() {
				defer func() {
					if p := recover(); p != nil {
						t.Fatalf("%s: flipping byte %d of %d (mask %#x) panics: %v", name, i, len(orig), mask, p)
					}
				}()
				err = read()
			}()
			switch {
			case err == nil:
				ok++
			case !errors.Is(err, ErrDamaged) || !strings.Contains(err.Error(), path):
				t.Errorf("%s: byte %d: error %q does not wrap ErrDamaged or name the file", name, i, err)
			default:
				failed++
				if strings.Contains(err.Error(), "reader failed") {
					recovered++
				}
			}
		}
	}
	return ok, failed, recovered
}

// sameTable reports whether a and b hold the same fields, metadata and
// values, floats compared bit for bit (so NaNs compare equal) and a missing
// validity list equal to one without nulls.
func sameTable(a, b *Table) bool {
	if !reflect.DeepEqual(a.Fields, b.Fields) || !reflect.DeepEqual(a.Meta, b.Meta) || len(a.Columns) != len(b.Columns) {
		return false
	}
	for j := range a.Columns {
		switch ca := a.Columns[j].(type) {
		case []float64:
			cb, ok := b.Columns[j].([]float64)
			if !ok || len(ca) != len(cb) {
				return false
			}
			for i := range ca {
				if math.Float64bits(ca[i]) != math.Float64bits(cb[i]) {
					return false
				}
			}
		default:
			if !reflect.DeepEqual(a.Columns[j], b.Columns[j]) {
				return false
			}
		}
		n := a.Len()
		for i := range n {
			va := a.Valid[j] == nil || a.Valid[j][i]
			vb := b.Valid[j] == nil || b.Valid[j][i]
			if va != vb {
				return false
			}
		}
	}
	return true
}

// TestByteFlips flips the lowest bit of every byte of a small Arrow IPC and
// a small Parquet table in turn: Read must never panic, must report damage
// as ErrDamaged, and a flip that reads without error (in padding, or in
// bytes the readers do not use) must give the table unchanged: fields,
// metadata and every value bit for bit. (cmd/mixdepth sweeps whole-byte flips through the
// CLI.)
func TestByteFlips(t *testing.T) {
	for _, name := range []string{"t.arrow", "t.parquet"} {
		ok, failed, recovered := flipSweep(t, name, 0x01)
		t.Logf("%s: %d reads succeeded, %d failed (%d of them recovered panics inside arrow-go)", name, ok, failed, recovered)
	}
}

// TestParquetChecksum writes a Parquet table whose footer checksum does not
// match its rows, as a changed value that still decodes would leave it, and
// checks that Read refuses it.
func TestParquetChecksum(t *testing.T) {
	path := filepath.Join(t.TempDir(), "c.parquet")
	w, err := Create(path, []Field{{Name: "v", Type: Int64}}, Meta{})
	if err != nil {
		t.Fatal(err)
	}
	w.Append(int64(1))
	w.sum = newRowHash() // the checksum of no rows
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
	if _, err := Read(path); !errors.Is(err, ErrDamaged) || !strings.Contains(err.Error(), "checksum") {
		t.Errorf("Read of a table whose rows disagree with its checksum: %v, want a checksum error wrapping ErrDamaged", err)
	}
}

// TestParquetChecksumNotInMeta checks that the footer checksum stays out of
// the run metadata returned by Read and ReadMeta.
func TestParquetChecksumNotInMeta(t *testing.T) {
	path := filepath.Join(t.TempDir(), "m.parquet")
	writeRows(t, path, sampleFields, sampleMeta(), sampleRows)
	tb, err := Read(path)
	if err != nil {
		t.Fatal(err)
	}
	meta, _, err := ReadMeta(path)
	if err != nil {
		t.Fatal(err)
	}
	for _, m := range []Meta{tb.Meta, meta} {
		if _, ok := m.Get(checksumKey); ok {
			t.Errorf("the content checksum appears in Meta: %v", m.Keys)
		}
	}
}

// FuzzRead feeds arbitrary bytes to Read as an Arrow IPC and as a Parquet
// file: it must return a table or an error wrapping ErrDamaged, never panic
// (the seed corpus is the sample table in both formats).
func FuzzRead(f *testing.F) {
	dir := f.TempDir()
	for _, name := range []string{"seed.arrow", "seed.parquet"} {
		path := filepath.Join(dir, name)
		w, err := Create(path, sampleFields, sampleMeta())
		if err != nil {
			f.Fatal(err)
		}
		for _, r := range sampleRows {
			w.Append(r...)
		}
		if err := w.Close(); err != nil {
			f.Fatal(err)
		}
		data, err := os.ReadFile(path)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(data)
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		for _, name := range []string{"f.arrow", "f.parquet"} {
			path := filepath.Join(dir, name) // one process runs one input at a time
			if err := os.WriteFile(path, data, 0o644); err != nil {
				t.Fatal(err)
			}
			if _, err := Read(path); err != nil && !errors.Is(err, ErrDamaged) {
				t.Errorf("%s: error %v does not wrap ErrDamaged", name, err)
			}
		}
	})
}

// TestArrowChecksum writes an Arrow IPC table and checks, with arrow-go's
// own reader, that its last record batch carries the content and schema
// checksums in its custom metadata (the Arrow format's
// Message.custom_metadata; a test that fails if an arrow-go upgrade stops
// writing or reading it), and that changing the 8 bytes of one float value
// in the file (1/3, whose IEEE-754 bytes occur once) is refused as a
// checksum mismatch, where before the checksum it read as another value.
func TestArrowChecksum(t *testing.T) {
	path := filepath.Join(t.TempDir(), "c.arrow")
	writeRows(t, path, sampleFields, sampleMeta(), sampleRows)
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	r, err := ipc.NewFileReader(f)
	if err != nil {
		t.Fatal(err)
	}
	rec, err := r.RecordBatch(r.NumRecords() - 1)
	if err != nil {
		t.Fatal(err)
	}
	md := batchMeta(rec)
	sum, ok1 := md.Get(checksumKey)
	_, ok2 := md.Get(schemaKey)
	r.Close()
	f.Close()
	if !ok1 || !ok2 || len(sum) != 16 {
		t.Fatalf("last record batch metadata %v: no content and schema checksums", md)
	}
	if _, err := Read(path); err != nil {
		t.Fatal(err)
	}
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	var third [8]byte
	binary.LittleEndian.PutUint64(third[:], math.Float64bits(1.0/3))
	if bytes.Count(data, third[:]) != 1 {
		t.Fatalf("the bytes of 1/3 occur %d times in the file", bytes.Count(data, third[:]))
	}
	i := bytes.Index(data, third[:])
	data[i] ^= 0x01 // 1/3 becomes another finite float
	if err := os.WriteFile(path, data, 0o644); err != nil {
		t.Fatal(err)
	}
	if _, err := Read(path); !errors.Is(err, ErrDamaged) || !strings.Contains(err.Error(), "content checksum") {
		t.Errorf("Read of a table with a changed value: %v, want a content checksum error wrapping ErrDamaged", err)
	}
}

// TestArrowWithoutChecksum: an Arrow IPC file written without the
// checksums, as Create wrote them before they existed (arrow-go's writer
// alone), still reads, values unverified; the same file whose schema
// carries the seal (sealKey) but whose batches lost their checksums is
// damaged.
func TestArrowWithoutChecksum(t *testing.T) {
	dir := t.TempDir()
	write := func(name string, md arrow.Metadata) string {
		path := filepath.Join(dir, name)
		schema := arrow.NewSchema([]arrow.Field{{Name: "v", Type: arrow.PrimitiveTypes.Int64}}, &md)
		b := array.NewInt64Builder(memory.NewGoAllocator())
		b.AppendValues([]int64{3, 1, 4}, nil)
		col := b.NewArray()
		rec := array.NewRecordBatch(schema, []arrow.Array{col}, 3)
		var buf bytes.Buffer
		w, err := ipc.NewFileWriter(&buf, ipc.WithSchema(schema))
		if err != nil {
			t.Fatal(err)
		}
		if err := w.Write(rec); err != nil {
			t.Fatal(err)
		}
		if err := w.Close(); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(path, buf.Bytes(), 0o644); err != nil {
			t.Fatal(err)
		}
		return path
	}
	old := write("old.arrow", arrow.NewMetadata([]string{"seed"}, []string{"7"}))
	tb, err := Read(old)
	if err != nil {
		t.Fatalf("an Arrow table without checksums: %v", err)
	}
	if v, _ := tb.Int64s("v"); !slices.Equal(v, []int64{3, 1, 4}) {
		t.Errorf("values %v", v)
	}
	if _, _, err := ReadMeta(old); err != nil {
		t.Errorf("ReadMeta of an Arrow table without checksums: %v", err)
	}
	lost := write("lost.arrow", arrow.NewMetadata([]string{"seed", sealKey}, []string{"7", sealValue}))
	if _, err := Read(lost); !errors.Is(err, ErrDamaged) || !strings.Contains(err.Error(), "checksums are missing") {
		t.Errorf("Read of a sealed table without its checksums: %v", err)
	}
	if _, _, err := ReadMeta(lost); !errors.Is(err, ErrDamaged) {
		t.Errorf("ReadMeta of a sealed table without its checksums: %v", err)
	}
}
