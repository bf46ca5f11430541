package circuits

import (
	"flag"
	"fmt"
	"math"
	"path/filepath"
	"testing"

	"mixdepth/internal/golden"
)

var update = flag.Bool("update", false, "rewrite testdata/regress.json from the current code")

// regressTol is the tolerance on every real and imaginary part of a pinned
// gate. The golden file stores each float64 in its shortest round-trip form,
// so on the machine that wrote it the match is exact; the tolerance only
// leaves room for another compiler or architecture to reassociate or fuse
// the floating-point operations of the Haar sampler (QR of a 4×4 Ginibre
// matrix, errors of a few 1e-16). A change to a random stream changes the
// entries by O(0.1), far above it.
const regressTol = 1e-12

// regressGate is a Gate as stored in the golden file, M as (re, im) pairs.
type regressGate struct {
	A, B int
	M    [16][2]float64
}

// regressCircuit is the first gates of one circuit instance and, for an
// ensemble with a final single-qubit layer, that layer at the built depth.
type regressCircuit struct {
	Name  string
	Gates []regressGate
	Final [][4][2]float64 `json:",omitempty"`
}

// regressStream is the first values of a raw stream.
type regressStream struct {
	Name   string
	Uint64 []string // hexadecimal: JSON numbers would round them
}

type regressFile struct {
	Streams  []regressStream
	Circuits []regressCircuit
}

func pairs(dst [][2]float64, m []complex128) {
	for i, z := range m {
		dst[i] = [2]float64{real(z), imag(z)}
	}
}

// regressValues computes the values that TestRegress pins.
func regressValues(t *testing.T) *regressFile {
	f := &regressFile{}
	for _, s := range []struct {
		name string
		rng  func() interface{ Uint64() uint64 }
	}{
		{"Stream(20261201, 0)", func() interface{ Uint64() uint64 } { return Stream(20261201, 0) }},
		{"Stream(1, 1099511627776)", func() interface{ Uint64() uint64 } { return Stream(1, 1<<40) }},
		{"FinalStream(20261201, 3, 8)", func() interface{ Uint64() uint64 } { return FinalStream(20261201, 3, 8) }},
	} {
		rng := s.rng()
		rs := regressStream{Name: s.name}
		for range 4 {
			rs.Uint64 = append(rs.Uint64, fmt.Sprintf("%016x", rng.Uint64()))
		}
		f.Streams = append(f.Streams, rs)
	}
	for _, c := range []struct {
		graph, schedule, gates string
		seed                   uint64
		instance, steps        int
	}{
		{"line:4", "layered", "haar", 20261201, 0, 2},
		{"line:4", "layered", "haar", 1, 5, 2},
		{"line:4", "layered", "clifford", 20261201, 0, 2},
		{"line:4", "layered", "cz+haar1", 20261201, 0, 2},
		{"ring:5", "random-edge", "haar", 7, 3, 4},
		{"ring:5", "random-edge", "cz+haar1", 7, 3, 4},
	} {
		g, err := ParseGraph(c.graph)
		if err != nil {
			t.Fatal(err)
		}
		sch, err := NewSchedule(ScheduleKind(c.schedule), g)
		if err != nil {
			t.Fatal(err)
		}
		e, err := NewEnsemble(c.gates)
		if err != nil {
			t.Fatal(err)
		}
		rc := regressCircuit{Name: fmt.Sprintf("%s %s %s seed %d instance %d, %d steps", c.graph, c.schedule, c.gates, c.seed, c.instance, c.steps)}
		b := NewBuilder(sch, e, c.seed, c.instance)
		var gates []Gate
		for range c.steps {
			gates = b.Next(gates)
		}
		for _, gt := range gates {
			rg := regressGate{A: gt.A, B: gt.B}
			pairs(rg.M[:], gt.M[:])
			rc.Gates = append(rc.Gates, rg)
		}
		if layer, ok := FinalLayer(e, g.Qubits, c.seed, c.instance, c.steps, nil); ok {
			rc.Final = make([][4][2]float64, len(layer))
			for q := range layer {
				pairs(rc.Final[q][:], layer[q][:])
			}
		}
		f.Circuits = append(f.Circuits, rc)
	}
	return f
}

// TestRegress pins the random streams: fixed (seed, instance) → the first
// raw values of Stream and FinalStream, and the first gates (edges and
// matrices) that Builder draws for the haar, clifford and cz+haar1 gate sets
// under both schedules, with the final single-qubit layer. It is a
// regression pin, in the manner of math/rand/v2's regress_test.go: the
// values in testdata/regress.json were produced by this code on purpose, and
// the test guards against a change to the streams, which would silently
// change every --resume of an older table, every merge of old and new parts
// and every pt-plot of an older table (each rebuilds its circuits from the
// seed). Regenerate with go test ./circuits/ -run TestRegress -update only
// for a deliberate, announced change of the streams.
func TestRegress(t *testing.T) {
	got := regressValues(t)
	var want regressFile
	if !golden.Load(t, filepath.Join("testdata", "regress.json"), *update, got, &want) {
		return
	}
	if len(want.Streams) != len(got.Streams) || len(want.Circuits) != len(got.Circuits) {
		t.Fatalf("golden file has %d streams and %d circuits, the test computes %d and %d: regenerate with -update after checking why",
			len(want.Streams), len(want.Circuits), len(got.Streams), len(got.Circuits))
	}
	for i, w := range want.Streams {
		g := got.Streams[i]
		if g.Name != w.Name || fmt.Sprint(g.Uint64) != fmt.Sprint(w.Uint64) {
			t.Errorf("%s: first values %v, pinned %s: %v", g.Name, g.Uint64, w.Name, w.Uint64)
		}
	}
	for i, w := range want.Circuits {
		g := got.Circuits[i]
		if g.Name != w.Name || len(g.Gates) != len(w.Gates) || len(g.Final) != len(w.Final) {
			t.Errorf("%s: %d gates and %d final gates, pinned %s: %d and %d", g.Name, len(g.Gates), len(g.Final), w.Name, len(w.Gates), len(w.Final))
			continue
		}
		for k, wg := range w.Gates {
			gg := g.Gates[k]
			if gg.A != wg.A || gg.B != wg.B {
				t.Errorf("%s, gate %d: edge (%d, %d), pinned (%d, %d)", g.Name, k, gg.A, gg.B, wg.A, wg.B)
			}
			if j := firstDiff(gg.M[:], wg.M[:]); j >= 0 {
				t.Errorf("%s, gate %d: entry %d is %v, pinned %v", g.Name, k, j, gg.M[j], wg.M[j])
			}
		}
		for q, wf := range w.Final {
			if j := firstDiff(g.Final[q][:], wf[:]); j >= 0 {
				t.Errorf("%s, final gate of qubit %d: entry %d is %v, pinned %v", g.Name, q, j, g.Final[q][j], wf[j])
			}
		}
	}
}

// firstDiff returns the first index where got and want differ by more than
// regressTol in a real or imaginary part, or −1.
func firstDiff(got, want [][2]float64) int {
	for j := range want {
		if math.Abs(got[j][0]-want[j][0]) > regressTol || math.Abs(got[j][1]-want[j][1]) > regressTol {
			return j
		}
	}
	return -1
}
