package scan

import (
	"context"
	"fmt"
	"math"
	"strings"
	"testing"

	"mixdepth/circuits"
)

// TestFoldedReadout: the read-out folded into the last gate pass of a
// depth (sim.State.RunVisit, sim.State64.RunVisit) gives the records of
// the read-out in passes of its own (foldReadout off: Run, then the
// AmplitudeBlocks or ProbabilityBlocks count pass, the code before the
// fold) bit for bit: collision, ratio, KS and XEB of every record. The
// fold changes neither the amplitudes nor the chunks nor the order of the
// sums, so no tolerance. Circuits of 14–22 qubits on every schedule kind
// the scan takes (layered classes, random edges, a layout file whose
// layers stay within the lowest 14 qubits or jump between the halves),
// with and without the final single-qubit layer, complex128 and complex64,
// 1 and 2 workers (under the race detector, about ten times slower, only
// the grid:3x7 cases with 2 workers). Block passes, and so folds, run from
// 21 qubits on. The haar cases of grid:3x7 (double and single precision), the
// layout and the random edges fold at some depths; with the final layer no
// graph of 21–22 qubits folds (its last pass is gathered in short runs), so
// the fold of a final layer is checked in sim's TestRunVisitChunks, whose
// random ops include single-qubit gates.
func TestFoldedReadout(t *testing.T) {
	if testing.Short() {
		t.Skip("22-qubit scans")
	}
	layout := layoutJSON(22)
	for _, c := range []struct {
		graph, schedule, gates string
		depths                 []int
		single                 bool
	}{
		{"grid:3x7", "layered", "haar", []int{1, 2, 3, 4, 5, 6, 7, 8}, false},
		{"grid:3x7", "layered", "cz+haar1", []int{1, 2, 3, 4, 5, 6}, false},
		{"grid:3x7", "layered", "cz+haar1", []int{1, 2, 3, 4, 5}, true},
		{"grid:3x7", "layered", "haar", []int{1, 3, 4, 8}, true},
		{"grid:3x7", "layered", "haar", []int{1, 2, 3, 4, 5, 6, 7, 8}, true}, // single precision, folded
		{"line:22", "layered", "haar", []int{1, 2, 3, 4}, false},
		{"layout", "layered", "haar", []int{1, 2, 3, 4, 5, 6}, false},
		{"layout", "layered", "cz+haar1", []int{1, 2, 3, 4}, true},
		{"grid:3x7", "random-edge", "haar", []int{3, 10, 40, 41}, false},
		{"ring:22", "random-edge", "cz+haar1", []int{5, 20, 21}, true},
		{"grid:2x7", "layered", "cz+haar1", []int{1, 2, 3, 4}, false},
		{"grid:3x6", "layered", "haar", []int{1, 2, 5}, true},
	} {
		if raceEnabled && c.graph != "grid:3x7" {
			continue // the race run checks the concurrent visits, on the grid's cases
		}
		for _, workers := range []int{1, 2} {
			if raceEnabled && workers == 1 {
				continue
			}
			name := fmt.Sprintf("%s %s %s single=%v workers=%d", c.graph, c.schedule, c.gates, c.single, workers)
			mk := func() *Config {
				var cfg *Config
				if c.graph == "layout" {
					l, err := circuits.ReadLayout("fold.json", strings.NewReader(layout))
					if err != nil {
						t.Fatal(err)
					}
					cfg = config(t, "line:22", c.schedule, c.gates, c.depths, 2)
					cfg.Graph, cfg.Schedule = l.Graph("fold"), l.Schedule()
				} else {
					cfg = config(t, c.graph, c.schedule, c.gates, c.depths, 2)
				}
				cfg.Workers = workers
				if c.single {
					cfg.Precision = PrecisionSingle
				}
				return cfg
			}
			folded, _, err := Run(context.Background(), mk())
			if err != nil {
				t.Fatal(err)
			}
			foldReadout = false
			apart, _, err := Run(context.Background(), mk())
			foldReadout = true
			if err != nil {
				t.Fatal(err)
			}
			if len(folded) != len(apart) || len(folded) != 2*len(c.depths) {
				t.Fatalf("%s: %d folded records, %d apart", name, len(folded), len(apart))
			}
			for i := range folded {
				f, a := folded[i], apart[i]
				if f.Depth != a.Depth || f.Instance != a.Instance || f.GateCount != a.GateCount ||
					math.Float64bits(f.Collision) != math.Float64bits(a.Collision) ||
					math.Float64bits(f.Ratio) != math.Float64bits(a.Ratio) ||
					math.Float64bits(f.KS) != math.Float64bits(a.KS) ||
					math.Float64bits(f.XEBIdeal) != math.Float64bits(a.XEBIdeal) {
					t.Errorf("%s: record %d folded %+v, apart %+v", name, i, f, a)
				}
			}
		}
	}
}

// layoutJSON returns a layout on a line of n ≥ 16 qubits whose layers are
// the even edges within the lowest 14 qubits (a pass in place, so the
// read-out folds into it), the even edges of the rest, and the odd edges
// of the whole line.
func layoutJSON(n int) string {
	var layers []string
	edges := func(from, to, parity int) string {
		var e []string
		for q := from; q+1 < to; q++ {
			if q%2 == parity {
				e = append(e, fmt.Sprintf("[%d,%d]", q, q+1))
			}
		}
		return "[" + strings.Join(e, ",") + "]"
	}
	layers = append(layers, edges(0, 14, 0), edges(14, n, 0), edges(0, n, 1))
	return fmt.Sprintf(`{"qubits": %d, "layers": [%s]}`, n, strings.Join(layers, ","))
}
