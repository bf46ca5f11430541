package sampling

import (
	"errors"
	"fmt"
	"math/rand/v2"

	"mixdepth/circuits"
)

// Noise is the noise model of a sampling run. Each option has one meaning:
//
//   - GateError e: after every two-qubit gate, with probability e a Pauli
//     drawn uniformly from the 15 non-identity two-qubit Paulis acts on the
//     gate's qubits (a Pauli error rate e). It is simulated by quantum
//     trajectories: each trajectory re-simulates the circuit with fresh
//     Pauli draws and gives its share of the shots (see Trajectories).
//   - Fidelity f: global depolarizing. Each shot is drawn from the circuit's
//     output distribution (with its gate errors) with probability f, and
//     uniformly from all 2^n bitstrings otherwise, so that the sampled law is
//     q = f·p + (1−f)/D (Boixo et al. 2018, Nature Physics 14, 595).
//   - Readout01, Readout10: readout errors. At measurement every qubit's bit
//     flips independently, 0 → 1 with probability Readout01 and 1 → 0 with
//     probability Readout10.
//
// Chip, when non-nil, is the whole model instead, element by element, with
// the meanings circuits.ChipNoise gives its rates: the Pauli error rate of
// each coupler after each two-qubit gate on it, the single-qubit Pauli
// error rate of each qubit after each of its single-qubit gates (for a
// *circuits.GateSet G·(u_a ⊗ u_b), after u_a and u_b and before G; for a
// circuits.Finisher, after each gate of the final layer; Haar and Clifford
// two-qubit gates have none), each qubit's readout flips, and its global
// depolarizing fidelity. The other fields must then be zero. A Chip with
// the same rates everywhere draws exactly what the same uniform fields
// draw, so the two give the same shots bit for bit.
//
// The zero Noise is a uniform sampler (Fidelity 0); Ideal is the noiseless
// model.
type Noise struct {
	Fidelity             float64
	GateError            float64
	Readout01, Readout10 float64
	Chip                 *circuits.ChipNoise
}

// Ideal is the noiseless model: Fidelity 1 and no gate or readout errors.
var Ideal = Noise{Fidelity: 1}

// ErrNoiseRange is wrapped by the error of Noise.Validate.
var ErrNoiseRange = errors.New("noise parameter outside [0, 1]")

// Validate returns an error wrapping ErrNoiseRange, naming the parameter,
// unless every parameter lies in [0, 1], and an error wrapping ErrConfig for
// a Chip beside a non-zero uniform field or with slices of different
// lengths. Config.Validate also checks the Chip against the circuit's
// qubits and couplers.
func (n Noise) Validate() error {
	if n.Chip != nil {
		c := n.Chip
		switch {
		case n.Fidelity != 0 || n.GateError != 0 || n.Readout01 != 0 || n.Readout10 != 0:
			return fmt.Errorf("sampling: a noise with a Chip takes its fidelity and rates from it; leave the other fields zero: %w", ErrConfig)
		case len(c.Readout01) != c.Qubits() || len(c.Readout10) != c.Qubits():
			return fmt.Errorf("sampling: chip noise with %d single-qubit rates and %d, %d readout rates: %w", c.Qubits(), len(c.Readout01), len(c.Readout10), ErrConfig)
		}
		// Names are built only for the value at fault: DrawShots validates
		// its noise once per trajectory.
		bad := func(v float64) bool { return !(v >= 0 && v <= 1) }
		if bad(c.Fidelity) {
			return checkUnitRange([]namedValue{{"fidelity", c.Fidelity}})
		}
		for i, v := range c.Pair {
			if bad(v) {
				return checkUnitRange([]namedValue{{fmt.Sprintf("Pauli error rate of coupler %d", i), v}})
			}
		}
		for q := range c.Qubits() {
			for _, r := range []namedValue{{"single-qubit error rate", c.Single[q]}, {"readout error 0→1", c.Readout01[q]}, {"readout error 1→0", c.Readout10[q]}} {
				if bad(r.v) {
					return checkUnitRange([]namedValue{{fmt.Sprintf("%s of qubit %d", r.name, q), r.v}})
				}
			}
		}
		return nil
	}
	return checkUnitRange([]namedValue{{"fidelity", n.Fidelity}, {"gate error", n.GateError},
		{"readout error 0→1", n.Readout01}, {"readout error 1→0", n.Readout10}})
}

// namedValue is a parameter and its name, for messages.
type namedValue struct {
	name string
	v    float64
}

// checkUnitRange returns an error wrapping ErrNoiseRange for the first
// value outside [0, 1] (NaN included).
func checkUnitRange(values []namedValue) error {
	for _, p := range values {
		if !(p.v >= 0 && p.v <= 1) {
			return fmt.Errorf("sampling: %s is %v: %w", p.name, p.v, ErrNoiseRange)
		}
	}
	return nil
}

// check panics if n is invalid.
func (n Noise) check() {
	if err := n.Validate(); err != nil {
		panic(err.Error())
	}
}

