package circuits_test

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"mixdepth/circuits"
)

// cliffPaulis are the 16 two-qubit Paulis P_a ⊗ P_b in the basis 2·b_a + b_b,
// index 4·p_a + p_b with p = 0 (I), 1 (X), 2 (Y), 3 (Z).
var cliffPaulis = func() [16][16]complex128 {
	one := [4][4]complex128{{1, 0, 0, 1}, {0, 1, 1, 0}, {0, -1i, 1i, 0}, {1, 0, 0, -1}}
	var out [16][16]complex128
	for pa := 0; pa < 4; pa++ {
		for pb := 0; pb < 4; pb++ {
			out[4*pa+pb] = cliffKron(&one[pa], &one[pb])
		}
	}
	return out
}()

func cliffKron(a, b *[4]complex128) [16]complex128 {
	var m [16]complex128
	for i := 0; i < 2; i++ {
		for j := 0; j < 2; j++ {
			for k := 0; k < 2; k++ {
				for l := 0; l < 2; l++ {
					m[(2*i+j)*4+2*k+l] = a[2*i+k] * b[2*j+l]
				}
			}
		}
	}
	return m
}

func cliffMul(a, b *[16]complex128) [16]complex128 {
	var m [16]complex128
	for i := 0; i < 4; i++ {
		for j := 0; j < 4; j++ {
			for k := 0; k < 4; k++ {
				m[i*4+j] += a[i*4+k] * b[k*4+j]
			}
		}
	}
	return m
}

func cliffAdjoint(a *[16]complex128) [16]complex128 {
	var m [16]complex128
	for i := 0; i < 4; i++ {
		for j := 0; j < 4; j++ {
			m[i*4+j] = cmplx.Conj(a[j*4+i])
		}
	}
	return m
}

// cliffPTMKey returns the Pauli transfer matrix R[P][Q] = Tr(P g Q g†)/4 of g
// as a signed permutation (entry Q holds ±(P+1) for the one P with
// R[P][Q] = ±1), and ok false if R is not a signed permutation matrix to
// 1e-9 (then g is not a Clifford unitary). The adjoint action g·g† ignores
// global phases and determines g up to one (its kernel is the centre of
// U(4); common practice), so equal keys mean equal modulo phase, and the key
// is independent of the phase convention of the table under test.
func cliffPTMKey(g *[16]complex128) (key [16]int8, ok bool) {
	gd := cliffAdjoint(g)
	for q := 0; q < 16; q++ {
		gq := cliffMul(g, &cliffPaulis[q])
		x := cliffMul(&gq, &gd)
		found := 0
		for p := 0; p < 16; p++ {
			var tr complex128 // Tr(P X)
			for i := 0; i < 4; i++ {
				for j := 0; j < 4; j++ {
					tr += cliffPaulis[p][i*4+j] * x[j*4+i]
				}
			}
			r := real(tr) / 4
			switch {
			case math.Abs(imag(tr)) > 1e-9:
				return key, false
			case math.Abs(r-1) < 1e-9:
				key[q] = int8(p + 1)
				found++
			case math.Abs(r+1) < 1e-9:
				key[q] = -int8(p + 1)
				found++
			case math.Abs(r) > 1e-9:
				return key, false
			}
		}
		if found != 1 {
			return key, false
		}
	}
	return key, true
}

// TestCliffordGroupOrder checks the size of the table against the order of
// the n-qubit Clifford group modulo phases, 2^(n²+2n) Π_{j=1..n} (4^j − 1)
// (Koenig & Smolin, "How to efficiently select an arbitrary Clifford group
// element", J. Math. Phys. 55, 122202, 2014; from memory), = 11 520 for
// n = 2; equivalently |Sp(4, F_2)|·4² = 720·16 (common practice).
func TestCliffordGroupOrder(t *testing.T) {
	n := 2
	order := 1 << (n*n + 2*n)
	for j := 1; j <= n; j++ {
		order *= 1<<(2*j) - 1
	}
	if order != 720*16 {
		t.Fatalf("formula gives %d, want 720·16", order)
	}
	if got := len(circuits.CliffordGroup()); got != order {
		t.Fatalf("CliffordGroup has %d elements, want %d", got, order)
	}
	if circuits.CliffordOrder != order {
		t.Fatalf("CliffordOrder = %d, want %d", circuits.CliffordOrder, order)
	}
}

// TestCliffordGroupElements checks that every element is unitary (to 1e-12:
// products of ~20 generators accumulate ~1e-15 per entry), maps Paulis to
// signed Paulis (the definition of a Clifford unitary; Gottesman 1998), and
// that no two elements are equal modulo phase (distinct Pauli transfer
// matrices). With the order test, the table is the whole group.
func TestCliffordGroupElements(t *testing.T) {
	group := circuits.CliffordGroup()
	seen := make(map[[16]int8]int, len(group))
	for i := range group {
		g := &group[i]
		gd := cliffAdjoint(g)
		p := cliffMul(&gd, g)
		for r := 0; r < 4; r++ {
			for c := 0; c < 4; c++ {
				want := complex(0, 0)
				if r == c {
					want = 1
				}
				if cmplx.Abs(p[r*4+c]-want) > 1e-12 {
					t.Fatalf("element %d is not unitary: (g†g)[%d][%d] = %v", i, r, c, p[r*4+c])
				}
			}
		}
		key, ok := cliffPTMKey(g)
		if !ok {
			t.Fatalf("element %d does not map Paulis to signed Paulis", i)
		}
		if j, dup := seen[key]; dup {
			t.Fatalf("elements %d and %d are equal modulo phase", j, i)
		}
		seen[key] = i
	}
}

