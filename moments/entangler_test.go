package moments_test

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"mixdepth/circuits"
	"mixdepth/moments"
	"mixdepth/sim"
)

func entMaxDiff(a, b *moments.Transfer) float64 {
	var d float64
	for r := 0; r < 4; r++ {
		for c := 0; c < 4; c++ {
			d = max(d, math.Abs(a[r][c]-b[r][c]))
		}
	}
	return d
}

func entNamed(t *testing.T, name string) moments.Transfer {
	t.Helper()
	g, ok := circuits.Entangler(name)
	if !ok {
		t.Fatalf("no entangler %q", name)
	}
	return moments.EntanglerTransfer(&g)
}

// entReadout is E[Z] for two qubits from their first gate's transfer: each
// fresh qubit enters as (I+S)/6, v₀ = (1/36)(1, 1, 1, 1), and after the
// final single-qubit layer every qubit reads Σ_x ⟨xx|σ|xx⟩ = 2 for σ = I
// or S, so E[Z] = 4 Σ_τ (T·v₀)_τ (Hunter-Jones 2019, arXiv:1905.12053).
func entReadout(t *moments.Transfer) float64 {
	var z float64
	for r := 0; r < 4; r++ {
		for c := 0; c < 4; c++ {
			z += 4 * t[r][c] / 36
		}
	}
	return z
}

// TestEntanglerTransferIdentity checks that the identity "entangler" gives
// the identity transfer (the projection of V_σ is V_σ), to 1e-15 (sums of
// a few O(1) terms).
func TestEntanglerTransferIdentity(t *testing.T) {
	id := [16]complex128{0: 1, 5: 1, 10: 1, 15: 1}
	got := moments.EntanglerTransfer(&id)
	want := moments.Transfer{{1, 0, 0, 0}, {0, 1, 0, 0}, {0, 0, 1, 0}, {0, 0, 0, 1}}
	if d := entMaxDiff(&got, &want); d > 1e-15 {
		t.Errorf("identity transfer %v, off by %g", got, d)
	}
}

// TestEntanglerTransferReadout checks the two-qubit readout formula
// E[Z] = 4 Σ_τ (T·v₀)_τ on published values: the Haar U(4) transfer gives
// Z_H = 2/(D+1) = 2/5 for D = 4, and the identity gives two independent
// Haar qubit states, Z = (2/3)² (Haar collision probability for D = 2; the
// Beta(1, D−1) law, Porter & Thomas 1956). Then CZ: one cz+haar1
// gate followed by the final layer gives E[Z] = 32/81, derived by hand:
//
// Write Z = Tr[ρ^⊗2 M], M = ⊗_q (II + ZZ)/2 on the two copies. The final
// twirl turns each qubit's ZZ into (XX+YY+ZZ)/3, so M = ⊗_q ½ Σ_P w(P) P⊗P
// with w(I) = 1, w(X) = w(Y) = w(Z) = 1/3; the first twirl makes
// E[ρ_q^⊗2] = ¼ Σ_P w(P) P⊗P. With w(P_a P_b) = w(P_a) w(P_b) and
// Tr[(P⊗P)(Q⊗Q)] = 16 δ_PQ for two-qubit Paulis,
//
//	E[Z] = ¼ Σ_P w(P) w(CZ P CZ†),
//
// a sum over the 16 Paulis P (signs cancel in P⊗P). CZ fixes II, ZI, IZ, ZZ
// and maps XI ↔ XZ, YI ↔ YZ, IX ↔ ZX, IY ↔ ZY, XX ↔ YY, XY ↔ YX. The terms:
// II 1; ZI, IZ 1/9 each; the 8 weight-one/weight-two pairs 1/27 each; ZZ,
// XX, YY, XY, YX 1/81 each. Sum 1 + 2/9 + 8/27 + 5/81 = 128/81, so
// E[Z] = 32/81. Tolerance 1e-14: a few dozen O(1) terms.
func TestEntanglerTransferReadout(t *testing.T) {
	id := [16]complex128{0: 1, 5: 1, 10: 1, 15: 1}
	ti := moments.EntanglerTransfer(&id)
	tcz := entNamed(t, "cz")
	for _, tc := range []struct {
		name string
		t    *moments.Transfer
		want float64
	}{
		{"haar", &moments.HaarTransfer, 2.0 / 5},
		{"identity", &ti, 4.0 / 9},
		{"cz", &tcz, 32.0 / 81},
	} {
		if got := entReadout(tc.t); math.Abs(got-tc.want) > 1e-14 {
			t.Errorf("%s: E[Z] = %.15g, want %.15g", tc.name, got, tc.want)
		}
	}
}

