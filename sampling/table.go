package sampling

import (
	"errors"
	"fmt"
	"path/filepath"
	"slices"
	"strings"

	"mixdepth/tables"

	"mixdepth/internal/inputfile"
)

// Sentinel errors of ReadSampleTable, wrapped by *RowError, besides
// ErrColumn.
var (
	// ErrColumnType marks a required column of another type than the one
	// a sample table needs.
	ErrColumnType = errors.New("wrong column type")
	// ErrNull marks a row without a value in a required column.
	ErrNull = errors.New("missing value")
)

// sampleFields are the columns of a sample table, one row per shot.
var sampleFields = []tables.Field{
	{Name: "instance", Type: tables.Int64, Doc: "instance id; its random streams depend only on (seed, instance, depth)"},
	{Name: "shot", Type: tables.Int64, Doc: "shot number within the instance, from 0"},
	{Name: "bitstring", Type: tables.String, Doc: "measured bits after all noise, qubit 0 first"},
	{Name: "outcome", Type: tables.Int64, Doc: "basis index x = Σ b_q 2^q of the bitstring"},
	{Name: "p_ideal", Type: tables.Float64, Unit: "probability", Doc: "noiseless probability of the bitstring under the instance's circuit"},
}

// SampleFields returns the columns of a sample table, one row per shot:
// instance, shot, bitstring, outcome and p_ideal. The slice is new on every
// call.
func SampleFields() []tables.Field { return slices.Clone(sampleFields) }

// WriteSampleTable writes the shots of results to a new table at path
// (FILE.arrow or FILE.parquet, written atomically by package tables) with
// the metadata meta: one row per shot, in the order of results and of their
// shots, with the bitstring of qubits qubits and its ideal probability.
func WriteSampleTable(path string, meta tables.Meta, qubits int, results []*Result) error {
	w, err := tables.Create(path, sampleFields, meta)
	if err != nil {
		return fmt.Errorf("sampling: writing %s: %w", path, err)
	}
	defer w.Abort()
	for _, r := range results {
		for k, x := range r.Outcomes {
			w.Append(r.Circuit.Instance, k, FormatBitstring(x, qubits), int64(x), r.PIdeal[k])
		}
	}
	return w.Close()
}

// ReadSampleTable reads the shots of a sample table to score: FILE.csv
// through ReadCSV (measured data, no metadata), any other name through
// tables.Read (FILE.arrow or FILE.parquet, as WriteSampleTable writes them),
// with its metadata. A table needs the columns instance (int64) and
// bitstring (string), with a value in every row; a p_ideal column (float64)
// is optional, and a null there means no ideal probability. Data errors are
// *RowError values wrapping ErrColumn, ErrColumnType or ErrNull, or those
// of ReadCSV; a name of no table format gives the *tables.FormatError of
// tables.Read.
func ReadSampleTable(path string) ([]Record, tables.Meta, error) {
	if strings.EqualFold(filepath.Ext(path), ".csv") {
		f, err := inputfile.Open(path, inputfile.DataLimit)
		if err != nil {
			return nil, tables.Meta{}, fmt.Errorf("sampling: reading %s: %w", path, err)
		}
		defer f.Close()
		recs, err := ReadCSV(path, f)
		return recs, tables.Meta{}, err
	}
	t, err := tables.Read(path)
	if err != nil {
		return nil, tables.Meta{}, err
	}
	col := func(name string) (int, error) {
		j, ok := t.Column(name)
		if !ok {
			return 0, &RowError{File: path, Column: name, Err: ErrColumn,
				Detail: "a sample table needs instance (int64) and bitstring (string) columns"}
		}
		return j, nil
	}
	typed := func(name string, err error) error {
		return &RowError{File: path, Column: name, Err: ErrColumnType, Detail: err.Error()}
	}
	ji, err := col("instance")
	if err != nil {
		return nil, t.Meta, err
	}
	jb, err := col("bitstring")
	if err != nil {
		return nil, t.Meta, err
	}
	inst, err := t.Int64s("instance")
	if err != nil {
		return nil, t.Meta, typed("instance", err)
	}
	bits, err := t.Strings("bitstring")
	if err != nil {
		return nil, t.Meta, typed("bitstring", err)
	}
	var p []float64
	jp, hasP := t.Column("p_ideal")
	if hasP {
		if p, err = t.Float64s("p_ideal"); err != nil {
			return nil, t.Meta, typed("p_ideal", err)
		}
	}
	valid := func(j, i int) bool { return t.Valid == nil || t.Valid[j] == nil || t.Valid[j][i] }
	recs := make([]Record, t.Len())
	for i := range recs {
		for _, j := range []int{ji, jb} {
			if !valid(j, i) {
				return nil, t.Meta, &RowError{File: path, Row: i + 1, Column: t.Fields[j].Name, Err: ErrNull,
					Detail: "every shot needs an instance and a bitstring"}
			}
		}
		recs[i] = Record{Row: i + 1, Instance: int(inst[i]), Bitstring: bits[i]}
		if hasP && valid(jp, i) {
			recs[i].PIdeal, recs[i].HasP = p[i], true
		}
	}
	return recs, t.Meta, nil
}
