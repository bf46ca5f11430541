package circuits

import (
	"encoding/binary"
	"math/rand/v2"
)

// Finisher is implemented by ensembles whose circuits end with a layer of
// single-qubit gates on every qubit before measurement (GateSet: Haar U(2)
// for "…+haar1" and "haar" files, the finite set otherwise). The layer makes
// a Haar-dressed ensemble invariant under single-qubit rotations up to the
// readout, as random-circuit experiments commonly do (common practice).
type Finisher interface {
	// Final draws one single-qubit gate of the final layer into m
	// (row-major 2×2).
	Final(rng *rand.Rand, m *[4]complex128)
}

// FinalStream returns the random stream of the final layer of instance i at
// depth d of a run with seed s. It is keyed by (s, i, d) only, apart from
// the instance's gate stream (Stream), so the circuit's gate layers do not
// depend on which depths are read out.
func FinalStream(seed uint64, instance, depth int) *rand.Rand {
	var key [32]byte
	copy(key[:8], "mixfinal")
	binary.LittleEndian.PutUint64(key[8:], seed)
	binary.LittleEndian.PutUint64(key[16:], uint64(instance))
	binary.LittleEndian.PutUint64(key[24:], uint64(depth))
	return rand.New(rand.NewChaCha8(key))
}

// FinalLayer appends to dst[:0] the final single-qubit gates of instance i at
// depth d on n qubits, gate q for qubit q, drawn in qubit order from
// FinalStream(seed, i, d), and returns it with ok true. When e is not a
// Finisher it returns dst[:0] and ok false.
func FinalLayer(e Ensemble, n int, seed uint64, instance, depth int, dst [][4]complex128) (layer [][4]complex128, ok bool) {
	dst = dst[:0]
	f, ok := e.(Finisher)
	if !ok {
		return dst, false
	}
	rng := FinalStream(seed, instance, depth)
	for q := 0; q < n; q++ {
		var m [4]complex128
		f.Final(rng, &m)
		dst = append(dst, m)
	}
	return dst, true
}
