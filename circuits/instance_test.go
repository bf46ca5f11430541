package circuits

import (
	"reflect"
	"testing"
)

func draws(seed uint64, instance int) []uint64 {
	rng := Stream(seed, instance)
	out := make([]uint64, 64)
	for i := range out {
		out[i] = rng.Uint64()
	}
	return out
}

// TestStreamDeterminism: the stream of instance i depends on (seed, i) alone
// (so results do not depend on workers or parts): the same pair repeats exactly, a different instance
// or seed gives different draws.
func TestStreamDeterminism(t *testing.T) {
	base := draws(7, 3)
	if !reflect.DeepEqual(base, draws(7, 3)) {
		t.Fatal("Stream(7, 3) differs between two calls")
	}
	for _, other := range []struct {
		seed uint64
		inst int
	}{{7, 0}, {7, 2}, {7, 4}, {7, 1 << 40}, {8, 3}, {0, 3}, {3, 7}} {
		d := draws(other.seed, other.inst)
		same := 0
		for i := range d {
			if d[i] == base[i] {
				same++
			}
		}
		// Independent 64-bit draws coincide with probability 2^-64 each.
		if same > 0 {
			t.Errorf("Stream(%d, %d) shares %d of 64 draws with Stream(7, 3)", other.seed, other.inst, same)
		}
	}
}

// TestBuilderDeterminism: an instance's gates depend only on (seed, i), not
// on which other instances were built before it or in what order.
func TestBuilderDeterminism(t *testing.T) {
	g := mustGraph(t, "grid:2x3")
	for _, kind := range Schedules {
		s, err := NewSchedule(kind, g)
		if err != nil {
			t.Fatal(err)
		}
		build := func(inst int) []Gate {
			b := NewBuilder(s, Haar{}, 99, inst)
			var gates []Gate
			for step := range 6 {
				if b.Steps() != step {
					t.Fatalf("Steps() = %d before step %d", b.Steps(), step)
				}
				gates = b.Next(gates)
			}
			return gates
		}
		a5 := build(5)
		build(4)
		if !reflect.DeepEqual(a5, build(5)) {
			t.Errorf("%s: instance 5 built twice gives different gates", kind)
		}
		if reflect.DeepEqual(a5, build(6)) {
			t.Errorf("%s: instances 5 and 6 give the same gates", kind)
		}
		for _, gate := range a5 {
			if !g.HasEdge(gate.A, gate.B) {
				t.Errorf("%s: gate on (%d, %d), not an edge", kind, gate.A, gate.B)
			}
			if e := maxUnitarityError(gate.M[:], 4); e > 1e-12 {
				t.Errorf("%s: gate not unitary (%g)", kind, e)
			}
		}
	}
}

func TestNewEnsemble(t *testing.T) {
	e, err := NewEnsemble("haar")
	if err != nil || e.Name() != "haar" {
		t.Errorf("NewEnsemble(haar) = %v, %v", e, err)
	}
	if _, err := NewEnsemble("no-such-gate-set"); err == nil {
		t.Error("NewEnsemble(no-such-gate-set) returned no error")
	}
}
