package circuits

import (
	"encoding/binary"
	"math/rand/v2"
)

// Stream returns the random stream of instance i of a run with seed s. It is
// a ChaCha8 generator keyed by (s, i) alone, so an instance's circuit does
// not depend on the worker count, the order of work or the split into parts.
func Stream(seed uint64, instance int) *rand.Rand {
	var key [32]byte
	copy(key[:8], "mixdepth")
	binary.LittleEndian.PutUint64(key[8:], seed)
	binary.LittleEndian.PutUint64(key[16:], uint64(instance))
	copy(key[24:], "instance")
	return rand.New(rand.NewChaCha8(key))
}

// Gate is a two-qubit gate M on qubits (A, B), with M in the basis
// |b_A b_B⟩, index 2·b_A + b_B.
type Gate struct {
	A, B int
	M    [16]complex128
}

// Builder produces the gates of one circuit instance step by step, drawing
// edges and gates from the instance's own stream.
type Builder struct {
	Schedule Schedule
	Ensemble Ensemble
	rng      *rand.Rand
	t        int
	edges    []Edge
}

// NewBuilder returns a builder for instance i of the run with seed s.
func NewBuilder(s Schedule, e Ensemble, seed uint64, instance int) *Builder {
	return &Builder{Schedule: s, Ensemble: e, rng: Stream(seed, instance)}
}

// Steps returns how many steps have been built so far.
func (b *Builder) Steps() int { return b.t }

// Next appends the gates of the next step to dst and returns it.
func (b *Builder) Next(dst []Gate) []Gate {
	b.edges = b.Schedule.Step(b.t, b.rng, b.edges[:0])
	on, perEdge := b.Ensemble.(EdgeEnsemble)
	for _, e := range b.edges {
		g := Gate{A: e.A, B: e.B}
		if perEdge {
			on.GateOn(e, b.rng, &g.M)
		} else {
			b.Ensemble.Gate(b.rng, &g.M)
		}
		dst = append(dst, g)
	}
	b.t++
	return dst
}
