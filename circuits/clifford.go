package circuits

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"slices"
	"sync"
)

// CliffordOrder is the number of two-qubit Clifford unitaries modulo global
// phases: |C_n/U(1)| = 2^(n²+2n) Π_{j=1..n} (4^j − 1), which is 11 520 for
// n = 2 (Koenig & Smolin, "How to efficiently select an arbitrary Clifford
// group element", J. Math. Phys. 55, 122202, 2014).
const CliffordOrder = 11520

// Clifford is the uniform distribution on the two-qubit Clifford group
// modulo phases. The group is a unitary 3-design (Webb, "The Clifford group
// forms a unitary 3-design", QIC 16, 1379, 2016; Zhu, PRA 96, 062336, 2017),
// so its second moments are those of Haar U(4).
type Clifford struct{}

// Name returns "clifford".
func (Clifford) Name() string { return "clifford" }

// Gate copies a uniformly drawn element of CliffordGroup into m.
func (Clifford) Gate(rng *rand.Rand, m *[16]complex128) {
	t := cliffordTable()
	*m = t[rng.IntN(len(t))]
}

// SecondMoments reports HaarMoments: a 2-design has the two-copy average of
// Haar U(4).
func (Clifford) SecondMoments() (MomentKind, [16]complex128) {
	return HaarMoments, [16]complex128{}
}

// CliffordGroup returns a copy of the table of the 11 520 two-qubit Clifford
// unitaries modulo phases, each with its canonical phase (see cliffordKey).
// The table is generated once, by breadth-first closure of {H⊗I, I⊗H, S⊗I,
// I⊗S, CNOT} starting from the identity; its order is fixed, so Clifford
// gates drawn with the same stream are reproducible.
func CliffordGroup() [][16]complex128 {
	return slices.Clone(cliffordTable())
}

var (
	cliffordOnce sync.Once
	cliffords    [][16]complex128
)

// cliffordTable returns the shared table, generating it on first use.
func cliffordTable() [][16]complex128 {
	cliffordOnce.Do(func() { cliffords = generateCliffords() })
	return cliffords
}

// cliffordGenerators are H and S on each qubit and CNOT (control a, target
// b), in the basis 2·b_a + b_b. They generate the two-qubit Clifford group
// modulo phases (Gottesman, "The Heisenberg representation of quantum
// computers", 1998, arXiv quant-ph/9807006; from memory).
func cliffordGenerators() [][16]complex128 {
	s := complex(1/math.Sqrt2, 0)
	h := [4]complex128{s, s, s, -s}
	ph := [4]complex128{1, 0, 0, 1i}
	id := [4]complex128{1, 0, 0, 1}
	var gens [][16]complex128
	for _, pair := range [][2]*[4]complex128{{&h, &id}, {&id, &h}, {&ph, &id}, {&id, &ph}} {
		var g [16]complex128
		kron2(&g, pair[0], pair[1])
		gens = append(gens, g)
	}
	cnot, _ := Entangler("cnot")
	return append(gens, cnot)
}

// generateCliffords closes the generators under left multiplication,
// breadth first, identifying matrices that differ by a phase.
func generateCliffords() [][16]complex128 {
	gens := cliffordGenerators()
	id := [16]complex128{0: 1, 5: 1, 10: 1, 15: 1}
	table := [][16]complex128{id}
	seen := map[cliffordKeyT]bool{cliffordKey(&id): true}
	for head := 0; head < len(table); head++ {
		for i := range gens {
			var m [16]complex128
			mul4(&m, &gens[i], &table[head])
			canonicalPhase(&m)
			k := cliffordKey(&m)
			if !seen[k] {
				seen[k] = true
				table = append(table, m)
			}
		}
	}
	if len(table) != CliffordOrder {
		panic("circuits: Clifford closure found a wrong group order")
	}
	return table
}

// canonicalPhase divides m by the phase of its first entry of largest
// modulus, so that matrices equal up to a phase become equal up to rounding.
// Entries of a Clifford unitary have moduli in {0, 1/2, 1/√2, 1}, far apart
// compared with the tolerance 1e-6 used to pick "largest".
func canonicalPhase(m *[16]complex128) {
	var big float64
	for _, v := range m {
		big = max(big, cmplx.Abs(v))
	}
	for _, v := range m {
		if a := cmplx.Abs(v); a >= big-1e-6 {
			ph := v / complex(a, 0)
			for i := range m {
				m[i] /= ph
			}
			return
		}
	}
}

// cliffordKeyT is a matrix rounded to a grid of 1e-6.
type cliffordKeyT [32]int32

// cliffordKey rounds the entries of m (already in canonical phase) to a grid
// of 1e-6: far coarser than the rounding errors of the closure (~1e-15) and
// far finer than the gaps between the values Clifford entries take (sums of
// ±1/2, ±1/√2, ±1 times powers of i, which differ by more than 0.1).
func cliffordKey(m *[16]complex128) cliffordKeyT {
	var k cliffordKeyT
	for i, v := range m {
		k[2*i] = int32(math.Round(real(v) * 1e6))
		k[2*i+1] = int32(math.Round(imag(v) * 1e6))
	}
	return k
}