// TestEntanglerTransferStructure checks properties every entangler's
// transfer must have: II and SS are fixed (G^⊗2 commutes with the identity
// and with the swap of the two copies), the transfer is symmetric under
// exchanging the qubits (every two-qubit gate is locally equivalent to its
// swap conjugate by the KAK decomposition; Khaneja & Glaser 2001, Kraus &
// Cirac 2001), it depends only on the local-equivalence class (CNOT =
// (I⊗H) CZ (I⊗H), so T_cnot = T_cz), iSWAP = SWAP·CZ·(S⊗S) (from memory,
// checked on the basis in the circuits tests' definitions) gives T_iswap =
// P_swap·T_cz, and no entangler has the Haar transfer. Tolerance 1e-14.
func TestEntanglerTransferStructure(t *testing.T) {
	tcz := entNamed(t, "cz")
	for _, name := range circuits.EntanglerNames {
		tr := entNamed(t, name)
		for r := 0; r < 4; r++ {
			for _, c := range []int{0, 3} {
				want := 0.0
				if r == c {
					want = 1
				}
				if math.Abs(tr[r][c]-want) > 1e-14 {
					t.Errorf("%s: T[%d][%d] = %g, want %g", name, r, c, tr[r][c], want)
				}
			}
		}
		swap := [4]int{0, 2, 1, 3}
		for r := 0; r < 4; r++ {
			for c := 0; c < 4; c++ {
				if math.Abs(tr[r][c]-tr[swap[r]][swap[c]]) > 1e-14 {
					t.Errorf("%s: transfer not symmetric under exchanging the qubits: %v", name, tr)
				}
			}
		}
		if d := entMaxDiff(&tr, &moments.HaarTransfer); d < 0.05 {
			t.Errorf("%s: transfer within %g of HaarTransfer", name, d)
		}
	}
	tcnot := entNamed(t, "cnot")
	if d := entMaxDiff(&tcnot, &tcz); d > 1e-14 {
		t.Errorf("T_cnot differs from T_cz by %g", d)
	}
	tisw := entNamed(t, "iswap")
	var want moments.Transfer
	for r, pr := range [4]int{0, 2, 1, 3} {
		want[r] = tcz[pr]
	}
	if d := entMaxDiff(&tisw, &want); d > 1e-14 {
		t.Errorf("T_iswap differs from P_swap·T_cz by %g: %v vs %v", d, tisw, want)
	}
}

// TestEntanglerTransferCliffordAverage checks that averaging the transfer
// over a unitary 2-design gives HaarTransfer: T is a polynomial of degree
// (2, 2) in (G, Ḡ), so its mean over the two-qubit Clifford group (a
// 3-design: Webb 2016; Zhu, PRA 96, 062336, 2017) equals its Haar average
// exactly. Tolerance 1e-12: a mean of 11 520 transfers with O(1) entries.
func TestEntanglerTransferCliffordAverage(t *testing.T) {
	var mean moments.Transfer
	group := circuits.CliffordGroup()
	for i := range group {
		tr := moments.EntanglerTransfer(&group[i])
		for r := 0; r < 4; r++ {
			for c := 0; c < 4; c++ {
				mean[r][c] += tr[r][c] / float64(len(group))
			}
		}
	}
	if d := entMaxDiff(&mean, &moments.HaarTransfer); d > 1e-12 {
		t.Errorf("Clifford-averaged transfer %v differs from HaarTransfer by %g", mean, d)
	}
}

