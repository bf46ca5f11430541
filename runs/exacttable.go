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