// fidelity returns the global depolarizing fidelity: Chip's when set.
func (n Noise) fidelity() float64 {
	if n.Chip != nil {
		return n.Chip.Fidelity
	}
	return n.Fidelity
}

// readoutRates returns the readout flip rates of qubit q: Chip's when set.
func (n Noise) readoutRates(q int) (p01, p10 float64) {
	if n.Chip != nil {
		return n.Chip.Readout01[q], n.Chip.Readout10[q]
	}
	return n.Readout01, n.Readout10
}

// noReadout reports whether no qubit has a readout flip.
func (n Noise) noReadout() bool {
	if n.Chip == nil {
		return n.Readout01 == 0 && n.Readout10 == 0
	}
	for q := range n.Chip.Qubits() {
		if n.Chip.Readout01[q] != 0 || n.Chip.Readout10[q] != 0 {
			return false
		}
	}
	return true
}

// Readout returns the outcome x of qubits qubits after independent readout
// flips: bit q = 0 becomes 1 with probability Readout01 and bit q = 1 becomes
// 0 with probability Readout10 (qubit q's rates with a Chip). It draws from
// rng only for non-zero rates, qubit by qubit. It panics if a Chip has
// fewer than qubits qubits.
func (n Noise) Readout(rng *rand.Rand, x uint64, qubits int) uint64 {
	if n.noReadout() {
		return x
	}
	for q := range qubits {
		p01, p10 := n.readoutRates(q)
		bit := uint64(1) << q
		if x&bit == 0 {
			if p01 > 0 && rng.Float64() < p01 {
				x |= bit
			}
		} else if p10 > 0 && rng.Float64() < p10 {
			x &^= bit
		}
	}
	return x
}

// DrawShots appends shots outcomes of qubits qubits to dst and returns it.
// Each shot is drawn from the alias table a (the circuit's output
// distribution) with probability nz.Fidelity and uniformly from the 2^qubits
// outcomes otherwise, then read out through nz's readout flips. Gate errors
// are not DrawShots' business: a holds the distribution of one trajectory.
// The cost is O(qubits) per shot with readout errors and O(1) without. It
// panics if a does not have 2^qubits outcomes or nz is invalid.
func DrawShots(dst []uint64, rng *rand.Rand, a *Alias, qubits, shots int, nz Noise) []uint64 {
	nz.check()
	if qubits < 1 || qubits > 32 || a.Len() != 1<<qubits {
		panic(fmt.Sprintf("sampling: alias table of %d outcomes for %d qubits", a.Len(), qubits))
	}
	dim := uint64(1) << qubits
	f := nz.fidelity()
	for range shots {
		var x uint64
		if f == 1 || rng.Float64() < f {
			x = uint64(a.Draw(rng))
		} else {
			x = rng.Uint64N(dim)
		}
		dst = append(dst, nz.Readout(rng, x, qubits))
	}
	return dst
}

// Pauli indices: a two-qubit Pauli on gate qubits (A, B) is p = 4·pA + pB
// with 0 = I, 1 = X, 2 = Y, 3 = Z; p = 0 is the identity.
const pauliCount = 16

// pauliMatrices[p] is the 4×4 matrix of Pauli p in the gate basis
// |b_A b_B⟩, index 2·b_A + b_B: the Kronecker product P_A ⊗ P_B.
var pauliMatrices = func() (m [pauliCount][16]complex128) {
	one := [4][4]complex128{
		{1, 0, 0, 1},    // I
		{0, 1, 1, 0},    // X
		{0, -1i, 1i, 0}, // Y
		{1, 0, 0, -1},   // Z
	} // row-major 2×2
	for p := range pauliCount {
		pa, pb := one[p/4], one[p%4]
		for i := range 2 {
			for j := range 2 {
				for k := range 2 {
					for l := range 2 {
						m[p][(2*i+j)*4+2*k+l] = pa[2*i+k] * pb[2*j+l]
					}
				}
			}
		}
	}
	return m
}()

// drawPauli returns 0 (no error) with probability 1−e and otherwise one of
// the 15 non-identity two-qubit Paulis 1..15, uniformly.
func drawPauli(rng *rand.Rand, e float64) int {
	if e == 0 || rng.Float64() >= e {
		return 0
	}
	return 1 + rng.IntN(pauliCount-1)
}

// onePauli[p] is the 2×2 Pauli p (0 = I, 1 = X, 2 = Y, 3 = Z), row-major.
var onePauli = [4][4]complex128{
	{1, 0, 0, 1},
	{0, 1, 1, 0},
	{0, -1i, 1i, 0},
	{1, 0, 0, -1},
}

// drawSingle returns 0 (no error) with probability 1−e and otherwise one of
// X, Y, Z (1..3), uniformly. It draws nothing for e = 0.
func drawSingle(rng *rand.Rand, e float64) uint8 {
	if e == 0 || rng.Float64() >= e {
		return 0
	}
	return uint8(1 + rng.IntN(3))
}