// TestEntanglerTransferHaarAverage checks the same Haar average by Monte
// Carlo over 3000 Haar U(4) gates (Mezzadri 2007): every entry within 4
// standard errors (estimated from the samples; exact entries such as the II
// column have zero spread and must match to 1e-12).
func TestEntanglerTransferHaarAverage(t *testing.T) {
	rng := rand.New(rand.NewPCG(41, 43))
	const n = 3000
	var sum, sum2 moments.Transfer
	for i := 0; i < n; i++ {
		var g [16]complex128
		circuits.HaarUnitary(rng, 4, g[:])
		tr := moments.EntanglerTransfer(&g)
		for r := 0; r < 4; r++ {
			for c := 0; c < 4; c++ {
				sum[r][c] += tr[r][c]
				sum2[r][c] += tr[r][c] * tr[r][c]
			}
		}
	}
	for r := 0; r < 4; r++ {
		for c := 0; c < 4; c++ {
			mean := sum[r][c] / n
			se := math.Sqrt(max(sum2[r][c]/n-mean*mean, 0) / (n - 1))
			if math.Abs(mean-moments.HaarTransfer[r][c]) > 4*se+1e-12 {
				t.Errorf("T[%d][%d]: mean %.5f ± %.5f, want %g", r, c, mean, se, moments.HaarTransfer[r][c])
			}
		}
	}
}

// entPredict runs the transfer on a chain of gates over n qubits, starting
// from (I+S)/6 on every qubit (each qubit's first gate twirls |0⟩⟨0|^⊗2) and
// reading out 2 per qubit after the final layer: E[Z] = 2^n Σ_σ c(σ). It is
// valid when every qubit is touched. Coefficient index Σ_q σ_q 2^q.
func entPredict(n int, edges []circuits.Edge, tr *moments.Transfer) float64 {
	c := make([]float64, 1<<n)
	for i := range c {
		c[i] = math.Pow(1.0/6, float64(n))
	}
	for _, e := range edges {
		next := make([]float64, len(c))
		for i, v := range c {
			in := 2*(i>>e.A&1) + (i >> e.B & 1)
			base := i &^ (1<<e.A | 1<<e.B)
			for out := 0; out < 4; out++ {
				next[base|(out>>1)<<e.A|(out&1)<<e.B] += tr[out][in] * v
			}
		}
		c = next
	}
	var z float64
	for _, v := range c {
		z += v
	}
	return z * math.Pow(2, float64(n))
}

// TestEntanglerTransferMonteCarlo simulates "+haar1" circuits with their
// final single-qubit layer on a state vector and compares the mean collision
// probability with the transfer's prediction: 2 qubits with one gate, and 3
// qubits with gates on (0,1), (1,2), (0,1) (and iSWAP on (1,0), (2,1)).
// 20 000 instances each (fixed seeds); the mean must lie within 4 standard
// errors (sd/√N from the same samples) of the prediction. To show the test
// has power, where HaarTransfer predicts a value more than 8 standard errors
// away (sqrt-iSWAP, iSWAP), the simulation must reject that value by more
// than 4 standard errors.
func TestEntanglerTransferMonteCarlo(t *testing.T) {
	cases := []struct {
		gates  string
		qubits int
		layers [][]circuits.Edge
	}{
		{"cz+haar1", 2, [][]circuits.Edge{{{A: 0, B: 1}}}},
		{"cz+haar1", 3, [][]circuits.Edge{{{A: 0, B: 1}}, {{A: 1, B: 2}}, {{A: 0, B: 1}}}},
		{"sqrt-iswap+haar1", 3, [][]circuits.Edge{{{A: 0, B: 1}}, {{A: 1, B: 2}}, {{A: 0, B: 1}}}},
		{"iswap+haar1", 3, [][]circuits.Edge{{{A: 1, B: 0}}, {{A: 2, B: 1}}}},
	}
	for ci, tc := range cases {
		e, err := circuits.NewEnsemble(tc.gates)
		if err != nil {
			t.Fatal(err)
		}
		tr, finishes, err := moments.TransferFor(e)
		if err != nil || !finishes {
			t.Fatalf("%s: TransferFor: final layer %v, %v; want an entangler set with its final layer", tc.gates, finishes, err)
		}
		var chain []circuits.Edge
		for _, l := range tc.layers {
			chain = append(chain, l...)
		}
		want := entPredict(tc.qubits, chain, &tr)
		sched := &circuits.Layered{Classes: tc.layers}
		depth := len(tc.layers)
		st, err := sim.NewState(tc.qubits, 0)
		if err != nil {
			t.Fatal(err)
		}
		const n = 20000
		var sum, sum2 float64
		var gates []circuits.Gate
		var final [][4]complex128
		for inst := 0; inst < n; inst++ {
			st.Reset()
			b := circuits.NewBuilder(sched, e, uint64(100+ci), inst)
			for step := 0; step < depth; step++ {
				gates = b.Next(gates[:0])
				for i := range gates {
					st.Apply2(gates[i].A, gates[i].B, &gates[i].M, 1)
				}
			}
			final, _ = circuits.FinalLayer(e, tc.qubits, uint64(100+ci), inst, depth, final)
			for q := range final {
				st.Apply1(q, &final[q], 1)
			}
			var z float64
			for _, a := range st.Amp {
				p := real(a)*real(a) + imag(a)*imag(a)
				z += p * p
			}
			sum += z
			sum2 += z * z
		}
		mean := sum / n
		se := math.Sqrt((sum2/n - mean*mean) / (n - 1))
		if math.Abs(mean-want) > 4*se {
			t.Errorf("%s on %d qubits: simulated E[Z] = %.5f ± %.5f, transfer predicts %.5f", tc.gates, tc.qubits, mean, se, want)
		}
		haar := entPredict(tc.qubits, chain, &moments.HaarTransfer)
		if math.Abs(haar-want) > 8*se && math.Abs(mean-haar) <= 4*se {
			t.Errorf("%s on %d qubits: simulated E[Z] = %.5f ± %.5f does not reject the Haar-transfer value %.5f", tc.gates, tc.qubits, mean, se, haar)
		}
		t.Logf("%s on %d qubits: simulated %.5f ± %.5f, predicted %.5f (Haar transfer %.5f)", tc.gates, tc.qubits, mean, se, want, haar)
	}
}

