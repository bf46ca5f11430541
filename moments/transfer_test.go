package moments

import (
	"math"
	"testing"
)

// TestTransferHaarWeingarten derives the Haar U(4) transfer from the dense
// Weingarten twirl (Collins, IMRN 2003: Wg(e) = 1/15, Wg(swap) = −1/60 for
// d = 4) applied to each V_σ, and compares it with HaarTransfer. Tolerance:
// a few dozen float64 operations on numbers of order 1.
func TestTransferHaarWeingarten(t *testing.T) {
	got := bruteTransfer(t, bruteHaar)
	for r := range 4 {
		for c := range 4 {
			if math.Abs(got[r][c]-HaarTransfer[r][c]) > 1e-14 {
				t.Errorf("T[%d][%d]: Weingarten %.16g, HaarTransfer %.16g", r, c, got[r][c], HaarTransfer[r][c])
			}
		}
	}
}

// TestTransferDressedSymmetric checks that the transfers of CNOT and of a
// partial entangler, dressed with single-qubit Haar gates, are symmetric
// under exchanging the qubits (every two-qubit gate is locally equivalent to
// its swap conjugate: the Cartan/KAK decomposition, Khaneja and Glaser,
// Chem. Phys. 267, 11, 2001), while an arbitrary matrix is not.
func TestTransferDressedSymmetric(t *testing.T) {
	for name, g := range map[string]*[16]float64{"cnot": &bruteCNOT, "givens(0.3)": bruteGivens(0.3)} {
		tr := bruteTransfer(t, bruteDressed(g))
		if !tr.symmetric(1e-12) {
			t.Errorf("%s: dressed transfer %v is not swap symmetric", name, tr)
		}
	}
	asym := Transfer{{1, 0.2, 0.5, 0}, {0, 0.1, 0, 0}, {0, 0, 0.3, 0}, {0, 0.2, 0.5, 1}}
	if asym.symmetric(1e-12) {
		t.Errorf("%v reported symmetric", asym)
	}
	if !HaarTransfer.symmetric(0) {
		t.Error("HaarTransfer reported asymmetric")
	}
}

// TestTransferFreshQubit checks the entry of fresh qubits (an untouched qubit acts in later twirls like (I+S)/6, same Tr and Tr(·S)):
// |0⟩⟨0|^⊗2 has Tr = Tr(·S) = 1, like (I+S)/6 (Tr I = 4, Tr S = 2 on one
// qubit's two copies), so two fresh qubits enter a gate with readout-weighted
// weight 1/9 on each of II, IS, SI, SS; a Haar gate keeps II and SS and
// sends IS and SI to weight 4/5 each, total (1 + 4/5 + 4/5 + 1)/9 = 2/5,
// which is Z_H = 2/(D+1) for D = 4 (Dalzell, Hunter-Jones, Brandão 2022).
func TestTransferFreshQubit(t *testing.T) {
	m := HaarTransfer.withFresh(true, true)
	var sum float64
	for r := range 4 {
		sum += m[r][0]
	}
	if math.Abs(sum-0.4) > 1e-15 {
		t.Errorf("one Haar gate on fresh qubits: Σ_row T'[row][II] = %.17g, want 2/5", sum)
	}
	l := HaarTransfer.threeState(1)
	sum = 0
	for r := range 4 {
		sum += l[r][8] // input FF
	}
	if math.Abs(sum-0.4) > 1e-15 {
		t.Errorf("three-state FF column sums to %.17g, want 2/5", sum)
	}
}

// TestWallDecay: a Haar U(4) gate erases a domain wall in one gate
// (IS → (2/5)(II+SS), so every non-fixed eigenvalue is 0; Hunter-Jones 2019,
// arXiv:1905.12053), while a swap moves it unchanged (eigenvalue −1 on
// IS − SI), so its wall decay is 1.
func TestWallDecay(t *testing.T) {
	if d := HaarTransfer.WallDecay(); d > 1e-12 {
		t.Errorf("Haar wall decay %g, want 0", d)
	}
	swap := Transfer{{1, 0, 0, 0}, {0, 0, 1, 0}, {0, 1, 0, 0}, {0, 0, 0, 1}}
	if d := swap.WallDecay(); d < 1-1e-12 || d > 1+1e-12 {
		t.Errorf("swap wall decay %g, want 1", d)
	}
}