// TestCliffordGroupClosed checks closure under multiplication: the table
// contains the identity and is closed under left multiplication by H⊗I,
// I⊗H, S⊗I, I⊗S and CNOT (built here independently), which generate the
// group (Gottesman 1998); a finite set with both properties is closed under
// all products. Random pairs a·b are checked directly as well.
func TestCliffordGroupClosed(t *testing.T) {
	group := circuits.CliffordGroup()
	index := make(map[[16]int8]bool, len(group))
	for i := range group {
		k, _ := cliffPTMKey(&group[i])
		index[k] = true
	}
	s := complex(1/math.Sqrt2, 0)
	h := [4]complex128{s, s, s, -s}
	ph := [4]complex128{1, 0, 0, 1i}
	id := [4]complex128{1, 0, 0, 1}
	gens := [][16]complex128{cliffKron(&h, &id), cliffKron(&id, &h), cliffKron(&ph, &id), cliffKron(&id, &ph),
		{0: 1, 5: 1, 11: 1, 14: 1}} // CNOT: |b_a b_b⟩ → |b_a, b_a ⊕ b_b⟩
	idm := cliffKron(&id, &id)
	if k, _ := cliffPTMKey(&idm); !index[k] {
		t.Fatal("the identity is not in the table")
	}
	for i := range group {
		for j := range gens {
			p := cliffMul(&gens[j], &group[i])
			if k, ok := cliffPTMKey(&p); !ok || !index[k] {
				t.Fatalf("generator %d times element %d is not in the table", j, i)
			}
		}
	}
	rng := rand.New(rand.NewPCG(1, 2))
	for trial := 0; trial < 5000; trial++ {
		a, b := &group[rng.IntN(len(group))], &group[rng.IntN(len(group))]
		p := cliffMul(a, b)
		if k, ok := cliffPTMKey(&p); !ok || !index[k] {
			t.Fatalf("a product of two elements is not in the table")
		}
	}
}

// TestCliffordFramePotentials checks the frame potentials of the uniform
// two-qubit Clifford group. For a group, E_{U,V}|Tr(U†V)|^(2k) =
// (1/|G|) Σ_g |Tr g|^(2k), exactly and independent of phases. F^(k) ≥ k!
// with equality iff the ensemble is a unitary k-design for D ≥ k (Gross,
// Audenaert, Eisert, "Evenly distributed unitaries", J. Math. Phys. 48,
// 052104, 2007). The Clifford group is a 3-design (Webb 2016; Zhu, PRA 96,
// 062336, 2017) but not a 4-design (Zhu, Kueng, Grassl, Gross, "The Clifford
// group fails gracefully to be a unitary 4-design", 2016): F^(1..3) = 1, 2, 6
// and F^(4) > 24. F^(k) is an integer (the sum of squared multiplicities of
// the irreducible parts of U^⊗k ⊗ Ū^⊗k; common practice). Tolerance 1e-9: a
// mean of 11 520 terms ≤ 4^8 in float64, rounding ~1e-12.
func TestCliffordFramePotentials(t *testing.T) {
	group := circuits.CliffordGroup()
	var f [5]float64
	for i := range group {
		g := &group[i]
		a := cmplx.Abs(g[0] + g[5] + g[10] + g[15])
		a2 := a * a
		for k, p := 1, a2; k <= 4; k, p = k+1, p*a2 {
			f[k] += p
		}
	}
	for k := 1; k <= 4; k++ {
		f[k] /= float64(len(group))
	}
	for k, want := range map[int]float64{1: 1, 2: 2, 3: 6} {
		if math.Abs(f[k]-want) > 1e-9 {
			t.Errorf("F^(%d) = %.12g, want %g", k, f[k], want)
		}
	}
	if math.Abs(f[4]-math.Round(f[4])) > 1e-9 || f[4] < 25 {
		t.Errorf("F^(4) = %.12g, want an integer above 4! = 24", f[4])
	}
	t.Logf("F^(4) = %.12g", f[4])
}

// TestCliffordGate checks that Clifford draws table elements uniformly:
// counts of 4 classes (element index mod 4) in 40 000 draws stay within 4
// standard errors of 10 000 (binomial sd = √(N·p(1−p)) ≈ 86.6), and that
// SecondMoments reports HaarMoments (a 2-design).
func TestCliffordGate(t *testing.T) {
	group := circuits.CliffordGroup()
	where := make(map[[16]complex128]int, len(group))
	for i, g := range group {
		where[g] = i
	}
	rng := rand.New(rand.NewPCG(9, 9))
	var e circuits.Clifford
	var counts [4]int
	const n = 40000
	for i := 0; i < n; i++ {
		var m [16]complex128
		e.Gate(rng, &m)
		j, ok := where[m]
		if !ok {
			t.Fatal("Clifford.Gate returned a matrix outside CliffordGroup")
		}
		counts[j%4]++
	}
	sd := math.Sqrt(n * 0.25 * 0.75)
	for c, k := range counts {
		if math.Abs(float64(k)-n/4) > 4*sd {
			t.Errorf("class %d drawn %d times, want %d ± %.0f", c, k, n/4, 4*sd)
		}
	}
	if kind, _, ok := circuits.SecondMoments(e); kind != circuits.HaarMoments || !ok {
		t.Errorf("SecondMoments(clifford) = %v, %v, want haar", kind, ok)
	}
	if e.Name() != "clifford" {
		t.Errorf("Name() = %q", e.Name())
	}
}
