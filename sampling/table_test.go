package sampling

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"mixdepth/tables"
)

// TestSampleTableRoundTrip: the shots written by WriteSampleTable read back
// as the same instances, bitstrings and ideal probabilities (exactly: Arrow
// and Parquet store float64 bit for bit), with the metadata, in both
// formats.
func TestSampleTableRoundTrip(t *testing.T) {
	c := testConfig(t, "line:4", "haar", 4, 3, 25, Noise{Fidelity: 0.9, Readout01: 0.05})
	c.Instances = []int{5, 1, 3}
	rs := runAll(t, c)
	var meta tables.Meta
	meta.Set("command", "sample")
	for _, name := range []string{"s.arrow", "s.parquet"} {
		path := filepath.Join(t.TempDir(), name)
		if err := WriteSampleTable(path, meta, 4, rs); err != nil {
			t.Fatal(err)
		}
		recs, got, err := ReadSampleTable(path)
		if err != nil {
			t.Fatal(err)
		}
		if cmd, _ := got.Get("command"); cmd != "sample" {
			t.Errorf("%s: metadata command %q", name, cmd)
		}
		k := 0
		for _, r := range rs {
			for i, x := range r.Outcomes {
				if k >= len(recs) {
					t.Fatalf("%s: %d records, want %d", name, len(recs), 3*25)
				}
				want := Record{Row: k + 1, Instance: r.Circuit.Instance, Bitstring: FormatBitstring(x, 4), PIdeal: r.PIdeal[i], HasP: true}
				if recs[k] != want {
					t.Fatalf("%s: record %d = %+v, want %+v", name, k, recs[k], want)
				}
				k++
			}
		}
		if k != len(recs) {
			t.Errorf("%s: %d records, want %d", name, len(recs), k)
		}
	}
}

// TestReadSampleTableErrors: a table without a required column, with one of
// another type, or with a null in one, is a *RowError naming the column
// (and the row) and wrapping its sentinel; a CSV goes through ReadCSV.
func TestReadSampleTableErrors(t *testing.T) {
	dir := t.TempDir()
	write := func(name string, fields []tables.Field, rows ...[]any) string {
		t.Helper()
		path := filepath.Join(dir, name)
		w, err := tables.Create(path, fields, tables.Meta{})
		if err != nil {
			t.Fatal(err)
		}
		for _, r := range rows {
			w.Append(r...)
		}
		if err := w.Close(); err != nil {
			t.Fatal(err)
		}
		return path
	}
	inst := tables.Field{Name: "instance", Type: tables.Int64, Nullable: true}
	bits := tables.Field{Name: "bitstring", Type: tables.String, Nullable: true}
	cases := []struct {
		name     string
		path     string
		sentinel error
		want     string
	}{
		{"no bitstring", write("a.arrow", []tables.Field{inst}, []any{0}), ErrColumn, "column bitstring"},
		{"instance as string", write("b.arrow", []tables.Field{{Name: "instance", Type: tables.String}, bits}, []any{"0", "01"}), ErrColumnType, "column instance"},
		{"p_ideal as string", write("c.parquet", []tables.Field{inst, bits, {Name: "p_ideal", Type: tables.String}}, []any{0, "01", "x"}), ErrColumnType, "column p_ideal"},
		{"null bitstring", write("d.arrow", []tables.Field{inst, bits}, []any{0, "01"}, []any{1, nil}), ErrNull, "row 2: column bitstring"},
		{"null instance", write("e.parquet", []tables.Field{inst, bits}, []any{nil, "01"}), ErrNull, "row 1: column instance"},
	}
	for _, c := range cases {
		_, _, err := ReadSampleTable(c.path)
		var re *RowError
		if !errors.As(err, &re) || !errors.Is(err, c.sentinel) || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: err = %v, want a *RowError wrapping %v mentioning %q", c.name, err, c.sentinel, c.want)
		}
	}
	// A null p_ideal is a missing ideal probability, not an error.
	recs, _, err := ReadSampleTable(write("f.arrow", []tables.Field{inst, bits, {Name: "p_ideal", Type: tables.Float64, Nullable: true}},
		[]any{0, "01", 0.25}, []any{1, "10", nil}))
	if err != nil || len(recs) != 2 || !recs[0].HasP || recs[0].PIdeal != 0.25 || recs[1].HasP {
		t.Errorf("null p_ideal: %+v, %v", recs, err)
	}
	csvPath := filepath.Join(dir, "m.csv")
	if err := os.WriteFile(csvPath, []byte("instance,bitstring\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	if _, _, err := ReadSampleTable(csvPath); !errors.Is(err, ErrEmpty) {
		t.Errorf("header-only CSV: %v, want ErrEmpty", err)
	}
	var fe *tables.FormatError
	if _, _, err := ReadSampleTable(filepath.Join(dir, "t.txt")); !errors.As(err, &fe) {
		t.Errorf("t.txt: %v, want a *tables.FormatError", err)
	}
}