// TestEntanglerTransferEigenvalues checks Eigenvalues: HaarTransfer is
// triangular after ordering the basis (II, SS, IS, SI), with diagonal
// (1, 1, 0, 0); the identity has four eigenvalues 1; for every entangler
// the power sums Σ λ^k equal Tr(T^k) for k = 1..4, which determine the
// spectrum (Newton's identities; common practice), to 1e-12 (gonum's QR
// iteration on a 4×4 matrix is accurate to ~1e-15).
func TestEntanglerTransferEigenvalues(t *testing.T) {
	check := func(name string, got []complex128, want []complex128) {
		t.Helper()
		if len(got) != len(want) {
			t.Fatalf("%s: %d eigenvalues", name, len(got))
		}
		for i := range want {
			if cmplx.Abs(got[i]-want[i]) > 1e-12 {
				t.Errorf("%s: eigenvalues %v, want %v", name, got, want)
				return
			}
		}
	}
	check("haar", moments.HaarTransfer.Eigenvalues(), []complex128{1, 1, 0, 0})
	id := moments.Transfer{{1, 0, 0, 0}, {0, 1, 0, 0}, {0, 0, 1, 0}, {0, 0, 0, 1}}
	check("identity", id.Eigenvalues(), []complex128{1, 1, 1, 1})
	for _, name := range circuits.EntanglerNames {
		tr := entNamed(t, name)
		ev := tr.Eigenvalues()
		for i := 1; i < len(ev); i++ {
			if cmplx.Abs(ev[i]) > cmplx.Abs(ev[i-1])+1e-15 {
				t.Errorf("%s: eigenvalues %v not in decreasing modulus", name, ev)
			}
		}
		pow := tr
		for k := 1; k <= 4; k++ {
			var trace float64
			for i := 0; i < 4; i++ {
				trace += pow[i][i]
			}
			var sum complex128
			for _, l := range ev {
				sum += cmplx.Pow(l, complex(float64(k), 0))
			}
			if cmplx.Abs(sum-complex(trace, 0)) > 1e-12 {
				t.Errorf("%s: Σ λ^%d = %v, Tr(T^%d) = %g", name, k, sum, k, trace)
			}
			var next moments.Transfer
			for r := 0; r < 4; r++ {
				for c := 0; c < 4; c++ {
					for j := 0; j < 4; j++ {
						next[r][c] += pow[r][j] * tr[j][c]
					}
				}
			}
			pow = next
		}
		t.Logf("%s: T = %v, eigenvalues %v", name, tr, ev)
	}
}
