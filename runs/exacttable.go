package runs

import (
	"fmt"
	"slices"

	"mixdepth/moments"
	"mixdepth/tables"
)

// exactFields are the columns of a per-depth exact table.
var exactFields = []tables.Field{
	{Name: "depth", Type: tables.Int64, Unit: "layers (gates for random-edge)", Doc: "circuit depth (layers, or gates for random-edge)"},
	{Name: "gate_count", Type: tables.Int64, Unit: "gates", Doc: "two-qubit gates applied up to this depth"},
	{Name: "collision", Type: tables.Float64, Unit: "probability", Doc: "exact ensemble average E[Z] of the collision probability"},
	{Name: "collision_ratio", Type: tables.Float64, Doc: "E[Z] / Z_H with Z_H = 2/(D+1)"},
	{Name: "frame_potential", Type: tables.Float64, Nullable: true, Doc: "second frame potential F2 (Haar value 2); null above the size limit or for non-Haar gate sets"},
}

// ExactFields returns the columns of a per-depth exact table: depth,
// gate_count, collision, collision_ratio and the nullable frame_potential.
// The slice is new on every call.
func ExactFields() []tables.Field { return slices.Clone(exactFields) }

// WriteExactTable writes the per-depth values of r atomically to path
// (.arrow or .parquet) with the metadata meta; the frame potential is null
// in every row when r has none.
func WriteExactTable(path string, meta tables.Meta, r *moments.Result) error {
	w, err := tables.Create(path, exactFields, meta)
	if err != nil {
		return fmt.Errorf("runs: writing %s: %w", path, err)
	}
	defer w.Abort()
	for i, d := range r.Depths {
		var f any
		if r.Frame != nil {
			f = r.Frame[i]
		}
		w.Append(d, r.GateCounts[i], r.Collision[i], r.Ratio[i], f)
	}
	return w.Close()
}

// exactXEBFields are the extra columns of an exact table with noise, after
// exactFields.
var exactXEBFields = []tables.Field{
	{Name: "gate_error", Type: tables.Float64, Unit: "probability", Doc: "Pauli error rate after every two-qubit gate of this block of rows"},
	{Name: "xeb_expected", Type: tables.Float64, Doc: "exact expected linear cross-entropy benchmark E[F_lin] under the noise"},
	{Name: "xeb_ideal", Type: tables.Float64, Doc: "noiseless E[F_lin] = D·E[Z] − 1 of the same circuits"},
	{Name: "xeb_normalized", Type: tables.Float64, Doc: "xeb_expected / xeb_ideal"},
	{Name: "digital_fidelity", Type: tables.Float64, Doc: "digital error model: product of the fidelities of the operations up to this depth"},
	{Name: "xeb_over_digital", Type: tables.Float64, Doc: "xeb_normalized / digital_fidelity"},
}

// ExactXEBFields returns the columns of an exact table with noise: those of
// ExactFields, then gate_error, xeb_expected, xeb_ideal, xeb_normalized,
// digital_fidelity and xeb_over_digital. The slice is new on every call.
func ExactXEBFields() []tables.Field { return slices.Concat(exactFields, exactXEBFields) }

// WriteExactXEBTable writes the per-depth values of results, one block of
// rows per gate error rate (gateErrors[k] for results[k], each computed with
// moments.ExactNoise), atomically to path with the metadata meta. It panics
// if the lengths differ or a result has no XEB values.
func WriteExactXEBTable(path string, meta tables.Meta, gateErrors []float64, results []*moments.Result) error {
	if len(gateErrors) != len(results) {
		panic(fmt.Sprintf("runs: %d gate errors for %d results", len(gateErrors), len(results)))
	}
	w, err := tables.Create(path, ExactXEBFields(), meta)
	if err != nil {
		return fmt.Errorf("runs: writing %s: %w", path, err)
	}
	defer w.Abort()
	for k, r := range results {
		if r.XEBExpected == nil {
			panic("runs: WriteExactXEBTable with a result without XEB values")
		}
		for i, d := range r.Depths {
			var f any
			if r.Frame != nil {
				f = r.Frame[i]
			}
			w.Append(d, r.GateCounts[i], r.Collision[i], r.Ratio[i], f, gateErrors[k],
				r.XEBExpected[i], r.XEBIdeal[i], r.XEBNormalized[i], r.DigitalFidelity[i], r.XEBOverDigital[i])
		}
	}
	return w.Close()
}
