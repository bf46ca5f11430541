package scan

import (
	"math"
	"math/rand/v2"
	"strconv"
	"testing"

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
