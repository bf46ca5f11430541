package tables

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
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
	data := make([]byte, len(orig))
	for i := range orig {
		copy(data, orig)
		data[i] ^= mask
		if err := os.WriteFile(path, data, 0o644); err != nil {
			t.Fatal(err)
		}
		reads := []func() error{func() error { _, err := Read(path); return err }}
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

// TestByteFlips flips the lowest bit of every byte of a small Arrow IPC and
// a small Parquet table in turn: Read must never panic and must report
// damage as ErrDamaged. (cmd/mixdepth sweeps whole-byte flips through the
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
