package scan

import (
	"context"
	"math"
	"math/rand/v2"
	"strconv"
	"testing"

	"mixdepth/circuits"
	"mixdepth/sim"
)

// BenchmarkReader times Reader.Read on random (Porter–Thomas) states, the
// read-out of every depth of a scan; bytes/s counts the 16 bytes of each
// amplitude once, so a read-out of one pass over the state runs near the
// machine's bandwidth.
func BenchmarkReader(b *testing.B) {
	for _, n := range []int{12, 16, 20, 22, 24} {
		b.Run("n="+strconv.Itoa(n), func(b *testing.B) {
			st, err := sim.NewState(n, 0)
			if err != nil {
				b.Skip(err)
			}
			rng := rand.New(rand.NewPCG(uint64(n), 5))
			s := math.Sqrt(0.5 / float64(len(st.Amp)))
			for i := range st.Amp {
				st.Amp[i] = complex(s*rng.NormFloat64(), s*rng.NormFloat64())
			}
			r := NewReader(n, 2)
			r.Read(st)
			b.SetBytes(16 << n)
			b.ReportAllocs()
			for b.Loop() {
				r.Read(st)
			}
		})
	}
}

// BenchmarkFoldedReadout times one depth of a scan of grid:4x6 (24 qubits,
// 2 workers): one layer of Haar gates and the read-out, with the read-out's
// count pass folded into the layer's last pass (sim.State.RunVisit) and in
// a pass of its own (fold=false, the code before the fold); alternate the
// two by running them as separate -bench patterns in turn (-count repeats
// one sub-benchmark before the next). The layer of the fourth class (vertical edges
// from odd rows) ends with a pass on the block {0..12, 17}, gathered in
// runs of whole chunks, so the count folds; that of the first class
// (horizontal edges from even columns) ends with a pass gathered in runs of
// 16 amplitudes, so it does not, and both forms should take the same time.
func BenchmarkFoldedReadout(b *testing.B) {
	g, err := circuits.ParseGraph("grid:4x6")
	if err != nil {
		b.Fatal(err)
	}
	classes := circuits.LayeredClasses(g)
	n := g.Qubits
	st, err := sim.NewState(n, 0)
	if err != nil {
		b.Skip(err)
	}
	rng := rand.New(rand.NewPCG(24, 6))
	s := math.Sqrt(0.5 / float64(len(st.Amp)))
	for i := range st.Amp {
		st.Amp[i] = complex(s*rng.NormFloat64(), s*rng.NormFloat64())
	}
	r := newReadout(n, 2)
	for _, c := range []struct {
		name  string
		class int
	}{{"folds", 3}, {"apart-only", 0}} {
		var ops []sim.Op
		for _, e := range classes[c.class] {
			o := sim.Op{A: e.A, B: e.B}
			circuits.HaarUnitary(rng, 4, o.M[:])
			ops = append(ops, o)
		}
		for _, fold := range []bool{true, false} {
			name := c.name + "/fold=" + strconv.FormatBool(fold)
			b.Run(name, func(b *testing.B) {
				defer func() { foldReadout = true }()
				foldReadout = fold
				b.SetBytes(16 << n)
				for b.Loop() {
					if err := r.run(context.Background(), st, ops); err != nil {
						b.Fatal(err)
					}
					r.finish(st)
				}
			})
		}
	}
}
