package moments_test

import (
	"context"
	"path/filepath"
	"strconv"
	"testing"

	"mixdepth/circuits"
	"mixdepth/moments"
	"mixdepth/runs"
	"mixdepth/tables"
)

// TestExactToTable: a Go program can run an exact computation and keep it
// as a table with the library alone (moments, runs and tables, no CLI): the
// per-depth values written to Arrow IPC and to Parquet read back bit for
// bit, an absent frame potential as nulls, and the run's parameters as
// metadata.
func TestExactToTable(t *testing.T) {
	dir := t.TempDir()
	for _, gates := range []string{"haar", "cz+haar1"} {
		g, s, e := exactInputs(t, "grid:2x3", circuits.KindLayered, gates)
		r, err := moments.Exact(context.Background(), g, s, e, depthRange(1, 12, 1))
		if err != nil {
			t.Fatal(err)
		}
		if (r.Frame == nil) != (gates != "haar") {
			t.Fatalf("%s: frame potential %v (note %q)", gates, r.Frame, r.FrameNote)
		}
		var meta tables.Meta
		meta.Set("graph", g.Name)
		meta.Set("gates", e.Name())
		meta.Set("anticoncentration_depth", strconv.Itoa(r.Depth))
		for _, name := range []string{"exact.arrow", "exact.parquet"} {
			path := filepath.Join(dir, gates+"-"+name)
			if err := runs.WriteExactTable(path, meta, r); err != nil {
				t.Fatal(err)
			}

			tab, err := tables.Read(path)
			if err != nil {
				t.Fatal(err)
			}
			depth, err1 := tab.Int64s("depth")
			gateCount, err2 := tab.Int64s("gate_count")
			z, err3 := tab.Float64s("collision")
			ratio, err4 := tab.Float64s("collision_ratio")
			frame, err5 := tab.Float64s("frame_potential")
			for _, err := range []error{err1, err2, err3, err4, err5} {
				if err != nil {
					t.Fatal(err)
				}
			}
			if tab.Len() != len(r.Depths) {
				t.Fatalf("%s: %d rows, want %d", path, tab.Len(), len(r.Depths))
			}
			frameCol, _ := tab.Column("frame_potential")
			for i := range r.Depths {
				if int(depth[i]) != r.Depths[i] || int(gateCount[i]) != r.GateCounts[i] || z[i] != r.Collision[i] || ratio[i] != r.Ratio[i] {
					t.Errorf("%s row %d: %d %d %v %v, want %d %d %v %v", path, i, depth[i], gateCount[i], z[i], ratio[i],
						r.Depths[i], r.GateCounts[i], r.Collision[i], r.Ratio[i])
				}
				valid := tab.Valid[frameCol] == nil || tab.Valid[frameCol][i]
				if r.Frame == nil && valid || r.Frame != nil && (!valid || frame[i] != r.Frame[i]) {
					t.Errorf("%s row %d: frame potential %v (present %v), want %v", path, i, frame[i], valid, r.Frame)
				}
			}
			if v, _ := tab.Meta.Get("anticoncentration_depth"); v != strconv.Itoa(r.Depth) {
				t.Errorf("%s: metadata anticoncentration_depth %q, want %d", path, v, r.Depth)
			}
		}
	}
}
